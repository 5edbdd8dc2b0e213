"""Readers for every supported file kind, summary statistics, missing codes and row filters."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError, ModelError, OptionError
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
    result = cfa_tool.fit(THREE_FACTORS, path, missing="listwise")
    assert result.n_obs == 299 and result.data.rows_dropped == 2
    assert result.labels["variables"] == {"x1": "Visual perception"}
    rated = cfa_tool.fit("factor f: x1, x2, rating\n", path)
    assert rated.converged
    assert rated.labels["values"]["rating"][5.0] == "strongly agree"
    # an ordinal fit of the same file carries the same labels, one way for both (new-user trial)
    ordinal = cfa_tool.fit("factor f: x1, x2, rating\n", path, ordinal="rating")
    assert ordinal.method.ordinal and ordinal.labels == rated.labels
    assert ordinal.to_dict()["labels"]["values"]["rating"]["5.0"] == "strongly agree"
    from cfa_tool.reporting.reports import report_of

    assert any(t.key == "value_labels" for t in report_of(ordinal).tables)


def test_a_row_filter_by_a_value_label_of_an_spss_file(tmp_path, hs_items):
    # '--keep "school != Pasteur"' on a file where school is stored as codes 1/2 with value labels: compared with
    # the labels (it kept every row silently before: the code 2 is never the text 'Pasteur'; new-user trial)
    import pyreadstat

    data = hs_items[ITEMS].round(4).copy()
    data["school"] = (hs_items["school"] == "Pasteur").astype(float) + 1
    path = tmp_path / "hs_codes.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={"school": {1: "Grant-White", 2: "Pasteur"}})
    result = cfa_tool.fit(THREE_FACTORS, path, keep=["school != Pasteur"])
    assert result.n_obs == int((hs_items["school"] == "Grant-White").sum()) == 145
    assert any("compared with the value labels of 'school'" in w for w in result.warnings)
    by_code = cfa_tool.fit(THREE_FACTORS, path, keep=["school = 1.0"])  # a number still compares with the codes
    assert by_code.n_obs == 145
    # groups by the labelled column are named by its labels, and the reference group can be given by its label
    scalar = THREE_FACTORS + "invariance scalar\n"  # factor means estimated: the reference group sets them
    grouped = cfa_tool.fit(scalar, path, group="school", reference_group="Pasteur")
    assert [g.label for g in grouped.groups] == ["Pasteur", "Grant-White"]
    same = data.assign(school=hs_items["school"])  # the same rounded numbers, with the labels as text
    assert grouped.fit.chi_square == pytest.approx(cfa_tool.fit(scalar, same, group="school",
                                                                reference_group="Pasteur").fit.chi_square, rel=1e-6)
    assert ("the group column 'school' holds codes with value labels in the data file; its groups are named by those "
            "labels (1 as 'Grant-White', 2 as 'Pasteur')") in grouped.warnings
    # groups keep the file's order of codes, and the reference group can be given by its code as filters take it
    # (new-user trial: labels sorted as text made the later wave the reference)
    path2 = tmp_path / "hs_codes_reversed.sav"
    pyreadstat.write_sav(data, str(path2), variable_value_labels={"school": {1: "West", 2: "East"}})
    assert [g.label for g in cfa_tool.fit(THREE_FACTORS, path2, group="school").groups] == ["West", "East"]
    by_code = cfa_tool.fit(scalar, path2, group="school", reference_group="2")
    assert [g.label for g in by_code.groups] == ["East", "West"]


def test_numeric_group_labels_are_ordered_by_value(hs_items):
    data = hs_items[ITEMS].assign(site=np.where(np.arange(len(hs_items)) % 3 == 0, 10, 2))
    assert [g.label for g in cfa_tool.fit(THREE_FACTORS, data, group="site").groups] == ["2", "10"]


def test_explore_leaves_out_a_labelled_code_column_as_fit_reads_it_as_labels(tmp_path, hs_items):
    # an SPSS file of 5-point answers that share one answer scale's labels, beside a column of campus codes 1/2
    # labelled with the schools' names (a name that is no unit's word, so read by its labels, not its name): fit reads
    # the codes as their labels (they name groups), and explore's default items leave the column out and say so, by
    # the same rule (every code labelled), written once
    import pyreadstat

    scale = {1: "strongly disagree", 2: "disagree", 3: "neutral", 4: "agree", 5: "strongly agree"}
    data = pd.DataFrame({c: pd.qcut(hs_items[c], 5, labels=False).astype(float) + 1 for c in ITEMS})
    data["campus"] = (hs_items["school"] == "Pasteur").astype(float) + 1
    path = tmp_path / "coded.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels={
        **{c: scale for c in ITEMS}, "campus": {1: "Grant-White", 2: "Pasteur"}})
    grouped = cfa_tool.fit(THREE_FACTORS, path, group="campus")
    assert sorted(g.label for g in grouped.groups) == ["Grant-White", "Pasteur"]
    explored = cfa_tool.explore(path, factors=3, replications=5)
    assert explored.items == tuple(ITEMS)
    assert any("Left out as codes of categories" in n and "campus (name them in items=..." in n for n in explored.notes)
    chosen = cfa_tool.explore(path, items=[*ITEMS, "campus"], factors=3, replications=5)  # named: explored as asked
    assert chosen.items == (*ITEMS, "campus")


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


def test_workbook_whose_first_sheet_is_a_codebook(tmp_path, hs_items, hs_three):
    # a codebook sheet before the data (new-user trial): the error names the sheet read and the others, for fit
    # and for explore (which stopped with an internal error on a sheet without numbers)
    path = tmp_path / "hs.xlsx"
    with pd.ExcelWriter(path, engine="openpyxl") as writer:
        pd.DataFrame({"variable": ITEMS, "meaning": ["a test score"] * 9}).to_excel(writer, sheet_name="Codebook",
                                                                                   index=False)
        hs_items.to_excel(writer, sheet_name="Data", index=False)
    with pytest.raises(ModelError, match="its first sheet not hidden, 'Codebook', was read, and the workbook also has 'Data': "
                                         r"name the sheet of the data with sheet=\.\.\."):
        cfa_tool.fit(THREE_FACTORS, path)
    with pytest.raises(DataError, match="none of its columns holds numbers.*also has 'Data'"):
        cfa_tool.explore(path, replications=5)
    assert cfa_tool.fit(THREE_FACTORS, path, sheet="Data").fit.chi_square == pytest.approx(hs_three.fit.chi_square,
                                                                                           rel=1e-9)


def test_title_above_the_column_names_and_markers_of_no_answer(tmp_path, hs_items, hs_three):
    # a sheet with a title merged across the table above the names (as reports are laid out) is read from the
    # names down, with a note; 'n/a' and '#N/A' cells (spreadsheets' words for no answer) are read as empty in a
    # workbook and in a CSV, with a note counting them: the same fit as the data with those cells empty
    import openpyxl

    data = hs_items[ITEMS].round(6)
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["Visual, verbal and speed tests, 1939"] + [None] * 8)
    sheet.merge_cells("A1:I1")
    sheet.append(ITEMS)
    for k, row in enumerate(data.itertuples(index=False)):
        row = list(row)
        if k == 3:
            row[1] = "n/a"
        if k == 7:
            row[4] = " #N/A"
        sheet.append(row)
    path = tmp_path / "titled.xlsx"
    book.save(path)
    gaps = data.copy()
    gaps.iloc[3, 1] = np.nan
    gaps.iloc[7, 4] = np.nan
    expected = cfa_tool.fit(THREE_FACTORS, gaps)
    result = cfa_tool.fit(THREE_FACTORS, path)
    assert result.fit.chi_square == pytest.approx(expected.fit.chi_square, rel=1e-9)
    from cfa_tool.data.readers import read_data

    notes = " ".join(read_data(path).notes)
    assert "row 1 holds a title ('Visual, verbal and speed tests, 1939') above the column names" in notes
    assert "cells written as 'n/a' (1 cell), '#N/A' (1 cell) were read as no answer" in notes
    text = gaps.to_csv(index=False, na_rep="n/a")
    (tmp_path / "gaps.csv").write_text(text)
    from_csv = cfa_tool.fit(THREE_FACTORS, tmp_path / "gaps.csv")
    assert from_csv.fit.chi_square == pytest.approx(expected.fit.chi_square, rel=1e-9)
    assert "cells written as 'n/a' (2 cells) were read as no answer" in " ".join(read_data(tmp_path / "gaps.csv").notes)


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


def _made_up_answers(n: int = 60) -> pd.DataFrame:
    """Invented 1-5 answers to three items of one factor (seeded), for the workbook layout checks."""
    rng = np.random.default_rng(11)
    trait = rng.normal(size=n)
    return pd.DataFrame({name: np.clip(np.rint(3 + trait + rng.normal(scale=0.8, size=n)), 1, 5).astype(int)
                         for name in ("a", "b", "c")})


def _sheet_of(data: pd.DataFrame, path, column: int = 1, merge: str | None = None):
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    for j, name in enumerate(data.columns):
        sheet.cell(1, column + j, name)
        for i, value in enumerate(data[name], start=2):
            sheet.cell(i, column + j, int(value))
    if merge:
        sheet.merge_cells(merge)
    book.save(path)
    return path


def test_merged_cells_among_the_answers_are_refused_with_their_range_and_column(tmp_path):
    # hostile trial 7, H1: the other cells of a merged range were read as missing answers without a word, while the
    # sheet shows the value in them; only the header's merged cells were refused
    path = _sheet_of(_made_up_answers(), tmp_path / "merged_body.xlsx", merge="B4:B7")
    with pytest.raises(DataError, match=r"\(sheet 'Sheet'\): cells B4:B7 of column 'b' are merged") as caught:
        cfa_tool.fit("factor f: a, b, c\n", path)
    assert "\n" not in str(caught.value)
    # a merged range of empty cells is read as shown (empty), and a table starting in column C is named by its columns
    data = _made_up_answers()
    path = _sheet_of(data, tmp_path / "shifted.xlsx", column=3, merge="F10:F12")
    from cfa_tool.data.readers import read_data

    assert list(read_data(path).frame.columns) == ["a", "b", "c"]
    path = _sheet_of(data, tmp_path / "shifted_merged.xlsx", column=3, merge="D10:D12")
    with pytest.raises(DataError, match="cells D10:D12 of column 'b' are merged"):
        read_data(path)


def test_a_table_starting_in_column_b_has_no_row_names(tmp_path):
    # hostile trial 7, H6: the empty column A was reported as row names and then as '60 rows have no id'
    from cfa_tool.data.readers import read_data

    data = _made_up_answers()
    data.to_csv(tmp_path / "plain.csv", index=False)  # pandas writes the reference copy
    expected = cfa_tool.fit("factor f: a, b, c\n", tmp_path / "plain.csv")
    for path in (_sheet_of(data, tmp_path / "col_b.xlsx", column=2), tmp_path / "lead.csv"):
        if path.suffix == ".csv":
            path.write_text("".join("," + line + "\n" for line in data.to_csv(index=False).splitlines()))
        loaded = read_data(path)
        assert list(loaded.frame.columns) == ["a", "b", "c"]
        assert not any("row names" in note for note in loaded.notes), loaded.notes
        result = cfa_tool.fit("factor f: a, b, c\n", path)
        assert result.fit.chi_square == pytest.approx(expected.fit.chi_square, rel=1e-9)
        assert not any("row names" in w or "no id" in w for w in result.warnings), result.warnings


def test_missing_codes_in_a_plain_file(tmp_path, hs_items):
    data = hs_items[ITEMS].copy()
    data.loc[[3, 4, 5], "x2"] = -99
    data.loc[[6], "x7"] = 999
    path = tmp_path / "codes.csv"
    data.to_csv(path, index=False)
    result = cfa_tool.fit(THREE_FACTORS, path, missing_codes=(-99, 999), missing="listwise")
    assert result.n_obs == 297


def _lower_triangle_file(tmp_path, cov: np.ndarray, n: int, names: list[str], extra: str = "",
                         suffix: str = ".stats") -> str:
    rows = "\n".join(names[i] + "," + ",".join(f"{cov[i, j]:.12g}" for j in range(i + 1)) for i in range(len(names)))
    path = tmp_path / f"hs{suffix}"
    path.write_text(f"# published matrix\ncovariance,{','.join(names)}\n{rows}\nn,{n}\n{extra}")
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


def test_summary_statistics_as_csv_with_semicolons_sds_and_means(tmp_path, hs_items, hs_three):
    # the correlation matrix with standard deviations and means, as a spreadsheet in a decimal-comma locale
    # writes it (semicolons, decimal commas, empty cells right of the triangle): the same fit as the raw data
    corr = hs_items[ITEMS].corr().to_numpy()
    sds = hs_items[ITEMS].std().to_numpy()
    means = hs_items[ITEMS].mean().to_numpy()
    comma = lambda v: f"{v:.12g}".replace(".", ",")  # noqa: E731
    lines = ["correlation;" + ";".join(ITEMS)]
    lines += [ITEMS[i] + ";" + ";".join(comma(corr[i, j]) for j in range(i + 1)) + ";" * (8 - i) for i in range(9)]
    lines += ["n;301", "sd;" + ";".join(comma(v) for v in sds), "mean;" + ";".join(comma(v) for v in means)]
    path = tmp_path / "published.csv"
    path.write_text("\n".join(lines) + "\n")
    result = cfa_tool.fit(THREE_FACTORS, str(path))
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-8)
    divisor_n = _lower_triangle_file(tmp_path, np.cov(hs_items[ITEMS].to_numpy().T, bias=True), 301, ITEMS,
                                     extra="divisor,n\n", suffix=".csv")
    assert cfa_tool.fit(THREE_FACTORS, divisor_n).fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-8)


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


def test_labelled_sds_and_means_are_read_by_their_labels(hs_items, hs_three):
    # hostile tester s24: a pandas Series of sds or means in another order than the matrix (sorted, or built from
    # another source) was read by position, giving other loadings without a sign; labelled values are read by
    # label, and the fit equals the raw data's (Holzinger & Swineford 1939 rows, the matrix's own moments)
    corr = hs_items[ITEMS].corr()
    sds, means = hs_items[ITEMS].std(), hs_items[ITEMS].mean()
    result = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=301, matrix="correlation", sds=sds[::-1],
                          means=means.sample(frac=1.0, random_state=1))
    assert [r.estimate for r in result.estimates] == pytest.approx([r.estimate for r in hs_three.estimates], rel=1e-6)
    assert list(result.data.means) == pytest.approx(list(means.to_numpy()), rel=1e-12)
    as_dict = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=301, matrix="correlation",
                           sds=dict(reversed(list(sds.items()))))
    assert [r.estimate for r in as_dict.estimates] == pytest.approx([r.estimate for r in hs_three.estimates], rel=1e-6)
    # a plain array stays positional: reversed values are other sds, so other loadings
    plain = cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=301, matrix="correlation", sds=sds.to_numpy()[::-1])
    assert plain.estimates[1].estimate != pytest.approx(hs_three.estimates[1].estimate, rel=1e-3)
    with pytest.raises(DataError, match=r"'a', 'b', 'c'.*not variables of the matrix; none for 'x1'"):
        cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=301, matrix="correlation",
                     sds=pd.Series(sds.to_numpy(), index=list("abcdefghi")))
    with pytest.raises(DataError, match=r"the means are labelled by variable.*none for 'x9'"):
        cfa_tool.fit(THREE_FACTORS, covariance=corr, n_obs=301, matrix="correlation", means=means[:8])


@pytest.mark.parametrize(
    "content, words",
    [
        ("covariance,a,b,c\na,1\nb,0.5,1\nn,100\n", "the matrix has 2 rows for 3 variables"),
        ("covariance,a,b,c\na,1\nb,0.5,1,3\nc,0.1,0.2,1\nn,100\n", "row 2 of the matrix has 3 numbers"),
        ("covariance,a,b,c\na,1\nb,.5,1\nc,.4,.3,1\nn,ten\n", "one whole number"),
        ("covariance,a,b,c\na,1\nb,.5,x\nc,.4,.3,1\nn,100\n", "'x' is not a number"),
        ("covariance,a,b,c\na,1\nb,.5,1\nc,.4,.3,1\n", "no 'n' row"),
        ("correlation,a,b,c\na,2\nb,.5,1\nc,.4,.3,1\nn,100\n", "ones on its diagonal"),
        ("covariance,a,b,c\na,1\nc,.5,1\nb,.4,.3,1\nn,100\n", "row 2 of the matrix is named 'c'"),
        ("covariance,a,b,c\na,1\nb,.5,1\nc,.4,.3,1\nn,100\nn,100\n", "the 'n' row is given twice"),
        ("matrix,a,b,c\n", "the first cell must say what the matrix holds"),
        ("variables: a b c\nobservations: 100\nmatrix: covariance\nvalues:\n1\n.5 1\n.4 .3 1\n",
         "earlier keyword form of a summary-statistics file; write it as comma-separated lines"),
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


def test_row_filter_with_a_space_inside_an_operator_says_where():
    from cfa_tool.data.filters import parse_filter

    with pytest.raises(OptionError, match=r"the operator at character 7 has a space inside \('> ='\); write '>='"):
        parse_filter("ageyr > = 13")
    with pytest.raises(OptionError, match="a second operator '<' at character 10; put a value that begins with '<' in "
                                          "quotes"):
        parse_filter("school = <b>")
    with pytest.raises(OptionError, match="unknown operator '<>'"):
        parse_filter("ageyr <> 13")
    assert parse_filter('school = "<b>"').value == "<b>"  # the way out the message names


def test_row_filter_of_a_value_no_row_has_lists_the_values_nearest_first(hs_data):
    with pytest.raises(DataError, match=r"no row has 'pasteur' in 'school' \(values present: Pasteur, Grant-White\)"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school = pasteur"])
    kept_all = cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school != pasteur"])
    assert any("kept 301 of 301 rows; no row has 'pasteur'" in w for w in kept_all.warnings)
    with pytest.raises(DataError, match=r"values present: 13, 14, 12, 15, 11, 16\)"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["ageyr = 13.2"])
    # a hostile trial: filters match text with its case while 'answers' words do not; the error says so (the rule
    # itself is unchanged: 'pasteur' still keeps no row), and names the label as the data write it
    with pytest.raises(DataError, match=r"\(values present: Pasteur, Grant-White\); a row filter matches text exactly, "
                                        r"upper and lower case included \(unlike the answer words a model file codes\): "
                                        r"write 'Pasteur' as the data have it"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school = pasteur"])
    with pytest.raises(DataError, match=r"Pasteur\); a row filter matches text exactly, upper and lower case "
                                        r"included \(unlike the answer words a model file codes\)$"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school = Central"])


def test_row_filter_on_true_and_false_cells_reads_them_as_spreadsheets_write_them(hs_data):
    flagged = hs_data.assign(retested=hs_data["id"] % 2 == 0)  # a TRUE/FALSE column, as a CSV reader gives it
    for value in ("TRUE", "true", "True"):
        kept = cfa_tool.fit(THREE_FACTORS, flagged, keep=[f"retested = {value}"])
        assert kept.n_obs == int(flagged["retested"].sum())
    with pytest.raises(DataError, match=r"values present: FALSE, TRUE\)"):
        cfa_tool.fit(THREE_FACTORS, flagged, keep=["retested = yes"])


def test_filters_are_never_evaluated(hs_data):
    # a filter that would be code in a language is only ever compared as text
    with pytest.raises(DataError, match="no row is left"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school = __import__('os').system('true')"])


# ---------------------------------------------------------------- files as users have them


def _clean_csv(hs_data) -> str:
    return hs_data[["id", "school", "ageyr"] + ITEMS].round(6).to_csv(index=False)


@pytest.mark.parametrize("change", [
    "utf-16", "cp1252 byte 0x85 in the header", "line separator in the header", "form feed in the header",
    "quoted line break in the header", "blank lines before the header", "semicolons in quoted names",
    "empty field at the end of each row", "carriage returns only", "row names without a header cell",
])
def test_files_as_users_have_them_give_the_clean_result(tmp_path, hs_data, hs_three, change):
    """Each variant of one file reads to the same data: the chi-square of Holzinger & Swineford's
    three factors, 85.306 (recalled from memory, also test_holzinger_swineford_published.py)."""
    text = _clean_csv(hs_data)
    header, body = text.split("\n", 1)
    encoding = "utf-8"
    notes = []
    if change == "utf-16":
        encoding = "utf-16"
    elif change == "cp1252 byte 0x85 in the header":
        header, encoding = header.replace("ageyr", "age\x85yr"), "latin-1"
    elif change == "line separator in the header":
        header = header.replace("ageyr", "age\u2028yr")
    elif change == "form feed in the header":
        header = header.replace("ageyr", "age\x0cyr")
    elif change == "quoted line break in the header":
        header = header.replace("ageyr", '"age\nin years"')
    elif change == "blank lines before the header":
        header = "\n\n" + header
    elif change == "semicolons in quoted names":
        header = header.replace("id", '"id;number"').replace("school", '"school;name"').replace("ageyr", '"age;yr"')
    elif change == "empty field at the end of each row":
        body = "\n".join(line + "," for line in body.rstrip("\n").split("\n")) + "\n"
        notes = ["empty fields at the end of the lines (a delimiter after the last value) were ignored"]
    elif change == "carriage returns only":
        header, body = header, body.replace("\n", "\r")
    elif change == "row names without a header cell":
        header = "," + header
        body = "\n".join(f"pupil {k},{line}" for k, line in enumerate(body.rstrip("\n").split("\n"))) + "\n"
        notes = ["the first column has no name in the header and was read as row names, not as data"]
    path = tmp_path / "answers.csv"
    path.write_bytes((header + ("\r" if change == "carriage returns only" else "\n") + body).encode(encoding))
    result = cfa_tool.fit(THREE_FACTORS, path)
    assert result.n_obs == 301
    assert result.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-6)
    for note in notes:
        assert any(note in w for w in result.warnings), result.warnings


def test_model_text_or_path_by_explicit_rules(tmp_path, hs_items):
    long_text = "factor visual: x1, x2, x3  # " + "a long comment " * 30
    assert len(long_text) > 255
    assert cfa_tool.fit(long_text, hs_items).converged  # one long line is model text, never tried as a file
    model = tmp_path / "three.cfa"
    model.write_text(THREE_FACTORS)
    assert cfa_tool.fit(str(model), hs_items).converged  # one line ending in .cfa: a model file
    other = tmp_path / "three.txt"
    other.write_text(THREE_FACTORS)
    assert cfa_tool.fit(other, hs_items).converged  # a Path is a file, whatever its extension
    with pytest.raises(ModelError, match="to read a model file, pass a pathlib.Path"):
        cfa_tool.fit(str(other), hs_items)
    with pytest.raises(ModelError, match="is a folder, not a model file"):
        cfa_tool.fit(tmp_path, hs_items)
    with pytest.raises(ModelError, match="does not exist"):
        cfa_tool.fit(str(tmp_path / "missing.cfa"), hs_items)


@pytest.mark.parametrize("options, words", [
    ({"n_obs": float("nan")}, "must be a whole number, not nan"),
    ({"n_obs": 300.7}, "must be a whole number, not 300.7"),
    ({"n_obs": "301"}, "must be a whole number, not '301'"),
    ({"sds": [1.0] * 8}, "give 9 positive standard deviations, one per variable (8 given)"),
    ({"sds": [1.0] * 8 + [-1.0]}, "the standard deviation of 'x9' is -1; standard deviations must be positive"),
    ({"means": [0.0] * 10}, "give 9 finite means, one per variable (10 given)"),
    ({"asymmetric": True}, "the matrix is not symmetric (row 1, column 2 differs from row 2, column 1)"),
    ({"variables": ITEMS[:8] + ["x1"]}, "the variable 'x1' is named twice"),
])
def test_summary_statistics_from_python_are_checked_like_files(hs_items, options, words):
    cov = hs_items[ITEMS].cov().to_numpy().copy()
    if options.pop("asymmetric", False):
        cov[1, 0] += 0.5
    arguments = {"n_obs": 301, "variables": ITEMS, **options}
    if "sds" in options:  # standard deviations go with a correlation matrix
        cov = hs_items[ITEMS].corr().to_numpy()
        arguments["matrix"] = "correlation"
    with pytest.raises((DataError, OptionError)) as info:
        cfa_tool.fit(THREE_FACTORS, covariance=cov, **arguments)
    assert words in str(info.value)


@pytest.mark.parametrize("variables, words", [
    (["x4", "x2", "x3", "x1", "x5", "x6", "x7", "x8", "x9"],
     "variables names 'x4' as variable 1, where the frame's labels name 'x1'"),
    (ITEMS[:8], "variables names 8 variables and the frame's labels 9"),
])
def test_variables_that_contradict_a_labelled_frame_are_an_error(hs_items, variables, words):
    frame = hs_items[ITEMS].cov()  # labelled x1..x9 on both sides
    with pytest.raises(OptionError) as info:
        cfa_tool.fit(THREE_FACTORS, covariance=frame, n_obs=301, variables=variables)
    assert words in str(info.value)
    same = cfa_tool.fit(THREE_FACTORS, covariance=frame, n_obs=301, variables=list(ITEMS))  # agreeing: accepted
    assert same.fit.chi_square == pytest.approx(cfa_tool.fit(THREE_FACTORS, covariance=frame, n_obs=301).fit.chi_square)


def test_python_options_of_the_wrong_type(hs_items):
    from cfa_tool.workflows.bootstrap import bootstrap

    with pytest.raises(OptionError, match="the number of replications must be a whole number, not '10'"):
        bootstrap(THREE_FACTORS, hs_items, replications="10")
    with pytest.raises(OptionError, match="must be a whole number, not 20.5"):
        bootstrap(THREE_FACTORS, hs_items, replications=20.5)
    # one number for missing_codes is read as a list of one
    coded = hs_items.copy()
    coded.loc[0, "x1"] = -99
    result = cfa_tool.fit(THREE_FACTORS, coded, missing_codes=-99, missing="listwise")
    assert result.n_obs == 300
    # text that reads as a number is that code, as on the command line (scores-s15: one rule for both)
    assert cfa_tool.fit(THREE_FACTORS, coded, missing_codes="-99", missing="listwise").n_obs == 300
    with pytest.raises(OptionError, match="missing_codes must be a list of numbers and words, not object"):
        cfa_tool.fit(THREE_FACTORS, coded, missing_codes=object())


@pytest.mark.parametrize("column, words", [
    (lambda n: pd.Series(pd.date_range("2020-01-01", periods=n)), "holds dates or times"),
    (lambda n: pd.Series(np.arange(n) + 1j), "holds complex numbers"),
    (lambda n: pd.Series(np.arange(n) % 2 == 0), "holds TRUE/FALSE values"),
    (lambda n: pd.Series([10**400] + list(range(n - 1)), dtype=object), "the number is too large to compute with"),
])
def test_columns_that_are_not_numbers(hs_items, column, words):
    frame = hs_items.copy()
    frame["x1"] = column(len(frame))
    with pytest.raises(DataError, match=words):
        cfa_tool.fit(THREE_FACTORS, frame)


def test_excel_dates_are_not_numbers(tmp_path, hs_items):
    frame = hs_items.copy()
    frame["x1"] = pd.date_range("2020-01-01", periods=len(frame))
    path = tmp_path / "dates.xlsx"
    frame.to_excel(path, index=False)
    with pytest.raises(DataError, match="column 'x1' holds dates or times"):
        cfa_tool.fit(THREE_FACTORS, path)


def test_summary_csv_in_utf16_and_the_old_form_in_a_csv(tmp_path, hs_items, hs_three):
    cov = np.cov(hs_items[ITEMS].to_numpy().T)
    text = Path(_lower_triangle_file(tmp_path, cov, 301, ITEMS)).read_text()
    wide = tmp_path / "wide.csv"
    wide.write_bytes(text.encode("utf-16"))  # what a spreadsheet's 'Unicode text' writes, with its byte-order mark
    assert cfa_tool.fit(THREE_FACTORS, str(wide)).fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-9)
    old = tmp_path / "old.csv"
    old.write_text("variables: a b c\nobservations: 100\nmatrix: covariance\nvalues:\n1\n.5 1\n.4 .3 1\n")
    with pytest.raises(DataError, match="earlier keyword form of a summary-statistics file"):
        cfa_tool.fit("factor f: a, b, c\n", str(old))


def test_tab_separated_utf16_with_decimal_commas(tmp_path, hs_data, hs_three):
    # what a spreadsheet's 'Unicode text' export writes in a decimal-comma locale: the same fit as the CSV
    items = [f"x{i}" for i in range(1, 10)]
    text = hs_data[items].to_csv(sep="\t", index=False).replace(".", ",")
    path = tmp_path / "unicode.txt"
    path.write_bytes(text.encode("utf-16"))
    assert cfa_tool.fit(THREE_FACTORS, str(path)).fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-9)


def test_row_filters_are_stated_where_the_rows_are(hs_data, tmp_path):
    # the data line, the methods paragraph and the JSON name the filters and the rows the file held; what reading
    # the file noted (here: a row-name column) is still said when a filter is applied
    from cfa_tool.reporting.paragraph import methods_paragraph
    from cfa_tool.reporting.tables import rows_phrase

    path = tmp_path / "rows.csv"
    hs_data.to_csv(path)  # the index written as a first column without a name: row names
    result = cfa_tool.fit(THREE_FACTORS, path, keep=["school = Pasteur"])
    assert rows_phrase(result.data) == ("156 rows analysed of 156 kept by the row filter 'school = Pasteur' "
                                        "(301 rows in the file)")
    # in a methods section's words, not the option's syntax (a new-user trial found command syntax in the paragraph)
    assert "N = 156 of the 301 rows in the data file, those where school was Pasteur" in methods_paragraph(result)
    two = cfa_tool.fit(THREE_FACTORS, path, keep=['"school" != Pasteur', "x1 >= 4"])
    kept = int(((hs_data["school"] != "Pasteur") & (hs_data["x1"] >= 4)).sum())
    assert (f"N = {kept} of the 301 rows in the data file, those where school was not Pasteur and x1 was at least 4"
            in " ".join(methods_paragraph(two).split()))
    saved = result.to_dict()["data"]
    assert saved["row_filters"] == ["school = Pasteur"] and saved["rows_in_file"] == 301
    assert any("read as row names" in w for w in result.warnings)
    assert any("kept 156 of 301 rows" in w for w in result.warnings)
    unfiltered = cfa_tool.fit(THREE_FACTORS, path)
    assert rows_phrase(unfiltered.data) == "301 rows analysed of 301 read"
    assert "row_filters" not in unfiltered.to_dict()["data"]


def test_a_filter_comparing_with_text_names_the_value(hs_data):
    # a hostile trial: 'x1 > abc' said "'x1' holds text" although x1 holds numbers
    with pytest.raises(OptionError, match="'abc' is not a number, and > compares numbers"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["x1 > abc"])
    with pytest.raises(OptionError, match="'1,5' is not a number"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["x1 > 1,5"])
    with pytest.raises(OptionError, match="'school' of <data frame> holds text"):
        cfa_tool.fit(THREE_FACTORS, hs_data, keep=["school > 3"])


def test_a_header_with_decomposed_accents_names_the_models_column(tmp_path, hs_items):
    # a header saved with decomposed accents ('e' + combining acute, as some systems write it) and a model that
    # quotes the composed name: the same column (it was 'unknown variable ... did you mean' the same-looking name)
    import unicodedata

    composed = "qualit\u00e9"
    data = hs_items[ITEMS].rename(columns={"x3": unicodedata.normalize("NFD", composed)})
    path = tmp_path / "nfd.csv"
    data.to_csv(path, index=False)
    assert unicodedata.normalize("NFD", composed) in path.read_text(encoding="utf-8")
    model = THREE_FACTORS.replace("x1, x2, x3", f'x1, x2, "{composed}"')
    assert cfa_tool.fit(model, path).converged
    again = cfa_tool.fit(model.replace(composed, unicodedata.normalize("NFD", composed)), path)  # either way
    assert again.converged


def test_cells_written_as_a_marker_of_no_answer_are_said(tmp_path):
    # new-user trial: a file from a statistics package wrote '.' for no answer; it was read so without a word
    from cfa_tool.data.readers import read_data

    path = tmp_path / "dots.tsv"
    path.write_text("a\tb\tc\n1\t.\t3\nNA\t2\t3.5\n4\t5\t6\n")
    loaded = read_data(path)
    assert loaded.frame.isna().sum().to_dict() == {"a": 1, "b": 1, "c": 0}
    assert any("cells written as 'NA' (1 cell), '.' (1 cell) were read as no answer" in n for n in loaded.notes)
    plain = tmp_path / "plain.csv"
    plain.write_text("a,b\n1,2.5\n,3\n")
    assert not any("read as no answer" in n for n in read_data(plain).notes)


def test_lines_are_counted_as_the_split_text_counts_them():
    """--names-row checks its line against the file's line count, counted without splitting the whole text
    (input_files.line_count); the reference is the split of the normalised text, every string of up to five pieces."""
    import itertools

    from cfa_tool.input_files import line_count, normalise_line_ends, text_lines

    pieces = ["a", "\n", "\r", "\r\n", ""]
    for n in range(6):
        for combo in itertools.product(pieces, repeat=n):
            text = "".join(combo)
            assert line_count(text) == len(text_lines(normalise_line_ends(text))), repr(text)


def test_a_note_merged_across_the_table_under_the_data_is_a_footer(tmp_path, hs_items):
    # hostile s21: a 'Source: ...' line under the data, merged across the table's width as spreadsheets lay such lines
    # out, stopped the run with advice to unmerge it and fill every cell; the same line in one cell is skipped as a
    # footer, and so is the merged one now: the same fit as the data frame's; a merged range among the answers is
    # still refused
    import openpyxl

    data = hs_items[ITEMS].round(6)
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(ITEMS)
    for row in data.itertuples(index=False):
        sheet.append(list(row))
    sheet.append([None] * 9)
    sheet.append(["Source: the 1939 tests, rounded"] + [None] * 8)
    last = sheet.max_row
    sheet.merge_cells(f"A{last}:I{last}")
    path = tmp_path / "footer.xlsx"
    book.save(path)
    assert cfa_tool.fit(THREE_FACTORS, path).fit.chi_square == pytest.approx(
        cfa_tool.fit(THREE_FACTORS, data).fit.chi_square, rel=1e-9)
    sheet.cell(5, 1, 4.5)
    sheet.merge_cells("A5:A6")  # a value shown over two rows of answers
    book.save(path)
    with pytest.raises(DataError, match="merged"):
        cfa_tool.fit(THREE_FACTORS, path)
