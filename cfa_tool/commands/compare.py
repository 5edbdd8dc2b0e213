"""``cfa-tool compare``: fit rival models to the same rows and test nested pairs."""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import add_report_options, check_output, emit, inputs_of


def add_parser(sub) -> None:
    compare = sub.add_parser("compare", help="fit rival models to the same rows and test nested pairs")
    compare.add_argument("models", metavar="MODEL", nargs="+", help="two or more model files")
    compare.add_argument("--data", required=True, metavar="FILE", help="data file")
    O.add_data_options(compare)
    O.add_id_option(compare)
    O.add_group_options(compare, required=False)
    O.add_test_option(compare)
    O.add_incomplete_rows_option(compare, "; every model is fitted to the same rows either way")
    O.add_ordinal_options(compare)
    O.add_design_options(compare)
    O.add_max_iterations_option(compare)
    add_report_options(compare)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.workflows.compare import compare

    check_output(args, inputs_of(args))
    result = compare([Path(m) for m in args.models], args.data, group=args.group, reference_group=args.reference_group,
                     test=O.fit_test(args), missing=args.missing, **O.reading_args(args),
                     ordinal=O.ordinal_arg(args.ordinal), ordinal_estimator=args.ordinal_estimator,
                     id_column=args.id, **O.design_args(args), **O.max_iterations_arg(args))
    return emit(args, result)
