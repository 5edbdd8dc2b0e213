"""Commands that live in modules of their own: each registers its subparser and runs it.

``cfa_tool.cli`` calls :func:`add_parsers` when it builds its parser and :func:`run` for these
commands; everything else about a command (its options, checks of its outputs, its report) is in its
module.
"""

from __future__ import annotations

import argparse
from importlib import import_module

#: command name -> module (imported when the command runs or its parser is built)
MODULES = {"scores": "cfa_tool.commands.scores", "explore": "cfa_tool.commands.explore",
           "report": "cfa_tool.commands.report"}


def add_parsers(sub) -> None:
    for module in MODULES.values():
        import_module(module).add_parser(sub)


def handles(command: str | None) -> bool:
    return command in MODULES


def run(args: argparse.Namespace) -> int:
    return import_module(MODULES[args.command]).run(args)
