"""Cells a table marks faint (small rotated loadings) are faint in every format whose note says so: dim in the
terminal, grey in HTML and Word, italic in Markdown (which has no colour).  Found by a hostile trial: the
Word and Markdown notes said 'shown faintly' over cells that were not."""

from __future__ import annotations

import io

from docx import Document

from cfa_tool.reporting.docx_report import FAINT_GREY, _add_table
from cfa_tool.reporting.tables import ReportTable
from cfa_tool.reporting.text_formats import markdown_table

TABLE = ReportTable("loadings", "Pattern loadings", ("Item", "f1", "f2"), ("l", "r", "r"),
                    (("x1", ".71", ".12"), ("x2", ".05", ".66")), note="Loadings below .30 shown faintly.",
                    faint=((0, 2), (1, 1)))


def test_markdown_shows_faint_cells_in_italics():
    lines = markdown_table(TABLE).splitlines()
    assert "| x1 | .71 | *.12* |" in lines and "| x2 | *.05* | .66 |" in lines


def test_word_shows_faint_cells_in_grey():
    document = Document()
    _add_table(document, TABLE, 1)
    buffer = io.BytesIO()
    document.save(buffer)
    grid = Document(io.BytesIO(buffer.getvalue())).tables[0]
    colour = lambda r, c: grid.cell(r, c).paragraphs[0].runs[0].font.color.rgb  # noqa: E731
    assert colour(1, 2) == FAINT_GREY and colour(2, 1) == FAINT_GREY
    assert colour(1, 1) != FAINT_GREY and colour(2, 2) != FAINT_GREY
