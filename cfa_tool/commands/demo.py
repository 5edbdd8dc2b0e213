"""``cfa-tool demo``: fit the bundled rider-experience demo (a fictional transit agency's survey) and report it."""

from __future__ import annotations

import argparse

from cfa_tool.commands import fit


def add_parser(sub) -> None:
    demo = sub.add_parser("demo", help="fit the bundled rider-experience demo and print the report")
    fit.add_fit_outputs(demo)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.resources import resource_dir

    args.group = args.reference_group = None  # read as fit reads a file without the reading options (options.reading_args)
    args.weights = args.weight_kind = args.cluster = args.strata = None
    args.model = str(resource_dir("models") / "rider_three_factors.cfa")
    args.data = str(resource_dir("demo") / "rider_survey.csv")
    return fit.run(args)
