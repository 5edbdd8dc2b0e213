"""explore --split draws its halves by the one rule of every split (data.halves.drawn_halves, replicate --data's):
with --cluster whole clusters go to each half, within each stratum of --strata; the report, the JSON and the halves
file say so, and fit --half reads such a file.  Without --split, --cluster draws nothing: refused.  And the JSON of
explore lists the columns the default items left out, with why, as the items' note says them in words.

The data are the bundled demo (a fictional transit agency's rider survey) with a household column of four riders
each, nested in the districts; the check values are counted here by pandas (rows and households per half) and by
numpy's default generator, as draw_cluster_halves documents its rule."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"


@pytest.fixture()
def households(rider_demo):
    frame = rider_demo.copy()
    frame["household"] = (frame.groupby("district").cumcount() // 4
                          + np.where(frame["district"] == "north", 1000, 2000))
    frame["years_riding"] = np.round(np.random.default_rng(1).uniform(0.5, 30, len(frame)), 1)
    return frame


def _half_of_each_row(result, frame):
    half = pd.Series("", index=np.arange(len(frame)) + 2)  # a file's rows as a spreadsheet numbers them
    half[list(result.split.exploration_rows)] = "exploration"
    half[list(result.split.confirmation_rows)] = "confirmation"
    return half.to_numpy()


def test_whole_households_go_to_each_half_within_districts(households, tmp_path):
    path = tmp_path / "riders.csv"
    households.to_csv(path, index=False)
    result = cfa_tool.explore(str(path), split=5, cluster="household", strata="district")
    half = _half_of_each_row(result, households)
    assert (half != "").all()
    per_household = pd.Series(half).groupby(households["household"].to_numpy()).nunique()
    assert (per_household == 1).all()  # every household in one half
    # within each district, its households split in two by the rule of draw_cluster_halves: half of them (the odd
    # one to the first half in the first district of odd count, then in turn)
    counts = pd.DataFrame({"d": households["district"], "h": households["household"], "half": half}
                          ).drop_duplicates("h").groupby(["d", "half"]).size().unstack()
    north, south = households.groupby("district")["household"].nunique()[["north", "south"]]
    assert sorted(counts.loc["north"]) == [north // 2, north - north // 2]
    assert sorted(counts.loc["south"]) == [south // 2, south - south // 2]
    split = result.to_dict()["split"]
    assert (split["cluster_column"], split["strata_column"]) == ("household", "district")
    assert split["clusters_per_half"] == [int((counts["exploration"]).sum()), int(counts["confirmation"].sum())]
    assert "drawn cluster by cluster within each stratum of district" in result.summary().replace("\n", " ")
    assert "household" not in result.items and "district" not in result.items


def test_the_halves_file_records_the_clusters_and_fit_reads_a_half(households, tmp_path, capsys):
    path, halves = tmp_path / "riders.csv", tmp_path / "halves.csv"
    households.to_csv(path, index=False)
    assert main(["explore", "--data", str(path), "--split", "5", "--cluster", "household",
                 "--halves-file", str(halves)]) == 0
    saved = pd.read_csv(halves)
    assert (saved["cluster_column"] == "household").all()
    assert (saved.groupby("cluster")["half"].nunique() == 1).all()
    capsys.readouterr()
    assert main(["fit", str(MODEL), "--data", str(path), "--half", str(halves), "confirmation", "--json",
                 str(tmp_path / "fit.json")]) == 0
    fitted = json.loads((tmp_path / "fit.json").read_text())
    assert fitted["data"]["rows_read"] == int((saved["half"] == "confirmation").sum())


def test_a_cluster_without_a_split_is_refused(households):
    with pytest.raises(OptionError, match="draws the random halves of split"):
        cfa_tool.explore(households, cluster="household")


def test_the_json_lists_the_columns_left_out_of_the_items(households):
    result = cfa_tool.explore(households.drop(columns="household"))
    left = result.to_dict()["items_left_out"]
    assert {"column": "years_riding", "reason": "measure off the answer scale"} in left
    assert "years_riding" in str(result.notes[0]) and "years_riding" not in result.items
