"""The report of the invariance ladder over occasions of the same people (cfa_tool.workflows.occasions): the ladder's
tables, verdicts and cautions of the ladder across groups (reporting.workflow_tables), told over occasions in one
group, with the latent mean and variance changes and the model each step fitted."""

from __future__ import annotations

from cfa_tool.language.names import written_group
from cfa_tool.model.description import parameter_words
from cfa_tool.numbers import count_text, word_list
from cfa_tool.reporting.document import Listing, Report, ResultKind
from cfa_tool.reporting.numbers import est_num, num, p_phrase, p_value, signed, unit
from cfa_tool.reporting.paragraph import (_Shape, _basis, _departures, _estimator_phrase, _held, _sample_phrase,
                                         _step_problems, _structure)
from cfa_tool.reporting.tables import GUIDE_NOTE, HIGH_STAKES_NOTE, ProblemNotice, _table
from cfa_tool.reporting.workflow_tables import (CHECK_SOLUTIONS, CONFIGURAL_NOTE, INADMISSIBLE_VERDICT_NOTE, NOT_JUDGED,
                                                SOME_NOT_ADMISSIBLE, TEST_MET, TEST_MET_NOTE, _admissible_cell,
                                                _ladder_caution_lines, _level_fit_cells, _other_differences,
                                                _score_tests_mcar_note, _step_cells, _verdict)

#: the change-in-fit guides were studied for groups; over occasions they are read by the same convention
OCCASIONS_GUIDES_NOTE = ("The change-in-fit guides were studied for invariance across groups; over occasions of the "
                         "same people they are used by common practice, as conventions.")


def _misfit_sources(step, result) -> str:
    """The score tests of a step that did not hold: those significant at the steps' level named as likely sources
    (each an item's parameter at a later occasion against the first occasion's), or the largest when none is."""
    from cfa_tool.numerics import distributions as dist

    def words(c) -> str:
        parts = [result.at_occasion(v) for v in c.variables]
        return (parameter_words(c.kind, tuple(name for name, _ in parts), article=True)
                + f" at occasion {written_group(parts[-1][1], result.occasions)}")

    significant = [c for c in step.culprits if dist.chi2_sf(c.index, 1) < result.alpha]
    level = unit(result.alpha, 2)
    if not significant:
        top = step.culprits[0]
        return (f"No score test of the {step.level} step's equalities is significant at {level} "
                f"({result.score_tests.phrase}; the largest: {words(top)}, {top.index:.2f}), so these data point to "
                f"no single equality as the source of its misfit.")
    which = "those" if len(significant) <= 5 else f"the 5 largest of the {len(significant)}"
    return (f"Likeliest sources of misfit at the {step.level} step ({result.score_tests.phrase}; {which} significant "
            f"at {level}, each against the first occasion's): "
            + "; ".join(f"{words(c)} ({c.index:.2f})" for c in significant[:5])
            + ". A step with such an equality freed (partial invariance over occasions) is not yet fitted by this "
              "command.")


def _where(result) -> str:
    """The occasions in words: 'occasions 1 and 2 of wave' (long data) or 'occasions t1 and t2 (columns ending
    _t1, _t2)' (wide data)."""
    occasions = word_list([written_group(o, result.occasions) for o in result.occasions])  # 'time, 2' quoted
    if result.occasion_column is not None:
        return f"occasions {occasions} of {result.occasion_column}"
    return f"occasions {occasions} (columns ending {', '.join(result.layout.endings)})"


def occasions_report(result) -> Report:
    from cfa_tool.workflows.invariance import delta_cfi_not_defined, unsound_basis

    steps = result.steps
    adjusted = any(s.result.robust is not None for s in steps)
    levels, level_values, flagged, rows, row_values = [], [], [], [], []
    for k, step in enumerate(steps):
        cells, values = _level_fit_cells(step.result, adjusted)
        levels.append([step.level, *cells, _admissible_cell(step.result)])
        level_values.append([step.level, *values, _admissible_cell(step.result)])
        if step.result.converged and not step.result.admissible:
            flagged.append(k)
        verdict = ("not tested (0 df)" if step.untested else f"{NOT_JUDGED} (did not converge)"
                   if not step.result.converged else NOT_JUDGED if step.unjudged and step.result.admissible
                   else TEST_MET if step.holds and unsound_basis(steps, k) is not None
                   else _verdict(step.holds, step.result)) + (" *" if step.conditional else "")
        if step.versus_previous is not None:
            cells, values = _step_cells(step.versus_previous, step.delta_srmr, step.level, False,
                                        delta_cfi_not_defined(step.result, steps[k - 1].result))
            rows.append([step.level, *cells, verdict])
            row_values.append([step.level, *values, verdict])
        else:
            rows.append([step.level, "its own fit", "", "", "", "", verdict])
            row_values.append([step.level, None, None, None, None, None, None, verdict])
    step_notes = [note for note, shown in (
        (INADMISSIBLE_VERDICT_NOTE, any(s.result.converged and not s.result.admissible for s in steps)),
        (TEST_MET_NOTE, any(s.holds and unsound_basis(steps, k) is not None for k, s in enumerate(steps))),
        ("* tested after a step that did not hold: the comparison is between models already rejected.",
         any(s.conditional for s in steps))) if shown]
    tables = [
        _table("levels", "Fit of each level over the occasions",
               [("Level", "l"), ("Scaled chi-square (df)" if adjusted else "Chi-square (df)", "r"), ("p", "r"),
                ("CFI", "r"), ("RMSEA", "r"), ("SRMR", "r"), ("Admissible", "l")], levels, None,
               flagged=tuple(flagged),
               values=(["Level", "Chi-square", "df", "p", "CFI", "RMSEA", "SRMR", "Admissible"], level_values)),
        _table("steps", "Each step against the one before",
               [("Level", "l"), ("Scaled difference (df)" if adjusted else "Difference (df)", "r"), ("p", "r"),
                ("\u0394CFI", "r"), ("\u0394RMSEA", "r"), ("\u0394SRMR", "r"), ("Holds", "l")], rows,
               " ".join(step_notes) or None,
               values=(["Level", "Chi-square difference", "df difference", "p", "\u0394CFI", "\u0394RMSEA",
                        "\u0394SRMR", "Holds"], row_values)),
    ]
    notes = []
    if adjusted:
        tests = sorted({s.result.robust.label for s in steps if s.result.robust is not None})
        notes.append(f"Chi-square, CFI and RMSEA of each level are the scaled statistic and robust indices "
                     f"({', '.join(tests)}), and each difference test is the scaled difference of those statistics "
                     f"(Satorra & Bentler 2001){_other_differences(steps)}.")
    notes += [CONFIGURAL_NOTE, OCCASIONS_GUIDES_NOTE]
    notes += [_misfit_sources(step, result) for step in steps if not step.holds and step.culprits]
    notes += _score_tests_mcar_note(result)
    first_occasion = written_group(result.occasions[0], result.occasions)
    if result.latent_changes:
        cells = [[d.factor, d.group, est_num(d.mean), est_num(d.se),
                  f"[{est_num(d.ci95[0], 2)}, {est_num(d.ci95[1], 2)}]", p_value(d.p_value),
                  est_num(d.standardized, 2), est_num(d.variance_ratio, 2)] for d in result.latent_changes]
        values = [[d.factor, d.group, d.mean, d.se, d.ci95[0], d.ci95[1], d.p_value, d.standardized, d.variance_ratio]
                  for d in result.latent_changes]
        tables.append(_table("latent_changes", f"Latent mean and variance changes from occasion {first_occasion}",
                             [("Factor", "l"), ("Occasion", "l"), ("Mean change", "r"), ("SE", "r"), ("95% CI", "r"),
                              ("p", "r"), ("d", "r"), ("Var. ratio", "r")], cells, result.latent_note or None,
                             values=(["Factor", "Occasion", "Mean change", "SE", "95% CI lower", "95% CI upper", "p",
                                      "d", "Variance ratio"], values)))
    elif result.latent_note:
        notes.append(result.latent_note)
    inadmissible = any(s.result.converged and not s.result.admissible for s in steps)
    warnings = tuple(result.warnings) + tuple(_ladder_caution_lines([(s.level, s.result) for s in steps]))
    notice = None if not warnings else ProblemNotice(SOME_NOT_ADMISSIBLE if inadmissible else CHECK_SOLUTIONS,
                                                     warnings, inadmissible)
    first = steps[0].result
    counts = result.people_counts
    both = f" ({counts.at_both()})" if counts is not None else ""
    gone = counts.read - counts.analysed if counts is not None else 0
    read = (f" of the {count_text(counts.read)} read ({count_text(gone)} answered no item at any occasion and "
            f"{'was' if gone == 1 else 'were'} left out)" if gone else "")
    lines = (f"The same people at {_where(result)}, in one group{both}: each step is the model of every occasion side "
             f"by side, each item's residuals correlated across the occasions",
             f"{count_text(first.n_obs)} people analysed{read}; estimation: {first.estimator}",
             f"Each step after the configural one is judged by "
             f"{result.rule.description.replace('alpha', unit(result.alpha, 2))}.")
    last = steps[-1]
    listing = Listing(f"The model of the {last.level} step, as fitted (the steps before it leave out its later "
                      f"equalities; the JSON result gives each step's model)", result.texts[-1])
    return Report(ResultKind.INVARIANCE, f"Measurement invariance over {_where(result)}", notice, lines,
                  tuple(tables), tuple(notes), (GUIDE_NOTE, HIGH_STAKES_NOTE), occasions_paragraph(result),
                  warnings=tuple(result.notes), listings=(listing,))


_HELD = {"configural": "the same pattern of loadings at every occasion", "metric": "loadings equal across occasions",
         "scalar": "loadings and intercepts equal across occasions, the later occasions' factor means estimated "
                   "against the first occasion's, fixed at 0",
         "strict": "loadings, intercepts and residual variances equal across occasions"}


def occasions_paragraph(result) -> str:
    """The methods-and-results paragraph: over time, with the same people, exactly the models of the ladder, the
    estimator and the difference test with its authors, each step's figures and verdict, and the latent changes."""
    from cfa_tool.workflows.invariance import _fit_values

    steps = result.steps
    first = steps[0].result
    method = next((s.versus_previous.method for s in steps if s.versus_previous is not None), None)
    parts = [f"Measurement invariance over time was tested with the same people answering at {_where(result)}, "
             f"n = {count_text(first.n_obs)}, in one group, with a sequence of models each adding equality "
             f"constraints to the one before: "
             + "; ".join(f"{s.level} ({_HELD[s.level]})" for s in steps) + ". Each model held every occasion's "
             f"factors and items side by side, each item's residuals correlated across the occasions and the factors' "
             f"covariances across the occasions free; each factor was scaled by its first item's loading fixed at 1 at "
             f"every occasion. The models were estimated by {_estimator_phrase(first)} ({_sample_phrase(first)})."]
    d = result.one_occasion
    if d is not None:  # the model of one occasion, in the words of the ladder across groups' paragraph
        shape = _Shape({f: set(items) for f, items in result.factor_items},
                       frozenset(frozenset(p) for p in d.uncorrelated), {}, ())
        parts.append(f"At each occasion the model had {_structure(d, shape).rstrip(',')}, the same at every "
                     f"occasion.")
        departures = _departures(d, shape)
        if departures:
            parts.append(departures.replace("The model also included", "At each occasion the model also included", 1)
                         .replace("The covariance", "At each occasion the covariance"))
    counts = result.people_counts
    if counts is not None:  # who was left out and who was seen at both occasions, as the report's first lines say
        gone = counts.read - counts.analysed
        both = counts.at_both().replace(" of them", "", 1)
        if gone:
            parts.append(f"Of the {count_text(counts.read)} people read, {count_text(gone)} answered none of the items "
                         f"at any occasion and {'was' if gone == 1 else 'were'} left out; of the "
                         f"{count_text(counts.analysed)} analysed, {both}.")
        elif counts.fewest[2] < counts.analysed:
            parts.append(f"Of the {count_text(counts.analysed)} people, {both}.")
        else:
            parts.append(f"Each of the {count_text(counts.analysed)} people answered at every occasion.")
    if method is not None:
        parts.append(f"Each step was compared with the one before by {method.phrase}, and judged by "
                     f"{result.rule.description.replace('alpha', unit(result.alpha, 2))}; the configural model by its "
                     f"own fit against common-practice guide values (Hu & Bentler 1999).")
    problems = _step_problems(steps)
    if problems:  # problems first: before any step reads as held (the ladder across groups' sentence)
        parts.append(problems)
    figures = []
    for k, s in enumerate(steps):
        fit = s.result.fit
        if fit is None or not s.result.converged:
            figures.append(f"the {s.level} model did not converge")
            continue
        robust = s.result.robust
        chi = fit.chi_square if robust is None else robust.chi_square_scaled  # the figures the tables show
        shown = _fit_values(s.result)
        own = (f"{'scaled ' if robust is not None else ''}\u03c7\u00b2({fit.df}) = {num(chi, 2)}, "
               f"CFI = {unit(shown['cfi'])}, RMSEA = {unit(shown['rmsea'])}")
        t = s.versus_previous
        verdict = _held(s, _basis(steps, k))  # the ladder across groups' words: an inadmissible step says why
        if t is None:
            figures.append(f"the configural model ({own}) " + ("did not hold: its solution was not admissible"
                                                               if not s.result.admissible else
                                                               f"{'fitted' if s.holds else 'did not fit'} by the guide "
                                                               f"values"))
        else:
            figures.append(f"the {s.level} step {verdict} (\u0394\u03c7\u00b2({t.df_difference}) = "
                           f"{num(t.chi_square_difference, 2)}, p {p_phrase(t.p_value)}, "
                           f"\u0394CFI = {signed(t.delta_cfi)}, \u0394RMSEA = {signed(t.delta_rmsea)})")
    parts.append(figures[0][0].upper() + figures[0][1:] + (("; " + "; ".join(figures[1:])) if figures[1:] else "")
                 + ".")
    if result.latent_changes:
        parts.append("From the scalar model, " + "; ".join(
            f"the mean of {d.factor} at occasion {written_group(d.group, result.occasions)} differed from occasion "
            f"{written_group(result.occasions[0], result.occasions)} by "
            f"{est_num(d.mean)} (SE = {est_num(d.se)}, p {p_phrase(d.p_value)}, d = "
            f"{est_num(d.standardized, 2)}), its variance ratio {est_num(d.variance_ratio, 2)}"
            for d in result.latent_changes) + ".")
    else:
        parts.append(result.latent_note)
    return " ".join(parts)
