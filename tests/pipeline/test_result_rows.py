"""Rows of a fit's result built from arrays.  The modification indices a fit holds as columns (assessment.modification.ModificationIndices): every candidate is
kept, rows read one by one, the reported ones and the JSON rows agree with each other, largest first.  The values
themselves are checked against published ones (tests/pipeline/test_holzinger_swineford_published.py: Holzinger &
Swineford 1939, x9 on visual 36.411, x7-x8 34.145, recalled from memory) and against semopy elsewhere."""

from __future__ import annotations

import math

import numpy as np
import pytest

import cfa_tool
from cfa_tool.numerics.plain import clean
from tests.conftest import THREE_FACTORS


def test_rows_are_every_candidate_largest_first(hs_three):
    rows = list(hs_three.modification_indices)
    # 9 items x 3 factors - 9 loadings = 18 cross-loadings, 36 residual covariances (factor covariances are free)
    assert len(rows) == len(hs_three.modification_indices) == 54
    assert [r.index for r in rows] == sorted((r.index for r in rows), reverse=True)
    assert rows[0] == hs_three.modification_indices[0] == hs_three.modification_indices[-54]
    assert hs_three.modification_indices[:3] == tuple(rows[:3])
    assert hs_three.modification_indices == rows
    assert {r.kind for r in rows} == {"loading", "residual_covariance"}


def test_reported_rows_and_their_json_agree(hs_data):
    result = cfa_tool.fit(THREE_FACTORS, hs_data, mi_threshold=10, mi_top=4)
    every = list(result.modification_indices)
    reported = result.reported_modification_indices()
    assert list(reported) == [r for r in every if r.index >= 10][:4]
    assert len(reported) == 4
    assert result.to_dict()["modification_indices"] == [clean(r.to_dict()) for r in reported]
    assert all(math.isfinite(d["index"]) for d in reported.dicts())


def test_groups_name_their_rows(hs_data):
    result = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    rows = list(result.modification_indices)
    assert {r.group for r in rows} == {"Grant-White", "Pasteur"}
    assert len(rows) == 108
    one = cfa_tool.fit(THREE_FACTORS, hs_data[hs_data["school"] == "Pasteur"])
    # the pooled fit's score test of a group's entry is not the single-group one, but both find x9's cross-loading
    pasteur = next(r for r in rows if r.group == "Pasteur" and r.variables == ("visual", "x9"))
    assert pasteur.index > 3.84 and one.modification_indices[0].index > 3.84
    assert np.isfinite([r.standardized_expected_change for r in rows]).all()


def test_an_empty_set_reads_as_empty(hs_data):
    result = cfa_tool.fit(THREE_FACTORS, hs_data, modification_indices=False)
    assert len(result.modification_indices) == 0 and list(result.modification_indices) == []
    assert result.to_dict()["modification_indices"] == []
    with pytest.raises(IndexError):
        result.modification_indices[0]


def test_plain_arrays_are_the_cleaned_lists():
    """``plain_array`` (the residual matrices of the JSON) gives what cleaning the array's lists number by number gives:
    NaN and infinities as None, every other number as a Python float."""
    from cfa_tool.numerics.plain import plain_array

    M = np.array([[1.5, np.nan, -0.0], [np.inf, 2.0, -np.inf]])
    assert plain_array(M) == clean(M.tolist()) == [[1.5, None, -0.0], [None, 2.0, None]]
    assert plain_array(np.eye(2)) == [[1.0, 0.0], [0.0, 1.0]]
    assert all(type(v) is float for row in plain_array(M) for v in row if v is not None)  # not numpy floats
    assert plain_array(np.array([0.5, np.nan])) == [0.5, None]


def test_estimate_rows_json_is_each_field_cleaned(hs_data):
    """The JSON's estimate rows (built from one array of their numbers) hold each row's fields as cleaning them one
    by one gives, fixed parameters' missing standard errors as None, in the fields' order."""
    result = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    rows = result.to_dict()["estimates"]
    assert len(rows) == len(result.estimates)
    for row, r in zip(rows, result.estimates):
        assert row == clean({"kind": r.kind, "variables": list(r.variables), "group": r.group, "free": r.free,
                             "estimate": r.estimate, "se": r.se, "z": r.z, "p_value": r.p_value, "ci95": list(r.ci95),
                             "standardized": r.standardized, "standardized_factors_only": r.standardized_factors_only})
        assert list(row) == ["kind", "variables", "group", "free", "estimate", "se", "z", "p_value", "ci95",
                             "standardized", "standardized_factors_only"]
    assert any(row["se"] is None for row in rows) and any(not row["free"] for row in rows)


def _same(a, b) -> bool:
    """The same JSON value to the bit: types, keys in order, floats' bits (NaN equal to NaN)."""
    if type(a) is not type(b):
        return False
    if isinstance(a, dict):
        return list(a) == list(b) and all(_same(a[k], b[k]) for k in a)
    if isinstance(a, list):
        return len(a) == len(b) and all(_same(x, y) for x, y in zip(a, b))
    if isinstance(a, float):
        return (math.isnan(a) and math.isnan(b)) or (a == b and math.copysign(1, a) == math.copysign(1, b))
    return a == b


def test_columns_checked_at_once_are_each_value_cleaned():
    """The estimate rows' columns (pipeline.results._json_numbers) and the data block's category counts, pairs of items
    and answer ranges, each built at once when every value is plain, are what cleaning them value by value gives
    (numerics.plain.clean): Python floats, NaN and infinities as None, numpy numbers as Python ones."""
    from cfa_tool.pipeline.results import _answer_ranges, _category_counts, _json_numbers, _pair_rows

    rng = np.random.default_rng(3)
    odd = [float("nan"), float("inf"), -float("inf"), np.float64(2.5), np.float64("nan"), -0.0, 1e308]
    for k in range(300):
        values = [float(v) for v in rng.normal(size=12)]
        if k % 2:
            values[int(rng.integers(12))] = odd[k % len(odd)]
        assert _same(_json_numbers(list(values)), [clean(v) for v in values])
        names = tuple(f"item{j}" for j in range(6))
        ranges = tuple((values[2 * j], values[2 * j + 1]) for j in range(6))
        assert _same(_answer_ranges(names, ranges), {n: clean(list(r)) for n, r in zip(names, ranges)})
        counts = [int(c) for c in rng.integers(0, 90, 12)]
        if k % 4 == 1:
            counts[3] = np.int64(counts[3])
        categories = tuple(tuple(zip(values[2 * j: 2 * j + 2], counts[2 * j: 2 * j + 2])) for j in range(6))
        assert _same(_category_counts(names, categories),
                     clean({n: [{"value": v, "rows": c} for v, c in cats] for n, cats in zip(names, categories)}))
        pairs = tuple((names[j], names[j + 1], counts[j]) for j in range(5))
        assert _same(_pair_rows(pairs), clean([{"items": [a, b], "rows": c} for a, b, c in pairs]))
