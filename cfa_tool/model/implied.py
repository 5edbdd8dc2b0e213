"""Implied moments and their analytic derivatives.

Sigma = G P G' + T and mu = N + G M, with G = L A and A = (I - B)^-1 (see
:mod:`parameters`).  The derivative of Sigma with respect to one matrix entry
is a rank-two update (Neudecker & Satorra 1991 give the general form), and
that of mu a single vector:

* L[i, j]:  dSigma = e_i c_j' + c_j e_i',  dmu = e_i a_j      with c_j = (A P G')[j, :], a = A M
* B[i, j]:  dSigma = g_i c_j' + c_j g_i',  dmu = g_i a_j      with g_i = G[:, i]
* P[i, j]:  dSigma = g_i g_j' + g_j g_i' (i != j), g_i g_i' (i == j)
* T[i, j]:  dSigma = E_ij + E_ji (i != j), E_ii (i == j)
* N[i]:     dmu = e_i;     M[j]: dmu = g_j
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from cfa_tool.model.parameters import ParameterTable
from cfa_tool.model.rank_two import entry_basis, second_order_layout


@dataclass(frozen=True)
class ModelMatrices:
    """The model matrices of one group at one parameter vector."""
    L: np.ndarray
    B: np.ndarray
    P: np.ndarray
    T: np.ndarray
    N: np.ndarray
    M: np.ndarray

    @cached_property
    def has_paths(self) -> bool:
        """Some factor loads on another (B is not zero): A, G and the factors' total covariances need B."""
        return bool(self.B.any())

    @cached_property
    def A(self) -> np.ndarray:
        m = self.B.shape[-1]
        if not self.has_paths:
            return np.eye(m)
        return np.linalg.inv(np.eye(m) - self.B)

    @cached_property
    def G(self) -> np.ndarray:
        """L A: the indicators' loadings on every factor, through higher-order paths too."""
        return self.L if not self.has_paths else self.L @ self.A

    def latent_covariance(self) -> np.ndarray:
        """Total (co)variances of the factors: A P A' (read-only; computed once)."""
        return self._latent_covariance

    @cached_property
    def _latent_covariance(self) -> np.ndarray:
        A = self.A
        out = self.P.copy() if not self.has_paths else A @ self.P @ np.swapaxes(A, -1, -2)
        out.setflags(write=False)
        return out

    def item_factor_covariance(self) -> np.ndarray:
        """Cov(x, eta) = L A P A' (p, m): the items' covariances with every factor, through higher-order paths too (what
        a keyed sum's omega and the ordinal sum's share due to a factor read; read-only, computed once)."""
        return self._item_factor_covariance

    @cached_property
    def _item_factor_covariance(self) -> np.ndarray:
        out = self.L @ self.latent_covariance()
        out.setflags(write=False)
        return out

    def latent_means(self) -> np.ndarray:
        return self.A @ self.M

    def with_unit_variances(self, held: np.ndarray | None = None) -> ModelMatrices:
        """The same matrices with the residual variance of each item in ``held`` (a mask over the items; every item
        when None) 1 minus the variance its factors explain, so that its latent response has variance 1: the
        correlation metric of ordinal items (Muthén & Asparouhov 2002), the one rule for every view of it."""
        from dataclasses import replace

        held = np.ones(self.T.shape[0], dtype=bool) if held is None else np.asarray(held, dtype=bool)
        if not held.any():
            return self
        T = self.T.copy()
        common = np.diag(self.implied_covariance()) - np.diag(self.T)
        T[held, held] = 1.0 - common[held]
        return replace(self, T=T)

    def implied_covariance(self) -> np.ndarray:
        """Sigma = G P G' + T (read-only; computed once)."""
        return self._implied_covariance

    @cached_property
    def _implied_covariance(self) -> np.ndarray:
        G = self.G
        out = G @ self.P @ np.swapaxes(G, -1, -2) + self.T
        out.setflags(write=False)
        return out

    def implied_mean(self) -> np.ndarray:
        return self.N + self.G @ self.M


class StructuredModel:
    """Maps theta to each group's matrices, implied moments and their derivatives.

    Holds only precomputed index arrays (and, in ``derived``, what other modules compute from the structure
    alone); every method is a pure function of theta.
    """

    def __init__(self, table: ParameterTable):
        self.table = table
        self.p, self.m = table.p, table.m
        self.n_groups = table.n_groups
        self.mean_structure = table.mean_structure
        self.derived: dict = {}  # what other modules derive from the structure alone, kept for refits of the model
        codes, rows, cols = table.entry_arrays()
        groups = table.group_array()
        J, offset = table.mapping()
        self._codes, self._rows, self._cols = [], [], []
        self._J, self._offset = [], []
        for g in range(self.n_groups):
            sel = groups == g
            self._codes.append(codes[sel])
            self._rows.append(rows[sel])
            self._cols.append(cols[sel])
            self._J.append(J[sel])
            self._offset.append(offset[sel])
        self.J, self.offset = J, offset
        self.groups = groups
        self._layouts = [self._layout(g) for g in range(self.n_groups)]
        self._copies = [self._copied_entries(g) for g in range(self.n_groups)]
        # per group: the entries that depend on theta, their rank-two description and their rows of J
        self.active, self.bases, self.active_J = [], [], []
        # where second derivatives of Sigma land, over the active entries and over all entries
        self.second_orders, self.all_second_orders = [], []
        for g in range(self.n_groups):
            active = np.flatnonzero(self._J[g].any(axis=1))
            self.active.append(active)
            codes, rows, cols = self._codes[g], self._rows[g], self._cols[g]
            self.bases.append(entry_basis(codes[active], rows[active], cols[active], self.p, self.m))
            self.second_orders.append(second_order_layout(codes[active], rows[active], cols[active], self.p, self.m))
            self.all_second_orders.append(second_order_layout(codes, rows, cols, self.p, self.m))
            self.active_J.append(self._J[g][active])
        # each parameter is one active entry, in order (no equality constraints): products with J can be skipped
        self.identity_J = [J.shape[0] == J.shape[1] and np.array_equal(J, np.eye(J.shape[0])) for J in self.active_J]
        self.higher_order = bool(np.any(table.entry_arrays()[0] == 1))

    # -- matrices
    def entry_values(self, theta: np.ndarray) -> np.ndarray:
        """Values of all table entries (all groups), in table order."""
        return self.offset + self.J @ theta

    def _layout(self, group: int) -> tuple:
        """Where each entry of a group goes in one flat buffer holding L, B, P, T, N, M (entries of
        symmetric matrices on both sides of the diagonal), and where each matrix lies in it."""
        p, m = self.p, self.m
        shapes = [(p, m), (m, m), (m, m), (p, p), (p,), (m,)]
        starts = np.concatenate([[0], np.cumsum([int(np.prod(s)) for s in shapes])])
        codes, rows, cols = self._codes[group], self._rows[group], self._cols[group]
        in_moments = codes < 6  # thresholds enter no moment matrix
        width = np.array([m, m, m, p, 1, 1, 0])[codes]
        flat = starts[np.minimum(codes, 5)] + np.where(codes >= 4, rows, rows * width + cols)
        mirror = in_moments & np.isin(codes, (2, 3)) & (rows != cols)
        flat_mirror = starts[np.minimum(codes, 5)] + cols * width + rows
        take = np.concatenate([np.flatnonzero(in_moments), np.flatnonzero(mirror)])
        at = np.concatenate([flat[in_moments], flat_mirror[mirror]])
        pieces = tuple((int(starts[k]), int(starts[k + 1]), shape) for k, shape in enumerate(shapes))
        return int(starts[-1]), take, at, pieces

    def _copied_entries(self, group: int) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
        """When each of a group's entries is a fixed value or one parameter itself (a row of J holding a single 1 and
        no offset; no equality constraints with other coefficients, the usual model): (the buffer of
        :meth:`_layout` holding the fixed values, the buffer positions of the free entries, their parameters), so that
        the matrices at theta are the fixed buffer with theta copied in.  offset + J theta gives exactly theta_k there
        for finite theta (every other term is zero), so the matrices are the same numbers.  None otherwise."""
        size, take, at, _ = self._layouts[group]
        J, offset = self._J[group][take], self._offset[group][take]
        nonzero = J != 0
        free = nonzero.any(axis=1)
        # each free row has one nonzero (checked first), so its sum is that entry (a sum, unlike a maximum, also takes
        # a model with no free parameter: every row fixed)
        if not (nonzero.sum(axis=1) <= 1).all() or not (J[free].sum(axis=1) == 1.0).all() or (offset[free] != 0).any():
            return None
        buffer = np.zeros(size)
        buffer[at[~free]] = offset[~free]
        buffer.setflags(write=False)
        parameter = nonzero[free].argmax(axis=1) if J.shape[1] else np.zeros(0, dtype=np.intp)
        return buffer, at[free], parameter

    def matrices(self, theta: np.ndarray, group: int = 0) -> ModelMatrices:
        """A group's matrices at theta; at a stack of parameter vectors (R, q), stacks of matrices (R, ...)
        (the implied moments and latent covariances of :class:`ModelMatrices` then have the leading axis too)."""
        size, take, at, pieces = self._layouts[group]
        if theta.ndim == 2:
            buffer = np.zeros((len(theta), size))
            buffer[:, at] = (self._offset[group] + theta @ self._J[group].T)[:, take]
            return ModelMatrices(*[buffer[:, a:b].reshape((len(theta), *shape)) for a, b, shape in pieces])
        copied = self._copies[group]
        if copied is not None and math.isfinite(theta.sum()):  # fixed values with the parameters copied in (a NaN
            # or infinite parameter spreads through J theta to every entry: the general path keeps that)
            fixed, where, which = copied
            buffer = fixed.copy()
            buffer[where] = theta[which]
        else:
            buffer = np.zeros(size)
            buffer[at] = (self._offset[group] + self._J[group] @ theta)[take]
        mats = ModelMatrices(*[buffer[a:b].reshape(shape) for a, b, shape in pieces])
        if not self.higher_order:  # B has no entry in the table: known without looking at it
            mats.__dict__["has_paths"] = False  # where the cached property keeps its value
        return mats

    def thresholds(self, theta: np.ndarray, group: int = 0) -> np.ndarray:
        """Thresholds of the ordinal items (matrix K), stacked item by item."""
        sel = self._codes[group] == 6
        out = np.empty(int(sel.sum()))
        out[self._rows[group][sel]] = self._offset[group][sel] + self._J[group][sel] @ theta
        return out

    def threshold_jacobian(self, group: int = 0) -> np.ndarray:
        """d thresholds / d theta, shape (q, number of thresholds); constant in theta."""
        sel = np.flatnonzero(self._codes[group] == 6)
        out = np.empty((self._J[group].shape[1], len(sel)))
        out[:, self._rows[group][sel]] = self._J[group][sel].T
        return out

    def implied(self, theta: np.ndarray, group: int = 0) -> np.ndarray:
        return self.matrices(theta, group).implied_covariance()

    # -- derivatives
    def jacobian(self, theta: np.ndarray, group: int = 0) -> tuple[np.ndarray, np.ndarray]:
        """(d Sigma / d theta of shape (q, p, p), d mu / d theta of shape (q, p)) for one group."""
        mats = self.matrices(theta, group)
        d_sigma, d_mu = entry_derivatives(mats, self._codes[group], self._rows[group], self._cols[group])
        Jt = self._J[group].T
        return np.tensordot(Jt, d_sigma, axes=1), Jt @ d_mu


def entry_derivatives(mats: ModelMatrices, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """d Sigma and d mu with respect to each listed matrix entry: shapes (E, p, p) and (E, p).

    Works for entries that are not parameters of the model too, which is what
    modification indices need.
    """
    p = mats.L.shape[0]
    A = mats.A
    G = mats.L @ A
    C = A @ mats.P @ G.T  # m x p
    a = A @ mats.M
    E = len(codes)
    out = np.zeros((E, p, p))
    d_mu = np.zeros((E, p))
    idx = np.arange(E)
    for code in (0, 1):  # L and B: u c_j' + c_j u'
        sel = codes == code
        if not sel.any():
            continue
        e = idx[sel]
        cj = C[cols[sel]]  # (k, p)
        if code == 0:
            out[e, rows[sel], :] += cj
            out[e, :, rows[sel]] += cj
            d_mu[e, rows[sel]] += a[cols[sel]]
        else:
            u = G[:, rows[sel]].T  # (k, p)
            outer = u[:, :, None] * cj[:, None, :]
            out[e] += outer + outer.transpose(0, 2, 1)
            d_mu[e] += u * a[cols[sel]][:, None]
    sel = codes == 2
    if sel.any():
        e = idx[sel]
        gi, gj = G[:, rows[sel]].T, G[:, cols[sel]].T
        outer = gi[:, :, None] * gj[:, None, :]
        off = (rows[sel] != cols[sel])[:, None, None]
        out[e] += outer + np.where(off, outer.transpose(0, 2, 1), 0.0)
    sel = codes == 3
    if sel.any():
        e = idx[sel]
        out[e, rows[sel], cols[sel]] += 1.0
        off = rows[sel] != cols[sel]
        out[e[off], cols[sel][off], rows[sel][off]] += 1.0
    sel = codes == 4
    if sel.any():
        d_mu[idx[sel], rows[sel]] = 1.0
    sel = codes == 5
    if sel.any():
        d_mu[idx[sel]] = G[:, rows[sel]].T
    return out, d_mu
