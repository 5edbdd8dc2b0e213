"""Blank text cells and labelled codes as statistics programs and spreadsheets write them (hostile tester s8, cases
03, 04 and 25).

The reference for every reader is the same data as a plain CSV file with empty cells, which the tool reads
right: an SPSS or Stata text variable holding '' for no answer, an Excel cell holding a space and a DataFrame
holding '' must give the check, the choice of the missing-data handling and the fit of that CSV file.  The data
are the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed); SPSS and Stata
files are written by pyreadstat and pandas, workbooks by openpyxl: writers this project did not write."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.non_answers import says_no_answer, unlabelled_extra_codes
from cfa_tool.data.readers import read_data

pyreadstat = pytest.importorskip("pyreadstat")


def _items(frame: pd.DataFrame) -> list[str]:
    return list(frame.columns[2:])


def _as_text(frame: pd.DataFrame) -> pd.DataFrame:
    """The items as text ('3'), '' where no answer was given, as survey exports write SPSS text variables."""
    out = frame.copy()
    for c in _items(frame):
        out[c] = out[c].map(lambda v: "" if v != v else str(int(v)))
    return out


@pytest.fixture(scope="module")
def reference(rider_demo, rider_model, tmp_path_factory):
    """The check and the fit of the demo as a plain CSV file (its empty cells are no answers)."""
    path = tmp_path_factory.mktemp("csv") / "riders.csv"
    rider_demo.to_csv(path, index=False)
    return cfa_tool.check(rider_model, str(path)), cfa_tool.fit(rider_model, str(path))


def _same_as_reference(rider_model, data, reference):
    check, fit = reference
    gaps = int(check.with_gaps)
    assert gaps == 9  # the demo's rows with a missing item answer, counted in its CSV file by pandas
    mine = cfa_tool.check(rider_model, data)
    assert (mine.complete, mine.with_gaps) == (check.complete, check.with_gaps)
    result = cfa_tool.fit(rider_model, data)
    assert result.method.missing is fit.method.missing  # full information: every row kept, as with the CSV
    assert result.n_obs == fit.n_obs == 480
    assert result.fit.chi_square == pytest.approx(fit.fit.chi_square, rel=1e-8)


def test_spss_text_items_with_blank_cells_read_as_the_csv(rider_demo, rider_model, reference, tmp_path):
    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(_as_text(rider_demo), str(path))
    _same_as_reference(rider_model, str(path), reference)


def test_stata_text_items_with_blank_cells_read_as_the_csv(rider_demo, rider_model, reference, tmp_path):
    path = tmp_path / "riders.dta"
    pyreadstat.write_dta(_as_text(rider_demo), str(path))
    _same_as_reference(rider_model, str(path), reference)


def test_excel_cells_holding_a_space_read_as_the_csv(rider_demo, rider_model, reference, tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(list(rider_demo.columns))
    for row in rider_demo.itertuples(index=False):
        sheet.append([(" " if v != v else v) if isinstance(v, float) else v for v in row])
    path = tmp_path / "riders.xlsx"
    book.save(path)
    _same_as_reference(rider_model, str(path), reference)


def test_data_frame_with_blank_strings_reads_as_the_csv_and_is_left_unchanged(rider_demo, rider_model, reference):
    frame = _as_text(rider_demo)
    column = next(c for c in _items(rider_demo) if (frame[c] == "").any())
    frame.loc[frame.index[frame[column] == ""][0], column] = "   "  # spaces only
    before = frame.copy()
    _same_as_reference(rider_model, frame, reference)
    pd.testing.assert_frame_equal(frame, before)  # the caller's frame is not altered


def test_csv_cell_na_with_a_space_is_the_no_answer_na(rider_demo, tmp_path):
    """Hostile case 20: 'NA ' was refused as text ('NA'); it is the marker 'NA' of no answer, as 'NA' is."""
    text = rider_demo.to_csv(index=False, na_rep="NA ")
    path = tmp_path / "riders.csv"
    path.write_text(text)
    loaded = read_data(path)
    items = _items(rider_demo)
    assert loaded.frame[items].dtypes.map(lambda d: d.kind in "iuf").all()
    assert int(loaded.frame[items].isna().to_numpy().sum()) == int(rider_demo[items].isna().to_numpy().sum())
    assert any("'NA'" in note for note in loaded.notes)  # the reading is said


def test_spss_text_items_with_labelled_text_codes(rider_demo, rider_model, tmp_path):
    """Hostile case 25: text codes with value labels crashed the label table ({code:g} of a str), and the text
    code '9' labelled "Don't know" was analysed; now its cells are read as missing and named first."""
    data = _as_text(rider_demo.dropna())
    items = _items(rider_demo)
    rows = data.index[::25]
    data.loc[rows, "clean"] = "9"
    labels = {c: {"1": "Strongly disagree", "2": "Disagree", "3": "Neither", "4": "Agree", "5": "Strongly agree"}
              for c in items}
    labels["clean"]["9"] = "Don't know"
    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels=labels)
    result = cfa_tool.fit(rider_model, str(path))
    assert result.n_obs == len(data)  # 471 complete rows of the demo; the cells of '9' are gaps, kept by FIML
    assert result.missing_data["coverage"]["clean"] == pytest.approx(1 - len(rows) / len(data))
    # no row lost (full information keeps the rows): a note, not a caution (s14)
    [first] = [w for w in result.warnings if "read as missing, not as answers" in w]
    assert "Don't know" in first and f"clean {len(rows)}" in first
    from cfa_tool.reporting.tables import label_tables

    table = {row[0]: row[1] for row in label_tables(result)[-1].rows}
    assert table["clean"].startswith("1 = Strongly disagree")


@pytest.mark.parametrize("text", ["N/A", "NA", "Decline to answer", "Does not apply to me", "Not sure", "No opinion",
                                  "Unsure", "DK/NA", "Can't say", "Don't know", "n/a"])
def test_further_labels_of_no_answer(text):
    """Labels survey files use for no answer (hostile case 04; common practice of survey codebooks)."""
    assert says_no_answer(text)


def test_an_explained_label_of_no_answer():
    assert says_no_answer("Not applicable / never ride", explained=True)


@pytest.mark.parametrize("text", ["Not at all", "Never", "Neither agree nor disagree", "Not very satisfied",
                                  "Not at all likely", "Nearly never", "Something else", "Sure"])
def test_answers_that_begin_like_no_answers_stay_answers(text):
    assert not says_no_answer(text) and not says_no_answer(text, explained=True)


AGREE = {1: "Strongly disagree", 2: "Disagree", 3: "Neither agree nor disagree", 4: "Agree", 5: "Strongly agree"}


def test_stata_code_labelled_na_is_read_as_missing(rider_demo, rider_model, tmp_path):
    data = rider_demo.copy()
    items = _items(rider_demo)
    data.loc[::20, "clean"] = 6
    for c in items:
        data[c] = data[c].astype("float64")
    labels = {c: dict(AGREE) for c in items}
    labels["clean"][6] = "N/A"
    path = tmp_path / "riders.dta"
    data.to_stata(path, write_index=False, value_labels=labels, version=118)
    result = cfa_tool.fit(rider_model, str(path))
    [said] = [w for w in result.warnings if "read as missing, not as answers" in w]  # a note: no row lost (s14)
    assert "'N/A'" in said and "clean 24" in said  # rows 1, 21, ... 461
    assert np.nanmax(read_data(path).frame["clean"]) == 5


def test_a_labelled_code_beyond_the_scale_is_named_first(rider_demo, rider_model, tmp_path):
    data = rider_demo.copy()
    data.loc[::20, "clean"] = 6
    labels = {c: dict(AGREE) for c in _items(rider_demo)}
    labels["clean"][6] = "Something else"
    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(data, str(path), variable_value_labels=labels)
    check = cfa_tool.check(rider_model, str(path))
    first = check.problems[0].explanation
    assert "clean" in first and "'Something else'" in first and "24 cells" in first
    assert "missing_codes=[6]" in check.problems[0].advice  # the keyword: a Python call


@pytest.mark.parametrize("labels, present", [
    (AGREE, [1, 2, 3, 4, 5]),
    ({1: "Strongly disagree", 2: "Disagree", 3: "Slightly disagree", 4: "Slightly agree", 5: "Agree",
      6: "Strongly agree"}, [1, 2, 3, 4, 5, 6]),
    ({1: "Never", 2: "Sometimes", 3: "Often", 4: "Always"}, [1, 2, 3, 4]),
    ({0: "Not at all satisfied", 1: "Slightly", 2: "Moderately", 3: "Very satisfied", 4: "Completely satisfied"},
     [0, 1, 2, 3, 4]),
])
def test_ordinary_answer_scales_raise_no_caution(labels, present):
    assert unlabelled_extra_codes(np.array(present, dtype=float), labels) == []


def test_a_code_apart_from_the_scale_raises_the_caution():
    labels = {**AGREE, 9: "Other"}
    assert unlabelled_extra_codes(np.array([1, 2, 3, 4, 5, 9.0]), labels) == [(9.0, "Other")]
    assert unlabelled_extra_codes(np.array([1, 2, 3, 4, 5.0]), labels) == []  # not given: nothing to say


def test_a_no_answer_label_on_a_text_code_is_read_as_missing():
    """A text variable whose codes are letters ('a' to 'c', 'x' labelled "Don't know"): the cells of 'x' are no
    answer, counted here by hand (rows 2 and 5)."""
    from cfa_tool.data.non_answers import labelled_non_answers

    frame = pd.DataFrame({"mode": ["a", "x", "b", "c", " x", "a"]})
    out, found = labelled_non_answers(frame, {"mode": {"a": "bus", "b": "tram", "c": "ferry", "x": "Don't know"}})
    assert out["mode"].isna().tolist() == [False, True, False, False, True, False]
    assert [(f.value, f.rows) for f in found] == [("x", (1, 4))]  # the frame's index labels
    assert frame["mode"].notna().all()  # the frame given is left as it was


def test_blank_cells_of_every_kind_of_text_column_in_a_data_frame():
    """The text columns are found from the frame's dtypes (pandas' text and object columns; categories are no text
    column): blanks read as no answer in each (beside lists in an object column too), a column left with numbers only
    read as numbers, and a frame without blanks returned as it is (not copied)."""
    from cfa_tool.data.readers import blank_text_as_missing

    frame = pd.DataFrame({"district": ["north", " ", "south"], "q1": [1.0, 2.0, 3.0],
                          "kind": pd.Categorical(["a", " ", "b"]), "lists": pd.Series([[1], [2], " "], dtype=object),
                          "q2": pd.Series(["", 4, 5], dtype=object), "q3": pd.array(["x", "", None], dtype="string")})
    out = blank_text_as_missing(frame)
    assert out["district"].isna().tolist() == [False, True, False]
    assert out["kind"].tolist() == ["a", " ", "b"]  # categories are not text cells
    assert out["lists"].tolist()[:2] == [[1], [2]] and pd.isna(out["lists"].iloc[2])  # lists are no text; ' ' is
    assert out["q2"].dtype == float and out["q2"].isna().tolist() == [True, False, False]
    assert out["q3"].isna().tolist() == [False, True, True]
    assert frame["district"].tolist() == ["north", " ", "south"]  # the caller's frame is not changed
    clean = frame.drop(columns=["district", "lists", "q2", "q3"])
    assert blank_text_as_missing(clean) is clean


def test_variables_labelled_alike_share_one_line_of_the_label_table(rider_demo, rider_model, tmp_path):
    """New-user trial s15 (16): twenty items labelled alike made twenty identical lines; they share one line that
    names them, while the table's data (CSV) keep one row per variable."""
    from cfa_tool.reporting.tables import label_tables

    items = _items(rider_demo)
    labels = {c: {1: "Strongly disagree", 2: "Disagree", 3: "Neither", 4: "Agree", 5: "Strongly agree"} for c in items}
    labels["clean"] = {**labels["clean"], 9: "Don't know"}
    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(rider_demo.dropna(), str(path), variable_value_labels=labels)
    table = label_tables(cfa_tool.fit(rider_model, str(path)))[-1]
    others = [c for c in items if c != "clean"]
    assert [row[0] for row in table.rows] == [", ".join(others) + f" ({len(others)} variables)", "clean"]
    assert [row[0] for row in table.values] == list(items)
