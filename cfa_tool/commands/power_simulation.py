"""``cfa-tool power-simulation``: Monte Carlo power, bias and coverage for a model with population values; with
``--group-sizes``, the power of each step of the invariance ladder for a design with several groups."""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import check_output, emit, inputs_of, progress


def add_parser(sub) -> None:
    mc = sub.add_parser("power-simulation", help="Monte Carlo power, bias and coverage for a model with population "
                                                 "values; with --group-sizes, power to detect differences between "
                                                 "groups (measurement invariance)")
    mc.add_argument("model", metavar="MODEL", help="model file; 'start' and 'fix' statements give population values, "
                    "and with --group-sizes 'in group NAME: start ...' gives a value that differs in one group")
    mc.add_argument("--n", help="sample size of each simulated data set, or several separated by commas "
                    "(100,200,400) for power by sample size")
    mc.add_argument("--group-sizes", metavar="GROUP=N,...", help="plan an invariance study instead: the groups and "
                    "the rows of each (north=300,south=200; the first is the reference group); several designs with "
                    "sizes separated by slashes (north=100/200,south=100/200: the first sizes together, then the "
                    "second). Each data set is fitted by the invariance ladder and the report gives how often each "
                    "step was rejected: its power where the groups differ, its false-alarm rate where they do not")
    mc.add_argument("--highest-level", metavar="LEVEL", default=None,
                    help="with --group-sizes: the last level of the ladder to fit: metric, scalar (the default) or "
                         "strict")
    mc.add_argument("--replications", type=int, default=500, help="number of data sets (default 500)")
    mc.add_argument("--alpha", type=float, default=0.05, help="significance level (default .05)")
    mc.add_argument("--population-from", metavar="RESULT", help="take the population values from an earlier fit of "
                    "this model (the file written by 'fit --json'); an ordinal fit gives its thresholds too; with "
                    "--group-sizes, a continuous fit of one group gives every group's values, and 'in group' "
                    "statements the differences")
    mc.add_argument("--categories", type=int, help="cut the ordinal items (all items without an 'ordinal' statement) "
                    "into this many equally likely categories and fit them as ordinal")
    mc.add_argument("--nested-model", metavar="MODEL2", help="a model nested in MODEL, of the same items (a restricted "
                    "form of it: two of its factors merged into one, say): each data set is fitted by both models, and "
                    "the report gives the power of their chi-square difference test at each sample size, beside its "
                    "noncentral chi-square approximation (Satorra & Saris 1985); continuous items, one group")
    O.add_ordinal_estimator_option(mc)
    O.add_run_options(mc)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.errors import OptionError
    from cfa_tool.language.parser import read_model_file

    if args.group_sizes is not None:
        if args.nested_model is not None:
            raise OptionError("--nested-model cannot apply with --group-sizes: the difference test of a nested model "
                              "is simulated for one group; the invariance ladder's steps are the nested models there")
        given = [flag for flag, value in (("--n", args.n), ("--categories", args.categories),
                                          ("--ordinal-estimator", args.ordinal_estimator)) if value is not None]
        if given and given[0] == "--n":
            raise OptionError("--n cannot apply with --group-sizes: the group sizes replace it; leave it out")
        if given:
            from cfa_tool.workflows.group_population import answers_in_categories_refused

            raise OptionError(f"{given[0]} cannot apply with --group-sizes: "
                              + answers_in_categories_refused(f"plan continuous answers without {given[0]}"))
    elif args.n is None:
        raise OptionError("give the sample size (--n 300), or the groups and their sizes to plan an invariance study "
                          "(--group-sizes north=300,south=200)")
    elif args.highest_level is not None:
        raise OptionError("--highest-level is the last level of the invariance ladder, fitted only with "
                          "--group-sizes; leave it out or give the groups")
    check_output(args, inputs_of(args))
    spec = read_model_file(args.model)
    if args.group_sizes is None:
        from cfa_tool.model.parameters import group_statement

        statement = group_statement(spec)
        if statement is not None:
            raise OptionError(f"the model has {statement}, which needs groups: give the groups and their sizes to "
                              f"plan an invariance study (--group-sizes north=300,south=200), or remove it for the "
                              f"power of one group")
    if args.group_sizes is not None:
        from cfa_tool.workflows.group_power import DEFAULT_HIGHEST, invariance_power

        with progress(args.command) as advance:
            result = invariance_power(spec, args.group_sizes, args.replications, args.seed,
                                      args.alpha, args.workers, args.scheduler, advance,
                                      args.highest_level or DEFAULT_HIGHEST, args.population_from)
        return emit(args, result)
    from cfa_tool.workflows.montecarlo import monte_carlo_power

    with progress(args.command) as advance:
        result = monte_carlo_power(spec, args.n, args.replications, args.seed, args.alpha,
                                   args.workers, args.scheduler, advance, args.population_from, args.categories,
                                   args.ordinal_estimator,
                                   Path(args.nested_model) if args.nested_model is not None else None)
    return emit(args, result)
