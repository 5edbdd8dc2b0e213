"""The free-parameter count of an ordinal fit says what it does with the thresholds (new-user trial s22: 'Free
parameters 18' beside 45 thresholds estimated, unsaid).  In one group the thresholds count in neither the parameters
nor the df, which weigh the model's parameters against the polychoric correlations: df = p(p-1)/2 - free parameters
(Olsson 1979's two steps; the df rule as in Joreskog 1994, recalled from memory); in groups they are counted.

Data: simulated five-point answers of two factors of four items (tests.conftest.five_point_answers, fixed seed)."""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.reporting.tables import fit_table
from cfa_tool.reporting.workflow_tables import comparison_report
from tests.conftest import five_point_answers

MODEL = "factor a: a1, a2, a3, a4\nfactor b: b1, b2, b3, b4\n"
ONE = "factor g: a1, a2, a3, a4, b1, b2, b3, b4\n"


def _free_row(result):
    table = fit_table(result)
    return next(row for row in table.rows if row[0] == "Free parameters")


def test_one_group_ordinal_fit_says_its_thresholds_are_not_counted():
    result = cfa_tool.fit(MODEL, five_point_answers(600, 3), ordinal="all")
    thresholds = [e for e in result.estimates if e.kind == "threshold"]
    assert len(thresholds) == 8 * 4
    # the count the row says: 8 * 7 / 2 correlations = df + free parameters, thresholds outside both
    assert result.fit.df + result.fit.n_free_parameters == 8 * 7 // 2
    row = _free_row(result)
    assert row[1] == str(result.fit.n_free_parameters)
    assert "32 thresholds" in row[2] and "neither" in row[2]


def test_fit_in_groups_counts_its_thresholds():
    data = five_point_answers(800, 4)
    data["site"] = np.where(np.arange(len(data)) % 2 == 0, "north", "south")
    result = cfa_tool.fit(MODEL, data, ordinal="all", group="site")
    row = _free_row(result)
    assert "included" in row[2]


def test_continuous_fit_says_nothing_of_thresholds():
    result = cfa_tool.fit(MODEL, five_point_answers(300, 5))
    assert _free_row(result)[2] == ""


def test_comparison_table_note_says_the_same():
    comparison = cfa_tool.compare([MODEL, ONE], five_point_answers(600, 6), ordinal="all")
    report = comparison_report(comparison)
    table = next(t for t in report.tables if t.key == "model_fit")
    assert "32 thresholds count in neither" in str(table.note)
