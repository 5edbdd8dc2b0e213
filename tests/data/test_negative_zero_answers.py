"""A cell written '-0' or '-0.0' is the answer 0 (IEEE 754 keeps a sign on zero, which '{:g}' prints as "-0"): the
categories of an ordinal fit and the answers per category of check name it 0 (re-check s17, neighbour of finding 1)."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.data.moments import item_values, numeric_columns


def _answers() -> pd.DataFrame:
    rng = np.random.default_rng(3)
    eta = rng.normal(size=(300, 1))
    x = 0.7 * eta + 0.7 * rng.normal(size=(300, 4))
    codes = np.digitize(x, [-0.8, 0.0, 0.8]) - 1.0  # -1, 0, 1, 2
    codes[codes == 0] = -0.0  # as a file of '-0' cells is read
    return pd.DataFrame(codes, columns=["q1", "q2", "q3", "q4"])


def _signs_of_zero(values) -> set[float]:
    return {math.copysign(1.0, v) for v in values if v == 0}


def test_item_values_hold_no_negative_zero():
    frame = _answers()
    assert _signs_of_zero(frame.to_numpy().ravel()) == {-1.0}  # the data do hold it
    assert _signs_of_zero(item_values(frame, ["q1", "q2"]).ravel()) == {1.0}
    text = frame.astype(object)  # an object column read cell by cell
    assert _signs_of_zero(numeric_columns(text, ("q1",), "frame").ravel()) == {1.0}


def test_an_ordinal_fit_and_check_name_the_answer_0():
    frame = _answers()
    result = cfa_tool.fit("factor f: q1, q2, q3, q4\n", frame, ordinal="all")
    codes = [v for item in result.data.categories for v, _ in item]
    assert 0.0 in codes and _signs_of_zero(codes) == {1.0}
    assert "-0" not in " ".join(f"{v:g}" for v in codes)
