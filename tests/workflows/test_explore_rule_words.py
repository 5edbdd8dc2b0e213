"""explore's table of rules writes its RMSEA guide as every other guide of the reports does, without the leading zero
of a value that cannot exceed 1 (new-user trial s21, finding 12: 'RMSEA at most 0.05' beside '.06' elsewhere).  The
value: close fit at RMSEA .05 or less (Browne & Cudeck 1993; a convention)."""

from __future__ import annotations

from cfa_tool.exploration.choices import CountRule
from cfa_tool.workflows.explore import RULE_WORDS


def test_the_close_fit_rule_reads_rmsea_at_most_point_05():
    assert RULE_WORDS[CountRule.CLOSE_FIT].startswith("fewest factors with RMSEA at most .05 ")  # Browne & Cudeck 1993
    assert not any("0." in words for words in RULE_WORDS.values())
