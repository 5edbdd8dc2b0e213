"""``cfa-tool report``: turn a saved JSON result (any command's --json file) into the terminal view, HTML,
Markdown, Word or CSV/LaTeX tables later, without fitting again; the result's input is never replaced."""

from __future__ import annotations

import argparse

from cfa_tool.commands.common import add_diagram_option, add_report_options, check_files, diagram_output, \
    document_files, picture_resolution, show, table_files, write_reports, write_tables


def add_parser(sub) -> None:
    p = sub.add_parser("report", help="write a saved result (a command's --json file) as HTML, Markdown, Word or "
                                      "tables, without fitting again")
    p.add_argument("result", metavar="RESULT", help="JSON file written by a command's --json option")
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
    from cfa_tool.reporting.picture import PictureFormat, picture_format, require_converter
    from cfa_tool.reporting.reports import saved_report

    diagram = picture_format("--diagram", args.diagram) if args.diagram else None
    if diagram is not None:  # the format checked, and a missing converter said, before any work
        require_converter(diagram)
    check_files(args, [], [args.result])  # never the result file itself, never a file the run did not create
    report = saved_report(read_result(args.result), shown_path(args.result))
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
