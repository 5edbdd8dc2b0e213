"""The population of a design with several groups, for planning an invariance study by simulation.

Each group's items have the means and covariances that the model's matrices give
(Sörbom 1974: mu = nu + Lambda (I - B)^-1 alpha, Sigma = Lambda (I - B)^-1 Psi (I - B)^-T Lambda' + Theta).
The values shared by every group are those of the one-group population of the
model file (:func:`cfa_tool.workflows.simulation.population_from_spec`: 'start'
and 'fix' statements, standardized defaults beside them); intercepts and factor
means are 0 unless a statement gives them (an earlier fit's item means are the
intercepts when the population comes from it); an ``in group NAME:`` statement gives
a value for that group alone, which is how a researcher states the difference a
study should detect (a loading of .8 instead of 1 in one language version: values in the model's own units, a
marker's loading being 1, not standardized ones).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from cfa_tool.numbers import user_number, word_list
from cfa_tool import options as check
from cfa_tool.errors import ModelError, OptionError
from cfa_tool.language.checks import all_refs
from cfa_tool.language.names import written_group, written_name
from cfa_tool.language.spec import ParameterRef, Spec
from cfa_tool.model.implied import ModelMatrices, StructuredModel
from cfa_tool.model.parameters import ParameterTable
from cfa_tool.numerics.linalg import log_det_pd
from cfa_tool.workflows.simulation import Population, given_values_possible, population_from_spec

#: parameters the one-group population cannot hold (it has no mean structure): given per group here
MEAN_KINDS = ("intercept", "mean")
#: the kinds a difference between groups can concern, in the order a report lists them
DIFFERENCE_KINDS = ("loading", "intercept", "residual_variance", "residual_covariance", "factor_variance",
                    "factor_covariance", "mean")


@dataclass(frozen=True)
class GroupDifference:
    """A population value of one group that differs from the first (reference) group's."""

    kind: str
    variables: tuple[str, ...]
    group: str
    value: float
    reference_value: float
    # an intercept's: the item's standard deviation in the reference group's population, the unit in which
    # :meth:`standard_deviations` measures the difference (None for other kinds)
    reference_sd: float | None = None

    def standard_deviations(self) -> float | None:
        """An intercept's difference from the reference group's in the item's standard deviations there (None for
        other kinds)."""
        if self.reference_sd is None or not self.reference_sd > 0:
            return None
        return abs(self.value - self.reference_value) / self.reference_sd

    def far(self) -> bool:
        """Whether an intercept lies :data:`FAR_INTERCEPT_SDS` or more of the item's standard deviations from the
        reference group's: a shift no study expects, the mark of a value written as a shift where the plan takes the
        intercept itself (new-user trial s27: '.3' for '.3 higher' against 4.29, a power of 1.00)."""
        size = self.standard_deviations()
        return size is not None and size >= FAR_INTERCEPT_SDS

    def to_dict(self) -> dict:
        return {"kind": self.kind, "variables": list(self.variables), "group": self.group, "value": self.value,
                "reference_value": self.reference_value} | (
                    {"reference_sd": self.reference_sd} if self.reference_sd is not None else {})


#: an intercept this many of the item's standard deviations from the reference group's is a caution first in a plan
#: (a rule of this project: measurement-invariance studies report intercept differences of a fraction of an item's
#: standard deviation, and 2 is far beyond them; not a published cutoff)
FAR_INTERCEPT_SDS = 2.0


@dataclass(frozen=True, eq=False)
class GroupPopulation:
    """Each group's population moments, the one-group population of the values all groups share, and the values
    in which the groups differ."""

    spec: Spec
    labels: tuple[str, ...]
    sigmas: tuple[np.ndarray, ...]
    means: tuple[np.ndarray, ...]
    shared: Population
    differences: tuple[GroupDifference, ...]

    @property
    def observed(self) -> tuple[str, ...]:
        return self.shared.observed

    def named_groups(self) -> tuple[str, ...]:
        """The groups the model's 'in group' statements name."""
        return groups_named(self.spec)


def designs_of(value: object) -> tuple[tuple[str, ...], tuple[tuple[int, ...], ...]]:
    """The groups and their sizes: text such as 'north=300,south=200' (several designs: 'north=100/200,south=100/200',
    the k-th size of every group together), or a dict {'north': 300, 'south': 200} (a list of sizes per group for
    several designs).  Returns (the groups in the order given, each design's sizes in that order); designs are
    sorted from the smallest total."""
    name = check.Option.GROUP_SIZES
    if isinstance(value, str):
        parts = [part.strip() for part in value.split(",")]
        pairs = []
        for part in parts:
            label, equals, sizes = part.partition("=")
            if not equals or not label.strip() or not sizes.strip():
                raise OptionError(f"{name}: each group is written NAME=SIZE (north=300,south=200), not '{part}'")
            if "=" in sizes:  # 'a=100;b=100' (hostile s24: read as one group 'a' of size '100;b=100')
                raise OptionError(f"{name}: groups are separated by commas (north=300,south=200), so '{part}' "
                                  f"reads as one group; write a comma between the groups")
            pairs.append((label.strip(), sizes.strip().split("/")))
    elif isinstance(value, dict):
        pairs = [(str(k), list(v) if isinstance(v, (list, tuple)) else [v]) for k, v in value.items()]
    else:
        raise OptionError(f"{name} must be text such as 'north=300,south=200' or a dict of group sizes, not "
                          f"{type(value).__name__}")
    labels = tuple(label for label, _ in pairs)
    if len(set(labels)) < len(labels):
        twice = next(x for x in labels if labels.count(x) > 1)
        raise OptionError(f"{name}: group {written_group(twice, labels)} is given twice; give each group once")
    if len(labels) < 2:
        raise OptionError(f"{name}: an invariance design needs at least two groups, and {len(labels)} is given")
    counts = {len(sizes) for _, sizes in pairs}
    if len(counts) > 1:
        raise OptionError(f"{name}: every group needs as many sizes as the others (one per design, separated by "
                          f"'/'), and they have {', '.join(f'{written_group(label, labels)}: {len(s)}' for label, s in pairs)}")
    sized = [[check.observations(int(s) if isinstance(s, str) and s.strip().isdigit() else s,
                                 f"{name}: the size of group {written_group(label, labels)}") for s in sizes]
             for label, sizes in pairs]
    designs = sorted(set(zip(*sized)), key=lambda d: (sum(d), d))
    if len(designs) < counts.pop():
        raise OptionError(f"{name}: a design is given twice; give each once")
    return labels, tuple(designs)


def _shared_only(spec: Spec) -> Spec:
    """``spec`` without what needs groups or a mean structure (statements for one group, intercepts and factor
    means, 'noninvariant'): the one-group model whose population every group shares."""

    def kept(ref: ParameterRef) -> bool:
        return ref.group is None and ref.kind not in MEAN_KINDS

    def settings(items):
        return tuple(replace(s, refs=tuple(r for r in s.refs if kept(r))) for s in items
                     if any(kept(r) for r in s.refs))

    return replace(spec, starts=settings(spec.starts), fixed=settings(spec.fixed), bounds=settings(spec.bounds),
                   freed=tuple(r for r in spec.freed if kept(r)),
                   equal=tuple(g for g in spec.equal if all(kept(r) for r in g)), noninvariant=())


def groups_named(spec: Spec) -> tuple[str, ...]:
    """The groups that the model's 'in group' statements name, in the order of the statements."""
    return tuple(dict.fromkeys(r.group for r in all_refs(spec) if r.group is not None))


def check_groups_named(spec: Spec, labels: tuple[str, ...]) -> None:
    """A one-line error naming the groups that the model's 'in group' statements name and the sizes do not give (a
    group of the sizes that no statement names takes the shared values, which the report says)."""
    missing = [g for g in groups_named(spec) if g not in labels]
    if missing:
        raise OptionError(f"the model file names {'groups' if len(missing) > 1 else 'group'} "
                          f"{word_list(written_group(g, missing) for g in missing)} in 'in group' statements, "
                          f"which {check.Option.GROUP_SIZES} does not give (it gives "
                          f"{word_list(written_group(g, labels) for g in labels)}); give "
                          f"{'their sizes' if len(missing) > 1 else 'its size'} or correct the name")


def answers_in_categories_refused(instead: str) -> str:
    """Why a plan of several groups (power-simulation --group-sizes) takes no answers in categories, and what to do
    instead: the one wording of each such refusal (an 'ordinal' or 'answers' statement, the number of categories or
    an ordinal estimator given, an ordinal fit as the population), ``instead`` saying how to plan continuous answers
    from what was given.  The ladder of ordinal items holds thresholds equal first (Wu & Estabrook 2016), which the
    plan's ladder of continuous items does not simulate, and answers cut into a few categories carry less information
    than the continuous answers behind them (Cohen 1983, The cost of dichotomization, recalled from memory: a median
    split leaves a correlation about .8 of its value), so a plan of continuous answers is likely optimistic: the sizes
    it finds are the least the study needs, not enough."""
    return (f"planning an invariance study ({check.Option.GROUP_SIZES}) does not simulate answers in categories yet: "
            f"the ladder of ordinal items (thresholds held equal first; Wu & Estabrook 2016) is not simulated, and a "
            f"plan of continuous answers would misstate answers in a few categories, which carry less information "
            f"(its power likely too high, its group sizes too small); instead, {instead} and take the group sizes it "
            f"finds as the least the study needs, and check that each group's size estimates the model in the "
            f"categories with the power of one group (without {check.Option.GROUP_SIZES}), which simulates and fits "
            f"answers in categories")


def group_population(spec: Spec, labels: tuple[str, ...], configural: Spec, fitted=None) -> GroupPopulation:
    """The population of each group in ``labels`` (the first the reference group), with ``configural`` the model
    with no equality across groups (whose table lays out every group's parameters); ``fitted``: an earlier
    continuous fit of one group whose estimates every group shares (simulation.population_from_spec), its item means
    every group's intercepts unless a statement gives them (without a fit, intercepts are 0 unless a statement gives
    them)."""
    from cfa_tool.pipeline.continuous import model_structure

    check_groups_named(spec, labels)
    shared = population_from_spec(_shared_only(spec), fitted)
    if fitted is not None:
        if shared.thresholds is not None:
            raise OptionError(f"{shared.fitted_from}: the fit is of ordinal items, and "
                              + answers_in_categories_refused("plan continuous answers from a continuous fit of the "
                                                              "items"))
    shared_model = StructuredModel(shared.table)
    value_of = {(par.kind, par.variables): float(v) for par, v in
                zip(shared.table.parameters, shared_model.entry_values(shared.theta))}
    if shared.means is not None:  # an earlier fit's item means are every group's intercepts (its factor means 0)
        # unless a statement gives them: 'in group new: start intercept(x) = 3.45' is then in the fit's units, as
        # every other value (newuser s24: they were 0, so a shift of .4 written as 3.45 was planned as 3.45)
        value_of.update({("intercept", (x,)): float(v) for x, v in zip(shared.table.observed, shared.means)})
    table, model = model_structure(configural, labels, True)
    theta = np.full(table.n_free, np.nan)
    for par in table.parameters:
        if len(par.terms) == 1 and par.terms[0][1] == 1.0 and par.offset == 0.0:
            k = par.terms[0][0]
            if np.isnan(theta[k]):
                given = table.start[k]
                theta[k] = given if np.isfinite(given) else value_of.get((par.kind, par.variables), 0.0)
    if np.isnan(theta).any():  # pragma: no cover - every free parameter of a model with groups is one entry somewhere
        raise OptionError("a population value could not be laid out for every group")
    values = model.entry_values(theta)
    for g, label in enumerate(labels):  # a group's values checked as the shared ones are, at their statements
        given_values_possible(spec, table, values, g, label)
    factor_means = _factor_means(spec, table)
    mats = []
    for g, label in enumerate(labels):
        m = model.matrices(theta, g)
        mats.append(ModelMatrices(m.L, m.B, m.P, m.T, m.N, factor_means[g]))
    sigmas = tuple(np.array(m.implied_covariance()) for m in mats)
    means = tuple(np.array(m.implied_mean()) for m in mats)
    for label, sigma in zip(labels, sigmas):
        if log_det_pd(sigma) is None:
            own = [(ref, s.value, how) for how, settings in (("start", spec.starts), ("fix", spec.fixed))
                   for s in settings for ref in s.refs if ref.group == label]
            listed = "; ".join(f"line {ref.location.line}: {how} {ref} = {user_number(value)}" for ref, value, how in own)
            message = (f"the population values of group {written_group(label, labels)} imply a covariance matrix "
                       f"that is not positive definite or not finite: check its 'in group {written_name(label)}:' "
                       f"values"
                       + (f" ({listed})" if own else ""))
            if own:
                raise ModelError(message, own[0][0].location, spec.source_line(own[0][0].location))
            raise OptionError(message)
    return GroupPopulation(spec, labels, sigmas, means, shared, _differences(table, model.entry_values(theta),
                                                                             factor_means, labels, sigmas[0]))


def _factor_means(spec: Spec, table: ParameterTable) -> list[np.ndarray]:
    """Each group's factor means: 0, or the value of a 'start' or 'fix' statement (one for every group first, then
    those for one group, which override them)."""
    means = [np.zeros(len(table.latent)) for _ in table.groups]
    settings = [(ref, s.value) for s in spec.starts + spec.fixed for ref in s.refs if ref.kind == "mean"]
    for ref, value in sorted(settings, key=lambda rv: rv[0].group is not None):
        for g, label in enumerate(table.groups):
            if ref.group is None or ref.group == label:
                means[g][table.latent.index(ref.names[0])] = value
    return means


def _differences(table: ParameterTable, values: np.ndarray, factor_means: list[np.ndarray],
                 labels: tuple[str, ...], reference_sigma: np.ndarray) -> tuple[GroupDifference, ...]:
    """The values of each later group that differ from the reference group's, loadings first; an intercept's with
    the item's standard deviation in the reference group's population (``reference_sigma``)."""
    reference = {(par.kind, par.variables): float(v) for par, v in zip(table.parameters, values) if par.group == 0}
    out = []
    for par, v in zip(table.parameters, values):
        if par.group == 0 or par.kind not in DIFFERENCE_KINDS or par.kind == "mean":
            continue
        first = reference.get((par.kind, par.variables))
        if first is not None and not np.isclose(v, first, rtol=1e-9, atol=1e-12):
            sd = None
            if par.kind == "intercept" and par.variables[0] in table.observed:
                i = table.observed.index(par.variables[0])
                sd = float(np.sqrt(reference_sigma[i, i]))
            out.append(GroupDifference(par.kind, par.variables, labels[par.group], float(v), first, sd))
    for g in range(1, len(labels)):
        for f, (value, first) in enumerate(zip(factor_means[g], factor_means[0])):
            if value != first:
                out.append(GroupDifference("mean", (table.latent[f],), labels[g], float(value), float(first)))
    return tuple(sorted(out, key=lambda d: DIFFERENCE_KINDS.index(d.kind)))
