"""Two findings of the s23 testers (session note s23, 'Noticed, left alone'):

- explore's default items kept a column holding only 1 and 2 (a survey wave) among items answered 1 to 5: such a
  column of two values, where the items answer on a scale of three values or more, that correlates with no item is
  left out as codes of two groups (a wave, a sex coded 0 and 1), named in the note; a two-valued column that goes
  with the items (a yes/no question of the scale) stays.
- the nearly-constant rule (one answer in all rows but fewer than 5, or than 1%) missed items with 5 to 8 other
  answers of 400: a researcher calls an item nearly constant when some 98-99% of the sample gave one answer, so the
  line is now 98% (all but at most 2% of the rows answering; common practice, recalled from memory, not a published
  cutoff), with all but fewer than 5 rows kept for small samples.

Check values: the correlations the rule reads against pandas' pairwise Pearson correlations (DataFrame.corrwith); the
counts of other answers by pandas (value_counts).  Invented data: a fictional transit agency's rider survey, fixed
seed.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.descriptives import nearly_constant_items
from cfa_tool.workflows.explore import LeftOut, explore

ITEMS = [f"q{i}" for i in range(1, 7)]


def _survey(n: int = 400, seed: int = 9) -> pd.DataFrame:
    """Two factors of three items answered 1 to 5, a wave (1 and 2) and a sex code (0 and 1) unrelated to them, and a
    yes/no question (1 and 2) that goes with the first factor."""
    rng = np.random.default_rng(seed)
    eta = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    frame = pd.DataFrame({"wave": rng.integers(1, 3, n), "v2": rng.integers(0, 2, n)})
    for k, name in enumerate(ITEMS):
        frame[name] = np.clip(np.round(3 + 0.9 * eta[:, k // 3] + 0.7 * rng.standard_normal(n)), 1, 5)
    frame["yes_no"] = np.where(eta[:, 0] + 0.5 * rng.standard_normal(n) > 0, 2, 1)
    return frame


def test_a_column_of_two_values_unrelated_to_the_items_is_not_explored_as_one():
    frame = _survey()
    related = frame[ITEMS].corrwith(frame["yes_no"]).abs().max()  # pandas' Pearson correlations
    unrelated = max(frame[ITEMS].corrwith(frame[c]).abs().max() for c in ("wave", "v2"))
    assert related >= 0.30 > unrelated  # the rule's line (RELATED_TO_THE_ITEMS, a rule of thumb of this project)
    result = explore(frame)
    left = dict(result.left_out)
    assert left["wave"] is LeftOut.GROUPING_OR_RECORD and left["v2"] is LeftOut.GROUPING_OR_RECORD
    assert "yes_no" in result.items and "wave" not in result.items and "v2" not in result.items
    note = " ".join(str(n) for n in result.notes)
    assert ("Left out as codes of two groups rather than answers (two values alone, where most columns hold answers "
            "from 1 to 5, and no correlation of .30 or more with any item, as a wave or a sex would be): wave (1 and 2), "
            "v2 (0 and 1)") in " ".join(note.split())
    # named, a two-valued column is explored
    assert "wave" in explore(frame, items=[*ITEMS, "wave"]).items


def test_an_item_answered_alike_by_98_percent_of_the_rows_is_nearly_constant():
    rng = np.random.default_rng(5)
    frame = _survey().drop(columns=["wave", "v2", "yes_no"])
    for others, name in ((5, "q7"), (8, "q8"), (9, "q9")):  # of 400 rows: 98.75%, 98%, 97.75% answered 3
        column = np.full(len(frame), 3.0)
        column[rng.choice(len(frame), others, replace=False)] = rng.choice([1.0, 2.0, 4.0, 5.0], others)
        frame[name] = column
    counts = {c: int(len(frame) - frame[c].value_counts().max()) for c in ("q7", "q8", "q9")}  # pandas
    assert counts == {"q7": 5, "q8": 8, "q9": 9}
    found = {c.name: c.others for c in nearly_constant_items(frame.to_numpy(dtype=float), tuple(frame.columns))}
    assert found == {"q7": 5, "q8": 8}  # 9 of 400 (97.75%) is beyond the line
    model = "factor a: q1, q2, q3, q7\nfactor b: q4, q5, q6, q8, q9\n"
    [caution] = [p for p in cfa_tool.check(model, frame).problems if p.kind is ProblemKind.NEARLY_CONSTANT]
    text = " ".join(str(caution.explanation).split())
    assert text.startswith("Nearly constant items (one answer given by 98% or more of the rows answering, or by all "
                           "but fewer than 5: a line of common practice, not a published cutoff): 'q7' is 3 in all "
                           "but 5 of the 400 rows answering it; 'q8' is 3 in all but 8")
    assert "'q9'" not in text
    # small samples keep the floor: 4 other answers of 50 rows (8%) leave an item nearly constant
    small = np.full((50, 1), 2.0)
    small[:4, 0] = [1, 3, 1, 3]
    assert [c.others for c in nearly_constant_items(small, ("x",))] == [4]


def test_a_yes_no_subscale_and_a_ceiling_item_stay_items(rider_demo):
    """Hostile tester s24b: four 0/1 items that correlate with each other (a yes/no subscale), and an item of the 1-5
    scale answered only 4 or 5 (a ceiling), were left out as the codes of two groups."""
    rng = np.random.default_rng(3)
    frame = rider_demo.drop(columns=["rider_id", "district"]).copy()
    f = rng.normal(size=len(frame))
    for k in range(4):
        frame[f"b{k + 1}"] = (0.9 * f + rng.normal(size=len(frame)) * 0.6 > 0).astype(int)
    assert frame[["b1", "b2"]].corr().iloc[0, 1] > 0.3  # pandas: they go together
    frame["polite_driver"] = np.where(rng.normal(size=len(frame)) > 0.2, 5, 4)
    result = explore(frame, replications=20)
    text = " ".join(result.summary().split())
    assert "b1 (0 and 1)" not in text and "polite_driver (4 and 5)" not in text
    frame["wave"] = np.where(np.arange(len(frame)) % 2 == 0, 1, 2)  # a wave code still is one
    assert "wave (1 and 2)" in " ".join(explore(frame, replications=20).summary().split())
