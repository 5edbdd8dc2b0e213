"""Mardia's multivariate kurtosis of rows with gaps (Yuan, Lambert & Fouladi 2004, recalled from memory: each row's
squared Mahalanobis distance on the items it answered, at the saturated EM moments, centred by p_i (p_i + 2)).

Checked against (1) Mardia's (1970) b2,p test, which it must equal when every row is complete (b2,p = mean of the
squared distances squared, z = (b2 - p(p+2)) / sqrt(8p(p+2)/N), Mardia 1970, 1974); (2) a direct computation written
here row by row with numpy (an EM of its own, Little & Rubin 2002 ch. 11; each row's Sigma_oo inverted; the
information of vech Sigma summed row by row from explicit direction matrices); (3) its null distribution by
simulation: multivariate normal rows with 20% of the answers missing completely at random give z with mean about 0
and standard deviation about 1 (seeded; loose tolerances), where the variance that ignores the estimation of the
moments gives a spread far below 1; and (4) multivariate t rows with 4 df, heavy-tailed, are rejected.
"""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.assessment.normality import kurtosis_with_gaps, mardia


def _correlated(rng: np.random.Generator, n: int, p: int) -> np.ndarray:
    L = np.linalg.cholesky(0.4 + 0.6 * np.eye(p))
    return rng.standard_normal((n, p)) @ L.T


def _with_gaps(rng: np.random.Generator, x: np.ndarray, share: float = 0.2) -> np.ndarray:
    x = x.copy()
    x[rng.random(x.shape) < share] = np.nan
    return x[~np.isnan(x).all(axis=1)]


def test_complete_rows_give_mardias_kurtosis_test():
    rng = np.random.default_rng(20261205)
    x = rng.gamma(2.0, size=(400, 6)) @ (np.eye(6) + 0.3 * rng.standard_normal((6, 6)))  # skewed, correlated
    a, b = mardia(x), kurtosis_with_gaps(x)
    for field in ("kurtosis", "kurtosis_expected", "kurtosis_z", "kurtosis_p_value"):
        assert getattr(b, field) == pytest.approx(getattr(a, field), rel=1e-12, abs=1e-12), field
    assert b.kurtosis_expected == 6 * 8  # p(p + 2), Mardia 1970
    assert b.rows_with_gaps == 0 and b.skewness is None
    # frequency weights: each row counted as often as its weight, as mardia counts them
    w = rng.integers(1, 4, len(x)).astype(float)
    a, b = mardia(x, frequencies=w), kurtosis_with_gaps(x, frequencies=w)
    assert b.kurtosis_z == pytest.approx(a.kurtosis_z, rel=1e-10, abs=1e-12)
    assert b.kurtosis == pytest.approx(a.kurtosis, rel=1e-10)


def _direct(rows: np.ndarray) -> tuple[float, float, float]:
    """(b, e, z) of rows with gaps, written here from the formulas (the rows of one pattern of answers taken
    together, numpy.unique): an EM of its own (Little & Rubin 2002, ch. 11), each row's distance from Sigma_oo's
    inverse, and the variance V = (1/N^2)[sum 8 p_i(p_i+2)(p_i+3) - N g' I^-1 g] with
    g_a = -(2/N) sum_i (p_i+2) tr(Sigma_oo^-1 E_a,oo) and I_ab = (1/2N) sum_i tr(Sigma_oo^-1 E_a,oo Sigma_oo^-1 E_b,oo)
    over the symmetric unit directions E_a of Sigma (the delta method; Fisher information of one row)."""
    n, p = rows.shape
    mu, sigma = np.nanmean(rows, axis=0), np.diag(np.nanvar(rows, axis=0))
    # the rows of one pattern of answers share their regression of the missing items on the answered ones
    patterns, pattern_of = np.unique(~np.isnan(rows), axis=0, return_inverse=True)
    members = [np.flatnonzero(pattern_of.ravel() == k) for k in range(len(patterns))]
    for _ in range(5000):
        completed, extra = rows.copy(), np.zeros((p, p))
        for o, at in zip(patterns, members):
            m = ~o
            if m.any():
                coef = sigma[np.ix_(m, o)] @ np.linalg.inv(sigma[np.ix_(o, o)])
                completed[np.ix_(at, m)] = mu[m] + (rows[np.ix_(at, o)] - mu[o]) @ coef.T
                extra[np.ix_(m, m)] += len(at) * (sigma[np.ix_(m, m)] - coef @ sigma[np.ix_(o, m)])
        new_mu = completed.mean(axis=0)
        new_sigma = (completed - new_mu).T @ (completed - new_mu) / n + extra / n
        done = max(np.abs(new_mu - mu).max(), np.abs(new_sigma - sigma).max()) < 1e-13
        mu, sigma = new_mu, new_sigma
        if done:
            break
    directions = []
    for j in range(p):
        for k in range(j, p):
            E = np.zeros((p, p))
            E[j, k] = E[k, j] = 1.0
            directions.append(E)
    q = len(directions)
    d4, expected, var_h, g, info = [], [], [], np.zeros(q), np.zeros((q, q))
    for o, at in zip(patterns, members):  # each row's terms; the rows of one pattern share all but d4
        k, count = int(o.sum()), len(at)
        inv = np.linalg.inv(sigma[np.ix_(o, o)])
        r = rows[np.ix_(at, o)] - mu[o]
        d4.extend(np.einsum("ij,jk,ik->i", r, inv, r) ** 2)
        expected.extend([k * (k + 2.0)] * count)
        var_h.extend([8.0 * k * (k + 2.0) * (k + 3.0)] * count)
        parts = [inv @ E[np.ix_(o, o)] for E in directions]
        g += count * np.array([-2.0 * (k + 2.0) * np.trace(P) for P in parts]) / n
        info += count * np.array([[np.trace(P @ Q) for Q in parts] for P in parts]) / (2.0 * n)
    b, e = float(np.mean(d4)), float(np.mean(expected))
    variance = (sum(var_h) - n * g @ np.linalg.solve(info, g)) / n**2
    return b, e, (b - e) / np.sqrt(variance)


def test_rows_with_gaps_against_a_direct_computation():
    rng = np.random.default_rng(7)
    x = _with_gaps(rng, _correlated(rng, 150, 4) * np.sqrt(3.0 / rng.chisquare(3, 150))[:, None])
    b, e, z = _direct(x)
    found = kurtosis_with_gaps(x)
    assert found.kurtosis == pytest.approx(b, rel=1e-7)
    assert found.kurtosis_expected == pytest.approx(e, rel=1e-12)
    assert found.kurtosis_z == pytest.approx(z, rel=1e-6)
    assert found.rows_with_gaps == int(np.isnan(x).any(axis=1).sum())


def test_normal_rows_with_gaps_give_a_standard_normal_z():
    rng = np.random.default_rng(11)
    n, p = 500, 5
    z, naive = [], []
    for _ in range(200):
        x = _with_gaps(rng, _correlated(rng, n, p))
        found = kurtosis_with_gaps(x)
        z.append(found.kurtosis_z)
        k = (~np.isnan(x)).sum(axis=1)  # the variance of the mean of h_i with the moments known, for contrast
        naive.append((found.kurtosis - found.kurtosis_expected) / np.sqrt(np.sum(8 * k * (k + 2) * (k + 3)) / len(x) ** 2))
    # Mardia's b2,p itself lies below p(p+2) by 2p(p+2)/(N+1) on average (E b2 = p(p+2)(N-1)/(N+1), Mardia 1974,
    # recalled from memory): z about -0.2 here, hence the loose bound on its mean
    assert abs(np.mean(z)) < 0.3
    assert 0.85 < np.std(z) < 1.15
    assert np.std(naive) < 0.6  # the estimation of the moments matters: leaving it out is no test


def test_heavy_tailed_rows_with_gaps_are_rejected():
    rng = np.random.default_rng(5)
    n = 500
    x = _with_gaps(rng, _correlated(rng, n, 5) * np.sqrt(4.0 / rng.chisquare(4, n))[:, None])  # multivariate t, 4 df
    found = kurtosis_with_gaps(x)
    assert found.kurtosis_z > 1.96 and found.kurtosis_p_value < 0.05


def _dense_quadratic(rows: np.ndarray, mean: np.ndarray, sigma: np.ndarray) -> float:
    """c' H^-1 c of the module docstring written with numpy from the formula (Yuan, Lambert & Fouladi 2004's
    variance, derived in assessment/normality.py): H = sum_i (1/N) D' (A_i kron A_i) D over the duplication matrix D
    (Magnus & Neudecker 1988: vec Sigma = D vech Sigma), c = D' vec(sum_i (p_i + 2) A_i), A_i = Sigma_oo^-1 embedded,
    made in full (rows of one pattern of answers share their A_i: counted, by numpy.unique)."""
    n, p = rows.shape
    D = np.zeros((p * p, p * (p + 1) // 2))
    column = 0
    for j in range(p):
        for k in range(j, p):
            D[j * p + k, column] = D[k * p + j, column] = 1.0
            column += 1
    H = np.zeros((D.shape[1], D.shape[1]))
    C = np.zeros((p, p))
    patterns, counts = np.unique(~np.isnan(rows), axis=0, return_counts=True)
    for o, count in zip(patterns, counts):
        A = np.zeros((p, p))
        A[np.ix_(o, o)] = np.linalg.inv(sigma[np.ix_(o, o)])
        H += count * (D.T @ np.kron(A, A) @ D) / n
        C += count * (o.sum() + 2.0) * A
    c = D.T @ C.reshape(-1)
    return float(c @ np.linalg.solve(H, c))


@pytest.mark.parametrize("share", [0.02, 0.3])
def test_the_information_term_without_the_matrix_of_covariances(share):
    # the conjugate-gradient route (assessment.normality.information_quadratic) against the dense formula above, at
    # 10 items: a few rows with gaps (as the demo: 9 of 480) and many
    from cfa_tool.assessment.normality import information_quadratic
    from cfa_tool.data.em import em_saturated
    from cfa_tool.data.patterns import group_patterns, pattern_data, pattern_inverses

    rng = np.random.default_rng(25)
    x = _correlated(rng, 300, 10)
    gaps = rng.random(x.shape) < 0.15
    gaps[rng.random(len(x)) > share] = False
    x[gaps] = np.nan
    mean, sigma, _ = em_saturated(pattern_data(x))
    observed = ~np.isnan(x)
    distinct, index, _ = group_patterns(observed)
    share_k = np.bincount(index, minlength=len(distinct)) / len(x)
    found = information_quadratic(pattern_inverses(sigma, distinct), distinct, share_k, sigma) * len(x) ** 2
    assert found == pytest.approx(_dense_quadratic(x, mean, sigma), rel=1e-9)


def test_the_kurtosis_of_rows_with_gaps_at_many_items():
    from cfa_tool.numerics.threads import one_blas_thread

    # 128 items: the information of their covariances (8,384 x 8,384 with the means) was beyond the largest matrix
    # the tool makes (numerics.sizes), and the kurtosis was not given; it needs no such matrix now.  Normal rows: z
    # within the spread of a standard normal, after Mardia's (1974) downward bias of b2 (E b2 = p(p+2)(N-1)/(N+1),
    # recalled from memory: -3.7 here)
    rng = np.random.default_rng(130)
    n, p = 600, 128
    x = _correlated(rng, n, p)
    gaps = rng.random(x.shape) < 0.02
    gaps[40:] = False  # gaps in the first 40 rows only
    x[gaps] = np.nan
    with one_blas_thread():  # (matrices of 128 items: several threads only wait for each other on a busy machine)
        normal = kurtosis_with_gaps(x)
    bias = -2.0 * p * (p + 2) / (n + 1) / np.sqrt(8.0 * p * (p + 2) / n)
    assert normal.rows_with_gaps == int(gaps.any(axis=1).sum()) > 20 and abs(normal.kurtosis_z - bias) < 3.5


def _mardia_by_hand(rows: np.ndarray) -> tuple[float, float]:
    """Mardia's (1970) b1,p and b2,p from their definitions, every pair of rows at once:
    b1 = (1/N^2) sum_ij (z_i' S^-1 z_j)^3, b2 = (1/N) sum_i (z_i' S^-1 z_i)^2, S with divisor N."""
    z = rows - rows.mean(axis=0)
    G = z @ np.linalg.inv(z.T @ z / len(rows)) @ z.T
    return float((G**3).sum() / len(rows) ** 2), float((np.diag(G) ** 2).mean())


def test_rows_with_gaps_also_give_both_tests_of_the_complete_rows():
    # the demo lost Mardia's skewness of its 471 complete rows when 9 rows had gaps: both tests of the complete rows
    # now stand beside the kurtosis of every row, labelled as the complete rows'
    from scipy import stats

    rng = np.random.default_rng(12)
    x = rng.gamma(2.0, size=(200, 5)) @ (np.eye(5) + 0.3 * rng.standard_normal((5, 5)))  # skewed
    x[rng.choice(200, 12, replace=False), rng.integers(0, 5, 12)] = np.nan
    complete = x[~np.isnan(x).any(axis=1)]
    found = kurtosis_with_gaps(x)
    whole = found.of_complete_rows
    assert found.complete_rows == len(complete) and found.rows_with_gaps == 200 - len(complete)
    b1, b2 = _mardia_by_hand(complete)
    p, n = 5, len(complete)
    assert whole.skewness == pytest.approx(b1, rel=1e-10) and whole.kurtosis == pytest.approx(b2, rel=1e-10)
    assert whole.skewness_df == p * (p + 1) * (p + 2) // 6
    assert whole.skewness_p_value == pytest.approx(stats.chi2.sf(n * b1 / 6, p * (p + 1) * (p + 2) // 6), rel=1e-8)
    z = (b2 - p * (p + 2)) / np.sqrt(8 * p * (p + 2) / n)
    assert whole.kurtosis_z == pytest.approx(z, rel=1e-10)
    assert whole.kurtosis_p_value == pytest.approx(2 * stats.norm.sf(abs(z)), rel=1e-8)
    assert found.to_dict()["of_complete_rows"]["skewness"] == pytest.approx(b1, rel=1e-10)
    # too few complete rows (no more than the items and one): none, and said so
    few = x.copy()
    few[np.arange(6, 200), np.arange(6, 200) % 5] = np.nan
    assert kurtosis_with_gaps(few).of_complete_rows is None
