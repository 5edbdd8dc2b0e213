"""Rows without a value in the group column are left out of a fit in groups, and the methods paragraph says so for
that reason: a hostile trial found them called rows that "answered no model variable" (full-information ML) or rows
"with missing answers excluded listwise" in fit, and "rows answering none of some model's variables" in compare.
The counts are checked against the data frame's own (pandas)."""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.workflow_tables import comparison_report
from tests.conftest import THREE_FACTORS


def _data(hs_data):
    data = hs_data.copy()
    data.loc[data.index[::15], "school"] = None  # 21 rows without a school
    data.loc[data.index[1::40], "x2"] = np.nan  # and some gaps in answers
    return data


def test_the_fit_paragraph_gives_the_reason_rows_were_left_out(hs_data):
    data = _data(hs_data)
    without = int(data["school"].isna().sum())
    result = cfa_tool.fit(THREE_FACTORS, data, group="school")
    text = " ".join(methods_paragraph(result).split())
    assert result.data.without_group == without and result.to_dict()["data"]["rows_without_group"] == without
    assert f"{without} of {len(data)} rows had no value of school, the group column, and were left out" in text
    assert "answered no model variable" not in text
    listwise = cfa_tool.fit(THREE_FACTORS, data, group="school", missing="listwise")
    gaps = int((data["school"].notna() & data["x2"].isna()).sum())
    text = " ".join(methods_paragraph(listwise).split())
    assert (f"the {len(data) - gaps - without} complete rows were analysed and {gaps} of {len(data)} rows with "
            f"missing answers excluded listwise" in text)
    assert f"{without} of {len(data)} rows had no value of school, the group column," in text


def test_the_comparison_says_it_too(hs_data):
    data = _data(hs_data)
    without = int(data["school"].isna().sum())
    comparison = cfa_tool.compare([THREE_FACTORS, "factor g: x1..x9\n"], data, "school")
    assert comparison.without_group == without and comparison.rows_dropped == 0
    report = comparison_report(comparison)
    text = " ".join(report.paragraph.split())
    assert f"{without} of {len(data)} rows had no value of school, the group column, and were left out" in text
    assert "answered none of some model's variables" not in text
    # 21 of 301 rows (7%): past the share of listwise deletion's caution, a caution first (hostile tester s15)
    assert any(p.explanation.startswith(f"{without} of {len(data)} rows (7%) have no value in the group column 'school'")
               for p in comparison.problems)


def test_the_invariance_paragraph_says_it_too(hs_data):
    # the fit's sentence, shared: the ladder's models were fitted to the rows with a school only
    from cfa_tool.reporting.paragraph import invariance_paragraph
    from cfa_tool.workflows.invariance import LEVELS

    data = _data(hs_data)
    without = int(data["school"].isna().sum())
    ladder = cfa_tool.invariance(THREE_FACTORS, data, "school")
    assert all(s.result.data.without_group == without for s in ladder.steps)
    assert ladder.steps[0].result.n_obs == len(data) - without  # counted by pandas above
    text = " ".join(invariance_paragraph(ladder, LEVELS).split())
    assert f"(N = {len(data) - without}; " in text
    assert f"; {without} of {len(data)} rows had no value of school, the group column, and were left out)" in text
