"""Population models and simulated data.

Population values come from the model file: ``start`` (or ``fix``) statements
give them; any free parameter without one takes a default: loadings 0.7
(-0.7 for an item declared reverse-keyed by a ``reversed`` statement, signs
turned around in a factor whose marker is reverse-keyed), factor variances 1,
factor covariances 0.3, residual covariances 0, and each indicator's residual
variance set so that its total variance is 1 (0.1 when the loadings already
exceed that).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
from cfa_tool import distributions as dist

from cfa_tool.errors import OptionError
from cfa_tool.language.spec import Spec
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import ParameterTable, build_parameter_table

DEFAULTS = {"loading": 0.7, "factor_variance": 1.0, "factor_covariance": 0.3, "residual_covariance": 0.0}


@dataclass(frozen=True, eq=False)
class Population:
    spec: Spec
    table: ParameterTable
    theta: np.ndarray
    sigma: np.ndarray
    defaulted: tuple[str, ...]  # labels of the parameters that took default values

    @property
    def observed(self) -> tuple[str, ...]:
        return self.table.observed


def population_from_spec(spec: Spec) -> Population:
    table = build_parameter_table(spec)
    model = StructuredModel(table)
    theta = table.start.copy()
    kind_of: dict[int, str] = {}
    sign_of: dict[int, float] = {}  # default loadings of reverse-keyed items point the other way
    keyed = spec.reverse_keyed
    marker_key = {par.variables[0]: (-1.0 if par.variables[1] in keyed else 1.0) for par in table.parameters
                  if par.kind == "loading" and not par.free and par.offset != 0.0}
    for par in table.parameters:
        if len(par.terms) == 1:
            kind_of.setdefault(par.terms[0][0], par.kind)
            if par.kind == "loading":
                f, x = par.variables
                sign_of.setdefault(par.terms[0][0], (-1.0 if x in keyed else 1.0) * marker_key.get(f, 1.0))
    defaulted = []
    residual_slots = []
    for k in range(table.n_free):
        if np.isnan(theta[k]):
            kind = kind_of.get(k, "loading")
            if kind == "residual_variance":
                residual_slots.append(k)
                theta[k] = 0.0
            else:
                theta[k] = DEFAULTS.get(kind, 0.0) * sign_of.get(k, 1.0)
            defaulted.append(table.free_labels[k])
    if residual_slots:
        common = np.diag(model.implied(theta))
        for k in residual_slots:
            row = next(p.row for p in table.parameters if p.terms and p.terms[0][0] == k)
            theta[k] = max(1.0 - common[row], 0.1)
    sigma = model.implied(theta)
    if np.linalg.eigvalsh(sigma)[0] <= 0:
        raise OptionError("the population values imply a covariance matrix that is not positive definite")
    return Population(spec, table, theta, sigma, tuple(defaulted))


def simulate_rows(sigma: np.ndarray, n: int, rng: np.random.Generator, means: np.ndarray | None = None) -> np.ndarray:
    chol = np.linalg.cholesky(sigma)
    rows = rng.standard_normal((n, len(sigma))) @ chol.T
    return rows + (0.0 if means is None else means)


def to_ordinal(rows: np.ndarray, sigma: np.ndarray, categories: int) -> np.ndarray:
    """Cut each standardized variable at the normal quantiles that give equally likely categories 1..k."""
    sd = np.sqrt(np.diag(sigma))
    cuts = dist.norm_ppf(np.arange(1, categories) / categories)
    return (np.searchsorted(cuts, rows / sd, side="right") + 1).astype(float)


def simulate(spec: Spec, n: int, seed: int, categories: int | None = None, missing: float = 0.0) -> pd.DataFrame:
    """Data from the model's population values: continuous, or ordinal with ``categories``
    categories, with a share ``missing`` of answers removed completely at random."""
    if n < 1:
        raise OptionError("the number of rows to simulate must be at least 1")
    if not 0 <= missing < 1:
        raise OptionError("the share of missing answers must be at least 0 and below 1")
    if categories is not None and categories < 2:
        raise OptionError("ordinal items need at least 2 categories")
    population = population_from_spec(spec)
    rng = np.random.default_rng(seed)
    rows = simulate_rows(population.sigma, n, rng)
    if categories is not None:
        rows = to_ordinal(rows, population.sigma, categories)
    if missing:
        rows[rng.random(rows.shape) < missing] = np.nan
    return pd.DataFrame(rows, columns=list(population.observed))
