"""One rule of 'as many decimals as a number needs' (reporting.numbers.needed_decimals), used by the power report's
target (a number the user gave: printed exactly, at least two decimals) and by the least share of a scores' report (a
computed share: within half a percent of itself, never printed as 0).  Values worked by hand."""

from __future__ import annotations

import pytest

from cfa_tool.reporting.numbers import needed_decimals, unit
from cfa_tool.reporting.score_words import SHARE_CLOSE, share_words


@pytest.mark.parametrize("value, fewest, most, within, digits", [
    (0.8, 2, 9, 0.0, 2),  # .80: a target power as given, two decimals at least
    (0.825, 2, 9, 0.0, 3),
    (0.80001, 2, 9, 0.0, 5),
    (200 / 3, 0, 4, SHARE_CLOSE, 0),  # 2/3 as 67%: 67 is 0.5% of 66.67 away, at the edge of 0.5%
    (12.34, 0, 4, SHARE_CLOSE, 1),  # 12% is 2.8% away; 12.3% 0.3%
    (0.01, 0, 4, SHARE_CLOSE, 2),  # 0% and 0.0% print 0; 0.01% is exact
    (0.0, 0, 4, SHARE_CLOSE, 4),  # nothing prints 0 otherwise: the most
])
def test_needed_decimals(value, fewest, most, within, digits):
    assert needed_decimals(value, fewest, most, within) == digits


def test_both_users_print_by_it():
    assert unit(0.825, needed_decimals(0.825, fewest=2)) == ".825" and unit(0.8, needed_decimals(0.8, fewest=2)) == ".80"
    assert share_words(2 / 3) == "67%" and share_words(0.0001) == "0.01%" and share_words(0.123) == "12.3%"
