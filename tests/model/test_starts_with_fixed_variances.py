"""Start values and fits of models with fixed variances: higher-order factors whose disturbance is fixed (at 0,
making the factor below a multiple of the one above, or at another value), fixed factor variances under every
scaling, items' residual variances fixed at 0 (a perfect indicator) or at a value, a fixed factor covariance,
a fixed loading other than the marker, two-indicator factors and factors of two factors, a third-order factor.

Each model that can be estimated is checked against an independent minimisation, written here with numpy and
scipy, of the maximum likelihood discrepancy F = log|Sigma| + tr(S Sigma^-1) - log|S| - p (Joreskog 1969) for
the all-latent model Sigma = L (I - B)^-1 Psi (I - B)^-T L' + Theta (Bollen 1989, ch. 8), with the model's
constraints written out by hand below (the markers the tool adds included), and started from values of its own.
The tool must reach the same minimum (chi-square = N F with S of divisor N) and the same estimates.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.moments import sample_moments
from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.starts import starting_values
from cfa_tool.pipeline.continuous import model_structure

ITEMS = [f"{f}{i}" for f in "abc" for i in range(1, 5)]
FIRST = {f: [f"{f}{i}" for i in range(1, 5)] for f in "abc"}
THREE = "factor a: a1..a4\nfactor b: b1..b4\nfactor c: c1..c4\n"
HIGHER = THREE + "factor g: a, b, c\n"


def _data() -> pd.DataFrame:
    """Three facets of four items under one general factor, N = 500 (seeded; population paths .8, .7, .6,
    loadings .7, residual variances .36)."""
    rng = np.random.default_rng(5)
    n = 500
    general = rng.standard_normal(n)
    facets = np.column_stack([0.8 * general, 0.7 * general, 0.6 * general]) + rng.standard_normal((n, 3)) * np.sqrt(
        [0.36, 0.51, 0.64])
    X = np.column_stack([0.7 * facets[:, j] + 0.6 * rng.standard_normal(n) for j in range(3) for _ in range(4)])
    return pd.DataFrame(X, columns=ITEMS)


@dataclass
class Reference:
    """A model written out by hand: each entry a fixed value or None (free).  ``paths`` (higher, lower);
    ``effects``: factors whose loadings average 1 (the last written as n minus the others; Little, Slegers &
    Card 2006)."""

    loadings: dict
    paths: dict = field(default_factory=dict)
    variances: dict = field(default_factory=dict)  # a factor's variance, or its disturbance below another
    covariances: dict = field(default_factory=dict)
    residuals: dict = field(default_factory=dict)
    effects: tuple = ()


def _reference(first: dict, higher: dict | None = None, *, markers: dict, variances: dict | None = None,
               loadings: dict | None = None, residuals: dict | None = None, covariances: dict | None = None,
               effects: tuple = ()) -> Reference:
    """``markers``: factor -> the indicator (item or lower factor) whose loading is fixed at 1; other loadings,
    paths, variances, residual variances and the covariances of the factors below no other are free unless
    given."""
    higher = higher or {}
    ref = Reference({(f, x): None for f, xs in first.items() for x in xs},
                    {(g, f): None for g, fs in higher.items() for f in fs}, effects=effects)
    for f, x in markers.items():
        (ref.paths if x in higher.get(f, ()) else ref.loadings)[(f, x)] = 1.0
    for key, value in (loadings or {}).items():
        (ref.paths if key[1] not in sum(first.values(), []) else ref.loadings)[key] = value
    factors = list(first) + list(higher)
    ref.variances = {f: (variances or {}).get(f) for f in factors}
    below = {f for fs in higher.values() for f in fs}
    top = [f for f in factors if f not in below]
    ref.covariances = {(f, h): (covariances or {}).get((f, h)) for i, f in enumerate(top) for h in top[i + 1:]}
    ref.residuals = {x: (residuals or {}).get(x) for xs in first.values() for x in xs}
    return ref


def _ml_minimum(ref: Reference, S: np.ndarray, items: list[str]) -> tuple[float, dict]:
    """The minimum of the ML discrepancy (Joreskog 1969) over the free entries of ``ref``, by BFGS (scipy)
    from loadings and paths of 0.8, variances of 0.4 (factors) and half of each item's variance (residuals);
    returns (F, {(kind, names): estimate})."""
    from scipy.optimize import minimize

    factors = list(dict.fromkeys([f for f, _ in ref.loadings] + [g for g, _ in ref.paths]
                                 + [f for _, f in ref.paths]))
    fi, xi = {f: k for k, f in enumerate(factors)}, {x: k for k, x in enumerate(items)}
    p, m = len(items), len(factors)
    loads = {**ref.loadings, **ref.paths}
    dependent = {(f, x) for f in ref.effects for x in [x for g, x in loads if g == f][-1:]}
    entries = [("loading", k) for k, v in ref.loadings.items() if v is None and k not in dependent]
    entries += [("path", k) for k, v in ref.paths.items() if v is None and k not in dependent]
    entries += [("variance", k) for k, v in ref.variances.items() if v is None]
    entries += [("covariance", k) for k, v in ref.covariances.items() if v is None]
    entries += [("residual", k) for k, v in ref.residuals.items() if v is None]
    start = np.array([0.8 if kind in ("loading", "path") else 0.4 if kind == "variance" else 0.0
                      if kind == "covariance" else 0.5 * S[xi[k], xi[k]] for kind, k in entries])

    def matrices(theta):
        value = dict(zip(entries, theta))
        L, B, P, T = np.zeros((p, m)), np.zeros((m, m)), np.zeros((m, m)), np.zeros((p, p))
        for (f, x), v in ref.loadings.items():
            if (f, x) not in dependent:
                L[xi[x], fi[f]] = value[("loading", (f, x))] if v is None else v
        for (g, f), v in ref.paths.items():
            if (g, f) not in dependent:
                B[fi[f], fi[g]] = value[("path", (g, f))] if v is None else v
        for f, x in dependent:
            if x in xi:
                others = [xi[y] for g, y in ref.loadings if g == f and y != x]
                L[xi[x], fi[f]] = len(others) + 1 - L[others, fi[f]].sum()
            else:
                others = [fi[y] for g, y in ref.paths if g == f and y != x]
                B[fi[x], fi[f]] = len(others) + 1 - B[others, fi[f]].sum()
        for f, v in ref.variances.items():
            P[fi[f], fi[f]] = value[("variance", f)] if v is None else v
        for (f, h), v in ref.covariances.items():
            P[fi[f], fi[h]] = P[fi[h], fi[f]] = value[("covariance", (f, h))] if v is None else v
        for x, v in ref.residuals.items():
            T[xi[x], xi[x]] = value[("residual", x)] if v is None else v
        return L, B, P, T

    logdet_S = np.linalg.slogdet(S)[1]

    def discrepancy(theta):
        L, B, P, T = matrices(theta)
        A = np.linalg.inv(np.eye(m) - B)
        sigma = L @ A @ P @ A.T @ L.T + T
        sign, logdet = np.linalg.slogdet(sigma)
        if sign <= 0:
            return 1e10
        return logdet + np.trace(np.linalg.solve(sigma, S)) - logdet_S - p

    best = minimize(discrepancy, start, method="BFGS", options={"gtol": 1e-10, "maxiter": 20000})
    L, B, P, T = matrices(best.x)
    out = {("loading", (f, x)): L[xi[x], fi[f]] for f, x in ref.loadings}
    out |= {("loading", (g, f)): B[fi[f], fi[g]] for g, f in ref.paths}
    out |= {("factor_variance", (f,)): P[fi[f], fi[f]] for f in ref.variances}
    out |= {("factor_covariance", (f, h)): P[fi[f], fi[h]] for f, h in ref.covariances}
    out |= {("residual_variance", (x,)): T[xi[x], xi[x]] for x in ref.residuals}
    return float(best.fun), out


D0 = _reference(FIRST, {"g": ["a", "b", "c"]}, markers={"a": "a1", "b": "b1", "c": "c1", "g": "a"},
                variances={"a": 0.0})
CASES = {
    # the issue: a first-order factor that is a multiple of the higher-order factor (its marker fixed by hand)
    "disturbance 0": (HIGHER + "fix variance(a) = 0\nfix loading(a, a1) = 1\n", D0),
    # a fixed disturbance other than 0 sets the factor's scale in place of the marker
    "disturbance 0.2": (HIGHER + "fix variance(a) = 0.2\n",
                        _reference(FIRST, {"g": ["a", "b", "c"]}, markers={"b": "b1", "c": "c1", "g": "a"},
                                   variances={"a": 0.2})),
    "disturbance 0.2 and a marker": (HIGHER + "fix variance(a) = 0.2\nfix loading(a, a1) = 1\n",
                                     _reference(FIRST, {"g": ["a", "b", "c"]},
                                                markers={"a": "a1", "b": "b1", "c": "c1", "g": "a"},
                                                variances={"a": 0.2})),
    "variance 1, markers": (HIGHER + "fix variance(b) = 1\n",
                            _reference(FIRST, {"g": ["a", "b", "c"]}, markers={"a": "a1", "c": "c1", "g": "a"},
                                       variances={"b": 1.0})),
    "variance 1, variance scaling": (HIGHER + "fix variance(b) = 1\nscale latent by variance\n",
                                     _reference(FIRST, {"g": ["a", "b", "c"]}, markers={},
                                                variances={f: 1.0 for f in "abcg"})),
    "variance 1, effects coding": (HIGHER + "fix variance(b) = 1\nscale latent by effects\n",
                                   _reference(FIRST, {"g": ["a", "b", "c"]}, markers={}, variances={"b": 1.0},
                                              effects=("a", "c", "g"))),
    "perfect indicator": (HIGHER + "fix variance(a2) = 0\n",
                          _reference(FIRST, {"g": ["a", "b", "c"]},
                                     markers={"a": "a1", "b": "b1", "c": "c1", "g": "a"}, residuals={"a2": 0.0})),
    "residual variance 0.3": (THREE + "fix variance(b3) = 0.3\n",
                              _reference(FIRST, markers={"a": "a1", "b": "b1", "c": "c1"}, residuals={"b3": 0.3})),
    "factor covariance": (THREE + "fix covariance(a, b) = 0.2\n",
                          _reference(FIRST, markers={"a": "a1", "b": "b1", "c": "c1"},
                                     covariances={("a", "b"): 0.2})),
    # a fixed loading other than the marker scales the factor in the marker's place
    "fixed loading": (HIGHER + "fix loading(a, a3) = 0.7\n",
                      _reference(FIRST, {"g": ["a", "b", "c"]}, markers={"b": "b1", "c": "c1", "g": "a"},
                                 loadings={("a", "a3"): 0.7})),
    "two-indicator factor": ("factor a: a1, a2\nfactor b: b1..b4\nfactor c: c1..c4\nfactor g: a, b, c\n",
                             _reference({"a": ["a1", "a2"], "b": FIRST["b"], "c": FIRST["c"]},
                                        {"g": ["a", "b", "c"]}, markers={"a": "a1", "b": "b1", "c": "c1", "g": "a"})),
    # six two-item factors, three factors of two of them, one factor of those three; the middle level's
    # disturbance of one factor fixed at 0 with its marker fixed by hand
    "third order, disturbance 0": (
        "factor p: a1, a2\nfactor q: a3, a4\nfactor r: b1, b2\nfactor s: b3, b4\nfactor u: c1, c2\n"
        "factor v: c3, c4\nfactor ga: p, q\nfactor gb: r, s\nfactor gc: u, v\nfactor t: ga, gb, gc\n"
        "fix variance(ga) = 0\nfix loading(ga, p) = 1\n",
        _reference({"p": ["a1", "a2"], "q": ["a3", "a4"], "r": ["b1", "b2"], "s": ["b3", "b4"], "u": ["c1", "c2"],
                    "v": ["c3", "c4"]},
                   {"ga": ["p", "q"], "gb": ["r", "s"], "gc": ["u", "v"], "t": ["ga", "gb", "gc"]},
                   markers={"p": "a1", "q": "a3", "r": "b1", "s": "b3", "u": "c1", "v": "c3", "ga": "p",
                            "gb": "r", "gc": "u", "t": "ga"}, variances={"ga": 0.0})),
}


@pytest.mark.parametrize("name", CASES)
def test_fixed_variances_fit_at_the_minimum_of_an_independent_ml_minimisation(name):
    text, ref = CASES[name]
    data = _data()
    result = cfa_tool.fit(text, data, diagnostics=False, modification_indices=False)
    assert result.converged, result.message
    items = list(ref.residuals)
    S = np.cov(data[items].to_numpy(), rowvar=False, bias=True)  # divisor N, as ML uses
    F, expected = _ml_minimum(ref, S, items)
    # chi-square = N F at the minimum (Joreskog 1969)
    assert result.fit.chi_square == pytest.approx(len(data) * F, rel=1e-6, abs=1e-6)
    ours = {(r.kind, tuple(sorted(r.variables)) if r.kind == "factor_covariance" else tuple(r.variables)): r.estimate
            for r in result.estimates}
    assert set(ours) == set(expected)
    for key, value in expected.items():
        assert ours[key] == pytest.approx(value, rel=2e-3, abs=2e-4), key


def test_a_disturbance_fixed_at_0_starts_from_a_positive_definite_matrix_and_is_admissible():
    """The start values of the issue's model (they divided by the fixed disturbance of 0, and the search could not
    start) imply a positive-definite covariance matrix; the fitted solution, whose first-order factor is a
    multiple of the general one (standardized path 1), is admissible: a disturbance fixed at 0 is a constraint of
    the model, not an estimate at the boundary (a Heywood case)."""
    text = CASES["disturbance 0"][0]
    data = _data()
    spec = parse_model(text)
    table, model = model_structure(spec, None, False)
    moments = sample_moments(data, spec.observed_names, "<test>")
    start = starting_values(table, moments.covariance, moments.means)
    assert np.isfinite(start).all()
    sigma = model.implied(start)
    assert np.linalg.eigvalsh(sigma)[0] > 0
    result = cfa_tool.fit(text, data)
    assert result.admissible and not result.problems
    path = next(r for r in result.estimates if r.kind == "loading" and tuple(r.variables) == ("g", "a"))
    assert path.standardized == pytest.approx(1.0, abs=1e-9)  # a = 1 * g exactly: its variance is g's


def test_a_disturbance_fixed_at_0_without_a_fixed_loading_names_the_line():
    """Without a fixed loading the factor has no scale (its loadings and its path trade off), under every
    scaling: a one-line model error at the 'fix' statement, never the estimation's failure."""
    for scaling in ("", "scale latent by variance\n", "scale latent by effects\n"):
        with pytest.raises(ModelError) as caught:
            cfa_tool.fit(HIGHER + scaling + "fix variance(a) = 0\n", _data())
        assert caught.value.location.line == 5 + bool(scaling)
        assert "sets no scale for 'a'" in str(caught.value)


def test_a_factor_of_two_factors_is_a_model_error_naming_its_line():
    with pytest.raises(ModelError) as caught:
        cfa_tool.fit("factor a: a1..a4\nfactor b: b1..b4\nfactor g: a, b\nfix variance(a) = 0\n"
                     "fix loading(a, a1) = 1\n", _data())
    assert caught.value.location.line == 3
    assert "two indicators and no correlation" in str(caught.value)


def test_a_first_order_factor_that_is_a_multiple_of_the_general_one_is_not_called_inadmissible(hs_data):
    """Holzinger & Swineford (1939) with the disturbance of textual fixed at 0: the factors' covariance matrix is
    singular by that constraint (textual's correlation with the general factor is 1), which rounding put an
    eigenvalue of -1e-17 below zero and flagged as 'not positive definite' (a structural zero is not a problem of
    the solution: the disturbances' matrix Psi, of which the factors' is (I - B)^-1 Psi (I - B)^-T, has the
    constraint's 0 on its diagonal and is positive definite elsewhere; Bollen 1989, ch. 8)."""
    result = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
                          "factor general: visual, textual, speed\nfix variance(textual) = 0\n"
                          "fix loading(textual, x4) = 1\n", hs_data)
    # no problem of the solution; the constraint fits these data poorly, which the report cautions about
    assert result.converged and result.admissible, result.problems
    assert [p.kind.value for p in result.problems] in ([], ["poor fit"]), result.problems
    path = next(r for r in result.estimates if r.kind == "loading" and tuple(r.variables) == ("general", "textual"))
    assert path.standardized == pytest.approx(1.0, abs=1e-9)
