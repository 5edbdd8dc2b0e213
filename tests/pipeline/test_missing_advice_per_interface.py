"""The notes and cautions on rows with gaps name the option that changes their handling as the caller writes it:
a Python caller reads missing='listwise', the command line --incomplete-rows listwise (options.Option.given).
No computed value is asserted here: the words of the advice only."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.options import on_command_line

MODEL = "factor rider_comfort: q1, q2, q3, q4\n"


def _with_gaps(seed: int = 5, n: int = 200, share: float = 0.15) -> pd.DataFrame:
    """One factor, four items, answers removed completely at random (invented data, seeded)."""
    rng = np.random.default_rng(seed)
    factor = rng.normal(size=n)
    values = 0.7 * factor[:, None] + 0.6 * rng.normal(size=(n, 4))
    values[rng.random(values.shape) < share] = np.nan
    return pd.DataFrame(values, columns=["q1", "q2", "q3", "q4"])


def _lines(result) -> list[str]:
    return [str(w) for w in result.warnings] + [str(p.advice) for p in result.problems] + \
        [str(p.explanation) for p in result.problems]


def test_full_information_note_names_the_python_keyword_to_a_python_caller():
    lines = _lines(cfa_tool.fit(MODEL, _with_gaps()))
    said = [line for line in lines if "every answer is used by full-information ML" in line]
    assert said and "missing='listwise'" in said[0] and "--incomplete-rows" not in said[0]


def test_full_information_note_names_the_flag_on_the_command_line():
    with on_command_line():
        lines = _lines(cfa_tool.fit(MODEL, _with_gaps()))
    said = [line for line in lines if "every answer is used by full-information ML" in line]
    assert said and "--incomplete-rows listwise" in said[0]


def test_listwise_caution_names_the_python_keyword_to_a_python_caller():
    result = cfa_tool.fit(MODEL, _with_gaps(), missing="listwise")
    advice = [str(p.advice) for p in result.problems if "would use every answer" in str(p.advice)]
    assert advice and "missing='full-information'" in advice[0] and "--incomplete-rows" not in advice[0]
    with on_command_line():
        result = cfa_tool.fit(MODEL, _with_gaps(), missing="listwise")
    advice = [str(p.advice) for p in result.problems if "would use every answer" in str(p.advice)]
    assert advice and "--incomplete-rows full-information" in advice[0]
