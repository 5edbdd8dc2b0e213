"""Every line of a report's notices (problems, notes and warnings on the data, notes, cautions) starts as a
sentence, with a capital, whichever part of the tool wrote it: the report model makes it so in one place
(reporting.document.sentence), for the messages written in lower case to be joined into other sentences
(the vocabulary below is read from the tool's source) and for reports saved before."""

from __future__ import annotations

import ast
from pathlib import Path

import numpy as np

import cfa_tool
from cfa_tool.reporting.document import Report, ResultKind, sentence
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.tables import ProblemNotice
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown

SOURCE = Path(cfa_tool.__file__).parent


def _message_starts() -> list[str]:
    """The literal beginnings of the notes and warnings the tool appends (``warnings.append("...")``,
    ``notes.append(f"...")``): the message vocabulary, as written in the source."""
    found = []
    for path in SOURCE.rglob("*.py"):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if not (isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute) and node.func.attr == "append"
                    and node.args):
                continue
            target = node.func.value
            name = target.id if isinstance(target, ast.Name) else getattr(target, "attr", "")
            if not name.endswith(("warnings", "notes")):
                continue
            first = node.args[0]
            if isinstance(first, ast.JoinedStr) and first.values and isinstance(first.values[0], ast.Constant):
                first = first.values[0]
            if isinstance(first, ast.Constant) and isinstance(first.value, str) and first.value:
                found.append(first.value)
    return found


def test_the_vocabulary_of_notes_and_warnings_starts_with_capitals_in_a_report():
    starts = _message_starts()
    lower = [s for s in starts if s[0].islower()]
    assert len(starts) > 10 and len(lower) >= 5  # (the messages joined into other sentences start in lower case)
    for start in starts:
        shown = sentence(start)
        assert not shown[0].islower(), start
        assert shown[1:] == start[1:]  # only the first letter changes
    report = Report(ResultKind.FIT, "Title", ProblemNotice("Heading", tuple(lower), False), (), (), tuple(lower),
                    tuple(lower), warnings=tuple(lower))
    for view in (report_text(report, 400), report_html(report), report_markdown(report)):
        for start in lower:
            assert start not in view or start[0].upper() + start[1:] in view


def test_names_keep_their_case():
    # a file or a variable name that begins a line is not a word of the sentence to capitalise
    for line in ("data.csv: the first column has no name", "x1: no variance", "q_3 has one value", "/data/a.csv: b",
                 "y2, y3 and y4 share a residual", "r2d2 is an item"):
        assert sentence(line) == line
    assert sentence("listwise deletion left out 45 rows") == "Listwise deletion left out 45 rows"
    assert sentence("") == ""


def test_a_fit_and_a_report_saved_before_show_their_warnings_as_sentences(hs_data):
    data = hs_data.copy()
    data.loc[data.index[:40], "x1"] = np.nan
    result = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n", data, missing="listwise")
    # the rows left out listwise: a caution written as a sentence (pipeline.continuous.listwise_problem), in the box
    report = fit_report(result)
    assert str(report.notice.lines[0]).startswith("Listwise deletion")
    assert "Listwise deletion" in report_text(report) and "listwise deletion" not in report_text(report)
    saved = report.to_dict()
    saved["warnings"] = ["listwise deletion left out 40 rows"]  # as a report saved before held it
    assert Report.from_dict(saved).warnings == ("Listwise deletion left out 40 rows",)
