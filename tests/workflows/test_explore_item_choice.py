"""explore's default items leave out columns that look like groupings or records by their values (new-user trial
s15: a numeric grade column, 5 to 9, was explored as an item among 4-point answers), by the one rule of the columns
left out (workflows.explore._default_items), with a note naming them and how to include them.  Invented data: a
fictional transit agency's rider survey, fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd

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
            "5 that most columns hold, as a grade or a year would be): grade (5 to 9), year (2021 to 2024) (name "
            "them in items=... to explore them).") in note
    named = explore(_survey(), items="r1..r8, grade", factors=2, replications=10)  # named: explored
    assert "grade" in named.to_dict()["items"]


def test_an_item_partly_on_the_scale_stays_and_no_shared_scale_leaves_nothing_out():
    frame = _survey(200)
    frame["r9"] = np.resize(np.arange(0, 11), 200).astype(float)  # 0..10: reaches the scale's low end
    frame["r10"] = np.resize(np.arange(2, 7), 200).astype(float)  # 2..6: mostly on the scale
    found, scale = unlike_the_items(frame, ITEMS + ["r9", "r10", "grade"])
    assert scale == (1.0, 5.0) and found == [("grade", 5.0, 9.0)]
    # continuous columns (no whole values) share no scale: nothing is left out by their values
    assert unlike_the_items(frame.assign(r1=frame.r1 + 0.5, r2=frame.r2 + 0.25, r3=frame.r3 + 0.1,
                                         r4=frame.r4 + 0.3, r5=frame.r5 + 0.3),
                            ["r1", "r2", "r3", "r4", "r5", "grade", "r6"]) == ([], None)
