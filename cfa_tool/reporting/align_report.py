"""The report of an alignment run (cfa_tool.workflows.alignment): the shared report tables (ReportTable),
drawn in the terminal, HTML and Markdown.  Problems of the configural solution and the cautions come first."""

from __future__ import annotations

from cfa_tool.data.groups import reference_words
from cfa_tool.language.names import written_group
from cfa_tool.note_parts import Command, Note, Text, capitalised, said
from cfa_tool.options import Option
from cfa_tool.reporting import tables as T
from cfa_tool.numbers import count_text
from cfa_tool.reporting.numbers import est_num, num, p_phrase, unit
from cfa_tool.reporting.tables import GUIDE_NOTE, HIGH_STAKES_NOTE, ReportTable, _table

ALIGNMENT_CAUTION = (
    "Aligned means compare groups under approximate invariance: they are the means that make the loadings and "
    "intercepts as alike across groups as the simplicity loss allows, not means under tested scalar invariance. The "
    "25% share and the .98 correlation are the method's authors' rules of thumb, not tests.")


#: what closes every view of the report
CLOSING_CAUTIONS = (ALIGNMENT_CAUTION, GUIDE_NOTE, HIGH_STAKES_NOTE)


def _reference(result) -> Text:
    """The reference group and why it is (data.groups.reference_words)."""
    if result.reference_rule is None:
        return written_group(result.reference_group, result.groups)
    return reference_words(result.reference_group, result.reference_rule, result.groups)


def title(result) -> str:
    return f"Alignment across {result.group_column}: {result.configural.model_name}"


def _percent(share: float) -> str:
    return f"{100 * share:.0f}%"


def header_lines(result) -> list[str]:
    from cfa_tool.workflows.alignment import EPSILON, STANDARD_ERRORS

    fit = result.configural
    total = sum(result.sizes)
    lines = [f"Model file: {fit.model_source}",
             f"Data: {fit.data.source}; {count_text(total)} rows in {len(result.groups)} groups of {result.group_column} "
             f"(smallest {count_text(min(result.sizes))}, largest {count_text(max(result.sizes))})"
             + (f", {T.selection_phrase(fit.data)}" if fit.data.row_filters else ""),
             "Reference group: " + _reference(result) + f"; {result.reference_mean.phrase}",
             f"Configural model (every factor's mean 0 and variance 1 in every group), {fit.estimator}: {_fit_words(fit)}",
             f"Alignment (Asparouhov & Muthén 2014): total simplicity loss f(x) = \u221a\u221a(x\u00b2 + {EPSILON:g}) over "
             f"every pair of groups, weighted by \u221a(N1 N2), for every loading and intercept",
             f"Standard errors: {STANDARD_ERRORS}",
             f"Non-invariant loadings and intercepts: {_percent(result.noninvariant_share)} of all, flagged at level "
             f"{unit(result.flag_level, 3)}"]
    return lines


def _fit_words(fit) -> str:
    f = fit.fit
    if f is None:
        return "no fit statistics"
    return (f"chi-square {f.chi_square:.2f} (df {f.df}), p {p_phrase(f.p_value)}, CFI {unit(f.cfi)}, RMSEA {unit(f.rmsea)}, "
            f"SRMR {unit(f.srmr)}")


def caution_lines(result) -> list[Text]:
    few = few_groups_line(result)
    return [capitalised(w) + "." for w in result.warnings] + ([few] if few is not None else [])


def few_groups_line(result) -> Note | None:
    """What alignment over few groups can and cannot show (new-user trial s24: three language versions, whose Monte
    Carlo check gave correlations of three means, .002 to .94, as trust figures): the method was made for many
    groups, where a search for partially invariant parameters group by group is impractical (Asparouhov & Muthén
    2014), and over G groups the check's correlation of true and estimated means rests on G pairs, which reach the
    authors' .98 by chance alone with a probability (workflows.alignment.chance_trusted) at or above
    FEW_GROUPS_CHANCE for 3 to 5 groups.  None for more groups, or where the check was not run and two groups
    leave no correlation to read (the check table's note says so)."""
    from cfa_tool.workflows.alignment import FEW_GROUPS_CHANCE, TRUSTED_CORRELATION, chance_trusted

    groups = len(result.groups)
    if groups < 2 or (groups >= 3 and chance_trusted(groups) < FEW_GROUPS_CHANCE):
        return None
    text = (f"Only {groups} groups: the alignment method was made for comparing many groups, where a search for "
            f"partially invariant loadings and intercepts group by group is impractical (Asparouhov & Muthén 2014); "
            f"with {groups} groups that search is practical, and its score tests say which parameters differ")
    if result.check is None or groups < 3:
        return Note((text, Command(f" (the invariance ladder with {Option.PARTIAL.given('auto')})"), "."))
    chance = chance_trusted(groups)
    share = f"{100 * chance:.0f}%" if chance >= 0.01 else f"{100 * chance:.1f}%"
    return Note((text, Command(f" (the invariance ladder with {Option.PARTIAL.given('auto')})"),
                 f". The Monte Carlo check's correlations are each over {groups} pairs of true and estimated means: they "
                 f"say whether the order and spacing of {groups} means is recovered, no more; {groups} means unrelated "
                 f"to the true ones reach the {unit(TRUSTED_CORRELATION, 2)} asked for in {share} of draws by chance "
                 f"alone (the distribution of a correlation of {groups} pairs, Fisher 1915), and a low correlation may "
                 f"only mean that the true means hardly differ. Its root mean square error of the means says how far "
                 f"they miss."))


#: the heading of the box of the alignment's cautions, first in every view (the one report model's rule: a problem
#: with a solution comes before the title), when the configural solution itself has none that makes it inadmissible
ALIGNED_CAUTION = "Check before comparing these aligned means"


def alignment_notice(result) -> T.ProblemNotice | None:
    """What every view shows first: the configural solution's problems (tables.problem_notice, under its heading when
    they make it inadmissible), then the alignment's cautions (workflows.alignment: a loss without a minimum, much
    non-invariance, a Monte Carlo check below the authors' correlation); None when there are none (new-user trial
    s19: the cautions stood inside the header, after the model, data and fit lines)."""
    configural = T.problem_notice(result.configural)
    cautions = tuple(caution_lines(result))
    if configural is None and not cautions:
        return None
    lines = (configural.lines if configural is not None else ()) + cautions
    inadmissible = configural is not None and configural.inadmissible
    return T.ProblemNotice(configural.heading if inadmissible else ALIGNED_CAUTION, lines, inadmissible)


def alignment_problem_table(result) -> ReportTable | None:
    """:func:`alignment_notice` as a table for data files: the configural solution's problems
    (tables.problem_table), then a row for each of the alignment's cautions (without configural problems, the
    notice's own table, text_formats.notice_table)."""
    table = T.problem_table(result.configural)
    cautions = caution_lines(result)
    if table is None or not cautions:
        return table
    kind = "caution about the aligned means"
    rows = list(table.rows) + [[kind, "no", "", "", "", said(c), ""] for c in cautions]
    values = list(table.values) + [[kind, "no", "", None, "", said(c), ""] for c in cautions]
    return _table(table.key, alignment_notice(result).heading, list(zip(table.columns, table.align)), rows,
                  values=(list(table.value_columns), values))


def _order_doubts(result, k: int) -> list[str]:
    """Why the order of factor k's aligned means may not hold, in the words of the caution that says it first."""
    from cfa_tool.workflows.alignment import CAUTION_SHARE

    factor = result.factors[k]
    found = []
    if not factor.converged:
        found.append("the alignment did not reach a minimum of its loss")
    if factor.noninvariant_share > CAUTION_SHARE:
        found.append(f"more than {_percent(CAUTION_SHARE)} of its loadings and intercepts are non-invariant")
    if result.check is not None:
        check = next((c for c in result.check.factors if c.factor == factor.factor), None)
        if check is not None and check.trusted is False:
            found.append(f"in the Monte Carlo check its aligned means correlate {unit(check.mean_correlation)} with the "
                         f"true ones")
    return found


def means_table(result, k: int) -> ReportTable:
    from cfa_tool.method import ReferenceMean

    factor = result.factors[k]
    shares = dict(result.group_shares(factor.factor))
    rows = [[g.group, count_text(g.rows), est_num(g.mean), est_num(g.mean_se), est_num(g.variance), est_num(g.variance_se),
             _percent(shares[g.group])] for g in factor.groups]
    ranked = sorted(factor.groups, key=lambda g: -g.mean)
    doubts = _order_doubts(result, k)
    order = (f" (an order that may not hold: {'; '.join(doubts)}; see the caution first)" if doubts else "")
    note = (f"Groups in the order of their labels, the reference group first. Highest mean: {ranked[0].group}; lowest: "
            f"{ranked[-1].group}{order}. The reference group's "
            + ("mean and variance are fixed (no standard error)." if result.reference_mean is ReferenceMean.ZERO
               else "variance is fixed at 1 (no standard error).")
            + f" Non-invariant: the group's share of flagged loadings and intercepts of {factor.factor}'s items"
            + (" (with two groups a flagged parameter differs between them, so it counts in both)."
               if len(result.groups) == 2 else "."))
    values = (["group", "rows", "mean", "mean_se", "variance", "variance_se", "noninvariant_share"],
              [[g.group, g.rows, g.mean, g.mean_se, g.variance, g.variance_se, shares[g.group]] for g in factor.groups])
    return _table(f"aligned_means_{k}", f"Aligned factor means and variances of {factor.factor}",
                  [("Group", "l"), ("Rows", "r"), ("Mean", "r"), ("SE", "r"), ("Variance", "r"), ("SE", "r"),
                   ("Non-invariant", "r")], rows, note, values=values)


def item_table(result, k: int) -> ReportTable:
    from cfa_tool.workflows.alignment import CAUTION_SHARE

    factor = result.factors[k]
    by_item = {(p.item, p.kind): p for p in factor.invariance}
    shares = {(f, i): s for f, i, s in result.item_shares()}
    rows, flagged, numbers = [], [], []
    for n, item in enumerate(factor.items):
        loading, intercept = by_item[(item, "loading")], by_item[(item, "intercept")]
        share = shares[(factor.factor, item)]
        high = share > CAUTION_SHARE
        differs = [_groups(result, loading.noninvariant_groups), _groups(result, intercept.noninvariant_groups)]
        rows.append([item, _percent(share) + (f" {HIGH_MARK}" if high else ""), est_num(loading.value),
                     est_num(intercept.value), *differs])
        numbers.append([item, share, loading.value, intercept.value, *differs])  # the files' figures as computed
        if high:
            flagged.append(n)
    two = len(result.groups) == 2
    columns = [("Item", "l"), ("Share", "r"), ("Loading", "r"), ("Intercept", "r"),
               ("Loading differs" if two else "Loading differs in", "l"),
               ("Intercept differs" if two else "Intercept differs in", "l")]
    return _table(f"noninvariance_{k}", f"Non-invariant loadings and intercepts of {factor.factor}, by item", columns,
                  rows,
                  "Share: the item's share of non-invariant values over groups and both parameters"
                  + (" (with two groups a flagged parameter differs between them, so it counts in both)" if two else "")
                  + f"; a share above {_percent(CAUTION_SHARE)} is marked {HIGH_MARK}. Loading and Intercept: the "
                  "average aligned value in the groups where the parameter is invariant. "
                  + ("Differs: whether the two groups' values differ" if two else "Differs in: the groups flagged")
                  + ", by pairwise Wald tests and tests against the invariant groups' average (after Asparouhov & "
                  "Muthén 2014).", flagged=tuple(flagged),
                  values=(["Item", "Share (proportion)", *(c for c, _ in columns[2:])], numbers))


#: the mark of an item whose share of non-invariant values is above the method's authors' rule of thumb (25%)
HIGH_MARK = "(high)"


def _groups(result, names: tuple[str, ...]) -> str:
    """The groups a parameter was flagged in; with two groups, that the two differ (neither is the one that does)."""
    if len(result.groups) == 2:
        return f"between {result.groups[0]} and {result.groups[1]}" if names else "no"
    return ", ".join(names) if names else "none"


#: the width every table of the report keeps to (a terminal's 80 columns)
WIDTH = 80


def item_chunks(result, items: tuple[str, ...]) -> list[tuple[str, ...]]:
    """The items in runs narrow enough that a table of groups by items keeps to :data:`WIDTH` columns (a value such as
    '3.643 *' and each column's two spaces of padding; the group column as wide as the longest label, up to 20)."""
    budget = WIDTH - min(max(len(g) for g in result.groups), 20) - 2
    chunks: list[tuple[str, ...]] = [()]
    used = 0
    for item in items:
        width = max(len(item), 7) + 2
        if chunks[-1] and used + width > budget:
            chunks.append(())
            used = 0
        chunks[-1] += (item,)
        used += width
    return chunks


def parameter_tables(result, k: int, kind: str) -> list[ReportTable]:
    """The aligned loadings (or intercepts) of factor k, groups by items, in as many tables as the width needs."""
    factor = result.factors[k]
    values = {(p.group, p.item): p for p in factor.parameters if p.kind == kind}
    word = "loadings" if kind == "loading" else "intercepts"
    chunks = item_chunks(result, factor.items)
    out = []
    for n, items in enumerate(chunks):
        rows = [[g] + [est_num(values[(g, item)].aligned) + ("" if values[(g, item)].invariant else " *") for item in items]
                for g in result.groups]
        data = (["group", "item", "configural", "aligned", "se", "invariant"],
                [[g, item, values[(g, item)].configural, values[(g, item)].aligned, values[(g, item)].se,
                  values[(g, item)].invariant] for g in result.groups for item in items])
        which = f", items {items[0]} to {items[-1]}" if len(chunks) > 1 and len(items) > 1 else \
            f", item {items[0]}" if len(chunks) > 1 else ""
        out.append(_table(f"aligned_{word}_{k}" + (f"_{n + 1}" if len(chunks) > 1 else ""),
                          f"Aligned {word} of {factor.factor}{which}", [("Group", "l")] + [(item, "r") for item in items],
                          rows, f"* flagged as non-invariant. The standard errors and the configural {word} are in the "
                                f"JSON result.", values=data))
    return out


def check_table(result) -> ReportTable | None:
    from cfa_tool.workflows.alignment import TRUSTED_CORRELATION

    check = result.check
    if check is None:
        return None
    trusted = {True: "yes", False: "no", None: ""}
    rows = [[c.factor, unit(c.mean_correlation), unit(c.lowest_mean_correlation), unit(c.variance_correlation),
             unit(c.lowest_variance_correlation), num(c.mean_error), trusted[c.trusted]] for c in check.factors]
    numbers = [[c.factor, c.mean_correlation, c.lowest_mean_correlation, c.variance_correlation,
                c.lowest_variance_correlation, c.mean_error, trusted[c.trusted]] for c in check.factors]
    columns = [("Factor", "l"), ("Means r", "r"), ("Lowest means r", "r"), ("Variances r", "r"),
               ("Lowest variances r", "r"), ("RMSE of means", "r"), (f"r >= {unit(TRUSTED_CORRELATION, 2)}", "l")]
    return _table("trust_check", "Monte Carlo check of the aligned means",
                  [c if c[0] not in ("Lowest means r", "Lowest variances r") else ("lowest", "r") for c in columns],
                  rows,
                  f"{check.completed} of {check.trials} simulated data sets (seed {check.seed}), each group's rows drawn "
                  f"from the aligned solution with the group's size (complete rows, normal), refitted and realigned: the "
                  f"correlation over groups "
                  f"of the true and the estimated means and variances (average over data sets, and the lowest). The "
                  f"method's authors ask for a correlation of means of about {unit(TRUSTED_CORRELATION, 2)} or more (a "
                  f"rule of thumb)." + (" With fewer than three groups a correlation over groups is not defined."
                                         if len(result.groups) < 3 else ""),
                  flagged=tuple(n for n, c in enumerate(check.factors) if c.trusted is False),
                  values=([c for c, _ in columns], numbers))


def group_table(result) -> ReportTable:
    from cfa_tool.workflows.alignment import CAUTION_SHARE

    rows = [[g, _percent(s)] for g, s in result.group_shares()]
    return _table("noninvariance_by_group", "Share of non-invariant loadings and intercepts, by group",
                  [("Group", "l"), ("Non-invariant", "r")], rows,
                  "Over every item of every factor." + (" With two groups a flagged parameter differs between them, "
                                                       "so it counts in both." if len(result.groups) == 2 else ""),
                  flagged=tuple(n for n, (_, s) in enumerate(result.group_shares())
                                                                    if s > CAUTION_SHARE),
                  values=(["Group", "Non-invariant (proportion)"], [[g, s] for g, s in result.group_shares()]))


def alignment_tables(result) -> list[ReportTable]:
    out = []
    for k in range(len(result.factors)):
        out += [means_table(result, k), item_table(result, k)]
    if len(result.factors) > 1:
        out.append(group_table(result))
    check = check_table(result)
    if check is not None:
        out.append(check)
    for k in range(len(result.factors)):
        out += parameter_tables(result, k, "loading") + parameter_tables(result, k, "intercept")
    return out


def notes(result) -> list[Text]:
    out = [capitalised(n) + "." for n in result.notes] + list(result.configural.warnings)
    if result.check is None:
        out.append("The Monte Carlo check of the aligned means was not run (0 trials).")
    return out


def alignment_report(result):
    """The alignment's report as the one report model (cfa_tool.reporting.document.Report): what every view and
    file shows, and what a saved result holds."""
    from cfa_tool.reporting.document import Report, ResultKind

    return Report(ResultKind.ALIGN, title(result), alignment_notice(result), tuple(header_lines(result)),
                  tuple(alignment_tables(result)), tuple(notes(result)), CLOSING_CAUTIONS,
                  problem_table=alignment_problem_table(result))
