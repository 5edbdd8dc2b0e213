"""The replicate report says what it did (a new-user trial found it silent on rows and methods): the rows of each
sample (read, analysed, with gaps, and how those were used, with the assumption that makes), a methods paragraph
made by the paragraph module as compare's and invariance's are, and the standardized loadings of the two samples
side by side with their difference.

Reference values: the rows with gaps are counted by pandas (isna().any(axis=1)) in the files written; each
sample's standardized loadings are those of ``cfa_tool.fit`` of that file alone (the loose refit is that fit)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.reports import report_of
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()
ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers"]


@pytest.fixture(scope="module")
def samples(tmp_path_factory):
    here = tmp_path_factory.mktemp("replication_report")
    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    first, second = rows.iloc[: len(rows) // 2].copy(), rows.iloc[len(rows) // 2:].copy()
    second.loc[second.index[:15], "on_time"] = np.nan
    second.loc[second.index[10:20], "clean"] = np.nan
    first.to_csv(here / "first.csv", index=False)
    second.to_csv(here / "second.csv", index=False)
    return here / "first.csv", here / "second.csv"


def _gaps(path) -> int:
    return int(pd.read_csv(path)[ITEMS].isna().any(axis=1).sum())


def test_the_rows_of_each_sample_and_how_rows_with_gaps_were_used(samples):
    first, second = samples
    rep = cfa_tool.replicate(MODEL, first, second)
    report = report_of(rep)
    rows = next(t for t in report.tables if t.key == "replication_rows")
    assert [list(r) for r in rows.values] == [
        ["Calibration", 240, 240, _gaps(first), "kept: full-information ML" if _gaps(first) else "none had gaps"],
        ["Validation", 240, 240, _gaps(second), "kept: full-information ML"]]
    gaps = _gaps(second)
    assert gaps >= 20  # the demo's own gaps and those written here
    assert "Validation, answers missing at random" in rows.note
    assert rep.entry()["validation"]["rows"] == {"rows_read": 240, "rows_analysed": 240, "analysed_with_gaps": gaps,
                                                  "rows_left_out": 0, "rows_with_gaps_used_by": "full-information",
                                                  "rows_in_file": None}
    listwise = cfa_tool.replicate(MODEL, first, second, missing="listwise")
    values = next(t for t in report_of(listwise).tables if t.key == "replication_rows").values
    assert list(values[1]) == ["Validation", 240, 240 - gaps, gaps, "left out: listwise deletion"]
    assert f"{gaps} with missing answers excluded listwise, which assumes that answers are missing completely at random" \
        in report_of(listwise).paragraph


def test_a_row_filter_on_both_files_shows_the_rows_in_each_file_and_those_kept(samples):
    # hostile tester s13: with --keep the table said 'Rows read 123' where the file held 240 and the filter kept 123
    first, second = samples
    rep = cfa_tool.replicate(MODEL, first, second, keep=["district = north"])
    kept = [int((pd.read_csv(path)["district"] == "north").sum()) for path in (first, second)]  # counted by pandas
    rows = next(t for t in report_of(rep).tables if t.key == "replication_rows")
    assert list(rows.value_columns[:4]) == ["Sample", "Rows in the file", "Kept by the row filter", "Analysed"]
    assert [list(r)[:4] for r in rows.values] == [["Calibration", 240, kept[0], kept[0]],
                                                  ["Validation", 240, kept[1], kept[1]]]
    assert rep.entry()["calibration"]["rows"]["rows_in_file"] == 240


def test_the_methods_paragraph_says_the_model_the_rows_the_test_and_the_index(samples):
    first, second = samples
    rep = cfa_tool.replicate(MODEL, first, second)
    paragraph = report_of(rep).paragraph
    assert paragraph.startswith("The replication of a confirmatory factor analysis with 12 indicators of three "
                                "correlated factors (punctuality, comfort, and courtesy) was examined in two samples")
    assert (f"refitted in a validation sample (N = 240 of 240 rows read; {_gaps(second)} with missing answers, whose every answer "
            "was used by full-information maximum likelihood, which assumes that answers are missing at random, "
            "Little & Rubin, 2002)") in paragraph  # no parentheses inside the sample's own (new-user trial 18)
    t = rep.same_solution
    assert f"\u03c7\u00b2({t.df_difference}) = {t.chi_square_difference:.2f}" in paragraph
    assert "held equal (the intercepts free in each sample; Jöreskog, 1971)" in paragraph
    assert f"The cross-validation index (Cudeck & Browne, 1983) was {rep.cvi:.4f}" in paragraph
    assert "Standardized loadings differed between the samples by at most" in paragraph


def test_the_paragraph_of_ordinal_halves_names_pairwise_rows_and_tests_once(samples):
    first, _ = samples
    a, b = cfa_tool.split_half(MODEL, resource_dir("demo") / "rider_survey.csv", seed=3, ordinal="all")
    assert a.same_solution is b.same_solution  # the same two halves: one test
    paragraph = report_of(cfa_tool.workflows.replication.Replications((a, b))).paragraph
    assert "used pairwise" in paragraph and "missing completely at random, Little & Rubin, 2002)" in paragraph
    assert paragraph.count("Whether one solution holds in both samples was tested") == 1
    assert "held equal (the thresholds free in each sample" in paragraph
    assert "error covariance and factor variance" in paragraph and "error variance and" not in paragraph


def test_the_standardized_loadings_of_both_samples_side_by_side(samples):
    first, second = samples
    rep = cfa_tool.replicate(MODEL, first, second)
    table = next(t for t in report_of(rep).tables if t.key == "replication_1_loadings")
    own = {}
    for path in (first, second):
        own[path] = {r.variables: r.standardized for r in cfa_tool.fit(MODEL, path).estimates if r.kind == "loading"}
    assert len(table.values) == 12
    for factor, item, calibration, validation, difference in table.values:
        assert calibration == pytest.approx(own[first][(factor, item)], abs=1e-6)
        assert validation == pytest.approx(own[second][(factor, item)], abs=1e-6)
        assert difference == pytest.approx(validation - calibration, abs=1e-12)
