"""The scores file carries, beside the ids, the columns by which the run chose or grouped its rows: the row filters'
columns (--keep), the group column, the cluster and strata columns, named and written as in the data file (new-user
trial s25, findings 2 and 10).  The file has a line for every row of the data, the rows a filter left out too (its
documented layout, kept), so a person of data in long form has a line per wave: scored with --keep 'wave = 1', a
merge by the id alone doubled the rows (4,303 for 2,400 people), and the caution's advice to merge by the id and the
time together could not be followed, for the file held no wave column; nor could teams be aggregated, for it held no
team column.

Data: the bundled demo (a fictional transit agency's rider survey, simulated: demo/make_demo_data.py), written twice
as two waves of the same riders (wave 2: the answers of wave 1 shifted by one row, so that the waves' scores
differ), with each rider's depot (a cluster; invented) and a two-level stratum.  The checks are against pandas (read
the data file, merge, groupby), which the project did not write, and against the scores of a file that holds the
wave-1 rows alone."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.resources import resource_dir
from cfa_tool.workflows.factor_scores import score_with_fit

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()
ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
         "room_to_stand", "greeting", "helpful", "respectful", "clear_answers"]


def _long(tmp_path) -> tuple:
    riders = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    riders["depot"] = [f"D{k % 12:02d}" for k in range(len(riders))]
    riders["zone"] = np.where(riders.index % 2 == 0, "inner", "outer")
    first = riders.assign(wave=1)
    second = riders.assign(wave=2)
    second[ITEMS] = np.roll(riders[ITEMS].to_numpy(), 1, axis=0)
    data = pd.concat([first, second], ignore_index=True)
    path = tmp_path / "riders_long.csv"
    data.to_csv(path, index=False)
    alone = tmp_path / "riders_wave1.csv"
    first.to_csv(alone, index=False)
    return path, alone


def test_a_filtered_run_carries_the_filter_and_cluster_columns_and_merges_by_id_and_wave(tmp_path):
    path, alone = _long(tmp_path)
    result = cfa_tool.scores(MODEL, path, id_column="rider_id", keep="wave = 1", cluster="depot", strata="zone")
    table = result.table
    # the id first, then the columns the run chose and grouped its rows by, as the data file names them
    assert list(table.columns[:4]) == ["rider_id", "wave", "depot", "zone"]
    assert result.carried == ("wave", "depot", "zone")
    # line by line, the carried cells are the data file's own (pandas' reading of the file)
    data = pd.read_csv(path)
    assert len(table) == len(data) == 960
    for column in ("wave", "depot", "zone"):
        assert table[column].tolist() == data[column].tolist()
    # a merge by the id alone still meets each rider twice (the documented line-per-row layout), by the id and the
    # wave together once: one row per person, with the scores of the wave-1 rows
    wave1 = data[data.wave == 1][["rider_id", "wave"]]
    assert len(wave1.merge(table, on="rider_id")) == 960
    merged = wave1.merge(table, on=["rider_id", "wave"], how="left", validate="one_to_one")
    assert len(merged) == 480 and merged["comfort_regression"].notna().all()
    # the same scores as those of a file that holds the wave-1 rows alone (same fit, same rows)
    own = cfa_tool.scores(MODEL, alone, id_column="rider_id", cluster="depot", strata="zone").table
    assert np.allclose(merged["comfort_regression"].to_numpy(), own["comfort_regression"].to_numpy(), atol=1e-9)


def test_the_repeated_ids_advice_can_be_followed_with_the_file_written(tmp_path):
    path, _ = _long(tmp_path)
    result = cfa_tool.scores(MODEL, path, id_column="rider_id", keep="wave = 1")
    caution = next(p for p in result.fit.problems if p.kind is ProblemKind.REPEATED_IDS)
    advice = str(caution.advice)
    # the advice to merge by the id and the time together names where the time is (the file carries the filter's
    # column), and the merge that needs no column: line by line
    assert "merge by the id and the time together" in advice
    assert "a scores file carries beside the id the columns its run's row filters" in advice
    assert "line by line" in advice


def test_units_aggregate_from_the_scores_file_alone(tmp_path):
    """Finding 10: the team (cluster) column in the scores file gives the units' means by a groupby of the file
    alone, equal to those of the scores set beside the data file's own cluster column line by line."""
    path, _ = _long(tmp_path)
    result = cfa_tool.scores(MODEL, path, id_column="rider_id", keep="wave = 1", cluster="depot")
    table = result.table
    from_file = table.dropna(subset=["comfort_regression"]).groupby("depot")["comfort_regression"].agg(["mean", "size"])
    data = pd.read_csv(path)
    beside = pd.DataFrame({"depot": data["depot"], "score": table["comfort_regression"].to_numpy()})
    by_data = beside[data.wave == 1].groupby("depot")["score"].agg(["mean", "size"])
    assert from_file.index.tolist() == by_data.index.tolist() and (from_file["size"] == by_data["size"]).all()
    assert np.allclose(from_file["mean"].to_numpy(), by_data["mean"].to_numpy(), atol=1e-12)
    assert from_file["size"].sum() == 480


def test_groups_are_carried_and_from_fit_carries_the_filter_and_the_fit_groups(tmp_path):
    path, _ = _long(tmp_path)
    grouped = cfa_tool.scores(MODEL + "invariance scalar\n", path, id_column="rider_id", group="district",
                              keep="wave = 1")
    assert list(grouped.table.columns[:3]) == ["rider_id", "wave", "district"]
    # an earlier fit scores the wave-2 rows: the file carries the filter's column and the fit's group column
    fitted = cfa_tool.fit(MODEL + "invariance scalar\n", pd.read_csv(path).query("wave == 1"), group="district")
    later = score_with_fit(fitted, path, id_column="rider_id", keep="wave = 2")
    assert list(later.table.columns[:3]) == ["rider_id", "wave", "district"] and later.carried == ("wave", "district")
    assert later.table.loc[later.table.wave == 2, "comfort_regression"].notna().all()
    assert later.table.loc[later.table.wave == 1, "comfort_regression"].isna().all()


def test_without_filters_groups_or_design_nothing_is_carried(tmp_path):
    path, _ = _long(tmp_path)
    result = cfa_tool.scores(MODEL, pd.read_csv(path).query("wave == 1"), id_column="rider_id")
    assert result.carried == () and result.table.columns[1] == "punctuality_regression"


def test_a_carried_column_named_as_a_score_column_is_refused(tmp_path):
    path, _ = _long(tmp_path)
    data = pd.read_csv(path).rename(columns={"wave": "comfort_regression"})
    with pytest.raises(OptionError, match="'comfort_regression', which the scores file carries from the data"):
        cfa_tool.scores(MODEL, data, keep="comfort_regression = 1")


def test_the_command_line_writes_them_and_the_json_names_them(tmp_path):
    path, _ = _long(tmp_path)
    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    out, report = tmp_path / "s.csv", tmp_path / "s.json"
    assert main(["scores", str(model), "--data", str(path), "--id", "rider_id", "--keep", "wave = 1",
                 "--cluster", "depot", "--output", str(out), "--json", str(report)]) == 0
    assert pd.read_csv(out).columns[:3].tolist() == ["rider_id", "wave", "depot"]
    saved = json.loads(report.read_text())
    assert saved["columns_of_the_data"] == ["wave", "depot"]
    assert saved["columns"][:3] == ["rider_id", "wave", "depot"]
