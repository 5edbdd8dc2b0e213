"""Rows named by an id column (--id) or by the file's row names, in the case diagnostics of a fit.

The expected ids are read from the data file itself (Holzinger & Swineford 1939, tests/datasets):
its first header cell is empty (a row-name column "1", "2", ...) and its column 'id' holds the
pupils' numbers, which skip values (row 105 is pupil 114), so a wrong row-to-id mapping shows.
"""

from __future__ import annotations

import json

import pandas as pd
import pytest

from cfa_tool.cli import main
from cfa_tool.data.readers import read_data
from tests.conftest import DATASETS, THREE_FACTORS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"


def test_the_row_name_column_is_kept_as_text_beside_the_data():
    loaded = read_data(HS_FILE)
    raw = pd.read_csv(HS_FILE, index_col=0)
    assert "" not in loaded.frame.columns and "id" in loaded.frame.columns
    assert loaded.row_names.tolist() == [str(v) for v in raw.index]  # the file's first column
    assert loaded.row_names.index.equals(loaded.frame.index)


def _cases(tmp_path, capsys, *extra):
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    code = main(["fit", str(model), "--data", str(HS_FILE), "--json", "-", *extra])
    out = capsys.readouterr()
    assert code == 0, out.err
    return json.loads(out.out)["diagnostics"]["influential_cases"]


def test_fit_names_the_case_diagnostics_by_the_id_column(tmp_path, capsys):
    raw = pd.read_csv(HS_FILE, index_col=0)
    cases = _cases(tmp_path, capsys, "--id", "id")
    assert cases
    for case in cases:
        # rows are named by the file's lines (the header is line 1): row k is the (k-1)-th row after the header
        assert case["id"] == str(raw["id"].iloc[case["row"] - 2])
    assert any(case["id"] != str(case["row"]) for case in cases)  # the ids are not the row numbers


def test_without_id_column_the_row_names_name_the_cases(tmp_path, capsys):
    raw = pd.read_csv(HS_FILE, index_col=0)
    for case in _cases(tmp_path, capsys):
        assert case["id"] == str(raw.index[case["row"] - 2])


def test_a_filtered_fit_keeps_the_ids_of_the_rows_it_analysed(tmp_path, capsys):
    raw = pd.read_csv(HS_FILE, index_col=0)
    cases = _cases(tmp_path, capsys, "--id", "id", "--keep", "school = Grant-White")
    for case in cases:
        assert raw["school"].iloc[case["row"] - 2] == "Grant-White"
        assert case["id"] == str(raw["id"].iloc[case["row"] - 2])


def test_an_id_column_is_kept_as_written(tmp_path, hs_data):
    # ids such as '0007' are text: read as numbers they would become 7
    import cfa_tool

    frame = hs_data[[f"x{i}" for i in range(1, 10)]].copy()
    frame.insert(0, "code", [f"{k:04d}" for k in range(1, len(frame) + 1)])
    frame.iloc[3, 0] = None
    path = tmp_path / "coded.csv"
    frame.to_csv(path, index=False)
    model = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    scored = cfa_tool.scores(model, str(path), id_column="code")
    ids = scored.table["code"].tolist()
    assert ids[0] == "0001" and ids[300] == "0301" and pd.isna(ids[3])
    assert scored.csv().splitlines()[4].startswith(",")  # a missing id is an empty cell, not the text 'nan'
    fitted = cfa_tool.fit(model, str(path), id_column="code")
    named = [c.id for c in fitted.groups[0].influential_cases]
    assert all(i is None or (len(i) == 4 and i.isdigit()) for i in named)


def test_repeated_ids_are_noted_by_fit(tmp_path, hs_data):
    import cfa_tool

    frame = hs_data[[f"x{i}" for i in range(1, 10)]].copy()
    frame.insert(0, "code", ["007"] * len(frame))
    path = tmp_path / "same.csv"
    frame.to_csv(path, index=False)
    result = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n",
                          str(path), id_column="code")
    # s20: a caution first (pipeline.inputs.repeated_id_problems), no longer a note among the warnings; the 301 rows
    # of Holzinger & Swineford (1939) all hold '007' here, from file row 2 (under the header) on
    from cfa_tool.assessment.admissibility import ProblemKind

    first = result.problems[0]
    assert first.kind is ProblemKind.REPEATED_IDS
    assert "The id column 'code' gives one id to 301 rows: '007' in rows 2, 3, 4, 5 and 297 more" in first.explanation
    assert not any("repeat" in str(w) for w in result.warnings)


def test_rows_with_gaps_are_named_by_the_id_column_under_full_information(tmp_path, capsys):
    # a few blanks make the default fit full-information ML; the case table is there and names its rows
    raw = pd.read_csv(HS_FILE, index_col=0)
    gaps = raw.copy()
    gaps.iloc[::7, gaps.columns.get_loc("x5")] = None
    path = tmp_path / "gaps.csv"
    gaps.to_csv(path, index=False)
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    code = main(["fit", str(model), "--data", str(path), "--id", "id", "--json", "-"])
    out = capsys.readouterr()
    assert code == 0, out.err
    payload = json.loads(out.out)
    cases = payload["diagnostics"]["influential_cases"]
    assert cases and any(case["answered"] == 8 for case in cases + payload["diagnostics"]["unusual_cases"])
    for case in cases:
        assert case["id"] == str(raw["id"].iloc[case["row"] - 2])  # the file's own id of that row


def test_an_id_column_applies_to_a_fit_without_its_diagnostics(hs_data):
    # s20: refused once ('nothing to name'); every fit of rows names copies of earlier rows by it
    # (tests/commands/test_id_in_every_command.py), so it applies, and a wrong column is still an error
    import cfa_tool
    from cfa_tool.errors import OptionError

    frame = hs_data[[f"x{i}" for i in range(1, 10)]].copy()
    frame.insert(0, "code", [f"{k:04d}" for k in range(1, len(frame) + 1)])
    assert cfa_tool.fit(THREE_FACTORS, frame, id_column="code", diagnostics=False).n_obs == 301  # H&S 1939: 301 pupils
    with pytest.raises(OptionError, match="the id column 'cod' is not a column"):
        cfa_tool.fit(THREE_FACTORS, frame, id_column="cod", diagnostics=False)


def test_ids_read_alike_by_the_repeated_id_caution_and_the_scores_file(tmp_path, hs_data):
    """s21: one rule of an id's text (data.row_ids.id_text) for the caution and the scores file.  A data frame's id
    column of numbers with a gap is float: 16-digit ids became '1.23456789012346e+15' (the 15 digits of '%.15g'), two
    neighbours one id, so a false repeated-id caution and a scores file that merges back to nothing; 7.0 and 7 are the
    same number, one id; '007' and 7 of a text file are two; an empty cell is no id.  Check: pandas' own merge of
    the scores file back on the data (validate='one_to_one' refuses repeated keys) and the ids planted here."""
    import cfa_tool
    from cfa_tool.assessment.admissibility import ProblemKind

    model = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    frame = hs_data[[f"x{i}" for i in range(1, 10)]].reset_index(drop=True)
    frame.insert(0, "pid", [1234567890123456.0 + k for k in range(len(frame))])
    frame.loc[5, "pid"] = float("nan")  # a gap: the column stays float
    scored = cfa_tool.scores(model, frame, id_column="pid")
    assert not [p for p in scored.fit.problems if p.kind is ProblemKind.REPEATED_IDS]
    path = tmp_path / "scores.csv"
    path.write_text(scored.csv())
    written = pd.read_csv(path, dtype={"pid": str})
    assert written["pid"].iloc[0] == "1234567890123456" and written["pid"].iloc[1] == "1234567890123457"
    keys = frame["pid"].map(lambda v: None if pd.isna(v) else str(int(v)))
    merged = pd.DataFrame({"pid": keys}).dropna().merge(written.dropna(subset=["pid"]), on="pid",
                                                        validate="one_to_one")
    assert len(merged) == len(frame) - 1
    # 7.0 and 7 (one number) name two rows: the caution says so, and the scores file writes both as '7'
    frame["pid"] = [7.0, 7] + list(range(100, 100 + len(frame) - 2))
    scored = cfa_tool.scores(model, frame.astype({"pid": object}), id_column="pid")
    [caution] = [p for p in scored.fit.problems if p.kind is ProblemKind.REPEATED_IDS]
    assert "'7' in rows labelled 0, 1" in str(caution.explanation)
    assert [line.split(",")[0] for line in scored.csv().splitlines()[1:3]] == ["7", "7"]
    # a text file's '007' and 7 are two ids, written as they stand
    frame["pid"] = ["007", "7"] + [str(k) for k in range(100, 100 + len(frame) - 2)]
    data = tmp_path / "ids.csv"
    frame.to_csv(data, index=False)
    scored = cfa_tool.scores(model, str(data), id_column="pid")
    assert not [p for p in scored.fit.problems if p.kind is ProblemKind.REPEATED_IDS]
    assert [line.split(",")[0] for line in scored.csv().splitlines()[1:3]] == ["007", "7"]
