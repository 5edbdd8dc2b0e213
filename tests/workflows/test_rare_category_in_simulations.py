"""Simulated samples that lack a rare answer category, in the cutoffs and in power by simulation (session 23): kept
and fitted with the categories they hold, as the bootstrap keeps its resamples (workflows.ordinal_resampling), and
now counted and said, with the category, in the result and its report.

Check value: a fit of N rows with one row in category 1 of an item places that item's first threshold at
Phi^-1(1/N) (its first-step estimate, Olsson 1979), so an answer simulated from the fit falls in category 1 with
chance 1/N, and a sample of N answers lacks it with chance (1 - 1/N)^N (a binomial zero count), with its binomial
spread over the samples."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.reports import report_of
from cfa_tool.workflows.montecarlo import monte_carlo_power
from cfa_tool.workflows.simulation import simulate

MODEL = "factor f: y1, y2, y3, y4\nordinal y1..y4\n"
N = 300


@pytest.fixture(scope="module")
def one_row():
    data = simulate(MODEL, N, seed=4, categories=5).frame
    ones = data.index[data["y2"] == 1]
    data.loc[ones[1:], "y2"] = 2
    return data


def _within(count: int, total: int) -> bool:
    share = (1 - 1 / N) ** N
    return abs(count - total * share) < 4.5 * np.sqrt(total * share * (1 - share))


def _said(report) -> str:
    return " ".join(" ".join(str(x).split()) for x in report.lines)


def test_cutoffs_keep_and_count_the_samples_that_lack_the_rare_category(one_row, monkeypatch):
    import cfa_tool.workflows.cutoffs as cutoffs

    # no search for the N or the size of misspecification that would separate the models (more samples, not wanted)
    monkeypatch.setattr(cutoffs, "N_STEPS", ())
    monkeypatch.setattr(cutoffs, "SIZE_STEPS", ())
    cut = cfa_tool.cutoffs(MODEL, one_row, replications=60, seed=2, workers=1)
    assert cut.converged_correct >= 57
    assert _within(cut.lacking[0], cut.converged_correct) and cut.lacking[0] > 0
    assert [(c.item, c.category, c.samples) for c in cut.lacked] == [("y2", 1.0, cut.lacking[0])]
    assert f"{cut.lacking[0]} of the {cut.converged_correct} converged samples of the fitted model lacked an answer " \
           f"category of an ordinal item (y2 1 in {cut.lacking[0]})" in _said(report_of(cut))
    assert cut.to_dict()["result"]["lacking_a_category_correct"] == cut.lacking[0]


def test_power_by_simulation_keeps_and_counts_the_replications_that_lack_the_rare_category(one_row):
    fit = cfa_tool.fit(MODEL, one_row)
    power = monte_carlo_power(MODEL, N, replications=40, seed=3, population=fit, workers=1)
    assert power.converged >= 38 and power.lacking > 0 and _within(power.lacking, power.converged)
    assert [(c.item, c.category) for c in power.lacked] == [("y2", 1.0)]
    assert (f"{power.lacking} of the {power.converged} converged replications lacked an answer category of an "
            f"ordinal item (y2 1 in {power.lacking})") in _said(report_of(power))
    assert power.to_dict()["lacking_a_category"] == power.lacking
