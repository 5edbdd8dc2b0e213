"""Readers for every supported file kind, summary statistics, missing codes and row filters."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError, OptionError
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture(scope="module")
def hs_items(hs_data) -> pd.DataFrame:
    return hs_data[ITEMS + ["school"]].reset_index(drop=True)


def test_spss_file_with_value_labels_and_user_missing_codes(tmp_path, hs_items):
    import pyreadstat

    data = hs_items[ITEMS].round(4).copy()
    data["rating"] = pd.qcut(data["x3"], 5, labels=False).astype(float) + 1  # a 5-point rating of the same ability
    data.loc[[0, 1], "x1"] = -99.0  # declared as user-missing in the file
    path = tmp_path / "hs.sav"
    pyreadstat.write_sav(data, str(path), column_labels={"x1": "Visual perception"},
                         variable_value_labels={"rating": {1: "strongly disagree", 5: "strongly agree"}},
                         missing_ranges={"x1": [-99.0]})
    result = cfa_tool.fit(THREE_FACTORS, path)
    assert result.n_obs == 299 and result.data.rows_dropped == 2
    assert result.labels["variables"] == {"x1": "Visual perception"}
    rated = cfa_tool.fit("factor f: x1, x2, rating\n", path)
    assert rated.converged
    assert rated.labels["values"]["rating"][5.0] == "strongly agree"


def test_stata_file(tmp_path, hs_items, hs_three):
    import pyreadstat

    path = tmp_path / "hs.dta"
    pyreadstat.write_dta(hs_items[ITEMS], str(path))
    result = cfa_tool.fit(THREE_FACTORS, path)
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-6)


def test_excel_workbook_and_sheet_choice(tmp_path, hs_items, hs_three):
    path = tmp_path / "hs.xlsx"
    with pd.ExcelWriter(path, engine="openpyxl") as writer:
        pd.DataFrame({"note": ["not data"]}).to_excel(writer, sheet_name="readme", index=False)
        hs_items.to_excel(writer, sheet_name="scores", index=False)
    result = cfa_tool.fit(THREE_FACTORS, path, sheet="scores")
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-9)
    with pytest.raises(DataError, match="no sheet 'score'"):
        cfa_tool.fit(THREE_FACTORS, path, sheet="score")


def test_excel_merged_header_is_refused(tmp_path):
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["Visual tests", None, None])
    sheet.append([1, 2, 3])
    sheet.merge_cells("A1:C1")
    path = tmp_path / "merged.xlsx"
    book.save(path)
    with pytest.raises(DataError, match="merged cells"):
        cfa_tool.fit("factor f: a, b, c\n", path)


def test_missing_codes_in_a_plain_file(tmp_path, hs_items):
    data = hs_items[ITEMS].copy()
    data.loc[[3, 4, 5], "x2"] = -99
    data.loc[[6], "x7"] = 999
    path = tmp_path / "codes.csv"
    data.to_csv(path, index=False)
    result = cfa_tool.fit(THREE_FACTORS, path, missing_codes=(-99, 999))
    assert result.n_obs == 297


def _lower_triangle_file(tmp_path, cov: np.ndarray, n: int, names: list[str], extra: str = "") -> str:
    rows = "\n".join(" ".join(f"{cov[i, j]:.12g}" for j in range(i + 1)) for i in range(len(names)))
    path = tmp_path / "hs.stats"
    path.write_text(f"# published matrix\nvariables: {' '.join(names)}\nobservations: {n}\nmatrix: covariance\n{extra}values:\n{rows}\n")
    return str(path)


def test_summary_statistics_file_reproduces_the_raw_fit(tmp_path, hs_items, hs_three):
    # Holzinger & Swineford (1939): the covariance matrix (divisor N - 1, as published) as a
    # lower triangle with N = 301 gives the raw-data chi-square 85.306 on 24 df.
    cov = np.cov(hs_items[ITEMS].to_numpy().T)
    result = cfa_tool.fit(THREE_FACTORS, _lower_triangle_file(tmp_path, cov, 301, ITEMS))
    assert result.fit.chi_square == pytest.approx(85.306, abs=5e-4)
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-9)
    for a, b in zip(result.estimates, hs_three.estimates):
        assert a.estimate == pytest.approx(b.estimate, rel=1e-7, abs=1e-10)
        assert a.se == pytest.approx(b.se, rel=1e-7) or not a.free


def test_summary_statistics_from_python(hs_items, hs_three):
    cov = hs_items[ITEMS].cov()
    result = cfa_tool.fit(THREE_FACTORS, covariance=cov, n_obs=301)
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-9)


def test_correlation_matrix_without_sds_is_fitted_with_a_note(hs_items, hs_three):
    corr = hs_items[ITEMS].corr()
    result = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=301, matrix="correlation")
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-8)
    assert any("correlation matrix without standard deviations" in w for w in result.warnings)
    std = {r.variables: r.standardized for r in hs_three.estimates}
    for r in result.estimates:
        assert r.standardized == pytest.approx(std[r.variables], abs=1e-6)
    sds = hs_items[ITEMS].std().to_numpy()
    with_sd = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=301, matrix="correlation", sds=sds)
    assert [r.estimate for r in with_sd.estimates] == pytest.approx([r.estimate for r in hs_three.estimates], rel=1e-6)


@pytest.mark.parametrize(
    "content, words",
    [
        ("variables: a b c\nobservations: 100\nmatrix: covariance\nvalues:\n1\n0.5 1\n", "2 rows for 3 variables"),
        ("variables: a b c\nobservations: 100\nmatrix: covariance\nvalues:\n1\n0.5 1 3\n0.1 0.2 1\n", "row 2 of the matrix has 3 numbers"),
        ("variables: a b c\nobservations: ten\nmatrix: covariance\nvalues:\n1\n.5 1\n.4 .3 1\n", "whole number"),
        ("variables: a b c\nobservations: 100\nmatrix: covariance\nvalues:\n1\n.5 x\n.4 .3 1\n", "'x' is not a number"),
        ("variables: a b c\nmatrix: covariance\nvalues:\n1\n.5 1\n.4 .3 1\n", "no 'observations:' line"),
        ("variables: a b c\nobservations: 100\nmatrix: correlation\nvalues:\n2\n.5 1\n.4 .3 1\n", "ones on its diagonal"),
        ("variables: a b c\nobservations: 100\nsize: 3\n", "expected one of"),
    ],
)
def test_summary_statistics_errors(tmp_path, content, words):
    path = tmp_path / "bad.stats"
    path.write_text(content)
    with pytest.raises(DataError, match=words):
        cfa_tool.fit("factor f: a, b, c\n", path)


def test_row_filters(hs_data, hs_three):
    pasteur = cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school = Pasteur"])
    assert pasteur.n_obs == 156
    assert any("kept 156 of 301 rows" in w for w in pasteur.warnings)
    older = cfa_tool.fit(THREE_FACTORS, hs_data, keep=["ageyr >= 13", "school != Pasteur"])
    assert older.n_obs == int(((hs_data.ageyr >= 13) & (hs_data.school != "Pasteur")).sum())
    with pytest.raises(OptionError, match="cannot read the row filter"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school Pasteur"])
    with pytest.raises(OptionError, match="can only be compared with = or !="):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school > P"])
    with pytest.raises(DataError, match="no row is left"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["ageyr > 99"])


def test_filters_are_never_evaluated(hs_data):
    # a filter that would be code in a language is only ever compared as text
    with pytest.raises(DataError, match="no row is left"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school = __import__('os').system('true')"])
