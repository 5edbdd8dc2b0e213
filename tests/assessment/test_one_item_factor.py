"""A factor with one item (its error variance fixed, as identification requires) gets no reliability or AVE: with one
indicator the factor's share of the item's variance is whatever the fixed error variance makes it (Bollen 1989,
ch. 7), so omega, composite reliability and AVE of 1 (error variance 0) restate an assumption (hostile trial).
Data: Holzinger & Swineford (1939), tests/datasets."""

from __future__ import annotations

import math

import cfa_tool
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text

MODEL = "factor visual: x1\nfix variance(x1) = 0\nfactor textual: x4, x5, x6\n"


def test_a_one_item_factor_gets_no_coefficients_and_its_item_a_factor(hs_data):
    result = cfa_tool.fit(MODEL, hs_data)
    by_factor = {r.factor: r for r in result.groups[0].reliability}
    one = by_factor["visual"]
    assert math.isnan(one.omega) and math.isnan(one.omega_total)
    assert one.composite_reliability is None and one.average_variance_extracted is None
    assert one.fornell_larcker_holds is None
    assert 0 < by_factor["textual"].omega < 1  # the factor with three items keeps its coefficients
    words = " ".join(report_text(report_of(result)).split())
    table = words[words.index("How reliable are the scale scores?"):]
    assert table.index("visual 1 textual 3") < table.index("visual has one item: with one indicator the factor's share "
                                                            "of the item's variance follows from the error variance "
                                                            "fixed in the model, an assumption rather than evidence")
    assert "1.000" not in table[:table.index("textual 3")]
    assert "Are the factors distinct?" not in words  # one trait factor with an AVE left: nothing to compare
    items = words[words.index("Items: descriptive statistics"):]
    assert "x1 301" in items and items.index("visual") < items.index("textual")
