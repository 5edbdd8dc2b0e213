"""`--json -`: standard output holds exactly one JSON document, by every command that writes JSON, also when the
run has a problems box to show, files to announce and notes on the data (they go to standard error or the JSON).

The data are the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), with one
answer of 99 that looks like a missing-value code, so that every run has a caution to show first."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

RIDER_ITEMS = "on_time,short_wait,accurate_info,easy_transfer,seat_available,clean,temperature,room_to_stand,greeting,helpful,respectful,clear_answers"  # explore's items (ranges count numbered names, and these have none)
MODEL = "rider_three_factors.cfa"
OTHER = "rider_one_factor.cfa"


@pytest.fixture(scope="module")
def folder(tmp_path_factory) -> Path:
    here = tmp_path_factory.mktemp("stdout")
    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rows.loc[3, "on_time"] = 99  # named first as a value that looks like no answer
    rows.to_csv(here / "rider.csv", index=False)
    for name in (MODEL, OTHER):
        (here / name).write_text((resource_dir("models") / name).read_text())
    return here


#: one run per command family (bootstrap stands for the resampling ones, cutoffs among them); each also asks for an
#: HTML file, whose announcement must not reach standard output
RUNS = {
    "check": ["check", MODEL, "--data", "rider.csv"],
    "fit": ["fit", MODEL, "--data", "rider.csv"],
    "compare": ["compare", MODEL, OTHER, "--data", "rider.csv"],
    "invariance": ["invariance", MODEL, "--data", "rider.csv", "--group-column", "district"],
    "bootstrap": ["bootstrap", MODEL, "--data", "rider.csv", "--replications", "20", "--workers", "1"],
    "replicate": ["replicate", MODEL, "--data", "rider.csv"],
    "power": ["power", MODEL, "--n", "200"],
    "power-simulation": ["power-simulation", MODEL, "--n", "200", "--replications", "3", "--workers", "1"],
    "simulate": ["simulate", MODEL, "--n", "50", "--output", "simulated.csv"],
    "scores": ["scores", MODEL, "--data", "rider.csv", "--output", "scores.csv"],
    "explore": ["explore", "--data", "rider.csv", "--items", RIDER_ITEMS, "--replications", "5"],
    "align": ["align", MODEL, "--data", "rider.csv", "--group-column", "district", "--trials", "0"],
}


def _strict(constant: str):
    raise ValueError(f"not JSON: {constant}")


@pytest.mark.parametrize("command", sorted(RUNS))
def test_json_to_standard_output_is_one_document_and_nothing_else(folder, command, capfd, monkeypatch):
    for made in ("simulated.csv", "scores.csv", f"{command}.html"):
        (folder / made).unlink(missing_ok=True)
    monkeypatch.chdir(folder)
    capfd.readouterr()
    code = main([*RUNS[command], "--json", "-", "--html", f"{command}.html"])
    out, err = capfd.readouterr()  # what reached the file descriptors, as a shell's pipe sees them
    assert code == 0, err
    document, end = json.JSONDecoder(parse_constant=_strict).raw_decode(out)
    assert out[end:] == "\n"  # one document, nothing after it (and nothing before: raw_decode starts at 0)
    assert document["command"] == command and document["tool"] == "cfa-tool"
    assert f"HTML report written to {command}.html" in err  # announced on standard error
    if command not in ("power", "power-simulation", "simulate"):  # the runs that read the data: the caution first
        assert "99" in err or "99" in json.dumps(document["report"]["notice"])
