"""Maximum-likelihood extraction against scikit-learn's FactorAnalysis, an independent implementation.

scikit-learn fits x = W'z + mu + e, cov(e) = diag(noise_variance_), by maximum likelihood on the data
rows (its covariance with divisor N), with an SVD-based iteration of its own (Barber 2012).  Its
model is our model: Sigma = W'W + Psi.  Conventions and their conversions:

* its ``score(X)`` is the mean log-likelihood per row of the normal model with the ML means, so
  N score(X) is the log-likelihood we report (``SolutionFit.log_likelihood``, from the divisor-N
  covariance matrix and the normal density's constant);
* it works in the units of the data: its loadings W' of column j divided by that column's standard
  deviation (divisor N) are standardized loadings, and its communalities are sum(W'^2) / var;
  ours are of the correlation matrix (ML is scale free, so these agree);
* its ``rotation="varimax"`` rotates its unstandardized loadings by the raw varimax criterion (no
  row normalization), so the comparison feeds it data standardized with divisor N and asks ours
  for varimax without row normalization;
* its iteration converges linearly, so it runs with a tight tolerance and the LAPACK SVD;
* its varimax (an SVD iteration, a different algorithm from gradient projection) stops when the
  criterion's relative change falls below 1e-6 or after 100 steps, fixed in its code, which leaves
  loadings up to about 2e-4 from the optimum on these data: the public option is compared at 5e-4,
  and the same routine (its private ``_ortho_rotation``) run to a tolerance of 1e-13 at 1e-5.
"""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.data.moments import sample_moments
from cfa_tool.exploration import ExtractionMethod, RotationMethod, RotationSpec, extract, from_sample_moments, rotate
from tests.conftest import simulate_cfa

ITEMS = tuple(f"x{i}" for i in range(1, 10))

@pytest.fixture(autouse=True)
def _one_blas_thread():
    """Small matrices compute with one BLAS thread, as the tool does (cfa_tool.numerics.threads.blas_threads_for)."""
    from cfa_tool.numerics.threads import blas_threads_for

    with blas_threads_for(1):
        yield


def _sklearn(X: np.ndarray, m: int, rotation=None):
    from sklearn.decomposition import FactorAnalysis

    return FactorAnalysis(m, tol=1e-12, max_iter=200_000, svd_method="lapack", rotation=rotation).fit(X)


def _same_columns(ours: np.ndarray, theirs: np.ndarray, atol: float) -> None:
    """Equal up to the order and signs of the columns."""
    from itertools import permutations

    best = min(permutations(range(ours.shape[1])),
               key=lambda order: np.abs(np.abs(ours[:, order]) - np.abs(theirs)).max())
    matched = ours[:, best]
    matched = matched * np.sign(np.sum(matched * theirs, axis=0))
    np.testing.assert_allclose(matched, theirs, atol=atol)


def _cases(hs_data):
    sim = simulate_cfa(np.kron(np.eye(3), [[0.7], [0.6], [0.5], [0.65]]), 0.3 + 0.7 * np.eye(3), np.eye(12) * 0.6,
                       n=500, seed=11)
    return [(hs_data, ITEMS, 3), (hs_data, ITEMS, 2), (sim, tuple(sim.columns), 3)]


def test_log_likelihood_and_communalities(hs_data):
    for frame, names, m in _cases(hs_data):
        X = frame[list(names)].to_numpy(float)
        theirs = _sklearn(X, m)
        ours = extract(from_sample_moments(sample_moments(frame, names, "data")), m, ExtractionMethod.MAXIMUM_LIKELIHOOD)
        assert ours.converged and not ours.at_bound
        # same log-likelihood (scikit-learn: mean per row, times N)
        assert ours.fit.log_likelihood == pytest.approx(theirs.score(X) * len(X), abs=1e-4)
        communalities = (theirs.components_**2).sum(axis=0) / X.var(axis=0)
        np.testing.assert_allclose(ours.communalities, communalities, atol=1e-4)
        np.testing.assert_allclose(ours.uniquenesses, theirs.noise_variance_ / X.var(axis=0), atol=1e-4)


def test_varimax_loadings(hs_data):
    from sklearn.decomposition._factor_analysis import _ortho_rotation

    for frame, names, m in _cases(hs_data):
        X = frame[list(names)].to_numpy(float)
        Z = (X - X.mean(axis=0)) / X.std(axis=0)
        solution = extract(from_sample_moments(sample_moments(frame, names, "data")), m)
        ours = rotate(solution.loadings, RotationSpec(RotationMethod.VARIMAX, row_normalization=False))
        assert ours.converged
        _same_columns(ours.pattern, _sklearn(Z, m, rotation="varimax").components_.T, atol=5e-4)
        unrotated = _sklearn(Z, m).components_
        _same_columns(ours.pattern, _ortho_rotation(unrotated.T, "varimax", tol=1e-13, max_iter=100_000).T, atol=1e-5)
