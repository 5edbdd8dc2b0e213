"""``cfa-tool report``: turn a saved JSON result (any command's --json file) into the terminal view, HTML,
Markdown, Word or CSV/LaTeX tables later, without fitting again; the result's input is never replaced.  Several
results make one document (reporting.combined): a manuscript's fit, rival model, invariance ladder and exploration
in one Word file, their tables and figures numbered through it."""

from __future__ import annotations

import argparse

from cfa_tool.commands.common import add_diagram_option, add_report_options, check_files, diagram_output, \
    document_files, notice_on_standard_error, picture_resolution, say, show, table_files, write_reports, write_tables
from cfa_tool.errors import OptionError


def add_parser(sub) -> None:
    p = sub.add_parser("report", help="write a saved result (a command's --json file) as HTML, Markdown, Word or "
                                      "tables, without fitting again; several results as one document")
    p.add_argument("result", metavar="RESULT", nargs="+",
                   help="JSON file written by a command's --json option; several make one document, in the order "
                        "given, its tables and figures numbered through it")
    add_report_options(p, json=False)
    add_diagram_option(p)
    p.add_argument("--dpi", type=int, default=None, help="resolution of pictures (PNG diagram, Word figure; default "
                                                         "300); only with --diagram FILE.png, or --docx for a result "
                                                         "with pictures")


def read_result(path: str) -> object:
    """The JSON of a saved result; a one-line error naming the file when it cannot be read as JSON."""
    from cfa_tool.errors import OptionError
    from cfa_tool.input_files import input_json

    return input_json(path, "result file", OptionError)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.errors import OptionError, shown_path
    from cfa_tool.reporting.combined import in_saved_words
    from cfa_tool.reporting.picture import PictureFormat, picture_format, require_converter
    from cfa_tool.reporting.reports import saved_report

    if len(args.result) > 1:
        return run_several(args)
    args.result = args.result[0]
    diagram = picture_format("--diagram", args.diagram) if args.diagram else None
    if diagram is not None:  # the format checked, and a missing converter said, before any work
        require_converter(diagram)
    check_files(args, [], [args.result])  # never the result file itself, never a file the run did not create
    # its views made by 'report': an option it advises said as running its command again (reporting.combined)
    report = in_saved_words(saved_report(read_result(args.result), shown_path(args.result)))
    if diagram is not None and report.diagram is None:
        raise OptionError(diagram_missing(report, args.result))
    picture_resolution(args, (bool(args.docx) and bool(report.figures)) or diagram is PictureFormat.PNG,
                       "give --diagram FILE.png or --docx, or leave --dpi out" if report.diagram is not None else
                       "give --docx, or leave --dpi out" if report.figures else
                       "this result has none to draw; leave --dpi out")
    if args.docx and report.figures:
        from cfa_tool.reporting.picture import png_converter

        if png_converter() is None:  # said before the work, not after
            from cfa_tool.reporting.docx_report import NO_PICTURE

            import sys

            print(f"cfa-tool: note: {NO_PICTURE}", file=sys.stderr)
    files = document_files(args, report, args.dpi) + ([] if diagram is None else diagram_output(args, report.diagram.svg))
    tables = table_files(args, report, [args.result])
    written = write_reports(args, files) + write_tables(args, tables, [args.result])
    show(args, report, written, terminal=not (files or tables))  # its work is the files: the view only without them
    return 0


def run_several(args: argparse.Namespace) -> int:
    """Several saved results as one document (reporting.combined): each read as one is (a file that is not a saved
    result, or of another version, a one-line error naming it), none given twice, no output replacing any of them;
    nothing is written before every check has passed."""
    from pathlib import Path

    from cfa_tool.errors import shown_path
    from cfa_tool.reporting.combined import combined, in_saved_words, notice_view
    from cfa_tool.reporting.reports import saved_report

    paths = list(args.result)
    if args.diagram:
        raise OptionError(f"--diagram writes one fit's path diagram, and {len(paths)} results are given; write it "
                          f"with 'cfa-tool report FIT.json --diagram PATH', one result")
    same_result(paths)
    check_files(args, [], paths)  # never a result file itself, never a file the run did not create
    reports = [(saved_report(read_result(path), shown_path(path)), Path(path).name) for path in paths]
    document = combined(reports)
    figures = any(r.figures for r, _ in reports)
    picture_resolution(args, bool(args.docx) and figures,
                       "give --docx, or leave --dpi out" if figures else "these results have none to draw; leave "
                                                                         "--dpi out")
    if args.docx and figures:
        from cfa_tool.reporting.picture import png_converter

        if png_converter() is None:  # said before the work, not after
            import sys

            from cfa_tool.reporting.docx_report import NO_PICTURE

            print(f"cfa-tool: note: {NO_PICTURE}", file=sys.stderr)
    files = combined_files(args, document)
    tables = combined_table_files(args, document, paths)
    written = write_reports(args, files) + write_tables(args, tables, paths)
    if not (files or tables) and not args._stdout_taken:
        from cfa_tool.commands.common import console
        from cfa_tool.reporting.terminal import problem_panel, render_report

        shown = console()
        if document.notice is not None:
            shown.print(problem_panel(document.notice, notice_view(document, numbers=False)))
            shown.print()
        for report, _ in reports:  # each result's own report in turn, on the terminal, as report's views say it
            render_report(in_saved_words(report), shown)
            shown.print()
    else:
        notice_on_standard_error(document.notice, notice_view(document, numbers=False))
    for line in written:
        say(args, line)
    return 0


def same_result(paths: list[str]) -> None:
    """A result given twice (the same file, by another spelling or a link, or a copy of the same bytes) would be
    reported twice in one document: a one-line error naming both."""
    import os

    from cfa_tool.errors import shown_path

    seen: dict[object, str] = {}
    for path in paths:
        try:
            status = os.stat(path)
            with open(path, "rb") as handle:
                content = handle.read()
        except OSError:
            continue  # the reader of saved results says what is wrong with it
        for key in ((status.st_dev, status.st_ino), content):
            if key in seen:
                raise OptionError(f"{shown_path(path)} is the same result as {shown_path(seen[key])}, given twice; give "
                                  f"each result once")
        seen[(status.st_dev, status.st_ino)] = seen[content] = path


def combined_files(args: argparse.Namespace, document) -> list[tuple[str, object, str]]:
    """(option, content, message) of the HTML, Markdown and Word files asked for, drawn from one document of several
    results (reporting.combined.Combined)."""
    files: list[tuple[str, object, str]] = []
    if args.html:
        from cfa_tool.reporting.html_report import combined_html

        files.append(("--html", combined_html(document), f"HTML report written to {args.html}"))
    if args.markdown:
        from cfa_tool.reporting.text_formats import combined_markdown

        files.append(("--markdown", combined_markdown(document), f"Markdown report written to {args.markdown}"))
    if args.docx:
        from cfa_tool.reporting.docx_report import combined_docx

        files.append(("--docx", combined_docx(document, args.dpi), f"Word report written to {args.docx}"))
    return files


def combined_table_files(args: argparse.Namespace, document, inputs: list[str]) -> dict[str, str]:
    """The --tables files of a document of several results, checked against the folder before anything is written
    (commands.common.table_files)."""
    if not args.tables:
        return {}
    from cfa_tool.output_files import check_table_folder
    from cfa_tool.reporting.text_formats import combined_table_files as table_texts

    files = table_texts(document)
    check_table_folder("--tables", args.tables, files, inputs)
    return files


def diagram_missing(report, path: str) -> str:
    """Why a saved result gives no path diagram file: only a fit draws one, and a fit saved before results kept it
    has it in its HTML report alone."""
    from cfa_tool.errors import shown_path
    from cfa_tool.reporting.document import ResultKind

    if report.kind is ResultKind.FIT:
        return (f"--diagram: {shown_path(path)} was saved before a fit's result kept its path diagram file; run the "
                f"fit again with --diagram, or write the report with --html, which shows the diagram")
    return (f"--diagram: {shown_path(path)} is the result of '{report.kind.value}', which draws no path diagram (a "
            f"fit's result does); leave --diagram out")
