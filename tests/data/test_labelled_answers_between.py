"""A labelled code that lies between an item's answers is an answer, whatever the words of its label and their order;
a missing code given for a code the file labels as such an answer is said first (hostile trial s15, findings 1 and 2).

The data are the bundled demo (a fictional transit agency's rider survey, answers 1 to 5), written as SPSS files by
pyreadstat, an independent writer of the format.  Check values: the cells and rows holding a code, counted here by
pandas from the CSV file the SPSS files are written from; a fit of the file whose midpoint label reads like no answer
is compared with the fit of the same answers without value labels (the CSV file), which no label can change."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.non_answers import labelled_non_answers
from cfa_tool.resources import resource_dir

SCALE = {1.0: "Strongly disagree", 2.0: "Disagree", 4.0: "Agree", 5.0: "Strongly agree"}
MIDPOINTS = ["Not sure / neutral", "Neutral / not sure", "No opinion / neutral", "Can't say / neither", "Don't know"]


@pytest.fixture(scope="module")
def rider():
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    items = [c for c in data.columns if c not in ("rider_id", "district")]
    return data, items, (resource_dir("models") / "rider_three_factors.cfa").read_text()


def _sav(tmp_path, data, items, middle: str, name: str = "riders.sav"):
    import pyreadstat

    path = tmp_path / name
    pyreadstat.write_sav(data, str(path), variable_value_labels={c: {**SCALE, 3.0: middle} for c in items})
    return path


@pytest.mark.parametrize("middle", MIDPOINTS)
def test_a_code_between_labelled_answers_is_an_answer_in_either_order_of_words(middle):
    frame = pd.DataFrame({"q": [1.0, 2.0, 3.0, 3.0, 4.0, 5.0, 8.0, 9.0, -1.0]})
    labels = {**SCALE, 3.0: middle, 8.0: "Refused", 9.0: "Don't know / not sure", -1.0: "Not applicable"}
    out, found = labelled_non_answers(frame, {"q": labels})
    # 3 stays (two cells); 8, 9 and -1, outside the answers 1 to 5, are read as no answer
    assert out["q"].tolist()[:6] == [1.0, 2.0, 3.0, 3.0, 4.0, 5.0] and out["q"].iloc[6:].isna().all()
    assert sorted(f.value for f in found) == [-1.0, 8.0, 9.0]


def test_the_answers_around_a_code_may_be_labelled_or_answered():
    from cfa_tool.data.non_answers import between_answers

    # no label but the midpoint's: the answers 1, 2, 4 and 5 in the cells make 3 a code between answers
    assert between_answers(3.0, {3.0: "Don't know", 9.0: "Refused"}, present=[1.0, 2.0, 3.0, 4.0, 5.0, 9.0])
    # beyond the answers: no answer, labelled or answered
    assert not between_answers(9.0, {3.0: "Don't know", 9.0: "Refused"}, present=[1.0, 2.0, 3.0, 4.0, 5.0, 9.0])
    assert not between_answers(0.0, {0.0: "Don't know", 1.0: "Never", 4.0: "Always"}, present=[0.0, 1.0, 2.0])
    # a stray 99 among the cells (a code of no answer itself) does not make 9 a code between answers
    assert not between_answers(9.0, {9.0: "Don't know"}, present=[1.0, 2.0, 3.0, 9.0, 99.0])
    # a code given as missing is no answer on either side
    assert not between_answers(3.0, {1.0: "No", 3.0: "Not sure", 5.0: "Yes"}, present=[1.0, 3.0, 5.0], skip=(5.0,))


def test_a_midpoint_whose_label_reads_like_no_answer_is_analysed_with_a_note(tmp_path, rider):
    data, items, model = rider
    plain = cfa_tool.fit(model, resource_dir("demo") / "rider_survey.csv")  # no labels: the answers as they are
    threes = int((data[items] == 3).sum().sum())
    assert threes == 2250  # counted by pandas from the CSV file
    for middle in ("Not sure / neutral", "Neutral / not sure"):
        result = cfa_tool.fit(model, _sav(tmp_path, data, items, middle))
        assert result.fit.chi_square == pytest.approx(plain.fit.chi_square, rel=1e-9)
        assert result.n_obs == plain.n_obs
        [note] = [str(n) for n in result.warnings if "lies between other answers" in n]
        assert note.startswith(f"riders.sav: 3 '{middle}' lies between other answers of the items and is read "
                               f"as an answer ({threes:,} cells: on_time {int((data.on_time == 3).sum())}, ")
        assert note.endswith("though its label reads like no answer; to read it as no answer, give missing_codes=[3]")
        assert not any(p.kind in (ProblemKind.VALUES_READ_AS_MISSING, ProblemKind.ANSWERS_GIVEN_AS_MISSING)
                       for p in result.problems)
    # the advice followed: the midpoint read as no answer, said as a code given, with no caution (its label reads
    # like no answer) and no note advising it again
    given = cfa_tool.fit(model, _sav(tmp_path, data, items, "Not sure / neutral"), missing_codes=[3])
    assert not any(p.kind is ProblemKind.ANSWERS_GIVEN_AS_MISSING for p in given.problems)
    assert not any("lies between other answers" in n for n in given.warnings)
    assert any(f"{threes:,} cells holding a code given with missing_codes=... (3)" in n for n in given.warnings)


def test_a_missing_code_on_a_labelled_answer_is_a_caution_first(tmp_path, rider):
    data, items, model = rider
    path = _sav(tmp_path, data, items, "Neutral")
    result = cfa_tool.fit(model, path, missing_codes=[3])
    first = result.problems[0]
    assert first.kind is ProblemKind.ANSWERS_GIVEN_AS_MISSING
    threes = data[items] == 3
    cells, rows = int(threes.sum().sum()), int(threes.any(axis=1).sum())
    assert (cells, rows) == (2250, 475)  # counted by pandas from the CSV file
    assert str(first.explanation).startswith(
        "missing_codes=[3] read as no answer the code 3, which riders.sav labels 'Neutral', an answer between the "
        f"other answers (1 to 5) of 12 items holding it: {cells:,} cells (on_time {int(threes.on_time.sum())}, ")
    assert f") in {rows} rows became gaps" in first.explanation
    assert str(first.advice).startswith("If 'Neutral' is an answer, leave 3 out of missing_codes")
    # after a row filter, the cells and rows of the rows kept
    north = data.district == "north"
    kept = cfa_tool.fit(model, path, missing_codes=[3], keep=["district = north"])
    [caution] = [p for p in kept.problems if p.kind is ProblemKind.ANSWERS_GIVEN_AS_MISSING]
    assert (f"{int(threes[north].sum().sum()):,} cells (on_time {int(threes.on_time[north].sum())}, " in caution.explanation
            and f") in {int(threes[north].any(axis=1).sum())} rows became gaps" in caution.explanation)


def test_a_missing_code_outside_the_answers_or_labelled_as_none_is_no_caution(tmp_path, rider):
    data, items, model = rider
    coded = data.copy()
    coded.loc[[0, 5], "on_time"] = 9
    path = _sav(tmp_path, coded, items, "Neutral")
    import pyreadstat

    pyreadstat.write_sav(coded, str(path), variable_value_labels={
        c: {**SCALE, 3.0: "Neutral", 9.0: "Don't know"} for c in items})
    result = cfa_tool.fit(model, path, missing_codes=[9])
    assert not any(p.kind is ProblemKind.ANSWERS_GIVEN_AS_MISSING for p in result.problems)
    assert np.isfinite(result.fit.chi_square)


def test_a_missing_value_the_file_declares_on_a_labelled_answer_is_a_caution_first(tmp_path, rider):
    """Hostile tester s25: an SPSS file whose MISSING VALUES declare 3 'Neither agree nor disagree' (the midpoint of
    every item) lost 2,250 answers (475 of 480 rows with gaps) with a note only, where the same code given with
    missing_codes=[3] is a caution first: the file's declaration takes the same rule (the cells counted by pandas);
    a declared code outside the answers (9 'Refused') stays a note."""
    import pyreadstat

    data, items, model = rider
    path = tmp_path / "declared.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={c: {**SCALE, 3.0: "Neither agree nor disagree"}
                                                                 for c in items},
                         missing_ranges={c: [3] for c in items})
    result = cfa_tool.fit(model, path)
    first = result.problems[0]
    assert first.kind is ProblemKind.ANSWERS_DECLARED_MISSING
    threes = data[items] == 3
    cells, rows = int(threes.sum().sum()), int(threes.any(axis=1).sum())
    assert (cells, rows) == (2250, 475)
    assert str(first.explanation).startswith(
        "declared.sav declares the code 3 a missing value, which it labels 'Neither agree nor disagree', an answer "
        f"between the other answers (1 to 5) of 12 items holding it: {cells:,} cells (on_time {int(threes.on_time.sum())}, ")
    assert f") in {rows} rows became gaps" in first.explanation
    assert str(first.advice).startswith("If 'Neither agree nor disagree' is an answer, remove its declaration")
    refused = tmp_path / "refused.sav"
    coded = data.copy()
    coded.loc[[0, 5], "on_time"] = 9
    pyreadstat.write_sav(coded, str(refused), variable_value_labels={c: {**SCALE, 3.0: "Neutral", 9.0: "Refused"}
                                                                     for c in items},
                         missing_ranges={c: [9] for c in items})
    assert not any(p.kind is ProblemKind.ANSWERS_DECLARED_MISSING for p in cfa_tool.fit(model, refused).problems)
