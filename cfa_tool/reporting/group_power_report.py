"""The report of a sample-size plan for an invariance study (cfa_tool.workflows.group_power): how often each step
of the ladder was rejected, per design, with the population drawn from.  Problems of the replicated solutions
come first."""

from __future__ import annotations

import math
from dataclasses import replace

from cfa_tool.model.description import parameter_words
from cfa_tool.numbers import count_text
from cfa_tool.note_parts import Command, Note, Text, joined
from cfa_tool.reporting.document import Report, ResultKind
from cfa_tool.reporting.numbers import est_num, unit, word_list
from cfa_tool.reporting.tables import HIGH_STAKES_NOTE, _table
from cfa_tool.reporting.workflow_tables import _notice, defaults_caution, population_parts
from cfa_tool.workflows.group_power import StepRole

#: why a step after a misfitting one measures neither power nor a false-alarm rate
AFTER_MISFIT_CAUTION = ("A step tested after a step whose equalities already fail in the population compares two "
                        "models that both misfit: its rejection share is neither a power nor a false-alarm rate (the "
                        "invariance command marks such a step as conditional on a rejected step).")


def _sizes(labels, sizes) -> str:
    return ", ".join(f"{label} {count_text(n)}" for label, n in zip(labels, sizes))


def _difference_words(result) -> str:
    """The population values in which the groups differ, in words."""
    observed = result.population.observed
    parts = [f"{parameter_words(d.kind, d.variables, observed=frozenset(observed))} ({d.group} {est_num(d.value, 2)}, "
             f"{result.labels[0]} {est_num(d.reference_value, 2)})" for d in result.population.differences]
    if not parts:
        return ("The groups share every population value, so every step's equalities hold in the population and its "
                "rejection share is a false-alarm rate (nominal alpha).")
    return f"The populations of the groups differ in {word_list(parts)}; every other value is shared."


def _inadmissible_cautions(result) -> tuple[str, ...]:
    """A caution, first, per design and level at which some converged replications' solutions are not admissible."""
    out = []
    for d in result.designs:
        where = f" at group sizes {_sizes(result.labels, d.sizes)}" if len(result.designs) > 1 else ""
        found = [("configural", d.configural_inadmissible, d.configural_problems)]
        found += [(s.level, s.inadmissible, s.inadmissible_named) for s in d.steps]
        out += [f"The {level} model's solution is not admissible, as a single fit would judge it, in {count_text(count)} of the "
                f"{count_text(d.converged)} converged replications{where} ({named}); they are included in the rejection shares"
                for level, count, named in found if count]
    return tuple(out)


def _far_value_cautions(result) -> tuple[Text, ...]:
    """A caution, first, per intercept a group's plan sets far from the reference group's
    (workflows.group_population.GroupDifference.far): an 'in group' value is the intercept itself, in the model's
    units (an earlier fit's, from its item means), not a shift, and a difference so large makes every step's power
    about 1 and may make replications' solutions inadmissible (new-user trial s27)."""
    observed = frozenset(result.population.observed)
    out = []
    for d in result.population.differences:
        if not d.far():
            continue
        what = parameter_words(d.kind, d.variables, observed=observed, article=False)
        shifted = d.reference_value + d.value
        out.append(Note((f"Group {d.group}'s {what} is {est_num(d.value, 2)} against {est_num(d.reference_value, 2)} "
                         f"in {result.labels[0]}, {est_num(d.standard_deviations(), 1)} standard deviations of the item "
                         f"({est_num(d.reference_sd, 2)}) away: the value",
                         Command(" of an 'in group' statement"),
                         " is the intercept itself, in the model's units, not a shift from the other group, and a "
                         "difference this large makes the power of the steps that test it about 1"
                         + (" and may leave replications' solutions inadmissible" if any(
                             d2.configural_inadmissible or any(s.inadmissible for s in d2.steps)
                             for d2 in result.designs) else "")
                         + f". If you meant a shift of {est_num(d.value, 2)}, give the intercept "
                           f"{est_num(shifted, 2)} (the other group's {est_num(d.reference_value, 2)} plus "
                           f"{est_num(d.value, 2)}).")))
    return tuple(out)


def invariance_power_report(result) -> Report:
    labels = result.labels
    levels = [result.designs[0].steps[0].versus] + [s.level for s in result.designs[0].steps]
    lines = [f"Groups: {word_list([f'{labels[0]} (the reference group)', *labels[1:]])}; each replication draws "
             f"every group's rows from its population and fits the {word_list(levels)} models as the invariance "
             f"command fits them, each tested against the one before by {result.method.phrase} at alpha "
             f"{unit(result.alpha, 2)}.",
             "Converged (every model of the ladder): " + "; ".join(
                 f"{count_text(d.converged)} of {count_text(d.replications)}" + (f" at {_sizes(labels, d.sizes)}"
                                                         if len(result.designs) > 1 else "")
                 for d in result.designs) + ".",
             _difference_words(result)]
    named = result.population.named_groups()
    unnamed = [label for label in labels if label not in named]
    if named and unnamed:  # groups of the sizes that no 'in group' statement names: said, so a misspelling shows
        lines.append(Note((f"The model gives no values of its own to {word_list(unnamed)}",
                           Command(" (no 'in group' statement names them)" if len(unnamed) > 1 else
                                   " (no 'in group' statement names it)"),
                           f": {'their populations are' if len(unnamed) > 1 else 'its population is'} the shared one.")))
    declared = result.population.spec.noninvariant
    observed = frozenset(result.population.observed)
    every = [r for r in declared if r.group is None]
    one = [r for r in declared if r.group is not None]
    if every:  # partial invariance declared in the model file: the ladder leaves these free
        named = word_list([parameter_words(r.kind, r.names, observed=observed) for r in every])
        lines.append(f"The model declares {named} "
                     f"not equal across groups ('noninvariant'): each level leaves it free, as the invariance command "
                     f"does, so the steps test partial invariance.")
    if one:  # set apart in one group ('in group east: noninvariant ...'): free there, the other groups' held equal
        named = word_list([parameter_words(r.kind, r.names, r.group, observed=observed) for r in one])
        lines.append(f"The model sets {named} apart ('in group ...: noninvariant'): each level that holds "
                     f"{'its class' if len(one) == 1 else 'their classes'} equal sets "
                     f"{'it' if len(one) == 1 else 'each'} apart in that group and holds the other groups' equal, "
                     f"as the invariance command does, so the steps test partial invariance.")
    shared = result.population.shared
    several = len(result.designs) > 1  # the sizes of one design are in the title
    rows, values = [], []
    for d in result.designs:
        for s in d.steps:
            counted = s.role is not StepRole.NOT_TESTED  # a step of 0 df rejects nothing: no share to read
            rows.append([_sizes(labels, d.sizes)] * several + [
                f"{s.level} against {s.versus}", s.role.value, str(s.df), unit(s.share, 2) if counted else "",
                unit(s.standard_error, 3) if counted else "", unit(s.approximate_power, 2), str(s.inadmissible)])
            values.append([_sizes(labels, d.sizes), s.level, s.versus, s.role.value, s.df, s.share,
                           s.standard_error, s.approximate_power, s.noncentrality, s.inadmissible])
    table = _table("invariance_power", "Rejections of each step of the ladder",
                   [("Group sizes", "l")] * several + [
                       ("Step", "l"), ("Measures", "l"), ("df", "r"), ("Share rejecting", "r"), ("MC SE", "r"),
                       ("Approximation", "r"), ("Not admissible", "r")], rows,
                   f"Share rejecting: share of the replications whose every model converged in which the difference "
                   f"test rejected the step at alpha {unit(result.alpha, 2)}: the power when the step's equalities do "
                   f"not hold in the population, the false-alarm rate when they do (nominal "
                   f"{unit(result.alpha, 2)}). MC SE: its Monte Carlo standard error, \u221a(p(1 \u2212 p)/R). Approximation: "
                   f"the rejection probability of the noncentral chi-square whose noncentrality is N times the rise in "
                   f"the minimum discrepancy when the step's model and the one before are fitted to the population "
                   f"itself (Satorra & Saris 1985); none after a step the population already misfits, where it "
                   f"does not hold. It is a large-sample approximation: where it and the share rejecting differ by "
                   f"more than about two Monte Carlo standard errors, plan by the share rejecting. Not admissible: replications whose fit of the step's model is not "
                   f"admissible (kept in the shares).",
                   values=(["Group sizes", "Level", "Tested against", "Measures", "df", "Share rejecting",
                            "Monte Carlo SE", "Noncentral chi-square approximation", "Noncentrality",
                            "Not admissible"], values))
    tables = [table]
    if result.population.differences:
        observed = frozenset(result.population.observed)
        diff_rows = [[parameter_words(d.kind, d.variables, observed=observed, article=False), d.group, est_num(d.value),
                      est_num(d.reference_value)] for d in result.population.differences]
        tables.append(_table("group_differences", "Population values that differ between the groups",
                             [("Parameter", "l"), ("Group", "l"), ("Value", "r"), (f"In {labels[0]}", "r")], diff_rows,
                             Note(("Values the model file gives one group", Command(" ('in group' statements)"),
                                   ", in the model's own units; every other value is the same in every group (the "
                                   "population table below).")),
                             values=(["Parameter", "Group", "Value", f"Value in {labels[0]}"],
                                     [[parameter_words(d.kind, d.variables, observed=observed, article=False), d.group,
                                       d.value, d.reference_value] for d in result.population.differences])))
    line, population = population_parts(shared)
    tables.append(replace(population, title="Population values shared by the groups",
                          note=joined((line, "Intercepts and factor means are 0 unless the model gives them.",
                                       population.note))))
    cautions = [HIGH_STAKES_NOTE]
    if any(s.role is StepRole.AFTER_MISFIT for d in result.designs for s in d.steps):
        cautions.insert(0, AFTER_MISFIT_CAUTION)
    title = (f"Invariance power by simulation: {_sizes(labels, result.designs[0].sizes)}"
             if len(result.designs) == 1 else f"Invariance power by simulation at {len(result.designs)} designs")
    return Report(ResultKind.POWER_SIMULATION, f"{title}; {count_text(result.replications)} replications (seed {result.seed})",
                  _notice([], [*_far_value_cautions(result), *_inadmissible_cautions(result)]), tuple(lines),
                  tuple(tables),
                  cautions=tuple(cautions), warnings=_defaults_caution(shared) + _few_replications(result.replications))


def _defaults_caution(shared) -> tuple[Note, ...]:
    """The caution of population values shared by the groups that are the standardized defaults
    (workflow_tables.defaults_caution, the one caution of power-simulation with groups and without)."""
    if not shared.defaulted:
        return ()
    return (defaults_caution(f"{len(shared.defaulted)} of the population values shared by the groups are the "
                             f"standardized defaults",
                             "the rejection shares", "a continuous fit of the model to one group"),)


def _few_replications(replications: int) -> tuple[str, ...]:
    """A caution when the replications are too few for shares to two decimals: the Monte Carlo standard error of a
    share p from R replications is sqrt(p (1 - p) / R)."""
    if replications >= 100:
        return ()
    return (f"Only {count_text(replications)} replications: a power near .80 has a Monte Carlo standard error of about "
            f"{unit(math.sqrt(0.16 / replications), 2)}, and a false-alarm rate near .05 one of about "
            f"{unit(math.sqrt(0.0475 / replications), 2)}; give 500 or more (common practice) for shares to two decimals",)
