"""Model-specific fit-index cutoffs by simulation, in the manner of McNeish & Wolf's
dynamic fit indices (2023).

Two populations share the fitted model's estimates: one is the model itself;
the other adds a misspecification of known size that the model leaves out --
for models with two or more factors, a cross-loading (standardized size equal
to the model's smallest standardized loading, on the item whose own loading is
smallest, towards the factor most correlated with its own); for one-factor
models, a residual correlation of .30 between the first two items.  Samples of
the user's size are drawn from each and fitted with the user's model.  A
cutoff separates the two at 95% when 95% of misspecified samples are beyond it
and 95% of correct samples are not (likewise at 90%).  The choice of
misspecification is this tool's reading of the method, and the cutoffs hold
for that misspecification only.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool import options as check
from cfa_tool.errors import OptionError
from cfa_tool.fitting import moments_from_rows, replicate_fit
from cfa_tool.language.spec import Spec
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.results import FitResult, clean
from cfa_tool.workflows.parallel import run_tasks
from cfa_tool.workflows.simulation import simulate_rows

LEVELS = (0.95, 0.90)
INDICES = ("cfi", "rmsea", "srmr")


@dataclass(frozen=True)
class Cutoff:
    index: str
    level: float
    cutoff: float | None  # None: the distributions overlap too much at this level
    observed: float
    beyond: bool | None  # the observed value is on the misspecified side of the cutoff

    def to_dict(self) -> dict:
        return clean(dict(self.__dict__))


@dataclass(frozen=True)
class CutoffResult:
    misspecification: str
    replications: int
    converged_correct: int
    converged_misspecified: int
    seed: int
    n_obs: int
    cutoffs: tuple[Cutoff, ...]

    def to_dict(self) -> dict:
        return clean({"misspecification": self.misspecification, "replications": self.replications,
                      "converged_correct": self.converged_correct, "converged_misspecified": self.converged_misspecified,
                      "seed": self.seed, "n_obs": self.n_obs, "cutoffs": [c.to_dict() for c in self.cutoffs]})


def _replicate(task):
    spec, sigma, names, n, seed, start = task
    rows = simulate_rows(sigma, n, np.random.default_rng(seed))
    fit = replicate_fit(spec, moments_from_rows(rows, names), start=start)
    return fit.converged, fit.cfi, fit.rmsea, fit.srmr


def misspecified_covariance(spec: Spec, result: FitResult) -> tuple[np.ndarray, str]:
    table = build_parameter_table(spec)
    model = StructuredModel(table)
    mats = model.matrices(result.theta)
    L = mats.L.copy()
    T = mats.T.copy()
    phi = mats.latent_covariance()
    sigma = mats.implied_covariance()
    sd_obs, sd_lat = np.sqrt(np.diag(sigma)), np.sqrt(np.diag(phi))
    std = L * sd_lat[None, :] / sd_obs[:, None]
    first_order = [j for j in range(L.shape[1]) if np.any(L[:, j] != 0)]
    names, factors = result.observed, result.latent
    if len(first_order) >= 2:
        primary = np.abs(std[:, first_order]).max(axis=1)
        own = [first_order[int(np.argmax(np.abs(std[i, first_order])))] for i in range(len(names))]
        size = float(primary.min())
        item = int(np.argmin(primary))
        corr = phi / np.outer(sd_lat, sd_lat)
        others = [j for j in first_order if j != own[item] and L[item, j] == 0]
        if not others:
            raise OptionError("every item already loads on every factor; there is no cross-loading to leave out")
        target = max(others, key=lambda j: abs(corr[own[item], j]))
        L[item, target] = size * sd_obs[item] / sd_lat[target]
        what = f"a cross-loading of {size:.2f} (standardized) of {names[item]} on {factors[target]}"
    else:
        if len(names) < 2:
            raise OptionError("a model with one item has nothing to misspecify")
        r = 0.30
        T[0, 1] = T[1, 0] = r * np.sqrt(T[0, 0] * T[1, 1])
        what = f"a residual correlation of {r:.2f} between {names[0]} and {names[1]}"
    G = L @ mats.A
    return G @ mats.P @ G.T + T, what


def cutoff_options(replications: int, seed: int, workers: int | None) -> tuple[int, int]:
    """The options checked (at least 20 samples per population)."""
    check.workers(workers)
    return check.replications(replications, minimum=20), check.seed(seed)


def fit_cutoffs(spec: Spec, result: FitResult, replications: int = 200, seed: int = 1, workers: int | None = None,
                cluster: str | None = None, progress=None) -> CutoffResult:
    if result.multigroup or not result.converged or result.fit is None:
        raise OptionError("model-specific cutoffs need a converged single-group fit")
    replications, seed = cutoff_options(replications, seed, workers)
    n = result.n_obs
    wrong, what = misspecified_covariance(spec, result)
    seeds = np.random.SeedSequence(seed).generate_state(2 * replications)
    tasks = [(spec, result.implied_covariance, result.observed, n, int(s), result.theta) for s in seeds[:replications]]
    tasks += [(spec, wrong, result.observed, n, int(s), result.theta) for s in seeds[replications:]]
    draws = run_tasks(_replicate, tasks, workers, cluster, progress)
    correct = np.array([d[1:] for d in draws[:replications] if d[0]])
    mis = np.array([d[1:] for d in draws[replications:] if d[0]])
    if len(correct) < 10 or len(mis) < 10:
        raise OptionError("too few simulated fits converged to set cutoffs")
    observed = {"cfi": result.fit.cfi, "rmsea": result.fit.rmsea, "srmr": result.fit.srmr}
    cutoffs = []
    for k, index in enumerate(INDICES):
        for level in LEVELS:
            if index == "cfi":  # misspecified samples have low CFI
                cut = float(np.quantile(mis[:, k], level))
                ok = np.quantile(correct[:, k], 1 - level) >= cut
                beyond = observed[index] < cut
            else:
                cut = float(np.quantile(mis[:, k], 1 - level))
                ok = np.quantile(correct[:, k], level) <= cut
                beyond = observed[index] > cut
            cutoffs.append(Cutoff(index, level, cut if ok else None, float(observed[index]), bool(beyond) if ok else None))
    return CutoffResult(what, replications, len(correct), len(mis), seed, n, tuple(cutoffs))
