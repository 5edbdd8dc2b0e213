"""With sampling weights, every view says in the table's title which data tables are weighted: the items'
means and SDs are (checked against numpy's weighted average, an implementation the project did not write),
the answers per category are counted once per row, unweighted.

Data: Holzinger & Swineford (1939), the nine tests cut at their quartiles into four ordered answers, with
weights drawn once from a seeded uniform distribution (invented for this test)."""

from __future__ import annotations

import io

import docx
import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown
from tests.conftest import THREE_FACTORS
from tests.reporting.test_fit_views import _html_text, _plain

ITEMS = [f"x{i}" for i in range(1, 10)]
WEIGHTED = "Items: descriptive statistics (analysed rows; means and SDs weighted by w)"
COUNTED = "Answers per category (rows analysed, each counted once: unweighted)"


@pytest.fixture(scope="module")
def weighted(hs_data):
    data = hs_data.copy()
    for column in ITEMS:
        data[column] = pd.qcut(hs_data[column], 4, labels=False) + 1
    data["w"] = np.random.default_rng(11).uniform(0.2, 3.0, len(data))
    return data, cfa_tool.fit(THREE_FACTORS, data, ordinal="all", weights="w")


def test_the_item_means_are_the_weighted_ones_and_every_view_says_so(weighted):
    data, result = weighted
    report = fit_report(result)
    items = next(t for t in report.tables if t.title.startswith("Items: descriptive"))
    assert items.title == WEIGHTED
    mean = dict(zip(items.value_columns, items.values[0]))["Mean"]  # the row of x1
    assert mean == pytest.approx(np.average(data["x1"], weights=data["w"]), abs=1e-9)
    assert abs(mean - data["x1"].mean()) > 1e-3  # the weights matter here, so the check can tell them apart
    # the SD: the weighted variance (numpy, divisor the sum of the weights) stretched to divisor N - 1 as the note says
    n = len(data)
    sd = np.sqrt(np.cov(data["x1"], aweights=data["w"], bias=True) * n / (n - 1))
    assert dict(zip(items.value_columns, items.values[0]))["SD"] == pytest.approx(sd, abs=1e-9)
    word = " ".join(p.text for p in docx.Document(io.BytesIO(report_docx(report, 72))).paragraphs)
    for name, text in {"terminal": report_text(report, 100), "HTML": _html_text(report_html(report)),
                       "Markdown": report_markdown(report), "Word": word}.items():
        text = _plain(text)
        assert WEIGHTED in text and COUNTED in text, name
        assert text.index(WEIGHTED) < text.index(COUNTED), name


def test_without_weights_the_titles_say_nothing_of_weights(hs_data):
    titles = [t.title for t in fit_report(cfa_tool.fit(THREE_FACTORS, hs_data)).tables]
    assert "Items: descriptive statistics (analysed rows)" in titles
    assert not any("weighted" in title for title in titles)
