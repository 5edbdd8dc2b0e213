"""Exports that label only the end points of a scale (new-user trial s25, finding 11): 'Never', 1, 2, 3, 4, 5,
'Always' for a scale of 0 to 6.  The refusal of such a column advised coding the words 'from the lowest answer up:
answers "..." = 1, "..." = 2', which gives 'Never' the code of the answer 1; it now writes a statement that works,
every number listed as itself and each word coded by its place on the scale, which reads the file back as the answers
planted.  Invented data (a fictional transit agency's riders), simulated with a fixed seed.
"""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.cli import main

MODEL = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")


def _answers(seed: int = 4, n: int = 300) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    raw = .8 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .6, (n, 6))
    return pd.DataFrame(np.clip(np.round(raw * 1.5 + 3), 0, 6).astype(int), columns=ITEMS)


def _ends(frame: pd.DataFrame, low: str, high: str, top: int = 6) -> pd.DataFrame:
    return frame.astype(object).map(lambda v: low if v == 0 else high if v == top else v)


def test_the_refusal_writes_a_statement_that_reads_the_file_as_planted(tmp_path, capsys):
    numbers = _answers()
    assert set(np.unique(numbers.to_numpy())) == set(range(7))  # every answer 0 to 6 planted
    _ends(numbers, "Never", "Always").to_csv(tmp_path / "ends.csv", index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    assert main(["check", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "ends.csv")]) == 2
    err = " ".join(capsys.readouterr().err.split())
    statement = 'answers "Never" = 0, 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5, "Always" = 6'
    assert statement in err and "from the lowest answer up" not in err
    assert "the words' codes come from the questionnaire's scale" in err
    assert "if \"Never\" is the lowest answer" not in err  # the common frequency scales order these two words
    # the statement advised, written into the model: the file reads as the numbers planted (the same fit)
    coded = cfa_tool.fit(MODEL + statement + "\n", tmp_path / "ends.csv", diagnostics=False)
    plain = cfa_tool.fit(MODEL, numbers, diagnostics=False)
    assert np.isclose(coded.fit.chi_square, plain.fit.chi_square) and coded.n_obs == plain.n_obs == 300


def test_words_no_common_scale_orders_say_which_is_taken_for_the_lowest(tmp_path, capsys):
    numbers = _answers()
    _ends(numbers, "Bad", "Good").to_csv(tmp_path / "ends.csv", index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    assert main(["check", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "ends.csv")]) == 2
    err = " ".join(capsys.readouterr().err.split())
    found = re.search(r'answers "(\w+)" = 0, 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5, "(\w+)" = 6 \(if "(\w+)" is the '
                      r'lowest answer and "(\w+)" the highest\)', err)
    assert found and {found[1], found[2]} == {"Bad", "Good"} and found[1] == found[3] and found[2] == found[4]


def test_the_model_language_page_shows_the_statement():
    from pathlib import Path

    page = (Path(__file__).resolve().parents[2] / "docs" / "model-language.md").read_text(encoding="utf-8")
    assert 'answers "Never" = 0, 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5, "Always" = 6 for vig1..vig6' in page
