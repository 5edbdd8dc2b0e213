"""compare's methods paragraph describes exactly the models compared (each one's factors and departures from simple
structure), the estimator and rows, the difference test used with its authors (Steiger, Shapiro & Browne 1985;
Satorra & Bentler 2001, 2010; Satorra 2000 and Asparouhov & Muthén 2006 for ordinal items), its figures, and a
restricted model on the boundary (Self & Liang 1987; Savalei & Kolenikov 2008), for complete rows, full-information and ordinal comparisons."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from cfa_tool.method import ADJUSTED_TEST
from cfa_tool.reporting.paragraph import comparison_paragraph
from cfa_tool.reporting.workflow_tables import comparison_report
from cfa_tool.workflows.compare import compare
from tests.conftest import simulate_cfa

TWO = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\n"
ONE = "factor g: y1, y2, y3, y4, y5, y6\n"
WITH_RESIDUAL = TWO + "covary y1, y2\n"


@pytest.fixture(scope="module")
def data() -> pd.DataFrame:
    # invented population: two factors correlating .6, loadings .7, residual variances .51
    L = np.zeros((6, 2))
    L[:3, 0] = L[3:, 1] = 0.7
    return simulate_cfa(L, np.array([[1.0, 0.6], [0.6, 1.0]]), np.diag(np.full(6, 0.51)), 500, 7)


def test_the_paragraph_describes_each_model_and_the_likelihood_ratio_test(data):
    comparison = compare([ONE, TWO, WITH_RESIDUAL], data)
    text = comparison_paragraph(comparison)
    assert comparison_report(comparison).paragraph == text
    assert text.startswith("Three models of the same six indicators were compared on the same rows (N = 500")
    assert "Model 1 (<model text>) had six indicators of one factor (g)." in text
    assert "had six indicators of two correlated factors (a and b)" in text
    # Model 3 said by what differs from Model 2, the earlier model it shares most with
    assert ("Model 3 (<model text> (3)) was specified as Model 2 except as follows. Model 3 also included one residual "
            "covariance (y1 with y2).") in text
    assert "by maximum likelihood" in text
    assert "the likelihood-ratio chi-square difference test (Steiger, Shapiro & Browne, 1985)" in text
    one_two = next(t for t in comparison.tests if t.restricted == comparison.names[0] and t.general == comparison.names[1])
    # the difference and its p-value, against scipy's chi-square distribution
    difference = comparison.results[0].fit.chi_square - comparison.results[1].fit.chi_square
    assert one_two.chi_square_difference == pytest.approx(difference, rel=1e-12)
    assert one_two.p_value == pytest.approx(stats.chi2.sf(difference, 1), rel=1e-8)
    assert f"Model 1 against Model 2: \u03c7\u00b2(1) = {difference:.2f}" in text
    # merging a and b puts their correlation at 1, which the two-factor fit does not hold at or below 1: said, with
    # the usual chi-square as the reading (Savalei & Kolenikov 2008), no mixture
    assert ("Model 1 has factors a and b merged into g (their correlation fixed at 1), on the boundary of the "
            "parameter space of Model 2") in text
    assert "the difference follows the usual chi-square distribution (Savalei & Kolenikov, 2008)." in text
    assert "50:50 mixture" not in text and np.isnan(one_two.boundary_p_value)
    # adding a residual covariance is an interior change: no boundary words for Model 2 against Model 3
    sentence = next(s for s in text.split(". ") if s.startswith("Model 2 against Model 3"))
    assert "boundary" not in sentence


def test_robust_complete_rows_name_the_strictly_positive_version(data):
    text = comparison_paragraph(compare([TWO + "equal loading(a, y2), loading(a, y3)\n", TWO], data,
                                        test="satorra-bentler"))
    assert "with the Satorra-Bentler scaled test and robust standard errors" in text
    assert ("the strictly positive scaled chi-square difference test (Satorra & Bentler, 2010) of the Satorra-Bentler "
            "statistics") in text
    assert "boundary" not in text


def test_full_information_comparisons_say_so(data):
    rng = np.random.default_rng(11)
    gappy = data.mask(rng.random(data.shape) < 0.05)
    text = comparison_paragraph(compare([ONE, TWO], gappy, test="robust"))
    assert "every answer of every row was used, including rows with missing answers" in text
    assert "full-information maximum likelihood with the Yuan-Bentler scaled test" in text
    assert "missing at random (Little & Rubin, 2002)" in text
    assert ("compared by the strictly positive scaled chi-square difference test (Satorra & Bentler, 2010) of the "
            "Yuan-Bentler statistics" in text)
    # the one-factor model misfits grossly (chi-square 132 on 9 df): its Yuan-Bentler factor from the observed
    # information (0.86) against the two-factor model's (1.02) makes the 2001 correction negative, and the
    # paragraph says why that version is missing (the reason for the 2010 version)
    assert ("The scaled chi-square difference test (Satorra & Bentler, 2001) was not computed: its scaling correction "
            "is not positive") in text
    assert "--incomplete-rows" not in text


def test_ordinal_comparisons_name_the_adjusted_difference(data):
    cut = data.apply(lambda column: pd.cut(column, [-np.inf, -0.5, 0.5, np.inf], labels=False) + 1)
    text = comparison_paragraph(compare([ONE, TWO], cut, ordinal="all"))
    assert "diagonally weighted least squares on polychoric correlations of the ordinal items" in text
    assert f"the {ADJUSTED_TEST} chi-square difference test (Satorra, 2000; Asparouhov & Muthén, 2006)" in text
    assert "reproduces the restricted model's implied thresholds and correlations" in text
    assert f"Fit (the {ADJUSTED_TEST} statistic and robust indices)" in text
    # changes in the adjusted indices are not comparable across models (as invariance refuses to judge steps by them):
    # no figures and no guide sentence, the reason in their place, in the paragraph, the report and the JSON
    assert "\u0394CFI" not in text and "Cheung & Rensvold" not in text
    assert "Changes in CFI and RMSEA were not used" in text


def test_ordinal_comparisons_leave_out_the_changes_in_fit_indices(data):
    from cfa_tool.reporting.reports import report_of

    cut = data.apply(lambda column: pd.cut(column, [-np.inf, -0.5, 0.5, np.inf], labels=False) + 1)
    comparison = compare([ONE, TWO], cut, ordinal="all")
    report = report_of(comparison)
    tests = [t for t in report.tables if t.key.startswith("difference_tests")]
    assert tests and all("\u0394CFI" not in t.columns for t in tests)
    assert any("their changes between models cannot be compared" in note for note in report.notes)
    assert not any("Cheung & Rensvold 2002" in note for note in report.notes)
    out = comparison.to_dict()
    assert all(t["delta_cfi"] is None and t["delta_rmsea"] is None for t in out["tests"])
    assert "cannot be compared" in out["fit_index_changes_left_out"]
    assert compare([ONE, TWO], data).to_dict()["fit_index_changes_left_out"] is None
