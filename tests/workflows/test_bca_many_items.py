"""BCa's influence values of a complete-data fit without a matrix of the moments by the moments (robust-s20, the
neighbour of hostile tester s19's case 11: the normal-theory weight W, 20,100 x 20,100 at 200 items, was formed)."""

from __future__ import annotations

import tracemalloc

import numpy as np

from cfa_tool.language.parser import parse_model


def test_the_influence_values_of_60_items_hold_no_matrix_of_the_moments():
    # 60 items: 1,830 moments, one 1,830 x 1,830 matrix 26.8 MB; the rows' moment contributions (300 x 1,830) are
    # 4.4 MB, the model's derivatives (126 x 60 x 60) 3.6 MB
    from cfa_tool.pipeline.continuous import moments_from_rows, replicate_fit
    from cfa_tool.workflows.bootstrap import influence_values

    rng = np.random.default_rng(5)
    p, n = 60, 300
    rows = 0.6 * rng.normal(size=(n, 4))[:, np.arange(p) * 4 // p] + 0.8 * rng.normal(size=(n, p))
    names = tuple(f"q{j + 1}" for j in range(p))
    spec = parse_model("".join(f"factor F{k + 1}: q{15 * k + 1}..q{15 * k + 15}\n" for k in range(4)))
    full = replicate_fit(spec, moments_from_rows(rows, names))
    tracemalloc.start()
    try:
        influence, _ = influence_values(spec, rows, names, full.theta)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert influence.shape == (n, len(full.values))
    assert np.all(np.isfinite(influence))
    moments = p * (p + 1) // 2
    assert peak < moments * moments * 8
