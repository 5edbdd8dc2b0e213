"""``cfa-tool check``: parse a model and check it against the data without fitting."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import add_report_options, check_output, emit, inputs_of
from cfa_tool.errors import DataError, printable


def add_parser(sub) -> None:
    check = sub.add_parser("check", help="parse a model and check it against the data without fitting")
    O.add_model_and_data(check)
    check.add_argument("--group-column", dest="group", metavar="COLUMN", help="column whose values name the groups")
    O.add_renamed(check, "--group", O.GROUP_NOW)
    O.add_data_options(check)
    O.add_id_option(check)
    check.add_argument("--ordinal", metavar="ITEMS",
                       help="'all' or comma-separated items to check as an ordinal fit would (their categories, in "
                            "each group); every problem that would stop that fit is listed, then the exit code is 2")
    O.add_design_options(check, "checked and stated as the fit would use it: the sum of the weights, Kish's effective "
                                "sample size, the clusters and strata, and a caution when clusters are too few")
    add_report_options(check)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.pipeline.inputs import check

    check_output(args, inputs_of(args))
    found = check(Path(args.model), args.data, group=args.group, ordinal=O.ordinal_arg(args.ordinal),
                  id_column=args.id, **O.reading_args(args), **O.design_args(args))
    emit(args, found)
    if found.refusals or found.stops_fit:  # the line a fit of the same model and data stops with, first; the exit
        # code says the data cannot be fitted
        print(f"cfa-tool: {printable(found.refusals[0] if found.refusals else found.stops_fit)}", file=sys.stderr)
        if found.refusals:  # listed in the report, each with its place (a fit names the first alone)
            from cfa_tool.reporting.workflow_tables import stops_ordinal_fit

            print(f"cfa-tool: {printable(found.source)}: {stops_ordinal_fit(len(found.refusals))} (listed first in "
                  f"the report)", file=sys.stderr)
        return DataError.exit_code
    return 0
