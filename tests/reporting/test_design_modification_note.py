"""Modification indices under a sampling design: since s17 the design-based score tests (Satorra's 1989 generalized
score test, assessment.robust_scores.robust_score_tests; tests/assessment/test_design_score_tests.py checks them), and
the first note under their table says so (new-user trial s16 found normal-theory ones without a word); the
normal-theory score tests of the weighted likelihood, which the design-based ones replaced, are larger with clustered
answers, on Holzinger & Swineford (1939) rows given a shared effect within invented clusters of six."""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.reporting.tables import modification_table

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ITEMS = [f"x{i}" for i in range(1, 10)]


def _clustered(hs_data):
    rng = np.random.default_rng(3)
    n = len(hs_data)
    unit = np.arange(n) // 6
    data = hs_data.copy()
    data[ITEMS] = data[ITEMS] + rng.normal(0, 0.6, (unit.max() + 1, 9))[unit]  # rows of one cluster answer alike
    return data.assign(unit=unit, w=rng.uniform(0.5, 2, n), st=unit % 3, count=1 + np.arange(n) % 3)


def test_the_indices_under_a_design_say_first_that_they_take_it_in(hs_data):
    data = _clustered(hs_data)
    fitted = cfa_tool.fit(THREE_FACTORS, data, weights="w", cluster="unit", strata="st", mi_threshold=0)
    note = modification_table(fitted).note
    assert note.startswith("These indices take the sampling design (sampling weights, clusters, and strata) into "
                           "account: each is a design-based score test")
    only = modification_table(cfa_tool.fit(THREE_FACTORS, data, cluster="unit", mi_threshold=0)).note
    assert only.startswith("These indices take the sampling design (clusters) into account")
    # frequency weights are repeated rows: their score tests are the ordinary ones, and so is a fit without a design
    for plain in (cfa_tool.fit(THREE_FACTORS, data, weights="count", weight_kind="frequency", mi_threshold=0),
                  cfa_tool.fit(THREE_FACTORS, data, mi_threshold=0)):
        assert "sampling design" not in modification_table(plain).note


def test_the_plain_indices_are_larger_than_the_design_based_score_tests(hs_data):
    # why they were replaced: the weighted likelihood's normal-theory indices against Satorra's (1989) generalized score test over the design-based meat
    from cfa_tool.assessment.modification import modification_indices
    from cfa_tool.data.sample_design import DesignColumns, check_design
    from cfa_tool.language.checks import exogenous_factors
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for
    from cfa_tool.assessment.robust_scores import robust_score_tests

    spec = parse_model(THREE_FACTORS)
    columns = DesignColumns("w", "unit", None)
    frame, _ = check_design(_clustered(hs_data), columns, spec.observed_names, None, "data")
    groups, _ = moments_for(spec, frame, "data", design=columns)
    est = estimate(spec, groups, FitOptions(test="satorra-bentler"))
    found = modification_indices(est.model, est.theta, est.likelihood, exogenous_factors(spec),
                                 [est.model.matrices(est.theta, 0)])
    robust = robust_score_tests(found, est.model, est.theta, est.likelihood)
    plain = {found.candidates[r]: v for r, v in zip(found.rows, found.index)}
    ratio = np.array([plain[robust.candidates[r]] / v for r, v in zip(robust.rows, robust.index)])
    assert len(ratio) > 40
    assert np.mean(ratio > 1) > 0.9 and np.median(ratio) > 1.3
