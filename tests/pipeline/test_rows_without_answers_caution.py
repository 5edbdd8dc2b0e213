"""Rows that answered no model variable (survey break-offs holding only an id) left out of a fit that keeps every row
with an answer (full-information ML, pairwise present rows): a caution first when they are more than the share of
rows that listwise deletion's caution takes (pipeline.continuous.LISTWISE_WARNING_SHARE, 5%: common practice), and
the listwise caution's advice counts only the rows full-information ML would keep (hostile tester s28, 04: 336 of
480 rows were said in the second note, and listwise's advice promised 'every answer they have' of rows with none).
The counts below follow from how the data are made: 200 rows, the first 100 emptied, one later row with one gap."""
from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind

MODEL = "factor f: x1, x2, x3\nfactor g: x4, x5, x6\n"


def _data(empty: int, ordinal: bool = False) -> pd.DataFrame:
    rng = np.random.default_rng(28)
    f = rng.normal(size=(200, 2)) @ np.array([[1.0, 0.4], [0.0, 0.92]])
    x = np.hstack([f[:, [0]] * 0.8, f[:, [0]] * 0.7, f[:, [0]] * 0.6, f[:, [1]] * 0.8, f[:, [1]] * 0.7,
                   f[:, [1]] * 0.6]) + rng.normal(scale=0.6, size=(200, 6))
    if ordinal:
        x = np.digitize(x, [-1.0, -0.3, 0.3, 1.0]) + 1.0
    frame = pd.DataFrame(x, columns=[f"x{i}" for i in range(1, 7)])
    frame.insert(0, "district", np.where(np.arange(200) % 2, "north", "south"))
    frame.iloc[:empty, 1:] = np.nan  # break-offs: the district alone
    frame.iloc[150, 3] = np.nan  # one row with a gap (x3)
    return frame


def test_many_rows_without_answers_are_a_caution_first():
    result = cfa_tool.fit(MODEL, _data(100))
    first = result.problems[0]
    assert first.kind is ProblemKind.ROWS_WITHOUT_ANSWERS and first.value == 100
    assert str(first.explanation).startswith("100 of 200 rows (50%) answered no model variable and were left out "
                                             "(rows labelled 0, 1, 2, 3, 4 and 95 more), so the 100 rows analysed")
    said = result.to_dict()["problems"][0]
    assert said["kind"] == ProblemKind.ROWS_WITHOUT_ANSWERS.value and said["value"] == 100
    assert not any("answered none of the model variables" in str(w) for w in result.warnings)  # not said twice


def test_few_rows_without_answers_stay_a_note():
    # 10 of 200 rows is 5%, not more than the share
    result = cfa_tool.fit(MODEL, _data(10))
    assert not any(p.kind is ProblemKind.ROWS_WITHOUT_ANSWERS for p in result.problems)
    assert any(str(w).startswith("10 of 200 rows answered none of the model variables") for w in result.warnings)


def test_listwise_advice_counts_the_rows_full_information_would_keep():
    result = cfa_tool.fit(MODEL, _data(100), missing="listwise")
    [left] = [p for p in result.problems if p.kind is ProblemKind.ROWS_LEFT_OUT]
    assert str(left.explanation).startswith("Listwise deletion left out 101 of 200 rows (50%) because they miss an "
                                            "answer on a model variable (100 of them answered no model variable at all)")
    advice = str(left.advice)
    assert "would keep the 1 row with some answers" in advice and "the 100 that answered no model variable" in advice
    assert "every answer they have" not in advice


def test_listwise_advice_promises_nothing_when_no_row_left_out_has_an_answer():
    frame = _data(100)
    frame.iloc[150, 3] = 1.0
    result = cfa_tool.fit(MODEL, frame, missing="listwise")
    [left] = [p for p in result.problems if p.kind is ProblemKind.ROWS_LEFT_OUT]
    assert "(all of them answered no model variable at all)" in str(left.explanation)
    assert "would leave them out too" in str(left.advice) and "every answer" not in str(left.advice)


def test_groups_and_ordinal_items_say_it_first_too():
    grouped = cfa_tool.fit(MODEL, _data(100), group="district")
    assert [p.kind for p in grouped.problems[:2]] == [ProblemKind.ROWS_WITHOUT_ANSWERS] * 2  # 50 in each group
    ordinal = cfa_tool.fit(MODEL, _data(100, ordinal=True), ordinal="all")
    first = ordinal.problems[0]
    assert first.kind is ProblemKind.ROWS_WITHOUT_ANSWERS and first.value == 100
    listwise = cfa_tool.fit(MODEL, _data(100, ordinal=True), ordinal="all", missing="listwise")
    [left] = [p for p in listwise.problems if p.kind is ProblemKind.ROWS_LEFT_OUT]
    assert "(100 of them answered no model variable at all)" in str(left.explanation)
    assert "would keep the 1 row with some answers" in str(left.advice)


def test_compare_says_it_first_and_counts_them_listwise():
    models = [MODEL, "factor f: x1, x2, x3, x4, x5, x6\n"]
    fiml = cfa_tool.compare(models, _data(100))
    first = fiml.problems[0]
    assert first.kind is ProblemKind.ROWS_WITHOUT_ANSWERS and first.value == 100
    listwise = cfa_tool.compare(models, _data(100), missing="listwise")
    [left] = [p for p in listwise.problems if p.kind is ProblemKind.ROWS_LEFT_OUT]
    assert "(100 of them answered no model variable at all)" in str(left.explanation)
    assert "would keep the 1 row with some answers" in str(left.advice)
