"""The reading's notes on cells read as no answer count the rows analysed, by the one rule of data.kept_counts
(rows-s23): a fit of groups leaves out the rows without a value in the group column, and its notes on codes given
with --missing-codes, on cells that say no answer, on cells written as 'NA' or '.' and on words of --missing-codes
that no cell holds counted them still; the notes on 'NA'/'.' markers and on unused words counted every row read even
when row filters chose the rows.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with cells set here;
every expected count is counted below with pandas from the file written."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool

NO_GROUP = list(range(10))  # the rows without a district


def _survey(rider_demo, tmp_path) -> tuple[pd.DataFrame, str]:
    frame = rider_demo.astype(object)
    frame.loc[NO_GROUP, "district"] = None
    frame.loc[0:5, "on_time"] = -99  # rows left out
    frame.loc[[20, 21], "clean"] = -99  # rows analysed
    frame.loc[6:8, "helpful"] = "refused"
    frame.loc[30, "helpful"] = "refused"
    frame.loc[6:7, "respectful"] = "Sans avis"  # a word given, held only by rows left out
    frame.loc[NO_GROUP, "greeting"] = "NA"
    frame.loc[40, "greeting"] = "NA"
    frame.loc[41, "clear_answers"] = "."
    path = tmp_path / "survey.csv"
    frame.to_csv(path, index=False)
    return frame, str(path)


def _notes(result) -> list[str]:
    """The notes of ``result``, each without the file's folder, and the option shown as 'missing_codes'."""
    return [str(w).split("/")[-1].replace("missing_codes=...", "missing_codes") for w in result.warnings]


def test_a_fit_of_groups_counts_the_rows_with_a_group_label(rider_demo, rider_model, tmp_path):
    frame, path = _survey(rider_demo, tmp_path)
    result = cfa_tool.fit(rider_model, path, group="district", missing_codes=[-99, "Nope", "Sans avis"])
    kept = frame[frame["district"].notna()]  # pandas: the rows with a group label
    among = f"the {len(kept)} rows with a value in the group column 'district'"
    assert len(kept) == result.n_obs == 470
    na, dot = int((kept == "NA").to_numpy().sum()), int((kept == ".").to_numpy().sum())
    clean, refused = int((kept["clean"] == -99).sum()), int((kept["helpful"] == "refused").sum())
    notes = _notes(result)
    assert f"survey.csv: cells written as 'NA' ({na} cell), '.' ({dot} cell) of {among} were read as no answer" in notes
    assert (f"survey.csv: {clean} cells of the items in {among} holding a code given with missing_codes (-99) were "
            f"read as no answer (clean {clean})") in notes
    assert any(n.startswith(f"{refused} cell of the items in the 470 rows of survey.csv with a value in the group "
                            f"column 'district' holds values that the file writes as no answer") for n in notes)
    # 'Sans avis' was read as no answer in rows left out only: among the rows analysed no cell holds it
    assert (f"survey.csv: no cell of the items in {among} holds any of the codes given with missing_codes ('Nope', "
            f"'Sans avis')") in notes
    assert not any("(-99) were read as no answer (on_time" in n for n in notes)
    # without groups every row is analysed: the notes count every row read
    whole = _notes(cfa_tool.fit(rider_model, path, missing_codes=[-99, "Nope", "Sans avis"]))
    assert (f"survey.csv: cells written as 'NA' ({int((frame == 'NA').to_numpy().sum())} cells), '.' (1 cell) were "
            f"read as no answer") in whole
    assert "survey.csv: no cell of the items holds any of the codes given with missing_codes ('Nope')" in whole


def test_markers_and_unused_words_count_the_rows_the_row_filters_kept(rider_demo, rider_model, tmp_path):
    frame, path = _survey(rider_demo, tmp_path)
    result = cfa_tool.fit(rider_model, path, missing_codes=[-99, "Sans avis"], keep="rider_id not in R0007, R0008, R0009, R0010")
    kept = frame[~frame["rider_id"].isin(["R0007", "R0008", "R0009", "R0010"])]  # pandas: the rows kept
    na = int((kept == "NA").to_numpy().sum())
    notes = _notes(result)
    assert f"survey.csv: cells written as 'NA' ({na} cells), '.' (1 cell) of the {len(kept)} rows that the row " \
           f"filters kept were read as no answer" in notes
    # 'Sans avis' only in rows 7 and 8 of the file (frame rows 6 and 7: R0007, R0008), which the filter left out
    assert (f"survey.csv: no cell of the items in the {len(kept)} rows that the row filters kept holds any of the "
            f"codes given with missing_codes ('Sans avis')") in notes


@pytest.mark.parametrize("keep", [None, "rider_id not in R0100, R0101"])
def test_an_excel_workbooks_markers_count_the_rows_analysed(rider_demo, rider_model, tmp_path, keep):
    frame, _ = _survey(rider_demo, tmp_path)
    path = tmp_path / "survey.xlsx"
    frame.to_excel(path, index=False)
    result = cfa_tool.fit(rider_model, str(path), group="district", missing_codes=[-99], keep=keep)
    kept = frame[frame["district"].notna() & (~frame["rider_id"].isin(["R0100", "R0101"]) if keep else True)]
    among = f"of the {len(kept)} rows {'that the row filters kept ' if keep else ''}with a value in the group column"
    na = int((kept == "NA").to_numpy().sum())
    dot = int((kept == ".").to_numpy().sum())
    said = f"'NA' ({na} cell), " + (f"'.' ({dot} cell) " if dot else "")
    assert f"survey.xlsx: cells written as {said}{among} 'district' were read as no answer" in _notes(result)


def _paragraph(result) -> str:
    from cfa_tool.reporting.paragraph import methods_paragraph

    return " ".join(str(methods_paragraph(result)).split())


def test_what_only_rows_left_out_held_is_not_said_of_the_analysis(rider_demo, rider_model, tmp_path):
    """Rows without a group label leave a fit of groups for want of one: the values read as no answer in them are
    neither a caution ('rows leave the analysis because values read as no answer emptied their cells') nor named by
    the methods paragraph; nor is a code that only rows left out by a row filter held."""
    from cfa_tool.assessment.admissibility import ProblemKind

    frame = rider_demo.astype(object)
    frame.loc[NO_GROUP, "district"] = None
    frame.loc[0:5, "on_time"] = -99
    frame.loc[6:8, "helpful"] = "refused"
    path = tmp_path / "survey.csv"
    frame.to_csv(path, index=False)
    result = cfa_tool.fit(rider_model, str(path), group="district", missing_codes=[-99], missing="listwise")
    assert ProblemKind.VALUES_READ_AS_MISSING not in [p.kind for p in result.problems]
    text = _paragraph(result)
    assert "10 of 480 rows had no value of district" in text  # (pandas: the 10 rows set above)
    assert "declared to mean no answer" not in text and "'refused'" not in text
    # the same cells in rows with a group label: named, and the rows they empty are a caution
    labelled = frame.copy()
    labelled.loc[NO_GROUP, "district"] = "north"
    labelled.to_csv(path, index=False)
    result = cfa_tool.fit(rider_model, str(path), group="district", missing_codes=[-99], missing="listwise")
    [caution] = [p for p in result.problems if p.kind is ProblemKind.VALUES_READ_AS_MISSING]
    assert str(caution.explanation).startswith("3 rows leave the analysis")  # the 3 rows of 'refused' (rows 6 to 8)
    text = _paragraph(result)
    assert "the code -99, declared to mean no answer, was treated as missing" in text and "'refused'" in text
    # a row filter that leaves out every row holding -99: the paragraph names no code
    frame.loc[NO_GROUP, "district"] = "north"
    frame.to_csv(path, index=False)
    kept = cfa_tool.fit(rider_model, str(path), missing_codes=[-99],
                        keep="rider_id not in R0001, R0002, R0003, R0004, R0005, R0006")
    assert "declared to mean no answer" not in _paragraph(kept)
