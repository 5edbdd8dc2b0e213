"""The Word figure's note is kept whole on the page of its drawing (new-user trial s24, finding 12: a diagram drawn
in bands ran over two pages and the last two lines of its note fell alone on the next page, where docs/reports.md
says the figure keeps its caption and note on the page of the drawing).  Keep-with-next on the drawing holds only
the note's first line to it; keep-together holds the note's lines together, so that the last band, its caption and
its note move on together when the note does not fit (rendered with LibreOffice and looked at: the trial's 40-item
model, whose note was split, is whole on one page).  Table notes are left free to break, as before.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import io

import docx
import pytest
from docx.oxml.ns import qn

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.picture import png_converter
from cfa_tool.resources import resource_dir

pytestmark = pytest.mark.skipif(png_converter() is None, reason="the Word figure needs rsvg-convert")


def test_the_figure_note_is_kept_together_with_its_drawing():
    report = fit_report(cfa_tool.fit((resource_dir("models") / "rider_three_factors.cfa").read_text(),
                                     resource_dir("demo") / "rider_survey.csv"))
    paragraphs = docx.Document(io.BytesIO(report_docx(report, dpi=96))).paragraphs
    pictured = [k for k, p in enumerate(paragraphs) if p._p.findall(".//" + qn("wp:inline"))]
    note = pictured[-1] + 1
    assert paragraphs[note].text.startswith("Note. Standardized values")
    assert paragraphs[pictured[-1]].paragraph_format.keep_with_next  # the drawing with the note's first line
    assert paragraphs[note].paragraph_format.keep_together  # ... and the note's lines with each other
    table_notes = [p for k, p in enumerate(paragraphs) if p.text.startswith("Note.") and k != note]
    assert table_notes and not any(p.paragraph_format.keep_together for p in table_notes)
