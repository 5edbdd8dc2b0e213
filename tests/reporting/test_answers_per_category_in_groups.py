"""Answers per category of many groups: one table with a group column, in every view (review s17: fourteen groups
printed fourteen tables, in check and in the ordinal fit's report).  Data: an invented rider survey (a fictional
transit agency's fourteen depots), three items of four answer categories simulated with a fixed seed; the counts are
checked against pandas' own count of each group's answers, not against the tool's."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown, report_table_files

MODEL = "factor comfort: y1, y2, y3\n"
ITEMS = ["y1", "y2", "y3"]
DEPOTS = [f"depot {k:02d}" for k in range(1, 15)]


@pytest.fixture(scope="module")
def depots() -> pd.DataFrame:
    from cfa_tool.workflows.simulation import simulate

    frame = simulate(MODEL, 1400, seed=3, categories=4).frame
    frame["depot"] = [DEPOTS[k % 14] for k in range(len(frame))]
    return frame


def _answer_tables(report) -> list:
    return [t for t in report.tables if t.title.startswith("Answers per category")]


@pytest.mark.parametrize("run", ["check", "ordinal fit"])
def test_fourteen_groups_make_one_table_with_a_group_column(depots, run):
    result = (cfa_tool.check(MODEL, depots, group="depot", ordinal="all") if run == "check"
              else cfa_tool.fit(MODEL, depots, group="depot", ordinal="all"))
    report = report_of(result)
    (table,) = _answer_tables(report)
    assert table.title.startswith("Answers per category in each group")
    assert table.columns[:2] == ("Group", "Item") and table.value_columns[:2] == ("Group", "Item")
    assert len(table.values) == 14 * 3
    codes = [float(c) for c in table.columns[2:]]
    for row in table.values:  # every group's counts, against pandas
        depot, item, counts = row[0], row[1], row[2:]
        answers = depots.loc[depots["depot"] == depot, item]
        assert [c or 0 for c in counts] == [int((answers == v).sum()) for v in codes]
    assert [r[0] for r in table.rows if r[0]] == DEPOTS  # each group named once, on its first item's row
    # every view: one table, its title once
    title = table.title
    assert report_text(report, width=120).count("Answers per category") == 1
    assert report_markdown(report).count(title) == 1 and report_html(report).count(title) == 1
    assert sum("Answers per category" in text for text in report_table_files(report).values()) <= 2  # CSV and LaTeX


def test_one_group_keeps_the_table_without_a_group_column(depots):
    one = depots[depots["depot"] == DEPOTS[0]]
    (table,) = _answer_tables(report_of(cfa_tool.check(MODEL, one, ordinal="all")))
    assert table.columns[0] == "Item" and len(table.rows) == 3
