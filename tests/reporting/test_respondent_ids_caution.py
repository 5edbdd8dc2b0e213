"""A table that names rows by their ids (--id) carries a caution in every view: ids identify respondents, and a
report meant for a manuscript must not publish them.  Rows named by their numbers only carry none."""

from __future__ import annotations

import io
import re

import docx
import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.tables import IDS_IDENTIFY, IDS_LEFT_OUT, ReportTable, case_table, without_ids
from cfa_tool.reporting.text_formats import report_markdown

MODEL = "factor f: a, b, c, d\n"


def _riders() -> pd.DataFrame:
    """Invented answers of 120 riders of a city transit survey, each with a made-up rider code."""
    rng = np.random.default_rng(7)
    rows = rng.multivariate_normal(np.zeros(4), 0.5 + 0.5 * np.eye(4), size=120)
    frame = pd.DataFrame(rows, columns=list("abcd"))
    frame.insert(0, "rider", [f"RID-{5000 + k}" for k in range(120)])
    return frame


def _plain(text: str) -> str:
    return " ".join(re.sub(r"<[^>]+>", " ", text).replace("\\", "").split())


def test_ids_in_the_rows_table_carry_the_caution_in_every_view():
    result = cfa_tool.fit(MODEL, _riders(), id_column="rider")
    table = case_table(result)
    assert any(cell.startswith("RID-") for row in table.rows for cell in row)  # the ids are shown
    assert table.note.startswith(IDS_IDENTIFY)
    report = fit_report(result)
    words = " ".join(IDS_IDENTIFY.split()[:6])  # 'The ids identify respondents: leave this'
    assert words in _plain(result.summary())
    assert words in _plain(report_markdown(report))
    assert words in _plain(report_html(report))
    # the Word report, written for a manuscript, leaves the ids out and says so (a new-user trial found a client's
    # respondent ids in it); the row numbers stay
    document = docx.Document(io.BytesIO(report_docx(report)))
    text = " ".join(p.text for p in document.paragraphs)
    cells = [c.text for t in document.tables for r in t.rows for c in r.cells]
    assert words not in text and IDS_LEFT_OUT in " ".join(text.split())
    assert not any(c.startswith("RID-") for c in cells) and "Id" not in cells
    assert str(table.rows[0][0]) in cells  # the row number of the first row shown
    # a saved report keeps which column holds the ids
    assert ReportTable.from_dict(table.to_dict()).ids_column == 1
    assert without_ids(without_ids(table)) == without_ids(table)


def test_rows_named_by_numbers_only_carry_no_caution():
    result = cfa_tool.fit(MODEL, _riders().drop(columns="rider"))
    table = case_table(result)
    assert table is not None and IDS_IDENTIFY not in table.note
    assert "identify respondents" not in result.summary()
