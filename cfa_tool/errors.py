"""The tool's own error types.

Every problem caused by the user's input is raised as a :class:`UserInputError`
subclass; the command line prints its one-line message and exits with
``exit_code``.  Anything else reaching the top is a bug in the tool.
"""

from __future__ import annotations

from contextlib import contextmanager

import re
from dataclasses import dataclass

# C0 and C1 control characters, line and paragraph separators, and the bidirectional
# overrides that can make text display as something else
_UNPRINTABLE = re.compile("[\x00-\x1f\x7f-\x9f\u2028\u2029\u202a-\u202e\u2066-\u2069\ufeff]")


def printable(text: object, keep_newlines: bool = False) -> str:
    """``text`` with control characters shown as escapes (``\\x1b``, ``\\n``), so that names, labels
    and values from a user's files cannot move the cursor, clear a terminal or split a one-line
    message.  Tabs become spaces."""
    value = str(text).replace("\t", " ")

    def escape(match: re.Match) -> str:
        ch = match.group(0)
        if keep_newlines and ch == "\n":
            return ch
        if ch == "\n":
            return "\\n"
        if ch == "\r":
            return "\\r"
        code = ord(ch)
        return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"

    return _UNPRINTABLE.sub(escape, value)


def clipped(text: object, width: int) -> str:
    """:func:`printable` ``text`` in at most ``width`` characters, a cut one ending in '…' so that a reader sees it
    was cut (re-check s17: a workbook's title quoted to its 60th character, 'Meridian Cons', read as the whole)."""
    shown = printable(text)
    return shown if len(shown) <= width else shown[: width - 1] + "…"


def shown_path(path: object) -> str:
    """A file's path for a one-line message: :func:`printable`, and one longer than 200 characters cut in its
    middle, its first 120 and last 60 characters around '…' (the folders near the root and the file's own name
    both seen; '…' marks the cut as :func:`clipped` does)."""
    text = printable(str(path))
    return text if len(text) <= 200 else text[:120] + "…" + text[-60:]


def character_names(text: str, beside: str = "") -> str:
    """Words naming the characters of ``text`` beyond plain ASCII that ``beside`` does not hold, by their Unicode
    code points and names (' (U+0441 CYRILLIC SMALL LETTER ES)'), or '': a look-alike letter or an invisible
    mark (U+200B ZERO WIDTH SPACE, U+200F RIGHT-TO-LEFT MARK) cannot be seen in a message that shows it."""
    import unicodedata

    seen = []
    for ch in text:
        if ord(ch) > 0x7E and ch not in beside and ch not in seen:
            seen.append(ch)
    if not seen:
        return ""
    named = ", ".join(f"U+{ord(ch):04X} {unicodedata.name(ch, 'UNNAMED CHARACTER')}" for ch in seen[:3])
    return f" ({named}{' and more' if len(seen) > 3 else ''})"


@dataclass(frozen=True)
class Location:
    """A place in a model file: 1-based line and column."""

    source: str
    line: int
    column: int

    def __str__(self) -> str:
        return f"{self.source}:{self.line}:{self.column}"


class CfaError(Exception):
    """Base class of all errors the tool raises on purpose."""

    exit_code = 2


class UserInputError(CfaError):
    """Something in the user's model, data or options is wrong."""


class ModelError(UserInputError):
    """A problem in the model text, with the place it was found."""

    def __init__(self, message: str, location: Location | None = None, source_line: str | None = None):
        self.message = message
        self.location = location
        self.source_line = source_line
        super().__init__(self.one_line())

    def one_line(self) -> str:
        return f"{self.location}: {self.message}" if self.location else self.message

    def excerpt(self) -> str:
        """The offending source line with a caret under the column ('' if unknown); control
        characters in the line are shown escaped, and the caret stays under the same character."""
        if self.location is None or self.source_line is None:
            return ""
        line = self.source_line
        start = max(0, self.location.column - 1)
        head = printable(line[:start])
        tail = printable(line[start:])
        if len(head) > 60:  # a long line is shown around the place, as '…' + about 120 characters + '…'
            head = "…" + head[-59:]
        if len(tail) > 60:
            tail = clipped(tail, 60)
        return f"    {head}{tail}\n    {' ' * len(head)}^"


class DataError(UserInputError):
    """A problem with the data file or its columns."""


class RowDataError(DataError):
    """A :class:`DataError` about one data row (``row``: its number in the file or a data frame's index label,
    data.moments.row_numbers), so that a caller that knows more of that row (a row of means or totals found on
    reading) can say so first."""

    def __init__(self, message: str, row: int):
        self.row = row
        super().__init__(message)


class OptionError(UserInputError):
    """A command-line or API option that cannot be honoured."""


class InternalError(Exception):
    """A bug of the tool found by one of its own consistency checks (rows counted twice, a negative count): not the
    user's fault, so not a :class:`CfaError`; the command line reports it as an internal error, and no report of
    nonsense is written."""


def check_rows_counted(analysed: int, read: int, where: str) -> None:
    """Raise :class:`InternalError` unless ``0 <= analysed <= read``: rows analysed (summed over groups, each row in
    at most one) can be no more than the rows read, and no count of rows is negative."""
    if not 0 <= analysed <= read or read < 0:
        raise InternalError(f"{where}: {analysed} rows counted as analysed of {read} read; a row was counted twice or "
                            f"a count went negative, so no result is given")


class EstimationError(CfaError):
    """The model could not be estimated (did not converge, not identified)."""

    exit_code = 3


class NotIdentified(EstimationError):
    """The model is not identified with these data (its information matrix is singular); ``parameters``: the free
    parameters involved, as the parameter table labels them."""

    def __init__(self, message: str, parameters: tuple[str, ...] = ()):
        self.parameters = tuple(parameters)
        super().__init__(message)


class UnboundedSolution(EstimationError):
    """A least-squares solution of ordinal items with thresholds (latent responses' residual variances held at 1) that
    the data drive to an item's residual variance of zero and estimates without bound: in the metric of correlations
    they ask for a negative residual variance (a Heywood case), so there are no finite estimates, and the singular
    information says nothing of identification.  ``parameters``: the free parameters that grow, as the parameter
    table labels them."""

    def __init__(self, message: str, parameters: tuple[str, ...] = ()):
        self.parameters = tuple(parameters)
        super().__init__(message)


@contextmanager
def estimation_of(what: str):
    """Name which model or sample an estimation failure belongs to, when a command fits several:
    'model two_factor: the model is not identified ...'."""
    try:
        yield
    except EstimationError as exc:
        raise EstimationError(f"{what}: {exc}") from None
