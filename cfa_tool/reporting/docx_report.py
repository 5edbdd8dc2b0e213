"""The report as a Word document (python-docx), laid out for a manuscript in the style of the APA
Publication Manual, 7th edition: numbered tables with an italic title, horizontal rules only, notes under
the table; the methods paragraph; the path diagram as a numbered figure on one page (a landscape one when its labels
print larger there; in strips cut between its bands only when even whole on one page they would print below 5 pt);
the cautions.  The problems of
the solution come first, as in every view.  The tables are the report's own (one report model)."""

from __future__ import annotations

import io
import math
import re
from dataclasses import dataclass

from docx import Document
from docx.enum.section import WD_ORIENT, WD_SECTION
from docx.enum.table import WD_TABLE_ALIGNMENT
from docx.oxml import OxmlElement, parse_xml
from docx.oxml.ns import nsdecls
from docx.oxml.ns import qn
from docx.shared import Emu, Inches, Pt, RGBColor

from cfa_tool.errors import printable
from cfa_tool.note_parts import WORDS, View, numbered, said
from cfa_tool.reporting.column_parts import column_parts, label_columns
from cfa_tool.reporting.diagram import MIN_FIGURE_TEXT  # the smallest lettering of a figure in print
from cfa_tool.reporting.picture import (DEFAULT_DPI, page_fit, png_converter, smallest_text, svg_size, svg_strips,
                                       svg_to_png)
from cfa_tool.reporting.document import PARAGRAPH_HEADING, WARNINGS, by_file_name
from cfa_tool.reporting.numbers import printed, printed_line
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.tables import ReportTable

FAINT_GREY = RGBColor(0x99, 0x99, 0x99)
PROBLEM_RED = RGBColor(0xB3, 0x26, 0x1E)
FONT = "Times New Roman"
NO_PICTURE = ("The path diagram is not included: making a picture for Word needs the rsvg-convert program "
              "(Debian package librsvg2-bin); the diagram can be written as an SVG file instead.")


def _rule(cell, edge: str, size: int = 8) -> None:
    """A horizontal rule on one edge of a table cell (APA tables have no vertical rules)."""
    borders = _property(cell._tc.get_or_add_tcPr(), "w:tcBorders")
    line = OxmlElement(f"w:{edge}")
    line.set(qn("w:val"), "single")
    line.set(qn("w:sz"), str(size))
    line.set(qn("w:color"), "000000")
    borders.append(line)


# Typesetting for print (what a journal's production editor expects): a number or an interval is never broken
# across lines.  Minus signs and relations are set by the printed views' one rule (reporting.numbers.printed: the
# true minus, U+2212, after which no line breaks, where a hyphen-minus lets '-' end a line; '\u2265' for '>='); the spaces inside an interval and inside a numeric cell are non-breaking; numeric cells do
# not wrap (w:noWrap).  Tables wider than the text are set as table_layout says: a matrix of the items first with
# its rows numbered and a key, in smaller type on a portrait page, then on a landscape page, and when even that is
# too narrow, in parts of whole columns with the label column again (as the terminal does).
INTERVAL = re.compile(r"\[[^\[\]]*\]")
RELATION = re.compile(r"(?<=\S) ([=<>\u2264\u2265]) (?=[\d.\u2212-])")  # 'p = .186', 'N = 900': kept on one line
NO_BREAK_SPACE = "\u00a0"
BODY_SIZE = 10.0  # points: table type
MATRIX_SIZE = 9.0  # points: the least type of a matrix of the items on a portrait page
WIDE_SIZE = 8.0  # points: table type of a wide table, on a landscape page
CELL_PADDING = 2 * 5.4  # points: the left and right cell margins Word's default table style gives (0.075 inch each)
WIDE_PADDING = 2 * 2.0  # points: the narrower cell margins of a wide table


def typeset(text: str, numeric: bool = False) -> str:
    """``text`` with its minus signs as U+2212 and the spaces of its intervals, of a relation to a number
    ('p = .186') and, in a numeric cell, all its spaces non-breaking, so that no line break splits a number, an
    interval or a statistic from its value."""
    text = printable(text)  # control characters shown as escapes: XML allows none
    text = RELATION.sub(f"{NO_BREAK_SPACE}\\1{NO_BREAK_SPACE}", printed(text))
    if numeric:
        return text.replace(" ", NO_BREAK_SPACE)
    return INTERVAL.sub(lambda m: m.group(0).replace(" ", NO_BREAK_SPACE), text)


# Advance widths of Times' characters in thousandths of the type size (Adobe's Times-Roman font metrics, recalled
# from memory; Times New Roman's are nearly the same); any other character counts as 600.
_TIMES = {**dict.fromkeys("0123456789abdghknopquvxy_#$", 500), **dict.fromkeys(" .,:;!ijlt'|/", 278),
          **dict.fromkeys("ceaz?", 444), **dict.fromkeys("frI-[]()", 333), "s": 389, "m": 778, "w": 722,
          **dict.fromkeys("ADGHKNOQUVXY", 722), **dict.fromkeys("BRC", 667), **dict.fromkeys("ELTZ", 611),
          **dict.fromkeys("FPS", 556), "J": 389, "M": 889, "W": 944, "%": 833,
          **dict.fromkeys("<>=+\u2212\u00b1", 564), "\u00a0": 250, "\u00b2": 300}
WIDTH_MARGIN = 1.08  # estimated widths made a little larger: a cell a little too wide costs nothing


def _text_width(text: str, size: float) -> float:
    """The width of ``text`` in points at ``size`` points, from Times' character widths."""
    return WIDTH_MARGIN * size * sum(_TIMES.get(c, 600) for c in text) / 1000


def _column_widths(table: ReportTable, size: float) -> tuple[list[float], list[float]]:
    """For each column the width it needs on one line (its longest cell) and the least it needs (numeric
    cells whole; text and the header broken only between words), in points without the cell margins."""
    wanted, least = [], []
    for j, header in enumerate(table.columns):  # the cells as set (a true minus is wider than a hyphen)
        cells = [typeset(row[j], table.align[j] == "r") for row in table.rows]
        words = [w for text in [header, *([] if table.align[j] == "r" else cells)] for w in text.split()]
        whole = cells if table.align[j] == "r" else []
        least.append(max([_text_width(t, size) for t in [*words, *whole]] or [0.0]))
        wanted.append(max([_text_width(t, size) for t in [header, *cells]] or [0.0]))
    return wanted, least


def _fitted(wanted: list[float], least: list[float], room: float) -> list[float]:
    """Column widths that fill no more than ``room``: what each column wants if all fit (widened in proportion,
    by at most a half, to give the table air), else the least each needs and the rest of the room shared in
    proportion to what the columns that can wrap would still like."""
    if sum(wanted) <= room:
        stretch = min(room / sum(wanted), 1.5) if sum(wanted) > 0 else 1.0
        return [w * stretch for w in wanted]
    spare, extra = room - sum(least), [w - m for w, m in zip(wanted, least)]
    share = spare / sum(extra) if sum(extra) > 0 and spare > 0 else 0.0
    return [m + e * share for m, e in zip(least, extra)]


def _room(document) -> float:
    """The text width of the current section in points."""
    section = document.sections[-1]
    return Emu(section.page_width - section.left_margin - section.right_margin).pt


LANDSCAPE_GAIN = 1.1  # a figure goes on a landscape page when it prints at least this much larger there
# A drawing prints whole on one page, rather than in strips on following pages, when its smallest text reaches this
# size there: below MIN_FIGURE_TEXT, but a size some journals' artwork guides still accept as their least (5 pt;
# recalled from memory), and a journal prints a figure on one page, never cut across two with the second half empty.
ONE_PAGE_TEXT = 5.0  # points
# a line of the body text in points: 12 pt type at the default template's line spacing of 1.15 (w:line 276/240),
# a line of Times being about 1.15 times its size (Times New Roman's ascent plus descent, recalled from memory);
# PARAGRAPH_GAP is the space after a paragraph (the template's w:after 200 twentieths of a point)
LINE = 12.0 * 1.15 * 1.15
PARAGRAPH_GAP = 10.0
PICTURE_GAP = 6.0  # points after the picture's paragraph
SLACK = 14.0  # points kept free on the page: the estimates above are not the word processor's own
FIGURES = "Figures"  # the heading of the figures, on the page of the first
HEADING_ROOM = 13.0 * 1.15 + 10.0 + 6.0  # points: a level-2 heading's line (13 pt type) and the space before it, with air


def _figure_room(note: str, across: float) -> float:
    """Inches of a page's text height a figure's words take (no drawing) on a page whose text is ``across`` inches
    wide: the caption's two lines, the note's lines (estimated from Times' character widths, which are made a
    little wider than they are), the space after each paragraph, and a line's slack; the drawing is sized for what
    is left, so that the caption, the drawing and its note fit on one page (and are kept together there,
    keep-with-next)."""
    note_lines = math.ceil(_text_width("Note. " + typeset(note), 12.0) / (72.0 * across)) if note else 0
    points = 2 * LINE + PARAGRAPH_GAP + PICTURE_GAP + (note_lines * LINE + 12.0 if note else 0.0) + SLACK
    return points / 72.0


def _figure_layout(document, svg: str, note: str = "",
                   heading: bool = False) -> tuple[bool, list[str], tuple[float, float]]:
    """How a figure is set, worked out once: (on a landscape page, its drawing whole or in strips, the room for each
    piece in inches, width by height).  The room is the page's text area less the caption, ``note``
    (_figure_room) and, with ``heading``, the figures' heading on the first figure's page, all taken before the
    layout is chosen.  The first of: whole on a portrait page, whole on a landscape page, whose smallest text prints
    at least ``MIN_FIGURE_TEXT``; whole on one page, in the orientation where it prints larger, when its smallest
    text reaches ``ONE_PAGE_TEXT`` there; in strips on portrait pages, in strips on landscape pages, at
    ``MIN_FIGURE_TEXT`` or more; the strips are cut between the bands of a diagram of many items
    (picture.svg_strips), one under the other on following pages.  When none reaches that size, the one that prints
    largest, if at least ``LANDSCAPE_GAIN`` times larger than whole on the portrait page.  The drawing is the same in
    every case."""
    width, height = svg_size(svg)
    areas = _figure_areas(document, note, heading)
    choices = []  # (inches per unit of the drawing, landscape, pieces), in the order of preference
    for pieces_of in (lambda w, h: [svg], lambda w, h: svg_strips(svg, h * width / w)):
        for landscape in (False, True):
            w, h = areas[landscape]
            pieces = pieces_of(w, h)
            choices.append((min(w / width, h / max(svg_size(piece)[1] for piece in pieces)), landscape, pieces))

    def prints(choice, size: float) -> bool:  # its smallest text at least ``size`` points (or no text)
        smallest = smallest_text(svg, choice[0] * width)
        return smallest is None or smallest >= size

    whole = max(choices[:2], key=lambda c: c[0])  # whole on one page, in the orientation where it prints larger
    ranked = [(c, MIN_FIGURE_TEXT) for c in choices[:2]] + [(whole, ONE_PAGE_TEXT)] + \
        [(c, MIN_FIGURE_TEXT) for c in choices[2:]]
    for choice, size in ranked:
        if prints(choice, size):
            _, landscape, pieces = choice
            return landscape, pieces, areas[landscape]
    scale, landscape, pieces = max(choices, key=lambda c: c[0])
    if scale <= LANDSCAPE_GAIN * choices[0][0]:
        landscape, pieces = False, [svg]
    return landscape, pieces, areas[landscape]


def _figure_areas(document, note: str = "", heading: bool = False) -> tuple[tuple[float, float], tuple[float, float]]:
    """The room for a figure's drawing, width by height in inches, on a portrait and on a landscape page of
    ``document``'s paper and margins: the text area less the room of its caption and ``note`` (_figure_room) and,
    with ``heading``, of the figures' heading (HEADING_ROOM).  A drawing set to the narrower width of a portrait
    page shrinks its labels with it, so a wide drawing (a model of many items) prints larger across a landscape
    page."""
    section = document.sections[-1]
    long_side, short_side = max(section.page_width, section.page_height), min(section.page_width, section.page_height)
    across, down = section.left_margin + section.right_margin, section.top_margin + section.bottom_margin
    areas = ((Emu(short_side - across).inches, Emu(long_side - down).inches),
             (Emu(long_side - across).inches, Emu(short_side - down).inches))
    above = HEADING_ROOM / 72.0 if heading else 0.0
    return tuple((w, h - _figure_room(note, w) - above) for w, h in areas)


def _set_orientation(document, landscape: bool) -> None:
    """A new section (on a new page) when the orientation changes: a landscape page for a wide table.  A section
    that holds nothing yet is turned instead (a new page and no content would print as an empty page); so the
    caller turns the page back only when something follows (an empty portrait page ended a report whose last table
    was landscape)."""
    current = document.sections[-1]
    if (current.orientation == WD_ORIENT.LANDSCAPE) == landscape:
        return
    section = current if _section_is_empty(document) else document.add_section(WD_SECTION.NEW_PAGE)
    width, height = section.page_width, section.page_height
    section.orientation = WD_ORIENT.LANDSCAPE if landscape else WD_ORIENT.PORTRAIT
    section.page_width, section.page_height = max(width, height) if landscape else min(width, height), \
        min(width, height) if landscape else max(width, height)


def _section_is_empty(document) -> bool:
    """Whether the last section holds nothing yet: the body ends, before its own section properties, on the
    paragraph that closes the section before (python-docx's add_section puts that section's properties in it)."""
    body = [child for child in document.element.body.iterchildren() if child.tag != qn("w:sectPr")]
    if not body:
        return True
    last = body[-1]
    return last.tag == qn("w:p") and last.find(f"{qn('w:pPr')}/{qn('w:sectPr')}") is not None


# the order the properties of a table and of a cell must come in (ECMA-376 Part 1, 17.4.60 tblPr and 17.4.70 tcPr):
# readers ignore or refuse others (LibreOffice dropped the narrow cell margins of a table set after its look)
_ORDER = {"w:tblPr": ("w:tblStyle", "w:tblpPr", "w:tblOverlap", "w:bidiVisual", "w:tblStyleRowBandSize",
                      "w:tblStyleColBandSize", "w:tblW", "w:jc", "w:tblCellSpacing", "w:tblInd", "w:tblBorders",
                      "w:shd", "w:tblLayout", "w:tblCellMar", "w:tblLook", "w:tblCaption", "w:tblDescription"),
          "w:tcPr": ("w:cnfStyle", "w:tcW", "w:gridSpan", "w:hMerge", "w:vMerge", "w:tcBorders", "w:shd", "w:noWrap",
                     "w:tcMar", "w:textDirection", "w:tcFitText", "w:vAlign", "w:hideMark")}


def _property(parent, tag: str, **values: str):
    """An OOXML property element ``tag`` under ``parent`` (made when missing; in a table's or a cell's properties,
    at its place in their order) with the ``values`` set."""
    element = parent.find(qn(tag))
    if element is None:
        element = OxmlElement(tag)
        order = next((o for t, o in _ORDER.items() if parent.tag == qn(t)), ())
        later = {qn(t) for t in order[order.index(tag) + 1:]} if tag in order else set()
        after = next((child for child in parent if child.tag in later), None)
        if after is not None:
            after.addprevious(element)
        else:
            parent.append(element)
    for name, value in values.items():
        element.set(qn(f"w:{name}"), value)
    return element


def _caption(document, label: str, title: str, keep: bool = True) -> None:
    number = document.add_paragraph()
    number.add_run(label).bold = True
    number.paragraph_format.space_after = Pt(0)
    name = document.add_paragraph()
    name.add_run(printable(printed(title))).italic = True  # the printed views' signs (reporting.numbers.printed)
    # the caption stays on the page of what it names
    number.paragraph_format.keep_with_next = True
    name.paragraph_format.keep_with_next = keep


def _note(document, text: str, whole: bool = False) -> None:
    """A table's or a figure's note; ``whole``: kept on one page (keep-together: a figure's note, whose drawing is
    kept with it by keep-with-next, which holds only the note's first line; new-user trial s24: the last two lines of
    a figure's note fell alone on the next page)."""
    paragraph = document.add_paragraph()
    paragraph.add_run("Note. ").italic = True
    paragraph.add_run(typeset(text))
    paragraph.paragraph_format.space_after = Pt(12)
    paragraph.paragraph_format.keep_together = whole or None


def _grid(document, table: ReportTable, columns: list[int], widths: list[float], size: float, padding: float,
          kept: list[int] | None = None) -> None:
    """One table of the report's rows (those numbered in ``kept``, default all) in the ``columns`` given, with fixed
    column widths (points, cell margins included): APA rules, numeric cells never wrapped, the header row repeated
    on every page, and every row kept with the next so that a short table is not split from its caption or its
    note."""
    kept = list(range(len(table.rows))) if kept is None else kept
    rows = [table.columns] + [table.rows[i] for i in kept]
    grid = document.add_table(rows=0, cols=len(columns))
    grid.alignment = WD_TABLE_ALIGNMENT.LEFT
    grid.autofit = False
    properties = grid._tbl.tblPr
    _property(properties, "w:tblW", w=str(round(20 * sum(widths))), type="dxa")
    _property(properties, "w:tblLayout", type="fixed")
    margins = _property(properties, "w:tblCellMar")
    for edge in ("left", "right"):
        _property(margins, f"w:{edge}", w=str(round(10 * padding)), type="dxa")  # half the padding each side
    for k, gridcol in enumerate(grid._tbl.tblGrid.findall(qn("w:gridCol"))):
        gridcol.set(qn("w:w"), str(round(20 * widths[k])))
    faint = set(table.faint)
    # the rows written as one piece of WordprocessingML and read once (python-docx's element by element making took
    # most of a Word report's time): the elements python-docx would make, in the schema's order
    size_xml = f' w:val="{int(Pt(size).pt * 2)}"'
    cell_widths = [Pt(w).twips for w in widths]
    rule = '<w:{0} w:val="single" w:sz="8" w:color="000000"/>'
    xml = []
    for r, values in enumerate(rows):
        source = kept[r - 1] + 1 if r > 0 else 0  # the row's number among the report's rows (header 0)
        xml.append("<w:tr><w:trPr><w:cantSplit/>" + ("<w:tblHeader/>" if r == 0 else "") + "</w:trPr>")
        for k, c in enumerate(columns):
            numeric = table.align[c] == "r"
            edges = (["top", "bottom"] if r == 0 else []) + (["bottom"] if r == len(rows) - 1 else [])
            shade = T.heat_colour(str(values[c])) if numeric and table.heat and r > 0 else None
            xml.append(f'<w:tc><w:tcPr><w:tcW w:type="dxa" w:w="{cell_widths[k]}"/>')
            if edges:
                xml.append("<w:tcBorders>" + "".join(rule.format(e) for e in edges) + "</w:tcBorders>")
            if shade is not None:  # a matrix's cells shaded as in the HTML report
                xml.append(f'<w:shd w:val="clear" w:color="auto" w:fill="{shade[1:]}"/>')
            if numeric and r > 0:
                xml.append("<w:noWrap/>")
            xml.append('</w:tcPr><w:p><w:pPr><w:keepNext/><w:spacing w:after="0"/>'
                       + ('<w:jc w:val="right"/>' if numeric else "") + "</w:pPr><w:r><w:rPr>")
            if r > 0 and (source - 1) in table.flagged:
                xml.append(f'<w:b/><w:color w:val="{PROBLEM_RED}"/>')
            elif r > 0 and (source - 1, c) in faint:  # small loadings: grey, as the note says
                xml.append(f'<w:color w:val="{FAINT_GREY}"/>')
            xml.append(f"<w:sz{size_xml}/></w:rPr>{_run_text(typeset(str(values[c]), numeric and r > 0))}</w:r></w:p></w:tc>")
        xml.append("</w:tr>")
    made = parse_xml(f'<w:tbl {nsdecls("w")}>{"".join(xml)}</w:tbl>')
    for row in list(made):
        grid._tbl.append(row)


def _run_text(text: str) -> str:
    """A run's text as python-docx's ``Run.text`` writes it: tabs and line ends as their own elements, the rest in
    ``w:t`` elements (spaces kept where the text starts or ends with one)."""
    from xml.sax.saxutils import escape

    out, plain = [], []

    def flush() -> None:
        if plain:
            words = "".join(plain)
            keep = ' xml:space="preserve"' if len(words.strip()) < len(words) else ""
            out.append(f"<w:t{keep}>{escape(words)}</w:t>")
            plain.clear()

    for character in text:
        if character == "\t":
            flush()
            out.append("<w:tab/>")
        elif character in "\r\n":
            flush()
            out.append("<w:br/>")
        else:
            plain.append(character)
    flush()
    return "".join(out)


@dataclass(frozen=True)
class TableLayout:
    """How a table is set in the Word report: on a portrait or a landscape page, at what type size and cell
    padding (points), the table as set (a matrix of the items may name its rows by number only) and the key that
    names each numbered item in the note ('' when the rows keep their names)."""

    landscape: bool
    size: float
    padding: float
    table: ReportTable
    key: str = ""


def _needed(table: ReportTable, size: float, padding: float) -> float:
    """The least width in points a table takes set at ``size`` with ``padding``: each column's least (numbers
    whole, text broken between words), and the row names of a matrix of the items whole on one line."""
    wanted, least = _column_widths(table, size)
    if table.matrix:
        least = [wanted[0], *least[1:]]
    return sum(w + padding for w in least)


def table_layout(document, table: ReportTable) -> TableLayout:
    """The one rule of how a table is set, written once: the first of these in which the table fits the text width
    of its page (its columns at their least, _needed) is taken; a table that fits none comes in parts of whole
    columns with its label column again (column_parts), set as the last.

    1. a portrait page at the body type (10 pt) as the report has it;
    2. a matrix of the items (residual correlations, the items' correlations): a portrait page at 10 pt with its
       rows named by the items' numbers, a key in the note naming each (reporting.tables.matrix_key); then at
       9 pt with narrow cell margins, with the names and then with the numbers;
    3. a landscape page at 10 pt, then at 8 pt with narrow cell margins (then, for a matrix, numbered with a key).

    A 10 x 10 matrix (a lower triangle of two-decimal correlations) so fits a portrait page at a readable size;
    only a truly wide one turns the page or is cut into parts."""
    section = document.sections[-1]
    across = section.left_margin + section.right_margin
    short_side, long_side = sorted((section.page_width, section.page_height))
    room = {False: Emu(short_side - across).pt, True: Emu(long_side - across).pt}
    keyed = T.matrix_key(table)
    numbered, key = (keyed[0], "Items: " + "; ".join(f"{n} {name}" for n, name in keyed[1]) + ".") if keyed else \
        (None, "")
    choices = [TableLayout(False, BODY_SIZE, CELL_PADDING, table)]
    if numbered is not None:
        choices += [TableLayout(False, BODY_SIZE, CELL_PADDING, numbered, key),
                    TableLayout(False, MATRIX_SIZE, WIDE_PADDING, table),
                    TableLayout(False, MATRIX_SIZE, WIDE_PADDING, numbered, key)]
    choices += [TableLayout(True, BODY_SIZE, CELL_PADDING, table), TableLayout(True, WIDE_SIZE, WIDE_PADDING, table)]
    if numbered is not None:
        choices.append(TableLayout(True, WIDE_SIZE, WIDE_PADDING, numbered, key))
    return next((c for c in choices if _needed(c.table, c.size, c.padding) <= room[c.landscape]), choices[-1])


def _square(table: ReportTable) -> bool:
    """A lower triangle of a matrix (of the items, or of the factors): number columns each headed by its variable's
    number, and in each row the cells filled up to a place and empty after it."""
    numeric = [j for j, a in enumerate(table.align) if a == "r"]
    if not numeric or not all(table.columns[j].isdigit() for j in numeric):
        return False
    filled = [[bool(row[j]) for j in numeric] for row in table.rows]
    return all(cells == sorted(cells, reverse=True) for cells in filled)


def _add_table(document, table: ReportTable, number: int, view: View = WORDS) -> None:
    table = T.without_ids(table)  # a document for a manuscript: no respondents' ids
    layout = table_layout(document, table)
    _set_orientation(document, layout.landscape)
    table, size, padding = layout.table, layout.size, layout.padding
    wanted, least = _column_widths(table, size)
    square = _square(table)
    if square:  # a matrix's columns alike: each as wide as the widest, so that the triangle reads as one
        numeric = [j for j, a in enumerate(table.align) if a == "r"]
        widest, whole = max(wanted[j] for j in numeric), max(least[j] for j in numeric)
        wanted = [widest if j in numeric else w for j, w in enumerate(wanted)]
        least = [whole if j in numeric else w for j, w in enumerate(least)]
    room = _room(document)
    padded = [w + padding for w in least]
    parts = column_parts(padded, room, label_columns(table.align, padded, room, table.rows))
    for k, columns in enumerate(parts):
        _caption(document, f"Table {number}" + (" (continued)" if k else ""), table.title)
        widths = _fitted([wanted[j] + padding for j in columns], [least[j] + padding for j in columns], room)
        # a later part of a matrix's lower triangle: the rows with a value in its columns (the rows above are empty)
        numbers = [j for j in columns if table.align[j] == "r"]
        kept = ([i for i, row in enumerate(table.rows) if any(row[j] for j in numbers)]
                if square and k and numbers else None)
        _grid(document, table, columns, widths, size, padding, kept)
        if k < len(parts) - 1:
            document.add_paragraph()
    note = " ".join(text for text in (said(table.note or "", view), layout.key, T.HEAT_LEGEND if table.heat else "")
                    if text)
    if note:
        _note(document, note)
    else:
        document.add_paragraph()


def _document(title: str, notice, view: View = WORDS, level: int = 1) -> Document:
    """A document with the problems first, then the title (at heading ``level``: 0, the title style, over the
    parts of a document of several results)."""
    document = Document()
    style = document.styles["Normal"]
    style.font.name = FONT
    style.font.size = Pt(12)
    _notice(document, notice, view)
    document.add_heading(printable(title), level=level)
    return document


def _notice(document, notice, view: View = WORDS) -> None:
    """The problems of a solution (reporting.tables.ProblemNotice; None: nothing), in red, each a bullet."""
    if notice is None:
        return
    heading = document.add_paragraph()
    run = heading.add_run(printable(notice.heading))
    run.bold = True
    run.font.color.rgb = PROBLEM_RED
    heading.paragraph_format.keep_with_next = True
    for line in notice.lines:
        document.add_paragraph(printable(printed_line(line, view)), style="List Bullet")


def _saved(document) -> bytes:
    buffer = io.BytesIO()
    document.save(buffer)
    return buffer.getvalue()


def report_docx(report, dpi: int = DEFAULT_DPI) -> bytes:
    """Any command's report (cfa_tool.reporting.document.Report) as a .docx file's bytes: the problems first,
    what was done, the methods paragraph, the numbered tables with their notes, the figures, the notes and the
    cautions.  A note's advice is said without the command that takes it (a manuscript's reader runs nothing),
    and a table it refers to is named by its number (cfa_tool.note_parts); the user's files by their names, not their
    folders (document.by_file_name)."""
    report = by_file_name(report)
    view = numbered(report.tables)
    document = _document(report.title, report.notice, view)
    _body(document, report, view, dpi)
    _cautions(document, report.cautions, view)
    return _saved(document)


def combined_docx(document_model, dpi: int = DEFAULT_DPI) -> bytes:
    """A document of several results (reporting.combined.Combined) as a .docx file's bytes: the "Read first"
    notice (every result's problems, each naming its result, and the data when the results do not describe the
    same rows), the title and what the results read, then each result under its heading (its own problems first,
    its methods paragraph, tables and figures), the tables and figures numbered through the document, and the
    cautions once at the end."""
    from cfa_tool.reporting.combined import figure_numbers, notice_view, table_numbers

    whole = notice_view(document_model, numbers=True)
    document = _document(document_model.title, document_model.notice, whole, level=0)
    for line in document_model.lines:
        document.add_paragraph(printable(printed_line(line, whole)))
    for part, first_table, first_figure in zip(document_model.parts, table_numbers(document_model),
                                               figure_numbers(document_model)):
        report = part.report
        view = numbered(report.tables, first_table)
        _set_orientation(document, landscape=False)
        document.add_heading(printable(part.heading), level=1)
        _notice(document, report.notice, view)
        _body(document, report, view, dpi, first_table, first_figure)
    _cautions(document, document_model.cautions, whole)
    return _saved(document)


def _body(document, report, view: View, dpi: int = DEFAULT_DPI, first_table: int = 1, first_figure: int = 1,
          level: int = 2) -> None:
    """A report after its problems and title: what was done, the warnings, the methods paragraph, the figures and the
    tables (the first of each numbered ``first_figure`` and ``first_table``: numbered through a document of several
    results), the listings and the notes, under headings of ``level``."""
    for line in report.lines:
        document.add_paragraph(printable(printed_line(line, view)))
    if report.warnings:
        heading = document.add_paragraph()
        heading.add_run(WARNINGS).bold = True
        heading.paragraph_format.keep_with_next = True
        for line in report.warnings:
            document.add_paragraph(printable(printed_line(line, view)), style="List Bullet")
    if report.paragraph:
        document.add_heading(PARAGRAPH_HEADING, level=level)
        document.add_paragraph(typeset(report.paragraph))
    if report.figures:
        if png_converter() is None:
            document.add_heading(FIGURES, level=level)
            document.add_paragraph(NO_PICTURE)
        else:
            for number, figure in enumerate(report.figures, start=first_figure):
                first = number == first_figure
                # the heading on the first figure's page (a landscape page starts after the heading had been left
                # alone at the foot of the page before it): its room taken before the layout is chosen
                wider, pieces, area = _figure_layout(document, figure.svg, figure.note, heading=first)
                _set_orientation(document, wider)  # a wide drawing (many items) on a landscape page: larger labels
                if first:
                    document.add_heading(FIGURES, level=level).paragraph_format.keep_with_next = True
                for k, piece in enumerate(pieces):
                    _caption(document, f"Figure {number}" + (" (continued)" if k else ""), figure.title)
                    png = svg_to_png(piece, dpi)
                    side, inches = page_fit(png, *area)
                    document.add_picture(io.BytesIO(png), **{side: Inches(inches)})
                    picture = document.paragraphs[-1].paragraph_format
                    picture.line_spacing = 1.0  # the template's 1.15 would make the picture's line taller still
                    picture.space_after = Pt(PICTURE_GAP)
                    picture.keep_with_next = bool(figure.note) and k == len(pieces) - 1  # the note on its page
                if figure.note:
                    _note(document, figure.note, whole=True)
    # each table turns its page as it needs; the text after them turns it back (never an empty page at the end)
    section = ""
    for number, table in enumerate(report.tables, start=first_table):
        if table.section and table.section != section:
            _set_orientation(document, table_layout(document, table).landscape)
            document.add_heading(printable(table.section), level=level).paragraph_format.keep_with_next = True
        section = table.section
        _add_table(document, table, number, view)
    if report.listings or report.notes:
        _set_orientation(document, landscape=False)
    for listing in report.listings:
        document.add_heading(printable(listing.title), level=level)
        for line in listing.text.splitlines():
            paragraph = document.add_paragraph()
            paragraph.paragraph_format.space_after = Pt(0)
            run = paragraph.add_run(printable(line))  # control characters shown as escapes (XML allows none)
            run.font.name = "Courier New"
            run.font.size = Pt(10)
    if report.notes:
        document.add_heading("Notes", level=level)
        for line in report.notes:
            document.add_paragraph(printable(printed_line(line, view)), style="List Bullet")


def _cautions(document, cautions, view: View) -> None:
    """The cautions, last (in a document of several results, once for them all)."""
    if cautions:
        _set_orientation(document, landscape=False)
        document.add_heading("Cautions", level=2)
        for line in cautions:
            document.add_paragraph(printable(printed_line(line, view)))
