"""A table's sub-rows ('  scaling factor', '  p', '  90% interval' under the row they belong to) lost their indent in
HTML, where spaces collapse, so 'p' read as a row of its own (new-user trial, sixteenth round).  The leading spaces
become the cell's left padding, and the cell holds the words alone."""

import re
from pathlib import Path

import pandas as pd

from cfa_tool import fit
from cfa_tool.reporting.html_report import report_html, table_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.tables import ReportTable

ROOT = Path(__file__).resolve().parents[2]


def test_leading_spaces_become_padding():
    table = ReportTable("t", "Fit", ("Index", "Value"), ("l", "r"), (("Chi-square", "1.0"), ("  p", ".50")))
    html = table_html(table)
    assert '<td class="l" style="padding-left:1.35em">p</td>' in html
    assert '<td class="l">Chi-square</td>' in html


def test_the_robust_fit_table_indents_its_scaling_factor():
    result = fit(ROOT / "models" / "rider_three_factors.cfa", pd.read_csv(ROOT / "demo" / "rider_survey.csv"),
                 test="robust")
    html = report_html(report_of(result))
    assert re.search(r'<td class="l" style="padding-left:[0-9.]+em">scaling factor</td>', html)
    assert not re.search(r'<td class="l">\s+\S', html)  # no cell starts with spaces a browser would collapse
