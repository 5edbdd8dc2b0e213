"""A fit index without a value (its formula undefined) reads 'not defined' in the fit table and the methods
paragraph, never an empty place ('robust TLI = ,' was printed; hostile trial)."""

from __future__ import annotations

import dataclasses
import math

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.numbers import index_text
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import THREE_FACTORS


def test_index_text():
    assert index_text(0.9512) == ".951" and index_text(float("nan")) == "not defined" and index_text(None) == "not defined"


def test_an_undefined_robust_tli_is_said_to_be_so(hs_data):
    fitted = cfa_tool.fit(THREE_FACTORS, hs_data, test="satorra-bentler")
    assert fitted.robust is not None and math.isfinite(fitted.robust.tli_robust)
    result = dataclasses.replace(fitted, robust=dataclasses.replace(fitted.robust, tli_robust=float("nan")))
    row = next(r for r in T.fit_table(result).rows if r[0] == "Robust CFI / TLI")
    assert row[1].endswith("/ not defined")
    assert "robust TLI = not defined," in methods_paragraph(result)


def test_a_robust_fit_shows_its_robust_figures_first_and_marks_the_unadjusted_ones(hs_data):
    # the figures to read come first; the normal-theory ones follow, marked and without guide values (new-user trial)
    fitted = cfa_tool.fit(THREE_FACTORS, hs_data, test="satorra-bentler")
    table = T.fit_table(fitted)
    labels = [row[0] for row in table.rows]
    assert labels[0].startswith("Scaled chi-square") and labels.index("SRMR") < labels.index("CFI (unadjusted)")
    assert all(row[2] == "for reference only" for row in table.rows if "(unadjusted)" in row[0])
    assert "RMSEA (unadjusted) [90% interval]" in labels
    assert [v[0] for v in table.values][:1] == ["Scaled chi-square (Satorra-Bentler)"]
    plain = [row[0] for row in T.fit_table(cfa_tool.fit(THREE_FACTORS, hs_data)).rows]
    assert plain[:3] == ["Chi-square test", "CFI", "TLI"] and not any("unadjusted" in label for label in plain)


def test_a_factor_table_says_when_r_squared_is_the_items_whole(hs_data):
    # x9 loads on visual and speed: its R² (all its factors together) is not one factor's share (new-user trial)
    result = cfa_tool.fit("factor visual: x1, x2, x3, x9\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n",
                          hs_data)
    tables = {t.title.split(" (")[0]: t for t in T.estimate_tables(result)}
    assert "R² and the error variance of x9 are each item's whole" in tables["Factor visual"].note
    assert "not speed's alone" in tables["Factor speed"].note
    assert tables["Factor textual"].note is None
