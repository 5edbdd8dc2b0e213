"""Write docs/options.md, every command's options as its parser declares them (the words of `cfa-tool CMD --help`),
so that the reference cannot drift from the program.  Run after changing an option or its help text:

    python docs/write_options.py

tests/commands/test_docs.py renders the page again and fails when the file differs.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.cli import PROG, build_parser

PAGE = Path(__file__).resolve().parent / "options.md"

HEADER = f"""# Options of every command

This page is written from the program's own option parsers by `python docs/write_options.py` (a test fails when it
differs from them); `{PROG} COMMAND --help` prints the same words.  What each command does, with the sources of
its methods: [commands.md](commands.md) and [fit.md](fit.md).  Options are never abbreviated: a shortened name is an
error, never another option; an option that takes one value given twice is an error too.
"""


def _commands() -> list[tuple[str, argparse.ArgumentParser, str]]:
    """Each command's name, parser and one-line summary, in the order of `cfa-tool --help`."""
    sub = next(a for a in build_parser()._actions if isinstance(a, argparse._SubParsersAction))  # noqa: SLF001
    summaries = {choice.dest: choice.help for choice in sub._choices_actions}  # noqa: SLF001
    return [(name, parser, summaries[name]) for name, parser in sub.choices.items()]


def _cell(text: str) -> str:
    """One Markdown table cell: one line, a literal '|' escaped."""
    return " ".join(text.split()).replace("|", "\\|")


def _invocation(formatter: argparse.HelpFormatter, action: argparse.Action) -> str:
    return formatter._format_action_invocation(action)  # noqa: SLF001 - the words --help prints


def command_section(name: str, parser: argparse.ArgumentParser, summary: str) -> str:
    """One command: its one-line summary, how it is called, and a table of its options (hidden ones left out: they
    only answer with an error, as options of earlier versions and options a command cannot take do)."""
    formatter = parser._get_formatter()  # noqa: SLF001
    shown = [a for a in parser._actions  # noqa: SLF001
             if a.help != argparse.SUPPRESS and not isinstance(a, argparse._HelpAction)]  # noqa: SLF001
    positional = [a for a in shown if not a.option_strings]
    required = [a for a in shown if a.option_strings and a.required]
    # positionals as the usage line writes them ('MODEL [MODEL ...]'), then the options a call needs
    call = " ".join([PROG, name, *(formatter._format_args(a, a.dest) for a in positional),  # noqa: SLF001
                     *(_invocation(formatter, a) for a in required)])
    lines = [f"## {name}", "", f"{summary[0].upper()}{summary[1:]}.", "", f"`{call}`", ""]
    if shown:
        lines += ["| option | what it does |", "| --- | --- |"]
        for action in shown:
            words = formatter._expand_help(action) if action.help else ""  # noqa: SLF001 - '%(default)s' expanded
            lines.append(f"| `{_cell(_invocation(formatter, action))}` | {_cell(words)} |")
        lines.append("")
    return "\n".join(lines)


def options_markdown() -> str:
    """The whole page, commands in the order of `cfa-tool --help`."""
    commands = _commands()
    index = ", ".join(f"[{name}](#{name})" for name, _, _ in commands)
    sections = [command_section(name, parser, summary) for name, parser, summary in commands]
    return "\n".join([HEADER, f"Commands: {index}.", "", *sections]).rstrip("\n") + "\n"


if __name__ == "__main__":
    PAGE.write_text(options_markdown(), encoding="utf-8")
    print(f"wrote {PAGE}")
