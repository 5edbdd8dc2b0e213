"""A value printed beside the guide it is judged by prints on the side of the guide it lies on.

An RMSEA of .0605 judged against a guide of .06 (Hu & Bentler 1999; common practice) printed as '.060' reads as
meeting the guide while the report says it does not: it prints with as many decimals as it takes (the comparison
itself is Python's float comparison, the reference)."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.assessment.fit_indices import GUIDE_VALUES
from cfa_tool.numerics.plain import decimals_beside
from cfa_tool.reporting.numbers import signed, unit
from cfa_tool.workflows.invariance import CONFIGURAL_GUIDES, _judged


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
    assert CONFIGURAL_GUIDES == {"cfi": 0.95, "rmsea": 0.06, "srmr": 0.08}  # Hu & Bentler (1999), as recalled
    assert GUIDE_VALUES["tli"] == 0.95
