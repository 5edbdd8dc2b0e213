"""An item coded on shifted codes in different groups of one file (0 to 4 in one group, 1 to 5 in another, as two
exports merged into one file may code it).  Hostile trial s25, finding 4: invariance reported it as intercept
non-invariance ("Scalar invariance did not hold", the intercept of 'clean' the likeliest source) without a word on the
codes, and the ordinal refusal advised merging categories (0 as 1, 5 as 4) instead of undoing the shift.  Data: the
bundled rider survey (invented), with 'clean' moved down by 1 in group north by construction, so the ranges and counts
asserted below are those of the construction, counted here with pandas."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.errors import DataError
from cfa_tool.resources import resource_dir
from cfa_tool.workflows.invariance import invariance

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def shifted_survey() -> pd.DataFrame:
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    north = data.district == "north"
    data.loc[north, "clean"] = data.loc[north, "clean"] - 1  # 1 to 5 becomes 0 to 4 in north only
    return data


def test_the_rule_takes_equal_ranges_moved_by_one_amount_and_nothing_else():
    from cfa_tool.data.shifted_scales import shifted_scales

    a = np.array([[0.0, 1.0], [4.0, 5.0], [2.0, 3.0]])  # item x: 0 to 4; item y: 1 to 5
    b = np.array([[1.0, 1.0], [5.0, 4.0], [np.nan, 2.0]])  # item x: 1 to 5 (shifted by 1); item y: 1 to 4 (an end unused)
    found = shifted_scales(("x", "y"), [("group a", a), ("group b", b)])
    assert [f.item for f in found] == ["x"]  # y merely stops short of 5 in group b: not a shift
    assert found[0].ranges_words() == "'x' runs 0 to 4 in group a and 1 to 5 in group b"
    # as many groups on each codes: the first group's codes are kept, the other's moved onto them
    assert found[0].undoing_words() == "subtract 1 from 'x' in group b"
    c = np.array([[1.0, 1.0], [5.0, 5.0]])  # a third group on 1 to 5: the codes most groups use
    found = shifted_scales(("x", "y"), [("group a", a), ("group b", b), ("group c", c)])
    assert found[0].undoing_words() == "add 1 to 'x' in group a"
    assert found[0].ranges_words() == "'x' runs 0 to 4 in group a and 1 to 5 in group b and group c"


def test_invariance_says_first_that_clean_lies_on_shifted_codes():
    data = shifted_survey()
    north, south = data[data.district == "north"].clean, data[data.district == "south"].clean
    assert (north.min(), north.max(), south.min(), south.max()) == (0, 4, 1, 5)  # the construction
    result = invariance(MODEL, data, "district")
    shifted = [p for p in result.data_problems if p.kind is ProblemKind.SHIFTED_CODES_IN_GROUPS]
    assert len(shifted) == 1
    words = str(shifted[0].explanation)
    assert "'clean' runs 0 to 4 in group north and 1 to 5 in group south" in words
    assert "subtract 1 from 'clean' in group south" in str(shifted[0].advice)
    assert result.warnings[0].startswith("An item has answers on shifted codes")  # first, before any step's verdict


def test_a_fit_with_groups_says_it_too_and_one_without_the_shift_does_not():
    fit = cfa_tool.fit(MODEL, shifted_survey(), group="district")
    assert [p.kind for p in fit.problems].count(ProblemKind.SHIFTED_CODES_IN_GROUPS) == 1
    plain = cfa_tool.fit(MODEL, pd.read_csv(resource_dir("demo") / "rider_survey.csv"), group="district")
    assert ProblemKind.SHIFTED_CODES_IN_GROUPS not in [p.kind for p in plain.problems]


def test_the_ordinal_refusal_undoes_the_shift_before_merging_categories():
    data = shifted_survey()
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, data, group="district", ordinal="all")
    message = str(refused.value)
    moved = int(data[data.district == "south"].clean.notna().sum())  # every answer of clean in south moves by 1
    undo = message.index(f"undo the shift in a copy of the data file (subtract 1 from 'clean' in group south of "
                         f"'district'), which merges no category ({moved} answers recoded)")
    merge = message.index("if the codes are alike in every group, join each empty category with its nearest category "
                          "answered, in every group, by a statement of the model file: 'join answers 0, 1 as 1 for "
                          "clean'; 'join answers 4, 5 as 4 for clean'")
    assert "'clean' runs 0 to 4 in group north of 'district' and 1 to 5 in group south of 'district'" in message
    assert undo < merge  # the shift first
    # the advice undone as it says, the ordinal fit runs
    data.loc[data.district == "south", "clean"] -= 1
    assert cfa_tool.fit(MODEL, data, group="district", ordinal="all").converged
