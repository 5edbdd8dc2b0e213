"""The power report prints the values the user gave as given (reporting.numbers.short, by cfa_tool.numbers.user_number:
a significance level of .005 was printed '.01', an intraclass correlation of .0625 '0.062', a cluster size of
1,234,567 rows '1.23457e+06'), the counts it computed grouped by thousands (count_text), and 'Clusters of 1 row'."""

from __future__ import annotations

import re

from cfa_tool.reporting.workflow_tables import power_report
from cfa_tool.workflows.power import plan


def _rows(result) -> dict[str, str]:
    return {row[0]: row[1] for table in power_report(result).tables for row in table.rows}


def test_given_values_as_given_and_counts_grouped():
    rows = _rows(plan(20, alpha=0.005, intraclass=0.0625, cluster_size=1234567))
    assert rows["Significance level"] == ".005" and rows["Intraclass correlation (given)"] == ".0625"
    assert rows["Rows per cluster (given)"] == "1234567" and "Clusters of 1234567 rows needed" in rows
    # 1 + (1234567 - 1) x .0625 = 77,161.375 (Kish 1965), times the N required: far above 1,000 rows
    assert re.fullmatch(r"\d{1,3}(,\d{3})+", rows["Rows needed in the cluster sample"])


def test_clusters_of_one_row():
    rows = _rows(plan(20, design_effect=1.5, cluster_size=1))
    assert rows["Clusters of 1 row needed"] == rows["Rows needed in the cluster sample"]  # one row per cluster
