"""The case rows' JSON built at once (assessment.diagnostics.case_dicts) is what cleaning each row's own dictionary
gives (numerics.plain.clean of CaseDiagnostic.to_dict): the same keys in the same order and the same values, NaN and
infinities as None, numpy numbers as Python ones, for both ways of naming rows and rows with and without gaps."""

import math

import numpy as np
import pytest

from cfa_tool.assessment.diagnostics import CaseDiagnostic, Cases, case_dicts
from cfa_tool.data.kept_rows import RowNaming
from cfa_tool.numerics.plain import clean


def _cases(rng):
    odd = [float("nan"), float("inf"), -float("inf"), 0.0, -0.0, np.float64(2.5), np.float32(1.5)]
    out = []
    for k in range(300):
        values = [float(v) for v in rng.normal(size=4)]
        for j in range(4):
            if rng.random() < 0.2:
                values[j] = odd[rng.integers(len(odd))]
        row = int(rng.integers(1, 500)) if rng.random() < 0.8 else np.int64(rng.integers(1, 500))
        identifier = None if rng.random() < 0.5 else (f"r{k}" if rng.random() < 0.8 else np.str_(f"s{k}"))
        gaps = rng.random() < 0.4
        answered = (int(rng.integers(1, 9)) if rng.random() < 0.8 else np.int64(3)) if gaps else None
        out.append(CaseDiagnostic(row, values[0], values[1], values[2], identifier, answered,
                                  values[3] if gaps else None))
    return out


def _columns(rows) -> Cases:
    """The rows held as columns, as a fit holds them (assessment.diagnostics.Cases)."""
    return Cases(*(tuple(getattr(c, name) for c in rows) for name in
                   ("row", "mahalanobis", "p_value", "chi_square_share", "id", "answered", "model_mahalanobis")))


def _same(a, b):
    if type(a) is not type(b):
        return False
    if isinstance(a, dict):
        return list(a) == list(b) and all(_same(a[k], b[k]) for k in a)
    if isinstance(a, float):
        return (math.isnan(a) and math.isnan(b)) or (a == b and math.copysign(1, a) == math.copysign(1, b))
    return a == b


@pytest.mark.parametrize("naming", list(RowNaming))
def test_case_rows_as_json_are_those_of_each_row_cleaned(naming):
    cases = _cases(np.random.default_rng(5))
    held = _columns(cases)
    assert list(held) == cases  # each row read back from the columns is the row
    built, expected = case_dicts(held, naming), [clean(c.to_dict(naming)) for c in cases]
    assert len(built) == len(expected) == 300
    assert all(_same(a, b) for a, b in zip(built, expected))
    assert any(None in d.values() for d in built)  # the draws hold NaN and infinities
    assert all(type(d["row"]) is int for d in built)  # numpy integers turned into Python ones


def test_rows_checked_at_once_are_each_row_cleaned():
    """Sets of ten rows without ids or gaps, as a complete-data fit holds them, are built at once when every number is
    a finite Python float and every row a Python int: what cleaning each row gives, also when one odd value (NaN, an
    infinity, a numpy number) sends the set back to the row-by-row route."""
    rng = np.random.default_rng(8)
    odd = [float("nan"), float("inf"), -float("inf"), np.float64(2.5), 1e308]
    at_once = 0
    for k in range(400):
        rows = [CaseDiagnostic(int(rng.integers(1, 500)), *(float(v) for v in rng.normal(size=3))) for _ in range(10)]
        if k % 3 == 0:  # one odd value in one row's column
            j, column = int(rng.integers(10)), ("mahalanobis", "p_value", "chi_square_share")[k % 9 // 3]
            rows[j] = CaseDiagnostic(**{**vars(rows[j]), column: odd[k % len(odd)]})
        elif k % 3 == 1 and k % 5 == 0:  # a row numbered by a numpy integer
            rows[0] = CaseDiagnostic(**{**vars(rows[0]), "row": np.int64(7)})
        else:
            at_once += 1
        for naming in RowNaming:
            built, expected = case_dicts(_columns(rows), naming), [clean(c.to_dict(naming)) for c in rows]
            assert len(built) == 10 and all(_same(a, b) for a, b in zip(built, expected))
    assert 200 < at_once < 400  # both routes were taken
