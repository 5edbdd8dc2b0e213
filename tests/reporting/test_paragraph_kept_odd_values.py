"""A row that looks like a spreadsheet's means row, or a value that looks like a missing-value code (data.odd_values),
is analysed as the file holds it (the run warns first but does not refuse): the methods paragraph of fit, compare and
invariance says which and that it was analysed, since a reviewer needs it to judge the N and the estimates.  The
means row is computed here with pandas from Holzinger & Swineford (1939) and appended at index label 301 (the 302nd
row of a frame indexed from 0), by which a data frame's row is named."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.data.odd_values import OddKind
from cfa_tool.reporting.paragraph import comparison_paragraph, invariance_paragraph, methods_paragraph
from cfa_tool.workflows.invariance import LEVELS
from tests.conftest import THREE_FACTORS, holzinger_swineford

MEANS_ROW = ("row labelled 301, whose values equal the means of the other rows' answers in every item column it answers "
             "(9): perhaps a means row; this was analysed as answers, as the file holds it")


def _with_means_row() -> pd.DataFrame:
    data = holzinger_swineford()[["school"] + [f"x{i}" for i in range(1, 10)]]
    means = data.mean(numeric_only=True).round(2)  # as a spreadsheet's means row writes them
    return pd.concat([data, pd.DataFrame([dict(school="Pasteur", **means.to_dict())])], ignore_index=True)


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_the_fit_paragraph_says_the_means_row_was_analysed():
    result = cfa_tool.fit(THREE_FACTORS, _with_means_row())
    assert result.n_obs == 302  # 301 pupils and the means row
    assert [o.kind for o in result.data.odd_values] == [OddKind.MEANS_ROW]
    assert f"(N = 302; {MEANS_ROW})" in _flat(methods_paragraph(result))


def test_a_row_left_out_by_a_filter_is_not_named():
    result = cfa_tool.fit(THREE_FACTORS, _with_means_row(), keep=("x1 != 4.94",))  # the means row's x1, rounded
    assert result.n_obs == 301 and not result.data.odd_values
    assert "perhaps a means row" not in methods_paragraph(result)


def test_a_value_like_a_missing_code_is_named_with_its_item():
    data = holzinger_swineford()[[f"x{i}" for i in range(1, 10)]].copy()
    data.loc[data.index[[3, 40, 77]], "x2"] = -99
    text = _flat(methods_paragraph(cfa_tool.fit(THREE_FACTORS, data)))
    low, high = data["x2"][data["x2"] != -99].min(), data["x2"].max()  # pandas: the other answers' range
    assert (f"the value -99 in x2 (3 answers), far outside the other answers ({low:g} to {high:g}): perhaps a "
            f"missing-value code; this was analysed as answers, as the file holds it") in text


def test_compare_and_invariance_say_it_too():
    data = _with_means_row()
    assert MEANS_ROW in _flat(comparison_paragraph(cfa_tool.compare([THREE_FACTORS, THREE_FACTORS + "covary x7, x8\n"],
                                                                   data)))
    assert MEANS_ROW in _flat(invariance_paragraph(cfa_tool.invariance(THREE_FACTORS, data, "school"), LEVELS))
