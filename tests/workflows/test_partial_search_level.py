"""The partial-invariance search frees constraints while the largest score test is significant at alpha, under the
fit-change rule too: alpha was refused there ("the fit-change rule does not use" it) while the search used .05, and
the freed-parameters note said "at the steps' level" naming none (hostile tester s15, 16).  Data: Holzinger &
Swineford (1939), the two schools."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.reporting.workflow_tables import invariance_report
from tests.conftest import THREE_FACTORS, holzinger_swineford


def test_alpha_sets_the_search_level_under_the_fit_change_rule():
    ladder = cfa_tool.invariance(THREE_FACTORS, holzinger_swineford(), "school", partial="auto",
                                 decide_by="fit-change", alpha=0.01)
    assert ladder.alpha == 0.01
    [freed] = [t for t in invariance_report(ladder).tables if t.key == "freed"]  # the schools' intercepts differ
    assert "at alpha = .01, the level the search stops at" in freed.note
    with pytest.raises(OptionError, match="without a partial search does not use"):
        cfa_tool.invariance(THREE_FACTORS, holzinger_swineford(), "school", decide_by="fit-change", alpha=0.01)
