"""A full-information refit of one bootstrap resample against semopy's model with a mean structure fitted by ML
to the same incomplete rows (an independent implementation of the casewise likelihood).  semopy's summary
statistics for incomplete rows are not the full-information chi-square, so the check is of the estimates and of
the likelihood at the refit's minimum: semopy's objective there is -2 log L without the constant (the number of
answers times log 2 pi), checked to equal ours to 1e-6 relative (one small case: semopy's fit takes seconds)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.estimation.fiml import fiml_log_likelihood
from cfa_tool.language.parser import parse_model
from cfa_tool.method import MissingData
from cfa_tool.pipeline.continuous import FitOptions, estimate, moments_from_rows, replicate_fits

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

TWO = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n"
ITEMS = [f"x{k}" for k in range(1, 7)]


def test_a_full_information_refit_of_one_resample_agrees_with_semopy(hs_data):
    data = hs_data.copy()
    values = data[ITEMS].to_numpy().copy()
    values[np.random.default_rng(1).random(values.shape) < 0.10] = np.nan
    data[ITEMS] = values
    full = cfa_tool.fit(TWO, data)
    assert full.method.missing is MissingData.FULL_INFORMATION
    rows = values[np.random.default_rng(7).integers(0, len(values), len(values))]
    rows = rows[~np.isnan(rows).all(axis=1)]
    spec = parse_model(TWO)
    sample = moments_from_rows(rows, tuple(ITEMS), full_information=True)
    [refit] = replicate_fits(spec, [sample], full.theta, full_information=True)
    est = estimate(spec, [(None, sample)], FitOptions(missing=MissingData.FULL_INFORMATION), start=full.theta)
    assert refit.converged and refit.chi_square == pytest.approx(est.likelihood.n_total * est.value, rel=1e-10)
    minus_two_log_l = -2.0 * fiml_log_likelihood(est.likelihood, est.theta) - (~np.isnan(rows)).sum() * np.log(2 * np.pi)

    model = semopy.ModelMeans("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6")
    found = model.fit(pd.DataFrame(rows, columns=ITEMS), obj="ML", solver="L-BFGS-B")
    assert found.fun == pytest.approx(minus_two_log_l, rel=1e-6)
    table = model.inspect()
    free = {(r.kind, r.variables): r.free for r in full.estimates}
    values_by_key = dict(zip([(r.kind, r.variables) for r in full.estimates], refit.values))
    checked = 0
    for _, row in table.iterrows():
        if row["op"] == "~" and row["rval"] in ("visual", "textual"):
            key = ("loading", (row["rval"], row["lval"]))
        elif row["op"] == "~~" and row["lval"] == row["rval"] and row["lval"] in ITEMS:
            key = ("residual_variance", (row["lval"],))
        else:
            continue
        if free[key]:
            assert values_by_key[key] == pytest.approx(row["Estimate"], rel=2e-3)
            checked += 1
    assert checked == 10
