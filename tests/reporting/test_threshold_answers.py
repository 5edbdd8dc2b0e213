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
    # the words head the answers' columns, as the value labels of a data file do
    assert categories.columns == ("Item", "1 never", "2 sometimes", "3 often", "4 always")


def test_the_value_labels_of_the_data_file_name_the_answers(data, tmp_path):
    # new-user trial s15: an SPSS file labelling 1..4 never .. always had thresholds 'between answers 1 and 2'
    pyreadstat = pytest.importorskip("pyreadstat")
    labels = {1: "never", 2: "sometimes", 3: "often", 4: "always"}
    pyreadstat.write_sav(data.astype(float), str(tmp_path / "answers.sav"),
                         variable_value_labels={item: labels for item in ("y1", "y2", "y3", "y4")})
    result = cfa_tool.fit(MODEL, tmp_path / "answers.sav", ordinal="all")
    table = _threshold_table(result)
    assert [row[1] for row in table.rows[:5]] == ["sometimes and often", "often and always", "never and sometimes",
                                                  "sometimes and often", "often and always"]


def test_a_std_column_that_would_repeat_the_estimates_is_left_out_and_said(data):
    # one group: the latent responses have variance 1, so a threshold's standardized value (tau / sd of the latent
    # response) is the threshold itself
    result = cfa_tool.fit(MODEL, data, ordinal="all")
    table = _threshold_table(result)
    thresholds = [e for e in result.estimates if e.kind == "threshold"]
    assert all(e.standardized == pytest.approx(e.estimate, abs=1e-12) for e in thresholds)
    assert "Std." not in table.columns and "Estimate" in table.columns
    assert "no Std. column repeats them" in table.note
    assert "Standardized" in table.value_columns  # the data-file version keeps every number
    assert T._same_values([0.1, np.nan], [0.1, np.nan]) and not T._same_values([0.1, 0.2], [0.1, 0.25])
