"""How a table wider than the room it has is shown: in parts of whole columns, each part with the label
columns again (the leading text columns, such as factor and group), so that no number is ever broken across
lines and every number keeps its row's names.  The terminal (characters) and the Word report (points) use the
same rule."""

from __future__ import annotations

from collections.abc import Sequence


def column_parts(widths: Sequence[float], room: float, labels: int = 1) -> list[list[int]]:
    """The columns of each part, the first ``labels`` (label) columns included in every part: all columns in one
    part when they fit in ``room`` (or nothing is left beside the labels but one column), else the other columns
    in order, as many to a part as fit beside the label columns (at least one each)."""
    labels = max(1, min(labels, len(widths) - 1))
    if len(widths) <= labels + 1 or sum(widths) <= room:
        return [list(range(len(widths)))]
    kept = sum(widths[:labels])
    groups: list[list[int]] = []
    for j in range(labels, len(widths)):
        if groups and kept + sum(widths[i] for i in groups[-1]) + widths[j] <= room:
            groups[-1].append(j)
        else:
            groups.append([j])
    return [[*range(labels), *g] for g in groups]


def label_columns(align: Sequence[str], widths: Sequence[float], room: float) -> int:
    """How many leading columns name a row: the left-aligned (text) ones before the first number, at least one,
    and no more than take half the room together."""
    count = 1
    while count < len(align) - 1 and align[count] == "l" and sum(widths[:count + 1]) <= room / 2:
        count += 1
    return count
