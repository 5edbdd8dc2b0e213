"""Full-information maximum likelihood for incomplete data (Anderson 1957;
Arbuckle 1996), with rows grouped by missing-data pattern so that one batched
factorisation serves every row of a pattern.

For pattern k with n_k rows, observed set o, sample mean m_k and scatter S_k:
    f(theta) = sum_k (n_k / N) [log|Sigma_oo| + tr(Sigma_oo^-1 (S_k + d_k d_k'))],  d_k = m_k - mu_o
and the discrepancy is F = f(theta) - f(saturated), the saturated model being
estimated by EM, so that N F is the likelihood-ratio chi-square.

With A_k = Sigma_oo^-1 embedded in p x p (zeros elsewhere):
    df/dSigma = sum_k w_k (A_k - A_k T_k A_k),  df/dmu = -2 sum_k w_k A_k d_k,
and the information used for scoring treats patterns as fixed:
    H = sum_k w_k [tr(A_k X A_k Y) + 2 x_mu' A_k y_mu]
(the "expected" information of Kenward & Molenberghs 1998; standard errors use
the observed information).

For a model whose derivatives are rank-two (a StructuredModel: D_e = c_e (u v' + v u') for columns u, v of
V = [I, C', G], :mod:`cfa_tool.model.rank_two`) every trace is a product of entries of the patterns'
K_k = V' A_k V (and Q_k = V' A_k T_k A_k V for the observed Hessian), so the search's gradient and information,
the observed Hessian and the modification indices need gathers, never a p x p derivative or the patterns' (p*p, p*p)
weight matrix.  No pattern's p x p matrix is made on this route either (speed-s24): A_k is kept in the low-rank form of
the Schur complement, L - L_.m C_k L_m. with L = Sigma^-1 and C_k = (L_mm)^-1 (:class:`~cfa_tool.data.patterns.
PatternInverses`), so that K_k = V' L V - R_k' C_k R_k (R_k = (L V)_m: m r (m + r) a pattern, where V' A_k V took
p r (p + r)), and the sums in T_k are sums over the rows: with u_i = A_k (x_i - mu),
    sum_k w_k tr(A_k T_k) = (1/N) sum_i e_i' u_i,   sum_k w_k A_k T_k A_k = (1/N) sum_i u_i u_i',
    Q_k = V' A_k T_k A_k V = (1/n_k) sum_{i in k} (V' u_i)(V' u_i)'
(n p^2 for all rows, where A_k T_k A_k took 2 p^3 a pattern).  The sums over the patterns of products of the K_k's
entries (the information's and the Hessian's traces) are taken in the rank-m form K_k = K0 - F_k' F_k (speed-s25,
:func:`low_rank_trace_sum`): terms of K0, of sum_k w_k F_k' F_k and of the rows' V' u_i, and one symmetric product of
the patterns' pairs of missing items, at the processor's matrix speed instead of E x E gathers a pattern.  The joint
model of missing-data helpers and its baseline give their own basis (``rank_two_layout``,
:mod:`cfa_tool.estimation.auxiliary`) and take the same sums.  The information in the moments themselves (the robust
routes and the robust score tests) is gathered from one product over the patterns' distinct elements
(:func:`moment_second_derivatives`).  The general route, with whole (q, p, p) derivatives (``model.jacobian``) and
that weight matrix a block at a time, is the reference both are checked against (tests/estimation/test_fiml_rank_two.py,
tests/estimation/test_fiml_without_weight_matrix.py).
"""

from __future__ import annotations

import numpy as np

from cfa_tool.estimation.objective import Evaluation, ScoreRoute
from cfa_tool.model.rank_two import (basis_vectors, gradient_and_information, mean_coefficients, mean_second_derivatives,
                                     path_second_derivatives, second_derivative_contraction)
from cfa_tool.data.em import weighted_available_moments
from cfa_tool.data.patterns import (PatternBases, PatternData, applied_inverses, batch_members, embedded_inverse,
                                    missing_groups, pattern_inverses, refuse_large_patterns,
                                    weighted_inverse_sum)
from cfa_tool.model.implied import StructuredModel


def pattern_objective(data: PatternData, mu: np.ndarray, sigma: np.ndarray) -> float:
    """f(mu, Sigma) summed over patterns, weighted by n_k / N (inf if some Sigma_oo is not positive definite): the
    patterns' log|Sigma_oo| and the traces tr(A_k T_k) summed over the rows (:func:`row_objective`), no pattern's p x p
    matrix made."""
    missing = list(missing_groups(data.observed))
    inv = pattern_inverses(sigma, data.observed, missing)
    if inv is None:
        return np.inf
    observed = ~np.isnan(data.rows)
    resid = np.where(observed, data.rows - mu, 0.0)
    return row_objective(data, inv, resid, applied_inverses(inv, resid, batch_members(missing, data.index), observed))


def row_objective(data: PatternData, inv, resid: np.ndarray, u: np.ndarray) -> float:
    """sum_k w_k (log|Sigma_oo| + tr(A_k T_k)) with w_k = n_k / N and T_k the mean of the pattern's rows'
    e_i e_i' (e_i = x_i - mu; ``resid``), so that the traces are (1/N) sum_i e_i' A_k e_i over the rows (``u``: the rows'
    A_k e_i; with row weights every sum weighted)."""
    traces = data.row_weights @ np.einsum("ij,ij->i", resid, u) / data.n_obs
    return float(data.counts / data.n_obs @ inv.logdet + traces)


def moment_hessian(data: PatternData, mu: np.ndarray, sigma: np.ndarray, rows: np.ndarray, cols: np.ndarray
                   ) -> np.ndarray | None:
    """The observed information of the saturated (unstructured) model in its moments beta = (mu, vech Sigma), vech's
    elements at (``rows``, ``cols``): the second derivatives of f (module docstring) at any (mu, Sigma), whose
    directions are linear in the moments, so that the terms of :func:`first_order_hessian` are all there is, gathered
    by :func:`moment_second_derivatives` (None if some Sigma_oo is not positive definite)."""
    inv = embedded_inverse(sigma, data.observed)
    if inv is None:
        return None
    A, _ = inv
    dev = np.where(data.observed, data.means - mu, 0.0)
    T = data.scatter + dev[:, :, None] * dev[:, None, :]
    w = data.counts / data.counts.sum()
    return moment_second_derivatives(A, w, rows, cols, A @ T @ A, (A @ dev[:, :, None])[:, :, 0])


class MissingParts:
    """One group's pieces of the FIML discrepancy at theta (see the module docstring)."""

    def __init__(self, M: np.ndarray, mean_gradient: np.ndarray, A: np.ndarray, w: np.ndarray):
        self.M = M
        self.mean_gradient = mean_gradient
        self.A, self.w = A, w  # the patterns' A_k and weights w_k, whose sum_k w_k tr(A X A Y) is the information
        self.mean_weight = np.tensordot(w, A, axes=1)  # sum_k w_k A_k
        self._G = None  # at few items, the whole weight matrix of :func:`_trace_products`, made once

    def _products(self, x_sigma: np.ndarray) -> np.ndarray:
        if self._G is None and _in_one_block(self.A.shape[1]):
            self._G = _trace_weights(self.A, self.A, self.w)
        return _trace_products(self.A, self.A, self.w, x_sigma, self._G)

    def gradient(self, d_sigma: np.ndarray, d_mu: np.ndarray) -> np.ndarray:
        return d_sigma.reshape(len(d_sigma), -1) @ self.M.ravel() + d_mu @ self.mean_gradient

    def information_diagonal(self, x_sigma: np.ndarray, x_mu: np.ndarray) -> np.ndarray:
        T = self._products(x_sigma)
        return np.einsum("kib,kbi->k", T, x_sigma) + 2.0 * np.einsum("ki,ij,kj->k", x_mu, self.mean_weight, x_mu)

    def information(self, x_sigma, x_mu, y_sigma=None, y_mu=None) -> np.ndarray:
        y_sigma = x_sigma if y_sigma is None else y_sigma
        y_mu = x_mu if y_mu is None else y_mu
        # tr(A X A Y) = sum_{ijab} A_ij X_ja A_ab Y_bi: the products A X A, then their traces with Y
        return _trace_contract(self._products(x_sigma), y_sigma) + 2.0 * x_mu @ self.mean_weight @ y_mu.T


class MissingDataLikelihood:
    """FIML discrepancy summed over groups, weighted by group size."""

    #: rows with gaps, held pattern by pattern (:attr:`patterns`): the flag the assessment reads (NormalLikelihood)
    complete_data = False

    def __init__(self, model: StructuredModel, patterns: list[PatternData], saturated: list[tuple[np.ndarray, np.ndarray]],
                 groups):
        self.model = model
        self.patterns = patterns
        # the stacks of one p x p matrix per pattern that a fit makes whole (the case diagnostics' inverses, the robust
        # routes' A_k, A T A and scatter) within the one limit before any is made; the search's own K_k = V' A_k V
        # come a chunk at a time (PatternBases) and hold no such stack
        refuse_large_patterns(max((len(d.counts) for d in patterns), default=0),
                              max((d.rows.shape[1] for d in patterns), default=0), model.p)
        self.groups = groups  # GroupMoments holding the EM (saturated) moments, for reports and starts
        self.n_total = sum(d.n_obs for d in patterns)
        self.weights = [d.n_obs / self.n_total for d in patterns]
        self.p = model.p
        self.means = True
        self.n_statistics = len(patterns) * (self.p * (self.p + 1) // 2 + self.p)
        self.saturated_value = [pattern_objective(d, mu, sigma) for d, (mu, sigma) in zip(patterns, saturated)]
        self._row_blocks = [_row_blocks(d.rows, d.row_weights) for d in patterns]  # fixed by the data: computed once
        # each group's missing items by pattern, batched by their number (fixed by the data), for embedded_inverse
        self._missing = [list(missing_groups(d.observed)) for d in patterns]
        # each row's batch of patterns and place in it, the rows sorted by pattern (for the patterns' sums over rows)
        self._members = [batch_members(m, d.index) for d, m in zip(patterns, self._missing)]
        self._pattern_members = [batch_members(m, np.arange(len(d.counts))) for d, m in zip(patterns, self._missing)]
        self._at = None  # the last point's per-pattern pieces: (theta's bytes, {group: pieces})

    def _pieces(self, theta: np.ndarray, g: int):
        """Group g's pieces at theta: (matrices, the patterns' inverses (:class:`~cfa_tool.data.patterns.PatternInverses`,
        no stack of p x p matrices), w, d, the rows' residuals e_i = x_i - mu and u_i = A_k e_i (zeros where a row has
        gaps)), None if some Sigma_oo is not positive definite.  The search asks for the value, the gradient and
        information, and the Hessian at the same point one after the other; the pieces of the last point are kept, so
        they are computed once."""
        key = theta.tobytes()
        if self._at is None or self._at[0] != key:
            self._at = (key, {})
        kept = self._at[1]
        if g not in kept:
            data = self.patterns[g]
            mats = self.model.matrices(theta, g)
            inv = pattern_inverses(mats.implied_covariance(), data.observed, self._missing[g])
            if inv is None:
                kept[g] = None
            else:
                mu = mats.implied_mean()
                observed = self._row_blocks[g][0]
                dev = np.where(data.observed, data.means - mu, 0.0)
                resid = np.where(observed, data.rows - mu, 0.0)
                u = applied_inverses(inv, resid, self._members[g], observed)
                kept[g] = (mats, inv, data.counts / data.n_obs, dev, resid, u)
        return kept[g]

    def _stacks(self, theta: np.ndarray, g: int):
        """(A, A T A) of group g at theta as stacks of one p x p matrix per pattern (A_k = Sigma_oo^-1 embedded,
        T_k = S_k + d_k d_k'), for the routes that take them whole: the general route of models whose derivatives are
        not rank-two gathers and the information in the moments (:meth:`moment_hessian`); kept with the point's
        pieces."""
        pieces = self._pieces(theta, g)
        kept = self._at[1]
        if ("stacks", g) not in kept:
            data = self.patterns[g]
            A, _ = embedded_inverse(pieces[0].implied_covariance(), data.observed, self._missing[g])
            dev = pieces[3]
            T = data.scatter + dev[:, :, None] * dev[:, None, :]
            kept[("stacks", g)] = A, A @ T @ A
        return kept[("stacks", g)]

    def matrices(self, theta: np.ndarray, g: int):
        """Group g's model matrices at theta: those of the point's pieces when kept (as
        :meth:`cfa_tool.estimation.ml.NormalLikelihood.matrices`), else new ones."""
        pieces = self._pieces(theta, g)
        return self.model.matrices(theta, g) if pieces is None else pieces[0]

    def _jacobian(self, theta: np.ndarray, g: int):
        """model.jacobian(theta, g), kept with the point's pieces (the information and the Hessian both use it)."""
        self._pieces(theta, g)
        kept = self._at[1]
        if ("jacobian", g) not in kept:
            kept[("jacobian", g)] = self.model.jacobian(theta, g)
        return kept[("jacobian", g)]

    @property
    def _rank_two_model(self) -> bool:
        """Whether the model's derivatives are rank-two gathers (:mod:`cfa_tool.model.rank_two`): a StructuredModel's
        are, and so are those of a model that gives its own layout (``rank_two_layout``: the joint model of missing-data
        helpers and its baseline, :mod:`cfa_tool.estimation.auxiliary`)."""
        return isinstance(self.model, StructuredModel) or hasattr(self.model, "rank_two_layout")

    def _layout(self, mats, g: int):
        """(V, a, the entries' basis, J) of group g at its matrices ``mats``: V the basis vectors whose columns the
        entries' derivatives c (u v' + v u') and s w take, a the mean coefficients, J the map from the parameters to the
        entries (a StructuredModel's :func:`~cfa_tool.model.rank_two.basis_vectors`, ``bases`` and ``active_J``)."""
        if isinstance(self.model, StructuredModel):
            V, a = basis_vectors(mats, True)
            return V, a, self.model.bases[g], self.model.active_J[g]
        return self.model.rank_two_layout(mats, g)

    def _rank_two_pieces(self, theta: np.ndarray, g: int):
        """(V, a, per-pattern K_k = V' A_k V, the entries' basis, J) at theta, kept with the point's pieces, None
        outside the region."""
        state = self._pattern_state(theta, g)
        if state is None:
            return None
        kept = self._at[1]
        if ("rank two", g) not in kept:
            mats, inv = state[0], state[1]
            V, a, basis, J = self._layout(mats, g)
            kept[("rank two", g)] = V, a, PatternBases(inv, V), basis, J
        return kept[("rank two", g)]

    def _rank_two(self, theta: np.ndarray, g: int) -> tuple[np.ndarray, np.ndarray] | None:
        """Group g's gradient and patterns-fixed information in theta from rank-two gathers (the module docstring's
        H; :mod:`cfa_tool.model.rank_two`): with K_k = V' A_k V per pattern,
            H_ef = sum_k w_k 2 c_e c_f (K_k[u_e, u_f] K_k[v_e, v_f] + K_k[u_e, v_f] K_k[v_e, u_f])
                   + 2 s_e s_f (V' (sum_k w_k A_k) V)[w_e, w_f],
        p_o^2 (p + 2m) a pattern and E^2 gathers, where the general route's weight matrix is p^4."""
        pieces = self._rank_two_pieces(theta, g)
        if pieces is None:
            return None
        _, _, w, M, _, mean_gradient, _ = self._pattern_state(theta, g)
        V, a, K, basis, J = pieces
        g_e, _, K_bar, _ = gradient_and_information(basis, V, a, self._mean_weight(theta, g), M, mean_gradient,
                                                    with_information=False)
        s = mean_coefficients(basis, a)
        H = self._trace_sum(theta, g) + 2.0 * np.outer(s, s) * K_bar.ravel()[basis.ww]
        return g_e @ J, J.T @ H @ J

    def _trace_sum(self, theta: np.ndarray, g: int) -> np.ndarray:
        """sum_k w_k tr(A_k D_e A_k D_f) over group g's entries at theta (:func:`low_rank_trace_sum`), kept with the
        point's pieces: the information of :meth:`evaluate` and the observed Hessian at the same point share it."""
        kept = self._at[1]
        if ("trace", g) not in kept:
            _, _, w, *_ = self._pattern_state(theta, g)
            _, _, K, basis, _ = self._rank_two_pieces(theta, g)
            kept[("trace", g)] = low_rank_trace_sum(basis, K, w)
        return kept[("trace", g)]

    @property
    def score_route(self) -> ScoreRoute:
        """Rank-two gathers (:meth:`candidate_scores`) where the model's derivatives are (missing-data helpers' joint
        model too); the general route otherwise."""
        return ScoreRoute.RANK_TWO if self._rank_two_model else ScoreRoute.GENERAL

    @property
    def candidate_scores(self):
        """:meth:`_candidate_scores` where the model's derivatives are rank-two gathers (:attr:`score_route`; with
        missing-data helpers too: a candidate is an entry of the model's matrices, its basis columns the joint layout's
        first ones, and its cross-information is with every joint parameter); absent otherwise."""
        if not self._rank_two_model:
            raise AttributeError("candidate_scores")
        return self._candidate_scores

    def _candidate_scores(self, theta: np.ndarray, g: int, chunks):
        """(d, H_ct, h) of group g's candidate entries for score tests, one triple per chunk (``chunks``: their
        :class:`~cfa_tool.model.rank_two.EntryBasis`), as :meth:`cfa_tool.estimation.ml.NormalLikelihood.candidate_scores`
        gives them: the gradient, the patterns-fixed information with theta and the candidates' own, of this group's
        discrepancy (unweighted).  With Z_e = sum_k w_k K_k[:, u_e] K_k[:, v_e]' for each model entry e (taken in the
        rank-m form K_k = K0 - F_k' F_k, :func:`low_rank_pair_sums`),
            H_ce = 2 c_c c_e (Z_e[u_c, v_c] + Z_e[v_c, u_c]) + 2 s_c s_e Kbar[w_c, w_e],
        with Kbar = V' (sum_k w_k A_k) V: no (p*p, p*p) weight matrix, and no candidate's p x p derivative."""
        pieces = self._rank_two_pieces(theta, g)
        if pieces is None:
            return
        _, _, w, M, _, mean_gradient, _ = self._pattern_state(theta, g)
        V, a, K, model, J = pieces
        Q = V.T @ M @ V
        Vm = V.T @ mean_gradient
        K_bar = V.T @ self._mean_weight(theta, g) @ V
        s_model = mean_coefficients(model, a)
        chunks = tuple(chunks)
        uc = np.concatenate([c.u for c in chunks]) if chunks else np.zeros(0, dtype=int)
        vc = np.concatenate([c.v for c in chunks]) if chunks else np.zeros(0, dtype=int)
        # the cross-information with the model's entries and the diagonal of H_cc, sums over the patterns
        H, own = low_rank_pair_sums(model, K, w, uc, vc)
        if isinstance(self.model, StructuredModel) and self.model.identity_J[g]:
            J = None  # each parameter one entry: the blocks are the cross-information with theta already
        start = 0
        for cand in chunks:
            stop = start + len(cand.u)
            sc = mean_coefficients(cand, a)
            d = 2.0 * cand.c * Q[cand.u, cand.v] + sc * Vm[cand.w]
            block = H[start:stop] * cand.c[:, None] + 2.0 * np.outer(sc, s_model) * K_bar[np.ix_(cand.w, model.w)]
            h = 2.0 * cand.c ** 2 * own[start:stop] + 2.0 * sc ** 2 * K_bar[cand.w, cand.w]
            yield d, (block if J is None else block @ J), h
            start = stop

    def _mean_weight(self, theta: np.ndarray, g: int) -> np.ndarray:
        """sum_k w_k A_k at theta (kept with the point's pieces)."""
        return self._pattern_state(theta, g)[6]

    def _rank_two_hessian(self, theta: np.ndarray, g: int, state) -> np.ndarray:
        """:func:`first_order_hessian`'s terms in theta from rank-two gathers: with K_k = V' A_k V, Q_k = V' (A T A)_k V
        and (V' A d)_k per pattern, each trace a sum over the patterns of products of their entries (the formulas of
        :mod:`cfa_tool.model.rank_two`), taken in the rank-m form K_k = K0 - F_k' F_k (:func:`low_rank_trace_sum`,
        :func:`low_rank_cross_sum` over the rows, :func:`low_rank_mean_sum`): no pattern's Q_k is made."""
        _, _, w, _, Ad, _, _ = state
        V, a, K, basis, J = self._rank_two_pieces(theta, g)
        s = mean_coefficients(basis, a)
        data = self.patterns[g]
        same = self._trace_sum(theta, g)
        mixed = low_rank_cross_sum(basis, K, self._pieces(theta, g)[5] @ V, data.row_weights / data.n_obs,
                                   self._members[g])
        cross = low_rank_mean_sum(basis, K, Ad @ V, w, s)
        K_bar = V.T @ self._mean_weight(theta, g) @ V
        H = (-same + (mixed + mixed.T) + 2.0 * (cross + cross.T) + 2.0 * np.outer(s, s) * K_bar.ravel()[basis.ww])
        return J.T @ H @ J

    def group_discrepancy(self, theta: np.ndarray, g: int) -> float:
        pieces = self._pieces(theta, g)
        if pieces is None:
            return np.inf
        _, inv, _, _, resid, u = pieces  # pattern_objective's sum
        return row_objective(self.patterns[g], inv, resid, u) - self.saturated_value[g]

    def value(self, theta: np.ndarray) -> float:
        return float(sum(w * self.group_discrepancy(theta, g) for g, w in enumerate(self.weights)))

    def _pattern_state(self, theta: np.ndarray, g: int):
        """Group g's pieces at theta (None if some Sigma_oo is not positive definite): (matrices, the patterns'
        inverses, w, M, A d, m, sum_k w_k A_k) in the notation of the module docstring, with
            sum_k w_k A_k T_k A_k = (1/N) sum_i w_i u_i u_i'   (u_i = A_k (x_i - mu), T_k the rows' mean of
        (x_i - mu)(x_i - mu)' over pattern k), so that no pattern's p x p matrix is made."""
        pieces = self._pieces(theta, g)
        if pieces is None:
            return None
        kept = self._at[1]
        if ("state", g) not in kept:
            mats, inv, w, dev, _, u = pieces
            data = self.patterns[g]
            mean_weight = weighted_inverse_sum(inv, data.observed, w)
            wu = u * (data.row_weights / data.n_obs)[:, None]
            M = mean_weight - wu.T @ u
            Ad = applied_inverses(inv, dev, self._pattern_members[g], data.observed)
            kept[("state", g)] = mats, inv, w, M, Ad, -2.0 * w @ Ad, mean_weight
        return kept[("state", g)]

    def group_parts(self, theta: np.ndarray, g: int) -> MissingParts | None:
        state = self._pattern_state(theta, g)
        if state is None:
            return None
        _, _, w, M, _, mean_gradient, _ = state
        return MissingParts(M, mean_gradient, self._stacks(theta, g)[0], w)

    def moment_hessian(self, theta: np.ndarray, g: int, rows: np.ndarray, cols: np.ndarray,
                       observed: bool = True) -> np.ndarray | None:
        """Group g's information in the moments beta = (mu, vech Sigma) (vech's elements at ``rows``, ``cols``) at the
        model's moments at theta, with the patterns weighed n_k / n_obs, as :meth:`observed_hessian` and
        :meth:`group_parts` weigh them (n_obs rounds the sum of sampling weights): the observed one, the first-order
        terms of :meth:`observed_hessian` here in the moments, or (``observed`` False) the patterns-fixed one of
        :meth:`evaluate`; both gathered by :func:`moment_second_derivatives`, no (p*p, p*p) weight matrix.  None if
        some Sigma_oo is not positive definite."""
        state = self._pattern_state(theta, g)
        if state is None:
            return None
        _, _, w, _, Ad, _, _ = state
        A, ATA = self._stacks(theta, g)
        if not observed:
            return moment_second_derivatives(A, w, rows, cols)
        return moment_second_derivatives(A, w, rows, cols, ATA, Ad)

    def evaluate(self, theta: np.ndarray) -> Evaluation | None:
        """Value, gradient and patterns-fixed information summed over groups (None outside the region)."""
        q = len(theta)
        gradient = np.zeros(q)
        information = np.zeros((q, q))
        for g, w in enumerate(self.weights):
            if self._rank_two_model:
                out = self._rank_two(theta, g)
                if out is None:
                    return None
                group_gradient, group_information = out
            else:
                parts = self.group_parts(theta, g)
                if parts is None:
                    return None
                d_sigma, d_mu = self._jacobian(theta, g)
                group_gradient, group_information = parts.gradient(d_sigma, d_mu), parts.information(d_sigma, d_mu)
            gradient += w * group_gradient
            information += w * group_information
        value = self.value(theta)
        if not np.isfinite(value):
            return None
        return Evaluation(value, gradient, information)

    def observed_hessian(self, theta: np.ndarray) -> np.ndarray | None:
        """Second derivatives of F in closed form (None where some Sigma_oo is not positive definite).

        Differentiating the gradient (module docstring) once more, per pattern k and summed with w_k:
            H_ab = sum_k w_k [-tr(A D_a A D_b) + 2 tr(A D_a (A T A) D_b) + 2 d'A D_a A dmu_b
                              + 2 d'A D_b A dmu_a + 2 dmu_a' A dmu_b]
                   + tr(M D_ab) + m' dmu_ab
        with M = sum_k w_k (A - A T A) and m = -2 sum_k w_k A d (the gradient's parts); D_ab and
        dmu_ab are the second derivatives of Sigma and mu (Neudecker & Satorra 1991)."""
        q = len(theta)
        total = np.zeros((q, q))
        for g, w_group in enumerate(self.weights):
            state = self._pattern_state(theta, g)
            if state is None:
                return None
            mats, _, w, M, Ad, mean_gradient, _ = state
            if self._rank_two_model:
                H = self._rank_two_hessian(theta, g, state)
            else:
                A, ATA = self._stacks(theta, g)
                H = first_order_hessian(A, w, ATA, Ad, *self._jacobian(theta, g))
            total += w_group * (H + self._second_order(g, mats, M, mean_gradient))
        return 0.5 * (total + total.T)

    def _second_order(self, g: int, mats, M: np.ndarray, mean_gradient: np.ndarray) -> np.ndarray:
        """Group g's tr(M D_ab) + m' dmu_ab (:meth:`observed_hessian`): the model's (:func:`model_second_order`)."""
        return model_second_order(self.model, g, mats, M, mean_gradient)

    def gradient(self, theta: np.ndarray) -> np.ndarray:
        """The gradient alone, row by row (no information matrix): what finite-difference
        second derivatives need.  With r_i = x_i - mu (observed part) and u_i = A_i r_i:
        df/dSigma = (1/N) sum_i A_i - (1/N) sum_i u_i u_i',  df/dmu = -(2/N) sum_i u_i
        (with row weights w_i every sum weighted and N = sum_i w_i; Asparouhov 2005).
        A_i comes from the precision matrix L by the Schur complement, row by row, without
        forming every pattern's p x p matrix: u_i = L r_i - L_.m C_i L_m. r_i (observed part),
        C_i = (L_mm)^-1."""
        q = len(theta)
        total = np.zeros(q)
        for g, w_group in enumerate(self.weights):
            data = self.patterns[g]
            mats = self.model.matrices(theta, g)
            sigma = mats.implied_covariance()
            precision = np.linalg.inv(sigma)
            rows = data.rows
            p = self.p
            observed, together, blocks = self._row_blocks[g]
            weights = data.weights
            n = float(data.counts.sum())
            resid = np.where(observed, rows - mats.implied_mean(), 0.0)
            v = resid @ precision
            u = v.copy()
            mean_A = precision * together / n
            for which, miss, seen in blocks:
                cond = np.linalg.inv(precision[miss[:, :, None], miss[:, None, :]])  # (L_mm)^-1 per row
                side = precision[miss] * seen  # L_m. restricted to observed columns
                z = (cond @ v[which[:, None], miss][:, :, None])[:, :, 0]
                u[which] -= np.einsum("rk,rkp->rp", z, side)
                # sum over rows of side' cond side, as one matrix product over all (row, missing item) pairs
                left = side if weights is None else side * weights[which, None, None]
                mean_A -= left.reshape(-1, p).T @ (cond @ side).reshape(-1, p) / n
            u = np.where(observed, u, 0.0)
            wu = u if weights is None else u * weights[:, None]
            M = mean_A - wu.T @ u / n
            d_sigma, d_mu = self.model.jacobian(theta, g)
            total += w_group * (d_sigma.reshape(q, -1) @ M.ravel() - 2.0 * d_mu @ (wu.sum(axis=0) / n))
        return total


def first_order_hessian(A: np.ndarray, w: np.ndarray, ATA: np.ndarray, Ad: np.ndarray, d_sigma: np.ndarray,
                        d_mu: np.ndarray) -> np.ndarray:
    """The terms of :meth:`MissingDataLikelihood.observed_hessian` in the first derivatives D_a, dmu_a (``d_sigma``,
    ``d_mu``) of Sigma and mu, from the patterns' A, weights w, A T A and A d:
        sum_k w_k [-tr(A D_a A D_b) + 2 tr(A D_a (A T A) D_b) + 2 d'A D_a A dmu_b + 2 d'A D_b A dmu_a
                   + 2 dmu_a' A dmu_b]."""
    q = len(d_sigma)
    P, p, _ = A.shape
    same = _trace_contract(_trace_products(A, A, w, d_sigma), d_sigma)  # sum_k w_k tr(A X A Y)
    mixed = _trace_contract(_trace_products(A, ATA, w, d_sigma), d_sigma)  # sum_k w_k tr(A X (ATA) Y)
    t3 = (Ad * w[:, None]).T @ A.reshape(P, p * p)  # [i, (j, l)] = sum_k w_k (A d)_i A_jl
    cross = d_sigma.reshape(q, p * p) @ t3.reshape(p * p, p) @ d_mu.T  # d'A D_a A dmu_b
    return (-same + (mixed + mixed.T) + 2.0 * (cross + cross.T)  # mixed is symmetric: 2 mixed, symmetrised
            + 2.0 * d_mu @ np.tensordot(w, A, axes=1) @ d_mu.T)


def moment_second_derivatives(A: np.ndarray, w: np.ndarray, rows: np.ndarray, cols: np.ndarray,
                               ATA: np.ndarray | None = None, Ad: np.ndarray | None = None) -> np.ndarray:
    """The patterns' second derivatives of f in the moments beta = (mu, vech Sigma) themselves, vech's elements at
    (``rows``, ``cols``) (d Sigma / d sigma_ij = E_ij + E_ji off the diagonal, E_ii on it; d mu / d mu_i = e_i):
    with ``ATA`` None the patterns-fixed information sum_k w_k [tr(A D_a A D_b) + 2 dmu_a' A dmu_b]
    (:meth:`MissingParts.information` in those directions), else the observed one, :func:`first_order_hessian`'s
    terms (with ``Ad``).  Every trace of unit directions is a sum of products of the patterns' entries,
    tr(X E_ij Y E_lm) = X_mi Y_jl, read from one product over the patterns of their distinct elements
    (:func:`_pair_traces`): P p^4 / 4 products and gathers, where the directions' (k, p, p) array times the
    (p*p, p*p) weight matrix took k p^4 (k = p + p(p+1)/2) and made both arrays."""
    P, p, _ = A.shape
    kv = len(rows)
    out = np.zeros((p + kv, p + kv))
    out[:p, :p] = 2.0 * np.tensordot(w, A, axes=1)
    same = _pair_traces(A, None, w, rows, cols)  # sum_k w_k tr(A D_a A D_b)
    if ATA is None:
        out[p:, p:] = same
        return out
    block = out[p:, p:]  # mixed + mixed' - same, mixed symmetric: in place, no matrix of the moments beside
    block[...] = _pair_traces(A, ATA, w, rows, cols)
    block *= 2.0
    block -= same
    # d'A D_a A dmu_b = s_a sum_k w_k ((A d)_k[i] A_k[j, b] + (A d)_k[j] A_k[i, b]), the sigma rows by the mean columns
    t3 = ((Ad * w[:, None]).T @ A.reshape(P, p * p)).reshape(p, p, p)  # [i, j, b] = sum_k w_k (A d)_k[i] A_k[j, b]
    cross = (t3[rows, cols] + t3[cols, rows]) * np.where(rows == cols, 0.5, 1.0)[:, None]
    out[p:, :p] = 2.0 * cross
    out[:p, p:] = 2.0 * cross.T
    return out


def _pair_traces(X: np.ndarray, Y: np.ndarray | None, w: np.ndarray, rows: np.ndarray, cols: np.ndarray
                 ) -> np.ndarray:
    """sum_k w_k tr(X_k D_a Y_k D_b) for the vech directions a, b at (``rows``, ``cols``)
    (:func:`moment_second_derivatives`; ``Y`` None: X itself).  With D_a = s_a (E_ij + E_ji), s_a 1/2 on the
    diagonal, and F(i, j, l, m) = sum_k w_k X_il Y_jm, the trace of a = (i, j), b = (l, m) is
        s_a s_b (F(i, j, l, m) + F(i, j, m, l) + F(j, i, l, m) + F(j, i, m, l)),
    and as X_k and Y_k are symmetric, F(i, j, l, m) = G[(i, l), (j, m)] with G the small matrix over their distinct
    elements (i <= l, j <= m; :func:`pattern_outer`'s, one product over the patterns, the size of the result), so
    that the trace is s_a s_b (S[(i, l), (j, m)] + S[(i, m), (j, l)]) for S = G + G' (symmetric in a and b),
    gathered a block of rows a at a time (:data:`BLOCK_BYTES`): no (p*p, p*p) matrix and no direction is made."""
    P, p, _ = X.shape
    iu, ju = np.triu_indices(p)
    G = (X[:, iu, ju] * w[:, None]).T @ (X if Y is None else Y)[:, iu, ju]
    if Y is None:  # G symmetric: S = 2 G, made in place
        G *= 2.0
        S = G
    else:
        S = G + G.T
    del G
    flat = S.ravel()
    width = len(iu)
    position = np.empty((p, p), dtype=np.intp)
    position[iu, ju] = np.arange(width)
    position[ju, iu] = position[iu, ju]
    n = len(rows)
    out = np.empty((n, n))
    step = max(1, BLOCK_BYTES // (8 * 4 * n))
    for start in range(0, n, step):
        i, j = rows[start:start + step, None], cols[start:start + step, None]
        at = np.take(flat, position[i, rows] * width + position[j, cols])
        at += np.take(flat, position[i, cols] * width + position[j, rows])
        out[start:start + step] = at
    s = np.where(rows == cols, 0.5, 1.0)
    return out * np.outer(s, s)


def model_second_order(model: StructuredModel, g: int, mats, M: np.ndarray, mean_gradient: np.ndarray) -> np.ndarray:
    """tr(M D_ab) + m' dmu_ab in the model's parameters: the term of :meth:`MissingDataLikelihood.observed_hessian`
    in the second derivatives of Sigma and mu (Neudecker & Satorra 1991; with higher-order factors
    :func:`~cfa_tool.model.rank_two.path_second_derivatives`), M and m the gradient's parts in Sigma and mu."""
    codes, rows, cols = model._codes[g], model._rows[g], model._cols[g]
    if model.higher_order:
        second = path_second_derivatives(codes, rows, cols, M, mats, mean_gradient)
    else:
        second = second_derivative_contraction(model.all_second_orders[g], M, mats.L, mats.P)
        second += mean_second_derivatives(codes, rows, cols, mean_gradient)
    J = model._J[g]
    return J.T @ second @ J


#: the most bytes of :func:`low_rank_pair_sums`' products of the patterns' pairs of missing items for a batch of model
#: entries (added into each entry's p x p sum by np.bincount)
PAIR_BYTES = 1 << 25
#: the most bytes of a chunk of the patterns' S_k = F_k' F_k that :func:`low_rank_pair_sums` makes at once
SQUARE_BYTES = 1 << 21


def low_rank_pair_sums(basis, K, w: np.ndarray, uc: np.ndarray, vc: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The score tests' sums over the patterns for candidates c (basis columns ``uc``, ``vc``) from the rank-m form
    K_k = K0 - S_k of the patterns' V' A_k V (:class:`~cfa_tool.data.patterns.PatternBases` ``K``; S_k = F_k' F_k =
    R_k' C_k R_k, R_k = (L V)_m the rows of L V at the m items pattern k misses, C_k = (L_mm)^-1), no pattern's K_k made:

    * their cross-information with the entries e of ``basis``, shape (C, E) (zero for the entries without a covariance
      part): sum_k w_k 2 c_e (K_k[u_c, u_e] K_k[v_c, v_e] + K_k[u_c, v_e] K_k[v_c, u_e]) = 2 c_e (Z_e + Z_e')[u_c, v_c]
      with Z_e = sum_k w_k K_k[:, u_e] K_k[:, v_e]' =
          W K0[:, u] K0[:, v]' - K0[:, u] G[:, v]' - G[:, u] K0[:, v]' + (L V)' Omega_e (L V),
      W = sum_k w_k, G = sum_k w_k S_k = (L V)' Cbar (L V) with Cbar = sum_k w_k C_k (each C_k in its items' rows and
      columns of a p x p matrix), and Omega_e = sum_k w_k a_k b_k' with a_k = C_k R_k[:, u_e], b_k = C_k R_k[:, v_e]
      placed likewise: m^2 numbers a pattern and entry added into p x p (np.bincount), then p^2 r + p r^2 an entry, where the
      patterns' Z_e took r^2 a pattern and entry (5.5 billion multiply-adds at 100 items and 1,500 patterns);
    * their own, sum_k w_k (K_k[u_c, u_c] K_k[v_c, v_c] + K_k[u_c, v_c]^2) = (D' w D)[u_c, v_c] + Y[u_c, v_c], with D the
      patterns' diagonals (D[k] = diag K0 - the column sums of F_k * F_k) and Y = sum_k w_k K_k * K_k (elementwise) =
      W K0 * K0 - 2 K0 * G + sum_k w_k S_k * S_k: m r^2 a pattern (each S_k made a chunk at a time)."""
    E = len(basis.u)
    cov = np.flatnonzero(basis.c)
    K0, LV = K.K0, K.LV
    p, r = LV.shape
    total_w = float(w.sum())
    # every pattern's pairs (a, b) of missing items and their place in a p x p matrix, added up by np.bincount
    batches = K.inverses.batches
    places = np.concatenate([(miss[:, :, None] * p + miss[:, None, :]).ravel() for _, miss, _ in batches]
                            or [np.zeros(0, dtype=int)])
    c_bar = np.bincount(places, np.concatenate([(C * w[which][:, None, None]).ravel() for which, _, C in batches]
                                               or [np.zeros(0)]), minlength=p * p)
    G = LV.T @ c_bar.reshape(p, p) @ LV
    G = 0.5 * (G + G.T)
    # the candidates' own sums
    diag = np.broadcast_to(np.diagonal(K0), (len(w), r)).copy()
    squares = np.zeros((r, r))
    for which, F in K.factors:
        diag[which] -= np.einsum("kmr,kmr->kr", F, F)
        step = max(1, SQUARE_BYTES // (8 * r * r))
        for lo in range(0, len(which), step):
            Fk = F[lo:lo + step]
            S = np.swapaxes(Fk, 1, 2) @ Fk
            S *= S
            squares += (w[which[lo:lo + step]] @ S.reshape(len(S), -1)).reshape(r, r)
    squares += total_w * K0 * K0 - 2.0 * K0 * G
    own = ((diag * w[:, None]).T @ diag + squares)[uc, vc]
    cross = np.zeros((len(uc), E))
    if not len(cov) or not len(uc):
        return cross, own
    u, v = basis.u[cov], basis.v[cov]
    CR = [(C @ LV[miss], w[which]) for which, miss, C in batches]  # C_k R_k (k, m, r) and the patterns' weights
    batch = max(1, min(len(cov), PAIR_BYTES // (8 * max(len(places), p * p))))
    products = np.empty(len(places) * batch)
    sums = np.empty((batch, p * p))
    for start in range(0, len(cov), batch):
        part = slice(start, start + batch)
        ub, vb = u[part], v[part]
        b = len(ub)
        pairs = products[: len(places) * b].reshape(b, len(places))  # w_k a_k b_k' of every pattern, an entry a row
        at = 0
        for R, wk in CR:
            k, m, _ = R.shape
            np.multiply((R[:, :, ub] * wk[:, None, None]).transpose(2, 0, 1)[:, :, :, None],
                        R[:, :, vb].transpose(2, 0, 1)[:, :, None, :], out=pairs[:, at:at + k * m * m].reshape(b, k, m, m))
            at += k * m * m
        for e in range(b):  # each entry's p x p sum Omega_e
            sums[e] = np.bincount(places, pairs[e], minlength=p * p)
        omega = sums[:b].reshape(b, p, p)
        Z = np.matmul(LV.T, (omega.reshape(-1, p) @ LV).reshape(len(omega), p, r))  # (b, r, r)
        # the terms of K0 and G, rank two an entry
        left = np.stack([K0[:, ub], -G[:, ub]], axis=0).transpose(2, 1, 0)  # (b, r, 2)
        right = np.stack([total_w * K0[:, vb] - G[:, vb], K0[:, vb]], axis=0).transpose(2, 0, 1)  # (b, 2, r)
        Z += left @ right
        cross[:, cov[part]] = (Z[:, uc, vc] + Z[:, vc, uc]).T
    cross[:, cov] *= 2.0 * basis.c[cov]
    return cross, own


#: the most bytes of the products of one chunk of patterns :func:`low_rank_trace_sum` makes at once: small enough for
#: the processor's caches (at 100 items' shapes, one call's processor time 0.34-0.35 s with chunks of 256-512 KiB,
#: 0.45 s with 1 MiB, 1.7 s with 32 MiB; the gathers pattern by pattern took 0.86 s)
LOW_RANK_BYTES = 1 << 19


def _pair_products(A: np.ndarray, B: np.ndarray, u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """A[u_e, u_f] B[v_e, v_f] + A[u_e, v_f] B[v_e, u_f] for the entries e, f (rows and columns)."""
    return A[np.ix_(u, u)] * B[np.ix_(v, v)] + A[np.ix_(u, v)] * B[np.ix_(v, u)]


def low_rank_trace_sum(basis, K, w: np.ndarray) -> np.ndarray:
    """sum_k w_k tr(A_k D_e A_k D_f) over the entries of ``basis`` (:mod:`cfa_tool.model.rank_two`):
    sum_k w_k 2 c_e c_f (K_k[u_e, u_f] K_k[v_e, v_f] + K_k[u_e, v_f] K_k[v_e, u_f]), from the rank-m
    form K_k = K0 - F_k' F_k of the patterns' V' A_k V (:class:`~cfa_tool.data.patterns.PatternBases`, ``K``: its
    ``factors``; m the items pattern k misses).  With T(A, B)_ef = A[u_e, u_f] B[v_e, v_f] + A[u_e, v_f] B[v_e, u_f] and
    G = sum_k w_k F_k' F_k,
        sum_k w_k T(K_k, K_k) = (sum_k w_k) T(K0, K0) - T(K0, G) - T(G, K0) + Y' Y,
    where the last term, sum_k w_k sum_ij (F_ui F_uj)(F_vi F_vj)-type products, is one symmetric product of a column
    per pattern and pair i <= j of its missing items: Y_e = sqrt(w_k) (F[i, u_e] F[j, v_e] + F[j, u_e] F[i, v_e]),
    the pairs i = j scaled by sqrt(1/2).  E^2 m (m + 1) / 2 multiply-adds a pattern at the processor's matrix speed,
    where the gathers pattern by pattern (speed-s24's route, replaced in speed-s25) were about ten passes over E x E
    numbers a pattern."""
    E = len(basis.u)
    cov = np.flatnonzero(basis.c)
    u, v = basis.u[cov], basis.v[cov]
    K0 = K.K0
    r = len(K0)
    G = np.zeros((r, r))
    total = np.zeros((len(cov), len(cov)))
    for which, F in K.factors:
        wk = w[which]
        G += (F * wk[:, None, None]).reshape(-1, r).T @ F.reshape(-1, r)
        iu, ju = np.triu_indices(F.shape[1])
        scale = np.where(iu == ju, np.sqrt(0.5), 1.0)
        step = max(1, LOW_RANK_BYTES // (8 * len(iu) * max(1, len(cov))))
        for lo in range(0, len(which), step):
            Fu, Fv = F[lo:lo + step][:, :, u], F[lo:lo + step][:, :, v]  # (k, m, E)
            Y = Fu[:, iu] * Fv[:, ju]
            Y += Fu[:, ju] * Fv[:, iu]
            Y *= np.sqrt(wk[lo:lo + step])[:, None, None] * scale[None, :, None]
            Y = Y.reshape(-1, len(cov))
            total += Y.T @ Y
    total += float(w.sum()) * _pair_products(K0, K0, u, v) - _pair_products(K0, G, u, v) - _pair_products(G, K0, u, v)
    out = np.zeros((E, E))
    out[np.ix_(cov, cov)] = 2.0 * np.outer(basis.c[cov], basis.c[cov]) * total
    return out


def low_rank_cross_sum(basis, K, z: np.ndarray, row_w: np.ndarray, members: list) -> np.ndarray:
    """sum_k w_k tr(A_k D_e B_k D_f) with B_k = A_k T_k A_k (:func:`cfa_tool.model.rank_two.cross_term`, summed over
    the patterns with Q_k = V' B_k V), from the rows: with
    z_i = V' u_i (u_i = A_k (x_i - mu)) and the rows' weights ``row_w`` (w_k Q_k = sum_{i in k} row_w_i z_i z_i'),
    Qbar = sum_i row_w_i z_i z_i' and K_k = K0 - F_k' F_k (:func:`low_rank_trace_sum`),
        sum_k w_k T2(Q_k, K_k) = T2(Qbar, K0) - sum_i row_w_i P_i' P_i,
    T2(Q, K)_ef = Q[v_e, u_f] K[u_e, v_f] + Q[v_e, v_f] K[u_e, u_f] + Q[u_e, u_f] K[v_e, v_f] + Q[u_e, v_f] K[v_e, u_f],
    P_i[j, e] = z_i[v_e] F_k[j, u_e] + z_i[u_e] F_k[j, v_e]: E^2 m a row in one product, no pattern's Q_k made.
    ``members``: each batch's rows and their places in it (data.patterns.batch_members)."""
    E = len(basis.u)
    cov = np.flatnonzero(basis.c)
    u, v = basis.u[cov], basis.v[cov]
    Qbar = (z * row_w[:, None]).T @ z
    K0 = K.K0
    total = (Qbar[np.ix_(v, u)] * K0[np.ix_(u, v)] + Qbar[np.ix_(v, v)] * K0[np.ix_(u, u)]
             + Qbar[np.ix_(u, u)] * K0[np.ix_(v, v)] + Qbar[np.ix_(u, v)] * K0[np.ix_(v, u)])
    for (_, F), (rows, at) in zip(K.factors, members):
        if not len(rows):
            continue
        step = max(1, LOW_RANK_BYTES // (8 * F.shape[1] * max(1, len(cov))))
        for lo in range(0, len(rows), step):
            Fr, zr = F[at[lo:lo + step]], z[rows[lo:lo + step]]  # (n, m, r), (n, r)
            P = zr[:, None, v] * Fr[:, :, u]
            P += zr[:, None, u] * Fr[:, :, v]
            P *= np.sqrt(row_w[rows[lo:lo + step]])[:, None, None]
            P = P.reshape(-1, len(cov))
            total -= P.T @ P
    out = np.zeros((E, E))
    out[np.ix_(cov, cov)] = np.outer(basis.c[cov], basis.c[cov]) * total
    return out


def low_rank_mean_sum(basis, K, VAd: np.ndarray, w: np.ndarray, s: np.ndarray) -> np.ndarray:
    """sum_k w_k d_k' A_k D_e A_k dmu_f over the entries of ``basis``, c_e s_f sum_k w_k ((V'Ad)_k[u_e] K_k[v_e, w_f] +
    (V'Ad)_k[v_e] K_k[u_e, w_f]), from K_k = K0 - F_k' F_k (:func:`low_rank_trace_sum`): with abar = sum_k w_k
    (V' A d)_k,
        c_e s_f [abar[u_e] K0[v_e, w_f] + abar[v_e] K0[u_e, w_f] - sum_k w_k sum_j P_k[j, e] F_k[j, w_f]],
    P_k[j, e] = (V'Ad)_k[u_e] F_k[j, v_e] + (V'Ad)_k[v_e] F_k[j, u_e]: one product over the patterns' missing items."""
    E = len(basis.u)
    cov, mean = np.flatnonzero(basis.c), np.flatnonzero(s)
    out = np.zeros((E, E))
    if not len(mean) or not len(cov):
        return out
    u, v, at = basis.u[cov], basis.v[cov], basis.w[mean]
    abar = w @ VAd
    K0 = K.K0
    total = abar[u][:, None] * K0[np.ix_(v, at)] + abar[v][:, None] * K0[np.ix_(u, at)]
    for which, F in K.factors:
        ad = VAd[which] * w[which][:, None]  # (k, r)
        P = ad[:, None, u] * F[:, :, v]
        P += ad[:, None, v] * F[:, :, u]
        total -= P.reshape(-1, len(cov)).T @ F[:, :, at].reshape(-1, len(mean))
    out[np.ix_(cov, mean)] = basis.c[cov][:, None] * total * s[mean][None, :]
    return out


#: the most bytes a block of the patterns' weight matrix takes (:func:`_trace_products`): up to about 50 items the
#: whole (p*p, p*p) matrix is one block; beyond, a few of its columns at a time, so that no route makes it whole
#: (at 200 items it would be 40,000 x 40,000, 11.9 GiB: a MemoryError after minutes, robust-s20)
BLOCK_BYTES = 1 << 26


def _in_one_block(p: int) -> bool:
    return p ** 4 * 8 <= BLOCK_BYTES


def pattern_outer(X: np.ndarray, Y: np.ndarray, w: np.ndarray) -> np.ndarray:
    """sum_k w_k vec(X_k) vec(Y_k)' for symmetric X_k, Y_k of shape (P, p, p), as a (p*p, p*p) matrix.

    Computed on the p(p+1)/2 distinct elements and expanded: about a quarter of the work."""
    P, p, _ = X.shape
    iu, ju = np.triu_indices(p)
    small = (X[:, iu, ju] * w[:, None]).T @ Y[:, iu, ju]
    position = np.empty((p, p), dtype=int)
    position[iu, ju] = np.arange(len(iu))
    position[ju, iu] = position[iu, ju]
    flat = position.ravel()
    return small[np.ix_(flat, flat)]


def _trace_weights(X: np.ndarray, Y: np.ndarray, w: np.ndarray) -> np.ndarray:
    """The whole of G = sum_k w_k X_ij Y_ce arranged with rows (j, c) and columns (i, e) (:func:`_weight_block`'s
    layout) from the symmetric X_k, Y_k's distinct elements (:func:`pattern_outer`): the route of few items."""
    p = X.shape[1]
    return pattern_outer(X, Y, w).reshape(p, p, p, p).transpose(1, 2, 0, 3).reshape(p * p, p * p)


def _weight_block(X: np.ndarray, Y: np.ndarray, w: np.ndarray, rows: slice) -> np.ndarray:
    """Columns (i, e), i in ``rows``, of G = sum_k w_k X_ij Y_ce arranged with rows (j, c) (X_k, Y_k of shape (P, p,
    p)), ready for a product with the directions' vec: G' vec(D) = vec(X D Y) for each i in ``rows``."""
    P, p, _ = X.shape
    Xw = X[:, rows, :] * w[:, None, None]
    n_i = Xw.shape[1]
    M = Xw.reshape(P, n_i * p).T @ Y.reshape(P, p * p)  # ((i, j), (c, e)) = sum_k w_k X_ij Y_ce
    return M.reshape(n_i, p, p, p).transpose(1, 2, 0, 3).reshape(p * p, n_i * p)


def _trace_products(X: np.ndarray, Y: np.ndarray, w: np.ndarray, x_sigma: np.ndarray,
                    whole: np.ndarray | None = None) -> np.ndarray:
    """sum_k w_k X_k D_a Y_k for every D_a in ``x_sigma``, shape (len(x_sigma), p, p): the products of the
    directions with the patterns' weight matrix G (:func:`_weight_block`; ``whole``: G made beforehand), a block of
    its columns at a time (:data:`BLOCK_BYTES`), never the (p*p, p*p) matrix at once beyond about 50 items."""
    kx, p, _ = x_sigma.shape
    D = x_sigma.reshape(kx, p * p)
    if whole is not None or _in_one_block(p):
        G = whole if whole is not None else _trace_weights(X, Y, w)
        return (D @ G).reshape(kx, p, p)
    T = np.empty((kx, p, p))
    step = max(1, BLOCK_BYTES // (8 * p ** 3))
    for start in range(0, p, step):
        rows = slice(start, min(p, start + step))
        T[:, rows, :] = (D @ _weight_block(X, Y, w, rows)).reshape(kx, -1, p)
    return T


def _trace_contract(T: np.ndarray, y_sigma: np.ndarray) -> np.ndarray:
    """sum_k w_k tr(X_k D_a Y_k E_b) for every E_b in y_sigma, T from :func:`_trace_products`."""
    kx = len(T)
    return T.reshape(kx, -1) @ y_sigma.transpose(0, 2, 1).reshape(len(y_sigma), -1).T


def _row_blocks(rows: np.ndarray, weights: np.ndarray):
    """(observed mask, co-observation counts (weighted), [(rows, their missing columns, observed mask of those
    rows)]) for each number of missing answers above zero."""
    observed = ~np.isnan(rows)
    together = observed.T.astype(float) @ (observed * weights[:, None])
    blocks = [(which, miss, observed[which][:, None, :]) for which, miss in missing_groups(observed)]
    return observed, together, blocks


def fixed_covariance_discrepancy(data: PatternData, sigma: np.ndarray, saturated: tuple[np.ndarray, np.ndarray]) -> float:
    """The full-information discrepancy of rows with gaps from a fixed covariance matrix, the means at their ML
    estimate given it: with A_k = Sigma_oo^-1 embedded (zeros elsewhere) the score in mu vanishes at
        mu = (sum_k n_k A_k)^-1 sum_k n_k A_k m_k
    (m_k the pattern's means, zeros where missing; the generalised least-squares mean, Little & Rubin 2002,
    ch. 11), and F = f(mu, Sigma) - f(saturated) as in the module docstring.  Without gaps it is the normal-theory
    discrepancy log|Sigma| + tr(S Sigma^-1) - log|S| - p (Joreskog 1969), the means at the sample means."""
    inv = embedded_inverse(sigma, data.observed)
    if inv is None:
        return np.inf
    A, _ = inv
    w = data.counts / data.n_obs
    mu = np.linalg.solve(np.tensordot(w, A, axes=1), np.einsum("k,kij,kj->i", w, A, data.means))
    return pattern_objective(data, mu, sigma) - pattern_objective(data, *saturated)


def fiml_log_likelihood(likelihood: MissingDataLikelihood, theta: np.ndarray) -> float:
    """log L = -1/2 sum_k n_k (p_k log 2 pi + log|Sigma_oo| + tr(Sigma_oo^-1 T_k)), over groups."""
    total = 0.0
    for g, data in enumerate(likelihood.patterns):
        mats = likelihood.model.matrices(theta, g)
        f = pattern_objective(data, mats.implied_mean(), mats.implied_covariance())
        observed_cells = float(data.counts @ data.observed.sum(axis=1))
        total += -0.5 * (observed_cells * np.log(2 * np.pi) + data.n_obs * f)
    return total


def fiml_baseline(likelihood: MissingDataLikelihood) -> tuple[float, int]:
    """Independence model: its FIML estimates are each variable's available-case mean and variance,
    because the likelihood factors over variables when Sigma is diagonal."""
    chi = 0.0
    df = 0
    for g, data in enumerate(likelihood.patterns):
        mu, var = weighted_available_moments(data.rows, data.row_weights)
        f = pattern_objective(data, mu, np.diag(var))
        chi += data.n_obs * (f - likelihood.saturated_value[g])
        p = data.rows.shape[1]
        df += p * (p - 1) // 2
    return chi, df
