"""Standard errors of a fit in two groups from the observed information (the closed-form second derivatives of
estimation.ml.NormalLikelihood.observed_hessian) against semopy's observed information, an independent
implementation: semopy's multi-group analysis fits each group on its own (semopy.multigroup), which is the
configural model, and its observed information is numdifftools' differences of its gradient (semopy.stats.calc_se)."""

from __future__ import annotations

import pytest

import cfa_tool
from tests.semopy.helpers import _semopy_lookup, observed_information_compared

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_grouped_observed_information_standard_errors_match_semopy_per_group(hs_data):
    # the configural model's intercepts are the groups' sample means at the estimates (d = 0), so the covariance
    # parameters' block of the observed information is semopy's model without means, group by group
    ours = cfa_tool.fit(THREE_FACTORS, hs_data, group="school", information="observed", diagnostics=False,
                        modification_indices=False)
    compared = 0
    for school in ("Pasteur", "Grant-White"):
        model = semopy.Model("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9")
        model.fit(hs_data[hs_data["school"] == school], solver="trust-constr")
        theirs = _semopy_lookup(model.inspect(information="observed"))
        # (the largest relative difference of the standard errors was 2.4e-7 when this test was written, semopy 2.3.11)
        compared += observed_information_compared([r for r in ours.estimates if r.group == school and r.kind not in
                                                   ("intercept", "mean") and r.se == r.se], theirs)
    assert compared == 2 * 21  # 6 loadings, 9 residual variances, 3 factor variances and 3 covariances per group
