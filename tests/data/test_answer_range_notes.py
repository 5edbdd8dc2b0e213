"""Answers that look impossible are named (column, value, rows): answers outside the scale a 'reversed'
statement declares are refused in every item it covers (its own and the other items of the factors it keys);
a partner answered mostly outside it, and values without a value label in an item whose other values are
labelled, are named without refusing the data (new-user trials U3, 7 U12).  Check values: the cells set by hand
below."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from tests.data.test_non_answer_codes import refusal

ITEMS = ["a1", "a2", "a3", "b1", "b2", "b3"]
MODEL = "factor a: a1..a3\nfactor b: b1..b3\n"


@pytest.fixture(scope="module")
def answers():
    rng = np.random.default_rng(33)
    eta = rng.normal(size=(300, 2)) @ np.linalg.cholesky([[1, 0.4], [0.4, 1]]).T
    latent = np.repeat(eta, 3, axis=1) * 0.7 + rng.normal(size=(300, 6)) * 0.7
    data = pd.DataFrame(np.clip(np.round(latent * 1.3 + 3), 1, 5), columns=ITEMS)
    data["a1"] = 6 - data["a1"]  # worded against a
    data.loc[9, "a2"], data.loc[19, "a2"], data.loc[40, "b3"] = 0, 0, 9  # rows 10, 20 and 41
    return data


def test_partners_of_reversed_items_outside_the_declared_scale_are_refused_as_the_named_items_are(answers):
    # one rule for every item the statement's scale covers (new-user trial 7, U12: a note on the partners let the
    # stray answers become categories); the remedy first is missing_codes (--missing-codes), a wider scale only second
    assert refusal(MODEL + "reversed a1 on 1 to 5\n", answers) == (
        "<data frame> holds answers outside the scale 1 to 5 declared here: 'a2' 0 (2 cells: rows labelled 9, 19); if "
        "they are typing errors or codes for no answer, give missing_codes=[0] (or correct them in a copy of the "
        "file); if the scale really runs wider, give its lowest and highest answers here")
    # b is not keyed by the statement: its 9 is not judged by that scale
    fitted = cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", answers, missing_codes=[0])
    assert not [w for w in fitted.warnings if "outside the scale" in w]


def test_a_partner_answered_mostly_outside_the_declared_scale_is_read_as_on_another_scale(answers):
    # a2 answered on a scale of even numbers to 10 (and the two 0s): more than OTHER_SCALE_SHARE of its answers
    # outside 1 to 5, so it is read as answered on another scale and named, not refused
    doubled = answers.assign(a2=answers["a2"] * 2)
    assert ((doubled["a2"] < 1) | (doubled["a2"] > 5)).mean() > 0.2
    result = cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", doubled)
    named = [str(w) for w in result.warnings if "outside the scale 1 to 5" in w]
    assert [w.split(" (")[0] for w in named] == [f"<data frame>: 'a2' has the answer {v}" for v in (0, 6, 8, 10)]
    assert all("read as answered on another scale" in w for w in named)
    assert named[0].endswith("if 0 is a typing error or means 'no answer', give missing_codes=[0]")  # the keyword: a Python call


def test_values_without_a_value_label_are_named(tmp_path, answers):
    import pyreadstat

    scale = {1: "never", 2: "rarely", 3: "sometimes", 4: "often", 5: "always"}
    path = tmp_path / "labelled.sav"
    pyreadstat.write_sav(answers, str(path), variable_value_labels={c: scale for c in ITEMS})
    result = cfa_tool.fit(MODEL, path)
    named = [str(w) for w in result.warnings if "has no value label" in w]
    assert named == [
        "labelled.sav: 'a2' has the value 0 (rows 10, 20), which has no value label, below its labelled answers 1 to "
        "5; if it is a typing error or means 'no answer', give missing_codes=[0] (or correct it in a copy of the file)",
        "labelled.sav: 'b3' has the value 9 (row 41), which has no value label, above its labelled answers 1 to 5; "
        "if it is a typing error or means 'no answer', give missing_codes=[9] (or correct it in a copy of the file)"]


@pytest.mark.parametrize("labels", [
    {1: "never", 5: "always"},  # the two ends only, as many questionnaires label them
    {1: "never", 3: "sometimes", 5: "always"},
    {9: "Refused"},  # the no-answer code only: no scale named
], ids=["ends", "ends and middle", "no-answer code only"])
def test_answers_between_labelled_answers_are_answers(tmp_path, answers, labels):
    """Hostile tester s25: labels on the ends only (or on 9 'Refused' only) had every middle answer called a
    possible typing error, one note per item and value (36 and 60 notes); a value between labelled answers is an
    answer, as a labelled code between answers is (data.non_answers.between_answers).  The stray 0s and the 9 set in
    the fixture are still named where labels name a scale around them."""
    import pyreadstat

    path = tmp_path / "ends.sav"
    pyreadstat.write_sav(answers, str(path), variable_value_labels={c: labels for c in ITEMS})
    named = [str(w) for w in cfa_tool.fit(MODEL, path).warnings if "has no value label" in w]
    if 9 in labels:
        assert named == []
    else:
        assert [w.split(" (")[0] for w in named] == ["ends.sav: 'a2' has the value 0", "ends.sav: 'b3' has the value 9"]


def test_labels_of_another_coding_are_said_once_and_no_answer_is_dropped(tmp_path, answers):
    """Hostile tester s25: labels 0 to 4 over answers 1 to 5 (the top answer 5 in about a tenth of the cells) had
    each item's 5 called a typing error, with advice to read it as no answer (deleting real answers).  Too many
    for typing errors (more than data.odd_values.FEW_SHARE of the answers): one note naming the items, the 5s
    analysed as answers, and no advice to drop them."""
    import pyreadstat

    shifted = {0: "never", 1: "rarely", 2: "sometimes", 3: "often", 4: "always"}
    data = answers.copy()
    data.loc[[9, 19], "a2"] = 1  # the fixture's 0s: the labels' own 0 aside
    assert (data[ITEMS] == 5).mean().min() > 0.02
    path = tmp_path / "shifted.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={c: shifted for c in ITEMS})
    result = cfa_tool.fit(MODEL, path)
    notes = [str(w) for w in result.warnings if "value labels of" in w or "no value label" in w]
    assert len([n for n in notes if "value labels of" in n]) == 1
    (note,) = [n for n in notes if "value labels of" in n]
    assert note.startswith("shifted.sav: the value labels of 'a1', 'a2', 'a3' and 3 more name the answers 0 to 4")
    assert "analysed as answers" in note and "missing_codes=[5]" not in " ".join(notes)
    assert result.data.n_obs == 300


def test_a_partner_measured_in_fractions_is_not_judged_by_the_declared_scale(answers):
    # a2 as a measure (values with decimals, some below 1): not answers on the 1 to 5 scale, so neither refused
    # nor named (the Holzinger & Swineford tests beside a reversed item are such measures)
    measured = answers.assign(a2=answers["a2"] * 0.9 + 0.05)
    assert 0 < (measured["a2"] < 1).mean() < 0.2  # few outside: judged by the scale if they were whole numbers
    result = cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", measured)
    assert not [w for w in result.warnings if "outside the scale" in w]


def test_declared_scale_and_value_labels_together_name_each_answer_once(tmp_path, answers):
    """Both rules on one file: a partner of the reversed item answered on another scale is named by the declared
    scale (not by its labels), the other factor's items by their labels; a model without either reads nothing
    (the notes cost a fit nothing then).  Check values: the cells set by hand in the fixture."""
    import pyreadstat

    scale = {1: "never", 2: "rarely", 3: "sometimes", 4: "often", 5: "always"}
    doubled = answers.assign(a2=answers["a2"] * 2)
    path = tmp_path / "labelled.sav"
    pyreadstat.write_sav(doubled, str(path), variable_value_labels={c: scale for c in ITEMS})
    result = cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", path)
    named = [str(w) for w in result.warnings if "outside the scale" in w or "has no value label" in w]
    assert [w.split(" (")[0] for w in named] == [
        *(f"labelled.sav: 'a2' has the answer {v}" for v in (0, 6, 8, 10)), "labelled.sav: 'b3' has the value 9"]
    plain = cfa_tool.fit(MODEL, answers)
    assert not [w for w in plain.warnings if "outside the scale" in w or "has no value label" in w]


def test_items_that_are_not_all_numbers_are_judged_one_by_one(answers):
    """A text column among the items (so the items are not taken out as one array): the declared scale still
    judges its partners, and the notes are those of the items' array.  Check values: the cells set by hand in the
    fixture."""
    from cfa_tool.data.matching import answer_range_notes
    from cfa_tool.language.parser import parse_model

    spec = parse_model(MODEL + "reversed a1 on 1 to 5\n", source="<model text>")
    doubled = answers.assign(a2=answers["a2"] * 2)
    mixed = doubled.astype({"a3": object})
    mixed.loc[0, "a3"] = "n/a"
    notes = answer_range_notes(spec, mixed, "<data frame>")
    assert [str(n).split(" (")[0] for n in notes] == [f"<data frame>: 'a2' has the answer {v}" for v in (0, 6, 8, 10)]
    assert notes == answer_range_notes(spec, doubled, "<data frame>", values=doubled[ITEMS].to_numpy(dtype=float))


def test_a_missing_code_on_a_declared_scale_is_refused(answers):
    """--missing-codes 5 with 'reversed a1 on 1 to 5' would read every top answer of a1..a3 as no answer
    (hostile tester, 9th round: 460 answers dropped with a note): refused, naming the code, scale and line; a code
    off the scale (0, 9) is a code of no answer and is read so."""
    with pytest.raises(OptionError, match=r"missing_codes=\[5\] is an answer of the scale 1 to 5 declared by "
                                                   "the 'reversed' statement on line 3"):
        cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", answers, missing_codes=[0, 5])
    assert cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", answers, missing_codes=[0, 9]).converged
