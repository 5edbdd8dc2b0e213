"""Score tests: modification indices for fixed-at-zero parameters, and for
equality constraints across groups.

For a parameter gamma not free in the model, with d = dF/dgamma at the
estimates and H the expected second derivatives of F,

    MI = (N/2) d^2 / h,   h = H_gg - H_gt H_tt^-1 H_tg          (Sorbom 1989)

and the expected parameter change is EPC = -d / h (Saris, Satorra & Sorbom
1987), shown also fully standardized.  Candidates: cross-loadings, residual
covariances between indicators, factor covariances fixed at zero, and (for
invariance) each group's copy of a parameter held equal across groups; for
the latter, gamma is a deviation of that group's value from the common one
(the univariate score test of an equality constraint; Sorbom 1989).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.assessment.standardized import standardize_entries
from cfa_tool.estimation.linalg import scaled_solve
from cfa_tool.estimation.ml import information_diagonal
from cfa_tool.model.implied import StructuredModel, entry_derivatives
from cfa_tool.model.parameters import MATRIX_CODES, ParameterTable


@dataclass(frozen=True)
class ModificationIndex:
    kind: str
    variables: tuple[str, ...]
    index: float
    expected_change: float
    standardized_expected_change: float
    group: str | None = None

    def to_dict(self) -> dict:
        return {
            "kind": self.kind,
            "variables": list(self.variables),
            "group": self.group,
            "index": self.index,
            "expected_change": self.expected_change,
            "standardized_expected_change": self.standardized_expected_change,
        }


Candidate = tuple[str, tuple[str, ...], str, int, int]  # kind, variables, matrix, row, col
CHUNK = 256  # candidates whose derivatives are held in memory at once


def candidate_entries(table: ParameterTable, exogenous: tuple[str, ...], group: int = 0) -> list[Candidate]:
    """Every zero parameter of one group that could be freed."""
    own = [p for p in table.parameters if p.group == group]
    present = {(p.matrix, p.row, p.col) for p in own if p.free or p.offset != 0.0}
    out: list[Candidate] = []
    lat, obs = table.latent, table.observed
    below = {p.variables[1] for p in own if p.matrix == "B"}
    first_order = [j for j, f in enumerate(lat) if any(p.matrix == "L" and p.col == j for p in own)]
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


def constrained_entries(table: ParameterTable, kinds: tuple[str, ...], group: int) -> list[Candidate]:
    """Entries of one group whose free parameter is shared with another group."""
    groups_of_index: dict[int, set[int]] = {}
    for par in table.parameters:
        if len(par.terms) == 1:
            groups_of_index.setdefault(par.terms[0][0], set()).add(par.group)
    return [
        (par.kind, par.variables, par.matrix, par.row, par.col)
        for par in table.parameters
        if par.group == group and par.kind in kinds and len(par.terms) == 1 and len(groups_of_index[par.terms[0][0]]) > 1
    ]


def score_tests(model: StructuredModel, theta: np.ndarray, likelihood, candidates: list[list[Candidate]]) -> list[ModificationIndex]:
    """MI and EPC for each group's candidate entries (``candidates[g]``)."""
    table = model.table
    q = len(theta)
    H_tt = np.zeros((q, q))
    parts = []
    for g, weight in enumerate(likelihood.weights):
        mats = model.matrices(theta, g)
        group = likelihood.group_parts(theta, g)
        t_sigma, t_mu = model.jacobian(theta, g)
        H_tt += weight * group.information(t_sigma, t_mu)
        cands = candidates[g]
        if not cands:
            continue
        codes = np.array([MATRIX_CODES[c[2]] for c in cands])
        rows = np.array([c[3] for c in cands])
        cols = np.array([c[4] for c in cands])
        fast = _rank_two_blocks(group, mats, t_sigma, codes, rows, cols) if not likelihood.means else None
        if fast is not None:
            d_all, H_all, h_all = fast
            parts.append((g, cands, codes, rows, cols, mats, weight * d_all, weight * H_all, weight * h_all))
            continue
        H_ct, h_cc, d = [], [], []
        for start in range(0, len(cands), CHUNK):  # bounded memory for models with thousands of candidates
            sl = slice(start, start + CHUNK)
            c_sigma, c_mu = entry_derivatives(mats, codes[sl], rows[sl], cols[sl])
            H_ct.append(group.information(c_sigma, c_mu, t_sigma, t_mu))
            h_cc.append(information_diagonal(group, c_sigma, c_mu))
            d.append(group.gradient(c_sigma, c_mu))
        parts.append((g, cands, codes, rows, cols, mats, weight * np.concatenate(d), weight * np.vstack(H_ct),
                      weight * np.concatenate(h_cc)))
    out: list[ModificationIndex] = []
    n = likelihood.n_total
    for g, cands, codes, rows, cols, mats, d, H_ct, h_cc in parts:
        h = h_cc - np.einsum("ij,ij->i", H_ct, scaled_solve(H_tt, H_ct.T).T)
        ok = h > 1e-10 * np.maximum(h_cc, 1e-300)
        mi = np.where(ok, 0.5 * n * d**2 / np.where(ok, h, 1.0), np.nan)
        epc = np.where(ok, -d / np.where(ok, h, 1.0), np.nan)
        std_epc, _ = standardize_entries(mats, codes, rows, cols, epc)
        label = table.groups[g] if table.multigroup else None
        out.extend(
            ModificationIndex(kind, variables, float(mi[k]), float(epc[k]), float(std_epc[k]), label)
            for k, (kind, variables, *_rest) in enumerate(cands)
            if ok[k]
        )
    out.sort(key=lambda r: -r.index)
    return out


def _rank_two_blocks(parts, mats, t_sigma: np.ndarray, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray):
    """Gradient, cross-information and own information of candidates without forming their derivatives.

    Every candidate here (a cross-loading L_ij, a residual covariance T_ij, a factor covariance
    P_ij) changes Sigma by a b' + b a' for vectors a, b (e_i and c_j; e_i and e_j; g_i and g_j),
    so with S = Sigma^-1 and K_t = S D_t S:  d = 2 a'M b,  H_ct = 2 a'K_t b,
    h = 2 ((a'S a)(b'S b) + (a'S b)^2).  Only for complete data without a mean structure
    (None otherwise, and for other candidate kinds)."""
    if not hasattr(parts, "sigma_inv") or np.any((codes == 1) | (codes > 3)):
        return None
    S, M = parts.sigma_inv, parts.M
    G = mats.L @ mats.A
    C = mats.A @ mats.P @ G.T  # (m, p): c_j = C[j]
    K = S @ t_sigma @ S  # (q, p, p)
    E = len(codes)
    q = len(t_sigma)
    d = np.empty(E)
    H = np.empty((E, q))
    h = np.empty(E)
    sel = codes == 0  # L_ij: a = e_i, b = c_j
    if sel.any():
        i, j = rows[sel], cols[sel]
        KC = K @ C.T  # (q, p, m)
        H[sel] = 2.0 * KC[:, i, j].T
        SC = C @ S  # (m, p)
        d[sel] = 2.0 * (M @ C.T)[i, j]
        h[sel] = 2.0 * (S[i, i] * np.einsum("jp,jp->j", SC, C)[j] + SC[j, i] ** 2)
    sel = codes == 3  # T_ij: a = e_i, b = e_j
    if sel.any():
        i, j = rows[sel], cols[sel]
        H[sel] = 2.0 * K[:, i, j].T
        d[sel] = 2.0 * M[i, j]
        h[sel] = 2.0 * (S[i, i] * S[j, j] + S[i, j] ** 2)
    sel = codes == 2  # P_ij: a = g_i, b = g_j
    if sel.any():
        i, j = rows[sel], cols[sel]
        GKG = G.T @ K @ G  # (q, m, m)
        H[sel] = 2.0 * GKG[:, i, j].T
        SG = S @ G
        GSG = G.T @ SG
        d[sel] = 2.0 * (G.T @ M @ G)[i, j]
        h[sel] = 2.0 * (GSG[i, i] * GSG[j, j] + GSG[i, j] ** 2)
    return d, H, h


def modification_indices(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood,
                         exogenous: tuple[str, ...]) -> list[ModificationIndex]:
    table = model.table
    return score_tests(model, theta, likelihood, [candidate_entries(table, exogenous, g) for g in range(table.n_groups)])


def equality_score_tests(model: StructuredModel, theta: np.ndarray, likelihood: NormalLikelihood,
                         kinds: tuple[str, ...]) -> list[ModificationIndex]:
    """Score tests for releasing each cross-group equality of the given kinds, per group."""
    table = model.table
    return score_tests(model, theta, likelihood, [constrained_entries(table, kinds, g) for g in range(table.n_groups)])
