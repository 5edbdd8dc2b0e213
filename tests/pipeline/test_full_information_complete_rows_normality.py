"""A full-information fit of rows without a gap gives Mardia's (1970) tests of multivariate normality, as the fit of
the same complete rows does (hostile trial s20: it said they 'need complete rows' and left them out while every row
was complete); rows with gaps give Mardia's kurtosis with each row on the items it answered (Yuan, Lambert & Fouladi
2004; assessment.normality.kurtosis_with_gaps, checked against Mardia's test and a direct computation in
tests/assessment/test_kurtosis_with_gaps.py), and beside it both of Mardia's tests of the complete rows alone."""

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


def test_rows_with_gaps_give_the_kurtosis_on_the_items_each_row_answered(rider_demo, rider_model):
    from cfa_tool.assessment.normality import kurtosis_with_gaps

    items = list(cfa_tool.parse_model(rider_model).observed_names)
    rows = rider_demo[items].to_numpy(dtype=float)
    rows = rows[~np.isnan(rows).all(axis=1)]
    assert np.isnan(rows).any()
    full = cfa_tool.fit(rider_model, rider_demo, missing="full-information")
    found, alone = full.groups[0].normality, kurtosis_with_gaps(rows)
    assert found.rows_with_gaps == int(np.isnan(rows).any(axis=1).sum()) > 0 and found.skewness is None
    assert found.kurtosis_z == pytest.approx(alone.kurtosis_z, rel=1e-6)  # the fit's EM moments, or estimated again
    text = " ".join(full.summary().split())
    assert "need complete rows" not in text and "were not computed" not in text
    assert (f"Multivariate kurtosis of every row, each on the items it answered ({found.rows_with_gaps} rows with gaps; "
            f"Mardia 1970, for rows with gaps Yuan, Lambert & Fouladi 2004)") in text
    # beside it, both of Mardia's tests of the complete rows, labelled as theirs (s25: the demo's 471 complete rows
    # lost their skewness), as the fit of those rows alone gives them (Mardia 1970)
    complete = cfa_tool.fit(rider_model, rider_demo.dropna(subset=items)).groups[0].normality
    whole = found.of_complete_rows
    assert found.complete_rows == len(rider_demo.dropna(subset=items)) == 471  # the demo: 9 of 480 rows with gaps
    for field in ("skewness", "skewness_chi_square", "skewness_p_value", "kurtosis", "kurtosis_z", "kurtosis_p_value"):
        assert getattr(whole, field) == pytest.approx(getattr(complete, field), rel=1e-8), field
    assert (f"of the 471 complete rows alone (Mardia 1970): skewness {complete.skewness:.3f}, chi-square "
            f"{complete.skewness_chi_square:.2f} on {complete.skewness_df} df") in text
    said = full.to_dict()["normality"]
    assert said["rows_with_gaps"] == found.rows_with_gaps and said["skewness"] is None
    assert said["kurtosis_z"] == pytest.approx(found.kurtosis_z)
    assert said["complete_rows"] == 471 and said["of_complete_rows"]["skewness"] == pytest.approx(complete.skewness)


def test_missing_data_helpers_judge_the_items_alone(rider_demo, rider_model):
    # with a helper the kurtosis is of the items' rows at the items' own EM moments, not of the helper
    from cfa_tool.assessment.normality import kurtosis_with_gaps

    aged = rider_demo.assign(age=np.random.default_rng(15).integers(18, 80, len(rider_demo)))
    items = list(cfa_tool.parse_model(rider_model).observed_names)
    rows = rider_demo[items].to_numpy(dtype=float)
    rows = rows[~np.isnan(rows).all(axis=1)]
    found = cfa_tool.fit(rider_model, aged, missing_helpers=["age"]).groups[0].normality
    assert found is not None and found.kurtosis_z == pytest.approx(kurtosis_with_gaps(rows).kurtosis_z, rel=1e-6)


def test_a_kurtosis_that_cannot_be_computed_is_said_so(rider_demo, rider_model, monkeypatch):
    # the kurtosis of rows with gaps needs the information of the covariances to be positive definite (and, before
    # s25, to fit within the largest matrix the tool makes, which it no longer forms); where it cannot be solved the
    # fit says why there is no test, and the remedies
    from cfa_tool.assessment import normality
    from cfa_tool.reporting.tables import normality_lines

    def unsolved(*_args, **_kwargs):
        raise np.linalg.LinAlgError("the information of the saturated covariances is not positive definite")

    monkeypatch.setattr(normality, "information_quadratic", unsolved)
    full = cfa_tool.fit(rider_model, rider_demo, missing="full-information")
    assert full.groups[0].normality is None
    [line] = normality_lines(full)
    text = " ".join(str(line).split())
    assert text.startswith("Mardia's tests of multivariate normality were not computed: the skewness needs complete "
                           "rows, and the kurtosis of rows with gaps")
    assert "--incomplete-rows listwise" in text or "missing='listwise'" in text
    assert "--robust" in text or "test='robust'" in text


def test_the_json_counts_the_complete_rows_of_every_record(rider_demo, rider_model):
    # hostile s25b case 03: docs/json.md's complete_rows, 'the number of complete rows', was 0 for a file of complete
    # rows and inside of_complete_rows; the counts are the demo's (471 of 480 rows complete, by pandas' dropna)
    items = list(cfa_tool.parse_model(rider_model).observed_names)
    complete = rider_demo.dropna(subset=items)
    assert len(complete) == 471
    said = cfa_tool.fit(rider_model, complete).to_dict()["normality"]
    assert said["complete_rows"] == 471 and said["rows_with_gaps"] == 0
    gaps = cfa_tool.fit(rider_model, rider_demo, missing="full-information").to_dict()["normality"]
    assert gaps["complete_rows"] == 471 and gaps["of_complete_rows"]["complete_rows"] == 471
