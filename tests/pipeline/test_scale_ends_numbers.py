"""The caution on a declared scale whose ends no answer reaches writes the numbers it computes by the one rule of a
computed number (numbers.rounded_number): answers of 1.2 to 4.7 on a declared 1 to 5 shift each reversed answer by
6 - 5.9 = 0.1 (arithmetic), which it wrote '0.09999999999999964' (s26)."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind


def test_the_shift_is_written_as_a_number_of_the_tool():
    rng = np.random.default_rng(8)
    f = rng.normal(size=200)
    frame = pd.DataFrame({f"c{j}": np.clip(np.round(3 + s * 0.8 * f + rng.normal(scale=0.6, size=200), 1), 1.2, 4.7)
                          for j, s in enumerate([1, 1, 1, -1], 1)})
    fit = cfa_tool.fit("factor f: c1, c2, c3, c4\nreversed c4 on 1 to 5\n", frame)
    (problem,) = [p for p in fit.problems if p.kind is ProblemKind.SCALE_ENDS_UNREACHED]
    said = str(problem.explanation)
    assert "they run from 1.2 to 4.7" in said and "counts as 6 - x" in said
    assert "each reversed answer counts 0.1 too high" in said, said
