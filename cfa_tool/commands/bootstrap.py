"""``cfa-tool bootstrap``: bootstrap intervals and the Bollen-Stine p-value of a fit."""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import check_output, emit, inputs_of, progress


def add_parser(sub) -> None:
    p = O.add_resampling_parser(sub, "bootstrap", "bootstrap intervals and the Bollen-Stine p-value of a fit (ordinal "
                                "items: percentile intervals, each resample refitted by least squares)", 1000,
                                "number of resamples")
    O.add_ordinal_options(p)
    O.add_design_options(p)
    O.add_incomplete_rows_option(p, O.REFITS_AS_THE_FIT)
    O.add_max_iterations_option(p, " of the fit to the data")


def run(args: argparse.Namespace) -> int:
    from cfa_tool.workflows.bootstrap import bootstrap

    check_output(args, inputs_of(args))
    with progress(args.command) as advance:
        result = bootstrap(Path(args.model), args.data, args.replications, args.seed, workers=args.workers,
                           scheduler=args.scheduler, progress=advance, **O.reading_args(args), ordinal=O.ordinal_arg(args.ordinal),
                           ordinal_estimator=args.ordinal_estimator, missing=args.missing, id_column=args.id,
                           **O.design_args(args), **O.max_iterations_arg(args))
    return emit(args, result)
