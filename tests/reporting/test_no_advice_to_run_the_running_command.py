"""A report does not advise running the command the reader is running: inside compare, the caution on two factors
that correlate nearly 1 says to compare a model in which they are one factor among the models compared, not to run
'cfa-tool compare' (s23's closing note, fixinv-s23).  The command a note names is declared with it
(note_parts.Command.runs, with the words said in that command's own report, ``inside``), and each view knows whose
report it writes (View.running: document.ResultKind's word).  The other commands' reports keep the command.  Data:
simulated with a fixed seed (two factors of three items each, population correlation .97, 500 rows)."""

from __future__ import annotations

import html

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.note_parts import Command, Note, View, titled
from cfa_tool.reporting.document import Report
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown
from cfa_tool.workflows.compare import compare

TWO = "factor a: a1, a2, a3\nfactor b: b1, b2, b3\n"
ONE = "factor a: a1, a2, a3, b1, b2, b3\n"


def _close_factors() -> pd.DataFrame:
    rng = np.random.default_rng(7)
    f = rng.normal(size=500)
    g = 0.97 * f + np.sqrt(1 - 0.97 ** 2) * rng.normal(size=500)
    items = {f"a{k}": 0.7 * f + np.sqrt(0.51) * rng.normal(size=500) for k in (1, 2, 3)}
    items.update({f"b{k}": 0.7 * g + np.sqrt(0.51) * rng.normal(size=500) for k in (1, 2, 3)})
    return pd.DataFrame(items).round(3)


def _flat(text: str) -> str:
    return " ".join(html.unescape(text).split())


def test_a_view_says_a_command_in_its_own_report_by_its_inside_words():
    note = Note(("compare them", Command(" (cfa-tool compare)", runs="compare", inside=" (among those compared)"), "."))
    assert note.said(View(True)) == "compare them (cfa-tool compare)."
    assert note.said(View(True, running="compare")) == "compare them (among those compared)."
    assert note.said(View(True, running="fit")) == "compare them (cfa-tool compare)."
    assert note.said(View(False, running="compare")) == "compare them."  # a manuscript names no command
    assert Note.from_dict(note.to_dict()) == note  # a saved report keeps both


def test_inside_compare_the_near_one_caution_does_not_send_to_compare():
    data = _close_factors()
    report = report_of(compare([TWO, ONE], data))
    views = {"terminal": report_text(report, 3000), "html": report_html(report), "markdown": report_markdown(report)}
    for name, text in views.items():
        flat = _flat(text)
        assert "nearly 1" in flat, name  # the caution is there
        assert "cfa-tool compare" not in flat, name
        assert "compare this model with one in which they are one factor (among the models compared here" in flat, name
    again = Report.from_dict(report.to_dict())  # 'cfa-tool report' on the saved comparison
    assert "cfa-tool compare" not in _flat(report_text(again, 3000))
    assert titled(again.tables, running=again.kind.value).running == "compare"
    # the fit of the same model still advises the command, which its reader is not running
    fitted = fit_report(cfa_tool.fit(TWO, data))
    assert "one in which they are one factor (cfa-tool compare)" in _flat(report_text(fitted, 3000))
