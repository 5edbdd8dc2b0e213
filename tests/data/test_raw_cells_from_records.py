"""The cells of a delimited file as written (data.readers._RawCells: the checks of number spellings, markers of no
answer and dotted thousands read them) come from the fields the csv module read once for the whole file
(data.readers.TextRecords), not from a second reading by the table parser: the two readings must give the same cells.
Checked on generated files (quoted cells with delimiters, doubled quotes and line breaks, spaces, markers, leading
zeros, rows of empty fields, blank lines, trailing delimiters, CR LF line ends), against pandas' own parser reading
every cell as text, the reference the reader used before."""

from __future__ import annotations

import random

import pandas as pd
import pytest

from cfa_tool.data import readers
from cfa_tool.errors import DataError

CELLS = ["1", "01", "1.0", " 2", "2 ", "NA", ".", "", "", "a b", '"x,y"', '"q""uote"', '"two\nlines"', " 3 ", "-",
         "#N/A", '"7"', "nan", "4,5", "0.50", "+1", "x;y", '"a\r\nb"']


def _table(rng: random.Random) -> str:
    width = rng.randint(2, 6)
    delimiter = rng.choice([",", ";", "\t"])
    end = rng.choice(["\n", "\r\n"])
    trailing = delimiter if rng.random() < 0.2 else ""
    lines = [delimiter.join(f"c{k}" for k in range(width)) + trailing]
    for _ in range(rng.randint(1, 25)):
        roll = rng.random()
        if roll < 0.05:
            lines.append("")  # a blank line
        elif roll < 0.1:
            lines.append(delimiter * (width - 1))  # a row of empty fields
        else:
            cells = [rng.choice(CELLS) for _ in range(width)]
            lines.append(delimiter.join(c if delimiter not in c or c.startswith('"') else f'"{c}"' for c in cells)
                         + trailing)
    return end.join(lines) + (end if rng.random() < 0.7 else "")


@pytest.mark.parametrize("seed", range(4))
def test_the_cells_from_the_records_are_the_table_parsers(tmp_path, monkeypatch, seed):
    parser_reading = readers._RawCells
    made = []

    class Kept(parser_reading):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            made.append(self)

    monkeypatch.setattr(readers, "_RawCells", Kept)
    rng = random.Random(seed)
    compared = 0
    for k in range(250):
        path = tmp_path / f"t{k}.csv"
        path.write_bytes(_table(rng).encode())
        made.clear()
        try:
            readers.read_table(path)
        except DataError:  # refused files (a stray quote, a row of too many fields) have no cells to read
            continue
        raw = made[-1]
        assert raw._rows is not None  # the records' fields were used
        by_parser = parser_reading(raw.body, raw._delimiter, raw._widest, raw._width, raw._index).frame()
        pd.testing.assert_frame_equal(raw.frame(), by_parser)
        for position in range(raw._width):  # the column the spellings read, by itself
            pd.testing.assert_series_equal(pd.Series(raw.column(position), index=by_parser.index, name=position),
                                           by_parser.iloc[:, position])
        compared += 1
    assert compared > 150  # most generated files are tables


def test_the_cell_scans_find_what_the_alternation_found():
    # data.readers._found_in_cells: the pattern at the text's start or after a line break or a delimiter, against the
    # search it replaced, '(?:^|[,;\t|])' before the pattern (re.MULTILINE), on random texts of delimiters, line
    # breaks, quotes, spaces, markers and numbers
    import re

    rng = random.Random(5)
    pieces = ["NA", "N/A", ".", ",", ";", "\t", "|", "\n", "\r", '"', " ", "1", "01", "1.0", "x", "nan", "a", "+0"]
    for cell in (readers._MARKER, readers._SPELLED_NUMBER):
        before = re.compile(r"(?:^|[,;\t|])" + cell[0].pattern, re.MULTILINE)
        for _ in range(10_000):
            text = "".join(rng.choice(pieces) for _ in range(rng.randint(0, 14)))
            assert readers._found_in_cells(cell, text) == (before.search(text) is not None), repr(text)
