"""``cfa-tool align``: group factor means and variances across many groups under approximate invariance,
by the alignment method (cfa_tool.workflows.alignment)."""

from __future__ import annotations

import argparse

from cfa_tool.commands import options as O
from cfa_tool.commands.common import add_report_options, check_files, emit_report


def add_parser(sub) -> None:
    from cfa_tool.method import ALIGNMENT_FLAG_LEVEL, ALIGNMENT_TRIALS, ReferenceMean

    p = sub.add_parser("align", help="factor means and variances across many groups by alignment (approximate "
                                     "invariance), with the non-invariant loadings and intercepts")
    p.add_argument("model", metavar="MODEL", help="model file (each item measuring one factor)")
    p.add_argument("--data", required=True, metavar="FILE", help="data file (rows of answers)")
    p.add_argument("--group-column", dest="group", required=True, metavar="COLUMN",
                   help="column whose values name the groups (two or more)")
    O.add_renamed(p, "--group", O.GROUP_NOW)
    p.add_argument("--reference-group", metavar="LABEL",
                   help="group whose factor variances are 1 and, unless its means are estimated, means 0 (default: "
                        f"{O.DEFAULT_REFERENCE})")
    p.add_argument("--reference-mean", choices=ReferenceMean.words(), default=ReferenceMean.ZERO.value,
                   help="the reference group's factor means: 'zero' (default), or 'estimated' from the non-invariance "
                        "of the loadings")
    p.add_argument("--flag-level", type=float, default=ALIGNMENT_FLAG_LEVEL, metavar="P",
                   help=f"level of the tests that flag non-invariant loadings and intercepts (default {ALIGNMENT_FLAG_LEVEL:g})")
    p.add_argument("--trials", type=int, default=ALIGNMENT_TRIALS, metavar="N",
                   help=f"simulated data sets of the Monte Carlo check of the aligned means (default {ALIGNMENT_TRIALS}; "
                        f"0 leaves the check out)")
    p.add_argument("--seed", type=int, default=None, help="random seed of the Monte Carlo check (default 1)")
    O.add_incomplete_rows_option(p)
    O.add_max_iterations_option(p)
    O.add_data_options(p)
    O.add_id_option(p)
    add_report_options(p)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from cfa_tool.errors import OptionError
    from cfa_tool.workflows.alignment import align

    check_files(args, [("--json", args.json)], [args.model, args.data])
    if args.trials == 0 and args.seed is not None:
        raise OptionError("--seed sets the random data of the Monte Carlo check, which --trials 0 leaves out: give one "
                          "or the other")
    result = align(Path(args.model), args.data, args.group, reference_group=args.reference_group,
                   reference_mean=args.reference_mean, flag_level=args.flag_level, trials=args.trials, seed=1 if args.seed is None else args.seed,
                   **O.reading_args(args), missing=args.missing,
                   max_iterations=args.max_iterations, id_column=args.id)
    return emit_report(args, result, [args.model, args.data])
