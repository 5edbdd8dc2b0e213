"""Answers that look impossible are named (column, value, data rows) before anything else, without refusing the
data: answers outside the scale a 'reversed' statement declares, in the other items of the factors it keys, and
values without a value label in an item whose other values are labelled (new-user trial U3).  Check values: the
cells set by hand below."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool

ITEMS = ["a1", "a2", "a3", "b1", "b2", "b3"]
MODEL = "factor a: a1..a3\nfactor b: b1..b3\n"


@pytest.fixture(scope="module")
def answers():
    rng = np.random.default_rng(33)
    eta = rng.normal(size=(300, 2)) @ np.linalg.cholesky([[1, 0.4], [0.4, 1]]).T
    latent = np.repeat(eta, 3, axis=1) * 0.7 + rng.normal(size=(300, 6)) * 0.7
    data = pd.DataFrame(np.clip(np.round(latent * 1.3 + 3), 1, 5), columns=ITEMS)
    data["a1"] = 6 - data["a1"]  # worded against a
    data.loc[9, "a2"], data.loc[19, "a2"], data.loc[40, "b3"] = 0, 0, 9  # data rows 10, 20 and 41
    return data


def test_partners_of_reversed_items_outside_the_declared_scale_are_named(answers):
    result = cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", answers)
    named = [w for w in result.warnings if "outside the scale 1 to 5" in w]
    assert named == ["<data frame>: 'a2' has the answer 0 (data rows 10, 20), outside the scale 1 to 5 that the "
                     "'reversed' statement declares for the items of a; check the answer, or give --missing-codes if "
                     "it means 'no answer'"]  # b is not keyed by the statement: its 9 is not judged by that scale


def test_values_without_a_value_label_are_named(tmp_path, answers):
    import pyreadstat

    scale = {1: "never", 2: "rarely", 3: "sometimes", 4: "often", 5: "always"}
    path = tmp_path / "labelled.sav"
    pyreadstat.write_sav(answers, str(path), variable_value_labels={c: scale for c in ITEMS})
    result = cfa_tool.fit(MODEL, path)
    named = [w for w in result.warnings if "has no value label" in w]
    assert named == [
        "labelled.sav: 'a2' has the value 0 (data rows 10, 20), which has no value label, while its other values are "
        "labelled; check the answer, or give --missing-codes if it means 'no answer'",
        "labelled.sav: 'b3' has the value 9 (data row 41), which has no value label, while its other values are "
        "labelled; check the answer, or give --missing-codes if it means 'no answer'"]


def test_declared_scale_and_value_labels_together_name_each_answer_once(tmp_path, answers):
    """Both rules on one file: the partners of the reversed item are judged by the declared scale (not by their
    labels), the other factor's items by their labels; out-of-range answers of a model without either are not read.
    Check values: the cells set by hand in the fixture."""
    import pyreadstat

    scale = {1: "never", 2: "rarely", 3: "sometimes", 4: "often", 5: "always"}
    path = tmp_path / "labelled.sav"
    pyreadstat.write_sav(answers, str(path), variable_value_labels={c: scale for c in ITEMS})
    result = cfa_tool.fit(MODEL + "reversed a1 on 1 to 5\n", path)
    named = [w for w in result.warnings if "outside the scale" in w or "has no value label" in w]
    assert named == [
        "labelled.sav: 'a2' has the answer 0 (data rows 10, 20), outside the scale 1 to 5 that the 'reversed' "
        "statement declares for the items of a; check the answer, or give --missing-codes if it means 'no answer'",
        "labelled.sav: 'b3' has the value 9 (data row 41), which has no value label, while its other values are "
        "labelled; check the answer, or give --missing-codes if it means 'no answer'"]
    assert result.warnings.index(named[0]) < result.warnings.index(named[1])
    plain = cfa_tool.fit(MODEL, answers)
    assert not [w for w in plain.warnings if "outside the scale" in w or "has no value label" in w]


def test_items_that_are_not_all_numbers_are_judged_one_by_one(answers):
    """A text column among the items (so the items are not taken out as one array): the declared scale still
    judges its partners.  Check values: the cells set by hand in the fixture."""
    from cfa_tool.data.matching import answer_range_notes
    from cfa_tool.language.parser import parse_model

    spec = parse_model(MODEL + "reversed a1 on 1 to 5\n", source="<model text>")
    mixed = answers.astype({"a3": object})
    mixed.loc[0, "a3"] = "n/a"
    notes = answer_range_notes(spec, mixed, "<data frame>")
    assert [n.split(" (")[0] for n in notes] == ["<data frame>: 'a2' has the answer 0"]
    assert notes == answer_range_notes(spec, answers, "<data frame>", values=answers[ITEMS].to_numpy(dtype=float))
