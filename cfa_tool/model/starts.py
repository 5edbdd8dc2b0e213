"""Starting values from the sample covariance matrix.

Each factor's standardized loadings are taken from the first principal axis of
its indicators' correlation matrix (a one-factor principal-axis solution,
Harman 1976, ch. 8), signs included: reverse-keyed items start with a loading
of the opposite sign.  The axis is turned so that the factor points the way its
scale says: the marker's loading gets the sign of its fixed value (a reverse-keyed
marker makes the other items' loadings negative), effects coding makes the
keyed loadings' sum positive, and a factor with a fixed variance follows the majority
of its items, counted with their keys (an item a 'reversed' statement declares counts
against the factor).  Residual variances follow as ``s_ii (1 - l_i^2)``.  Factor
correlations are least-squares estimates from the cross-correlations of the two
blocks, phi_ab = l_a' R_ab l_b / (l_a'l_a l_b'l_b), which is the population value
when R_ab = l_a phi_ab l_b' (a Spearman-style correction for attenuation), shrunk
towards zero if needed so that they form a positive-definite matrix.  A higher-order
factor's paths take their signs from the first principal axis of the correlations
of the factors below it.  The variance of a factor below a higher-order factor is
its disturbance, the part the factor above does not explain: its total variance is
that disturbance plus what the factor above explains, which the start takes as half
the total when the disturbance is free and as the rest of the total when it is fixed
(all of it at 0, the factor then being a multiple of the one above; Bollen 1989,
ch. 8, for the total variance of a factor, B Phi B' + Psi).  Targets for every matrix entry are then mapped to theta by
least squares, which respects equality constraints and effects coding.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.model.parameters import ParameterTable
from cfa_tool.numerics import linalg


@dataclass(frozen=True)
class FactorBlock:
    """k factors with n indicators each, whose one-factor solutions are found as one stack."""

    factors: np.ndarray  # (k,)
    items: np.ndarray  # (k, n)
    share: np.ndarray  # (k, n): sqrt of each item's number of factors
    # how each factor's variance is set: 0 fixed at ``value``, 1 by the marker at ``position`` with loading
    # ``value``, 2 from the mean loading
    rule: np.ndarray
    position: np.ndarray
    value: np.ndarray
    marker: tuple[np.ndarray, np.ndarray]  # (row, position) of each factor's marker in the stack
    keys: np.ndarray  # (k, n): -1 for an item a 'reversed' statement declares, +1 otherwise
    markers_only: bool  # every factor of the block is scaled by a marker (the usual case)


@dataclass(frozen=True)
class StartPlan:
    """What the start finder reads from a parameter table, laid out once per table (positions are
    indices into ``table.parameters``, ``table.observed`` and ``table.latent``)."""

    blocks: tuple[FactorBlock, ...]  # the factors with indicators, by number of indicators
    # higher-order factors, lowest level first: (factor, the factors it loads on, (rule, position, value)) with
    # the rules of FactorBlock, the marker's position being the lower factor itself
    higher: tuple[tuple[int, tuple[int, ...], tuple[int, int, float]], ...]
    endogenous: np.ndarray  # bool per factor: loads on a higher-order factor
    disturbance: np.ndarray  # per factor: the fixed value of its disturbance variance (NaN: free, or no disturbance)
    has_factor: np.ndarray  # bool per item: has a loading
    pairs_with_items: np.ndarray | None  # per factor covariance: both factors have items (None: all do)
    loads: tuple[np.ndarray, np.ndarray, np.ndarray]  # (entries, factor, item) of indicator loadings
    paths: tuple[np.ndarray, np.ndarray, np.ndarray]  # (entries, higher factor, lower factor)
    variances: tuple[np.ndarray, np.ndarray]  # (entries, factor)
    covariances: tuple[np.ndarray, np.ndarray, np.ndarray]  # (entries, factor a, factor b)
    residuals: tuple[np.ndarray, np.ndarray]  # (entries, item)
    intercepts: tuple[np.ndarray, np.ndarray]
    thresholds: tuple[np.ndarray, np.ndarray]  # (entries, position among the stacked thresholds)
    solve: np.ndarray  # (q, E): least-squares map from entry targets to theta
    given: np.ndarray  # parameters with start values from the model
    bounded: bool  # some parameter has a bound


def start_plan(table: ParameterTable) -> StartPlan:
    """Read the table's structure once (see :class:`StartPlan`)."""
    lat_ix = {n: i for i, n in enumerate(table.latent)}
    obs_ix = {n: i for i, n in enumerate(table.observed)}
    m, p = len(table.latent), len(table.observed)
    items: dict[int, list[int]] = {f: [] for f in range(m)}
    lower: dict[int, list[int]] = {f: [] for f in range(m)}
    fixed_var: dict[int, float] = {}
    # factor -> (item or lower factor, fixed loading), for the loadings on items ("L") and on factors ("B")
    fixed_load: dict[str, dict[int, tuple[int, float]]] = {"L": {}, "B": {}}
    endogenous = np.zeros(m, dtype=bool)
    recipes: dict[str, list[tuple]] = {k: [] for k in ("L", "B", "var", "cov", "res", "int", "thr")}
    for e, par in enumerate(table.parameters):
        kind = par.kind
        if kind == "loading":
            f, x = par.variables
            if par.matrix == "B":
                endogenous[lat_ix[x]] = True
                target = lower[lat_ix[f]]
                recipes["B"].append((e, lat_ix[f], lat_ix[x]))
            else:
                target = items[lat_ix[f]]
                recipes["L"].append((e, lat_ix[f], obs_ix[x]))
            k = lat_ix[x] if par.matrix == "B" else obs_ix[x]
            if k not in target:  # several groups repeat each entry
                target.append(k)
            if not par.free and par.offset != 0.0 and lat_ix[f] not in fixed_load[par.matrix]:
                fixed_load[par.matrix][lat_ix[f]] = (k, par.offset)
        elif kind == "factor_variance":
            recipes["var"].append((e, lat_ix[par.variables[0]]))
            if not par.free:
                fixed_var[lat_ix[par.variables[0]]] = par.offset
        elif kind == "factor_covariance":
            recipes["cov"].append((e, lat_ix[par.variables[0]], lat_ix[par.variables[1]]))
        elif kind == "residual_variance":
            recipes["res"].append((e, obs_ix[par.variables[0]]))
        elif kind == "intercept":
            recipes["int"].append((e, obs_ix[par.variables[0]]))
        elif kind == "threshold":
            recipes["thr"].append((e, par.row))
        # residual covariances and factor means start at zero

    n_factors = np.zeros(p)
    for ix in items.values():
        n_factors[ix] += 1
    # the variance fixed for a factor below a higher-order factor is its disturbance, not its total variance
    disturbance = np.array([fixed_var[f] if endogenous[f] and f in fixed_var else np.nan for f in range(m)])

    def rule_of(f: int, matrix: str) -> tuple[int, int, float]:
        """How the start sets factor f's total variance from its items (``matrix`` "L"; the marker's position
        among them) or the factors below it ("B"; the marker's position is the lower factor itself): a fixed
        variance of a factor below no other is its total; otherwise a fixed loading (its own marker); otherwise
        a fixed disturbance d > 0 (the factor above explaining as much again, a total of 2d); otherwise the mean
        loading (a disturbance fixed at 0 sets no scale: the factor is then a multiple of the one above)."""
        if f in fixed_var and not endogenous[f]:
            return (0, 0, fixed_var[f])
        if f in fixed_load[matrix]:
            k, value = fixed_load[matrix][f]
            return (1, items[f].index(k) if matrix == "L" else k, value)
        if f in fixed_var and fixed_var[f] > 0.0:
            return (0, 0, 2.0 * fixed_var[f])
        return (2, 0, 1.0)

    rules = {f: rule_of(f, "L") for f, ix in items.items() if ix}
    blocks = []
    for n in sorted({len(ix) for ix in items.values() if ix}):
        fs = [f for f, ix in items.items() if len(ix) == n]
        ix = np.array([items[f] for f in fs])
        rule, position, value = (np.array(v) for v in zip(*(rules[f] for f in fs)))
        keys = np.array([[-1.0 if (table.latent[f], table.observed[i]) in table.reverse_keyed else 1.0
                          for i in items[f]] for f in fs]).reshape(ix.shape)
        blocks.append(FactorBlock(np.array(fs), ix, np.sqrt(n_factors[ix]), rule, position, value,
                                  (np.arange(len(fs)), position), keys, bool((rule == 1).all())))
    known = {f for f, ix in items.items() if ix}
    pending = [f for f in range(m) if lower[f]]
    higher = []
    for _ in range(len(pending) + 1):
        for g in list(pending):
            if not all(h in known for h in lower[g]):
                continue
            higher.append((g, tuple(lower[g]), rule_of(g, "B")))
            known.add(g)
            pending.remove(g)

    def columns(key: str, width: int) -> tuple[np.ndarray, ...]:
        rows = np.array(recipes[key], dtype=int).reshape(-1, width)
        return tuple(rows[:, k] for k in range(width))

    J, _ = table.mapping()
    try:
        solve = linalg.solve(J.T @ J, J.T)  # J'J is nearly diagonal here
    except np.linalg.LinAlgError:
        solve = np.linalg.pinv(J)
    has_items = np.array([bool(items[f]) for f in range(m)])
    covariances = columns("cov", 3)
    with_items = has_items[covariances[1]] & has_items[covariances[2]]
    return StartPlan(tuple(blocks), tuple(higher), endogenous, disturbance, n_factors > 0, None if with_items.all() else with_items,
                     columns("L", 3), columns("B", 3), columns("var", 2), covariances, columns("res", 2),
                     columns("int", 2), columns("thr", 2), solve, np.flatnonzero(~np.isnan(table.start)),
                     bool(np.isfinite(table.lower).any() or np.isfinite(table.upper).any()))


def starting_values(table: ParameterTable, S: np.ndarray, means: np.ndarray | None = None,
                    thresholds: np.ndarray | None = None) -> np.ndarray:
    """Start values for theta from a (pooled) covariance matrix, mean vector and (ordinal items) thresholds."""
    plan = table.derived("start plan", start_plan)
    m = len(table.latent)
    sd = np.sqrt(np.maximum(S.diagonal(), 1e-12))  # (np.clip costs several times more at this size)
    R = S / np.outer(sd, sd)
    std_loading = np.zeros((m, len(sd)))
    total_var = np.full(m, np.nan)
    for b in plan.blocks:
        ix = b.items
        l_std = _principal_axes(R[ix[:, :, None], ix[:, None, :]]) if ix.shape[1] > 1 else np.full(ix.shape, 0.9)
        if b.markers_only:  # turn each axis so that the marker's loading has the sign of its fixed value
            l_std *= np.sign(l_std[b.marker] * b.value)[:, None]
        else:
            l_std *= _orientation(l_std, l_std * sd[ix], b.rule, b.position, b.value, b.keys)[:, None]
        # an item that loads on several factors shares its common variance among them
        std = l_std / b.share
        std_loading[b.factors[:, None], ix] = std
        raw = std * sd[ix]
        if b.markers_only:
            total_var[b.factors] = (raw[b.marker] / b.value) ** 2
        else:
            marker = raw[b.marker] / np.where(b.rule == 1, b.value, 1.0)
            # effects coding: the loadings average 1 (kept away from zero when the items' keys nearly cancel)
            mean_raw = np.maximum(raw.mean(axis=1) ** 2, 0.01 * (raw**2).mean(axis=1))
            total_var[b.factors] = np.where(b.rule == 0, b.value, np.where(b.rule == 1, marker**2, mean_raw))
    # each factor as a weighted sum of its items, weights l / l'l: then w_a' R w_b estimates the correlation
    # of two factors with distinct items
    weights = std_loading / np.maximum((std_loading**2).sum(axis=1), 1e-12)[:, None]
    path_sign = None
    if plan.higher:
        path_sign = np.ones((m, m))
        for g, lower, (rule, position, value) in plan.higher:
            low = list(lower)
            explained = _explained(total_var[low], plan.disturbance[low])
            if rule == 0:
                total_var[g] = value
            elif rule == 1:
                total_var[g] = explained[low.index(position)] / value**2
            else:
                total_var[g] = explained.mean()
            signs = np.ones(len(low))
            if len(low) > 1:
                C = weights[low] @ R @ weights[low].T
                d = np.sqrt(np.maximum(np.diag(C), 1e-12))
                axis = _principal_axes((C / np.outer(d, d))[None])
                signs = np.sign(axis[0] * _orientation(axis, axis, np.array([rule]),
                                                       np.array([low.index(position) if rule == 1 else 0]),
                                                       np.array([value]))[0])
            path_sign[g, low] = signs
            weights[g] = (signs[:, None] * weights[low]).mean(axis=0)  # for the signs of the level above
    total_var = np.where(np.isnan(total_var), 1.0, total_var)

    target = np.zeros(len(table.parameters))
    e, f, x = plan.loads
    target[e] = std_loading[f, x] * sd[x] / np.sqrt(total_var[f])
    e, f = plan.variances
    if plan.higher:  # a lower factor's variance parameter is its disturbance: its total less what is explained
        explained = np.where(plan.endogenous, _explained(total_var, plan.disturbance), 0.0)
        target[e] = total_var[f] - explained[f]
        e, f, x = plan.paths
        target[e] = path_sign[f, x] * np.sqrt(explained[x] / total_var[f])
    else:
        target[e] = total_var[f]
    e, a, b = plan.covariances
    if len(e):
        r = np.minimum(np.maximum((weights @ R @ weights.T)[a, b], -0.9), 0.9)
        if plan.pairs_with_items is not None:  # factors reached only through others (higher-order) start uncorrelated
            r = np.where(plan.pairs_with_items, r, 0.0)
        r = _positive_definite(r, a, b, m)
        target[e] = r * np.sqrt(total_var[a] * total_var[b])
    e, x = plan.residuals
    explained = np.minimum((std_loading**2).sum(axis=0), 0.9)
    target[e] = S[x, x] * (1.0 - np.where(plan.has_factor[x], explained[x], 0.5))
    if means is not None and len(plan.intercepts[0]):
        e, x = plan.intercepts
        target[e] = means[x]
    if thresholds is not None:
        e, k = plan.thresholds
        target[e] = thresholds[k]

    theta = plan.solve @ (target - table.mapping()[1])
    if len(plan.given):
        theta[plan.given] = table.start[plan.given]
    return np.minimum(np.maximum(theta, table.lower), table.upper) if plan.bounded else theta


def _explained(total: np.ndarray, disturbance: np.ndarray) -> np.ndarray:
    """The start's part of each lower factor's total variance that the factor above explains: half, or what a
    fixed disturbance variance leaves (all of it when the disturbance is fixed at 0; at least a tenth when the
    fixed disturbance leaves less)."""
    return np.where(np.isnan(disturbance), 0.5 * total, np.maximum(total - np.nan_to_num(disturbance), 0.1 * total))


def _orientation(loadings: np.ndarray, raw: np.ndarray, rule: np.ndarray, position: np.ndarray,
                 value: np.ndarray, keys: np.ndarray | None = None) -> np.ndarray:
    """+1 or -1 per row of a stack of one-factor solutions (k, n): the direction in which each factor
    points.  A marker (rule 1) keeps the sign of its fixed loading; effects coding (rule 2) needs a
    positive sum of the unstandardized loadings ``raw``; otherwise the majority of the items
    (ties broken by the sum of the loadings) loads positively.  ``keys`` (k, n): -1 for an item a
    'reversed' statement declares, whose loading then counts with its sign turned in the sum and the
    majority, so that the factor points the way the statement says."""
    rows = np.arange(len(loadings))
    marker_sign = np.sign(loadings[rows, position])
    if keys is not None:
        loadings, raw = loadings * keys, raw * keys
    majority = np.sign(np.sign(loadings).sum(axis=1) + 0.5 * np.sign(loadings.sum(axis=1)))
    toward = np.where(rule == 1, marker_sign * np.sign(value),
                      np.where(rule == 2, np.sign(raw.sum(axis=1)), majority))
    return np.where(toward == 0, 1.0, toward)


def _positive_definite(r: np.ndarray, a: np.ndarray, b: np.ndarray, m: int) -> np.ndarray:
    """Factor correlations r (of the pairs a, b) shrunk towards zero as far as needed for their matrix to
    have its smallest eigenvalue at least 0.02.  No eigenvalue of a matrix with unit diagonal lies further
    from 1 than the largest sum of a row's other entries in absolute value (Gershgorin 1931), so when
    those sums stay below 0.98 no eigenvalue is needed (summed in Python: a few pairs cost less so than
    numpy calls)."""
    sums = [0.0] * m
    for value, i, j in zip(np.abs(r).tolist(), a.tolist(), b.tolist()):
        sums[i] += value
        sums[j] += value
    if max(sums) < 0.98:
        return r
    C = np.eye(m)
    C[a, b] = C[b, a] = r
    smallest = float(linalg.symmetric_eigenvalues(C)[0])
    return r if smallest >= 0.02 else r * (0.98 / (1.0 - smallest))


def _principal_axes(R: np.ndarray) -> np.ndarray:
    """One-factor principal-axis loadings of a stack of correlation matrices (k, n, n), with squared
    multiple correlations as communalities; shape (k, n).  Signs are kept (an item that correlates
    negatively with the others gets a negative loading); each axis points the way of the sum of its
    eigenvector, and magnitudes are held between 0.2 and 0.95."""
    reduced = R.copy()
    try:
        smc = 1.0 - 1.0 / np.diagonal(linalg.inverse(R), axis1=1, axis2=2)
    except np.linalg.LinAlgError:
        smc = np.full(R.shape[:2], 0.5)
    n = R.shape[1]
    reduced[:, np.arange(n), np.arange(n)] = np.minimum(np.maximum(smc, 0.05), 0.95)
    vals, vecs = linalg.symmetric_eigen(reduced)
    v = vecs[:, :, -1]
    sign = np.sign(v.sum(axis=1))
    v = v * np.where(sign == 0, 1.0, sign)[:, None]
    loadings = v * np.sqrt(np.maximum(vals[:, -1], 0.05))[:, None]
    return np.copysign(np.minimum(np.maximum(np.abs(loadings), 0.2), 0.95), loadings)
