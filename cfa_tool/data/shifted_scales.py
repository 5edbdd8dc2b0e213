"""Items whose answers lie on shifted codes in different groups of one file: 0 to 4 in one group and 1 to 5 in another,
as two exports of one questionnaire merged into one file may code them (hostile trial s25, finding 4: read as
intercept non-invariance, and freed by the search of partial invariance).

The one rule: an item's answers in two groups span ranges of the same width, whose lowest and highest answers both
differ by the same amount (0 to 4 against 1 to 5).  A group whose answers merely stop short of an end (1 to 4 against 1
to 5) is not shifted: few rows may leave an end unanswered, and the ordinal fit names such an empty category itself.
The scoring of another file with an earlier fit has the neighbouring rule between two files
(workflows.factor_scores: answers outside the fitted ranges)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.errors import printable
from cfa_tool.numbers import user_number, word_list


@dataclass(frozen=True)
class ShiftedScale:
    """An item whose answers lie on shifted codes in some groups: each group (as the words name it) with its lowest
    and highest answer, and the shift that brings each group onto the codes most groups use (0 where it is on them;
    the first group's codes when as many groups use each)."""

    item: str
    ranges: tuple[tuple[str, float, float], ...]
    shifts: tuple[float, ...]

    def ranges_words(self) -> str:
        """"'clean' runs 0 to 4 in group north and 1 to 5 in group south"."""
        by_range: dict[tuple[float, float], list[str]] = {}
        for group, low, high in self.ranges:
            by_range.setdefault((low, high), []).append(group)
        parts = [f"{user_number(low)} to {user_number(high)} in {word_list(groups)}"
                 for (low, high), groups in by_range.items()]
        return f"'{printable(self.item)}' runs {word_list(parts)}"

    def undoing_words(self) -> str:
        """"add 1 to 'clean' in group north": each shifted group's answers moved onto the codes most groups use."""
        moves = []
        for (group, _, _), shift in zip(self.ranges, self.shifts):
            if shift:
                amount = user_number(abs(shift))
                moves.append(f"add {amount} to '{printable(self.item)}' in {group}" if shift > 0 else
                             f"subtract {amount} from '{printable(self.item)}' in {group}")
        return word_list(moves)

    def shifted_groups(self) -> tuple[str, ...]:
        """The groups whose answers the undoing moves."""
        return tuple(group for (group, _, _), shift in zip(self.ranges, self.shifts) if shift)


def scale_shift(scale: tuple[float, float], answers: tuple[float, float]) -> float | None:
    """How far answers running from ``answers[0]`` to ``answers[1]`` lie from the scale ``scale`` (lowest, highest):
    the amount added to every code (1 for answers 1 to 4 on the scale 0 to 3), by the one rule of this module (the
    same width, both ends moved by the same amount); None when they are not the scale moved.  A file of 0-3 items
    exported as 1-4 is read so, instead of its top answer being taken for a code of no answer (new-user trial s26)."""
    (low, high), (lowest, highest) = scale, answers
    shift = lowest - low
    return float(shift) if shift != 0 and highest - lowest == high - low and high > low else None


def shift_words(shift: float) -> str:
    """"subtract 1 from": what brings answers shifted by ``shift`` back onto the scale, before the answers named."""
    amount = user_number(abs(shift))
    return f"subtract {amount} from" if shift > 0 else f"add {amount} to"


def shifted_scales(items, groups) -> tuple[ShiftedScale, ...]:
    """The items of ``items`` whose answers lie on shifted codes in some of ``groups`` ((words naming the group, its
    rows' answers: an array with one column per item, gaps NaN)), by the rule of this module; () when none.  Groups
    without an answer to an item leave it."""
    found = []
    for j, item in enumerate(items):
        ranges = []
        for name, values in groups:
            column = np.asarray(values, dtype=float)[:, j]
            column = column[~np.isnan(column)]
            if len(column):
                ranges.append((name, float(column.min()), float(column.max())))
        widths = {high - low for _, low, high in ranges}
        lows = {low for _, low, _ in ranges}
        if len(ranges) < 2 or len(widths) != 1 or len(lows) < 2 or not next(iter(widths)) > 0:
            continue
        counts: dict[float, int] = {}
        for _, low, _ in ranges:
            counts[low] = counts.get(low, 0) + 1
        target = max(counts, key=lambda low: (counts[low], -[r[1] for r in ranges].index(low)))
        found.append(ShiftedScale(item, tuple(ranges), tuple(target - low for _, low, _ in ranges)))
    return tuple(found)
