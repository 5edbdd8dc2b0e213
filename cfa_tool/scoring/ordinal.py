"""Expected a posteriori (EAP) factor scores of ordinal items.

Under the latent-response model (:class:`cfa_tool.scoring.model.OrdinalScoringModel`) the
answers are independent given the factors, with

    P(y_j = c | eta) = Phi((tau_j,c - nu_j - l_j'eta) / s_j) - Phi((tau_j,c-1 - nu_j - l_j'eta) / s_j),

s_j^2 the latent response's residual variance (Muthén 1984), and a continuous item beside them
contributing its normal density.  A row's EAP score is the posterior mean E[eta | y] under the
normal prior N(alpha, Phi) (Bock & Aitkin 1981; Bock & Mislevy 1982), with the posterior
standard deviation as its standard error; unanswered items drop out of the product.

The integral runs over the factors with items of their own (F).  Each row's grid is centred
on its posterior mean and scaled by the Cholesky factor of its posterior covariance, both
refined from the prior until they settle (adaptive quadrature; Naylor & Smith 1982, Liu &
Pierce 1994, Rabe-Hesketh, Skrondal & Pickles 2005): Gauss-Hermite product rules for 1-3
such factors, scrambled Sobol points (importance sampling with the adaptive normal as
proposal) beyond (:mod:`cfa_tool.scoring.quadrature`).  Factors measured only through
others (higher-order factors, H) follow exactly from the normal prior:
E[eta_H | y] = alpha_H + B (E[eta_F | y] - alpha_F) and
Var[eta_H | y] = Phi_HH - B Phi_FH + B Var[eta_F | y] B', with B = Phi_HF Phi_FF^-1.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np
from scipy.special import log_ndtr

from cfa_tool.errors import EstimationError
from cfa_tool.scoring.methods import ScoreMethod, rows_without_answers
from cfa_tool.scoring.model import OrdinalScoringModel
from cfa_tool.scoring.quadrature import Rule, default_rule

MAX_ITERATIONS = 20  # adaptive refinements of each row's grid
TOLERANCE = 1e-7  # change of the posterior mean (in prior standard deviations) at which the grid's place has settled
CELLS_PER_BLOCK = 2_000_000  # rows x points handled at once
#: seconds per row, quadrature point and item of a whole scoring (its refinements of the grid included): measured on
#: the machine of the new-user trial s15 (1,112 rows, 20 items, 4 factors, 4,096 points: about 40 s), a rough guide
#: for the time a scoring will take, never a result
SECONDS_PER_CELL = 4e-7
#: a scoring expected to take this many seconds or more is announced before it starts
LONG_SCORING = 5.0


@dataclass(frozen=True, eq=False)
class PosteriorScores:
    """EAP scores of rows: posterior means, standard deviations and covariances."""

    method: ScoreMethod
    factors: tuple[str, ...]
    scores: np.ndarray  # (n, m)
    standard_errors: np.ndarray  # (n, m) posterior standard deviations
    covariances: np.ndarray  # (n, m, m) posterior covariance matrices
    unscored: dict  # Unscored -> (m,) counts
    rule: str  # the integration rule used


def _log_category_probability(upper: np.ndarray, lower: np.ndarray, sd: float) -> np.ndarray:
    """log(Phi(upper / sd) - Phi(lower / sd)) elementwise, accurate in both tails: where the interval
    starts right of 0 the same probability is taken as Phi(-lower / sd) - Phi(-upper / sd)."""
    a, b = upper / sd, lower / sd
    left = b <= 0
    hi = log_ndtr(np.where(left, a, -b))
    lo = log_ndtr(np.where(left, b, -a))
    with np.errstate(under="ignore"):
        return hi + np.log1p(-np.exp(np.minimum(lo - hi, 0.0)))


class EapScorer:
    """Posterior means of one group's factors, for blocks of rows of raw answers."""

    def __init__(self, model: OrdinalScoringModel, rule: Rule | None = None):
        self.model = model
        base = model.base
        self.F = np.flatnonzero(base.measured)
        self.H = np.flatnonzero(~base.measured)
        r = len(self.F)
        self.rule = rule or default_rule(r)
        if self.rule.dimension != r:
            raise ValueError(f"the rule integrates over {self.rule.dimension} dimensions; the model has {r} factors with items")
        phi = base.factor_covariance
        self.alpha_F = base.factor_means[self.F]
        self.phi_FF = phi[np.ix_(self.F, self.F)]
        try:
            self.prior_chol = np.linalg.cholesky(self.phi_FF)
        except np.linalg.LinAlgError:
            raise EstimationError("the covariance matrix of the factors is not positive definite, so the posterior "
                                  "of the factors given the answers is not defined") from None
        self.prior_precision = np.linalg.inv(self.phi_FF)
        self.prior_sd = np.sqrt(np.diag(self.phi_FF))
        self.B = phi[np.ix_(self.H, self.F)] @ self.prior_precision
        self.cond_H = phi[np.ix_(self.H, self.H)] - self.B @ phi[np.ix_(self.F, self.H)]
        self.loadings = base.loadings[:, self.F]  # (p, r)
        self.nu = base.intercepts
        self.sd = np.sqrt(np.diag(base.residual_covariance))
        width = max([len(t) for t in model.thresholds] + [0]) + 2
        table = np.full((base.p, width), np.inf)
        for j, tau in enumerate(model.thresholds):
            table[j, 0] = -np.inf
            table[j, 1: len(tau) + 1] = tau
        self.limits = table  # item j, category c lies in (table[j, c], table[j, c + 1]]
        self.continuous = model.continuous

    def _log_likelihood(self, codes: np.ndarray, z: np.ndarray, eta: np.ndarray) -> np.ndarray:
        """sum_j log P(y_j | eta) at the points eta (n, K, r): (n, K)."""
        n, K, _ = eta.shape
        total = np.zeros((n, K))
        for j in range(self.model.base.p):
            answered = codes[:, j] >= 0
            if not answered.any():
                continue
            # every row answered the item (the usual case): whole arrays, no copy of eta (n, K, r) per item
            rows = slice(None) if answered.all() else np.flatnonzero(answered)
            predictor = self.nu[j] + eta[rows] @ self.loadings[j]  # (k, K)
            if self.continuous[j]:
                resid = (z[rows, j][:, None] - predictor) / self.sd[j]
                total[rows] += -0.5 * resid**2 - np.log(self.sd[j]) - 0.5 * np.log(2.0 * np.pi)
            else:
                c = codes[rows, j]
                upper = self.limits[j, c + 1][:, None] - predictor
                lower = self.limits[j, c][:, None] - predictor
                total[rows] += _log_category_probability(upper, lower, self.sd[j])
        return total

    def _moments(self, codes, z, centre, chol):
        """Posterior mean and covariance of eta_F from the rule placed at centre + chol u."""
        u, log_w = self.rule.points, self.rule.log_weights
        eta = centre[:, None, :] + u @ np.swapaxes(chol, 1, 2)  # (n, K, r)
        dev = eta - self.alpha_F
        log_prior = -0.5 * np.sum((dev @ self.prior_precision) * dev, axis=2)
        log_f = self._log_likelihood(codes, z, eta) + log_prior + (0.5 * np.sum(u**2, axis=1) + log_w)
        log_f -= log_f.max(axis=1, keepdims=True)
        w = np.exp(log_f)
        w /= w.sum(axis=1, keepdims=True)
        mean = (w[:, None, :] @ eta)[:, 0, :]
        d = eta - mean[:, None, :]
        cov = np.swapaxes(d * w[:, :, None], 1, 2) @ d
        return mean, 0.5 * (cov + np.swapaxes(cov, 1, 2))

    def _posterior_F(self, codes: np.ndarray, z: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        n, r = len(codes), len(self.F)
        centre = np.broadcast_to(self.alpha_F, (n, r)).copy()
        chol = np.broadcast_to(self.prior_chol, (n, r, r)).copy()
        active = np.arange(n)
        mean = centre.copy()
        cov = np.broadcast_to(self.phi_FF, (n, r, r)).copy()
        for _ in range(MAX_ITERATIONS):
            m_new, c_new = self._moments(codes[active], z[active], centre[active], chol[active])
            change = np.max(np.abs(m_new - mean[active]) / self.prior_sd, axis=1)
            mean[active], cov[active] = m_new, c_new
            values, vectors = np.linalg.eigh(c_new)
            good = np.all(values > 1e-12 * self.prior_sd.max() ** 2, axis=1)
            new_chol = np.linalg.cholesky(np.where(good[:, None, None], c_new, chol[active]))
            centre[active] = m_new
            chol[active] = new_chol
            active = active[change > TOLERANCE]
            if not len(active):
                break
        return mean, cov

    def score(self, rows: np.ndarray) -> PosteriorScores:
        """EAP scores of a block of raw rows ((n, p), the model's items in order, NaN for no answer)."""
        base = self.model.base
        rows = np.asarray(rows, dtype=float)
        if rows.ndim != 2 or rows.shape[1] != base.p:
            raise ValueError(f"rows must have {base.p} columns, one per item")
        if np.isinf(rows).any():
            raise ValueError("rows contain infinite values")
        codes = self.model.category_codes(rows)
        z = np.where(self.continuous, (rows - self.model.location) / self.model.scale, 0.0)
        n, m = len(rows), base.m
        scores = np.full((n, m), np.nan)
        covs = np.full((n, m, m), np.nan)
        answered = (codes >= 0).any(axis=1)
        unscored = rows_without_answers(answered, m)
        take = np.flatnonzero(answered)
        if not self.continuous.any() and len(take):  # rows with the same answers have the same scores: score each once
            keys = np.ascontiguousarray(codes[take].astype(np.int8)).view(np.dtype((np.void, base.p))).ravel()
            _, first, inverse = np.unique(keys, return_index=True, return_inverse=True)
            distinct = take[first]
        else:
            distinct, inverse = take, np.arange(len(take))
        step = max(1, CELLS_PER_BLOCK // len(self.rule.points))
        F, H = self.F, self.H
        for start in range(0, len(distinct), step):
            sel = distinct[start:start + step]
            mean, cov = self._posterior_F(codes[sel], z[sel])
            full = np.zeros((len(sel), m, m))
            full[:, F[:, None], F[None, :]] = cov
            est = np.zeros((len(sel), m))
            est[:, F] = mean
            if len(H):
                est[:, H] = base.factor_means[H] + (mean - self.alpha_F) @ self.B.T
                full[:, H[:, None], H[None, :]] = self.cond_H + self.B @ cov @ self.B.T
                cross = self.B @ cov  # Cov(eta_H, eta_F | y)
                full[:, H[:, None], F[None, :]] = cross
                full[:, F[:, None], H[None, :]] = np.swapaxes(cross, 1, 2)
            scores[sel] = est
            covs[sel] = full
        if len(take):
            scores[take] = scores[distinct][inverse]
            covs[take] = covs[distinct][inverse]
        se = np.sqrt(np.clip(np.diagonal(covs, axis1=1, axis2=2), 0.0, None))
        return PosteriorScores(ScoreMethod.EXPECTED_A_POSTERIORI, base.factors, scores, se, covs, unscored,
                               self.rule.kind.value)


def expected_seconds(model: OrdinalScoringModel, rows: int) -> float:
    """A rough time for the posterior means of ``rows`` rows under ``model`` by the default rule:
    rows x quadrature points x items x :data:`SECONDS_PER_CELL` (rows with the same answers, scored once, make it
    shorter)."""
    from cfa_tool.scoring.quadrature import default_rule_size

    base = model.base
    return rows * default_rule_size(int(np.count_nonzero(base.measured))) * base.p * SECONDS_PER_CELL


def scoring_announcement(model: OrdinalScoringModel, rows: int) -> str | None:
    """The line said before a long scoring starts ('Scoring 1,112 rows by posterior means over 4 factors (about
    40 s)...'; new user s15: 43 s without a word); None when it is expected to be short."""
    seconds = expected_seconds(model, rows)
    if seconds < LONG_SCORING:
        return None
    factors = int(np.count_nonzero(model.base.measured))
    about = f"{seconds:.0f} s" if seconds < 90 else f"{seconds / 60:.0f} minutes"
    return (f"Scoring {rows:,} row{'s' if rows != 1 else ''} by posterior means over {factors} "
            f"factor{'s' if factors != 1 else ''} (about {about})...")


def eap_blocks(model: OrdinalScoringModel, blocks, rule: Rule | None = None) -> Iterator[PosteriorScores]:
    """EAP scores of each block of rows in turn."""
    scorer = EapScorer(model, rule)
    for block in blocks:
        yield scorer.score(block)


def eap_scores(model: OrdinalScoringModel, rows: np.ndarray, rule: Rule | None = None) -> PosteriorScores:
    """EAP scores of all ``rows``."""
    return EapScorer(model, rule).score(rows)
