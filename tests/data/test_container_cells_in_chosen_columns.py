"""A list, a dict or a set in a group, cluster, strata, weights, id or row filter column of a data frame is refused in
one line naming the column and the row, by the rule of the item columns (re-check s17, N7: a TypeError traceback for a
cluster or strata column; a group named "['north']"; a weight "'['north']' is not a number")."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
MODEL = "factor transit: on_time, short_wait, accurate_info, easy_transfer\n"


def with_cell(column: str, cell) -> pd.DataFrame:
    frame = pd.read_csv(DATA)
    frame["school"] = np.arange(len(frame)) % 40  # invented clusters and strata
    frame["stratum"] = np.arange(len(frame)) % 3
    frame["weight"] = 1.0
    frame[column] = frame[column].astype(object)
    frame.at[7, column] = cell
    return frame


ROLES = [("district", {"group": "district"}), ("school", {"cluster": "school"}),
         ("stratum", {"strata": "stratum"}), ("weight", {"weights": "weight"}),
         ("rider_id", {"id_column": "rider_id"}), ("district", {"keep": ["district = north"]})]


@pytest.mark.parametrize("column, options", ROLES, ids=[next(iter(o)) for _, o in ROLES])
@pytest.mark.parametrize("cell", [["north"], {"a": 1}, {"x"}], ids=["list", "dict", "set"])
def test_a_container_cell_is_refused_naming_the_column_and_the_row(column, options, cell):
    kind = type(cell).__name__
    with pytest.raises(DataError) as refused:
        cfa_tool.fit(MODEL, with_cell(column, cell), **options)
    # the item columns' words (data.non_answers), the row by its index label as a data frame names it
    assert str(refused.value).startswith(f"<data frame>: column '{column}', row labelled 7: holds a {kind} (")
    assert f"unpack the {kind} into its own columns or rows first" in str(refused.value)


def test_check_and_scores_refuse_it_too():
    frame = with_cell("district", ["north"])
    for run in (lambda: cfa_tool.check(MODEL, frame, group="district"),
                lambda: cfa_tool.scores(MODEL, frame, group="district")):
        with pytest.raises(DataError, match=r"column 'district', row labelled 7: holds a list \(\['north'\]\)"):
            run()


def test_a_container_in_a_column_the_run_does_not_read_is_left_alone():
    frame = with_cell("school", ["north"])  # not a group, design, id or filter column of this fit: never read
    assert cfa_tool.fit(MODEL, frame).converged
