"""``cfa-tool scores``: fit a model and write a factor score per row and factor, with a report of how good
the scores are (cfa_tool.workflows.factor_scores)."""

from __future__ import annotations

import argparse

from cfa_tool.commands import options as O
from cfa_tool.commands.common import add_report_options, check_files, emit_report, require_suffix, say


def add_parser(sub) -> None:

    from cfa_tool.scoring.methods import UnansweredFactor

    p = sub.add_parser("scores", help="fit a model and write factor scores of every row, with their quality")
    p.add_argument("model", metavar="MODEL", help="model file")
    p.add_argument("--data", required=True, metavar="FILE", help="data file (rows of answers)")
    p.add_argument("--output", required=True, metavar="PATH",
                   help="CSV file to write the scores to ('-' for standard output); its columns, in this order in "
                        "every run: the id (--id or the file's row names, when given), the columns the run chose or "
                        "grouped rows by (--keep's, --group-column, --cluster, --strata) as the data name them, each "
                        "factor's score by each "
                        "method (with its standard error when asked for), each factor's items answered, "
                        "same_answer_to_every_item (1 for a row that gave one answer to every item, reversed ones "
                        "included; empty without a 'reversed' statement) and why_not_scored (empty for rows scored "
                        "in full)")
    p.add_argument("--method", metavar="LIST",
                   help="comma-separated: regression (default), bartlett, correlation-preserving, item-sum, item-mean "
                        "(the keyed sum or mean of each factor's items, reverse-keyed items reversed); ordinal items "
                        "are always scored by their posterior mean with its standard deviation, item sums and means "
                        "beside it when asked for")
    p.add_argument("--least-answered", type=float, metavar="SHARE",
                   help="item sums and means: the least share of a factor's items a row must answer, its sum then "
                        "prorated from the answered ones (default 0.5, common practice); a row that answered fewer "
                        "gets empty cells")
    p.add_argument("--unanswered-factors", choices=[u.value for u in UnansweredFactor], metavar="WHAT",
                   help="what to do with a regression score or posterior mean of a factor a row answered none of the "
                        "items of, a prediction from its other answers: predict (default; a caution says which rows "
                        "have one) or leave-empty (the cell empty, why_not_scored saying why)")
    p.add_argument("--standard-errors", action="store_true",
                   help="also write each score's standard error (for regression scores the posterior standard deviation; "
                        "for item sums and means, _sem, their standard error of measurement from the items the row "
                        "answered); "
                        "ordinal items always have theirs written, so the option is not given with them")
    O.add_id_option(p)
    O.add_data_options(p)
    O.add_group_options(p, required=False)
    O.add_ordinal_options(p)
    O.add_incomplete_rows_option(p, " (in the fit; every row is scored from the items it answered either way)")
    O.add_design_options(p, "the design the model is fitted under (weighted estimates, sandwich standard errors); a "
                            "row's score follows from its answers and the fitted parameters alone, so every row is "
                            "scored whatever its weight; not with --from-fit, whose fit had its own design")
    O.add_max_iterations_option(p, " (not with --from-fit, whose parameters are fitted already)")
    p.add_argument("--from-fit", metavar="RESULT.json",
                   help="score the data with the parameters of an earlier fit of MODEL (its 'fit --json' result) instead "
                        "of fitting the model to them (ordinal items by their posterior mean, from its thresholds)")
    add_report_options(p)


#: options about fitting, which cannot apply when the parameters come from an earlier fit
FITTING_OPTIONS = (("group", "--group-column"), ("reference_group", "--reference-group"), ("ordinal", "--ordinal"),
                   ("ordinal_estimator", "--ordinal-estimator"), ("missing", "--incomplete-rows"),
                   ("max_iterations", "--max-iterations"), ("weights", "--weights"), ("weight_kind", "--weight-kind"),
                   ("cluster", "--cluster"), ("strata", "--strata"))


def _methods(text: str | None):
    from cfa_tool.errors import OptionError

    if text is None:
        return None
    words = [w.strip() for w in text.split(",")]
    if not any(words) or not all(words):
        raise OptionError(f"--method: give method names separated by commas, e.g. 'regression,bartlett', not '{text}'")
    return words


def _announcer():
    """Where a long scoring says it is starting: one line on standard error when that is a terminal (never into the
    report or the files); None (silence) otherwise."""
    import sys

    if not sys.stderr.isatty():
        return None
    return lambda line: print(line, file=sys.stderr, flush=True)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from cfa_tool.errors import OptionError
    from cfa_tool.workflows.factor_scores import score_with_saved_fit, scores

    require_suffix("--output", args.output, ".csv", "the scores")
    outputs = [("--output", args.output), ("--json", args.json), ("--html", args.html), ("--markdown", args.markdown)]
    check_files(args, outputs, [args.model, args.data, args.from_fit], never_replaced=("--output",))
    if args.from_fit:
        given = getattr(args, "_given_options", set())
        for dest, option in FITTING_OPTIONS:
            if dest in given:
                raise OptionError(f"{option} is about fitting the model, and with --from-fit the parameters come from "
                                  f"the earlier fit (its groups too), so it cannot apply; remove it")
        result = score_with_saved_fit(Path(args.model), args.from_fit, args.data, methods=_methods(args.method),
                                      standard_errors=args.standard_errors, id_column=args.id, **O.reading_args(args),
                                      least_answered=args.least_answered,
                                      unanswered_factors=args.unanswered_factors, announce=_announcer())
    else:
        result = scores(Path(args.model), args.data, methods=_methods(args.method), standard_errors=args.standard_errors,
                        id_column=args.id, group=args.group, reference_group=args.reference_group,
                        **O.reading_args(args), ordinal=O.ordinal_arg(args.ordinal),
                        ordinal_estimator=args.ordinal_estimator, missing=args.missing,
                        max_iterations=args.max_iterations, least_answered=args.least_answered,
                        unanswered_factors=args.unanswered_factors, announce=_announcer(),
                        **O.design_args(args))
    from cfa_tool.reporting.score_report import lines_without_data, rows_above_names, rows_scored
    from cfa_tool.workflows.factor_scores import WHY_NOT_SCORED_COLUMN

    empty = result.rows - result.rows_scored
    lines = lines_without_data(result)
    rows = ("--output", result.file_text(), f"Scores of {rows_scored(result)} written to {args.output}"
            + (f"; the {empty} without any score {'keeps its' if empty == 1 else 'keep their'} line, empty, with the "
               f"reason in {WHY_NOT_SCORED_COLUMN}"
               if empty else "") + (f"; it holds {lines}" if lines else "")
            + (f"; it has {rows_above_names(result)}" if rows_above_names(result) else "")
            + ("" if result.file_format.plain() else f"; {result.file_format.said()}"))
    emit_report(args, result, [args.model, args.data, args.from_fit], first=[rows])
    if result.low_determinacy:
        from cfa_tool.language.names import written_name
        from cfa_tool.numbers import word_list

        named = word_list(written_name(f) for f in result.low_determinacy)  # the one list of words in a sentence
        say(args, f"Caution: the determinacy of {named} is below .80; see the report")
    return 0
