"""The draft model: placement rules, and text that this program's parser accepts.

The threshold .30 for a salient loading is common practice; the placement rule (largest absolute
loading; several or no salient loadings left to the researcher) is the one stated in issue 17.
"""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.errors import DataError
from cfa_tool.exploration import Placement, draft_model
from cfa_tool.language.parser import parse_model

PATTERN = np.array([
    [0.72, 0.05, 0.01],
    [0.65, -0.10, 0.12],
    [0.81, 0.02, -0.04],
    [0.05, 0.70, 0.00],
    [-0.02, 0.60, 0.10],
    [0.10, -0.55, 0.02],  # negative loading on its factor
    [0.40, 0.35, 0.05],  # two salient loadings
    [0.20, 0.10, 0.15],  # none
    [0.00, 0.05, 0.66],  # the only item of factor 3
])
NAMES = ("a1", "a2", "a3", "b1", "b2", "b3", "mixed", "weak", "c1")


def _factors(text: str) -> dict[str, list[str]]:
    spec = parse_model(text)
    return {f.name.text: [i.text for i in f.indicators] for f in spec.factors}


def test_placement_and_parsed_model():
    draft = draft_model(NAMES, PATTERN)
    kinds = {p.item: p.placement for p in draft.placements}
    assert kinds["mixed"] is Placement.SEVERAL_LOADINGS
    assert kinds["weak"] is Placement.NO_LOADING
    assert all(kinds[x] is Placement.ON_FACTOR for x in ("a1", "a2", "a3", "b1", "b2", "b3", "c1"))
    factors = _factors(draft.text)
    # largest loading first, so the marker loads most strongly; the negative item comes last
    assert factors == {"factor1": ["a3", "a1", "a2"], "factor2": ["b1", "b2", "b3"]}
    assert draft.written == (True, True, False)  # one item cannot identify factor3
    lines = draft.text.splitlines()
    code = [line for line in lines if line and not line.startswith("#")]
    assert not any("mixed" in line or "weak" in line or "c1" in line for line in code)
    for item in ("mixed", "weak", "c1"):
        assert any(line.startswith("#") and item in line for line in lines)


def test_quoted_names_collisions_and_ordinal_items():
    names = ("item one", "factor1", "x-3", "q4", "q5", "q6")
    pattern = np.array([[0.7, 0.0], [0.6, 0.1], [0.5, 0.0], [0.0, 0.8], [0.1, 0.7], [0.0, 0.6]])
    draft = draft_model(names, pattern, ordinal=("item one", "q4", "q5", "q6"))
    assert draft.factor_names == ("factor_1", "factor_2")  # 'factor1' is an item
    spec = parse_model(draft.text)
    assert _factors(draft.text) == {"factor_1": ["item one", "factor1", "x-3"], "factor_2": ["q4", "q5", "q6"]}
    assert {name.text for name in spec.ordinal} == {"item one", "q4", "q5", "q6"}
    ordinal_lines = [line for line in draft.text.splitlines() if line.startswith("ordinal")]
    assert ordinal_lines == ['ordinal "item one", q4, q5, q6']


def test_long_factor_lines_continue_after_a_comma():
    names = tuple(f"a_rather_long_item_name_{i:02d}" for i in range(12))
    pattern = np.column_stack([np.linspace(0.8, 0.5, 12)])
    draft = draft_model(names, pattern)
    assert max(len(line) for line in draft.text.splitlines() if not line.startswith("#")) <= 100
    assert _factors(draft.text) == {"factor1": list(names)}


def test_nothing_placed_gives_a_text_without_a_model():
    draft = draft_model(("a", "b", "c"), np.array([[0.2], [0.1], [0.25]]))
    assert not draft.usable
    assert all(line.startswith("#") or not line for line in draft.text.splitlines())


def test_names_the_language_cannot_write_are_an_error():
    with pytest.raises(DataError, match="double quote"):
        draft_model(('say "hi"', "b", "c"), np.array([[0.7], [0.6], [0.5]]))


def test_a_factor_of_two_items_is_left_as_a_comment_that_says_why():
    """Two items identify a factor only through its correlations with other factors; such a factor often fails
    as inadmissible on new data (Anderson & Gerbing 1984), so the draft asks for three (common practice)."""
    pattern = np.array([[0.7, 0.0], [0.6, 0.1], [0.8, 0.0], [0.0, 0.8], [0.1, 0.7]])
    draft = draft_model(("a1", "a2", "a3", "b1", "b2"), pattern)
    assert draft.written == (True, False)
    assert _factors(draft.text) == {"factor1": ["a3", "a1", "a2"]}
    comment = " ".join(line[2:] for line in draft.text.splitlines() if line.startswith("#"))
    assert "factor2 is left out: it has 2 items (b1, b2), fewer than 3" in comment
    assert "inadmissible" in comment
    assert "# factor factor2: b1, b2" in draft.text
