"""Random halves saved in a file (explore --split, replicate --data, with --halves-file) and one of them read back.

The halves file is the one record of which rows went to which half: one line per row split, ``row,half,seed,
data_file,data_sha256`` (the row's number as the data file numbers them, data.moments.row_numbers; the half's name;
the seed that drew the halves; the data file's name and the SHA-256 of its bytes).  A half of it is analysed by
choosing it among the row selections (``--half FILE.csv NAME``, ``keep=[RandomHalf('FILE.csv', 'NAME')]``): the rows
are read from the data file itself, never from a copy, and the halves file is checked against that file first: the
same contents (the checksum), and the same rows split (the rows the data file holds after the row filters are those
the halves file lists, no more and no fewer), else a refusal that says which."""

from __future__ import annotations

import csv
import hashlib
import io
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.data.kept_rows import KEPT_BY, row_naming, rows_listed
from cfa_tool.data.moments import row_numbers
from cfa_tool.errors import DataError, OptionError, printable
from cfa_tool.options import Option

#: the columns of a halves file, in order
HALVES_COLUMNS = ("row", "half", "seed", "data_file", "data_sha256")


@dataclass(frozen=True)
class RandomHalf:
    """The choice of one half of a halves file: ``path`` the file, ``name`` the half ('confirmation')."""

    path: str | Path
    name: str


@dataclass(frozen=True)
class HalfRows:
    """One half of a halves file, as chosen and found in the data: it joins the row filters of a data summary
    (``LoadedData.row_filters``, ``DataSummary.row_filters``), whose reports and methods text name it as they name a
    filter (the attributes a row filter has: no column, nothing left out for an empty cell)."""

    halves_file: str
    name: str
    seed: int
    rows: int  # the half's rows
    split: int  # the rows split into the halves
    column = None  # no column of the data file chose the rows
    operator = "="
    empty = 0
    dropped = 0
    shared = ()
    other_case = ()

    @property
    def value(self) -> str:
        return self.name

    @property
    def text(self) -> str:
        """'confirmation half (seed 17) of halves.csv': the selection as the data line and the JSON name it."""
        return f"{self.name} half (seed {self.seed}) of {self.halves_file}"

    def __str__(self) -> str:
        return self.text

    def note(self) -> str:
        """The note of a report: which rows were analysed."""
        return (f"Only the rows of the {self.name} half (seed {self.seed}) of {self.halves_file} are analysed: "
                f"{self.rows} of the {self.split} rows split at random into two halves")

    def in_words(self) -> str:
        """'the row fell in the confirmation half of two random halves (seed 17; listed in halves.csv)', after
        'those where' in a methods section, which gives the rows analysed and those in the file."""
        return (f"the row fell in the {self.name} half of two random halves (seed {self.seed}; listed in "
                f"{self.halves_file})")


def fingerprint(path) -> str:
    """The SHA-256 of a data file's bytes ('' when ``path`` is no regular file: a data frame, a special file)."""
    if not isinstance(path, (str, Path)) or not Path(path).is_file():
        return ""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def halves_text(halves: list[tuple[str, tuple[int, ...]]], seed: int, data) -> str:
    """The halves file: one line per row split, in the order of the rows (``halves``: each half's name and its rows'
    numbers, data.moments.row_numbers), each with the seed and the data file's name and checksum."""
    name = Path(data).name if isinstance(data, (str, Path)) else ""
    sums = fingerprint(data)
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(HALVES_COLUMNS)
    for row, half in sorted((row, half) for half, numbers in halves for row in numbers):
        writer.writerow((row, half, seed, name, sums))
    return out.getvalue()


@dataclass(frozen=True)
class SavedHalves:
    """A halves file as read: the rows' numbers and their halves (in the file's order), the seed, the data file's
    name and checksum."""

    path: str
    rows: np.ndarray
    halves: tuple[str, ...]
    seed: int
    data_file: str
    data_sha256: str

    def names(self) -> tuple[str, ...]:
        return tuple(dict.fromkeys(self.halves))


def read_halves(path) -> SavedHalves:
    """Read a halves file (:func:`halves_text`), every line checked: a one-line error naming the file and line."""
    shown = printable(str(path))
    try:
        text = Path(path).read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise OptionError(f"the halves file '{shown}' does not exist") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise DataError(f"{shown}: cannot read the halves file ({exc.__class__.__name__})") from None
    lines = list(csv.reader(io.StringIO(text)))
    if not lines or tuple(c.strip() for c in lines[0]) != HALVES_COLUMNS:
        earlier = bool(lines) and tuple(c.strip() for c in lines[0]) == HALVES_COLUMNS[:2]
        raise DataError(f"{shown}, line 1: " + (
            "a halves file of an earlier version, without the seed and the data file's checksum that a half is "
            "checked by; write the halves again (cfa-tool explore --split SEED --halves-file NEW.csv draws the same "
            "halves from as many rows)" if earlier else
            f"not a halves file (its first line must be '{','.join(HALVES_COLUMNS)}', as explore --split and "
            f"replicate --data write it with --halves-file)"))
    rows, halves, seeds, data, lines_of = [], [], set(), set(), {}
    for number, cells in enumerate(lines[1:], start=2):
        if not any(c.strip() for c in cells):
            continue
        if len(cells) != len(HALVES_COLUMNS):
            raise DataError(f"{shown}, line {number}: {len(cells)} values, and a halves file has "
                            f"{len(HALVES_COLUMNS)} ({', '.join(HALVES_COLUMNS)})")
        row, half, seed, name, sums = (c.strip() for c in cells)
        if not row.isdigit() or int(row) < 1:
            raise DataError(f"{shown}, line {number}, column row: '{printable(row)}' is not a row number")
        if not half:
            raise DataError(f"{shown}, line {number}, column half: empty (each row names its half)")
        if not seed.lstrip("-").isdigit():
            raise DataError(f"{shown}, line {number}, column seed: '{printable(seed)}' is not a whole number")
        if int(row) in lines_of:
            raise DataError(f"{shown}, line {number}: row {int(row)} is listed twice (line {lines_of[int(row)]} "
                            f"too); each row is in one half")
        lines_of[int(row)] = number
        rows.append(int(row))
        halves.append(half)
        seeds.add(int(seed))
        data.add((name, sums))
        if len(seeds) > 1 or len(data) > 1:
            raise DataError(f"{shown}, line {number}: another seed or data file than the lines above; a halves file "
                            f"holds the halves of one split of one data file")
    if not rows:
        raise DataError(f"{shown}: the halves file lists no rows")
    name, sums = data.pop()
    return SavedHalves(str(path), np.asarray(rows, dtype=np.int64), tuple(halves), seeds.pop(), name, sums)


def half_kept(frame: pd.DataFrame, choice: RandomHalf, data, source: str) -> tuple[pd.DataFrame, HalfRows]:
    """The rows of ``frame`` (the data file's rows after the row filters) in the half ``choice`` names, and the half
    as found; a refusal when the halves file is not that of these rows: drawn from a file of other contents (the
    checksum), naming rows the data do not hold, or leaving rows of the data out (another selection of rows)."""
    saved = read_halves(choice.path)
    shown = printable(str(choice.path))
    if choice.name not in saved.names():
        listed = " and ".join(f"'{printable(n)}'" for n in saved.names())
        raise OptionError(f"{shown} holds the halves {listed}, not '{printable(choice.name)}'")
    if not isinstance(data, (str, Path)):
        raise OptionError(f"a half of {shown} is checked against the data file its rows were drawn from "
                          f"({printable(saved.data_file)}): give that file's path as the data, not a data frame")
    if fingerprint(data) != saved.data_sha256:
        raise DataError(f"{shown} holds the halves of a data file with other contents ('{printable(saved.data_file)}' "
                        f"as it was when the halves were drawn), not those of {source}: give the data file the halves "
                        f"were drawn from; if that file was corrected since, write the halves again from it (cfa-tool "
                        f"explore --split {saved.seed} --halves-file NEW.csv draws the same halves from as many rows)")
    numbers = row_numbers(frame)
    naming = row_naming(frame)
    absent = np.setdiff1d(saved.rows, numbers)
    unlisted = np.setdiff1d(numbers, saved.rows)
    if len(absent) or len(unlisted):
        kept = " after the row filters" if frame.attrs.get(KEPT_BY) else ""
        which = (f"it lists {rows_listed(absent, naming=naming)}, not among them" if len(absent) else
                 f"it leaves out {rows_listed(unlisted, naming=naming)}")
        raise DataError(f"{shown} split {len(saved.rows)} rows, and {source} holds {len(numbers)}{kept}; {which}: the "
                        f"halves are of another selection of rows; give the {Option.SHEET}, {Option.NAMES_ROW}, "
                        f"{Option.FIRST_DATA_ROW} and {Option.KEEP} of the run that drew them")
    mask = np.isin(numbers, saved.rows[np.asarray(saved.halves) == choice.name])
    chosen = frame[mask]
    half = HalfRows(shown, choice.name, saved.seed, int(mask.sum()), len(numbers))
    chosen.attrs[KEPT_BY] = tuple(frame.attrs.get(KEPT_BY, ())) + (half.text,)
    return chosen, half
