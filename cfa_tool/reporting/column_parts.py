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


def label_columns(align: Sequence[str], widths: Sequence[float], room: float,
                  rows: Sequence[Sequence[str]] | None = None) -> int:
    """How many leading columns name a row: the left-aligned (text) ones before the first number, at least one,
    and no more than take half the room together; and beyond half the room, those it takes to tell the rows
    apart (``rows``: the table's cells), as long as the widest other column still fits beside them.  A bootstrap
    table names a parameter on two rows, one per scale: a part showing the parameter without its scale would give
    two numbers for one name."""
    count = 1
    while count < len(align) - 1 and align[count] == "l":
        together = sum(widths[:count + 1])
        if together > room / 2 and (rows is None or _told_apart(rows, count)
                                    or together + max(widths[count + 1:]) > room):
            break
        count += 1
    return count


def _told_apart(rows: Sequence[Sequence[str]], count: int) -> bool:
    """Whether the first ``count`` columns name every row differently."""
    return len({tuple(row[:count]) for row in rows}) == len(rows)
