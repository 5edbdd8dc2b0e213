"""How a table wider than the room it has is shown: in parts of whole columns, each part with the first
(label) column again, so that no number is ever broken across lines.  The terminal (characters) and the
Word report (points) use the same rule."""

from __future__ import annotations

from collections.abc import Sequence


def column_parts(widths: Sequence[float], room: float) -> list[list[int]]:
    """The columns of each part, the first (label) column included in every part: all columns in one part
    when they fit in ``room`` (or the table has no more than two columns), else the other columns in order,
    as many to a part as fit beside the first column (at least one each)."""
    if len(widths) <= 2 or sum(widths) <= room:
        return [list(range(len(widths)))]
    groups: list[list[int]] = []
    for j in range(1, len(widths)):
        if groups and widths[0] + sum(widths[i] for i in groups[-1]) + widths[j] <= room:
            groups[-1].append(j)
        else:
            groups.append([j])
    return [[0, *g] for g in groups]
