"""When the scaled test cannot be computed, the fit table still prints every figure it has at every terminal width
(new-user trial s18: in 80 columns the Value column was cut at "not computed: ... (see", and the SRMR, the scaling
factor and the unadjusted CFI were not printed at all, though the caution says to judge fit by the SRMR), and no
view prints an empty interval ("not defined [, ]")."""

from __future__ import annotations

import io
import re

import numpy as np
import pytest
from rich.console import Console

import cfa_tool
from cfa_tool.reporting.tables import fit_table
from cfa_tool.reporting.terminal import rich_table
from cfa_tool.reporting.text_formats import markdown_table
from tests.inference.test_scaling_factor_not_positive import heavy_tailed_rows_with_gaps

MODEL = "factor comfort: q1, q2, q3, q4\n"


@pytest.fixture(scope="module")
def not_computed():
    import cfa_tool.inference.robust_missing as robust_missing

    data = heavy_tailed_rows_with_gaps()
    real = robust_missing.robust_missing

    def negative(*args, **kwargs):  # the estimate of c replaced by a negative one: a constructed case
        cov, c, c_base = real(*args, **kwargs)
        return cov, -0.148, c_base

    robust_missing.robust_missing = negative
    try:
        result = cfa_tool.fit(MODEL, data, test="robust")
    finally:
        robust_missing.robust_missing = real
    assert np.isnan(result.robust.chi_square_scaled)
    return result


@pytest.mark.parametrize("width", [40, 50, 60, 80, 120])
def test_every_figure_of_the_fit_table_is_printed_at_every_width(not_computed, width):
    f = not_computed.fit
    buffer = io.StringIO()
    Console(file=buffer, width=width, no_color=True).print(rich_table(fit_table(not_computed)))
    text = " ".join(buffer.getvalue().split())
    # the figures the caution tells the reader to judge fit by, and those printed beside them
    for figure in (f"{f.srmr:.3f}".lstrip("0"), "-0.148", f"{f.cfi:.3f}".lstrip("0"), f"{f.chi_square:.3f}",
                   f"{f.baseline_chi_square:.3f}", str(f.n_free_parameters)):
        assert figure in text, (width, figure)
    assert "not computed" in text and "see the caution first" in text


def test_no_view_prints_an_empty_interval(not_computed):
    table = fit_table(not_computed)
    assert not any(re.search(r"\[\s*,\s*\]", cell) for row in table.rows for cell in row)
    assert "[, ]" not in markdown_table(table)
    [robust_rmsea] = [row for row in table.rows if row[0].startswith("Robust RMSEA")]
    assert robust_rmsea[1] == "not computed (see the caution first)"  # compare-s18 and fixnew-a-s18 merged
