"""Full-information ML estimates against semopy's model with a mean structure fitted by ML to incomplete
rows (an independent implementation of the same likelihood)."""

from __future__ import annotations

import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS
from tests.data.test_missing_data import ITEMS, hs_holes  # noqa: F401 (a fixture)

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")


def test_fiml_estimates_agree_with_semopy(hs_holes):
    # semopy's model with a mean structure fitted by ML to incomplete rows is FIML
    import semopy

    ours = cfa_tool.fit(THREE_FACTORS, hs_holes, missing="full-information")
    assert ours.converged
    model = semopy.ModelMeans("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9")
    model.fit(hs_holes, obj="ML", solver="L-BFGS-B")
    table = model.inspect()
    est = {(r.kind, r.variables): r.estimate for r in ours.estimates}
    checked = 0
    for _, row in table.iterrows():
        if row["op"] == "~" and row["rval"] in ("visual", "textual", "speed"):
            assert est[("loading", (row["rval"], row["lval"]))] == pytest.approx(row["Estimate"], rel=1e-3)
            checked += 1
        elif row["op"] == "~~" and row["lval"] == row["rval"] and row["lval"] in ITEMS:
            assert est[("residual_variance", (row["lval"],))] == pytest.approx(row["Estimate"], rel=1e-3)
            checked += 1
    assert checked == 18


def test_a_fixed_intercept_in_a_full_information_fit_without_groups_agrees_with_semopy(hs_holes):
    # hostile trial 10, case 11: 'fix intercept(x1) = 5' was refused in a full-information fit without groups ("only
    # with groups or with missing data"), though that fit has a mean structure (two factors: semopy's fit of all
    # nine tests takes minutes)
    import semopy

    data = hs_holes[[f"x{i}" for i in range(1, 7)]]
    ours = cfa_tool.fit("factor visual: x1..x3\nfactor textual: x4..x6\nfix intercept(x1) = 5\n", data,
                        missing="full-information")
    model = semopy.ModelMeans("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nx1 ~ 5*1")
    model.fit(data, obj="ML", solver="L-BFGS-B")
    table = model.inspect()
    est = {(r.kind, r.variables): r.estimate for r in ours.estimates}
    assert est[("intercept", ("x1",))] == 5.0
    checked = 0
    for _, row in table.iterrows():
        if row["op"] == "~" and row["rval"] in ("visual", "textual"):
            assert est[("loading", (row["rval"], row["lval"]))] == pytest.approx(row["Estimate"], rel=1e-3)
            checked += 1
        elif row["op"] == "~" and row["rval"] == "1":
            assert est[("intercept", (row["lval"],))] == pytest.approx(row["Estimate"], rel=1e-3)
            checked += 1
    assert checked == 12
