"""The count of an id- or unit-named column's different values (data.column_roles.distinct_values), read from the
column's stored array: checked against pandas' own Series.dropna().nunique() (and its count of cells) on columns of
every kind a data frame may hold, text compared as text where a cell cannot be hashed."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.data.column_roles import distinct_values, id_named_column, unit_id_column


def _frame() -> pd.DataFrame:
    return pd.DataFrame({
        "numbers": [1, 2, 2, None, 3.0],
        "text": ["a", None, np.nan, "a", "b"],
        "nullable": pd.array([1, None, 1, 3, 3], dtype="Int64"),
        "zeros": [-0.0, 0.0, np.nan, 1.0, 1.0],
        "categories": pd.Categorical(["u", "v", None, "u", "u"]),
        "objects": [True, 1, 1.0, "1", None],
        "lists": [[1], [1], 2, None, "x"],
        "strings": pd.array(["x", pd.NA, "y", "x", "x"], dtype="string"),
    })


def test_the_count_is_pandas_nunique_of_the_cells_with_a_value():
    frame = _frame()
    for name in frame.columns:
        values = frame[name].dropna()
        try:
            expected = values.nunique()
        except TypeError:  # a list in a cell: pandas cannot hash it, compared as text
            expected = values.astype(str).nunique()
        assert distinct_values(frame, name) == (expected, len(values)), name


def test_the_rules_of_named_columns_read_the_count_as_before():
    # 'rider_id' repeats (two rows of R1) beside a 'team_id' of few teams: the rows' id is the rider's, and the
    # teams are units of many respondents
    frame = pd.DataFrame({"rider_id": ["R1", "R1", "R2", "R3", "R4", "R5"], "team_id": [1, 1, 1, 2, 2, 2],
                          "q1": [1, 2, 3, 4, 5, 1]})
    assert id_named_column(frame, {"q1"}) == "rider_id"
    assert unit_id_column(frame, {"q1"}) == ("team_id", "team")
    assert id_named_column(frame.drop(index=1), {"q1"}) is None  # every rider once: the rows' id, not repeated
