"""A data frame's rows are named by their index labels, as pandas names them (``frame.loc[105]``) and as the scores
table keeps them; a file's rows keep their file row numbers.

The reference for every label is pandas itself: the frame indexed from 100 is the bundled demo (a fictional transit
agency's rider survey, simulated with a fixed seed), and each planted row is looked up with ``frame.loc``; the same
table written by pandas to a CSV file (header on line 1) puts the row of label L on line L - 100 + 2.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.tables import case_table
from cfa_tool.data.kept_rows import RowNaming
from cfa_tool.errors import DataError

ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers"]
START = 100  # the frame's first index label


@pytest.fixture()
def indexed(rider_demo) -> pd.DataFrame:
    frame = rider_demo.copy()
    frame.index = pd.RangeIndex(START, START + len(frame))
    frame.loc[105, ITEMS] = np.nan  # answers nothing
    frame.loc[110, "clean"] = 999.0  # a missing-value code read as an answer
    return frame


def test_rows_of_a_frame_are_named_by_their_index_labels(indexed, rider_model):
    assert indexed.loc[105, ITEMS].isna().all() and indexed.loc[110, "clean"] == 999.0  # pandas' own labels
    result = cfa_tool.fit(rider_model, indexed)
    note = next(w for w in result.warnings if "answered none of the model variables" in w)
    assert note.endswith("left out (row labelled 105)") and "row 106" not in note
    code = next(p for p in result.problems if "999" in p.explanation)
    assert "in 1 row: row labelled 110)" in code.explanation and "row 111" not in code.explanation
    checked = cfa_tool.check(rider_model, indexed)
    assert checked.empty_rows == (105,) and "no answer to any model variable (row labelled 105)." in checked.summary()
    assert result.data.row_naming is RowNaming.INDEX_LABEL
    # the case table: headed 'Index label', each row one of the frame's labels (the file's rows for a file)
    cases = result.groups[0].influential_cases
    assert {c.row for c in cases} <= set(indexed.index)
    table = case_table(result)
    assert table.columns[0] == "Index label"


def test_a_bad_cell_of_a_frame_is_named_by_its_label_and_of_its_file_by_its_line(indexed, rider_model, tmp_path):
    frame = indexed.astype({"greeting": object})
    frame.loc[107, "greeting"] = "x"
    with pytest.raises(DataError, match=r"\('x' in row labelled 107\)"):
        cfa_tool.fit(rider_model, frame)
    path = tmp_path / "riders.csv"
    frame.to_csv(path, index=False)  # written by pandas: the header on line 1, label L on line L - 100 + 2
    with pytest.raises(DataError, match=rf"\('x' in row {107 - START + 2}\)"):
        cfa_tool.fit(rider_model, str(path))


def test_the_same_case_is_named_by_its_label_in_a_frame_and_its_line_in_the_file(indexed, rider_model, tmp_path):
    frame = indexed.drop(index=[105, 110])
    path = tmp_path / "riders.csv"
    frame.reset_index(drop=True).to_csv(path, index=False)
    by_frame = cfa_tool.fit(rider_model, frame).groups[0].influential_cases
    by_file = cfa_tool.fit(rider_model, str(path)).groups[0].influential_cases
    lines = {label: k + 2 for k, label in enumerate(frame.index)}  # the file's line of each label
    assert [lines[c.row] for c in by_frame] == [c.row for c in by_file]
    assert [c.chi_square_share for c in by_frame] == pytest.approx([c.chi_square_share for c in by_file])


def test_the_scores_table_and_the_messages_name_the_same_rows(indexed, rider_model):
    scored = cfa_tool.scores(rider_model, indexed)
    assert scored.table.index.equals(indexed.index)  # the table keeps the labels
    said = scored.warnings + tuple(scored.fit.warnings) + tuple(scored.notes)
    assert any("row labelled 105" in w for w in said) and not any("row 106" in w for w in said)
    assert scored.table.loc[105].filter(like="_regression").isna().all()  # the row named is the one without scores


def test_a_frame_not_indexed_by_whole_numbers_keeps_rows_named_by_position(rider_model, rider_demo):
    frame = rider_demo.copy()
    frame.index = [f"r{k}" for k in range(len(frame))]
    frame.loc["r3", ITEMS] = np.nan
    note = next(w for w in cfa_tool.fit(rider_model, frame).warnings if "answered none of the model variables" in w)
    assert note.endswith("left out (row at position 4)")  # said as a position, not a file's row (hostile s17, 7)


def test_the_json_case_rows_say_what_their_row_numbers_count(indexed, rider_model, tmp_path, capsys):
    """The JSON case rows' "row" held a data frame's index label or a file's row number with nothing saying which;
    "row_named_by" says it beside each row.  The reference is pandas again: the frame's labels (``frame.loc``), and
    the line pandas writes label L on (L - 100 + 2).  A result saved without the field (as versions before it
    wrote them) is still read by 'cfa-tool report', the same report as with it."""
    import json

    from tests.conftest import run_cli

    frame = indexed.drop(index=[105, 110])
    by_frame = cfa_tool.fit(rider_model, frame).to_dict()["diagnostics"]
    path = tmp_path / "riders.csv"
    frame.reset_index(drop=True).to_csv(path, index=False)
    model = tmp_path / "riders.cfa"
    model.write_text(rider_model)
    saved = tmp_path / "fit.json"
    code, _, err = run_cli(["fit", model, "--data", path, "--json", saved], capsys)
    assert code == 0, err
    payload = json.loads(saved.read_text())
    by_file = payload["diagnostics"]
    lines = {label: k + 2 for k, label in enumerate(frame.index)}
    for kind in ("unusual_cases", "influential_cases"):
        assert by_frame[kind] and all(c["row_named_by"] == "index_label" for c in by_frame[kind])
        assert all(c["row_named_by"] == "file_row" for c in by_file[kind])
        assert {c["row"] for c in by_frame[kind]} <= set(frame.index)
        assert [lines[c["row"]] for c in by_frame[kind]] == [c["row"] for c in by_file[kind]]
    reports = []
    for name, content in (("new", payload), ("older", _without_key(payload, "row_named_by"))):
        written = tmp_path / f"{name}.json"
        written.write_text(json.dumps(content))
        code, out, err = run_cli(["report", written, "--markdown", "-"], capsys)
        assert code == 0, err
        reports.append(out)
    assert "row_named_by" not in json.dumps(_without_key(payload, "row_named_by")) and reports[0] == reports[1]


def _without_key(value, key: str):
    if isinstance(value, dict):
        return {k: _without_key(v, key) for k, v in value.items() if k != key}
    if isinstance(value, list):
        return [_without_key(v, key) for v in value]
    return value
