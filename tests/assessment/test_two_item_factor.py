"""A factor with two items and no correlation with another factor is identified when two of its loadings and its
variance are fixed (at values other than 0) or held equal: then its one covariance gives the third (Bollen 1989,
ch. 7, the two-indicator rule).  Hostile trial 10, case 05: one loading and the variance fixed was refused as
unidentified.  Data: Holzinger & Swineford (1939), tests/datasets.

Check values by formula: with 'visual' and 'textual' uncorrelated, the implied covariance matrix is block-diagonal, so
the normal-theory discrepancy log|Sigma| + tr(S Sigma^-1) splits into the two blocks; both blocks are saturated
(three items on one factor; two items, one fixed loading and a fixed variance), so each block reproduces its sample
covariances (divided by N) exactly: loading(textual, x4) = s45 / (1 * 1), the residual variances s44 - s45^2 and
s55 - 1, and chi-square N (log|S11| + log|S22| - log|S|) on the 3 x 2 covariances between the blocks (Joreskog 1969)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import ModelError

MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5\nuncorrelated visual, textual\n"


def test_one_fixed_loading_and_the_fixed_variance_identify_a_two_item_factor(hs_data):
    result = cfa_tool.fit(MODEL + "fix loading(textual, x5) = 1\nfix variance(textual) = 1\n", hs_data)
    x = hs_data[["x1", "x2", "x3", "x4", "x5"]].to_numpy(float)
    n = len(x)
    s = np.cov(x, rowvar=False, bias=True)
    est = {(r.kind, r.variables): r.estimate for r in result.estimates}
    assert est[("loading", ("textual", "x4"))] == pytest.approx(s[3, 4], rel=1e-5)
    assert est[("residual_variance", ("x4",))] == pytest.approx(s[3, 3] - s[3, 4] ** 2, rel=1e-5)
    assert est[("residual_variance", ("x5",))] == pytest.approx(s[4, 4] - 1.0, rel=1e-5)
    chi_square = n * (np.linalg.slogdet(s[:3, :3])[1] + np.linalg.slogdet(s[3:, 3:])[1] - np.linalg.slogdet(s)[1])
    assert result.fit.df == 6
    assert result.fit.chi_square == pytest.approx(chi_square, rel=1e-5)


@pytest.mark.parametrize("statements", [
    "fix variance(textual) = 1\n",  # the variance alone: the two loadings' product is all the covariance gives
    "fix loading(textual, x5) = 0\nfix variance(textual) = 1\n",  # a loading at 0 leaves x4's loading free
])
def test_fewer_than_two_constraints_stay_refused(hs_data, statements):
    with pytest.raises(ModelError, match="two indicators and no correlation with another factor"):
        cfa_tool.fit(MODEL + statements, hs_data)
