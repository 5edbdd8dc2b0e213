"""Texts from a user's file quoted in a note or message are cut to a width with a mark of the cut (errors.clipped):
re-check s17 found a workbook's title quoted to its 60th character, '(Meridian Cons')', read as the whole title, in
every view.  The data: Holzinger & Swineford (1939), tests/datasets, under an invented title row."""

from __future__ import annotations

import openpyxl
import pandas as pd

import cfa_tool
from cfa_tool.errors import clipped
from tests.conftest import DATASETS

MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def test_a_cut_text_says_it_was_cut():
    assert clipped("short", 10) == "short" and clipped("x" * 10, 10) == "x" * 10
    assert clipped("abcdefghijk", 10) == "abcdefghi…" and len(clipped("a" * 500, 60)) == 60
    assert clipped("tab\there\x1b", 40) == "tab here\\x1b"  # printable first: control characters escaped


def test_a_long_title_above_the_column_names_is_quoted_with_the_cut_marked(tmp_path):
    frame = pd.read_csv(DATASETS / "holzinger_swineford_1939.csv")
    title = "Ability tests of seventh- and eighth-grade pupils, two schools, raw scores as recorded"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append([title])
    sheet.append(list(frame.columns))
    for row in frame.itertuples(index=False):
        sheet.append(list(row))
    book.save(tmp_path / "titled.xlsx")
    notes = " ".join(str(w) for w in cfa_tool.fit(MODEL, str(tmp_path / "titled.xlsx")).warnings)
    assert f"holds a title ('{title[:59]}…') above the column names" in notes
