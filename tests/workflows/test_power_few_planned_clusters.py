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


def test_the_caution_names_every_sample_of_the_plan_with_few_clusters():
    # fixleft s26: N = 90 rows asked about, in clusters of 15 rows, are 6 clusters (90 / 15), yet the caution judged
    # the smallest N's sample alone (ICC .10: deff 1 + 14 x .10 = 2.4, Kish 1965; close fit, df 51, 211 independent
    # rows, MacCallum, Browne & Sugawara 1996, the plan's table; 211 x 2.4 = 506.4, so 507 rows in 34 clusters)
    result = plan(51, "close", n_obs=90, variables=12, intraclass=0.10, cluster_size=15)
    assert result.clusters.clusters == 34  # ceil(507 / 15)
    caution = _caution(result)
    assert "The plan's cluster sample at N = 90 has only 6 clusters: with fewer than about 30-50 clusters" in caution
    assert "the model's 27 free parameters" in caution  # 6 clusters, no more than 27
    # both samples few: ICC .10, 40 rows per cluster (26 clusters for the smallest N, above), N = 400 in 10
    both = _caution(plan(51, "close", n_obs=400, variables=12, intraclass=0.10, cluster_size=40))
    assert ("The plan's cluster samples at N = 400 and for the smallest N (power .80, 1,034 rows) have only 10 and 26 "
            "clusters") in both
    # the N asked about is the smallest N's rows: one sample, named once (1,034 rows in 26 clusters)
    once = _caution(plan(51, "close", n_obs=1034, variables=12, intraclass=0.10, cluster_size=40))
    assert "The plan's cluster sample at N = 1,034 (the smallest N's rows too) has only 26 clusters" in once
    # the difference test's plan says it alike
    from cfa_tool.workflows.power_nested import nested_power

    two, one = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\n", "factor g: y1, y2, y3, y4, y5, y6\n"
    from cfa_tool.language.parser import parse_model

    nested = _caution(nested_power(parse_model(two), parse_model(one), n_obs=100, design_effect=2.0, cluster_size=20))
    assert "The plan's cluster samples at N = 100 and for the smallest N" in nested and "have only 5 and " in nested
