"""A value just below a cutoff is printed on its side of it: a determinacy of .7996 read 'determinacy .80, below
.80' in the scores report (rounded to two decimals).  reporting.numbers.unit with ``beside`` prints as many decimals as
it takes (the rule every guide value of the fit indices already uses)."""

from __future__ import annotations

from types import SimpleNamespace

from cfa_tool.reporting.score_report import caution_lines
from cfa_tool.scoring.methods import DETERMINACY_CAUTION


def test_a_determinacy_just_below_the_caution_is_not_printed_as_the_caution():
    value = DETERMINACY_CAUTION - 0.0004  # .7996
    quality = SimpleNamespace(factors=("f",), determinacy=(value,), low_determinacy=(True,), group=None)
    (line,) = caution_lines(SimpleNamespace(quality=(quality,)))
    assert line.startswith("The determinacy of f is .7996, below .80 ")
    far = SimpleNamespace(factors=("f",), determinacy=(0.61,), low_determinacy=(True,), group=None)
    assert caution_lines(SimpleNamespace(quality=(far,)))[0].startswith("The determinacy of f is .61, below .80 ")
