"""A full-information fit of rows without a gap gives Mardia's (1970) tests of multivariate normality, as the fit of
the same complete rows does (hostile trial s20: it said they 'need complete rows' and left them out while every row
was complete); rows with a gap still leave them out, with the note that says why."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool


def test_complete_rows_give_the_same_tests_under_full_information(rider_demo, rider_model):
    complete = rider_demo.dropna()
    ordinary = cfa_tool.fit(rider_model, complete)
    full = cfa_tool.fit(rider_model, complete, missing="full-information")
    a, b = ordinary.groups[0].normality, full.groups[0].normality
    assert a is not None and b is not None
    for field in ("skewness", "skewness_chi_square", "skewness_p_value", "kurtosis", "kurtosis_z", "kurtosis_p_value"):
        assert getattr(b, field) == pytest.approx(getattr(a, field), rel=1e-10), field
    text = " ".join(full.summary().split())
    assert "need complete rows" not in text and "Multivariate normality (Mardia 1970)" in text


def test_rows_with_gaps_still_leave_the_tests_out(rider_demo, rider_model):
    assert np.isnan(rider_demo.select_dtypes("number").to_numpy()).any()
    full = cfa_tool.fit(rider_model, rider_demo, missing="full-information")
    assert full.groups[0].normality is None
    assert "need complete rows" in " ".join(full.summary().split())
