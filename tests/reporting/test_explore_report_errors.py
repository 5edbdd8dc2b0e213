"""The standard errors of rotated loadings stand beside the loadings in every explore report (terminal, HTML,
Markdown), with their method stated; the values are those of exploration.rotated_errors (checked against a
bootstrap and finite differences in test_exploration_standard_errors.py)."""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.reporting.explore_report import loading_table
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.text_formats import report_markdown

ITEMS = [f"x{i}" for i in range(1, 10)]


def test_pattern_table_shows_each_loading_with_its_standard_error(hs_data):
    result = cfa_tool.explore(hs_data, items=ITEMS, factors=3, rotation="geomin", replications=10)
    ex = result.exploration
    table = loading_table(result)
    names = ex.draft.factor_names
    assert table.columns[:7] == ("Item", names[0], "SE", names[1], "SE", names[2], "SE")
    order = list(result.order)
    for row, k in zip(table.rows, order):
        shown = [float(row[2 + 2 * j]) for j in range(3)]
        np.testing.assert_allclose(shown, ex.errors.pattern[k], atol=5e-4)
    assert "delta method" in table.note and "normal theory" in table.note
    # faint: the small loadings only, not their standard errors
    small = int((np.abs(ex.rotated.pattern) < ex.draft.threshold).sum())
    assert len(table.faint) == small and all(col % 2 == 1 for _, col in table.faint)
    for report in (report_markdown(report_of(result)), report_html(report_of(result)), " ".join(result.summary().split())):
        assert "SE: standard errors of the pattern loadings by the delta method" in report
