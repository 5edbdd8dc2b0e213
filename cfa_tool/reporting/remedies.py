"""What a researcher can do next, said once: in words, with the command-line option that does it after them as a
part of its own (cfa_tool.note_parts.Command), which the views whose reader runs the program show and a manuscript
(the Word file) leaves out; the methods paragraph, written for a paper, gives no advice and names no option.  A
report that gives advice names a :class:`Remedy`."""

from __future__ import annotations

import enum

from cfa_tool.note_parts import Command, Note
from cfa_tool.options import option_in_both


class Remedy(enum.Enum):
    """A next step: the words for it, the command-line option that takes it and the Python keyword that does."""

    COMPLETE_ROWS = ("a fit of the complete rows only", "--incomplete-rows listwise", "missing='listwise'")
    ROBUST = ("the scaled test and robust standard errors", "--robust", "test='robust'")

    def __init__(self, words: str, option: str, keyword: str):
        self.words = words
        self.option = option
        self.keyword = keyword

    @property
    def named(self) -> str:
        """The option and the keyword (:func:`cfa_tool.options.option_in_both`)."""
        return option_in_both(self.option, self.keyword)

    def said(self) -> Note:
        """The words, followed (for the program's user) by the option and the keyword in parentheses."""
        return Note((self.words, Command(f" ({self.named})")))
