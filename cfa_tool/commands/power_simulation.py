"""``cfa-tool power-simulation``: Monte Carlo power, bias and coverage for a model with population values."""

from __future__ import annotations

import argparse

from cfa_tool.commands import options as O
from cfa_tool.commands.common import check_output, emit, inputs_of, progress


def add_parser(sub) -> None:
    mc = sub.add_parser("power-simulation", help="Monte Carlo power, bias and coverage for a model with population values")
    mc.add_argument("model", metavar="MODEL", help="model file; 'start' and 'fix' statements give population values")
    mc.add_argument("--n", required=True, help="sample size of each simulated data set, or several separated by commas "
                    "(100,200,400) for power by sample size")
    mc.add_argument("--replications", type=int, default=500, help="number of data sets (default 500)")
    mc.add_argument("--alpha", type=float, default=0.05, help="significance level (default .05)")
    mc.add_argument("--population-from", metavar="RESULT", help="take the population values from an earlier fit of "
                    "this model (the file written by 'fit --json'); an ordinal fit gives its thresholds too")
    mc.add_argument("--categories", type=int, help="cut the ordinal items (all items without an 'ordinal' statement) "
                    "into this many equally likely categories and fit them as ordinal")
    O.add_ordinal_estimator_option(mc)
    O.add_run_options(mc)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.language.parser import read_model_file
    from cfa_tool.workflows.montecarlo import monte_carlo_power

    check_output(args, inputs_of(args))
    with progress(args.command) as advance:
        result = monte_carlo_power(read_model_file(args.model), args.n, args.replications, args.seed, args.alpha,
                                   args.workers, args.scheduler, advance, args.population_from, args.categories,
                                   args.ordinal_estimator)
    return emit(args, result)
