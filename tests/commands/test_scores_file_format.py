"""The scores file follows the separator and decimal mark of the data file scored (new-user trial s23b, finding 4: a
semicolon file of decimal commas, as a German spreadsheet saves CSV, got a scores file of commas and decimal points,
in which the same spreadsheet reads the prorated sum 23.625 as 23625, or the whole line as one cell).

Check values: the prorated item sum of a row that answered three of four items is 4/3 times its sum (the
least-share proration of scoring.item_sums; common practice), computed here with pandas from the data; the scores
file of each format, read by pandas with that format's separator and decimal mark, holds the same numbers as the
one of the plain file (commas and points) of the same data.
"""

from __future__ import annotations

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
    assert report["scores_file"] == {"separator": written[0], "decimal_mark": written[1]}
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
    assert report["scores_file"] == {"separator": ";", "decimal_mark": ","}
    scores = pd.read_csv(io.StringIO(text), sep=";", decimal=",")
    answered = frame.iloc[:50][["m1", "m2", "m3", "m4"]]
    np.testing.assert_allclose(scores["mood_item_sum"], answered.sum(axis=1) * 4 / answered.notna().sum(axis=1),
                               rtol=1e-9)


def test_a_data_frame_gets_commas_and_points():
    import cfa_tool

    result = cfa_tool.scores(MODEL, _frame(), id_column="pid", methods="item-sum")
    assert result.file_format.plain()
    assert result.csv().splitlines()[0].startswith("pid,") and "," in result.csv().splitlines()[4]
