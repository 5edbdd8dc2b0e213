"""Words of the reports read as a practitioner reads them (s25): lists by the one rule of a list in a sentence
(numbers.word_list, 'a, b, and c') in the model's order, and the noncentrality of a planned difference test written
as a product."""

from __future__ import annotations

import cfa_tool
from cfa_tool.note_parts import said
from cfa_tool.numbers import word_list
from cfa_tool.reporting.reports import report_of
from tests.conftest import THREE_FACTORS


def test_the_distinctness_note_names_the_factors_in_the_models_order(hs_data):
    # Holzinger & Swineford (1939): visual, textual, speed, each scaled by a marker, so no correlation is a parameter
    result = cfa_tool.fit(THREE_FACTORS, hs_data)
    note = next(said(t.note) for t in report_of(result).tables if t.title.startswith("Distinctness of the factors"))
    order = [f for f in ("visual", "textual", "speed")]
    assert f"and {word_list(order)} are scaled otherwise" in note  # not sorted: 'speed, textual, and visual'


def test_the_nested_plan_writes_its_noncentrality_as_a_product_and_its_merged_factors_as_a_list():
    from cfa_tool.workflows.power_nested import nested_power

    result = nested_power("factor a: a1, a2, a3\nfactor b: b1, b2, b3\nfactor c: c1, c2, c3\n",
                          "factor g: a1, a2, a3, b1, b2, b3, c1, c2, c3\n", n_obs=300)
    report = report_of(result)
    rows = [row[0] for t in report.tables for row in t.rows]
    assert "Noncentrality with N = 300 (N × F)" in rows
    text = " ".join(said(n) for n in report.notes)
    assert "noncentrality N × F, F being the minimum discrepancy" in text
    assert f"factors {word_list(['a', 'b', 'c'])} merged into g" in text
