"""Command line: argument parsing, output files and exit codes only.

Exit codes: 0 success, 2 a problem with the user's input, 3 the model could
not be estimated (no convergence, not identified), 1 an internal error.
"""

from __future__ import annotations

import argparse
import contextlib
import os
import sys
import warnings
from pathlib import Path

from cfa_tool.errors import CfaError, ModelError, OptionError, printable
from cfa_tool.method import FitTest, Information, MissingData, Weighting

PROG = "cfa-tool"


class _Parser(argparse.ArgumentParser):
    """One line for every mistake, starting with the program's name (control characters escaped),
    and an error for an option given twice that takes one value (argparse would keep the last)."""

    def error(self, message: str):  # one line, not the usage block
        command = self.prog[len(PROG):].strip()
        where = f"{command}: " if command else ""
        self.exit(2, f"{PROG}: {where}{printable(message)} (see '{self.prog} --help')\n")

    def add_argument(self, *args, **kwargs):
        if kwargs.get("action") is None and args and str(args[0]).startswith("--"):
            kwargs["action"] = _Once
        return super().add_argument(*args, **kwargs)


class _Once(argparse.Action):
    """Store one value; the same option a second time is an error, never silently the last one."""

    def __call__(self, parser, namespace, values, option_string=None):
        seen = namespace.__dict__.setdefault("_given_options", set())
        if self.dest in seen:
            parser.error(f"{option_string} is given twice; give it once"
                         + (" (several values go in one comma-separated list)" if self.dest == "missing_codes" else ""))
        seen.add(self.dest)
        setattr(namespace, self.dest, values)


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog=PROG, description="Confirmatory factor analysis: fit a model file to a data set.")
    parser.add_argument("--version", action="version", version=_version())
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    fit = sub.add_parser("fit", help="fit a model to data and report the result")
    fit.add_argument("model", metavar="MODEL", help="model file")
    fit.add_argument("--data", required=True, metavar="FILE",
                     help="data file: CSV/TSV, Excel .xlsx, SPSS .sav/.por, Stata .dta, or a .stats summary-statistics file")
    _add_data_options(fit)
    _add_group_options(fit, required=False)
    _add_output_options(fit)
    fit.add_argument("--id", metavar="COLUMN", help="column that names each row (never analysed): the case tables show it "
                                                    "beside the data-row number")

    check = sub.add_parser("check", help="parse a model and check it against the data without fitting")
    check.add_argument("model", metavar="MODEL", help="model file")
    check.add_argument("--data", required=True, metavar="FILE", help="data file")
    check.add_argument("--group", metavar="COLUMN", help="column that defines groups")
    _add_data_options(check)

    compare = sub.add_parser("compare", help="fit rival models to the same rows and test nested pairs")
    compare.add_argument("models", metavar="MODEL", nargs="+", help="two or more model files")
    compare.add_argument("--data", required=True, metavar="FILE", help="data file")
    _add_data_options(compare)
    _add_group_options(compare, required=False)
    _add_test_option(compare)
    _add_ordinal_options(compare)
    _add_json_option(compare)

    inv = sub.add_parser("invariance", help="test configural, metric, scalar and strict invariance across groups")
    inv.add_argument("model", metavar="MODEL", help="model file")
    inv.add_argument("--data", required=True, metavar="FILE", help="data file")
    _add_data_options(inv)
    _add_group_options(inv, required=True)
    inv.add_argument("--partial", choices=("none", "auto"), default="none",
                     help="'auto': when a step fails, free the constraint with the largest score test until it holds")
    inv.add_argument("--alpha", type=float, default=None, help="level of the chi-square difference tests (default .05)")
    inv.add_argument("--decide-by", choices=tuple(m.value for m in _decision_rules()), default="difference-test",
                     help="how each step is judged: the chi-square difference test (default), the change in CFI, RMSEA "
                          "and SRMR against common-practice guides, or both")
    _add_ordinal_options(inv)
    _add_json_option(inv)

    rep = sub.add_parser("replicate", help="check that a model replicates in new data (or in random halves of one data set)")
    rep.add_argument("model", metavar="MODEL", help="model file")
    rep.add_argument("--calibration", metavar="FILE", help="data the model is estimated in")
    rep.add_argument("--validation", metavar="FILE", help="new data the estimates are checked in")
    rep.add_argument("--data", metavar="FILE", help="one data file to split at random into two halves")
    rep.add_argument("--seed", type=int, default=1, help="seed of the random split (default 1)")
    _add_json_option(rep)

    _add_resampling_command(sub, "bootstrap", "bootstrap intervals and the Bollen-Stine p-value of a fit", 1000,
                            "number of resamples")

    power = sub.add_parser("power", help="power and sample size of RMSEA tests of fit")
    power.add_argument("model", metavar="MODEL", nargs="?", help="model file (gives the degrees of freedom)")
    power.add_argument("--df", type=int, help="degrees of freedom (instead of a model file)")
    power.add_argument("--n", type=int, help="sample size whose power to report")
    power.add_argument("--test", choices=("close", "not-close", "exact"), default="close", help="which test (default close)")
    power.add_argument("--alpha", type=float, default=0.05, help="significance level (default .05)")
    power.add_argument("--target", type=float, default=0.80, help="power the sample size should reach (default .80)")
    _add_json_option(power)

    mc = sub.add_parser("power-simulation", help="Monte Carlo power, bias and coverage for a model with population values")
    mc.add_argument("model", metavar="MODEL", help="model file; 'start' and 'fix' statements give population values")
    mc.add_argument("--n", required=True, help="sample size of each simulated data set, or several separated by commas "
                    "(100,200,400) for power by sample size")
    mc.add_argument("--replications", type=int, default=500, help="number of data sets (default 500)")
    mc.add_argument("--alpha", type=float, default=0.05, help="significance level (default .05)")
    mc.add_argument("--population-from", metavar="RESULT", help="take the population values from an earlier fit of "
                    "this model (the file written by 'fit --json')")
    _add_run_options(mc)

    sim = sub.add_parser("simulate", help="write data simulated from a model with population values")
    sim.add_argument("model", metavar="MODEL", help="model file; 'start' and 'fix' statements give population values")
    sim.add_argument("--n", type=int, required=True, help="number of rows")
    sim.add_argument("--output", required=True, metavar="PATH", help="CSV file to write")
    sim.add_argument("--seed", type=int, default=1, help="random seed (default 1)")
    sim.add_argument("--categories", type=int, help="make ordinal items with this many categories")
    sim.add_argument("--missing", type=float, default=0.0, help="share of answers removed completely at random")
    sim.add_argument("--population-from", metavar="RESULT", help="take the population values from an earlier fit of "
                     "this model (the file written by 'fit --json')")
    _add_json_option(sim)

    _add_resampling_command(sub, "cutoffs", "fit-index cutoffs simulated for this model and sample size", 200,
                            "samples per population")

    demo = sub.add_parser("demo", help="fit the bundled rider-experience demo and print the report")
    _add_output_options(demo)
    from cfa_tool import commands

    commands.add_parsers(sub)  # commands in modules of their own (cfa_tool/commands/)
    return parser


def _add_data_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--sheet", metavar="NAME", help="sheet of an Excel workbook (default: the first)")
    p.add_argument("--missing-codes", metavar="LIST", type=_codes, default=(),
                   help="comma-separated values that mean 'no answer', e.g. -99,999")
    p.add_argument("--keep", metavar="FILTER", action="append", default=[],
                   help="keep only rows that meet COLUMN OPERATOR VALUE, e.g. 'district = north' (repeatable)")


def _codes(text: str) -> tuple[float, ...]:
    from cfa_tool.numbers import number

    codes = [number(t) for t in text.split(",") if t.strip()]
    if not codes or any(c is None for c in codes):
        raise argparse.ArgumentTypeError(f"missing codes must be numbers separated by commas, not '{text}'")
    return tuple(codes)


def _add_group_options(p: argparse.ArgumentParser, required: bool) -> None:
    p.add_argument("--group", required=required, metavar="COLUMN",
                   help="column that defines groups: the model is fitted in every group at once, with intercepts and factor means")
    p.add_argument("--reference-group", metavar="LABEL",
                   help="group whose factor means are fixed at zero (default: the first label in sorted order)")


def _add_test_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--test", choices=FitTest.words(), default="normal",
                   help="'satorra-bentler': scaled chi-square, robust standard errors and robust fit indices for non-normal "
                        "complete data; 'yuan-bentler': the same with full-information ML (--missing full-information)")


def _add_resampling_command(sub, name: str, help_text: str, replications: int, what: str) -> None:
    p = sub.add_parser(name, help=help_text)
    p.add_argument("model", metavar="MODEL", help="model file")
    p.add_argument("--data", required=True, metavar="FILE", help="data file")
    _add_data_options(p)
    p.add_argument("--replications", type=int, default=replications, help=f"{what} (default {replications})")
    _add_run_options(p)


def _add_run_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--seed", type=int, default=1, help="random seed (default 1); the same seed gives the same result")
    p.add_argument("--workers", type=int, help="local processes (default: one per core)")
    p.add_argument("--cluster", metavar="ADDRESS", help="Dask scheduler to run on, e.g. tcp://host:8786")
    _add_json_option(p)


def _add_json_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--json", metavar="PATH", help="also write the result as JSON to PATH ('-' for standard output only)")


def _add_output_options(p: argparse.ArgumentParser) -> None:
    _add_json_option(p)
    p.add_argument("--html", metavar="PATH", help="write a self-contained HTML report (tables, path diagram, methods paragraph)")
    p.add_argument("--markdown", metavar="PATH", help="write the report as Markdown")
    p.add_argument("--docx", metavar="PATH", help="write the report as a Word document for a manuscript (numbered "
                   "tables, methods paragraph, path diagram)")
    p.add_argument("--diagram", metavar="PATH", help="write the path diagram as SVG (or PNG when PATH ends in .png and a converter is installed)")
    p.add_argument("--dpi", type=int, default=300, help="resolution of pictures (PNG diagram, Word figure; default 300)")
    p.add_argument("--tables", metavar="FOLDER", help="write every table as CSV and as LaTeX (booktabs) into FOLDER")
    p.add_argument("--information", choices=Information.words(), default=None,
                   help="information matrix for standard errors (default: expected; full-information ML uses observed)")
    p.add_argument("--mi-threshold", type=float, default=3.84, metavar="X",
                   help="show modification indices of at least X (default 3.84)")
    p.add_argument("--mi-top", type=int, default=None, metavar="N", help="show at most N modification indices")
    p.add_argument("--max-iterations", type=int, default=500, metavar="N", help="iteration limit of the estimation (default 500)")
    _add_test_option(p)
    _add_ordinal_options(p)
    p.add_argument("--missing", choices=MissingData.words(), default=None,
                   help="rows with missing answers: used by full-information ML (the default when a model variable has "
                        "gaps) or left out (listwise)")


def _add_ordinal_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--ordinal", metavar="ITEMS",
                   help="'all' or comma-separated items to treat as ordinal (thresholds and polychoric correlations)")
    p.add_argument("--ordinal-estimator", choices=Weighting.words(), default=None,
                   help="least squares for ordinal items (default diagonally-weighted)")


def _decision_rules():
    from cfa_tool.workflows.invariance import DecisionRule

    return DecisionRule


def _version() -> str:
    from cfa_tool.version import __version__

    return f"{PROG} {__version__}"


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    argv = list(sys.argv[1:] if argv is None else argv)
    for k, arg in enumerate(argv[:-1]):  # '--missing-codes -99,999': a value that starts with '-'
        if arg == "--missing-codes" and argv[k + 1].startswith("-"):
            argv[k : k + 2] = [f"{arg}={argv[k + 1]}"]
            break
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return 2
    try:
        with warnings.catch_warnings(), np_quiet():
            # the report says what went wrong in its own words; library warnings would only print before it
            warnings.simplefilter("ignore")
            return _run(args)
    except CfaError as exc:
        _report_error(exc)
        return exc.exit_code
    except KeyboardInterrupt:
        print(f"{PROG}: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:  # a bug in the tool, not the user's fault
        if os.environ.get("CFA_TOOL_DEBUG"):
            raise
        print(f"{PROG}: internal error: {type(exc).__name__}: {printable(str(exc)[:300])} (please report this; set "
              f"CFA_TOOL_DEBUG=1 for details)", file=sys.stderr)
        return 1


def np_quiet():
    """numpy's floating-point warnings off for the run (numpy is imported only when needed)."""
    if "numpy" not in sys.modules:
        try:
            import numpy
        except ImportError:  # pragma: no cover - a declared dependency
            return contextlib.nullcontext()
    import numpy

    return numpy.errstate(all="ignore")


def _report_error(exc: CfaError) -> None:
    """One line (control characters from names and values shown escaped, so nothing in a user's
    file can split the line or reach the terminal), plus the model line with a caret."""
    if isinstance(exc, ModelError):
        print(f"{PROG}: {printable(exc.one_line())}", file=sys.stderr)
        excerpt = exc.excerpt()
        if excerpt:
            print(excerpt, file=sys.stderr)
    else:
        print(f"{PROG}: {printable(exc)}", file=sys.stderr)


def _run(args: argparse.Namespace) -> int:
    from cfa_tool import commands

    if commands.handles(args.command):
        return commands.run(args)
    if args.command == "demo":
        from cfa_tool.resources import resource_dir

        args.group = args.reference_group = args.sheet = None
        args.missing_codes, args.keep = (), []
        args.model = str(resource_dir("models") / "rider_three_factors.cfa")
        args.data = str(resource_dir("demo") / "rider_survey.csv")
    _check_output(args, _inputs(args))
    # model files are paths, never model text (cfa_tool.pipeline.inputs.load_spec reads a Path as a file)
    if getattr(args, "model", None):
        args.model = Path(args.model)
    if getattr(args, "models", None):
        args.models = [Path(m) for m in args.models]
    if args.command == "check":
        from cfa_tool.pipeline.inputs import check

        found = check(args.model, args.data, group=args.group, sheet=args.sheet, missing_codes=args.missing_codes,
                      keep=args.keep)
        print(printable(found.summary(), keep_newlines=True))
        return 0
    if args.command == "demo":
        return _fit_and_report(args, args.model, args.data)
    if args.command == "compare":
        from cfa_tool.reporting.workflow_text import render_comparison
        from cfa_tool.workflows.compare import compare

        result = compare(args.models, args.data, group=args.group, reference_group=args.reference_group, test=args.test,
                         sheet=args.sheet, missing_codes=args.missing_codes, keep=args.keep,
                         ordinal=_ordinal_arg(args.ordinal), ordinal_estimator=args.ordinal_estimator)
        return _emit(args, result, render_comparison)
    if args.command == "invariance":
        from cfa_tool.reporting.workflow_text import render_invariance
        from cfa_tool.workflows.invariance import invariance

        result = invariance(args.model, args.data, args.group, reference_group=args.reference_group,
                            partial=args.partial, alpha=args.alpha, decide_by=args.decide_by, sheet=args.sheet,
                            missing_codes=args.missing_codes,
                            keep=args.keep, ordinal=_ordinal_arg(args.ordinal), ordinal_estimator=args.ordinal_estimator)
        return _emit(args, result, render_invariance)
    if args.command == "replicate":
        return _replicate(args)
    if args.command in ("bootstrap", "power", "power-simulation", "simulate", "cutoffs"):
        return _simulation_command(args)
    return _fit_and_report(args, args.model, args.data)


def _replicate(args: argparse.Namespace) -> int:
    from cfa_tool.reporting.workflow_text import render_replication
    from cfa_tool.workflows.replication import replicate, split_half

    if args.data and (args.calibration or args.validation):
        raise OptionError("give either --data (split-half) or --calibration and --validation, not both")
    if args.data:
        pair = split_half(args.model, args.data, seed=args.seed)
    elif args.calibration and args.validation:
        pair = (replicate(args.model, args.calibration, args.validation),)
    else:
        raise OptionError("give --calibration and --validation files, or --data FILE to split one data set in two halves")

    return _emit(args, _Replications(pair), lambda _, console: render_replication(pair, console))


class _Replications(tuple):
    def to_dict(self) -> dict:
        return {"replications": [r.to_dict() for r in self]}


def _simulation_command(args: argparse.Namespace) -> int:
    from cfa_tool.reporting import workflow_text as W

    if args.command == "power":
        from cfa_tool.workflows.power import model_degrees_of_freedom, plan

        df = args.df
        if args.model and args.df is not None:
            raise OptionError("give a model file or --df, not both (the model file gives the degrees of freedom)")
        variables = None
        if args.model:
            from cfa_tool.language.parser import read_model_file

            df, variables = model_degrees_of_freedom(read_model_file(args.model))
        if df is None:
            raise OptionError("give a model file or --df")
        return _emit(args, plan(df, args.test, args.n, args.alpha, args.target, variables=variables), W.render_power)
    from cfa_tool.language.parser import read_model_file

    if args.command == "simulate":
        from cfa_tool.workflows.simulation import simulate

        from cfa_tool.output_files import write_file

        simulated = simulate(read_model_file(args.model), args.n, args.seed, args.categories, args.missing,
                             args.population_from)
        frame = simulated.frame
        if not args._stdout_taken:
            W.render_population(simulated, _console())
        if args.json:
            from cfa_tool.reporting.json_report import to_json

            write_file(args._targets["--json"], to_json(simulated))
        from cfa_tool.reporting.text_formats import csv_cell

        guarded = frame.set_axis([csv_cell(c) for c in frame.columns], axis=1)  # a name spreadsheets would run
        write_file(args._targets["--output"], guarded.to_csv(index=False, na_rep=""))
        _say(args, f"{len(frame)} rows of {frame.shape[1]} variables written to {args.output} (seed {args.seed})")
        return 0
    with _progress(args.command) as advance:
        if args.command == "power-simulation":
            from cfa_tool.workflows.montecarlo import monte_carlo_power

            result = monte_carlo_power(read_model_file(args.model), args.n, args.replications, args.seed, args.alpha,
                                       args.workers, args.cluster, advance, args.population_from)
            render = W.render_montecarlo
        elif args.command == "bootstrap":
            from cfa_tool.workflows.bootstrap import bootstrap

            result = _Pair(bootstrap(args.model, args.data, args.replications, args.seed, workers=args.workers,
                                     cluster=args.cluster, progress=advance, sheet=args.sheet,
                                     missing_codes=args.missing_codes, keep=args.keep))
            render = W.render_bootstrap
        else:
            from cfa_tool.workflows.cutoffs import cutoffs

            result = _Pair(cutoffs(args.model, args.data, args.replications, args.seed, args.workers, args.cluster,
                                   advance, sheet=args.sheet, missing_codes=args.missing_codes, keep=args.keep))
            render = W.render_cutoffs
    return _emit(args, result, render)


class _Pair(tuple):
    """(fit, workflow result) pairs: JSON holds the workflow result beside the fit."""

    def __new__(cls, pair):
        return super().__new__(cls, pair)

    def to_dict(self) -> dict:
        fit, other = self
        return {"fit": fit.to_dict(), "result": other.to_dict()}


def _progress(label: str):
    """A progress bar on standard error when it is a terminal (count done of the count announced,
    percentage, time remaining); otherwise silence."""
    if not sys.stderr.isatty():
        return contextlib.nullcontext(None)
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TaskProgressColumn, TextColumn, TimeRemainingColumn

    @contextlib.contextmanager
    def bar():
        columns = (TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(), TaskProgressColumn(),
                   TextColumn("remaining"), TimeRemainingColumn())
        with Progress(*columns, transient=True, console=Console(stderr=True)) as progress:
            task = progress.add_task(label, total=0)

            def advance(done: int, more: int = 0) -> None:
                if more:
                    progress.update(task, total=progress.tasks[0].total + more)
                if done:
                    progress.advance(task, done)

            yield advance

    return bar()


def _ordinal_arg(text: str | None):
    if text is None:
        return None
    if not text.strip(" ,"):
        raise OptionError("--ordinal names no items: give 'all' or item names separated by commas")
    return "all" if text.strip() == "all" else [t.strip() for t in text.split(",") if t.strip()]


REPORT_FILES = (("--json", "json"), ("--html", "html"), ("--markdown", "markdown"), ("--docx", "docx"),
                ("--diagram", "diagram"), ("--output", "output"))
DIAGRAM_SUFFIXES = (".svg", ".png")


def _inputs(args: argparse.Namespace) -> list[str]:
    """Every file the command reads: models, data, calibration and validation files."""
    names = [getattr(args, "model", None), *(getattr(args, "models", None) or ()),
             getattr(args, "data", None), getattr(args, "calibration", None), getattr(args, "validation", None),
             getattr(args, "population_from", None)]
    return [n for n in names if n]


def _check_output(args: argparse.Namespace, inputs: list[str]) -> dict:
    """Every output of the run checked before any work (see cfa_tool.output_files)."""
    from cfa_tool.commands.common import require_suffix
    from cfa_tool.output_files import check_outputs
    from cfa_tool.reporting.picture import png_converter, require_png_converter

    diagram = getattr(args, "diagram", None)
    if diagram and diagram != "-" and Path(diagram).suffix.lower() not in DIAGRAM_SUFFIXES:
        raise OptionError(f"--diagram: '{diagram}' must end in .svg or .png (the two formats the diagram is written in)")
    output = getattr(args, "output", None)
    require_suffix("--output", output, ".csv", "the simulated rows")
    outputs = [(option, getattr(args, attr, None)) for option, attr in REPORT_FILES]
    targets = check_outputs(outputs, inputs, [("--tables", getattr(args, "tables", None))])
    if output and "--output" in targets:  # rows of data: an existing file (perhaps someone's data) is never replaced
        from cfa_tool.output_files import check_new_file

        targets["--output"] = check_new_file(targets["--output"])
    if diagram and diagram.lower().endswith(".png"):
        require_png_converter()
    if getattr(args, "dpi", None) is not None:
        from cfa_tool import options as check

        args.dpi = check.whole_number("--dpi", args.dpi, 72, 1200)
    if getattr(args, "docx", None) and png_converter() is None:  # said before the work, not after
        from cfa_tool.reporting.docx_report import NO_PICTURE

        print(f"cfa-tool: note: {NO_PICTURE}", file=sys.stderr)
    args._targets = targets
    args._stdout_taken = any(t.is_stdout for t in targets.values())
    return targets


def _say(args: argparse.Namespace, text: str) -> None:
    """A line about files written: on standard output, or on standard error when standard output
    carries one of the outputs (JSON, a report or the simulated rows)."""
    print(printable(text), file=sys.stderr if getattr(args, "_stdout_taken", False) else sys.stdout)


def _report_files(args: argparse.Namespace, result) -> list[tuple[str, object, str]]:
    """(option, content, message) of every report file asked for, made before anything is written."""
    from cfa_tool.reporting.picture import svg_to_png
    files: list[tuple[str, object, str]] = []
    if getattr(args, "json", None):
        from cfa_tool.reporting.json_report import to_json

        files.append(("--json", to_json(result), f"JSON result written to {args.json}"))
    if getattr(args, "html", None):
        from cfa_tool.reporting.html_report import html_report

        files.append(("--html", html_report(result), f"HTML report written to {args.html}"))
    if getattr(args, "markdown", None):
        from cfa_tool.reporting.text_formats import markdown_report

        files.append(("--markdown", markdown_report(result), f"Markdown report written to {args.markdown}"))
    if getattr(args, "docx", None):
        from cfa_tool.reporting.docx_report import docx_report

        files.append(("--docx", docx_report(result, args.dpi), f"Word report written to {args.docx}"))
    if getattr(args, "diagram", None):
        from cfa_tool.reporting.diagram import path_diagram

        svg = path_diagram(result, legend=True)
        content = svg_to_png(svg, args.dpi) if args.diagram.lower().endswith(".png") else svg
        files.append(("--diagram", content, f"Path diagram written to {args.diagram}"))
    return files


def _table_files(args: argparse.Namespace, result) -> dict[str, str]:
    if not getattr(args, "tables", None):
        return {}
    from cfa_tool.reporting import tables as T
    from cfa_tool.reporting.text_formats import all_tables, csv_table, latex_table

    files = {}
    problems = T.problem_table(result) if hasattr(result, "problems") else None
    for table in ([problems] if problems is not None else []) + all_tables(result):
        files[f"{table.key}.csv"] = csv_table(table)
        files[f"{table.key}.tex"] = latex_table(table)
    return files


def _emit(args: argparse.Namespace, result, render) -> int:
    """Make every output, check that each can be written, then show the report and write them."""
    from cfa_tool.output_files import check_table_folder, write_file, write_table_folder

    files = _report_files(args, result)
    tables = _table_files(args, result)
    if tables:
        check_table_folder("--tables", args.tables, tables, _inputs(args))
    if not args._stdout_taken:  # otherwise standard output carries that output alone
        render(result, _console())
    for option, content, message in files:
        write_file(args._targets[option], content)
        if not args._targets[option].is_stdout:
            _say(args, message)
    if tables:
        write_table_folder("--tables", args.tables, tables, _inputs(args))
        _say(args, f"Tables written to {args.tables}/ as CSV and LaTeX")
    return 0


def _console():
    from cfa_tool.reporting.terminal import SafeConsole

    console = SafeConsole(highlight=False, markup=False, emoji=False)
    return console


def _fit_and_report(args: argparse.Namespace, model: str, data: str) -> int:
    from cfa_tool.pipeline.inputs import fit
    from cfa_tool.reporting.terminal import render

    result = fit(model, data, group=args.group, reference_group=args.reference_group, sheet=args.sheet,
                 missing_codes=args.missing_codes, keep=args.keep, information=args.information,
                 mi_threshold=args.mi_threshold, mi_top=args.mi_top, max_iterations=args.max_iterations, test=args.test,
                 missing=args.missing, ordinal=_ordinal_arg(args.ordinal), ordinal_estimator=args.ordinal_estimator,
                 id_column=getattr(args, "id", None))
    return _emit(args, result, render)  # a model that does not converge raises EstimationError (exit 3)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
