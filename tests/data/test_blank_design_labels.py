"""A cell of a cluster or strata column holding only invisible format characters (a zero-width space) or spaces looks
empty and is read as no cluster or stratum, by the one rule of group labels (data.groups.group_keys): refused as a
missing cluster is, naming the column, the row and the characters (re-check s17, G1: such a cell was a cluster named
'', counted among the clusters).  The rows whose group cell looks empty are in no group, also when clusters are
judged shared by groups (a cluster of 'north' with such a row was said to be shared, and a full-information fit
refused)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError
from tests.commands.test_cli import run

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
MODEL = "factor transit: on_time, short_wait, accurate_info, easy_transfer\n"


def with_design() -> pd.DataFrame:
    frame = pd.read_csv(DATA)
    count = np.arange(len(frame)) % 40  # invented schools (40 in each district, named by it) and 4 strata
    frame["school"] = (frame["district"] + pd.Series(count).astype(str)).astype(object)
    frame["stratum"] = ("h" + pd.Series(count % 4).astype(str)).astype(object)
    frame["district"] = frame["district"].astype(object)
    return frame


@pytest.mark.parametrize("column, option, unit", [("school", "cluster", "cluster"), ("stratum", "strata", "stratum")])
@pytest.mark.parametrize("cell, said", [("\u200b", "invisible format characters (U+200B ZERO WIDTH SPACE)"),
                                        ("\ufeff ", "invisible format characters (U+FEFF ZERO WIDTH NO-BREAK SPACE) "
                                                    "and spaces")])
def test_a_blank_looking_cell_is_no_cluster_or_stratum(column, option, unit, cell, said):
    frame = with_design()
    frame.at[7, column] = cell
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, frame, **{option: column})
    assert str(refused.value).startswith(f"<data frame>: column '{column}', row labelled 7: no {unit} given (the cell "
                                         f"holds only {said}, so it looks empty); every row needs one")


def test_the_command_line_says_it_in_the_file_s_row(tmp_path):
    frame = with_design()
    frame.at[7, "school"] = "\u200b"
    path = tmp_path / "design.csv"
    frame.to_csv(path, index=False)
    model = tmp_path / "one.cfa"
    model.write_text(MODEL)
    done = run("fit", str(model), "--data", str(path), "--cluster", "school", "--json", str(tmp_path / "out.json"))
    assert done.returncode == 2
    assert "design.csv: column 'school', row 9: no cluster given" in done.stderr  # index 7, the names in row 1
    assert len(done.stderr.strip().splitlines()) == 1 and not (tmp_path / "out.json").exists()


def test_a_row_in_no_group_shares_no_cluster():
    frame = with_design()
    frame.at[7, "district"] = "\u200b"  # no group (data.groups.group_keys); its school 'north7' stays in north
    result = cfa_tool.fit(MODEL, frame, group="district", cluster="school")
    said = result.design.to_dict()
    # 40 schools in each district by construction, none in both: 80 in all
    assert said["groups"] == "independent samples" and said["clusters"] == 80
