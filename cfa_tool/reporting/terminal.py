"""The terminal report: the shared report tables drawn with rich."""

from __future__ import annotations

import io
import re
import textwrap

from rich import box
from rich.console import Console, Group
from rich.panel import Panel
from rich.table import Table
from rich.text import Text

from cfa_tool.errors import printable
from cfa_tool.note_parts import RUNNING, View, said, titled
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.column_parts import column_parts, label_columns
from cfa_tool.reporting.document import WARNINGS
from cfa_tool.reporting.tables import ReportTable

__all__ = ["SafeConsole", "render_report", "report_text", "rich_table"]


class SafeConsole(Console):
    """A console that shows control characters in text escaped (``\\x1b``), so that column names,
    group labels, titles and data values from a user's files cannot clear the screen, set the
    window title or move the cursor.  Every string (table cells, titles, notes) passes here."""

    def on_broken_pipe(self) -> None:  # the command line's handler says nothing more and exits 141
        raise BrokenPipeError

    def render_str(self, text: str, **options):  # type: ignore[override]
        return super().render_str(printable(text, keep_newlines=True), **options)

    def print(self, *objects, **options) -> None:  # type: ignore[override]
        safe = [Text(printable(o.plain, keep_newlines=True), style=o.style) if isinstance(o, Text) and not o.spans else o
                for o in objects]
        super().print(*safe, **options)


def _table(title: str, columns: list[tuple[str, str]]) -> Table:
    table = Table(title=title, title_justify="left", title_style="bold", box=box.SIMPLE_HEAD, pad_edge=False)
    for name, justify in columns:
        table.add_column(name, justify=justify)  # type: ignore[arg-type]
    return table


def rich_table(report: ReportTable, view: View = RUNNING) -> Group:
    """The table with its title above and its note below, both wrapped at the terminal's width (as part of
    the table they would wrap at the table's width, a narrow column of words under a narrow table).  A table
    wider than the terminal first wraps its widest text columns (long item names) and its number columns'
    headings; what still does not fit is shown in parts of whole columns, each with the first column again: a
    number is never broken across lines (a residual '-.02' printed as '-.0' above '2' reads as another number).
    The note's advice names its command, and a table it refers to is named as ``view`` names it."""
    parts = [_Folded(report.title, "bold"), _ColumnParts(report)]
    if report.note:
        parts += [_Folded(said(report.note, view), "dim"), Text("")]
    return Group(*parts)


class _Folded:
    """Words drawn at the width the console offers when they are drawn (a table's title, its note), a word wider
    than that (a long item name in a title at 40 columns) broken after a '_' or '-' inside it as the tables' cells
    break it (:func:`_names_broken`), never in the middle of a part: 'satisfaction_with_the_overall_service_qu'
    above 'ality_...' read as two names."""

    def __init__(self, text: str, style: str):
        self.text, self.style = text, style

    def __rich_console__(self, console, options):
        text = printable(self.text, keep_newlines=True)  # (Text is not escaped otherwise)
        # printable text: rich's Text would hold these words unchanged (it strips control codes, none left here)
        words = "\n".join(_names_broken(line, options.max_width) for line in text.split("\n"))
        lines = _wrapped_lines(words, options.max_width)
        if lines is None:
            yield Text(words, style=self.style)
            return
        from rich.segment import Segment

        style = console.get_style(self.style) if self.style else None
        for line in lines:
            yield Segment(line, style)
            yield Segment.line()


def _wrapped_lines(text: str, width: int) -> list[str] | None:
    """The lines rich's Text of one style wraps ``text`` into at ``width`` (overflow 'fold', no justification), by
    rich's own line division, without the Text's spans and copies: most of a report's words are drawn here.  None
    where rich would expand tabs, or when its division is not found (then the Text itself is drawn)."""
    if "\t" in text:
        return None
    try:
        from rich._wrap import divide_line
        from rich.cells import set_cell_size
    except ImportError:  # pragma: no cover - another rich
        return None
    out = []
    for line in text.split("\n"):
        offsets = divide_line(line, width, fold=True)
        for start, end in zip([0, *offsets], [*offsets, len(line)]):
            piece = line[start:end]
            if len(piece) > width:  # Text.rstrip_end: spaces beyond the width dropped
                spaces = len(piece) - len(piece.rstrip())
                piece = piece[:len(piece) - min(spaces, len(piece) - width)]
            if _cells(piece) > width:  # Text.truncate, overflow 'fold'
                piece = set_cell_size(piece, width)
            out.append(piece)
    return out


class _ColumnParts:
    """A report table laid out at the width the console offers when it is drawn."""

    def __init__(self, report: ReportTable):
        self.report = report

    def __rich_console__(self, console, options):
        report, room = self.report, options.max_width
        whole = _widths(report)
        # a matrix of long-named items too wide for the room: numbers for names, the names in a key under it
        keyed = T.matrix_key(report) if sum(whole) > room and whole[0] > room / 4 else None
        if keyed is not None:
            report = keyed[0]
            whole = _widths(report)
        narrow = _widths(report, wrapped_headings=True)
        # a long name kept whole up to LONGEST_UNBROKEN, but in no more than half the room: at 40 columns a floor
        # of 40 left the item column beside it one character wide, its names written down the page letter by letter
        floors = [min(f, max(LEAST_TEXT, room // 2) + CELL_PADDING) for f in _unbroken_widths(report)]
        labels = label_columns(report.align, whole, room, report.rows)
        for k, columns in enumerate(column_parts(_wrapped(narrow, report.align, room, floors), room, labels)):
            if k:
                yield _Folded(f"{report.title}, continued", "dim")
            # each part's text as wide as the room beside its own number columns allows, their headings wrapped
            # between words where the room is short
            part = dict(zip(columns, _wrapped([narrow[j] for j in columns], tuple(report.align[j] for j in columns),
                                              room, [floors[j] for j in columns])))
            for j in sorted(columns, key=lambda j: whole[j] - part[j]):  # headings whole while the room lasts
                if report.align[j] == "r" and sum(part.values()) - part[j] + whole[j] <= room:
                    part[j] = whole[j]
            yield self._table(report, columns, part, room)
        if keyed is not None:
            yield _key(keyed[1], room)

    @staticmethod
    def _table(report: ReportTable, columns: list[int], widths: dict[int, float], room: int) -> "_Drawn":
        table = _table("", [(report.columns[j], "left" if report.align[j] == "l" else "right") for j in columns])
        for column, j in zip(table.columns, columns):
            # text wraps at its column's width, within words only when a word is longer (never cut short);
            # numbers stay whole
            column.overflow = "fold"
            column.max_width = max(1, int(widths[j]) - CELL_PADDING)
            if report.align[j] == "r":  # a number column's heading wraps between its words, its numbers never
                column.min_width = _least_width(report, j, room - sum(
                    min(widths[i], LEAST_TEXT + CELL_PADDING) for i in columns if i != j) - CELL_PADDING)
        # a text column's width as the table will draw it: no wider than what the number columns at their least
        # and the other text columns leave in the room, so that its long names are broken where it wraps them
        least = {j: max([c.min_width or 1, *map(len, report.columns[j].split())]) + CELL_PADDING
                 for j, c in zip(columns, table.columns) if report.align[j] == "r"}  # a heading's word is whole
        text_widths = {j: max(1, int(min(widths[j], room - sum(least.values()) - sum(
            widths[i] for i in columns if i != j and i not in least))) - CELL_PADDING) for j in columns if j not in least}
        for column, j in zip(table.columns, columns):
            if j in text_widths:
                column.max_width = text_widths[j]
        faint = set(report.faint)
        # a part of a matrix of the items: the rows of its columns' items and those with a value in them
        shown = set(range(len(report.rows))) if not report.matrix else {
            k for k, (row, number) in enumerate(zip(report.rows, T.matrix_row_numbers(report)))
            if number in {report.columns[j] for j in columns} or any(row[j] for j in columns[1:])}
        drawn = _Drawn(table)
        for k, row in enumerate(report.rows):
            if k not in shown:
                continue
            cells = [_names_broken(row[j], text_widths[j]) if j in text_widths else row[j] for j in columns]
            cells = [Text(printable(cell), style="dim") if (k, j) in faint else cell for j, cell in zip(columns, cells)]
            drawn.add_row(cells, "bold red" if k in report.flagged else None)
        return drawn



class _Drawn:
    """A report table drawn as rich's :class:`~rich.table.Table` of :func:`_table`'s layout would draw it, line by
    line, when every cell's lines fit its column unwrapped and the table fits the room (the common case, where the
    table's own measuring and wrapping cost most of a report's time); otherwise the rich table itself, which wraps
    the cells that need it.  The widths are the table's: each column its longest line (heading or cell, in terminal
    cells), no narrower than its least width, plus its padding; a left column's lines padded on the right, a right
    column's on the left; a heading of several lines at the bottom of its row, a cell's at the top."""

    def __init__(self, table: Table):
        self.table = table
        self.rows: list[tuple[list, str | None]] = []

    def add_row(self, cells: list, style: str | None) -> None:
        self.table.add_row(*cells, style=style)
        self.rows.append((cells, style))

    def __rich_console__(self, console, options):
        lines = self._lines(console, options)
        if lines is None:
            yield self.table
            return
        yield from lines

    def _lines(self, console, options):
        from rich.segment import Segment
        from rich.style import Style

        table, columns = self.table, self.table.columns
        if table.box is None or table.title or table.caption or not table.show_edge:
            return None
        header = [printable(str(c.header), keep_newlines=True) for c in columns]
        body = [[c.plain if isinstance(c, Text) else printable(c, keep_newlines=True) for c in cells]
                for cells, _ in self.rows]
        if any("\t" in cell or "\r" in cell or cell.endswith("\n") for cell in header + [c for r in body for c in r]):
            return None
        split = [[cell.split("\n") for cell in header]] + [[cell.split("\n") for cell in row] for row in body]
        widths = []
        for j, column in enumerate(columns):
            longest = max((_cells(line) for row in split for line in row[j]), default=0)
            if column.min_width is not None:
                longest = max(longest, column.min_width)
            if column.max_width is not None:
                longest = min(longest, column.max_width)
            widths.append(min(longest + table._get_padding_width(j), options.max_width))
        if sum(widths) + table._extra_width > options.max_width:
            return None  # columns to narrow further: the table's own layout
        for j, column in enumerate(columns):  # a line longer than its column wrapped as the table wraps it
            inner = widths[j] - table._get_padding_width(j)
            for row in split:
                if any(_cells(line) > inner for line in row[j]):
                    row[j] = [line.plain for line in Text("\n".join(row[j])).wrap(
                        console, inner, justify=column.justify, overflow=column.overflow)]
        lefts = [0 if (j == 0 and not table.pad_edge) else 1 for j in range(len(columns))]
        pads = [table._get_padding_width(j) for j in range(len(columns))]
        frame = table.box.substitute(options, safe=console.safe_box)
        border, get_style = Style.null(), console.get_style
        header_style = get_style(table.header_style or "")
        out = [Segment(frame.get_top(widths), border), Segment.line()]

        def row_lines(cells: list[list[str]], styles: list[Style], bottom: bool, edges: tuple[str, str, str]) -> None:
            height = max(len(c) for c in cells)
            left_edge, vertical, right_edge = edges
            for i in range(height):
                pieces = [(left_edge, border)]
                for j, (lines, column) in enumerate(zip(cells, columns)):
                    if j:
                        pieces.append((vertical, border))
                    k = i - (height - len(lines)) if bottom else i
                    line = lines[k] if 0 <= k < len(lines) else ""
                    inner = widths[j] - pads[j]
                    if column.justify == "right":
                        line = line.rstrip()
                        line = " " * (inner - _cells(line)) + line
                    else:
                        line = line + " " * (inner - _cells(line))
                    pieces.append((" " * lefts[j] + line + " " * (widths[j] - inner - lefts[j]), styles[j]))
                pieces.append((right_edge, border))
                merged = [list(pieces[0])]  # neighbours of one style as one segment: fewer for the console to split
                for text, style in pieces[1:]:
                    if style is merged[-1][1] or style == merged[-1][1]:
                        merged[-1][0] += text
                    else:
                        merged.append([text, style])
                out.extend(Segment(text, style) for text, style in merged)
                out.append(Segment.line())

        # the table's edges: the heading's row, the rows between, the last row (as rich.table.Table._render)
        head = (frame.head_left, frame.head_vertical, frame.head_right)
        mid = (frame.mid_left, frame.mid_vertical, frame.mid_right)
        foot = (frame.foot_left, frame.foot_vertical, frame.foot_right)
        row_lines(split[0], [header_style] * len(columns), True, foot if not self.rows else head)
        out += [Segment(frame.get_row(widths, "head", edge=True), border), Segment.line()]
        for k, ((cells, style), lines) in enumerate(zip(self.rows, split[1:])):
            row_style = get_style(style or "")
            row_lines(lines, [get_style(c.style) + row_style if isinstance(c, Text) and isinstance(c.style, str)
                              else row_style for c in cells], False, foot if k == len(self.rows) - 1 else mid)
        out += [Segment(frame.get_bottom(widths), border), Segment.line()]
        return out


def _cells(text: str) -> int:
    """The terminal cells ``text`` takes: its length when it is ASCII (printable, as every cell is by then), else as
    rich counts wide letters."""
    if text.isascii():
        return len(text)
    from rich.cells import cell_len

    return cell_len(text)


CELL_PADDING = 3  # characters a column takes beside its text: padding and the gap to the next column


def _least_width(report: ReportTable, j: int, room: float) -> int:
    """The narrowest a number column ``j`` may be drawn: its longest cell, kept on one line; or, when that is wider
    than the ``room`` left beside the other columns at their narrowest, its longest word, so that a cell of several
    figures ('2906.584 / 2951.029 / 3000.105', '610.472 on 98 df, p < .001') wraps between them instead of being
    cut at the terminal's edge with the figures under it (new-user trial s18); a figure is never broken."""
    cells = [row[j] for row in report.rows]
    longest = max(map(len, cells), default=1)
    if longest <= room:
        return max(longest, 1)
    return max([len(word) for cell in cells for word in cell.split()] or [1])


def _widths(report: ReportTable, wrapped_headings: bool = False) -> list[float]:
    """Each column's width in characters: its longest cell or heading (with ``wrapped_headings``, of a number
    column the heading's longest word) and its padding."""
    def head(j: int) -> int:
        wrap = wrapped_headings and report.align[j] == "r"
        return max(map(len, report.columns[j].split()), default=0) if wrap else len(report.columns[j])

    return [max([head(j), *(len(row[j]) for row in report.rows)]) + CELL_PADDING for j in range(len(report.columns))]


LEAST_TEXT = 16  # characters a text column keeps when it is narrowed to wrap (or its own width, when less)
#: the longest word (an item's name such as belonging_school_engagement_01, which Stata allows to 32 characters) a
#: text column keeps whole when narrowed: a name broken after '_0' reads as two names; longer words are folded
LONGEST_UNBROKEN = 40


def _unbroken_widths(report: ReportTable) -> list[float]:
    """Each text column's least width when narrowed to wrap: its longest word (up to ``LONGEST_UNBROKEN``
    characters) and its padding, so that wrapping breaks its cells between words; 0 for number columns."""
    return [max([min(len(word), LONGEST_UNBROKEN) for row in report.rows for word in row[j].split()] or [0])
            + CELL_PADDING if align == "l" else 0 for j, align in enumerate(report.align)]


_NAME_PIECE = re.compile(r"[^_\-]*[_\-]+|[^_\-]+")  # a part of a name up to and with its '_' or '-'


def _names_broken(text: str, width: int) -> str:
    """A text cell with each word longer than ``width`` (an item's name of 52 characters in a column narrowed to 40)
    broken into lines after a '_' or '-' inside it, as many of its parts to a line as fit, so that it reads as one
    name carried over ('short_wait_with_a_really_very_long_' above 'descriptive_suffix'), never cut inside a part
    (re-check s18: '..._descriptive_suffi' above 'x'); a part longer than the width alone is folded by the table.
    Every terminal table's text columns (:class:`_ColumnParts`)."""
    if width < 1 or len(text) <= width or all(len(word) <= width for word in text.split()):
        return text
    out = []
    for word in text.split(" "):
        if len(word) <= width:
            out.append(word)
            continue
        lines = [""]
        for piece in _NAME_PIECE.findall(word):
            if lines[-1] and len(lines[-1]) + len(piece) > width:
                lines.append("")
            lines[-1] += piece
        out.append("\n".join(lines))
    return " ".join(out)


def _wrapped(widths: list[float], align: tuple[str, ...], room: int, floors: list[float]) -> list[float]:
    """The widths with the widest text columns narrowed, their text to wrap, so that the number columns fit
    beside them in one part: when the table is wider than ``room``, the text columns share what the number
    columns leave (at least a third of the room), the widest cut to one width and the narrower kept whole,
    none narrower than ``LEAST_TEXT`` nor than its ``floors`` entry (:func:`_unbroken_widths`: its longest word,
    an item's name kept whole; the parts of whole columns then take what does not fit)."""
    if sum(widths) <= room:
        return widths
    text = sorted((widths[j] for j, a in enumerate(align) if a == "l"), reverse=True)
    share = max(room - (sum(widths) - sum(text)), room / 3)
    if not text or sum(text) <= share:
        return widths
    # the cap: the widest k columns cut to one width, the others whole, together ``share``
    cap = share / len(text)
    for k in range(1, len(text) + 1):
        level = (share - sum(text[k:])) / k
        if k == len(text) or level >= text[k]:
            cap = level
            break
    cap = max(int(cap), LEAST_TEXT + CELL_PADDING)
    return [max(min(w, cap), min(w, floor)) if a == "l" else w for w, a, floor in zip(widths, align, floors)]


def _key(entries: tuple[tuple[str, str], ...], room: int) -> Table:
    """The key under a matrix drawn with numbers for its items: each number and its item's name, the name
    wrapped under itself, a long one after a '_' or '-' (:func:`_names_broken`) in the ``room`` beside the numbers."""
    grid = Table.grid(padding=(0, 1))
    grid.add_column(no_wrap=True, justify="right")
    grid.add_column(overflow="fold")
    beside = room - max((len(short) for short, _ in entries), default=0) - 1
    for short, name in entries:
        grid.add_row(short, Text(printable(_names_broken(name, beside), keep_newlines=True)))
    return grid


def _bullets(lines) -> Table:
    """Lines as a list, each wrapped under its own first word (not under the dash), a long name broken after a '_'
    or '-' inside it (:class:`_Folded`)."""
    grid = Table.grid(padding=(0, 1))
    grid.add_column(no_wrap=True)
    grid.add_column(overflow="fold")
    for line in lines:
        grid.add_row("  -", _Folded(line, ""))
    return grid


def problem_panel(notice: T.ProblemNotice, view: View = RUNNING) -> Panel:
    """The boxed problems section that comes before any table."""
    body = Text("\n".join(f"- {said(line, view)}" for line in notice.lines))
    return Panel(body, title=Text(notice.heading, style="bold"), title_align="left",
                 border_style="red" if notice.inadmissible else "yellow", box=box.HEAVY if notice.inadmissible else box.ROUNDED)


def render_report(report, console: Console) -> None:
    """Any command's report (cfa_tool.reporting.document.Report): the problems first, then what was done, the
    tables, the notes and the cautions.  A note's advice names its command (the reader runs the program), and a
    table it refers to is named by its title (cfa_tool.note_parts)."""
    view = titled(report.tables, running=report.kind.value)  # its own command not advised in it
    if report.notice is not None:
        console.print(problem_panel(report.notice, view))
        console.print()
    console.print(_Folded(report.title, "bold underline"))
    for line in report.lines:  # (a long name broken after a '_' or '-' inside it, as in the tables: _Folded)
        console.print(_Folded(said(line, view), ""))
    if report.warnings:
        console.print(Text(WARNINGS, style="bold"))
        console.print(_bullets([said(line, view) for line in report.warnings]))
    if report.paragraph:
        console.print()
        console.print(_Folded(report.paragraph, ""))
    for figure in report.figures:  # pictures cannot be drawn here: named, where a reader finds them
        console.print(Text(f"{figure.title}: a picture, drawn in the HTML, Markdown and Word reports", style="dim"))
    console.print()
    section = ""
    for table in report.tables:
        if table.section and table.section != section:
            console.print(Text(table.section, style="bold reverse"))
        section = table.section
        left_out = T.terminal_matrix_left_out(table)
        console.print(rich_table(table, view) if left_out is None else Text(left_out, style="dim"))
        if left_out is not None:
            console.print()
    for listing in report.listings:
        console.print(Text(listing.title, style="bold"))
        # a listing is a model file's text: broken where the model stays the same, so that it can be copied as it
        # stands (wrapped by the terminal, a comment went on without its '#')
        text = "\n".join(listing_lines(printable(listing.text, keep_newlines=True), console.width))
        console.print(Text(text))  # (a line that cannot break so, a name wider than the terminal, wraps there)
    for line in report.notes:
        console.print(_Folded(said(line, view), ""))
    for line in report.cautions:
        console.print(_Folded(said(line, view), "italic"))


def _outside_quotes(line: str, wanted: str) -> list[int]:
    """Where the character ``wanted`` stands in ``line`` outside double quotes (names in quotes may hold any)."""
    found, quoted = [], False
    for k, c in enumerate(line):
        quoted = quoted != (c == '"')
        if c == wanted and not quoted:
            found.append(k)
    return found


def listing_lines(text: str, width: int) -> list[str]:
    """A model file's text in lines of at most ``width`` characters that read as the same model: a comment goes on
    over lines that start with '#'; a statement's list breaks after a comma (the model language lets a list go on
    in the next line after one), its next lines indented; a line that cannot break so stays whole."""
    out: list[str] = []
    for line in text.split("\n"):
        if len(line) <= width:
            out.append(line)
            continue
        hashes = _outside_quotes(line, "#")
        code, comment = (line[:hashes[0]], line[hashes[0] + 1:]) if hashes else (line, "")
        if code.strip():
            indent = " " * (len(code) - len(code.lstrip()) + 4)
            current = ""
            for piece in _pieces(code.rstrip()):
                if current and len(current) + len(piece) > width:
                    out.append(current.rstrip())
                    current = indent + piece.lstrip()
                else:
                    current += piece
            out.append(current.rstrip())
        if hashes:
            margin = " " * (len(line) - len(line.lstrip())) if not code.strip() else ""
            out += textwrap.wrap(comment.strip(), width, initial_indent=margin + "# ", subsequent_indent=margin + "# ",
                                 break_long_words=False, break_on_hyphens=False) or [margin + "#"]
    return out


def _pieces(code: str) -> list[str]:
    """A statement cut after each comma outside quotes, the commas kept."""
    cuts = [k + 1 for k in _outside_quotes(code, ",")]
    return [code[a:b] for a, b in zip([0] + cuts, cuts + [len(code)]) if code[a:b]]


def report_text(report, width: int = 120) -> str:
    buffer = io.StringIO()
    render_report(report, SafeConsole(file=buffer, width=width, no_color=True, highlight=False, emoji=False, markup=False))
    return buffer.getvalue()
