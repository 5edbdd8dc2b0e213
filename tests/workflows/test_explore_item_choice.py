"""explore's default items leave out columns that look like groupings or records by their values (new-user trial
s15: a numeric grade column, 5 to 9, was explored as an item among 4-point answers), by the one rule of the columns
left out (workflows.explore._default_items), with a note naming them and how to include them; a column of such
values that goes with the answers (a 0-10 'recommend' question answered 3 to 10 among items of 1 to 5: re-check s15,
R4) stays an item.  Check values: the correlations the rule reads against pandas' pairwise-complete Pearson
correlations (DataFrame.corrwith) and scipy.stats.pearsonr.  Invented data: a fictional transit agency's rider survey,
fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.workflows.explore import explore, unlike_the_items

ITEMS = [f"r{i}" for i in range(1, 9)]


def _survey(n: int = 400) -> pd.DataFrame:
    rng = np.random.default_rng(15)
    eta = rng.standard_normal((n, 2))
    y = 0.7 * np.repeat(eta, 4, axis=1) + np.sqrt(0.51) * rng.standard_normal((n, 8))
    answers = np.searchsorted([-1.2, -0.3, 0.4, 1.2], y) + 1.0  # 1..5
    frame = pd.DataFrame(answers, columns=ITEMS)
    frame["grade"] = rng.integers(5, 10, n).astype(float)  # 5..9: off the items' 1..5
    frame["year"] = rng.integers(2021, 2025, n)
    frame["wave"] = rng.integers(1, 4, n)  # 1..3: on the items' scale, cannot be told apart by its values
    return frame


def test_a_grade_and_a_year_are_not_explored_as_items_and_the_note_says_how_to_include_them():
    result = explore(_survey(), factors=2, replications=10)
    items = result.to_dict()["items"]
    assert "grade" not in items and "year" not in items
    assert items == ITEMS + ["wave"]
    note = next(str(n) for n in result.notes if str(n).startswith("Items:"))
    assert ("Left out as groupings or records rather than answers (a few whole values, most of them above the 1 to "
            "5 that most columns hold, and no correlation of .30 or more with any item, as a grade or a year would "
            "be): grade (5 to 9), year (2021 to 2024) (name them in items=... to explore them).") in note
    named = explore(_survey(), items="r1..r8, grade", factors=2, replications=10)  # named: explored
    assert "grade" in named.to_dict()["items"]


def test_an_item_partly_on_the_scale_stays_and_no_shared_scale_leaves_nothing_out():
    frame = _survey(200)
    frame["r9"] = np.resize(np.arange(0, 11), 200).astype(float)  # 0..10: reaches the scale's low end
    frame["r10"] = np.resize(np.arange(2, 7), 200).astype(float)  # 2..6: mostly on the scale
    found = unlike_the_items(frame, ITEMS + ["r9", "r10", "grade"])
    assert found.scale == (1.0, 5.0) and found.groupings == (("grade", 5.0, 9.0),) and found.off_scale == ()
    # continuous columns (no whole values) share no scale: nothing is left out by their values
    none = unlike_the_items(frame.assign(r1=frame.r1 + 0.5, r2=frame.r2 + 0.25, r3=frame.r3 + 0.1,
                                         r4=frame.r4 + 0.3, r5=frame.r5 + 0.3),
                            ["r1", "r2", "r3", "r4", "r5", "grade", "r6"])
    assert none.columns == () and none.scale is None


def _with_recommend(frame: pd.DataFrame, seed: int = 2) -> pd.DataFrame:
    """A 0-10 'recommend' question that goes with the items, answered 3 to 10 (mostly above their 1 to 5), as a rider
    who finds the service good recommends it (re-check s15, R4)."""
    rng = np.random.default_rng(seed)
    base = frame[["r1", "r2", "r5"]].mean(axis=1)
    return frame.assign(recommend=np.clip(np.round(3 + 1.4 * base + rng.normal(0, 1, len(frame))), 3, 10))


def test_a_wider_scaled_answer_that_goes_with_the_items_stays_an_item():
    frame = _with_recommend(_survey())
    values = np.unique(frame["recommend"])
    assert values.min() > 1 and 2 * (values > 5).sum() > len(values)  # the values alone look like a grade's
    assert frame[ITEMS].corrwith(frame["recommend"]).abs().max() >= 0.30  # pandas: it goes with the items
    found = unlike_the_items(frame, ITEMS + ["recommend", "grade", "year", "wave"])
    assert found.scale == (1.0, 5.0) and found.columns == ("grade", "year")
    result = explore(frame, factors=2, replications=10)
    assert "recommend" in result.items and "grade" not in result.items and "year" not in result.items


def test_a_grade_weakly_related_to_the_answers_and_a_school_number_are_still_left_out():
    frame = _survey()
    rng = np.random.default_rng(7)
    # older pupils answer a little lower: a correlation of about -.15 with the first items, not an answer
    frame["grade"] = np.clip(np.round(7 - 0.15 * (frame["r1"] - 3) + rng.normal(0, 1.2, len(frame))), 5, 9)
    frame["school"] = rng.integers(101, 113, len(frame)).astype(float)  # twelve schools numbered 101 to 112
    strongest = frame[ITEMS].corrwith(frame["grade"]).abs().max()
    assert 0.1 < strongest < 0.30
    assert unlike_the_items(frame, ITEMS + ["grade", "school"]).columns == ("grade", "school")


def test_the_correlations_the_rule_reads_are_pairwise_pearson_correlations():
    from scipy.stats import pearsonr

    from cfa_tool.workflows.explore import _largest_correlations

    frame = _with_recommend(_survey(120))
    frame.loc[::5, "recommend"] = np.nan  # gaps: each correlation from the rows that answered both
    frame.loc[::7, "r3"] = np.nan
    ours = _largest_correlations(frame, ["recommend", "grade"], ITEMS)
    for k, column in enumerate(["recommend", "grade"]):
        theirs = []
        for item in ITEMS:
            both = frame[[column, item]].dropna()
            theirs.append(abs(pearsonr(both[column], both[item])[0]))
        assert ours[k] == pytest.approx(max(theirs), abs=1e-12)
        assert ours[k] == pytest.approx(frame[ITEMS].corrwith(frame[column]).abs().max(), abs=1e-12)
    # a constant column has no correlation: it is not counted as related
    assert np.isnan(_largest_correlations(frame.assign(c=7.0), ["c"], ITEMS)[0])
