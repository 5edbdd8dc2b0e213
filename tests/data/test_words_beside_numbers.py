"""Answers typed partly as words and partly as numbers, a totals row under them, and counts past 999 in the notes
(new-user trial s23: an HR workbook, findings 11, 12 and 13).

- The suggested 'answers' statement of a column of a common scale's words that also holds the scale's numbers lists
  the numbers as themselves too: written as offered, the fit reads the column (it stopped on 'holds the number 3').
- A number ten times the statement's largest code among answer words is a totals row's: the advice is to remove it
  or leave it out with --keep, never to list it in the statement (which would make it a respondent).
- Counts of rows past 999 carry their thousands separator (the pairwise-rows note of an ordinal fit, the repeated
  ids' caution, which now reads 'gives one id to N rows').
The data are invented (a fictional transit agency's rider survey), simulated with a fixed seed; each fit's reference
is the fit of the same answers as numbers.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError

ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")
PLAIN = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
WORDS = ("Strongly disagree", "Disagree", "Neither agree nor disagree", "Agree", "Strongly agree")


def _answers(n: int = 300, seed: int = 20261205) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    return pd.DataFrame({x: np.digitize(.7 * traits[:, k // 3] + rng.normal(0, .7, n), [-1.2, -.4, .4, 1.2]) + 1
                         for k, x in enumerate(ITEMS)})


def _mixed(frame: pd.DataFrame) -> pd.DataFrame:
    """Every other row's answers written as the scale's words, the rest as numbers."""
    out = frame.astype(object)
    words = out.index % 2 == 0
    for x in ITEMS:
        out.loc[words, x] = [WORDS[int(v) - 1] for v in frame.loc[words, x]]
    return out


def test_the_suggested_statement_reads_the_numbers_beside_the_words():
    frame = _answers()
    with pytest.raises(DataError) as raised:
        cfa_tool.fit(PLAIN, _mixed(frame))
    said = str(raised.value)
    statement = said[said.index("answers \""):]
    assert statement.endswith('"Strongly agree" = 5, 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5')
    written = cfa_tool.fit(PLAIN + statement + "\n", _mixed(frame))  # the statement as offered reads the column
    assert written.fit.chi_square == pytest.approx(cfa_tool.fit(PLAIN, frame).fit.chi_square, rel=1e-10)


def test_a_totals_row_among_word_answers_is_advised_as_one():
    frame = _mixed(_answers())
    totals = pd.DataFrame([{x: 1000 + k for k, x in enumerate(ITEMS)}])
    statement = "answers " + ", ".join(f'"{w}" = {k + 1}' for k, w in enumerate(WORDS)) + ", " + \
        ", ".join(f"{k} = {k}" for k in range(1, 6)) + "\n"
    with pytest.raises(DataError) as raised:
        cfa_tool.fit(PLAIN + statement, pd.concat([frame, totals], ignore_index=True))
    said = str(raised.value)
    assert "holds the number 1000 among answers recorded as words" in said
    assert "a row of means or totals below the answers? remove it, or leave it out with" in said
    assert "list the number in the statement" not in said
    with pytest.raises(DataError) as raised:  # a number just past the scale: a slip or a code, as before
        cfa_tool.fit(PLAIN + statement, pd.concat([frame, pd.DataFrame([{x: 8 for x in ITEMS}])], ignore_index=True))
    assert "list the number in the statement with its code" in str(raised.value)


def test_counts_past_999_carry_their_separator():
    frame = _answers(1200).astype(float)
    frame.iloc[::7, 0] = np.nan
    result = cfa_tool.fit(PLAIN, frame, ordinal="all")
    notes = " ".join(" ".join(str(w).split()) for w in result.warnings)
    assert "of 1,200;" in notes and "only the 1,028 complete rows" in notes
    rng = np.random.default_rng(5)  # continuous answers: no two rows copies of each other (a caution of its own)
    ids = (_answers(1200) + rng.normal(0, .1, (1200, 6))).assign(rider=["R1"] * 1100 + [f"R{k}" for k in range(2, 102)])
    found = cfa_tool.fit(PLAIN, ids, id_column="rider")
    said = " ".join(next(str(p.explanation) for p in found.problems if "id column" in str(p.explanation)).split())
    assert "The id column 'rider' gives one id to 1,100 rows: 'R1'" in said
