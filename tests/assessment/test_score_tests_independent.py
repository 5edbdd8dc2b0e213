"""The modification indices of complete-data ML against Sorbom's (1989) score statistic written out independently.

For a parameter psi_c held at zero, with F = log|Sigma| + tr(S Sigma^-1) - log|S| - p (S with divisor N) and the
log-likelihood -(N/2) F, the score test is (Sorbom 1989, eq. 4; the Lagrange multiplier of Bentler 1986)

    MI_c = (N / 2) g_c^2 / (H_cc - H_c. H_..^-1 H_.c),

g_c = tr[Sigma^-1 (Sigma - S) Sigma^-1 dSigma/dpsi_c], H_kl = tr[Sigma^-1 dSigma_k Sigma^-1 dSigma_l] (the expected
second derivatives of F; Browne & Arminger 1995), the free parameters' gradient being zero at the estimates.  Here
every derivative of Sigma = L Phi L' + Theta is written out as a dense p x p matrix from the estimates alone (no
code of the tool's derivatives, rank-two gathers or quadratic forms), for every candidate of Holzinger & Swineford's
(1939) three-factor model: 18 cross-loadings and 36 residual covariances.
"""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]
FACTORS = ["visual", "textual", "speed"]


def _unit(i: int, j: int, p: int) -> np.ndarray:
    E = np.zeros((p, p))
    E[i, j] = 1.0
    return E


def test_every_modification_index_is_sorboms_statistic(hs_data):
    result = cfa_tool.fit(THREE_FACTORS, hs_data)
    p, m, n = len(ITEMS), len(FACTORS), len(hs_data)
    L, Phi, Theta = np.zeros((p, m)), np.zeros((m, m)), np.zeros((p, p))
    free = []  # each free parameter's dSigma
    for row in result.estimates:
        if row.kind == "loading":
            f, i = FACTORS.index(row.variables[0]), ITEMS.index(row.variables[1])
            L[i, f] = row.estimate
        elif row.kind == "factor_variance":
            f = FACTORS.index(row.variables[0])
            Phi[f, f] = row.estimate
        elif row.kind == "factor_covariance":
            f, g = FACTORS.index(row.variables[0]), FACTORS.index(row.variables[1])
            Phi[f, g] = Phi[g, f] = row.estimate
        elif row.kind == "residual_variance":
            i = ITEMS.index(row.variables[0])
            Theta[i, i] = row.estimate
    Sigma = L @ Phi @ L.T + Theta

    def loading(i, f):  # d(L Phi L')/d l_if = E_if Phi L' + L Phi E_fi
        E = np.zeros((p, m))
        E[i, f] = 1.0
        return E @ Phi @ L.T + L @ Phi @ E.T

    for row in result.estimates:
        if not row.free:
            continue
        if row.kind == "loading":
            free.append(loading(ITEMS.index(row.variables[1]), FACTORS.index(row.variables[0])))
        elif row.kind in ("factor_variance", "factor_covariance"):
            f, g = FACTORS.index(row.variables[0]), FACTORS.index(row.variables[-1])
            E = _unit(f, g, m) + (_unit(g, f, m) if f != g else 0)
            free.append(L @ E @ L.T)
        elif row.kind == "residual_variance":
            i = ITEMS.index(row.variables[0])
            free.append(_unit(i, i, p))
    assert len(free) == 21  # 6 loadings, 6 factor variances and covariances, 9 residual variances

    S = np.cov(hs_data[ITEMS].to_numpy(dtype=float), rowvar=False, bias=True)  # divisor N
    inv = np.linalg.inv(Sigma)
    A = [inv @ D for D in free]
    H = np.array([[np.trace(a @ b) for b in A] for a in A])
    H_inv = np.linalg.inv(H)
    residual = inv @ (Sigma - S) @ inv
    # the free parameters' gradient vanishes at the estimates (the minimum): checked, as the formula assumes it
    assert max(abs(np.trace(residual @ D)) for D in free) < 1e-5

    def statistic(D: np.ndarray) -> float:
        g = np.trace(residual @ D)
        a = inv @ D
        cross = np.array([np.trace(a @ b) for b in A])
        return n / 2 * g * g / (np.trace(a @ a) - cross @ H_inv @ cross)

    found = {(r.kind, r.variables): r.index for r in result.modification_indices}
    expected = {}
    for f, factor in enumerate(FACTORS):
        for i, item in enumerate(ITEMS):
            if L[i, f] == 0.0:
                expected[("loading", (factor, item))] = statistic(loading(i, f))
    for i in range(p):
        for j in range(i + 1, p):
            expected[("residual_covariance", (ITEMS[i], ITEMS[j]))] = statistic(_unit(i, j, p) + _unit(j, i, p))
    assert len(expected) == 54 and set(found) == set(expected)
    for key, value in expected.items():
        # the estimates are read back from the result's rows (to the last bit), so only the order of the sums
        # differs from the tool's rank-two route
        assert found[key] == pytest.approx(value, rel=1e-9, abs=1e-9), key
    # and the best-known pair (recalled from memory of widely published analyses of these data)
    assert expected[("loading", ("visual", "x9"))] == pytest.approx(36.411, abs=5e-3)
    assert expected[("residual_covariance", ("x7", "x8"))] == pytest.approx(34.145, abs=5e-3)
