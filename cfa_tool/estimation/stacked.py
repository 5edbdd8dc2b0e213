"""Many fits of one model at once: the normal-theory ML discrepancy of R data sets minimised together.

Bootstraps, Monte Carlo power and simulated cutoffs fit one model to many covariance matrices
S_1 ... S_R.  Each iteration here computes, for every replication still running, one stacked
array computation ((R, p, p) arrays through batched matrix products):

    F_r(theta_r) = log|Sigma_r| + tr(S_r Sigma_r^-1) - log|S_r| - p      (Joreskog 1969)

with its gradient, expected information (Browne 1974) and observed Hessian (Neudecker & Satorra
1991) from the rank-two derivatives of :mod:`cfa_tool.model.rank_two` -- the same formulas as
:class:`cfa_tool.estimation.ml.NormalLikelihood`, with a leading axis of replications.

Each replication follows the steps that :func:`cfa_tool.estimation.optimizer.minimise` takes for
one fit: Fisher scoring while the Newton decrement is at least 1e-2, then Newton steps with the
observed Hessian where it is positive definite, each step shortened until the discrepancy falls by
the Armijo share of the promised decrease, and convergence when the decrement g' H^-1 g falls below
the same tolerance.  Replications never influence each other (every test and step length is per
replication), so a replication's estimates do not depend on which others share its batch.

What this module does not do is reported, not attempted: a replication whose sample covariance
matrix is not positive definite, whose start or trial point leaves the region where Sigma is
positive definite, whose line search fails or that does not converge within :data:`ITERATIONS` iterations is returned
with ``converged`` False, and the caller refits it one at a time with the full search (restarts,
quasi-Newton fallback and diagnosis of the failure) so that it is judged exactly as a single fit is.
Only models it covers are given to it (:func:`stackable`): one group, no mean structure, no bounds on the
parameters.  Higher-order factors are covered: Sigma = G P G' + T with G = L A, A = (I - B)^-1, the basis
V = [I, C', G] with C' = G P A' (:func:`cfa_tool.model.rank_two.basis_vectors`), and the observed Hessian's second
derivatives of the pairs with a loading or a path between factors those of
:func:`cfa_tool.model.rank_two.path_second_derivatives`, with a leading axis of replications
(:meth:`StackedNormal._path_second_derivatives`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.estimation.optimizer import CLOSED_FORM_NEWTON_BELOW, NEAR_MINIMUM
from cfa_tool.model.implied import StructuredModel
# the stacked LAPACK kernels behind np.linalg (see _cholesky), imported where the package imports them; not public
# API, so a numpy without them (LAPACK_KERNELS None) or with other ones falls back to one matrix at a time (_stacked)
from cfa_tool.numerics.linalg import LAPACK_KERNELS, full_rank_pivots

TOLERANCE = 1e-14  # on the Newton decrement, as for a single fit (optimizer.minimise)
ARMIJO = 1e-4
HALVINGS = 40
ITERATIONS = 25  # a longer search is left to the caller (the few that need it cost more here, in lockstep)
BLOCK = 64  # replications evaluated together: (BLOCK, q, q) arrays of a questionnaire model fit in the cache


def stackable(model: StructuredModel) -> bool:
    """Whether :func:`fit_stacked` covers the model: one group, no mean structure and no bounds on any parameter
    (higher-order factors are covered)."""
    table = model.table
    return (model.n_groups == 1 and not model.mean_structure
            and not np.isfinite(table.lower).any() and not np.isfinite(table.upper).any())


@dataclass(frozen=True)
class StackedFits:
    """The end of R searches: estimates (R, q), discrepancy (R,), expected information at the
    estimates (R, q, q; NaN for replications that did not converge), whether each converged and its
    iterations.  Estimates of replications that did not converge are where their search stopped (their
    start when it never moved)."""

    theta: np.ndarray
    value: np.ndarray
    information: np.ndarray
    converged: np.ndarray
    iterations: np.ndarray


class StackedNormal:
    """The ML discrepancy of one model for a stack of sample covariance matrices (R, p, p)."""

    def __init__(self, model: StructuredModel, covariances: np.ndarray):
        if not stackable(model):
            raise ValueError("the stacked discrepancy covers one group without means or bounds")
        self.model = model
        self.S = np.asarray(covariances, dtype=float)
        self.p, self.m = model.p, model.m
        factor, self.usable = _cholesky(self.S)
        self.logdet_S = 2.0 * np.log(np.diagonal(factor, axis1=1, axis2=2)).sum(axis=1)
        self.usable &= np.isfinite(self.logdet_S) & full_rank_pivots(factor, self.S)
        self._J = model.active_J[0]
        self._identity = model.identity_J[0]
        basis = self._basis = model.bases[0]
        nb = self.p + 2 * self.m
        self._uv = basis.u * nb + basis.v
        self._second = model.second_orders[0]
        self._triangle = _Triangle.of(basis, self._second)
        self._c2 = (2.0 * basis.c)[:, None]
        # where the second derivatives read M L = Q[:p, p+m:] in the flat (p+2m) x (p+2m) Q
        first, second = self._second.first, self._second.second
        self._first = first // self.m * nb + self.p + self.m + first % self.m
        self._second_at = second // self.m * nb + self.p + self.m + second % self.m
        self.higher_order = model.higher_order
        if self.higher_order:
            active = model.active[0]
            self._paths = _PathLayout.of(model._codes[0][active], model._rows[0][active], model._cols[0][active],
                                         self.p)

    def _sigma(self, theta: np.ndarray):
        """G = L A (R, p, m), P (R, m, m), C' = G P A' (the basis columns c_j; L P without higher-order factors),
        Sigma = G P G' + T (R, p, p) and A = (I - B)^-1 (None without higher-order factors) at a stack of parameter
        vectors."""
        mats = self.model.matrices(theta)
        L, P = mats.L, mats.P
        if not self.higher_order:
            LP = L @ P
            return L, P, LP, LP @ np.swapaxes(L, 1, 2) + mats.T, None
        A = np.broadcast_to(mats.A, P.shape)  # (the identity, unstacked, where no replication has a path)
        G = L @ A
        GP = G @ P
        return G, P, GP @ np.swapaxes(A, 1, 2), GP @ np.swapaxes(G, 1, 2) + mats.T, A

    def value(self, theta: np.ndarray, rows: np.ndarray) -> np.ndarray:
        """F of the replications ``rows`` (indices into the stack) at their ``theta`` (inf where Sigma is
        not positive definite)."""
        sigma = self._sigma(theta)[3]
        factor, ok = _cholesky(sigma)
        logdet = 2.0 * np.log(np.abs(np.diagonal(factor, axis1=1, axis2=2))).sum(axis=1)
        # tr(S Sigma^-1) = ||F^-1 S^1/2||^2 is not cheaper than a solve at these sizes: solve Sigma X = S
        trace = np.trace(np.linalg.solve(np.where(ok[:, None, None], sigma, np.eye(self.p)), self.S[rows]),
                         axis1=1, axis2=2)
        out = logdet + trace - self.logdet_S[rows] - self.p
        return np.where(ok & np.isfinite(out), out, np.inf)

    def evaluate(self, theta: np.ndarray, rows: np.ndarray, observed: bool = True):
        """(value, gradient, expected information, observed Hessian or None, ok) of the replications
        ``rows`` at their ``theta``; entries of replications whose Sigma is not positive definite
        (ok False) are meaningless.  Computed in blocks of :data:`BLOCK` replications, whose arrays stay
        in the processor's cache."""
        R, q = theta.shape
        information = np.empty((R, q, q))
        hessian = np.empty((R, q, q)) if observed else None
        if R <= BLOCK:
            return self._evaluate(theta, rows, information, hessian)
        value, gradient, ok = np.empty(R), np.empty((R, q)), np.empty(R, dtype=bool)
        for k in range(0, R, BLOCK):  # each block writes its part of the (R, q, q) arrays, no joining copies
            block = slice(k, k + BLOCK)
            value[block], gradient[block], _, _, ok[block] = self._evaluate(
                theta[block], rows[block], information[block], None if hessian is None else hessian[block])
        return value, gradient, information, hessian, ok

    def _evaluate(self, theta: np.ndarray, rows: np.ndarray, information_out: np.ndarray,
                  hessian_out: np.ndarray | None):
        """:meth:`evaluate` of one block, its information and Hessian written into ``information_out`` and
        ``hessian_out`` (None: no Hessian)."""
        G, P, C, sigma, A = self._sigma(theta)
        R, p, m = len(theta), self.p, self.m
        factor, ok = _cholesky(sigma)
        if not ok.all():
            sigma = np.where(ok[:, None, None], sigma, np.eye(p))
        logdet = 2.0 * np.log(np.abs(np.diagonal(factor, axis1=1, axis2=2))).sum(axis=1)
        inverse = np.linalg.inv(sigma)
        inverse = 0.5 * (inverse + np.swapaxes(inverse, 1, 2))
        S = self.S[rows]
        SI = S @ inverse
        value = logdet + np.trace(SI, axis1=1, axis2=2) - self.logdet_S[rows] - p
        ok &= np.isfinite(value)
        W = inverse - inverse @ SI  # Sigma^-1 (Sigma - S) Sigma^-1
        V = np.zeros((R, p, p + 2 * m))  # [I, C', G] with C' = G P A' (rank_two.basis_vectors)
        V[:, np.arange(p), np.arange(p)] = 1.0
        V[:, :, p:p + m] = C
        V[:, :, p + m:] = G
        Vt = np.swapaxes(V, 1, 2)
        # K and Q with the replications on the last axis ((entries, R)): every gather below then moves rows of R
        # values at once (gathering along the last axis moves one number at a time)
        K = (Vt @ (inverse @ V)).reshape(R, -1).T.copy()
        Q = (Vt @ (W @ V)).reshape(R, -1).T.copy()
        take = np.take  # gathers along one axis: several times faster than fancy indexing with 2-d index arrays
        gradient = (self._c2 * take(Q, self._uv, axis=0)).T
        # the information and the Hessian are symmetric: their entries are computed on the upper triangle
        # (pairs e <= f, (T, R)) and spread to both halves at the end
        tri = self._triangle
        Kuv, Kvu = take(K, tri.uv, axis=0), take(K, tri.vu, axis=0)
        Kuu, Kvv = take(K, tri.uu, axis=0), take(K, tri.vv, axis=0)
        information = Kuu * Kvv
        information += Kuv * Kvu
        information *= tri.cc2[:, None]
        hessian = None
        if hessian_out is not None:
            # the cross term tr(Sigma^-1 D_e W D_f) is symmetric in (e, f) (K and Q are), so the Hessian's
            # information - cross - cross' is information - 2 cross
            cross = take(Q, tri.vu, axis=0) * Kuv
            cross += take(Q, tri.vv, axis=0) * Kuu
            cross += take(Q, tri.uu, axis=0) * Kvv
            cross += take(Q, tri.uv, axis=0) * Kvu
            cross *= tri.cc2[:, None]
            hessian = information - cross + (self._second_derivatives(W, P, Q) if A is None
                                             else self._path_second_derivatives(W, A, P, G))
        if self._identity:
            information_out.reshape(R, -1)[...] = take(information, tri.full, axis=0).T
            if hessian is not None:
                hessian_out.reshape(R, -1)[...] = take(hessian, tri.full, axis=0).T
        else:
            J = self._J
            gradient = gradient @ J
            information_out[...] = J.T @ take(information, tri.full, axis=0).T.reshape(R, tri.size, tri.size) @ J
            if hessian is not None:
                hessian_out[...] = J.T @ take(hessian, tri.full, axis=0).T.reshape(R, tri.size, tri.size) @ J
        return value, gradient, information_out, hessian_out, ok

    def _second_derivatives(self, W: np.ndarray, P: np.ndarray, Q: np.ndarray) -> np.ndarray:
        """tr(W d2Sigma / de de') for the pairs e <= f of active entries, (T, R) (rank_two.second_derivative_contraction
        with a trailing axis of replications, on the upper triangle: M L is the block Q[:p, p+m:] of Q, since V starts
        with I and ends with L; ``Q`` is (entries, R))."""
        layout, tri, R = self._second, self._triangle, len(W)
        out = np.zeros((tri.pairs, R))
        take = np.take
        out[tri.load_load] = (2.0 * take(W.reshape(R, -1).T, tri.m_at, axis=0)) * take(P.reshape(R, -1).T, tri.p_at,
                                                                                          axis=0)
        if len(layout.load_cov):
            out[tri.load_cov] = (take(Q, self._first, axis=0) * layout.first_weight[:, None]
                                 + take(Q, self._second_at, axis=0) * layout.second_weight[:, None])
        return out


    def _path_second_derivatives(self, W: np.ndarray, A: np.ndarray, P: np.ndarray, G: np.ndarray) -> np.ndarray:
        """tr(W d2Sigma / de de') for the pairs e <= f of active entries of a model with higher-order factors, (T, R):
        :func:`cfa_tool.model.rank_two.path_second_derivatives` (without a mean structure) with a leading axis of
        replications, computed over all pairs and read on the upper triangle.  With U = [I, G], S = U' W U,
        Z = G' W U and Phi = A P A', a pair of loadings or paths (x_e = U[:, u_e], columns c_e) gives
        2 Phi[c_e, c_f] S[u_e, u_f], a path B[k, l] adds 2 A[c_f, k] (A P Z)[l, u_f] (and its mirror image), and a
        loading or path with a factor (co)variance P[k, l] gives 2 c (A[c_e, k] Z[l, u_e] + A[c_e, l] Z[k, u_e])."""
        lay, R, p = self._paths, len(W), self.p
        swap = np.swapaxes
        U = np.concatenate((np.broadcast_to(np.eye(p), (R, p, p)), G), axis=2)
        S = swap(U, 1, 2) @ (W @ U)
        Z = S[:, p:]
        out = np.zeros((R, lay.size, lay.size))
        x, u, c = lay.x, lay.u, lay.c
        if len(x):
            Phi = A @ P @ swap(A, 1, 2)
            block = 2.0 * Phi[:, c[:, None], c[None, :]] * S[:, u[:, None], u[None, :]]
            if len(lay.paths):
                Y = A @ P @ Z
                T = 2.0 * swap(A[:, c[:, None], lay.k[None, :]], 1, 2) * Y[:, lay.l[:, None], u[None, :]]
                block[:, lay.paths] += T
                block[:, :, lay.paths] += swap(T, 1, 2)
            out[:, x[:, None], x[None, :]] = block
            if len(lay.cov):
                k, l = lay.cov_k, lay.cov_l
                term = lay.cov_weight * (A[:, c[:, None], k[None, :]] * swap(Z[:, l[:, None], u[None, :]], 1, 2)
                                         + A[:, c[:, None], l[None, :]] * swap(Z[:, k[:, None], u[None, :]], 1, 2))
                out[:, x[:, None], lay.cov[None, :]] = term
                out[:, lay.cov[:, None], x[None, :]] = swap(term, 1, 2)
        return np.take(out.reshape(R, -1), lay.upper, axis=1).T


@dataclass(frozen=True)
class _PathLayout:
    """Where the second derivatives of a model with higher-order factors read their matrices
    (:meth:`StackedNormal._path_second_derivatives`): the active entries with an X (loadings and paths, ``x``), the
    column of U = [I, G] each multiplies (``u``) and its factor (``c``); among them the paths B[k, l] (positions in
    ``x``, ``k``, ``l``); the factor (co)variances P[k, l] (``cov``) with 2 c (c = 1/2 on the diagonal)."""

    size: int
    upper: np.ndarray  # the flat positions of the pairs e <= f in an E x E matrix, in the order of _Triangle's pairs
    x: np.ndarray
    u: np.ndarray
    c: np.ndarray
    paths: np.ndarray
    k: np.ndarray
    l: np.ndarray
    cov: np.ndarray
    cov_k: np.ndarray
    cov_l: np.ndarray
    cov_weight: np.ndarray

    @staticmethod
    def of(codes: np.ndarray, rows: np.ndarray, cols: np.ndarray, p: int) -> "_PathLayout":
        E = len(codes)
        x = np.flatnonzero((codes == 0) | (codes == 1))
        paths = np.flatnonzero(codes[x] == 1)
        cov = np.flatnonzero(codes == 2)
        return _PathLayout(E, np.flatnonzero(np.triu(np.ones((E, E), dtype=bool))), x,
                           np.where(codes[x] == 0, rows[x], p + rows[x]), cols[x], paths, rows[x][paths],
                           cols[x][paths], cov, rows[cov], cols[cov],
                           2.0 * np.where(rows[cov] == cols[cov], 0.5, 1.0))


@dataclass(frozen=True)
class _Triangle:
    """Where the pairs e <= f of active entries (the upper triangle of the E x E information, T pairs) read
    K, Q and the second derivatives, and how the triangle spreads back to the full E x E matrix."""

    size: int  # E
    pairs: int  # T = E (E + 1) / 2
    uu: np.ndarray  # flat positions in K and Q (rank_two.EntryBasis) of each pair
    vv: np.ndarray
    uv: np.ndarray
    vu: np.ndarray
    cc2: np.ndarray  # 2 c_e c_f
    full: np.ndarray  # for each flat position of the E x E matrix, its pair in the triangle
    load_load: np.ndarray  # the pairs of two loadings (rank_two.SecondOrderLayout) and where they read M and P
    m_at: np.ndarray
    p_at: np.ndarray
    load_cov: np.ndarray  # the pairs of a loading and a factor (co)variance, in the layout's order

    @staticmethod
    def of(basis, layout) -> "_Triangle":
        E = len(basis.u)
        upper = np.flatnonzero(np.triu(np.ones((E, E), dtype=bool)))
        pair = np.full(E * E, -1)
        pair[upper] = np.arange(len(upper))
        full = pair.reshape(E, E)
        full = np.where(full >= 0, full, full.T).ravel()
        in_upper = pair[layout.load_load] >= 0  # each pair of loadings appears twice in the layout, (e, f) and (f, e)
        load_cov = np.where(pair[layout.load_cov] >= 0, pair[layout.load_cov], pair[layout.cov_load])
        return _Triangle(E, len(upper), basis.uu.ravel()[upper], basis.vv.ravel()[upper], basis.uv.ravel()[upper],
                         basis.vu.ravel()[upper], 2.0 * basis.cc.ravel()[upper], full, pair[layout.load_load[in_upper]],
                         layout.m_at[in_upper], layout.p_at[in_upper], load_cov)


def fit_stacked(model: StructuredModel, covariances: np.ndarray, start: np.ndarray, max_iterations: int = 200) -> StackedFits:
    """Minimise the ML discrepancy of ``model`` for each covariance matrix of the stack (R, p, p) from
    the same ``start`` (see the module docstring for the steps and what is left to the caller), within
    ``max_iterations`` or :data:`ITERATIONS`, whichever is fewer."""
    max_iterations = min(max_iterations, ITERATIONS)
    objective = StackedNormal(model, covariances)
    R, q = len(objective.S), len(start)
    theta = np.tile(np.asarray(start, dtype=float), (R, 1))
    value = np.full(R, np.inf)
    information = np.full((R, q, q), np.nan)
    converged = np.zeros(R, dtype=bool)
    iterations = np.zeros(R, dtype=int)
    running = np.flatnonzero(objective.usable)
    if len(running) == 0:
        return StackedFits(theta, value, information, converged, iterations)
    f, g, H, N, ok = objective.evaluate(theta[running], running)
    running, f, g, H, N = _kept(ok, running, f, g, H, N)  # a start outside the region: left to the caller
    value[running] = f
    previous = np.full(len(running), np.inf)
    for it in range(1, max_iterations + 1):
        if len(running) == 0:
            break
        iterations[running] = it - 1
        # as optimizer.minimise: Newton's step with the observed Hessian first when the last decrement was
        # small, else scoring's, switching to Newton's when scoring's decrement is small; Newton's only
        # where the Hessian is positive definite
        n = len(running)
        newton, newton_ok = np.full((n, q), np.nan), np.zeros(n, dtype=bool)
        tried = (previous > NEAR_MINIMUM) & (previous < CLOSED_FORM_NEWTON_BELOW)
        if tried.any():
            newton[tried], newton_ok[tried] = _solve(*_kept(tried, N, g), negated=True)
        newton_first = tried & newton_ok
        scoring, scoring_ok = np.full((n, q), np.nan), np.zeros(n, dtype=bool)
        scored = ~newton_first
        if scored.any():
            scoring[scored], scoring_ok[scored] = _solve(*_kept(scored, H, g), negated=True, positive_definite=False)
        step = np.where(newton_first[:, None], newton, scoring)
        decrement = -np.einsum("ij,ij->i", g, step)
        done = (newton_first | scoring_ok) & (decrement < TOLERANCE)
        converged[running[done]] = True
        information[running[done]] = H[done]
        # Newton's decrement falls quadratically: when the next one is far below the tolerance, the full
        # step ends the search (optimizer.minimise)
        last_step = newton_first & (decrement**3 < 1e-2 * TOLERANCE * previous**2)
        late = scored & scoring_ok & ~tried & ~done & (decrement < CLOSED_FORM_NEWTON_BELOW)
        if late.any():
            newton[late], newton_ok[late] = _solve(*_kept(late, N, g), negated=True)
        switch = scored & newton_ok
        step = np.where(switch[:, None], newton, step)
        go = ~done & (newton_first | scoring_ok) & np.isfinite(step).all(axis=1)
        previous = decrement
        # keep the replications still searching
        running, f, g, H, step, previous, last_step = _kept(go, running, f, g, H, step, previous, last_step)
        if len(running) == 0:
            break
        trial, t, f, g, H, N, ok = _step(objective, theta[running], f, g, step, running)
        running, trial, t, previous, last_step, f, g, H, N = _kept(ok, running, trial, t, previous, last_step, f, g, H, N)
        theta[running], value[running] = trial, f
        iterations[running] = it
        finished = last_step & (t == 1.0)
        converged[running[finished]] = True
        information[running[finished]] = H[finished]
        running, f, g, H, N, previous = _kept(~finished, running, f, g, H, N, previous)
    return StackedFits(theta, value, information, converged, iterations)


def _kept(keep: np.ndarray, *arrays: np.ndarray) -> tuple:
    """The rows ``keep`` of each array (the arrays themselves when all are kept, as they mostly are: no copies)."""
    if keep.all():
        return arrays
    return tuple(a[keep] for a in arrays)


def _step(objective: StackedNormal, theta: np.ndarray, f0: np.ndarray, g: np.ndarray, step: np.ndarray,
          rows: np.ndarray):
    """Each replication's next point, where F falls by the Armijo share of the decrease its step promises
    (steepest descent where the step is not a descent direction), evaluated there: (points, step lengths,
    value, gradient, information, Hessian, found).  Near the minimum the full step is nearly always taken,
    so the full step's point is evaluated at once and its value tested; only the replications whose full step
    fails the test search backwards from half of it (:func:`_line_search`), and the point found is then
    evaluated.  The points are those of a backtracking search from the full step."""
    slope = np.einsum("ij,ij->i", g, step)
    uphill = slope >= 0
    if uphill.any():
        step = np.where(uphill[:, None], -g, step)
        slope = np.einsum("ij,ij->i", g, step)
    trial = theta + step
    f, gradient, information, hessian, ok = objective.evaluate(trial, rows)
    ok &= f <= f0 + ARMIJO * slope  # evaluate's ok already requires a finite value
    t = np.ones(len(theta))
    if ok.all():
        return trial, t, f, gradient, information, hessian, ok
    rest = np.flatnonzero(~ok)
    t[rest], trial[rest], found = _line_search(objective, theta[rest], f0[rest], slope[rest], step[rest], rows[rest])
    again = rest[found]
    if len(again):
        f[again], gradient[again], information[again], hessian[again], ok[again] = objective.evaluate(trial[again],
                                                                                                     rows[again])
    return trial, t, f, gradient, information, hessian, ok


def _line_search(objective: StackedNormal, theta: np.ndarray, f0: np.ndarray, slope: np.ndarray, step: np.ndarray,
                 rows: np.ndarray):
    """Backtracking from half of each (descent) ``step``, per replication, until F falls by the Armijo share of
    the decrease the step promises (``slope`` = g' step): (step lengths, points, found)."""
    t = np.full(len(theta), 0.5)
    trial = theta + 0.5 * step
    found = np.zeros(len(theta), dtype=bool)
    pending = np.arange(len(theta))
    for _ in range(HALVINGS - 1):  # the full step was the first try
        f = objective.value(trial[pending], rows[pending])
        accept = np.isfinite(f) & (f <= f0[pending] + ARMIJO * t[pending] * slope[pending])
        found[pending[accept]] = True
        pending = pending[~accept]
        if len(pending) == 0:
            break
        t[pending] *= 0.5
        trial[pending] = theta[pending] + t[pending, None] * step[pending]
    return t, trial, found


def _cholesky(A: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Lower Cholesky factors of a stack of symmetric matrices and which of them are positive definite
    (the others get the identity).  numpy's stacked LAPACK kernel (the one behind np.linalg.cholesky)
    factors every matrix and leaves NaN where one is not positive definite; np.linalg.cholesky would then
    raise for the whole stack, so the kernel is called directly and the failures read from the factors."""
    with np.errstate(invalid="ignore", over="ignore", divide="ignore", under="ignore"):
        factor = _stacked(lambda: LAPACK_KERNELS.cholesky_lo(A, signature="d->d"), np.linalg.cholesky, A)
    ok = np.isfinite(np.diagonal(factor, axis1=1, axis2=2)).all(axis=1)
    if not ok.all():
        factor[~ok] = np.eye(A.shape[-1])
    return factor, ok


def _solve(H: np.ndarray, b: np.ndarray, positive_definite: bool = True, negated: bool = False
           ) -> tuple[np.ndarray, np.ndarray]:
    """Solutions of H_r x_r = b_r (with ``negated``, of H_r x_r = -b_r) for a stack of symmetric matrices scaled
    to unit diagonal (as numerics.linalg.scaled_solve does for one), and which of them were found: with
    ``positive_definite`` only those of positive definite H_r (checked by a Cholesky factorisation), otherwise
    those of nonsingular H_r; the solutions not found are NaN.  Stacks are passed whole when every matrix is
    wanted (no copies)."""
    if negated:
        b = -b
    d = 1.0 / np.sqrt(np.maximum(np.abs(np.diagonal(H, axis1=1, axis2=2)), 1e-300))
    scaled = H * (d[:, :, None] * d[:, None, :])
    if positive_definite:
        ok = _cholesky(scaled)[1]
    else:
        ok = np.isfinite(scaled).all(axis=(1, 2))
    x = np.full_like(b, np.nan)
    if ok.any():  # numpy's stacked LU kernel (behind np.linalg.solve): NaN for a singular matrix, not an error
        left, right, scale = _kept(ok, scaled, d * b, d)
        right = right[:, :, None]
        with np.errstate(invalid="ignore", over="ignore", divide="ignore", under="ignore"):
            x[ok] = _stacked(lambda: LAPACK_KERNELS.solve(left, right, signature="dd->d"), np.linalg.solve, left,
                             right)[:, :, 0] * scale
    return x, ok & np.isfinite(x).all(axis=1)


def _stacked(kernel, one, *stacks: np.ndarray) -> np.ndarray:
    """numpy's stacked kernel (NaN where a matrix fails), or, should this numpy lack it, ``one`` applied matrix by
    matrix with NaN where it raises."""
    if LAPACK_KERNELS is not None:
        try:
            return kernel()
        except (AttributeError, TypeError):  # pragma: no cover - depends on the numpy installed
            pass
    out = []
    for parts in zip(*stacks):
        try:
            out.append(one(*parts))
        except np.linalg.LinAlgError:
            out.append(np.full(np.broadcast_shapes(*(p.shape for p in parts[-1:])), np.nan))
    return np.array(out)
