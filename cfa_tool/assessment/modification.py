"""Modification indices and expected parameter changes for fixed-at-zero parameters.

For a parameter gamma fixed at zero, with d = dF/dgamma at the estimates and
H the expected second derivatives of F, the score (Lagrange multiplier) test is

    MI = (N/2) d^2 / h,   h = H_gg - H_gt H_tt^-1 H_tg          (Sorbom 1989)

and the expected parameter change is EPC = -d / h (Saris, Satorra & Sorbom
1987), shown also fully standardized.  Candidates: cross-loadings,
residual covariances between indicators, and factor covariances fixed at zero.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.linalg import cho_factor, cho_solve

from cfa_tool.assessment.standardized import standardize_entries
from cfa_tool.estimation.linalg import scaled_solve
from cfa_tool.estimation.ml import whiten
from cfa_tool.model.implied import StructuredModel, entry_derivatives
from cfa_tool.model.parameters import MATRIX_CODES, ParameterTable


@dataclass(frozen=True)
class ModificationIndex:
    kind: str
    variables: tuple[str, ...]
    index: float
    expected_change: float
    standardized_expected_change: float

    def to_dict(self) -> dict:
        return {
            "kind": self.kind,
            "variables": list(self.variables),
            "index": self.index,
            "expected_change": self.expected_change,
            "standardized_expected_change": self.standardized_expected_change,
        }


def candidate_entries(table: ParameterTable, exogenous: tuple[str, ...]) -> list[tuple[str, tuple[str, ...], str, int, int]]:
    """(kind, variables, matrix, row, col) of every zero parameter that could be freed."""
    present = {(p.matrix, p.row, p.col) for p in table.parameters if p.free or p.offset != 0.0}
    out = []
    lat, obs = table.latent, table.observed
    below = {p.variables[1] for p in table.parameters if p.matrix == "B"}
    first_order = [j for j, f in enumerate(lat) if any(p.matrix == "L" and p.col == j for p in table.parameters)]
    for i, x in enumerate(obs):
        for j in first_order:
            if ("L", i, j) not in present:
                out.append(("loading", (lat[j], x), "L", i, j))
    for i in range(len(obs)):
        for j in range(i):
            if ("T", i, j) not in present:
                out.append(("residual_covariance", (obs[j], obs[i]), "T", i, j))
    exo = set(exogenous)
    for i in range(len(lat)):
        for j in range(i):
            same_level = (lat[i] in exo and lat[j] in exo) or (lat[i] in below and lat[j] in below)
            if same_level and ("P", i, j) not in present:
                out.append(("factor_covariance", (lat[j], lat[i]), "P", i, j))
    return out


def modification_indices(model: StructuredModel, theta: np.ndarray, S: np.ndarray, n_obs: int,
                         exogenous: tuple[str, ...]) -> list[ModificationIndex]:
    table = model.table
    candidates = candidate_entries(table, exogenous)
    if not candidates:
        return []
    mats = model.matrices(theta)
    sigma = mats.implied_covariance()
    chol, _ = cho_factor(sigma, lower=True)
    sigma_inv = cho_solve((chol, True), np.eye(len(sigma)))
    M = sigma_inv @ (sigma - S) @ sigma_inv
    codes = np.array([MATRIX_CODES[c[2]] for c in candidates])
    rows = np.array([c[3] for c in candidates])
    cols = np.array([c[4] for c in candidates])
    d_cand = entry_derivatives(mats, codes, rows, cols)
    d_free = model.jacobian(theta)
    X_c = whiten(chol, d_cand)
    X_t = whiten(chol, d_free)
    H_tt = X_t @ X_t.T
    H_ct = X_c @ X_t.T
    h_cc = np.einsum("ij,ij->i", X_c, X_c)
    d = d_cand.reshape(len(candidates), -1) @ M.ravel()
    h = h_cc - np.einsum("ij,ij->i", H_ct, scaled_solve(H_tt, H_ct.T).T)
    ok = h > 1e-10 * np.maximum(h_cc, 1e-300)
    mi = np.where(ok, 0.5 * n_obs * d**2 / np.where(ok, h, 1.0), np.nan)
    epc = np.where(ok, -d / np.where(ok, h, 1.0), np.nan)
    std_epc, _ = standardize_entries(mats, codes, rows, cols, epc)
    out = [
        ModificationIndex(kind, variables, float(mi[k]), float(epc[k]), float(std_epc[k]))
        for k, (kind, variables, *_rest) in enumerate(candidates)
        if ok[k]
    ]
    out.sort(key=lambda r: -r.index)
    return out

