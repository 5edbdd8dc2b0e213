"""A Word report never prints an empty page (session 13): a report ending on a landscape table (a wide matrix) added
a portrait section after it with nothing in it, an empty page at the end, because the page was turned back to portrait
whether or not anything followed.  Now each table turns its page as it needs, the text after the tables turns it
back, and a section that holds nothing yet is turned instead of followed by another.

Read back with python-docx (an independent reader of the file format: which section each element of the body is
in) and, where an office suite is installed, laid out by LibreOffice as PDF and read with poppler's pdfinfo and
pdftotext (independent of the tool): every page holds text.  The matrices are invented numbers."""

from __future__ import annotations

import io
import os
import shutil
import subprocess

import docx
import numpy as np
import pytest
from docx.enum.section import WD_ORIENT
from docx.oxml.ns import qn

from cfa_tool.reporting.docx_report import report_docx, table_layout
from cfa_tool.reporting.document import Report, ResultKind
from cfa_tool.reporting.tables import _item_matrix

RNG = np.random.default_rng(13)


def _matrix(k: int, key: str):
    names = [f"item_{i:02d}" for i in range(k)]
    return _item_matrix(key, f"Residual correlations of {k} items", names, RNG.uniform(-0.1, 0.1, (k, k)),
                        "Positive: the model underestimates the correlation.")


WIDE, SMALL = _matrix(24, "wide"), _matrix(4, "small")


def _report(tables, notes=()) -> bytes:
    return report_docx(Report(ResultKind.FIT, "Matrices", None, ("A line under the title.",), tuple(tables),
                              notes=tuple(notes)))


def _section_contents(document) -> list[int]:
    """How many elements with content (a table, a paragraph with text) each section holds, in order."""
    counts, current = [], 0
    for child in document.element.body.iterchildren():
        if child.tag == qn("w:tbl"):
            current += 1
        elif child.tag == qn("w:p"):
            current += bool("".join(t.text or "" for t in child.iter(qn("w:t"))).strip())
            if child.find(f"{qn('w:pPr')}/{qn('w:sectPr')}") is not None:  # this paragraph ends its section
                counts.append(current)
                current = 0
    return counts + [current]


@pytest.mark.parametrize("tables, notes, orientations", [
    ((SMALL, WIDE), (), ["portrait", "landscape"]),  # the report ends on the landscape table
    ((WIDE,), (), ["portrait", "landscape"]),
    ((WIDE, SMALL), (), ["portrait", "landscape", "portrait"]),  # a portrait table after it turns the page back
    ((SMALL, WIDE), ("A note after the tables.",), ["portrait", "landscape", "portrait"]),  # so does the text
], ids=["ends-landscape", "only-landscape", "portrait-after", "notes-after"])
def test_every_section_holds_something(tables, notes, orientations):
    assert table_layout(docx.Document(), WIDE).landscape and not table_layout(docx.Document(), SMALL).landscape
    document = docx.Document(io.BytesIO(_report(tables, notes)))
    turned = ["landscape" if s.orientation == WD_ORIENT.LANDSCAPE else "portrait" for s in document.sections]
    assert turned == orientations
    assert all(_section_contents(document)), _section_contents(document)


@pytest.mark.skipif(shutil.which("soffice") is None or shutil.which("pdftotext") is None,
                    reason="no office suite (soffice) or poppler to lay the Word file out as PDF")
def test_libreoffice_prints_no_empty_page_after_a_landscape_table(tmp_path):
    source = tmp_path / "ends_landscape.docx"
    source.write_bytes(_report((SMALL, WIDE)))
    proc = subprocess.run(["soffice", "--headless", "--convert-to", "pdf", "--outdir", str(tmp_path), str(source)],
                          capture_output=True, text=True, timeout=180, env={**os.environ, "HOME": str(tmp_path)})
    pdf = tmp_path / "ends_landscape.pdf"
    assert pdf.exists(), proc.stderr
    pages = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True).stdout.split("\f")
    pages = pages[:-1] if not pages[-1].strip() else pages  # pdftotext ends the last page with a form feed
    assert len(pages) == 2  # the title with the small table, then the wide one; nothing after it
    assert all(page.strip() for page in pages)
    assert "Residual correlations of 24 items" in pages[-1]
