"""explore without --missing-codes on items of 1 to 5 whose codes of no answer, 8 and 9, fill 5% of the cells (more
than the 2% the screening of odd values allows outside a scale, data.odd_values.FEW_SHARE): the scale most columns
share is still 1 to 5, so a grade column beside them (7 to 10, 6 to 9) is left out as a grouping, not explored as an
item (s20: the scale read 1 to 9 and took the grade in), and a caution names the codes first with the option that
reads them as no answer (the one rule of every command, data.odd_values: tests/commands/test_codes_set_apart_every_command.py).  Check values: the cells the simulation planted, counted with pandas; a fixed seed; no
caution on the bundled rider survey and Holzinger & Swineford (1939), whose answers hold no codes."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.workflows.explore import LeftOut, explore
from tests.commands.test_codes_set_apart_every_command import ITEMS, pupils


def _survey(grade_from: int, seed: int = 20) -> pd.DataFrame:
    """400 simulated pupils (tests.commands.test_codes_set_apart_every_command.pupils: 12 items of 1 to 5 on two
    factors, 8 'don't know' and 9 'refused' each in about 2.5% of every item's cells) and a school grade of four years
    starting at ``grade_from``."""
    frame = pupils(seed)[ITEMS].copy()
    frame["grade"] = np.random.default_rng(seed + 1).integers(grade_from, grade_from + 4, len(frame))
    return frame


@pytest.mark.parametrize("grade_from", [6, 7, 9])
def test_a_grade_beside_items_with_codes_is_left_out_and_the_codes_named_first(grade_from):
    frame = _survey(grade_from)
    items = [f"q{j}" for j in range(1, 13)]
    result = explore(frame, replications=5)
    assert list(result.items) == items
    assert ("grade", LeftOut.GROUPING_OR_RECORD) in result.left_out
    note = next(str(n) for n in result.notes if str(n).startswith("Items:"))
    assert "most of them above the 1 to 5 that most columns hold" in note
    [caution] = [p for p in result.data_problems if p.kind is ProblemKind.CODES_SET_APART]
    planted = int(frame[items].isin([8, 9]).sum().sum())  # pandas' count of the planted codes
    assert str(caution.explanation).startswith(f"12 item columns of <data frame> (q1, q2, q3 and 9 more) share the codes "
                                               f"8 and 9, set apart from their other answers (1 to 5): {planted} of "
                                               f"their 4,800 answers")
    assert "missing_codes=[8, 9]" in str(caution.advice)
    given = explore(frame, replications=5, missing_codes=[8, 9])  # read as no answer: nothing to say, grade still out
    assert not [p for p in given.data_problems if p.kind is ProblemKind.CODES_SET_APART]
    assert list(given.items) == items


def test_no_caution_where_no_codes_lie_beyond_the_answers(hs_data):
    from cfa_tool.resources import resource_dir

    for frame in (pd.read_csv(resource_dir("demo") / "rider_survey.csv"), hs_data):
        result = explore(frame, replications=5)
        assert not [p for p in result.data_problems if p.kind is ProblemKind.CODES_SET_APART]
