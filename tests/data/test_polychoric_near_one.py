"""Two ordinal items that answer alike are refused with their polychoric correlation printed as the reports print
correlations: without the leading zero, and 'about 1' where the search for it stopped at its bound (.999,
data.polychoric.RHO_BOUND), beyond which the estimate may lie.  '0.9990' was printed: the bound to four decimals, a
precision the estimate never had (the s20 closing note)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError


def _answers(reverse: bool = False) -> pd.DataFrame:
    """300 invented rows of four items on four points (one factor, fixed seed) and a fifth that copies the first
    (reversed on the same scale with ``reverse``)."""
    rng = np.random.default_rng(1)
    f = rng.normal(size=300)
    cols = {f"q{k}": np.digitize(0.7 * f + 0.7 * rng.normal(size=300), [-1, 0, 1]) + 1 for k in range(1, 5)}
    cols["q5"] = 5 - cols["q1"] if reverse else cols["q1"].copy()
    return pd.DataFrame(cols)


@pytest.mark.parametrize("reverse, words", [(False, "correlate about 1 (the estimate stopped at the search's bound "
                                                    "of .999): they give (nearly) the same answers"),
                                            (True, "correlate about -1 (the estimate stopped at the search's bound "
                                                   "of -.999): they give (nearly) the same answers")])
def test_items_answering_alike_correlate_about_one(reverse, words):
    with pytest.raises(DataError) as raised:
        cfa_tool.fit("factor F: q1, q2, q3, q4, q5\n", _answers(reverse), ordinal="all")
    said = str(raised.value)
    assert words in said and "0.999" not in said


def test_a_near_duplicate_below_the_bound_prints_its_value_as_correlations_are_printed():
    from cfa_tool.data.polychoric import near_one

    assert near_one(0.99623) == ".996" and near_one(-0.99623) == "-.996"
    # on its side of the .995 a near duplicate is judged by (numerics.plain.decimals_beside), never at it
    assert near_one(0.99504) == ".99504" and near_one(0.9954) == ".9954"


def test_a_correlation_near_one_from_a_sparse_table_names_the_rare_categories_not_duplicates():
    # hostile trial s23 (02): two unrelated items answering 7 in 98% of rows, never departing in the same row
    # (Pearson r -.01, computed here), were refused as giving '(nearly) the same answers ... drop one of them'
    # because their polychoric correlation ran to -.995 on a table of a few rows
    from tests.commands.test_cli import DATA

    rows = pd.read_csv(DATA).dropna().reset_index(drop=True)  # the demo's complete rows
    x, y = np.full(len(rows), 7), np.full(len(rows), 7)
    x[:7] = [3, 4, 4, 5, 5, 6, 6]
    y[20:25] = [3, 5, 5, 6, 6]
    assert abs(np.corrcoef(x, y)[0, 1]) < 0.05
    with pytest.raises(DataError) as raised:
        cfa_tool.fit("factor punctuality: on_time, short_wait, accurate_info, easy_transfer, x\n"
                     "factor comfort: seat_available, clean, temperature, room_to_stand, y\n", rows.assign(x=x, y=y),
                     ordinal="all")
    said = str(raised.value)
    assert "the same answers" not in said and "drop one of them" not in said
    assert "items 'x' and 'y' correlate -.99" in said
    assert "yet categories of theirs are answered by very few rows: 'x' 3 (1 row)" in said
    assert "join such a category with its neighbour by a 'join answers' statement" in said
    base = _answers()
    # a true near duplicate keeps its words however rare a category of it is
    copy = base.assign(q5=base["q1"])
    copy.loc[0, ["q1", "q5"]] = 9  # one row of a category of its own in both
    with pytest.raises(DataError, match="they give \\(nearly\\) the same answers"):
        cfa_tool.fit("factor F: q1, q2, q3, q4, q5\n", copy, ordinal="all")
