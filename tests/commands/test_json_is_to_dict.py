"""README: a Python result's ``to_dict()`` is what the command's ``--json`` writes, less the JSON's wrapper (the
tool's name and version, the ``command`` that wrote it and its ``report``), when made as the command makes it
(options.on_command_line: the notes name an option as the caller writes it, --incomplete-rows or missing=...).  For each command with a Python
function that takes the same inputs, the two are compared key for key (a hostile trial found replicate's
to_dict() flat while its JSON nested the result under ``replications``).  ``power`` is left out: its Python
function plans from degrees of freedom, not from a model file.

The data are the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.options import on_command_line
from cfa_tool.resources import resource_dir

RIDER_ITEMS = "on_time,short_wait,accurate_info,easy_transfer,seat_available,clean,temperature,room_to_stand,greeting,helpful,respectful,clear_answers"  # explore's items (ranges count numbered names, and these have none)
MODEL = "rider_three_factors.cfa"
OTHER = "rider_one_factor.cfa"
WRAPPER = ("tool", "version", "command", "report")


@pytest.fixture(scope="module")
def folder(tmp_path_factory) -> Path:
    here = tmp_path_factory.mktemp("to_dict")
    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rows.iloc[: len(rows) // 2].to_csv(here / "first.csv", index=False)
    rows.iloc[len(rows) // 2:].to_csv(here / "second.csv", index=False)
    rows.to_csv(here / "rider.csv", index=False)
    for name in (MODEL, OTHER):
        (here / name).write_text((resource_dir("models") / name).read_text())
    return here


def _pair(pair) -> dict:  # split_half's two directions, as the command's one result holds them
    return {"replications": [r.entry() for r in pair]}


#: command line, and the Python call of the same run
RUNS = {
    "check": (["check", MODEL, "--data", "rider.csv"], lambda: cfa_tool.check(MODEL, "rider.csv").to_dict()),
    "fit": (["fit", MODEL, "--data", "rider.csv"], lambda: cfa_tool.fit(MODEL, "rider.csv").to_dict()),
    "compare": (["compare", MODEL, OTHER, "--data", "rider.csv"],
                lambda: cfa_tool.compare([MODEL, OTHER], "rider.csv").to_dict()),
    "invariance": (["invariance", MODEL, "--data", "rider.csv", "--group-column", "district"],
                   lambda: cfa_tool.invariance(MODEL, "rider.csv", group="district").to_dict()),
    "bootstrap": (["bootstrap", MODEL, "--data", "rider.csv", "--replications", "20", "--workers", "1"],
                  lambda: cfa_tool.bootstrap(MODEL, "rider.csv", replications=20, workers=1).to_dict()),
    "replicate": (["replicate", MODEL, "--calibration", "first.csv", "--validation", "second.csv"],
                  lambda: cfa_tool.replicate(MODEL, "first.csv", "second.csv").to_dict()),
    "replicate halves": (["replicate", MODEL, "--data", "rider.csv", "--seed", "4"],
                         lambda: _pair(cfa_tool.split_half(MODEL, "rider.csv", seed=4))),
    "explore": (["explore", "--data", "rider.csv", "--items", RIDER_ITEMS, "--replications", "5"],
                lambda: cfa_tool.explore("rider.csv", items=RIDER_ITEMS, replications=5).to_dict()),
    # the rows named by their ids (without, a note names rider_id with the option as each interface writes it)
    "scores": (["scores", MODEL, "--data", "rider.csv", "--id", "rider_id", "--output", "scores.csv"],
               lambda: cfa_tool.scores(MODEL, "rider.csv", id_column="rider_id").to_dict()),
    "simulate": (["simulate", MODEL, "--n", "50", "--output", "simulated.csv"],
                 lambda: cfa_tool.simulate(cfa_tool.parse_model(Path(MODEL).read_text()), 50).to_dict()),
    "power-simulation": (["power-simulation", MODEL, "--n", "200", "--replications", "3", "--workers", "1"],
                         lambda: cfa_tool.power_simulation(cfa_tool.parse_model(Path(MODEL).read_text()), 200,
                                                           replications=3, workers=1).to_dict()),
    "align": (["align", MODEL, "--data", "rider.csv", "--group-column", "district", "--trials", "0"],
              lambda: cfa_tool.align(MODEL, "rider.csv", group="district", trials=0).to_dict()),
}


@pytest.mark.parametrize("run", sorted(RUNS))
def test_the_json_is_the_python_results_to_dict(folder, run, monkeypatch, capsys):
    command, python = RUNS[run]
    monkeypatch.chdir(folder)
    for made in ("scores.csv", "simulated.csv"):
        (folder / made).unlink(missing_ok=True)
    assert main([*command, "--json", "out.json"]) == 0, capsys.readouterr().err
    written = json.loads((folder / "out.json").read_text())
    assert written["command"] == command[0]
    for key in WRAPPER:
        written.pop(key)
    with on_command_line():  # as the command runs it: notes name options as the command line writes them
        made = python()
    assert json.loads(json.dumps(made, allow_nan=False)) == written
