"""Items of at most four answer categories analysed as continuous: the fit's note says so and so must the methods text,
which describes exactly the model fitted (new-user trial s15, finding 2: a 4-point scale fitted as continuous, the
paragraph silent).  Data: Holzinger & Swineford (1939), tests cut at their quartiles into answers 1 to 4 (pandas)."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.reporting.paragraph import comparison_paragraph, methods_paragraph
from tests.conftest import THREE_FACTORS, holzinger_swineford

SENTENCE = ("had at most four categories and were analysed as continuous; with so few categories, analysing them as "
            "ordered categories is usually preferred (Rhemtulla, Brosseau-Liard, & Savalei, 2012).")
ONE_FACTOR = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n"


def _coarse(items) -> pd.DataFrame:
    data = holzinger_swineford()
    for x in items:
        data[x] = pd.qcut(data[x], 4, labels=False) + 1
    return data


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_every_item_coarse():
    data = _coarse([f"x{i}" for i in range(1, 10)])
    result = cfa_tool.fit(THREE_FACTORS, data)
    assert any("at most 4 answer categories" in w for w in result.warnings)  # the note, as before
    assert f"The answers to all 9 items {SENTENCE}" in _flat(methods_paragraph(result))
    assert result.to_dict()["data"]["few_categories_analysed_as_continuous"] == [f"x{i}" for i in range(1, 10)]
    compared = cfa_tool.compare([THREE_FACTORS, ONE_FACTOR], data)
    assert f"The answers to all 9 items {SENTENCE}" in _flat(comparison_paragraph(compared))


def test_some_items_coarse_are_named():
    result = cfa_tool.fit(THREE_FACTORS, _coarse(["x1", "x2", "x3"]))
    assert f"The answers to 3 of the 9 items (x1, x2, and x3) {SENTENCE}" in _flat(methods_paragraph(result))


def test_not_said_when_the_items_are_ordinal_or_many_valued():
    assert "categories" not in methods_paragraph(cfa_tool.fit(THREE_FACTORS, holzinger_swineford()))
    ordinal = cfa_tool.fit(THREE_FACTORS, _coarse([f"x{i}" for i in range(1, 10)]), ordinal="all")
    assert SENTENCE not in _flat(methods_paragraph(ordinal))


def test_the_invariance_text_says_so_too():
    from cfa_tool.reporting.paragraph import invariance_paragraph
    from cfa_tool.workflows.invariance import LEVELS

    ladder = cfa_tool.invariance(THREE_FACTORS, _coarse([f"x{i}" for i in range(1, 10)]), group="school")
    assert f"The answers to all 9 items {SENTENCE}" in _flat(invariance_paragraph(ladder, LEVELS))
