"""The strictly positive scaled difference (Satorra & Bentler 2010) written out by hand with numpy and scipy on a
small case, complete rows: two factors of three items each, held uncorrelated in the restricted model.

c_d = (r0 c0 - r1 c10) / (r0 - r1), c = tr(U Gamma) / r, U = V - V D (D'VD)^-1 D'V with D the derivatives of
vech(Sigma) at the restricted model's estimates (for c10: the general model's, at the same implied Sigma) and Gamma
the covariance of the rows' vech((x - xbar)(x - xbar)') (Browne 1984; Satorra & Bentler 1994, 2001, 2010).  V is
one matrix for both factors: the normal-theory weight 1/2 D_p'(A (x) A) D_p, A = Sigma^-1 at the restricted model's
implied Sigma for the ordinary (Satorra-Bentler) fits, whose c0 is then the fit's own factor, and at the sample
covariance S for full-information fits (inference.robust_missing.scaling_at: the rows' observed information at the
saturated moments, which with complete rows is this weight at S).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy.optimize import minimize

from cfa_tool.workflows.compare import compare

P = 6
ROWS, COLS = np.tril_indices(P)


def _vech(S: np.ndarray) -> np.ndarray:
    return S[ROWS, COLS]


def _unvech(v: np.ndarray) -> np.ndarray:
    S = np.zeros((P, P))
    S[ROWS, COLS] = v
    S[COLS, ROWS] = v
    return S


def _sigma(t: np.ndarray, restricted: bool) -> np.ndarray:
    """Marker loadings (x1, x4), loadings t[0:4], factor variances t[4:6], their covariance (general model only),
    residual variances."""
    lam = np.zeros((P, 2))
    lam[[0, 3], [0, 1]] = 1.0
    lam[[1, 2, 4, 5], [0, 0, 1, 1]] = t[:4]
    covariance = 0.0 if restricted else t[6]
    residuals = t[6:] if restricted else t[7:]
    return lam @ np.array([[t[4], covariance], [covariance, t[5]]]) @ lam.T + np.diag(residuals)


def _discrepancy(S: np.ndarray, sigma: np.ndarray) -> float:
    """The ML discrepancy log|Sigma| + tr(S Sigma^-1) - log|S| - p."""
    sign, logdet = np.linalg.slogdet(sigma)
    if sign <= 0:
        return 1e10
    return logdet + np.trace(S @ np.linalg.inv(sigma)) - np.linalg.slogdet(S)[1] - P


def _fit(S: np.ndarray, restricted: bool) -> tuple[np.ndarray, float]:
    start = np.concatenate([np.ones(4), [0.5, 0.5], [] if restricted else [0.1], np.full(P, 0.5)])
    found = minimize(lambda t: _discrepancy(S, _sigma(t, restricted)), start, method="BFGS",
                     options=dict(gtol=1e-10, maxiter=10_000))
    return found.x, found.fun


def _derivatives(t: np.ndarray, restricted: bool, h: float = 1e-6) -> np.ndarray:
    return np.column_stack([(_vech(_sigma(t + h * e, restricted)) - _vech(_sigma(t - h * e, restricted))) / (2 * h)
                            for e in np.eye(len(t))])


def _normal_weight(sigma: np.ndarray) -> np.ndarray:
    A = np.linalg.inv(sigma)
    E = [_unvech(e) for e in np.eye(len(ROWS))]
    return np.array([[0.5 * np.trace(A @ a @ A @ b) for b in E] for a in E])


def _trace_u_gamma(V: np.ndarray, D: np.ndarray, gamma: np.ndarray) -> float:
    return float(np.trace((V - V @ D @ np.linalg.solve(D.T @ V @ D, D.T @ V)) @ gamma))


@pytest.fixture(scope="module")
def normal_rows() -> np.ndarray:
    """20,000 normal rows, two factors correlating .5 (so that holding them uncorrelated fits very badly)."""
    lam = np.array([[1, 0], [.8, 0], [.9, 0], [0, 1], [0, .8], [0, .9]])
    population = lam @ np.array([[1, .5], [.5, 1]]) @ lam.T + np.diag(np.full(P, 0.6))
    return np.random.default_rng(7).multivariate_normal(np.zeros(P), population, 20_000)


def _hand_corrections(rows: np.ndarray) -> tuple[float, dict[str, float]]:
    """(the likelihood-ratio difference, c_d with V at the restricted model's Sigma and with V at S)."""
    n = len(rows)
    centred = rows - rows.mean(axis=0)
    S = centred.T @ centred / n
    gamma = np.cov(np.array([_vech(np.outer(x, x)) for x in centred]).T, bias=True)
    t0, f0 = _fit(S, True)
    _, f1 = _fit(S, False)
    t10 = np.concatenate([t0[:6], [0.0], t0[6:]])  # the general model at the restricted estimates (M10)
    assert np.allclose(_sigma(t10, False), _sigma(t0, True))
    D0, D10 = _derivatives(t0, True), _derivatives(t10, False)
    r0, r1 = len(ROWS) - len(t0), len(ROWS) - len(t10)
    corrections = {}
    for where, V in (("restricted", _normal_weight(_sigma(t0, True))), ("sample", _normal_weight(S))):
        corrections[where] = (_trace_u_gamma(V, D0, gamma) - _trace_u_gamma(V, D10, gamma)) / (r0 - r1)
    return n * (f0 - f1), corrections


def test_the_strictly_positive_difference_by_hand(normal_rows):
    lr, by_hand = _hand_corrections(normal_rows)
    data = pd.DataFrame(normal_rows, columns=[f"x{k}" for k in range(1, 7)])
    model = "factor a: x1..x3\nfactor b: x4..x6\n"
    for missing, where in ((None, "restricted"), ("full-information", "sample")):
        result = compare([model + "uncorrelated a, b\n", model], data, test="robust", missing=missing)
        tests = {t.method.name: t for t in result.tests}
        assert tests["LIKELIHOOD_RATIO"].chi_square_difference == pytest.approx(lr, rel=1e-6)
        positive = tests["SATORRA_BENTLER_2010"]
        assert lr / positive.chi_square_difference == pytest.approx(by_hand[where], rel=1e-5), missing


def test_on_normal_rows_the_full_information_correction_stays_near_one_however_bad_the_fit(normal_rows):
    # normal rows need no correction: the likelihood-ratio difference is the right test (Steiger, Shapiro & Browne
    # 1985), and with V at S and Gamma estimating V(S)^-1 (normality; Browne 1984) tr(U Gamma) estimates r whatever
    # D, so c_d estimates 1 however far the restricted model is from the data.  Before this session the full-
    # information version took V at the restricted model's moments with the residual term of the observed
    # information: 0.39 here, a scaled difference 2.5 times the unscaled one (9,202 against 3,631 on 1 df)
    lr, by_hand = _hand_corrections(normal_rows)
    assert by_hand["sample"] == pytest.approx(1.0, abs=0.05)  # tolerance: the spread of Gamma's estimate at n=20,000
    data = pd.DataFrame(normal_rows, columns=[f"x{k}" for k in range(1, 7)])
    model = "factor a: x1..x3\nfactor b: x4..x6\n"
    result = compare([model + "uncorrelated a, b\n", model], data, test="robust", missing="full-information")
    positive = next(t for t in result.tests if t.method.name == "SATORRA_BENTLER_2010")
    assert lr / positive.chi_square_difference == pytest.approx(1.0, abs=0.05)
