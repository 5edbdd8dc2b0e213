"""ids_of_several_rows: the ids that more than one row holds, rows without an id (None, NaN, pandas' NA) left out;
the common case of ids that each name one row answered without building a series (a fixed price of every fit)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.data.row_ids import ids_of_several_rows


def test_unique_ids_and_missing_ids_give_nothing():
    assert ids_of_several_rows({2: "a", 3: "b", 4: None, 5: np.nan, 6: float("nan")}) == ()
    assert ids_of_several_rows({2: 1, 3: 2, 4: pd.NA, 5: pd.NA}) == ()
    assert ids_of_several_rows({}) == ()


def test_repeated_ids_are_named_with_their_rows_in_order():
    ids = {2: "p1", 3: "p2", 4: "p1", 5: None, 6: None, 7: "p2", 8: "p3"}
    assert ids_of_several_rows(ids) == (("p1", (2, 4)), ("p2", (3, 7)))
    with_na = {2: 7, 3: pd.NA, 4: 7, 5: pd.NA}  # NA cannot be compared: the series route decides, alike
    assert ids_of_several_rows(with_na) == (("7", (2, 4)),)


def test_rows_without_an_id_counted_in_words():
    from cfa_tool.data.row_ids import duplicate_note

    assert duplicate_note(pd.Series(["a", None, "c"]), "Id column") == ["Id column: 1 row has no id"]
    assert duplicate_note(pd.Series(["a", None, np.nan]), "Id column") == ["Id column: 2 rows have no id"]
