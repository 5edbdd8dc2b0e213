"""The closed-form observed Hessian of the complete-data ML discrepancy in several groups and with a mean structure
(estimation.ml.NormalLikelihood.observed_hessian): the second derivatives of Sorbom's (1974) discrepancy, summed over
groups with the weights N_g / N.  Checked against central differences of the analytic gradient (a handbook rule,
Nocedal & Wright 2006, section 8.1), away from the minimum where every term counts, and the standard errors from the
observed information against those of the central differences at the estimates (to 1e-6 relative).  The check against
another program's observed information, semopy's, is in tests/semopy/test_grouped_observed_information_against_semopy.py."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

import cfa_tool
from cfa_tool.inference.standard_errors import parameter_covariance
from cfa_tool.language import parse_model
from cfa_tool.numerics.linalg import difference_hessian
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.pipeline.inputs import moments_for

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"

# configural; metric with a residual covariance; scalar (factor means free in the second group: the loading-mean
# second derivative of mu); strict
LEVELS = [("", ()), ("covary x1, x4\n", ("loadings",)), ("", ("loadings", "intercepts")),
          ("", ("loadings", "intercepts", "residuals"))]


def _estimate(hs_data, extra: str, invariant: tuple[str, ...]):
    spec = parse_model(THREE_FACTORS + extra)
    if invariant:
        spec = replace(spec, invariant=invariant, ladder_step=True)
    groups, _ = moments_for(spec, hs_data, "hs", group="school")
    est = estimate(spec, groups, FitOptions())
    assert est.converged
    return est


@pytest.mark.parametrize("extra, invariant", LEVELS)
def test_grouped_closed_form_hessian_equals_differences_of_the_gradient(hs_data, extra, invariant):
    est = _estimate(hs_data, extra, invariant)
    assert est.model.mean_structure and len(est.likelihood.groups) == 2
    theta = est.theta + 0.05 * np.random.default_rng(5).normal(size=len(est.theta))
    closed = est.likelihood.observed_hessian(theta)
    assert closed is not None, "no closed form for two groups with a mean structure"
    numeric = difference_hessian(est.likelihood.gradient, theta, central=True)
    # central differences of step 1e-5 are good to about 1e-9 of the largest entry here; 1e-6 leaves room
    np.testing.assert_allclose(closed, numeric, rtol=0, atol=1e-6 * np.abs(numeric).max())
    # not the expected information, which has no terms in the residuals
    assert not np.allclose(closed, est.likelihood.evaluate(theta).information, atol=1e-4)


@pytest.mark.parametrize("extra, invariant", LEVELS)
def test_grouped_observed_information_standard_errors_equal_those_of_differences(hs_data, extra, invariant):
    est = _estimate(hs_data, extra, invariant)
    n = est.likelihood.n_total
    closed = np.sqrt(np.diag(parameter_covariance(est.likelihood.observed_hessian(est.theta), n)))
    numeric = np.sqrt(np.diag(parameter_covariance(
        difference_hessian(est.likelihood.gradient, est.theta, central=True), n)))
    np.testing.assert_allclose(closed, numeric, rtol=1e-6)


def test_a_grouped_fit_with_the_observed_information_reports_the_closed_form_standard_errors(hs_data):
    # what fit() reports: the closed form's (2/N) H^-1 mapped onto the entries, against central differences
    result = cfa_tool.fit(THREE_FACTORS, hs_data, group="school", information="observed", diagnostics=False,
                          modification_indices=False)
    est = _estimate(hs_data, "", ())
    numeric = parameter_covariance(difference_hessian(est.likelihood.gradient, est.theta, central=True),
                                   est.likelihood.n_total)
    se = np.sqrt(((est.model.J @ numeric) * est.model.J).sum(axis=1))
    reported = np.array([r.se for r in result.estimates])
    free = np.isfinite(reported)
    assert free.sum() == len(est.theta) == 60
    np.testing.assert_allclose(reported[free], se[(est.model.J != 0).any(axis=1)], rtol=1e-6)
