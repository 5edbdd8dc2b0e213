"""Monte Carlo power for a model with population values: simulate, fit, repeat.

For each free parameter: mean estimate and relative bias against the
population value, the spread of the estimates beside the mean standard error,
coverage of the 95% Wald interval, and power (share of replications with
p < alpha); plus the convergence rate (Muthen & Muthen 2002).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from cfa_tool.numerics import distributions as dist

from cfa_tool import options as check
from cfa_tool.errors import OptionError
from cfa_tool.pipeline.continuous import moments_from_rows, replicate_fit
from cfa_tool.language.spec import Spec
from cfa_tool.workflows.parallel import run_tasks
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


def _replicate(task) -> tuple[bool, np.ndarray, np.ndarray]:
    spec, sigma, names, n, seed, start = task
    rows = simulate_rows(sigma, n, np.random.default_rng(seed))
    fit = replicate_fit(spec, moments_from_rows(rows, names), start=start, standard_errors=True, fit_indices_wanted=False)
    return fit.converged, fit.theta, fit.se if fit.se is not None else np.full(0, np.nan)


def monte_carlo_power(spec: Spec, n_obs: int, replications: int = 500, seed: int = 1, alpha: float = 0.05,
                      workers: int | None = None, scheduler: str | None = None, progress=None,
                      population=None) -> MonteCarloPower:
    from cfa_tool.pipeline.inputs import continuous_only, load_spec

    spec = continuous_only(load_spec(spec), "power-simulation")
    replications = check.replications(replications, minimum=2)
    seed = check.seed(seed)
    alpha = check.probability("alpha (the significance level)", alpha)
    p = len(spec.observed_names)
    n_obs = check.observations(n_obs, "the sample size")
    if n_obs <= p + 1:
        raise OptionError(f"the sample size {n_obs} is too small for {p} variables: each simulated data set needs more "
                          f"rows than variables (and a factor analysis far more)")
    if n_obs * p > check.MAX_SIMULATED_CELLS:
        raise OptionError(f"{n_obs:,} rows of {p} variables are more than {check.MAX_SIMULATED_CELLS:,} values per "
                          f"simulated data set; plan with a smaller sample size")
    population = population_from_spec(spec, population)
    table = population.table
    seeds = np.random.SeedSequence(seed).generate_state(replications)
    tasks = [(spec, population.sigma, population.observed, n_obs, int(s), population.theta) for s in seeds]
    results = run_tasks(_replicate, tasks, workers, scheduler, progress)
    ok = [(theta, se) for converged, theta, se in results if converged]
    if not ok:
        raise OptionError("no replication converged; check the population values and the sample size")
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
