"""The case diagnostics of rows with gaps and Little's (1988) test read every pattern's Sigma_oo^-1 in the Schur
complement's low-rank form (data.patterns.PatternInverses, speed-s25), never as a stack of one p x p matrix per
pattern (data.patterns.embedded_inverse: at 100 items and 1,500 rows, each its own pattern, a stack of 120 MB made
three times).  Checked against the plain per-pattern formulas written out here with numpy's own inverse and
log-determinant of each pattern's Sigma_oo, one pattern at a time:

* Little (1988, J. Amer. Statist. Assoc. 83, eq. 5): d^2 = sum_j n_j (ybar_j - mu_j)' Sigma_jj^-1 (ybar_j - mu_j);
* each row's squared distance on the items it answered, d_i = (x_o - mu_o)' Sigma_oo^-1 (x_o - mu_o) (Yuan & Bentler
  2000; Enders 2010, ch. 10), and its share of the chi-square, log|Sigma_oo| - log|S_oo| + d_model - d_saturated
  (the casewise likelihood, Arbuckle 1996), weighted by a frequency weight when rows carry one."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool.data.patterns as patterns
from cfa_tool.assessment.diagnostics import incomplete_case_diagnostics
from cfa_tool.assessment.missingness import little_distance
from cfa_tool.data.patterns import pattern_data


def _moments(p: int, seed: int) -> tuple[np.ndarray, np.ndarray]:
    """An invented mean and a positive-definite covariance of ``p`` items with strong correlations (two factors)."""
    rng = np.random.default_rng(seed)
    loadings = rng.uniform(0.5, 0.95, size=(p, 2)) * (rng.random((p, 2)) < 0.7)
    sigma = loadings @ np.array([[1.0, 0.4], [0.4, 1.0]]) @ loadings.T + np.diag(rng.uniform(0.1, 0.5, size=p))
    return rng.normal(size=p), sigma


def _rows(p: int, n: int, share: float, seed: int) -> np.ndarray:
    """``n`` invented rows of ``p`` items with ``share`` of the answers missing at random (no row empty), a few rows
    complete and a few patterns shared by several rows."""
    mean, sigma = _moments(p, seed + 1)
    rng = np.random.default_rng(seed)
    rows = rng.multivariate_normal(mean, sigma, size=n)
    gaps = rng.random(rows.shape) < share
    gaps[: n // 10] = False  # complete rows
    gaps[n // 10: n // 5] = gaps[n // 10]  # one pattern of several rows
    gaps[gaps.all(axis=1), 0] = False
    rows[gaps] = np.nan
    return rows


def _plain_distances(rows: np.ndarray, mean: np.ndarray, sigma: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each row's d_i and log|Sigma_oo| from its own Sigma_oo, inverted alone (numpy's inv and slogdet)."""
    d, logdet = [], []
    for x in rows:
        o = ~np.isnan(x)
        block = sigma[np.ix_(o, o)]
        e = x[o] - mean[o]
        d.append(e @ np.linalg.inv(block) @ e)
        logdet.append(np.linalg.slogdet(block)[1])
    return np.array(d), np.array(logdet)


@pytest.mark.parametrize("p, n, share, weighted", [(9, 301, 0.1, False), (24, 400, 0.15, False),
                                                    (24, 400, 0.15, True), (40, 200, 0.3, False)])
def test_case_diagnostics_of_rows_with_gaps_are_the_plain_per_row_formulas(p, n, share, weighted):
    rows = _rows(p, n, share, seed=p)
    model = _moments(p, seed=p + 1)  # the 'fitted' moments: those the rows were drawn from
    saturated = (np.nanmean(rows, axis=0), model[1] * 1.05 + 0.02 * np.eye(p))  # others, positive definite
    frequencies = np.random.default_rng(p).integers(1, 4, size=n).astype(float) if weighted else None
    unusual, influential = incomplete_case_diagnostics(rows, *model, saturated, None, top=n, frequencies=frequencies)
    d_model, logdet_model = _plain_distances(rows, *model)
    d_saturated, logdet_saturated = _plain_distances(rows, *saturated)
    share_of = logdet_model - logdet_saturated + d_model - d_saturated
    if weighted:
        share_of = share_of * frequencies
    assert len(influential.rows) == n
    for j, row in enumerate(influential.rows):
        k = row - 1  # rows numbered from 1 when the caller gives no numbers
        assert influential.chi_square_share[j] == pytest.approx(share_of[k], rel=1e-10, abs=1e-10)
        assert influential.mahalanobis[j] == pytest.approx(d_saturated[k], rel=1e-10)
        assert influential.model_mahalanobis[j] == pytest.approx(d_model[k], rel=1e-10)
        assert influential.answered[j] == int((~np.isnan(rows[k])).sum())
    assert [influential.rows[j] - 1 for j in range(3)] == list(np.argsort(-share_of, kind="stable")[:3])
    assert sorted(unusual.rows) == list(range(1, n + 1))


@pytest.mark.parametrize("p, n, share, weighted", [(9, 301, 0.1, False), (30, 500, 0.1, False),
                                                    (30, 500, 0.1, True), (12, 60, 0.4, False)])
def test_littles_distance_is_the_plain_per_pattern_formula(p, n, share, weighted):
    rows = _rows(p, n, share, seed=3 * p)
    mu, sigma = _moments(p, seed=3 * p + 1)
    weights = np.random.default_rng(p).uniform(0.5, 2.0, size=n) if weighted else None
    data = pattern_data(rows, weights)
    d2, df = little_distance(data, mu, sigma)
    expected = 0.0
    for j, o in enumerate(data.observed):  # Little (1988), eq. 5, one pattern at a time
        e = data.means[j][o] - mu[o]
        expected += data.counts[j] * (e @ np.linalg.inv(sigma[np.ix_(o, o)]) @ e)
    assert df == int(data.observed.sum()) - p
    assert len(data.counts) > 20 and np.bincount(data.index).max() > 1  # many patterns, some of several rows
    assert d2 == pytest.approx(expected, rel=1e-10)


def test_neither_makes_a_stack_of_one_p_by_p_inverse_per_pattern(monkeypatch):
    # speed-s25: on 5690afae both made every pattern's Sigma_oo^-1 embedded in p x p (data.patterns.embedded_inverse),
    # the case diagnostics twice (saturated and fitted moments)
    def refused(*args, **kwargs):
        raise AssertionError("a stack of one p x p inverse per pattern was made")

    monkeypatch.setattr(patterns, "embedded_inverse", refused)
    rows = _rows(20, 200, 0.1, seed=5)
    mu, sigma = _moments(20, seed=6)
    d2, _ = little_distance(pattern_data(rows), mu, sigma)
    assert np.isfinite(d2) and d2 > 0
    unusual, influential = incomplete_case_diagnostics(rows, mu, sigma, (mu, sigma * 1.1), None)
    assert len(unusual.rows) == len(influential.rows) == 10


def test_a_covariance_that_is_not_positive_definite_gives_no_distances():
    rows = _rows(6, 80, 0.2, seed=9)
    mu, sigma = _moments(6, seed=10)
    broken = sigma.copy()
    broken[0, 1] = broken[1, 0] = 2.0 * np.sqrt(sigma[0, 0] * sigma[1, 1])  # a correlation of 2
    d2, df = little_distance(pattern_data(rows), mu, broken)
    assert np.isnan(d2) and df > 0
    with pytest.raises(np.linalg.LinAlgError, match="not positive definite"):
        incomplete_case_diagnostics(rows, mu, broken, (mu, sigma), None)
