"""Least squares for ordinal items, one group or several: one objective.

Each item j has a latent response x*_j = nu_j + Lambda_j eta + e_j and is observed in category c
when tau_j,c-1 < x*_j <= tau_j,c.  The data are each group's sample statistics s_g (polychoric
correlations, and with thresholds as parameters the thresholds too), their model counterparts
sigma_g(theta), a diagonal weight W_g and the asymptotic covariance Gamma_g of sqrt(N_g)(s_g - sigma_g):

    F(theta) = sum_g (N_g / N) (s_g - sigma_g(theta))' W_g (s_g - sigma_g(theta)),

W_g = diag(Gamma_g)^-1 (diagonally weighted least squares; Muthén, du Toit & Spisic 1997) or the
identity (unweighted).  N F is the statistic that the mean-and-variance adjustment corrects
(:mod:`cfa_tool.inference.adjusted`).  The model statistics take one of two forms:

* latent responses of unit variance (one group; the "delta" form): sigma = the implied
  covariances below the diagonal, which do not depend on the residual variances, so those are
  not parameters (they follow as 1 minus the common variance);
* thresholds as parameters (any number of groups; Muthén & Asparouhov 2002, identified as Wu &
  Estabrook 2016 set out): with mu = nu + Lambda alpha and Sigma the latent responses' moments,

      tau~_jc = (tau_jc - mu_j) / sqrt(Sigma_jj),      rho_ij = Sigma_ij / sqrt(Sigma_ii Sigma_jj).

Scoring uses 2 sum_g (N_g/N) D_g W_g D_g', the expected second derivatives for a correct model (the
Gauss-Newton matrix of weighted least squares; Browne 1984, Muthén 1984); Newton's steps near the minimum use
the exact Hessian, that matrix plus the residuals times the second derivatives of the statistics, in closed
form for both forms (:meth:`OrdinalLeastSquares.observed_hessian`).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from cfa_tool.estimation.objective import Evaluation, ScoreRoute
from cfa_tool.model.implied import StructuredModel, entry_derivatives
from cfa_tool.model.rank_two import (SecondOrderLayout, basis_vectors, path_second_derivatives, second_derivative_contraction,
                                     second_order_layout)


@dataclass(frozen=True, eq=False)
class GroupStatistics:
    """One group's sample statistics, their diagonal weights and asymptotic covariance."""

    values: np.ndarray  # (thresholds item by item, then) correlations in np.tril_indices(p, -1) order
    weights: np.ndarray  # the diagonal of W_g
    gamma: np.ndarray  # asymptotic covariance of sqrt(N_g)(s_g - sigma_g)
    n_obs: int
    #: groups that share clusters: the covariance of every group's statistics stacked (the same in every group,
    #: data.polychoric.OrdinalMoments.domains_gamma), which :meth:`OrdinalLeastSquares.stacked` returns
    domains_gamma: np.ndarray | None = None


def group_statistics(values: np.ndarray, gamma: np.ndarray, n_obs: int, diagonal: bool,
                     variances: np.ndarray | None = None, domains_gamma: np.ndarray | None = None) -> GroupStatistics:
    """Statistics with diagonal weights 1 / diag(Gamma) (``diagonal``) or unit weights; ``variances``, when given,
    replace diag(Gamma) in the weights (under clusters or strata: the statistics' variances with the rows taken as
    independent, so that the design changes the standard errors and tests but not the estimates);
    ``domains_gamma``: of groups that share clusters, :attr:`GroupStatistics.domains_gamma`."""
    weights = 1.0 / (np.diag(gamma) if variances is None else variances) if diagonal else np.ones(len(values))
    return GroupStatistics(values, weights, gamma, n_obs, domains_gamma)


@dataclass(frozen=True, eq=False)
class _GroupPart:
    """Index arrays of one group with thresholds as parameters, fixed by the model: the parameters its
    statistics depend on (``touched``), its moment-matrix entries that depend on them (matrix codes, rows,
    columns), the map from those parameters to the entries (``Jt``, touched x entries), the thresholds'
    derivatives (touched x thresholds), where tr(M d2Sigma) lands among the entries, and the pairs
    (loading L[i, f], latent mean M[f]) whose second derivative of mu_i is 1."""

    touched: np.ndarray
    codes: np.ndarray
    rows: np.ndarray
    cols: np.ndarray
    Jt: np.ndarray
    d_tau: np.ndarray
    second_order: SecondOrderLayout
    mean_loading: np.ndarray  # positions among the entries
    mean_mean: np.ndarray
    mean_item: np.ndarray  # the item i of each pair

    @staticmethod
    def of(model: StructuredModel, g: int, n_thresholds: int) -> _GroupPart:
        J, _ = model.table.mapping()
        all_codes, all_rows, all_cols = model.table.entry_arrays()
        mine = model.groups == g
        touched = np.flatnonzero(J[mine].any(axis=0))
        entries = np.flatnonzero(mine & J.any(axis=1) & (all_codes < 6))
        codes, rows, cols = all_codes[entries], all_rows[entries], all_cols[entries]
        thresholds = np.flatnonzero(mine & (all_codes == 6))
        d_tau = np.zeros((len(touched), n_thresholds))
        d_tau[:, all_rows[thresholds]] = J[np.ix_(thresholds, touched)].T
        loading, mean = np.flatnonzero(codes == 0), np.flatnonzero(codes == 5)
        a, b = np.nonzero(cols[loading][:, None] == rows[mean][None, :])
        return _GroupPart(touched, codes, rows, cols, J[np.ix_(entries, touched)].T, d_tau,
                          second_order_layout(codes, rows, cols, model.p, model.m), loading[a], mean[b], rows[loading[a]])


class OrdinalLeastSquares:
    """F(theta) of the module docstring for one group or several (see :class:`~cfa_tool.estimation.objective.Objective`).

    ``thresholds``: the model statistics are standardized thresholds and correlations (thresholds
    as parameters); otherwise correlations of latent responses of unit variance."""

    score_route = ScoreRoute.GENERAL

    def __init__(self, model: StructuredModel, groups: list[GroupStatistics], thresholds: bool,
                 unit_variances: tuple[np.ndarray, ...] | None = None):
        self.model = model
        self.groups = groups
        self.thresholds = thresholds
        # per group, the items whose latent response has variance 1 (the correlation metric, its residual variance
        # following as 1 minus its common variance) rather than residual variance 1: see unit_variance_matrices
        self.unit_variances = (tuple(np.asarray(u, dtype=bool) for u in unit_variances)
                               if unit_variances is not None and any(np.any(u) for u in unit_variances) else None)
        self.pairs = np.tril_indices(model.p, -1)
        self.n_total = sum(g.n_obs for g in groups)
        self.weights = [g.n_obs / self.n_total for g in groups]
        self.targets = [g.values for g in groups]
        self.w = [g.weights for g in groups]
        self.n_statistics = sum(len(t) for t in self.targets)
        # the item of each threshold, in the stacked order of the table's matrix K
        table = model.table
        item = {x: j for j, x in enumerate(table.observed)}
        positions = {par.row: item[par.variables[0]] for par in table.parameters if par.matrix == "K" and par.group == 0}
        self.item_of = np.array([positions[k] for k in range(len(positions))], dtype=int)
        self.n_thresholds = len(self.item_of)
        if thresholds:
            self._parts = [_GroupPart.of(model, g, self.n_thresholds) for g in range(model.n_groups)]

    def with_targets(self, values: list[np.ndarray]) -> OrdinalLeastSquares:
        """The same objective for other statistics of the same shape (weights and Gamma kept), e.g. the
        statistics another model implies (the nesting check of Bentler & Satorra 2010)."""
        return OrdinalLeastSquares(self.model, [replace(g, values=np.asarray(v, dtype=float))
                                                for g, v in zip(self.groups, values)], self.thresholds,
                                   self.unit_variances)

    def with_unit_variances(self, unit_variances: tuple[np.ndarray, ...] | None) -> OrdinalLeastSquares:
        """The same objective with other items' latent responses held at variance 1 (the same model in another
        metric where that variance only sets the scale)."""
        return OrdinalLeastSquares(self.model, self.groups, self.thresholds, unit_variances)

    def unit_variance_matrices(self, theta: np.ndarray, g: int):
        """Group g's model matrices as this objective reads them: the residual variance of each item held at
        variance 1 (``unit_variances``) is 1 minus its common variance, so that its latent response has variance 1
        (Muthén & Asparouhov 2002's correlation metric); the others as the parameters give them."""
        mats = self.model.matrices(theta, g)
        return mats if self.unit_variances is None else mats.with_unit_variances(self.unit_variances[g])

    # -- model statistics and their derivatives
    def _latent_moments(self, theta: np.ndarray, g: int):
        """(matrices, Sigma, its diagonal as the statistics read it, mu, thresholds, the items held at variance 1 or
        None) of group g's latent responses; None when some implied variance is not positive."""
        mats = self.model.matrices(theta, g)
        sigma = mats.implied_covariance()
        if not self.thresholds:  # the residual variances are not parameters: the pairs are all there is
            return mats, sigma, None, None, None, None
        var = np.diag(sigma)
        unit = None
        if self.unit_variances is not None and self.unit_variances[g].any():
            unit = self.unit_variances[g]
            var = np.where(unit, 1.0, var)
        if np.any(var <= 0) or not np.all(np.isfinite(var)):
            return None
        return mats, sigma, var, mats.implied_mean(), self.model.thresholds(theta, g), unit

    def _statistics(self, moments) -> np.ndarray:
        _, sigma, var, mu, tau, _ = moments
        i, j = self.pairs
        if not self.thresholds:
            return sigma[i, j]
        sd = np.sqrt(var)
        it = self.item_of
        return np.concatenate([(tau - mu[it]) / sd[it], sigma[i, j] / (sd[i] * sd[j])])

    def statistics(self, theta: np.ndarray, g: int) -> np.ndarray | None:
        moments = self._latent_moments(theta, g)
        return None if moments is None else self._statistics(moments)

    def _transform(self, moments, d_sigma: np.ndarray, d_mu: np.ndarray, d_tau: np.ndarray) -> np.ndarray:
        """Derivatives of the statistics from those of Sigma, mu and tau: (k, statistics)."""
        _, sigma, var, mu, tau, _ = moments
        i, j = self.pairs
        if not self.thresholds:
            return d_sigma[:, i, j]
        sd = np.sqrt(var)
        it = self.item_of
        d_var = self._variance_derivatives(moments, d_sigma)
        d_thr = (d_tau - d_mu[:, it]) / sd[it] - ((tau - mu[it]) / (2.0 * sd[it] ** 3)) * d_var[:, it]
        rho = sigma[i, j] / (sd[i] * sd[j])
        d_rho = d_sigma[:, i, j] / (sd[i] * sd[j]) - 0.5 * rho * (d_var[:, i] / var[i] + d_var[:, j] / var[j])
        return np.hstack([d_thr, d_rho])

    @staticmethod
    def _variance_derivatives(moments, d_sigma: np.ndarray) -> np.ndarray:
        """d diag(Sigma) / d theta as the statistics read it, (k, p): zero for the items whose latent response is
        held at variance 1 (their variance does not move)."""
        d_var = np.diagonal(d_sigma, axis1=1, axis2=2)
        unit = moments[5]
        return d_var if unit is None else np.where(unit[None, :], 0.0, d_var)

    def _jacobian(self, theta: np.ndarray, g: int, moments) -> np.ndarray:
        """d sigma_g / d theta, shape (q, statistics)."""
        if not self.thresholds:
            return self._unit_jacobian(moments[0], g)
        part = self._parts[g]
        D = np.zeros((len(theta), len(self.targets[g])))  # the group's statistics (more beside continuous items)
        D[part.touched] = self._transform(moments, *self._moment_derivatives(moments[0], part))
        return D

    def _touched_jacobian(self, moments, g: int) -> tuple[np.ndarray, np.ndarray]:
        """(the parameters group g's statistics depend on, d sigma_g / d those parameters): the rows of
        :meth:`_jacobian` that are not zero (one group's parameters of a configural model, and the shared ones)."""
        if not self.thresholds:
            return slice(None), self._unit_jacobian(moments[0], g)
        part = self._parts[g]
        return part.touched, self._transform(moments, *self._moment_derivatives(moments[0], part))

    @staticmethod
    def _moment_derivatives(mats, part: _GroupPart) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """d Sigma, d mu and d tau with respect to the parameters ``part`` touches: (k, p, p), (k, p), (k, K)."""
        d_sigma, d_mu = entry_derivatives(mats, part.codes, part.rows, part.cols)
        return np.tensordot(part.Jt, d_sigma, axes=1), part.Jt @ d_mu, part.d_tau

    def _unit_jacobian(self, mats, g: int) -> np.ndarray:
        """d Sigma_ij / d theta for the pairs below the diagonal.  Each entry's derivative of Sigma is
        c (u v' + v u') for columns u, v of V = [I, C', G] (:mod:`cfa_tool.model.rank_two`), so its
        element (i, j) is c (V_iu V_jv + V_iv V_ju): gathered for the pairs, without p x p arrays."""
        V, _ = basis_vectors(mats, False)
        basis = self.model.bases[g]
        Vi, Vj = V[self.pairs[0]], V[self.pairs[1]]
        D = basis.c * (Vi[:, basis.u] * Vj[:, basis.v] + Vi[:, basis.v] * Vj[:, basis.u])  # (pairs, active entries)
        return D.T if self.model.identity_J[g] else self.model.active_J[g].T @ D.T

    def jacobian(self, theta: np.ndarray, g: int = 0) -> np.ndarray:
        return self._jacobian(theta, g, self._latent_moments(theta, g))

    def entry_jacobian(self, theta: np.ndarray, g: int, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray) -> np.ndarray:
        """Derivatives of group g's statistics with respect to single matrix entries (candidates of score tests)."""
        moments = self._latent_moments(theta, g)
        d_sigma, d_mu = entry_derivatives(moments[0], codes, rows, cols)
        d_tau = np.zeros((len(codes), self.n_thresholds))
        k = np.flatnonzero(codes == 6)
        d_tau[k, rows[k]] = 1.0
        return self._transform(moments, d_sigma, d_mu, d_tau)

    # -- the objective
    def group_discrepancy(self, theta: np.ndarray, g: int) -> float:
        s = self.statistics(theta, g)
        if s is None:
            return np.inf
        e = self.targets[g] - s
        return float(e @ (self.w[g] * e))

    def value(self, theta: np.ndarray) -> float:
        total = 0.0
        for g, share in enumerate(self.weights):
            f = self.group_discrepancy(theta, g)
            if not np.isfinite(f):
                return np.inf
            total += share * f
        return total

    def evaluate(self, theta: np.ndarray) -> Evaluation | None:
        q = len(theta)
        value, gradient, information = 0.0, np.zeros(q), np.zeros((q, q))
        for g, share in enumerate(self.weights):
            moments = self._latent_moments(theta, g)
            if moments is None:
                return None
            e = self.targets[g] - self._statistics(moments)
            touched, D = self._touched_jacobian(moments, g)
            WD = D * (share * self.w[g])[None, :]
            value += share * float(e @ (self.w[g] * e))
            gradient[touched] -= 2.0 * WD @ e
            if isinstance(touched, slice):
                information += 2.0 * WD @ D.T
            else:
                information[np.ix_(touched, touched)] += 2.0 * WD @ D.T
        return Evaluation(value, gradient, information)

    def gradient(self, theta: np.ndarray) -> np.ndarray:
        """-2 sum_g (N_g/N) D_g W_g (s_g - sigma_g): what differences of the gradient (Newton's steps
        near the minimum) need."""
        total = np.zeros(len(theta))
        for g, share in enumerate(self.weights):
            moments = self._latent_moments(theta, g)
            if moments is None:
                return np.full(len(theta), np.nan)
            e = self.targets[g] - self._statistics(moments)
            touched, D = self._touched_jacobian(moments, g)
            total[touched] -= 2.0 * share * (D @ (self.w[g] * e))
        return total

    def observed_hessian(self, theta: np.ndarray) -> np.ndarray | None:
        """Second derivatives of F in closed form (thresholds as parameters: :meth:`_threshold_hessian`).  For
        latent responses of unit variance:

            H = sum_g (N_g/N) [2 D W D' - 2 tr(M d2Sigma / dtheta dtheta')],   M_ij = M_ji = w_k e_k / 2

        for the pair k = (i, j), e = s - sigma the residuals; the second derivatives of Sigma are those
        of maximum likelihood (Neudecker & Satorra 1991; :func:`cfa_tool.model.rank_two.second_derivative_contraction`,
        with higher-order factors :func:`~cfa_tool.model.rank_two.path_second_derivatives`)."""
        model = self.model
        if self.thresholds:
            return self._threshold_hessian(theta)
        q = len(theta)
        H = np.zeros((q, q))
        for g, share in enumerate(self.weights):
            mats = model.matrices(theta, g)
            half = 0.5 * self.w[g] * (self.targets[g] - mats.implied_covariance()[self.pairs])
            M = np.zeros((model.p, model.p))
            M[self.pairs] = half
            M[self.pairs[1], self.pairs[0]] = half
            if model.higher_order:
                active = model.active[g]
                second = path_second_derivatives(model._codes[g][active], model._rows[g][active],
                                                 model._cols[g][active], M, mats)
            else:
                second = second_derivative_contraction(model.second_orders[g], M, mats.L, mats.P)
            if not model.identity_J[g]:
                J = model.active_J[g]
                second = J.T @ second @ J
            D = self._unit_jacobian(mats, g)
            H += share * (2.0 * (D * self.w[g]) @ D.T - 2.0 * second)
        return 0.5 * (H + H.T)

    def _threshold_hessian(self, theta: np.ndarray) -> np.ndarray | None:
        """The exact Hessian of F with thresholds as parameters, or None outside
        the region where F is defined.  With c = (N_g/N) W_g e_g and D_g = d sigma_g / d theta,

            H = sum_g [2 (N_g/N) D_g W_g D_g' - 2 sum_k c_k d2 sigma_k / dtheta dtheta'],

        the Gauss-Newton term 2 D'WD of weighted least squares (Browne 1984; Muthén 1984) plus the
        residuals times the statistics' curvature, which vanishes only for a model that fits exactly.  Each
        statistic is a function of a few moments of the latent responses (tau~ = (tau - mu_j) v_j^-1/2,
        rho = Sigma_ij (v_i v_j)^-1/2 with v = diag Sigma; Muthén & Asparouhov 2002), so by the chain rule
        its curvature is

            sum_a (df/da) d2a + sum_ab (d2f/da db) da db',

        a = Sigma_ij, v_i, mu_j, tau.  The first sum contracts the second derivatives of Sigma = L P L' + T
        with a symmetric matrix M (Neudecker & Satorra 1991; :func:`second_derivative_contraction`, with
        higher-order factors :func:`path_second_derivatives`, which takes the means' terms too) and
        those of mu = N + L M (d2 mu_i / dL_if dM_f = 1) with a vector m.  In the second only
        products with dv are not zero (tau is linear in theta, Sigma_ij and mu_j enter linearly), so it is
        Z dV' + dV Z' + dV B dV' for dV = d diag(Sigma) / dtheta, with, from the partial derivatives of tau~
        and rho,

            Z_i = -sum_j c_ij dSigma_ij / (2 v_i s_i s_j) - sum_k(i) c_k (dtau_k - dmu_i) / (2 v_i^3/2),
            B_ij = c_ij rho_ij / (4 v_i v_j),  B_ii = sum_j 3 c_ij rho_ij / (4 v_i^2) + sum_k(i) 3 c_k d_k / (4 v_i^5/2),

        s = sqrt(v), d_k = tau_k - mu_i, k(i) the thresholds of item i.  An item held at variance 1
        (``unit_variances``) has v_i = 1 whatever theta: its dv and its term of M are zero.  Checked against
        differences of the analytic gradient in tests/estimation/test_threshold_hessian.py."""
        q = len(theta)
        H = np.zeros((q, q))
        i, j = self.pairs
        it = self.item_of
        p, K = self.model.p, self.n_thresholds
        for g, share in enumerate(self.weights):
            moments = self._latent_moments(theta, g)
            if moments is None:
                return None
            mats, sigma, var, mu, tau, _ = moments
            part = self._parts[g]
            d_sigma, d_mu, d_tau = self._moment_derivatives(mats, part)
            D = self._transform(moments, d_sigma, d_mu, d_tau)
            c = share * self.w[g] * (self.targets[g] - self._statistics(moments))
            c_thr, c_rho = c[:K], c[K:]
            sd = np.sqrt(var)
            rho = sigma[i, j] / (sd[i] * sd[j])
            dev = tau - mu[it]
            # first derivatives of the statistics with respect to the moments, weighted by c
            M = np.zeros((p, p))
            M[i, j] = M[j, i] = c_rho / (2.0 * sd[i] * sd[j])
            half = c_rho * rho
            M[np.diag_indices(p)] = (-(np.bincount(i, half, p) + np.bincount(j, half, p)) / (2.0 * var)
                                     - np.bincount(it, c_thr * dev, p) / (2.0 * var * sd))
            if moments[5] is not None:  # a variance held at 1 does not move: no term in its second derivatives
                M[moments[5], moments[5]] = 0.0
            m = -np.bincount(it, c_thr, p) / sd
            if self.model.higher_order:
                second = path_second_derivatives(part.codes, part.rows, part.cols, M, mats, m)
            else:
                second = second_derivative_contraction(part.second_order, M, mats.L, mats.P)
                np.add.at(second, (part.mean_loading, part.mean_mean), m[part.mean_item])
                np.add.at(second, (part.mean_mean, part.mean_loading), m[part.mean_item])
            curvature = part.Jt @ second @ part.Jt.T
            # second derivatives of the statistics with respect to the moments, weighted by c
            d_var = self._variance_derivatives(moments, d_sigma)
            A = np.zeros((p, p))
            A[i, j] = -c_rho / (2.0 * var[i] * sd[i] * sd[j])
            A[j, i] = -c_rho / (2.0 * var[j] * sd[i] * sd[j])
            Z = np.einsum("qab,ab->qa", d_sigma, A)
            per_threshold = -c_thr / (2.0 * var[it] * sd[it])
            spread = np.zeros((K, p))
            spread[np.arange(K), it] = per_threshold
            Z += d_tau @ spread - d_mu * np.bincount(it, per_threshold, p)
            B = np.zeros((p, p))
            B[i, j] = B[j, i] = half / (4.0 * var[i] * var[j])
            B[np.diag_indices(p)] = (0.75 * (np.bincount(i, half, p) + np.bincount(j, half, p)) / var**2
                                     + 0.75 * np.bincount(it, c_thr * dev, p) / (var**2 * sd))
            ZV = Z @ d_var.T
            curvature += ZV + ZV.T + d_var @ B @ d_var.T
            block = 2.0 * (D * (share * self.w[g])) @ D.T - 2.0 * curvature
            H[np.ix_(part.touched, part.touched)] += block
        return 0.5 * (H + H.T)

    # -- stacked pieces for robust inference
    def stacked(self, theta: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """(D of shape (q, k), residuals e, weights diag(N_g/N W_g), Gamma blockdiag(N/N_g Gamma_g)) over all groups;
        of groups that share clusters Gamma has blocks between the groups too (:attr:`GroupStatistics.domains_gamma`,
        and :meth:`gamma_blocks` is None)."""
        moments = [self._latent_moments(theta, g) for g in range(len(self.weights))]
        D = np.hstack([self._jacobian(theta, g, m) for g, m in enumerate(moments)])
        e = np.concatenate([self.targets[g] - self._statistics(m) for g, m in enumerate(moments)])
        w = np.concatenate([share * wg for share, wg in zip(self.weights, self.w)])
        if self.groups[0].domains_gamma is not None:
            return D, e, w, self.groups[0].domains_gamma
        gammas = [g.gamma / share for g, share in zip(self.groups, self.weights)]
        gamma = gammas[0]
        if len(gammas) > 1:
            from scipy.linalg import block_diag  # here, not at the top: importing scipy.linalg is slow (~80 ms)

            gamma = block_diag(*gammas)
        return D, e, w, gamma

    def group_slices(self) -> list[slice]:
        sizes = [len(t) for t in self.targets]
        ends = np.cumsum(sizes)
        return [slice(int(end - size), int(end)) for size, end in zip(sizes, ends)]

    def gamma_blocks(self) -> list[slice] | None:
        """The groups' slices of the statistics over which the stacked Gamma is block-diagonal (independent groups),
        or None when the groups share clusters and Gamma has blocks between them."""
        return None if self.groups[0].domains_gamma is not None else self.group_slices()


class MixedLeastSquares(OrdinalLeastSquares):
    """Thresholds as parameters with continuous items beside the ordinal ones, in any number of groups.

    A continuous item j is its own response (no thresholds), so beside the standardized thresholds and the
    correlations its mean and variance are statistics too, and their model counterparts are mu_j and
    Sigma_jj: each group keeps the continuous items' metric, so that their intercepts and residual
    variances can be compared across groups as for continuous items alone (Millsap & Yun-Tein 2004, for
    the ordinal ones Wu & Estabrook 2016).  The correlations of all pairs stay Sigma_ij / sqrt(Sigma_ii
    Sigma_jj): polychoric, polyserial and Pearson correlations in the data.  Statistics per group:
    (thresholds, means of the continuous items, their variances, correlations)."""

    def __init__(self, model: StructuredModel, groups: list[GroupStatistics], continuous: np.ndarray,
                 unit_variances: tuple[np.ndarray, ...] | None = None):
        super().__init__(model, groups, thresholds=True, unit_variances=unit_variances)
        self.continuous = np.asarray(continuous, dtype=int)

    def with_targets(self, values: list[np.ndarray]) -> MixedLeastSquares:
        return MixedLeastSquares(self.model, [replace(g, values=np.asarray(v, dtype=float))
                                              for g, v in zip(self.groups, values)], self.continuous,
                                 self.unit_variances)

    def with_unit_variances(self, unit_variances: tuple[np.ndarray, ...] | None) -> MixedLeastSquares:
        return MixedLeastSquares(self.model, self.groups, self.continuous, unit_variances)

    def _statistics(self, moments) -> np.ndarray:
        _, sigma, var, mu, _, _ = moments
        base = super()._statistics(moments)
        K, c = self.n_thresholds, self.continuous
        return np.concatenate([base[:K], mu[c], var[c], base[K:]])

    def _transform(self, moments, d_sigma: np.ndarray, d_mu: np.ndarray, d_tau: np.ndarray) -> np.ndarray:
        base = super()._transform(moments, d_sigma, d_mu, d_tau)
        K, c = self.n_thresholds, self.continuous
        d_var = np.diagonal(d_sigma, axis1=1, axis2=2)
        return np.hstack([base[:, :K], d_mu[:, c], d_var[:, c], base[:, K:]])

    def observed_hessian(self, theta: np.ndarray) -> np.ndarray | None:
        """Not in closed form for these statistics: the expected second derivatives serve."""
        return None
