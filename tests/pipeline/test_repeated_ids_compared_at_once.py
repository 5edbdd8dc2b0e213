"""The rows of repeated ids compared with each other in one pass (pipeline.inputs._without_copies,
_same_answers_again): a long file of 600 people at two waves took seconds when each id's rows were compared apart.
Check values: pandas' own DataFrame.duplicated over the whole frame, the id among the columns (a row identical in
every column to an earlier row holds that row's id, so its earlier copy is one of the same id's rows), not the tool's
grouping.  Data: invented (a fictional transit agency's rider panel), simulated with a fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.moments import row_numbers
from cfa_tool.data.row_ids import ids_by_row_number, ids_of_several_rows
from cfa_tool.pipeline.inputs import _same_answers_again, _without_copies

ITEMS = ("q1", "q2", "q3", "q4", "q5", "q6")


def _panel(people: int = 600, seed: int = 6) -> pd.DataFrame:
    """Each rider at two waves (another time stamp each), a few rows copied whole, and a few riders who sent their
    first wave's answers again later."""
    rng = np.random.default_rng(seed)
    f = rng.normal(size=2 * people)
    frame = pd.DataFrame(np.clip(np.round(4 + f[:, None] * 1.2 + rng.normal(scale=1.0, size=(2 * people, 6))), 1, 7),
                         columns=list(ITEMS))
    frame.insert(0, "rider", [f"R{i % people:04d}" for i in range(2 * people)])
    frame["sent"] = [f"2026-0{3 + i // people}-01 {i % 24:02d}:{i % 60:02d}" for i in range(2 * people)]
    copies = frame.iloc[[3, 10, 3 * people // 4]]  # the same rows exported twice
    again = frame.iloc[[7, 20]].assign(sent="2026-06-30 12:00")  # the first wave's answers sent once more
    return pd.concat([frame, copies, again], ignore_index=True)


def test_copies_and_second_submissions_of_600_repeated_ids_are_those_pandas_finds():
    frame = _panel()
    found = ids_of_several_rows(ids_by_row_number(frame["rider"], frame))
    assert len(found) == 600
    numbers = row_numbers(frame)
    copies = set(numbers[frame.duplicated(keep="first").to_numpy()].tolist())
    kept = _without_copies(found, frame)
    assert {r for _, rows in found for r in rows} - {r for _, rows in kept for r in rows} == copies
    assert len(copies) == 3 and len(kept) == 600
    twice, rest = _same_answers_again(kept, frame, ITEMS)
    again = frame.drop(index=frame.index[frame.duplicated(keep="first").to_numpy()])
    later = numbers[again.index[again.duplicated(subset=["rider", *ITEMS], keep="first").to_numpy()]].tolist()
    assert sorted(r for _, _, rows in twice for r in rows) == sorted(later) and len(later) == 2
    assert {value for value, _, _ in twice} == {"R0007", "R0020"} and len(rest) == 600
    result = cfa_tool.check("factor f: q1..q6\n", frame, id_column="rider")
    kinds = [p.kind for p in result.problems]
    assert ProblemKind.SUBMITTED_TWICE in kinds and ProblemKind.REPEATED_IDS in kinds
    [repeated] = [p for p in result.problems if p.kind is ProblemKind.REPEATED_IDS]
    assert "gives 600 ids each to more than one row" in " ".join(str(repeated.explanation).split())


def test_a_cell_pandas_cannot_hash_compares_each_ids_rows_apart_as_before():
    frame = _panel(people=20).astype({"sent": object})
    frame.at[5, "sent"] = ["2026-03-01", "10:00"]  # a list in a cell (a frame built in Python)
    found = ids_of_several_rows(ids_by_row_number(frame["rider"], frame))
    kept = _without_copies(found, frame)
    # by hand, each id's rows apart: pandas' duplicated over them, as text where a cell cannot be hashed
    expected = []
    numbers = row_numbers(frame)
    for value, rows in found:
        block = frame.iloc[[int(np.flatnonzero(numbers == r)[0]) for r in rows]]
        try:
            repeat = block.duplicated(keep="first").to_numpy()
        except TypeError:
            repeat = block.astype(str).duplicated(keep="first").to_numpy()
        rest = tuple(r for r, copy in zip(rows, repeat) if not copy)
        if len(rest) > 1:
            expected.append((value, rest))
    assert kept == tuple(expected) and len(kept) == 20
    assert sum(len(rows) for _, rows in found) - sum(len(rows) for _, rows in kept) == 3  # rows 3, 10 and 15 copied
