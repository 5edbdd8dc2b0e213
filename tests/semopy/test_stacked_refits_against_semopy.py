"""Refits of bootstrap resamples fitted together in stacked arrays (pipeline.continuous.replicate_fits)
against semopy fitting each resample on its own: estimates and standard errors."""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest

from cfa_tool.language import parse_model
from cfa_tool.pipeline.continuous import model_structure, moments_from_rows, replicate_fits
from tests.conftest import THREE_FACTORS
from tests.semopy.helpers import _compare, _ours_lookup, _semopy_fit, _semopy_lookup

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

NAMES = tuple(f"x{i}" for i in range(1, 10))


def test_stacked_bootstrap_refits_match_semopy(hs_data, hs_three):
    spec = parse_model(THREE_FACTORS)
    table, _ = model_structure(spec, None, False)
    rng = np.random.default_rng(5)
    picks = [rng.integers(0, len(hs_data), len(hs_data)) for _ in range(3)]
    rows = hs_data[list(NAMES)].to_numpy(float)
    fits = replicate_fits(spec, [moments_from_rows(rows[k], NAMES) for k in picks], hs_three.theta,
                          standard_errors=True)
    for k, fit in zip(picks, fits):
        assert fit.converged
        ours = SimpleNamespace(estimates=[SimpleNamespace(kind=par.kind, variables=par.variables, estimate=value, se=se)
                                          for par, value, se in zip(table.parameters, fit.values, fit.se)])
        _, theirs = _semopy_fit("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9",
                                hs_data.iloc[k].reset_index(drop=True))
        _compare(_ours_lookup(ours), _semopy_lookup(theirs))
