"""Robust (sandwich) standard errors against semopy's, an independent implementation."""

from __future__ import annotations

import pytest

from tests.semopy.helpers import _ours_lookup, _semopy_fit
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
