"""An invariance ladder with a group smaller than its model: the caution's advice names the row filter's option in the
running views only, as fit's and compare's do (a note_parts.Command part), never in the manuscript's words (re-check
s18, r05: the Word file said '... or leave it out with a row filter (--keep)')."""

from __future__ import annotations

import cfa_tool
from cfa_tool.note_parts import RUNNING, WORDS, said


def test_the_small_groups_advice_names_no_option_in_the_manuscript(hs_data):
    data = hs_data.copy()
    data.loc[data.index[:5], "school"] = "Tiny"  # 5 rows for the group's 6 free parameters
    result = cfa_tool.invariance("factor f: x4, x5, x6\n", data, group="school")
    # the group named by the one rule of group names (language.names.written_group; s22): one word, as it is
    [caution] = [w for w in result.warnings if said(w, RUNNING).startswith("Group Tiny: 5 rows for the 6 free parameters")]
    assert "--keep" in said(caution, RUNNING) or "keep=" in said(caution, RUNNING)
    assert "--keep" not in said(caution, WORDS) and "keep=" not in said(caution, WORDS)
