"""The scores file follows the separator and decimal mark of the data file scored (new-user trial s23b, finding 4: a
semicolon file of decimal commas, as a German spreadsheet saves CSV, got a scores file of commas and decimal points,
in which the same spreadsheet reads the prorated sum 23.625 as 23625, or the whole line as one cell).

Check values: the prorated item sum of a row that answered three of four items is 4/3 times its sum (the
least-share proration of scoring.item_sums; common practice), computed here with pandas from the data; the scores
file of each format, read by pandas with that format's separator and decimal mark, holds the same numbers as the
one of the plain file (commas and points) of the same data.
"""

from __future__ import annotations

import csv
import io
import json

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main

MODEL = "factor mood: m1..m4\n"


def _frame() -> pd.DataFrame:
    rng = np.random.default_rng(4)
    n = 200
    latent = rng.normal(size=(n, 1)) * 0.8 + rng.normal(size=(n, 4)) * 0.6
    frame = pd.DataFrame(np.clip(np.round(latent + 3), 1, 5), columns=["m1", "m2", "m3", "m4"])
    frame.loc[[3, 7, 11], "m2"] = np.nan  # three rows answer three of the four items: prorated sums
    frame.insert(0, "pid", [f"R{i:03d}" for i in range(n)])
    frame["age"] = rng.uniform(18, 80, size=n).round(1)  # a column of decimals, written in the file's own mark
    return frame


def _write(frame: pd.DataFrame, path, sep: str, decimal: str) -> None:
    path.write_text(frame.to_csv(index=False, sep=sep, decimal=decimal, lineterminator="\n"), encoding="utf-8")


def _scores(tmp_path, capsys, data, name, extra=()):
    out, report = tmp_path / f"{name}_scores.csv", tmp_path / f"{name}_scores.json"
    model = tmp_path / "mood.cfa"
    model.write_text(MODEL)
    code = main(["scores", str(model), "--data", str(data), "--id", "pid", "--method", "regression,item-sum",
                 "--output", str(out), "--json", str(report), *extra])
    said = capsys.readouterr()
    assert code == 0, said.err
    return out.read_text(encoding="utf-8"), json.loads(report.read_text()), " ".join(said.out.split())


@pytest.mark.parametrize(("sep", "decimal", "written"), [
    (";", ",", (";", ",")),  # a spreadsheet's CSV in decimal-comma locales
    ("\t", ",", (";", ",")),  # its 'Unicode text': decimal commas, so semicolons between the fields of a .csv file
    (";", ".", (";", ".")),
    ("\t", ".", (",", ".")),
    (",", ".", (",", ".")),
])
def test_the_scores_file_is_written_as_the_data_file_was(tmp_path, capsys, sep, decimal, written):
    frame = _frame()
    plain_data, data = tmp_path / "plain.csv", tmp_path / "data.csv"
    _write(frame, plain_data, ",", ".")
    _write(frame, data, sep, decimal)
    plain_text, _, _ = _scores(tmp_path, capsys, plain_data, "plain")
    text, report, said = _scores(tmp_path, capsys, data, "scores")
    assert text.splitlines()[0].count(written[0]) == len(text.splitlines()[0].split(written[0])) - 1 >= 5
    scores = pd.read_csv(io.StringIO(text), sep=written[0], decimal=written[1], dtype={"pid": str})
    plain = pd.read_csv(io.StringIO(plain_text), dtype={"pid": str})
    assert list(scores.columns) == list(plain.columns) and scores["pid"].tolist() == frame["pid"].tolist()
    for column in ("mood_regression", "mood_item_sum"):
        assert scores[column].dtype == float
        np.testing.assert_allclose(scores[column], plain[column], rtol=1e-9)
    answered = frame[["m1", "m2", "m3", "m4"]]
    prorated = answered.sum(axis=1) * 4 / answered.notna().sum(axis=1)
    np.testing.assert_allclose(scores["mood_item_sum"], prorated, rtol=1e-9)
    assert (scores["mood_item_sum"] % 1 != 0).any()  # decimals written, and read back, in the file's mark
    assert report["scores_file"] == {"separator": written[0], "decimal_mark": written[1], "byte_order_mark": False}
    words = {",": "commas", ";": "semicolons"}[written[0]], {",": "commas", ".": "points"}[written[1]]
    sentence = f"fields separated by {words[0]}, decimals written with {words[1]}, as in the data file"
    assert (sentence in said) is (written != (",", "."))  # said when it is not the plain CSV


def test_scores_of_other_data_with_an_earlier_fit_follow_the_data_scored(tmp_path, capsys):
    frame = _frame()
    fitted, other = tmp_path / "fitted.csv", tmp_path / "other.csv"
    _write(frame, fitted, ",", ".")
    _write(frame.iloc[:50], other, ";", ",")
    model = tmp_path / "mood.cfa"
    model.write_text(MODEL)
    assert main(["fit", str(model), "--data", str(fitted), "--json", str(tmp_path / "fit.json")]) == 0
    text, report, said = _scores(tmp_path, capsys, other, "other", ["--from-fit", str(tmp_path / "fit.json")])
    assert report["scores_file"] == {"separator": ";", "decimal_mark": ",", "byte_order_mark": False}
    scores = pd.read_csv(io.StringIO(text), sep=";", decimal=",")
    answered = frame.iloc[:50][["m1", "m2", "m3", "m4"]]
    np.testing.assert_allclose(scores["mood_item_sum"], answered.sum(axis=1) * 4 / answered.notna().sum(axis=1),
                               rtol=1e-9)


def test_a_data_frame_gets_commas_and_points():
    import cfa_tool

    result = cfa_tool.scores(MODEL, _frame(), id_column="pid", methods="item-sum")
    assert result.file_format.plain()
    assert result.csv().splitlines()[0].startswith("pid,") and "," in result.csv().splitlines()[4]


def _german_file(frame: pd.DataFrame, path, encoding: str = "utf-8-sig") -> None:
    """As a German spreadsheet saves 'CSV UTF-8': a byte-order mark, semicolons, decimal commas."""
    path.write_bytes(frame.to_csv(index=False, sep=";", decimal=",", lineterminator="\r\n").encode(encoding))


def _umlaut_frame() -> pd.DataFrame:
    return _frame().rename(columns={"pid": "Kennung", "age": "Größe"})


@pytest.mark.parametrize(("encoding", "mark"), [("utf-8-sig", True), ("cp1252", True), ("utf-8", False)])
def test_the_scores_file_keeps_the_data_files_byte_order_mark(tmp_path, capsys, encoding, mark):
    """A data file with a byte-order mark (a spreadsheet's 'CSV UTF-8') gets a scores file with one, so that the
    spreadsheet opens its accented headers as written (fixscore's notes, s23: without the mark a German spreadsheet
    reads UTF-8 in its own code page, 'GrÃ¶ÃŸe' for 'Größe'); so does data in the Windows code page, which a
    spreadsheet would otherwise read the UTF-8 scores file in; UTF-8 data without a mark get none, as they came."""
    data = tmp_path / "umfrage.csv"
    _german_file(_umlaut_frame(), data, encoding)
    out = tmp_path / "werte.csv"
    model = tmp_path / "mood.cfa"
    model.write_text(MODEL)
    code = main(["scores", str(model), "--data", str(data), "--id", "Kennung", "--method", "item-sum",
                 "--output", str(out), "--json", str(tmp_path / "werte.json")])
    said = " ".join(capsys.readouterr().out.split())
    assert code == 0
    raw = out.read_bytes()
    assert raw.startswith(b"\xef\xbb\xbfKennung;") is mark and raw.startswith(b"Kennung;") is not mark
    scores = pd.read_csv(io.BytesIO(raw), sep=";", decimal=",", encoding="utf-8-sig")
    assert scores.columns[0] == "Kennung" and scores["mood_item_sum"].dtype == float
    saved = json.loads((tmp_path / "werte.json").read_text())
    assert saved["scores_file"] == {"separator": ";", "decimal_mark": ",", "byte_order_mark": mark}
    assert ("UTF-8 with a byte-order mark" in said) is mark


def test_report_tables_follow_the_data_files_convention(tmp_path, capsys):
    """The report tables' CSV files (--tables) are written by the scores file's rule: a German spreadsheet's data
    file (byte-order mark, semicolons, decimal commas, umlauts in the headers) gets tables it opens as numbers with
    its headers as written; `report` of the saved result writes the same files; a plain data file keeps commas and
    points without a mark.  Check values: the items' means in items.csv equal pandas' means of the data file's
    columns (complete here: the data's own numbers, read back in the file's decimal mark)."""
    frame = _umlaut_frame().fillna({"m2": 3.0}).rename(columns={"m1": "Stimmung_ä", "m2": "Stimmung_ö", "m3": "Stimmung_ü",
                                            "m4": "Stimmung_ß"})
    data = tmp_path / "umfrage.csv"
    _german_file(frame, data)
    model = tmp_path / "stimmung.cfa"
    model.write_text('factor mood: "Stimmung_ä", "Stimmung_ö", "Stimmung_ü", "Stimmung_ß"\n', encoding="utf-8")
    assert main(["fit", str(model), "--data", str(data), "--tables", str(tmp_path / "tabellen"),
                 "--json", str(tmp_path / "fit.json")]) == 0
    assert main(["report", str(tmp_path / "fit.json"), "--tables", str(tmp_path / "again")]) == 0
    assert main(["check", str(model), "--data", str(data), "--tables", str(tmp_path / "checked")]) == 0
    assert main(["explore", "--data", str(data), "--tables", str(tmp_path / "explored")]) == 0
    capsys.readouterr()
    for folder in ("checked", "explored"):  # every command's tables, whatever its result
        written = sorted((tmp_path / folder).glob("*.csv"))
        assert written and all(f.read_bytes().startswith(b"\xef\xbb\xbf") for f in written)
    for folder in ("tabellen", "again"):
        raw = (tmp_path / folder / "items.csv").read_bytes()
        assert raw.startswith("\ufeffItem;".encode("utf-8"))
        items = pd.read_csv(io.BytesIO(raw), sep=";", decimal=",", encoding="utf-8-sig").set_index("Item")
        assert list(items.index) == ["Stimmung_ä", "Stimmung_ö", "Stimmung_ü", "Stimmung_ß"]
        assert items["Mean"].dtype == float
        np.testing.assert_allclose(items["Mean"], frame[list(items.index)].mean().to_numpy(), rtol=1e-9)
        assert "decimals written with commas" in (tmp_path / folder / "contents.txt").read_text(encoding="utf-8")
        assert (tmp_path / folder / "items.csv").read_bytes() == (tmp_path / "tabellen" / "items.csv").read_bytes()
    plain = tmp_path / "plain.csv"
    _write(_frame(), plain, ",", ".")
    model.write_text(MODEL)
    assert main(["fit", str(model), "--data", str(plain), "--tables", str(tmp_path / "plain_tables")]) == 0
    raw = (tmp_path / "plain_tables" / "items.csv").read_bytes()
    assert raw.startswith(b"Item,N,Mean,") and ";" not in raw.decode("utf-8").splitlines()[1]


def test_a_halves_file_follows_the_data_files_convention_and_is_read_back(tmp_path, capsys):
    """The halves file (--halves-file) is a CSV file the tool writes from the data file, so it follows the same rule:
    a German spreadsheet's data file gets semicolons and a byte-order mark (the data file's name, with its umlaut,
    readable in that spreadsheet), and --half reads it back.  Check value: the halves' rows are the data's 200 rows,
    each in one half (replicate's split of one file: every row to one half)."""
    data = tmp_path / "Umfrage_März.csv"
    _german_file(_umlaut_frame(), data)
    model = tmp_path / "mood.cfa"
    model.write_text(MODEL)
    halves = tmp_path / "hälften.csv"
    assert main(["replicate", str(model), "--data", str(data), "--seed", "5", "--halves-file", str(halves),
                 "--tables", str(tmp_path / "tables"), "--json", str(tmp_path / "rep.json")]) == 0
    raw = halves.read_bytes()
    assert raw.startswith("\ufeffrow;half;seed;".encode("utf-8"))
    saved = pd.read_csv(io.BytesIO(raw), sep=";", encoding="utf-8-sig")
    assert sorted(saved["row"]) == list(range(2, 202)) and set(saved["data_file"]) == {"Umfrage_März.csv"}
    first = str(saved["half"].iloc[0])
    assert main(["fit", str(model), "--data", str(data), "--half", str(halves), first]) == 0
    # the report tables of a workflow (replicate) follow the data file too, and so does `report` of its JSON
    assert main(["report", str(tmp_path / "rep.json"), "--tables", str(tmp_path / "again")]) == 0
    # and those of a workflow that fits the data by its own route (bootstrap)
    assert main(["bootstrap", str(model), "--data", str(data), "--replications", "20", "--tables",
                 str(tmp_path / "resampled")]) == 0
    capsys.readouterr()
    for folder in ("tables", "again", "resampled"):
        written = sorted((tmp_path / folder).glob("*.csv"))
        assert written and all(f.read_bytes().startswith(b"\xef\xbb\xbf") for f in written)
        headers = [f.read_text(encoding="utf-8-sig").splitlines()[0] for f in written]
        assert max(len(next(csv.reader([h], delimiter=";"))) for h in headers) >= 3
        assert all(len(next(csv.reader([h], delimiter=";"))) >= len(next(csv.reader([h]))) for h in headers)
