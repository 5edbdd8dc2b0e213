"""Markdown report, and tables as CSV and LaTeX (booktabs) for journals."""

from __future__ import annotations

import base64
import csv
import io
import re

import numpy as np

from cfa_tool.data.csv_convention import PLAIN, CsvConvention
from cfa_tool.note_parts import RUNNING, WORDS, View, said, titled
from cfa_tool.numerics.plain import csv_cell
from cfa_tool.output_files import TABLE_CONTENTS
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.escape import latex_text, markdown_text
from cfa_tool.reporting.document import PARAGRAPH_HEADING, WARNINGS, by_file_name
from cfa_tool.reporting.tables import ReportTable


def markdown_table(table: ReportTable, view: View = RUNNING) -> str:
    def cell(text: str) -> str:
        spaces, words = T.indented(text)  # as no-break spaces: a Markdown table's cells lose plain ones
        return "\u00a0" * spaces + markdown_text(words) if text else ""

    lines = [f"**{markdown_text(table.title)}**", "",
             "| " + " | ".join(cell(c) or " " for c in table.columns) + " |",
             "| " + " | ".join("---:" if a == "r" else "---" for a in table.align) + " |"]
    faint = set(table.faint)  # shown in italics, Markdown's nearest to faint (the note says faintly)
    lines += ["| " + " | ".join(f"*{cell(v)}*" if (k, j) in faint and v else cell(v) for j, v in enumerate(row)) + " |"
              for k, row in enumerate(table.rows)]
    if table.note:
        lines += ["", f"*{markdown_text(said(table.note, view))}*"]
    return "\n".join(lines) + "\n"


def _csv_number(value, convention: CsvConvention = PLAIN) -> str:
    """A number as a data file holds it: full precision in the convention's decimal mark, a missing value empty."""
    if value is None:
        return ""
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    if isinstance(value, (float, np.floating)):
        return "" if not np.isfinite(value) else convention.number(repr(float(value)))
    return _csv_text(value, convention)


def _csv_text(value, convention: CsvConvention) -> str:
    """A cell of text guarded against spreadsheet formulas; a cell that is a number written with a decimal point
    ('0.52', '-1.3') in the convention's decimal mark, so that a spreadsheet of decimal commas reads it as a number."""
    text = csv_cell(value)
    if convention.decimal == "," and _DECIMAL.fullmatch(text):
        return convention.number(text)
    return text


_DECIMAL = re.compile(r"[-−]?\d*\.\d+")  # a number with a decimal point and no thousands separator


def csv_table(table: ReportTable, convention: CsvConvention = PLAIN) -> str:
    """A table as CSV: numbers as numbers (the table's values when it has them: p-values and interval ends in
    their own columns), text guarded against spreadsheet formulas; written in ``convention``, the data file's
    (data.csv_convention: its separator and decimal mark)."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, delimiter=convention.separator, lineterminator="\n")
    if table.values is not None:
        writer.writerow([csv_cell(c) for c in table.value_columns])
        writer.writerows([_csv_number(v, convention) for v in row] for row in table.values)
    else:
        writer.writerow([csv_cell(c) for c in table.columns])
        writer.writerows([_csv_text(v, convention) for v in row] for row in table.rows)
    return buffer.getvalue()


LATEX_LONG_TEXT = 40  # a text column with a longer cell wraps in a column of fixed width (p{...}) instead of running off
LATEX_TEXT_SHARE = 0.5  # of the line's width, shared by the wrapping columns, less beside many number columns
LATEX_NUMBER_SHARE = 0.05  # of the line's width, taken by a number column


def latex_spec(table: ReportTable) -> str:
    """The columns of a LaTeX tabular: numbers right-aligned, short text left-aligned, long text (such as items
    named by their full question) wrapping in columns that share half the line's width, or what the number
    columns leave of it (a fifth at least)."""
    long = [j for j, a in enumerate(table.align) if a == "l"
            and max([len(table.columns[j]), *(len(row[j]) for row in table.rows)]) > LATEX_LONG_TEXT]
    room = min(LATEX_TEXT_SHARE, max(0.2, 0.95 - LATEX_NUMBER_SHARE * table.align.count("r")))
    share = f"{room / len(long):.3g}" if long else ""
    return "".join("r" if a == "r" else f"p{{{share}\\linewidth}}" if j in long else "l"
                   for j, a in enumerate(table.align))


def latex_table(table: ReportTable, view: View = WORDS) -> str:
    """A table for a manuscript (booktabs): its note's advice without the command that takes it."""
    spec = latex_spec(table)
    lines = [
        "\\begin{table}[ht]", "\\centering", f"\\caption{{{latex_text(table.title)}}}",
        f"\\begin{{tabular}}{{{spec}}}", "\\toprule",
        " & ".join(latex_text(c) for c in table.columns) + " \\\\", "\\midrule",
    ]
    lines += [" & ".join(latex_text(v) for v in row) + " \\\\" for row in table.rows]
    lines += ["\\bottomrule", "\\end{tabular}"]
    if table.note:
        lines.append(f"\\par\\small {latex_text(said(table.note, view))}")
    lines.append("\\end{table}")
    return "\n".join(lines) + "\n"


def notice_table(notice: T.ProblemNotice, view: View = RUNNING) -> ReportTable:
    """The problems that every view shows first, as a table for data files (where no notice can go)."""
    return ReportTable("problems", notice.heading, ("Problem",), ("l",), tuple((said(line, view),) for line in notice.lines))


def report_markdown(report) -> str:
    """Any command's report (cfa_tool.reporting.document.Report) as Markdown: the problems first.  A note's advice
    names its command (the reader runs the program), and a table it refers to is named by its title
    (cfa_tool.note_parts); the user's files by their names, not their folders (document.by_file_name)."""
    report = by_file_name(report)
    view = titled(report.tables, running=report.kind.value)  # its own command not advised in it
    parts = _markdown_notice(report.notice, view) + [f"# {markdown_text(report.title)}", ""]
    return "\n".join(parts + _markdown_body(report, view) + _markdown_cautions(report.cautions, view))


def combined_markdown(document) -> str:
    """A document of several results (reporting.combined.Combined) as Markdown: the "Read first" notice, the title
    and what the results read, each result under its heading (its own problems first), the cautions once."""
    from cfa_tool.reporting.combined import figure_numbers, notice_view, numbered_part, table_numbers

    whole = notice_view(document, numbers=True, commands=True)  # the tables numbered through, as in Word
    parts = _markdown_notice(document.notice, whole) + [f"# {markdown_text(document.title)}", ""]
    parts += [markdown_text(said(line, whole)) + "  " for line in document.lines] + ([""] if document.lines else [])
    for part, first_table, first_figure in zip(document.parts, table_numbers(document), figure_numbers(document)):
        report, view = numbered_part(part.report, first_table, first_figure)
        parts += [f"## {markdown_text(part.heading)}", ""] + _markdown_notice(report.notice, view, 3)
        parts += _markdown_body(report, view, 3)
    return "\n".join(parts + _markdown_cautions(document.cautions, whole))


def _markdown_notice(notice, view: View = RUNNING, level: int = 2) -> list[str]:
    if notice is None:
        return []
    return [f"{'#' * level} {markdown_text(notice.heading)}", ""] + [f"- {markdown_text(said(line, view))}"
                                                                     for line in notice.lines] + [""]


def _markdown_cautions(cautions, view: View = RUNNING) -> list[str]:
    if not cautions:
        return []
    return ["## Cautions", ""] + [markdown_text(said(c, view)) + "\n" for c in cautions]


def _markdown_body(report, view: View, level: int = 2) -> list[str]:
    """A report after its problems and title: what was done, the warnings, the methods paragraph, the figures, the
    tables, the listings and the notes, under headings of ``level``."""
    heading = "#" * level
    parts = []
    if report.lines:
        parts += [markdown_text(said(line, view)) + "  " for line in report.lines] + [""]
    if report.warnings:
        parts += [f"**{WARNINGS}**", ""] + [f"- {markdown_text(said(w, view))}" for w in report.warnings] + [""]
    if report.paragraph:
        parts += [f"{heading} {PARAGRAPH_HEADING}", "", markdown_text(report.paragraph), ""]
    for figure in report.figures:  # an image of its SVG (a data address): nothing in it can run
        data = base64.b64encode(figure.svg.encode("utf-8")).decode("ascii")
        parts += [f"**{markdown_text(figure.title)}**", "", f"![{markdown_text(figure.title)}](data:image/svg+xml;base64,"
                  f"{data})", ""] + ([f"*{markdown_text(figure.note)}*", ""] if figure.note else [])
    section = ""
    for table in report.tables:
        if table.section and table.section != section:
            parts += [f"{heading} {markdown_text(table.section)}", ""]
        section = table.section
        parts.append(markdown_table(table, view))
    for listing in report.listings:  # escaped line by line (a code block would pass markup to lenient readers)
        lines = [markdown_text(line) if line.strip() else "" for line in listing.text.rstrip("\n").split("\n")]
        parts += [f"{heading} {markdown_text(listing.title)}", "", "  \n".join(lines).replace("  \n  \n", "\n\n"), ""]
    if report.notes:
        parts += [f"{heading} Notes", ""] + [f"- {markdown_text(said(w, view))}" for w in report.notes] + [""]
    return parts


def report_table_files(report, convention: CsvConvention = PLAIN) -> dict[str, str]:
    """Every table of a report as CSV and LaTeX, file name -> text; the problems first.  The tables go
    into manuscripts and to colleagues: the user's files by their names, not their folders (document.by_file_name).
    The CSV files are written in ``convention``, that of the data file the result read (data.csv_convention: its
    separator, decimal mark and byte-order mark, the one rule of every CSV file the tool writes)."""
    report = by_file_name(report)
    problems = report.problem_table or (notice_table(report.notice) if report.notice is not None else None)
    tables = ([problems] if problems is not None else []) + list(report.tables)
    files = {}
    manuscript = titled(tables, commands=False)  # a LaTeX table goes into a manuscript: advice without commands
    for table in tables:
        files[f"{table.key}.csv"] = convention.file_text(csv_table(table, convention))
        files[f"{table.key}.tex"] = latex_table(table, manuscript)
    # which table is in which file, and of what report (hostile trial s11: the CSV files carry no title, and tables
    # of two models in one folder could not be told apart)
    files[TABLE_CONTENTS] = "\n".join([report.title, *map(said, report.lines), ""] + [
        f"{table.key}.csv, {table.key}.tex: {table.title}" for table in tables]
        + ([f"The CSV files: {convention.said()}."] if not convention.plain() else [])) + "\n"
    return files


#: the file of a --tables folder that lists its tables with their titles and the report they belong to


def combined_table_files(document) -> dict[str, str]:
    """Every table of a document of several results (reporting.combined.Combined) as CSV and LaTeX, file name ->
    text: each result's tables as its own report writes them (report_table_files, in the convention of the data it
    read), their names starting with the result's number ('result2-model_fit.csv'), the "Read first" problems
    first; one contents file names each result and its tables."""
    from cfa_tool.reporting.combined import folder_convention, notice_view

    files: dict[str, str] = {}
    contents: list[str] = []
    convention, said_convention = folder_convention(document)  # one for the folder, said once
    if document.notice is not None:
        problems = notice_table(document.notice, notice_view(document, numbers=False))
        files["read_first.csv"] = convention.file_text(csv_table(problems, convention))
        files["read_first.tex"] = latex_table(problems)
        contents += [f"read_first.csv, read_first.tex: {document.notice.heading}", ""]
    for part in document.parts:
        own = report_table_files(part.report, convention)
        prefix = f"result{part.number}-"
        listed = [line for line in own.pop(TABLE_CONTENTS).rstrip("\n").split("\n")
                  if not line.startswith("The CSV files:")]
        files.update({prefix + name: text for name, text in own.items()})
        contents += [part.heading] + [re.sub(r"^([\w.-]+\.csv), ([\w.-]+\.tex):", rf"{prefix}\1, {prefix}\2:", line)
                                      for line in listed[1:]] + [""]
    files[TABLE_CONTENTS] = "\n".join(contents + ([said_convention, ""] if said_convention else []))
    return files
