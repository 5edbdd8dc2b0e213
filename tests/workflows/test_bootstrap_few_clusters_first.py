"""A bootstrap that resamples a handful of clusters says so first (s25, a neighbour of hostile s24b's halves of two
clusters): with 2 clusters the resamples are few kinds of the same clusters, so its intervals are too narrow and
unsteady (fewer than about 30 clusters, common practice), a problem of every interval it gives, said before among the
report's lines.  The rider survey demo data are invented (a fictional transit agency); their district column has two
values."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.reports import report_of
from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"


def test_resamples_of_two_districts_are_a_caution_first(rider_demo):
    boot = cfa_tool.bootstrap(MODEL, rider_demo, replications=10, seed=4, cluster="district")
    report = report_of(boot)
    first = [" ".join(str(line).split()) for line in report.notice.lines]
    assert any(line.startswith("With only 2 clusters the resamples are few kinds of the same clusters, so the "
                               "bootstrap intervals are too narrow and unsteady") and "What to try:" in line
               for line in first)
    assert not any("few kinds of the same clusters" in str(line) for line in report.lines)
    # the fit's own caution of 2 clusters for 39 free parameters stays, in words that count
    assert any("at most 1 independent direction (one fewer than the clusters)" in line for line in first)
