"""An ordinal category given by one row, in every command (hostile trial s22): fit said 'Categories of ordinal items
given by few rows', bootstrap, scores, cutoffs and replicate were silent, and bootstrap left out the resamples that
lost the category (about (1 - 1/480)^480 = 37% of them, the chance a resample misses one given row) without a word,
its intervals conditional on the rare answer being drawn (session 23: those resamples are kept, the rare
category's threshold without an interval, said first).  Data: the bundled demo (a fictional transit agency's rider
survey, simulated with a fixed seed) with every answer 1 to short_wait but one made 2."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.score_report import scores_report
from cfa_tool.reporting.workflow_tables import bootstrap_report, cutoffs_report, replication_report
from cfa_tool.resources import resource_dir

MODEL = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "ordinal on_time, short_wait, accurate_info, easy_transfer\n")
FEW = "short_wait 1 (1 row)"


@pytest.fixture(scope="module")
def one_row() -> pd.DataFrame:
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rare = data.index[data["short_wait"] == 1]
    data.loc[rare[1:], "short_wait"] = 2
    return data


def _said(lines) -> str:
    return " ".join(" ".join(str(x).split()) for x in lines)


def test_bootstrap_says_first_which_interval_the_rare_category_leaves_without_one(one_row):
    # session 23: the resamples that lost the category are kept (fitted with the categories they hold), and the
    # threshold with no answer below it there has no interval, said first with their count
    boot = cfa_tool.bootstrap(MODEL, one_row, replications=60, workers=1)
    lacking = boot.resamples_lacking
    assert boot.failed == 0 and lacking >= 0.15 * boot.replications  # the chance of missing the one row is about .37
    report = bootstrap_report(boot)
    first = _said(report.notice.lines)
    assert (f"No interval for threshold 1 of short_wait ({lacking} of the {boot.converged} converged resamples held "
            f"no answer 1 of short_wait)") in first and "too narrow" in first
    assert FEW in _said(report.warnings)


def test_scores_cutoffs_and_replicate_say_the_rare_category(one_row):
    assert FEW in _said(scores_report(cfa_tool.scores(MODEL, one_row)).warnings)
    assert FEW in _said(cutoffs_report(cfa_tool.cutoffs(MODEL, one_row, replications=20, workers=1)).warnings)
    rep = cfa_tool.replicate(MODEL, one_row.iloc[:240], one_row.iloc[240:])
    assert FEW in _said(replication_report(rep).warnings)


def test_invariance_and_compare_say_the_rare_category_too():
    # hostile trial s25, finding 6: both were silent, though the ladder's threshold step equates the threshold next to
    # the category across the groups; by construction north keeps one answer 1 of on_time, south all of its own
    from cfa_tool.reporting.workflow_tables import comparison_report, invariance_report
    from cfa_tool.workflows.compare import compare
    from cfa_tool.workflows.invariance import invariance

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    north = data.index[(data.district == "north") & (data.on_time == 1)]
    data.loc[north[1:], "on_time"] = 2
    assert (data[data.district == "north"].on_time == 1).sum() == 1  # the construction
    ladder = invariance(MODEL, data, "district")
    assert "on_time 1 (1 row) in group north" in _said(invariance_report(ladder).warnings)
    one_factor = ("factor f: on_time, short_wait, accurate_info, easy_transfer, seat_available, clean, temperature, "
                  "room_to_stand\nordinal on_time, short_wait, accurate_info, easy_transfer\n")
    pooled = data.copy()
    rare = pooled.index[pooled.on_time == 1]
    pooled.loc[rare[1:], "on_time"] = 2
    said = _said(comparison_report(compare([MODEL, one_factor], pooled)).warnings)
    assert said.count("on_time 1 (1 row)") == 1  # once, though both models have the item
