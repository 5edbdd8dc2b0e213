"""``cfa-tool fit`` (and ``demo``, the same on the bundled rider survey): fit a model and report it."""

from __future__ import annotations

import argparse
from pathlib import Path

from cfa_tool.commands import options as O
from cfa_tool.commands.common import add_diagram_option, add_report_options, check_output, diagram_files, emit, \
    inputs_of
from cfa_tool.method import Information


def add_parser(sub) -> None:
    fit = sub.add_parser("fit", help="fit a model to data and report the result")
    O.add_model_and_data(fit, "data file: CSV/TSV, Excel .xlsx, SPSS .sav/.por, Stata .dta, or a summary-statistics "
                              "CSV (covariance or correlation matrix)")
    O.add_data_options(fit)
    O.add_group_options(fit, required=False)
    add_fit_outputs(fit)
    O.add_id_option(fit)
    O.add_design_options(fit)
    fit.add_argument("--missing-helpers", metavar="COLUMNS", default=None,
                     help="numeric columns outside the model that go with the answers or with their being missing (age, "
                          "say), comma-separated: with full-information ML they enter the likelihood as auxiliary "
                          "variables (Graham's 2003 saturated correlates), so that answers need be missing at random "
                          "only given the items and these columns; the model, its degrees of freedom and its fit "
                          "indices are unchanged")


def add_fit_outputs(p: argparse.ArgumentParser) -> None:
    """The options of a fit's estimation and of its report files."""
    add_report_options(p)  # JSON, HTML, Markdown, Word and tables, as every command has them
    add_diagram_option(p)
    p.add_argument("--dpi", type=int, default=None, help="resolution of pictures (PNG diagram, Word figure; default "
                                                         "300); only with --diagram FILE.png or --docx")
    p.add_argument("--standard-errors-from", dest="information", choices=Information.words(), default=None,
                   help="'expected' or 'observed' information (the curvature of the likelihood the standard errors come "
                        "from; default: expected with complete rows, observed with full-information ML); --robust gives "
                        "robust (sandwich) standard errors instead")
    O.add_renamed(p, "--information", "choose where standard errors come from with --standard-errors-from "
                                      "expected|observed")
    p.add_argument("--mi-threshold", type=float, default=None, metavar="X",
                   help="show modification indices of at least X (default 3.84)")
    p.add_argument("--mi-top", type=int, default=None, metavar="N", help="show at most N modification indices")
    O.add_max_iterations_option(p)
    O.add_test_option(p)
    O.add_ordinal_options(p)
    O.add_incomplete_rows_option(p)


def run(args: argparse.Namespace) -> int:
    from cfa_tool.pipeline.inputs import fit

    check_output(args, inputs_of(args))
    # a model file is a path, never model text (cfa_tool.pipeline.inputs.load_spec reads a Path as a file)
    result = fit(Path(args.model), args.data, group=args.group, reference_group=args.reference_group,
                 **O.reading_args(args), information=args.information,
                 mi_threshold=args.mi_threshold, mi_top=args.mi_top, max_iterations=args.max_iterations,
                 test=O.fit_test(args), missing=args.missing, ordinal=O.ordinal_arg(args.ordinal),
                 ordinal_estimator=args.ordinal_estimator, id_column=getattr(args, "id", None), **O.design_args(args),
                 **({"missing_helpers": args.missing_helpers} if getattr(args, "missing_helpers", None) is not None else {}))
    return emit(args, result, diagram_files(args, result))  # a model that does not converge raises EstimationError (exit 3)
