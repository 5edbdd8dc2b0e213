"""The keyed sum score's mean, SD and item-rest correlations say what they are computed on (a new-user trial got
neither the unweighted nor the weighted mean of the complete rows): the rows analysed, weighted as the fit weights
them, or with gaps the full-information estimates for every row.  Checked against statsmodels' weighted
descriptive statistics (DescrStatsW), an outside implementation."""

from __future__ import annotations

import numpy as np
import pytest
from statsmodels.stats.weightstats import DescrStatsW

import cfa_tool
from cfa_tool.reporting import tables as T
from tests.conftest import THREE_FACTORS


def test_sum_score_figures_are_the_weighted_ones_of_the_rows_analysed_and_say_so(hs_data):
    data = hs_data.reset_index(drop=True).assign(w=1.0 + np.arange(len(hs_data)) % 3)
    result = cfa_tool.fit(THREE_FACTORS, data, weights="w")
    [visual] = [r for r in result.groups[0].reliability if r.factor == "visual"]
    w = data["w"].to_numpy() * len(data) / data["w"].sum()  # rescaled to sum to the rows, as the fit does
    x = data[["x1", "x2", "x3"]].to_numpy()
    total = DescrStatsW(x.sum(axis=1), weights=w, ddof=1)
    assert visual.sum_score_mean == pytest.approx(total.mean, rel=1e-9)
    assert visual.sum_score_sd == pytest.approx(total.std, rel=1e-9)  # divisor N - 1 with weights summing to N
    rest = DescrStatsW(np.column_stack([x[:, 0], x[:, 1] + x[:, 2]]), weights=w)
    assert visual.item_total[0] == pytest.approx(rest.corrcoef[0, 1], rel=1e-9)  # item-rest r, weighted too
    assert visual.item_total[0] != pytest.approx(np.corrcoef(x[:, 0], x[:, 1] + x[:, 2])[0, 1], rel=1e-4)
    note = T.sum_score_table(result).note
    assert f"item-rest r come from the item means and covariances the fit analysed: the {len(data)} rows analysed, " \
           f"weighted by w." in note
    assert "Mean, SD and item-rest r weighted by w; N, skewness and kurtosis count each row once." in \
        T.item_table(result).note  # (the note said item-rest r counted each row once)


def test_with_gaps_the_sum_score_figures_are_said_to_be_full_information_estimates(hs_data):
    data = hs_data.reset_index(drop=True).copy()
    data.loc[::7, "x1"] = np.nan
    result = cfa_tool.fit(THREE_FACTORS, data)
    [visual] = [r for r in result.groups[0].reliability if r.factor == "visual"]
    means = dict(zip(result.groups[0].data.variables, result.groups[0].data.means))
    assert visual.sum_score_mean == pytest.approx(means["x1"] + means["x2"] + means["x3"], rel=1e-12)
    complete = data[["x1", "x2", "x3"]].dropna().sum(axis=1).mean()
    assert visual.sum_score_mean != pytest.approx(complete, rel=1e-4)  # not the complete rows' mean
    note = T.sum_score_table(result).note
    assert f"estimates for all {len(data)} rows analysed by full-information ML" in note
    assert "not the figures of the rows that answered every item" in note


def test_the_scores_report_cites_without_a_working_marker(hs_data):
    from cfa_tool.reporting.score_report import scores_report

    report = scores_report(cfa_tool.scores(THREE_FACTORS, hs_data))
    notes = " ".join(str(t.note or "") for t in report.tables)
    assert "(Gulliksen 1950)" in notes and "recalled from memory" not in notes
