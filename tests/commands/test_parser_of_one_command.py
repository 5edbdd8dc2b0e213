"""A run builds only the parser of the command it names (the other commands' modules and options would only
add to the start); that parser is the one the full parser holds for the command, and an unknown word, help
or nothing still gets every command."""

from __future__ import annotations

import argparse
import subprocess
import sys

from cfa_tool import cli, commands


def _subparsers(parser: argparse.ArgumentParser) -> dict[str, argparse.ArgumentParser]:
    action = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    return dict(action.choices)


def _options(parser: argparse.ArgumentParser) -> list[tuple]:
    return [(type(a).__name__, tuple(a.option_strings), a.dest, a.nargs, repr(a.default), repr(a.choices), a.required,
             a.help, a.metavar) for a in parser._actions]


def test_one_command_gets_only_its_parser_and_it_is_the_full_parsers():
    everything = _subparsers(cli.build_parser())
    assert list(everything) == list(commands.MODULES)
    for name in commands.MODULES:
        alone = _subparsers(cli.build_parser(name))
        assert list(alone) == [name]
        assert alone[name].prog == everything[name].prog
        assert _options(alone[name]) == _options(everything[name]), name


def test_other_words_get_every_command():
    for word in (None, "--help", "-h", "--version", "fitt", "FIT"):
        assert list(_subparsers(cli.build_parser(word))) == list(commands.MODULES), word


def test_a_fit_from_the_command_line_imports_no_other_command():
    code = ("import sys\nfrom cfa_tool import cli\ntry:\n    cli.main(['fit', '--help'])\nexcept SystemExit:\n    pass\n"
            "print(sorted(m for m in sys.modules if m.startswith('cfa_tool.commands.')), file=sys.stderr)")
    shown = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True).stderr.strip()
    assert shown == "['cfa_tool.commands.common', 'cfa_tool.commands.fit', 'cfa_tool.commands.options']"


def test_an_unknown_command_still_lists_every_command(capsys):
    try:
        cli.main(["fitt"])
    except SystemExit as stop:
        assert stop.code == 2
    message = capsys.readouterr().err
    assert message.count("\n") == 1
    for name in commands.MODULES:
        assert f"'{name}'" in message
