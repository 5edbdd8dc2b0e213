"""A power plan whose cluster sample has too few clusters is a caution first, in the words of a fit's design
(data.sample_design.FEW_CLUSTERS_WORDS; s25, the neighbours of hostile s24b's halves of two clusters: every command
that takes a design says where it leaves too few clusters).  Fewer than about 30-50 clusters make cluster-robust
standard errors and tests too small (common practice), and no more clusters than the free parameters make a test of
many parameters at once unreliable (Cameron & Miller 2015, recalled from memory, as the fit's caution cites it).  The
design effect 1 + (m - 1) ICC is Kish's (1965, recalled from memory)."""

from __future__ import annotations

from cfa_tool.reporting.reports import report_of
from cfa_tool.resources import resource_dir
from cfa_tool.workflows.power import plan

MODEL = resource_dir("models") / "rider_three_factors.cfa"  # 12 variables, 27 free parameters, df 51


def _caution(result) -> str:
    notice = report_of(result).notice
    return " ".join(" ".join(str(line).split()) for line in notice.lines) if notice is not None else ""


def test_a_plan_of_few_large_clusters_is_cautioned_first():
    # ICC .10 and 40 rows per cluster: deff 1 + 39 x .10 = 4.9; close fit, df 51, power .80 needs 211 independent
    # rows (MacCallum, Browne & Sugawara 1996; the plan's table), 211 x 4.9 = 1,033.9, so 1,034 rows in 26 clusters
    result = plan(51, "close", variables=12, intraclass=0.10, cluster_size=40)
    assert abs(result.clusters.design_effect - 4.9) < 1e-12
    assert result.clusters.clusters == 26
    caution = _caution(result)
    assert ("The plan's cluster sample has only 26 clusters: with fewer than about 30-50 clusters (common practice) "
            "cluster-robust standard errors and tests tend to be too small") in caution
    assert "with no more clusters than the model's 27 free parameters, the design-based test of fit" in caution
    assert "What to try: plan more clusters of fewer rows each (a smaller cluster_size)" in caution  # from Python


def test_many_small_clusters_are_no_caution():
    # 5 rows per cluster: deff 1.4, 296 rows in 60 clusters
    result = plan(51, "close", variables=12, intraclass=0.10, cluster_size=5)
    assert result.clusters.clusters >= 30
    assert "cluster sample has only" not in _caution(result)


def test_the_fits_design_caution_says_it_in_the_same_words():
    from cfa_tool.data.sample_design import FEW_CLUSTERS_WORDS, planned_clusters_caution

    assert FEW_CLUSTERS_WORDS in planned_clusters_caution(12)
    assert planned_clusters_caution(30) is None
