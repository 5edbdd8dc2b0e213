"""One rule for 'this value lies where a missing-value code lies' (data.missing_codes.beyond_as_a_code): the
screening of item columns (data.odd_values) and the codes given with --missing-codes that other columns keep
(data.missing_codes.kept_codes_note) judged 9 beside answers of 1 to 5 apart (s20: the screening named it a code, at
least the range of the other answers beyond them, while the kept-codes note took it for the column's own value,
needing more than that range).  Check values: the module's rule as its docstring states it, on invented columns."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.data.missing_codes import apply_missing_codes, beyond_as_a_code
from cfa_tool.data.odd_values import OddKind, odd_values


def _column(rng, code: float) -> np.ndarray:
    values = rng.integers(1, 6, 200).astype(float)  # answers 1 to 5
    values[::20] = code  # 10 cells of the code
    return values


def test_nine_beside_one_to_five_is_a_code_in_an_item_and_in_a_column_that_keeps_it():
    rng = np.random.default_rng(7)
    frame = pd.DataFrame({"q1": _column(rng, 9.0), "site": _column(rng, 9.0)})
    [found] = odd_values(frame, ["q1"])
    assert found.kind is OddKind.MISSING_CODE and found.values == (9.0,)  # the screening of an item
    _, notes, _ = apply_missing_codes(frame, (9.0,), "f.csv", items=["q1"])
    kept = " ".join(str(n) for n in notes if "other columns keep" in str(n))
    assert "'site' holds 9 in 10 rows" in kept and "site != 9" in kept  # the same verdict: rows to leave out


def test_the_rule_as_stated():
    assert beyond_as_a_code(9, 1, 5) and beyond_as_a_code(-99, 1, 5) and beyond_as_a_code(11, 7, 9)
    assert not beyond_as_a_code(8, 1, 5) and not beyond_as_a_code(10, 7, 9) and not beyond_as_a_code(3, 1, 5)
    assert beyond_as_a_code(9, 7, 7) and not beyond_as_a_code(7.5, 7, 7)  # others all one value: at least 1 beyond
