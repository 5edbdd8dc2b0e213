"""The design's methods sentence says 'weighted' only of weights that were given (s23: clusters or strata alone were
described as 'the clusters' weighted sums', and a lone stratum's unit as 'its weighted sum', with no weights in the
run).  What the design-based covariance sums over (inference.design.design_meat): each cluster's sum of its rows'
contributions, or each row's own contribution, weighted by the row's weight when weights were given (Binder 1983).
Data: the bundled fictional rider survey, its districts taken as clusters or strata (invented for the check)."""

from __future__ import annotations

import cfa_tool
from cfa_tool.data.sample_design import DesignColumns, SampleDesign, WeightKind


def test_clusters_without_weights_are_summed_not_weighted(rider_demo, rider_model):
    said = " ".join(cfa_tool.fit(rider_model, rider_demo, cluster="district").design.sentence().split())
    assert "over the clusters' sums (multiplied by the number of clusters over that number less one" in said
    assert "weighted" not in said


def test_strata_of_rows_without_weights_centre_the_rows_contributions(rider_demo, rider_model):
    said = " ".join(cfa_tool.fit(rider_model, rider_demo, strata="district").design.sentence().split())
    assert "over the rows' contributions centred within each stratum" in said
    assert "weighted" not in said


def test_weights_keep_their_word(rider_demo, rider_model):
    frame = rider_demo.assign(w=1.0 + (rider_demo["district"] == "north"))  # invented weights, 2 in north
    said = " ".join(cfa_tool.fit(rider_model, frame, weights="w", cluster="district").design.sentence().split())
    assert "over the clusters' weighted sums (multiplied by" in said


def test_a_lone_stratums_unit_is_named_by_the_same_words():
    design = SampleDesign(DesignColumns(None, "school", "region", WeightKind.SAMPLING), rows=400, sum_of_weights=None,
                          effective_n=None, clusters=40, strata=5, lone_strata=("coast",))
    assert ("with no second cluster to compare, its sum was centred at the mean of all clusters' sums"
            in design.lone_text())
    rows = SampleDesign(DesignColumns("w", None, "region", WeightKind.SAMPLING), rows=400, sum_of_weights=400.0,
                        effective_n=380.0, clusters=None, strata=5, lone_strata=("coast",))
    assert ("with no second row to compare, its weighted contribution was centred at the mean of all rows' "
            "contributions" in rows.lone_text())


def test_the_score_tests_note_weights_the_likelihood_only_with_weights():
    clusters = SampleDesign(DesignColumns(None, "school", None, WeightKind.SAMPLING), rows=400, sum_of_weights=None,
                            effective_n=None, clusters=40, strata=None)
    assert clusters.score_test_text().endswith("the expected changes are those of the likelihood.")
    weighted = SampleDesign(DesignColumns("w", "school", None, WeightKind.SAMPLING), rows=400, sum_of_weights=400.0,
                            effective_n=380.0, clusters=40, strata=None)
    assert weighted.score_test_text().endswith("the expected changes are those of the weighted likelihood.")
