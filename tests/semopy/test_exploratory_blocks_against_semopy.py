"""An exploratory block beside an ordinary factor has the fit semopy (an independent implementation) finds
for the same model in an equivalent identification (anchor items; Joreskog 1969), on Holzinger &
Swineford (1939), x1..x9, N = 301."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

ITEMS = tuple(f"x{i}" for i in range(1, 10))


def test_block_beside_an_ordinary_factor_matches_semopy(hs_data):
    text = "exploratory factors f1, f2 from x1..x6\nfactor speed: x7, x8, x9\n"
    ours = cfa_tool.fit(text, hs_data)
    assert ours.converged and ours.fit.df == 20  # 45 moments, 25 parameters (11 + 3 + 9 + 2)
    # the block in the equivalent anchor identification (Joreskog 1969): x1 marks f1 and has no loading on f2,
    # x4 the other way round, the factors correlate; m^2 = 4 constraints as the block's own
    model = semopy.Model("f1 =~ 1*x1 + 0*x4 + x2 + x3 + x5 + x6\nf2 =~ 1*x4 + 0*x1 + x2 + x3 + x5 + x6\n"
                         "speed =~ x7 + x8 + x9\nf1 ~~ f2\nf1 ~~ speed\nf2 ~~ speed\n")
    model.fit(hs_data[list(ITEMS)], solver="L-BFGS-B")
    stats = semopy.calc_stats(model)
    assert int(stats["DoF"].iloc[0]) == 20
    assert ours.fit.chi_square == pytest.approx(float(stats["chi2"].iloc[0]), rel=1e-5)
    block = ours.exploratory[0]
    assert block.other_factors == ("speed",)
    assert np.all(np.isfinite(block.other_correlations_se)) and np.all(np.abs(block.other_correlations) < 1)
    assert not any(set(m.variables) & {"f1", "f2"} for m in ours.modification_indices)
