"""``cfa-tool simulate``: write rows simulated from a model with population values."""

from __future__ import annotations

import argparse

from cfa_tool.commands.common import add_report_options, check_output, emit_report, inputs_of


def add_parser(sub) -> None:
    sim = sub.add_parser("simulate", help="write data simulated from a model with population values")
    sim.add_argument("model", metavar="MODEL", help="model file; 'start' and 'fix' statements give population values")
    sim.add_argument("--n", type=int, required=True, help="number of rows")
    sim.add_argument("--output", required=True, metavar="PATH", help="CSV file to write")
    sim.add_argument("--seed", type=int, default=1, help="random seed (default 1)")
    sim.add_argument("--categories", type=int, help="make ordinal items with this many categories")
    sim.add_argument("--missing", type=float, default=0.0, help="share of answers removed completely at random")
    sim.add_argument("--population-from", metavar="RESULT", help="take the population values from an earlier fit of "
                     "this model (the file written by 'fit --json'); an ordinal fit gives its thresholds too")
    add_report_options(sim)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.language.parser import read_model_file
    from cfa_tool.workflows.simulation import simulate

    check_output(args, inputs_of(args))
    simulated = simulate(read_model_file(args.model), args.n, args.seed, args.categories, args.missing,
                         args.population_from)
    frame = simulated.frame
    # the model's names as written, never given the formula guard of report tables: the file is read back with the
    # same model file (a name '-a' written "'-a" was no column of it; hostile trial s17, finding 3's neighbour); in
    # the convention of the earlier fit's data file (--population-from), commas and points without one
    convention = simulated.population.csv_convention
    rows = ("--output", convention.file_text(frame.to_csv(index=False, na_rep="", sep=convention.separator,
                                                          decimal=convention.decimal)),
            f"{len(frame)} rows of {frame.shape[1]} variables written to {args.output} (seed {args.seed})"
            + (f"; {convention.said()}" if not convention.plain() else ""))
    return emit_report(args, simulated, inputs_of(args), first=[rows])
