"""A value printed beside the guide it is judged by prints on the side of the guide it lies on.

An RMSEA of .0605 judged against a guide of .06 (Hu & Bentler 1999; common practice) printed as '.060' reads as
meeting the guide while the report says it does not: it prints with as many decimals as it takes (the comparison
itself is Python's float comparison, the reference)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.fit_indices import FIT_GUIDES
from cfa_tool.numerics.plain import decimals_beside
from cfa_tool.reporting.numbers import fit_index_text, guide_text, guides_text, signed, unit
from cfa_tool.reporting.workflow_tables import CONFIGURAL_GUIDE, _level_fit_cells
from cfa_tool.workflows.invariance import CONFIGURAL_INDICES, _judged


@pytest.mark.parametrize("value, limit, shown", [(0.0605, 0.06, ".0605"), (0.0601, 0.06, ".0601"),
                                                 (0.06, 0.06, ".060"), (0.0594, 0.06, ".059"),
                                                 (0.9496, 0.95, ".9496"), (0.95004, 0.95, ".95004"),
                                                 (0.951, 0.95, ".951"), (0.0800004, 0.08, ".080000")])
def test_a_value_near_its_guide_prints_on_its_side(value, limit, shown):
    """Six decimals at most: a difference from the guide below a millionth prints at the guide."""
    assert unit(value, beside=limit) == shown


def test_printed_values_keep_the_side_of_their_guide_on_random_values():
    rng = np.random.default_rng(20261203)
    for limit in (0.06, 0.95, 0.08, -0.01, 0.015):
        for value in limit + rng.normal(0, 1e-3, 2000):
            text = signed(value, beside=limit)
            printed = float(text.replace("+.", "0.").replace("-.", "-0."))
            if abs(value - limit) > 1e-6:  # beyond the six decimals kept at most
                assert (printed > limit) == (value > limit) and (printed < limit) == (value < limit), (value, text)
            assert decimals_beside(value, limit) >= 3


def test_the_configural_caution_names_the_index_that_misses_its_guide():
    said = _judged({"cfi": 0.951, "rmsea": 0.0605, "srmr": 0.046})
    assert said == "RMSEA .0605, above .06; CFI .951 and SRMR .046 meet theirs"
    assert _judged({"cfi": 0.9496, "rmsea": 0.07, "srmr": 0.09}) == "CFI .9496, below .95; RMSEA .070, above .06; " \
                                                                  "SRMR .090, above .08"
    # Hu & Bentler (1999), as recalled: CFI and TLI at least .95, RMSEA at most .06, SRMR at most .08
    assert {k: (g.value, g.relation) for k, g in FIT_GUIDES.items()} == {
        "cfi": (0.95, ">="), "tli": (0.95, ">="), "rmsea": (0.06, "<="), "srmr": (0.08, "<=")}
    assert CONFIGURAL_INDICES == ("cfi", "rmsea", "srmr")


def test_one_declaration_gives_the_guide_its_direction_everywhere():
    """The side of a guide that fits is declared once (FIT_GUIDES): the judgement, the guide column and the
    sentences all follow it, the guide itself counting as met."""
    assert FIT_GUIDES["cfi"].met_by(0.95) and not FIT_GUIDES["cfi"].met_by(0.9499)
    assert FIT_GUIDES["rmsea"].met_by(0.06) and not FIT_GUIDES["rmsea"].met_by(0.0601)
    assert [guide_text(k) for k in ("cfi", "tli", "rmsea", "srmr")] == [">= .95", ">= .95", "<= .06", "<= .08"]
    assert guides_text(CONFIGURAL_INDICES, signs=True) == "CFI \u2265 .95, RMSEA \u2264 .06, SRMR \u2264 .08"
    assert "(CFI >= .95, RMSEA <= .06, SRMR <= .08; Hu & Bentler 1999)" in CONFIGURAL_GUIDE
    assert fit_index_text("rmsea", 0.0605) == ".0605" and fit_index_text("cfi", 0.9496) == ".9496"
    assert fit_index_text("tli", float("nan")) == "not defined"


def test_the_fit_table_and_paragraph_print_every_index_beside_its_guide(hs_data):
    """An RMSEA printed to three decimals would read .0xx whatever side of .06 it lies on: the fit table's cells and
    the paragraph print each index by fit_index_text (Holzinger & Swineford 1939 data, three-factor model)."""
    from cfa_tool.reporting.paragraph import methods_paragraph
    from cfa_tool.reporting.tables import fit_rows
    from tests.conftest import THREE_FACTORS

    result = cfa_tool.fit(THREE_FACTORS, hs_data)
    f = result.fit
    rows = {row.label: row for row in fit_rows(result)}
    assert rows["CFI"].text == fit_index_text("cfi", f.cfi) and rows["CFI"].guide == ">= .95"
    assert rows["RMSEA [90% interval]"].text.startswith(fit_index_text("rmsea", f.rmsea) + " [")
    assert rows["SRMR"].guide == "<= .08"
    text = " ".join(methods_paragraph(result).split())
    assert f"CFI = {fit_index_text('cfi', f.cfi)}, TLI = {fit_index_text('tli', f.tli)}" in text
    assert "(e.g., CFI \u2265 .95, RMSEA \u2264 .06, SRMR \u2264 .08; Hu & Bentler, 1999)" in text


def test_an_index_without_a_value_reads_not_defined_in_the_invariance_table_too():
    """A just-identified level (0 df: one factor of three items) has no RMSEA (Steiger 1990: its formula divides by
    df): the invariance table's cell says so as the fit table and the paragraph do, not an empty cell."""
    rng = np.random.default_rng(20261203)
    f = rng.normal(size=300)
    data = pd.DataFrame({f"y{i}": 0.7 * f + rng.normal(scale=0.7, size=300) for i in (1, 2, 3)})
    result = cfa_tool.fit("factor f: y1, y2, y3\n", data)
    assert result.fit.df == 0 and not np.isfinite(result.fit.rmsea)
    cells, values = _level_fit_cells(result, adjusted=False)
    assert cells[3] == "not defined" and np.isnan(values[4])
