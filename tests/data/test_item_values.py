"""The item columns taken out of a data frame in one selection (data.moments.item_values) equal pandas' own
conversion of each column, whatever the frame's layout: columns of several dtypes, nullable integers with gaps,
names in another order than the frame's, a column repeated, and text columns beside the items."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.data.moments import item_values, numeric_columns


def _frame() -> pd.DataFrame:
    rng = np.random.default_rng(20261203)
    return pd.DataFrame({"district": ["north", "south", "east", "west", "north"],  # invented transit survey
                         "q1": rng.integers(1, 6, 5), "q2": rng.normal(size=5),
                         "q3": pd.array([1, None, 3, 4, 5], dtype="Int64"),
                         "q4": np.float32([1.5, 2.5, np.nan, 4.0, 5.0]), "q5": rng.integers(1, 6, 5).astype(np.uint8)})


def _expected(frame: pd.DataFrame, names) -> np.ndarray:
    """Independent of the code under test: pandas' Series.to_numpy, one column at a time."""
    return np.column_stack([frame[n].to_numpy(dtype=float, na_value=np.nan) for n in names])


def test_numbers_of_every_numeric_dtype_in_any_order():
    frame = _frame()
    for names in (["q1", "q2", "q4", "q5"], ["q5", "q2", "q1"], ["q1", "q2", "q3", "q4", "q5"], ["q2", "q2"]):
        got = item_values(frame, names)
        np.testing.assert_array_equal(got, _expected(frame, names))
        assert got.flags.owndata and got.flags.writeable  # a fresh array the moments may work in
        assert got.flags.f_contiguous  # each column contiguous: the screening and the moments reduce over columns
        assert got.shape == (5, len(names))


def test_a_changed_array_leaves_the_frame_alone():
    frame = _frame()
    before = frame.copy()
    item_values(frame, ["q1", "q2"])[:] = -1.0
    pd.testing.assert_frame_equal(frame, before)


def test_missing_or_text_columns_give_none_and_the_readers_name_them():
    frame = _frame()
    assert item_values(frame, ["q1", "nowhere"]) is None
    assert item_values(frame, ["q1", "district"]) is None
    assert item_values(frame, []).shape == (5, 0)


def test_a_name_held_by_two_columns_is_not_taken_as_one():
    frame = pd.concat([_frame()[["q1", "q2"]], _frame()[["q1"]]], axis=1)
    assert item_values(frame, ["q1", "q2"]) is None
    np.testing.assert_array_equal(item_values(frame, ["q2"]), _expected(frame, ["q2"]))


def test_numeric_columns_of_numbers_is_the_same_array():
    frame = _frame()
    names = ("q3", "q1", "q4")
    np.testing.assert_array_equal(numeric_columns(frame, names, "survey.csv"), _expected(frame, names))


def test_a_pandas_without_its_column_accessor_gives_the_same_array(monkeypatch):
    """item_values reads pandas' stored column arrays where pandas has the accessor, and each column's public
    array otherwise: both give pandas' own conversion."""
    frame = _frame()
    names = ["q5", "q2", "q1", "q4", "q3"]
    monkeypatch.delattr(pd.DataFrame, "_get_column_array", raising=False)
    np.testing.assert_array_equal(item_values(frame, names), _expected(frame, names))
    assert item_values(frame, ["q1", "district"]) is None


def test_column_dtypes_are_pandas_own():
    """data.moments.column_dtypes (read from the frame's store of columns) against pandas' DataFrame.dtypes, on a
    frame of text, numbers, nullable integers, categories and objects, and on a frame without columns."""
    from cfa_tool.data.moments import column_dtypes

    frame = _frame().assign(kind=pd.Categorical(["a", "b", "a", "b", "a"]), note=pd.Series([[1], "", None, "x", 2.0],
                                                                                        dtype=object))
    assert column_dtypes(frame) == frame.dtypes.tolist()
    assert column_dtypes(frame.iloc[:, []]) == []
