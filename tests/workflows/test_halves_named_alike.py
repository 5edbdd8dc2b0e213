"""explore --split and replicate --data say which of their halves is which (new-user trial s24, finding 9: the same
seed draws the same halves of the same rows, data.halves.draw_halves, and explore called them exploration and
confirmation, replicate half A and half B, so that the researcher matched chi-squares to learn that half B was the
confirmation half).  Each report names the other's halves, and the halves files both write show that the names it
gives are true: explore's exploration rows are replicate's half A.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), every row
complete, so that both commands split the same rows."""

from __future__ import annotations

import csv

import pytest

from tests.conftest import run_cli


def _flat(text: str) -> str:
    return " ".join(text.replace("\u2502", " ").split())


def _halves(path) -> dict[str, set[int]]:
    out: dict[str, set[int]] = {}
    with open(path, newline="") as handle:
        for row in csv.DictReader(handle):
            out.setdefault(row["half"], set()).add(int(row["row"]))
    return out


@pytest.mark.parametrize("design", [[], ["--strata", "district"]])
def test_each_command_names_the_others_halves_truly(tmp_path, capsys, rider_demo, rider_model, design):
    data = tmp_path / "survey.csv"
    rider_demo.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, explored, err = run_cli(["explore", "--data", data, "--split", "7", "--replications", "20",
                                   "--halves-file", tmp_path / "e.csv"] + design, capsys)
    assert code == 0, err
    code, replicated, err = run_cli(["replicate", model, "--data", data, "--seed", "7",
                                     "--halves-file", tmp_path / "r.csv"] + design, capsys)
    assert code == 0, err
    by = " --strata district" if design else ""
    assert ("names the exploration half 'half A' and the confirmation half 'half B' (replicate MODEL --data FILE "
            f"--seed 7{by})") in _flat(explored)
    assert ("Half A holds the rows that an exploration of the same rows with the same seed explores (its exploration "
            f"half), and half B those of its confirmation half (explore --data FILE --split 7{by})") in _flat(replicated)
    e, r = _halves(tmp_path / "e.csv"), _halves(tmp_path / "r.csv")
    assert e["exploration"] == r["A"] and e["confirmation"] == r["B"]


def test_replicate_says_nothing_of_explores_halves_when_it_splits_fewer_rows(tmp_path, capsys, rider_demo,
                                                                                rider_model):
    frame = rider_demo.copy()
    frame.loc[frame.index[:30], "clean"] = None  # rows with gaps, left out before the split (listwise)
    data = tmp_path / "survey.csv"
    frame.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, out, err = run_cli(["replicate", model, "--data", data, "--seed", "7", "--incomplete-rows", "listwise"],
                             capsys)
    assert code == 0, err
    assert "its exploration half" not in _flat(out)
