"""The one note of what --missing-codes read as no answer: the reader's count of cells of numbers (data/readers.py)
and the count among answers recorded as words (data/answer_words.py) are both written by :func:`missing_codes_note`."""

from __future__ import annotations

from pathlib import Path

from cfa_tool.errors import printable
from cfa_tool.input_files import base_name

#: the columns a note names before it counts the rest
NAMED_COLUMNS = 8


def missing_codes_note(source: str | Path, codes, read_as_none: list[tuple[str, int]], where: str = "") -> str:
    """What --missing-codes (``codes``) did in the data file ``source``: how many cells of which columns
    (``read_as_none``: (column, cells) pairs) were read as no answer, or that no cell holds any of the codes, as a
    mistyped code would leave it.  ``where``: which cells were looked at when not those of numbers ('of the items
    coded by an 'answers' statement')."""
    given = ", ".join(f"{c:g}" if isinstance(c, (int, float)) else printable(str(c)) for c in codes)
    name = base_name(source)
    if not read_as_none:
        return f"{name}: no cell {where or 'of numbers'} holds any of the codes given with --missing-codes ({given})"
    total = sum(n for _, n in read_as_none)
    shown = ", ".join(f"{printable(str(column))} {n}" for column, n in read_as_none[:NAMED_COLUMNS]) + (
        f" and {len(read_as_none) - NAMED_COLUMNS} more columns" if len(read_as_none) > NAMED_COLUMNS else "")
    return (f"{name}: {total} {'cell' if total == 1 else 'cells'} {where + ' ' if where else ''}holding a code given "
            f"with --missing-codes ({given}) {'was' if total == 1 else 'were'} read as no answer ({shown})")
