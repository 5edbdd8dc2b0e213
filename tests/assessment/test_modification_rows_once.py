"""A default fit builds its modification indices once (issue 20, sixteenth round): no empty record for a fit that
has not yet computed them, and the rows its JSON reports read from the computed columns, not copied into a record
of their own.  What the rows are is the rule written out: the rows of at least the threshold, in the computed order,
at most the ``top`` first."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment import modification
from cfa_tool.assessment.modification import ModificationIndices

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_a_default_fit_and_its_json_build_the_indices_once(hs_data, monkeypatch):
    built = []
    original = ModificationIndices.__init__

    def counted(self, *args, **kwargs):
        built.append(len(args) + len(kwargs))
        original(self, *args, **kwargs)

    monkeypatch.setattr(ModificationIndices, "__init__", counted)
    out = cfa_tool.fit(THREE_FACTORS, hs_data).to_dict()
    assert len(built) == 1
    assert out["modification_indices"] and all(row["index"] >= 3.84 for row in out["modification_indices"])


def _reported_written_out(found: ModificationIndices, threshold: float, top: int | None) -> ModificationIndices:
    """The rule as it was: the rows of at least the threshold, then the first ``top`` of them."""
    shown = found.where(found.index >= threshold)
    return shown.where(slice(None, top)) if top is not None else shown


def _same(a, b) -> bool:
    return len(a) == len(b) and all(
        x.kind == y.kind and x.variables == y.variables and x.group == y.group
        and np.array_equal([x.index, x.expected_change, x.standardized_expected_change],
                           [y.index, y.expected_change, y.standardized_expected_change], equal_nan=True)
        for x, y in zip(a, b))


def test_reported_rows_are_those_of_the_rule_written_out():
    rng = np.random.default_rng(20)
    candidates = tuple(("covariance", ("a", f"b{k}"), "theta", k, 0) for k in range(8))
    for _ in range(1500):
        n = int(rng.integers(0, 8))
        index = rng.choice([0.5, 3.84, 4.0, 10.0, np.nan, np.inf, -0.0], size=n)
        if rng.random() < 0.7:  # largest first, NaN last, as collected_indices orders them; else in any order
            index = index[np.argsort(-index, kind="stable")]
        found = ModificationIndices(candidates[:n], ("A", "B"), np.arange(n), rng.integers(0, 2, size=n), index,
                                    rng.normal(size=n), np.where(rng.random(n) < 0.2, np.nan, rng.normal(size=n)))
        for threshold in (0.0, 3.84, 4.0, 11.0):
            for top in (None, 0, 1, 3, 10):
                expected = _reported_written_out(found, threshold, top)
                assert _same(found.reported(threshold, top), expected)
                assert repr(found.reported_dicts(threshold, top)) == repr(expected.dicts())


def test_a_fit_without_score_tests_shares_the_empty_indices(hs_data):
    lean = cfa_tool.fit(THREE_FACTORS, hs_data, modification_indices=False)
    assert lean.modification_indices is modification.NO_INDICES and len(lean.modification_indices) == 0
    assert lean.to_dict()["modification_indices"] == []
    assert lean.reported_modification_indices() is modification.NO_INDICES


@pytest.mark.parametrize("top", [None, 3])
def test_the_json_rows_are_the_reported_ones(hs_three, top):
    from dataclasses import replace

    result = replace(hs_three, mi_top=top)
    assert result.to_dict()["modification_indices"] == result.reported_modification_indices().dicts()
