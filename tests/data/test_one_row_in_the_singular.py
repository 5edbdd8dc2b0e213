"""A count of one takes its noun and verb in the singular: '1 row has', not '1 rows have' (the s20 closing note: '1
rows have no id'), in every message that can count one row or one item: cfa_tool.numbers.counted is the count with
its noun, and the verbs follow it."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import Problem, ProblemKind
from cfa_tool.errors import DataError, OptionError
from cfa_tool.pipeline.continuous import helpers_only_note
from cfa_tool.pipeline.inputs import without_group_problem
from tests.conftest import THREE_FACTORS


def _flat(text) -> str:
    return " ".join(str(text).split())


def test_counted():
    from cfa_tool.numbers import counted

    assert counted(1, "row") == "1 row" and counted(2, "row") == "2 rows" and counted(1204, "row") == "1,204 rows"
    assert counted(1, "category", "categories") == "1 category" and counted(3, "category", "categories") == "3 categories"


def test_one_row_with_a_gap(hs_data):
    data = hs_data.copy()
    data.loc[data.index[0], "x1"] = np.nan
    with pytest.raises(OptionError) as raised:
        cfa_tool.fit(THREE_FACTORS, data, test="satorra-bentler")
    assert str(raised.value).startswith("1 row has missing answers on model variables")  # was '1 rows have'
    text = _flat(cfa_tool.fit(THREE_FACTORS, data))
    assert "1 of 301 rows misses some answers on model variables" in text  # was '1 of 301 rows miss'
    assert "would leave that row out" in text


def test_one_item_of_few_categories(hs_data):
    data = hs_data.assign(x1=(hs_data["x1"] > hs_data["x1"].median()).astype(float))
    text = _flat(cfa_tool.fit(THREE_FACTORS, data))
    assert "1 of the 9 items (x1) has at most 4 answer categories and is analysed here as continuous" in text


def test_a_file_of_one_row(tmp_path):
    path = tmp_path / "one.csv"
    path.write_text("x1,x2,x3\n")
    with pytest.raises(DataError) as raised:
        cfa_tool.fit("factor f: x1, x2, x3\n", path, names_row=3)
    assert "has 1 row, so row 3" in str(raised.value)  # was 'has 1 rows'


def test_one_row_in_problems_and_notes():
    left = Problem(ProblemKind.ROWS_LEFT_OUT, (), 1.0, "", "")
    assert left.phrase() == "1 row left out listwise for a missing answer"
    assert Problem(ProblemKind.COPIED_ROWS, (), 1.0, "", "").phrase().startswith("1 row identical in every column")
    assert Problem(ProblemKind.ROWS_LEFT_OUT, (), 1234.0, "", "").phrase().startswith("1,234 rows left out")
    note = helpers_only_note(1, 300)
    assert note.startswith("1 of 300 rows answers none of the model's items but a missing-data helper: it is analysed")
    assert "left out, it would leave" in note
    caution = without_group_problem(1, 10, "school")
    assert "1 of 10 rows (10%) has no value in the group column 'school' and was left out, and the row left out" in (
        _flat(caution.explanation))


def test_one_row_of_ordinal_items_answering_nothing(rider_demo, rider_model):
    data = rider_demo.copy()
    items = [c for c in data.columns if c in rider_model and c not in ("district", "line")]
    data.loc[data.index[0], items] = np.nan
    text = _flat(cfa_tool.fit(rider_model, data, ordinal="all"))
    # the note (the paragraph said it so already): was 'and were left out'
    assert "- 1 of 480 rows answered no model variable and was left out" in text and "were left out" not in text


def test_one_row_in_a_group_the_earlier_fit_does_not_have():
    from cfa_tool.workflows.factor_scores import _unknown_groups

    said = _unknown_groups(np.array(["a", "a", "c"], dtype=object), ["a", "b"], "grp", "new.csv")
    assert said.startswith("1 row of new.csv is in groups of 'grp' that the earlier fit does not have: 'c' (1 row)")
    assert said.endswith("; that row gets no scores")  # was '1 rows of new.csv are ...; those rows get no scores'
