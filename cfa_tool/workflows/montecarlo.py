"""Monte Carlo power for a model with population values: simulate, fit, repeat.

For each free parameter: mean estimate and relative bias against the
population value, the spread of the estimates beside the mean standard error,
coverage of the 95% Wald interval, and power (share of replications with
p < alpha); plus the convergence rate (Muthen & Muthen 2002).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np
from cfa_tool.numerics import distributions as dist

from cfa_tool import options as check
from cfa_tool.errors import OptionError
from cfa_tool.pipeline.continuous import moments_from_rows, replicate_fits
from cfa_tool.language.spec import Spec
from cfa_tool.workflows.parallel import REFITS_TOGETHER, run_tasks
from cfa_tool.workflows.simulation import population_from_spec, simulate_rows
from cfa_tool.views import Presentable


@dataclass(frozen=True)
class ParameterPower:
    label: str
    population: float
    mean_estimate: float
    relative_bias: float
    sd_estimate: float
    mean_se: float
    coverage: float
    power: float

    @property
    def se_bias(self) -> float:
        """Relative bias of the standard errors: (mean SE - SD of the estimates) / SD of the estimates."""
        return (self.mean_se - self.sd_estimate) / self.sd_estimate if self.sd_estimate > 0 else float("nan")

    def to_dict(self) -> dict:
        return {**self.__dict__, "se_relative_bias": self.se_bias}


@dataclass(frozen=True)
class MonteCarloPower(Presentable):
    n_obs: int
    replications: int
    converged: int
    alpha: float
    seed: int
    parameters: tuple[ParameterPower, ...]
    defaulted: tuple[str, ...]

    def to_dict(self) -> dict:
        return {"n_obs": self.n_obs, "replications": self.replications, "converged": self.converged,
                "convergence_rate": self.converged / self.replications, "alpha": self.alpha, "seed": self.seed,
                "parameters": [p.to_dict() for p in self.parameters], "population_defaults": list(self.defaulted)}


@dataclass(frozen=True)
class PowerCurve(Presentable):
    """Monte Carlo power at several sample sizes: one simulation per size (as :func:`monte_carlo_power`
    does for one), each with the same number of replications and its own seeds drawn from one seed."""

    results: tuple[MonteCarloPower, ...]

    @property
    def sample_sizes(self) -> tuple[int, ...]:
        return tuple(r.n_obs for r in self.results)

    def to_dict(self) -> dict:
        first = self.results[0]
        return {"sample_sizes": list(self.sample_sizes), "replications": first.replications, "alpha": first.alpha,
                "seed": first.seed, "converged": [r.converged for r in self.results],
                "power": [{"label": p.label, "population": p.population,
                           "power": [r.parameters[k].power for r in self.results]} for k, p in enumerate(first.parameters)],
                "by_sample_size": [r.to_dict() for r in self.results], "population_defaults": list(first.defaulted)}


def _replicate(tasks: list) -> list[tuple[bool, np.ndarray, np.ndarray]]:
    """(converged, estimates, standard errors) of each task's simulated data set, fitted together."""
    spec, _, names, _, _, start = tasks[0]
    samples = [moments_from_rows(simulate_rows(sigma, n, np.random.default_rng(seed)), names)
               for _, sigma, _, n, seed, _ in tasks]
    fits = replicate_fits(spec, samples, start, standard_errors=True, fit_indices_wanted=False)
    return [(fit.converged, fit.theta, fit.se if fit.se is not None else np.full(0, np.nan)) for fit in fits]


def monte_carlo_power(spec: Spec, n_obs: int | Sequence[int] | str, replications: int = 500, seed: int = 1,
                      alpha: float = 0.05, workers: int | None = None, scheduler: str | None = None, progress=None,
                      population=None) -> MonteCarloPower | PowerCurve:
    """Monte Carlo power at one sample size, or a :class:`PowerCurve` when ``n_obs`` lists several
    (a list, or text such as '100,200,400'); every replication of every size runs in one batch of tasks."""
    from cfa_tool.pipeline.inputs import continuous_only, load_spec, without_exploratory_blocks

    spec = without_exploratory_blocks(continuous_only(load_spec(spec), "power-simulation"), "power-simulation",
                                      "its power would be of the block's unrotated loadings, which no report shows")
    replications = check.replications(replications, minimum=2)
    seed = check.seed(seed)
    alpha = check.probability("alpha (the significance level)", alpha)
    p = len(spec.observed_names)
    sizes = check.sample_sizes(n_obs)
    for n in sizes:
        if n <= p + 1:
            raise OptionError(f"the sample size {n} is too small for {p} variables: each simulated data set needs more "
                              f"rows than variables (and a factor analysis far more)")
        if n * p > check.MAX_SIMULATED_CELLS:
            raise OptionError(f"{n:,} rows of {p} variables are more than {check.MAX_SIMULATED_CELLS:,} values per "
                              f"simulated data set; plan with a smaller sample size")
    population = population_from_spec(spec, population)
    # one size keeps the seeds it always had; several take one stream per size from the same seed
    streams = [np.random.SeedSequence(seed)] if len(sizes) == 1 else np.random.SeedSequence(seed).spawn(len(sizes))
    tasks = [(spec, population.sigma, population.observed, n, int(s), population.theta)
             for n, stream in zip(sizes, streams) for s in stream.generate_state(replications)]
    results = run_tasks(_replicate, tasks, workers, scheduler, progress, REFITS_TOGETHER, batched=True)
    powers = tuple(_summary(population, n, replications, seed, alpha, results[k * replications:(k + 1) * replications])
                   for k, n in enumerate(sizes))
    return powers[0] if len(sizes) == 1 else PowerCurve(powers)


def _summary(population, n_obs: int, replications: int, seed: int, alpha: float, results: list) -> MonteCarloPower:
    """Power, bias and coverage of one sample size's replications."""
    table = population.table
    ok = [(theta, se) for converged, theta, se in results if converged]
    if not ok:
        raise OptionError(f"no replication converged at N = {n_obs}; check the population values and the sample size")
    # SEs of theta: each theta index appears as an entry with one coefficient 1
    entry_of = {}
    for e, par in enumerate(table.parameters):
        if len(par.terms) == 1 and par.terms[0][1] == 1.0:
            entry_of.setdefault(par.terms[0][0], e)
    thetas = np.array([t for t, _ in ok])
    ses = np.array([se[[entry_of[k] for k in range(table.n_free)]] for _, se in ok])
    crit = dist.norm_ppf(1 - alpha / 2)
    rows = []
    for k in range(table.n_free):
        truth = population.theta[k]
        est, se = thetas[:, k], ses[:, k]
        z = np.abs(est / se)
        covered = np.abs(est - truth) <= dist.norm_ppf(0.975) * se
        rows.append(ParameterPower(
            table.free_labels[k], float(truth), float(est.mean()),
            float((est.mean() - truth) / truth) if truth != 0 else float("nan"),
            float(est.std(ddof=1)), float(np.nanmean(se)), float(np.nanmean(covered)), float(np.nanmean(z > crit))))
    return MonteCarloPower(n_obs, replications, len(ok), alpha, seed, tuple(rows), population.defaulted)
