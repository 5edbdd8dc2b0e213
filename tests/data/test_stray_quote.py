"""A quote opened in a free-text cell and closed only rows later makes the rows between one cell (the CSV rules,
RFC 4180, read it so): a hostile tester's file lost 200 of 480 rows without a word.  A quoted value whose later
lines hold the separators of a whole row is refused, naming the line and column; comments of several lines with a
few commas (a survey export) are read as they are.  Reference for what the rows are: Python's csv module."""

from __future__ import annotations

import csv
import io

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError

MODEL = "factor f: q1, q2, q3, q4\n"


def _rows(n: int, comment) -> str:
    rng = np.random.default_rng(3)
    f = rng.normal(size=n)
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(["id", "q1", "q2", "q3", "q4", "comment"])
    for k in range(n):
        writer.writerow([k + 1, *np.round(0.8 * f[k] + 0.6 * rng.normal(size=4), 2), comment(k)])
    return out.getvalue()


def test_a_stray_quote_that_swallows_rows_is_refused(tmp_path):
    text = _rows(120, lambda k: "ok")
    lines = text.splitlines()
    lines[11] = lines[11][: -len("ok")] + '"Late again'  # line 12 opens a quote, line 41 closes it
    lines[40] = lines[40][: -len("ok")] + 'see above"'
    path = tmp_path / "stray.csv"
    path.write_text("\n".join(lines) + "\n")
    assert len(list(csv.reader(io.StringIO(path.read_text())))) == 1 + 120 - 29  # the csv module reads 29 rows fewer
    before = path.read_bytes()
    with pytest.raises(DataError, match=r"stray.csv: line 12, column 6: a quoted value runs over 30 lines, to line 41, "
                                        r"and holds 29 lines with the separators of a whole row"):
        cfa_tool.fit(MODEL, str(path))
    assert path.read_bytes() == before


def test_comments_of_several_lines_are_read_as_they_are(tmp_path):
    path = tmp_path / "comments.csv"
    path.write_text(_rows(120, lambda k: "late, crowded,\nbut fine" if k % 7 == 0 else "ok"))
    result = cfa_tool.fit(MODEL, str(path))
    assert result.n_obs == 120 == len(list(csv.reader(io.StringIO(path.read_text())))) - 1


def test_a_quoted_comment_with_as_many_commas_as_a_row_is_read(tmp_path):
    """Four columns and a properly quoted comment of several lines with three commas on a line ('late, dirty, cold,
    rude'): words, not a row of data, so the file is read as the csv module reads it (review s14: refused)."""
    rng = np.random.default_rng(4)
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(["x1", "x2", "x3", "comment"])
    f = rng.normal(size=200)
    for k in range(200):
        writer.writerow([*np.round(0.8 * f[k] + 0.6 * rng.normal(size=3), 2),
                         "bus was\nlate, dirty, cold, rude\nagain" if k % 9 == 0 else "ok"])
    path = tmp_path / "legit.csv"
    path.write_text(out.getvalue())
    assert cfa_tool.fit("factor f: x1, x2, x3\n", str(path)).n_obs == 200


def test_a_stray_quote_in_a_middle_column_or_left_open_is_named(tmp_path):
    """A quote opened in the second column (the field count would be wrong, and was said first) and one left open to
    the end of the file (the line it runs to is the last, not one beyond; review s14)."""
    lines = _rows(60, lambda k: "ok").splitlines()
    middle = lines[:]
    cells = middle[20].split(",")
    cells[1] = '"' + cells[1]
    middle[20] = ",".join(cells)
    (tmp_path / "middle.csv").write_text("\n".join(middle) + "\n")
    with pytest.raises(DataError, match=r"middle.csv: line 21, column 2: a quoted value runs over 41 lines, to line 61"):
        cfa_tool.fit(MODEL, str(tmp_path / "middle.csv"))
    open_end = lines[:]
    open_end[10] = open_end[10][: -len("ok")] + '"bus was late'
    (tmp_path / "open.csv").write_text("\n".join(open_end) + "\n")
    with pytest.raises(DataError, match=r"open.csv: line 11, column 6: a quoted value runs over 51 lines, to line 61,"):
        cfa_tool.fit(MODEL, str(tmp_path / "open.csv"))


def test_explore_and_fit_say_the_same_of_a_word_among_numbers(tmp_path):
    """One message for a word typed among a column's numbers (re-read s14: explore said 'leave it empty for no answer'
    where fit named the option that reads the word as no answer)."""
    frame = pd.read_csv(io.StringIO(_rows(120, lambda k: "ok")))
    frame["q2"] = frame["q2"].astype(object)
    frame.loc[7, "q2"] = "abc"
    path = tmp_path / "word.csv"
    frame.to_csv(path, index=False)
    said = []
    for run in (lambda: cfa_tool.fit(MODEL, str(path)), lambda: cfa_tool.explore(str(path), items=["q1", "q2", "q3",
                                                                                                   "q4"], factors=1)):
        with pytest.raises(DataError) as found:
            run()
        said.append(str(found.value))
    assert "holds text ('abc' in row 9) among numbers; correct the cell, or, if the word means no answer" in said[0]
    assert said[0] == said[1]
