"""What the commands of this package share: checking their output files first, and writing them."""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.errors import OptionError, printable


def check_files(args: argparse.Namespace, outputs: list[tuple[str, str | None]], inputs: list[str | None]) -> dict:
    """Every output checked before any work (cfa_tool.output_files); the targets are kept on ``args``."""
    from cfa_tool.output_files import check_outputs

    targets = check_outputs(outputs, [i for i in inputs if i])
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


def say(args: argparse.Namespace, text: str) -> None:
    """A line about files written: on standard output, or standard error when standard output carries an output."""
    import sys

    print(printable(text), file=sys.stderr if getattr(args, "_stdout_taken", False) else sys.stdout)


def write_reports(args: argparse.Namespace, files: list[tuple[str, object, str]]) -> None:
    """Write (option, content, message) outputs through the output guard, each with its message."""
    from cfa_tool.output_files import write_file

    for option, content, message in files:
        write_file(args._targets[option], content)
        if not args._targets[option].is_stdout:
            say(args, message)


def report_files(args: argparse.Namespace, result, html, markdown) -> list[tuple[str, object, str]]:
    """(option, content, message) of the JSON, HTML and Markdown reports asked for; ``html`` and ``markdown``
    make the command's report in those formats."""
    from cfa_tool.reporting.json_report import to_json

    files = []
    for option, wanted, make, what in (("--json", args.json, to_json, "JSON result"),
                                       ("--html", args.html, html, "HTML report"),
                                       ("--markdown", args.markdown, markdown, "Markdown report")):
        if wanted:
            files.append((option, make(result), f"{what} written to {wanted}"))
    return files


def add_report_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--json", metavar="PATH", help="also write the result as JSON to PATH ('-' for standard output only)")
    p.add_argument("--html", metavar="PATH", help="write a self-contained HTML report")
    p.add_argument("--markdown", metavar="PATH", help="write the report as Markdown")
