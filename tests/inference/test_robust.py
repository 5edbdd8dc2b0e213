"""Satorra-Bentler scaled test, robust standard errors, Mardia's tests, scaled difference tests."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.normality import mardia
from cfa_tool.workflows.compare import compare
from tests.conftest import THREE_FACTORS, simulate_cfa


@pytest.fixture(scope="module")
def hs_robust(hs_data):
    return cfa_tool.fit(THREE_FACTORS, hs_data, test="satorra-bentler")


def test_holzinger_swineford_scaled_chi_square(hs_robust, hs_three):
    # Scaled chi-square 80.872 with scaling factor 1.055 for the three-factor model
    # (recalled from memory of widely published robust analyses of these data).
    r = hs_robust.robust
    assert r.chi_square_scaled == pytest.approx(80.872, abs=5e-4)
    assert r.scaling_factor == pytest.approx(1.055, abs=5e-4)
    assert r.df == 24
    # the estimates themselves are the ML estimates
    assert [e.estimate for e in hs_robust.estimates] == [e.estimate for e in hs_three.estimates]
    assert hs_robust.fit.chi_square == hs_three.fit.chi_square


def _two_factor(n: int, seed: int, heavy: bool) -> pd.DataFrame:
    loadings = np.zeros((6, 2))
    loadings[:3, 0] = [1.0, 0.8, 0.9]
    loadings[3:, 1] = [1.0, 1.1, 0.7]
    data = simulate_cfa(loadings, np.array([[1.0, 0.4], [0.4, 0.8]]), np.diag([0.5, 0.6, 0.4, 0.5, 0.5, 0.6]), n, seed)
    if heavy:  # multivariate t with 5 df: same covariance structure up to a constant, heavy tails
        w = np.random.default_rng(seed + 10_000).chisquare(5, size=n) / 5
        data = data.div(np.sqrt(w), axis=0)
    return data


MODEL = "factor f: y1..y3\nfactor g: y4..y6\n"


def test_scaling_factor_is_near_one_for_normal_data():
    result = cfa_tool.fit(MODEL, _two_factor(4000, 1, heavy=False), test="satorra-bentler")
    # for a correct model and normal data, tr(U Gamma) estimates df (Satorra & Bentler 1994)
    assert result.robust.scaling_factor == pytest.approx(1.0, abs=0.1)


def test_scaled_test_keeps_its_level_with_heavy_tails():
    # Small seeded Monte Carlo: true model, multivariate t(5) data.  The normal-theory test
    # rejects far too often; the scaled test stays near the nominal 5% (Satorra & Bentler 1994;
    # Curran, West & Finch 1996).  With 150 replications the Monte Carlo SE of a 5% rate is 1.8%.
    naive, scaled = [], []
    for rep in range(150):
        result = cfa_tool.fit(MODEL, _two_factor(400, 100 + rep, heavy=True), test="satorra-bentler")
        naive.append(result.fit.p_value < 0.05)
        scaled.append(result.robust.p_value_scaled < 0.05)
    assert np.mean(naive) > 0.2
    assert 0.01 <= np.mean(scaled) <= 0.10


def test_mardia_against_direct_double_sum():
    rng = np.random.default_rng(4)
    x = rng.gamma(2.0, size=(40, 3))
    z = x - x.mean(0)
    s_inv = np.linalg.inv(z.T @ z / 40)
    b1 = sum((z[i] @ s_inv @ z[j]) ** 3 for i in range(40) for j in range(40)) / 40**2
    b2 = sum((z[i] @ s_inv @ z[i]) ** 2 for i in range(40)) / 40
    result = mardia(x)
    assert result.skewness == pytest.approx(b1, rel=1e-10)
    assert result.kurtosis == pytest.approx(b2, rel=1e-10)
    assert result.skewness_df == 10 and result.kurtosis_expected == 15


@pytest.mark.parametrize("n, p", [(20, 6), (30, 6), (200, 3), (300, 20)])
def test_mardia_in_blocks_against_direct_double_sum(monkeypatch, n, p):
    # 20 rows of 6 items take the blocked Gram-matrix path (p^2 >= 1.5 N), the others the third-moment path;
    # a small block size makes several blocks of each (the definition of b1 and b2: Mardia 1970)
    from cfa_tool.assessment import normality

    monkeypatch.setattr(normality, "BLOCK", 64)
    x = np.random.default_rng(5).gamma(2.0, size=(n, p))
    z = x - x.mean(0)
    g = z @ np.linalg.inv(z.T @ z / n) @ z.T
    result = mardia(x)
    assert result.skewness == pytest.approx(float(np.sum(g**3)) / n**2, rel=1e-10)
    assert result.kurtosis == pytest.approx(float(np.mean(np.diag(g) ** 2)), rel=1e-10)


def test_mardia_on_normal_data():
    result = mardia(np.random.default_rng(9).standard_normal((5000, 4)))
    # p(p+2) = 24 under normality (Mardia 1970); its SE here is sqrt(8 p (p+2) / N) = 0.2
    assert result.kurtosis == pytest.approx(24.0, abs=0.6)
    assert result.skewness < 0.01


def test_scaled_difference_tests_agree_with_lr_for_normal_data():
    # a mildly false restriction (the factor covariance is 0.4 in the population): with normal data
    # the scaled differences estimate the same quantity as the likelihood-ratio difference
    data = _two_factor(3000, 3, heavy=False)
    result = compare([MODEL + "fix covariance(f, g) = 0.3\n", MODEL], data, test="satorra-bentler")
    by_method = {t.method: t for t in result.tests}
    lr = by_method["likelihood ratio"]
    for method in ("Satorra-Bentler 2001 scaled difference", "Satorra-Bentler 2010 strictly positive scaled difference"):
        assert by_method[method].chi_square_difference == pytest.approx(lr.chi_square_difference, rel=0.15)
        assert by_method[method].df_difference == 1


def test_scaled_difference_shrinks_with_heavy_tails():
    data = _two_factor(1500, 8, heavy=True)
    result = compare([MODEL + "fix covariance(f, g) = 0.3\n", MODEL], data, test="satorra-bentler")
    by_method = {t.method: t for t in result.tests}
    lr = by_method["likelihood ratio"].chi_square_difference
    for method in ("Satorra-Bentler 2001 scaled difference", "Satorra-Bentler 2010 strictly positive scaled difference"):
        assert 0 < by_method[method].chi_square_difference < lr


def test_robust_test_needs_raw_rows():
    from cfa_tool.data.moments import SampleMoments
    from cfa_tool.errors import OptionError
    from cfa_tool.pipeline.continuous import FitOptions, fit_moments
    from cfa_tool.language import parse_model

    cov = np.array([[1.0, 0.5, 0.4], [0.5, 1.0, 0.45], [0.4, 0.45, 1.0]])
    moments = SampleMoments(("a", "b", "c"), cov, np.zeros(3), 200, 200, 0, "<matrix>")
    with pytest.raises(OptionError, match="raw data"):
        fit_moments(parse_model("factor f: a, b, c\n"), moments, FitOptions(test="satorra-bentler"))


def test_whitened_rows_from_the_fits_moments_equal_those_from_the_rows(hs_data):
    # the fit passes its sample moments (divisor N) instead of recomputing them: the same whitened rows, so that
    # Mardia's tests and the case diagnostics do not depend on where the moments came from
    from cfa_tool.assessment.normality import whitened_rows

    rows = hs_data[[f"x{i}" for i in range(1, 10)]].to_numpy(dtype=float)
    z = rows - rows.mean(axis=0)
    own, shared = whitened_rows(rows), whitened_rows(rows, (rows.mean(axis=0), z.T @ z / len(rows)))
    Y, log_det = own.rows, own.log_det
    assert np.allclose(shared.rows, Y, rtol=1e-12, atol=1e-12) and shared.log_det == pytest.approx(log_det, rel=1e-12)
    assert np.allclose(shared.centred, z, rtol=1e-12, atol=1e-12)
    # y_i' y_j = z_i' S^-1 z_j (the definition the tests use; S with divisor N)
    assert np.allclose(Y @ Y.T, z @ np.linalg.inv(z.T @ z / len(rows)) @ z.T, atol=1e-9)
    # each row's squared Mahalanobis distance from the centroid (Mahalanobis 1936), by scipy's distance
    from scipy.spatial.distance import cdist

    scipy_d2 = cdist(rows, rows.mean(axis=0)[None, :], "mahalanobis", VI=np.linalg.inv(z.T @ z / len(rows)))[:, 0] ** 2
    assert np.allclose(own.distances, scipy_d2, rtol=1e-10)
