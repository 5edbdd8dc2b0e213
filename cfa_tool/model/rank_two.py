"""Gradient, expected information and observed Hessian of the ML discrepancy from
rank-two derivatives, without forming any p x p derivative matrix.

The derivative of Sigma with respect to any matrix entry e is c_e (u v' + v u')
and that of mu is s_e w, for vectors u, v, w taken from the basis
V = [I_p, C', G] (C = A P G', G = L A; see :mod:`cfa_tool.model.implied`):

* L[i, j]: u = e_i, v = c_j, c = 1;     w = e_i, s = a_j       (a = A M)
* B[i, j]: u = g_i, v = c_j, c = 1;     w = g_i, s = a_j
* P[i, j]: u = g_i, v = g_j, c = 1 (1/2 on the diagonal)
* T[i, j]: u = e_i, v = e_j, c = 1 (1/2 on the diagonal)
* N[i]: w = e_i, s = 1;   M[j]: w = g_j, s = 1;   thresholds: no moment derivative

With K = V' Sigma^-1 V and Q = V' W V for W = Sigma^-1 (Sigma - S - d d') Sigma^-1,
the traces reduce to products of entries of K and Q (Neudecker & Satorra 1991 give
the derivatives; the reduction is the identity tr(X a b' Y c d') = (b'Y c)(d'X a)):

    gradient     g_e  = 2 c_e Q[u, v] + s_e (V' m)[w]              (m = -2 Sigma^-1 d)
    information  H_ef = 2 c_e c_f (K[u_e, u_f] K[v_e, v_f] + K[u_e, v_f] K[v_e, u_f]) + 2 s_e s_f K[w_e, w_f]
    cross term   tr(Sigma^-1 D_e W D_f) from the analogous four products of K and Q.

This costs O(p^2 (p + 2m) + E^2) per evaluation instead of O(E p^3).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class EntryBasis:
    """Which basis vectors and coefficients describe each entry's derivative (constant in theta)."""

    u: np.ndarray
    v: np.ndarray
    w: np.ndarray
    c: np.ndarray
    mean_from_a: np.ndarray  # entries whose mean coefficient is a_j (index j), -1 otherwise
    mean_one: np.ndarray  # entries whose mean coefficient is 1
    # flat positions in the (basis x basis) matrices K and Q of the pairs each formula reads
    uu: np.ndarray
    vv: np.ndarray
    uv: np.ndarray
    vu: np.ndarray
    ww: np.ndarray
    cc: np.ndarray  # outer(c, c)
    #: candidates only (:func:`row_runs`): (start, stop, u, first v) of each run of entries with one u and consecutive
    #: v, u = -1 for the rows between runs; empty when there is no long run
    runs: tuple[tuple[int, int, int, int], ...] = ()


def entry_basis(codes: np.ndarray, rows: np.ndarray, cols: np.ndarray, p: int, m: int, with_pairs: bool = True) -> EntryBasis:
    """The basis indices of each entry; ``with_pairs`` also lays out the E x E gathers that the
    information matrix reads (not wanted for long candidate lists)."""
    E = len(codes)
    u = np.zeros(E, dtype=int)
    v = np.zeros(E, dtype=int)
    w = np.zeros(E, dtype=int)
    c = np.zeros(E)
    mean_from_a = np.full(E, -1)
    mean_one = np.zeros(E, dtype=bool)
    C0, G0 = p, p + m  # where the c_j and g_j columns start in V
    for code, sel_u, sel_v, sel_w in (
        (0, rows, C0 + cols, rows),
        (1, G0 + rows, C0 + cols, G0 + rows),
        (2, G0 + rows, G0 + cols, None),
        (3, rows, cols, None),
    ):
        sel = codes == code
        u[sel], v[sel] = sel_u[sel], sel_v[sel]
        c[sel] = np.where(rows[sel] == cols[sel], 0.5, 1.0) if code in (2, 3) else 1.0
        if sel_w is not None:
            w[sel] = sel_w[sel]
            mean_from_a[sel] = cols[sel]
    sel = codes == 4
    w[sel], mean_one[sel] = rows[sel], True
    sel = codes == 5
    w[sel], mean_one[sel] = G0 + rows[sel], True
    nb = p + 2 * m

    def pairs(a, b):
        return a[:, None] * nb + b[None, :] if with_pairs else np.zeros((0, 0), dtype=int)

    return EntryBasis(u, v, w, c, mean_from_a, mean_one, pairs(u, u), pairs(v, v), pairs(u, v), pairs(v, u), pairs(w, w),
                      np.outer(c, c) if with_pairs else np.zeros((0, 0)), () if with_pairs else row_runs(u, v))


#: the fewest entries of a run that :func:`candidate_blocks` reads as slices of K's columns rather than gathers (a run
#: costs a few numpy calls; a gathered row four copies of a row)
SHORTEST_RUN = 16


def row_runs(u: np.ndarray, v: np.ndarray, shortest: int = SHORTEST_RUN) -> tuple[tuple[int, int, int, int], ...]:
    """(start, stop, u, first v) of each run of at least ``shortest`` consecutive entries with one u and consecutive
    v (the residual covariances (i, j) of one item i, j = 0, 1, ..., i - 1), and (start, stop, -1, -1) for the
    entries between runs; empty when there is no such run."""
    n = len(u)
    if n < shortest:
        return ()
    breaks = np.flatnonzero((u[1:] != u[:-1]) | (v[1:] != v[:-1] + 1)) + 1
    starts = np.concatenate(([0], breaks)).tolist()
    stops = np.concatenate((breaks, [n])).tolist()
    runs: list[tuple[int, int, int, int]] = []
    loose = None  # where the entries not in a run began
    for start, stop in zip(starts, stops):
        if stop - start < shortest:
            loose = start if loose is None else loose
            continue
        if loose is not None:
            runs.append((loose, start, -1, -1))
            loose = None
        runs.append((start, stop, int(u[start]), int(v[start])))
    if not any(r[2] >= 0 for r in runs):
        return ()
    if loose is not None:
        runs.append((loose, n, -1, -1))
    return tuple(runs)


def basis_vectors(mats, means: bool) -> tuple[np.ndarray, np.ndarray]:
    """(V = [I, C', G], a = A M) at a group's model matrices (a is zero without a mean structure)."""
    G = mats.G
    higher_order = mats.has_paths  # known without looking at B for models without paths (StructuredModel.matrices)
    PG = mats.P @ G.T
    C = mats.A @ PG if higher_order else PG
    p, m = G.shape
    V = np.zeros((p, p + 2 * m))
    V.ravel()[::p + 2 * m + 1] = 1.0  # the identity block
    V[:, p:p + m] = C.T
    V[:, p + m:] = G
    if not means:
        return V, np.zeros(m)
    return V, (mats.A @ mats.M if higher_order else mats.M)


def mean_coefficients(basis: EntryBasis, a: np.ndarray) -> np.ndarray:
    s = basis.mean_one.astype(float)
    has_a = basis.mean_from_a >= 0
    s[has_a] = a[basis.mean_from_a[has_a]]
    return s


def gradient_and_information(basis: EntryBasis, V: np.ndarray, a: np.ndarray, sigma_inv: np.ndarray, W: np.ndarray,
                             mean_gradient: np.ndarray | None, with_information: bool = True):
    """(g_e, H_e, K, Q) for the entries of ``basis``; H_e is None unless wanted."""
    K = V.T @ (sigma_inv @ V)
    Q = V.T @ (W @ V)
    g = 2.0 * basis.c * Q[basis.u, basis.v]
    means = mean_gradient is not None
    if means:
        s = mean_coefficients(basis, a)
        g = g + s * (V.T @ mean_gradient)[basis.w]
    H = None
    if with_information:
        k = K.ravel()
        Kuv = k[basis.uv]
        H = 2.0 * basis.cc * (k[basis.uu] * k[basis.vv] + Kuv * Kuv.T)
        if means:
            H += 2.0 * np.outer(s, s) * k[basis.ww]
    return g, H, K, Q


def cross_term(basis: EntryBasis, K: np.ndarray, Q: np.ndarray) -> np.ndarray:
    """tr(Sigma^-1 D_e W D_f) for all pairs of entries (covariance part only)."""
    k, q = K.ravel(), Q.ravel()
    Kuv = k[basis.uv]
    return basis.cc * (q[basis.vu] * Kuv + q[basis.vv] * k[basis.uu] + q[basis.uu] * k[basis.vv] + q[basis.uv] * Kuv.T)


def model_columns(model: EntryBasis, K: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(2 c_e K[:, u_e], K[:, v_e]): the columns of K that every candidate's cross-information reads, gathered once
    per group, with the factor 2 c_e of the formula folded in (2 c_e is 2 or 1, a power of two: no rounding
    changes).  Both C-ordered: each candidate gathers whole rows of them, and K[:, u] taken by columns is laid out by
    columns (a row gathered from it reads one number per cache line: the blocks took twice as long at 60 items)."""
    return (np.ascontiguousarray(K[:, model.u] * (2.0 * model.c)), np.ascontiguousarray(K[:, model.v]))


def candidate_blocks(cand: EntryBasis, model: EntryBasis, K: np.ndarray, Q: np.ndarray, Vm: np.ndarray | None,
                     a: np.ndarray, columns: tuple[np.ndarray, np.ndarray],
                     buffers: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None
                     ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """For candidate entries (not parameters of the model): their gradient d, their cross-information
    with the model's entries H_ce and their own information h (the diagonal), as in the formulas above.
    ``Vm`` is V' m (the mean part of the gradient), None without a mean structure; ``columns`` is
    :func:`model_columns` of the model's entries.  ``buffers``, for large blocks: three arrays of at least as many
    rows as candidates and one column per model entry, reused from chunk to chunk (memory in use and in the
    processor's caches, where new arrays are fresh memory), in which H_ce is made (the first one's leading rows),
    reading runs (:func:`row_runs`) as slices."""
    uc, vc, cc = cand.u, cand.v, cand.c
    Ku, Kv = columns  # K is symmetric, so K[u_c, u_e] = Ku[u_c]: whole rows gathered
    d = 2.0 * cc * Q[uc, vc]
    # 2 c_e c_c (K[u_c, u_e] K[v_c, v_e] + K[u_c, v_e] K[v_c, u_e]); c_c is 1 for every off-diagonal entry (all but
    # equality tests of variances): powers of two, exact in any order
    if buffers is None:  # small blocks: rows gathered into new arrays, the fewest numpy calls
        H = np.take(Ku, uc, axis=0)
        H *= np.take(Kv, vc, axis=0)
        other = np.take(Kv, uc, axis=0)
        other *= np.take(Ku, vc, axis=0)
        H += other
    else:
        H = _products_in_runs(cand, Ku, Kv, buffers)
    if not (cc == 1.0).all():
        H *= cc[:, None]
    h = 2.0 * cc**2 * (K[uc, uc] * K[vc, vc] + K[uc, vc] ** 2)
    if Vm is not None:
        sc, se = mean_coefficients(cand, a), mean_coefficients(model, a)
        d = d + sc * Vm[cand.w]
        H += 2.0 * np.outer(sc, se) * K[np.ix_(cand.w, model.w)]
        h = h + 2.0 * sc**2 * K[cand.w, cand.w]
    return d, H, h


def _products_in_runs(cand: EntryBasis, Ku: np.ndarray, Kv: np.ndarray,
                      buffers: tuple[np.ndarray, np.ndarray, np.ndarray]) -> np.ndarray:
    """Ku[u_c] Kv[v_c] + Kv[u_c] Ku[v_c] for :func:`candidate_blocks`, made in ``buffers``: a run of one u and
    consecutive v (an item's residual covariances, :func:`row_runs`) reads slices of Ku and Kv, not gathered rows (a
    few numpy calls for the run, which pay for long rows: large models), and each run's two products are summed
    while its rows are in the processor's cache."""
    uc, vc = cand.u, cand.v
    n = len(uc)
    H, other, spare = (b[:n] for b in buffers)
    for start, stop, u, v in cand.runs or ((0, n, -1, -1),):
        rows, second = H[start:stop], other[: stop - start]
        if u >= 0:
            np.multiply(Ku[u], Kv[v:v + stop - start], out=rows)
            np.multiply(Kv[u], Ku[v:v + stop - start], out=second)
        else:  # mode "clip" gathers straight into the given array (the default mode copies through a new one)
            rows_u, rows_v, into = uc[start:stop], vc[start:stop], spare[: stop - start]
            np.take(Ku, rows_u, axis=0, out=rows, mode="clip")
            rows *= np.take(Kv, rows_v, axis=0, out=into, mode="clip")
            np.multiply(np.take(Kv, rows_u, axis=0, out=second, mode="clip"),
                        np.take(Ku, rows_v, axis=0, out=into, mode="clip"), out=second)
        rows += second
    return H


@dataclass(frozen=True)
class SecondOrderLayout:
    """Where tr(M d2Sigma / de de') lands for pairs of entries (no higher-order factors, so G = L).

    Only two kinds of pair have a second derivative (Neudecker & Satorra 1991): two loadings
    L[i, j], L[k, l] give 2 M[i, k] P[j, l]; a loading L[i, j] and a factor (co)variance P[k, l]
    give 2 c ([j == k] (M L)[i, l] + [j == l] (M L)[i, k]), c = 1/2 on the diagonal of P.
    The positions are fixed by the model, so they are laid out once."""

    size: int
    load_load: np.ndarray  # flat positions in the E x E result
    m_at: np.ndarray  # flat positions in M (p x p)
    p_at: np.ndarray  # flat positions in P (m x m)
    load_cov: np.ndarray  # flat positions of (loading, covariance) pairs in the result
    cov_load: np.ndarray  # their mirror images
    first: np.ndarray  # flat positions in M L (p x m) and their weights
    first_weight: np.ndarray
    second: np.ndarray
    second_weight: np.ndarray


def second_order_layout(codes: np.ndarray, rows: np.ndarray, cols: np.ndarray, p: int, m: int) -> SecondOrderLayout:
    E = len(codes)
    e_load = np.flatnonzero(codes == 0)
    e_cov = np.flatnonzero(codes == 2)
    li, lj = rows[e_load], cols[e_load]
    pk, pl = rows[e_cov], cols[e_cov]
    c = 2.0 * np.where(pk == pl, 0.5, 1.0)[None, :]

    def flat(r, k, width):
        return (r[:, None] * width + k[None, :]).ravel()

    return SecondOrderLayout(
        E, flat(e_load, e_load, E), flat(li, li, p), flat(lj, lj, m),
        flat(e_load, e_cov, E), flat(e_cov, e_load, E).reshape(len(e_cov), len(e_load)).T.ravel(),
        (li[:, None] * m + pl[None, :]).ravel(), ((lj[:, None] == pk[None, :]) * c).ravel(),
        (li[:, None] * m + pk[None, :]).ravel(), ((lj[:, None] == pl[None, :]) * c).ravel(),
    )


def second_derivative_contraction(layout: SecondOrderLayout, M: np.ndarray, L: np.ndarray, P: np.ndarray,
                                  ML: np.ndarray | None = None) -> np.ndarray:
    """tr(M d2Sigma / de de') for all pairs of the layout's entries (see :class:`SecondOrderLayout`);
    ``ML`` is M L when the caller has it."""
    out = np.zeros(layout.size * layout.size)
    out[layout.load_load] = 2.0 * M.ravel()[layout.m_at] * P.ravel()[layout.p_at]
    if len(layout.load_cov):
        ML = (M @ L if ML is None else ML).ravel()
        term = ML[layout.first] * layout.first_weight + ML[layout.second] * layout.second_weight
        out[layout.load_cov] = term
        out[layout.cov_load] = term
    return out.reshape(layout.size, layout.size)


def mean_second_derivatives(codes: np.ndarray, rows: np.ndarray, cols: np.ndarray, mean_gradient: np.ndarray) -> np.ndarray:
    """m' d2mu / de de' for pairs of entries: mu = N + L M (no higher-order factors) has d2mu / dL_ij dM_j = e_i."""
    E = len(codes)
    out = np.zeros((E, E))
    loads = np.flatnonzero(codes == 0)
    means = np.flatnonzero(codes == 5)
    if len(loads) and len(means):
        match = cols[loads][:, None] == rows[means][None, :]
        block = match * mean_gradient[rows[loads]][:, None]
        out[np.ix_(loads, means)] = block
        out[np.ix_(means, loads)] = block.T
    return out


def path_second_derivatives(codes: np.ndarray, rows: np.ndarray, cols: np.ndarray, M: np.ndarray, mats,
                            mean_gradient: np.ndarray | None = None) -> np.ndarray:
    """tr(M d2Sigma / de de') + m' d2mu / de de' for all pairs of the listed entries of a model with paths between
    factors (higher-order factors: Sigma = G P G' + T, mu = N + G a, G = L A, A = (I - B)^-1, a = A M_f, the factor
    means M_f), M symmetric and m = ``mean_gradient`` (None without a mean structure).

    The second differential of tr(M Sigma) + m' mu in directions 1 and 2 (Neudecker & Satorra 1991's rules, with
    dA = A dB A) is, with X = dL + G dB (dG = X A) and Phi = A P A',

        2 tr(M X1 Phi X2') + 2 tr(M X2 A dB1 Phi L') + 2 tr(M X1 A dB2 Phi L')
        + 2 tr(M X1 A dP2 G') + 2 tr(M X2 A dP1 G')
        + m' X2 A dB1 a + m' X1 A dB2 a + m' X1 A dM2 + m' X2 A dM1.

    For a loading L[i, j], X = e_i e_j'; for a path B[k, l], X = g_k e_l' (g_k the k-th column of G): each is
    x e_c' with x a column of U = [I, G], so every term is a product of entries of S = U' M U, A, Phi and a.  Without
    paths (A = I) this gives :func:`second_derivative_contraction` and :func:`mean_second_derivatives`."""
    p, m = mats.L.shape
    A, G = mats.A, mats.G
    E = len(codes)
    out = np.zeros((E, E))
    x = np.flatnonzero((codes == 0) | (codes == 1))  # entries with an X: loadings and paths
    if len(x) == 0:
        return out
    u = np.where(codes[x] == 0, rows[x], p + rows[x])  # x = U[:, u]
    c = cols[x]
    U = np.hstack((np.eye(p), G))
    MU = M @ U
    S = U.T @ MU  # (p + m) x (p + m)
    Z = S[p:]  # G' M U, m x (p + m)
    Phi = A @ mats.P @ A.T
    # 2 tr(M X1 Phi X2') = 2 Phi[c1, c2] S[u1, u2]
    block = 2.0 * Phi[np.ix_(c, c)] * S[np.ix_(u, u)]
    paths = np.flatnonzero(codes[x] == 1)
    mean_u = None if mean_gradient is None else U.T @ mean_gradient
    if len(paths):
        k, l = rows[x][paths], cols[x][paths]
        Y = A @ mats.P @ Z  # Phi L' M U = A P G' M U
        # 2 tr(M X2 A dB1 Phi L') for a path 1 = B[k, l]: 2 A[c2, k] Y[l, u2]
        T = 2.0 * A[np.ix_(c, k)].T * Y[np.ix_(l, u)]
        if mean_u is not None:  # m' X2 A dB1 a = (m' x2) A[c2, k] a[l]
            a = A @ mats.M
            T += A[np.ix_(c, k)].T * (a[l][:, None] * mean_u[u][None, :])
        block[paths] += T
        block[:, paths] += T.T
    out[np.ix_(x, x)] = block
    cov = np.flatnonzero(codes == 2)
    if len(cov):
        k, l = rows[cov], cols[cov]
        half = np.where(k == l, 0.5, 1.0)
        # 2 tr(M X1 A dP2 G') with dP2 = e_k e_l' + e_l e_k' (once on the diagonal)
        term = 2.0 * half * (A[np.ix_(c, k)] * Z[np.ix_(l, u)].T + A[np.ix_(c, l)] * Z[np.ix_(k, u)].T)
        out[np.ix_(x, cov)] = term
        out[np.ix_(cov, x)] = term.T
    means = np.flatnonzero(codes == 5)
    if len(means) and mean_u is not None:
        term = mean_u[u][:, None] * A[np.ix_(c, rows[means])]  # m' X1 A dM2 = (m' x1) A[c1, j]
        out[np.ix_(x, means)] = term
        out[np.ix_(means, x)] = term.T
    return out
