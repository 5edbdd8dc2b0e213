"""The tool's own error types.

Every problem caused by the user's input is raised as a :class:`UserInputError`
subclass; the command line prints its one-line message and exits with
``exit_code``.  Anything else reaching the top is a bug in the tool.
"""

from __future__ import annotations

from dataclasses import dataclass


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
        """The offending source line with a caret under the column ('' if unknown)."""
        if self.location is None or self.source_line is None:
            return ""
        line = self.source_line.expandtabs(1)
        return f"    {line}\n    {' ' * (self.location.column - 1)}^"


class DataError(UserInputError):
    """A problem with the data file or its columns."""


class OptionError(UserInputError):
    """A command-line or API option that cannot be honoured."""


class EstimationError(CfaError):
    """The model could not be estimated (did not converge, not identified)."""

    exit_code = 3
