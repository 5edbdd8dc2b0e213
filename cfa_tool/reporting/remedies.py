"""What a researcher can do next, said once: in words, with the command-line option that does it after them.
Every view of a report shows the same advice (its reader is the researcher who runs the command); the methods
paragraph, written for a paper, gives no advice and names no option.  A report that gives advice names a
:class:`Remedy`."""

from __future__ import annotations

import enum


class Remedy(enum.Enum):
    """A next step: the words for it and the command-line option that takes it."""

    COMPLETE_ROWS = ("a fit of the complete rows only", "--incomplete-rows listwise")
    ROBUST = ("the scaled test and robust standard errors", "--robust")

    def __init__(self, words: str, option: str):
        self.words = words
        self.option = option

    def said(self) -> str:
        """The words, followed by the option in parentheses."""
        return f"{self.words} ({self.option})"
