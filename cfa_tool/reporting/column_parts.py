"""How a table wider than the room it has is shown: in parts of whole columns, each part with the label
columns again (the leading text columns, such as factor and group), so that no number is ever broken across
lines and every number keeps its row's names.  The terminal (characters) and the Word report (points) use the
same rule."""

from __future__ import annotations

from collections.abc import Sequence


def column_parts(widths: Sequence[float], room: float, labels: int = 1) -> list[list[int]]:
    """The columns of each part, the first ``labels`` (label) columns included in every part: all columns in one
    part when they fit in ``room`` (or nothing is left beside the labels but one column), else the other columns
    in order, as many to a part as fit beside the label columns (at least one each); when that leaves a lone column
    for the last part, the parts are made as even as the fewest parts allow (filled in turn up to the narrowest width
    that needs no more parts), so that no 'continued' part holds one column a fuller part left over (new-user trial
    s15: a 20-item matrix's continued table of one cell)."""
    labels = max(1, min(labels, len(widths) - 1))
    if len(widths) <= labels + 1 or sum(widths) <= room:
        return [list(range(len(widths)))]
    kept = sum(widths[:labels])
    others = list(range(labels, len(widths)))

    def filled(width: float) -> list[list[int]]:  # in turn, as many to a part as fit within ``width`` beside the labels
        groups: list[list[int]] = []
        for j in others:
            if groups and sum(widths[i] for i in groups[-1]) + widths[j] <= width:
                groups[-1].append(j)
            else:
                groups.append([j])
        return groups

    fewest = filled(room - kept)
    if len(fewest[-1]) > 1:  # the parts as full as they go, the numbers of a row together where they fit
        return [[*range(labels), *g] for g in fewest]
    low, high = max(widths[j] for j in others), room - kept  # the narrowest part that keeps as few parts
    for _ in range(40):
        middle = (low + high) / 2
        if len(filled(middle)) <= len(fewest):
            high = middle
        else:
            low = middle
    even = filled(high)
    groups = even if len(even) <= len(fewest) else fewest
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
