"""'N/A' read as no answer, in a file and in a data frame.  In a file the markers of an empty cell ('NA', 'N/A', as R
and spreadsheets write gaps) are a note, as pandas' ``read_csv`` reads them as gaps by default (the lead's decision,
s13: a caution on every R export with gaps would be noise that trains readers to skip cautions); in a data frame the
same text means the frame was built without that reading, which is a note worded for a frame (review s12: it
said 'the file writes'), a caution only when rows leave the analysis because of it (s14).  The reference is pandas' own reading of the same cells: the cells named are the cells
pandas leaves empty."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.commands.test_cli import DATA, MODEL


def _gappy(tmp_path, marker: str):
    frame = pd.read_csv(DATA).dropna().reset_index(drop=True)  # only the gaps made here
    frame.loc[[3, 40], "on_time"] = np.nan
    frame.loc[5, "clean"] = np.nan
    path = tmp_path / "riders.csv"
    frame.to_csv(path, index=False, na_rep=marker)
    as_frame = frame.astype(object).where(frame.notna(), marker)
    return path, as_frame


@pytest.mark.parametrize("marker", ["N/A", "n/a", "NA"])
def test_a_marker_of_no_answer_is_a_note_in_a_file_and_in_a_frame(marker, tmp_path):
    path, as_frame = _gappy(tmp_path, marker)
    gaps = int(pd.read_csv(path)[["on_time", "clean"]].isna().to_numpy().sum())  # pandas' reading: the reference
    from_file, from_frame = cfa_tool.fit(MODEL, path), cfa_tool.fit(MODEL, as_frame)
    assert not [p for p in from_file.problems if "no answer" in p.explanation]
    assert [w for w in from_file.warnings if "cells written as" in w]  # the file's note
    # no row leaves the analysis because of them (full information keeps the rows): a note of the frame's own, not a
    # caution (the lead's decision, s14)
    assert not [p for p in from_frame.problems if "no answer" in p.explanation]
    said = [w for w in from_frame.warnings if "says no answer" in w]
    assert len(said) == 1 and f"'{marker}' ({gaps} cells: on_time 2, clean 1)" in said[0]
    assert said[0].startswith(f"{gaps} cells of the items in the data frame hold text that says no answer")
    assert "the file" not in said[0] and said[0].endswith("in a copy of the data frame")
    assert from_file.fit.chi_square == pytest.approx(from_frame.fit.chi_square, rel=1e-10)


def test_the_methods_text_names_a_data_frame_as_one(tmp_path):
    """The methods text of a data frame's fit does not speak of a data file."""
    _, as_frame = _gappy(tmp_path, "N/A")
    text = " ".join(methods_paragraph(cfa_tool.fit(MODEL, as_frame)).split())
    assert "text cells of the data frame that say no answer were treated as missing ('N/A' in on_time and clean)" in text
    assert "data file marks" not in text
