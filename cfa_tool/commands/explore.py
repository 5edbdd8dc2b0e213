"""``cfa-tool explore``: how many factors, an exploratory solution and a draft model file
(cfa_tool.workflows.explore); with --split, explore one random half and fit the draft on the other."""

from __future__ import annotations

import argparse

from cfa_tool.commands import options as O
from cfa_tool.commands.common import HALF, HALVES_FILE, add_halves_file, add_report_options, check_files, emit_report, \
    halves_file, refuse_halves_of_a_half, require_suffix, say


def add_parser(sub) -> None:

    p = sub.add_parser("explore", help="how many factors, an exploratory solution, and a draft model file")
    p.add_argument("--data", required=True, metavar="FILE", help="data file (rows of answers)")
    p.add_argument("--items", metavar="NAMES",
                   help="comma-separated columns to explore; item1..item9 is a range counted as a model file counts it "
                        "(q1..q9 is q1, q2, ..., q9, whatever the order of the columns) "
                        "(default: every column that holds numbers, except ids, columns named as weights, "
                        "clusters, strata or groups, and columns unlike the items that correlate with none of them, "
                        "such as years of service; the report names those left out)")
    p.add_argument("--factors", metavar="K", default="auto",
                   help="number of factors, or 'auto' for the recommended number (default auto)")
    p.add_argument("--rotation", default=None,
                   choices=("quartimin", "oblimin", "geomin", "promax", "varimax", "target", "none"),
                   help="quartimin (default), oblimin, geomin, promax: correlated factors; varimax: uncorrelated; "
                        "target: towards --target; none (a rotation turns several factors: with --factors 1 it is an "
                        "error, and when the rules recommend one factor it is not applied, with a note)")
    p.add_argument("--target", metavar="FILE",
                   help="target rotation towards this CSV file: first line 'item,' then the factor names; one line per "
                        "item, 0 where its loading is aimed at zero, empty where free (implies --rotation target)")
    p.add_argument("--answers", metavar="FILE",
                   help="an answers file for answers recorded as words: 'answers' statements as a model file writes "
                        "them, such as: answers \"Disagree\" = 1, \"Agree\" = 2 (the draft model carries them)")
    p.add_argument("--extraction", default="maximum-likelihood", choices=("maximum-likelihood", "least-squares"),
                   help="how the factors are estimated (default maximum-likelihood)")
    p.add_argument("--ordinal", metavar="ITEMS",
                   help="'all' or comma-separated items to analyse by polychoric correlations")
    p.add_argument("--draft", metavar="PATH",
                   help="write the draft model file here (.cfa); an existing file is never replaced")
    p.add_argument("--split", metavar="SEED", type=int,
                   help="explore one random half of the rows (seed SEED) and fit the draft model on the other half")
    add_halves_file(p, "--split")
    p.add_argument("--replications", type=int, default=100, help="random data sets of parallel analysis (default 100)")
    p.add_argument("--seed", type=int, default=0, help="seed of parallel analysis and of the rotation's random starts "
                                                       "(default 0)")
    O.add_max_iterations_option(p, " of the draft model's fit on the confirmation half (with --split)")
    O.add_data_options(p)
    O.add_id_option(p)
    O.add_halves_design_options(p, "--split", ", as replicate --data draws them")
    O.refuse_design_options(p, "explore analyses the unweighted correlations of independent rows (columns named as "
                               "weights, clusters or strata are left out of its default items); fit the draft model "
                               "with 'fit' and the design options", ("--weights", "--weight-kind"))
    add_report_options(p)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.errors import OptionError
    from cfa_tool.language.parser import MODEL_SUFFIX
    from cfa_tool.workflows.explore import explore

    require_suffix("--draft", args.draft, MODEL_SUFFIX, "model files")
    require_suffix(HALVES_FILE, args.halves_file, ".csv", "the rows of the halves")
    if args.halves_file and args.split is None:
        raise OptionError("--halves-file saves the random halves of --split SEED, and this run draws no halves")
    refuse_halves_of_a_half(args)
    outputs = [("--draft", args.draft), ("--json", args.json), ("--html", args.html), ("--markdown", args.markdown),
               (HALVES_FILE, args.halves_file)]
    check_files(args, outputs, [args.data] + [f for f in (args.target, args.answers) if f],
                never_replaced=("--draft", HALVES_FILE))
    result = explore(args.data, items=args.items, factors=args.factors, rotation=args.rotation,
                     extraction=args.extraction, ordinal=O.ordinal_arg(args.ordinal), split=args.split,
                     **O.reading_args(args),
                     replications=args.replications, seed=args.seed, target=args.target, answers=args.answers,
                     cluster=args.cluster, strata=args.strata, id_column=args.id,
                     **(O.max_iterations_arg(args) if "max_iterations" in getattr(args, "_given_options", ()) else {}))
    files = [("--draft", result.draft_text, f"Draft model written to {args.draft}")] if args.draft else []
    if result.split is not None:
        from cfa_tool.data.halves import EXPLORE_HALVES

        first, second = EXPLORE_HALVES
        files += halves_file(args, [(first, result.split.exploration_rows),
                                    (second, result.split.confirmation_rows)], result.split.seed,
                            result.split.drawn_by, result)
        if files[-1:] and files[-1][0] == HALVES_FILE:  # the way to fit an edited draft on the confirmation half
            import shlex

            files[-1] = files[-1][:2] + (f"{files[-1][2]}; fit an edited model on the confirmation half alone with "
                                         f"cfa-tool fit MODEL --data {shlex.quote(args.data)}{O.reading_words(args)} "
                                         f"{HALF} {shlex.quote(args.halves_file)} confirmation",)
    emit_report(args, result, [args.data, args.target, args.answers], files)  # one report for every format
    if args.draft and not result.exploration.draft.usable:
        say(args, "The draft model declares no factor (too few items per factor); it holds comments only")
    return 0
