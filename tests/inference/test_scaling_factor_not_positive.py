"""A robust test whose estimated scaling factor is not positive (re-check s17: a full-information fit of heavy-tailed
answers missing at random, n = 300, warned 'invalid value in sqrt' and reported NaN): the scaled statistic is not
computed, no numpy warning escapes, and every view says why, first.  The scaling factor c = tr(U Gamma) / df and the
scaled statistic T / c are Satorra & Bentler's (1994); the cases are constructed (a trace given directly, or the
full-information estimate of c replaced by a negative one)."""

from __future__ import annotations

import json
import warnings

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.inference.robust import robust_fit
from cfa_tool.method import FitTest
from cfa_tool.reporting.paragraph import methods_paragraph

MODEL = "factor comfort: q1, q2, q3, q4\n"


def test_a_scaling_factor_that_is_not_positive_scales_nothing():
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no 'invalid value in sqrt'
        bad = robust_fit(50.0, 8, -3.0, 900.0, 15, 20.0, 300, 1, FitTest.YUAN_BENTLER)
        baseline_bad = robust_fit(50.0, 8, 10.0, 900.0, 15, -20.0, 300, 1, FitTest.YUAN_BENTLER)
    assert np.isnan([bad.chi_square_scaled, bad.p_value_scaled, bad.cfi_robust, bad.tli_robust, bad.rmsea_robust,
                     *bad.rmsea_robust_ci90]).all()
    assert bad.not_computed.startswith("the Yuan-Bentler scaled test could not be computed: the model's scaling "
                                       "factor came out -0.375")
    # the model's factor positive, the baseline's not: the test stands (T / c = 50 / 1.25, Satorra & Bentler 1994),
    # the robust CFI and TLI, which need the baseline's, do not (never a CFI of 0 from a NaN noncentrality)
    assert baseline_bad.chi_square_scaled == pytest.approx(40.0)
    assert np.isnan([baseline_bad.cfi_robust, baseline_bad.tli_robust, baseline_bad.baseline_chi_square_scaled]).all()
    assert baseline_bad.not_computed.startswith("the robust CFI and TLI could not be computed")
    assert "not_computed" not in robust_fit(50.0, 8, 10.0, 900.0, 15, 20.0, 300, 1).to_dict()


def heavy_tailed_rows_with_gaps() -> pd.DataFrame:
    """300 rows of four heavy-tailed items (t with 4 df) on one factor, 10% of the cells missing."""
    rng = np.random.default_rng(7)
    factor = rng.normal(size=300)
    values = 0.7 * factor[:, None] + 0.6 * rng.standard_t(4, size=(300, 4))
    values[rng.random(values.shape) < 0.1] = np.nan
    return pd.DataFrame(values, columns=["q1", "q2", "q3", "q4"])


def test_a_full_information_fit_says_first_that_its_scaled_test_could_not_be_computed(monkeypatch):
    data = heavy_tailed_rows_with_gaps()
    import cfa_tool.inference.robust_missing as robust_missing

    real = robust_missing.robust_missing

    def negative(*args, **kwargs):  # the estimate of c replaced by a negative one: the constructed case
        cov, c, c_base = real(*args, **kwargs)
        return cov, -0.4, c_base

    monkeypatch.setattr(robust_missing, "robust_missing", negative)
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)
        result = cfa_tool.fit(MODEL, data, test="robust")
    assert result.robust.test is FitTest.YUAN_BENTLER and np.isnan(result.robust.chi_square_scaled)
    [problem] = [p for p in result.problems if p.kind is ProblemKind.SCALED_TEST_NOT_COMPUTED]
    assert "the model's scaling factor came out -0.4" in str(problem.explanation)
    assert all(np.isfinite(r.se) for r in result.estimates if r.free)  # the robust standard errors stand
    text = " ".join(str(result).split())
    assert "not computed its scaling factor is not positive" in text and " nan " not in text
    paragraph = " ".join(methods_paragraph(result).split())
    assert "scaled chi-square test could not be computed, as the estimate of its scaling factor was not positive" \
        in paragraph and "nan" not in paragraph
    saved = json.loads(json.dumps(result.to_dict(), default=str))
    assert saved["robust"]["not_computed"].startswith("the Yuan-Bentler scaled test could not be computed")


def test_a_scaling_factor_without_a_value_is_said_so_not_nan():
    # the words of a scaling factor that is not a finite number (numbers s21: 'came out nan' could be printed)
    from cfa_tool.inference.robust import _not_positive

    words = _not_positive(float("nan"), 1.2, FitTest.SATORRA_BENTLER)
    assert "the model's scaling factor had no finite value" in words and "nan" not in words
    assert "came out -0.5" in _not_positive(-0.5, 1.2, FitTest.SATORRA_BENTLER)
