"""A comma-separated file whose numbers are quoted with decimal commas ("0,024"), as a spreadsheet of a decimal-comma
locale writes it when its list separator is a comma: refused naming the decimal commas, not as one mistyped cell
(hostile tester s28, 08: 'holds text ... correct the cell')."""
from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.data.moments import decimal_commas
from cfa_tool.errors import DataError


def test_quoted_decimal_commas_are_named(tmp_path):
    x = np.random.default_rng(1).multivariate_normal(np.zeros(4), 0.5 * np.eye(4) + 0.5, size=50)
    path = tmp_path / "d.csv"
    path.write_text("x1,x2,x3,x4\n" + "".join(",".join('"' + f"{v:.3f}".replace(".", ",") + '"' for v in r) + "\n"
                                             for r in x))
    first = f"{x[0, 0]:.3f}".replace(".", ",")
    with pytest.raises(DataError) as caught:
        cfa_tool.fit("factor f: x1, x2, x3, x4\n", path)
    said = str(caught.value)
    assert f"column 'x1' holds numbers written with a decimal comma ('{first}' in row 2" in said
    assert "semicolons between the fields" in said and "correct the cell" not in said


@pytest.mark.parametrize("cells, words", [
    (["0,024", "3", None, "-1,5"], "a decimal comma"),  # whole numbers and empty cells beside them
    (["1,234", "2,500"], "a comma (a decimal comma, or a comma between thousands)"),  # thousands, or decimals
    (["0,024", "1.5"], ""),  # a point elsewhere: not every fraction has a comma
    (["0,024", "abc"], ""),  # a word: said as text
    (["3", "4"], ""),
])
def test_which_columns_hold_decimal_commas(cells, words):
    assert decimal_commas(np.array(cells, dtype=object)) == words
