"""The HTML report printed: long lines wrap, each section starts a page, and a matrix of 60 items (the most any
view shows) prints whole on a landscape page; on screen the matrix scrolls inside its own box with its item
column kept in view.  Found in a re-check: the draft model and the matrices were cut at the right edge on paper.
A path diagram is scaled to its box on screen, and one too wide for a portrait page's legibility rule
(reporting.diagram.MIN_FIGURE_TEXT) prints on a landscape page (a new-user trial: 15 items were cut at the right).

The print itself is checked in a real browser (headless Chromium prints the page to PDF) and read back with
poppler's pdftotext and pdfinfo, tools the project did not write; both are skipped where they are missing."""

from __future__ import annotations

import re
import shutil
import subprocess

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import CSS, report_html
from cfa_tool.reporting.tables import MAX_MATRIX
from tests.conftest import simulate_cfa
from tests.reporting.test_reports import CHROMIUM, _chromium

LONG_LINE = "# " + " ".join(f"w{k}" for k in range(90)) + " end_of_the_long_line"


@pytest.fixture(scope="module")
def sixty():
    items = MAX_MATRIX
    data = simulate_cfa(np.full((items, 1), 0.6), np.eye(1), np.eye(items) * 0.64, 300, seed=4)
    model = f"{LONG_LINE}\nfactor f: " + ", ".join(data.columns) + "\n"
    return fit_report(cfa_tool.fit(model, data))


def _print_block() -> str:
    start = CSS.index("@media print{")
    return CSS[start:CSS.index("\n}\n", start)]


def test_the_print_styles_wrap_break_and_turn_matrices_landscape(sixty):
    rules = _print_block()
    assert re.search(r"p,li,pre,\.summary\{white-space:pre-wrap;overflow-wrap:anywhere\}", rules)
    assert "body>h2~h2{break-before:page}" in rules and "thead{display:table-header-group}" in rules
    assert re.search(r"div\.wide\{[^}]*page:wide", rules) and "@page wide{size:A4 landscape" in CSS
    page = report_html(sixty)
    for key in ("residuals_0", "correlations_0"):
        # (the heading of the section a matrix opens goes on its landscape page with it: test_html_matrix_page.py)
        assert re.search(rf'<div class="wide">(<h2>[^<]*</h2>)?<table id="{key}" class="matrix">', page)


PRINTING = pytest.mark.skipif(CHROMIUM is None or shutil.which("pdftotext") is None or shutil.which("pdfinfo") is None,
                              reason="headless Chromium and poppler's pdftotext are not installed (.ci/run installs them)")


def _printed(tmp_path, report, title: str) -> tuple[str, int, bool]:
    """The report printed to PDF by headless Chromium, read back by poppler: (its text, the index of the first page
    holding ``title``, whether that page is landscape)."""
    html, pdf = tmp_path / "report.html", tmp_path / "report.pdf"
    html.write_text(report_html(report), encoding="utf-8")
    done = _chromium("--no-pdf-header-footer", f"--print-to-pdf={pdf}", html.resolve().as_uri())
    assert pdf.exists(), done.stderr[-2000:]
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True, check=True).stdout
    page = next(k for k, p in enumerate(text.split("\f")) if title in p)
    info = subprocess.run(["pdfinfo", "-f", str(page + 1), "-l", str(page + 1), str(pdf)], capture_output=True,
                          text=True, check=True).stdout
    width, height = map(float, re.search(rf"Page\s+{page + 1} size:\s+([\d.]+) x ([\d.]+)", info).groups())
    return text, page, width > height


@PRINTING
def test_a_printed_report_keeps_the_long_lines_and_the_whole_matrices(tmp_path, sixty):
    text, page, landscape = _printed(tmp_path, sixty, "Residual correlations (sample minus model)")
    assert "end_of_the_long_line" in text  # the model file's long line wraps instead of running off the paper
    found = text.split("\f")[page]
    header = " ".join(str(k) for k in range(1, MAX_MATRIX))
    assert header in " ".join(found.split())  # every column of the matrix is on the paper
    assert re.search(rf"{MAX_MATRIX} y{MAX_MATRIX}\s", found)  # and its last row
    assert landscape


@pytest.fixture(scope="module")
def fifteen():
    """Three factors of five items each (the new-user trial's work-engagement scale had 15 items)."""
    loadings = np.kron(np.eye(3), np.full((5, 1), 0.7))
    phi = np.full((3, 3), 0.5) + 0.5 * np.eye(3)
    data = simulate_cfa(loadings, phi, np.eye(15) * 0.51, 300, seed=15, names=[f"WE{k:02d}" for k in range(1, 16)])
    model = "".join(f"factor {f}: " + ", ".join(f"WE{k:02d}" for k in range(5 * j + 1, 5 * j + 6)) + "\n"
                    for j, f in enumerate(("vigour", "dedication", "absorption")))
    return fit_report(cfa_tool.fit(model, data))


def test_a_wide_path_diagram_fits_the_screen_and_prints_on_a_landscape_page(fifteen):
    # new-user trial: the path diagram of 15 items was wider than the page, cut off at the right on screen and on paper
    from cfa_tool.reporting.diagram import MIN_FIGURE_TEXT
    from cfa_tool.reporting.html_report import LANDSCAPE_INCHES, PORTRAIT_INCHES, landscape_figure, printed_inches
    from cfa_tool.reporting.picture import smallest_text, svg_size

    screen = CSS[:CSS.index("@media print{")]
    assert re.search(r"\.diagram img\{[^}]*max-width:100%;height:auto", screen)  # scaled to its box on screen
    assert re.search(r"figure\.landscape\{[^}]*page:wide", _print_block())  # as a wide table prints
    diagram = next(f for f in fifteen.figures if f.title.startswith("Path diagram"))
    width = svg_size(diagram.svg)[0]
    assert f'viewBox="0 0 {width:.0f} ' in diagram.svg  # the picture scales: it has a view box
    # across a portrait page its smallest text would be below the legibility rule; across a landscape page it is not
    assert smallest_text(diagram.svg, printed_inches(diagram.svg, PORTRAIT_INCHES)) < MIN_FIGURE_TEXT
    assert smallest_text(diagram.svg, printed_inches(diagram.svg, LANDSCAPE_INCHES)) >= MIN_FIGURE_TEXT
    assert landscape_figure(diagram.svg)
    page = report_html(fifteen)
    assert page.count('<figure class="diagram landscape">') == 1  # the path diagram, not the small pictures
    # the page sizes: A4 landscape less 10 mm margins is 277 mm; A4 portrait less them 190 mm (ISO 216 sizes)
    assert "@page{margin:10mm}" in CSS and LANDSCAPE_INCHES == pytest.approx(277 / 25.4)
    assert PORTRAIT_INCHES == pytest.approx(190 / 25.4)


def test_a_small_path_diagram_stays_on_the_portrait_page():
    from cfa_tool.reporting.html_report import landscape_figure

    data = simulate_cfa(np.full((3, 1), 0.7), np.eye(1), np.eye(3) * 0.51, 200, seed=3)
    report = fit_report(cfa_tool.fit("factor f: y1, y2, y3\n", data))
    assert not any(landscape_figure(f.svg) for f in report.figures)
    assert '<figure class="diagram landscape">' not in report_html(report)


@PRINTING
def test_a_printed_wide_path_diagram_is_whole_on_a_landscape_page(tmp_path, fifteen):
    text, page, landscape = _printed(tmp_path, fifteen, "Path diagram of the fitted model")
    words = set(text.split("\f")[page].split())
    assert {"vigour", "dedication", "absorption", "WE01", "WE15"} <= words  # the rightmost factor and item too
    assert landscape
