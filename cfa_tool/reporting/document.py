"""One report model for every command: a result is turned into a :class:`Report` once (a title, the problems
that come first, what was done, the tables, notes and cautions), and the terminal, HTML, Markdown, Word and
CSV/LaTeX writers draw that same report.  A saved JSON result carries its report, so that ``cfa-tool report``
writes any format later without fitting again.  Which result has which report: cfa_tool.reporting.reports."""

from __future__ import annotations

import enum
import re
from dataclasses import dataclass, field, replace
from functools import cached_property, partial
from typing import Callable

from cfa_tool.data.csv_convention import PLAIN, CsvConvention
from cfa_tool.note_parts import Command, Name, Note, Text, capitalised, read, saved
from cfa_tool.reporting.tables import NoticeKind, ProblemNotice, ReportTable


WARNINGS = "Notes and warnings on the data and the estimation"  # the heading of a report's warnings in every view


def sentence(line: Text) -> Text:
    """A notice's line as a sentence: starting with a capital when its first word is a plain lower-case word, by the
    one rule (note_parts.capitalised).  Every line of a report's notices passes here (:class:`Report`), whichever part
    of the tool made it."""
    return capitalised(line)


def in_section(section: str, tables) -> list[ReportTable]:
    """The tables (None left out) under the heading ``section`` in every view."""
    return [replace(t, section=section) for t in tables if t is not None]


class ResultKind(enum.Enum):
    """Which command made a result (written into its JSON as "command")."""

    FIT = "fit"
    CHECK = "check"
    COMPARE = "compare"
    INVARIANCE = "invariance"
    REPLICATE = "replicate"
    BOOTSTRAP = "bootstrap"
    CUTOFFS = "cutoffs"
    POWER = "power"
    POWER_SIMULATION = "power-simulation"
    SIMULATE = "simulate"
    SCORES = "scores"
    EXPLORE = "explore"
    ALIGN = "align"


@dataclass(frozen=True, eq=False)
class Figure:
    """A picture of the report (SVG text, :attr:`svg`) with its title and the note under it (:attr:`note`).  Both
    are made by ``draw`` when a view first asks for them: the terminal names a figure without drawing it (a fit's
    path diagram and the modules that draw it were a tenth of the first terminal report's own work)."""

    title: str
    draw: Callable[[], tuple[str, str]] = field(repr=False)  # -> (SVG text, note)

    @cached_property
    def _drawn(self) -> tuple[str, str]:
        return self.draw()

    @property
    def svg(self) -> str:
        return self._drawn[0]

    @property
    def note(self) -> str:
        return self._drawn[1]


def drawn(svg: str, note: str = "") -> Callable[[], tuple[str, str]]:
    """The ``draw`` of a :class:`Figure` whose picture is already made (read from a saved result): a drawing of this
    tool, whose root gives its size (ValueError otherwise, as for any part of a saved report changed by hand)."""
    from cfa_tool.reporting.picture import svg_size

    svg_size(svg)
    return lambda: (svg, note)


@dataclass(frozen=True)
class Listing:
    """Text shown as written (the model file), with its title."""

    title: str
    text: str



@dataclass(frozen=True)
class DataRead:
    """A data file a result read, and how: its path as given, the SHA-256 of its bytes ('' where it is no regular
    file: standard input, a data frame from Python) and how its rows were read and kept, in words ('rows where
    district == "north"', 'codes 9 and 99 read as no answer'; nothing when every row was read as it stands).  Two
    results describe the same rows only when they read the same file the same way: a document of several results
    says so, or says that they do not (reporting.combined)."""

    file: str
    checksum: str = ""
    reading: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        return {"file": self.file, "checksum": self.checksum, "reading": list(self.reading)}

    @classmethod
    def from_dict(cls, d: dict) -> "DataRead":
        return cls(str(d["file"]), str(d.get("checksum", "")), tuple(map(str, _listed(d, "reading", ()))))


#: the heading of a report's methods-and-results paragraph, in every view that has headings (HTML, Markdown, Word)
PARAGRAPH_HEADING = "Summary for a paper"

@dataclass(frozen=True)
class Report:
    """Every view draws, in this order: the notice, the title, the lines, the warnings, the paragraph, the
    figures, the tables (a table's ``section`` heading shown where the section changes), the listings, the notes
    and the cautions."""

    kind: ResultKind
    title: str
    notice: ProblemNotice | None  # problems of a solution: first in every view
    # the lines below are words, or Notes (cfa_tool.note_parts): advice with the command apart, references to a table,
    # which each view writes its own way
    lines: tuple[Text, ...]  # what was done and on what data, under the title
    tables: tuple[ReportTable, ...]
    notes: tuple[Text, ...] = ()  # after the tables
    cautions: tuple[Text, ...] = ()  # last, in every view
    paragraph: str | None = None  # the methods-and-results paragraph for a paper, under PARAGRAPH_HEADING
    figures: tuple[Figure, ...] = ()
    # the problems as a table for data files, when the solution's problems have more to say than the notice's
    # lines (parameters, values, advice)
    problem_table: ReportTable | None = None
    # cautions about the data and the estimation (rows left out, codes read as missing): right under the lines
    warnings: tuple[Text, ...] = ()
    listings: tuple[Listing, ...] = ()
    # the paths of the user's files as the report's words give them (the command line's models, data and outputs):
    # the views written for others to read name each by its file name (:func:`by_file_name`)
    files: tuple[str, ...] = ()
    #: how the report's tables are written as CSV files (--tables): in the convention of the data file the result
    #: read, the one rule of every CSV file the tool writes (data.csv_convention.convention_of_result)
    csv_convention: CsvConvention = PLAIN
    #: a fit's path diagram as one file (every group, one legend: reporting.diagram.diagram_file), which ``fit
    #: --diagram`` writes and a saved result keeps, so that ``cfa-tool report --diagram`` writes it later
    diagram: Figure | None = None
    #: the data files the result read (:class:`DataRead`), as the command line gave them: () for a result that read
    #: none (a plan, a simulation), None where it is not known (a result made from Python, or saved before results
    #: recorded it)
    data: tuple[DataRead, ...] | None = None
    #: a fit's path diagram drawn once (reporting.diagram.PathDrawings, or what gives it: its ``to_dict``), from which
    #: its figures and its diagram file are made: a saved result keeps it in their place, once (s28: the JSON held
    #: the drawing twice, as the figures and as the file)
    drawings: object = None

    def __post_init__(self) -> None:
        # the notices' lines as sentences, in every view and in a saved report (those saved before too)
        for name in ("warnings", "notes", "cautions"):
            object.__setattr__(self, name, tuple(sentence(line) for line in getattr(self, name)))
        if self.notice is not None:
            object.__setattr__(self, "notice", replace(self.notice, lines=tuple(sentence(x) for x in self.notice.lines)))

    def to_dict(self) -> dict:
        notice = None if self.notice is None else {"heading": self.notice.heading,
                                                   "lines": [saved(x) for x in self.notice.lines],
                                                   "inadmissible": self.notice.inadmissible,
                                                   "problem_kind": self.notice.kind.value,
                                                   "leading": self.notice.leading}
        return {"kind": self.kind.value, "title": self.title, "notice": notice, "lines": [saved(x) for x in self.lines],
                "tables": [t.to_dict() for t in self.tables], "notes": [saved(x) for x in self.notes],
                "cautions": [saved(x) for x in self.cautions],
                "paragraph": self.paragraph,
                "figures": [{"title": f.title} if self.drawings is not None else
                            {"title": f.title, "svg": f.svg, "note": f.note} for f in self.figures],
                "problem_table": None if self.problem_table is None else self.problem_table.to_dict(),
                "warnings": [saved(x) for x in self.warnings], "listings": [{"title": x.title, "text": x.text} for x in self.listings],
                "files": list(self.files), "csv_convention": self.csv_convention.to_dict(),
                **({"drawings": self.drawings.to_dict()} if self.drawings is not None else
                   {} if self.diagram is None else {"diagram": self.diagram.svg}),
                **({} if self.data is None else {"data_read": [x.to_dict() for x in self.data]})}

    @classmethod
    def from_dict(cls, d: dict) -> "Report":
        """The report saved by :meth:`to_dict`; a ValueError (or KeyError, TypeError) for a part of another type, as a
        file changed by hand may hold (hostile s19: a text as 'lines' was shown one character per line, a number as
        the paragraph ended in an internal error)."""
        n = d.get("notice")
        # a notice saved before it kept its kind and leading lines: taken from 'inadmissible' (ProblemNotice)
        notice = None if n is None else ProblemNotice(
            str(n["heading"]), tuple(map(read, _listed(n, "lines"))), bool(n["inadmissible"]),
            None if n.get("problem_kind") is None else NoticeKind(n["problem_kind"]),
            None if n.get("leading") is None else max(0, min(int(n["leading"]), len(_listed(n, "lines")))))
        paragraph = d.get("paragraph")
        if paragraph is not None and not isinstance(paragraph, str):
            raise ValueError("a report's paragraph that is not text")
        if d.get("drawings") is not None:  # a fit's path diagram, drawn once: its figures and its file
            from cfa_tool.reporting.diagram import PathDrawings

            drawings = PathDrawings.from_dict(d["drawings"])
            titles = [str(f["title"]) for f in _listed(d, "figures", ())]
            if len(titles) != len(drawings.drawings):
                raise ValueError("a saved path diagram whose groups are not its figures")
            return replace(cls.from_dict({k: v for k, v in d.items() if k not in ("drawings", "figures", "diagram")}),
                           figures=tuple(Figure(t, partial(drawings.figure, k)) for k, t in enumerate(titles)),
                           diagram=Figure("Path diagram", lambda: (drawings.file(), "")), drawings=drawings)
        return cls(ResultKind(d["kind"]), str(d["title"]), notice, tuple(map(read, _listed(d, "lines"))),
                   tuple(ReportTable.from_dict(t) for t in _listed(d, "tables")),
                   tuple(map(read, _listed(d, "notes", ()))), tuple(map(read, _listed(d, "cautions", ()))), paragraph,
                   tuple(Figure(str(f["title"]), drawn(str(f["svg"]), str(f.get("note", ""))))
                         for f in _listed(d, "figures", ())),
                   None if d.get("problem_table") is None else ReportTable.from_dict(d["problem_table"]),
                   tuple(map(read, _listed(d, "warnings", ()))),
                   tuple(Listing(str(x["title"]), str(x["text"])) for x in _listed(d, "listings", ())),
                   tuple(map(str, _listed(d, "files", ()))), CsvConvention.from_dict(d.get("csv_convention")),
                   None if d.get("diagram") is None else Figure("Path diagram", drawn(str(d["diagram"]))),
                   None if d.get("data_read") is None else tuple(DataRead.from_dict(x) for x in _listed(d, "data_read")))


def _listed(d: dict, key: str, default=None) -> list:
    """The list a saved report holds under ``key`` (``default`` when it has none and one is given); a ValueError for
    anything else, which iterating would take apart (a text into its characters, a dict into its keys)."""
    value = d[key] if default is None else d.get(key, default)
    if not isinstance(value, (list, tuple)):
        raise ValueError(f"a report's '{key}' that is not a list")
    return list(value)


def file_names(files) -> dict[str, str]:
    """Each path of ``files`` that names folders -> the name a report for others gives it: the file's own name, or,
    where files that differ share that name, its last folders too, as many as tell them apart ('wave1/x.csv' and
    'wave2/x.csv').  Paths that normalise alike ('./x.csv', 'x.csv') are one file."""
    import posixpath

    def steps(path: str) -> list[str]:
        return [p for p in posixpath.normpath(path.replace("\\", "/")).split("/") if p not in ("", ".")]

    given = {p: steps(p) for p in dict.fromkeys(files) if p}
    kept = {"/".join(s) for s in given.values()}
    out: dict[str, str] = {}
    for path, parts in given.items():
        k = 1
        while k < len(parts) and any("/".join(o) != "/".join(parts) and o[-k:] == parts[-k:]
                                     for o in (q.split("/") for q in kept)):
            k += 1
        name = "/".join(parts[-k:]) if parts else path
        if name != path:
            out[path] = name
    return out


def by_file_name(report: Report) -> Report:
    """``report`` as the views written for others to read give it (HTML, Markdown, Word: a manuscript, a shared
    page): the user's files (:attr:`Report.files`) named by their file names, not by paths that carry the user's
    folders (re-check s17, 07: 'Model file: /home/<user>/.../x.cfa' in a manuscript).  The terminal report and the
    JSON result keep the paths as given."""
    names = file_names(report.files)
    if not names:
        return report
    found = re.compile("|".join(rf"(?<![\w/\\.~-]){re.escape(p)}(?![\w/\\-])"
                                for p in sorted(names, key=len, reverse=True)))

    def plain(text: str) -> str:
        return found.sub(lambda m: names[m.group(0)], text)

    def named(text):
        if text is None or isinstance(text, str):
            return None if text is None else plain(text)
        return Note(tuple(plain(p) if isinstance(p, str) else
                          replace(p, text=plain(p.text), words=plain(p.words)) if isinstance(p, Command) else
                          replace(p, text=plain(p.text)) if isinstance(p, Name) else p
                          for p in text.parts))

    def table(t: ReportTable | None) -> ReportTable | None:
        return None if t is None else replace(t, title=plain(t.title), rows=tuple(tuple(map(plain, r)) for r in t.rows),
                                              note=named(t.note))

    def figure(f: Figure) -> Figure:
        return Figure(plain(f.title), lambda: (f.svg, plain(f.note)))

    notice = report.notice
    return replace(report, title=plain(report.title),
                   notice=None if notice is None else replace(notice, heading=plain(notice.heading),
                                                              lines=tuple(map(named, notice.lines))),
                   lines=tuple(map(named, report.lines)), tables=tuple(map(table, report.tables)),
                   notes=tuple(map(named, report.notes)), cautions=tuple(map(named, report.cautions)),
                   paragraph=None if report.paragraph is None else plain(report.paragraph),
                   figures=tuple(map(figure, report.figures)), problem_table=table(report.problem_table),
                   warnings=tuple(map(named, report.warnings)),
                   listings=tuple(Listing(plain(x.title), plain(x.text)) for x in report.listings), files=())
