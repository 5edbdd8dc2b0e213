"""A spreadsheet's totals row among the rows analysed is bad input (hostile trial s13): the fit stopped with exit 3,
"the model cannot be estimated", naming the row only as a likely cause, and compare and explore analysed it with a
caution.  Every command that reads rows of data now refuses it with exit 2 and one line naming the file, the row and
how to leave it out; a totals row that is not analysed (no group label in a multi-group run, left out by a row
filter) is no error, and a means row, which moves the estimates little, stays a caution.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), with a totals row
computed here by pandas (the column sums), not by the tool.  The row's number is the file's line: the header is
line 1."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.odd_values import OddKind, OddValues
from cfa_tool.data.readers import LoadedData
from cfa_tool.errors import DataError, EstimationError
from cfa_tool.pipeline.inputs import odd_values_named
from tests.conftest import run_cli

ONE = "factor comfort: seat_available, clean, temperature, room_to_stand\n"


def _with_totals(frame: pd.DataFrame, district: str = "") -> pd.DataFrame:
    items = list(frame.columns[2:])
    totals = frame[items].sum().to_frame().T  # pandas' column sums: the totals row
    totals.insert(0, "rider_id", "Total")
    totals.insert(1, "district", district or None)
    return pd.concat([frame, totals], ignore_index=True)


@pytest.fixture()
def files(rider_demo, rider_model, tmp_path):
    data = tmp_path / "survey.csv"
    _with_totals(rider_demo).to_csv(data, index=False)
    labelled = tmp_path / "labelled.csv"
    _with_totals(rider_demo, "north").to_csv(labelled, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    one = tmp_path / "one.cfa"
    one.write_text(ONE)
    half = len(rider_demo) // 2
    calibration = tmp_path / "spring.csv"
    coded = rider_demo.iloc[:half].copy()
    coded.loc[[3, 7], "clean"] = -99  # a caution of the first file must not hide the second file's totals row
    coded.to_csv(calibration, index=False)
    validation = tmp_path / "autumn.csv"
    _with_totals(rider_demo.iloc[half:].reset_index(drop=True)).to_csv(validation, index=False)
    return {"data": data, "labelled": labelled, "model": model, "one": one, "calibration": calibration,
            "validation": validation, "row": len(rider_demo) + 2, "validation_row": len(rider_demo) - half + 2,
            "out": tmp_path / "scores.csv", "items": ",".join(rider_demo.columns[2:])}


COMMANDS = {
    "fit": ["fit", "{model}", "--data", "{data}"],
    "check": ["check", "{model}", "--data", "{data}"],
    "compare": ["compare", "{model}", "{one}", "--data", "{data}"],
    "invariance": ["invariance", "{model}", "--data", "{labelled}", "--group-column", "district"],
    "scores": ["scores", "{model}", "--data", "{data}", "--output", "{out}"],
    "replicate": ["replicate", "{model}", "--data", "{data}", "--seed", "1"],
    "replicate two files": ["replicate", "{model}", "--calibration", "{calibration}", "--validation", "{validation}"],
    "explore": ["explore", "--data", "{data}", "--items", "{items}", "--factors", "3"],
    "bootstrap": ["bootstrap", "{model}", "--data", "{data}", "--replications", "20", "--seed", "1"],
    "cutoffs": ["cutoffs", "{model}", "--data", "{data}", "--replications", "20", "--seed", "1"],
    "align": ["align", "{model}", "--data", "{labelled}", "--group-column", "district"],
}


@pytest.mark.parametrize("command", list(COMMANDS))
def test_every_command_that_reads_rows_refuses_a_totals_row(command, files, capsys):
    argv = [a.format(**files) for a in COMMANDS[command]]
    code, out, err = run_cli(argv, capsys)
    assert code == 2, (command, err[:300])
    assert err.startswith("cfa-tool: ") and err.strip().count("\n") == 0  # one line
    name, row = ("autumn.csv", files["validation_row"]) if command == "replicate two files" else (
        "labelled.csv" if "{labelled}" in COMMANDS[command] else "survey.csv", files["row"])
    assert f"Row {row} of {name} holds the sums of the other rows' answers in 12 item columns" in err
    assert "a spreadsheet's totals row, not anyone's answers" in err
    assert 'leave it out with a row filter (--keep "rider_id != Total")' in err
    assert not files["out"].exists()


def test_a_totals_row_left_out_is_no_error(files, capsys):
    # without a group label it is not analysed in a multi-group run; a row filter can leave it out as advised
    code, out, _ = run_cli(["fit", files["model"], "--data", files["data"], "--group-column", "district"], capsys)
    assert code == 0 and "sums of the other rows" not in out
    code, _, _ = run_cli(["check", files["model"], "--data", files["data"], "--keep", "rider_id != Total"], capsys)
    assert code == 0


def test_a_data_frame_names_the_row_by_its_index_label(rider_demo, rider_model):
    frame = _with_totals(rider_demo)
    with pytest.raises(DataError) as caught:
        cfa_tool.fit(rider_model, frame)
    message = str(caught.value)
    assert message.startswith(f"Row labelled {len(rider_demo)} of <data frame> holds the sums of the other rows' answers")
    assert "delete row labelled" in message and "from the data frame" in message
    assert "keep=['rider_id != Total']" in message  # the Python keyword, as a Python caller writes it


def test_a_failed_estimation_with_a_row_far_beyond_is_a_data_error():
    # a row far beyond the others in several item columns (the sums of another file's rows, a COUNT row) stays a
    # caution when the fit succeeds; when the fit fails it is named first as bad input (exit 2), not exit 3
    far = OddValues(OddKind.FAR_BEYOND, ("a", "b", "c"), (1500.0, 1509.0, 1545.0), (242,), 3, (1.0, 5.0))
    means = OddValues(OddKind.MEANS_ROW, ("a", "b", "c"), (3.1, 3.2, 3.3), (242,), 3, (1.0, 5.0))
    frame = pd.DataFrame({"a": [1.0], "b": [2.0], "c": [3.0]})
    with pytest.raises(DataError) as caught:
        with odd_values_named(LoadedData(frame, "val.csv", odd_values=(far,))):
            raise EstimationError("the information matrix is singular")
    message = str(caught.value)
    assert message.startswith("Row 242 of val.csv holds values far beyond every other row's answers (1 to 5)")
    assert message.index("What to try first") < message.index("Then: the information matrix is singular")
    with pytest.raises(EstimationError):  # a means row is not why a fit fails: still the estimation's error, exit 3
        with odd_values_named(LoadedData(frame, "val.csv", odd_values=(means,))):
            raise EstimationError("the information matrix is singular")


def test_a_totals_row_beside_a_means_row_is_refused(rider_demo, rider_model, tmp_path):
    """'Total' and 'Mean' rows at the end (pandas' column sums and means of the answers): the totals row is the sum
    of the other answers once the means row is set aside (review s14: off by the means, it was not found, and compare
    and explore analysed it)."""
    items = list(rider_demo.columns[2:])
    sums = rider_demo[items].sum().to_frame().T
    means = rider_demo[items].mean().to_frame().T
    for row, name in ((sums, "Total"), (means, "Mean")):
        row.insert(0, "rider_id", name)
        row.insert(1, "district", "")
    path = tmp_path / "both.csv"
    pd.concat([rider_demo, sums, means], ignore_index=True).to_csv(path, index=False)
    with pytest.raises(DataError, match=r"Row 482 of both.csv holds the sums of the other rows' answers"):
        cfa_tool.fit(rider_model, str(path))
    with pytest.raises(DataError, match=r"Row 482 of both.csv holds the sums"):
        cfa_tool.compare([rider_model, rider_model + "\ncovary on_time, clean\n"], str(path))


def test_the_row_filter_suggested_keeps_every_other_row(rider_demo, rider_model, tmp_path):
    """A text column empty in other rows ('note': one row says 'called back') cannot leave the totals row out: an
    empty cell meets no comparison, so 'note != Total' would keep 1 of 481 rows (review s14); the advice names a
    column with a value in every row, or none."""
    data = _with_totals(rider_demo)
    data["rider_id"] = data["rider_id"].where(data["rider_id"] == "Total", "")
    data["note"] = ""
    data.loc[10, "note"] = "called back"
    data.loc[len(data) - 1, "note"] = "Total"
    path = tmp_path / "noted.csv"
    data.to_csv(path, index=False)
    with pytest.raises(DataError) as found:
        cfa_tool.fit(rider_model, str(path))
    assert "note != Total" not in str(found.value) and "rider_id != Total" not in str(found.value)
    assert str(found.value).endswith("or leave it out with a row filter (keep=...).")


def test_a_totals_row_outside_a_declared_scale_is_refused_in_the_words_of_every_command(rider_demo, rider_model,
                                                                                       tmp_path, capsys):
    """The declared scale's route ('reversed ITEM on 1 to 5', data.matching, which meets the totals row first) refuses
    it with the one message every command gives (OddValues.totals_refusal; s15: it had a message of its own): exit 2,
    the file, the row and the row filter that keeps every other row, or none when no cell names the row."""
    path = tmp_path / "declared.csv"
    _with_totals(rider_demo).to_csv(path, index=False)
    unnamed = tmp_path / "unnamed.csv"
    _with_totals(rider_demo).assign(rider_id="").to_csv(unnamed, index=False)
    item = rider_demo.columns[2]
    model, declared = tmp_path / "m.cfa", tmp_path / "declared.cfa"
    model.write_text(rider_model)
    declared.write_text(rider_model + f"reversed {item} on 1 to 5\n")
    for data, keep in ((path, '(--keep "rider_id != Total").'), (unnamed, "(--keep).")):
        said = []
        for each in (model, declared):
            code, _, err = run_cli(["fit", each, "--data", data], capsys)
            assert code == 2 and err.strip().count("\n") == 0
            said.append(err)
        assert said[0] == said[1]
        assert said[1].startswith(f"cfa-tool: Row 482 of {data.name} holds the sums of the other rows' answers")
        assert said[1].strip().endswith(f"delete row 482 from the file, or leave it out with a row filter {keep}")
    with pytest.raises(DataError, match=r"leave it out with a row filter \(keep=\['rider_id != Total'\]\)"):
        cfa_tool.fit(rider_model + f"reversed {item} on 1 to 5\n", str(path))
