"""The power of the chi-square difference test between a model and a model nested in it (two factors against
the one factor that merges them, say), by Monte Carlo simulation beside the noncentral chi-square approximation.

Each simulated data set is fitted by both models; the likelihood-ratio difference T_R - T_G is referred to the
chi-square distribution with df_R - df_G degrees of freedom (Steiger, Shapiro & Browne 1985), as ``compare`` refers
it, and the share of converged pairs with p < alpha is the difference test's power.  Its approximation (Satorra &
Saris 1985): the nested model fitted to the population covariance matrix leaves a minimum discrepancy F_R (the
larger model reproduces the population exactly), and at N rows the difference follows the noncentral chi-square
with df_R - df_G degrees of freedom and noncentrality N F_R (this tool's statistic is N F; Satorra & Saris write
(N - 1) F for theirs), so power = P(chi2(df, N F_R) > chi2_(1 - alpha)(df)).  The nesting is judged by the one rule
``compare`` uses (workflows.nesting.is_nested: the larger model fitted to the nested model's implied moments
reproduces them; Bentler & Satorra 2010), here at the population.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from cfa_tool.errors import ModelError, OptionError, printable
from cfa_tool.language.spec import Spec
from cfa_tool.numerics import distributions as dist
from cfa_tool.options import Option
from cfa_tool.views import Presentable


@dataclass(frozen=True)
class NestedPlan:
    """A model nested in the simulated one, as the population judges it: its name and file, the degrees of freedom
    of the difference, the minimum discrepancy F it leaves at the population (0: the restriction holds there), its
    estimates at the population (the start of each replication's fit), and what it fixes on the boundary of the
    larger model's space (workflows.nesting.boundary_of, in words)."""
    name: str
    source: str
    spec: Spec
    df_difference: int
    discrepancy: float
    start: np.ndarray
    boundary: tuple[str, ...] = ()

    def noncentrality(self, n_obs: int) -> float:
        """N F (Satorra & Saris 1985, with this tool's statistic N F)."""
        return n_obs * self.discrepancy


@dataclass(frozen=True)
class DifferencePower:
    """The difference test's power at one sample size: simulated (the share of the ``pairs`` of converged fits of
    both models whose difference had p < alpha) and approximated (the noncentral chi-square)."""
    n_obs: int
    pairs: int  # replications in which both models converged
    rejected: float  # their share with p < alpha
    approximate: float  # Satorra & Saris (1985)
    noncentrality: float
    mean_difference: float  # the mean chi-square difference over the pairs (its expectation: df + noncentrality)

    @property
    def monte_carlo_se(self) -> float:
        """sqrt(p (1 - p) / R): the simulated share's Monte Carlo standard error."""
        return math.sqrt(self.rejected * (1 - self.rejected) / self.pairs) if self.pairs else float("nan")

    def to_dict(self) -> dict:
        return {"n_obs": self.n_obs, "pairs_converged": self.pairs, "power": self.rejected,
                "monte_carlo_se": self.monte_carlo_se, "approximate_power": self.approximate,
                "noncentrality": self.noncentrality, "mean_chi_square_difference": self.mean_difference}


def approximate_power(discrepancy: float, df: int, n_obs: int, alpha: float) -> float:
    """The power of the chi-square difference test at ``n_obs`` rows by the noncentral chi-square with
    noncentrality ``n_obs`` x ``discrepancy`` (Satorra & Saris 1985)."""
    return float(dist.ncx2_sf(dist.chi2_ppf(1 - alpha, df), df, n_obs * max(discrepancy, 0.0)))


def difference_power(plan: NestedPlan, n_obs: int, alpha: float, pairs: list[tuple[float, float]]) -> DifferencePower:
    """The difference test's power at ``n_obs`` from the (general, nested) chi-squares of the ``pairs`` of converged
    fits, beside its approximation."""
    diffs = np.array([nested - general for general, nested in pairs], dtype=float)
    rejected = float(np.mean(dist.chi2_sf(diffs, plan.df_difference) < alpha)) if len(diffs) else float("nan")
    return DifferencePower(n_obs, len(diffs), rejected, approximate_power(plan.discrepancy, plan.df_difference,
                                                                          n_obs, alpha),
                           plan.noncentrality(n_obs), float(diffs.mean()) if len(diffs) else float("nan"))


def nested_plan(spec: Spec, nested: str | Path | Spec, population) -> NestedPlan:
    """The model ``nested`` (a model file, model text or parsed model) judged against ``spec`` at its ``population``
    (workflows.simulation.Population, continuous items): refused in one line when it cannot apply (groups, an
    exploratory block, ordinal items, other items than the model's, or not nested in it by compare's
    rule), else its plan."""
    from cfa_tool.model.parameters import group_statement
    from cfa_tool.pipeline.inputs import load_spec, without_exploratory_blocks
    from cfa_tool.workflows.nesting import boundary_of, is_nested

    rival = load_spec(nested)
    where = f"the nested model ({Option.NESTED_MODEL})"
    statement = group_statement(rival)
    if statement is not None:
        raise OptionError(f"{where} has {statement}, which needs groups; the difference test's power is simulated "
                          f"for one group")
    rival = without_exploratory_blocks(rival, "power-simulation",
                                       "the nested model must name each factor's items for its fit to be compared")
    if population.ordinal_items or spec.ordinal or rival.ordinal:
        raise OptionError(f"{where} applies to continuous items only so far: the adjusted difference test of ordinal "
                          f"items is not simulated; leave out {Option.CATEGORIES} and the 'ordinal' statements, or "
                          f"{Option.NESTED_MODEL}")
    ours, theirs = set(spec.observed_names), set(rival.observed_names)
    if ours != theirs:
        only = [f"{', '.join(sorted(a - b)[:5])} only in {whose}" for a, b, whose in
                ((ours, theirs, "the model"), (theirs, ours, "the nested model")) if a - b]
        raise OptionError(f"{where} and the model use different items ({'; '.join(only)}), so no "
                          f"difference test compares them; give a nested model of the same items")
    general, restricted = _population_fit(spec, population, "the model"), \
        _population_fit(rival, population, "the nested model")
    if restricted.fit.df < general.fit.df:  # the two given the other way round
        raise OptionError(f"{where} has fewer degrees of freedom ({restricted.fit.df}) than the model "
                          f"({general.fit.df}), so it is not a restricted form of it; give the more restricted model "
                          f"as {Option.NESTED_MODEL} and the other as the model")
    nested_ok, reason, _ = is_nested(restricted, spec, general)
    if not nested_ok:
        raise OptionError(f"{where} is not nested in the model ({reason}), so their chi-square difference "
                          f"is no test; give a restricted form of the model (two of its factors merged into one, say)")
    name = rival.title or Path(rival.source).stem or "nested model"
    boundary = boundary_of(rival, restricted, spec, general)
    return NestedPlan(name, rival.source, rival, int(restricted.fit.df - general.fit.df),
                      max(restricted.fit.chi_square / restricted.n_obs, 0.0), np.asarray(restricted.theta, dtype=float),
                      boundary.parts)


#: the N of the population's moments fitted by :func:`_population_fit`: the discrepancy F does not depend on it
POPULATION_N = 100_000


def _population_fit(spec: Spec, population, which: str):
    """``spec`` fitted by maximum likelihood to the population covariance matrix."""
    from cfa_tool.data.moments import SampleMoments
    from cfa_tool.errors import EstimationError
    from cfa_tool.pipeline.continuous import FitOptions, fit_moments

    p = len(population.observed)
    moments = SampleMoments(tuple(population.observed), population.sigma, np.zeros(p), POPULATION_N, POPULATION_N, 0,
                            "population")
    try:
        found = fit_moments(spec, moments, FitOptions(diagnostics=False, modification_indices=False))
    except (EstimationError, ModelError) as failure:
        raise OptionError(f"{which} could not be fitted to the population covariance matrix: "
                          f"{printable(str(failure))}") from None
    if not found.converged:
        raise OptionError(f"{which} did not converge when fitted to the population covariance matrix, so its "
                          f"population discrepancy is unknown; check its statements and the population values")
    return found


@dataclass(frozen=True)
class NestedPower(Presentable):
    """The power of the chi-square difference test against a nested model at a planned N, and the smallest N that
    reaches a target power, by the noncentral chi-square (Satorra & Saris 1985) at the population the model file's
    values describe: ``cfa-tool power MODEL --nested-model MODEL2``."""
    nested: NestedPlan
    alpha: float
    n_obs: int | None
    power: float | None
    required_n: int
    target_power: float
    #: the population values the model file does not give, taken from the standardized defaults (their labels)
    defaulted: tuple[str, ...] = ()
    #: a planned cluster sample (workflows.power.ClusterPlan) for ``required_n``; None without one
    clusters: object = None
    #: when the test alone would reach the power with fewer rows than estimating the models needs
    note: str | None = None
    population: object = field(default=None, compare=False)
    #: the sample sizes shown (the smallest N, then the N asked about) below the rule of rows per free parameter of the
    #: model (assessment.admissibility.rows_per_parameter): the test's N says nothing of how precisely the model's
    #: parameters are estimated, which the report says first
    below_rows_rule: tuple = ()
    #: what the N asked about is worth as independent rows in a planned cluster sample (N / design effect), the N its
    #: power is computed for (workflows.power.effective_rows; hostile s24b: the power of N independent rows was given)
    effective_n: float | None = None

    @property
    def observed(self) -> tuple[str, ...]:
        return tuple(self.population.spec.observed_names) if self.population is not None else ()

    def to_dict(self) -> dict:
        from dataclasses import asdict

        return {"nested_model": self.nested.name, "source": self.nested.source,
                "df_difference": self.nested.df_difference, "population_discrepancy": self.nested.discrepancy,
                "on_the_boundary": list(self.nested.boundary), "alpha": self.alpha, "n_obs": self.n_obs,
                "power": self.power, "effective_n": self.effective_n,
                "noncentrality": (self.nested.noncentrality(self.effective_n if self.effective_n is not None
                                                            else self.n_obs) if self.n_obs is not None else None),
                "required_n": self.required_n, "target_power": self.target_power,
                "population_defaults": list(self.defaulted), "note": self.note,
                "below_rows_per_parameter": [n.rows for n in self.below_rows_rule],
                "clusters": asdict(self.clusters) if self.clusters is not None else None,
                "population": self.population.values() if self.population is not None else None}


def nested_power(model: str | Path | Spec, nested_model: str | Path | Spec, n_obs: int | None = None,
                 alpha: float = 0.05, target_power: float = 0.80, design_effect: float | None = None,
                 cluster_size: float | None = None, intraclass: float | None = None,
                 largest: int = 10_000_000) -> NestedPower:
    """The power at ``n_obs`` of the chi-square difference test of ``nested_model`` against ``model`` and the smallest
    N reaching ``target_power`` (the power rises with N), by :func:`approximate_power` at the population of the
    model file's 'start' and 'fix' values with standardized defaults beside them (workflows.simulation
    .population_from_spec); refused where the nested model holds in that population (its power is alpha at every
    N).  The N is never below what estimating the model needs (more rows than items).  ``design_effect``, or
    ``intraclass`` with ``cluster_size``: a planned cluster sample (workflows.power.cluster_plan)."""
    from cfa_tool import options as check
    from cfa_tool.model.parameters import group_statement
    from cfa_tool.numbers import user_number
    from cfa_tool.pipeline.inputs import load_spec, without_exploratory_blocks
    from cfa_tool.workflows.power import cluster_plan, effective_rows, least_rows, rows_rule_judged
    from cfa_tool.workflows.simulation import model_order_labels, population_from_spec

    spec = without_exploratory_blocks(load_spec(model), "power",
                                      "its population would be of the block's unrotated loadings, which no report shows")
    statement = group_statement(spec)
    if statement is not None:
        raise OptionError(f"the model has {statement}, which needs groups; the difference test's power is planned for "
                          f"one group")
    if spec.ordinal:
        raise OptionError(f"{Option.NESTED_MODEL} applies to continuous items only so far: the adjusted difference "
                          f"test of ordinal items is not planned; remove the 'ordinal' statements to plan continuous "
                          f"answers")
    if n_obs is not None:
        n_obs = check.observations(n_obs, "the sample size", minimum=2)
    alpha = check.probability("alpha (the significance level)", alpha)
    target_power = check.probability("the target power", target_power)
    if target_power <= alpha:
        raise OptionError(f"the target power ({user_number(target_power)}) is not above the significance level "
                          f"({user_number(alpha)}): the test rejects at least that often at any sample size; give a "
                          f"target above {user_number(alpha)} (.80 is common practice)")
    population = population_from_spec(spec)
    plan = nested_plan(spec, nested_model, population)
    if plan.discrepancy < 1e-10:
        raise OptionError(f"the nested model ({Option.NESTED_MODEL}) holds in the population the model file's values "
                          f"describe (it reproduces that covariance matrix), so the difference test rejects at alpha "
                          f"at every sample size and no N reaches a power; give the values that differ with 'start' "
                          f"statements (a factor correlation below 1, say)")
    df = plan.df_difference
    lo, hi = 2, 4
    while approximate_power(plan.discrepancy, df, hi, alpha) < target_power:
        lo, hi = hi, hi * 2
        if hi > largest:
            raise OptionError(f"more than {largest:,} observations would be needed")
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if approximate_power(plan.discrepancy, df, mid, alpha) >= target_power:
            hi = mid
        else:
            lo = mid
    required, note = least_rows(hi, len(spec.observed_names))
    labels = model_order_labels(population.table)
    free = population.table.n_free
    clusters = cluster_plan(required, design_effect, cluster_size, intraclass)
    effective = effective_rows(n_obs, clusters) if clusters is not None and n_obs is not None else None
    below = rows_rule_judged(free, required, n_obs, effective)  # as independent rows
    at = effective if effective is not None else n_obs
    return NestedPower(plan, alpha, n_obs, approximate_power(plan.discrepancy, df, at, alpha) if n_obs is not None else None,
                       required, target_power, tuple(labels.get(x, x) for x in population.defaulted),
                       clusters, note, population, below, effective)
