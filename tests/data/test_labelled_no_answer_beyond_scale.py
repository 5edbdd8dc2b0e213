"""Codes an SPSS file labels as no answer beyond the answer scale, outside its declared missing values, are never
analysed as answers: labels whose words hold a phrase of no answer among others ('REFUSED (VOL)', 'Not applicable -
question skipped') on codes far beyond the scale (97 and 99 beside 1 to 5) are read as no answer and named in the
reading's note, and no longer make a code between them (98 "Don't know") an answer; and a fit keeps every code its
items' labels mark as no answer, held by its rows or not, so that scoring other data with the fit (an export of the
same survey without the labels) reads it as no answer in every item (rows-s25, task 2).

The data are the bundled demo (a fictional transit agency's rider survey, answers 1 to 5; its complete rows), with
codes of no answer put into some cells with a fixed seed, written as SPSS files by pyreadstat, an independent writer of
the format.  Check values: the cells holding each code, counted here by pandas; the fit of the SPSS file is compared
with the fit of the same answers with those cells left empty (a CSV file, which no label can change); a row of the
scored file whose only code of no answer is in an item the fit's rows never gave it is scored from the other items, as
the same row with that cell empty is."""

from __future__ import annotations

import io
import json
from contextlib import redirect_stderr, redirect_stdout

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main
from cfa_tool.data.non_answers import labelled_non_answers
from cfa_tool.resources import resource_dir

SCALE = {1.0: "Strongly disagree", 2.0: "Disagree", 3.0: "Neither", 4.0: "Agree", 5.0: "Strongly agree"}
NONE = {97.0: "REFUSED (VOL)", 98.0: "Don't know / can't say (do not read)", 99.0: "Not applicable - question skipped"}


def _run(argv) -> tuple[int, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = main([str(a) for a in argv])
    return code, " ".join((out.getvalue() + err.getvalue()).split())


@pytest.fixture(scope="module")
def rider():
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").dropna().reset_index(drop=True)
    items = [c for c in data.columns if c not in ("rider_id", "district")]
    return data.astype({c: float for c in items}), items


def _coded(data, items, codes, per_code=4, seed=3):
    """``data`` with each code of ``codes`` in ``per_code`` cells of every item (rows drawn with a fixed seed)."""
    rng = np.random.default_rng(seed)
    out = data.copy()
    for c in items:
        rows = rng.choice(len(out), per_code * len(codes), replace=False)
        for k, code in enumerate(codes):
            out.loc[rows[k * per_code:(k + 1) * per_code], c] = code
    return out


def test_labels_with_words_of_no_answer_beyond_the_scale_are_no_answers(tmp_path, rider):
    import pyreadstat

    data, items = rider
    coded = _coded(data, items, sorted(NONE))
    sav = tmp_path / "survey.sav"  # 97 declared missing; 98 and 99 labelled only, beyond the declaration
    pyreadstat.write_sav(coded, str(sav), variable_value_labels={c: {**SCALE, **NONE} for c in items},
                         missing_ranges={c: [97.0] for c in items})
    blank = tmp_path / "blank.csv"
    coded.assign(**{c: coded[c].where(coded[c] <= 5) for c in items}).to_csv(blank, index=False)
    model = tmp_path / "three.cfa"
    model.write_text((resource_dir("models") / "rider_three_factors.cfa").read_text())
    code, said = _run(["fit", model, "--data", sav, "--json", tmp_path / "sav.json"])
    assert code == 0, said
    assert _run(["fit", model, "--data", blank, "--json", tmp_path / "blank.json"])[0] == 0
    fitted, plain = (json.loads((tmp_path / f"{n}.json").read_text()) for n in ("sav", "blank"))
    assert fitted["fit"]["chi_square"] == pytest.approx(plain["fit"]["chi_square"], rel=1e-6)
    cells = {code: int((coded[items] == code).to_numpy().sum()) for code in NONE}  # 4 per item: 48 each
    for code, label in NONE.items():  # each named with its label and its cells
        assert f"{code:g} '{label}' ({cells[code]} cells" in said
    assert "share the codes" not in said and "read as an answer" not in said


def test_a_phrase_one_step_from_the_scale_or_at_its_end_stays_an_answer():
    from cfa_tool.data.non_answers import loosely_none

    # 6 "Don't know (VOL)" beside 1 to 5: one step away, an answer (a caution names codes beyond a scale)
    assert not loosely_none(6.0, {**SCALE, 6.0: "Don't know (VOL)"})
    assert loosely_none(8.0, {**SCALE, 8.0: "Don't know (VOL)"})
    assert loosely_none(-1.0, {**SCALE, -1.0: "Not applicable (routed past)"})
    # a scale whose end labels hold a phrase ('skip') is a scale of answers
    ends = {1.0: "Never skip", 2.0: "Rarely", 3.0: "Sometimes", 4.0: "Often", 5.0: "Always skip"}
    frame = pd.DataFrame({"q": [1.0, 2.0, 3.0, 4.0, 5.0, 5.0]})
    out, found = labelled_non_answers(frame, {"q": ends})
    assert found == () and out["q"].tolist() == frame["q"].tolist()
    # words of an answer ('Not at all') are no phrase of no answer, wherever the code lies
    assert not loosely_none(9.0, {**SCALE, 9.0: "Not at all"})


def test_scoring_other_data_reads_every_code_the_fits_labels_mark(tmp_path, rider):
    import pyreadstat

    data, items = rider
    fitted, other = data.iloc[:300].copy(), data.iloc[300:].copy().reset_index(drop=True)
    fitted.loc[fitted.index[:6], items[0]] = 8.0  # 8 'Refused' given in the first item only
    sav = tmp_path / "fit.sav"
    pyreadstat.write_sav(fitted, str(sav), variable_value_labels={c: {**SCALE, 8.0: "Refused"} for c in items})
    model = tmp_path / "three.cfa"
    model.write_text((resource_dir("models") / "rider_three_factors.cfa").read_text())
    assert _run(["fit", model, "--data", sav, "--json", tmp_path / "fit.json"])[0] == 0
    coded = other.copy()
    coded.loc[[0, 1, 2], items[5]] = 8.0  # an export without labels: 8 in an item the fit's rows never gave it
    blank = other.copy()
    blank.loc[[0, 1, 2], items[5]] = np.nan
    for name, frame in (("coded", coded), ("blank", blank)):
        frame.to_csv(tmp_path / f"{name}.csv", index=False)
        code, said = _run(["scores", model, "--from-fit", tmp_path / "fit.json", "--data", tmp_path / f"{name}.csv",
                           "--output", tmp_path / f"{name}_scores.csv"])
        assert code == 0, said
        if name == "coded":
            assert "3 cells of the items (in 3 rows) holding a value that the earlier fit's data file marked" in said
            assert "outside the answer scale" not in said and "outside the range" not in said
    scored, expected = (pd.read_csv(tmp_path / f"{n}_scores.csv") for n in ("coded", "blank"))
    pd.testing.assert_frame_equal(scored, expected)
    assert (scored.loc[:2, "comfort_items_answered"] == 3).all()  # clean (the sixth item) left unanswered
    saved = json.loads((tmp_path / "fit.json").read_text())["data"]
    assert {d["column"] for d in saved["codes_labelled_no_answer_by_the_file"]} == set(items)


def test_a_code_beyond_the_scale_is_named_against_the_answers_alone():
    """The caution on a labelled code beyond the answers (6 'Something else' beside 1 to 5, analysed as an answer)
    names the scale of the answers, not one that a code read as no answer (97 'REFUSED (VOL)') stretches to 97."""
    from cfa_tool.data.non_answers import beyond_scale

    labels = {**SCALE, 6.0: "Something else", 97.0: "REFUSED (VOL)"}
    frame = pd.DataFrame({"q": [1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 6.0, 97.0]})
    out, found = labelled_non_answers(frame, {"q": labels})
    assert [(f.value, f.rows) for f in found] == [(97.0, (7,))] and out["q"].isna().sum() == 1
    named = beyond_scale(out, ["q"], {"q": labels}, np.arange(2, 10))
    assert [(b.value, b.scale, b.rows) for b in named] == [(6.0, (1.0, 5.0), ((7, 8),))]
