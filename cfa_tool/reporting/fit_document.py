"""The report of a fit as the one report model (:class:`~cfa_tool.reporting.document.Report`): what a saved
fit result carries so that ``cfa-tool report`` can write any format later."""

from __future__ import annotations

from cfa_tool.reporting import tables as T
from cfa_tool.reporting.diagram import LEGEND, path_diagram
from cfa_tool.reporting.document import Figure, Report, ResultKind
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import GUIDE_NOTE, HIGH_STAKES_NOTE
from cfa_tool.reporting.text_formats import all_tables


def fit_report(result) -> Report:
    d = result.data
    lines = (f"Model file: {result.model_source}", f"Data: {d.source}; {T.rows_phrase(d)}",
             T.status_line(result))
    notes = list(T.normality_lines(result))
    local = T.local_fit_line(result)
    if local:
        notes.append(local)
    notes += list(result.warnings)
    figures = tuple(Figure("Path diagram of the fitted model" + ("" if g.label is None else f", group {g.label}")
                           + " (standardized values)", path_diagram(result, k),
                           LEGEND + (" Elements in red show a problem of the solution." if result.problems else ""))
                    for k, g in enumerate(result.groups))
    return Report(ResultKind.FIT, result.model_name, T.problem_notice(result), lines, tuple(all_tables(result)),
                  tuple(notes), (GUIDE_NOTE, HIGH_STAKES_NOTE), methods_paragraph(result), figures,
                  T.problem_table(result))
