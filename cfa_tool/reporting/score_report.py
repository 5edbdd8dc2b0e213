"""The report of a factor-score run in the one report model (cfa_tool.reporting.document.Report), which every
writer draws.  Problems of the fitted solution come first."""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from cfa_tool.numbers import count_text, user_number
from cfa_tool.reporting import tables as T
from cfa_tool.note_parts import WORDS, Command, Note, Text, joined, said
from cfa_tool.reporting.remedies import Remedy
from cfa_tool.pipeline.ordinal import ORDINAL_NOTE
from cfa_tool.options import Option
from cfa_tool.language.names import written_group
from cfa_tool.reporting.numbers import est_num, num, unit, word_list
from cfa_tool.reporting.paragraph import group_labels, scores_paragraph
from cfa_tool.reporting.score_words import METHOD_LABELS, share_words
from cfa_tool.reporting.tables import HIGH_STAKES_NOTE, ReportTable, _table
from cfa_tool.workflows.factor_scores import (ABOUT_THE_FIT, SAME_ANSWER_COLUMN, WHY_NOT_SCORED_COLUMN, NotScored,
                                             factor_methods)
from cfa_tool.scoring.methods import (DETERMINACY_CAUTION, INDIVIDUAL_DECISIONS, ITEM_METHODS, LINEAR_METHODS,
                                      ScoreMethod, Unscored)

SCORES_CAUTION = (
    "Factor scores are estimates, not the factors themselves: with the same data, other equally valid scores exist.")
def flagging_caution(result) -> Text:
    """What flagging people by their scores needs, beside the high-stakes caution (new user s15: a school
    psychologist flagging pupils for a follow-up talk found no word on cut scores or on comparing groups), with where
    the run's rows have their standard error.  The general source is the Standards for Educational and Psychological
    Testing (AERA, APA & NCME 2014); the 95% band around the cut (1.96 standard errors, the normal distribution's 97.5%
    point) is common practice."""
    return ("Flagging people by their scores (for a follow-up talk, a referral) needs a cut score set and validated "
            "for that purpose: a record of how it was chosen and of its sensitivity and specificity against an outside "
            "criterion. A score near the cut is uncertain: within about 1.96 times the row's standard error of the cut "
            "(" + _where_errors(result) + "), a flag is not sure (a 95% band, common practice). Comparing people of "
            "different groups (gender, grade) needs the measurement invariance across those groups tested first "
            "(Standards for Educational and Psychological Testing, AERA, APA & NCME 2014).")


def _where_errors(result) -> Text:
    """Where the scores file has each row's standard error, or how to have it written (the option apart: a
    manuscript's reader runs nothing)."""
    if ScoreMethod.EXPECTED_A_POSTERIORI in result.methods:
        return "its posterior standard deviation, in the file's _posterior_sd columns"
    sem = "an item sum's or mean's: its standard error of measurement"
    if result.standard_errors:
        return f"in the file's _se columns; {sem}, _sem"
    return Note((Command(f"written with {Option.STANDARD_ERRORS}", "not written in this run's scores file"),
                 f"; {sem}"))



#: short column headers (the notes name the methods in full)
METHOD_COLUMNS = {ScoreMethod.REGRESSION: "Regression", ScoreMethod.BARTLETT: "Bartlett",
                  ScoreMethod.CORRELATION_PRESERVING: "Corr.-preserving"}


def _group(result, label) -> str:
    """A group's label as the scores' report names it: among the fit's groups, by the one rule
    (language.names.written_group)."""
    return written_group(label, group_labels(result.fit))


def _where(result, q) -> str:
    return f" (group {_group(result, q.group)})" if q.group is not None else ""


def header_lines(result) -> list[str]:
    fit = result.fit
    methods = ", ".join(METHOD_LABELS[m] for m in result.methods)
    carried = tuple(getattr(result, "carried", ()))
    first = ((f"{result.id_name}, " if result.id_name else "")
             + (f"{word_list(carried)} (as in the data file: the {'column' if len(carried) == 1 else 'columns'} the "
                f"run chose or grouped its rows by), " if carried else "")
             + "then ") if result.id_name or carried else ""
    scored = [f"Scored data: {result.scored_source} (with the parameters of the fit above)"] if result.scored_source else []
    return [f"Model file: {fit.model_source}", f"Data: {fit.data.source}; the model was fitted to {count_text(fit.n_obs)} rows",
            f"Estimation of the fit: {fit.estimator}", *scored,
            f"Scores ({methods}) of {rows_scored(result)}, one line per row of the data in the file's order"
            + _empty_lines(result) + f"; columns: {first}one per factor" + ("" if not result.standard_errors else
                                        " with its posterior standard deviation" if ScoreMethod.EXPECTED_A_POSTERIORI
                                        in result.methods else " with its standard error")
            + (" (an item sum's or mean's: its standard error of measurement, _sem)" if result.standard_errors
               and any(m in ITEM_METHODS for m in result.methods) else "")
            + f"{' and method' if len(result.methods) > 1 else ''}, then per factor the number of its items the row "
              f"answered, then {SAME_ANSWER_COLUMN} and {WHY_NOT_SCORED_COLUMN} (always written, empty where there "
              f"is nothing to say)"] + _design_line(fit)


def rows_scored(result) -> str:
    """'250 of the 480 rows' when some lines of the scores file hold no score, else '480 rows'."""
    if result.rows_scored == result.rows:
        return f"{count_text(result.rows)} rows"
    return f"{count_text(result.rows_scored)} of the {count_text(result.rows)} rows"


def _empty_lines(result) -> str:
    """What the lines without any score are: the rows of data without one, with their count by reason (the words of
    the why_not_scored column), and the empty lines of rows of the file that hold no data (:func:`lines_without_data`)."""
    said = ""
    if result.not_scored:
        counts = ", ".join(f"{why.value} {count_text(n)}" for why, n in result.not_scored.items())
        empty = result.rows - result.rows_scored
        keep = "keeps its line" if empty == 1 else "keep their line"
        said = (f" (the {count_text(empty)} without any score {keep} with empty cells, the column "
                f"{WHY_NOT_SCORED_COLUMN} saying why: {counts})")
    lines = lines_without_data(result)
    above = rows_above_names(result)
    return said + (f", and {lines}" if lines else "") + (f"; {above}" if above else "")


def rows_above_names(result) -> str:
    """The rows of the scored file above its column names (a title, the rows --names-row leaves unread), which the
    scores file has no line for, said where the empty lines of the rows without data are (new-user trial s21: only
    the rows below the names were said): its header stands for the names' row, as a CSV file begins with its header;
    '' when the names are the first row."""
    names = getattr(result, "names_row", 1)
    if names <= 1:
        return ""
    above = "the row above the column names (row 1 of the file" if names == 2 else \
        f"the {names - 1} rows above the column names (rows 1 to {names - 1} of the file"
    return (f"no line for {above}; its header stands for row {names}, which holds the names, so that its lines "
            f"follow the file's rows from there)")


#: the rows of a file that hold no data, whose lines the scores file keeps empty (workflows.factor_scores.NotScored
#: .row_of_data), in words: one, several
_NO_DATA_WORDS = {NotScored.BLANK: ("a blank row of the file", "blank rows of the file"),
                  NotScored.ABOVE_ANSWERS: ("the row above the first row of answers",
                                            "rows above the first row of answers")}


def lines_without_data(result) -> str:
    """The empty lines the scores file keeps for rows of the file that hold no data, so that its lines follow the
    file's rows ('an empty line for the row above the first row of answers'), never counted as rows of the data
    (new-user trial s21); '' when there are none."""
    found = result.lines_without_data
    if not found:
        return ""
    listed = word_list(_NO_DATA_WORDS[why][0] if n == 1 else f"each of the {count_text(n)} {_NO_DATA_WORDS[why][1]}"
                       for why, n in found.items())
    return (f"an empty line for {listed} (no data; {WHY_NOT_SCORED_COLUMN} says '"
            + "', '".join(why.value for why in found) + "'), so that the lines follow the file's rows")


def _design_line(fit) -> list[str]:
    """The sampling design the parameters were fitted under, and that it does not change a row's score."""
    design = getattr(fit, "design", None)
    if design is None:
        return []
    return [f"Fitted under the sampling {design.status()}; a row's score follows from its own answers and the "
            f"parameters alone, so its weight does not change it"]


def caution_lines(result) -> list[str]:
    """The low-determinacy caution, one line per group and factor below the common-practice level."""
    lines = []
    for q in result.quality:
        for name, rho, low in zip(q.factors, q.determinacy, q.low_determinacy):
            if low:
                lines.append(f"The determinacy of {name}{_where(result, q)} is {unit(rho, 2, DETERMINACY_CAUTION)}, below {unit(DETERMINACY_CAUTION, 2)} "
                             f"(common practice, no single source): its scores should not be used for decisions about "
                             f"individuals.")
    return lines


def _one_item_sentence(fit) -> str:
    """Factors measured by one item, whose error variance the model must fix: their scores' determinacy,
    reliability and precision follow from that fixed value, not from the data (:mod:`cfa_tool.reporting.one_item`).
    ``fit``: the fit result, or a saved fit (its estimate rows as read back)."""
    from cfa_tool.reporting.one_item import one_item_factors, one_item_sentence

    return one_item_sentence(one_item_factors(fit.estimates, fit.observed), "determinacy, reliability and precision")


def _withheld_sentence(result, q) -> str:
    """The factors of one group (``q``: its quality) whose keyed sum has no omega because the fit's loadings contradict
    the declared keying (assessment.reliability.withheld_sums: the fit withholds it too), said where the tables show
    '—' for it; '' where there are none."""
    from cfa_tool.assessment.reliability import withheld_sums

    several = len(result.quality) > 1
    found = [f for f in q.factors if ((q.group if several else None), f) in withheld_sums(result.fit.problems)]
    if not found:
        return ""
    many = len(found) > 1
    return (f" No item sum ω is given for {word_list(found)}: the loadings of {'their' if many else 'its'} items "
            f"contradict the keying the model declares (the caution first in this report), so "
            f"{'their keyed sums add' if many else 'its keyed sum adds'} items that run against each other and "
            f"describe{'' if many else 's'} no scale.")


def quality_table(result, k: int) -> ReportTable:
    q = result.quality[k]
    ordinal = not hasattr(q, "methods")
    sums = _item_sums_of(result, q)
    if ordinal:
        rows = [[name, unit(rho) + (" (below .80)" if low else ""), unit(rel)]
                for name, rho, rel, low in zip(q.factors, q.determinacy, q.reliability, q.low_determinacy)]
        numbers = [[name, rho, rel] for name, rho, rel in zip(q.factors, q.determinacy, q.reliability)]
        cols = [("Factor", "l"), ("Determinacy", "r"), ("Reliability", "r")]
        note = ("Posterior-mean scores in these data: reliability Var(score) / (Var(score) + mean posterior variance), the "
                "squared correlation of the score with its factor (law of total variance); determinacy its square root.")
        if sums is not None:
            cols.append(("Item sum ω", "r"))
            rows = [row + [_omega_cell(sums, name)] for row, name in zip(rows, q.factors)]
            numbers = [row + [_omega_of(sums, name)] for row, name in zip(numbers, q.factors)]
            note += (" Item sum ω: the reliability of the keyed sum of the answers' codes (and of the item mean, its "
                     "multiple) of rows that answered every item, from the fitted thresholds, loadings and factor "
                     "variance (Green & Yang 2009; a prorated sum of fewer items is less reliable), as the "
                     "fit gives it: the agreement of the sum with its own true score, not with the factor, so it is "
                     "not comparable with the posterior means' reliability beside it; — where a factor has no item "
                     "sum or its sum none (one item, or continuous items beside ordinal ones: the notes say why)."
                     + _withheld_sentence(result, q) + _one_item_sentence(result.fit))
    else:
        cols = [("Factor", "l"), ("Determinacy", "r")] + [(METHOD_COLUMNS[m.method], "r") for m in q.methods]
        rows = []
        for f, name in enumerate(q.factors):
            rows.append([name, unit(q.determinacy[f], 3, DETERMINACY_CAUTION)
                         + (f" (below {unit(DETERMINACY_CAUTION, 2)})" if q.low_determinacy[f] else "")]
                        + [unit(m.reliability[f]) for m in q.methods])
        numbers = [[name, q.determinacy[f]] + [m.reliability[f] for m in q.methods] for f, name in enumerate(q.factors)]
        if sums is not None:
            cols.append(("Item sum ω", "r"))
            rows = [row + [_omega_cell(sums, name)] for row, name in zip(rows, q.factors)]
            numbers = [row + [_omega_of(sums, name)] for row, name in zip(numbers, q.factors)]
        note = ("Determinacy: the correlation of the regression scores with their factor (Grice 2001). Then the "
                "reliability of each method's scores (Corr.-preserving: correlation-preserving scores): the squared correlation of "
                "the score with its factor (Beauducel 2011). Values "
                "under the fitted model with every item answered. "
                + _written_words([METHOD_LABELS[m] for m in LINEAR_METHODS if m in result.methods],
                                 [METHOD_LABELS[m] for m in LINEAR_METHODS if m not in result.methods])
                + (" Item sum ω: the reliability of each factor's keyed item sum (and of the item mean, its multiple), "
                   "omega (McDonald 1999) as the fit gives it, the share of the sum's variance due to the factor; for "
                   "items that load on one factor only it is the squared correlation of the sum with the factor, as "
                   "the methods' reliabilities are; it is that of rows that answered every item (a prorated sum of "
                   "fewer items is less reliable); — where a factor has no item sum or its sum none (one item)."
                   + _withheld_sentence(result, q) if sums is not None else "")
                + _one_item_sentence(result.fit))
    title = "Quality of the scores" + _where(result, q) + ("" if ordinal else ": determinacy, and reliability by method")
    return _table(f"score_quality_{k}", title, cols, rows, note,
                  flagged=tuple(i for i, low in enumerate(q.low_determinacy) if low),
                  values=([c for c, _ in cols], numbers))


def _omega_of(sums, factor: str) -> float:
    """The item sum's omega of ``factor``: the one value of the sums' table (scoring.quality.SumScore, read through
    the item sums' summary), NaN where it has none."""
    return dict(zip(sums.factors, sums.omega)).get(factor, float("nan"))


def _omega_cell(sums, factor: str) -> str:
    """The item sum's omega of ``factor`` in the quality table (:func:`_omega_of`), '—' where it has none."""
    return _or_dash(_omega_of(sums, factor))



def _precision_of(result, q) -> tuple[ScoreMethod | None, tuple]:
    """(the method, its scoring.quality.Precision per factor) of one group's scores: the first factor-score method
    written (the posterior means for ordinal items, their one method); (None, ()) for item sums and means alone,
    whose precision has its own table (:func:`item_sum_precision_table`)."""
    found = _precisions_of(result, q)
    return found[0] if found else (None, ())


def precision_table(result, k: int) -> ReportTable | None:
    """How precise one person's score is, for the first method written or the posterior means of ordinal items
    (module docstring of scoring.quality): the standard error, a 95% band and the smallest difference between two
    people that exceeds chance, in the factor's units and in its standard deviations."""
    q = result.quality[k]
    ordinal = not hasattr(q, "methods")
    method, found = _precision_of(result, q)
    rows, values = [], []
    for p in found:
        rows.append([p.factor, est_num(p.standard_error, 2), f"±{est_num(p.band, 2)}", f"±{est_num(p.band_in_sd, 2)}",
                     est_num(p.smallest_difference, 2), est_num(p.smallest_difference_in_sd, 2)])
        values.append([p.factor, p.standard_error, p.band, p.band_in_sd, p.smallest_difference,
                       p.smallest_difference_in_sd])
    if not rows:
        return None
    cols = [("Factor", "l"), ("SE", "r"), ("95% band", "r"), ("Band, SDs", "r"), ("Real difference", "r"),
            ("Difference, SDs", "r")]
    if ordinal:
        levels = "; ".join(f"{f} {est_num(low, 2)} in the lowest third of the scores and {est_num(high, 2)} in the highest"
                           for f, low, high in q.precision_by_level)
        first = (f"For {METHOD_LABELS[method]} scores of the rows that answered every item of the factor: SE is the "
                 f"median of their posterior SDs (each row's own is the _posterior_sd column of the file), which "
                 f"depends on the answers: {levels}. ")
    else:
        own = ("each row's own standard error is the _se column of the file" if result.standard_errors else
               "each row's own standard error is written to the file when standard errors are asked for")
        first = f"For {METHOD_LABELS[method]} scores with every item answered ({own}). "
    sds = ", ".join(f"{p.factor} {est_num(p.scale_sd, 2)}" for p in found)
    first += (f"Scores, SEs and bands are in each factor's units as the model scales it (the factor's standard "
              f"deviation: {sds}). ")
    first += _left_empty_sentence(result, method)
    note = (first + "SE: the typical distance of a score from the person's factor value; 95% band: "
            "±1.96 SE about a score (normal approximation); real difference: the smallest difference between two "
            "people's scores that exceeds chance at the 5% level, 1.96 × √2 × SE (Gulliksen 1950). SDs: divided by "
            "the factor's standard deviation." + _one_item_sentence(result.fit))  # (Gulliksen: scoring.quality)
    return _table(f"score_precision_{k}", "Precision of one person's score" + _where(result, q), cols, rows, note,
                  values=([c for c, _ in cols], values))


def _left_empty_sentence(result, method: ScoreMethod) -> Text:
    """What the precision table says of the cells of ``method`` left empty for rows that answered none of a
    factor's items (workflows.factor_scores, UnansweredFactor.LEAVE_EMPTY), with their count per factor in the
    whole file (the unscored table's count); '' when none was."""
    counts = next((c for r, m, c in result.unscored if r == Unscored.LEFT_EMPTY.value and m == method.value), None)
    if counts is None or not any(counts):
        return ""
    several = " (all groups together)" if len(result.quality) > 1 else ""
    return Note(("Left empty, as asked", Command(f" ({Option.UNANSWERED_FACTORS.given(result.unanswered.value)})"),
                 f": the {METHOD_LABELS[method]} scores of rows that answered none of the factor's items, "
                 f"{_unscored_counts(result.factors, counts)}{several}; no figure here is about them. "))


def item_sum_precision_table(result, k: int) -> ReportTable | None:
    """How precise one person's item sum (or mean) is: its standard error of measurement from the sum's SD under the
    fitted model and its omega (scoring.quality.item_sum_precision), with the band and real difference of factor
    scores, in the sum's (or mean's) own units."""
    q = result.quality[k]
    sums = _item_sums_of(result, q)
    if sums is None or not sums.precision:
        return None
    kinds = {p.method for p in sums.precision}
    both, mean_only = len(kinds) > 1, kinds == {ScoreMethod.ITEM_MEAN}
    count = dict(zip(sums.factors, (len(items) for items in sums.items)))
    rows, values = [], []
    for p in sums.precision:
        label = [METHOD_LABELS[p.method]] if both else []
        rows.append([p.factor, *label, str(count[p.factor]), unit(p.reliability), est_num(p.scale_sd, 2),
                     est_num(p.standard_error, 2), f"±{est_num(p.band, 2)}", est_num(p.smallest_difference, 2)])
        values.append([p.factor, *label, count[p.factor], p.reliability, p.scale_sd, p.standard_error, p.band,
                       p.smallest_difference])
    cols = [("Factor", "l")] + ([("Score", "l")] if both else []) + [
        ("Items", "r"), ("ω", "r"), ("SD", "r"), ("SEM", "r"), ("95% band", "r"), ("Real difference", "r")]
    ordinal = not hasattr(q, "methods")
    codes = " of the answers' codes" if ordinal else ""
    spread = ("from the fitted thresholds, loadings and factor variance, Green & Yang 2009" if ordinal else
              "√(k'Σk) for the keys k and the fitted covariance matrix Σ")
    if mean_only:
        units, sd = ("in the units of the answer scale (the keyed sum's figures divided by the number of items)",
                     f"the item mean's standard deviation under the fitted model ({spread}, divided by the number "
                     f"of items)")
    else:
        units = (f"in the units of the keyed sum{codes}" if not both else
                 f"in each score's own units (an item sum's those of the keyed sum{codes}, an item mean's those of "
                 f"the answer scale: the sum's divided by the number of items)")
        sd = f"the keyed sum's standard deviation under the fitted model ({spread})"
    written = word_list(METHOD_LABELS[m] for m in ITEM_METHODS if m in kinds)
    note = (f"For the {written} of rows that answered every item of the factor, {units}. SD: {sd}; ω: its "
            f"reliability, as in the quality table; SEM: the standard error of measurement, SD × √(1 − ω) (Lord & "
            f"Novick 1968), the typical distance of a person's score from their true score; 95% band: ±1.96 SEM "
            f"about a score (normal approximation); real difference: the smallest difference between two people's "
            f"scores that exceeds chance at the 5% level, 1.96 × √2 × SEM (Gulliksen 1950). "
            + _prorated_sentence(result, sums))
    return _table(f"item_sum_precision_{k}", "Precision of one person's item score" + _where(result, q), cols, rows,
                  note, values=([c for c, _ in cols], values))


def _prorated_sentence(result, sums) -> Text:
    """What the item-score precision table says of prorated scores: each row's own SEM is that of the sum of the
    items it answered, SD √(1 − ω) of their sum under the fitted model (Lord & Novick 1968; scoring.quality
    .answered_sum_sems), scaled as the score is; the range of the prorated rows' SEMs, per factor."""
    where = ("in the file's _sem columns" if result.standard_errors else
             Note((Command(f"written to the file (_sem columns) with {Option.STANDARD_ERRORS}",
                           "not written in this run's scores file"),)))
    said = ("A prorated score rests on the items the row answered, and its own SEM is that of their sum, SD × "
            "√(1 − ω) of that sum under the fitted model, scaled as the score is (times J/a for a sum prorated from a "
            "of J items, divided by a for a mean), as a rule larger than the figure above. Each row's own SEM is "
            + where + ".")
    if sums.prorated_sem:
        said += " Prorated rows here: " + "; ".join(
            f"{f} {n} {'row' if n == 1 else 'rows'}, {METHOD_LABELS[m]} SEM "
            + (num(low, 2) if num(low, 2) == num(high, 2) else f"{num(low, 2)} to {num(high, 2)}")
            for f, m, low, high, n in sums.prorated_sem) + "."
    return said


#: the heading of the scores' first box when its only cautions are the scores' precision
SCORES_PRECISION_HEADING = "Check before using these scores"


def precision_cautions(result) -> list[str]:
    """Factors whose scores' reliability is below what decisions about individuals usually need: one caution per
    group, naming each method whose scores fall below with its factors (new-user trial s21: item means, regression
    and Bartlett scores gave three nearly identical cautions in a row).  Its figures are those of rows answering every
    item: the rows scored from some of a factor's items, less precise still, are said beside them, once, with their
    standard errors (:func:`_fewer_items`; new-user trial s28: a third of the rows, given a shorter form, had SEs of
    0.37 to 0.54 against 0.33, said only in a note near the end of the report)."""
    lines = []
    for q in result.quality:
        found = _item_sum_low(result, q)
        found += [(f"{METHOD_LABELS[method]} scores", low) for method, precise in _precisions_of(result, q)
                  for low in [_low_reliabilities(q, precise)] if low]
        if not found:
            continue
        if len(found) == 1:
            (what, low), = found
            lines.append(f"The reliability{' (omega)' if what == _SUMS else ''} of the {what}{_where(result, q)} is "
                         f"below {_NEEDED}: {', '.join(low)}.")
        else:
            said = "; ".join(f"{what}{' (omega)' if what == _SUMS else ''}: {', '.join(low)}" for what, low in found)
            lines.append(f"The reliability of the {word_list(what for what, _ in found)}{_where(result, q)} is "
                         f"below {_NEEDED}: {said}.")
    if lines:
        lines[0] += _fewer_items(result)
    return lines


def _fewer_items(result) -> str:
    """The sentence of the first precision caution on the rows scored from some but not all of a factor's items
    (workflows.factor_scores.partly_answered): how many, and how much less precise; '' when every row answered every
    item of the factors it was scored on."""
    from cfa_tool.workflows.factor_scores import partly_answered_words

    found = getattr(result, "partly_answered", ())
    if not found:
        return ""
    method = METHOD_LABELS[found[0].method]
    return (f" These figures are for rows that answered every item; rows that answered some but not all of a "
            f"factor's items have less precise {method} scores ({partly_answered_words(found)}).")


#: the level of the precision cautions, with its source
_NEEDED = (f"the {unit(INDIVIDUAL_DECISIONS, 2)} that decisions about individuals usually need (Nunnally & "
           f"Bernstein 1994; common practice)")
#: how the precision cautions name the item sums and means
_SUMS = "item sums and means"


def _precision_advice(result) -> Text:
    """What to try with scores less reliable than decisions about individuals need: read them for research, comparing
    groups only where the scores can be compared (new-user trial s21: with each group's scores centred at 0 the advice
    was still 'use the scores to compare groups'; workflows.factor_scores.not_comparable_problems), and groups or
    units the fit did not hold equal only once measurement invariance across them is tested (new-user trial s22: a
    one-group run advised 'use the scores to compare groups', and the wards ranked last by their mean scores were
    those of the one site whose patients answered an item differently; :func:`unit_means_caution`)."""
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.workflows.factor_scores import centred_factors

    if not any(p.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS for p in result.fit.problems):
        if not _has_groups(result):
            return ("use the scores for research, not for decisions about one person; comparing groups or units "
                    "(wards, sites, teams) by their mean scores needs measurement invariance across them tested first"
                    f"{_INVARIANCE_TEST} and enough rows in each ({_UNIT_MEANS_SAID}).")
        return ("use the scores for research and to compare the groups of this fit under the loadings and intercepts "
                "the model holds equal across them, not for decisions about one person; other groups or units (wards, "
                f"teams) only once measurement invariance across them is tested{_INVARIANCE_TEST} ({_UNIT_MEANS_SAID}).")
    centred = set(centred_factors(result.fit.estimates))
    others = [f for f in result.factors if f not in centred]
    if not others:
        return ("use the scores for research within each group, not to compare the groups (the caution above) nor "
                "for decisions about one person.")
    return (f"use the scores for research, comparing groups only on {word_list(others)} (the caution above), not "
            f"for decisions about one person.")


#: how the scores' report names the test of measurement invariance across groups or units (a command, as the
#: invariance reports name it, no option: every view says it alike, the Word file too)
_INVARIANCE_TEST = " (the invariance command, with their column as the groups)"
#: where the scores' report says what comparing the means of groups or units needs (:func:`unit_means_caution`)
_UNIT_MEANS_SAID = "the caution on means of groups and units, under the report"


def _has_groups(result) -> bool:
    """Whether the scores are of a fit with groups (one quality summary per group)."""
    return any(q.group is not None for q in result.quality)


def unit_means_caution(result) -> str:
    """What comparing or ranking groups or units (wards, sites, teams, schools) by the mean of their rows' scores
    needs, beside the high-stakes caution (new-user trial s22: an analyst ranked 18 wards by their mean scores for a
    bonus; the three lowest were the wards of the one site whose patients answered an item differently at the same
    level of the factor, and nothing said what such a ranking needs).  A unit's mean is a mean of its rows: its
    standard error is the scores' standard deviation over the square root of its rows, a 95% band of 1.96 of those
    (the normal approximation, common practice), ±0.31 SD for 40 rows and ±0.20 SD for 100; the reliability of unit
    means, ICC(2) = n ICC / (1 + (n - 1) ICC), the Spearman-Brown formula applied to the share of the variance that
    lies between units (Bliese 2000)."""
    from cfa_tool.assessment.admissibility import ProblemKind

    held = _has_groups(result) and not any(p.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS
                                           for p in result.fit.problems)
    fitted = (" The groups of this fit are compared under the loadings and intercepts the model holds equal across "
              "them; other groups or units are not." if held else "")
    return ("Comparing or ranking groups or units (wards, sites, teams, schools) by the mean of their rows' scores "
            f"needs measurement invariance across them tested first{_INVARIANCE_TEST}: an item that the people of one "
            "unit answer differently at the same level of the factor moves that unit's mean, not the factor."
            + fitted + " A unit's mean is only as reliable as its number of rows allows: its standard error is about "
            "the scores' standard deviation divided by √n for n rows (a 95% band of about ±0.31 SD for 40 rows, "
            "±0.20 SD for 100; normal approximation), and the reliability of the units' means grows with their rows "
            "and with the share of the differences that lies between units (ICC(2) = n·ICC / (1 + (n − 1)·ICC), ICC "
            "that share; Bliese 2000); units within larger ones (wards within sites) differ partly as those do. Ranking units, "
            "or the staff in them, for rewards or sanctions is a decision about people: the caution that follows "
            "applies.")


def indistinct_cautions(result) -> list[str]:
    """Pairs of scored factors whose correlation in the model is at least
    :data:`~cfa_tool.assessment.admissibility.HARDLY_DISTINCT` in size, per group (hostile s20: two factors correlating
    .998 were scored as two traits, their score columns correlating 1.000, with the correlation said only inside the
    paragraph)."""
    return [line for _, _, _, line in _indistinct_pairs(result)]


def _indistinct_pairs(result) -> list[tuple[str, str, str | None, str]]:
    """(first factor, second factor, group label or None, caution) of :func:`indistinct_cautions`."""
    from cfa_tool.assessment.admissibility import HARDLY_DISTINCT

    out = []
    for q in result.quality:
        r = np.asarray(q.factor_correlations, dtype=float)
        pairs = [(q.factors[i], q.factors[j], r[i, j]) for i in range(len(q.factors)) for j in range(i)
                 if np.isfinite(r[i, j]) and abs(r[i, j]) >= HARDLY_DISTINCT]
        for a, b, value in pairs:
            out.append((b, a, q.group, f"The factors {b} and {a} correlate {unit(value, 3)} in the model"
                                       f"{_where(result, q)}: their scores measure nearly the same thing, and read as "
                                       f"two traits they mislead."))
    return out


def _precisions_of(result, q) -> list[tuple[ScoreMethod, tuple]]:
    """(method, its scoring.quality.Precision per factor) of every factor-score method written for one group (the
    posterior means alone for ordinal items): each method's scores get their own caution (hostile s20: the Bartlett
    scores of a bifactor model, reliability .02-.05, went unflagged beside regression scores named in the box)."""
    from cfa_tool.scoring.quality import precision_of

    methods = factor_methods(result.methods)
    return [(m, precision_of(q, m)) for m in (methods if hasattr(q, "methods") else methods[:1])]


def _low_reliabilities(q, precise: tuple) -> list[str]:
    """The factors of one method's scores of one group whose reliability is below what decisions about individuals
    usually need, each with its reliability and its 95% band in the factor's SDs where it has one; [] when none is."""
    if hasattr(q, "methods"):
        found = [(p.factor, p.reliability, p.band_in_sd) for p in precise]
    else:  # every scored factor, with its band where rows answered all its items
        bands = {p.factor: p.band_in_sd for p in precise}
        found = [(f, rel, bands.get(f)) for f, rel in zip(q.factors, q.reliability)]
    return [f"{factor} {unit(rel, 2, INDIVIDUAL_DECISIONS)}"
            + (f" (95% band about ±{num(band, 2)} SD of the factor)" if band is not None else "")
            for factor, rel, band in found if rel < INDIVIDUAL_DECISIONS]


def _item_sums_of(result, q):
    """The item sums' summary (workflows.factor_scores.ItemSumSummary) of the group whose quality is ``q``; None
    when no item sum or mean is written."""
    return next((g for g in result.item_sums if g.group == q.group), None)


def _item_sum_low(result, q) -> list[tuple[str, list[str]]]:
    """The item sums' and means' factors of one group whose omega is below what decisions about individuals usually
    need, as [(their name in the caution, the factors with their omega)]; [] when none is or none is written."""
    sums = _item_sums_of(result, q)
    if sums is None:
        return []
    low = [f"{f} {unit(w, 2, INDIVIDUAL_DECISIONS)}" for f, w in zip(sums.factors, sums.omega)
           if w == w and w < INDIVIDUAL_DECISIONS]
    return [(_SUMS, low)] if low else []


def _listed_counts(factors, counts) -> str:
    return ", ".join(f"{f} {n}" for f, n in zip(factors, counts) if n)


def item_sum_notes(result) -> list[Text]:
    """What the item sums and means are and how they were made, in every view: the missing-answers rule and how many
    rows were prorated or left empty, the items reversed and on which scale, items counted on several factors, and
    the factors without a sum."""
    if not result.item_sums:
        return []
    rule = result.item_sums[0].rule
    share = share_words(rule.least_share)
    written = word_list(METHOD_LABELS[m] for m in ITEM_METHODS if m in result.methods)
    lines: list[Text] = [Note((
        f"Item sums and means ({written}): each factor's own items, each reverse-keyed item reversed as lowest + "
        f"highest answer - x, by the keys of the fit's reliability; a row that answered at least {share} of a "
        f"factor's items gets the mean of its answered keyed items (the item mean), and that mean times the "
        f"number of items (the item sum, prorated); a row that answered fewer gets empty cells ("
        + ("the common-practice default, no single source; " if rule.default else ""),
        Command(f"set by {Option.LEAST_ANSWERED}", "a setting of the run"),
        "). They are not factor scores: every item weighs the same, whatever its loading."))]
    one = next(m for m in ITEM_METHODS if m in result.methods)  # the sum and the mean leave the same cells empty
    few = next((c for r, m, c in result.unscored if r == Unscored.TOO_FEW_ITEMS_ANSWERED.value and m == one.value),
               (0,) * len(result.factors))
    several = len(result.item_sums) > 1
    prorated = "; ".join((f"group {_group(result, g.group)}: " if several else "") + (_listed_counts(g.factors, g.prorated) or "none")
                         for g in result.item_sums)
    lines.append(f"Rows whose item sums and means rest on some of a factor's items (prorated): {prorated}. Rows "
                 f"left empty for answering fewer than {share_words(rule.least_share)} "
                 f"of a factor's items: {_listed_counts(result.factors, few) or 'none'}.")
    for g in result.item_sums:
        where = f" in group {_group(result, g.group)}" if g.group is not None else ""
        if g.reversals:
            turned = "; ".join(f"{r.item} on {r.factor}, on {user_number(r.lowest)} to {user_number(r.highest)} ({r.source.value})"
                               for r in g.reversals)
            lines.append(f"Reversed in the item sums{where}: {turned}.")
        if g.shared:
            lines.append(f"Items counted in the item sum of each factor they load on{where}: "
                         + "; ".join(f"{x} ({', '.join(fs)})" for x, fs in g.shared) + ".")
        if g.not_summed:
            lines.append(f"No item sum or mean{where} for " + "; ".join(f"{f} ({why.value})" for f, why in g.not_summed)
                         + ".")
        if g.mixed:
            lines.append(f"No reliability or standard error of measurement{where} for the item sums and means of "
                         f"{word_list(g.mixed)}: they add continuous items' values to ordinal answers' codes, and the "
                         f"fitted model gives the spread of a sum of answers' codes alone (Green & Yang 2009), not of "
                         f"such a mixture.")
    return lines


def correlation_table(result, k: int) -> ReportTable | None:
    q = result.quality[k]
    if len(q.factors) < 2:
        return None
    if not hasattr(q, "methods"):  # ordinal items: posterior means in these data
        if q.score_correlations is None:
            return None
        rows = [[q.factors[j], q.factors[i], unit(q.factor_correlations[i, j]), unit(q.score_correlations[i, j])]
                for i in range(len(q.factors)) for j in range(i)]
        numbers = [[q.factors[j], q.factors[i], q.factor_correlations[i, j],
                    q.score_correlations[i, j]] for i in range(len(q.factors)) for j in range(i)]
        return _table(f"score_correlations_{k}", "Correlations of the scores beside the factors' correlations" + _where(result, q),
                      [("Factor", "l"), ("With", "l"), ("Factors", "r"), ("Posterior means", "r")], rows,
                      "The factors' correlations under the fitted model, then those of the posterior-mean scores of "
                      "the rows scored on every factor. Posterior means shrink towards the mean, by more for rows "
                      "that answered less, so their correlations differ from the factors'.",
                      values=(["Factor", "With", "Factors", "Posterior means"], numbers))
    rows, numbers = [], []
    for i in range(len(q.factors)):
        for j in range(i):
            rows.append([q.factors[j], q.factors[i], unit(q.factor_correlations[i, j])]
                        + [unit(m.score_correlations[i, j]) for m in q.methods])
            numbers.append([q.factors[j], q.factors[i], q.factor_correlations[i, j]]
                           + [m.score_correlations[i, j] for m in q.methods])
    cols = [("Factor", "l"), ("With", "l"), ("Factors", "r")] + [(METHOD_COLUMNS[m.method], "r") for m in q.methods]
    return _table(f"score_correlations_{k}", "Correlations of the scores beside the factors' correlations" + _where(result, q),
                  cols, rows,
                  "The factors' correlations, then those of each method's scores (Corr.-preserving: correlation-preserving "
                  "scores), under the fitted model. Regression scores as a rule overstate the factors' correlations; "
                  "correlation-preserving scores keep them (Grice 2001; ten Berge et al. 1999).",
                  values=([c for c, _ in cols], numbers))


def _written_words(written: list[str], unwritten: list[str]) -> Text:
    """Which methods' scores the file holds and which the table shows only for comparison (hostile s14: with item
    sums alone the note read 'Written to the file: ; shown for comparison')."""
    words = f"Written to the file: {word_list(written)}" if written else "No factor-score method is written to the file"
    if unwritten:  # the option for the program's user, apart (a manuscript leaves it out: note_parts)
        return Note((f"{words}; shown for comparison{'' if written else ' only'}, not written",
                     Command(f" (ask for them with {Option.SCORE_METHODS})"), f": {word_list(unwritten)}."))
    return words + "."


def sum_table(result, k: int) -> ReportTable | None:
    q = result.quality[k]
    if not hasattr(q, "sums") or not q.sums:
        return None
    rho = dict(zip(q.factors, q.determinacy))
    if not hasattr(q, "methods"):  # ordinal items: the sum of the answers' codes (Green & Yang 2009)
        rows = [[s.factor, str(len(s.items)), ", ".join(s.reversed_items), _sum_omega(s), _sum_validity(s),
                 unit(rho[s.factor])] for s in q.sums]
        numbers = _sum_numbers(q.sums, rho)
        return _table(f"score_sums_{k}", "Keyed sum scores beside the factor scores" + _where(result, q),
                      [("Factor", "l"), ("Items", "r"), ("Reversed", "l"), ("Sum omega", "r"),
                       ("Sum's r", "r"), ("Score's r", "r")], rows,
                      "The unit-weighted sum of the answers' codes of each factor's items (reversed: the "
                      "reverse-keyed items, reversed in the sum). Sum omega: its reliability from the fitted thresholds, loadings and factor variance "
                      "(Green & Yang 2009), the agreement of the sum with its own true score, which with answer "
                      "categories is a curved function of the factor, so it is not comparable with a score's "
                      "agreement with the factor. Sum's r: the sum's correlation with the factor under the fitted "
                      "model; score's r: the posterior-mean score's in these data (the square root of its reliability "
                      "in the quality table); the two show what the simpler score loses." + _withheld_sentence(result, q)
                      + _one_item_sentence(result.fit), values=(SUM_COLUMNS, numbers))
    rows = [[s.factor, str(len(s.items)), ", ".join(s.reversed_items), _sum_omega(s), _sum_validity(s),
             unit(rho[s.factor])] for s in q.sums]
    return _table(f"score_sums_{k}", "Keyed sum scores beside the factor scores" + _where(result, q),
                  [("Factor", "l"), ("Items", "r"), ("Reversed", "l"), ("Sum omega", "r"), ("Sum's r", "r"),
                   ("Score's r", "r")], rows,
                  "The unit-weighted sum of each factor's items (reversed: the reverse-keyed items, reversed in the "
                  "sum); sum omega: its reliability (McDonald 1999); sum's r and score's r: the correlations of the "
                  "sum and of the regression score with the factor under the fitted model, which show what the "
                  "simpler score loses against the factor score." + _withheld_sentence(result, q)
                  + _one_item_sentence(result.fit), values=(SUM_COLUMNS, _sum_numbers(q.sums, rho)))


#: the columns of the keyed sums' table as its data file holds them (:func:`sum_table`)
SUM_COLUMNS = ["Factor", "Items", "Reversed", "Sum omega", "Sum's r", "Score's r"]


def _sum_numbers(sums, rho: dict) -> list[list]:
    """The keyed sums' table as numbers (:func:`sum_table`): empty where a cell shows '—'."""
    return [[s.factor, len(s.items), ", ".join(s.reversed_items), s.omega,
             s.validity if s.omega == s.omega else float("nan"), rho[s.factor]] for s in sums]


def _sum_omega(s) -> str:
    """A keyed sum's omega cell (scoring.quality.SumScore), '—' for a sum of one item, which has none."""
    return _or_dash(s.omega)


def _sum_validity(s) -> str:
    """A keyed sum's correlation with its factor, '—' where its omega is (a sum of one item: the correlation is the
    square root of the reliability the fixed error variance assumes, and would restate it; review s14)."""
    return _or_dash(s.validity if s.omega == s.omega else float("nan"))


def _or_dash(value: float) -> str:
    """A value below 1 as the tables print it (reporting.numbers.unit), '—' where there is none (NaN)."""
    return "—" if value != value else unit(value)


def _unscored_counts(factors, counts) -> str:
    """The rows without a score of each factor, in one cell: '150 for each factor' when every factor lost the same
    rows, else each factor that lost rows with its count ('g 301')."""
    if len(set(counts)) == 1 and len(factors) > 1:
        return f"{counts[0]} for each factor"
    return ", ".join(f"{f} {c}" for f, c in zip(factors, counts) if c)


def reason_words(result, reason: str) -> str:
    """Why a cell is empty in plain words: the item sums' reason names the share the run used ('answered fewer than
    half of the factor's items'; new user s15: the rule's own jargon); the option that sets it is in the table's
    note (:func:`least_share_sentence`), which a manuscript says without it."""
    not_scored = next((why for why in NotScored if why.reason == reason), None)
    if not_scored is not None:
        return not_scored.words  # a row filter's, a first data row's: the option the user gave needs no repeating
    if reason != Unscored.TOO_FEW_ITEMS_ANSWERED.value or not result.item_sums:
        return reason
    return f"answered fewer than {share_words(result.item_sums[0].rule.least_share)} of the factor's items"


def least_share_sentence(result) -> Note | None:
    """The unscored table's sentence on the least share of its items a row must answer for a factor's item sum and
    mean, with the option that sets it apart (note_parts.Command); None when no row was left empty for it."""
    if not result.item_sums or not any(r == Unscored.TOO_FEW_ITEMS_ANSWERED.value for r, _, _ in result.unscored):
        return None
    share = result.item_sums[0].rule.least_share
    return Note((f"The least share of a factor's items a row must answer for its item sum and mean: "
                 f"{share_words(share)}", Command(f" ({Option.LEAST_ANSWERED.given(share)})"), "."))


def unscored_table(result) -> ReportTable | None:
    """Why cells of the scores file are empty: one row for each reason and method, the method and the rows each
    factor lost in one cell, so that a row of the table stays whole in one table at 80 columns (two columns are
    never split into parts; the data files keep a column for each factor)."""
    if not result.unscored:
        return None
    labels = [METHOD_LABELS.get(next((m for m in ScoreMethod if m.value == method), None), method)
              for _, method, _ in result.unscored]
    rows = [[reason_words(result, reason), f"{label}: {_unscored_counts(result.factors, counts)}"]
            for (reason, _, counts), label in zip(result.unscored, labels)]
    values = [[reason_words(result, reason), label, *counts]
              for (reason, _, counts), label in zip(result.unscored, labels)]
    return _table("unscored", "Rows without scores (empty cells), by reason",
                  [("Reason", "l"), ("Method: rows without a score", "l")], rows,
                  joined(("These rows stay in the file, in their place, with empty cells; a row without any score "
                          f"says why in the column {WHY_NOT_SCORED_COLUMN}.", least_share_sentence(result))),
                  values=(["Reason", "Method", *result.factors], values))


def score_tables(result) -> list[ReportTable]:
    out = []
    for k in range(len(result.quality)):
        out += [t for t in (quality_table(result, k), precision_table(result, k), item_sum_precision_table(result, k),
                            correlation_table(result, k), sum_table(result, k)) if t is not None]
    extra = unscored_table(result)
    if extra is not None:
        out.append(extra)
    return out




def warnings(result) -> list[Text]:
    """What the report says before its tables: the cautions about the rows' scores first (rows in a group the fit
    does not have, rows scored without an answer to a factor's items), then the fit's warnings (said to be about
    the fit when other data are scored)."""
    # the fit's note on reading the fit indices of ordinal items: the scores' report shows none
    fitted = [w for w in result.fit.warnings if w != ORDINAL_NOTE]
    if result.scored_source:
        # the fit's advice named its own options; scoring other data takes none of them (a fit read from its JSON
        # holds its warnings as text, with the option in it)
        option = f" ({Remedy.COMPLETE_ROWS.option})"
        fitted = [ABOUT_THE_FIT + said(w, WORDS).replace(option, "") for w in fitted]
    rare = T.few_answers_warning(result.fit, table=False)  # the fit's sparse categories, as fit says them (hostile s22)
    return list(result.warnings) + _guessed_scales(result) + fitted + ([] if rare is None else [rare])


def _guessed_scales(result) -> list[Text]:
    """The caution for item sums that reverse an item on the lowest and highest answers the fitted rows gave, which
    no statement declares: a scale whose extreme answer nobody gave would shift every sum with that item."""
    from cfa_tool.workflows.factor_scores import ScaleSource

    guessed = {r.item: r for g in result.item_sums for r in g.reversals if r.source is ScaleSource.OBSERVED}
    if not guessed:
        return []
    listed = ", ".join(f"{x} ({user_number(r.lowest)} to {user_number(r.highest)})" for x, r in guessed.items())
    return [Note((f"The item sums and means reverse {listed} on the lowest and highest answers of the rows the model "
                  f"was fitted to, as the model does not declare the answer scale; if the scale runs wider than these "
                  f"answers, every sum with {'this item' if len(guessed) == 1 else 'these items'} is shifted: declare "
                  f"the scale", Command(" with 'reversed ITEM on LOWEST to HIGHEST'"), " in the model file."))]


def scores_report(result):
    """The scores' report as the one report model (cfa_tool.reporting.document.Report): what every view and
    file shows, and what a saved result holds."""
    from cfa_tool.reporting.document import Report, ResultKind

    return Report(ResultKind.SCORES, f"Factor scores: {result.fit.model_name}", scores_notice(result),
                  tuple(header_lines(result)) + tuple(caution_lines(result)), tuple(score_tables(result)),
                  tuple(result.notes) + tuple(item_sum_notes(result)), (SCORES_CAUTION, unit_means_caution(result), HIGH_STAKES_NOTE, flagging_caution(result)),
                  paragraph=scores_paragraph(result), problem_table=scores_problem_table(result),
                  warnings=tuple(warnings(result)))


def scores_notice(result) -> T.ProblemNotice | None:
    """What the scores' report shows first: the fit's problems and the rows scored (workflows.factor_scores), then the
    factors whose scores are less reliable than decisions about individuals usually need (:func:`precision_cautions`):
    scores are made to be read one person at a time, so their precision is a caution first, not a note last (a new
    user scoring staff for feedback found it on the last page); under one heading of the scores' own."""
    notice = T.problem_notice(_with_precision_problems(result))
    if notice is None or notice.inadmissible:
        return notice
    return T.ProblemNotice(SCORES_PRECISION_HEADING, notice.lines, False)


def scores_problem_table(result) -> ReportTable | None:
    """The first box of :func:`scores_notice` as a table for the data files (--tables), by tables.problem_table's one
    layout, under the box's heading (review s14: the precision cautions were missing from problems.csv whenever the
    fit had a problem)."""
    fit = _with_precision_problems(result)
    table = T.problem_table(fit)
    return table if table is None or not fit.admissible else replace(table, title=SCORES_PRECISION_HEADING)


def _with_precision_problems(result):
    """The fit with the scores' precision cautions among its problems (assessment.admissibility.ProblemKind
    .SCORES_LESS_RELIABLE), for the views of the scores' report alone."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    said = tuple(Problem(ProblemKind.SCORES_LESS_RELIABLE, (), None, line,
                         _precision_advice(result))
                 for line in precision_cautions(result))
    pairs = _indistinct_pairs(result)
    said += tuple(Problem(ProblemKind.SCORED_FACTORS_HARDLY_DISTINCT, (), None, line,
                          Note(("compare a model in which they are one factor", Command(" (cfa-tool compare)", runs="compare"),
                                " before handing their scores out as two traits.")))
                  for _, _, _, line in pairs)
    # the fit's own caution on a pair the scores' caution names says it again: the scores' words stand for both
    scored = {(frozenset((a, b)), group) for a, b, group, _ in pairs}
    kept = tuple(p for p in result.fit.problems if not (p.kind is ProblemKind.FACTORS_HARDLY_DISTINCT and any(
        p.touches("factor_covariance", tuple(pair)) and p.group == group
        for pair, group in scored)))
    return replace(result.fit, problems=kept + said) if said else result.fit