"""Full-information ML's gradient, patterns-fixed information and observed Hessian from rank-two gathers, pattern by
pattern (large-s21: the patterns' (p*p, p*p) weight matrix made each evaluation p^4 per pattern and per parameter; a
fit of 120 items with 5% of answers missing at random took over ten minutes).

The reference is the general route of the same module, written from the formulas of Kenward & Molenberghs (1998) and
Neudecker & Satorra (1991) with whole (q, p, p) derivative matrices (``model.jacobian``), whose weight matrix is
itself checked pattern by pattern and trace by trace in test_fiml_many_items.py; the rank-two route must give its
values to 1e-10 (relative), for models with means, equal parameters, a correlated residual, a higher-order factor
and two groups with equal loadings."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
import cfa_tool.estimation.fiml as fiml
from cfa_tool.data.moments import sample_moments
from cfa_tool.pipeline.continuous import FitOptions, estimate

ONE_GROUP = ("factor F1: y1..y4\nfactor F2: y5..y9\ncovary y2, y6\n"
             "equal loading(F1, y3), loading(F1, y4)\n")
HIGHER_ORDER = "factor F1: y1..y3\nfactor F2: y4..y6\nfactor F3: y7..y9\nfactor G: F1, F2, F3\n"
TWO_GROUPS = "factor F1: y1..y4\nfactor F2: y5..y9\nequal across groups: loadings, intercepts\n"


def _rows(n: int, seed: int, shift: float = 0.0) -> pd.DataFrame:
    """Nine items of two correlated factors (loadings .6 to .8), 8% of answers missing at random; a test helper."""
    rng = np.random.default_rng(seed)
    factors = rng.multivariate_normal(np.zeros(2), [[1.0, 0.4], [0.4, 1.0]], size=n)
    loadings = np.linspace(0.6, 0.8, 9)
    X = shift + loadings * factors[:, (np.arange(9) >= 4).astype(int)] + 0.6 * rng.normal(size=(n, 9))
    X[rng.random((n, 9)) < 0.08] = np.nan
    return pd.DataFrame(X, columns=[f"y{j + 1}" for j in range(9)])


def _likelihood(model: str, groups: int):
    spec = cfa_tool.parse_model(model)
    moments = [(f"g{g}" if groups > 1 else None,
                sample_moments(_rows(300, 40 + g, 0.3 * g), spec.observed_names, "<frame>", missing="full-information"))
               for g in range(groups)]
    est = estimate(spec, moments, FitOptions(missing="full-information", diagnostics=False))
    return est.likelihood, est.theta


def _general_route(monkeypatch) -> None:
    monkeypatch.setattr(fiml.MissingDataLikelihood, "_rank_two_model", property(lambda self: False), raising=False)


def _close(found: np.ndarray, expected: np.ndarray) -> bool:
    return bool(np.abs(found - expected).max() <= 1e-10 * np.abs(expected).max())


@pytest.mark.parametrize("model, groups", [(ONE_GROUP, 1), (HIGHER_ORDER, 1), (TWO_GROUPS, 2)],
                         ids=["means-equal-covary", "higher-order", "two-groups"])
def test_the_rank_two_route_is_the_general_one(monkeypatch, model, groups):
    likelihood, estimate_theta = _likelihood(model, groups)
    assert likelihood._rank_two_model
    # at the estimate and away from it (where the gradient and the residual terms are far from zero)
    moved = estimate_theta + 0.05 * np.random.default_rng(3).normal(size=len(estimate_theta))
    found = []
    for theta in (estimate_theta, moved):
        likelihood._at = None
        found.append((likelihood.evaluate(theta), likelihood.observed_hessian(theta)))
    with monkeypatch.context() as patch:
        _general_route(patch)
        for (evaluation, hessian), theta in zip(found, (estimate_theta, moved)):
            likelihood._at = None
            general = likelihood.evaluate(theta)
            assert evaluation.value == general.value
            # at the estimate the gradient is near zero, a difference of terms of order one: compared on that scale
            assert np.abs(evaluation.gradient - general.gradient).max() <= 1e-10 * max(
                1.0, np.abs(general.gradient).max())
            assert _close(evaluation.information, general.information)
            assert _close(hessian, likelihood.observed_hessian(theta))
    assert np.abs(found[1][0].gradient).max() > 1e-3  # away from the estimate: a gradient to compare


def test_a_fit_with_gaps_makes_no_weight_matrix_of_the_patterns(monkeypatch):
    # the fit's search, standard errors and modification indices (the evaluations, the observed Hessian and the score
    # tests) never reach the general route's products with the patterns' (p*p, p*p) weight matrix, and give what
    # that route gives
    frame = _rows(300, 44)
    reference = None
    with monkeypatch.context() as patch:
        _general_route(patch)
        reference = cfa_tool.fit(ONE_GROUP, frame, missing="full-information", diagnostics=False)

    def refused(*args, **kwargs):
        raise AssertionError("the patterns' weight matrix was used")

    monkeypatch.setattr(fiml, "_trace_products", refused)
    result = cfa_tool.fit(ONE_GROUP, frame, missing="full-information", diagnostics=False)  # modification indices too
    assert result.converged
    assert abs(result.fit.chi_square - reference.fit.chi_square) < 1e-8 * reference.fit.chi_square
    assert np.allclose([e.estimate for e in result.estimates], [e.estimate for e in reference.estimates], rtol=0,
                       atol=1e-8)
    assert np.allclose([e.se for e in result.estimates], [e.se for e in reference.estimates], rtol=1e-7, atol=0,
                       equal_nan=True)
    assert np.allclose(result.modification_indices.index, reference.modification_indices.index, rtol=1e-7, atol=0)


@pytest.mark.parametrize("model, group", [(ONE_GROUP, None), (HIGHER_ORDER, None), (TWO_GROUPS, "site")],
                         ids=["means-equal-covary", "higher-order", "two-groups"])
def test_the_score_tests_from_rank_two_gathers_are_the_general_ones(monkeypatch, model, group):
    # modification indices with gaps: the candidates' cross-information in the rank-m form of the patterns' V' A_k V
    # (fiml.low_rank_pair_sums), against the general route's whole derivative matrices
    frame = _rows(300, 44)
    if group is not None:
        frame = pd.concat([frame, _rows(300, 45, 0.3)], ignore_index=True)
        frame.insert(0, "site", np.repeat(["north", "south"], 300))
    found = cfa_tool.fit(model, frame, missing="full-information", group=group)
    with monkeypatch.context() as patch:
        _general_route(patch)
        general = cfa_tool.fit(model, frame, missing="full-information", group=group)
    for attr in ("index", "expected_change", "standardized_expected_change"):
        mine = np.asarray(getattr(found.modification_indices, attr), float)
        theirs = np.asarray(getattr(general.modification_indices, attr), float)
        assert len(theirs) > 20 and np.array_equal(np.isnan(mine), np.isnan(theirs))
        assert np.nanmax(np.abs(mine - theirs)) <= 1e-10 * np.nanmax(np.abs(theirs))


def test_which_likelihoods_offer_the_rank_two_score_tests():
    # assessment.modification reads which route by the objective's score_route: a StructuredModel's likelihood and
    # the joint model of missing-data helpers (its own rank-two layout since large-s22,
    # tests/estimation/test_fiml_without_weight_matrix.py) offer them; a model without a layout does not
    from cfa_tool.estimation.auxiliary import AuxiliaryLikelihood, JointModel
    from cfa_tool.estimation.objective import ScoreRoute
    from cfa_tool.model.implied import StructuredModel

    joint = object.__new__(AuxiliaryLikelihood)
    joint.model = object()
    assert joint.score_route is ScoreRoute.GENERAL and not hasattr(joint, "candidate_scores")
    joint.model = object.__new__(JointModel)
    assert joint.score_route is ScoreRoute.RANK_TWO and hasattr(joint, "candidate_scores")
    plain = object.__new__(fiml.MissingDataLikelihood)
    plain.model = object.__new__(StructuredModel)
    assert plain.score_route is ScoreRoute.RANK_TWO and hasattr(plain, "candidate_scores")
