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
refined until they settle (adaptive quadrature; Naylor & Smith 1982, Liu & Pierce 1994,
Rabe-Hesketh, Skrondal & Pickles 2005), from the posterior's mode and the inverse of its
curvature there (Liu & Pierce 1994; found by Newton's method, which converges from any start
because the log-posterior is strictly concave: the normal prior is, and so is the logarithm of a
normal probability of an interval as a function of its shift, Prékopa 1973).  Started from the
prior instead, a row whose posterior lies beyond the outermost point of the coarse rule below put
all its weight on that point, read a posterior variance of about zero, and its grid shrank onto
that point: severe answer patterns all got the one score sqrt(3) prior SDs above the mean with a
posterior SD of 1e-5 (new-user trial s23b, finding 1).  Gauss-Hermite product rules for 1-3
such factors, the same pruned by weight for 4 and 5, scrambled Sobol points (importance
sampling with the adaptive normal as proposal) beyond (:mod:`cfa_tool.scoring.quadrature`).
The refinement runs in two stages: a coarse 3-point product rule places each row's grid to
:data:`COARSE_TOLERANCE`, and the rule itself refines it to :data:`TOLERANCE`, so the scores are
that rule's own (its fixed point) after a few passes of its many points instead of a dozen
(new-user trial s20: 4 factors, 327 rows, 15 s of CPU before, about 1.3 s after, with the 7^4
rule pruned in place of 4,096 Sobol points).  The time grows with rows x points x items: 21,
121, 343, 1,273 and 2,133 points for 1 to 5 factors, 4,096 beyond.  Factors measured only through
others (higher-order factors, H) follow exactly from the normal prior:
E[eta_H | y] = alpha_H + B (E[eta_F | y] - alpha_F) and
Var[eta_H | y] = Phi_HH - B Phi_FH + B Var[eta_F | y] B', with B = Phi_HF Phi_FF^-1.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np
from scipy.special import log_ndtr, ndtr

from cfa_tool.errors import EstimationError
from cfa_tool.scoring.methods import ScoreMethod, rows_without_answers
from cfa_tool.scoring.model import OrdinalScoringModel
from cfa_tool.scoring.quadrature import Rule, default_rule, gauss_hermite_rule

MAX_ITERATIONS = 20  # adaptive refinements of each row's grid
#: Newton steps to the posterior's mode, and the step (in prior standard deviations) at which it has been found; a
#: strictly concave function's Newton steps, halved until they rise, take a handful
MODE_ITERATIONS = 100
MODE_TOLERANCE = 1e-10
TOLERANCE = 1e-7  # change of the posterior mean (in prior standard deviations) at which the grid's place has settled
#: points per factor of the coarse product rule that places each row's grid before the rule itself refines it, and
#: the change of the posterior mean (in prior standard deviations) at which that first stage stops
COARSE_POINTS = 3
COARSE_TOLERANCE = 1e-3
#: rows x points handled at once (arrays of a few MB: the 2,000,000 of s15 made arrays of 16 MB and more, allocated
#: and released on every pass, and a third of the scoring's CPU time went to the system: new-user trial s20)
CELLS_PER_BLOCK = 250_000
#: seconds per row, quadrature point and item of a whole scoring (its refinements of the grid included): measured on
#: the machine of the new-user trial s20 with the staged refinement (2,400 rows, 16 items, 4 factors, 1,273 points:
#: about 11 s of CPU, 2.4e-7; 327 of those rows: 1.3 s, 2e-7), a rough guide for the time a scoring will take,
#: never a result
SECONDS_PER_CELL = 2.5e-7
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


#: a category probability below this is taken on the log scale (log_ndtr), where it cannot underflow
LOG_SCALE_BELOW = 1e-250


def _log_category_probability(upper: np.ndarray, lower: np.ndarray, sd: float) -> np.ndarray:
    """log(Phi(upper / sd) - Phi(lower / sd)) elementwise, accurate in both tails: where the interval
    starts right of 0 the same probability is taken as Phi(-lower / sd) - Phi(-upper / sd), both terms then in
    the lower tail, where ndtr keeps its relative accuracy.  The difference is formed from ndtr (a few times
    cheaper than log_ndtr: profile of new-user trial s20, where log_ndtr took most of a 4-factor scoring) and only
    probabilities below :data:`LOG_SCALE_BELOW`, which would lose digits or underflow, are taken as
    log Phi(hi) + log1p(-exp(log Phi(lo) - log Phi(hi)))."""
    a, b = upper / sd, lower / sd
    left = b <= 0
    hi_at = np.where(left, a, -b)
    lo_at = np.where(left, b, -a)
    p = ndtr(hi_at) - ndtr(lo_at)
    tiny = p < LOG_SCALE_BELOW
    with np.errstate(divide="ignore", invalid="ignore"):
        out = np.log(p)
    if tiny.any():
        hi, lo = log_ndtr(hi_at[tiny]), log_ndtr(lo_at[tiny])
        with np.errstate(under="ignore"):
            out[tiny] = hi + np.log1p(-np.exp(np.minimum(lo - hi, 0.0)))
    return out


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
        # the grid's place found first with a coarse product rule, then refined with the rule itself to TOLERANCE:
        # the scores are the rule's own (its fixed point), reached in fewer passes of its many points
        coarse = gauss_hermite_rule(r, COARSE_POINTS) if r else None
        self._stages = (((coarse, COARSE_TOLERANCE),) if coarse is not None and len(coarse.points) * 4
                        <= len(self.rule.points) else ()) + ((self.rule, TOLERANCE),)
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

    def _log_likelihood_derivatives(self, codes: np.ndarray, z: np.ndarray, eta: np.ndarray
                                    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """The answers' log-likelihood at one point eta (n, r) per row, with its gradient (n, r) and Hessian (n, r, r).

        With x = nu_j + l_j'eta, a = (tau_j,c - x) / s_j, b = (tau_j,c-1 - x) / s_j and P = Phi(a) - Phi(b):
        d log P / dx = -(phi(a) - phi(b)) / (s_j P) and
        d2 log P / dx2 = -(a phi(a) - b phi(b)) / (s_j^2 P) - (d log P / dx)^2 (the derivatives of the graded
        model's category probabilities under the normal ogive: Samejima 1969; Baker & Kim 2004), taken
        as phi / P = exp(log phi - log P) so that neither underflows in the tails; a continuous item adds
        (z_j - x) / s_j^2 and -1 / s_j^2.  The chain rule gives l_j d and l_j l_j' d2."""
        n, p = codes.shape
        predictor = self.nu + eta @ self.loadings.T  # (n, p)
        answered = codes >= 0
        ordinal = answered & ~self.continuous
        continuous = answered & self.continuous
        c = np.where(ordinal, codes, 0)
        columns = np.arange(p)
        upper = np.where(ordinal, self.limits[columns, c + 1], np.inf) - predictor
        lower = np.where(ordinal, self.limits[columns, c], -np.inf) - predictor
        log_p = _log_category_probability(upper, lower, self.sd)
        a, b = upper / self.sd, lower / self.sd
        half_log_2pi = 0.5 * np.log(2.0 * np.pi)
        with np.errstate(over="ignore", invalid="ignore", under="ignore"):
            ra = np.where(np.isfinite(a), np.exp(-0.5 * a**2 - half_log_2pi - log_p), 0.0)  # phi(a) / P
            rb = np.where(np.isfinite(b), np.exp(-0.5 * b**2 - half_log_2pi - log_p), 0.0)
            a_ra = np.where(np.isfinite(a), a * ra, 0.0)
            b_rb = np.where(np.isfinite(b), b * rb, 0.0)
        first = -(ra - rb) / self.sd
        second = -(a_ra - b_rb) / self.sd**2 - first**2
        resid = (z - predictor) / self.sd
        value = np.where(ordinal, log_p, 0.0) + np.where(continuous, -0.5 * resid**2 - np.log(self.sd) - half_log_2pi,
                                                         0.0)
        first = np.where(ordinal, first, 0.0) + np.where(continuous, resid / self.sd, 0.0)
        # log-concave in x (Prékopa 1973): a second derivative above 0 is rounding in the far tails
        second = np.where(ordinal, np.minimum(second, 0.0), 0.0) + np.where(continuous, -1.0 / self.sd**2, 0.0)
        gradient = first @ self.loadings
        hessian = np.einsum("np,pr,ps->nrs", second, self.loadings, self.loadings)
        return value.sum(axis=1), gradient, hessian

    def _log_posterior(self, codes, z, eta):
        """log p(y | eta) + log p(eta), up to a constant, at one point eta (n, r) per row: (n,)."""
        dev = eta - self.alpha_F
        return (self._log_likelihood(codes, z, eta[:, None, :])[:, 0]
                - 0.5 * np.sum((dev @ self.prior_precision) * dev, axis=1))

    def _mode(self, codes: np.ndarray, z: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Each row's posterior mode of eta_F and the Cholesky factor of the inverse of the log-posterior's negative
        Hessian there (the Laplace approximation's covariance; Liu & Pierce 1994): Newton's steps from the prior
        mean, each halved until the log-posterior rises (Armijo's rule; Nocedal & Wright 2006, ch. 3).  The
        log-posterior is strictly concave, so the steps lead to its one maximum from any start."""
        n, r = len(codes), len(self.F)
        eta = np.broadcast_to(self.alpha_F, (n, r)).copy()
        active = np.arange(n)
        for _ in range(MODE_ITERATIONS):
            if not len(active):
                break
            e, cd, zz = eta[active], codes[active], z[active]
            _, g, h = self._log_likelihood_derivatives(cd, zz, e)
            g = g - (e - self.alpha_F) @ self.prior_precision
            curvature = self.prior_precision - h  # negative Hessian of the log-posterior: positive definite
            step = np.linalg.solve(curvature, g[:, :, None])[:, :, 0]
            rise = np.sum(g * step, axis=1)  # the directional derivative, >= 0
            start = self._log_posterior(cd, zz, e)
            t = np.ones(len(active))
            for _ in range(60):
                trial = e + t[:, None] * step
                short = self._log_posterior(cd, zz, trial) < start + 1e-4 * t * rise
                short &= t * np.max(np.abs(step) / self.prior_sd, axis=1) > MODE_TOLERANCE
                if not short.any():
                    break
                t = np.where(short, 0.5 * t, t)
            eta[active] = e + t[:, None] * step
            active = active[np.max(np.abs(t[:, None] * step) / self.prior_sd, axis=1) > MODE_TOLERANCE]
        _, _, h = self._log_likelihood_derivatives(codes, z, eta)
        covariance = np.linalg.inv(self.prior_precision - h)
        return eta, np.linalg.cholesky(0.5 * (covariance + np.swapaxes(covariance, 1, 2)))

    def _moments(self, codes, z, centre, chol, rule: Rule):
        """Posterior mean and covariance of eta_F from ``rule`` placed at centre + chol u."""
        u, log_w = rule.points, rule.log_weights
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
        centre, chol = self._mode(codes, z)
        mean = centre.copy()
        cov = chol @ np.swapaxes(chol, 1, 2)
        for rule, tolerance in self._stages:
            active = np.arange(len(codes))
            for _ in range(MAX_ITERATIONS):
                m_new, c_new = self._moments(codes[active], z[active], centre[active], chol[active], rule)
                change = np.max(np.abs(m_new - mean[active]) / self.prior_sd, axis=1)
                mean[active], cov[active] = m_new, c_new
                values = np.linalg.eigvalsh(c_new)
                good = np.all(values > 1e-12 * self.prior_sd.max() ** 2, axis=1)
                # a covariance the rule cannot resolve keeps the grid's scale (before s23 its Cholesky factor was
                # factorised again as if it were a covariance, which crashed: new-user trial s23b, finding 5)
                new_chol = chol[active]
                if good.any():
                    new_chol[good] = np.linalg.cholesky(c_new[good])
                centre[active] = m_new
                chol[active] = new_chol
                active = active[change > tolerance]
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
