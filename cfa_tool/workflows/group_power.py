"""Sample-size planning for a measurement-invariance study: Monte Carlo power of the invariance ladder.

Each replication draws every group's rows from its population (:mod:`cfa_tool.workflows.group_population`),
fits the ladder the ``invariance`` command fits (configural, metric, scalar and, when asked, strict: the
models and difference tests of :mod:`cfa_tool.workflows.invariance`, never a copy) and records whether each
step's difference test rejects it at alpha.  The share of replications rejecting a step is its power when
the step's equalities do not hold in the population, and its false-alarm rate when they do (Muthén & Muthén
2002 for power by simulation).  Beside it, the power the noncentral chi-square gives (Satorra & Saris 1985):
the noncentrality of a step is N times the rise in the minimum discrepancy when the step's model, and the one
before it, are fitted to the population moments themselves.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from enum import Enum

import numpy as np

from cfa_tool.numbers import discrepancy_text, user_number
from cfa_tool import options as check
from cfa_tool.assessment.admissibility import counted_problems, replicated_problems
from cfa_tool.data.moments import SampleMoments
from cfa_tool.errors import CfaError, EstimationError, ModelError, OptionError, printable
from cfa_tool.language.names import names_text, written_group
from cfa_tool.language.spec import Spec
from cfa_tool.method import DifferenceMethod
from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.plain import clean
from cfa_tool.views import Presentable
from cfa_tool.workflows.group_population import (GroupPopulation, answers_in_categories_refused, designs_of,
                                                  group_population)
from cfa_tool.workflows.invariance import LEVELS, NormalLadder, ref_kind, rejected_by_test, spec_of_level
from cfa_tool.workflows.nesting import NESTING_TOLERANCE
from cfa_tool.workflows.parallel import run_tasks

#: the levels a plan may stop at (the ladder of the invariance command for continuous items)
HIGHEST_LEVELS = tuple(level for level, _, _ in LEVELS[1:])
DEFAULT_HIGHEST = "scalar"
#: the group column the fits name (simulated groups come from no data file)
SIMULATED_GROUPS = "simulated group"


class StepRole(Enum):
    """What the share of replications rejecting a step measures, read from the population."""

    POWER = "power"  # the step's model misfits the population and the model before it does not
    FALSE_ALARM = "false-alarm rate"  # the step's model reproduces the population exactly
    AFTER_MISFIT = "rejection rate after a misfitting step"  # the model before it already misfits the population
    NOT_TESTED = "nothing: the step adds no equality"  # 0 df (e.g. every loading fixed in the model file)


@dataclass(frozen=True)
class StepPower:
    """One step of the ladder at one design: how often its difference test rejected it."""

    level: str
    versus: str  # the level it is tested against
    role: StepRole
    df: int
    noncentrality: float  # Satorra & Saris (1985): N times the rise of the population discrepancy
    approximate_power: float  # the noncentral chi-square's rejection probability at alpha
    rejected: int
    counted: int  # replications whose every fit converged
    inadmissible: int  # of those, replications whose fit of this level is not admissible
    inadmissible_named: str

    @property
    def share(self) -> float:
        return self.rejected / self.counted if self.counted else float("nan")

    @property
    def standard_error(self) -> float:
        """The Monte Carlo standard error of the share, sqrt(p (1 - p) / R) (binomial)."""
        p = self.share
        return math.sqrt(p * (1 - p) / self.counted) if self.counted else float("nan")

    def to_dict(self) -> dict:
        return {"level": self.level, "tested_against": self.versus, "measures": self.role.value, "df": self.df,
                "rejection_share": self.share, "monte_carlo_se": self.standard_error, "rejected": self.rejected,
                "replications_counted": self.counted, "noncentrality": self.noncentrality,
                "approximate_power": self.approximate_power, "inadmissible": self.inadmissible,
                "inadmissible_problems": self.inadmissible_named}


@dataclass(frozen=True)
class DesignPower:
    """The ladder's figures at one set of group sizes."""

    sizes: tuple[int, ...]
    replications: int
    converged: int  # replications whose every fit converged
    configural_inadmissible: int
    configural_problems: str
    steps: tuple[StepPower, ...]

    @property
    def total(self) -> int:
        return sum(self.sizes)

    def to_dict(self, labels: tuple[str, ...]) -> dict:
        return {"group_sizes": dict(zip(labels, self.sizes)), "replications": self.replications,
                "converged": self.converged, "configural_inadmissible": self.configural_inadmissible,
                "configural_inadmissible_problems": self.configural_problems,
                "steps": [s.to_dict() for s in self.steps]}


@dataclass(frozen=True, eq=False)
class InvariancePower(Presentable):
    """Monte Carlo power (or false-alarm rate) of each step of the invariance ladder at one or several designs."""

    population: GroupPopulation
    designs: tuple[DesignPower, ...]
    replications: int
    alpha: float
    seed: int
    method: DifferenceMethod

    @property
    def labels(self) -> tuple[str, ...]:
        return self.population.labels

    def to_dict(self) -> dict:
        return clean({"groups": list(self.labels), "reference_group": self.labels[0], "replications": self.replications,
                "alpha": self.alpha, "seed": self.seed, "difference_test": self.method.value,
                "difference_test_described": self.method.phrase,
                "designs": [d.to_dict(self.labels) for d in self.designs],
                "population_differences": [d.to_dict() for d in self.population.differences],
                "population": self.population.shared.values(),
                "population_defaults": list(self.population.shared.defaulted)})


@dataclass(frozen=True)
class _Draw:
    """One replication's ladder: whether every fit converged, each step's rejection, each level's problems."""

    converged: bool
    rejected: tuple[bool, ...] = ()
    problems: tuple[tuple[str, ...], ...] = ()
    method: DifferenceMethod | None = None


def _ladder_of(spec: Spec, highest: str) -> tuple[tuple[str, Spec], ...]:
    """(level, model) of each level up to ``highest``, as the invariance command fits them.  Without the model
    file's 'start' statements: here they are the population's values (one for every group, and 'in group'
    values that differ from it), not starting values, and a level that holds such a parameter equal across groups
    could take only one of them."""
    fitted = replace(spec, starts=())
    out = []
    for level, classes, _ in LEVELS:
        out.append((level, spec_of_level(fitted, classes, spec.noninvariant)))
        if level == highest:
            break
    return tuple(out)


def _statement_of(difference, statements):
    """The reference of the 'in group' statement among ``statements`` ('start' or 'fix' settings) that gives a
    group's population ``difference`` (group_population.GroupDifference), or None."""
    word = ref_kind(difference.kind)
    return next((r for s in statements for r in s.refs if r.group == difference.group and r.kind == word
                 and sorted(r.names) == sorted(difference.variables)), None)


def _differences_tested(spec: Spec, population: GroupPopulation, highest: str) -> None:
    """An error at the 'in group' statement whose population difference only a step beyond ``highest`` tests (an
    intercept with the ladder stopping at metric, a residual variance before strict): up to ``highest`` those
    parameters are free in each group, in every model fitted, so the difference cannot change any step's test; a
    plan with it would report the steps' rejection shares as if the stated difference had been looked for."""
    stop = HIGHEST_LEVELS.index(highest) + 1  # index in LEVELS
    tested_at = {kind: level for level, _, kinds in LEVELS for kind in kinds}
    for d in population.differences:
        level = tested_at.get(d.kind)
        if level is None or [name for name, _, _ in LEVELS].index(level) <= stop:
            continue
        ref = _statement_of(d, spec.starts + spec.fixed)
        labels = population.labels
        group, first = written_group(d.group, labels), written_group(labels[0], labels)
        what = f"{ref}" if ref is not None else f"{ref_kind(d.kind)}({names_text(d.variables)}) in group {group}"
        message = (f"{what} makes group {group} differ from group {first} ({user_number(d.value)} against "
                   f"{user_number(d.reference_value)}), which only the {level} step tests, and {check.Option.HIGHEST_LEVEL} "
                   f"{highest} stops before it: up to {highest} the parameter is free in each group, so the difference "
                   f"changes no step's test; give {check.Option.HIGHEST_LEVEL.given(level)} to plan for it, or remove "
                   f"the statement")
        location = ref.location if ref is not None else None
        raise ModelError(message, location, spec.source_line(location))


def _fixed_differences(spec: Spec, population: GroupPopulation) -> None:
    """An error at an 'in group' 'fix' statement that makes a group's population differ: the ladder's models keep
    every 'fix' (only 'start' values are population values alone, :func:`_ladder_of`), so each model fitted holds
    the difference and no step tests it; a plan with it would report a false-alarm rate where the groups differ."""
    for d in population.differences:
        ref = _statement_of(d, spec.fixed)
        if ref is None:
            continue
        message = (f"'fix' holds {ref} at {user_number(d.value)} (against {user_number(d.reference_value)} in group "
                   f"{written_group(population.labels[0], population.labels)}) in every model the ladder fits, so no step tests the difference; write "
                   f"'start' to give it as the population value, which the fitted models then estimate")
        raise ModelError(message, ref.location, spec.source_line(ref.location))


def _scaled_alike(spec: Spec, labels: tuple[str, ...], configural: Spec) -> None:
    """An error at the 'in group' statement that scales a factor differently in some group (another marker, or its
    variance instead of a loading): the factor is then not on the same metric in every group (the words of the
    invariance report's methods text), so the loadings the metric step holds equal are in different units, and a
    population difference in them is partly the scales' difference, which no step can test: the plan would report a
    false-alarm rate where the groups differ (hostile tester s14)."""
    from cfa_tool.model.description import describe
    from cfa_tool.model.parameters import build_parameter_table

    d = describe(configural, build_parameter_table(configural, labels))
    if not d.group_scales:
        return
    first = {s.factor: s for s in d.scales}
    factor, how = next((s.factor, [(label, t) for label, scales in d.group_scales for t in scales
                                   if t.factor == s.factor]) for s in d.scales
                       if any(t.factor == s.factor and t != s for _, scales in d.group_scales for t in scales))

    def words(scale) -> str:
        if scale.method == "marker":
            return f"by the loading of {scale.marker}"
        return {"variance": "by its variance", "effects": "by effects coding"}.get(scale.method,
                                                                                  "by a value the model fixes")

    ways = "; ".join(f"{words(t)} in group {written_group(label, labels)}" for label, t in how)
    settings = ([r for r in spec.freed] + [r for s in spec.fixed for r in s.refs])
    ref = next((r for r in settings if r.group is not None and r.names[0] == factor
                and r.kind in ("loading", "variance")), None)
    location = ref.location if ref is not None else None
    raise ModelError(f"factor '{factor}' is scaled differently in different groups ({ways}), so it is not on the same "
                     f"metric in every group: the loadings the metric step holds equal are in different units, and a "
                     f"difference between the groups' loadings cannot be told from the scales' difference, so no step "
                     f"tests it; scale '{factor}' alike in every group ({words(first[factor])}) and give a difference "
                     f"in a loading with 'in group NAME: start loading(...) = VALUE'", location,
                     spec.source_line(location))


def _fit_ladder(ladder: tuple[tuple[str, Spec], ...], groups: list, alpha: float | None) -> list:
    """Each level's (estimation, result, difference test against the level before or None), fitted and tested
    as the invariance command fits and tests them (:class:`~cfa_tool.workflows.invariance.NormalLadder`); the
    list stops at a level that did not converge."""
    from cfa_tool.numerics.threads import blas_threads_for
    from cfa_tool.pipeline.continuous import FitOptions

    fitting = NormalLadder()
    options = FitOptions(diagnostics=False, modification_indices=False)
    out = []
    previous, start = None, None
    with blas_threads_for(len(groups[0][1].names)):
        for k, (level, spec) in enumerate(ladder):
            est = fitting.estimate(spec, groups, options, start)
            if not est.converged:
                out.append((est, None, None))
                break
            if alpha is None:  # the population's discrepancies only
                out.append((est, None, None))
            else:
                result = fitting.assess(spec, groups, est, options, SIMULATED_GROUPS)
                test = (fitting.difference(est, result, previous, level, ladder[k - 1][0])
                        if previous is not None else None)
                out.append((est, result, test))
                previous = (est, result)
            start = est.theta
    return out


def _replication(task) -> _Draw:
    """Simulate every group's rows from its population and fit the ladder to them."""
    from cfa_tool.pipeline.continuous import moments_from_rows
    from cfa_tool.workflows.simulation import simulate_rows

    ladder, labels, sigmas, means, sizes, seed, alpha, names = task
    rng = np.random.default_rng(seed)
    groups = [(label, moments_from_rows(simulate_rows(sigma, n, rng, mu), names, source="<replication>"))
              for label, sigma, mu, n in zip(labels, sigmas, means, sizes)]
    try:
        fits = _fit_ladder(ladder, groups, alpha)
    except CfaError:  # a sample whose model cannot be estimated: counted as not converged
        return _Draw(False)
    if len(fits) < len(ladder) or not fits[-1][0].converged:
        return _Draw(False)
    problems = tuple(replicated_problems(est.table, est.model, est.theta)[0] for est, _, _ in fits)
    tests = [test for _, _, test in fits[1:]]
    return _Draw(True, tuple(rejected_by_test(t, alpha) for t in tests), problems, tests[0].method)


def _population_steps(population: GroupPopulation, ladder, sizes: tuple[int, ...]) -> list[tuple[int, float, bool]]:
    """Per level: (degrees of freedom, noncentrality N F, whether its model reproduces the population), from the
    level's model fitted to the population moments of groups of ``sizes`` (Satorra & Saris 1985)."""
    groups = [(label, SampleMoments(population.observed, sigma, mu, n, n, 0, "<population>"))
              for label, sigma, mu, n in zip(population.labels, population.sigmas, population.means, sizes)]
    fits = _fit_ladder(ladder, groups, None)
    if len(fits) < len(ladder) or not fits[-1][0].converged:
        level = ladder[len(fits) - 1][0]
        raise EstimationError(f"the {level} model could not be fitted to the population's moments (it did not "
                              f"converge): "
                              f"check the population values")
    out = []
    for est, _, _ in fits:
        df = est.likelihood.n_statistics - est.table.n_free
        out.append((df, sum(sizes) * max(float(est.value), 0.0), float(est.value) < NESTING_TOLERANCE))
    if not out[0][2]:
        raise ModelError(f"the configural model does not reproduce the population (minimum discrepancy "
                         f"{discrepancy_text(fits[0][0].value)}): a value given for one group is fixed in a way the model of that "
                         f"group cannot take; check the 'in group' statements")
    return out


def approximate_power(df: int, noncentrality: float, alpha: float) -> float:
    """The probability that a chi-square difference on ``df`` degrees of freedom exceeds its 1 - alpha quantile
    when it follows the noncentral chi-square with this noncentrality (Satorra & Saris 1985)."""
    if df < 1:
        return float("nan")
    return float(dist.ncx2_sf(dist.chi2_ppf(1 - alpha, df), df, noncentrality)) if noncentrality > 0 else alpha


def invariance_power(model: str | Path | Spec, group_sizes: str | Mapping[str, int | Sequence[int]],
                     replications: int = 500, seed: int = 1, alpha: float = 0.05, workers: int | None = None,
                     scheduler: str | None = None, progress: Callable[..., None] | None = None,
                     highest_level: str = DEFAULT_HIGHEST, population=None) -> InvariancePower:
    """Monte Carlo power of the invariance ladder for groups of the given sizes (``group_sizes``: text such as
    'north=300,south=200', 'north=100/200,south=100/200' for several designs, or a dict), from the model's
    population values ('start' and 'fix' statements; 'in group NAME:' ones for one group), up to
    ``highest_level`` (metric, scalar or strict).  The first group is the reference group.  ``population``: an
    earlier continuous fit of the model to one group (a fit result, its JSON dict or the JSON file), whose estimates
    every group shares in place of the model file's values and defaults; 'in group NAME:' statements still give the
    differences (new-user trial s21: a plan could not start from the fit, and planned from defaults in silence)."""
    from cfa_tool.pipeline.inputs import load_spec, without_exploratory_blocks

    spec = without_exploratory_blocks(load_spec(model), "power-simulation",
                                      "a population needs every loading, and a block's loadings are known only up to "
                                      "its rotation")
    replications = check.replications(replications, minimum=2)
    seed = check.seed(seed)
    check.workers(workers, scheduler)
    alpha = check.probability("alpha (the level of the difference tests)", alpha)
    if highest_level not in HIGHEST_LEVELS:
        raise OptionError(f"{check.Option.HIGHEST_LEVEL} must be one of {', '.join(HIGHEST_LEVELS)}, not "
                          f"{highest_level!r}")
    labels, designs = designs_of(group_sizes)
    if spec.invariant:
        where = spec.equalities_location
        raise ModelError("the invariance ladder sets the equalities of each level itself; remove 'invariance' and "
                         "'equal across groups' statements from the model file", where, spec.source_line(where))
    _refuse_answers_in_categories(spec)
    p = len(spec.observed_names)
    for design in designs:
        for label, n in zip(labels, design):
            if n <= p + 1:
                raise OptionError(f"the size {n} of group {written_group(label, labels)} is too small for {p} variables: each simulated "
                                  f"group needs at least {p + 2} rows (a factor analysis far more)")
        if sum(design) * p > check.MAX_SIMULATED_CELLS:
            raise OptionError(f"{sum(design):,} rows of {p} variables are more than {check.MAX_SIMULATED_CELLS:,} "
                              f"values per simulated data set; plan with smaller groups")
    ladder = _ladder_of(spec, highest_level)
    configural = spec_of_level(spec, LEVELS[0][1], spec.noninvariant)
    # first: it names a group the sizes do not give
    population = group_population(spec, labels, configural, population)
    _scaled_alike(spec, labels, configural)
    _fixed_differences(spec, population)
    _differences_tested(spec, population, highest_level)
    truth = [_population_steps(population, ladder, design) for design in designs]
    # one design keeps the seeds one sample size has; several take one stream per design from the same seed
    streams = ([np.random.SeedSequence(seed)] if len(designs) == 1
               else np.random.SeedSequence(seed).spawn(len(designs)))
    tasks = [(ladder, labels, population.sigmas, population.means, design, int(s), alpha, population.observed)
             for design, stream in zip(designs, streams) for s in stream.generate_state(replications)]
    draws = run_tasks(_replication, tasks, workers, scheduler, progress)
    results = []
    for k, design in enumerate(designs):
        mine = draws[k * replications:(k + 1) * replications]
        results.append(_design_power(ladder, design, replications, mine, truth[k], alpha))
    method = next((d.method for d in draws if d.converged), DifferenceMethod.LIKELIHOOD_RATIO)
    return InvariancePower(population, tuple(results), replications, alpha, seed, method)


def _refuse_answers_in_categories(spec: Spec) -> None:
    """An 'ordinal' or 'answers' statement refused at its line (its source line shown), saying why and what to do
    (group_population.answers_in_categories_refused): planning with groups simulates continuous answers, fitted by the
    ladder of continuous items, and items answered in a few categories are not continuous answers, whose power a plan
    of continuous ones would overstate."""
    if not spec.ordinal and not spec.answers:
        return
    if spec.ordinal:
        name = spec.ordinal[0]
        what, location = f"the model declares '{printable(name.text)}' ordinal", name.location
    else:
        coding = spec.answers[0]
        items = [x for x, c in spec.answer_codings().items() if c is coding]
        covered = (f"'{printable(items[0])}'" if len(items) == 1 else
                   f"{len(items)} items ('{printable(items[0])}' first)") if items else "no item of the model"
        what, location = (f"{coding.origin} records the answers of {covered} in {len(coding.codes())} categories",
                          coding.location)
    instead = ("plan continuous answers from a copy of the model file without the statement (a continuous fit made "
               f"with it still gives the population, {check.Option.POPULATION_FROM})")
    raise ModelError(f"{what}, and {answers_in_categories_refused(instead)}", location, spec.source_line(location))


def _design_power(ladder, design: tuple[int, ...], replications: int, draws: list[_Draw], truth, alpha: float
                  ) -> DesignPower:
    """Each step's share of rejections among the replications whose every fit converged."""
    ok = [d for d in draws if d.converged]
    if not ok:
        raise EstimationError(f"no replication converged at group sizes {', '.join(map(str, design))}; check the "
                              f"population values and the group sizes")
    steps = []
    for k in range(1, len(ladder)):
        df_before, lam_before, holds_before = truth[k - 1]
        df, lam, holds = truth[k]
        step_df, step_lam = df - df_before, max(lam - lam_before, 0.0) if not holds else 0.0
        role = (StepRole.NOT_TESTED if step_df == 0 else StepRole.FALSE_ALARM if holds else
                StepRole.POWER if holds_before else StepRole.AFTER_MISFIT)
        count, named = counted_problems(d.problems[k] for d in ok)
        steps.append(StepPower(ladder[k][0], ladder[k - 1][0], role, step_df, step_lam,
                               # after a misfitting step the noncentral approximation does not hold (review s11)
                               float("nan") if role in (StepRole.AFTER_MISFIT, StepRole.NOT_TESTED) else
                               approximate_power(step_df, step_lam, alpha), sum(d.rejected[k - 1] for d in ok),
                               len(ok), count, named))
    count, named = counted_problems(d.problems[0] for d in ok)
    return DesignPower(design, replications, len(ok), count, named, tuple(steps))
