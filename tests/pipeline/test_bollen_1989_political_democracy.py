"""Bollen's (1989) political-democracy data: the measurement model of industrialization in 1960 and
democracy in 1960 and 1965 (75 countries), with the six residual covariances between the same
indicator measured twice and between indicators from one source.

Reference values: the chi-square, its p-value and the unstandardized loadings with their standard
errors are recalled from memory of the widely published analyses of these data (Bollen 1989, ch. 8,
and the many software manuals that reproduce it; ML, divisor N, marker scaling).  The published model
regresses dem60 on ind60 and dem65 on both; with three factors that structural part is saturated, so
the confirmatory model with three correlated factors is equivalent to it and has the same fit.
"""

from __future__ import annotations

import pytest

import cfa_tool
from tests.conftest import political_democracy

MODEL = """
name "Industrialization and political democracy"
factor ind60: x1, x2, x3
factor dem60: y1, y2, y3, y4
factor dem65: y5, y6, y7, y8
covary y1, y5
covary y2, y4
covary y2, y6
covary y3, y7
covary y4, y8
covary y6, y8
"""


@pytest.fixture(scope="module")
def democracy():
    return cfa_tool.fit(MODEL, political_democracy())


def test_global_fit(democracy):
    f = democracy.fit
    assert democracy.n_obs == 75
    assert f.chi_square == pytest.approx(38.125, abs=5e-4)  # recalled from memory
    assert f.df == 35
    assert f.p_value == pytest.approx(0.329, abs=5e-4)  # recalled from memory


def test_loadings_and_standard_errors(democracy):
    # (estimate, SE), recalled from memory, three decimals
    expected = {("ind60", "x2"): (2.180, 0.139), ("ind60", "x3"): (1.819, 0.152),
                ("dem60", "y2"): (1.257, 0.182), ("dem60", "y3"): (1.058, 0.151), ("dem60", "y4"): (1.265, 0.145),
                ("dem65", "y6"): (1.186, 0.169), ("dem65", "y7"): (1.280, 0.160), ("dem65", "y8"): (1.266, 0.158)}
    found = {r.variables: (r.estimate, r.se) for r in democracy.estimates if r.kind == "loading"}
    for key, (estimate, se) in expected.items():
        assert found[key][0] == pytest.approx(estimate, abs=1e-3), key
        assert found[key][1] == pytest.approx(se, abs=1e-3), key
