"""Which rows of the data file a frame holds after row filters: the words messages use for them."""

from __future__ import annotations

import pandas as pd

from cfa_tool.errors import printable
from cfa_tool.options import Option

#: the key of DataFrame.attrs that names the row filters a frame's rows were kept by (set by data.filters)
KEPT_BY = "kept_by_row_filters"


def rows_described(frame: pd.DataFrame) -> str:
    """Which rows ``frame`` holds, for a message about what they lack: 'the 250 rows kept by --keep 'district =
    north'', or 'the 480 rows' when no row filter was applied."""
    filters = frame.attrs.get(KEPT_BY, ())
    kept = Option.KEEP.given([printable(text) for text in filters])
    return f"the {len(frame)} {'row' if len(frame) == 1 else 'rows'}" + (f" kept by {kept}" if filters else "")
