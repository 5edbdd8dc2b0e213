"""A data frame's text cells that hold a marker of no answer ('.', 'nan': Stata and SAS exports, pandas' astype(str)
of a gap) are read as no answer, as a CSV file of the same cells is, with the note of text that says no answer in a data frame
(data.non_answers.NON_ANSWER_MARKS), where the frame was refused as holding text among numbers (hostile tester s24;
docs/python.md promises the same checks from Python).  Check values:
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
    said = [str(w) for w in from_frame.warnings if "says no answer" in str(w)]
    assert said == ["2 cells of the items in the data frame hold text that says no answer, read as missing, not as "
                    "answers: '.' (1 cell: clean 1); 'nan' (1 cell: clean 1). To analyse one as an answer, write the "
                    "answer's number in the cell, in a copy of the data frame"]
    assert any("cells written as 'nan' (1 cell), '.' (1 cell) were read as no answer" in str(w)
               for w in from_file.warnings)
    assert data.loc[3, "clean"] == "." and data.loc[4, "clean"] == "nan"  # the caller's frame as it was
