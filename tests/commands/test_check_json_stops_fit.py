"""check --json carries the line a fit of the same model and rows stops with (``stops_fit``), the line the check's
exit gives on standard error; null when a fit would not stop (plan s24: the JSON had no such key, so a script reading
it saw 'valid: true' and nothing else for data a fit refuses).  Invented answers (fixed seed): two groups of 150 rows
and one of 3, too few for six items."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.cli import main

MODEL = "factor f: q1, q2, q3\nfactor g: q4, q5, q6\n"


def _write(rows_small: int) -> None:
    rng = np.random.default_rng(4)
    n = 300 + rows_small
    common = rng.normal(size=(n, 1))
    frame = pd.DataFrame(np.round(0.7 * common + 0.7 * rng.normal(size=(n, 6)), 3),
                         columns=[f"q{k}" for k in range(1, 7)])
    frame["site"] = ["north"] * 150 + ["south"] * 150 + ["east"] * rows_small
    frame.to_csv("d.csv", index=False)
    Path("m.cfa").write_text(MODEL)


def test_the_json_carries_the_line_a_fit_stops_with(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    _write(3)
    code = main(["check", "m.cfa", "--data", "d.csv", "--group-column", "site", "--json", "o.json"])
    err = capsys.readouterr().err
    assert code == 2
    saved = json.loads(Path("o.json").read_text(encoding="utf-8"))
    assert saved["stops_fit"] and "has only 3 complete rows for the model's 6 variables" in saved["stops_fit"]
    assert err.splitlines()[0] == f"cfa-tool: {saved['stops_fit']}"


def test_null_when_a_fit_would_not_stop(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    _write(60)
    assert main(["check", "m.cfa", "--data", "d.csv", "--group-column", "site", "--json", "o.json"]) == 0
    saved = json.loads(Path("o.json").read_text(encoding="utf-8"))
    assert "stops_fit" in saved and saved["stops_fit"] is None
