"""The report as a Word document (python-docx), laid out for a manuscript in the style of the APA
Publication Manual, 7th edition: numbered tables with an italic title, horizontal rules only, notes under
the table; the methods paragraph; the path diagram as a numbered figure; the cautions.  The problems of
the solution come first, as in every view.  The tables are the report's own (one report model)."""

from __future__ import annotations

import io

from docx import Document
from docx.enum.table import WD_TABLE_ALIGNMENT
from docx.enum.text import WD_ALIGN_PARAGRAPH
from docx.oxml import OxmlElement
from docx.oxml.ns import qn
from docx.shared import Inches, Pt, RGBColor

from cfa_tool.reporting import tables as T
from cfa_tool.reporting.diagram import legend_text, path_diagram
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.picture import DEFAULT_DPI, page_fit, png_converter, svg_to_png
from cfa_tool.reporting.tables import GUIDE_NOTE, HIGH_STAKES_NOTE, ReportTable
from cfa_tool.reporting.text_formats import all_tables

FAINT_GREY = RGBColor(0x99, 0x99, 0x99)
PROBLEM_RED = RGBColor(0xB3, 0x26, 0x1E)
FONT = "Times New Roman"
NO_PICTURE = ("The path diagram is not included: making a picture for Word needs the rsvg-convert program "
              "(Debian package librsvg2-bin). Write it with --diagram as SVG instead.")


def _rule(cell, edge: str, size: int = 8) -> None:
    """A horizontal rule on one edge of a table cell (APA tables have no vertical rules)."""
    properties = cell._tc.get_or_add_tcPr()
    borders = properties.find(qn("w:tcBorders"))
    if borders is None:
        borders = OxmlElement("w:tcBorders")
        properties.append(borders)
    line = OxmlElement(f"w:{edge}")
    line.set(qn("w:val"), "single")
    line.set(qn("w:sz"), str(size))
    line.set(qn("w:color"), "000000")
    borders.append(line)


def _caption(document, label: str, title: str) -> None:
    number = document.add_paragraph()
    number.add_run(label).bold = True
    number.paragraph_format.space_after = Pt(0)
    name = document.add_paragraph()
    name.add_run(title).italic = True


def _note(document, text: str) -> None:
    paragraph = document.add_paragraph()
    paragraph.add_run("Note. ").italic = True
    paragraph.add_run(text)
    paragraph.paragraph_format.space_after = Pt(12)


def _add_table(document, table: ReportTable, number: int) -> None:
    _caption(document, f"Table {number}", table.title)
    grid = document.add_table(rows=len(table.rows) + 1, cols=len(table.columns))
    grid.alignment = WD_TABLE_ALIGNMENT.LEFT
    rows = [table.columns] + list(table.rows)
    faint = set(table.faint)
    for r, values in enumerate(rows):
        for c, value in enumerate(values):
            cell = grid.cell(r, c)
            paragraph = cell.paragraphs[0]
            run = paragraph.add_run(str(value))
            run.font.size = Pt(10)
            if r > 0 and (r - 1, c) in faint:  # small loadings: grey, as the note says
                run.font.color.rgb = FAINT_GREY
            if r > 0 and (r - 1) in table.flagged:
                run.bold = True
                run.font.color.rgb = PROBLEM_RED
            if table.align[c] == "r":
                paragraph.alignment = WD_ALIGN_PARAGRAPH.RIGHT
            if r == 0:
                _rule(cell, "top")
                _rule(cell, "bottom")
            if r == len(rows) - 1:
                _rule(cell, "bottom")
    if table.note:
        _note(document, table.note)
    else:
        document.add_paragraph()


def _document(title: str, notice) -> Document:
    document = Document()
    style = document.styles["Normal"]
    style.font.name = FONT
    style.font.size = Pt(12)
    document.add_heading(title, level=1)
    if notice is not None:  # problems first
        heading = document.add_paragraph()
        run = heading.add_run(notice.heading)
        run.bold = True
        run.font.color.rgb = PROBLEM_RED
        for line in notice.lines:
            document.add_paragraph(line, style="List Bullet")
    return document


def _saved(document) -> bytes:
    buffer = io.BytesIO()
    document.save(buffer)
    return buffer.getvalue()


def report_docx(report, dpi: int = DEFAULT_DPI) -> bytes:
    """Any command's report (cfa_tool.reporting.document.Report) as a .docx file's bytes: the problems first,
    what was done, the methods paragraph, the numbered tables with their notes, the figures, the notes and the
    cautions."""
    document = _document(report.title, report.notice)
    for line in report.lines:
        document.add_paragraph(line)
    if report.paragraph:
        document.add_heading("Method and results", level=2)
        document.add_paragraph(report.paragraph)
    for number, table in enumerate(report.tables, start=1):
        _add_table(document, table, number)
    if report.figures:
        document.add_heading("Figures", level=2)
        if png_converter() is None:
            document.add_paragraph(NO_PICTURE)
        else:
            for number, figure in enumerate(report.figures, start=1):
                _caption(document, f"Figure {number}", figure.title)
                document.add_picture(io.BytesIO(svg_to_png(figure.svg, dpi)), width=Inches(6.5))
                if figure.note:
                    _note(document, figure.note)
    if report.notes:
        document.add_heading("Notes", level=2)
        for line in report.notes:
            document.add_paragraph(line, style="List Bullet")
    if report.cautions:
        document.add_heading("Cautions", level=2)
        for line in report.cautions:
            document.add_paragraph(line)
    return _saved(document)


def docx_report(result, dpi: int = DEFAULT_DPI) -> bytes:
    """The fit ``result`` as a .docx file's bytes."""
    notice = T.problem_notice(result)
    document = _document(result.model_name, notice)
    d = result.data
    document.add_paragraph(f"Data: {d.source}; {T.rows_phrase(d)}. "
                            f"{T.status_line(result)}.")
    document.add_heading("Method and results", level=2)
    document.add_paragraph(methods_paragraph(result))
    number = 0
    for table in all_tables(result):
        number += 1
        _add_table(document, table, number)
    document.add_heading("Path diagram", level=2)
    if png_converter() is None:
        document.add_paragraph(NO_PICTURE)
    else:
        for g, group in enumerate(result.groups):
            where = "" if group.label is None else f", group {group.label}"
            _caption(document, f"Figure {g + 1}", f"Path diagram of the fitted model{where} (standardized values)")
            png = svg_to_png(path_diagram(result, g), dpi)
            side, inches = page_fit(png)
            document.add_picture(io.BytesIO(png), **{side: Inches(inches)})
            _note(document, legend_text(result) + (" Elements in red show a problem of the solution." if notice is not None else ""))
    document.add_heading("Cautions", level=2)
    document.add_paragraph(GUIDE_NOTE)
    document.add_paragraph(HIGH_STAKES_NOTE)
    return _saved(document)
