"""Options that several commands share, each declared once: which rows and columns, groups, the robust
switch, the sampling design, ordinal items, repetitions, and the options of earlier versions (one-line
errors that show the option to use now)."""

from __future__ import annotations

import argparse

from cfa_tool.errors import OptionError
from cfa_tool.method import FitTest, MissingData, Weighting
from cfa_tool.options import NAMING, Option


class Renamed(argparse.Action):
    """An option of an earlier version: a one-line error that shows the option to use now."""

    def __init__(self, option_strings, dest, now: str = "", **kwargs):
        self.now = now
        super().__init__(option_strings, dest, nargs="?", help=argparse.SUPPRESS, **kwargs)

    def __call__(self, parser, namespace, values, option_string=None):
        parser.error(f"{option_string} is no longer an option; {self.now}")


def add_renamed(p: argparse.ArgumentParser, option: str, now: str) -> None:
    p.add_argument(option, action=Renamed, dest=f"_renamed_{option.strip('-')}", now=now)


def add_model_and_data(p: argparse.ArgumentParser, data_help: str = "data file") -> None:
    p.add_argument("model", metavar="MODEL", help="model file")
    p.add_argument("--data", required=True, metavar="FILE", help=data_help)


def add_data_options(p: argparse.ArgumentParser, filters: bool = True) -> None:
    """--sheet, --missing-codes and (``filters``) --keep and --half: every command that selects rows can analyse one
    half of a halves file (new-user trial s17: only fit and check took --half, so a rival model was compared on
    every row, the exploration half included)."""
    p.add_argument("--sheet", metavar="NAME", help="sheet of an Excel workbook (default: the first)")
    p.add_argument("--names-row", metavar="N", type=row_number, default=None,
                   help="the row (of a sheet, or of a text file as a spreadsheet shows it) that holds the column "
                        "names, when rows above it hold other headings such as question texts; those rows are not "
                        "read (default: the first row with values)")
    p.add_argument("--first-data-row", metavar="N", type=first_row_of_data, default=None,
                   help="the row (of a sheet, or of a text file as a spreadsheet shows it) where the answers start, "
                        "when rows between it and the column names hold other headings such as question texts; those "
                        "rows are not read (default: the row under the column names)")
    p.add_argument("--missing-codes", metavar="LIST", type=_codes, default=(),
                   help="comma-separated values that mean 'no answer' in the model's items: numbers (codes), e.g. "
                        "-99,999, and words, e.g. '-99,Ne sait pas', read as no answer, counted and named as the words "
                        "the tool knows (refused, don't know, N/A) are; a word that holds a comma goes in double "
                        "quotes: '-99,\"No, not asked\"'")
    p.add_argument("--rename", metavar="OLD=NEW", action="append", default=[],
                   help="read the column OLD of the data file under the name NEW, e.g. SL3r=SL3_r, before anything "
                        "else looks at the names (the model and every option that names a column); several "
                        "separated by commas, or the option repeated; every report says so")
    if filters:
        p.add_argument("--keep", metavar="FILTER", action="append", default=[],
                       help="keep only rows that meet COLUMN OPERATOR VALUE, e.g. 'district = north', or whose value is "
                            "one of a list, or none of it: 'district in north, south', 'id not in R0601, R0602' "
                            "(a value that holds a comma in double quotes); repeatable")
        from cfa_tool.commands.common import add_half_option

        add_half_option(p)


def add_id_option(p: argparse.ArgumentParser) -> None:
    """--id, the one definition for every command that reads rows of data (fit, check, compare, invariance,
    replicate, scores, bootstrap, cutoffs, align, explore; new-user trial s19: most of them took none, so their
    cautions named row numbers only).  One rule: every such command names rows in its caution about copies of
    earlier rows (pipeline.inputs.copied_row_problems), whatever its model and items, so the option always applies
    there (a fit of ordinal items too, which refused it until s20 for want of case tables)."""
    p.add_argument("--id", metavar="COLUMN",
                   help="column that names each row (never analysed): the cautions about rows (one answer throughout, "
                        "copies of earlier rows) and the case tables show it beside the row number, and their advice "
                        "writes the row filter that leaves those rows out by it; a scores file writes it first. "
                        "Default: the file's row names, when its first header cell is empty")


def row_number(text: str) -> int:
    return _row_of_file(text, 1, "the row of column names must be a row number (1 or more)")


def first_row_of_data(text: str) -> int:
    return _row_of_file(text, 2, "the first row of data must be a row number (2 or more: the column names are above it)")


def _row_of_file(text: str, least: int, what: str) -> int:
    """A row number of a data file typed as an option's value, at least ``least``; ``what``: the message otherwise."""
    try:
        value = int(text)
    except ValueError:
        value = 0
    if value < least or not text.strip().isdigit():
        raise argparse.ArgumentTypeError(f"{what}, not '{text}'")
    return value


def _codes(text: str) -> tuple[float | str, ...]:
    """--missing-codes split at its commas (a value in double quotes may hold commas, as in a CSV line): each value a
    number (a code) or a word, which must hold a letter (a mistyped number such as '9 9' is an error), by the rule
    Python's ``missing_codes=`` follows too (data.missing_codes.missing_value)."""
    import csv

    from cfa_tool.data.missing_codes import missing_value

    values = [v.strip() for v in next(csv.reader([text], skipinitialspace=True), []) if v.strip()]
    codes, wrong = [], []
    for v in values:
        try:
            codes.append(missing_value(v))
        except ValueError as error:  # the one rule's words: neither a number nor a word, or NaN
            wrong.append(str(error))
    if not codes or wrong:
        raise argparse.ArgumentTypeError(
            f"missing codes must be numbers or words separated by commas, not '{text}'"
            + (f" ({wrong[0]})" if wrong else "")
            + "; a word that holds a comma goes in double quotes")
    return tuple(codes)


def no_answer_words(args: argparse.Namespace) -> tuple[str, ...]:
    """The words given with --missing-codes ('Ne sait pas'), which the run reads as no answer beside the words the
    tool knows (data.non_answers.also_no_answer); the numbers are codes (:func:`reading_args`)."""
    return tuple(v for v in getattr(args, "missing_codes", ()) if isinstance(v, str))


#: the attributes of the parsed arguments of the options that name columns, groups or words of the data
#: (options.NAMING, declared once for the command line and Python alike): each keyword's attribute, '--id' aside
NAMING_OPTIONS = tuple({Option.ID_COLUMN: "id"}.get(o, o.keyword) for o in NAMING)


def composed_names(args: argparse.Namespace) -> argparse.Namespace:
    """Every option of ``args`` that names a column, a group or a word of the data (:data:`NAMING_OPTIONS`:
    --group-column, --id, --keep, --weights, --cluster, --strata, --items, --ordinal, the words of --missing-codes, ...)
    in Unicode's composed form, by the one rule of names (language.names.composed_value, which the Python API's
    keywords follow too) by which the data's column names and the model's are read: a name typed or pasted with
    decomposed accents ('cafe' + U+0301, as some systems write it) is the column written composed (s23: refused with
    a 'did you mean' that showed the same-looking name).  The one place the command line reads them, for every
    command (commands.run)."""
    from cfa_tool.language.names import composed_value

    for name in NAMING_OPTIONS:
        if getattr(args, name, None) is not None:
            setattr(args, name, composed_value(getattr(args, name)))
    return args


GROUP_NOW = "name the column whose values are the groups with --group-column COLUMN"
#: the default reference group in --help, as data.groups.default_reference chooses it
DEFAULT_REFERENCE = ("a categorical column's first category; of codes with value labels, the lowest code's group; "
                     "otherwise the first label in sorted order, numbers by value")


def add_group_options(p: argparse.ArgumentParser, required: bool) -> None:
    p.add_argument("--group-column", dest="group", required=required, metavar="COLUMN",
                   help="column whose values name the groups: the model is fitted in every group at once, with intercepts "
                        "and factor means")
    add_renamed(p, "--group", GROUP_NOW)
    p.add_argument("--reference-group", metavar="LABEL",
                   help=f"group whose factor means are fixed at zero (default: {DEFAULT_REFERENCE})")


def add_test_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--robust", action="store_true",
                   help="for answers that are not normally distributed: a scaled chi-square, robust standard errors and "
                        "robust fit indices (Satorra-Bentler with complete rows, Yuan-Bentler when full-information ML "
                        "keeps rows with gaps; the report names the one used)")
    add_renamed(p, "--test", "for robust standard errors and a scaled test give --robust (the method follows from the "
                              "data and is named in the report)")


def fit_test(args: argparse.Namespace) -> FitTest | None:
    """The test the command line asks for: a robust one with --robust, else None (not chosen: the normal-theory test,
    or under a sampling design the design-based scaled one; pipeline.inputs.design_test)."""
    return FitTest.ROBUST if args.robust else None


def add_resampling_parser(sub, name: str, help_text: str, replications: int, what: str) -> argparse.ArgumentParser:
    p = sub.add_parser(name, help=help_text)
    add_model_and_data(p)
    add_data_options(p)
    add_id_option(p)
    p.add_argument("--replications", type=int, default=replications, help=f"{what} (default {replications})")
    add_run_options(p)
    return p


def add_design_options(p: argparse.ArgumentParser, what: str = "") -> None:
    """The sampling design: weights, clusters and strata (cfa_tool.data.sample_design); ``what`` says what the
    command does with it (in the help of --weights)."""
    from cfa_tool.method import WeightKind

    p.add_argument("--weights", metavar="COLUMN", help="column of sampling weights (rescaled to sum to the rows; "
                   "sandwich standard errors and a scaled test), or of frequency weights with --weight-kind frequency"
                   + (f"; with --cluster and --strata, {what}" if what else ""))
    p.add_argument("--weight-kind", choices=WeightKind.words(), default=None,
                   help="'sampling' (default) or 'frequency': each row counts as often as its weight says")
    p.add_argument("--cluster", metavar="COLUMN", help="column naming each row's cluster (school, clinic, firm): "
                   "cluster-robust standard errors and test")
    p.add_argument("--strata", metavar="COLUMN", help="column naming each row's stratum (clusters nested in strata)")


class CannotApply(argparse.Action):
    """An option that cannot apply to a command: a one-line error that says why (never silently ignored)."""

    def __init__(self, option_strings, dest, why: str = "", **kwargs):
        self.why = why
        super().__init__(option_strings, dest, help=argparse.SUPPRESS, **kwargs)

    def __call__(self, parser, namespace, values, option_string=None):
        parser.error(f"{option_string} cannot apply: {self.why}")


def refuse_design_options(p: argparse.ArgumentParser, why: str,
                          options: tuple[str, ...] = ("--weights", "--weight-kind", "--cluster", "--strata")) -> None:
    """The sampling design's ``options`` on a command to which they cannot apply: each an error saying ``why``."""
    for option in options:
        p.add_argument(option, action=CannotApply, dest=f"_refused_{option.strip('-').replace('-', '_')}", why=why)


def design_args(args: argparse.Namespace) -> dict:
    return {"weights": args.weights, "weight_kind": args.weight_kind, "cluster": args.cluster, "strata": args.strata}


#: the reading options (:func:`add_data_options`) as the workflows' keywords, each with its value when not given
READING_DEFAULTS = {"sheet": None, "names_row": None, "first_data_row": None, "missing_codes": (), "keep": [],
                    "rename": []}


def reading_args(args: argparse.Namespace) -> dict:
    """How the command line asks the data file to be read, as the workflows' keywords: the sheet, the rows of names
    and of the first data, the missing-value codes, the renamed columns and the rows kept (the --keep filters, then
    the half of --half: commands.common.kept_rows); of --missing-codes the numbers (its words:
    :func:`no_answer_words`).  A command without these options (demo) reads with the
    :data:`READING_DEFAULTS`."""
    from cfa_tool.commands.common import kept_rows

    given = {name: getattr(args, name, default) for name, default in READING_DEFAULTS.items()}
    codes = tuple(v for v in given["missing_codes"] if not isinstance(v, str))  # the words: no_answer_words
    return given | {"missing_codes": codes, "keep": kept_rows(args)}


def reading_words(args: argparse.Namespace) -> str:
    """How the command line asked the data file to be read, as options to type again (Option.given, with a space
    before each): --sheet, --names-row, --first-data-row, --missing-codes, --rename and --keep, so that a command
    the report prints for the same file reads it as this run did (hostile s20: explore's follow-up fit command
    carried --keep only, and run as shown read the missing codes as answers, silently)."""
    from cfa_tool.numbers import user_number
    from cfa_tool.options import Option

    def code(value) -> str:
        if isinstance(value, str):
            return f'"{value}"' if "," in value else value
        return user_number(value)

    codes = getattr(args, "missing_codes", ())
    given = ((Option.SHEET, getattr(args, "sheet", None)), (Option.NAMES_ROW, getattr(args, "names_row", None)),
             (Option.FIRST_DATA_ROW, getattr(args, "first_data_row", None)),
             (Option.MISSING_CODES, ",".join(code(v) for v in codes) if codes else None),
             (Option.RENAME, getattr(args, "rename", None) or None), (Option.KEEP, getattr(args, "keep", None) or None))
    return "".join(f" {option.given(value)}" for option, value in given if value is not None)


#: replicate's options that read the --validation file, each with the option that reads --data instead
VALIDATION_READING = (("validation_names_row", "--validation-names-row", "names the row of column names of",
                       "the row of --data is given with --names-row"),
                      ("validation_sheet", "--validation-sheet", "names the sheet of",
                       "the sheet of --data is given with --sheet"),
                      ("validation_rename", "--validation-rename", "renames columns of",
                       "the columns of --data are renamed with --rename"),
                      ("validation_first_data_row", "--validation-first-data-row", "names the first row of data of",
                       "that of --data is given with --first-data-row"))


def refuse_validation_reading(args: argparse.Namespace) -> None:
    """replicate's options that read the --validation file, given without one: an error naming the option to use."""
    for dest, option, does, instead in VALIDATION_READING:
        if getattr(args, dest) not in (None, []) and not args.validation:
            raise OptionError(f"{option} {does} the --validation file, and no --validation file is given; {instead}")


#: the commands that carry missing-data helpers (auxiliary variables) into their fits
MISSING_HELPERS_COMMANDS = frozenset({"fit"})


def refuse_missing_helpers(sub) -> None:
    """--missing-helpers (auxiliary variables in the full-information likelihood) on every command of ``sub`` (the
    subparsers) that does not carry them into its fits (:data:`MISSING_HELPERS_COMMANDS`): a one-line error, never
    ignored."""
    for name, parser in sub.choices.items():
        if name not in MISSING_HELPERS_COMMANDS:
            parser.add_argument("--missing-helpers", action=CannotApply, dest="_refused_missing_helpers",
                                why="missing-data helpers (auxiliary variables) are offered by fit only so far")


def add_halves_design_options(p: argparse.ArgumentParser, split: str, same: str = "") -> None:
    """--cluster and --strata of a command that splits its rows into random halves by the option ``split`` (replicate
    --data, explore --split): the halves drawn by the one rule of every split (data.halves.drawn_halves); ``same``:
    words after the cluster's help ('as replicate --data draws them')."""
    p.add_argument("--cluster", metavar="COLUMN",
                   help=f"with {split}: column naming each row's cluster (household, school); the halves are drawn "
                        f"cluster by cluster, every row of a cluster in one half{same}")
    p.add_argument("--strata", metavar="COLUMN",
                   help=f"with {split}: column naming each row's stratum; the halves are drawn within each stratum "
                        f"(its clusters with --cluster, else its rows)")


def add_run_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--seed", type=int, default=1, help="random seed (default 1); the same seed gives the same result")
    p.add_argument("--workers", type=int, help="local processes (default: one per core)")
    p.add_argument("--scheduler", metavar="ADDRESS", help="Dask scheduler to run on, e.g. tcp://host:8786")
    from cfa_tool.commands.common import add_report_options

    add_report_options(p)


#: where the refits of a command use the complete rows only
REFITS_AS_THE_FIT = "; every refit treats the rows as the fit does"


def add_incomplete_rows_option(p: argparse.ArgumentParser, where: str = "") -> None:
    p.add_argument("--incomplete-rows", dest="missing", choices=MissingData.words(), default=None,
                   help="rows with some answers missing: kept and used by full-information ML (the default for "
                        "continuous items when a model variable has gaps; ordinal items keep them by default through "
                        "pairwise present rows, each correlation from the rows that answered both items) or left out "
                        f"(listwise){where}")
    add_renamed(p, "--missing", "choose what happens to rows with gaps with --incomplete-rows "
                                 + "|".join(MissingData.words()))


def add_max_iterations_option(p: argparse.ArgumentParser, which: str = "") -> None:
    """--max-iterations, declared once for every command that fits a model to data (options.TAKEN_BY's list): a
    search that stops at the limit advises raising it (assessment.convergence, by options.Option.MAX_ITERATIONS), so
    every command that can show that advice takes the option (s28: compare, invariance, replicate, bootstrap and
    cutoffs advised it and refused it).  ``which``: the fits it limits, where not every fit of the command
    ('of the fit to the data')."""
    from cfa_tool.options import ITERATION_LIMIT

    p.add_argument("--max-iterations", type=int, default=ITERATION_LIMIT, metavar="N",
                   help=f"iteration limit of the estimation{which} (default {ITERATION_LIMIT}); raise it when a search "
                        f"stops at the limit")


def max_iterations_arg(args: argparse.Namespace) -> dict:
    """--max-iterations as the workflows' keyword."""
    return {"max_iterations": args.max_iterations}


def add_ordinal_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--ordinal", metavar="ITEMS",
                   help="'all' or comma-separated items to treat as ordinal (thresholds and polychoric correlations); "
                        "a range item1..item9 names the items it counts, as in a model file")
    add_ordinal_estimator_option(p)


def add_ordinal_estimator_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--ordinal-estimator", choices=Weighting.words(), default=None,
                   help="least squares for ordinal items (default diagonally-weighted)")


def ordinal_arg(text: str | None):
    if text is None:
        return None
    if not text.strip(" ,"):
        raise OptionError("--ordinal names no items: give 'all' or item names separated by commas")
    if text.strip() == "all":
        return "all"
    from cfa_tool.language.names import read_name_list

    names = []  # a range 'item1..item9' stays as it is written, for the commands to count (language.names.ordinal_names)
    for raw, ends in read_name_list(text, "--ordinal"):
        name = raw if raw is not None else "..".join(ends)
        if name.strip() if raw is not None else name:
            names.append(name)
    return names
