"""Fewer rows than ordinal items: the refusal read "d.csv: 9 with an answer rows for 10 items; more rows are needed"
and did not name the row filter that left so few (new-user trial s26).  Now it names the rows (and the filter that
kept them), how many answered, and what is needed: more rows than items, as a correlation matrix of p items needs
at least p + 1 rows to be of full rank (a handbook fact: the sample covariance matrix of n rows has rank at most
n - 1)."""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError

ITEMS = [f"q{i}" for i in range(1, 11)]
MODEL = "factor f: q1..q10\nordinal q1..q10\n"


def _clinic() -> pd.DataFrame:
    rng = np.random.default_rng(6)
    e = rng.standard_normal(200)
    frame = pd.DataFrame({x: np.digitize(.7 * e + .7 * rng.standard_normal(200), [-.6, .4, 1.3]).astype(float)
                          for x in ITEMS})
    frame.insert(0, "clinic", ["C1" if r < 9 else "C2" for r in range(200)])
    frame.loc[5, "q1"] = np.nan
    return frame


def test_a_row_filter_that_keeps_too_few_rows_is_named(tmp_path):
    path = tmp_path / "d.csv"
    _clinic().to_csv(path, index=False)
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, str(path), keep=["clinic = C1"])
    said = str(refused.value)
    assert "d.csv: the 9 rows kept by " in said and "clinic = C1" in said
    assert "too few for 10 items" in said and "(11 or more)" in said and "wider row filter" in said
    assert "with an answer rows" not in said


def test_listwise_says_how_many_answered_every_item(tmp_path):
    path = tmp_path / "d.csv"
    _clinic().to_csv(path, index=False)
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, str(path), keep=["clinic = C1"], missing="listwise")
    said = str(refused.value)
    assert "of the 9 rows kept by " in said and ", 8 answered every item, which are too few for 10 items" in said


def test_continuous_rows_too_few_name_the_filter_by_the_same_words():
    # the same wording (data.kept_rows.too_few_rows) for items analysed as continuous: complete rows (listwise) and
    # rows with any answer (full-information ML); and explore, whose moments are read by the same rule
    import cfa_tool
    from cfa_tool.errors import DataError

    rng = np.random.default_rng(4)
    frame = pd.DataFrame(rng.normal(size=(40, 4)), columns=["a", "b", "c", "d"])
    frame["site"] = ["x"] * 4 + ["y"] * 36
    model = "factor f: a, b, c, d\n"
    for missing in ("listwise", "full-information"):
        with pytest.raises(DataError) as refused:
            cfa_tool.fit(model, frame, keep=["site = x"], missing=missing)
        said = str(refused.value)
        assert "the 4 rows kept by " in said and "site" in said and "are too few for 4 variables" in said, said
        assert "(5 or more" in said and "wider row filter" in said
    with pytest.raises(DataError, match=r"the 4 rows kept by .*site.* are too few for 4 variables"):
        cfa_tool.explore(frame, items=["a", "b", "c", "d"], keep=["site = x"])
