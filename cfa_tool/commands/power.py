"""``cfa-tool power``: power and sample size of RMSEA tests of fit."""

from __future__ import annotations

import argparse

from cfa_tool.commands.common import add_report_options, check_output, emit, inputs_of


def add_parser(sub) -> None:
    power = sub.add_parser("power", help="power and sample size of RMSEA tests of fit")
    power.add_argument("model", metavar="MODEL", nargs="?", help="model file (gives the degrees of freedom)")
    power.add_argument("--df", type=int, help="degrees of freedom (instead of a model file)")
    power.add_argument("--n", type=int, help="sample size whose power to report")
    power.add_argument("--test", choices=("close", "not-close", "exact"), default=None, help="which test (default close)")
    power.add_argument("--alpha", type=float, default=0.05, help="significance level (default .05)")
    power.add_argument("--target", type=float, default=0.80, help="power the sample size should reach (default .80)")
    power.add_argument("--design-effect", type=float, metavar="D",
                       help="a planned cluster sample's design effect (at least 1): the rows it needs are D times the N "
                            "of independent rows; with --cluster-size, the clusters too")
    power.add_argument("--cluster-size", type=float, metavar="M",
                       help="rows per cluster of a planned cluster sample (e.g. the 'rows per cluster' a fit or check "
                            "with --cluster reports): with --intraclass or --design-effect, the clusters needed")
    power.add_argument("--intraclass", type=float, metavar="ICC",
                       help="the items' intraclass correlation in the planned clusters (e.g. the median a fit or check "
                            "with --cluster reports); with --cluster-size it gives the design effect 1 + (M - 1) ICC "
                            "(Kish 1965)")
    power.add_argument("--nested-model", metavar="MODEL2",
                       help="a model nested in MODEL, of the same items (two of its factors merged into one, say): "
                            "instead of an RMSEA test, the power of the chi-square difference test between the two "
                            "and the smallest N for the target power, by the noncentral chi-square (Satorra & Saris "
                            "1985) at the population MODEL's 'start' and 'fix' values describe (standardized defaults "
                            "beside them)")
    add_report_options(power)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.errors import OptionError
    from cfa_tool.workflows.power import model_degrees_of_freedom, plan

    check_output(args, inputs_of(args))
    if args.nested_model is not None:
        if args.df is not None or not args.model:
            raise OptionError("--nested-model needs the model file MODEL, whose 'start' values give the population "
                              "the difference is planned for, not --df")
        if args.test is not None:
            raise OptionError(f"--test chooses an RMSEA test of fit, which --nested-model replaces by the chi-square "
                              f"difference test; leave out --test {args.test}")
        from pathlib import Path

        from cfa_tool.workflows.power_nested import nested_power

        return emit(args, nested_power(Path(args.model), Path(args.nested_model), args.n, args.alpha, args.target,
                                       args.design_effect, args.cluster_size, args.intraclass))
    df = args.df
    if args.model and args.df is not None:
        raise OptionError("give a model file or --df, not both (the model file gives the degrees of freedom)")
    variables, ordinal = None, False
    if args.model:
        from cfa_tool.language.parser import read_model_file

        spec = read_model_file(args.model)
        df, variables = model_degrees_of_freedom(spec)
        ordinal = bool(spec.ordinal)
        if df < 1:
            state = ("just identified: it reproduces every variance and covariance exactly" if df == 0 else
                     "more free parameters than variances and covariances: not identified")
            raise OptionError(f"{args.model} has {df} degrees of freedom ({state}), so no RMSEA test of its fit exists "
                              f"and there is no power to compute")
    if df is None:
        raise OptionError("give a model file or --df")
    return emit(args, plan(df, args.test or "close", args.n, args.alpha, args.target, variables=variables, ordinal=ordinal,
                           design_effect=args.design_effect, cluster_size=args.cluster_size,
                           intraclass=args.intraclass))
