"""``--halves-file`` of explore --split and replicate --data: which rows went to which random half, saved as a
CSV (row, half, seed, data file and its SHA-256) that never replaces a file.  Check values: the halves against the JSON's own row lists and the
fits' N (explore), the same seed drawing the same halves in both commands (explore then confirm in the other half),
and the rows of a half refitted from the saved file giving the calibration fit's chi-square (replicate), on the
Holzinger & Swineford (1939) data (301 rows, tests/datasets)."""

from __future__ import annotations

import hashlib
import json

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from tests.conftest import DATASETS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def test_both_commands_save_the_same_halves_and_the_rows_refit_as_reported(tmp_path, capsys):
    model = tmp_path / "hs.cfa"
    model.write_text(MODEL)
    explored, replicated, js = tmp_path / "explored.csv", tmp_path / "replicated.csv", tmp_path / "explore.json"
    code, out, err = _run(["explore", "--data", HS_FILE, "--items", "x1..x9", "--split", 5, "--halves-file", explored,
                           "--json", js], capsys)
    assert code == 0, err
    assert f"The rows of each half written to {explored}" in out
    halves = pd.read_csv(explored)
    assert list(halves.columns) == ["row", "half", "seed", "data_file", "data_sha256", "sheet_read"]
    assert halves["sheet_read"].isna().all()  # no sheet read (a text file)
    assert set(halves["seed"]) == {5} and set(halves["data_file"]) == {HS_FILE.name}
    assert set(halves["data_sha256"]) == {hashlib.sha256(HS_FILE.read_bytes()).hexdigest()}  # hashlib: Python's own
    assert halves["row"].tolist() == list(range(2, 303))  # every row once, in the order of the file (by its line)
    split = json.loads(js.read_text())["split"]
    assert halves.loc[halves["half"] == "exploration", "row"].tolist() == split["exploration_rows"]
    assert halves.loc[halves["half"] == "confirmation", "row"].tolist() == split["confirmation_rows"]
    assert split["confirmation"]["n_obs"] == (halves["half"] == "confirmation").sum() == 150

    code, _, err = _run(["replicate", model, "--data", HS_FILE, "--seed", 5, "--halves-file", replicated], capsys)
    assert code == 0, err
    again = pd.read_csv(replicated)
    # the same seed draws the same halves: A is the exploration half, B the confirmation half (301 rows: A has 151)
    assert again["half"].map({"A": "exploration", "B": "confirmation"}).tolist() == halves["half"].tolist()
    # the saved rows of half A, fitted alone, give the calibration fit of the replication
    data = pd.read_csv(HS_FILE)
    rows_a = again.loc[again["half"] == "A", "row"].to_numpy() - 2  # lines to positions (the header is line 1)
    pair = cfa_tool.split_half(MODEL, HS_FILE, seed=5)
    direct = cfa_tool.fit(MODEL, data.iloc[rows_a])
    assert pair[0].calibration_result.n_obs == direct.n_obs == 151
    assert pair[0].calibration_result.fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-9)


@pytest.mark.parametrize("argv, words", [
    (["explore", "--data", HS_FILE, "--items", "x1..x9", "--halves-file", "h.csv"],
     "--halves-file saves the random halves of --split SEED, and this run draws no halves"),
    (["replicate", "{model}", "--calibration", HS_FILE, "--validation", HS_FILE, "--halves-file", "h.csv"],
     "--halves-file saves the random halves of one data file (--data)"),
    (["replicate", "{model}", "--data", HS_FILE, "--halves-file", "h.txt"],
     "the rows of the halves are written as CSV; give a file name ending in .csv"),
    (["explore", "--data", HS_FILE, "--items", "x1..x9", "--split", 5, "--halves-file", "taken.csv"],
     "--halves-file: 'taken.csv' exists, and this output never replaces a file"),
])
def test_a_halves_file_that_cannot_apply_or_would_replace_a_file_is_an_error(tmp_path, monkeypatch, capsys, argv, words):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.cfa").write_text(MODEL)
    (tmp_path / "taken.csv").write_text("kept\n")
    code, _, err = _run([a.replace("{model}", "m.cfa") if isinstance(a, str) else a for a in argv], capsys)
    assert code == 2 and words in err.splitlines()[0]
    assert (tmp_path / "taken.csv").read_text() == "kept\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["m.cfa", "taken.csv"]
