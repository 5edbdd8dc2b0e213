"""Robust (sandwich) standard errors against semopy's, an independent implementation."""

from __future__ import annotations

import pytest

from types import SimpleNamespace

import numpy as np

from tests.semopy.helpers import _ours_lookup, _semopy_fit, _semopy_lookup
from tests.inference.test_robust import hs_robust  # noqa: F401 (a fixture)

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")


def test_robust_standard_errors_match_semopy(hs_data, hs_robust):
    # semopy's robust standard errors are the sandwich (Huber-White) form, which for complete
    # data equals the Satorra-Bentler sandwich with the fourth-moment matrix Gamma.
    model, _ = _semopy_fit("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9", hs_data)
    table = model.inspect(se_robust=True)
    ours = _ours_lookup(hs_robust)
    for _, row in table.iterrows():
        if row["Std. Err"] == "-":
            continue
        if row["op"] == "~":
            key = ("loading", row["rval"], row["lval"])
        else:
            a, b = sorted((row["lval"], row["rval"]))
            key = ("cov", a, b)
        assert ours[key][1] == pytest.approx(float(row["Std. Err"]), rel=1e-3), key


def test_yuan_bentler_standard_errors_with_complete_rows_match_semopys_observed_information_sandwich(hs_data):
    # The Yuan-Bentler sandwich of full-information ML takes the observed information as its bread
    # (cfa_tool.inference.robust_missing); with complete rows it is semopy's robust standard errors with
    # information="observed" (its Hessian by numerical differences, its meat the rows' gradients).  The means are
    # saturated, so the covariance parameters' block of the sandwich does not involve them.
    import cfa_tool
    from tests.conftest import THREE_FACTORS

    yb = cfa_tool.fit(THREE_FACTORS, hs_data, test="yuan-bentler", missing="full-information")
    model, _ = _semopy_fit("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9", hs_data)
    theirs = _semopy_lookup(model.inspect(se_robust=True, information="observed"))
    covariance_part = SimpleNamespace(estimates=[r for r in yb.estimates if r.kind not in ("intercept", "mean")])
    ours = _ours_lookup(covariance_part)
    compared = 0
    for key, (_, se) in theirs.items():
        if np.isfinite(se):
            assert ours[key][1] == pytest.approx(se, rel=1e-5), key
            compared += 1
    assert compared == 21
    # the bread matters on these data: the expected-information sandwich gives 0.103 for visual's x2 loading
    assert ours[("loading", "visual", "x2")][1] == pytest.approx(0.1321, abs=1e-4)
