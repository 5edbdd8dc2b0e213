"""Normal-theory maximum-likelihood discrepancy, gradient and expected information.

F(theta) = log|Sigma| + tr(S Sigma^-1) - log|S| - p   (Joreskog 1969; Bollen 1989, eq. 4.67)

Gradient:  dF/dtheta_k = tr(Sigma^-1 (Sigma - S) Sigma^-1 dSigma_k)
Expected second derivatives:  H_kl = tr(Sigma^-1 dSigma_k Sigma^-1 dSigma_l)
(Browne 1974).  With N observations the Fisher information is (N/2) H and the
chi-square statistic is N F at the minimum.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from cfa_tool.estimation.objective import Evaluation, ScoreRoute
from cfa_tool.numerics.linalg import KnownFactor, sample_factor_of, spd_inverse
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.rank_two import (basis_vectors, candidate_blocks, cross_term, gradient_and_information, mean_coefficients,
                                     mean_second_derivatives, model_columns, path_second_derivatives,
                                     second_derivative_contraction)


#: the size (numbers) from which the score tests' blocks of candidates are made in arrays reused from chunk to chunk,
#: reading runs of an item's residual covariances as slices (model.rank_two.candidate_blocks); smaller blocks are
#: gathered into new arrays, with fewer numpy calls (at 30 items the runs' calls cost more than they save, at 60
#: items, 256 x 129 numbers, they gained nothing measurable; at 120 items, 256 x 306, a fifth of the blocks' time)
REUSED_BLOCK = 1 << 16


class SingularMoments(ValueError):
    """A sample covariance matrix that is not positive definite (a resample or simulated data set
    with too few distinct rows); data read from files are checked before this can happen."""


@dataclass(frozen=True)
class GroupMoments:
    """Sample moments of one group: covariance (divisor N), mean vector, size."""

    covariance: np.ndarray
    mean: np.ndarray
    n_obs: int
    rows: np.ndarray | None = None  # raw complete rows, when robust statistics are wanted
    design: object | None = None  # data.sample_design.RowDesign of the rows (weights, clusters, strata), if any
    # the covariance's factor made by the checks of the moments (data.moments.SampleMoments.factor), read for this matrix
    factor: KnownFactor | None = field(default=None, repr=False, compare=False)


class NormalParts:
    """One group's pieces of the complete-data discrepancy at theta, from which
    :mod:`cfa_tool.model.rank_two` differentiates it along any direction."""

    def __init__(self, sigma_inv: np.ndarray, M: np.ndarray, mean_gradient: np.ndarray | None,
                 value: float, log_det: float):
        self.value = value  # this group's discrepancy
        self.sigma_inv = sigma_inv
        self.log_det = log_det  # log|Sigma|
        self.M = M  # Sigma^-1 (Sigma - S - d d') Sigma^-1
        self.mean_gradient = mean_gradient  # -2 Sigma^-1 d, or None without a mean structure


class NormalLikelihood:
    """The ML discrepancy summed over groups, weighted by group size.

    F = sum_g (N_g / N) [log|Sigma_g| + tr(S_g Sigma_g^-1) - log|S_g| - p + d_g' Sigma_g^-1 d_g]
    with d_g = m_g - mu_g when the model has a mean structure (Sorbom 1974), so
    that N F is the likelihood-ratio chi-square against the saturated model.
    """

    #: the flag the assessment after the search reads (pipeline.continuous.assess), never an attribute's presence:
    #: complete rows, so each group's :attr:`sample_factors` and :meth:`sigma_inverse` at the estimates are there to
    #: share (full-information ML's MissingDataLikelihood declares False and holds its rows pattern by pattern)
    complete_data = True
    score_route = ScoreRoute.RANK_TWO  # candidate_scores

    def __init__(self, model: StructuredModel, groups: list[GroupMoments]):
        self.model = model
        self.groups = groups
        self.n_total = sum(g.n_obs for g in groups)
        self.weights = [g.n_obs / self.n_total for g in groups]
        self.p = model.p
        self.means = model.mean_structure
        self.n_statistics = len(groups) * (self.p * (self.p + 1) // 2 + (self.p if self.means else 0))
        self.logdet_S = []
        #: each group's (Cholesky factor of S, log|S|), read again by the whitened rows of the diagnostics
        self.sample_factors = []
        for g in groups:
            found = sample_factor_of(g.covariance, g.factor)
            if found is None:
                raise SingularMoments("sample covariance matrix is not positive definite")
            self.sample_factors.append(found)
            self.logdet_S.append(found[1])
        self._active, self._basis, self._J = model.active, model.bases, model.active_J
        self._memo: dict = {}

    def group_discrepancy(self, theta: np.ndarray, g: int) -> float:
        state = self._group_state(theta, g)
        return np.inf if state is None else state[1].value

    def value(self, theta: np.ndarray) -> float:
        if len(self.weights) == 1:
            return self.group_discrepancy(theta, 0)
        return float(sum(w * self.group_discrepancy(theta, g) for g, w in enumerate(self.weights)))

    def _group_state(self, theta: np.ndarray, g: int):
        """[matrices, parts, rank-two pieces or None] of group g at theta, or None when Sigma is not
        positive definite.

        The last result per group is kept: a line search's trial value, the evaluation that
        follows at the accepted point and the Hessian there all need the same factorisation
        (and the last two the same rank-two pieces)."""
        key = theta.tobytes()
        memo = self._memo.get(g)
        if memo is not None and memo[0] == key:
            return memo[1]
        state = self._compute_state(theta, g)
        self._memo[g] = (key, state)
        return state

    def _compute_state(self, theta: np.ndarray, g: int):
        mats = self.model.matrices(theta, g)
        sigma = mats.implied_covariance()
        found = spd_inverse(sigma)
        if found is None:
            return None
        sigma_inv, log_det = found
        S = self.groups[g].covariance
        mean_gradient = None
        value = log_det + float(np.vdot(sigma_inv, S)) - self.logdet_S[g] - self.p
        target = sigma - S
        if self.means:
            dev = self.groups[g].mean - mats.implied_mean()
            target -= np.outer(dev, dev)
            mean_gradient = -2.0 * sigma_inv @ dev
            value += float(dev @ sigma_inv @ dev)
        return [mats, NormalParts(sigma_inv, sigma_inv @ target @ sigma_inv, mean_gradient, value, log_det), None]

    def matrices(self, theta: np.ndarray, g: int):
        """Group g's model matrices at theta: those of the discrepancy's state there (their implied covariance
        already computed, no second scatter of theta), or new ones where Sigma is not positive definite."""
        state = self._group_state(theta, g)
        return self.model.matrices(theta, g) if state is None else state[0]

    def sigma_inverse(self, theta: np.ndarray, g: int) -> tuple[np.ndarray, float] | None:
        """(Sigma^-1, log|Sigma|) of group g at theta, from the factorisation the discrepancy used (None when
        Sigma is not positive definite)."""
        state = self._group_state(theta, g)
        return None if state is None else (state[1].sigma_inv, state[1].log_det)

    def _rank_two(self, theta: np.ndarray, g: int, with_information: bool = True):
        """(mats, parts, gradient and information over the group's active entries, K, Q, V, a) or None (V and a:
        :func:`~cfa_tool.model.rank_two.basis_vectors` of the matrices, kept for the score tests)."""
        state = self._group_state(theta, g)
        if state is None:
            return None
        mats, parts, known = state
        if known is not None and (known[3] is not None or not with_information):
            return known
        V, a = basis_vectors(mats, self.means)
        g_e, H_e, K, Q = gradient_and_information(self._basis[g], V, a, parts.sigma_inv, parts.M, parts.mean_gradient,
                                                  with_information)
        for kept in (g_e, H_e):  # shared by every caller at this point (see _evaluate)
            if kept is not None:
                kept.setflags(write=False)
        state[2] = (mats, parts, g_e, H_e, K, Q, V, a)
        return state[2]

    def evaluate(self, theta: np.ndarray) -> Evaluation | None:
        """Value, gradient and expected information at theta (None if some Sigma is not positive definite)."""
        return self._evaluate(theta, True)

    def candidate_scores(self, theta: np.ndarray, g: int, chunks):
        """(d, H_ct, h) of group g's candidate entries for score tests, one triple per chunk of candidates
        (``chunks``: their :class:`~cfa_tool.model.rank_two.EntryBasis`, made when used): gradient,
        cross-information with theta and own information, all of this group's discrepancy (unweighted).
        What every chunk reads (K, Q and the model's columns of K) is made once, and the chunks' cross-information is
        made in the same arrays each time when large (:data:`REUSED_BLOCK`): read (or copy) a chunk's H_ct before
        asking for the next."""
        out = self._rank_two(theta, g, with_information=False)
        if out is None:
            return
        mats, parts, _, _, K, Q, V, a = out
        Vm = V.T @ parts.mean_gradient if parts.mean_gradient is not None else None
        model = self._basis[g]
        columns = model_columns(model, K)
        J = None if self.model.identity_J[g] else self._J[g]
        chunks = tuple(chunks)
        rows = max((len(cand.u) for cand in chunks), default=0)
        buffers = (tuple(np.empty((rows, len(model.u))) for _ in range(3)) if rows * len(model.u) >= REUSED_BLOCK
                   else None)
        for cand in chunks:
            d, H_ce, h = candidate_blocks(cand, model, K, Q, Vm, a, columns, buffers)
            yield d, (H_ce if J is None else H_ce @ J), h

    def _evaluate(self, theta: np.ndarray, with_information: bool) -> Evaluation | None:
        if len(self.weights) == 1 and self.model.identity_J[0]:  # one group, each parameter one entry
            out = self._rank_two(theta, 0, with_information)
            if out is None or not np.isfinite(out[1].value):
                return None
            return Evaluation(out[1].value, out[2], out[3])  # the memo's read-only arrays
        q = len(theta)
        gradient = np.zeros(q)
        information = np.zeros((q, q)) if with_information else None
        value = 0.0
        for g, w in enumerate(self.weights):
            out = self._rank_two(theta, g, with_information)
            if out is None:
                return None
            _, parts, g_e, H_e, *_ = out
            value += w * parts.value
            if self.model.identity_J[g]:
                gradient += w * g_e
                if with_information:
                    information += w * H_e
            else:
                J = self._J[g]
                gradient += w * (g_e @ J)
                if with_information:
                    information += w * (J.T @ H_e @ J)
        if not np.isfinite(value):
            return None
        return Evaluation(value, gradient, information)

    def gradient(self, theta: np.ndarray) -> np.ndarray:
        ev = self._evaluate(theta, False)
        return np.full(len(theta), np.nan) if ev is None else ev.gradient

    def observed_hessian(self, theta: np.ndarray) -> np.ndarray | None:
        """Second derivatives of F in closed form, summed over groups with the weights N_g / N (None where some
        Sigma is not positive definite).  Per group,
        with W = Sigma^-1, D = dSigma, d = xbar - mu, M = W (Sigma - S - d d') W and m = -2 W d (S and xbar the
        sample covariance and means):

            F_ab = tr(W D_a W D_b) - 2 tr(W D_b M D_a) + tr(M D_ab)
                   + 2 dmu_a' W dmu_b + 2 d' W D_a W dmu_b + 2 d' W D_b W dmu_a + m' dmu_ab

        (the terms in mu only with a mean structure, Sorbom 1974's discrepancy differentiated twice; the same
        terms as :meth:`cfa_tool.estimation.fiml.MissingDataLikelihood.observed_hessian` for one pattern without
        gaps).  The second derivatives D_ab are nonzero only for pairs of loadings (2 M_ik Phi_jl) and
        loading-factor covariance pairs, dmu_ab only for a loading and its factor's mean (Neudecker & Satorra 1991
        give the general second derivatives); the traces are gathers from K and Q (:mod:`cfa_tool.model.rank_two`).
        With higher-order factors the pairs with a path between factors have terms too
        (:func:`~cfa_tool.model.rank_two.path_second_derivatives`)."""
        total = None
        for g, weight in enumerate(self.weights):
            H = self._group_hessian(theta, g)
            if H is None:
                return None
            if not self.model.identity_J[g]:
                J = self._J[g]
                H = J.T @ H @ J
            if len(self.weights) == 1:  # one group: its own (weight 1), as before groups were summed
                total = H
            else:
                total = weight * H if total is None else total + weight * H
        return 0.5 * (total + total.T)

    def _group_hessian(self, theta: np.ndarray, g: int) -> np.ndarray | None:
        """Group g's second derivatives (:meth:`observed_hessian`) over its active entries, unweighted."""
        out = self._rank_two(theta, g)
        if out is None:
            return None
        model, basis = self.model, self._basis[g]
        mats, parts, _, expected, K, Q, V, a = out
        cross = cross_term(basis, K, Q)
        p, m = model.p, model.m  # Q = V' M V with V = [I, C', L] holds M L in its first rows
        active = model.active[g]
        if model.higher_order:
            second = path_second_derivatives(model._codes[g][active], model._rows[g][active], model._cols[g][active],
                                             parts.M, mats, parts.mean_gradient)
        else:
            second = second_derivative_contraction(model.second_orders[g], parts.M, mats.L, mats.P, Q[:p, p + m:])
        H = expected - cross - cross.T + second
        if parts.mean_gradient is not None:
            # 2 d' W D_a W dmu_b = -c_a s_b (Vm[u_a] K[v_a, w_b] + Vm[v_a] K[u_a, w_b]), Vm = V' m
            Vm = V.T @ parts.mean_gradient
            s = mean_coefficients(basis, a)
            mixed = ((basis.c * Vm[basis.u])[:, None] * K[np.ix_(basis.v, basis.w)]
                     + (basis.c * Vm[basis.v])[:, None] * K[np.ix_(basis.u, basis.w)]) * -s
            H += mixed + mixed.T
            if not model.higher_order:  # with paths, in path_second_derivatives
                H += mean_second_derivatives(model._codes[g][active], model._rows[g][active], model._cols[g][active],
                                             parts.mean_gradient)
        return H
