"""An exploratory solution's table prints every loading, factor correlation and communality to two decimals, a
value that rounds to zero as '.00' without a sign (reporting.numbers.explored_unit: every entry is an estimate, so a
rounded zero is never taken for a fixed value, and the sign of -.0004 means nothing), in every view; the data files
(CSV) keep the full numbers (new-user trial s25: '-.00038' stood among two-decimal loadings).  The data: a seeded
simulation of three correlated factors of three items each, invented here."""

from __future__ import annotations

import re

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.explore_report import factor_correlation_table, loading_table
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.text_formats import csv_table, report_markdown

TWO_DECIMALS = re.compile(r"^-?\.\d\d$|^1\.00$")


@pytest.fixture(scope="module")
def result():
    rng = np.random.default_rng(3)  # a seed whose solution holds a loading of about .00025 (found by trying seeds)
    f = rng.multivariate_normal(np.zeros(3), [[1, .5, .4], [.5, 1, .45], [.4, .45, 1]], 600)
    frame = pd.DataFrame({f"w{k + 1}": .7 * f[:, k // 3] + rng.normal(0, .7, 600) for k in range(9)})
    return cfa_tool.explore(frame, factors=3, replications=10)


def test_a_near_zero_loading_is_printed_as_two_decimals(result):
    pattern = result.exploration.rotated.pattern
    assert np.abs(pattern).min() < .005  # the case: a loading that two decimals print as zero
    for structure in (False, True):
        table = loading_table(result, structure)
        step = 1 if structure or "SE" not in table.columns else 2
        for row in table.rows:
            for cell in row[1:1 + step * pattern.shape[1]:step]:
                assert TWO_DECIMALS.match(cell), cell
        tiny = [row[1 + step * j] for row, k in zip(table.rows, result.order) for j in range(pattern.shape[1])
                if abs((result.exploration.rotated.structure if structure else pattern)[k, j]) < .005]
        assert all(cell == ".00" for cell in tiny)
    correlations = factor_correlation_table(result)
    assert all(TWO_DECIMALS.match(c) for row in correlations.rows for c in row[1:] if c)


def test_every_view_shows_the_two_decimals_and_the_csv_the_full_numbers(result):
    k, j = np.unravel_index(np.argmin(np.abs(result.exploration.rotated.pattern)), result.exploration.rotated.pattern.shape)
    item = result.items[k]
    report = report_of(result)
    for text in (report_markdown(report), report_html(report), result.summary()):
        assert not re.search(r"(?<![\d.])-?\.000\d", text)  # no '.00025' among two-decimal columns
    table = next(t for t in report.tables if t.key == "pattern")
    csv_row = next(line for line in csv_table(table).splitlines() if line.startswith(item + ","))
    value = result.exploration.rotated.pattern[k, j]
    assert any(abs(float(c) - value) < 1e-12 for c in csv_row.split(",")[1:] if c)  # the number in full
