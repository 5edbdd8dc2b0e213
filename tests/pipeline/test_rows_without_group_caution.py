"""Rows left out for having no value in the group column: past the share that makes listwise deletion's loss a
caution (5%, common practice), a caution first in every command, as listwise deletion's is; fewer stay a note.
Hostile tester s15 (13): 192 of 480 rows (40%) without a group were said in a note only.  Data: the bundled rider
survey (invented), 'district' blanked in two rows of every five (or in a few rows)."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()
CAUTION = "192 of 480 rows (40%) have no value in the group column 'district' and were left out"


def _blank(every_fifth: bool) -> pd.DataFrame:
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    blank = data.index % 5 < 2 if every_fifth else data.index < 6
    data.loc[blank, "district"] = None
    return data


def test_many_rows_without_a_group_are_a_caution_first():
    data = _blank(True)
    result = cfa_tool.fit(MODEL, data, group="district")
    first = result.problems[0]
    assert first.kind is ProblemKind.ROWS_LEFT_OUT and first.explanation.startswith(CAUTION)
    assert not any("no value in the group column" in w for w in result.warnings)  # said once, first
    ladder = cfa_tool.invariance(MODEL, data, "district")
    assert any(p.explanation.startswith(CAUTION) for p in ladder.data_problems)
    compared = cfa_tool.compare([MODEL, MODEL + "\ncovary on_time, clean\n"], data, group="district")
    assert any(p.explanation.startswith(CAUTION) for p in compared.problems)


def test_a_few_rows_without_a_group_stay_a_note():
    result = cfa_tool.fit(MODEL, _blank(False), group="district")
    assert not any(p.kind is ProblemKind.ROWS_LEFT_OUT for p in result.problems)
    assert "6 rows have no value in the group column 'district' and were left out" in result.warnings
