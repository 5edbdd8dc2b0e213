"""The robust invariance ladder against a direct numpy computation of the published formulas, on
Holzinger & Swineford (1939) grouped by school: each step's Satorra-Bentler scaling factor
(Satorra & Bentler 1994: c = tr(U Gamma) / df, U = W - W Delta (Delta' W Delta)^-1 Delta' W, with the
normal-theory weight W of the means and covariances and Gamma their asymptotic covariance from the rows'
fourth moments; several groups stack block-diagonally with weights n_g / N) and each step's scaled
difference (Satorra & Bentler 2001: c_d = (df0 c0 - df1 c1) / (df0 - df1), T_d = (T0 - T1) / c_d).

Nothing here comes from the tool but the estimates at which the formulas are evaluated: the model's moments,
their derivatives (central differences), W, Gamma, the chi-square and the scaling are computed below from the
raw rows.  The chi-square of each step is recomputed from those moments first, which checks that the
parameters were read as the tool fitted them."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS, holzinger_swineford

ITEMS = tuple(f"x{i}" for i in range(1, 10))
FACTORS = ("visual", "textual", "speed")
FREE_LOADINGS = (("visual", "x2"), ("visual", "x3"), ("textual", "x5"), ("textual", "x6"), ("speed", "x8"),
                 ("speed", "x9"))
#: the pieces each step holds equal across the two schools (Meredith 1993)
SHARED = {"configural": (), "metric": ("loadings",), "scalar": ("loadings", "intercepts"),
          "strict": ("loadings", "intercepts", "residuals")}


def _pieces(level: str, estimates, group: str) -> dict[str, np.ndarray]:
    """One group's free parameters of this step, in a fixed order, read from the step's estimates."""
    rows = {(e.kind, e.variables, e.group): e.estimate for e in estimates}
    out = {
        "loadings": np.array([rows[("loading", v, group)] for v in FREE_LOADINGS]),
        "intercepts": np.array([rows[("intercept", (x,), group)] for x in ITEMS]),
        "residuals": np.array([rows[("residual_variance", (x,), group)] for x in ITEMS]),
        "phi": np.array([rows[("factor_variance", (f,), group)] for f in FACTORS]
                        + [rows[("factor_covariance", pair, group)]
                           for pair in (("visual", "textual"), ("visual", "speed"), ("textual", "speed"))]),
    }
    if "intercepts" in SHARED[level]:  # the factor means are free in the second group once intercepts are equal
        out["means"] = np.array([rows[("mean", (f,), group)] for f in FACTORS])
    return out


def _implied(p: dict[str, np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
    """mu = nu + Lambda alpha, Sigma = Lambda Phi Lambda' + Theta (Bollen 1989)."""
    lam = np.zeros((9, 3))
    lam[[0, 3, 6], [0, 1, 2]] = 1.0
    for value, (factor, item) in zip(p["loadings"], FREE_LOADINGS):
        lam[ITEMS.index(item), FACTORS.index(factor)] = value
    phi = np.diag(p["phi"][:3])
    for value, (i, j) in zip(p["phi"][3:], ((0, 1), (0, 2), (1, 2))):
        phi[i, j] = phi[j, i] = value
    alpha = p.get("means", np.zeros(3))
    return p["intercepts"] + lam @ alpha, lam @ phi @ lam.T + np.diag(p["residuals"])


def _vech(m: np.ndarray) -> np.ndarray:
    return m[np.tril_indices(len(m))]


def _duplication(p: int) -> np.ndarray:
    """D with vec(S) = D vech(S) (Magnus & Neudecker 1988)."""
    rows, cols = np.tril_indices(p)
    d = np.zeros((p * p, len(rows)))
    for k, (i, j) in enumerate(zip(rows, cols)):
        d[i * p + j, k] = d[j * p + i, k] = 1.0
    return d


def _reference(level: str, result, data) -> tuple[float, float, int]:
    """(chi-square, Satorra-Bentler scaling factor, df) of one step from the rows and the step's estimates."""
    labels = [g.label for g in result.groups]
    frames = [data.loc[data["school"] == g, list(ITEMS)].to_numpy(float) for g in labels]
    n = np.array([len(f) for f in frames], float)
    N = n.sum()
    # the free parameters: pieces held equal once (first group's), the others in each group; the reference
    # group's factor means stay fixed at zero
    layout, theta = [], []
    for k, g in enumerate(labels):
        for name, values in _pieces(level, result.estimates, g).items():
            if (name in SHARED[level] and k > 0) or (name == "means" and k == 0):
                continue
            layout.append((k, name, len(values)))
            theta.extend(values)
    theta = np.array(theta)

    def moments(t: np.ndarray) -> np.ndarray:
        pieces = [dict() for _ in labels]
        at = 0
        for k, name, size in layout:
            pieces[k][name] = t[at:at + size]
            at += size
        out = []
        for k in range(len(labels)):
            own = {name: pieces[k].get(name, pieces[0].get(name)) for name in ("loadings", "intercepts", "residuals",
                                                                                "phi")}
            if "means" in pieces[k]:
                own["means"] = pieces[k]["means"]
            mu, sigma = _implied(own)
            out.append(np.concatenate([mu, _vech(sigma)]))
        return np.concatenate(out)

    m = 9 + 45
    h = 1e-6
    delta = np.column_stack([(moments(theta + h * e) - moments(theta - h * e)) / (2 * h) for e in np.eye(len(theta))])
    implied = moments(theta)
    D = _duplication(9)
    chi_square = 0.0
    W = np.zeros((2 * m, 2 * m))
    gamma = np.zeros((2 * m, 2 * m))
    for k, x in enumerate(frames):
        mu, sigma_v = implied[k * m:k * m + 9], implied[k * m + 9:(k + 1) * m]
        sigma = (D @ sigma_v).reshape(9, 9)
        mean = x.mean(axis=0)
        S = np.cov(x, rowvar=False, bias=True)
        inv = np.linalg.inv(sigma)
        # the ML discrepancy with a mean structure (Bollen 1989; Sorbom 1974), N F as the test statistic
        f = (np.log(np.linalg.det(sigma)) + np.trace(S @ inv) - np.log(np.linalg.det(S)) - 9
             + (mean - mu) @ inv @ (mean - mu))
        chi_square += n[k] * f
        # normal-theory weight of (means, vech covariances) at the model's moments (Browne 1984)
        block = np.zeros((m, m))
        block[:9, :9] = inv
        block[9:, 9:] = 0.5 * D.T @ np.kron(inv, inv) @ D
        # Gamma: the rows' covariance of (x, vech((x - mean)(x - mean)')), divisor n_g (Browne 1984)
        z = x - mean
        rows, cols = np.tril_indices(9)
        g = np.column_stack([x, z[:, rows] * z[:, cols]])
        g = g - g.mean(axis=0)
        w = n[k] / N
        W[k * m:(k + 1) * m, k * m:(k + 1) * m] = w * block
        gamma[k * m:(k + 1) * m, k * m:(k + 1) * m] = (g.T @ g / n[k]) / w
    df = 2 * m - len(theta)
    U = W - W @ delta @ np.linalg.solve(delta.T @ W @ delta, delta.T @ W)
    return chi_square, float(np.trace(U @ gamma)) / df, df


@pytest.fixture(scope="module")
def robust_ladder():
    data = holzinger_swineford()
    return data, invariance(THREE_FACTORS, data, "school", test="robust")


def test_each_steps_scaled_test_and_scaled_difference_match_the_published_formulas(robust_ladder):
    data, ladder = robust_ladder
    assert [s.level for s in ladder.steps] == list(SHARED)
    found = []
    for step in ladder.steps:
        chi_square, c, df = _reference(step.level, step.result, data)
        # the parameters were read as fitted: the same chi-square and degrees of freedom
        assert step.result.fit.chi_square == pytest.approx(chi_square, rel=1e-6), step.level
        assert step.result.fit.df == df
        assert step.result.robust.scaling_factor == pytest.approx(c, rel=1e-8), step.level
        assert step.result.robust.chi_square_scaled == pytest.approx(chi_square / c, rel=1e-8), step.level
        found.append((chi_square, c, df))
    for (t1, c1, d1), (t0, c0, d0), step in zip(found, found[1:], ladder.steps[1:]):
        cd = (d0 * c0 - d1 * c1) / (d0 - d1)
        assert cd > 0  # the 2001 correction is positive at every step of these data: its version is the one given
        test = step.versus_previous
        assert test.method.value == "Satorra-Bentler 2001 scaled difference"
        assert test.df_difference == d0 - d1
        assert test.chi_square_difference == pytest.approx((t0 - t1) / cd, rel=1e-8), step.level
        assert test.p_value == pytest.approx(stats.chi2.sf((t0 - t1) / cd, d0 - d1), rel=1e-6), step.level
