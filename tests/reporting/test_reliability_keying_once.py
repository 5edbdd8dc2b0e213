"""The reliability table of a fit with groups says which items are keyed in reverse once: a later group keyed as the
first points to the first group's table (s27: every group's note repeated the sentence), and a group keyed
otherwise says its own keys.  The keys are the fit's (assessment.reliability.item_keys: a 'reversed' statement, or
the loadings' signs), read from its reliability rows."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.note_parts import said, WORDS
from cfa_tool.reporting.tables import reliability_table
from tests.reporting.test_paragraph_keying_and_reliability import REVERSED, TRAITS, _answers

KEYED = "Computed for keyed sums; reversed for scoring"


def _grouped(second_flipped: bool = False) -> pd.DataFrame:
    """Two groups of the invented answers (q2, q5, q8 worded against their traits); in the second, with
    ``second_flipped``, q2 given in the direction of its trait (6 minus the answer)."""
    first, second = _answers(20261203, 500), _answers(20261204, 500)
    if second_flipped:
        second["q2"] = 6 - second["q2"]
    return pd.concat([first.assign(site="east"), second.assign(site="west")], ignore_index=True)


def _notes(result) -> list[str]:
    return [said(reliability_table(result, g).note, WORDS) for g in range(len(result.groups))]


def test_the_keys_of_groups_keyed_alike_are_said_once():
    east, west = _notes(cfa_tool.fit(TRAITS + REVERSED, _grouped(), group="site"))
    assert east.count(KEYED) == 1 and "a: q2; b: q5; c: q8" in east
    assert KEYED not in west and west.startswith("Items keyed as in group east.")


def test_a_group_keyed_otherwise_says_its_own_keys():
    # no 'reversed' statement: each group's keys follow its loadings' signs, q2 reversed in east alone
    east, west = _notes(cfa_tool.fit(TRAITS, _grouped(second_flipped=True), group="site"))
    assert KEYED in east and KEYED in west
    assert "a: q2" in east and "a: q2" not in west
