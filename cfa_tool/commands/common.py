"""What the commands of this package share: checking their output files first, and writing them."""

from __future__ import annotations

import argparse
import contextlib
import sys
from dataclasses import replace
from pathlib import Path

from cfa_tool.errors import OptionError, printable
from cfa_tool.numbers import cut_list, word_list


def check_files(args: argparse.Namespace, outputs: list[tuple[str, str | None]], inputs: list[str | None],
                never_replaced: tuple[str, ...] = ()) -> dict:
    """Every output checked before any work (cfa_tool.output_files), the report options' files and table folder
    among them; the targets are kept on ``args``.  ``never_replaced``: options whose files hold rows of data (scores,
    simulated rows, a draft model), which never replace an existing file, even one this tool wrote (perhaps edited
    since)."""
    from cfa_tool.output_files import check_outputs

    asked = {option for option, _ in outputs}
    outputs = list(outputs) + [(o, getattr(args, a, None)) for o, a in REPORT_FILES if o not in asked]
    targets = check_outputs(outputs, [i for i in inputs if i], [("--tables", getattr(args, "tables", None))],
                            new_only=never_replaced)
    for option, attribute in REPORT_FILES:  # after the guard's refusals, which name an input or a folder
        require_report_ending(option, getattr(args, attribute, None))
    args._targets = targets
    args._stdout_taken = any(t.is_stdout for t in targets.values())
    return targets


def require_suffix(option: str, given: str | None, suffix: str, what: str) -> None:
    """A file output must carry the extension of what it holds; standard output and special files (written in
    place, whatever their names) need none."""
    from cfa_tool.output_files import special_file

    if given and given != "-" and Path(given).suffix.lower() != suffix and not special_file(given):
        raise OptionError(f"{option}: {what} are written as {suffix[1:].upper()}; give a file name ending in {suffix}, "
                          f"not '{printable(given)}'")


#: the endings of each report option's files (the first the one advice gives)
REPORT_ENDINGS = {"--json": (".json",), "--html": (".html", ".htm"), "--markdown": (".md", ".markdown", ".txt"),
                  "--docx": (".docx",)}
#: the endings of files of other kinds (reports, data, models, pictures, tables): a report written under one of them
#: would replace such a file with another kind, or leave a file whose name says what it does not hold (hostile s27:
#: '--docx r1.json' replaced a saved JSON result with a Word file)
OTHER_KINDS = frozenset({".json", ".html", ".htm", ".md", ".markdown", ".txt", ".docx", ".doc", ".odt", ".rtf",
                         ".csv", ".tsv", ".dat", ".xlsx", ".xlsm", ".xls", ".ods", ".sav", ".zsav", ".por", ".dta",
                         ".sas7bdat", ".cfa", ".svg", ".png", ".pdf", ".tex", ".py", ".r", ".zip"})


def require_report_ending(option: str, given: str | None) -> None:
    """A report option's file (--json, --html, --markdown, --docx) must not carry the ending of another kind of file:
    the one check of every command (:func:`check_files`), as --diagram and --draft check theirs.  A Word file must end
    in .docx (Word opens no other); the other reports may carry an ending of no known kind, or none; standard output
    and special files (written in place, whatever their names) need none."""
    from cfa_tool.output_files import special_file

    endings = REPORT_ENDINGS.get(option)
    if not given or not endings or given == "-" or special_file(given):
        return
    ending = Path(given).suffix.lower()
    if ending in endings or (option != "--docx" and ending not in OTHER_KINDS):
        return
    raise OptionError(f"{option}: '{printable(given)}' "
                      + (f"ends in {ending}, the ending of another kind of file" if ending else "has no ending")
                      + f"; give a file name ending in {word_list(endings, 'or')}")


def say(args: argparse.Namespace, text: str) -> None:
    """A line about files written: on standard output, or standard error when standard output carries an output."""
    import sys

    print(printable(text), file=sys.stderr if getattr(args, "_stdout_taken", False) else sys.stdout)


def write_reports(args: argparse.Namespace, files: list[tuple[str, object, str]]) -> list[str]:
    """Write (option, content, message) outputs through the output guard, an output on standard output last (a
    reader that stops early, '| head', loses no file); the messages of the files written, for :func:`say` after
    the report."""
    from cfa_tool.output_files import write_file

    for option, content, _ in sorted(files, key=lambda file: args._targets[file[0]].is_stdout):
        write_file(args._targets[option], content)
    return [message for option, _, message in files if not args._targets[option].is_stdout]


def report_files(args: argparse.Namespace, result, html, markdown, report=None) -> list[tuple[str, object, str]]:
    """(option, content, message) of the JSON, HTML and Markdown reports asked for; ``html`` and ``markdown``
    make the command's report in those formats; ``report``: the result's report when made already (the JSON
    holds it)."""
    from cfa_tool.reporting.json_report import to_json

    files = []
    for option, wanted, make, what in (("--json", args.json, lambda r: to_json(r, report), "JSON result"),
                                       ("--html", args.html, html, "HTML report"),
                                       ("--markdown", args.markdown, markdown, "Markdown report")):
        if wanted:
            files.append((option, make(result), f"{what} written to {wanted}"))
    return files


#: every file option of the commands: (option, attribute of the parsed arguments)
REPORT_FILES = (("--json", "json"), ("--html", "html"), ("--markdown", "markdown"), ("--docx", "docx"),
                ("--diagram", "diagram"), ("--output", "output"))


def add_report_options(p: argparse.ArgumentParser, json: bool = True) -> None:
    """The options that write a command's report: JSON (which ``cfa-tool report`` turns into any format later),
    HTML, Markdown, Word, and every table as CSV and LaTeX."""
    if json:
        p.add_argument("--json", metavar="PATH", help="also write the result as JSON to PATH ('-' for standard output "
                                                      "only); 'cfa-tool report' writes any format from it later")
    p.add_argument("--html", metavar="PATH", help="write a self-contained HTML report")
    p.add_argument("--markdown", metavar="PATH", help="write the report as Markdown")
    p.add_argument("--docx", metavar="PATH", help="write the report as a Word document for a manuscript (numbered "
                                                  "tables with notes)")
    p.add_argument("--tables", metavar="FOLDER", help="write every table as CSV and as LaTeX (booktabs) into FOLDER")


def add_diagram_option(p: argparse.ArgumentParser) -> None:
    """--diagram, the fit's path diagram as a file: of a fit (fit, demo) and of a saved fit (report)."""
    p.add_argument("--diagram", metavar="PATH", help="write the path diagram (every group) as SVG, or as PNG "
                   "or PDF when PATH ends in .png or .pdf (needs the rsvg-convert program)")


def document_files(args: argparse.Namespace, report, dpi: int | None = None) -> list[tuple[str, object, str]]:
    """(option, content, message) of the HTML, Markdown and Word files asked for, drawn from one report
    (cfa_tool.reporting.document.Report)."""
    files: list[tuple[str, object, str]] = []
    if getattr(args, "html", None):
        from cfa_tool.reporting.html_report import report_html

        files.append(("--html", report_html(report), f"HTML report written to {args.html}"))
    if getattr(args, "markdown", None):
        from cfa_tool.reporting.text_formats import report_markdown

        files.append(("--markdown", report_markdown(report), f"Markdown report written to {args.markdown}"))
    files += docx_file(args, report, dpi)
    return files


def docx_file(args: argparse.Namespace, report, dpi: int | None = None) -> list[tuple[str, object, str]]:
    if not getattr(args, "docx", None):
        return []
    from cfa_tool.reporting.docx_report import report_docx
    from cfa_tool.reporting.picture import DEFAULT_DPI

    return [("--docx", report_docx(report, dpi or DEFAULT_DPI), f"Word report written to {args.docx}")]


def table_files(args: argparse.Namespace, report, inputs: list[str | None]) -> dict[str, str]:
    """The --tables files of a report (name -> text), checked against the folder before anything is written; the CSV
    files in the convention of the data file the result read (reporting.document.Report.csv_convention)."""
    if not getattr(args, "tables", None):
        return {}
    from cfa_tool.output_files import check_table_folder
    from cfa_tool.reporting.text_formats import report_table_files

    files = report_table_files(report, report.csv_convention)
    check_table_folder("--tables", args.tables, files, [i for i in inputs if i])
    return files


def write_tables(args: argparse.Namespace, files: dict[str, str], inputs: list[str | None]) -> list[str]:
    """Write the --tables files; the message saying so, for :func:`say` after the report."""
    if not files:
        return []
    from cfa_tool.output_files import write_table_folder

    from cfa_tool.output_files import TABLE_CONTENTS

    earlier = write_table_folder("--tables", args.tables, files, [i for i in inputs if i])
    said = [f"Tables written to {args.tables}/ as CSV and LaTeX ({TABLE_CONTENTS} lists them)"]
    if earlier:
        shown_names = cut_list(earlier, 6)
        said.append(f"Caution: {args.tables}/ also holds {len(earlier)} files an earlier run wrote and this one did not "
                    f"({shown_names}); they belong to another report: delete them, or write into an empty folder, so "
                    f"that tables of two analyses are not mixed")
    return said


def show(args: argparse.Namespace, report, written: list[str], terminal: bool = True) -> None:
    """The one place a command prints its report: after every file is written (a reader of standard output that
    stops early, '| head', loses no file), the report on standard output (``terminal``, unless standard output
    carries an output: then its problems on standard error), then the files written."""
    if terminal and not args._stdout_taken:
        from cfa_tool.reporting.terminal import render_report

        render_report(report, console())
    else:  # as the terminal view names tables and advice (its own command's options: note_parts.View.running)
        from cfa_tool.note_parts import titled

        notice_on_standard_error(report.notice, titled(report.tables, running=report.kind.value))
    for line in written:
        say(args, line)


def console():
    from cfa_tool.reporting.terminal import SafeConsole

    return SafeConsole(highlight=False, markup=False, emoji=False)


def notice_on_standard_error(notice, view=None) -> None:
    """The problems box (reporting.tables.ProblemNotice; None: nothing to say) on standard error, for a run whose
    standard output carries an output instead of the report: the problems still come first; ``view``: how its
    lines name tables (note_parts.View; by default as a report's terminal view does)."""
    if notice is None:
        return
    from cfa_tool.reporting.terminal import SafeConsole, problem_panel

    panel = problem_panel(notice) if view is None else problem_panel(notice, view)
    SafeConsole(highlight=False, markup=False, emoji=False, stderr=True).print(panel)


def emit_report(args: argparse.Namespace, result, inputs: list[str | None],
                first: list[tuple[str, object, str]] = ()) -> int:
    """Turn ``result`` into its report once, make every output asked for (``first``: files the command makes
    itself, such as simulated rows) and write them, then show the report (:func:`show`)."""
    from cfa_tool.reporting.reports import report_of

    from cfa_tool.data.csv_convention import convention_of_result

    report = replace(report_of(result), files=named_files(args, inputs), csv_convention=convention_of_result(result),
                     data=data_read(args, result))
    files = list(first)
    if getattr(args, "json", None):
        from cfa_tool.reporting.json_report import to_json

        files.append(("--json", to_json(result, report), f"JSON result written to {args.json}"))
    files += document_files(args, report, getattr(args, "dpi", None))
    tables = table_files(args, report, inputs)
    show(args, report, write_reports(args, files) + write_tables(args, tables, inputs))
    return 0


def data_read(args: argparse.Namespace, result=None) -> tuple:
    """The data files the run read and how (reporting.document.DataRead: the path as given, its bytes' SHA-256, the
    reading options in words), kept in its report so that a document of several saved results can say whether they
    describe the same rows: --data (or --calibration) read with --sheet, --names-row, --first-data-row,
    --missing-codes, --rename, --keep and --half, and the values the file itself marks as no answer that ``result``
    read as missing (:func:`file_marked_said`: a Stata file's value labels and extended missing values); replicate's
    --validation with its own reading options and the same codes and filters."""
    from cfa_tool.data.file_checksum import fingerprint
    from cfa_tool.reporting.document import DataRead

    read = [(getattr(args, "data", None) or getattr(args, "calibration", None), ""),
            (getattr(args, "validation", None), "validation_")]
    return tuple(DataRead(path, fingerprint(path), reading_said(args, prefix) + (file_marked_said(result) if not prefix
                                                                                 else ()))
                 for path, prefix in read if isinstance(path, str) and path)


def file_marked_said(result) -> tuple[str, ...]:
    """The values the data file marks as no answer (its value labels, its declared missing values, cells whose text
    says no answer: data.non_answers) that ``result`` read as missing, in words for a document of saved results
    ("values the file marks as no answer read as missing: 8 'Refused', 9 'Not applicable'"); () when there are none
    or the result does not keep its data's summary (a fit keeps it; a comparison or ladder in its first fit)."""
    from cfa_tool.data.non_answers import NonAnswerKind
    from cfa_tool.numbers import word_list

    holders = [result, *(getattr(result, "results", None) or ())[:1],
               *(getattr(result, name, None) for name in ("fit", "calibration", "configural"))]
    for holder in holders:
        found = getattr(getattr(holder, "data", None), "non_answers", None)
        if found:
            shown = list(dict.fromkeys(f.shown() for f in found if f.kind is not NonAnswerKind.GIVEN))
            return (f"values the file marks as no answer read as missing: {word_list(shown)}",) if shown else ()
    return ()


def reading_said(args: argparse.Namespace, prefix: str = "") -> tuple[str, ...]:
    """How the command line asked a data file to be read, in words for any reader (commands.options.reading_words
    gives the same as options to type): the sheet, the rows of names and of the first data (``prefix``
    'validation_': those of replicate's --validation file), the renamed columns, the codes read as no answer, the
    row filters and the random half."""
    from cfa_tool.numbers import user_number, word_list

    def given(name: str):
        return getattr(args, prefix + name, None)

    codes = [f'"{v}"' if isinstance(v, str) else user_number(v) for v in getattr(args, "missing_codes", None) or ()]
    half = getattr(args, "half", None)
    words = [f'sheet "{given("sheet")}"' if given("sheet") else "",
             f"column names in row {given('names_row')}" if given("names_row") else "",
             f"data from row {given('first_data_row')}" if given("first_data_row") else "",
             f"columns renamed ({'; '.join(given('rename'))})" if given("rename") else "",
             f"code{'s' if len(codes) > 1 else ''} {word_list(codes)} read as missing" if codes else "",
             *(f"rows where {f}" for f in getattr(args, "keep", None) or ()),
             f'the random half "{half[1]}" of {Path(half[0]).name}' if half else ""]
    return tuple(printable(w) for w in words if w)


def named_files(args: argparse.Namespace, inputs: list[str | None]) -> tuple[str, ...]:
    """The paths of the user's files a report may name, as given and as the tool writes them (``inputs``, the
    command's outputs): the views written for others name them by file name (reporting.document.by_file_name)."""
    given = [*inputs, *(getattr(args, attribute, None) for _, attribute in REPORT_FILES),
             getattr(args, "halves_file", None), getattr(args, "tables", None)]
    return tuple(dict.fromkeys(p for g in given if isinstance(g, str) and g and g != "-" for p in (g, str(Path(g)))))


def progress(label: str):
    """A progress bar on standard error when it is a terminal (count done of the count announced,
    percentage, time remaining); otherwise silence."""
    if not sys.stderr.isatty():
        return contextlib.nullcontext(None)
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TaskProgressColumn, TextColumn, TimeRemainingColumn

    @contextlib.contextmanager
    def bar():
        columns = (TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(), TaskProgressColumn(),
                   TextColumn("remaining"), TimeRemainingColumn())
        with Progress(*columns, transient=True, console=Console(stderr=True)) as progress:
            task = progress.add_task(label, total=0)

            def advance(done: int, more: int = 0) -> None:
                if more:
                    progress.update(task, total=progress.tasks[0].total + more)
                if done:
                    progress.advance(task, done)

            yield advance

    return bar()


def inputs_of(args: argparse.Namespace) -> list[str]:
    """Every file the command reads: models, data, calibration and validation files."""
    names = [getattr(args, "model", None), *(getattr(args, "models", None) or ()),
             getattr(args, "data", None), getattr(args, "calibration", None), getattr(args, "validation", None),
             getattr(args, "population_from", None), getattr(args, "nested_model", None),
             (getattr(args, "half", None) or [None])[0]]
    return [n for n in names if n]


HALVES_FILE = "--halves-file"


def add_halves_file(parser: argparse.ArgumentParser, asked: str) -> None:
    """The option that saves which rows went to which random half (``asked``: what makes the halves)."""
    parser.add_argument(HALVES_FILE, metavar="FILE.csv",
                        help=f"with {asked}: write which rows went to which half, a CSV of the rows' numbers (as the "
                             f"file numbers them, as a spreadsheet shows it) and the half; an existing file is "
                             f"never replaced")


def halves_file(args: argparse.Namespace, halves: list[tuple[str, tuple[int, ...]]],
                seed: int, drawn_by, result) -> list[tuple[str, object, str]]:
    """(option, content, message) of --halves-file when asked (data.halves.halves_text: one line per row split, in
    the order of the rows, with the ``seed`` and the data file's name and checksum; ``halves``: each half's name and
    its rows' numbers, data.moments.row_numbers; ``drawn_by``: the clusters and strata they were drawn by,
    data.halves.DrawnBy); written in the convention of the data file (data.csv_convention) the ``result`` read."""
    if not getattr(args, "halves_file", None):
        return []
    from cfa_tool.data.csv_convention import convention_of_result
    from cfa_tool.data.halves import halves_text, names_in_file

    return [(HALVES_FILE, halves_text(halves, seed, args.data, getattr(args, "sheet", None), drawn_by,
                                      convention_of_result(result)),
             f"The rows of each half written to {args.halves_file} "
             f"({names_in_file(tuple(name for name, _ in halves), args.halves_file)})")]


HALF = "--half"


def refuse_halves_of_a_half(args: argparse.Namespace) -> None:
    """Halves saved (--halves-file) of the rows one half selects (--half) are refused before any work: a halves file
    is read back against the whole data file and one --half, so halves drawn inside a half could never be analysed
    (hostile s19: the confirmation half set aside was lost)."""
    if getattr(args, "halves_file", None) and getattr(args, "half", None):
        raise OptionError(f"{HALVES_FILE} would save halves of the rows of one half ({HALF}), and a halves file is read "
                          f"back against the whole data file, so those halves could never be analysed; draw and save "
                          f"the halves without {HALF}, or leave {HALVES_FILE} out")


def add_half_option(parser) -> None:
    """The option that analyses one half of a halves file (data.halves.RandomHalf)."""
    parser.add_argument(HALF, nargs=2, metavar=("HALVES.csv", "NAME"), default=None,
                        help="analyse only the rows of one random half that explore --split (or replicate --data) "
                             "wrote with --halves-file, such as: --half halves.csv confirmation (explore names its "
                             "halves exploration and confirmation, replicate A and B); the halves file is "
                             "checked against the data file (the same contents and rows, after the --keep filters of "
                             "the run that drew them), and every report names the half, its rows and the seed")


def kept_rows(args: argparse.Namespace) -> list:
    """The row selections of the command line: the --keep filters, then the half of --half (drawn from the rows the
    filters keep)."""
    keep, half = list(getattr(args, "keep", None) or []), getattr(args, "half", None)
    if not half:  # (a run without --half does not import the halves' module)
        return keep
    from cfa_tool.data.halves import RandomHalf

    return keep + [RandomHalf(*half)]


def check_output(args: argparse.Namespace, inputs: list[str]) -> dict:
    """Every output of the run checked before any work (see cfa_tool.output_files): the checks of
    :func:`check_files`, and those of the diagram, simulated rows, the halves' rows and picture resolution."""
    from cfa_tool.reporting.picture import PictureFormat, picture_format, png_converter, require_converter

    diagram = getattr(args, "diagram", None)
    if diagram:  # the format checked, and a missing converter said, before any work
        require_converter(picture_format("--diagram", diagram))
    output = getattr(args, "output", None)
    require_suffix("--output", output, ".csv", "the simulated rows")
    halves = getattr(args, "halves_file", None)
    require_suffix(HALVES_FILE, halves, ".csv", "the rows of the halves")
    refuse_halves_of_a_half(args)
    targets = check_files(args, [(HALVES_FILE, halves)] if halves else [], inputs,
                          never_replaced=("--output", HALVES_FILE))
    if hasattr(args, "dpi"):
        pictures = bool(getattr(args, "docx", None)) or (bool(diagram) and picture_format("--diagram", diagram)
                                                           is PictureFormat.PNG)
        picture_resolution(args, pictures, "give --diagram FILE.png or --docx, or leave --dpi out")
    if getattr(args, "docx", None) and args.command in ("fit", "demo") and png_converter() is None:  # said before the work
        from cfa_tool.reporting.docx_report import NO_PICTURE

        print(f"cfa-tool: note: {NO_PICTURE}", file=sys.stderr)
    return targets


def picture_resolution(args: argparse.Namespace, pictures: bool, advice: str) -> None:
    """``args.dpi`` checked (a whole number from 72 to 1200; the default when not given): given for a run that
    writes no picture (``pictures`` false), it cannot apply, an error with the ``advice``."""
    from cfa_tool import options as check
    from cfa_tool.reporting.picture import DEFAULT_DPI

    if args.dpi is None:
        args.dpi = DEFAULT_DPI
        return
    args.dpi = check.whole_number("--dpi", args.dpi, 72, 1200)
    if not pictures:
        raise OptionError(f"--dpi sets the resolution of pictures, and this run writes none: {advice}")


def emit(args: argparse.Namespace, result, first: list[tuple[str, object, str]] = ()) -> int:
    """Make every output of ``result``'s report, check that each can be written, then show the report and write
    them (see :func:`emit_report`)."""
    return emit_report(args, result, inputs_of(args), first)


def diagram_files(args: argparse.Namespace, result) -> list[tuple[str, object, str]]:
    """(option, content, message) of a fit's path diagram file when --diagram asks for one."""
    if not getattr(args, "diagram", None):
        return []
    from cfa_tool.reporting.diagram import diagram_file

    return diagram_output(args, diagram_file(result))


def diagram_output(args: argparse.Namespace, svg: str) -> list[tuple[str, object, str]]:
    """(option, content, message) of the path diagram ``svg`` as --diagram asks for it (SVG, PNG at --dpi, PDF): a
    fit's, or a saved fit's (cfa-tool report)."""
    from cfa_tool.reporting.picture import picture, picture_format

    content = picture(svg, picture_format("--diagram", args.diagram), args.dpi)
    return [("--diagram", content, f"Path diagram written to {args.diagram}")]
