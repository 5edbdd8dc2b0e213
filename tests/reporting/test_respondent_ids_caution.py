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
from cfa_tool.reporting.tables import IDS_IDENTIFY, case_table
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
    document = docx.Document(io.BytesIO(report_docx(report)))
    assert words in " ".join(p.text for p in document.paragraphs)


def test_rows_named_by_numbers_only_carry_no_caution():
    result = cfa_tool.fit(MODEL, _riders().drop(columns="rider"))
    table = case_table(result)
    assert table is not None and IDS_IDENTIFY not in table.note
    assert "identify respondents" not in result.summary()
