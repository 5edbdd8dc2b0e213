"""The reports of the workflows (comparisons, invariance ladders, replications, bootstrap, cutoffs, power,
Monte Carlo power, simulated data) and of a model check, each made once as a :class:`Report` whose tables
every writer draws.  Problems of a solution come first; the cautions come last."""

from __future__ import annotations

import math
from dataclasses import replace

from cfa_tool.numbers import count_text, counted, cut_list, discrepancy_text, user_number
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.assessment.admissibility import (DESIGN_CAUTIONS, WHY_NOT_ESTIMATED, ProblemKind, SAID_ONCE_FOR_RIVALS, design_cautions,
                                               design_cautions_by_kind, design_doubts, failure_words,
                                               not_admissible_sentence)
from cfa_tool.data.sample_design import SMALL_NUMBER_OF_CLUSTERS
from cfa_tool.data.summary_stats import given_with
from cfa_tool.data.groups import reference_words
from cfa_tool.data.halves import REPLICATE_NAMES, halves_named_alike
from cfa_tool.language.names import names_text, written_group, written_name
from cfa_tool.model.description import label_words, parameter_words
from cfa_tool.options import Option, taken_by
from cfa_tool.note_parts import Command, Name, Note, TableReference, Text, capitalised, joined
from cfa_tool.method import ADJUSTED_TEST, ORDINAL_FIT_CHANGE, ORDINAL_FIT_CHANGE_WHY, DifferenceMethod, FitTest, MissingData
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.document import Report, ResultKind
from cfa_tool.reporting.paragraph import (_loading_pairs, _parameter, cfi_not_defined_sentence, compared_cfi_not_defined,
                                          comparison_paragraph, set_apart_words, group_labels, design_sentence,
                                          mcar_score_tests, reversed_across_groups, reversed_loadings,
                                          invariance_paragraph, joined_sentence, replication_paragraph)
from cfa_tool.reporting.numbers import (est_num, est_unit, fit_index_text, guides_text, index_text, missing, needed_decimals, num,
                                        p_phrase, p_value, short, signed, signed_num, unit, word_list)
from cfa_tool.language.spec import equality_words
from cfa_tool.reporting.nested_power_report import boundary_words, nested_parts
from cfa_tool.reporting.tables import GUIDE_NOTE, HIGH_STAKES_NOTE, ProblemNotice, ReportTable, _table
from cfa_tool.workflows.invariance import CONFIGURAL_INDICES
from cfa_tool.workflows.nesting import REJECTED_RESTRICTION, BoundaryReading, heavy_tails_caution, rejects
from cfa_tool.workflows.power import effective_shown, fewest_rows

SOME_NOT_ADMISSIBLE = "Some solutions are not admissible: do not interpret them"
CHECK_SOLUTIONS = "Check before interpreting these solutions"  # the cautions of several models' solutions
SOME_NOT_ESTIMATED = "Some models could not be estimated: nothing of them is a result"
CHANGE_GUIDES = ("Changes in CFI and RMSEA are read against common-practice guides (a fall in CFI of more than .010, "
                 "Cheung & Rensvold 2002; a rise in RMSEA of .015 or more, Chen 2007), which are conventions, not tests.")
CHANGES_DESCRIBED = ("Changes in CFI and RMSEA describe the difference only: the common-practice guides for them "
                     "(Cheung & Rensvold 2002; Chen 2007) were set for steps of measurement invariance across groups, "
                     "not for rival structures.")


def _admissible_cell(result) -> str:
    if not result.converged:
        return failure_words(result)
    return "yes" if result.admissible else "NO"


def _problem_lines(named_results) -> list[str]:
    """One line per solution that is not admissible (problems first in every view)."""
    return [f"The solution of {name} is not admissible (" + "; ".join(p.phrase(groups=group_labels(r)) for p in r.problems
                                                                      if p.kind.inadmissible)
            + "): do not interpret its estimates or fit, and do not choose it over another model on its fit."
            for name, r in named_results if r.converged and not r.admissible]


def _in_group(problem, result) -> str:
    """'group north: ' before a problem of one group of ``result``, the group named among the fit's groups by the one
    rule of group names (language.names.written_group; s22: these lines wrote the label bare, a label with a space
    running into the sentence); '' for a problem of the whole model."""
    return "" if problem.group is None else f"group {written_group(problem.group, group_labels(result))}: "


def _named_line(name: str, rest: Text, given: bool) -> Text:
    """A line that starts with what names a fit: a model's name as given (``given``: note_parts.Name, which no
    sentence's capital recases; s24: 'One' for a model file 'one.cfa'), or words naming it ('the calibration fit on
    ...') as a sentence starts them."""
    return Note((Name(name),)) + rest if given else capitalised(name + rest)  # (``rest`` words or a Note)


def _failed_lines(named_results) -> list[Text]:
    """One line per model that could not be estimated, with the problems that say why first (fewer rows than free
    parameters, a group smaller than its model), as fit names them when it stops: problems first in every view."""
    lines = []
    for name, r in named_results:
        if r.converged:
            continue
        failure = next((p for p in r.problems if p.kind in (ProblemKind.NOT_CONVERGED,) + WHY_NOT_ESTIMATED), None)
        # a search that did not converge says what to try in its message: its problem's advice, the same, once only
        # (re-check s18: the invariance ladder said it twice)
        advice = " What to try: " + failure.advice if failure is not None and \
            failure.kind is not ProblemKind.NOT_CONVERGED else ""
        why = (failure.explanation[0].lower() + failure.explanation[1:].rstrip(".")
               if failure is not None and failure.kind is ProblemKind.UNBOUNDED_HEYWOOD else
               r.message if failure is not None and failure.kind is ProblemKind.NOT_IDENTIFIED else
               "its estimation did not converge (" + r.message + ")")
        # the model's name as given at the line's start (note_parts.Name: no sentence's capital recases it)
        lines.append(_named_line(name, " could not be estimated: " + why + "; nothing of it is a result, and no "
                                 "model is tested against it." + advice, True))
        lines += [_named_line(name, ": " + _in_group(p, r), True) + p.line() for p in r.problems
                  if p.kind in (ProblemKind.SMALL_SAMPLE, ProblemKind.SMALL_GROUP)]
    return lines


#: the cautions on a solution that is admissible but needs care in reading, which every view of several solutions (a
#: comparison, a ladder, a replication) says first, as fit does: the kinds declared so (ProblemKind.solution_caution:
#: a method factor that carries next to nothing, a standardized loading above 1, two factors that correlate nearly 1,
#: fewer rows than free parameters, a keying the loadings contradict, a factor pointing against its items, a weak
#: marker, a robust test whose scaling factor is not positive)
SOLUTION_CAUTIONS = tuple(kind for kind in ProblemKind if kind.solution_caution)


def _ladder_caution_lines(named_steps) -> list[Text]:
    """The cautions of every step's solution of a ladder (:data:`SOLUTION_CAUTIONS`; ``named_steps``: (the step's
    name, e.g. 'configural' or 'scalar with every equality', its result)), once per problem with the steps that have it
    named ('The configural, metric, and scalar models: group control: ...'), in the words of the last of them, the
    range of its figure over the steps added when it differs; then, once, the caution on a baseline model that misfits
    little (of the first step).  Groups smaller than their model the ladder says among its own cautions, and the
    configural model's poor fit it judges by its own guides."""
    found: dict[tuple, list[tuple[str, object, object]]] = {}
    for name, r in named_steps:
        for p in getattr(r, "problems", ()) if r is not None and r.converged else ():
            if p.kind in SOLUTION_CAUTIONS:
                found.setdefault((p.kind, p.group, p.parameters), []).append((name, p, r))
    lines: list[Text] = []
    for seen in found.values():
        names = list(dict.fromkeys(name for name, _, _ in seen))
        _, p, r = seen[-1]
        values = sorted({q.value for _, q, _ in seen if q.value is not None and math.isfinite(q.value)}, key=abs)
        spread = ""
        if len({str(q.explanation) for _, q, _ in seen}) > 1 and len(values) > 1:
            low, high = (journal_decimal(values[0]), journal_decimal(values[-1])) if abs(values[-1]) < 1 else \
                (num(values[0]), num(values[-1]))
            spread = f" ({low} to {high} over these steps; the figure below is the {names[-1]} model's)"
        whose = f"The {word_list(names)} model{'s' if len(names) > 1 else ''}{spread}: "
        line = whose + _in_group(p, r) + p.line()
        if line not in lines:
            lines.append(line)
    first = next((r for _, r in named_steps if r is not None and r.converged), None)
    return lines + [p.line() for p in getattr(first, "problems", ()) if p.kind is ProblemKind.UNINFORMATIVE_BASELINE][:1]


def _caution_lines(named_results, poor_fit: bool = True, small_groups: bool = True,
                   only: tuple[ProblemKind, ...] | None = None, given: bool = True) -> list[Text]:
    """One line per caution about a solution that is admissible but needs care in reading (a method factor that
    carries next to nothing, a standardized loading above 1, fewer rows than free parameters in the sample or a
    group, a fit poor by common bounds, unless ``poor_fit`` is False: an invariance test judges its configural
    model's fit by its own guides; groups smaller than their model unless ``small_groups`` is False: an invariance
    result says them once among its own cautions), each once, named by its model; a keying of reverse-scored items
    that the loadings contradict, a factor pointing against its items or a marker that hardly measures its factor
    (assessment.reliability.keying_problems), and a robust test whose scaling factor is not positive (its figures are dashes in the tables); last, once and
    unnamed, the caution on a baseline model that misfits little, which bounds the CFI and TLI of every model of
    the same rows alike (assessment.admissibility.uninformative_baseline_problems: a fit says it, and a comparison
    or a ladder printed CFI and TLI without it).  ``only``: these kinds alone (an invariance ladder's later steps:
    what their own fits could not compute); ``given``: the fits are named by the models' names as given, else by
    words (:func:`_named_line`)."""
    kinds = only if only is not None else SOLUTION_CAUTIONS + (
        (ProblemKind.SMALL_GROUP,) if small_groups else ()) + ((ProblemKind.POOR_FIT,) if poor_fit else ())
    lines: list[str] = []
    baseline: list[str] = []
    for name, r in named_results:
        for p in getattr(r, "problems", ()) if r.converged else ():
            line = _named_line(name, ": " + _in_group(p, r), given) + p.line()
            if p.kind in kinds and line not in lines:
                lines.append(line)
            elif only is None and p.kind is ProblemKind.UNINFORMATIVE_BASELINE and not baseline:
                baseline.append(p.line())
    return lines + baseline


def _design_caution_lines(named_results, given: bool = True) -> list[Text]:
    """The sampling design's cautions (too few clusters, a small effective sample) of several fits of the same rows,
    once (admissibility.design_cautions): those of the fit with the most free parameters when every fit has the same,
    or when the fits are steps of one model (an invariance ladder), named by it; those of rival models whose cautions
    differ in their figures (e.g. 'no more than the 78 free parameters'), each kind once in the words of the model
    with the most free parameters that has it, naming the other models it concerns (admissibility.
    design_cautions_by_kind, the methods paragraph's rule; new-user trial s28: one caution of about 120 words said
    once per model of a comparison).  ``given``: the fits are named by the models' names as given, else by words
    (:func:`_named_line`)."""
    most, problems = design_cautions([r for _, r in named_results])
    if most is None:
        return []
    own = [(name, tuple(p for p in r.problems if p.kind in DESIGN_CAUTIONS)) for name, r in named_results]
    own = [(name, found) for name, found in own if found]
    if all(found == problems for _, found in own):
        return [p.line() for p in problems]
    if len({r.model_name for _, r in named_results}) == len(named_results):  # rival models
        return _rivals_design_lines(named_results, most, given)
    name = next(n for n, r in named_results if r is most)
    same = [n for n, _ in own if n != name]  # the steps of one model: its largest's
    whose = _named_line(name, f" (the model with the most free parameters{'; ' + word_list(same) + ' too' if same else ''}): ",
                        given)
    return [whose + p.line() for p in problems]


def _rivals_design_lines(named_results, most, given: bool) -> list[Text]:
    """The design cautions of rival models whose cautions differ, each kind once in the words of the model with the
    most free parameters that has it (admissibility.design_cautions_by_kind): one line naming the other models for a
    caution that differs by their counts of free parameters alone (admissibility.SAID_ONCE_FOR_RIVALS: too few
    clusters, about 120 words said once per model of a comparison, new-user trial s28), as the methods paragraph does;
    for the others (a dominated test's scaling factor), the models with the same caution named beside it and each
    model's own figures under its own name (re-check s18: one model's extreme factor, 0.407, was said of the other,
    0.651)."""
    names = {id(r): n for n, r in named_results}
    lines: list[Text] = []
    for r, p, alike in design_cautions_by_kind([r for _, r in named_results]):
        largest = ["the model with the most free parameters"] if r is most else []
        theirs = [(o, next(q for q in o.problems if q.kind is p.kind)) for o in alike]
        if p.kind in SAID_ONCE_FOR_RIVALS:  # every model it concerns named, the others' figures in the fit table
            # the other models' names quoted when they hold commas or spaces, as the methods paragraph lists them
            also = [f"the same caution, with its own count of free parameters, for "
                    f"{word_list([written_name(names[id(o)]) for o in alike])}"] if alike else []
            theirs = []
        else:
            same = [names[id(o)] for o, q in theirs if q == p]
            also = [word_list(same) + " too"] if same else []
        said = "; ".join(largest + also)
        # a model's name keeps its case at the line's start (note_parts.Name: no sentence's capital recases it)
        lines.append(_named_line(names[id(r)], f" ({said}): " if said else ": ", given) + p.line())
        lines += [_named_line(names[id(o)], ": ", given) + q.line() for o, q in theirs if q != p]
    return lines


def _notice(problems: list[str], cautions: list[str] = (), failed: bool = False) -> ProblemNotice | None:
    """The box of several solutions' problems; ``failed``: some model could not be estimated at all."""
    if not problems and not cautions:
        return None
    heading = SOME_NOT_ESTIMATED if failed else SOME_NOT_ADMISSIBLE if problems else CHECK_SOLUTIONS
    kind = T.NoticeKind.NOT_ESTIMATED if failed else T.NoticeKind.NOT_ADMISSIBLE if problems else T.NoticeKind.CAUTION
    return ProblemNotice(heading, tuple(problems) + tuple(cautions), bool(problems), kind, len(problems))


def _models_problem_table(named_results, notice: ProblemNotice | None) -> ReportTable | None:
    """Every model's problems as one table for data files (a fit's table, T.problem_table, with the model first), in
    the words of compare's report."""
    rows, values, columns = [], [], None
    for name, r in named_results:
        own = T.problem_table(r, running=ResultKind.COMPARE.value)
        if own is None:
            continue
        columns = [("Model", "l")] + list(zip(own.columns, own.align))
        rows += [[name, *row] for row in own.rows]
        values += [[name, *row] for row in own.values]
    if notice is None or columns is None:
        return None
    return _table("problems", notice.heading, columns, rows, values=([c for c, _ in columns], values))


def _fit_notice(result) -> ProblemNotice | None:
    return T.problem_notice(result)


# ---------------------------------------------------------------- compare

_COMPARISON_ROWS = ("Admissible", "Free parameters", "Chi-square", "df", "p", "CFI", "TLI", "RMSEA",
                    "  90% interval", "SRMR", "AIC", "BIC")
_COMPARISON_VALUES = ("Admissible", "Free parameters", "Chi-square", "df", "p", "CFI", "TLI", "RMSEA",
                      "RMSEA 90% lower", "RMSEA 90% upper", "SRMR", "AIC", "BIC")


def _robust_rows(test, label: str | None = None) -> tuple[str, ...]:
    """The rows of a robust test in the comparison table; its pieces named as the fit's table names them (``label``:
    the statistic's name, design-based under a sampling design, as RobustFit.label gives it)."""
    return (f"Scaled chi-square ({label or test.label})", f"  {test.correction}", "  p", "Robust CFI", "Robust TLI",
            "Robust RMSEA", "  90% interval")


def _robust_values(test) -> tuple[str, ...]:
    return ("Scaled chi-square", *(name.capitalize() for name in test.pieces), "Scaled p", "Robust CFI", "Robust TLI",
            "Robust RMSEA", "Robust RMSEA 90% lower", "Robust RMSEA 90% upper")


def _robust_first(labels: tuple[str, ...], plain: int) -> tuple[list[int], list[str]]:
    """The order of a comparison column with a robust test: admissibility and parameters, the robust rows, SRMR,
    the normal-theory rows marked unadjusted, AIC and BIC; ``plain``: how many rows precede the robust ones."""
    srmr, df = labels.index("SRMR"), labels.index("df")
    unadjusted = [k for k in range(2, srmr) if k != df]
    order = [0, 1, df, *range(plain, len(labels)), srmr, *unadjusted, *range(srmr + 1, plain)]
    marked = set(unadjusted)
    return order, [T.unadjusted_label(labels[k]) if k in marked and not labels[k].startswith(" ") else labels[k]
                   for k in order]


def _comparison_cells(r, test) -> tuple[list[str], list]:
    """A model's column of the comparison table, as text and as numbers; ``test``: the robust test of the
    comparison (None without one)."""
    robust_rows = test is not None
    width = len(_COMPARISON_ROWS) + (len(_robust_rows(test)) if robust_rows else 0)
    values_width = len(_COMPARISON_VALUES) + (len(_robust_values(test)) if robust_rows else 0)
    if r.fit is None or not r.converged:
        return [_admissible_cell(r)] + [""] * (width - 1), [_admissible_cell(r)] + [None] * (values_width - 1)
    f = r.fit
    low, high = f.rmsea_ci90
    tested = f.df > 0
    # a tested model's CFI or TLI without a value is said to be so (0/0: the baseline fits), never a blank
    shown = index_text if tested else unit
    cells = [_admissible_cell(r), str(f.n_free_parameters), f"{f.chi_square:.3f}", str(f.df), p_value(f.p_value),
             shown(f.cfi), shown(f.tli),
             unit(f.rmsea) if tested else "", f"[{unit(low)}, {unit(high)}]" if tested else "",
             unit(f.srmr), _information_criterion(f.aic), _information_criterion(f.bic)]
    values = [_admissible_cell(r), f.n_free_parameters, f.chi_square, f.df, f.p_value, f.cfi, f.tli,
              f.rmsea if tested else None, low if tested else None, high if tested else None, f.srmr, f.aic, f.bic]
    if robust_rows:
        rb = r.robust
        if rb is None:
            cells += [""] * len(_robust_rows(test))
            values += [None] * len(_robust_values(test))
        else:
            rl, rh = rb.rmsea_robust_ci90
            cell = T.robust_cell  # a figure not computed: a dash, which the table's note explains
            cells += [cell(rb, rb.chi_square_scaled, num(rb.chi_square_scaled)), T.correction_text(rb),
                      cell(rb, rb.p_value_scaled, p_value(rb.p_value_scaled)), cell(rb, rb.cfi_robust, shown(rb.cfi_robust)),
                      cell(rb, rb.tli_robust, shown(rb.tli_robust)), cell(rb, rb.rmsea_robust, unit(rb.rmsea_robust)),
                      cell(rb, rl, f"[{unit(rl)}, {unit(rh)}]")]
            values += [rb.chi_square_scaled, *(value for _, value in rb.pieces), rb.p_value_scaled, rb.cfi_robust,
                       rb.tli_robust, rb.rmsea_robust, rl, rh]
    return cells, values


def not_computed_note(named_results) -> str | None:
    """The note of a table with cells of robust figures not computed (:data:`tables.NOT_COMPUTED`): whose and why, in
    a few words (each fit's caution, first, says it in full); None when every figure was computed."""
    said = [f"{name}: {T.not_computed_words(r.robust)}" for name, r in named_results
            if r.converged and T.not_computed_words(r.robust)]
    if not said:
        return None
    return f"{T.NOT_COMPUTED} not computed: " + "; ".join(said) + " (see the caution first)."


def _change(value: float, dashes: str | None) -> str:
    """A change in a fit index between two fits: signed, or a dash when it is missing because a robust index was not
    computed (``dashes``: the note of the fit table that says whose; None when all were)."""
    return T.NOT_COMPUTED if missing(value) and dashes is not None else signed(value)


def _changes_note(rows, dashes: str | None, ordinal: bool) -> Note | None:
    """The note of a difference-test table whose changes in robust indices are dashes: they need a robust index that
    was not computed (the fit table's note says whose)."""
    if dashes is None or ordinal or not any(T.NOT_COMPUTED in row[3:] for row in rows):
        return None
    return Note((f"{T.NOT_COMPUTED} in \u0394CFI or \u0394RMSEA: a robust index of a model was not computed (see the "
                 f"note under ", TableReference("model_fit"), ")."))


def _information_criterion(value) -> str:
    """AIC or BIC to one decimal, or 'not defined' (least-squares and weighted fits have no likelihood)."""
    return "not defined" if missing(value) else num(value, 1)


def _design_lines(result) -> tuple[str, ...]:
    """The sampling design of a fit in one line (none without a design)."""
    design = getattr(result, "design", None)
    return (design_sentence(result),) if design is not None else ()


def equivalent_models(information_criteria: bool) -> str:
    """The advice on a pair of probably equivalent models (workflows.nesting.probably_equivalent), in place of AIC and
    BIC, which are equal for them (equal likelihoods, equal numbers of parameters)."""
    return ("Equivalent models fit any data equally well" + (" (their AIC and BIC are equal too)" if information_criteria
                                                             else "")
            + ", so these data cannot choose between them: the choice rests on theory (MacCallum, Wegener, Uchino & "
              "Fabrigar 1993).")


BOUNDARY_CAUTION = ("values on the boundary of what the general model allows, so the chi-square difference does not "
                    "follow the usual chi-square distribution (Self & Liang 1987; Stoel, Garre, Dolan & van den "
                    "Wittenboer 2006)")

#: why a difference test with parameters on the boundary, which the general model's fit does not hold inside it,
#: is read as printed (nesting.BoundaryReading.CHI_SQUARE; Savalei & Kolenikov 2008)
BOUNDARY_UNHELD = ("the edge of what the general model allows, but the general model's fit does not hold its "
                   "estimates inside that edge (a correlation may go past 1, a variance below 0: an improper solution, "
                   "named first when it happens), so the difference follows the usual chi-square distribution "
                   "(Savalei & Kolenikov 2008); the 50:50 mixture of chi-square distributions (Self & Liang 1987) "
                   "holds only for estimates held inside the boundary, and would reject a true restriction about "
                   "twice as often as its level here")


def ordinal_decision_note(boundary: bool) -> str:
    """The one statement of what decides between nested models of ordinal items, and how rough each part is: the
    adjusted difference test (Satorra & Bentler 2001; Asparouhov & Muthén 2006), rough when the restricted model lies
    on the general one's boundary (``boundary``); each model's own fit indices, which describe each model; and their
    changes, which are no test for ordinal fits (method.ORDINAL_FIT_CHANGE_WHY).  Compare's boundary note refers here
    rather than advise on its own (re-check s15, R5: the two notes sent the reader to each other)."""
    test = ("the adjusted difference test (Satorra & Bentler 2001; Asparouhov & Muthén 2006) is the one test of the "
            "restricted model against the general one")
    if boundary:
        test += (", but with values on the boundary (marked *) its p-value is rough: one far from the level tested at "
                 "says more than one near it (a reading of common practice, not an exact rule)")
    return (f"Deciding between nested models of ordinal items{', and how rough each part is' if boundary else ''}: "
            f"{test}. Each model's own CFI, RMSEA and SRMR describe how well that model fits, read against the guide "
            f"values (conventions, not laws); their changes between the models are no test: {ORDINAL_FIT_CHANGE_WHY}."
            + (" So weigh the rough test together with each model's own fit and with what the restriction means for "
               "the theory; neither decides alone." if boundary else ""))


def boundary_note(tests, explained: str | None = None, criteria: bool = True, ordinal: bool = False) -> Text:
    """The note under a difference-test table whose restricted model sits on the boundary: what lies there and which
    p-value to read (``tests[0].boundary_reading``, nesting.BoundaryReading): the printed ones, unmarked, when the
    general model's fit does not hold the parameters on the boundary inside it (Savalei & Kolenikov 2008); the
    50:50 mixture's when a bound of the general model holds it (Self & Liang 1987); none exactly otherwise.  The why,
    and the mixture's distribution, are said in full under the first table of the usual chi-square's reading and under
    the first of the others only; the later tables
    name what lies on their boundary, their own p-values and the table whose note says the why (``explained``, its
    key: each view names it as it names its tables; new-user trial: five one-row tables repeated the same five
    lines); ``criteria``: the models have AIC and BIC to weigh them by (not for least-squares fits of ordinal items
    or fits under sampling weights: new-user trial s15 was told to weigh what the table showed as 'not defined');
    ``ordinal``: models of ordinal items, whose changes in fit indices are no test: what else decides is the one
    statement after the tables (:func:`ordinal_decision_note`), referred to here."""
    what = "; ".join(tests[0].boundary)
    mixture = [t for t in tests if not missing(t.boundary_p_value)]
    computed = sum(not t.not_computed for t in tests)
    shown = "p-value" if computed == 1 else "p-values"
    unheld = tests[0].boundary_reading is BoundaryReading.CHI_SQUARE
    if not computed:  # no p-value in the table, so none is marked: the boundary said, and what is left to weigh
        weigh = f"weigh the models by their fit indices{', AIC and BIC' if criteria else ''}"
        if explained is not None:
            return Note((f"On the boundary: {what}; see the note under ", TableReference(explained),
                         f". No difference test could be computed here: {weigh}."))
        return (f"On the boundary: {what}: {BOUNDARY_UNHELD if unheld else BOUNDARY_CAUTION}. No difference test "
                f"could be computed here: {weigh}.")
    if unheld:  # the usual chi-square: the p-values as printed, unmarked (Savalei & Kolenikov 2008)
        if explained is not None:
            return Note((f"On the boundary: {what}; see the note under ", TableReference(explained),
                         f": read the {shown} as printed."))
        return f"On the boundary: {what}: {BOUNDARY_UNHELD}. Read the {shown} as printed."
    if mixture:
        found = ", ".join(f"p {p_phrase(t.boundary_p_value)} for the {t.method}" for t in mixture)
        approximate = " (for the scaled differences as an approximation)" if len(mixture) > 1 else ""
        read = f": read {'that' if len(mixture) == 1 else 'those'}, not the {shown} marked *."
        if explained is not None:
            return Note((f"* On the boundary: {what}; see the note under ", TableReference(explained),
                         f". The 50:50 mixture gives {found}{approximate}{read}"))
        reading = (f"With one parameter on the boundary held inside it by a bound of the general model (any other "
                   f"there unbounded, free to pass it), the difference follows the 50:50 mixture of chi-square distributions with "
                   f"{mixture[0].df_difference - 1} and {mixture[0].df_difference} df (Self & Liang 1987; Stram & Lee "
                   f"1994), which gives {found}{approximate}{read}")
    else:
        if explained is not None:
            return Note((f"* On the boundary: {what}; see the note under ", TableReference(explained),
                         f". No exact p-value: read the {shown} marked * as rough."))
        weigh = ("; what else decides between these models, and how rough each part is: the note after the tables"
                 if ordinal else f", and weigh the models also by their fit indices{', AIC and BIC' if criteria else ''}")
        df = word_list((str(d) for d in sorted({t.df_difference for t in tests if not t.not_computed})), "or")
        reading = ("Its distribution depends on the model here (two or more parameters on the boundary held inside "
                   "it by bounds, or loadings that the restricted model leaves undefined), so no exact p-value is "
                   f"given: read the {shown} marked * (the usual chi-square's with {df} "
                   f"df, not corrected for the boundary) as rough{weigh}.")
    return f"* On the boundary: {what}: {BOUNDARY_CAUTION}. {reading}"


#: which difference test of a comparison with a robust test to read (the one its methods paragraph reports)
READ_POSITIVE = (f"Which difference test to read: the {DifferenceMethod.SATORRA_BENTLER_2010}, as the methods paragraph "
                 f"does. It carries the robust test's correction for rows that are not normal, and its correction "
                 f"cannot be negative; the 2001 version's, a difference of the two fits' factors, is unstable on few df "
                 f"and can be negative (Satorra & Bentler 2010); the likelihood-ratio difference holds for normal "
                 f"rows of a simple random sample only.")


def comparison_report(comparison) -> Report:
    named = list(zip(comparison.names, comparison.results))
    criteria = all(r.fit is not None and not missing(r.fit.aic) and not missing(r.fit.bic)
                   for r in comparison.results)  # what the fit table shows as defined
    ordinal = comparison.results[0].method.ordinal
    problems = _failed_lines(named) + _problem_lines(named)
    fitted = [(name, r) for name, r in named if r.converged and r.fit is not None]
    lowest: dict[str, list[str]] = {}
    for index in ("AIC", "BIC"):
        scored = [(getattr(r.fit, index.lower()), name, r) for name, r in fitted
                  if not missing(getattr(r.fit, index.lower()))]
        if len(scored) > 1:
            _, name, best = min(scored, key=lambda t: t[0])
            if not best.admissible:
                lowest.setdefault(name, []).append(index)
    problems += [f"The lowest {word_list(indices)} belong{'s' if len(indices) == 1 else ''} to {name}, whose solution "
                 f"is not admissible: that is no reason to prefer it." for name, indices in lowest.items()]
    cautions = [p.line() for p in comparison.problems]  # the data's, first
    cautions += _design_caution_lines(named) + _caution_lines(named)
    heavy = comparison.heavy_tails_cautioned  # those without a caution of their own (nesting.tails_said_once)
    if heavy and any(rejects(t) for t in comparison.tests):  # normal-theory differences over heavy-tailed answers,
        # a rejection among them (without one: a note on the tests' calibration, below)
        cautions.append(heavy_tails_caution(heavy, REJECTED_RESTRICTION))
    full_information = comparison.missing is MissingData.FULL_INFORMATION
    pairwise = comparison.missing is MissingData.PAIRWISE
    if full_information or pairwise:
        dropped, without = comparison.rows_dropped, comparison.without_group
        left = (f"{count_text(dropped)} {'row' if dropped == 1 else 'rows'} answering none of some model's variables left out" if
                dropped else "no row left out for missing answers")
        if without:
            left += f"; {count_text(without)} {'row' if without == 1 else 'rows'} without a value in the group column left out"
        how = ("every answer used: each correlation from the rows that answered both items" if pairwise else
               "by full-information ML, rows with missing answers included")
        rows_line = f"All models fitted to the same {count_text(comparison.n_obs)} rows, {how} ({left})."
    elif getattr(comparison.results[0].data, "analysed", None) is not None:  # summary statistics: no rows
        rows_line = (f"All models fitted to the same summary statistics "
                     f"({comparison.results[0].data.analysed.value}), N = {count_text(comparison.n_obs)} as given "
                     f"{given_with(comparison.results[0].data.source)}.")
    else:
        rows_line = (f"All models fitted to the same {count_text(comparison.n_obs)} rows ({count_text(comparison.rows_dropped)} rows with a missing "
                     f"answer on any model's variables left out).")
    lines = (rows_line, *_comparison_group_lines(comparison), *_design_lines(comparison.results[0]))
    # one column per model, one row per index: readable in 80 columns for the usual two to four models
    # every model of a comparison has the same robust test (or none): the estimator and rows are shared
    robust = next((r.robust for r in comparison.results if r.robust is not None), None)
    test = robust.test if robust is not None else None
    cells = [_comparison_cells(r, test) for r in comparison.results]
    labels = _COMPARISON_ROWS + (_robust_rows(test, robust.label) if test is not None else ())
    value_labels = _COMPARISON_VALUES + (_robust_values(test) if test is not None else ())
    if test is not None:  # the figures to read first, the unadjusted ones after SRMR, marked (as in fit's table)
        order, labels = _robust_first(labels, len(_COMPARISON_ROWS))
        value_order, value_labels = _robust_first(value_labels, len(_COMPARISON_VALUES))
        cells = [([c[0][k] for k in order], [c[1][k] for k in value_order]) for c in cells]
    rows = [[label, *[c[0][k] for c in cells]] for k, label in enumerate(labels)]
    bad = any(r.converged and not r.admissible for r in comparison.results)
    value_columns = ["Model", *value_labels]
    dashes = not_computed_note(named)
    thresholds = next(filter(None, map(T.thresholds_counted, comparison.results)), "")
    fit_note = " ".join(x for x in (dashes, f"Free parameters: {thresholds}." if thresholds else "") if x) or None
    tables = [_table("model_fit", "Fit of each model", [("", "l")] + [(name, "r") for name in comparison.names], rows,
                     fit_note, flagged=(0,) if bad else (),
                     values=(value_columns, [[name, *c[1]] for name, c in zip(comparison.names, cells)]))]
    by_name = dict(zip(comparison.names, comparison.results))
    pairs: dict[tuple[str, str], list] = {}
    for t in comparison.tests:
        pairs.setdefault((t.restricted, t.general), []).append(t)
    notes = []
    # the key of the first table on the boundary whose note says the why in full, referred to after: one for the
    # usual chi-square's why (nesting.BoundaryReading.CHI_SQUARE, BOUNDARY_UNHELD), one for the others' (BOUNDARY_CAUTION)
    explained: dict = {}
    cautioned = False  # the why of the cautions said once, in the first
    for k, ((restricted, general), found) in enumerate(pairs.items()):  # one small table per nested pair
        key = f"difference_tests_{k + 1}"
        rows, values = [], []
        boundary, reading = found[0].boundary, found[0].boundary_reading
        marked = bool(boundary) and reading is not BoundaryReading.CHI_SQUARE  # the printed p-values not the reading
        # a CFI of 0/0 (the baseline model fits no worse): the change from or to it is not defined, and said so
        undefined = [name for name in (restricted, general) if compared_cfi_not_defined(by_name[name])]
        cfi_change = (lambda t: "not defined") if undefined else (lambda t: _change(t.delta_cfi, dashes))
        for t in found:
            if t.not_computed:  # the changes in fit indices describe the two fits, with or without a statistic
                rows.append([t.method, f"not computed ({t.df_difference})", "", cfi_change(t),
                             _change(t.delta_rmsea, dashes)])
                notes.append(f"{t.method}: not computed: " + t.not_computed + (f"; {t.advice}" if t.advice else "")
                             + ".")
            else:
                rows.append([t.method, f"{num(t.chi_square_difference, 3)} ({t.df_difference})",
                             p_value(t.p_value) + (" *" if marked else ""), cfi_change(t),
                             _change(t.delta_rmsea, dashes)])
                if t.scaled_by:  # the factors and correction a scaled difference took, as computed (nesting._scaled_by)
                    pair = f" ({restricted} against {general})" if len(pairs) > 1 else ""
                    notes.append(f"{t.method}{pair}: {t.scaled_by}.")
            values.append([t.method, None if t.not_computed else t.chi_square_difference, t.df_difference,
                           None if t.not_computed else t.p_value, t.delta_cfi, t.delta_rmsea, str(t.not_computed),
                           "; ".join(t.boundary), None if missing(t.boundary_p_value) else t.boundary_p_value,
                           None if t.boundary_reading is None else t.boundary_reading.value])
        # a caution first only where the printed p-values are not the reading (the usual chi-square is read as
        # printed, Savalei & Kolenikov 2008: said under the table); the why once, in the first such caution
        if marked:
            computed = any(not t.not_computed for t in found)  # no p-value to read as approximate otherwise
            mixed = reading is BoundaryReading.MIXTURE
            mixture_p = ("p-values, not the printed ones" if sum(not t.not_computed for t in found) > 1
                         else "p-value, not the printed one")
            read = (f"read the 50:50 mixture's {mixture_p}" if computed and mixed else
                    "read the p-values of this comparison as approximate" if computed
                    else "no difference test of this comparison could be computed")
            # said after a word of its own: a line that starts with a model's name would have it capitalised as
            # the first word of a sentence (new-user s24: 'One against gen' for the model file one.cfa)
            head = f"Comparing {restricted} with {general}: the restricted model has {'; '.join(boundary)}: "
            if not cautioned:
                cautions.append(head + Note((f"{BOUNDARY_CAUTION}; {read}; see the note under ", TableReference(key),
                                             ".")))
            elif computed and mixed:
                cautions.append(head + Note((f"values on the boundary too; {read}; see the note under ",
                                             TableReference(key), ".")))
            else:
                cautions.append(head + ("values on the boundary too, so read the p-values of this comparison as "
                                        "approximate as well." if computed else f"values on the boundary too; {read}."))
            cautioned = True
        columns = [("Test", "l"), ("Difference (df)", "r"), ("p", "r"), ("\u0394CFI", "r"), ("\u0394RMSEA", "r")]
        value_names = ["Test", "Chi-square difference", "df difference", "p", "\u0394CFI", "\u0394RMSEA",
                       "Not computed because", "On the boundary", "p, 50:50 mixture", "Reading on the boundary"]
        if ordinal:  # no changes in fit indices to show (ORDINAL_FIT_CHANGE, in the notes)
            columns, rows = columns[:3], [row[:3] for row in rows]
            value_names = value_names[:4] + value_names[6:]
            values = [row[:4] + row[6:] for row in values]
        tables.append(_table(key, f"{restricted} (restricted) against {general}: difference tests",
                             columns, rows, joined((boundary_note(found, explained.get(not marked), criteria, ordinal)
                                                    if boundary
                                                    else None, _changes_note(rows, dashes, ordinal),
                                                    None if ordinal or not undefined else
                                                    f"\u0394CFI not defined: CFI has no value for {word_list(undefined)} "
                                                    f"(the baseline model fits these data no worse than "
                                                    f"{'they do' if len(undefined) > 1 else 'it does'}: both "
                                                    f"noncentralities at most 0, so CFI is 0/0); read the difference "
                                                    f"test and \u0394RMSEA.")) or None,
                             values=(value_names, values)))
        if boundary:
            explained.setdefault(not marked, key)
    if heavy and not any(rejects(t) for t in comparison.tests):
        notes.append(heavy_tails_caution(heavy, None))
    if any(t.method is DifferenceMethod.SATORRA_BENTLER_2010 and not t.not_computed for t in comparison.tests):
        notes.append(READ_POSITIVE)
    for n in comparison.not_nested:
        advice = (f" {equivalent_models(n.information_criteria)}" if n.equivalent
                  else " Compare them by AIC and BIC (lower is better)." if n.information_criteria else "")
        notes.append(f"Not tested: {n.first} and {n.second}: {n.reason}.{advice}")
    if comparison.tests:
        notes.append(ordinal_decision_note(any(t.boundary and t.boundary_reading is not BoundaryReading.CHI_SQUARE
                                               for t in comparison.tests)) if ordinal
                     else CHANGE_GUIDES if comparison.change_guides_apply else CHANGES_DESCRIBED)
    # the notes on the data and the estimation (answers outside a scale, codes read as labels) come under the lines,
    # first, as fit and invariance give them
    notice = _notice(problems, cautions, failed=not all(r.converged for r in comparison.results))
    return Report(ResultKind.COMPARE, "Model comparison", notice, lines, tuple(tables),
                  tuple(notes), (GUIDE_NOTE, HIGH_STAKES_NOTE), comparison_paragraph(comparison),
                  problem_table=_models_problem_table(named, notice),
                  warnings=few_answers_lines(comparison.results) + tuple(comparison.notes))


def few_answers_lines(results) -> tuple[Text, ...]:
    """The caution on categories of ordinal items given by few rows (tables.few_answers_warning, the one rule of
    fit, scores, bootstrap, cutoffs and check) of each fit of a workflow's several ones (compare's models, the
    invariance ladder's configural step), each once (hostile trial s25, finding 6: both said nothing of a category
    given by one row, whose threshold the ladder's threshold step equates across the groups)."""
    return tuple(dict.fromkeys(w for r in results if r is not None
                               and (w := T.few_answers_warning(r, table=False)) is not None))


# ---------------------------------------------------------------- invariance

def _level_fit_cells(result, adjusted: bool) -> tuple[list[str], list]:
    fit, robust = result.fit, result.robust
    if fit is None or not result.converged:
        return ["did not converge", "", "", "", ""], [None] * 6
    if adjusted and robust is not None:  # the scaled (ordinal items: adjusted) statistic and robust indices
        cell = T.robust_cell  # a figure not computed: a dash, which the table's note explains
        return ([cell(robust, robust.chi_square_scaled, f"{robust.chi_square_scaled:.2f} ({robust.df})"),
                 cell(robust, robust.p_value_scaled, p_value(robust.p_value_scaled)),
                 cell(robust, robust.cfi_robust, fit_index_text("cfi", robust.cfi_robust)),
                 cell(robust, robust.rmsea_robust, fit_index_text("rmsea", robust.rmsea_robust)),
                 fit_index_text("srmr", fit.srmr)],
                [robust.chi_square_scaled, robust.df, robust.p_value_scaled, robust.cfi_robust, robust.rmsea_robust,
                 fit.srmr])
    return ([f"{fit.chi_square:.2f} ({fit.df})", p_value(fit.p_value), fit_index_text("cfi", fit.cfi),
             fit_index_text("rmsea", fit.rmsea), fit_index_text("srmr", fit.srmr)],
            [fit.chi_square, fit.df, fit.p_value, fit.cfi, fit.rmsea, fit.srmr])


def _step_cells(t, delta_srmr, level: str, dashes: bool = False, cfi_undefined: bool = False) -> tuple[list[str], list]:
    """A step's difference test and changes in fit, each change printed on the side of its guide it lies on;
    ``dashes``: a change missing because a robust index was not computed is a dash (the table's note says so);
    ``cfi_undefined``: the change in CFI has no value, a CFI being 0/0 (workflows.invariance.delta_cfi_not_defined),
    'not defined' (the table's note says how the step was judged)."""
    from cfa_tool.workflows.invariance import CFI_GUIDE, RMSEA_GUIDE, SRMR_GUIDE, SRMR_GUIDE_LATER

    def change(value, guide) -> str:
        return T.NOT_COMPUTED if dashes and missing(value) else signed(value, beside=guide)

    return ([f"{num(t.chi_square_difference, 2)} ({t.df_difference})", p_value(t.p_value),
             "not defined" if cfi_undefined else change(t.delta_cfi, CFI_GUIDE), change(t.delta_rmsea, RMSEA_GUIDE),
             "" if delta_srmr is None else signed(delta_srmr, beside=SRMR_GUIDE.get(level, SRMR_GUIDE_LATER))],
            [t.chi_square_difference, t.df_difference, t.p_value, t.delta_cfi, t.delta_rmsea, delta_srmr])


CONFIGURAL_GUIDE = (f"The configural model holds when it fits by the guide values ({guides_text(CONFIGURAL_INDICES)}; "
                    f"Hu & Bentler 1999).")
CONFIGURAL_NOTE = (f"{CONFIGURAL_GUIDE} Change-in-fit guides are common practice: CFI falling by no more than .010 "
                   "(Cheung & Rensvold 2002), RMSEA rising by less than .015, SRMR by less than .030 for loadings and "
                   ".010 after (Chen 2007). All guides are conventions, not laws.")
CONFIGURAL_ORDINAL_NOTE = (f"{CONFIGURAL_GUIDE} Changes in fit indices between steps are not shown: "
                           f"{ORDINAL_FIT_CHANGE}. The guides are conventions, not laws.")
ADJUSTED_NOTE = (f"Ordinal items: chi-square, CFI and RMSEA come from the {FitTest.SCALE_SHIFTED.label} statistic, and "
                 f"each difference test is the {DifferenceMethod.SCALE_SHIFTED}. The adjusted statistic's "
                 f"{FitTest.SCALE_SHIFTED.correction} are estimated anew for each model, so it can fall when constraints "
                 f"are added: compare steps by the difference tests, not by the statistics or indices of the levels.")


def _other_differences(steps) -> str:
    """The steps of a robust ladder whose difference is not the 2001 scaled one, and why (for the scaled note): its
    correction not positive, or a scaling factor of one of the two fits not positive (that fit's scaled test not
    computed: inference.robust.robust_fit), which no difference is scaled by."""
    def unscaled(k: int) -> list[str]:  # the models of step k and the one before whose scaled test was not computed
        return [s.level for s in steps[k - 1:k + 1] if s.result.robust is not None
                and missing(s.result.robust.chi_square_scaled)]

    def levels(method, factor: bool) -> list[str]:
        return [s.level for k, s in enumerate(steps) if s.versus_previous is not None
                and s.versus_previous.method is method and bool(unscaled(k)) is factor]

    out = ""
    for k, s in enumerate(steps):
        if s.versus_previous is not None and s.versus_previous.method is not DifferenceMethod.SATORRA_BENTLER_2001 \
                and unscaled(k):
            given = ("the strictly positive version (Satorra & Bentler 2010), whose factors are computed at the "
                     "restricted model's estimates," if s.versus_previous.method is DifferenceMethod.SATORRA_BENTLER_2010
                     else "the unscaled likelihood-ratio difference")
            out += (f"; at the {s.level} step the scaling factor of the {word_list(unscaled(k))} model"
                    f"{'s' if len(unscaled(k)) > 1 else ''} is not positive (its scaled test not computed), so "
                    f"{given} is given")
    positive = levels(DifferenceMethod.SATORRA_BENTLER_2010, False)
    plain = levels(DifferenceMethod.LIKELIHOOD_RATIO, False)
    if positive:
        out += (f"; at the {word_list(positive)} step{'s' if len(positive) > 1 else ''} the scaled difference's "
                f"correction was not positive, so the strictly positive version (Satorra & Bentler 2010) is given")
    if plain:
        out += (f"; at the {word_list(plain)} step{'s' if len(plain) > 1 else ''} neither scaled version could be "
                f"computed, so the unscaled likelihood-ratio difference is given")
    return out


INADMISSIBLE_VERDICT_NOTE = ("'inadmissible': the step's solution is not admissible (see the problems above), so it "
                             "does not hold: it cannot show that invariance holds, whatever its fit.")


#: a step whose rule reads robust figures that were not computed (workflows.invariance.unjudged): it does not hold
NOT_JUDGED = "not judged"
#: a step that met its test but rests on a step that did not hold, did not converge or is not admissible
TEST_MET = "test met"
TEST_MET_NOTE = (f"'{TEST_MET}': the step met its test but rests on a step that did not hold, whose estimation did "
                 f"not converge or whose solution is not admissible (its model keeps that step's equalities), so it "
                 f"cannot be read as held.")


#: what a step's 'Holds' cell adds when the design's cautions doubt the tests and robust indices that judged it
#: (admissibility.design_doubts; hostile s25b: 'yes' for every step beside the caution that called them unreliable)
DOUBTED_MARK = " \u2020"


def _verdict(holds: bool | None, result) -> str:
    """A step's 'Holds' cell: an inadmissible solution says why it does not hold."""
    if holds:
        return "yes"
    return "inadmissible" if result is not None and result.converged and not result.admissible else "no"


def _comparison_group_lines(comparison) -> tuple[str, ...]:
    """The groups of a grouped comparison and what each model holds equal across them (what distinguishes them)."""
    first = comparison.results[0]
    if not first.multigroup:
        return ()
    held = []
    for k, (name, result) in enumerate(zip(comparison.names, comparison.results), start=1):
        d = result.description
        words = word_list(equality_words(d.invariant)) if d is not None and d.invariant else "nothing"
        held.append(f"model {k} ({name}): {words}" + (f" (with {len(d.noninvariant)} exception"
                                          f"{'s' if len(d.noninvariant) > 1 else ''})" if d is not None and
                                          d.invariant and d.noninvariant else ""))
    labels = group_labels(first)  # each named by the one rule of group names (s22: bare beside the quoted reference)
    return (f"Groups defined by {first.group_column}: "
            f"{', '.join(f'{written_group(g.label, labels)} ({count_text(g.data.n_obs)} rows)' for g in first.groups)}.",
            f"Held equal across groups: {'; '.join(held)}.")


def _step_label(step, inherited: bool = False) -> str:
    """A step's row label: partial when the search freed parameters (here or at an earlier step: ``inherited``;
    they stay free) or the model file declared some not equal."""
    if step.partial:
        return f"{step.level} ({'partial, ' if step.declared or inherited else ''}{len(step.freed)} freed)"
    return f"{step.level} (partial)" if step.declared or inherited else step.level


def _misfit_sources(step, result) -> Text:
    """The score tests of a step that did not hold: only those significant at the steps' level are named as likely
    sources (a score test is a chi-square(1) statistic; Sörbom 1989), or the note says none is; with two groups
    a parameter's difference is between them, not in one; a step the search did not run at points to the two
    ways of freeing an equality (the search, a 'noninvariant' statement)."""
    from cfa_tool.numerics import distributions as dist
    from cfa_tool.workflows.invariance import search_exemption

    two = len(result.groups) == 2
    level = short(result.alpha)

    def words(c) -> str:
        return parameter_words(c.kind, c.variables, None if two else c.group)

    significant = [c for c in step.culprits if dist.chi2_sf(c.index, 1) < result.alpha]
    between = f", each a difference between {result.groups[0]} and {result.groups[1]}" if two else ""
    if significant:
        sources = _one_test_each(significant)
        which = "those" if len(sources) <= 5 else f"the 5 largest of the {len(sources)}"
        text = (f"Likeliest sources of misfit at the {step.level} step ({result.score_tests.phrase}; {which} "
                f"significant at {level}{between}): "
                + "; ".join(f"{words(same[0])} ({same[0].index:.2f})" if len(same) == 1 else
                            f"{parameter_words('threshold', (same[0].variables[0], *(c.variables[1] for c in same)), None if two else same[0].group)}"
                            f" ({same[0].index:.2f}, one score test for the {len(same)})"
                            for same in sources[:5]) + ".")
    else:
        top = step.culprits[0]
        text = (f"No score test of the {step.level} step's equalities is significant at {level} ({result.score_tests.phrase}; "
                f"the largest: {words(top)}, {top.index:.2f}), so these data point to no single equality as the "
                f"source of its misfit.")
    if not step.stopped and significant:  # no search was asked for: how to test partial invariance
        text = text + Note((" To test partial invariance, free the equalities named: let the search choose them",
                            Command(f" ({Option.PARTIAL.given('auto')})"), " or declare each in the model file "
                            f"('noninvariant {search_exemption(significant[0])}'{_in_one_group(significant[0], result)}); "
                            f"a freed equality chosen from these data needs confirmation in new data."))
    return text


def _in_one_group(test, result) -> str:
    """With three groups or more, how a score test's parameter is set apart in its group alone, beside the
    exemption in every group: ", or in group north alone: 'in group north: noninvariant loading(f, x3)'" ('' where
    that statement is not available: two groups, whose difference is in neither, thresholds and ordinal items)."""
    from cfa_tool.language.names import written_name
    from cfa_tool.workflows.invariance import search_exemption

    if len(result.groups) == 2 or test.group is None or test.kind == "threshold" or result.steps[0].result.method.ordinal:
        return ""
    group = written_name(test.group)
    return f", or in group {group} alone: 'in group {group}: noninvariant {search_exemption(test)}'"


def _one_test_each(culprits) -> list[list]:
    """The score tests (largest first) with an item's thresholds in one group that share one value (to 1e-6: the
    tests of an item of few answer categories, whose thresholds' equalities the identification ties together, Wu &
    Estabrook 2016, come out as one statistic) taken as one source of misfit, so that one item does not fill several
    places of the list with the same test (new-user trial s18: thresholds 1, 2 and 3 of an item, 10.53 each)."""
    out: list[list] = []
    for c in culprits:
        last = out[-1][-1] if out else None
        if (last is not None and c.kind == last.kind == "threshold" and c.variables[0] == last.variables[0]
                and c.group == last.group and abs(c.index - last.index) <= 1e-6 * max(1.0, abs(c.index))):
            out[-1].append(c)
        else:
            out.append([c])
    return out


def _declared_note(steps) -> str:
    """Which parameters the model file's 'noninvariant' statements leave free across groups, from which step on."""
    first: dict = {}
    for step in steps:
        for ref in step.declared:
            first.setdefault((ref.kind, ref.names, ref.group), step.level)
    if not first:
        return ""
    d = steps[0].result.description
    every = [f"{_parameter(ref, d)} (from the {level} step)" for ref, level in first.items() if ref[2] is None]
    one = [f"{_parameter(ref, d)} (from the {level} step)" for ref, level in first.items() if ref[2] is not None]
    # sentences, each group named by the one rule (language.names.written_group through parameter_words; s22)
    others = set_apart_words(len(d.groups) if d is not None else 0, "are")
    said = ([f"{word_list(every)} {'is' if len(every) == 1 else 'are'} not held equal across groups"] if every else []) + (
        [f"{word_list(one)} {'is' if len(one) == 1 else 'are'} {others}"] if one else [])
    return (f"Partial invariance declared in the model file: {'; '.join(said)}. The steps marked partial hold every "
            f"other equality of their level.")


def _score_tests_mcar_note(result) -> list[Text]:
    """What the normal-theory score tests of the steps assume with full-information ML and rows with gaps, when the
    report shows some (InvarianceResult.score_tests_assume_mcar)."""
    shown = result.freed or any(not s.holds and s.culprits for s in result.steps)
    if not (shown and result.score_tests_assume_mcar):
        return []
    return [Note((f"With rows with gaps, the normal-theory score tests {mcar_score_tests()}; robust score tests",
                  Command(f" ({Option.ROBUST})", takes=taken_by(Option.ROBUST)), " take the observed information, which holds when they are missing "
                  "at random."))]


def _reversed_in_group_lines(configural, groups) -> list[str]:
    """A caution, first, for each item whose configural loading has the opposite sign in a group (hostile s20: an
    item recoded in one group ended the ladder in an inadmissible metric step with no word of the coding)."""
    return [f"The standardized loading of {item} on {factor} is {unit(a, 2)} in group {written_group(g, groups)} and "
            f"{unit(b, 2)} in group {written_group(h, groups)} in the configural model: the item is probably coded "
            f"the other way round in one of the groups (a reverse-worded item recoded in some rows and not others), "
            f"and no step that holds its loading equal can fit. What to try: check that item's coding in each group."
            for (factor, item), g, a, h, b in reversed_across_groups(configural)]


def invariance_report(result) -> Report:
    from cfa_tool.workflows.invariance import STOP_HOLDS, delta_cfi_not_defined, unsound_basis  # loaded with the ladder

    # two narrow tables (each level's own fit; each step against the one before) read in 80 columns;
    # a partially invariant step shows first with every equality, then with the freed ones
    levels, level_values, flagged = [], [], []
    steps, step_values = [], []
    adjusted = any(step.result.robust is not None for step in result.steps)
    named_levels = [(f"the {step.level} model{' with every equality' if step.partial else ''}", step.full_result)
                    for step in result.steps if step.partial and step.full_result is not None]
    named_levels += [(f"the {step.level} model", step.result) for step in result.steps]
    dashes = not_computed_note(named_levels)  # robust figures not computed: dashes, said under the levels' table
    doubted = any(design_doubts(s.result) for s in result.steps)  # the paragraph's rule (invariance_paragraph)
    for k, step in enumerate(result.steps):
        inherited = any(s.freed for s in result.steps[:k])
        label = _step_label(step, inherited)
        first_fit = "before its search" if inherited else "all equal"  # what the step's first fit held equal
        if step.partial and step.full_result is not None:
            cells, values = _level_fit_cells(step.full_result, adjusted)
            levels.append([f"{step.level} ({first_fit})", *cells, _admissible_cell(step.full_result)])
            level_values.append([f"{step.level} ({first_fit})", *values, _admissible_cell(step.full_result)])
            if step.full_result.converged and not step.full_result.admissible:
                flagged.append(len(levels) - 1)
            if step.full_test is not None:
                before = result.steps[result.steps.index(step) - 1].result
                srmr = step.full_result.fit.srmr - before.fit.srmr
                cells, values = _step_cells(step.full_test, srmr, step.level, dashes is not None,
                                            delta_cfi_not_defined(step.full_result, before))
                steps.append([f"{step.level} ({first_fit})", *cells, _verdict(step.full_holds, step.full_result)])
                step_values.append([f"{step.level} ({first_fit})", *values, _verdict(step.full_holds, step.full_result)])
        cells, values = _level_fit_cells(step.result, adjusted)
        levels.append([label, *cells, _admissible_cell(step.result)])
        level_values.append([label, *values, _admissible_cell(step.result)])
        if step.result.converged and not step.result.admissible:
            flagged.append(len(levels) - 1)
        verdict = ("not tested (0 df)" if step.untested else f"{NOT_JUDGED} (did not converge)"
                   if not step.result.converged else NOT_JUDGED if step.unjudged and step.result.admissible
                   else TEST_MET if step.holds and unsound_basis(result.steps, k) is not None
                   else _verdict(step.holds, step.result) + (DOUBTED_MARK if doubted else "")) \
            + (" *" if step.conditional else "")
        if step.versus_previous is not None:
            cells, values = _step_cells(step.versus_previous, step.delta_srmr, step.level, dashes is not None,
                                        delta_cfi_not_defined(step.result, result.steps[k - 1].result))
            steps.append([label, *cells, verdict])
            step_values.append([label, *values, verdict])
        else:
            steps.append([label, "its own fit", "", "", "", "", verdict])
            step_values.append([label, None, None, None, None, None, None, verdict])
    ordinal = result.steps[0].result.method.ordinal
    delta_columns = [("\u0394CFI", "r"), ("\u0394RMSEA", "r"), ("\u0394SRMR", "r")]
    delta_values = ["\u0394CFI", "\u0394RMSEA", "\u0394SRMR"]
    if ordinal:  # the adjusted indices are re-estimated for each model: their changes are not read (ADJUSTED_NOTE)
        steps = [row[:3] + row[6:] for row in steps]
        step_values = [row[:4] + row[7:] for row in step_values]
        delta_columns, delta_values = [], []
    # the differences are the scaled ones when every step's is (a step that falls back to another says so in a note)
    scaled = {DifferenceMethod.SATORRA_BENTLER_2001, DifferenceMethod.SATORRA_BENTLER_2010}
    difference = ("Scaled difference (df)" if all(s.versus_previous.method in scaled for s in result.steps[1:]
                                                  if s.versus_previous is not None) and len(result.steps) > 1
                  else "Difference (df)")
    tables = [
        _table("levels", "Fit of each level", [("Level", "l"),
                                                ("Scaled chi-square (df)" if adjusted else "Chi-square (df)", "r"),
                                                ("p", "r"), ("CFI", "r"), ("RMSEA", "r"), ("SRMR", "r"),
                                                ("Admissible", "l")], levels, dashes,
               flagged=tuple(flagged),
               values=(["Level", "Chi-square", "df", "p", "CFI", "RMSEA", "SRMR", "Admissible"], level_values)),
        _table("steps", "Each step against the one before",
               [("Level", "l"), (difference, "r"), ("p", "r"), *delta_columns, ("Holds", "l")], steps,
               joined(note for note, shown in (
                   (INADMISSIBLE_VERDICT_NOTE, any(not s.result.admissible for s in result.steps)),
                   (TEST_MET_NOTE, any(s.holds and unsound_basis(result.steps, k) is not None
                                       for k, s in enumerate(result.steps))),
                   *((f"'{NOT_JUDGED}': the {s.level} {'model' if s.versus_previous is None else 'step'}: "
                      f"{s.unjudged}.", True) for s in result.steps if s.unjudged and s.result.admissible),
                   ("* tested after a step that did not hold: the comparison is between models already rejected.",
                    any(step.conditional for step in result.steps)),
                   (f"{DOUBTED_MARK.strip()} judged by tests and robust fit indices that the sampling design leaves "
                    f"unreliable (see the caution first): no firm finding.", doubted),
                   (cfi_not_defined_sentence(result), True),
                   (Note((f"{T.NOT_COMPUTED} in \u0394CFI or \u0394RMSEA: a robust index of a level was not computed "
                          f"(see the note under ", TableReference("levels"), ").")),
                    any(T.NOT_COMPUTED in row[3:5] for row in steps) and not ordinal)) if shown) or None,
               values=(["Level", "Chi-square difference", "df difference", "p", *delta_values, "Holds"], step_values)),
    ]
    tests = sorted({step.result.robust.label for step in result.steps if step.result.robust is not None})
    scaled_note = (f"Chi-square, CFI and RMSEA of each level are the scaled statistic and robust indices "
                   f"({', '.join(tests)}), and each difference test is the scaled difference of those statistics "
                   f"(Satorra & Bentler 2001){_other_differences(result.steps)}.")
    notes = ([ADJUSTED_NOTE if ordinal else scaled_note] if adjusted else []) + [
        CONFIGURAL_ORDINAL_NOTE if ordinal else CONFIGURAL_NOTE]
    if result.freed:
        many = len(result.groups) > 2
        rows = [[f.level, f.words(article=False, groups=result.groups), *([str(f.group)] if many else []),
                 num(f.score, 2), _freed_estimates(f)] for f in result.freed]
        values = [[f.level, f.words(article=False, groups=result.groups), *([str(f.group)] if many else []),
                   f.score, _freed_estimates(f)] for f in result.freed]
        columns = [("Level", "l"), ("Parameter", "l")] + ([("Pointed to by group", "l")] if many else []) + [
            ("Score test", "r"), ("Estimate in each group (SE)", "l")]
        note = (f"Score tests: {result.score_tests.phrase}, each compared with chi-square(1) at alpha = "
                f"{unit(result.alpha, 3).rstrip('0')}, the level the search stops at."

                + " Estimates in each group: the fit of the step's partial model, unstandardized (fixed: set by the "
                  "model's scaling, no SE)."
                + (" Each freed parameter is freed in every group: its equality across the groups is dropped, so it "
                   "may differ between any of them; 'Pointed to by group' names the group whose constraint had the "
                   "largest score test." if many else "")
                + (" A parameter marked 'alone' is freed in that group only: the model file sets it apart in another "
                   "group, and the search freed the rest of its equality where its score test pointed, the other "
                   "groups still holding it equal among themselves."
                   if any(f.alone for f in result.freed) else ""))
        statements = result.partial_statements()
        if statements:  # how to fit that model again: the model file's lines (a manuscript edits no model file)
            note = Note((note, Command(f" To fit the partially invariant {statements[0].split()[-1]} model again "
                                       f"(fit, scores), add to the model file: "
                                       + "; ".join(f"'{s}'" for s in statements) + ".")))
        tables.append(_table("freed", "Parameters freed by the partial-invariance search", columns, rows, note,
                             values=([c for c, _ in columns], values)))
        notes.extend(_equal_tests_note(f) for f in result.freed if f.equal_tests)
    declared = _declared_note(result.steps)
    if declared:
        notes.append(declared)
    notes.extend(_score_tests_mcar_note(result))
    for step in result.steps:
        if step.stopped and (step.partial or step.stopped != STOP_HOLDS):
            freed_words = f"freed {len(step.freed)} parameter{'s' if len(step.freed) != 1 else ''} and " \
                if step.partial else ""
            notes.append(f"The search at the {step.level} step {freed_words}stopped: {step.stopped}.")
        if not step.holds and step.culprits:
            notes.append(_misfit_sources(step, result))
    if result.latent_differences:
        rows = [[d.factor, d.group, est_num(d.mean), est_num(d.se), f"[{est_num(d.ci95[0], 2)}, {est_num(d.ci95[1], 2)}]",
                 p_value(d.p_value), est_num(d.standardized, 2), est_num(d.variance_ratio, 2)]
                for d in result.latent_differences]
        values = [[d.factor, d.group, d.mean, d.se, d.ci95[0], d.ci95[1], d.p_value, d.standardized, d.variance_ratio]
                  for d in result.latent_differences]
        tables.append(_table("latent_differences", "Latent mean and variance differences",
                             [("Factor", "l"), ("Group", "l"), ("Mean", "r"), ("SE", "r"), ("95% CI", "r"), ("p", "r"),
                              ("d", "r"), ("Var. ratio", "r")], rows, result.latent_note or None,
                             values=(["Factor", "Group", "Mean", "SE", "95% CI lower", "95% CI upper", "p", "d",
                                      "Variance ratio"], values)))
    elif result.latent_note:
        notes.append(result.latent_note)
    inadmissible = any(s.result.converged and not s.result.admissible for s in result.steps)
    first = result.steps[0].result
    # the design's caution first: it doubts every step's test, the verdicts among the warnings included
    warnings = (tuple(_design_caution_lines([(f"the {s.level} model", s.result) for s in result.steps], given=False))
                + tuple(_reversed_in_group_lines(first, result.groups))
                # every step's solution's cautions (two factors that correlate nearly 1, a robust test that could not
                # be computed: its dashes in the tables), once each, with the steps that have them: first, as fit
                + tuple(result.warnings) + tuple(_ladder_caution_lines(
                    [pair for s in result.steps for pair in ((f"{s.level} with every equality", s.full_result),
                                                             (s.level, s.result))
                     if pair[0] == s.level or (s.partial and s.full_result is not None)])))
    notice = None if not warnings else ProblemNotice(SOME_NOT_ADMISSIBLE if inadmissible else CHECK_SOLUTIONS, warnings,
                                                     inadmissible)
    labels = tuple(result.groups)
    lines = ("Reference group (factor means fixed at zero): " + (
                 written_group(result.groups[0], labels) if result.reference_rule is None else
                 reference_words(result.groups[0], result.reference_rule, labels)),
             f"{count_text(first.n_obs)} rows analysed "
             f"({', '.join(f'{written_group(g.label, labels)}: {count_text(g.data.n_obs)}' for g in first.groups)}); "
             f"estimation: {first.estimator}",
             *_design_lines(first),
             f"Each step after the configural one is judged by "
             f"{result.rule.description.replace('alpha', unit(result.alpha, 2))}.")
    from cfa_tool.workflows.invariance import LEVELS, ORDINAL_LEVELS

    return Report(ResultKind.INVARIANCE, f"Measurement invariance across {result.group_column} "
                  f"({', '.join(written_group(g, result.groups) for g in result.groups)})",  # a title: as prose (s20)
                  notice, lines, tuple(tables), tuple(notes), (GUIDE_NOTE, HIGH_STAKES_NOTE),
                  invariance_paragraph(result, ORDINAL_LEVELS if ordinal else LEVELS),
                  warnings=few_answers_lines((first,)) + T.higher_order_cautions(first)
                  + tuple(getattr(result, "notes", ())))


# ---------------------------------------------------------------- replicate

def _replication_figures(result, adjusted: bool) -> tuple:
    """(chi-square, df, p, RMSEA, CFI) of a fit: the scale-shifted ones of an ordinal fit (``adjusted``)."""
    f, r = result.fit, result.robust
    if adjusted and r is not None:
        return r.chi_square_scaled, r.df, r.p_value_scaled, r.rmsea_robust, r.cfi_robust
    return f.chi_square, f.df, f.p_value, f.rmsea, f.cfi


#: the replication table's row of the test of one solution in both samples (workflows.replication)
SAME_SOLUTION_ROW = "One solution for both samples vs. each its own"
SAME_SOLUTION_NOTE = ("One solution for both samples: the two samples fitted together with every loading, error "
                      "variance and covariance (of ordinal items: error covariance) and factor variance and covariance "
                      "held equal, against each sample fitted on its own; a small p says the samples' solutions "
                      "differ.  The cross-validation index (Cudeck & Browne 1983) is descriptive.")


def replication_report(replications) -> Report:
    reps = list(getattr(replications, "replications", None) or [replications])
    problems, cautions, tables, notes = [], [], [], []
    for k, rep in enumerate(reps):
        # each fit named by its data after 'on', never in parentheses: a description of data may hold its own
        # ('data.dta (half B, seed 11)'), and parentheses in parentheses read badly (new-user trial 18)
        named = [(f"the calibration fit on {rep.calibration}", rep.calibration_result),
                 (f"the loose refit on {rep.validation}", rep.loose)]
        problems += _problem_lines(named)
        cautions += _caution_lines(named, given=False)
        cautions += _reversed_loading_lines(rep)
        cal = _replication_figures(rep.calibration_result, rep.adjusted)
        total = rep.calibration_result.n_obs + rep.loose.n_obs
        rows = [[f"Calibration fit (N = {count_text(rep.calibration_result.n_obs)})", f"{cal[0]:.3f}", str(cal[1]),
                 p_value(cal[2]), unit(cal[3]), unit(cal[4])]]
        values = [["Calibration fit", rep.calibration_result.n_obs, *cal]]
        flagged = [0] if not rep.calibration_result.admissible else []
        if rep.loose.fit is not None and rep.loose.converged:
            f = _replication_figures(rep.loose, rep.adjusted)
            rows.append([f"Loose: same model refitted (N = {count_text(rep.loose.n_obs)})", f"{f[0]:.3f}", str(f[1]),
                         p_value(f[2]), unit(f[3]), unit(f[4])])
            values.append(["Loose: same model refitted", rep.loose.n_obs, *f])
            if not rep.loose.admissible:
                flagged.append(1)
        else:
            rows.append(["Loose: same model refitted", "did not converge", "", "", "", ""])
            values.append(["Loose: same model refitted (did not converge)", rep.loose.n_obs, None, None, None, None, None])
        same = rep.same_solution
        if same.not_computed:
            rows.append([SAME_SOLUTION_ROW, "not tested", "", "", "", ""])
            values.append([f"{SAME_SOLUTION_ROW} (not tested)", total, None, None, None, None, None])
            notes.append(f"{rep.calibration} and {rep.validation}: one solution for both samples was not tested: "
                         + same.not_computed + "; the cross-validation index is descriptive only.")
        else:
            rows.append([SAME_SOLUTION_ROW, f"{same.chi_square_difference:.3f}", str(same.df_difference),
                         p_value(same.p_value), "", ""])
            values.append([SAME_SOLUTION_ROW, total, same.chi_square_difference, same.df_difference, same.p_value,
                           None, None])
        tables.append(_table(f"replication_{k + 1}", f"Calibrated on {rep.calibration}, validated on {rep.validation}",
                             [("Check", "l"), ("Chi-square", "r"), ("df", "r"), ("p", "r"), ("RMSEA", "r"), ("CFI", "r")],
                             rows, f"Cross-validation index (Cudeck & Browne 1983): {rep.cvi:.4f}; saturated model: "
                                   f"{rep.cvi_saturated:.4f} (smaller is better).", tuple(flagged),
                             values=(["Check", "N", "Chi-square", "df", "p", "RMSEA", "CFI"], values)))
        loadings = _loading_table(rep, k + 1)
        if loadings is not None:
            tables.append(loadings)
    if reps[0].rows:
        tables.insert(0, _rows_table(reps[0]))
    if any(rep.adjusted for rep in reps):
        notes.append(f"Ordinal items: every chi-square, RMSEA and CFI is the {FitTest.SCALE_SHIFTED.label} one of "
                     "the least-squares fit; the test of one solution fits the two samples together, the thresholds "
                     "free in each, and compares the fits with and without the equalities by the scale-shifted "
                     "difference (Asparouhov & Muthén 2006); the cross-validation index is the least-squares "
                     "discrepancy of the validation sample's polychoric correlations from those the calibration "
                     "estimates imply, with the validation sample's weights.")
    if any(r.method.missing is MissingData.FULL_INFORMATION for rep in reps for r in (rep.calibration_result, rep.loose)):
        notes.append("Rows with gaps: a sample whose rows have gaps is fitted by full-information ML, as fit fits it, "
                     "and so is the two-sample model of the test of one solution; when the validation sample has "
                     "gaps, the cross-validation index is its full-information discrepancy from the calibration "
                     "covariance matrix, its means at their maximum-likelihood values given that matrix.")
    if any(not rep.same_solution.not_computed for rep in reps):
        notes.append(SAME_SOLUTION_NOTE)
    scaled = list(dict.fromkeys(rep.same_solution.method for rep in reps if not rep.same_solution.not_computed
                                and rep.same_solution.method in (DifferenceMethod.SATORRA_BENTLER_2001,
                                                                 DifferenceMethod.SATORRA_BENTLER_2010)))
    if scaled:  # a robust test asked for: the two-sample fits' robust statistics, not the normal-theory ones
        notes.append(f"With the robust test, the test of one solution is {word_list([m.phrase for m in scaled], 'or')} of "
                     f"the two-sample fits' robust statistics, and its chi-square is that scaled difference; the "
                     f"strictly positive version (Satorra & Bentler 2010) is used when the 2001 correction is not "
                     f"positive.")
    halves = next((rep.split.halves_words for rep in reps if rep.split is not None), "two random halves")
    title = "Replication" if len(reps) == 1 else f"Replication in {halves}, each way"
    # the data's cautions first (the halves of one file: once), then the calibration fits'
    cautions = list(dict.fromkeys(p.line() for rep in reps for p in rep.data_problems)) + cautions
    split = tuple(dict.fromkeys([_split_sentence(rep.split) for rep in reps if rep.split is not None]
                                + [halves_named_alike(rep.split.seed, False, rep.split.cluster, rep.split.strata)
                                   for rep in reps
                                   if rep.split is not None and rep.split.seed is not None
                                   and rep.split.split >= rep.split.in_file]))  # explore's halves when the same rows
    read = tuple(dict.fromkeys([c for rep in reps for c in T.higher_order_cautions(rep.calibration_result)]
                               + [n for rep in reps for n in getattr(rep, "notes", ())]))  # as fit says them
    rare = tuple(dict.fromkeys(w for rep in reps for r in (rep.calibration_result, rep.loose)
                               if (w := T.few_answers_warning(r, table=False)) is not None))  # each half's answers
    return Report(ResultKind.REPLICATE, title, _notice(problems, cautions), split, tuple(tables), tuple(notes),
                  (GUIDE_NOTE, HIGH_STAKES_NOTE), replication_paragraph(replications), warnings=rare + read)


def _reversed_loading_lines(rep) -> list[str]:
    """A caution, first, for each item whose loading changes sign between the samples (hostile s20: an item recoded in
    one file made the test of one solution fail by a difference of 1.56 with no word why), as scores --from-fit names
    an item coded the other way round."""
    # the samples named after a comma, never in parentheses: a random half's name holds its own ('data.csv (half A,
    # seed 1)')
    return [f"The standardized loading of {item} on {factor} is {unit(a, 2)} in the calibration sample, "
            f"{rep.calibration}, and {unit(b, 2)} in the validation sample, {rep.validation}: the item is probably "
            f"coded the other way round in one of the files (a reverse-worded item recoded in one and not the other), "
            f"and then the test of one solution fails for the coding, not the scale. What to try: check that item's "
            f"coding in both files."
            for (factor, item), a, b in reversed_loadings(rep)]


#: how each sample's rows with gaps were used, and what that assumes (Little & Rubin 2002)
ROWS_WITH_GAPS_USED = {
    MissingData.FULL_INFORMATION: ("kept: full-information ML", "missing at random"),
    MissingData.PAIRWISE: ("kept: pairwise present rows", "missing completely at random"),
    MissingData.LISTWISE: ("left out: listwise deletion", "missing completely at random"),
}


def _rows_table(rep) -> ReportTable:
    """The rows of each sample (workflows.replication.SampleRows): read, analysed, with gaps, and how those were used
    (random halves: half A is the first replication's calibration sample)."""
    names = ((REPLICATE_NAMES.label(0), REPLICATE_NAMES.label(1)) if rep.split is not None
             else ("Calibration", "Validation"))
    # with a row filter the rows the file holds come first and the rows read are those the filter kept (hostile
    # tester s13: 'Rows read 123' where the file held 240 and the filter kept 123)
    filtered = any(sample.in_file is not None for sample in rep.rows)
    rows, values, assumed = [], [], []
    for name, sample in zip(names, rep.rows):
        gaps = sample.with_gaps if sample.missing is not MissingData.LISTWISE else sample.left_out
        how, assumption = ROWS_WITH_GAPS_USED[sample.missing] if gaps else ("none had gaps", "")
        if assumption:
            assumed.append(f"{name}, answers {assumption}")
        in_file = sample.in_file if sample.in_file is not None else sample.read
        rows.append([name] + [count_text(in_file)] * filtered + [count_text(sample.read), count_text(sample.analysed),
                                                              count_text(gaps), how])
        values.append([name] + [in_file] * filtered + [sample.read, sample.analysed, gaps, how])
    columns = ([("Sample", "l")] + [("Rows in the file", "r"), ("Kept by the row filter", "r")] * filtered
               + [("Rows read", "r")] * (not filtered)
               + [("Analysed", "r"), ("With gaps", "r"), ("Rows with gaps", "l")])
    note = (f"{names[0]}: {rep.calibration}; {names[1]}: {rep.validation}.  With gaps: rows missing an answer "
            f"on some model variable (under listwise deletion, those left out)."
            + (f"  What the handling of gaps assumes (Little & Rubin 2002): {'; '.join(assumed)}." if assumed else ""))
    return _table("replication_rows", "Rows of each sample", columns, rows, note,
                  values=([c for c, _ in columns], values))


def _loading_table(rep, k: int) -> ReportTable | None:
    """The standardized loadings of the calibration and the validation sample side by side, with their difference
    (validation minus calibration); None when the validation fit did not converge."""
    if not rep.loose.converged:
        return None
    pairs = _loading_pairs(rep)
    rows = [[names_text((factor,)), names_text((item,)), unit(a, 2), unit(b, 2), signed(b - a, 2)]
            for (factor, item), a, b in pairs]
    values = [[factor, item, a, b, b - a] for (factor, item), a, b in pairs]
    columns = [("Factor", "l"), ("Item", "l"), ("Calibration", "r"), ("Validation", "r"), ("Difference", "r")]
    return _table(f"replication_{k}_loadings", f"Standardized loadings: {rep.calibration} and {rep.validation}",
                  columns, rows, "Difference: validation minus calibration; a description, not a test (the test of "
                                 "one solution above tests every parameter at once).",
                  values=([c for c, _ in columns], values))


# ---------------------------------------------------------------- bootstrap

SCALE_WORDS = {"standardized": "std.", "unstandardized": "unstd."}  # short words for a narrow column

ORDINAL_BOOTSTRAP = ("Ordinal items: each resample gets its own thresholds and polychoric correlations and is refitted "
                     "by {estimator}. Only the parameters are bootstrapped, by percentile intervals: BCa's acceleration "
                     "and the Bollen-Stine bootstrap of the test are built for continuous rows and have no counterpart "
                     "for ordinal answers, so the test of fit remains the fit's adjusted one.")


def _freed_estimates(freed) -> str:
    """A freed parameter's estimate in each group of its step's partial model, with its standard error ('Grant-White
    2.00 (0.09); Pasteur 2.53 (0.11)'), so that the size and the direction of the difference show (new-user trial
    s20)."""
    return "; ".join(f"{g} {est_num(e, 2)} ({est_num(se, 2) if free else 'fixed'})" for g, e, se, free in freed.estimates)


def _equal_tests_note(freed) -> str:
    """Why the search freed one of parameters whose score tests were equal (workflows.invariance.EQUAL_SCORE_TESTS):
    freeing any of them gives the same fit, and the first in the model's order was freed, so rounding never chose."""
    chosen = parameter_words(freed.kind, freed.variables)
    others = word_list([parameter_words(k, v) for k, v in freed.equal_tests])
    either = "either" if len(freed.equal_tests) == 1 else "any"
    return (f"At the {freed.level} step the score tests of {chosen} and {others} were equal ({num(freed.score, 2)}): "
            f"freeing {either} of them fits the same, so the search freed the first in the model's order, {chosen}; "
            f"{others} could be freed instead.")


def _split_sentence(rows) -> Text:
    """Which rows of the file random halves were drawn from (workflows.replication.SplitRows)."""
    drawn = rows.how_drawn()  # row by row, or cluster by cluster within strata (workflows.replication.SplitRows)
    clusters: Text = f" {drawn[0].upper()}{drawn[1:]}."
    if rows.cluster is None:  # the option that draws them cluster by cluster, with a column named for units if any
        clusters = Note((clusters[:-1], Command(f" ({Option.CLUSTER.given(rows.unit_column or 'COLUMN')})",
                                                takes=taken_by(Option.CLUSTER)), "."))
    if rows.split >= rows.in_file:
        return (f"The {count_text(rows.split)} rows {f'{rows.kept_words()[1:]}' if rows.filters else 'of the file'} were "
                f"{rows.split_words()}." + clusters)
    why = ("they miss some answers, and the halves hold complete rows only" if rows.complete_only else
           "they answer none of the model's items")
    return (f"{count_text(rows.split)} of the {count_text(rows.in_file)} rows{rows.kept_words()} were {rows.split_words()}; the other "
            f"{count_text(rows.in_file - rows.split)} were left out before the split ({why})." + clusters)


def _left_out(result) -> str:
    """The rows with missing answers a command that refits complete rows left out ('' when none were), or, for
    a full-information fit, that the rows with gaps are kept in every refit."""
    d = result.data
    if result.method.ordinal:
        return ""
    if result.method.missing is MissingData.FULL_INFORMATION:
        return (" with their gaps, each refitted by full-information ML"
                + (f"; {count_text(d.rows_dropped)} of {count_text(d.rows_read)} rows answered none of the items and were left out"
                   if d.rows_dropped else ""))
    if not d.rows_dropped:
        return ""
    return f" ({count_text(d.rows_dropped)} of {count_text(d.rows_read)} rows with missing answers left out: the refits use complete rows)"


def bootstrap_report(boot) -> Report:
    result = boot.fit
    ordinal = result.method.ordinal
    not_converged = boot.replications - boot.converged - boot.failed
    why_failed = ("an item was left with a single answer, or the correlations were not positive definite" if ordinal else
                  "an item had fewer than two answers, or a pair of items none together, so the saturated model could "
                  "not be estimated")
    opening = f"{count_text(boot.replications)} resamples of {count_text(result.n_obs)} rows{_left_out(result)} (seed {boot.seed}); "
    if not_converged or boot.failed:
        opening += (f"{count_text(boot.converged)} converged"
                    + (f", {count_text(not_converged)} did not" if not_converged else "")
                    + (f"{' and' if not_converged else ','} {count_text(boot.failed)} could not be analysed ({why_failed})"
                       if boot.failed else "")
                    + "; those are left out of the intervals.")
    else:
        opening += "every one converged."
    lines = [opening]
    if ordinal:
        lines.append(ORDINAL_BOOTSTRAP.format(estimator=result.method.weighting.phrase))
        joined = joined_sentence(result.data, ", in the fit and in every resample")  # as fit's paragraph names them
        if joined:
            lines.append(joined)
    if boot.lacked:
        lines.append(_lacked_sentence(boot))
    if _design_lines(result):
        lines += [*_design_lines(result), "Resamples draw whole clusters (each row its own cluster without them) within "
                                          "strata, and keep the rows' weights."]
    clusters = result.design.clusters if _design_lines(result) else None
    # resamples of a handful of clusters: a problem of every interval, first (s25: said among the lines before)
    few_resampled = (f"With only {clusters} clusters the resamples are few kinds of the same clusters, so the bootstrap "
                     f"intervals are too narrow and unsteady (fewer than about {SMALL_NUMBER_OF_CLUSTERS} clusters, "
                     f"common practice). What to try: read them as rough, beside the fit's cluster-robust standard "
                     f"errors; more clusters in a later sample help."
                     if clusters is not None and clusters < SMALL_NUMBER_OF_CLUSTERS else None)
    if boot.bollen_stine_p is not None:
        lines.append(f"Bollen-Stine bootstrap p-value of the chi-square test: {unit(boot.bollen_stine_p)} "
                     f"({count_text(boot.bollen_stine_converged)} converged resamples; normal-theory p {p_phrase(result.fit.p_value)}).")
    elif boot.bollen_stine_not_computed and result.fit.df == 0:  # no test at all to fall back on
        lines.append(f"No Bollen-Stine p-value: {boot.bollen_stine_not_computed}.")
    elif boot.bollen_stine_not_computed:
        robust = result.robust
        test = (f"{robust.statistic()} (p {p_phrase(robust.p_value_scaled)})" if robust is not None
                else f"chi-square (p {p_phrase(result.fit.p_value)})")
        lines.append(f"No Bollen-Stine p-value: {boot.bollen_stine_not_computed}; the test of fit remains the fit's "
                     f"{test}.")
    def shown(value: float, scale: str) -> str:  # a standardized value within [-1, 1] without its leading zero
        return est_unit(value, 3) if scale == "standardized" and not missing(value) and abs(value) <= 1 else est_num(value)

    rows = [[parameter_words(i.kind, i.variables, article=False), SCALE_WORDS.get(i.scale, i.scale),
             shown(i.estimate, i.scale),
             est_num(i.bootstrap_se), f"[{shown(i.percentile[0], i.scale)}, {shown(i.percentile[1], i.scale)}]"
             if i.available else NOT_AVAILABLE,
             *([] if ordinal else [f"[{shown(i.bca[0], i.scale)}, {shown(i.bca[1], i.scale)}]"])] for i in boot.intervals]
    unavailable = [i for i in boot.intervals if not i.available]
    values = [[i.kind, names_text(i.variables), i.scale, i.estimate, i.bootstrap_se, *i.percentile,
               *([] if ordinal else i.bca), *([i.lacked_below + i.lacked_above] if unavailable else [])]
              for i in boot.intervals]
    kinds = "percentile intervals" if ordinal else "percentile and bias-corrected and accelerated (BCa; Efron 1987) intervals"
    table = _table("bootstrap_intervals", "Bootstrap intervals (95%)",
                   [("Parameter", "l"), ("Scale", "l"), ("Estimate", "r"), ("Bootstrap SE", "r"), ("Percentile", "r"),
                    *([] if ordinal else [("BCa", "r")])], rows,
                   "Scale: std., standardized (every variable with variance 1); unstd., in the model's units"
                   + ("; thresholds are on the latent response's scale (variance 1)" if ordinal else "")
                   + f". {kinds[0].upper()}{kinds[1:]} from the converged resamples"
                   + (f"; '{NOT_AVAILABLE}': a threshold that some resamples gave no value, as the first lines say."
                      if unavailable else "."),
                   values=(["Kind", "Variables", "Scale", "Estimate", "Bootstrap SE", "Percentile lower",
                            "Percentile upper", *([] if ordinal else ["BCa lower", "BCa upper"]),
                            *(["Resamples without a value"] if unavailable else [])], values))
    few = few_draws(boot.converged, 0.025, "converged resamples", "the interval ends" + (
        " and the Bollen-Stine p-value" if boot.bollen_stine_p is not None else ""))
    kept = not_admissible_sentence([(boot.inadmissible, boot.converged, boot.inadmissible_named, "")], "resamples",
                                   "the intervals, which are of the estimates' sampling distribution, such solutions "
                                   "included")
    if not boot.intervals:  # a model fixing every parameter: nothing estimated, no interval (an empty table before)
        lines.append("The model fixes every parameter, so there are no estimates to give intervals for; the resamples "
                     "serve the test of the stated values" + (" (the Bollen-Stine p-value above)."
                                                              if boot.bollen_stine_p is not None else "."))
    lost = _resamples_left_out(boot, why_failed)
    rare = T.few_answers_warning(result, table=False)
    notice = _fit_notice(result)
    if lost:  # intervals conditional on what the left-out resamples lacked: in the first box, as cutoffs' samples
        notice = replace(notice, lines=notice.lines + (lost,)) if notice is not None else _notice([], [lost])
    if few_resampled:
        notice = (replace(notice, lines=notice.lines + (few_resampled,)) if notice is not None
                  else _notice([], [few_resampled]))
    if unavailable:  # thresholds without an interval: in the first box, with what would give them one
        without = _without_interval(boot, unavailable)
        notice = replace(notice, lines=notice.lines + (without,)) if notice is not None else _notice([], [without])
    reliability = bootstrap_reliability_table(boot)
    return Report(ResultKind.BOOTSTRAP, f"Bootstrap of {result.model_name}", notice, tuple(lines),
                  ((table,) if boot.intervals else ()) + ((reliability,) if reliability is not None else ()),
                  tuple(result.warnings), (HIGH_STAKES_NOTE,),
                  warnings=((rare,) if rare else ()) + T.higher_order_cautions(result)
                  + ((kept,) if kept else ()) + ((few,) if few else ()))


#: the interval cell of a threshold that some resamples gave no value (workflows.bootstrap.BootInterval.available)
NOT_AVAILABLE = "not available"
#: the interval cell of a coefficient whose reliability the fit withholds (assessment.reliability_intervals.Withheld)
WITHHELD = "withheld"


def _coefficient_words(interval, ordinal: bool) -> str:
    """A coefficient's name in the bootstrap's reliability table: the latent responses' for ordinal items, beside the
    omega of the answers' sum (assessment.reliability_intervals.Coefficient)."""
    from cfa_tool.assessment.reliability_intervals import Coefficient

    words = interval.coefficient.value
    return f"latent-response {words}" if ordinal and interval.coefficient is not Coefficient.SUM_OMEGA else words


def bootstrap_reliability_table(boot) -> ReportTable | None:
    """The bootstrap intervals (95%) of the reliability coefficients the fit reports (workflows.bootstrap:
    each resample's coefficients from its refit by the fit's own function), by the estimates' methods; withheld where
    the fit withholds the coefficient, with the reason; marked not interpretable, as the fit's reliability table is,
    when the solution is not admissible.  None when the fit reports no reliability."""
    result = boot.fit
    found = boot.reliability
    if not found:
        return None
    ordinal = result.method.ordinal
    body, values = [], []
    for i in found:
        if i.available:
            cells = [f"[{unit(i.percentile[0])}, {unit(i.percentile[1])}]"]
            if not ordinal:
                cells.append(f"[{unit(i.bca[0])}, {unit(i.bca[1])}]" if not missing(i.bca[0]) else "-")
        else:
            cells = [WITHHELD if i.withheld is not None else NOT_AVAILABLE] * (1 if ordinal else 2)
        shown = None if i.withheld is not None else i.estimate  # withheld: no value in any view (hostile s24b)
        body.append([i.factor, _coefficient_words(i, ordinal), WITHHELD if shown is None else unit(shown),
                     est_num(i.bootstrap_se) if i.available else "-", *cells])
        values.append([i.factor, _coefficient_words(i, ordinal), shown, i.bootstrap_se if i.available else None,
                       *i.percentile,
                       *([] if ordinal else i.bca), i.withheld.value if i.withheld is not None else None,
                       i.without_value or None])
    kinds = "Percentile intervals" if ordinal else "Percentile and BCa intervals"
    note = (f"{kinds} of each coefficient from its value in every converged resample, computed from the resample's "
            f"refit as the fit computes it (omega from the fitted loadings, factor variances and residual variances; "
            f"alpha from the resample's " + ("polychoric correlations" if ordinal else "sample covariances")
            + "), the resamples counted as for the estimates' intervals (Kelley & Pornprasertmanit 2016 recommend "
              "bootstrap intervals for omega and alpha).")
    if ordinal:
        note += (" Omega of the answers' sum: of the keyed sum of the answers' codes, from the fitted thresholds too "
                 "(Green & Yang 2009), the one to report for a sum score; the latent-response coefficients describe "
                 "the responses behind the items. Each resample keys the sums by its own loadings' signs, as a fit "
                 "does; a resample that keys a factor's sum otherwise than the fit gives that factor's coefficients no "
                 "value.")
    else:
        note += (" Every resample keeps the keys of the fit's sums (its reversed items), so that each coefficient is of "
                 "the sum the fit scores.")
    for reason in dict.fromkeys(i.withheld for i in found if i.withheld is not None):
        factors = list(dict.fromkeys(i.factor for i in found if i.withheld is reason))
        its = "its" if len(factors) == 1 else "their"
        note += f" Withheld for {word_list(factors)}, as the fit withholds {its} reliability: {reason.value}."
    lacking = [i for i in found if i.withheld is None and i.without_value]
    for i in lacking:
        note += (f" Not available for {_coefficient_words(i, ordinal)} of {i.factor}: {count_text(i.without_value)} of "
                 f"the {count_text(boot.converged)} converged resamples gave it no value"
                 + (" (or keyed its sum otherwise than the fit)" if ordinal else "")
                 + ", and an interval from the others alone would leave them out.")
    names = ["Factor", "Coefficient", "Estimate", "Bootstrap SE", "Percentile lower", "Percentile upper",
             *([] if ordinal else ["BCa lower", "BCa upper"]), "Withheld because", "Resamples without a value"]
    return _table("bootstrap_reliability", "Bootstrap intervals of the reliability (95%)",
                  [("Factor", "l"), ("Coefficient", "l"), ("Estimate", "r"), ("Bootstrap SE", "r"),
                   ("Percentile", "r"), *([] if ordinal else [("BCa", "r")])], body,
                  T._unusable(result) + note, T._all_if_unusable(result, body), values=(names, values))


def _answers_words(values) -> str:
    """'answer 1', 'answers 1 and 2', 'answers 4, 5, and 6'."""
    return f"answer{'s' if len(values) > 1 else ''} {word_list([user_number(v) for v in values])}"


def _fit_categories(boot) -> dict[str, tuple[float, ...]]:
    """Each ordinal item's answer categories in the fit (item -> categories)."""
    result = boot.fit
    return {x: tuple(v for v, _ in cats) for x, cats in zip(result.observed, result.data.categories) if cats}


def _without_interval(boot, unavailable) -> str:
    """The first box's line on thresholds whose interval is not available: which, how many resamples gave each no
    value and why, and what would give the merged threshold one."""
    levels = _fit_categories(boot)
    phrases = []
    for i in unavailable:
        item, step = i.variables[0], int(i.variables[1])
        sides = [(n, levels[item][:step] if side < 0 else levels[item][step:])
                 for n, side in ((i.lacked_below, -1), (i.lacked_above, 1)) if n]
        held = "; ".join(f"{count_text(n)} of the {count_text(boot.converged)} converged resamples held no "
                         f"{_answers_words(cats)} of {item}" for n, cats in sides)
        phrases.append(f"{parameter_words(i.kind, i.variables, article=False)} ({held})")
    return (f"No interval for {cut_list(phrases, 6, sep='; ', lead='; and ')}: a resample holding no answer on one side "
            f"of a threshold gives it no value, and an interval from the other resamples alone would be too narrow "
            f"(it could end at the estimate); every other interval comes from all {count_text(boot.converged)} "
            f"converged resamples. Join a rare category with its neighbour by a 'join answers' statement of the "
            f"model file to bootstrap the joined category's threshold")


def lacked_sentence(lacking: int, converged: int, lacked, samples: str, kept_in: str) -> str:
    """What the converged ``samples`` ('resamples', 'samples of the fitted model') that lacked an answer category of an
    ordinal item were, and how they were kept (workflows.ordinal_resampling: fitted with the categories they held);
    ``kept_in``: what they count in.  The one rule of the bootstrap, the cutoffs and power by simulation."""
    listed = cut_list(lacked, 6, lambda c: f"{c.item} {user_number(c.category)} in {count_text(c.samples)}")
    return (f"{count_text(lacking)} of the {count_text(converged)} converged {samples} lacked an answer category of an "
            f"ordinal item ({listed}); each was fitted with the categories it held, as data lacking them would be, and "
            f"kept in {kept_in}.")


def _lacked_sentence(boot) -> str:
    """What the resamples lacking an answer category were and how they were kept."""
    return lacked_sentence(boot.resamples_lacking, boot.converged, boot.lacked, "resamples", "the intervals")[:-1] + (
        ": a threshold next to a lacked category takes the value of the boundary the merged categories share, and "
        "one with no answer on a side has no value there, so its interval is not available.")


#: the share of resamples that could not be analysed from which the intervals are cautioned as conditional on what
#: those resamples lacked (a convention of this project)
LEFT_OUT_SHARE = 0.01


def _resamples_left_out(boot, why: str) -> str:
    """A caution when resamples that could not be analysed (``why``) are left out of the intervals: those that are kept
    all hold what the others lacked (a rare answer category, two answers of every item), so the intervals describe
    the estimates given that it was drawn, too narrow near it (hostile s22: 38 of 100 resamples left out for a
    category given by one row, the interval of its threshold ending at the estimate); '' below LEFT_OUT_SHARE."""
    if not boot.failed or boot.failed < LEFT_OUT_SHARE * boot.replications:
        return ""
    return (f"{count_text(boot.failed)} of the {count_text(boot.replications)} resamples "
            f"({100 * boot.failed / boot.replications:.0f}%) could not be analysed ({why}) and are left out, so the "
            f"intervals come only from resamples that kept what the others lacked (two answers of a rarely answered "
            f"item, say): the intervals of the estimates it touches are too narrow, and one may end at the "
            f"estimate. Join a rare category with its neighbour by a 'join answers' statement of the model file, "
            f"or read those intervals as too narrow")


#: fewer draws than this beyond a percentile make it move with the seed (a rule of thumb of this program)
TAIL_DRAWS = 10


def few_draws(draws: int, tail: float, what: str, moves: str) -> str:
    """A caution when the ``draws`` leave fewer than TAIL_DRAWS beyond a percentile that cuts off ``tail``: the
    interval ends or cutoffs then rest on a handful of draws and change with the seed (common practice asks for
    1,000 or more resamples for bootstrap intervals; Efron & Tibshirani 1993, recalled)."""
    beyond = draws * tail
    if beyond >= TAIL_DRAWS:
        return ""
    return (f"Only {count_text(draws)} {what}: each {100 * tail:g}% tail holds about {beyond:.1f} of them, so {moves} move with the "
            f"seed; give {count_text(math.ceil(TAIL_DRAWS / tail))} or more (common practice asks for 1,000 or more resamples for "
            f"bootstrap intervals)")


# ---------------------------------------------------------------- cutoffs

def cutoffs_without_cfi(cut) -> str:
    """How many simulated samples had no CFI (workflows.cutoffs.CutoffResult.without_cfi), which the CFI cutoffs
    leave out: said beside the samples' line, never left as a cutoff that silently does not exist."""
    correct, wrong = cut.without_cfi
    why = ("" if cut.fit.method.ordinal else " (both noncentralities at most 0, so CFI is 0/0: the baseline model "
                                              "fitted them no worse than the model)")
    return (f"CFI had no value in {count_text(correct)} of the {count_text(cut.converged_correct)} converged samples "
            f"from the fitted model and {count_text(wrong)} of the {count_text(cut.converged_misspecified)} from the "
            f"misspecified one{why}; the CFI cutoffs come from the samples where it has one"
            + (", too few of one model's to set them (at least 10 each)"
               if min(cut.converged_correct - correct, cut.converged_misspecified - wrong) < 10 else "") + ".")


def cutoffs_report(cut) -> Report:
    from cfa_tool.workflows.cutoffs import N_STEPS, SIZE_STEPS

    result = cut.fit
    rows, values = [], []
    for c in cut.cutoffs:
        if c.cutoff is None:
            found = ([f"by N = {count_text(c.separating_n)}"] if c.separating_n is not None else []) + (
                [f"for a misspecification of {unit(c.separating_size, 2)} at this N"] if c.separating_size is not None else [])
            reading = f"none at N = {count_text(cut.n_obs)}" + ("; one exists " + ", or ".join(found) if found else
                                                      "; none either at 16 times this N or 3 times the misspecification")
        elif missing(c.observed):  # this model's CFI is 0/0: on neither side of a cutoff
            reading = f"this model's {c.index.upper()} is not defined"
        else:
            reading = CUTOFF_BEYOND if c.beyond else CUTOFF_WITHIN
        rows.append([c.index.upper(), f"{100 * c.level:.0f}%", unit(c.cutoff) if c.cutoff is not None else "",
                     index_text(c.observed), reading])
        values.append([c.index.upper(), c.level, c.cutoff, c.observed, reading])
    notes = []
    if any(c.cutoff is None for c in cut.cutoffs):
        notes.append(f"Where no cutoff exists, these fit indices cannot tell this model from one with {cut.misspecification} "
                     f"left out at this sample size: a good value of them is no evidence against that misspecification. "
                     f"Look at the modification indices and residual correlations for it, or gather more data. The "
                     f"sample sizes and sizes of misspecification quoted were found by simulating at "
                     f"{', '.join(map(str, N_STEPS))} times this N and {', '.join(f'{s:g}' for s in SIZE_STEPS)} times "
                     f"the misspecification, not by extrapolating.")
    table = _table("cutoffs", "Cutoffs", [("Index", "l"), ("Level", "r"), ("Cutoff", "r"), ("This model", "r"),
                                          ("Reading", "l")], rows, cutoff_meaning(cut.misspecification),
                   values=(["Index", "Level", "Cutoff", "This model", "Reading"], values))
    left_out = _left_out(result) if cut.pattern_rows is None else ""  # the gaps carried over: said below
    lines = (f"{count_text(cut.replications)} samples of N = {count_text(cut.n_obs)}{left_out} from the fitted model and from the model with "
             f"{cut.misspecification} left out (seed {cut.seed}).",)
    if any(cut.without_cfi):
        lines += (cutoffs_without_cfi(cut),)
    if cut.pattern_rows is not None:
        lines += (f"The missing-data pattern was carried over: each simulated row takes the gaps of one of the "
                  f"{count_text(cut.pattern_rows)} data rows, drawn at random (missing completely at random, with the data's "
                  f"patterns in their proportions), and each sample is fitted by full-information ML, as the data "
                  f"were.",)
    if result.method.ordinal:
        lines += (f"Ordinal items: each sample's latent responses are cut at the fitted thresholds, and the sample is "
                  f"fitted by {result.method.weighting.phrase} on its own thresholds and polychoric correlations. CFI "
                  f"and RMSEA, of this model and of every sample, come from the {cut.statistic} statistic; SRMR from "
                  f"the polychoric correlations.",)
        if cut.correct_rejected is not None:
            lines += (f"That test rejected the fitted model at .05 in {100 * cut.correct_rejected:.1f}% of the "
                      f"{count_text(cut.converged_correct)} samples drawn from it (nominal 5%).",)
        if cut.lacking[0]:
            lines += (lacked_sentence(cut.lacking[0], cut.converged_correct, cut.lacked, "samples of the fitted model",
                                      "the distributions the cutoffs come from")
                      + (f" So did {count_text(cut.lacking[1])} of the {count_text(cut.converged_misspecified)} of the "
                         f"misspecified model." if cut.lacking[1] else ""),)
    few = few_draws(cut.replications, 0.05, "samples", "the cutoffs")
    kept = not_admissible_sentence([(count, converged, named, f" from the {whose}") for (count, named), converged, whose
                                    in zip(cut.inadmissible, (cut.converged_correct, cut.converged_misspecified),
                                           ("fitted model", "misspecified model"))],
                                   "samples", "the distributions the cutoffs come from")
    # the samples whose solutions are not admissible: in the first box, as power-simulation says its replications'
    notice = _fit_notice(result)
    if kept:
        notice = replace(notice, lines=notice.lines + (kept,)) if notice is not None else _notice([], [kept])
    # the fit's notes on its rows (rows left out, rows with gaps) first, beside the notes on the estimation
    return Report(ResultKind.CUTOFFS, f"Model-specific fit cutoffs for {result.model_name}", notice, lines,
                  (table,), tuple(notes), ("These cutoffs hold for this model, sample size and kind of misspecification "
                                           "only; they are guides, not laws.", HIGH_STAKES_NOTE),
                  warnings=tuple(result.warnings) + (() if (rare := T.few_answers_warning(result, table=False)) is None
                                                     else (rare,)) + ((few,) if few else ()))


#: how a fit index on either side of a simulated cutoff reads (McNeish & Wolf 2023): the cutoff is a value that most
#: samples of a model misspecified by the stated amount pass, so a value within it makes misfit that large unlikely,
#: and a value beyond it only fails to rule it out (a smaller misspecification, or another kind, can give it too)
CUTOFF_BEYOND = "beyond: misfit that large is not ruled out"
CUTOFF_WITHIN = "within: misfit that large is unlikely"


def cutoff_meaning(misspecification: str) -> str:
    """The note under the cutoffs: what a cutoff at a level means, and so what either side of it says."""
    return (f"A cutoff at 95% is a value that 95% of the samples from the model with {misspecification} left out "
            f"fall beyond, and at most 5% of the samples from the fitted model do (likewise at 90%; McNeish & Wolf "
            f"2023). A value within it is one such a misspecified model seldom gives, so misfit that large is "
            f"unlikely; a value beyond it is what such a model gives in most samples, which does not show that misfit "
            f"that large is present (a smaller misspecification, or another kind, can give it too).")


# ---------------------------------------------------------------- power

def power_report(result) -> Report:
    if hasattr(result, "nested"):  # the difference test against a nested model (workflows.power_nested)
        return nested_power_report(result)
    rows = [["Test", f"{result.test} fit", result.test],
            ["RMSEA under the null hypothesis", short(result.rmsea_null), result.rmsea_null],
            ["RMSEA under the alternative", short(result.rmsea_alternative), result.rmsea_alternative],
            ["Degrees of freedom", str(result.df), result.df],
            ["Significance level", short(result.alpha), result.alpha]]
    effective = getattr(result, "effective_n", None)  # N / design effect of a planned cluster sample (Kish 1965)
    if result.power is not None:
        rows.append([f"Power with N = {count_text(result.n_obs)}" + (" rows of the cluster sample" if effective else ""),
                     unit(result.power), result.power])
    planned = getattr(result, "clusters", None)  # a planned cluster sample (workflows.power.cluster_plan)
    rows.append([f"Smallest N{' of independent rows' if planned is not None else ''} for power {unit(result.target_power, needed_decimals(result.target_power, fewest=2))}", str(result.required_n), result.required_n])
    rows += _cluster_rows(planned, effective, result.n_obs)
    table = _table("power", "Power and sample size", [("", "l"), ("Value", "r")], [r[:2] for r in rows],
                   f"Note: {result.note}." if result.note else None,
                   values=(["Quantity", "Value"], [[r[0], r[2]] for r in rows]))
    notes = [power_assumptions(planned is not None)] + ([POWER_ORDINAL] if result.ordinal else [])
    below = getattr(result, "below_rows_rule", ())
    lines = (rows_rule_caution(result),) if below else ()
    lines += planned_clusters_lines(result.clusters, getattr(result, "free_parameters", None), result.n_obs,
                                    result.target_power)
    notice = ProblemNotice(POWER_CAUTION, lines, False) if lines else None
    return Report(ResultKind.POWER, "Power of the RMSEA test (MacCallum, Browne & Sugawara 1996)", notice, (),
                  (table,), tuple(notes), ("RMSEA values of close and not-close fit are conventions, not laws.",))


POWER_CAUTION = "Check before planning with this sample size"


def _cluster_rows(planned, effective: float | None = None, n_obs: int | None = None) -> list[list]:
    """The rows of a power plan's table for a planned cluster sample (workflows.power.cluster_plan; none without
    one): (label, shown, value) each; ``effective``: what the N = ``n_obs`` rows of that sample are worth as
    independent rows (N / design effect, Kish 1965), the N the power at N was computed for."""
    if planned is None:
        return []
    rows = []
    if planned.intraclass is not None:
        rows.append(["Intraclass correlation (given)", short(planned.intraclass), planned.intraclass])
    if planned.cluster_size is not None:
        rows.append(["Rows per cluster (given)", user_number(planned.cluster_size), planned.cluster_size])
    rows.append(["Design effect" + (" (1 + (m - 1) ICC, Kish 1965)" if planned.intraclass is not None
                                    else " (given)"), num(planned.design_effect, 2), planned.design_effect])
    if effective is not None:
        rows.append([f"Independent rows N = {count_text(n_obs)} is worth (N / design effect, Kish 1965)",
                     count_text(effective_shown(effective)), effective])
    rows.append(["Rows needed in the cluster sample", count_text(planned.rows), planned.rows])
    if planned.clusters is not None:
        size = planned.cluster_size
        rows.append([f"Clusters of {user_number(size)} {'row' if size == 1 else 'rows'} needed",
                     count_text(planned.clusters), planned.clusters])
    return rows


def nested_power_report(result) -> Report:
    """The report of ``power MODEL --nested-model MODEL2`` (workflows.power_nested.NestedPower): the difference
    test's power at N and the smallest N for the target power, by the noncentral chi-square (Satorra & Saris 1985)."""
    nested = result.nested
    df, discrepancy = nested.df_difference, nested.discrepancy
    rows = [["Nested model", nested.name, nested.name],
            ["Degrees of freedom of the difference", str(df), df],
            ["Minimum discrepancy of the nested model at the population (F)", discrepancy_text(discrepancy), discrepancy],
            ["Significance level", short(result.alpha), result.alpha]]
    effective = result.effective_n  # a planned cluster sample: the N asked about is worth N / design effect rows
    if result.power is not None:
        at = effective if effective is not None else result.n_obs
        rows.append([f"Noncentrality with N = {count_text(result.n_obs)} ({'N' if effective is None else '(N / design effect)'} × F)",
                     num(nested.noncentrality(at), 2), nested.noncentrality(at)])
        rows.append([f"Power with N = {count_text(result.n_obs)}" + (" rows of the cluster sample" if effective else ""),
                     unit(result.power), result.power])
    rows.append([f"Smallest N{' of independent rows' if result.clusters is not None else ''} for power "
                 f"{unit(result.target_power, needed_decimals(result.target_power, fewest=2))}",
                 count_text(result.required_n), result.required_n])
    rows += _cluster_rows(result.clusters, effective, result.n_obs)
    table = _table("power", "Power of the difference test and sample size", [("", "l"), ("Value", "r")],
                   [r[:2] for r in rows], f"Note: {result.note}." if result.note else None,
                   values=(["Quantity", "Value"], [[r[0], r[2]] for r in rows]))
    assumptions = Note((f"This power is that of the likelihood-ratio chi-square difference between maximum-likelihood "
                        f"fits of the two models to independent, complete rows of normally distributed answers, by the "
                        f"noncentral chi-square with {df} df and noncentrality N × F, F being the minimum discrepancy the "
                        f"nested model leaves at the population the model file's values describe (Satorra & Saris "
                        f"1985): an approximation, for discrepancies small beside the sampling error. A power "
                        f"simulation fits both models to simulated data sets and gives the simulated power beside this "
                        f"one", Command(f" ('cfa-tool power-simulation MODEL --n {result.required_n} "
                                        f"{Option.NESTED_MODEL.given('MODEL2')}')"),
                        "." + boundary_words(nested)))
    defaulted = len(result.defaulted)
    warnings = (Note((f"{defaulted} population value{'s' if defaulted != 1 else ''} not given in the model file "
                      f"{'are the standardized defaults' if defaulted != 1 else 'is a standardized default'} "
                      f"({STANDARDIZED_DEFAULTS}; listed in the population table), not values of this scale: the "
                      f"power and the sample size are those of such a population. Give the values the model file lacks",
                      Command(" with 'start' statements", " from an earlier fit of the model or from the literature"),
                      ".")),) if defaulted else ()
    population = _population_of(result)
    notice = None
    few = planned_clusters_lines(result.clusters, result.population.table.n_free if result.population else None,
                                 result.n_obs, result.target_power)
    if few:
        notice = ProblemNotice(POWER_CAUTION, few, False)
    if result.below_rows_rule:  # the test's N is not what estimating the model needs: first
        from cfa_tool.assessment.admissibility import ROWS_PER_PARAMETER, ROWS_RULE

        below = result.below_rows_rule
        one = len(below) == 1
        notice = ProblemNotice(POWER_CAUTION, (
            f"{word_list(_sizes_judged(result))} {'is' if one else 'are'} judged by the "
            f"difference test alone, not by what estimating the model needs: {'; '.join(f.figures() for f in below)}, "
            f"fewer than {ROWS_PER_PARAMETER} per parameter ({ROWS_RULE}; {_rows_enough(result)} "
            f"here); this plan says nothing of how precisely the loadings, variances and correlations are "
            f"estimated at {'that N' if one else 'those sizes'}, which a power simulation of the model gives",) + few,
            False)
    return Report(ResultKind.POWER, f"Power of the chi-square difference test against '{nested.name}' (Satorra & "
                                    f"Saris 1985)", notice, (), (table, *population), (assumptions,),
                  ("The power is a plan's figure for the population assumed; high-stakes decisions need validation "
                   "and professional judgement.",), warnings=warnings)


def rows_rule_caution(result) -> Note:
    """The caution, first, of an RMSEA power plan whose sample sizes are below the rule of rows per free parameter
    of the model (workflows.power.PowerResult.below_rows_rule, assessment.admissibility.rows_per_parameter): the
    test's N is not what the model's estimates need, and a power simulation of the model gives that."""
    from cfa_tool.assessment.admissibility import ROWS_PER_PARAMETER, ROWS_RULE

    from math import ceil

    below = result.below_rows_rule
    one = len(below) == 1
    enough = ROWS_PER_PARAMETER * below[0].parameters
    sizes = [ceil(f.rows - 1e-9) for f in below] + [enough]  # independent rows, which power-simulation simulates
    variables, raised = getattr(result, "variables", None), ""
    if variables is not None and min(sizes) < fewest_rows(variables):
        # no size power-simulation refuses (hostile tester s28: '--n 5,135' for 12 items)
        least = fewest_rows(variables)
        raised = (f"; {count_text(least)} rather than fewer: each simulated data set of {variables} items needs at "
                  f"least {count_text(least)} rows")
        sizes = sorted({max(n, least) for n in sizes})
    typed = [user_number(n) for n in sizes]  # as a command takes them: no grouping comma inside a list of commas
    return Note((f"{word_list(_sizes_judged(result))} {'is' if one else 'are'} judged by the RMSEA "
                 f"test of {result.test} fit alone, not by what estimating the model needs: "
                 f"{'; '.join(f.figures() for f in below)}, fewer than {ROWS_PER_PARAMETER} per parameter ({ROWS_RULE}; "
                 f"{_rows_enough(result)} here); this plan says nothing of how precisely the loadings, variances and "
                 f"correlations are estimated at {'that N' if one else 'those sizes'}. What to try: plan the N with a "
                 f"power simulation of the model, which gives each parameter's power, bias and coverage at each sample "
                 f"size",
                 Command(f" ('cfa-tool power-simulation MODEL --n {','.join(typed)}'; from Python, "
                         f"power_simulation(model, [{', '.join(typed)}]))",
                         f" ({word_list(count_text(n) for n in sizes)} rows, say)"),
                 raised + "."))


def planned_clusters_lines(planned, free: int | None, n_obs: int | None = None,
                           target: float | None = None) -> tuple[Note, ...]:
    """The caution, first, of a power plan whose cluster sample (workflows.power.ClusterPlan) has too few clusters
    (data.sample_design.planned_clusters_caution, in the words of a fit's design), with what to try: more clusters of
    fewer rows, whose design effect 1 + (m - 1) ICC is smaller too when it came from the intraclass correlation
    (Kish 1965); () without a number of clusters or with enough.  With an N asked about (``n_obs`` rows of the
    cluster sample, in clusters of the same size) the plan has two samples, that N's and the smallest N's for power
    ``target``: the caution names every one with too few clusters (fixleft s26: N = 90 rows in 6 clusters passed
    unnamed beside a smallest N of 153 clusters)."""
    from math import ceil

    from cfa_tool.data.sample_design import SMALL_NUMBER_OF_CLUSTERS, planned_clusters_caution
    from cfa_tool.options import Interface, interface

    on_command_line = interface() is Interface.COMMAND_LINE
    if planned is None or planned.clusters is None:
        return ()
    samples = [(planned.clusters, f"for the smallest N (power {unit(target, needed_decimals(target, fewest=2))}, "
                                  f"{count_text(planned.rows)} rows)" if target is not None else
                f"for the smallest N ({count_text(planned.rows)} rows)")]
    if n_obs is not None and n_obs == planned.rows:  # one sample: the N asked about is the smallest N's
        samples = [(planned.clusters, f"at N = {count_text(n_obs)} (the smallest N's rows too)")]
    elif n_obs is not None:
        samples.insert(0, (ceil(n_obs / planned.cluster_size - 1e-9), f"at N = {count_text(n_obs)}"))
    few = [(c, where) for c, where in samples if c < SMALL_NUMBER_OF_CLUSTERS]
    if not few:
        return ()
    head = ""
    if n_obs is not None:  # two samples: say which, each with its clusters
        head = (f"The plan's cluster sample {few[0][1]} has only {counted(few[0][0], 'cluster')}" if len(few) == 1 else
                f"The plan's cluster samples {word_list([w for _, w in few])} have only "
                f"{word_list([count_text(c) for c, _ in few])} clusters")
    words = planned_clusters_caution(min(c for c, _ in few), free, head)
    if words is None:
        return ()
    lower = (", which lowers the design effect too (1 + (m - 1) ICC, Kish 1965)" if planned.intraclass is not None
             else "")
    return (Note((f"{words} What to try: plan more clusters of fewer rows each",
                  Command(f" (a smaller {Option.CLUSTER_SIZE.flag if on_command_line else Option.CLUSTER_SIZE.keyword})"),
                  f"{lower}.")),)


def _sizes_judged(result) -> list[str]:
    """The sample sizes of a power plan below the rule of rows per parameter, each as the plan's table names it
    (workflows.power.rows_rule_judged): 'N = 211' of independent rows, and under a planned cluster sample 'N = 200 rows
    of the cluster sample, worth 80 independent rows (N / design effect, Kish 1965)', the rows the rule judges."""
    effective = getattr(result, "effective_n", None)
    planned = getattr(result, "clusters", None) is not None
    return [f"N = {count_text(result.n_obs)} rows of the cluster sample, worth {count_text(f.rows)} independent rows "
            f"(N / design effect, Kish 1965)" if effective is not None and f.rows == effective_shown(effective) else
            f"N = {count_text(f.rows)}{' independent rows' if planned else ''}" for f in result.below_rows_rule]


def _rows_enough(result) -> str:
    """The rows the rule of rows per parameter asks for ('135 rows'), and under a planned cluster sample the rows
    of that sample they take ('135 independent rows, 338 rows of the cluster sample': times the design effect)."""
    from math import ceil

    from cfa_tool.assessment.admissibility import ROWS_PER_PARAMETER

    enough = ROWS_PER_PARAMETER * result.below_rows_rule[0].parameters
    planned = getattr(result, "clusters", None)
    if planned is None:
        return f"{count_text(enough)} rows"
    return (f"{count_text(enough)} independent rows, {count_text(ceil(enough * planned.design_effect - 1e-9))} rows of "
            f"the cluster sample")


def power_assumptions(design: bool = False) -> Note:
    """What the RMSEA power of MacCallum, Browne & Sugawara (1996) assumes, what lowers it, and what power-simulation
    models instead (ordinal answers; not missing answers, a sampling design or skewed continuous answers), with the
    options as the caller writes them; ``design``: the plan takes a design effect (a planned cluster sample), which
    it then says it models (new-user trial s25: 'this plan models none of them' under a table of that design)."""
    from cfa_tool.options import Option

    if design:
        lowered = ("A sampling design (clusters or uneven weights make the effective sample size smaller), missing "
                   "answers and non-normal data lower it. This plan takes the design effect given for the clusters "
                   "(the table gives the rows and clusters needed, and the power at an N given is that of the "
                   "independent rows it is worth, N / design effect), but not uneven weights, missing answers or "
                   "non-normal data: count on more rows than shown if the study will have them")
        return Note(("This power is that of the normal-theory likelihood-ratio test for rows answered in full by "
                     "normally distributed data. " + lowered + ". For answers",) + _power_simulation_tail())
    return Note(("This power is that of the normal-theory likelihood-ratio test for independent, equally weighted rows "
            "answered in full by normally distributed data. A sampling design (clusters or uneven weights make the "
            "effective sample size smaller), missing answers and non-normal data lower it, and this plan models none "
            "of them: count on more rows than shown (with a design, common practice multiplies the N shown by the "
            "expected design effect, which a fit or check of an earlier cluster sample reports with the items' median "
            "intraclass correlation and the rows per cluster; given here",
            Command(f" ({Option.DESIGN_EFFECT.given('D')}, or {Option.INTRACLASS.given('ICC')} with "
                    f"{Option.CLUSTER_SIZE.given('M')})", " as the plan's design effect"),
            ", the table gives the rows and clusters needed, and the power at an N given is that of the independent rows it "
            "is worth). For answers") + _power_simulation_tail())


def _power_simulation_tail() -> tuple:
    """The end of :func:`power_assumptions`: what power-simulation models for answers on few categories."""
    from cfa_tool.options import Option

    return (" on a few categories (4-point items, say), power-simulation simulates ordinal answers, cut from normal "
            "latent responses at the thresholds of an earlier ordinal fit",
            Command(f" ({Option.POPULATION_FROM.given('fit.json')})"), " or into equally likely categories",
            Command(f" ({Option.CATEGORIES.given(4)})"), ", and fits them as an ordinal fit does; it simulates no "
            "missing answers, sampling design or skewed continuous answers either.")


POWER_ORDINAL = ("The model declares ordinal items, whose fits use the adjusted test of least squares on polychoric "
                 "correlations, not the test planned here: power-simulation simulates ordinal answers and fits them as "
                 "the fit does (the power, bias and coverage of each parameter, and how often the adjusted test rejects "
                 "the true model).")


# ---------------------------------------------------------------- power-simulation

def _percent(share: float) -> str:
    return "" if share != share else signed_num(100 * share, 1)


def _ordinal_power_lines(result) -> list[str]:
    """What a power simulation with ordinal items did, and how often its adjusted test rejected the true model."""
    if not result.ordinal:
        return []
    return [f"Ordinal items: latent responses cut at the population thresholds; each data set fitted by "
            f"{result.ordinal} on its thresholds and polychoric correlations, with robust standard errors.",
            f"The {ADJUSTED_TEST} test rejected the true model at alpha {unit(result.alpha, 2)} in "
            f"{100 * result.model_rejected:.1f}% of the converged replications (nominal {100 * result.alpha:g}%)."] + (
        [lacked_sentence(result.lacking, result.converged, result.lacked, "replications",
                         f"every figure at N = {count_text(result.n_obs)}")] if result.lacking else [])


def _inadmissible_cautions(results) -> tuple[str, ...]:
    """The caution, first, on the converged replications whose solution is not admissible at each sample size,
    naming their problems (assessment.admissibility.not_admissible_sentence; said once per report)."""
    said = not_admissible_sentence([(r.inadmissible, r.converged, getattr(r, "inadmissible_named", ""),
                                     f" at N = {count_text(r.n_obs)}" if len(results) > 1 else "") for r in results],
                                   "replications", "the power, coverage and bias figures, which therefore describe "
                                                   "such solutions too")
    return (said,) if said else ()


def not_carried_line(not_carried, power: bool = True) -> list[Text]:
    """What an earlier fit's data had that simulated rows do not: said beside what was simulated (``power``: the
    report gives power and coverage figures of such samples; without it, simulated data only)."""
    if not not_carried:
        return []
    said = (f"The earlier fit's {word_list(list(not_carried))} {'are' if len(not_carried) > 1 else 'is'} not carried "
            f"over: every simulated row is independent, equally weighted and complete")
    if power:
        return [f"{said}, so the figures are those of such a sample (with a design effect or missing answers, power "
                f"is lower)."]
    return [Note((said, Command(f" ({Option.SIMULATED_MISSING} removes a share of the answers completely at random)"),
                  "."))]


def few_replications(replications: int) -> tuple[str, ...]:
    """A caution when the replications are too few for power and coverage to two decimals: the Monte Carlo standard
    error of a share p from R replications is sqrt(p (1 - p) / R)."""
    if replications >= 100:
        return ()
    return (f"Only {count_text(replications)} replications: a power near .80 has a Monte Carlo standard error of about "
            f"{unit(math.sqrt(0.16 / replications), 2)} and a coverage near 95% one of about "
            f"{100 * math.sqrt(0.0475 / replications):.0f} points; give 500 or more (common practice) for figures to "
            f"two decimals",)


def montecarlo_report(result) -> Report:
    if hasattr(result, "results"):  # a power curve: several sample sizes
        return power_curve_report(result)
    lines = [f"{count_text(result.converged)} of {count_text(result.replications)} replications converged "
             f"({100 * result.converged / result.replications:.1f}%)."
             ] + _ordinal_power_lines(result)
    lines += not_carried_line(result.not_carried)
    nested_lines, nested_tables, paragraph = nested_parts((result,))  # a nested model's difference test: its power
    lines += nested_lines
    # what decides the plan first: power, then whether intervals and estimates can be trusted at this N
    rows = [[label_words(p.label, article=False, observed=result.observed or None), unit(p.power, 2), f"{100 * p.coverage:.1f}%",
             _percent(p.relative_bias), _percent(p.se_bias)] for p in result.parameters]
    values = [[label_words(p.label, article=False, observed=result.observed or None), p.power, p.coverage, p.relative_bias,
               p.se_bias] for p in result.parameters]
    population = _population_of(result)
    # the population's table by reference (each view names it as it names its tables: 'Table 2' in Word); a result
    # read back without it has none to point to
    where = (Note(("Population values are in ", TableReference(population[0].key), "; mean estimates and SDs in "
                   "the JSON result.")) if population else "Mean estimates and SDs are in the JSON result.")
    table = _table("parameters", "Per parameter", [("Parameter", "l"), ("Power", "r"), ("Coverage", "r"),
                                                   ("Estimate bias %", "r"), ("SE bias %", "r")], rows,
                   f"Power: share of replications in which the parameter differs from zero at alpha {unit(result.alpha, 2)}; "
                   f"coverage: share of 95% Wald intervals that hold the population value (nominal 95%); bias: mean "
                   f"estimate (or mean SE) against the population value (or the SD of the estimates). "
                   + _zero_population_words(result.parameters) + where,
                   values=(["Parameter", "Power", "Coverage", "Estimate relative bias", "SE relative bias"], values))
    return Report(ResultKind.POWER_SIMULATION,
                  f"Monte Carlo power: N = {count_text(result.n_obs)}, {count_text(result.replications)} replications (seed {result.seed})",
                  _notice([], _inadmissible_cautions([result])), tuple(lines), (*nested_tables, table, *population),
                  warnings=one_group_defaults_caution(result) + few_replications(result.replications),
                  paragraph=paragraph)


def _zero_population_words(parameters) -> str:
    """For parameters whose population value is 0 (a residual covariance by default), the 'power' column counts false
    rejections and the relative bias is not defined: said where there are such parameters (hostile s20)."""
    zero = [p for p in parameters if p.population == 0]
    if not zero:
        return ""
    return (f"Where the population value is 0 ({len(zero)} parameter{'s' if len(zero) != 1 else ''}), the power column "
            f"is the share of false rejections (nominal alpha) and the estimate bias is not defined. ")


def _population_of(result) -> tuple[ReportTable, ...]:
    """The table of the population a power simulation drew from (none for a result read back without it)."""
    if getattr(result, "population", None) is None:
        return ()
    line, table = population_parts(result.population)
    return (replace(table, note=joined((line, table.note))),)


def power_curve_report(curve) -> Report:
    """Power per parameter (rows) and sample size (columns), with each size's convergence."""
    first = curve.results[0]
    lines = ["Converged: " + ", ".join(f"{count_text(r.converged)} of {count_text(r.replications)} at N = {count_text(r.n_obs)}" for r in curve.results)
             + "."]
    if first.ordinal:
        lines += [_ordinal_power_lines(first)[0], f"The {ADJUSTED_TEST} test rejected the true model at alpha "
                  f"{unit(first.alpha, 2)} in " + ", ".join(f"{100 * r.model_rejected:.1f}% at N = {count_text(r.n_obs)}"
                                                           for r in curve.results) + " of the converged replications."]
        lines += [lacked_sentence(r.lacking, r.converged, r.lacked, f"replications at N = {count_text(r.n_obs)}",
                                  "every figure of that size") for r in curve.results if r.lacking]
    lines += not_carried_line(first.not_carried)
    nested_lines, nested_tables, paragraph = nested_parts(curve.results)  # a nested model's difference test
    lines += nested_lines
    names = [label_words(p.label, article=False, observed=first.observed or None) for p in first.parameters]
    rows = [[name, *(unit(r.parameters[k].power, 2) for r in curve.results)] for k, name in enumerate(names)]
    values = [[name, *(r.parameters[k].power for r in curve.results)] for k, name in enumerate(names)]
    table = _table("power_by_sample_size", "Power per parameter and sample size",
                   [("Parameter", "l")] + [(f"N = {count_text(n)}", "r") for n in curve.sample_sizes], rows,
                   f"Power: share of replications in which the parameter differs from zero at alpha "
                   f"{unit(first.alpha, 2)}.",
                   values=(["Parameter", *(f"Power at N = {count_text(n)}" for n in curve.sample_sizes)], values))
    # whether intervals and estimates can be trusted at each size: coverage and bias beside each other per size
    heads = [("Parameter", "l")] + [(f"{what} at N = {count_text(n)}", "r") for n in curve.sample_sizes
                                    for what in ("Coverage", "Estimate bias %", "SE bias %")]
    rows = [[name, *(cell for r in curve.results for cell in (
        f"{100 * r.parameters[k].coverage:.1f}%", _percent(r.parameters[k].relative_bias),
        _percent(r.parameters[k].se_bias)))] for k, name in enumerate(names)]
    values = [[name, *(v for r in curve.results for v in (
        r.parameters[k].coverage, r.parameters[k].relative_bias, r.parameters[k].se_bias))]
        for k, name in enumerate(names)]
    trust = _table("coverage_and_bias_by_sample_size", "Coverage and bias per parameter and sample size", heads, rows,
                   "Coverage: share of 95% Wald intervals that hold the population value (nominal 95%); bias: mean "
                   "estimate (or mean SE) against the population value (or the SD of the estimates). Population "
                   "values, mean estimates and SDs are in the JSON result.",
                   values=([h for h, _ in heads], values))
    return Report(ResultKind.POWER_SIMULATION, f"Monte Carlo power by sample size: {count_text(first.replications)} replications "
                                               f"per size (seed {first.seed})",
                  _notice([], _inadmissible_cautions(curve.results)), tuple(lines),
                  (*nested_tables, table, trust, *_population_of(first)),
                  warnings=one_group_defaults_caution(first) + few_replications(first.replications),
                  paragraph=paragraph)


#: the values a population takes where the model file gives none (workflows.simulation: STANDARDIZED_LOADING,
#: FACTOR_CORRELATION and the standardized item variances), in words
STANDARDIZED_DEFAULTS = ("loadings .7, -.7 for reverse-keyed items, factor correlations .3, residual covariances 0, "
                         "item variances 1")


def defaults_caution(which: str, figures: str, whose: str, named: str = "") -> Note:
    """The one caution of a power simulation drawn from population values that are the standardized defaults rather
    than values of the researcher's scale (new-user trial s21: a plan drawn from loadings .7 and factor correlations
    +.3 where the fit found -.5), with the two ways to give them: ``which``, the defaulted values counted ('8 of the
    population values shared by the groups are the standardized defaults'); ``figures``, what is then a figure of such a population ('the
    rejection shares'); ``whose``, the earlier fit that may give every value ('a continuous fit of the model to one
    group'); ``named``, the defaulted values in words, or '' where the population table lists them.  Among the
    warnings, above the tables, in every view (power-simulation with groups and without)."""
    listed = f" They are {named}." if named else ""
    return Note((f"{which} ({STANDARDIZED_DEFAULTS}"
                 f"{'' if named else '; listed in the population table'}), not values of this scale: {figures} are "
                 f"those of such a population.{listed} Give the values the model file lacks",
                 Command(f" with 'start' statements, or take every value from {whose} "
                         f"({Option.POPULATION_FROM.given('FIT.json')})",
                         " from an earlier fit of the model or from the literature"), "."))


def one_group_defaults_caution(result) -> tuple[Note, ...]:
    """:func:`defaults_caution` of a power simulation of one group (``result``: a workflows.montecarlo result of one
    sample size, or the first of several): the defaulted values listed in the population table, or named where the
    result has none (read back from its JSON).  Before s22 a plain line among the report's lines, where the grouped
    plan's was a caution."""
    if not result.defaulted:
        return ()
    n = len(result.defaulted)
    named = "" if getattr(result, "population", None) is not None else word_list(
        [label_words(label, observed=result.observed or None) for label in result.defaulted])
    return (defaults_caution(f"{n} population value{'s' if n != 1 else ''} not given in the model file "
                             f"{'are the standardized defaults' if n != 1 else 'is a standardized default'}",
                             "the power, coverage and bias",
                             "an earlier fit of the model", named),)


# ---------------------------------------------------------------- simulate

def population_report(simulated) -> Report:
    """The population a simulation drew from: each free parameter, in the model's units and standardized, and
    whether the model file gave it or it took the default."""
    population = simulated.population
    line, table = population_parts(population)
    frame = simulated.frame
    cut = population.ordinal_items
    made = (f"{len(frame)} rows of {frame.shape[1]} variables (seed {simulated.seed})"
            + (f", ordinal with {simulated.categories} categories" if simulated.categories else "")
            + (f", {len(cut)} ordinal items cut at the fitted thresholds ("
               + ("answers in the earlier fit's own codes" if getattr(population, "answer_codes", None) else
                  "answers 1 to k") + ")"
               if cut and not simulated.categories and not population.equal_categories else "")
            + (f", {100 * simulated.missing:g}% of answers removed completely at random" if simulated.missing else "") + ".")
    carried = [] if simulated.missing else not_carried_line(population.not_carried, power=False)  # --missing: gaps
    return Report(ResultKind.SIMULATE, "Simulated data", None, (made, *_worded_lines(simulated), line, *carried),
                  (table,))


def _worded_lines(simulated) -> list[Text]:
    """Which simulated items were written as the words of the model's 'answers' statements, and how."""
    from cfa_tool.data.answer_words import coding_described
    from cfa_tool.errors import printable
    from cfa_tool.workflows.simulation import scale_answers, written_answers

    worded = getattr(simulated, "worded", ())
    spec = simulated.population.spec
    codings = spec.answer_codings()
    lines = []
    for coding in spec.answers:
        items = [x for x in worded if codings.get(x) is coding]
        if not items:
            continue
        which = "Every item is" if len(items) == len(spec.observed_names) else \
            f"{len(items)} item{'s are' if len(items) > 1 else ' is'} ({names_text(items)})"
        written = written_answers(coding)
        how = ("cut into equally likely categories" if simulated.population.equal_categories else
               "cut at the fitted thresholds where the earlier fit has them, else into equally likely categories")
        origin = Command(f" of {coding.origin}", " of the model's coding")  # a manuscript names no statement or line
        if all(word is not None for word, _, _ in written):
            said = Note(("written as the words", origin, f", {coding_described(written)}"))
        else:  # numbers listed beside the words: each code written as the answer listed first with it
            said = Note((f"written in the {len(written)} answer categories", origin, ", each as the answer it lists "
                         f"first with that code ({', '.join(printable(w) if w is not None else f'{user_number(n)}' for w, n, _ in written)})"))
        lines.append(f"{which} " + said + f" (the latent responses {how}), so the file reads back with the same model "
                                          f"file.")
    scaled = getattr(simulated, "scaled", ())
    on_scale = scale_answers(spec) if scaled else {}  # item -> (its answers, the 'reversed' statement)
    for keying in spec.reversed:
        items = [x for x in scaled if on_scale[x][1] is keying]
        if not items:
            continue
        low, high = user_number(keying.minimum), user_number(keying.maximum)
        lines.append(Note((f"{len(items)} item{'s' if len(items) > 1 else ''} ({names_text(items)}) "
                           f"{'are' if len(items) > 1 else 'is'} written as "
                           f"whole answers {low} to {high}, the scale",
                           Command(f" of the 'reversed' statement on line {keying.location.line}",
                                   " the model declares for its reverse-keyed items"),
                           " (the latent responses cut into equally likely categories), so the file reads back with "
                           "the same model file.")))
    return lines


def population_parts(population) -> tuple[Text, ReportTable]:
    """Where a population's values come from (a sentence) and the table of every value, fixed ones included: what
    simulate and power-simulation drew their samples from."""
    from cfa_tool.workflows.simulation import ValueSource

    entries = population.values()
    if population.fitted_from is not None:
        line = (f"Every value is an estimate of the earlier fit in {population.fitted_from}"
                + (", rescaled so that every item's latent response has variance 1, the scale on which items cut into "
                   "categories are fitted (the standardized values are the fit's)"
                   if getattr(population, "standardized", False) else "")
                + (Note((" but the thresholds, which cut equally likely categories (as many as ",
                         Command(f"{Option.CATEGORIES}", "asked for"), " or the 'answers' statement gives)"))
                   if population.equal_categories else "") + "; the items' means are "
                f"{population.means_from.value}"
                + (", and its values are in standard-deviation units (a correlation matrix without standard "
                   "deviations)" if population.standard_units else "")
                + ". The data follow the fitted model exactly, so they carry none of that model's misfit to the data "
                  "it was fitted to.")
    elif any(v["from"] == ValueSource.FIXED.value for v in entries):
        line = ("Defaults are set on the standardized metric (loadings .7, factor correlations .3, item variances 1) "
                "and converted to the model's scaling by fitting the model to that standardized population. Values "
                "fixed in the model file hold as written, so the defaults beside them are those closest to that "
                "population that the fixed values allow: their standardized values can differ from .7 and .3, and an "
                "item's variance from 1 (the Standardized column gives each value as it is in the population drawn "
                "from).")
    else:
        line = Note(("Defaults are set on the standardized metric (loadings .7, factor correlations .3, item "
                     "variances 1) and converted to the model's scaling; values the model file gives",
                     Command(" ('start' statements)"), " replace them."))
    def source(v: dict) -> str:  # a parameter held equal names the one whose value it shares
        equal = v.get("equal_to")
        return v["from"] if equal is None else \
            f"{v['from']} to {parameter_words(equal['kind'], tuple(equal['variables']), article=False)}"

    rows = [[parameter_words(v["kind"], tuple(v["variables"]), article=False), est_num(v["value"]), est_num(v["standardized"]),
             source(v)] for v in entries]
    values = [[v["kind"], names_text(v["variables"]), v["value"], v["standardized"], source(v)] for v in entries]
    # what each source means; the model file's statements apart (note_parts.Command), which a manuscript leaves out
    words: Text = ("From: earlier fit = its estimate" if population.fitted_from is not None else
                   Note(("From: default = the standardized default in the model's scaling; start = a population value "
                         "the model file gives", Command(" (a 'start' statement)"))))
    if population.fitted_from is not None and population.equal_categories:
        words += "; default = the thresholds of equally likely categories"
    if any(v["from"] in (ValueSource.FIXED.value, ValueSource.SCALE.value) for v in entries):
        words += Note(("; fix = a value the model file fixes", Command(" (a 'fix' statement)"),
                       "; scale (fixed) = fixed to give a factor its scale"))
    if any(v["from"] == ValueSource.EQUAL.value for v in entries):
        words += Note(("; equal to = held equal by the model file", Command(" (an 'equal' statement)"),
                       " to the parameter named (its row says where that value came from)"))
    words += "."
    table = _table("population", "Population values used", [("Parameter", "l"), ("Value", "r"), ("Standardized", "r"),
                                                             ("From", "l")], rows, words,
                   values=(["Kind", "Variables", "Value", "Standardized", "From"], values))
    return line, table


# ---------------------------------------------------------------- check

def check_report(found) -> Report:
    from cfa_tool.pipeline.results import _percent_below_all

    lines = [line for text in found.summary_lines() for line in (text.splitlines() if isinstance(text, str) else [text])]
    rows = [[name, "100%" if share >= 1 else _percent_below_all(share)] for name, share in found.coverage.items()]
    counted = (Note(("A value that looks like no answer (named above) counts as an answer here, as the fit would "
                     "count it; marked as missing (", Command(f"{Option.MISSING_CODES}", "a code of no answer"),
                     ", or an empty cell), it would not."))
               if any(p.kind in (ProblemKind.VALUES_NOT_ANSWERS, ProblemKind.CODES_SET_APART) for p in found.problems)
               else None)
    table = _table("coverage", "Share of rows answering each model variable", [("Variable", "l"), ("Answered", "r")],
                   rows, counted, values=(["Variable", "Share answering"], [[k, v] for k, v in found.coverage.items()]))
    notice = T.problem_notice(found)
    if notice is not None:
        notice = ProblemNotice(T.DATA_CAUTION, notice.lines, False)
    if found.refusals:  # what stops an ordinal fit: every one, before the cautions
        notice = ProblemNotice(f"{stops_ordinal_fit(len(found.refusals))}: fix each before fitting",
                               tuple(found.refusals) + (notice.lines if notice is not None else ()), True,
                               T.NoticeKind.DATA_STOP_FIT, len(found.refusals))
    # summary statistics hold no rows, so no share of rows answering
    return Report(ResultKind.CHECK, "Model check", notice, tuple(lines),
                  ((table,) if found.coverage else ()) + _answer_tables(found))


def stops_ordinal_fit(n: int) -> str:
    """The heading of a check's notice when the data stop an ordinal fit (each of the ``n`` refusals a line, then the
    cautions), and the words of its exit's one line."""
    return f"{n} problem{' in the data stops' if n == 1 else 's in the data stop'} an ordinal fit"


def _answer_tables(found) -> tuple[ReportTable, ...]:
    """A check's table of answers per category (data.answer_counts), every group in it, with the items not shown
    named: those of more different answers than an ordinal item may have, or of answers that are not whole numbers."""
    if not found.answers:
        return ()
    several = len(found.answers) > 1
    shown = set(found.answers[0].items)
    others = [x for x in found.spec.observed_names if x not in shown]
    left = (f" Not shown: {', '.join(others)} (more different answers than an ordinal item may have, or answers that "
            f"are not whole numbers)." if others else "")
    names = tuple(written_group(a.group, tuple(found.groups)) for a in found.answers) if several else ()
    return (T.answer_table(found.answers, T.CATEGORY_TABLE, " in each group" if several else "", groups=several,
                           analysed=" (rows with an answer, before any fit)", after=left, group_names=names),)


BUILDERS = {ResultKind.COMPARE: comparison_report, ResultKind.INVARIANCE: invariance_report,
            ResultKind.REPLICATE: replication_report, ResultKind.BOOTSTRAP: bootstrap_report,
            ResultKind.CUTOFFS: cutoffs_report, ResultKind.POWER: power_report,
            ResultKind.POWER_SIMULATION: montecarlo_report, ResultKind.SIMULATE: population_report,
            ResultKind.CHECK: check_report}

