"""Implied covariance matrix and its analytic derivatives.

Sigma = G P G' + T with G = L A and A = (I - B)^-1 (see :mod:`parameters`).
The derivative of Sigma with respect to one matrix entry is a rank-two
update (Neudecker & Satorra 1991 give the general form):

* L[i, j]:  e_i c_j' + c_j e_i'            with c_j = (A P G')[j, :]
* B[i, j]:  g_i c_j' + c_j g_i'            with g_i = G[:, i]
* P[i, j]:  g_i g_j' + g_j g_i' (i != j),  g_i g_i' (i == j)
* T[i, j]:  E_ij + E_ji (i != j),          E_ii (i == j)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.model.parameters import ParameterTable


@dataclass(frozen=True)
class ModelMatrices:
    L: np.ndarray
    B: np.ndarray
    P: np.ndarray
    T: np.ndarray

    @property
    def A(self) -> np.ndarray:
        m = self.B.shape[0]
        if not self.B.any():
            return np.eye(m)
        return np.linalg.inv(np.eye(m) - self.B)

    def latent_covariance(self) -> np.ndarray:
        """Total (co)variances of the factors: A P A'."""
        A = self.A
        return A @ self.P @ A.T

    def implied_covariance(self) -> np.ndarray:
        G = self.L @ self.A
        return G @ self.P @ G.T + self.T


class StructuredModel:
    """Maps theta to model matrices, the implied covariance and its derivatives.

    Holds only precomputed index arrays; every method is a pure function of theta.
    """

    def __init__(self, table: ParameterTable):
        self.table = table
        self.p, self.m = table.p, table.m
        self.codes, self.rows, self.cols = table.entry_arrays()
        self.J, self.offset = table.mapping()

    # -- matrices
    def entry_values(self, theta: np.ndarray) -> np.ndarray:
        return self.offset + self.J @ theta

    def matrices(self, theta: np.ndarray) -> ModelMatrices:
        values = self.entry_values(theta)
        p, m = self.p, self.m
        mats = [np.zeros((p, m)), np.zeros((m, m)), np.zeros((m, m)), np.zeros((p, p))]
        for code in range(4):
            sel = self.codes == code
            mats[code][self.rows[sel], self.cols[sel]] = values[sel]
        for code in (2, 3):  # symmetric matrices stored as lower triangle
            sel = (self.codes == code) & (self.rows != self.cols)
            mats[code][self.cols[sel], self.rows[sel]] = values[sel]
        return ModelMatrices(*mats)

    def implied(self, theta: np.ndarray) -> np.ndarray:
        return self.matrices(theta).implied_covariance()

    # -- derivatives
    def jacobian(self, theta: np.ndarray) -> np.ndarray:
        """d Sigma / d theta as an array of shape (q, p, p)."""
        mats = self.matrices(theta)
        d_entries = entry_derivatives(mats, self.codes, self.rows, self.cols)
        return np.tensordot(self.J.T, d_entries, axes=1)


def entry_derivatives(mats: ModelMatrices, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray) -> np.ndarray:
    """d Sigma / d (matrix entry) for each listed entry, shape (E, p, p).

    Works for entries that are not parameters of the model too, which is what
    modification indices need.
    """
    p = mats.L.shape[0]
    A = mats.A
    G = mats.L @ A
    C = A @ mats.P @ G.T  # m x p
    out = np.zeros((len(codes), p, p))
    idx = np.arange(len(codes))
    # L and B: u c_j' + c_j u'
    for code in (0, 1):
        sel = codes == code
        if not sel.any():
            continue
        e = idx[sel]
        cj = C[cols[sel]]  # (k, p)
        if code == 0:
            out[e, rows[sel], :] += cj
            out[e, :, rows[sel]] += cj
        else:
            u = G[:, rows[sel]].T  # (k, p)
            outer = u[:, :, None] * cj[:, None, :]
            out[e] += outer + outer.transpose(0, 2, 1)
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
    return out
