"""The Word report: read back with python-docx (an independent reader of the file format)."""

from __future__ import annotations

import io
import os
import shutil
import struct
import subprocess

import docx
import pytest

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.diagram import path_diagram
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.picture import svg_to_png
from cfa_tool.reporting.fit_document import fit_tables
from cfa_tool.resources import resource_dir
from tests.commands.test_cli import run

HEYWOOD = ("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
           "covary x7, x8\ncovary x8, x9\n")
CONVERTER = shutil.which("rsvg-convert") is not None


@pytest.fixture(scope="module")
def heywood(hs_data):
    return cfa_tool.fit(HEYWOOD, hs_data)


def _borders(cell) -> set[str]:
    found = cell._tc.tcPr.find(docx.oxml.ns.qn("w:tcBorders")) if cell._tc.tcPr is not None else None
    return {child.tag.split("}")[1] for child in found} if found is not None else set()


def test_word_report_puts_problems_first_and_numbers_every_table(heywood):
    document = docx.Document(io.BytesIO(report_docx(fit_report(heywood))))
    texts = [p.text for p in document.paragraphs]
    assert texts[0] == T.NOT_ADMISSIBLE and "x9 is negative" in texts[1]  # the problems before the title
    assert texts[2] == heywood.model_name
    expected = fit_tables(heywood)
    assert len(document.tables) == len(expected)
    for k, table in enumerate(expected, start=1):
        at = texts.index(f"Table {k}")
        assert texts[at + 1] == table.title
        assert document.paragraphs[at].runs[0].bold and document.paragraphs[at + 1].runs[0].italic
    first = document.tables[0]
    assert _borders(first.cell(0, 0)) == {"top", "bottom"}  # horizontal rules only
    assert _borders(first.cell(1, 0)) == set()
    assert _borders(first.cell(len(first.rows) - 1, 0)) == {"bottom"}
    speed = expected.index(next(t for t in expected if t.title.startswith("Factor speed")))
    grid = document.tables[speed]
    x9 = next(r for r in grid.rows if r.cells[0].text == "x9")
    assert x9.cells[1].paragraphs[0].runs[0].bold  # the impossible row is marked
    assert any("not admissible" in t for t in texts)


@pytest.mark.skipif(not CONVERTER, reason="rsvg-convert is not installed")
def test_word_report_has_the_diagram_at_print_resolution(heywood):
    document = docx.Document(io.BytesIO(report_docx(fit_report(heywood))))
    assert len(document.inline_shapes) == 1
    assert "Figure 1" in [p.text for p in document.paragraphs]
    svg = path_diagram(heywood)
    widths = [struct.unpack(">I", svg_to_png(svg, dpi)[16:20])[0] for dpi in (150, 300)]
    assert widths[1] == pytest.approx(2 * widths[0], rel=0.01)  # the PNG header's width doubles with the dpi


def test_cli_writes_word_and_checks_dpi(tmp_path, hs_data):
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(HEYWOOD)
    out = tmp_path / "r.docx"
    proc = run("fit", str(model), "--data", str(data), "--docx", str(out))
    assert proc.returncode == 0, proc.stderr
    assert docx.Document(str(out)).paragraphs[0].text == T.NOT_ADMISSIBLE
    proc = run("fit", str(model), "--data", str(data), "--docx", str(tmp_path / "s.docx"), "--dpi", "5")
    assert proc.returncode == 2 and "--dpi" in proc.stderr and not (tmp_path / "s.docx").exists()
    proc = run("fit", str(model), "--data", str(data), "--docx", str(data))
    assert proc.returncode == 2 and "x1" in data.read_text().splitlines()[0]  # an input is never replaced


def test_one_diagram_per_group_named_on_it(hs_data):
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.html_report import report_html
    from tests.reporting.test_reports import figure_svgs

    result = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n", hs_data, group="school")
    pictures = figure_svgs(report_html(fit_report(result)))
    assert [p.count('class="path-diagram"') for p in pictures] == [1, 1]
    assert "Group Grant-White</text>" in pictures[0] and "Group Pasteur</text>" in pictures[1]
    standalone = path_diagram(result, legend=True)
    assert "Ellipses: factors" in standalone and "Group Grant-White" in standalone
    if CONVERTER:
        document = docx.Document(io.BytesIO(report_docx(fit_report(result))))
        assert len(document.inline_shapes) == 2
        assert "Path diagram of the fitted model, group Pasteur (standardized values)" in [p.text for p in
                                                                                           document.paragraphs]


@pytest.mark.skipif(shutil.which("soffice") is None, reason="no office suite (soffice) to turn the Word file into PDF")
def test_the_word_report_converts_to_pdf_with_its_figure(tmp_path):
    # the page a reader prints: LibreOffice (an independent reader of .docx) lays the report out as PDF with the
    # path diagram as a picture on a page
    result = cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa", resource_dir("demo") / "rider_survey.csv")
    source = tmp_path / "report.docx"
    source.write_bytes(report_docx(fit_report(result), 150))
    proc = subprocess.run(["soffice", "--headless", "--convert-to", "pdf", "--outdir", str(tmp_path), str(source)],
                          capture_output=True, text=True, timeout=180, env={**os.environ, "HOME": str(tmp_path)})
    pdf = tmp_path / "report.pdf"
    assert pdf.exists(), proc.stderr
    content = pdf.read_bytes()
    assert content.startswith(b"%PDF-") and b"/Image" in content
    if shutil.which("pdfinfo"):
        pages = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True).stdout
        assert int(next(line.split()[-1] for line in pages.splitlines() if line.startswith("Pages:"))) >= 2
    if shutil.which("pdftotext"):  # the figure's note is printed on the page of its drawing, never alone on a page
        text = subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True).stdout
        page = next(page for page in text.split("\f") if "Note. Standardized values" in page)
        assert "Figure 1" in page
