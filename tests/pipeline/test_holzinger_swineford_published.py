"""Holzinger & Swineford (1939) three-ability model against published results.

Reference values: the three-factor CFA of x1..x9 (N = 301) appears in many
textbooks and software manuals.  The values below are recalled from memory of
those widely published analyses (ML, divisor N, marker scaling) and rounded as
usually printed; semopy reproduces the chi-square, CFI, TLI and RMSEA
independently (tests/semopy/test_fit_against_semopy.py).
"""

from __future__ import annotations

import pytest

import cfa_tool
from tests.conftest import ONE_FACTOR


def test_three_factor_global_fit(hs_three):
    f = hs_three.fit
    assert hs_three.converged
    assert f.chi_square == pytest.approx(85.306, abs=5e-4)  # recalled from memory
    assert f.df == 24
    assert f.cfi == pytest.approx(0.931, abs=5e-4)
    assert f.tli == pytest.approx(0.896, abs=5e-4)
    assert f.rmsea == pytest.approx(0.092, abs=5e-4)
    assert f.rmsea_ci90[0] == pytest.approx(0.071, abs=5e-4)
    assert f.rmsea_ci90[1] == pytest.approx(0.114, abs=5e-4)
    assert f.srmr == pytest.approx(0.065, abs=5e-4)
    assert f.baseline_chi_square == pytest.approx(918.852, abs=5e-3)  # recalled from memory
    assert f.baseline_df == 36


def test_three_factor_information_criteria(hs_three):
    # log-likelihood -3737.745, AIC 7517.490, BIC 7595.339 with 21 free parameters
    # (recalled from memory of the same published analyses; means not counted).
    f = hs_three.fit
    assert f.log_likelihood == pytest.approx(-3737.745, abs=5e-3)
    assert f.aic == pytest.approx(7517.490, abs=5e-3)
    assert f.bic == pytest.approx(7595.339, abs=5e-3)
    assert f.n_free_parameters == 21


def test_three_factor_loadings(hs_three):
    # Unstandardized loadings of x2, x3 (visual), x5, x6 (textual), x8, x9 (speed):
    # .554, .729, 1.113, .926, 1.180, 1.082 (recalled from memory, 3 decimals).
    est = {r.variables: r.estimate for r in hs_three.estimates if r.kind == "loading"}
    expected = {("visual", "x2"): 0.554, ("visual", "x3"): 0.729, ("textual", "x5"): 1.113,
                ("textual", "x6"): 0.926, ("speed", "x8"): 1.180, ("speed", "x9"): 1.082}
    for key, value in expected.items():
        assert est[key] == pytest.approx(value, abs=1e-3), key


def test_largest_modification_indices(hs_three):
    # Best-known local misfit of this model: cross-loading of x9 on visual, MI 36.411,
    # and residual covariance x7-x8, MI 34.145 (recalled from memory).
    mis = {(m.kind, m.variables): m.index for m in hs_three.modification_indices}
    assert mis[("loading", ("visual", "x9"))] == pytest.approx(36.411, abs=5e-3)
    assert mis[("residual_covariance", ("x7", "x8"))] == pytest.approx(34.145, abs=5e-3)
    top = hs_three.modification_indices[0]
    assert top.variables == ("visual", "x9")


def test_one_factor_model(hs_data):
    result = cfa_tool.fit(ONE_FACTOR, hs_data)
    assert result.fit.chi_square == pytest.approx(312.264, abs=5e-3)  # recalled from memory
    assert result.fit.df == 27
