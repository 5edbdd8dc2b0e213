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
