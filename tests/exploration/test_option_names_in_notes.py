"""The notes and errors of explore name its options as the caller wrote them (options.Option): the command line's
flags in a run from the command line, the Python keywords in a call from Python (a Python caller who reads '--items'
has no such thing to type).  No computation is checked here: only the words of the notes and errors."""

from __future__ import annotations

import json

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import CfaError
from cfa_tool.resources import resource_dir

RIDER = resource_dir("demo") / "rider_survey.csv"


def _item_note(notes) -> str:
    return next(str(n) for n in notes if str(n).startswith("Items: "))


def test_the_note_on_the_items_chosen_by_default_names_the_keyword_from_python():
    result = cfa_tool.explore(str(RIDER), factors=3, replications=5)
    note = _item_note(result.notes)
    assert "which items=... can change" in note and "--items" not in note
    assert "(split=..., a seed)" in str(result.summary()) and "--split" not in str(result.summary())


def test_the_note_on_the_items_chosen_by_default_names_the_flag_on_the_command_line(tmp_path, capsys):
    js = tmp_path / "explore.json"
    assert main(["explore", "--data", str(RIDER), "--factors", "3", "--replications", "5", "--json", str(js)]) == 0
    capsys.readouterr()
    written = json.loads(js.read_text())
    note = _item_note(written["notes"])
    assert "which --items can change" in note and "items=..." not in note
    from cfa_tool.note_parts import read, said

    assert any("(--split, a seed)" in said(read(n)) for n in written["report"]["notes"])  # saved with its parts


@pytest.fixture()
def worded(tmp_path):
    path = tmp_path / "worded.csv"
    frame = pd.read_csv(RIDER).iloc[:, 2:8]
    frame["sat1"] = ["Agree", "Disagree"] * (len(frame) // 2)
    frame.to_csv(path, index=False)
    return path


def test_an_error_about_answers_as_words_names_the_answers_keyword_from_python(worded):
    with pytest.raises(CfaError) as info:
        cfa_tool.explore(str(worded), items=["on_time", "short_wait", "sat1"])
    assert "answers='FILE'" in str(info.value) and "--answers" not in str(info.value)


def test_an_error_about_answers_as_words_names_the_flag_on_the_command_line(worded, capsys):
    assert main(["explore", "--data", str(worded), "--items", "on_time,short_wait,sat1"]) == 2
    err = capsys.readouterr().err
    assert "--answers FILE" in err and "answers=" not in err
