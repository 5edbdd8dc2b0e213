"""One document of several results (``cfa-tool report A.json B.json --docx paper.docx``): the report model of
each result (reporting.document.Report) in the order given, each under a heading that says what analysis it is, in
the report model of a document (:class:`Combined`), which the HTML, Markdown and Word writers draw.

What a reader must see first comes first: a "Read first" notice at the top gathers every result's problems, each
line naming the result it belongs to (and each result's own problems still open its part); the data the results
read is said at the top, plainly when they do not describe the same rows (another data file, or the same file read
with other row filters or missing codes); each result keeps its own methods paragraph (never merged into one claim);
the cautions every result gives (fit-index guide values are conventions, high-stakes use) are said once, at the
end.  Tables and figures are numbered through the whole document (:func:`table_numbers`, :func:`figure_numbers`)."""

from __future__ import annotations

import re
from dataclasses import dataclass, replace

from cfa_tool.note_parts import Command, Note, TableReference, Text, View, said
from cfa_tool.reporting.document import DataRead, Report, ResultKind, by_file_name, file_names
from cfa_tool.data.csv_convention import PLAIN, CsvConvention, separator_words
from cfa_tool.numbers import word_list
from cfa_tool.reporting.tables import NoticeKind, ProblemNotice

#: what each command's result is, in plain words: the heading of its part of a document of several results
ANALYSIS = {ResultKind.FIT: "Confirmatory factor analysis", ResultKind.CHECK: "Check of the model and the data",
            ResultKind.COMPARE: "Comparison of models", ResultKind.INVARIANCE: "Measurement invariance",
            ResultKind.REPLICATE: "Replication in a second sample", ResultKind.BOOTSTRAP: "Bootstrap of the fit",
            ResultKind.CUTOFFS: "Fit-index cutoffs from simulated samples",
            ResultKind.POWER: "Statistical power", ResultKind.POWER_SIMULATION: "Statistical power by simulation",
            ResultKind.SIMULATE: "Simulated data", ResultKind.SCORES: "Factor scores",
            ResultKind.EXPLORE: "Exploratory factor analysis", ResultKind.ALIGN: "Alignment of group parameters"}

TITLE = "Results"  # the document's title, over its parts
#: the heading of the "Read first" notice: what each kind of problem that some result has (tables.NoticeKind) says,
#: gravest first, or, when the results give cautions only, READ_FIRST_CAUTIONS
READ_FIRST = {NoticeKind.NOT_ESTIMATED: "some models could not be estimated: nothing of them is a result",
              NoticeKind.NOT_ADMISSIBLE: "some solutions are not admissible: do not interpret them",
              NoticeKind.DATA_STOP_FIT: "problems in the data stop a fit: fix them before fitting"}
READ_FIRST_CAUTIONS = "Read first: check these results before interpreting them"


def read_first_heading(kinds: set[NoticeKind]) -> str:
    """The "Read first" notice's heading for results whose notices have problems of ``kinds``: each kind said, gravest
    first ('Read first: some solutions are not admissible: do not interpret them; problems in the data stop a fit:
    fix them before fitting'), or the heading of cautions."""
    said_kinds = [words for kind, words in READ_FIRST.items() if kind in kinds]
    return "Read first: " + "; ".join(said_kinds) if said_kinds else READ_FIRST_CAUTIONS


@dataclass(frozen=True)
class Part:
    """One result of the document: its report (without the cautions, which the document says once and without
    the user's folders, as the views for others name files), its number among the results and the heading of its
    part."""

    number: int
    heading: str
    report: Report


@dataclass(frozen=True)
class Combined:
    """A document of several results: the "Read first" notice (every result's problems, each naming its result,
    and the data when the results do not describe the same rows), the lines under the title (what each result
    read), the parts in the order given, and the cautions once."""

    title: str
    notice: ProblemNotice | None
    lines: tuple[Text, ...]
    parts: tuple[Part, ...]
    cautions: tuple[Text, ...]


def part_heading(number: int, report: Report) -> str:
    """'Result 2. Model comparison': the result's number and its report's title, which says what analysis it is,
    but for a fit's, which is the model's name: 'Result 1. Confirmatory factor analysis: Rider experience, three
    factors'."""
    title = report.title.strip()
    if report.kind is ResultKind.FIT or not title:
        return f"Result {number}. {ANALYSIS[report.kind]}" + (f": {title}" if title else "")
    return f"Result {number}. {title}"


def _who(*parts: Part) -> str:
    """'Result 2 (comparison of models)'; of several parts that give the same line, 'Results 1 and 3 (confirmatory
    factor analysis, comparison of models)'."""
    if len(parts) == 1:
        return f"Result {parts[0].number} ({ANALYSIS[parts[0].report.kind].lower()})"
    analyses = list(dict.fromkeys(ANALYSIS[p.report.kind].lower() for p in parts))
    return f"Results {word_list([str(p.number) for p in parts])} ({', '.join(analyses)})"


def _has_table(line: Text) -> bool:
    """Whether ``line`` names a table of its result (a line said once for several results could name one only)."""
    return not isinstance(line, str) and any(isinstance(p, TableReference) for p in line.parts)


def combined(reports: list[tuple[Report, str]]) -> Combined:
    """The document of ``reports`` (each with the name of the file it was read from, which the data lines use
    when a result does not record its data), in the order given."""
    parts = tuple(Part(k, part_heading(k, by_file_name(r)), in_saved_words(replace(by_file_name(r), cautions=())))
                  for k, (r, _) in enumerate(reports, start=1))
    data_lines, same = _data_lines(parts, [source for _, source in reports])
    # each result's problems that make a solution not admissible (or stop its fit) before any result's cautions, as a
    # single result's notice puts them (admissibility.solution_first), each result's order kept; a line that several
    # results give in the same words said once, naming them all
    grave: dict[object, tuple[list[Part], Text]] = {}
    mild: dict[object, tuple[list[Part], Text]] = {}
    for part in parts:
        notice = part.report.notice
        if notice is None:
            continue
        for k, line in enumerate(notice.lines or (notice.heading + ".",)):  # (in its words: in_saved_words above)
            shared = (part.number, said(line)) if _has_table(line) else said(line)
            (grave if k < notice.leading else mild).setdefault(shared, ([], line))[0].append(part)
    rank = list(READ_FIRST).index
    gravest = sorted(grave.values(), key=lambda shared: min(rank(p.report.notice.kind) for p in shared[0]))
    problems = [Note((f"{_who(*whose)}: ",)) + _of_part(line, whose[0].number)
                for whose, line in (*gravest, *mild.values())]
    kinds = {p.report.notice.kind for p in parts if p.report.notice is not None and p.report.notice.leading}
    lines = tuple(problems) + (() if same else data_lines)
    notice = None if not lines else ProblemNotice(read_first_heading(kinds), lines, bool(kinds),
                                                  min(kinds, key=rank) if kinds else None,
                                                  len(grave))
    cautions: dict[str, Text] = {}
    for report, _ in reports:
        for line in report.cautions:
            cautions.setdefault(said(line), line)
    return Combined(TITLE, notice, data_lines if same else (), parts, tuple(cautions.values()))


def _of_part(line: Text, number: int) -> Text:
    """A line of a result's notice as the document's "Read first" notice holds it: a reference to a table of that
    result keyed by the result's number too ('2/model_fit'), so that it names that result's table
    (:func:`notice_view`), whichever other result has a table of the same key."""
    if isinstance(line, str):
        return line
    return Note(tuple(TableReference(f"{number}/{p.key}") if isinstance(p, TableReference) else p for p in line.parts))


def _in_its_words(line: Text, kind: ResultKind) -> Text:
    """A line of a result of ``kind`` as a document of saved results gives it, read by the user of ``cfa-tool
    report`` (who runs neither that command nor its options): a command it names that is the result's own said by
    the words of its own report (note_parts.Command.inside: 'among the models compared here', not 'cfa-tool
    compare'), and an option advised ('--max-iterations') as running the result's command again with it
    ('when running fit again: cfa-tool fit ... --max-iterations'), never as an option of ``report``; an option the
    command does not take as its own report says it (note_parts.Command's ``elsewhere``: 'a fit of the model with
    --robust' in a bootstrap's)."""
    if isinstance(line, str):
        return line
    parts = []
    for p in line.parts:
        if isinstance(p, Command) and p.takes and kind.value not in p.takes:  # as that command's own report says it
            p = replace(p, text=p.elsewhere, takes=(), elsewhere="")  # (note_parts.Command.said)
        if isinstance(p, Command) and p.runs == kind.value:
            p = replace(p, text=p.inside, runs="", inside="")
        elif isinstance(p, Command) and _OPTION.match(p.text):
            given, python = _OPTION.match(p.text).group(1, 2)
            again = (f"cfa-tool {kind.value} ... {given}{python or ''}" if given.startswith("--") else
                     f"cfa_tool.{kind.value.replace('-', '_')}(..., {given})")
            p = replace(p, text=f" (when running {kind.value} again: {again})")
        parts.append(p)
    return Note(tuple(parts))


def in_saved_words(report: Report) -> Report:
    """A result's report as a view made by ``cfa-tool report`` says it (its part of a document of saved results, or
    the one saved result's own views): its notice, warnings and notes in the words of :func:`_in_its_words` (an
    option advised as running its command again, never as an option of ``report``)."""
    notice = report.notice
    if notice is not None:
        notice = replace(notice, lines=tuple(_in_its_words(line, report.kind) for line in notice.lines))
    tables = tuple(t if t.note is None else replace(t, note=_in_its_words(t.note, report.kind)) for t in report.tables)
    return replace(report, notice=notice, warnings=tuple(_in_its_words(w, report.kind) for w in report.warnings),
                   notes=tuple(_in_its_words(n, report.kind) for n in report.notes), tables=tables)


#: a command's text that is an option and nothing else, as the command line (' (--max-iterations)') or the Python
#: API (' (max_iterations=...)') writes it (options.Option), or both (" (--robust; from Python, test='robust')")
_OPTION = re.compile(r"^\s*\(((?:--[a-z][a-z-]*|[a-z_]+=)[^;()]*)(; from Python, [^;()]*)?\)\s*$")


def notice_view(document: Combined, numbers: bool, commands: bool | None = None) -> View:
    """The view of the document's "Read first" notice and lines: with ``numbers`` (a document whose tables are
    numbered through: Word, HTML, Markdown) each result's table named by its number in the whole document ('Table
    7'), otherwise (the terminal, a --tables folder) by its title and its result; with the ``commands`` (by default
    where there are no numbers: a manuscript's Word file runs nothing) or without."""
    tables = {}
    for part, first in zip(document.parts, table_numbers(document)):
        for k, table in enumerate(part.report.tables):
            tables[f"{part.number}/{table.key}"] = (f"Table {first + k}" if numbers else
                                                    f'the table "{table.title}" of Result {part.number}')
    return View(not numbers if commands is None else commands, tables)


def numbered_part(report: Report, first_table: int, first_figure: int) -> tuple[Report, View]:
    """A result's report as a document numbered through shows it where its writer gives no numbers of its own (HTML,
    Markdown; the Word file captions its tables and figures itself from the same :func:`table_numbers` and
    :func:`figure_numbers`): each table's title and each figure's after its number ('Table 7. Fit of each level'),
    and the view of a reader who runs the program that names its tables so ('Table 7'), its own command not
    advised in it."""
    tables = tuple(replace(t, title=f"Table {k}. {t.title}") for k, t in enumerate(report.tables, start=first_table))
    figures = tuple(replace(f, title=f"Figure {k}. {f.title}") for k, f in enumerate(report.figures,
                                                                                      start=first_figure))
    view = View(True, {t.key: f"Table {k}" for k, t in enumerate(report.tables, start=first_table)},
                report.kind.value)
    return replace(report, tables=tables, figures=figures), view


def _identity(data: DataRead) -> tuple:
    """What makes two reads of data the same rows: the file's contents (its name where a checksum is missing) and
    how its rows were read and kept."""
    return (data.checksum or data.file, data.reading)


def _data_lines(parts: tuple[Part, ...], sources: list[str]) -> tuple[tuple[Text, ...], bool]:
    """The lines that say what data the results read, and whether those that read data all describe the same rows:
    one line when they read the same file the same way; otherwise a line that says they do not, then one line per
    result (its file and how its rows were read and kept)."""
    reads = [p.report.data for p in parts]
    known = [read for read in reads if read]
    # the same bytes read by other paths ('transit.csv', '../survey/transit.csv') are one file, named by the path the
    # first result gave it
    first = {}
    for d in (d for read in known for d in read):
        first.setdefault(d.checksum or d.file, d.file)
    names = file_names(list(first.values()))

    def name(d: DataRead) -> str:
        path = first[d.checksum or d.file]
        return names.get(path, path)
    identities = {tuple(_identity(d) for d in read) for read in known}
    none = [f"{_who(p)} read no data file (it plans or simulates)." for p, read in zip(parts, reads) if read == ()]

    # files of one name with other contents (read from other folders) told apart by their checksums: 'd.csv
    # (version 2)', numbered in the order the results first read them; results that read the same bytes share a label
    versions: dict[str, list[str]] = {}
    for d in (d for r in known for d in r):
        if d.checksum and d.checksum not in versions.setdefault(name(d), []):
            versions[name(d)].append(d.checksum)

    def label(d: DataRead) -> str:
        among = versions[name(d)]
        if len(among) < 2:
            return name(d)
        return name(d) + (f" (version {among.index(d.checksum) + 1})" if d.checksum else
                                " (a version not recorded)")

    def described(read: tuple[DataRead, ...]) -> str:
        return "; ".join(label(d) + (", " + ", ".join(d.reading) if d.reading else ", every row of the file as it stands")
                         for d in read)

    if None not in reads and len(identities) <= 1:
        if not known:
            return tuple(none), True
        who = ("Both results" if len(parts) == 2 else f"All {len(parts)} results") if len(known) == len(parts) else \
            f"{_who(parts[reads.index(known[0])])}" if len(known) == 1 else f"The {len(known)} results that read data"
        verb = "read" if len(known) == 1 else "read the same data the same way:"
        return (f"{who} {verb} {described(known[0])}.", *none), True
    lines: list[Text] = ["These results do not all describe the same rows of data: "
                         + ("some result does not record the data it read." if len(identities) <= 1 else
                            "they read different data files, or the same file with other row filters or missing "
                            "codes." + (" Files of one name with other contents are told apart as versions, numbered "
                                        "in the order the results read them." if any(len(v) > 1 for v in
                                                                                      versions.values()) else ""))]
    for part, read, source in zip(parts, reads, sources):
        if read is None:
            lines.append(f"{_who(part)} does not record the data it read ({source} was saved from Python, or by an "
                         f"earlier version of the tool); see the data lines of its part.")
        elif not read:
            lines.append(f"{_who(part)} read no data file (it plans or simulates).")
        else:
            lines.append(f"{_who(part)}: {described(read)}.")
    return tuple(lines), False


def table_numbers(combined_document: Combined) -> list[int]:
    """The number of each part's first table: the tables numbered through the document (Table 1 .. n)."""
    return _starts([len(part.report.tables) for part in combined_document.parts])


def figure_numbers(combined_document: Combined) -> list[int]:
    """The number of each part's first figure: the figures numbered through the document (Figure 1 .. n)."""
    return _starts([len(part.report.figures) for part in combined_document.parts])


def _starts(counts: list[int]) -> list[int]:
    """The number of the first of each run of ``counts`` things numbered from 1 through them all."""
    starts, k = [], 1
    for count in counts:
        starts.append(k)
        k += count
    return starts


def folder_convention(document: Combined) -> tuple[CsvConvention, str]:
    """The one convention of every CSV file of the document's --tables folder, and the line of its contents file that
    says it ('' for commas and decimal points of every result, which no report repeats).  Each result's convention is
    that of the data file it read (data.csv_convention); when they differ, the folder takes the one the results'
    delimited data files share that is not commas and points (a researcher whose data files use decimal commas opens
    the folder in a spreadsheet set so; a Stata, SPSS or workbook file sets none), or commas and points when they
    share none, and the line names the results whose data were written otherwise: a folder of files written two ways
    opened one of them as one column of text (new-user trial s28)."""
    conventions = [part.report.csv_convention for part in document.parts]
    own = list(dict.fromkeys(c for c in conventions if not c.plain()))
    chosen = own[0] if len({(c.separator, c.decimal) for c in own}) == 1 else PLAIN
    if len(set(conventions)) <= 1:
        return chosen, "" if chosen.plain() else f"The CSV files: {chosen.said()}."
    words = separator_words(chosen.separator, chosen.decimal) + (
        "; UTF-8 with a byte-order mark, by which a spreadsheet reads its accented letters as written"
        if chosen.byte_order_mark else "")
    others = [p for p, c in zip(document.parts, conventions) if c != chosen]
    whose = [p for p, c in zip(document.parts, conventions) if c == chosen]
    return chosen, (f"The CSV files of every result: {words}, one way for the whole folder, so that a spreadsheet opens "
                    f"them all alike" + (f" (as in the data of {word_list([f'Result {p.number}' for p in whose])}; "
                                         if whose else " (") +
                    f"{word_list([f'Result {p.number}' for p in others])} read data written otherwise, or a file "
                    f"that sets no convention: a Stata, SPSS or workbook file).")
