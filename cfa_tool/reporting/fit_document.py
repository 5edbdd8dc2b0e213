"""The report of a fit as the one report model (:class:`~cfa_tool.reporting.document.Report`): the source of
every view of a fit (terminal, notebook, HTML, Markdown, Word, CSV and LaTeX tables) and what a saved fit
result carries so that ``cfa-tool report`` can write any format later."""

from __future__ import annotations

import re
from dataclasses import replace
from functools import cached_property, partial

from cfa_tool.numbers import count_text
from cfa_tool.note_parts import joined
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.document import Figure, Listing, Report, ResultKind, in_section
from cfa_tool.reporting.paragraph import group_words, methods_paragraph
from cfa_tool.reporting.tables import HIGH_STAKES_NOTE, ReportTable

NOT_CONVERGED = "The estimation did not converge: nothing in this report is a result."


def fit_tables(result) -> list[ReportTable]:
    """Every table of a fit in the order of every view, each with the heading of its section: the missing answers
    (a caution about the data, first), the fit (with the normality tests and the local fit in its note), the
    estimates of each group, the local fit, the modification indices and the data."""
    out = in_section("", [T.missing_table(result)])  # a caution about the data: before the results
    if result.fit is not None and result.converged:
        fit = T.fit_table(result)
        extra = [*T.normality_lines(result), T.local_fit_line(result)]
        fit = replace(fit, note=joined([fit.note, *extra]))
        out += in_section("Fit", [fit, T.group_table(result) if result.multigroup else None])
    for g, group in enumerate(result.groups):
        heading = "Estimates" + (f", group {group_words(result, g)} (N = {count_text(group.data.n_obs)})"
                                 if result.multigroup else "")
        out += in_section(heading, of_group(result, g, [*T.estimate_tables(result, g), T.reliability_table(result, g),
                             T.sum_score_table(result, g), T.distinct_table(result, g), T.case_table(result, g)]))
    for g in range(len(result.groups)):
        heading = "Local fit" + (f", group {group_words(result, g)}" if result.multigroup else "")
        out += in_section(heading, of_group(result, g, [T.residual_table(result, g)]))
    if result.multigroup:  # each group's under its own heading, as its local fit
        for g in range(len(result.groups)):
            out += in_section(f"Modification indices, group {group_words(result, g)}",
                              of_group(result, g, [T.modification_table(result, g)]))
    else:
        out += in_section("Modification indices", [T.modification_table(result)])
    data = [T.item_table(result), T.category_table(result)]  # the answers per category: one table, every group in it
    for g in range(len(result.groups)):
        data += of_group(result, g, [T.correlation_table(result, g)])
    out += in_section("Data", data + T.label_tables(result))
    return out


def of_group(result, g: int, tables) -> list[ReportTable]:
    """Group ``g``'s tables of a multi-group fit with the group in each title (a Word or HTML table is read, cited
    and numbered on its own, away from its section's heading); one group's tables as they are."""
    tables = [t for t in tables if t is not None]
    if not result.multigroup:
        return tables
    label = group_words(result, g)
    named = re.compile(rf"\bgroup {re.escape(label)}(?=$|[ ,;:)?])")

    def titled(title: str) -> str:
        if named.search(title):  # the title names its group already
            return title
        return f"{title}, group {label}"

    return [replace(t, title=titled(t.title)) for t in tables]


class _Drawings:
    """A fit's path diagram (reporting.diagram.PathDrawings), drawn once when a view or the JSON first asks for it:
    the figures of the report, the file of ``--diagram`` and the saved result all take it from here."""

    def __init__(self, result) -> None:
        self.result = result

    @cached_property
    def drawn(self):
        from cfa_tool.reporting.diagram import PathDrawings

        return PathDrawings.of(self.result)

    def figure(self, k: int) -> tuple[str, str]:
        return self.drawn.figure(k)

    def file(self) -> tuple[str, str]:
        return self.drawn.file(), ""

    def to_dict(self) -> dict:
        return self.drawn.to_dict()


def fit_report(result) -> Report:
    """The report of the fit ``result``: the problems first; the model, the data and the estimation, with the
    cautions about the data right under them; the methods paragraph, the path diagrams, the tables, the model
    as written and the cautions."""
    d = result.data
    lines = (f"Model file: {result.model_source}", f"Data: {d.source}; {T.rows_phrase(d, getattr(result, 'design', None))}", T.status_line(result))
    few = T.few_answers_warning(result)  # categories of ordinal items given by few rows: first, with the table named
    warnings = (tuple(result.warnings) + (() if few is None else (few,)) + T.higher_order_cautions(result)
                + (() if result.converged else (NOT_CONVERGED,)))
    drawings = _Drawings(result)
    figures = tuple(Figure("Path diagram of the fitted model" + ("" if g.label is None else
                                                                 f", group {group_words(result, k)}")
                           + " (standardized values)", partial(drawings.figure, k))
                    for k, g in enumerate(result.groups))
    left_out = T.matrices_left_out(result)
    return Report(ResultKind.FIT, result.model_name, T.problem_notice(result), lines, tuple(fit_tables(result)),
                  () if left_out is None else (left_out,), (HIGH_STAKES_NOTE,), methods_paragraph(result), figures, T.problem_table(result), warnings,
                  (Listing("Model", result.model_text),), diagram=Figure("Path diagram", drawings.file), drawings=drawings)
