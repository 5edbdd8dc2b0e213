"""``cfa-tool cutoffs``: fit-index cutoffs simulated for this model and sample size."""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import check_output, emit, inputs_of, progress


def add_parser(sub) -> None:
    p = O.add_resampling_parser(sub, "cutoffs", "fit-index cutoffs simulated for this model and sample size (ordinal "
                                "items: simulated as ordinal answers, cutoffs of the adjusted indices)", 200,
                                "samples per population")
    O.add_ordinal_options(p)
    O.add_incomplete_rows_option(p, O.REFITS_AS_THE_FIT)
    O.add_max_iterations_option(p, " of the fit to the data")
    O.refuse_design_options(p, "cutoffs are simulated from samples of independent, equally weighted rows, and a "
                               "sampling design (weights, clusters, strata) cannot be simulated from the data alone; "
                               "run cutoffs without it and compare with the fit's design-based statistics with care")


def run(args: argparse.Namespace) -> int:
    from cfa_tool.workflows.cutoffs import cutoffs

    check_output(args, inputs_of(args))
    with progress(args.command) as advance:
        result = cutoffs(Path(args.model), args.data, args.replications, args.seed, args.workers, args.scheduler,
                         advance, **O.reading_args(args),
                         ordinal=O.ordinal_arg(args.ordinal), ordinal_estimator=args.ordinal_estimator,
                         missing=args.missing, id_column=args.id, **O.max_iterations_arg(args))
    return emit(args, result)
