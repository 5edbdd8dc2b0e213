"""The demo's HTML report printed: its residual matrix prints on a landscape page of its own (tests/reporting/
test_html_print.py), and the heading of the section it opens ('Local fit') and the note under it go on that page
with it.  Looked at in session s20: printed by Chromium, 'Local fit' stood alone at the top of a portrait page, the
matrix on the landscape page after it and the matrix's note ('Positive: the model underestimates ...') alone on a
third page.  Printed by headless Chromium and read back with poppler's pdftotext, as test_html_print.py does."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.resources import resource_dir
from tests.reporting.test_html_print import PRINTING, _printed

TITLE = "Residual correlations (sample minus model)"


def test_the_structure_keeps_a_matrix_with_its_heading_and_note():
    report = fit_report(cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa",
                                     resource_dir("demo") / "rider_survey.csv"))
    page = report_html(report)
    start = page.index('<div class="wide">')
    box = page[start:page.index("</div>", start)]
    assert "<h2>Local fit</h2>" in box and TITLE in box and "Positive: the model underestimates" in box


@PRINTING
def test_the_printed_matrix_has_its_heading_and_note_on_its_page(tmp_path):
    report = fit_report(cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa",
                                     resource_dir("demo") / "rider_survey.csv"))
    text, page, landscape = _printed(tmp_path, report, TITLE)
    found = text.split("\f")[page]
    assert landscape and "Local fit" in found and "Positive: the model underestimates" in found
