"""``cfa-tool invariance``: configural, metric, scalar and strict invariance across groups."""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import add_report_options, check_output, emit, inputs_of, progress


def add_parser(sub) -> None:
    from cfa_tool.method import DecisionRule

    inv = sub.add_parser("invariance", help="test configural, metric, scalar and strict invariance across groups")
    O.add_model_and_data(inv)
    O.add_data_options(inv)
    O.add_id_option(inv)
    O.add_group_options(inv, required=True)
    inv.add_argument("--partial", choices=("none", "auto"), default="none",
                     help="'auto': when a step fails, free the constraint with the largest score test until it holds")
    inv.add_argument("--alpha", type=float, default=None, help="level of the chi-square difference tests and of the partial search's score tests (default .05)")
    inv.add_argument("--decide-by", choices=tuple(m.value for m in DecisionRule), default="difference-test",
                     help="how each step is judged: the chi-square difference test (default), the change in CFI, RMSEA "
                          "and SRMR against common-practice guides, or both")
    O.add_test_option(inv)
    O.add_ordinal_options(inv)
    O.add_incomplete_rows_option(inv)
    O.add_design_options(inv)
    add_report_options(inv)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.workflows.invariance import invariance

    check_output(args, inputs_of(args))
    with progress("invariance: fits") as advance:
        result = invariance(Path(args.model), args.data, args.group, reference_group=args.reference_group,
                            partial=args.partial, alpha=args.alpha, decide_by=args.decide_by, test=O.fit_test(args),
                            ordinal=O.ordinal_arg(args.ordinal),
                            ordinal_estimator=args.ordinal_estimator, missing=args.missing, progress=advance,
                            id_column=args.id,
                            **O.reading_args(args), **O.design_args(args))
    return emit(args, result)
