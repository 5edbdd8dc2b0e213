"""Modification indices of a fit with a missing-data helper (Graham 2003's saturated correlates), checked against
Rao's score statistic built here from the textbook pieces, with nothing of the tool's but the data: the joint
model's moments written out by hand, its full-information maximum likelihood found by scipy, the derivatives of
the moments by central differences, and the information of incomplete normal rows with the patterns of answers
held fixed (Little & Rubin 2002, ch. 9: per pattern, n_k [1/2 tr(S^-1 dS_a S^-1 dS_b) + dmu_a' S^-1 dmu_b]; the
expected information of Kenward & Molenberghs 1998, which the tool's full-information score tests take), the score
statistic g^2 / (I_cc - I_ct I_tt^-1 I_tc) (Rao 1948; Sorbom 1989 for freeing one fixed parameter)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy.optimize import minimize

import cfa_tool

MODEL = "factor F: y1, y2, y3, y4\n"


@pytest.fixture(scope="module")
def frame() -> pd.DataFrame:
    """One factor, four items whose y1 and y2 share a residual covariance (0.25) the model leaves out; y1 and y3
    missing where the helper 'age' is high (missing at random given the helper)."""
    rng = np.random.default_rng(7)
    n = 500
    f = rng.normal(size=n)
    shared = rng.normal(size=n)
    e = rng.normal(size=(n, 4)) * 0.6
    e[:, 0] += 0.5 * shared
    e[:, 1] += 0.5 * shared
    y = np.column_stack([0.8 * f, 0.7 * f, 0.75 * f, 0.65 * f]) + e
    age = 0.8 * y[:, 0] + 0.4 * y[:, 2] + rng.normal(size=n)
    y[age > np.quantile(age, 0.75), 0] = np.nan
    y[(age < np.quantile(age, 0.15)), 2] = np.nan
    out = pd.DataFrame(y, columns=["y1", "y2", "y3", "y4"])
    out["age"] = age
    return out


def _moments(t: np.ndarray, free_cov: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    """The covariance and means of y1..y4 (and the helper, when t has 18 entries): loadings (1, t0, t1, t2), factor
    variance t3, residual variances t4..t7, item means t8..t11; the helper's mean t12, its covariances with the items
    t13..t16, its variance t17; ``free_cov`` the residual covariance of y1 and y2 (fixed at 0 in the model)."""
    lam = np.array([1.0, t[0], t[1], t[2]])
    k = 5 if len(t) == 18 else 4
    sigma = np.empty((k, k))
    sigma[:4, :4] = t[3] * np.outer(lam, lam) + np.diag(t[4:8])
    sigma[0, 1] += free_cov
    sigma[1, 0] += free_cov
    if k == 4:
        return sigma, t[8:12].copy()
    sigma[:4, 4] = sigma[4, :4] = t[13:17]
    sigma[4, 4] = t[17]
    return sigma, np.concatenate([t[8:12], t[12:13]])


def _patterns(values: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
    seen = ~np.isnan(values)
    keys, inverse = np.unique(seen, axis=0, return_inverse=True)
    return [(key, values[inverse.ravel() == k][:, key]) for k, key in enumerate(keys)]


def _minus_log_likelihood(t: np.ndarray, patterns, free_cov: float = 0.0) -> float:
    sigma, mu = _moments(t, free_cov)
    return _rows_minus_log_likelihood(sigma, mu, patterns)


def _rows_minus_log_likelihood(sigma: np.ndarray, mu: np.ndarray, patterns) -> float:
    """Minus the normal log-likelihood of the rows (less its constant), each on the items it answers."""
    total = 0.0
    for key, rows in patterns:
        s, m = sigma[np.ix_(key, key)], mu[key]
        sign, logdet = np.linalg.slogdet(s)
        if sign <= 0:
            return 1e10
        dev = rows - m
        total += 0.5 * (len(rows) * logdet + np.einsum("ij,jk,ik->", dev, np.linalg.inv(s), dev))
    return total


def _rao(frame: pd.DataFrame, columns: list[str]) -> tuple[float, float]:
    """Rao's score statistic for freeing the residual covariance of y1 and y2, from the rows of ``columns`` (the
    items, and the helper when it is among them), and the log-likelihood at scipy's estimates."""
    patterns = _patterns(frame[columns].to_numpy())
    values = frame[columns].to_numpy()
    k = len(columns)
    start = np.concatenate([[0.9, 0.9, 0.8, 0.5], np.full(4, 0.5), np.nanmean(values[:, :4], axis=0)]
                           + ([[values[:, 4].mean()], np.zeros(4), [values[:, 4].var()]] if k == 5 else []))
    found = minimize(_minus_log_likelihood, start, args=(patterns,), method="BFGS",
                     options={"gtol": 1e-9, "maxiter": 5000})
    t = found.x
    sigma, mu = _moments(t)
    dirs = []  # the moments' derivatives in every parameter and the candidate, by central differences
    for a in range(len(t) + 1):
        up, down = t.copy(), t.copy()
        cu = cd = 0.0
        if a < len(t):
            up[a] += 1e-6
            down[a] -= 1e-6
        else:
            cu, cd = 1e-6, -1e-6
        (s1, m1), (s0, m0) = _moments(up, cu), _moments(down, cd)
        dirs.append(((s1 - s0) / 2e-6, (m1 - m0) / 2e-6))
    info = np.zeros((len(dirs), len(dirs)))
    for key, x in patterns:
        inv = np.linalg.inv(sigma[np.ix_(key, key)])
        ds = [d[0][np.ix_(key, key)] for d in dirs]
        dm = [d[1][key] for d in dirs]
        for a in range(len(dirs)):
            for b in range(a, len(dirs)):
                info[a, b] = info[b, a] = info[a, b] + len(x) * (
                    0.5 * np.trace(inv @ ds[a] @ inv @ ds[b]) + dm[a] @ inv @ dm[b])
    score = -(_minus_log_likelihood(t, patterns, 1e-6) - _minus_log_likelihood(t, patterns, -1e-6)) / 2e-6
    tt, tc = info[:-1, :-1], info[:-1, -1]
    log_likelihood = -found.fun - 0.5 * sum(len(x) * key.sum() * np.log(2 * np.pi) for key, x in patterns)
    return score**2 / (info[-1, -1] - tc @ np.linalg.solve(tt, tc)), log_likelihood


@pytest.mark.parametrize("helpers", [(), ("age",)])
def test_the_modification_index_with_gaps_is_raos_score_statistic(frame, helpers):
    """With and without the helper: the tool's index against Rao's statistic (the patterns-fixed information)."""
    result = cfa_tool.fit(MODEL, frame, missing_helpers=list(helpers) or None)
    ours = {(m.kind, m.variables): m.index for m in result.modification_indices}
    rao, log_likelihood = _rao(frame, ["y1", "y2", "y3", "y4", *helpers])
    assert result.fit.log_likelihood == pytest.approx(log_likelihood, rel=1e-8)  # the same estimates
    assert rao > 10  # the covariance the data were drawn with (0.25 at N = 500; a floor of this test's design)
    assert ours[("residual_covariance", ("y1", "y2"))] == pytest.approx(rao, rel=1e-5)


def test_helpers_change_the_modification_indices(frame):  # the outside check is Rao's statistic, above
    without = {(m.kind, m.variables): m.index for m in cfa_tool.fit(MODEL, frame).modification_indices}
    with_helper = {(m.kind, m.variables): m.index
                   for m in cfa_tool.fit(MODEL, frame, missing_helpers="age").modification_indices}
    assert set(without) == set(with_helper)
    assert with_helper[("residual_covariance", ("y1", "y2"))] != pytest.approx(
        without[("residual_covariance", ("y1", "y2"))], rel=1e-3)


def test_the_table_says_what_the_indices_assume_with_gaps(frame, hs_data):
    """With rows with gaps (with or without helpers) the note under the indices says they rest on the patterns-fixed
    information (missing completely at random) and that comparing fits tests a freed parameter under MAR; complete
    rows have no such sentence."""
    from cfa_tool.reporting.tables import modification_table

    said = ("With rows with gaps the indices rest on the information with the patterns of answers held fixed, which "
            "holds when answers are missing completely at random (Kenward & Molenberghs 1998); ")
    plain = " ".join(str(modification_table(cfa_tool.fit(MODEL, frame)).note).split())
    assert said + "freeing a parameter and comparing the two fits ('cfa-tool compare') tests it when" in plain
    # compare does not take missing-data helpers (review s14): the way out is two fits with the same helpers
    helped = " ".join(str(modification_table(cfa_tool.fit(MODEL, frame, missing_helpers="age")).note).split())
    assert said + "refitting with the parameter freed and the same missing-data helpers and taking the difference" \
        in helped
    complete = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n",
                            hs_data)
    assert "patterns of answers held fixed" not in modification_table(complete).note
