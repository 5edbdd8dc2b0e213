"""Equivalent scalings of one model, and the map between their estimates.

A factor's scale is arbitrary: rescaling a factor by d (eta -> eta / d) multiplies its
loadings by d, divides its variances by d^2, its covariances and mean by d, and paths
from it to a factor below by d over that factor's d, leaving the implied moments, and so
the discrepancy, unchanged (Bollen 1989, ch. 7; Little, Slegers & Card 2006 for effects
coding).  With D = diag(d):

    L' = L D,   B' = D^-1 B D,   P' = D^-1 P D^-1,   M' = D^-1 M;   T, N and thresholds unchanged,

so that L' (I - B')^-1 = L (I - B)^-1 D and every Sigma and mu is the same.  The marker,
variance and effects scalings of one model are therefore one minimum seen in three
parameterisations; the estimation uses this to restart a failed search with every
automatically scaled factor scaled by its variance, and to turn the answer back.
"""

from __future__ import annotations

from dataclasses import dataclass
from dataclasses import replace as dc_replace

import numpy as np

from cfa_tool.errors import Location
from cfa_tool.language.spec import ScaleSetting, Spec
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import ParameterTable
from cfa_tool.model.starts import start_plan

#: A marker's standardized loading below this (in the variance-scaled solution) cannot set its factor's scale.
DEGENERATE = 1e-3


def variance_scaled(spec: Spec, table: ParameterTable) -> Spec | None:
    """The same model with every factor that takes its scale from a marker or from effects coding scaled
    by its variance instead; None when no factor of ``table`` has such a scale.  Start values and the
    bounds of parameters that a rescaling changes (loadings, factor variances, covariances and means) are
    left out: they are written in the original scale."""
    if not table.scaled_by_loadings:
        return None
    observed = set(spec.observed_names)
    kept = []
    for bound in spec.bounds:
        refs = tuple(ref for ref in bound.refs if ref.kind == "intercept"
                     or (ref.kind in ("variance", "covariance") and ref.names[0] in observed))
        if refs:
            kept.append(dc_replace(bound, refs=refs))
    everywhere = ScaleSetting((), "variance", Location(spec.source, 1, 1))
    return dc_replace(spec, scaling=(everywhere,), starts=(), bounds=tuple(kept))


@dataclass(frozen=True)
class Unscalable:
    """Why a variance-scaled solution has no counterpart in the original scaling."""

    factor: str
    indicator: str | None  # the marker, or None for effects coding (loadings summing to about zero)
    group: str | None


def convert(table: ParameterTable, source: StructuredModel, theta: np.ndarray) -> np.ndarray | Unscalable:
    """theta of ``table`` equivalent to ``theta`` of the model ``source`` (the same model in another
    scaling, with the same entries in the same order), or the factor whose scale cannot be carried over."""
    codes, rows, cols = table.entry_arrays()
    groups = table.group_array()
    d = np.ones((table.n_groups, table.m))
    for g in range(table.n_groups):
        mats = source.matrices(theta, g)
        found = _factor_scales(table, g, mats)
        if isinstance(found, Unscalable):
            return found
        d[g] = found
    values = source.entry_values(theta)
    dr, dc = d[groups, np.minimum(rows, table.m - 1)], d[groups, np.minimum(cols, table.m - 1)]
    factor = np.select([codes == 0, codes == 1, codes == 2, codes == 5], [dc, dc / dr, 1.0 / (dr * dc), 1.0 / dr], 1.0)
    J, offset = table.mapping()
    return table.derived("start plan", start_plan).solve @ (values * factor - offset)


def same_entries(a: ParameterTable, b: ParameterTable) -> bool:
    """Whether two parameter tables lay out the same matrix entries in the same order."""
    return len(a.parameters) == len(b.parameters) and all(
        (p.matrix, p.row, p.col, p.group) == (q.matrix, q.row, q.col, q.group) for p, q in zip(a.parameters, b.parameters))


def _factor_scales(table: ParameterTable, g: int, mats) -> np.ndarray | Unscalable:
    """d per factor of group g such that the rescaled matrices meet ``table``'s scaling: a marker's fixed
    loading, a fixed variance, or effects coding's loadings averaging 1; factors scaled by the user's
    own fixes are the same in both tables (d = 1)."""
    m = table.m
    d = np.ones(m)
    label = table.groups[g] if table.multigroup else None
    sigma = mats.implied_covariance()
    phi = mats.latent_covariance()
    pending = []
    for par in table.parameters:
        if par.group != g or par.origin != "scale" or par.matrix not in ("L", "B", "P"):
            continue
        if par.matrix == "P":  # a fixed variance (of a factor, or the disturbance of one below a higher-order factor)
            d[par.col] = np.sqrt(max(mats.P[par.col, par.col], 1e-300) / par.offset)
        else:
            pending.append(par)
    # markers and effects coding, lower factors first (a path's conversion needs the lower factors' d)
    lower = {f: {q.row for q in table.parameters if q.group == g and q.matrix == "B" and q.col == f} for f in range(m)}
    unknown = {par.col for par in pending}
    while pending:
        ready = [par for par in pending if par.matrix == "L" or not (lower[par.col] & unknown)]
        if not ready:  # pragma: no cover - higher-order structures are checked to have no circles
            break
        for par in ready:
            f = par.col
            if par.free:  # effects coding: the loadings of f sum to their number
                column = mats.L[:, f] if par.matrix == "L" else mats.B[:, f] / d
                count = sum(1 for q in table.parameters
                            if q.group == g and q.matrix == par.matrix and q.col == f and q.kind == "loading")
                total = float(column.sum())
                if abs(total) < DEGENERATE * max(float(np.abs(column).sum()), 1e-300):
                    return Unscalable(table.latent[f], None, label)
                d[f] = count / total
            elif par.matrix == "L":
                x = par.row
                standardized = mats.L[x, f] * np.sqrt(max(phi[f, f], 0.0) / max(sigma[x, x], 1e-300))
                if abs(standardized) < DEGENERATE:
                    return Unscalable(table.latent[f], table.observed[x], label)
                d[f] = par.offset / mats.L[x, f]
            else:
                h = par.row
                standardized = mats.B[h, f] * np.sqrt(max(phi[f, f], 0.0) / max(phi[h, h], 1e-300))
                if abs(standardized) < DEGENERATE:
                    return Unscalable(table.latent[f], table.latent[h], label)
                d[f] = par.offset * d[h] / mats.B[h, f]
            unknown.discard(f)
        pending = [par for par in pending if par not in ready]
    return d
