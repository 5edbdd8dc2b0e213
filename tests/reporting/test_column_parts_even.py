"""A table cut into parts never leaves a lone column for its last part when the fewest parts could share the columns
more evenly (new-user trial s15: a 20-item matrix in Word continued as a table of one cell); parts that end with
several columns stay as full as they go, so that a row's numbers stay together where they fit."""

from __future__ import annotations

from cfa_tool.reporting.column_parts import column_parts


def test_a_lone_last_column_is_shared_out():
    widths = [30] + [20] * 19  # a label column and 19 columns of a lower triangle
    parts = column_parts(widths, 30 + 20 * 18)  # room for 18 beside the labels: greedily 18 and 1
    assert [len(p) - 1 for p in parts] == [10, 9] and all(p[0] == 0 for p in parts)
    assert sorted(j for p in parts for j in p[1:]) == list(range(1, 20))


def test_full_parts_are_kept_when_the_last_holds_several():
    widths = [30] + [20] * 10
    assert [len(p) - 1 for p in column_parts(widths, 30 + 20 * 7)] == [7, 3]
    assert column_parts(widths, 30 + 20 * 10) == [list(range(11))]
