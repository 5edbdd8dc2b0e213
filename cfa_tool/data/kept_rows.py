"""Which rows of the data file a frame holds after row filters, and where a cell is in the file: the words messages
use for them."""

from __future__ import annotations

import pandas as pd

from cfa_tool.errors import printable
from cfa_tool.options import Option

#: the key of DataFrame.attrs that names the row filters a frame's rows were kept by (set by data.filters)
KEPT_BY = "kept_by_row_filters"

#: the key of DataFrame.attrs that keeps, for a table read from a sheet, each column's letter in the sheet
#: ({column name: 'E'}), set by data.readers: a message about a cell names it as the sheet does ('cell E425')
SHEET_COLUMNS = "sheet_columns"


def rows_listed(numbers, shown: int = 5, ids=()) -> str:
    """Rows named by their numbers (data.moments.row_numbers), the first ``shown`` of them, each with its id when
    ``ids`` gives one (one per row, None where a row has none): 'row 711 ('Total responses: 1204')',
    'rows 152, 154, 424, 709, 710 and 3 more'."""
    numbers = [int(n) for n in numbers]
    ids = list(ids) if len(ids) == len(numbers) else [None] * len(numbers)
    listed = ", ".join(str(n) + (f" ('{printable(str(i))[:40]}')" if i is not None else "")
                       for n, i in zip(numbers[:shown], ids))
    more = f" and {len(numbers) - shown} more" if len(numbers) > shown else ""
    return f"{'row' if len(numbers) == 1 else 'rows'} {listed}{more}"


def cell_words(frame: pd.DataFrame | pd.Series, column: str, row: int) -> str:
    """Where a cell is, for a message: 'row 425, cell E425' for a sheet's table (``row``: the number of the row as
    data.moments.row_numbers gives it, the sheet's own), 'row 425' otherwise."""
    letter = frame.attrs.get(SHEET_COLUMNS, {}).get(column)
    return f"row {row}" + (f", cell {letter}{row}" if letter else "")


def rows_described(frame: pd.DataFrame) -> str:
    """Which rows ``frame`` holds, for a message about what they lack: 'the 250 rows kept by --keep 'district =
    north'', or 'the 480 rows' when no row filter was applied."""
    filters = frame.attrs.get(KEPT_BY, ())
    kept = Option.KEEP.given([printable(text) for text in filters])
    return f"the {len(frame)} {'row' if len(frame) == 1 else 'rows'}" + (f" kept by {kept}" if filters else "")
