"""A line of a report that each view writes its own way (:class:`Note`): words for every reader, and apart from
them what the program's user runs or writes (:class:`Command`: an option, with its Python keyword, or a statement of
the model file), references to a table of the report (:class:`TableReference`, by its key) and respondents' ids
beside row numbers (:class:`RowId`).  A view says the line as its reader reads it (:class:`View`): the terminal,
text and HTML views give the command and the ids and name a table by its title; a manuscript (the Word file) leaves
the command out, or says it in words where the line needs them, names rows by their numbers alone and a table by its
number.  Any part of the tool that writes a line giving advice or naming respondents makes it a Note; a plain line
stays text."""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field

#: a plain lower-case first word ("listwise deletion left out ..."): not a file or a variable name ("data.csv: ...",
#: "x1: ...", "q_3 ..."), which keeps its case: the one rule of a line's capital (:func:`capitalised`; new-user trial
#: s24: align wrote a data file's name as 'Survey_export.csv')
PLAIN_FIRST_WORD = re.compile(r"[a-z]+(?:['\u2019-][a-z]+)*(?=[ ,;(]|$)")  # 'non-invariant', 'group's' too


@dataclass(frozen=True)
class Command:
    """What the program's user runs or writes to take a piece of advice, as that reader reads it (" (--robust; from
    Python, test='robust')", or a statement of the model language, " ('scale latent by variance')", its spaces and
    brackets included); ``words``: the same for a reader who runs nothing and edits no model file, where the line is
    incomplete without it (a manuscript's: "the factor's variance fixed at 1"), else nothing.  ``runs``: the command
    of this tool the text names ('compare'), and ``inside``: what the line says in that command's own report in its
    place, where naming the command the reader is running would send them to it again (s24: compare advised 'cfa-tool
    compare'); nothing there without it.  ``takes``: the commands that take the option the text names, and
    ``elsewhere``: what the line says in its place in a report of any other command (s28: bootstrap, cutoffs,
    replicate and scores advised --robust, which they refuse)."""

    text: str
    words: str = ""
    runs: str = ""
    inside: str = ""
    takes: tuple[str, ...] = ()
    elsewhere: str = ""

    def said(self, view: "View") -> str:
        """What ``view`` writes of it."""
        if not view.commands:
            return self.words
        if self.runs and self.runs == view.running:
            return self.inside
        if self.takes and view.running and view.running not in self.takes:
            return self.elsewhere
        return self.text


@dataclass(frozen=True)
class TableReference:
    """A table of the same report, by its key: each view names it as it names its tables ('Table 2' in Word, the
    table's title where tables have no numbers)."""

    key: str


@dataclass(frozen=True)
class RowId:
    """A respondent's id beside the number of a row the line names (" ('E1165')"): the program's user reads it to
    find the row; a manuscript leaves it out (its rows named by number alone), as it leaves out the ids column."""

    text: str


@dataclass(frozen=True)
class Name:
    """A name the user gave (a model's, a file's, an item's, a factor's) where a line starts with it: every view
    writes it as given, and no sentence's capital recases it (:func:`capitalised`; s24: 'One' for a model file
    'one.cfa' at a line's start)."""

    text: str


Part = str | Command | TableReference | RowId | Name


@dataclass(frozen=True)
class View:
    """How a view writes a :class:`Note`: with the commands and respondents' ids (its reader runs the program) or
    without (a manuscript's), and each table's name in it by key."""

    commands: bool
    tables: Mapping[str, str] = field(default_factory=dict)
    running: str = ""  # the command whose report this is (document.ResultKind's word): its own name is not advised

    def name(self, reference: TableReference) -> str:
        """The referred table's name in this view; a table the report does not hold (a saved report changed by
        hand) as 'a table of this report'."""
        return self.tables.get(reference.key, "a table of this report")


#: the view of a reader who runs the program (the terminal, text and HTML reports, the JSON result), tables by key
RUNNING = View(commands=True)
#: the view of a reader who runs nothing (a manuscript's), tables by key
WORDS = View(commands=False)


def titled(tables, commands: bool = True, running: str = "") -> View:
    """The view of a reader who runs the program (without ``commands``: who runs nothing), naming each of
    ``tables`` (ReportTable) by its title in quotes; ``running``: the command whose report it is."""
    return View(commands, {t.key: f'the table "{t.title}"' for t in tables}, running)


def numbered(tables, start: int = 1) -> View:
    """The view of a manuscript: no commands, each of ``tables`` named by its number in order ('Table 2'), the first
    numbered ``start`` (a document of several results numbers its tables through)."""
    return View(False, {t.key: f"Table {k}" for k, t in enumerate(tables, start=start)})


@dataclass(frozen=True)
class Note:
    """A line of words with parts that each view writes its own way (see the module)."""

    parts: tuple[Part, ...]

    def __post_init__(self) -> None:  # words next to words as one part, no empty part: one Note for one line
        parts: list[Part] = []
        for p in self.parts:
            if isinstance(p, str) and parts and isinstance(parts[-1], str):
                parts[-1] += p
            elif p != "":
                parts.append(p)
        object.__setattr__(self, "parts", tuple(parts))

    def said(self, view: View) -> str:
        return "".join(p if isinstance(p, str) else view.name(p) if isinstance(p, TableReference) else
                       p.text if isinstance(p, Name) else
                       (p.text if view.commands else "") if isinstance(p, RowId) else
                       p.said(view) for p in self.parts)

    def __str__(self) -> str:  # as the program's user reads it (what a result's JSON holds)
        return self.said(RUNNING)

    def __contains__(self, text: str) -> bool:
        """Whether ``text`` is among the words as the program's user reads them (str(note)): where a test searches a
        line for words, a Note is searched as plain text is.  The tool itself decides nothing by a note's words (a
        choice is made from the facts the note was written from; tests/reporting/test_word_names_no_option.py runs
        every command that writes a Word file with this refused)."""
        return text in str(self)

    def __add__(self, other: "str | Note") -> "Note":
        return Note(self.parts + (other.parts if isinstance(other, Note) else (other,)))

    def __radd__(self, other: str) -> "Note":
        return Note((other,) + self.parts)

    def capitalised(self) -> "Note":
        """The line with the first letter of its first words in capitals, when they start with a plain lower-case
        word (:data:`PLAIN_FIRST_WORD`): a name keeps its case, and a line that starts with a :class:`Name` is left
        as it is."""
        first = self.parts[0] if self.parts else ""
        if not isinstance(first, str) or not PLAIN_FIRST_WORD.match(first):
            return self
        return Note((first[0].upper() + first[1:],) + self.parts[1:])

    def to_dict(self) -> dict:
        return {"parts": [p if isinstance(p, str) else {"table": p.key} if isinstance(p, TableReference) else
                          {"id": p.text} if isinstance(p, RowId) else {"name": p.text} if isinstance(p, Name) else
                          {"command": p.text, "words": p.words, **({"runs": p.runs, "inside": p.inside} if p.runs
                                                                   else {}),
                           **({"takes": list(p.takes), "elsewhere": p.elsewhere} if p.takes else {})}
                          for p in self.parts]}

    @classmethod
    def from_dict(cls, d: dict) -> "Note":
        """A saved Note; a ValueError for a part that is none of the three."""
        parts: list[Part] = []
        for p in d["parts"]:
            if isinstance(p, str):
                parts.append(p)
            elif isinstance(p, dict) and isinstance(p.get("table"), str):
                parts.append(TableReference(p["table"]))
            elif isinstance(p, dict) and isinstance(p.get("command"), str):
                takes = p.get("takes", [])
                if not isinstance(takes, list):
                    raise ValueError("a command's list of the commands that take it that is not a list")
                parts.append(Command(p["command"], str(p.get("words", "")), str(p.get("runs", "")),
                                     str(p.get("inside", "")), tuple(map(str, takes)), str(p.get("elsewhere", ""))))
            elif isinstance(p, dict) and isinstance(p.get("id"), str):
                parts.append(RowId(p["id"]))
            elif isinstance(p, dict) and isinstance(p.get("name"), str):
                parts.append(Name(p["name"]))
            else:
                raise ValueError("a part of a note that is neither words, a command, a table, a row's id nor a name")
        return cls(tuple(parts))


Text = str | Note  # a line of a report: plain words, or words with parts each view writes its own way


def said(text: Text, view: View = RUNNING) -> str:
    """``text`` as ``view`` writes it."""
    return text if isinstance(text, str) else text.said(view)


def joined(texts: Iterable[Text | None], between: str = " ") -> Text:
    """The texts that are not empty, one after another with ``between``: a Note when any is one."""
    kept = [t for t in texts if t]
    if not any(isinstance(t, Note) for t in kept):
        return between.join(kept)  # type: ignore[arg-type]
    out = Note(())
    for k, t in enumerate(kept):
        out = out + (between if k else "") + t
    return out


def capitalised(text: Text) -> Text:
    """``text`` with the first letter of its first words in capitals when it starts with a plain lower-case word
    (:data:`PLAIN_FIRST_WORD`); a line that starts with a name (a file's, a variable's) keeps the name's case."""
    if isinstance(text, Note):
        return text.capitalised()
    return text[:1].upper() + text[1:] if PLAIN_FIRST_WORD.match(text) else text


def saved(text: Text) -> str | dict:
    """``text`` as a saved report holds it."""
    return text if isinstance(text, str) else text.to_dict()


def read(value: object) -> Text:
    """A saved line: text, or a Note saved as a dict (a ValueError for anything else)."""
    if isinstance(value, str):
        return value
    if isinstance(value, dict):
        return Note.from_dict(value)
    raise ValueError("a line of a report that is neither text nor a note")
