"""The scaled test under a sampling design is named for what the code computes (new-user trial s16: it was called
"Yuan-Bentler" or "Satorra-Bentler" alone): the Satorra-Bentler (1994) scaling with the design-based covariance of
the sample moments (Muthén & Satorra 1995), or with full-information ML Yuan and Bentler's (2000) scaling with the
design-based covariance of the rows' scores (Asparouhov 2005), both from cfa_tool.inference.design, whose values
tests/inference/test_sample_design.py checks by hand.  Every view names it so: the status line, the methods
paragraph, the fit table and the JSON."""

from __future__ import annotations

import numpy as np

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import fit_table

ONE_FACTOR = "factor f: x1, x2, x3, x4\n"


def _design(hs_data, gaps: bool = False):
    n = len(hs_data)
    data = hs_data.assign(w=np.random.default_rng(5).uniform(0.5, 2, n), unit=np.arange(n) // 5)
    if gaps:
        data.loc[data.index[::6], "x2"] = np.nan
    return data


def _names(result) -> tuple[str, str, str, str]:
    text = " ".join(methods_paragraph(result).split())
    table = fit_table(result)
    rows = " | ".join(str(row[0]) for row in table.rows)
    return result.estimator, text, rows, result.to_dict()["robust"]["method"]


def test_the_complete_rows_scaled_test_under_a_design_is_named_design_based(hs_data):
    result = cfa_tool.fit(ONE_FACTOR, _design(hs_data), weights="w", cluster="unit")
    status, text, rows, saved = _names(result)
    assert result.method.design_based and result.robust.design
    assert "with design-based scaled test (Satorra-Bentler scaling) and cluster-robust standard errors" in status
    assert ("a design-based scaled test (the Satorra-Bentler scaling with the design-based covariance of the sample "
            "moments; Muthén & Satorra, 1995)") in text
    assert "The design-based scaled chi-square test (Satorra-Bentler scaling) gave" in text
    assert "Scaled chi-square (design-based, Satorra-Bentler scaling)" in rows
    assert saved == "design-based, Satorra-Bentler scaling" and result.method.to_dict()["design_based"] is True


def test_the_full_information_scaled_test_under_a_design_is_named_design_based(hs_data):
    result = cfa_tool.fit(ONE_FACTOR, _design(hs_data, gaps=True), weights="w", cluster="unit")
    status, text, rows, saved = _names(result)
    assert result.method.full_information
    assert "with design-based scaled test (Yuan-Bentler scaling)" in status
    assert ("a design-based scaled test (the Yuan-Bentler scaling with the design-based covariance of the rows' "
            "scores; Asparouhov, 2005)") in text
    assert "Scaled chi-square (design-based, Yuan-Bentler scaling)" in rows and saved.startswith("design-based")


def test_without_a_design_the_tests_keep_their_names(hs_data):
    plain = cfa_tool.fit(ONE_FACTOR, _design(hs_data), test="robust")
    status, text, rows, saved = _names(plain)
    assert "with Satorra-Bentler scaled test and robust standard errors" in status
    assert "with the Satorra-Bentler scaled test and robust standard errors" in text and "design-based" not in text
    assert saved == "Satorra-Bentler" and not plain.method.design_based
    # frequency weights are repeated rows: no sandwich of a design, so no design-based test
    counted = cfa_tool.fit(ONE_FACTOR, _design(hs_data).assign(c=1 + np.arange(301) % 2), weights="c",
                           weight_kind="frequency")
    assert counted.robust is None or not counted.robust.design


def test_compare_names_the_design_based_test_in_its_table_and_notes(hs_data):
    """Re-check s16 (N6): compare's table still said 'Scaled chi-square (Yuan-Bentler)' under a design, and its note
    on rows with gaps 'the robust test with full-information ML is the Yuan-Bentler one'."""
    from cfa_tool.reporting.reports import report_of

    compared = cfa_tool.compare([ONE_FACTOR, ONE_FACTOR + "covary x1, x2\n"], _design(hs_data, gaps=True), weights="w",
                                cluster="unit")
    report = report_of(compared)
    rows = [str(row[0]) for table in report.tables for row in table.rows]
    assert "Scaled chi-square (design-based, Yuan-Bentler scaling)" in rows
    assert "Scaled chi-square (Yuan-Bentler)" not in rows
    notes = " ".join(str(w) for w in compared.notes)
    assert "the robust test with full-information ML is the Yuan-Bentler one" not in notes
    assert "under the sampling design the test is design-based" in notes
