"""Posterior-mean (EAP) scores of ordinal answer patterns far out in the prior's tail (new-user trial s23b,
findings 1 and 5).

The models are a nine-item depression screen of four answers (0-3) with strong loadings, one factor and two (the
invented values of the trial's simulated clinic, rounded): the latent responses x*_j = l_j'eta + e_j with
Var(x*_j) = 1, answered in category c when tau_j,c-1 < x*_j <= tau_j,c (Muthén 1984): Samejima's (1969) graded
model with the normal ogive.  Before s23 a severe, uneven pattern (3 to most items, 0 to two) had its grid placed
from the prior, put all its weight on the coarse rule's outermost point and shrank onto it: eight patients got
1.3649 (sqrt(3) prior SDs) with a posterior SD of 1e-5, below milder ones, and the top answer to every item of the
two-factor model stopped scoring with 'LinAlgError: Matrix is not positive definite'.

Check values and their sources:
* the posterior mean and SD of one factor as integrals over the factor, evaluated by scipy.integrate.quad (QUADPACK,
  general-purpose adaptive quadrature) with the category probabilities written here from scipy.special.ndtr (the
  normal distribution function), to 1e-6 (the issue's tolerance); of two factors by scipy.integrate.cubature
  (adaptive, a Gauss-Kronrod product rule), to 1e-6 for the top pattern;
* one factor with positive loadings: the posterior mean rises with every answer.  The normal-ogive graded model's
  category probabilities have a monotone likelihood ratio in the factor, P(y = c + 1 | eta) / P(y = c | eta)
  increasing, because the normal density is log-concave; a likelihood that rises in the likelihood-ratio order moves
  the posterior up in that order and its mean with it (Milgrom 1981, recalled from memory).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from scipy import integrate
from scipy.special import ndtr

from cfa_tool.scoring.model import OrdinalScoringModel, ScoringModel
from cfa_tool.scoring.ordinal import EapScorer, eap_scores

ONE_LOADINGS = np.array([1.0, 1.064, 0.874, 1.021, 0.816, 1.0, 0.836, 0.942, 0.778])
ONE_VARIANCE = 0.621
ONE_THRESHOLDS = [(0.293, 1.049, 1.599), (0.285, 0.981, 1.682), (0.404, 1.116, 1.784), (0.325, 1.006, 1.622),
                  (0.297, 1.075, 1.777), (0.330, 1.027, 1.782), (0.441, 1.155, 1.837), (0.389, 1.060, 1.751),
                  (0.736, 1.511, 2.241)]
ANSWERS = (0.0, 1.0, 2.0, 3.0)
#: the trial's patterns: A and H (H answers the eighth item one lower), E, the top and bottom answers throughout, and
#: a pattern that is 0 but for the two items A leaves at 0
PATTERNS = np.array([[3, 3, 3, 3, 0, 3, 3, 3, 0], [3, 3, 3, 3, 0, 3, 3, 2, 0], [3, 3, 2, 3, 2, 3, 2, 3, 1],
                     [3] * 9, [0] * 9, [0, 0, 0, 0, 3, 0, 0, 0, 3]], dtype=float)


def _model(loadings: np.ndarray, phi: np.ndarray, thresholds) -> OrdinalScoringModel:
    p, m = loadings.shape
    theta = np.diag(1.0 - np.einsum("jk,kl,jl->j", loadings, phi, loadings))  # latent responses of variance 1
    base = ScoringModel(tuple(f"dep{j + 1}" for j in range(p)), tuple(f"f{k}" for k in range(m)), loadings, phi,
                        np.zeros(m), np.zeros(p), theta)
    return OrdinalScoringModel(base, [np.array(t) for t in thresholds], [ANSWERS] * p)


def _one_factor(items: int = 9) -> OrdinalScoringModel:
    return _model(ONE_LOADINGS[:items, None], np.array([[ONE_VARIANCE]]), ONE_THRESHOLDS[:items])


def _two_factors() -> OrdinalScoringModel:
    loadings = np.zeros((9, 2))
    loadings[:4, 0] = [1.0, 1.1755, 0.9364, 0.9572]
    loadings[4:, 1] = [1.0, 1.0619, 1.0, 0.9425, 0.7865]
    phi = np.array([[0.5215, 0.5223], [0.5223, 0.6468]])
    thresholds = [(0.4032, 1.1112, 1.7688), (0.3245, 1.0019, 1.6105), (0.2962, 1.0702, 1.7618),
                  (0.4396, 1.1495, 1.8199), (0.2926, 1.0453, 1.5878), (0.2844, 0.9774, 1.6697),
                  (0.3291, 1.0232, 1.7669), (0.3883, 1.0555, 1.7368), (0.7335, 1.5018, 2.2010)]
    return _model(loadings, phi, thresholds)


def _likelihood(model: OrdinalScoringModel, y: np.ndarray):
    """eta -> prod_j P(y_j | eta) of the normal-ogive graded model for the answer pattern y, from scipy's standard
    normal distribution function (scipy.special.ndtr, which scipy.stats.norm.cdf evaluates, called here without its
    per-call overhead and once for all items); ``eta`` one point (m,) or a stack of points (n, m), one value each."""
    base = model.base
    codes = y.astype(int)
    limits = [np.concatenate([[-np.inf], t, [np.inf]]) for t in model.thresholds]
    lower = np.array([limits[j][c] for j, c in enumerate(codes)])
    upper = np.array([limits[j][c + 1] for j, c in enumerate(codes)])
    s = np.sqrt(np.diag(base.residual_covariance))
    loadings = base.loadings

    def likelihood(eta: np.ndarray) -> float | np.ndarray:
        x = eta @ loadings.T
        values = np.prod(ndtr((upper - x) / s) - ndtr((lower - x) / s), axis=-1)
        return float(values) if values.ndim == 0 else values

    return likelihood


def test_severe_uneven_patterns_of_one_factor_equal_the_posterior_integrals():
    model = _one_factor()
    out = eap_scores(model, PATTERNS)
    for i, y in enumerate(PATTERNS):
        likelihood = _likelihood(model, y)

        def density(e, power):
            return e**power * likelihood(np.array([e])) * np.exp(-0.5 * e * e / ONE_VARIANCE)
        moments = [integrate.quad(density, -12.0, 12.0, args=(k,), epsabs=0, epsrel=1e-12, limit=400, points=[0.0])[0]
                   for k in range(3)]
        mean = moments[1] / moments[0]
        sd = np.sqrt(moments[2] / moments[0] - mean**2)
        assert out.scores[i, 0] == pytest.approx(mean, abs=1e-6), y
        assert out.standard_errors[i, 0] == pytest.approx(sd, abs=1e-6), y
    # the trial's complaint in its own words: A above H, and no posterior SD near zero (the integrals give .27-.49)
    assert out.scores[0, 0] > out.scores[1, 0] + 0.1
    assert out.standard_errors.min() > 0.2


def test_one_factor_scores_rise_with_every_answer():
    model = _one_factor(items=6)
    patterns = np.array(list(itertools.product(range(4), repeat=6)), dtype=float)
    scores = eap_scores(model, patterns).scores[:, 0].reshape((4,) * 6)
    for j in range(6):
        rises = np.diff(scores, axis=j)  # one answer one category higher, the others the same
        assert rises.min() > 0, f"item {j + 1}: {np.sum(rises <= 0)} patterns score lower one category up"


def test_two_factors_score_the_top_answer_to_every_item_as_the_double_integral():
    model = _two_factors()
    others = np.random.default_rng(23).integers(0, 4, size=(300, 9)).astype(float)
    rows = np.vstack([np.full((1, 9), 3.0), others])
    out = eap_scores(model, rows)
    assert np.isfinite(out.scores).all() and np.isfinite(out.standard_errors).all()
    # the top pattern's scores are the highest (both factors' likelihoods rise with every answer, the prior's
    # correlation is positive)
    assert (out.scores[0] >= out.scores[1:].max(axis=0)).all()
    precision = np.linalg.inv(model.base.factor_covariance)
    likelihood = _likelihood(model, rows[0])

    def densities(e):  # (n, 2) points -> (n, 3): the posterior's kernel, times 1, eta_1 and eta_2
        kernel = likelihood(e) * np.exp(-0.5 * np.einsum("ij,jk,ik->i", e, precision, e))
        return np.column_stack([kernel, e * kernel[:, None]])

    # the three integrals at once by scipy's adaptive cubature (a Gauss-Kronrod product rule; scipy 1.15 on),
    # vectorised over the points: the values of scipy.integrate.dblquad's nested QUADPACK to 1e-15 here, 100 times
    # faster (s28); dblquad, one point at a time, where scipy is older
    lo, hi = out.scores[0] - 9 * out.standard_errors[0], out.scores[0] + 9 * out.standard_errors[0]
    if hasattr(integrate, "cubature"):
        found = integrate.cubature(densities, lo, hi, rtol=1e-10, atol=0)
        assert found.status == "converged"
        mass, first, second = found.estimate
    else:
        mass, first, second = (integrate.dblquad(lambda b, a, k: densities(np.array([[a, b]]))[0, k], lo[0], hi[0],
                                                 lo[1], hi[1], args=(k,), epsabs=0, epsrel=1e-10)[0] for k in range(3))
    np.testing.assert_allclose(out.scores[0], [first / mass, second / mass], atol=1e-6)


def test_a_covariance_the_rule_cannot_resolve_keeps_the_grids_scale():
    """The refinement's fallback: placed from the prior (the pre-s23 start), the top pattern's coarse grid puts all its
    weight on one point; the grid keeps its scale there instead of factorising its Cholesky factor as a covariance,
    which stopped the scoring (LinAlgError)."""
    model = _two_factors()
    scorer = EapScorer(model)
    n_rows = 1
    scorer._mode = lambda codes, z: (np.broadcast_to(scorer.alpha_F, (n_rows, 2)).copy(),
                                     np.broadcast_to(scorer.prior_chol, (n_rows, 2, 2)).copy())
    out = scorer.score(np.full((1, 9), 3.0))
    assert np.isfinite(out.scores).all() and np.isfinite(out.standard_errors).all()
