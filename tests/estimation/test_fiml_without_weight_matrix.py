"""Full-information routes that made the patterns' (p*p, p*p) weight matrix until large-s22, now gathers:

* the joint model of missing-data helpers (estimation/auxiliary.py, Graham 2003's saturated correlates) and its
  baseline (Savalei & Bentler 2009): their search's gradient and information, the observed Hessian and the
  modification indices from rank-two gathers pattern by pattern, as the model without helpers has them
  (K_k = V' A_k V over the joint basis [[V, 0], [0, I]]);
* the information of the saturated moments (mu, vech Sigma), observed and patterns-fixed, which the Yuan-Bentler
  test, the robust standard errors and the robust (design-based) score tests read
  (estimation.fiml.moment_second_derivatives: tr(X E_ij Y E_lm) = X_mi Y_jl gathered, no directions' array).

The reference is the general route of estimation/fiml.py (whole (q, p, p) derivatives times the weight matrix, from
the formulas of Kenward & Molenberghs 1998 and Neudecker & Satorra 1991), itself checked against differences of the
gradient in test_auxiliary.py and trace by trace in test_fiml_many_items.py; the new routes must give its values to
1e-10 (relative), and the fits must not touch the weight matrix at all."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
import cfa_tool.estimation.fiml as fiml
from cfa_tool.data.moments import moments_with_gaps
from cfa_tool.data.patterns import pattern_data
from cfa_tool.inference.robust import vech_indices
from cfa_tool.language.parser import parse_model
from cfa_tool.pipeline.continuous import FitOptions, estimate

TWO_FACTORS = "factor F1: y1..y4\nfactor F2: y5..y8\ncovary y2, y6\nequal loading(F1, y3), loading(F1, y4)\n"
HIGHER_ORDER = "factor F1: y1..y3\nfactor F2: y4..y6\nfactor F3: y7..y8\nfactor G: F1, F2, F3\n"


def _rows(n: int, seed: int, shift: float = 0.0) -> pd.DataFrame:
    """Eight items of two correlated factors, two helpers that go with the answers and with their being missing,
    10% of answers missing at random and 15% of one helper's; invented, a test helper."""
    rng = np.random.default_rng(seed)
    factors = rng.multivariate_normal(np.zeros(2), [[1.0, 0.4], [0.4, 1.0]], size=n)
    loadings = np.linspace(0.6, 0.8, 8)
    X = shift + loadings * factors[:, (np.arange(8) >= 4).astype(int)] + 0.6 * rng.normal(size=(n, 8))
    age = 0.5 * factors[:, 0] + rng.normal(size=n)
    visits = 0.3 * X[:, 5] + rng.normal(size=n)
    X[rng.random((n, 8)) < 0.10] = np.nan
    X[age > 1.2, 0] = np.nan
    frame = pd.DataFrame(X, columns=[f"y{j + 1}" for j in range(8)])
    frame["age"] = age
    frame["visits"] = np.where(rng.random(n) < 0.15, np.nan, visits)
    return frame


def _general_route(monkeypatch) -> None:
    monkeypatch.setattr(fiml.MissingDataLikelihood, "_rank_two_model", property(lambda self: False), raising=False)


def _close(found: np.ndarray, expected: np.ndarray, tolerance: float = 1e-10) -> bool:
    return bool(np.abs(found - expected).max() <= tolerance * np.abs(expected).max())


def _no_weight_matrix(monkeypatch) -> None:
    """Every way the general route makes the patterns' weight matrix (whole or a block of it) raises."""
    def refused(*args, **kwargs):
        raise AssertionError("the patterns' (p*p, p*p) weight matrix was made")

    for name in ("_trace_products", "_trace_weights", "_weight_block", "pattern_outer"):
        monkeypatch.setattr(fiml, name, refused)


HELPERS = ("age", "visits")


def _helper_fit(model: str, frame: pd.DataFrame, group: str | None = None):
    return cfa_tool.fit(model, frame, group=group, missing="full-information", missing_helpers=list(HELPERS))


def _joint_fit(model: str, frames: list[pd.DataFrame]):
    """The joint fit of items and helpers (estimation.auxiliary.AuxiliaryFit) of each frame a group."""
    names = tuple(f"y{j + 1}" for j in range(8)) + HELPERS
    moments = [(f"s{g}" if len(frames) > 1 else None, moments_with_gaps(f[list(names)].to_numpy(), names, "<frame>"))
               for g, f in enumerate(frames)]
    return estimate(parse_model(model), moments, FitOptions(missing="full-information", missing_helpers=HELPERS,
                                                            diagnostics=False)).auxiliary


@pytest.mark.parametrize("model, groups", [(TWO_FACTORS, 1), (HIGHER_ORDER, 1), (TWO_FACTORS, 2)],
                         ids=["means-equal-covary", "higher-order", "two-groups"])
def test_the_helpers_joint_likelihood_takes_the_rank_two_route_exactly(monkeypatch, model, groups):
    frames = [_rows(260, 11 + g, 0.3 * g) for g in range(groups)]
    frame = pd.concat([f.assign(site=f"s{g}") for g, f in enumerate(frames)], ignore_index=True)
    group = "site" if groups > 1 else None
    result = _helper_fit(model, frame, group)
    joint = _joint_fit(model, frames)
    likelihood = joint.likelihood
    assert likelihood._rank_two_model and hasattr(likelihood, "candidate_scores")
    rng = np.random.default_rng(5)
    points = [joint.theta, joint.theta + 0.02 * rng.normal(size=len(joint.theta))]
    found = [(likelihood.evaluate(t), likelihood.observed_hessian(t)) for t in points]
    with monkeypatch.context() as patch:
        _general_route(patch)
        assert not likelihood._rank_two_model and not hasattr(likelihood, "candidate_scores")
        likelihood._at = None
        expected = [(likelihood.evaluate(t), likelihood.observed_hessian(t)) for t in points]
        general = _helper_fit(model, frame, group)
    for (ev, hessian), (ev_ref, hessian_ref) in zip(found, expected):
        assert ev.value == ev_ref.value
        # at the estimate the gradient is about 1e-11: compared on the scale of the information there
        assert np.abs(ev.gradient - ev_ref.gradient).max() <= 1e-10 * max(np.abs(ev_ref.gradient).max(), 1e-3)
        assert _close(ev.information, ev_ref.information)
        assert _close(hessian, hessian_ref)
    # the whole fit: the same minimum, standard errors, baseline (its own joint search) and modification indices
    assert result.fit.chi_square == pytest.approx(general.fit.chi_square, rel=1e-8)
    assert result.fit.baseline_chi_square == pytest.approx(general.fit.baseline_chi_square, rel=1e-8)
    assert [e.se for e in result.estimates if e.free] == pytest.approx(
        [e.se for e in general.estimates if e.free], rel=1e-6)
    found_mi, expected_mi = result.modification_indices, general.modification_indices
    assert len(found_mi) == len(expected_mi) > 10
    assert _close(np.sort(found_mi.index), np.sort(expected_mi.index), 1e-6)


def _moment_pieces(p: int = 7, n: int = 90, seed: int = 3):
    rng = np.random.default_rng(seed)
    sigma = np.cov(rng.normal(size=(p, 3 * p)))
    x = rng.multivariate_normal(np.zeros(p), sigma, size=n)
    x[rng.random((n, p)) < 0.2] = np.nan
    x = x[~np.isnan(x).all(axis=1)]
    data = pattern_data(x)
    mu = 0.1 * rng.normal(size=p)
    A, _ = fiml.embedded_inverse(sigma, data.observed)
    dev = np.where(data.observed, data.means - mu, 0.0)
    T = data.scatter + dev[:, :, None] * dev[:, None, :]
    return data, mu, sigma, A, data.counts / data.counts.sum(), A @ T @ A, (A @ dev[:, :, None])[:, :, 0]


def _moment_directions(p: int, rows: np.ndarray, cols: np.ndarray):
    """The general route's directions of beta = (mu, vech Sigma): unit means, E_ij + E_ji (E_ii on the diagonal)."""
    k = p + len(rows)
    d_sigma, d_mu = np.zeros((k, p, p)), np.zeros((k, p))
    d_mu[np.arange(p), np.arange(p)] = 1.0
    d_sigma[p + np.arange(len(rows)), rows, cols] = 1.0
    d_sigma[p + np.arange(len(rows)), cols, rows] = 1.0
    return d_sigma, d_mu


@pytest.mark.parametrize("order", ["vech", "rows-of-the-lower-triangle", "diagonal-only"])
def test_the_moments_information_is_the_general_routes_gathered(order):
    data, mu, sigma, A, w, ATA, Ad = _moment_pieces()
    p = len(mu)
    rows, cols = {"vech": vech_indices(p), "rows-of-the-lower-triangle": np.tril_indices(p),
                  "diagonal-only": (np.arange(p), np.arange(p))}[order]
    d_sigma, d_mu = _moment_directions(p, rows, cols)
    observed = fiml.moment_second_derivatives(A, w, rows, cols, ATA, Ad)
    assert _close(observed, fiml.first_order_hessian(A, w, ATA, Ad, d_sigma, d_mu))
    assert _close(fiml.moment_hessian(data, mu, sigma, rows, cols), observed)
    expected = fiml.MissingParts(None, None, A, w).information(d_sigma, d_mu)
    assert _close(fiml.moment_second_derivatives(A, w, rows, cols), expected)


def test_the_moments_information_is_gathered_a_block_of_rows_at_a_time(monkeypatch):
    data, mu, sigma, A, w, ATA, Ad = _moment_pieces()
    rows, cols = vech_indices(len(mu))
    whole = fiml.moment_second_derivatives(A, w, rows, cols, ATA, Ad)
    monkeypatch.setattr(fiml, "BLOCK_BYTES", 1)  # one row of the moments a block
    assert _close(fiml.moment_second_derivatives(A, w, rows, cols, ATA, Ad), whole, 1e-14)


def test_robust_and_design_based_fits_with_gaps_make_no_weight_matrix(monkeypatch):
    """The Yuan-Bentler test and robust standard errors, and a fit under clusters within strata (its design-based
    score tests as modification indices), take the gathered moments' information: the same figures as the general
    route (to 1e-9 here, through the scaling factors, standard errors and every index), never its weight matrix."""
    frame = _rows(300, 21)
    frame["school"] = np.arange(300) % 30
    frame["region"] = frame["school"] % 3
    items = frame.drop(columns=["age", "visits", "school", "region"])
    design = frame.drop(columns=["age", "visits"])

    def fits():
        robust = cfa_tool.fit(TWO_FACTORS, items, missing="full-information", test="robust")
        clustered = cfa_tool.fit(TWO_FACTORS, design, missing="full-information", cluster="school", strata="region")
        return robust, clustered

    expected = fits()
    with monkeypatch.context() as patch:
        _no_weight_matrix(patch)
        found = fits()
    for new, old in zip(found, expected):
        assert new.robust.scaling_factor == pytest.approx(old.robust.scaling_factor, rel=1e-9)
        assert [e.se for e in new.estimates if e.free] == pytest.approx([e.se for e in old.estimates if e.free],
                                                                        rel=1e-9)
        assert len(new.modification_indices) == len(old.modification_indices) > 10
        assert _close(new.modification_indices.index, old.modification_indices.index, 1e-9)


def test_a_fit_with_helpers_makes_no_weight_matrix(monkeypatch):
    _no_weight_matrix(monkeypatch)
    result = _helper_fit(TWO_FACTORS, _rows(260, 11))
    assert result.converged and len(result.modification_indices) > 10
    assert np.isfinite(result.fit.cfi)
