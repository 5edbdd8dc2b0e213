"""compare finds a boundary nesting under full-information ML as it does with complete rows (newuser-s23, finding 5).

Two engagement factors over four first-order factors of six items is the second-order model of two correlated
higher-order factors over two factors each with the four disturbance variances at 0 (each pair of first-order
factors merged into its higher-order factor).  On rows with gaps compare said for some patterns of gaps that 'the
second model cannot reproduce the first model's implied covariances (discrepancy 1.3)'.  Why: under full-information
ML the nesting check (the general model fitted to the restricted model's implied moments) could not start from the
general fit's estimates, which have another layout (the means), and started from start values that hold the
higher-order factors' covariance at 0; there two higher-order factors over two factors each are not identified
(Rindskopf & Rose 1988), the information is singular, and the optimiser took the scoring step's negative decrement for
convergence at the start.  The same start made compare's own fit of the second-order model 'not identified' for other
gaps.  Data: the trial's shape (24 items, 2,300 rows, 277 empty cells at random), simulated with invented values;
seeds 1 and 2 are gap patterns where each failure showed at a5239e97."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.language.parser import parse_model
from cfa_tool.pipeline.continuous import estimate, FitOptions
from cfa_tool.workflows.nesting import NESTING_TOLERANCE, implied_moments

SECOND = ("factor vigour: vig1..vig6\nfactor dedication: ded1..ded6\nfactor exhaustion: exh1..exh6\n"
          "factor cynicism: cyn1..cyn6\nfactor engagement: vigour, dedication\nfactor burnout: exhaustion, cynicism\n")
TWO = "factor engagement: vig1..vig6, ded1..ded6\nfactor burnout: exh1..exh6, cyn1..cyn6\n"


def _rows(seed: int, n: int = 2300, gaps: int = 277) -> pd.DataFrame:
    """Standardised items loading .6 to .8 on their first-order factors, which load .8 to .9 on two higher-order
    factors correlated -.6 (invented values), with ``gaps`` cells emptied at random."""
    rng = np.random.default_rng(seed)
    L = np.zeros((24, 4))
    for k in range(4):
        L[6 * k:6 * k + 6, k] = [0.8, 0.75, 0.7, 0.7, 0.65, 0.6]
    B = np.array([[0.9, 0], [0.85, 0], [0, 0.9], [0, 0.8]])
    phi = B @ np.array([[1, -0.6], [-0.6, 1]]) @ B.T
    phi[np.diag_indices(4)] = 1.0
    sigma = L @ phi @ L.T
    sigma[np.diag_indices(24)] = 1.0
    x = rng.multivariate_normal(np.zeros(24), sigma, size=n)
    x.ravel()[rng.choice(n * 24, size=gaps, replace=False)] = np.nan
    return pd.DataFrame(x, columns=[f"{f}{j + 1}" for f in ("vig", "ded", "exh", "cyn") for j in range(6)])


@pytest.mark.parametrize("seed", [1, 2])
def test_the_boundary_nesting_is_tested_with_gaps_as_with_complete_rows(seed):
    rows = _rows(seed)
    found = {}
    for missing in ("full-information", "listwise"):
        result = cfa_tool.compare([SECOND, TWO], rows, missing=missing)
        assert not result.not_nested, result.not_nested
        (test,) = result.tests
        second, two = result.results
        # 4 disturbance variances fixed at 0: 77 against 73 free parameters (24 intercepts included with gaps)
        assert test.df_difference == 4 == two.fit.df - second.fit.df
        assert test.chi_square_difference == pytest.approx(two.fit.chi_square - second.fit.chi_square, rel=1e-9)
        assert len(test.boundary) == 2 and all("merged into" in b for b in test.boundary)
        found[missing] = test
    assert found["full-information"].boundary == found["listwise"].boundary


def test_the_nesting_check_starts_from_the_general_fit_and_reaches_zero():
    """The check fits the general model in its fit's own layout (the means too), from its estimates."""
    from cfa_tool.workflows.nesting import general_at_implied

    rows = _rows(2)
    second, two = cfa_tool.fit(SECOND, rows), cfa_tool.fit(TWO, rows)
    spec = parse_model(SECOND)
    est = general_at_implied(two, spec, second)
    assert len(est.theta) == len(second.theta) == 77  # 53 and the 24 intercepts
    assert est.converged and est.value <= NESTING_TOLERANCE
    # from the start values built from the implied moments too (the higher-order covariance at 0, a singular point)
    plain = estimate(spec, implied_moments(two), FitOptions())
    assert plain.converged and plain.value <= NESTING_TOLERANCE and plain.iterations > 0


def test_models_that_differ_in_their_means_are_compared_under_full_information():
    """A one-group longitudinal model with both occasions' means at 0 is nested in the one with the later mean free
    (1 df); the check, which fitted no means, stopped the comparison on 'intercepts and factor means are estimated
    only in a fit with a mean structure'."""
    from tests.model.test_free_mean_with_equal_intercepts import LONGITUDINAL
    from tests.conftest import exact_cfa_rows

    lam = np.array([1.0, 0.8, 0.7])
    L = np.zeros((6, 2))
    L[:3, 0] = L[3:, 1] = lam
    data = exact_cfa_rows(L, np.array([[1.0, 0.5], [0.5, 1.2]]), np.diag(np.full(6, 0.5)), 600, 7,
                          names=["x1_1", "x2_1", "x3_1", "x1_2", "x2_2", "x3_2"])
    data += np.r_[3.0, 3.5, 2.8, 3.0 + 0.3 * lam[0], 3.5 + 0.3 * lam[1], 2.8 + 0.3 * lam[2]]  # the mean moves .3
    result = cfa_tool.compare([LONGITUDINAL, LONGITUDINAL + "free mean(f2)\n"], data, missing="full-information")
    (test,) = result.tests
    fixed, free = result.results
    assert test.df_difference == 1 == fixed.fit.df - free.fit.df
    assert test.chi_square_difference == pytest.approx(fixed.fit.chi_square - free.fit.chi_square, rel=1e-9)
    assert test.chi_square_difference > 10
