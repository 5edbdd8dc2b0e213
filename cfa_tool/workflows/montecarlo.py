"""Monte Carlo power for a model with population values: simulate, fit, repeat.

For each free parameter: mean estimate and relative bias against the
population value, the spread of the estimates beside the mean standard error,
coverage of the 95% Wald interval, and power (share of replications with
p < alpha); plus the convergence rate (Muthén & Muthén 2002).  With a model
nested in the simulated one, each data set is fitted by both, and the power of
their chi-square difference test is counted too (workflows.power_nested).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Sequence

import numpy as np
from cfa_tool.numbers import rounded_number
from cfa_tool.numerics import distributions as dist

from cfa_tool import options as check
from cfa_tool.assessment.admissibility import counted_problems, replicated_problems
from cfa_tool.errors import OptionError
from cfa_tool.model.implied import StructuredModel
from cfa_tool.pipeline.continuous import moments_from_rows, replicate_fits
from cfa_tool.language.spec import Spec
from cfa_tool.workflows.power import fewest_rows
from cfa_tool.workflows.power_nested import difference_power, nested_plan
from cfa_tool.workflows.parallel import REFITS_TOGETHER, refits_together, run_tasks
from cfa_tool.workflows.simulation import model_order_labels, population_from_spec, simulate_rows
from cfa_tool.views import Presentable


@dataclass(frozen=True)
class ParameterPower:
    """One parameter's bias, coverage and power over the simulated samples."""
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
    """Power by Monte Carlo simulation of the model."""
    n_obs: int
    replications: int
    converged: int
    alpha: float
    seed: int
    parameters: tuple[ParameterPower, ...]
    defaulted: tuple[str, ...]
    #: ordinal items: how each sample was fitted (the estimator's words) and the share of converged replications
    #: whose adjusted test rejected the (true) model at alpha
    ordinal: str | None = None
    model_rejected: float | None = None
    #: converged replications whose solution is not admissible, as a single fit would judge it
    #: (assessment.admissibility.replicated_problems: negative variances, estimates held at a bound, ...); they stay in
    #: the figures, and ``inadmissible_named`` names their problems with the count of each
    inadmissible: int = 0
    #: what the earlier fit's data had that the simulated rows do not (simulation.Population.not_carried)
    not_carried: tuple[str, ...] = ()
    #: the population the samples were drawn from (simulation.Population): every value, fixed ones included
    population: object = field(default=None, compare=False)
    inadmissible_named: str = ""
    #: ordinal items: converged replications that lacked an answer category (fitted with the categories they held and
    #: kept: workflows.ordinal_resampling), and the categories lacked with their counts (LackedCategory)
    lacking: int = 0
    lacked: tuple = ()
    #: a model nested in the simulated one (workflows.power_nested.NestedPlan) and the power of the chi-square
    #: difference test against it at this sample size (DifferencePower); None without one
    nested: object = field(default=None, compare=False)
    difference: object = None

    @property
    def observed(self) -> tuple[str, ...]:
        """The model's items, which tell an item's residual variance from a factor's variance in the labels."""
        return tuple(self.population.spec.observed_names) if self.population is not None else ()

    def to_dict(self) -> dict:
        return {"n_obs": self.n_obs, "replications": self.replications, "converged": self.converged,
                "convergence_rate": self.converged / self.replications, "alpha": self.alpha, "seed": self.seed,
                "parameters": [p.to_dict() for p in self.parameters], "population_defaults": list(self.defaulted),
                "population": self.population.values() if self.population is not None else None,
                "ordinal_items_fitted_by": self.ordinal, "model_test_rejection_rate": self.model_rejected,
                "inadmissible": self.inadmissible,
                "inadmissible_problems": self.inadmissible_named, "not_carried_over": list(self.not_carried),
                **({"lacking_a_category": self.lacking, "categories_lacked": [c.to_dict() for c in self.lacked]}
                   if self.lacking else {}),
                **({"nested_model": nested_json(self.nested, (self.difference,))} if self.nested is not None else {})}


def nested_json(nested, differences) -> dict:
    """The nested model and its difference test's power at each sample size, for the JSON."""
    return {"name": nested.name, "source": nested.source, "df_difference": nested.df_difference,
            "population_discrepancy": nested.discrepancy, "on_the_boundary": list(nested.boundary),
            "difference_test": [d.to_dict() for d in differences]}


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
                "by_sample_size": [r.to_dict() for r in self.results], "population_defaults": list(first.defaulted),
                "ordinal_items_fitted_by": first.ordinal,
                "model_test_rejection_rate": [r.model_rejected for r in self.results] if first.ordinal else None,
                **({"nested_model": nested_json(first.nested, [r.difference for r in self.results])}
                   if first.nested is not None else {})}


def _replicate(tasks: list) -> list[tuple]:
    """(converged, estimates, standard errors) of each task's simulated data set, fitted together; with a nested
    model (the task's last field: its spec and start values), also (the chi-square, whether the nested model
    converged, its chi-square) of the same data set."""
    spec, _, names, _, _, start, nested = tasks[0]
    samples = [moments_from_rows(simulate_rows(sigma, n, np.random.default_rng(seed)), names)
               for _, sigma, _, n, seed, _, _ in tasks]
    fits = replicate_fits(spec, samples, start, standard_errors=True, fit_indices_wanted=False)
    found = [(fit.converged, fit.theta, fit.se if fit.se is not None else np.full(0, np.nan)) for fit in fits]
    if nested is None:
        return found
    rivals = replicate_fits(nested[0], samples, nested[1], standard_errors=False, fit_indices_wanted=False)
    return [(*one, fit.chi_square, rival.converged, rival.chi_square)
            for one, fit, rival in zip(found, fits, rivals)]


def monte_carlo_power(spec: Spec, n_obs: int | Sequence[int] | str, replications: int = 500, seed: int = 1,
                      alpha: float = 0.05, workers: int | None = None, scheduler: str | None = None, progress=None,
                      population=None, categories: int | None = None,
                      ordinal_estimator: str | None = None,
                      nested_model: str | Path | Spec | None = None) -> MonteCarloPower | PowerCurve:
    """Monte Carlo power at one sample size, or a :class:`PowerCurve` when ``n_obs`` lists several
    (a list, or text such as '100,200,400'); every replication of every size runs in one batch of tasks.

    Ordinal items: those an 'ordinal' statement declares, cut into ``categories`` equally likely categories
    (every item when no statement declares any), or the items of an earlier ordinal fit given as ``population``,
    cut at its thresholds.  Each sample is then fitted by least squares (``ordinal_estimator``, diagonally
    weighted by default) with robust standard errors, and the share of replications whose adjusted test rejects
    the true model is reported beside the power.

    ``nested_model``: a model nested in ``spec`` (a model file, model text or parsed model: a restricted form of it,
    such as two of its factors merged into one), of continuous items; each data set is fitted by both models too,
    and the power of their chi-square difference test at each sample size is reported beside its noncentral
    chi-square approximation (workflows.power_nested; Satorra & Saris 1985)."""
    from cfa_tool.pipeline.inputs import load_spec, ordinal_estimator_option, without_exploratory_blocks
    from cfa_tool.workflows.simulation import refuse_set_residual_variances_first, with_categories

    spec = without_exploratory_blocks(load_spec(spec), "power-simulation",
                                      "its power would be of the block's unrotated loadings, which no report shows")
    replications = check.replications(replications, minimum=2)
    seed = check.seed(seed)
    check.workers(workers, scheduler)
    alpha = check.probability("alpha (the significance level)", alpha)
    if categories is not None:
        categories = check.whole_number("the number of categories", categories, 2, check.MAX_CATEGORIES)
    p = len(spec.observed_names)
    sizes = check.sample_sizes(n_obs)
    for n in sizes:
        if n < fewest_rows(p):
            raise OptionError(f"the sample size {n} is too small for {p} variables: each simulated data set needs at "
                              f"least {fewest_rows(p)} rows (a factor analysis far more)")
        if n * p > check.MAX_SIMULATED_CELLS:
            raise OptionError(f"{n:,} rows of {p} variables are more than {check.MAX_SIMULATED_CELLS:,} values per "
                              f"simulated data set; plan with a smaller sample size")
    refuse_set_residual_variances_first(spec, categories)
    population = with_categories(population_from_spec(spec, population), spec, categories, "power-simulation")
    if len(population.theta) == 0:  # nothing is estimated, so there is no test whose power to count
        raise OptionError("power-simulation counts how often each free parameter's test rejects zero, and the model "
                          "fixes every parameter; give the population values with 'start' statements instead (a "
                          "start value is the population value, and the parameter stays free to be estimated)")
    nested = nested_plan(spec, nested_model, population) if nested_model is not None else None
    weighting = ordinal_estimator_option(ordinal_estimator, population.ordinal_items,
                                         f"an 'ordinal' statement, {check.Option.CATEGORIES} or an ordinal fit's "
                                         f"{check.Option.POPULATION_FROM}")
    # one size keeps the seeds it always had; several take one stream per size from the same seed
    streams = [np.random.SeedSequence(seed)] if len(sizes) == 1 else np.random.SeedSequence(seed).spawn(len(sizes))
    if population.ordinal_items:
        return _ordinal_power(spec, population, sizes, streams, replications, seed, alpha, weighting, workers,
                              scheduler, progress)
    rival = (nested.spec, nested.start) if nested is not None else None
    tasks = [(spec, population.sigma, population.observed, n, int(s), population.theta, rival)
             for n, stream in zip(sizes, streams) for s in stream.generate_state(replications)]
    results = run_tasks(_replicate, tasks, workers, scheduler, progress,
                        refits_together(REFITS_TOGETHER, len(population.theta)), batched=True)
    powers = tuple(_summary(population, n, replications, seed, alpha, results[k * replications:(k + 1) * replications],
                            nested)
                   for k, n in enumerate(sizes))
    return powers[0] if len(sizes) == 1 else PowerCurve(powers)


def _ordinal_power(spec: Spec, population, sizes, streams, replications: int, seed: int, alpha: float, weighting,
                   workers, scheduler, progress) -> MonteCarloPower | PowerCurve:
    """Power with ordinal items (:mod:`cfa_tool.workflows.ordinal_resampling`): the parameters are those of the
    one-group ordinal model (the latent responses' residual variances follow from their unit variances), whose
    population values are the population's on the latent responses' scale."""
    from cfa_tool.model.parameters import build_parameter_table
    from cfa_tool.pipeline.ordinal import ordinal_spec
    from cfa_tool.workflows.ordinal_resampling import OrdinalFitting, lacked_categories, simulated_fit
    from cfa_tool.workflows.simulation import on_latent_response_scale

    ordinal = ordinal_spec(spec)[0]  # (a statement setting a residual variance was refused by with_categories)
    variances = np.diag(population.sigma)
    if np.abs(variances - 1.0).max() > 1e-6:
        if population.fitted_from is not None:  # a continuous fit's values are on its items' own scales: standardized
            population = on_latent_response_scale(population)
        else:
            k = int(np.argmax(np.abs(variances - 1.0)))
            raise OptionError(f"with ordinal items the population values are on the scale of latent responses of "
                              f"variance 1, but the values given make the variance of '{population.observed[k]}' "
                              f"{rounded_number(variances[k], apart_from=1.0)}; change the 'start' values")
    table = build_parameter_table(ordinal)
    value_of = {(v["kind"], tuple(v["variables"])): v["value"] for v in population.values()}
    entry_of = {}  # each free parameter through an entry that is that parameter alone
    for par in table.parameters:
        if len(par.terms) == 1 and par.terms[0][1] == 1.0:
            entry_of.setdefault(par.terms[0][0], (par.kind, par.variables))
    keys = [entry_of[k] for k in range(table.n_free)]
    truth = [value_of[key] for key in keys]
    fitting = OrdinalFitting(spec, population.observed,
                             frozenset(x for x in population.observed if x not in population.ordinal_items), weighting)
    tasks = [(fitting, population.sigma, population.thresholds, n, int(s), tuple(keys))
             for n, stream in zip(sizes, streams) for s in stream.generate_state(replications)]
    draws = run_tasks(simulated_fit, tasks, workers, scheduler, progress)
    labels = model_order_labels(table)
    defaulted = tuple(labels[label] for label in population.defaulted if label in table.free_labels)
    powers = []
    for k, n in enumerate(sizes):
        ok = [d for d in draws[k * replications:(k + 1) * replications] if d.converged]
        if not ok:
            raise OptionError(f"no replication converged at N = {n}; check the population values and the sample size")
        thetas, ses = np.array([d.values for d in ok]), np.array([d.se for d in ok])
        count, named = counted_problems(d.problems for d in ok)  # as each replication's fit judged itself
        lacking, lacked = lacked_categories(ok, population.observed)  # kept, as the bootstrap keeps its resamples
        powers.append(MonteCarloPower(n, replications, len(ok), alpha, seed,
                                      _parameter_rows(tuple(labels.values()), np.array(truth), thetas, ses, alpha),
                                      defaulted,
                                      weighting.phrase, float(np.mean([d.p_value < alpha for d in ok])),
                                      count, population.not_carried, population, named, lacking, lacked))
    return powers[0] if len(sizes) == 1 else PowerCurve(tuple(powers))


def _summary(population, n_obs: int, replications: int, seed: int, alpha: float, results: list,
             nested=None) -> MonteCarloPower:
    """Power, bias and coverage of one sample size's replications; with a ``nested`` model
    (power_nested.NestedPlan), the power of the difference test over the replications both models converged in."""
    table = population.table
    ok = [(one[1], one[2]) for one in results if one[0]]
    if not ok:
        raise OptionError(f"no replication converged at N = {n_obs}; check the population values and the sample size")
    # SEs of theta: each theta index appears as an entry with one coefficient 1
    entry_of = {}
    for e, par in enumerate(table.parameters):
        if len(par.terms) == 1 and par.terms[0][1] == 1.0:
            entry_of.setdefault(par.terms[0][0], e)
    thetas = np.array([t for t, _ in ok])
    ses = np.array([se[[entry_of[k] for k in range(table.n_free)]] for _, se in ok])
    labels = model_order_labels(table)
    rows = _parameter_rows(tuple(labels.values()), population.theta, thetas, ses, alpha)
    count, named = counted_problems(replicated_problems(table, StructuredModel(table), thetas))
    difference = None
    if nested is not None:
        difference = difference_power(nested, n_obs, alpha, [(one[3], one[5]) for one in results if one[0] and one[4]])
    return MonteCarloPower(n_obs, replications, len(ok), alpha, seed, rows,
                           tuple(labels.get(label, label) for label in population.defaulted),
                           inadmissible=count, not_carried=population.not_carried, population=population,
                           inadmissible_named=named, nested=nested, difference=difference)


def _parameter_rows(labels, population: np.ndarray, thetas: np.ndarray, ses: np.ndarray,
                    alpha: float) -> tuple[ParameterPower, ...]:
    """Each parameter's power, bias and coverage from the estimates and standard errors of the converged
    replications (one row each, one column per parameter)."""
    crit = dist.norm_ppf(1 - alpha / 2)
    rows = []
    for k, label in enumerate(labels):
        truth = population[k]
        est, se = thetas[:, k], ses[:, k]
        z = np.abs(est / se)
        covered = np.abs(est - truth) <= dist.norm_ppf(0.975) * se
        rows.append(ParameterPower(
            label, float(truth), float(est.mean()),
            float((est.mean() - truth) / truth) if truth != 0 else float("nan"),
            float(est.std(ddof=1)), float(np.nanmean(se)), float(np.nanmean(covered)), float(np.nanmean(z > crit))))
    return tuple(rows)
