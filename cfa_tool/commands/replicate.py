"""``cfa-tool replicate``: does a model replicate in new data, or in random halves of one data set?"""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import add_halves_file, add_report_options, check_output, emit, halves_file, inputs_of


def add_parser(sub) -> None:
    rep = sub.add_parser("replicate", help="check that a model replicates in new data (or in random halves of one data set)",
                         epilog="Sampling designs: replicate takes no weights (--weights is refused); its test of "
                                "one solution and cross-validation index take the rows as independent and equally "
                                "weighted. --data is split row by row, so rows of one household, school or other "
                                "cluster can fall in both halves, unless --cluster names each row's cluster: whole "
                                "clusters then go to each half (within each stratum of --strata), and the report says "
                                "that the rows within each half are still taken as independent. For a weighted "
                                "sample, fit each sample with 'fit' and its design options.")
    rep.add_argument("model", metavar="MODEL", help="model file")
    rep.add_argument("--calibration", metavar="FILE", help="data the model is estimated in")
    rep.add_argument("--validation", metavar="FILE", help="new data the estimates are checked in")
    rep.add_argument("--data", metavar="FILE", help="one data file to split at random into two halves")
    rep.add_argument("--seed", type=int, default=None, help="seed of the random split of --data (default 1)")
    add_halves_file(rep, "--data")
    O.add_data_options(rep)
    O.add_id_option(rep)
    rep.add_argument("--validation-sheet", metavar="NAME", default=None,
                     help="the sheet of the --validation workbook to read; --sheet gives that of the --calibration "
                          "workbook (and of the --validation workbook when this is not given): two sheets of one "
                          "workbook may be the two samples")
    rep.add_argument("--validation-names-row", metavar="N", type=O.row_number, default=None,
                     help="the row of the --validation file that holds its column names; --names-row gives "
                          "that of the --calibration file (or of --data), so each file is read as it is laid out")
    rep.add_argument("--validation-first-data-row", metavar="N", type=O.first_row_of_data, default=None,
                     help="the row of the --validation file where its answers start; --first-data-row gives "
                          "that of the --calibration file (or of --data)")
    rep.add_argument("--validation-rename", metavar="OLD=NEW", action="append", default=[],
                     help="read a column of the --validation file under another name, as --rename does for the "
                          "--calibration file (or --data): each file's columns are renamed by its own option")
    O.add_ordinal_options(rep)
    O.add_incomplete_rows_option(rep, O.REFITS_AS_THE_FIT)
    O.add_max_iterations_option(rep, " of every fit (each sample's, the pooled and the two-sample one)")
    O.add_halves_design_options(rep, "--data")
    O.refuse_design_options(rep, "replicate compares samples of independent, equally weighted rows and takes no "
                                 "weights: its test of one solution and cross-validation index would mislead under "
                                 "sampling weights; fit each sample with 'fit' and its design options instead",
                            ("--weights", "--weight-kind"))
    add_report_options(rep)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.errors import OptionError
    from cfa_tool.workflows.replication import Replications, replicate, split_half

    check_output(args, inputs_of(args))
    model = Path(args.model)
    if args.data and (args.calibration or args.validation):
        raise OptionError("give either --data (split-half) or --calibration and --validation, not both")
    O.refuse_validation_reading(args)
    ordinal = {"ordinal": O.ordinal_arg(args.ordinal), "ordinal_estimator": args.ordinal_estimator,
               "missing": args.missing, "id_column": args.id, **O.reading_args(args), **O.max_iterations_arg(args)}
    if args.halves_file and not args.data:
        raise OptionError("--halves-file saves the random halves of one data file (--data), and --calibration and "
                          "--validation are not split")
    drawn_by = {"cluster": args.cluster, "strata": args.strata}
    if args.data:
        pair = split_half(model, args.data, seed=1 if args.seed is None else args.seed, **drawn_by, **ordinal)
    elif args.cluster or args.strata:
        raise OptionError(f"{'--cluster' if args.cluster else '--strata'} draws the random halves of --data by "
                          f"cluster; --calibration and --validation are split already: leave it out")
    elif args.seed is not None:
        raise OptionError("--seed sets the random split of --data into halves; --calibration and --validation are "
                          "split already: leave --seed out")
    elif args.calibration and args.validation:
        pair = (replicate(model, args.calibration, args.validation, validation_sheet=args.validation_sheet,
                          validation_names_row=args.validation_names_row,
                          validation_first_data_row=args.validation_first_data_row,
                          validation_rename=args.validation_rename, **ordinal),)
    else:
        raise OptionError("give --calibration and --validation files, or --data FILE to split one data set in two halves")
    split = pair[0].split
    from cfa_tool.data.halves import REPLICATE_HALVES

    first, second = REPLICATE_HALVES
    result = Replications(tuple(pair))
    halves = halves_file(args, [(first, split.half_a), (second, split.half_b)],
                         1 if args.seed is None else args.seed, split.drawn_by(), result) if split is not None else []
    return emit(args, result, halves)
