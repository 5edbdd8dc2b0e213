"""A semicolon-separated file says how its decimals were read (hostile trial s17, finding 6): one that writes them
with points ('3.5;4.5') is read and reported with points, no longer said to use commas; one with decimal commas
stays so; a lone '1.234' among whole numbers, which in such a file may be 1234 with a thousands point, is named in a
note.  The data are the bundled demo (a fictional transit agency's rider survey); check values: the means pandas
computes from the same cells."""

from __future__ import annotations

import json

import pandas as pd
import pytest

from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"


@pytest.fixture(scope="module")
def rider() -> pd.DataFrame:
    return pd.read_csv(resource_dir("demo") / "rider_survey.csv")


def _fit(path, tmp_path, capsys) -> tuple[dict, str]:
    code = main(["fit", str(MODEL), "--data", str(path), "--json", str(tmp_path / "r.json")])
    out = " ".join(capsys.readouterr().out.split())
    assert code == 0
    return json.loads((tmp_path / "r.json").read_text()), out


@pytest.mark.parametrize("mark", [".", ","])
def test_a_semicolon_file_is_reported_with_the_decimal_mark_it_writes(rider, tmp_path, capsys, mark):
    data = rider.assign(clean=rider["clean"] + 0.5)  # 1.5 .. 5.5
    data.to_csv(tmp_path / "semi.csv", index=False, sep=";", decimal=mark, float_format="%g")
    assert ("3.5" in (tmp_path / "semi.csv").read_text()) == (mark == ".")
    result, out = _fit(tmp_path / "semi.csv", tmp_path, capsys)
    assert result["data"]["reading"]["decimal_mark"] == mark
    assert f"decimals written with {'points' if mark == '.' else 'commas'}" in out
    clean = result["data"]["variables"].index("clean")
    assert result["data"]["means"][clean] == pytest.approx(data["clean"].mean(), abs=1e-9)  # pandas, same cells


def test_a_lone_dotted_number_in_a_semicolon_file_of_whole_numbers_is_named(rider, tmp_path, capsys):
    rider.to_csv(tmp_path / "lone.csv", index=False, sep=";", float_format="%g")
    lines = (tmp_path / "lone.csv").read_text().split("\n")
    cells = lines[3].split(";")
    cells[rider.columns.get_loc("clean")] = "1.234"
    lines[3] = ";".join(cells)
    (tmp_path / "lone.csv").write_text("\n".join(lines))
    result, out = _fit(tmp_path / "lone.csv", tmp_path, capsys)
    assert "column 'clean' was read with '.' as the decimal point ('1.234' in row 4)" in out
    assert "if its '.' separates thousands" in out
