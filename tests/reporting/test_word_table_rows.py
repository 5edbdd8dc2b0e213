"""The Word report's table rows, written as one piece of WordprocessingML (reporting.docx_report._grid), are the
elements python-docx's own API makes for the same table (the reference here: python-docx, which the project did not
write, cell by cell through Table, Row, Cell, Paragraph and Run, as the report made them before)."""

from __future__ import annotations

from docx import Document
from docx.enum.table import WD_TABLE_ALIGNMENT
from docx.enum.text import WD_ALIGN_PARAGRAPH
from docx.oxml.ns import qn
from docx.shared import Pt
from lxml import etree

from cfa_tool.reporting import docx_report as D
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.tables import ReportTable


def _by_python_docx(document, table, columns, widths, size, padding, kept=None) -> None:
    """The table made through python-docx's objects, cell by cell (the report's earlier way)."""
    kept = list(range(len(table.rows))) if kept is None else kept
    rows = [table.columns] + [table.rows[i] for i in kept]
    grid = document.add_table(rows=len(rows), cols=len(columns))
    grid.alignment = WD_TABLE_ALIGNMENT.LEFT
    grid.autofit = False
    properties = grid._tbl.tblPr
    D._property(properties, "w:tblW", w=str(round(20 * sum(widths))), type="dxa")
    D._property(properties, "w:tblLayout", type="fixed")
    margins = D._property(properties, "w:tblCellMar")
    for edge in ("left", "right"):
        D._property(margins, f"w:{edge}", w=str(round(10 * padding)), type="dxa")
    for k, gridcol in enumerate(grid._tbl.tblGrid.findall(qn("w:gridCol"))):
        gridcol.set(qn("w:w"), str(round(20 * widths[k])))
    faint = set(table.faint)
    for r, (values, row) in enumerate(zip(rows, grid.rows)):
        source = kept[r - 1] + 1 if r > 0 else 0
        row_properties = row._tr.get_or_add_trPr()
        D._property(row_properties, "w:cantSplit")
        if r == 0:
            D._property(row_properties, "w:tblHeader")
        for k, (c, cell) in enumerate(zip(columns, row.cells)):
            cell.width = Pt(widths[k])
            numeric = table.align[c] == "r"
            if numeric and r > 0:
                D._property(cell._tc.get_or_add_tcPr(), "w:noWrap")
            paragraph = cell.paragraphs[0]
            paragraph.paragraph_format.space_after = Pt(0)
            paragraph.paragraph_format.keep_with_next = True
            run = paragraph.add_run(D.typeset(str(values[c]), numeric and r > 0))
            run.font.size = Pt(size)
            if r > 0 and (source - 1, c) in faint:
                run.font.color.rgb = D.FAINT_GREY
            if r > 0 and (source - 1) in table.flagged:
                run.bold = True
                run.font.color.rgb = D.PROBLEM_RED
            if numeric:
                paragraph.alignment = WD_ALIGN_PARAGRAPH.RIGHT
                shade = T.heat_colour(str(values[c])) if table.heat and r > 0 else None
                if shade is not None:
                    D._property(cell._tc.get_or_add_tcPr(), "w:shd", val="clear", color="auto", fill=shade[1:])
            if r == 0:
                D._rule(cell, "top")
                D._rule(cell, "bottom")
            if r == len(rows) - 1:
                D._rule(cell, "bottom")


def _tables() -> list[tuple[ReportTable, list[int] | None]]:
    loadings = ReportTable("l", "Loadings", ("Item", "Factor", "Loading", "SE", "p"), ("l", "l", "r", "r", "r"),
                           (("x1 & <x2>", "visual", ".77", ".05", "< .001"), ("x2", "visual", "-0.21", "", ".186"),
                            ("  spaced ", "text\tafter a tab", "[.04, .09]", "1.00", "\u2265 .05"),
                            ("line\nbreak", "speed", ".30", ".10", ".003")),
                           flagged=(1,), faint=((1, 2), (2, 2), (1, 3)))
    matrix = ReportTable("m", "Residual correlations", ("", "x1", "x2", "x3"), ("l", "r", "r", "r"),
                         (("x1", "", "", ""), ("x2", ".12", "", ""), ("x3", "-.31", ".04", "")), heat=True,
                         matrix=True)
    header_only = ReportTable("h", "No rows", ("Item", "Value"), ("l", "r"), ())
    return [(loadings, None), (loadings, [0, 2]), (matrix, None), (header_only, None)]


def _body(build, table, kept) -> bytes:
    document = Document()
    columns = list(range(len(table.columns)))
    build(document, table, columns, [60.0 + 7 * k for k in columns], 10.5, 5.0, kept)
    body = document.element.body
    tables = body.findall(qn("w:tbl"))
    return b"".join(etree.tostring(t, method="c14n") for t in tables)


def test_rows_are_the_elements_python_docx_makes():
    for table, kept in _tables():
        assert _body(D._grid, table, kept) == _body(_by_python_docx, table, kept), table.key


def test_the_rows_read_back_through_python_docx():
    """Read back by python-docx's objects: the cells' words (as the report typesets them), the
    flagged row bold red, the faint cell grey, numbers right-aligned."""
    document = Document()
    table, _ = _tables()[0]
    D._grid(document, table, list(range(5)), [60.0] * 5, 10.0, 5.0)
    grid = document.tables[0]
    assert [c.text for c in grid.rows[0].cells] == list(table.columns)
    assert grid.rows[1].cells[0].text == "x1 & <x2>"
    assert grid.rows[3].cells[1].text == D.typeset("text\tafter a tab")  # (as the report's printable text: a space)
    assert grid.rows[4].cells[0].text == D.typeset("line\nbreak")
    flagged = grid.rows[2].cells[2].paragraphs[0].runs[0]
    assert flagged.bold and str(flagged.font.color.rgb) == str(D.PROBLEM_RED)
    faint = grid.rows[3].cells[2].paragraphs[0].runs[0]
    assert str(faint.font.color.rgb) == str(D.FAINT_GREY) and not faint.bold
    assert grid.rows[1].cells[2].paragraphs[0].alignment == WD_ALIGN_PARAGRAPH.RIGHT
