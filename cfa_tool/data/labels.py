"""Text labels from data cells (group, cluster and stratum labels, filter values), read the way people mean them.

'north' and 'north ' with a trailing space, or 'cafe' with an accent stored in two Unicode
forms, look the same on screen and are the same group to the researcher; whole numbers
stored as floats (2.0) are the label 2.  One function makes every such label, so groups and
row filters agree.
"""

from __future__ import annotations

import unicodedata
from typing import TYPE_CHECKING

from cfa_tool.errors import printable

if TYPE_CHECKING:
    import pandas as pd


def label_text(value) -> str:
    """A cell as a label: whole-number floats without '.0', text without spaces at its ends and in
    Unicode's composed form (NFC)."""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return unicodedata.normalize("NFC", str(value).strip())


def merged_labels(values) -> list[tuple[str, list[str]]]:
    """Labels that several different raw texts were read as (for a note): [(label, raw texts)]."""
    raw: dict[str, set[str]] = {}
    for v in values:
        raw.setdefault(label_text(v), set()).add(str(v))
    return [(label, sorted(texts)) for label, texts in raw.items() if len(texts) > 1]


def label_notes(frame: pd.DataFrame, column: str, shown: int = 5, part: str = "group", unit: str = "group") -> list[str]:
    """One note naming the labels of ``column`` that differed only by spaces at their ends or Unicode form and were
    read as one (none when no labels were merged): of the group column (every command with groups gives it through
    :func:`cfa_tool.pipeline.inputs.moments_for` or :func:`cfa_tool.pipeline.inputs.ordinal_groups`), or with
    ``part`` and ``unit`` of a cluster or strata column (cfa_tool.data.sample_design)."""
    merged = merged_labels(frame[column].dropna())
    if not merged:
        return []
    listed = "; ".join(f"{' and '.join(repr(printable(t)) for t in texts)} as '{printable(label)}'"
                       for label, texts in merged[:shown])
    more = f"; and {len(merged) - shown} more" if len(merged) > shown else ""
    return [f"in the {part} column '{printable(column)}', labels that differ only by spaces at their ends or by Unicode "
            f"form were read as one {unit}: {listed}{more}"]
