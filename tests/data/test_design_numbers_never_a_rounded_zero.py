"""Numbers of the sampling design's words are never a rounded zero for a quantity that is not zero (s21: sampling
weights summing to 5.9e-7 printed 'sum 0'): a sum of weights to its significant digits (numbers.count_text, by
numbers.rounded_number), the effective sample size's share of the rows and the dominant cluster's even share as
percentages of two significant digits.

Check values: arithmetic written out beside each (480 weights of 1.2e-9 sum to 5.76e-7; 2.2 effective rows of 1,000
are 0.22%; 1/4,000 of the design effect is 0.025%)."""

from __future__ import annotations

from dataclasses import replace

import cfa_tool
from cfa_tool.data.sample_design import DesignColumns, DominantCluster, SampleDesign, WeightKind
from cfa_tool.numbers import count_text


def test_a_tiny_sum_of_weights_is_written_to_its_significant_digits(rider_demo, rider_model):
    frame = rider_demo.copy()
    frame["w"] = 1.2e-9  # 480 rows: the weights sum to 5.76e-7
    result = cfa_tool.fit(rider_model, frame, weights="w")
    status = result.design.status()
    assert "sum 0.000000576," in status and "sum 0," not in status
    assert "(sum 0.000000576, rescaled to sum to the 480 rows" in result.design.sentence()
    # counts and sums of ordinary sizes as before
    assert (count_text(5.9e-7), count_text(-0.003), count_text(912), count_text(1234.5678), count_text(0.0)) == \
        ("0.00000059", "-0.003", "912", "1,234.57", "0")


def test_the_share_of_effective_rows_is_never_zero_percent():
    design = SampleDesign(DesignColumns("w", None, None, WeightKind.SAMPLING), rows=1000, sum_of_weights=1000.0,
                          effective_n=2.2, clusters=None, strata=None)
    said = design.weight_caution()
    assert "the 1,000 rows count as about 2.2 (Kish's effective sample size, 0.22% of the rows" in said
    assert "0% of the rows" not in said.replace("0.22% of the rows", "")
    half = replace(design, effective_n=431.6)
    assert "43% of the rows" in half.weight_caution()  # 431.6 / 1000


def test_the_dominant_clusters_shares_are_never_zero_percent():
    from cfa_tool.pipeline.inputs import dominant_cluster_problem

    design = SampleDesign(DesignColumns(None, "school", None, WeightKind.SAMPLING), rows=40000, sum_of_weights=None,
                          effective_n=None, clusters=4000, strata=None)
    dominant = DominantCluster("S-0001", share=0.6, clusters=4000, design_effect=0.004)
    said = str(dominant_cluster_problem(design, dominant).explanation)
    assert "holds 60% of the design effect" in said
    assert "mean design effect 0.004)" in said
    assert "where each would hold about 0.025% if they were alike" in said  # 100 / 4,000


def test_a_tiny_intraclass_correlation_is_not_written_as_zero():
    from cfa_tool.data.cluster_similarity import ClusterSimilarity

    similar = ClusterSimilarity(("a", "b", "c"), (0.0004, 0.0004, 0.02), 11.0)
    said = similar.phrase()
    assert said.startswith("median intraclass correlation of the items .0004 (.0004 to .02), design effect 1.00 at")
    # 1 + (11 - 1) x .0004 = 1.004 (Kish 1965)
    assert ".000 " not in said and ".000)" not in said
