"""The commands, one module each: each registers its subparser (``add_parser``) and runs it (``run``).

``cfa_tool.cli`` calls :func:`add_parsers` when it builds its parser and :func:`run` for the command
given; everything about a command (its options, checks of its outputs, its report) is in its module,
and the options several commands share are in :mod:`cfa_tool.commands.options`.
"""

from __future__ import annotations

import argparse
from importlib import import_module

#: command name -> module, in the order of the help (each imported when its parser is built or it runs)
MODULES = {name: f"cfa_tool.commands.{name.replace('-', '_')}" for name in (
    "fit", "check", "compare", "invariance", "replicate", "bootstrap", "power", "power-simulation", "simulate",
    "cutoffs", "demo", "scores", "explore", "align", "report")}


def add_parsers(sub, command: str | None = None) -> None:
    """Every command's subparser, or only ``command``'s when it names one (a run needs no other; an unknown
    word, help or nothing gets them all, so that the help and the error list every command)."""
    from cfa_tool.commands.options import refuse_missing_helpers

    for module in ([MODULES[command]] if command in MODULES else MODULES.values()):
        import_module(module).add_parser(sub)
    refuse_missing_helpers(sub)


def handles(command: str | None) -> bool:
    return command in MODULES


def run(args: argparse.Namespace) -> int:
    """Run the command of ``args``, its options that name columns composed (commands.options.composed_names) and
    the words of --missing-codes read as no answer throughout its run (data.non_answers.also_no_answer)."""
    from cfa_tool.commands.options import composed_names, no_answer_words
    from cfa_tool.data.non_answers import also_no_answer

    args = composed_names(args)  # the names of columns as the data's are read
    with also_no_answer(no_answer_words(args)):
        return import_module(MODULES[args.command]).run(args)
