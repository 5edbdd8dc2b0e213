"""Each bootstrap resample's omega (workflows.bootstrap: from the resample's refit by the fit's own reliability
function) against an independent fit of the same resample: semopy's maximum likelihood loadings, factor variances and
residual variances in McDonald's (1999) textbook formula omega = (sum lambda)^2 phi / ((sum lambda)^2 phi +
sum theta), for the Holzinger & Swineford (1939) three-factor model (no cross-loadings or correlated residuals, so
the keyed sum's implied variance is that denominator)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.assessment.reliability_intervals import Coefficient
from tests.conftest import THREE_FACTORS
from tests.semopy.helpers import _semopy_fit

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

DESCRIPTION = "visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9"
ITEMS = {"visual": ["x1", "x2", "x3"], "textual": ["x4", "x5", "x6"], "speed": ["x7", "x8", "x9"]}


def _textbook_omega(table: pd.DataFrame, factor: str, items: list[str]) -> float:
    """McDonald (1999): (sum of loadings)^2 phi / ((sum of loadings)^2 phi + sum of residual variances)."""
    def value(lval, op, rval) -> float:
        row = table[(table.lval == lval) & (table.op == op) & (table.rval == rval)]
        return float(row.Estimate.iloc[0])

    loadings = sum(value(x, "~", factor) for x in items)
    phi = value(factor, "~~", factor)
    residual = sum(value(x, "~~", x) for x in items)
    return loadings**2 * phi / (loadings**2 * phi + residual)


def test_each_resamples_omega_is_semopys_textbook_omega(hs_data):
    import cfa_tool
    from cfa_tool.language.parser import parse_model
    from cfa_tool.workflows.bootstrap import _replicate, fit_keys

    spec = parse_model(THREE_FACTORS)
    names = [x for items in ITEMS.values() for x in items]
    fit = cfa_tool.fit(THREE_FACTORS, hs_data)
    rows = hs_data[list(fit.observed)].to_numpy(float)
    seeds = [101, 202]
    draws = _replicate([(spec, rows, tuple(fit.observed), s, fit.theta, None, False, True, fit_keys(spec, fit))
                        for s in seeds])
    for seed, draw in zip(seeds, draws):
        assert draw[0]
        picked = np.random.default_rng(seed).integers(0, len(rows), len(rows))  # the bootstrap's draw of this seed
        _, table = _semopy_fit(DESCRIPTION, pd.DataFrame(rows[picked], columns=list(fit.observed))[names])
        for factor, items in ITEMS.items():
            # semopy stops near 1e-6 of the minimum (trust-constr): omega agrees to about 1e-4
            assert draw[6][(factor, Coefficient.OMEGA)] == pytest.approx(_textbook_omega(table, factor, items),
                                                                         abs=2e-4), (seed, factor)
