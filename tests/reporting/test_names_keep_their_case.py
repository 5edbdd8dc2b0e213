"""A line of a report never changes a name's case (new-user trial s24, finding 11: align printed its data notes with a
capital, 'Survey_export.csv: rows 2-3 were not read ...' and 'Lang_data.csv: ...', where every other command printed
the file's name as given; compare's caution on a boundary began 'One against gen' for the model files one.cfa and
gen.cfa).  One rule (note_parts.capitalised) gives a line its capital: only a plain lower-case first word is
capitalised.

Data: invented here (a one-factor scale in three language versions with a few 'NA' cells, seeded), and the demo."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.note_parts import Note, capitalised, said
from tests.conftest import run_cli


def test_the_one_rule():
    assert capitalised("listwise deletion left out 3 rows") == "Listwise deletion left out 3 rows"
    assert capitalised("non-invariant intercepts") == "Non-invariant intercepts"
    assert capitalised("lang_data.csv: 12 cells read as no answer") == "lang_data.csv: 12 cells read as no answer"
    assert capitalised("x1: no answers") == "x1: no answers"
    assert said(capitalised(Note(("survey.csv: rows 2-3 were not read",)))) == "survey.csv: rows 2-3 were not read"
    assert said(capitalised(Note(("the rows",)))) == "The rows"


def _languages(path):
    rng = np.random.default_rng(5)
    frames = []
    for label, n in (("en", 400), ("es", 300), ("fi", 200)):
        f = rng.normal(0, 1, n)
        x = f[:, None] * np.array([.7, .6, .65, .55]) + rng.normal(0, .7, (n, 4))
        frame = pd.DataFrame(1 + (x[:, :, None] > np.array([-1.2, -.4, .4, 1.2])).sum(2),
                             columns=["a1", "a2", "a3", "a4"]).astype(object)
        frame[rng.random(frame.shape) < .03] = "NA"
        frame.insert(0, "lang", label)
        frames.append(frame)
    pd.concat(frames).to_csv(path, index=False)


def test_align_names_the_data_file_as_given(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    _languages(tmp_path / "lang_data.csv")
    (tmp_path / "m.cfa").write_text("factor f: a1..a4\n")
    code, out, err = run_cli(["align", "m.cfa", "--data", "lang_data.csv", "--group-column", "lang", "--trials", "0"],
                             capsys)
    assert code == 0, err
    assert "lang_data.csv:" in out and "Lang_data.csv" not in out


GEN = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
       "factor comfort: seat_available, clean, temperature, room_to_stand\n"
       "factor courtesy: greeting, helpful, respectful, clear_answers\n")
#: punctuality and comfort merged into one factor (their correlation at 1: on the boundary)
ONE = ("factor riding: on_time, short_wait, accurate_info, easy_transfer, seat_available, clean, temperature, "
       "room_to_stand\nfactor courtesy: greeting, helpful, respectful, clear_answers\n")


def test_compare_names_the_models_as_given(tmp_path, capsys, rider_demo):
    rider_demo.to_csv(tmp_path / "survey.csv", index=False)
    (tmp_path / "gen.cfa").write_text(GEN)
    (tmp_path / "one.cfa").write_text(ONE)
    code, out, err = run_cli(["compare", tmp_path / "gen.cfa", tmp_path / "one.cfa", "--data", tmp_path / "survey.csv"],
                             capsys)
    assert code == 0, err
    flat = " ".join(out.replace("\u2502", " ").split())
    # (the merge is read by the plain chi-square, no caution first since boundary-s24: the table's title and note)
    assert "one (restricted) against gen: difference tests" in flat and "One (restricted)" not in flat
    assert "One against gen" not in flat
