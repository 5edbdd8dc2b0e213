"""Starting values from the sample covariance matrix.

Each factor's standardized loadings are taken from the first principal axis of
its indicators' correlation matrix; residual variances follow as
``s_ii (1 - l_i^2)``; factor correlations are the mean cross-correlation of
their indicators divided by the mean loadings (a Spearman-style correction
for attenuation).  Targets for every matrix entry are then mapped to theta by
least squares, which respects equality constraints and effects coding.
"""

from __future__ import annotations

import numpy as np

from cfa_tool.model.parameters import ParameterTable


def starting_values(table: ParameterTable, S: np.ndarray, means: np.ndarray | None = None,
                    thresholds: np.ndarray | None = None) -> np.ndarray:
    """Start values for theta from a (pooled) covariance matrix, mean vector and (ordinal items) thresholds."""
    lat_ix = {n: i for i, n in enumerate(table.latent)}
    obs_ix = {n: i for i, n in enumerate(table.observed)}
    sd = np.sqrt(np.clip(np.diag(S), 1e-12, None))
    R = S / np.outer(sd, sd)

    by_factor_obs: dict[str, list[str]] = {f: [] for f in table.latent}
    by_factor_lat: dict[str, list[str]] = {f: [] for f in table.latent}
    fixed_var: dict[str, float] = {}
    fixed_load: dict[str, tuple[str, float]] = {}
    endogenous: set[str] = set()
    for par in table.parameters:
        if par.kind == "loading":
            f, x = par.variables
            (by_factor_lat if par.matrix == "B" else by_factor_obs)[f].append(x)
            if par.matrix == "B":
                endogenous.add(x)
            if not par.free and par.offset != 0.0 and f not in fixed_load:
                fixed_load[f] = (x, par.offset)
        elif par.kind == "factor_variance" and not par.free:
            fixed_var[par.variables[0]] = par.offset

    std_loading: dict[tuple[str, str], float] = {}
    n_factors_of: dict[str, int] = {}
    for items in by_factor_obs.values():
        for x in items:
            n_factors_of[x] = n_factors_of.get(x, 0) + 1
    total_var: dict[str, float] = {}
    mean_std: dict[str, float] = {}
    for f, items in by_factor_obs.items():
        if not items:
            continue
        ix = [obs_ix[x] for x in items]
        if len(ix) == 1:
            l_std = np.array([0.9])
        else:
            l_std = _principal_axis(R[np.ix_(ix, ix)])
        for x, l in zip(items, l_std):
            # an item that loads on several factors shares its common variance among them
            std_loading[(f, x)] = float(l) / np.sqrt(n_factors_of[x])
        mean_std[f] = float(np.mean(l_std))
        raw = {x: std_loading[(f, x)] * sd[obs_ix[x]] for x in items}
        if f in fixed_var and f not in endogenous:
            total_var[f] = fixed_var[f]
        elif f in fixed_var:
            total_var[f] = 2.0 * fixed_var[f]
        elif f in fixed_load and fixed_load[f][0] in raw:
            x, c = fixed_load[f]
            total_var[f] = (raw[x] / c) ** 2
        else:
            total_var[f] = float(np.mean(list(raw.values()))) ** 2

    # higher-order factors, lowest level first
    pending = [f for f in table.latent if by_factor_lat[f]]
    for _ in range(len(pending) + 1):
        for g in list(pending):
            lower = by_factor_lat[g]
            if not all(h in total_var for h in lower):
                continue
            if g in fixed_var:
                total_var[g] = fixed_var[g]
            elif g in fixed_load and fixed_load[g][0] in total_var:
                h, c = fixed_load[g]
                total_var[g] = 0.5 * total_var[h] / c**2
            else:
                total_var[g] = 0.5 * float(np.mean([total_var[h] for h in lower]))
            mean_std[g] = float(np.sqrt(0.5))
            pending.remove(g)

    explained_of: dict[str, float] = {}  # each item's share of variance explained by its factors
    for (f, y), v in std_loading.items():
        explained_of[y] = explained_of.get(y, 0.0) + v * v
    target = np.zeros(len(table.parameters))
    for e, par in enumerate(table.parameters):
        if par.kind == "loading":
            f, x = par.variables
            vf = total_var.get(f, 1.0)
            if par.matrix == "L":
                target[e] = std_loading.get((f, x), 0.7) * sd[obs_ix[x]] / np.sqrt(vf)
            else:
                target[e] = np.sqrt(0.5 * total_var.get(x, 1.0) / vf)
        elif par.kind == "factor_variance":
            f = par.variables[0]
            target[e] = total_var.get(f, 1.0) * (0.5 if f in endogenous else 1.0)
        elif par.kind == "factor_covariance":
            a, b = par.variables
            target[e] = _factor_correlation(a, b, by_factor_obs, obs_ix, R, mean_std) * np.sqrt(
                total_var.get(a, 1.0) * total_var.get(b, 1.0)
            )
        elif par.kind == "residual_variance":
            x = par.variables[0]
            explained = min(explained_of[x], 0.9) if x in explained_of else 0.5
            target[e] = S[obs_ix[x], obs_ix[x]] * (1.0 - explained)
        elif par.kind == "intercept" and means is not None:
            target[e] = means[obs_ix[par.variables[0]]]
        elif par.kind == "threshold" and thresholds is not None:
            target[e] = thresholds[par.row]
        # residual covariances and factor means start at zero

    J, offset = table.mapping()
    theta = _least_squares(J, target - offset)
    given = ~np.isnan(table.start)
    theta[given] = table.start[given]
    return np.clip(theta, table.lower, table.upper)


def _least_squares(J: np.ndarray, y: np.ndarray) -> np.ndarray:
    """theta minimising |J theta - y|: by the normal equations (J'J is nearly diagonal here), else by SVD."""
    try:
        return np.linalg.solve(J.T @ J, J.T @ y)
    except np.linalg.LinAlgError:
        return np.linalg.lstsq(J, y, rcond=None)[0]


def _principal_axis(R: np.ndarray) -> np.ndarray:
    """One-factor principal-axis loadings, squared multiple correlations as communalities."""
    reduced = R.copy()
    try:
        smc = 1.0 - 1.0 / np.diag(np.linalg.inv(R))
    except np.linalg.LinAlgError:
        smc = np.full(len(R), 0.5)
    reduced[np.diag_indices_from(reduced)] = np.clip(smc, 0.05, 0.95)
    vals, vecs = np.linalg.eigh(reduced)
    v = vecs[:, -1] * (np.sign(vecs[:, -1].sum()) or 1.0)
    return np.clip(v * np.sqrt(max(vals[-1], 0.05)), 0.2, 0.95)


def _factor_correlation(a, b, by_factor_obs, obs_ix, R, mean_std) -> float:
    ia = [obs_ix[x] for x in by_factor_obs.get(a, [])]
    ib = [obs_ix[x] for x in by_factor_obs.get(b, [])]
    if not ia or not ib or a not in mean_std or b not in mean_std:
        return 0.0
    r = float(np.mean(R[np.ix_(ia, ib)])) / (mean_std[a] * mean_std[b])
    return float(np.clip(r, -0.9, 0.9))
