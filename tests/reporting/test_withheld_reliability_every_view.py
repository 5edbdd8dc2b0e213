"""A factor whose loadings contradict the declared keying has its reliability withheld in every view, by the one
rule that withholds it (assessment.reliability.miskeyed, which the methods paragraph and the scores follow too): the
report's table (terminal, HTML, Word: 'withheld' in each coefficient's cell, and why in its note) and the JSON
(the coefficients null, with 'withheld' saying why).  s23's closing note: the table still printed the omega the
methods paragraph and the scores withhold.  Data: tests/assessment/test_weak_item_against_keying.py's simulated
answers (fixed seed), a5 loading -.5 and not declared reversed."""

from __future__ import annotations

import html
import io
import json

import docx

import cfa_tool
from cfa_tool.assessment.reliability import WITHHELD_BECAUSE
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.terminal import report_text
from tests.assessment.test_weak_item_against_keying import MODEL, _answers


def test_the_omega_of_a_miskeyed_factor_is_withheld_in_every_view():
    result = cfa_tool.fit(MODEL, _answers(-0.5))
    [a, b] = result.groups[0].reliability
    assert a.against_keying == ("a5",) and not b.against_keying  # the case: factor a miskeyed, b not
    omega_a, omega_b = f"{a.omega:.3f}"[1:], f"{b.omega:.3f}"[1:]
    report = fit_report(result)
    [table] = [t for t in report.tables if t.key == "reliability_0"]
    assert list(table.rows[0][:2]) == ["a", "5"] and set(table.rows[0][2:]) == {"withheld"}
    assert table.rows[1][2] == omega_b  # the other factor's as before
    assert set(table.values[0][2:]) == {None}  # every coefficient, the delta-method interval's too
    assert f"Withheld for a (see the caution on the keying above): {WITHHELD_BECAUSE}." in " ".join(
        str(table.note).split())
    terminal = report_text(report, 3000)
    page = html.unescape(report_html(report))
    word = docx.Document(io.BytesIO(report_docx(report, 72)))
    cells = [c.text for t in word.tables for row in t.rows for c in row.cells]
    for view in (terminal, page, " ".join(cells)):
        assert "withheld" in view and omega_b in view
        assert omega_a not in view  # nowhere, in the table or elsewhere
    # the JSON: null, and why
    saved = json.loads(json.dumps(result.to_dict()))
    [a_saved, b_saved] = saved["reliability"]["factors"]
    assert a_saved["omega"] is None and a_saved["alpha"] is None and a_saved["withheld"] == WITHHELD_BECAUSE
    assert b_saved["omega"] == b.omega and "withheld" not in b_saved
    # the methods paragraph withholds it by the same rule, as before
    assert " for a" not in methods_paragraph(result).split("omega (McDonald, 1999) was")[1].split(".")[0]
