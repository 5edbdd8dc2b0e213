"""Thresholds of ordinal items are labelled by the two answers they lie between, not by their position: an item whose
rows never gave its lowest answer has its first threshold between its second and third answers (a new-user trial
compared such thresholds by their step number across items).  The threshold's value is checked against the normal
quantile of the share of rows at or below the lower answer (scipy.stats.norm.ppf; one group, thresholds from the
marginal shares, Olsson 1979's two-step estimates).  Data simulated here with a fixed seed."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.workflows.simulation import simulate

MODEL = "factor a: y1, y2, y3, y4\n"
WORDS = 'answers "never" = 1, "sometimes" = 2, "often" = 3, "always" = 4 for y1..y4\n'


@pytest.fixture(scope="module")
def data():
    frame = simulate(MODEL, 600, seed=5, categories=4).frame
    assert sorted(frame["y2"].unique()) == [1, 2, 3, 4]
    frame["y1"] = frame["y1"].clip(lower=2)  # y1's rows never gave the lowest answer
    return frame


def _threshold_table(result):
    return next(t for t in T.estimate_tables(result) if t.key == "threshold")


def test_a_threshold_names_the_answers_it_lies_between(data):
    result = cfa_tool.fit(MODEL, data, ordinal="all")
    table = _threshold_table(result)
    assert table.columns[:2] == ("Variable", "Between answers")
    y1 = [row for row in table.rows[:2]]
    assert [row[1] for row in y1] == ["2 and 3", "3 and 4"]
    assert [row[1] for row in table.rows[2:5]] == ["1 and 2", "2 and 3", "3 and 4"]  # y2: all four answers
    first = next(e for e in result.estimates if e.kind == "threshold" and e.variables == ("y1", "1"))
    assert first.estimate == pytest.approx(stats.norm.ppf(np.mean(data["y1"] <= 2)), abs=1e-6)
    assert table.value_columns[:3] == ("Variable", "Step", "Between answers")
    assert table.values[0][:3] == ("y1", "1", "2 and 3")


def test_the_words_of_an_answers_statement_name_the_answers(data):
    words = data.copy()
    for item in ("y1", "y2", "y3", "y4"):
        words[item] = words[item].map({1: "never", 2: "sometimes", 3: "often", 4: "always"})
    result = cfa_tool.fit(MODEL + WORDS, words, ordinal="all")
    assert [row[1] for row in _threshold_table(result).rows[:2]] == ["sometimes and often", "often and always"]
    categories = T.category_table(result)
    assert "Codes of the answer words: 1 never, 2 sometimes, 3 often, 4 always." in categories.note
