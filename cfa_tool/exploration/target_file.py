"""Target files of target rotation: an open, self-describing table of items by factors.

The file is comma-separated text (UTF-8).  Its first line names the columns: the word ``item``,
then one name per factor.  Every further line is one item: its name, then one cell per factor,
``0`` (or another number) for a loading to aim at, or an empty cell for a loading left free
(Browne 1972's partially specified target); each factor needs at least k - 1 targets for k factors, the
condition for the rotation to be identified (Browne 2001).  Lines starting with ``#`` are comments.  Items of
the analysis that the file leaves out have every loading free.  Example::

    item,visual,textual,speed
    x1,,0,0
    x4,0,,0
    x7,0,0,
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from cfa_tool.errors import OptionError
from cfa_tool.input_files import input_text, normalise_line_ends

MAX_TARGET_BYTES = 5_000_000
FIRST_WORD = "item"


@dataclass(frozen=True, eq=False)
class TargetFile:
    """A target file of target rotation as read: each item's target loadings."""
    source: str
    factors: tuple[str, ...]
    rows: dict  # item -> tuple of floats (NaN for free)

    def matrix(self, items: tuple[str, ...]) -> np.ndarray:
        """items x factors, NaN where free; an error for items the analysis does not have."""
        unknown = [x for x in self.rows if x not in items]
        if unknown:
            raise OptionError(f"{self.source}: the target names '{unknown[0]}', which is not among the items explored")
        out = np.full((len(items), len(self.factors)), np.nan)
        for i, item in enumerate(items):
            if item in self.rows:
                out[i] = self.rows[item]
        return out


def _fail(source: str, line: int, column: int | None, message: str) -> OptionError:
    where = f"{source}:{line}" + (f":{column}" if column is not None else "")
    return OptionError(f"{where}: {message}")


def read_target_file(path: str | Path) -> TargetFile:
    """Read a target file (see the module's docstring), with one-line errors naming the file, line and column."""
    source = str(path)
    text = input_text(path, "target file", OptionError, MAX_TARGET_BYTES)
    lines = [(n + 1, line) for n, line in enumerate(normalise_line_ends(text).split("\n"))
             if line.strip() and not line.lstrip().startswith("#")]
    if not lines:
        raise OptionError(f"{source}: the target file is empty; its first line names the columns: item, then each factor")
    parsed = []
    for number, line in lines:
        try:
            cells = next(csv.reader(io.StringIO(line)))
        except csv.Error as exc:
            raise _fail(source, number, None, f"this line cannot be read as comma-separated values ({exc})") from None
        parsed.append((number, line, [c.strip() for c in cells]))
    number, _, header = parsed[0]
    if not header or header[0].lower() != FIRST_WORD:
        raise _fail(source, number, 1, f"the first line names the columns: '{FIRST_WORD}', then one name per factor "
                                       f"(e.g. 'item,visual,textual'); found '{header[0] if header else ''}'")
    factors = tuple(header[1:])
    if not factors:
        raise _fail(source, number, None, "the first line names no factor after 'item'")
    for k, name in enumerate(factors):
        if not name:
            raise _fail(source, number, None, f"factor column {k + 1} has no name")
        if factors.index(name) != k:
            raise _fail(source, number, None, f"the factor name '{name}' appears twice")
    rows: dict[str, tuple[float, ...]] = {}
    for number, line, cells in parsed[1:]:
        item = cells[0]
        if not item:
            raise _fail(source, number, 1, "the line has no item name in its first cell")
        if item in rows:
            raise _fail(source, number, 1, f"the item '{item}' is listed twice")
        if len(cells) != len(factors) + 1:
            raise _fail(source, number, None, f"the line has {len(cells) - 1} cells after the item name, and the first "
                                              f"line names {len(factors)} factors")
        parts = line.split(",")
        starts = np.cumsum([1] + [len(part) + 1 for part in parts]).tolist() if len(parts) == len(cells) else None
        values = []
        for k, cell in enumerate(cells[1:]):
            if cell == "":
                values.append(math.nan)
                continue
            try:
                value = float(cell)
            except ValueError:
                value = math.nan
            if not math.isfinite(value):
                raise _fail(source, number, starts[k + 1] if starts else None,
                            f"'{cell}' is not a number: write 0 (or another loading) to aim at, or leave the cell "
                            f"empty for a free loading ({item}, {factors[k]})")
            values.append(value)
        rows[item] = tuple(values)
    if not rows:
        raise OptionError(f"{source}: the target file lists no item below its first line")
    if all(math.isnan(v) for values in rows.values() for v in values):
        raise OptionError(f"{source}: the target aims at no loading (every cell is empty); write 0 where a loading "
                          f"should be near zero")
    need = len(factors) - 1
    for k, name in enumerate(factors):
        count = sum(not math.isnan(values[k]) for values in rows.values())
        if count < need:
            raise OptionError(f"{source}: the factor column '{name}' (column {k + 2}) aims at {count} loading"
                              f"{'' if count == 1 else 's'}, and a target rotation of {len(factors)} factors is "
                              f"identified only with at least {need} target{'' if need == 1 else 's'} on each factor (Browne 2001)")
    return TargetFile(source, factors, rows)
