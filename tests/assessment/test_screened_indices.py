"""Modification indices screened against the report's threshold (issue 20, twenty-eighth round): with many candidates
a default fit computes the exact index of only the candidates whose index can reach the threshold (an upper bound from
the smallest eigenvalue of the scaled information), and every other index when it is read.  What the JSON and the
report show, and every index read afterwards, are those of the fit that computes them all, to the last bit."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment import modification
from cfa_tool.assessment.modification import ScreenedIndices
from cfa_tool.numerics.linalg import scaled_factor

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def _fits(monkeypatch, *args, **kwargs):
    """(the fit screened whatever its size, the fit that computes every index at once)."""
    monkeypatch.setattr(modification, "SCREEN_FROM", 0)
    screened = cfa_tool.fit(*args, **kwargs)
    monkeypatch.setattr(modification, "SCREEN_FROM", float("inf"))
    every = cfa_tool.fit(*args, **kwargs)
    return screened, every


def _columns(found) -> list[np.ndarray]:
    return [found.rows, found.groups, found.index, found.expected_change, found.standardized_expected_change]


@pytest.mark.parametrize("options", [{}, {"mi_threshold": 10.0}, {"mi_top": 3}, {"group": "school"}])
def test_screened_indices_show_and_read_what_every_index_computed_at_once_gives(hs_data, monkeypatch, options):
    screened, every = _fits(monkeypatch, THREE_FACTORS, hs_data, **options)
    found = screened.modification_indices
    assert isinstance(found, ScreenedIndices) and not isinstance(every.modification_indices, ScreenedIndices)
    # some candidates were left out at the fit (their bound below the threshold), none that reaches it
    assert len(found.reaching) < len(every.modification_indices)
    assert found.reaching.count_reaching(screened.mi_threshold) >= 1
    assert repr(screened.to_dict()) == repr(every.to_dict())  # the JSON: the same rows, numbers to the last bit
    assert screened.reported_modification_indices() == every.reported_modification_indices()
    assert "every" not in vars(found)  # nothing so far has needed the indices below the threshold
    assert found.reported(0.0, None) == every.modification_indices  # a lower threshold reads every index
    for mine, theirs in zip(_columns(found), _columns(every.modification_indices)):
        assert np.array_equal(mine, theirs, equal_nan=True)
    assert found == every.modification_indices and len(found) == len(every.modification_indices)
    assert found.without(frozenset({"speed"})) == every.modification_indices.without(frozenset({"speed"}))
    assert found.without(frozenset({"speed"})).reported_dicts(3.84, None) == \
        every.modification_indices.without(frozenset({"speed"})).reported_dicts(3.84, None)


def test_a_screened_fit_pickles_and_loads_with_every_index(hs_data, monkeypatch):
    # a caller may pickle a result (worker processes, a cache on disk): the screened rows' closure cannot be pickled,
    # so the result pickles with every row computed, and loads with the same JSON and rows as the fit of every index
    import copy
    import pickle

    screened, every = _fits(monkeypatch, THREE_FACTORS, hs_data)
    loaded = pickle.loads(pickle.dumps(screened))
    assert repr(loaded.to_dict()) == repr(every.to_dict())
    assert loaded.modification_indices == every.modification_indices
    assert copy.deepcopy(screened).modification_indices == every.modification_indices


@pytest.mark.parametrize("options", [{}, {"mi_top": 2}])
def test_the_terminal_report_of_a_screened_fit_is_that_of_every_index(hs_data, monkeypatch, options):
    screened, every = _fits(monkeypatch, THREE_FACTORS, hs_data, **options)
    assert screened.summary(width=100) == every.summary(width=100)
    assert "every" not in vars(screened.modification_indices)  # the report read the rows that reach the threshold


def test_a_report_where_no_index_reaches_the_threshold_names_the_largest_of_every_index(hs_data, monkeypatch):
    screened, every = _fits(monkeypatch, THREE_FACTORS, hs_data, mi_threshold=1000.0)
    found = screened.modification_indices
    assert found.count_reaching(1000.0) == 0 and screened.to_dict()["modification_indices"] == []
    text = screened.summary(width=100)
    assert "none reaches 1000" in text and text == every.summary(width=100)


def test_the_eigenvalue_floor_lies_below_numpys_smallest_eigenvalue():
    rng = np.random.default_rng(28)
    for q, spread in ((5, 1.0), (40, 0.01), (120, 1e-4)):
        basis = np.linalg.qr(rng.normal(size=(q, q)))[0]
        eigenvalues = np.geomspace(spread, 1.0, q) * rng.uniform(0.5, 2.0)
        scales = rng.uniform(0.1, 10.0, size=q)  # an information matrix far from unit diagonal
        H = (basis * eigenvalues) @ basis.T * np.outer(scales, scales)
        H = 0.5 * (H + H.T)
        factor = scaled_factor(H)
        floor = modification._eigenvalue_floor(H, factor)
        smallest = np.linalg.eigvalsh(H * np.outer(factor.scales, factor.scales))[0]  # numpy's LAPACK
        assert 0.0 < floor <= smallest and floor > 0.4 * smallest


def test_no_candidate_that_reaches_the_threshold_is_left_out():
    """The screen's bound against the index computed by numpy's solve, (N/2) d^2 / (h_cc - b' H^-1 b) (Sorbom 1989),
    for random information matrices and candidates, some of which lie just above the threshold."""
    rng = np.random.default_rng(281)
    n, threshold = 500, 3.84
    for q in (6, 30, 90):
        A = rng.normal(size=(q, 3 * q))
        H = A @ A.T / (3 * q) + np.diag(rng.uniform(0.0, 0.2, q))
        factor = scaled_factor(H)
        floor = modification._eigenvalue_floor(H, factor)
        B = rng.normal(size=(400, q)) * rng.uniform(0.0, 0.3, size=(400, 1))
        forms = np.einsum("ij,ij->i", B, np.linalg.solve(H, B.T).T)
        h_cc = forms + rng.uniform(0.01, 2.0, 400)
        index = 0.5 * n * rng.uniform(0.0, 3.0, 400) ** 2 / h_cc
        index[:50] = threshold * (1.0 + rng.uniform(0.0, 1e-9, 50))  # at or just above the threshold
        d = np.sqrt(index * (h_cc - forms) / (0.5 * n))
        exact = 0.5 * n * d**2 / (h_cc - forms)
        kept = modification._screened(d, B, h_cc, factor.scales, n, floor, threshold)
        assert kept[exact >= threshold].all()
        assert 0 < kept.sum() < len(kept)  # and the bound leaves some out
