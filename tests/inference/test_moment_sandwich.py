"""One fit under a sampling design makes the meat of its moments once (inference.robust.moment_sandwich) and shares it
between the robust standard errors and test, the baseline's scaling and the design-based score tests (speed2-s17:
it was made three times a fit)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def _design_rows(hs_data):
    """Holzinger-Swineford (1939) rows with invented sampling weights and 12 clusters in each school."""
    rng = np.random.default_rng(7)
    return hs_data.assign(w=rng.lognormal(0, 0.4, len(hs_data)),
                          unit=hs_data["school"].astype(str) + "-" + rng.integers(0, 12, len(hs_data)).astype(str))


def test_a_design_fit_makes_its_moments_meat_once_per_group(hs_data, monkeypatch):
    import cfa_tool.inference.robust as robust

    calls = []
    original = robust.moment_contributions

    def counted(rows, design, with_means):
        calls.append(with_means)
        return original(rows, design, with_means)

    monkeypatch.setattr(robust, "moment_contributions", counted)
    result = cfa_tool.fit(THREE_FACTORS, _design_rows(hs_data), group="school", weights="w", cluster="unit")
    assert result.robust is not None and len(result.modification_indices)  # the design's test and score tests
    # each school's rows once, and once times Sigma^-1 (the contributions times V, for tr(V Omega) without a
    # p* x p* matrix: robust-s20), with their means (the model has a mean structure)
    assert calls == [True, True, True, True]


def test_the_baseline_trace_of_the_shared_meat_is_the_independence_models_sum(hs_data):
    # tr(U Gamma_g) of the independence model (Sigma = diag(d), d the sample variances; Satorra & Bentler 1994's
    # U = V - V Delta (Delta' V Delta)^-1 Delta' V with V = 1/2 D'(A (x) A) D, A = diag(1/d)) written out: V is
    # diagonal, 1/(d_i d_j) for a covariance and 1/(2 d_i^2) for a variance, which the model's parameters fit
    # exactly, so tr(U Gamma_g) = sum_{i<j} Gamma_g[ij, ij] / (d_i d_j), summed over the groups; the sandwich of a
    # model with a mean structure holds the means' rows first, which the baseline's trace leaves out.
    from cfa_tool.data.sample_design import DesignColumns, check_design
    from cfa_tool.inference.design import moment_covariance
    from cfa_tool.inference.robust import baseline_trace, moment_sandwich, vech_indices
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for

    spec = parse_model(THREE_FACTORS)
    columns = DesignColumns("w", "unit", None)
    frame, _ = check_design(_design_rows(hs_data), columns, spec.observed_names, "school", "data")
    groups, _ = moments_for(spec, frame, "data", "school", design=columns)
    est = estimate(spec, groups, FitOptions(test="satorra-bentler"))
    likelihood = est.likelihood
    assert likelihood.means
    sandwich = moment_sandwich(est.model, est.theta, likelihood)
    I, J = vech_indices(9)
    off = I != J
    by_hand = 0.0
    for g in likelihood.groups:
        gamma = np.diag(moment_covariance(g.rows, g.design, False))
        d = np.diag(g.covariance)
        by_hand += float(np.sum(gamma[off] / (d[I[off]] * d[J[off]])))
    assert baseline_trace(likelihood, sandwich) == pytest.approx(by_hand, rel=1e-12)
    assert baseline_trace(likelihood) == pytest.approx(by_hand, rel=1e-12)
