"""Spec + observed-variable order -> parameter table.

Matrices (the "all-latent" form of a confirmatory model, Bollen 1989, ch. 7):

* ``L`` (p x m): loadings of observed indicators on factors;
* ``B`` (m x m): loadings of factors on higher-order factors (row = lower factor);
* ``P`` (m x m, symmetric): factor variances and covariances (for a factor
  below a higher-order factor: its disturbance variance);
* ``T`` (p x p, symmetric): residual (error) variances and covariances.

Implied covariance: Sigma = L A P A' L' + T with A = (I - B)^-1.

Each matrix entry in the table is an affine function of the free-parameter
vector theta: ``value = offset + sum(coef * theta[index])``.  Plain free
parameters have one coefficient 1, equal parameters share an index, fixed
parameters have none, and effects coding writes one loading as
``n - sum(other loadings)`` (Little, Slegers & Card 2006).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.errors import ModelError
from cfa_tool.language.checks import exogenous_factors
from cfa_tool.language.spec import Spec

MATRIX_CODES = {"L": 0, "B": 1, "P": 2, "T": 3}


@dataclass(frozen=True)
class Parameter:
    """One model-matrix entry."""

    kind: str  # loading, factor_variance, factor_covariance, residual_variance, residual_covariance
    variables: tuple[str, ...]
    matrix: str
    row: int
    col: int
    terms: tuple[tuple[int, float], ...]  # (index into theta, coefficient)
    offset: float
    origin: str  # "default", "user", "scale" (fixed or tied to give a factor its scale)

    @property
    def free(self) -> bool:
        return bool(self.terms)

    @property
    def label(self) -> str:
        return f"{self.kind}({', '.join(self.variables)})"


@dataclass(frozen=True)
class ParameterTable:
    observed: tuple[str, ...]
    latent: tuple[str, ...]
    parameters: tuple[Parameter, ...]
    n_free: int
    start: np.ndarray  # theta start values (may be NaN where the start finder decides)
    lower: np.ndarray
    upper: np.ndarray
    free_labels: tuple[str, ...]  # one label per theta element (its first parameter)

    @property
    def p(self) -> int:
        return len(self.observed)

    @property
    def m(self) -> int:
        return len(self.latent)

    def entry_arrays(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(matrix code, row, col) arrays for all parameters."""
        codes = np.array([MATRIX_CODES[p.matrix] for p in self.parameters], dtype=int)
        rows = np.array([p.row for p in self.parameters], dtype=int)
        cols = np.array([p.col for p in self.parameters], dtype=int)
        return codes, rows, cols

    def mapping(self) -> tuple[np.ndarray, np.ndarray]:
        """(J, offset) with entries = offset + J @ theta."""
        J = np.zeros((len(self.parameters), self.n_free))
        offset = np.zeros(len(self.parameters))
        for e, par in enumerate(self.parameters):
            offset[e] = par.offset
            for index, coef in par.terms:
                J[e, index] += coef
        return J, offset


def _kind_for(matrix: str, row_name: str, col_name: str) -> str:
    if matrix in ("L", "B"):
        return "loading"
    if matrix == "P":
        return "factor_variance" if row_name == col_name else "factor_covariance"
    return "residual_variance" if row_name == col_name else "residual_covariance"


def build_parameter_table(spec: Spec) -> ParameterTable:
    """Lay out the matrices and decide which entries are free, fixed or tied."""
    latent = spec.factor_names
    observed = spec.observed_names
    lat_ix = {n: i for i, n in enumerate(latent)}
    obs_ix = {n: i for i, n in enumerate(observed)}

    # --- every entry the model has, keyed like ParameterRef.key()
    entries: dict[tuple, dict] = {}

    def add(key: tuple, matrix: str, row: int, col: int, variables: tuple[str, ...]) -> None:
        entries[key] = dict(matrix=matrix, row=row, col=col, variables=variables, fixed=None, origin="default")

    for factor in spec.factors:
        f = factor.name.text
        for ind in factor.indicators:
            x = ind.text
            if x in lat_ix:
                add(("loading", (f, x)), "B", lat_ix[x], lat_ix[f], (f, x))
            else:
                add(("loading", (f, x)), "L", obs_ix[x], lat_ix[f], (f, x))
    for f in latent:
        add(("variance", (f,)), "P", lat_ix[f], lat_ix[f], (f,))
    for x in observed:
        add(("variance", (x,)), "T", obs_ix[x], obs_ix[x], (x,))
    exo = exogenous_factors(spec)
    zero = {p.key() for p in spec.uncorrelated}
    for i, a in enumerate(exo):
        for b in exo[i + 1 :]:
            pair = tuple(sorted((a, b)))
            if pair not in zero:
                add(("covariance", pair), "P", lat_ix[pair[1]], lat_ix[pair[0]], (a, b))
    for pair in spec.covary:
        a, b = pair.first.text, pair.second.text
        key = ("covariance", pair.key())
        if key in entries:
            continue
        if a in lat_ix:
            add(key, "P", max(lat_ix[a], lat_ix[b]), min(lat_ix[a], lat_ix[b]), (a, b))
        else:
            add(key, "T", max(obs_ix[a], obs_ix[b]), min(obs_ix[a], obs_ix[b]), (a, b))

    # --- the user's fixes, then the automatic scale of each factor
    for setting in spec.fixed:
        for ref in setting.refs:
            entries[ref.key()]["fixed"] = setting.value
            entries[ref.key()]["origin"] = "user"
    freed = {r.key() for r in spec.freed}
    effects: dict[tuple, list[tuple]] = {}  # the tied loading -> the other loadings of its factor
    for factor in spec.factors:
        f = factor.name.text
        load_keys = [("loading", (f, ind.text)) for ind in factor.indicators]
        var_key = ("variance", (f,))
        user_scaled = entries[var_key]["origin"] == "user" or any(entries[k]["origin"] == "user" for k in load_keys)
        if user_scaled:
            continue
        method = spec.scaling_of(f)
        if method == "marker":
            candidates = [k for k in load_keys if k not in freed]
            if not candidates:
                raise _scale_error(spec, f, "every loading of it is freed, so no indicator can set its scale")
            entries[candidates[0]].update(fixed=1.0, origin="scale")
        elif method == "variance":
            if var_key in freed:
                raise _scale_error(spec, f, "its variance is freed but 'scale ... by variance' fixes it")
            # for a factor below a higher-order factor this fixes its disturbance variance
            entries[var_key].update(fixed=1.0, origin="scale")
        else:  # effects coding: loadings average 1
            if len(load_keys) < 2:
                raise _scale_error(spec, f, "effects coding needs at least two indicators")
            effects[load_keys[-1]] = load_keys[:-1]
            entries[load_keys[-1]]["origin"] = "scale"

    # --- free indices: equality groups share one index (union-find)
    parent: dict[tuple, tuple] = {}

    def find(k: tuple) -> tuple:
        while parent.get(k, k) != k:
            k = parent[k]
        return k

    for group in spec.equal:
        keys = [r.key() for r in group]
        for k in keys[1:]:
            parent[find(k)] = find(keys[0])
    # a group with a fixed member is fixed at that value
    group_fixed: dict[tuple, float] = {}
    for key, e in entries.items():
        if e["fixed"] is not None:
            group_fixed[find(key)] = e["fixed"]
    for key in entries:
        root = find(key)
        if root in group_fixed and entries[key]["fixed"] is None:
            if key in effects:
                raise _scale_error(spec, key[1][0], "a loading tied by effects coding cannot also be set equal to a fixed parameter")
            entries[key]["fixed"] = group_fixed[root]
            entries[key]["origin"] = "user"

    index_of_root: dict[tuple, int] = {}
    free_labels: list[str] = []
    order = sorted(entries, key=lambda k: _sort_key(k, entries[k]))
    for key in order:
        e = entries[key]
        if e["fixed"] is not None or key in effects:
            continue
        root = find(key)
        if root not in index_of_root:
            index_of_root[root] = len(index_of_root)
            free_labels.append(_label(key))
    n_free = len(index_of_root)

    starts: dict[int, float] = {}
    for setting in spec.starts:
        for ref in setting.refs:
            if ref.key() in effects:
                continue
            starts[index_of_root[find(ref.key())]] = setting.value
    lower = np.full(n_free, -np.inf)
    upper = np.full(n_free, np.inf)
    for bound in spec.bounds:
        for ref in bound.refs:
            if ref.key() in effects:
                raise ModelError(f"{ref} is tied by effects coding and cannot carry its own bound", ref.location, spec.source_line(ref.location))
            k = index_of_root[find(ref.key())]
            if bound.lower is not None:
                lower[k] = max(lower[k], bound.lower)
            if bound.upper is not None:
                upper[k] = min(upper[k], bound.upper)

    parameters = []
    for key in order:
        e = entries[key]
        if key in effects:
            others = effects[key]
            terms = _merge_terms([(index_of_root[find(k)], -1.0) for k in others if entries[k]["fixed"] is None])
            offset = float(len(others) + 1) - sum(entries[k]["fixed"] for k in others if entries[k]["fixed"] is not None)
        elif e["fixed"] is not None:
            terms, offset = (), float(e["fixed"])
        else:
            terms, offset = ((index_of_root[find(key)], 1.0),), 0.0
        names = (latent if e["matrix"] in ("B", "P") else observed)
        row_name = names[e["row"]]
        col_name = (latent if e["matrix"] in ("L", "B", "P") else observed)[e["col"]]
        parameters.append(
            Parameter(
                kind=_kind_for(e["matrix"], row_name, col_name),
                variables=e["variables"],
                matrix=e["matrix"],
                row=e["row"],
                col=e["col"],
                terms=terms,
                offset=offset,
                origin=e["origin"],
            )
        )
    start = np.full(n_free, np.nan)
    for k, v in starts.items():
        start[k] = v
    return ParameterTable(observed, latent, tuple(parameters), n_free, start, lower, upper, tuple(free_labels))


def _merge_terms(terms: list[tuple[int, float]]) -> tuple[tuple[int, float], ...]:
    merged: dict[int, float] = {}
    for index, coef in terms:
        merged[index] = merged.get(index, 0.0) + coef
    return tuple((i, c) for i, c in merged.items() if c != 0.0)


_KIND_ORDER = {"loading": 0, "variance": 1, "covariance": 2}


def _sort_key(key: tuple, entry: dict) -> tuple:
    # loadings, then variances (factors before residuals), then covariances
    matrix_rank = {"L": 0, "B": 0, "P": 1, "T": 2}[entry["matrix"]]
    return (_KIND_ORDER[key[0]], matrix_rank, entry["col"] if key[0] == "loading" else entry["row"], entry["row"], entry["col"])


def _label(key: tuple) -> str:
    return f"{key[0]}({', '.join(key[1])})"


def _scale_error(spec: Spec, factor: str, why: str) -> ModelError:
    loc = next((f.name.location for f in spec.factors if f.name.text == factor), None)
    return ModelError(f"factor '{factor}' has no scale: {why}", loc, spec.source_line(loc))
