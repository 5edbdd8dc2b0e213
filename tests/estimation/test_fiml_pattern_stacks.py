"""Full-information ML held one matrix of the items by themselves for each pattern of missing answers (the patterns'
scatter, the inverses A_k, their products and the rank-two gathers K_k, about seven such stacks at once; since speed-s24
the search makes its K_k a chunk at a time, and since speed-s25 the case diagnostics read the low-rank form too:
the kurtosis of rows with gaps and the robust routes alone make such stacks): at 200
items and 2,000 rows with gaps everywhere each stack is 0.6 GB, and no limit covered them (large-s22).  A fit whose
stack would exceed the one limit of a matrix (numerics/sizes.py) is refused in one line before any is made (exit 3);
the scatter's rows' outer products are made a run of patterns at a time.  The limit is lowered here, so that a small
fit crosses it; the scatter is checked against its definition (the weighted sum of each pattern's centred rows'
outer products, Little & Rubin 2002, ch. 8's sufficient statistics of a pattern)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
import cfa_tool.data.patterns as patterns
import cfa_tool.estimation.fiml as fiml
from cfa_tool.cli import main
from cfa_tool.errors import EstimationError
from cfa_tool.numerics import sizes

MODEL = "factor F1: y1..y4\nfactor F2: y5..y8\n"


def _rows(n: int = 240, seed: int = 8) -> pd.DataFrame:
    """Eight items of two factors, 12% of answers missing at random; invented, a test helper."""
    rng = np.random.default_rng(seed)
    factors = rng.multivariate_normal(np.zeros(2), [[1.0, 0.3], [0.3, 1.0]], size=n)
    X = 0.7 * factors[:, (np.arange(8) >= 4).astype(int)] + 0.6 * rng.normal(size=(n, 8))
    X[rng.random((n, 8)) < 0.12] = np.nan
    return pd.DataFrame(X, columns=[f"y{j + 1}" for j in range(8)])


def _pattern_count(frame: pd.DataFrame) -> int:
    return len(np.unique(frame.notna().to_numpy(), axis=0))


def test_a_fit_whose_patterns_stack_is_too_large_is_refused_before_the_scatter(monkeypatch, tmp_path):
    frame = _rows()
    P = _pattern_count(frame)
    assert P > 40
    made = []
    original = patterns._scatter
    monkeypatch.setattr(patterns, "_scatter", lambda *args: made.append(1) or original(*args))
    monkeypatch.setattr(sizes, "MATRIX_BYTES", P * 8 * 8 * 8 - 1)  # one 8 x 8 matrix a pattern: one byte short
    with pytest.raises(EstimationError, match=rf"the {P:,} patterns of these rows make each stack {P:,} matrices of "
                                              r"8 x 8, .* GiB.*fit the items in smaller sets, or keep only the "
                                              r"complete rows \(missing='listwise'\)"):
        cfa_tool.fit(MODEL, frame, missing="full-information")
    assert made == []
    (tmp_path / "m.cfa").write_text(MODEL)
    frame.to_csv(tmp_path / "d.csv", index=False)
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "d.csv")]) == 3
    assert sorted(p.name for p in tmp_path.iterdir()) == ["d.csv", "m.cfa"]


def test_the_searchs_rank_two_gathers_hold_no_stack_and_the_items_stack_is_checked_before_the_search(monkeypatch):
    # speed-s24: the likelihood's K_k = V' A_k V (12 x 12: p + 2m for two factors) are made a chunk at a time, so a
    # limit below their whole stack fits the model; the stacks a fit still makes whole are of the 8 items by
    # themselves (case diagnostics, robust routes): refused when the likelihood is made, before any evaluation
    frame = _rows()
    P = _pattern_count(frame)
    monkeypatch.setattr(sizes, "MATRIX_BYTES", P * 12 * 12 * 8 - 1)
    assert cfa_tool.fit(MODEL, frame, missing="full-information").converged
    evaluated = []
    original = fiml.MissingDataLikelihood._pieces
    monkeypatch.setattr(fiml.MissingDataLikelihood, "_pieces", lambda *args: evaluated.append(1) or original(*args))
    monkeypatch.setattr(sizes, "MATRIX_BYTES", P * 8 * 8 * 8 - 1)
    with pytest.raises(EstimationError, match=rf"{P:,} matrices of 8 x 8"):
        cfa_tool.fit(MODEL, frame, missing="full-information")
    assert evaluated == []
    monkeypatch.setattr(sizes, "MATRIX_BYTES", P * 8 * 8 * 8)  # at the limit: fitted
    assert cfa_tool.fit(MODEL, frame, missing="full-information").converged


def test_the_helpers_joint_stack_is_checked_too(monkeypatch):
    frame = _rows()
    frame["age"] = np.random.default_rng(2).normal(size=len(frame))
    P = _pattern_count(frame)
    monkeypatch.setattr(sizes, "MATRIX_BYTES", P * 9 * 9 * 8 - 1)  # the rows of 8 items and one helper
    with pytest.raises(EstimationError, match=rf"{P:,} matrices of 9 x 9"):
        cfa_tool.fit(MODEL, frame, missing="full-information", missing_helpers=["age"])


@pytest.mark.parametrize("outer_bytes", [1, 8 * 8 * 8 * 5, 1 << 26], ids=["a-row-at-a-time", "five-rows", "at-once"])
@pytest.mark.parametrize("weighted", [False, True])
def test_the_scatter_a_run_of_patterns_at_a_time_is_its_definition(monkeypatch, outer_bytes, weighted):
    frame = _rows(300, 4)
    frame.iloc[:120, :] = frame.iloc[:120, :].fillna(0.5)  # one pattern of many rows: its scatter one product
    rows = frame.to_numpy()
    rng = np.random.default_rng(1)
    w = rng.uniform(0.5, 2.0, len(rows)) if weighted else None
    monkeypatch.setattr(patterns, "OUTER_BYTES", outer_bytes)
    data = patterns.pattern_data(rows, w)
    weights = np.ones(len(rows)) if w is None else w
    for k in range(len(data.counts)):
        mine = data.index == k
        x = rows[mine][:, data.observed[k]]
        c = x - np.average(x, axis=0, weights=weights[mine])
        expected = (c * weights[mine, None]).T @ c / weights[mine].sum()
        found = data.scatter[k][np.ix_(data.observed[k], data.observed[k])]
        np.testing.assert_allclose(found, expected, rtol=1e-12, atol=1e-14)
        assert not data.scatter[k][~data.observed[k]].any()
    assert data.counts.max() >= 120
