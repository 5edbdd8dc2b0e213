"""What a researcher can do next, said once in two ways: in words, as a manuscript reads it (Word, HTML,
Markdown), and with the command-line option that does it after the words, as the terminal shows it.  A report
that gives advice names a :class:`Remedy`; the view decides whether the option is shown."""

from __future__ import annotations

import enum


class Remedy(enum.Enum):
    """A next step: the words for it and the command-line option that takes it."""

    COMPLETE_ROWS = ("a fit of the complete rows only", "--incomplete-rows listwise")
    ROBUST = ("the scaled test and robust standard errors", "--robust")

    def __init__(self, words: str, option: str):
        self.words = words
        self.option = option

    def said(self, options: bool) -> str:
        """The words, followed by the option in parentheses when ``options`` (the terminal)."""
        return f"{self.words} ({self.option})" if options else self.words
