"""Checks of numeric (and column-name) options, shared by the Python API and the command line.

Each function returns the value in its proper type or raises :class:`OptionError` with one
sentence that names the option, the allowed range and the value given.  Library entry
points call them, so a value is checked once, wherever it comes from.
"""

from __future__ import annotations

import contextlib
import contextvars
import enum
import math
import numbers
import re
from collections.abc import Iterator

from cfa_tool.errors import OptionError, clipped

#: Upper limits that keep a run within reach of one computer; far above real use.
MAX_REPLICATIONS = 1_000_000
MAX_WORKERS = 1_024
MAX_SEED = 2**63 - 1
MAX_OBSERVATIONS = 10**12
MAX_ITERATIONS = 1_000_000
#: the iteration limit of a model's estimation when none is given (fit options' and the command line's default)
ITERATION_LIMIT = 500
MAX_SIMULATED_CELLS = 100_000_000  # rows x variables of simulated data held in memory
MAX_CATEGORIES = 100


def _shown(value: object) -> str:
    return clipped(repr(value) if isinstance(value, str) else value, 40)


def choice(kind, value: object, name: str):
    """A member of the enumeration ``kind``, given as the member or as its value (the word users type);
    anything else is an OptionError naming the words that are allowed."""
    if isinstance(value, kind):
        return value
    try:
        return kind(value)
    except (ValueError, TypeError):
        raise OptionError(f"{name} must be one of {', '.join(str(m.value) for m in kind)}, not {_shown(value)}") from None


def yes_or_no(name: str, value: object, unset: bool = False) -> bool | None:
    """True or False (numpy's booleans too), or None where ``unset`` allows it (the tool's choice); anything else,
    'no' or 0 among them, an OptionError (hostile s24: diagnostics='no' was read as true)."""
    if value is None and unset:
        return None
    if isinstance(value, bool) or (getattr(value, "dtype", None) is not None and value.dtype.kind == "b"
                                   and getattr(value, "ndim", None) == 0):  # numpy's bool, without importing numpy
        return bool(value)
    raise OptionError(f"{name} must be True or False{' (or None)' if unset else ''}, not {_shown(value)}")


def whole_number(name: str, value: object, minimum: int, maximum: int | None = None) -> int:
    """An integer (or a float with no fractional part) within [minimum, maximum]."""
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise OptionError(f"{name} must be a whole number, not {_shown(value)}")
    if isinstance(value, numbers.Integral):
        number = int(value)
    else:
        as_float = float(value)
        if not math.isfinite(as_float) or as_float != int(as_float):
            raise OptionError(f"{name} must be a whole number, not {_shown(value)}")
        number = int(as_float)
    if number < minimum:
        raise OptionError(f"{name} must be at least {minimum:,}, not {_shown(value)}")
    if maximum is not None and number > maximum:
        raise OptionError(f"{name} must be at most {maximum:,}, not {_shown(value)}")
    return number


def real_number(name: str, value: object, minimum: float | None = None, maximum: float | None = None,
                open_low: bool = False, open_high: bool = False) -> float:
    """A finite number within the given bounds (open or closed)."""
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise OptionError(f"{name} must be a number, not {_shown(value)}")
    number = float(value)
    if not math.isfinite(number):
        raise OptionError(f"{name} must be a finite number, not {_shown(value)}")
    if minimum is not None and (number < minimum or (open_low and number == minimum)):
        raise OptionError(f"{name} must be {'above' if open_low else 'at least'} {minimum:g}, not {_shown(value)}")
    if maximum is not None and (number > maximum or (open_high and number == maximum)):
        raise OptionError(f"{name} must be {'below' if open_high else 'at most'} {maximum:g}, not {_shown(value)}")
    return number + 0.0  # -0 is 0 ('at least -0' in a table's title; hostile trial s18)


def probability(name: str, value: object) -> float:
    """A level or a power: strictly between 0 and 1."""
    return real_number(name, value, 0.0, 1.0, open_low=True, open_high=True)


def seed(value: object) -> int:
    return whole_number("the seed", value, 0, MAX_SEED)


def replications(value: object, minimum: int = 1) -> int:
    return whole_number("the number of replications", value, minimum, MAX_REPLICATIONS)


def workers(value: object, scheduler: object = None) -> int | None:
    """Local worker processes; None means one per core.  Given beside a Dask ``scheduler`` they cannot apply (the
    scheduler's own workers run the tasks): an OptionError naming both (hostile trial s25, finding 8: --workers 2
    beside --scheduler was accepted and ignored by cutoffs, bootstrap and power-simulation)."""
    if value is not None and scheduler:
        raise OptionError(f"{Option.WORKERS} and {Option.SCHEDULER} cannot be given together: with a scheduler its own "
                          f"workers run the tasks, so the local processes of {Option.WORKERS} would not be used; "
                          f"give one of them")
    return None if value is None else whole_number("the number of workers", value, 1, MAX_WORKERS)


def observations(value: object, name: str = "the number of observations", minimum: int = 1) -> int:
    return whole_number(name, value, minimum, MAX_OBSERVATIONS)


def sample_sizes(value: object, name: str = "the sample size") -> tuple[int, ...]:
    """One sample size or several: a whole number, a list of them, or text such as '100,200,400'
    (each at least 1, none repeated), from the smallest to the largest whatever the order typed (a table of power
    by sample size reads left to right)."""
    if isinstance(value, str):
        parts = [part.strip() for part in value.split(",")]
        if not all(part.isdigit() for part in parts):
            raise OptionError(f"{name} must be a whole number or whole numbers separated by commas (100,200,400), "
                              f"not {_shown(value)}")
        value = [int(part) for part in parts]
    sizes = tuple(observations(v, name) for v in (value if isinstance(value, (list, tuple)) else [value]))
    if not sizes:
        raise OptionError(f"{name}: give at least one")
    if len(set(sizes)) < len(sizes):
        twice = next(s for s in sizes if sizes.count(s) > 1)
        raise OptionError(f"{name} {twice} is given twice; give each sample size once")
    return tuple(sorted(sizes))


def group_column(value: object) -> str | None:
    """The group column's name (None: no groups); anything but text, such as a list of names, is an OptionError
    (checked before the column is looked up, where a list would fail without a message)."""
    if value is None or isinstance(value, str):
        return value
    raise OptionError(f"the group column must be given by its name (text), not {type(value).__name__}")


class Interface(enum.Enum):
    """Where a run was asked for: what a refusal names an option by."""

    PYTHON = "python"
    COMMAND_LINE = "command line"


_INTERFACE: contextvars.ContextVar[Interface] = contextvars.ContextVar("cfa_tool_interface", default=Interface.PYTHON)


@contextlib.contextmanager
def on_command_line() -> Iterator[None]:
    """Within: the options are named as the command line's flags (the command line runs every command in it);
    elsewhere as the Python functions' keywords."""
    token = _INTERFACE.set(Interface.COMMAND_LINE)
    try:
        yield
    finally:
        _INTERFACE.reset(token)


def interface() -> Interface:
    return _INTERFACE.get()


class Option(enum.Enum):
    """An option that a refusal or a piece of advice names, declared once with its flag on the command line and
    its keyword in Python (``switch``: the keyword's value a flag without a value stands for, as --robust for
    ``test='robust'``; ``listed``: the keyword takes a list).  ``str(option)`` and :meth:`given` name it as the
    caller wrote it (:func:`on_command_line`)."""

    SHEET = ("--sheet", "sheet")
    MISSING_CODES = ("--missing-codes", "missing_codes", None, True)
    KEEP = ("--keep", "keep", None, True)
    GROUP_COLUMN = ("--group-column", "group")
    OCCASION_COLUMN = ("--occasion-column", "occasion_column")  # invariance over occasions of long data
    OCCASION_ORDER = ("--occasion-order", "occasion_order")  # ... the order of occasions named by text
    OCCASION_ENDINGS = ("--occasion-endings", "occasion_endings")  # ... the column endings of wide data
    REFERENCE_GROUP = ("--reference-group", "reference_group")
    ID_COLUMN = ("--id", "id_column")
    NAMES_ROW = ("--names-row", "names_row")
    VALIDATION_NAMES_ROW = ("--validation-names-row", "validation_names_row")  # replicate's validation file
    VALIDATION_SHEET = ("--validation-sheet", "validation_sheet")  # replicate's validation workbook's sheet
    FIRST_DATA_ROW = ("--first-data-row", "first_data_row")
    VALIDATION_FIRST_DATA_ROW = ("--validation-first-data-row", "validation_first_data_row")
    ROBUST = ("--robust", "test", "robust")
    INCOMPLETE_ROWS = ("--incomplete-rows", "missing")
    STANDARD_ERRORS_FROM = ("--standard-errors-from", "information")
    ORDINAL = ("--ordinal", "ordinal")
    WEIGHTS = ("--weights", "weights")
    WEIGHT_KIND = ("--weight-kind", "weight_kind")
    CLUSTER = ("--cluster", "cluster")
    STRATA = ("--strata", "strata")
    CATEGORIES = ("--categories", "categories")
    POPULATION_FROM = ("--population-from", "population")
    GROUP_SIZES = ("--group-sizes", "group_sizes")
    HIGHEST_LEVEL = ("--highest-level", "highest_level")
    NESTED_MODEL = ("--nested-model", "nested_model")  # power-simulation: a model nested in the simulated one
    DECIDE_BY = ("--decide-by", "decide_by")
    PARTIAL = ("--partial", "partial")
    DESIGN_EFFECT = ("--design-effect", "design_effect")  # power: a planned sample's design effect
    CLUSTER_SIZE = ("--cluster-size", "cluster_size")  # power: rows per cluster of a planned sample
    INTRACLASS = ("--intraclass", "intraclass")  # power: the items' intraclass correlation in a planned sample
    MAX_ITERATIONS = ("--max-iterations", "max_iterations")
    SCORE_METHODS = ("--method", "methods", None, True)
    MISSING_HELPERS = ("--missing-helpers", "missing_helpers", None, True)
    LEAST_ANSWERED = ("--least-answered", "least_answered")
    UNANSWERED_FACTORS = ("--unanswered-factors", "unanswered_factors")  # scores: a factor a row answered no item of
    STANDARD_ERRORS = ("--standard-errors", "standard_errors", True)  # scores' standard errors (and item sums' SEMs)
    DATA = ("--data", "data")
    ITEMS = ("--items", "items")  # explore's items
    ANSWERS = ("--answers", "answers")  # explore's answers file
    FACTORS = ("--factors", "factors")  # explore's number of factors
    TARGET = ("--target", "target")  # explore's target of rotation
    ROTATION = ("--rotation", "rotation")  # explore's rotation
    SPLIT = ("--split", "split")  # explore's seed of the random halves
    MI_THRESHOLD = ("--mi-threshold", "mi_threshold")
    MI_TOP = ("--mi-top", "mi_top")
    HALF = ("--half", "keep")  # one half of a halves file; in Python a data.halves.RandomHalf among the row selections
    SIMULATED_MISSING = ("--missing", "missing")  # simulate's share of answers removed at random
    RENAME = ("--rename", "rename", None, True)
    WORKERS = ("--workers", "workers")  # local processes of the resampling and simulating commands
    SCHEDULER = ("--scheduler", "scheduler")  # ... or the Dask scheduler they run on
    VALIDATION_RENAME = ("--validation-rename", "validation_rename", None, True)  # replicate's validation file

    def __init__(self, flag: str, keyword: str, switch: str | None = None, listed: bool = False) -> None:
        self.flag = flag
        self.keyword = keyword
        self.switch = switch
        self.listed = listed

    def __str__(self) -> str:
        """The option's name: '--incomplete-rows' / 'missing=...'; a switch with its value: '--robust' /
        "test='robust'"."""
        if interface() is Interface.COMMAND_LINE:
            return self.flag
        return f"{self.keyword}={self.switch!r}" if self.switch is not None else f"{self.keyword}=..."

    def given(self, value: object) -> str:
        """The option given ``value`` (several values of a repeatable option: a list) as the caller would write it:
        '--incomplete-rows listwise' / "missing='listwise'", '--missing-codes 9,99' / 'missing_codes=[9, 99]',
        '--keep "district = north"' / "keep=['district = north']"."""
        if isinstance(value, dict):  # names given new names (--rename): 'OLD=NEW,...' / "rename={'OLD': 'NEW'}"
            if interface() is not Interface.COMMAND_LINE:
                return f"{self.keyword}={value!r}"
            value = ",".join(f"{_name_in_list(old)}={_name_in_list(new)}" for old, new in value.items())
        values = [str(v) for v in value] if isinstance(value, (list, tuple)) else [str(value)]
        if interface() is Interface.COMMAND_LINE:
            return " ".join(f"{self.flag} {shell_word(text)}" for text in values)
        if not self.listed:
            return f"{self.keyword}={value!r}" if isinstance(value, str) else f"{self.keyword}={value}"
        if len(values) == 1 and _numbers(values[0]):
            values = [part.strip() for part in values[0].split(",")]
        return f"{self.keyword}=[{', '.join(text if _numbers(text) else repr(text) for text in values)}]"


#: the commands that take each option a piece of advice names where reports of other commands can show it too (the
#: data's cautions, a fit's problems): a report of another command says that advice its own way (note_parts.Command's
#: ``takes`` and ``elsewhere``; s28: bootstrap, cutoffs, replicate and scores advised --robust, cutoffs and align
#: --cluster, which they refuse).  Declared once here, as the command line's parsers take them (demo's report is a
#: fit's): tests/reporting/test_advice_where_taken.py checks the table against the parsers, and that every advice
#: naming one of these options says where it is taken.  replicate's and explore's --cluster draws random halves by
#: cluster, which their own advice says.  (Options that advice names only where the run gave them, '--weight-kind'
#: to leave out, need no entry.)
TAKEN_BY: dict[Option, tuple[str, ...]] = {
    Option.ROBUST: ("fit", "compare", "invariance"),
    Option.CLUSTER: ("fit", "check", "compare", "invariance", "replicate", "bootstrap", "scores", "explore"),
    Option.INCOMPLETE_ROWS: ("fit", "compare", "invariance", "replicate", "bootstrap", "cutoffs", "scores", "align"),
    Option.MAX_ITERATIONS: ("fit", "compare", "invariance", "replicate", "bootstrap", "cutoffs", "scores", "align",
                            "explore"),
    Option.REFERENCE_GROUP: ("fit", "compare", "invariance", "scores", "align"),
    Option.MISSING_HELPERS: ("fit",),
}


def taken_by(option: Option) -> tuple[str, ...]:
    """The commands that take ``option`` (:data:`TAKEN_BY`), for note_parts.Command's ``takes``."""
    return TAKEN_BY[option]


#: the options that name columns of the data, a group by its label or words of the data (--missing-codes' words):
#: each read in Unicode's composed form (language.names.composed_value), on the command line
#: (commands.options.composed_names) and by the Python API's entry points (cfa_tool.composing) alike
NAMING = (Option.GROUP_COLUMN, Option.REFERENCE_GROUP, Option.ID_COLUMN, Option.OCCASION_COLUMN, Option.KEEP, Option.WEIGHTS, Option.CLUSTER,
          Option.STRATA, Option.ITEMS, Option.ORDINAL, Option.MISSING_HELPERS, Option.RENAME, Option.VALIDATION_RENAME,
          Option.MISSING_CODES)


def _name_in_list(name: object) -> str:
    """A name in an option's list of pairs: in double quotes when it holds a comma or '=' (or spaces at its ends)."""
    text = str(name)
    return f'"{text}"' if any(c in text for c in ',="') or text != text.strip() else text


#: characters a POSIX shell (sh, bash) reads as its own outside quotes: a word holding one is quoted
_SHELL_SPECIAL = frozenset("'\"\\$`!;&|<>()*?[]{}#~")
#: what a shell still reads inside double quotes: a double quote, a backslash, '`', '$' before a name, a brace, a
#: parenthesis or a special parameter ('filter_$ = 1' it leaves alone), and '!' before another than a space, '=' or
#: the end, which interactive bash reads as history ('!=' it leaves alone)
_DOUBLE_QUOTE_SPECIAL = re.compile(r'["\\`]|\$[\w{(@*#?$!-]|![^\s=]')


def shell_word(text: str) -> str:
    """A value as typed in a POSIX shell, which gives the program ``text`` as it is: bare when it holds no space and
    nothing the shell reads as its own; else in double quotes (the usual '--keep "district = north"'); in single
    quotes when it holds a double quote, '`', a backslash, or a '$' or '!' the shell would read, each single quote in it
    written '\\'' (close the quotes, a quoted quote, open them again: the POSIX shell's rule, Shell Command Language
    2.2.2-2.2.3; recalled from memory), so that
    a filter of a value with an apostrophe ("district != \"St Mary's\"") or with double quotes runs as written
    (hostile s25b case 09: '--keep "district != "St Mary's""' was an unterminated quote)."""
    if text and not any(c.isspace() or c in _SHELL_SPECIAL for c in text):
        return text
    if not _DOUBLE_QUOTE_SPECIAL.search(text):
        return f'"{text}"'
    return _single_quoted(text)


def _single_quoted(text: str) -> str:
    return "'" + text.replace("'", "'\\''") + "'"


def quoted_word(text: str) -> str:
    """A name a message suggests for the user to copy (suggest.did_you_mean), in quotes whatever it holds, as the run's
    interface takes it: on the command line in single quotes by the shell's rule of :func:`shell_word` (each single
    quote in it written '\\''), so that 'district' reads as it always did and "St Mary's" pastes as one word; in the
    Python API a Python string ('district', "St Mary's")."""
    return _single_quoted(text) if interface() is Interface.COMMAND_LINE else repr(text)


def _numbers(text: str) -> bool:
    from cfa_tool.numbers import number

    return all(number(part) is not None for part in text.split(","))


def own_keywords(function) -> tuple[str, ...]:
    """The keywords of a public function besides the fit options it passes on (``**options``), in the order of its
    signature: read once where the function is defined (FIT_KEYWORDS = own_keywords(fit)), never per call, for
    pipeline.inputs.make_options to name an unknown keyword's near ones."""
    import inspect

    return tuple(name for name, p in inspect.signature(function).parameters.items() if p.kind is not p.VAR_KEYWORD)


def option_in_both(flag: str, keyword: str) -> str:
    """An option as advice names it, for a reader of the command line and of Python alike (a report reads the
    same whichever made it): "--ordinal all; from Python, ordinal='all'"."""
    return f"{flag}; from Python, {keyword}"
