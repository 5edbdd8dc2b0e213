"""The methods paragraph prints values by the tables' number rule (reporting.numbers.est_num / est_unit): a value
that is not zero is never printed as a rounded zero ('.00'), but below the last decimal's unit to two significant
digits, as the estimates table prints the same value (s23's closing note: 'the methods paragraph still rounds values to
.00').  A level the user gave is printed as given (reporting.numbers.short).  Data: simulated with a fixed seed (four
items of loading .7 and a fifth of pure noise, whose standardized loading came out -.0044 with this seed); Holzinger &
Swineford (1939), tests/datasets."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.reporting.numbers import est_unit
from cfa_tool.reporting.paragraph import invariance_paragraph, methods_paragraph
from cfa_tool.reporting.tables import estimate_tables
from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS


def _noise_item() -> pd.DataFrame:
    rng = np.random.default_rng(24)
    f = rng.normal(size=300)
    data = pd.DataFrame({f"x{i}": 0.7 * f + np.sqrt(0.51) * rng.normal(size=300) for i in range(1, 5)})
    data["x5"] = rng.normal(size=300)
    return data.round(3)


def test_a_small_loading_is_not_printed_as_a_rounded_zero():
    result = cfa_tool.fit("factor f: x1, x2, x3, x4, x5\n", _noise_item())
    [x5] = [e.standardized for e in result.estimates if e.kind == "loading" and e.variables[1] == "x5"]
    assert 0.001 < abs(x5) < 0.005  # the case: two decimals would print .00
    paragraph = " ".join(methods_paragraph(result).split())
    assert f"Standardized loadings ranged from {est_unit(abs(x5), 2)} to " in paragraph
    assert "from .00 to" not in paragraph and est_unit(abs(x5), 2) == ".0044"
    # the estimates table prints the same value by the same rule
    cells = [c for t in estimate_tables(result, 0) for row in t.rows for c in row]
    assert est_unit(x5, 2) in cells and "-.0044" in cells


def test_the_ladders_level_is_printed_as_given(hs_data):
    from cfa_tool.workflows.invariance import LEVELS

    ladder = invariance(THREE_FACTORS, hs_data, "school", alpha=0.005)
    paragraph = " ".join(invariance_paragraph(ladder, LEVELS).split())
    assert "(p \u2265 .005)" in paragraph and "(p \u2265 .01)" not in paragraph
