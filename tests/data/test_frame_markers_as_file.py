"""A data frame's text cells that hold a marker of no answer ('.', 'nan': Stata and SAS exports, pandas' astype(str)
of a gap) are read as no answer with the note a CSV file of the same cells gets, where the frame was refused as
holding text among numbers (hostile tester s24; docs/python.md promises the same checks from Python).  Check values:
the frame and the file of the same cells give the same rows and chi-square, the file's reading being the reference."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def _marked() -> pd.DataFrame:
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data["clean"] = data["clean"].astype(str)  # '3.0', and 'nan' for a gap
    data.loc[3, "clean"], data.loc[4, "clean"] = ".", "nan"
    return data


def test_frame_reads_markers_as_the_file_does(tmp_path):
    data = _marked()
    path = tmp_path / "marked.csv"
    data.to_csv(path, index=False)
    from_file = cfa_tool.fit(MODEL, path)
    from_frame = cfa_tool.fit(MODEL, data)
    assert from_frame.data.n_obs == from_file.data.n_obs
    assert from_frame.fit.chi_square == pytest.approx(from_file.fit.chi_square, rel=1e-10)
    said = [w for w in from_frame.warnings if "were read as no answer" in w]
    assert said == ["<data frame>: cells written as 'nan' (1 cell), '.' (1 cell) were read as no answer"]
    assert any(str(w).endswith("marked.csv" + said[0].removeprefix("<data frame>")) for w in from_file.warnings)
    assert data.loc[3, "clean"] == "." and data.loc[4, "clean"] == "nan" and not data.attrs  # the caller's frame


def test_the_note_counts_the_rows_a_filter_keeps():
    data = _marked()
    kept = cfa_tool.fit(MODEL, data, keep=["district = north"])
    assert data.loc[3, "district"] == "north" and data.loc[4, "district"] != "north"
    assert "<data frame>: cells written as '.' (1 cell) of the 250 rows that the row filters kept were read as no " \
           "answer" in kept.warnings
