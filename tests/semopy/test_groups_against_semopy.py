"""Configural multi-group estimates against semopy's multi-group analysis (an independent implementation)."""

from __future__ import annotations

import pytest

from tests.semopy.helpers import _compare, _semopy_lookup
from tests.workflows.test_groups_and_invariance import hs_ladder  # noqa: F401 (a fixture)

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")


def test_configural_estimates_match_semopy_per_group(hs_data, hs_ladder):
    # semopy's multi-group analysis fits each group on its own, which is the configural model
    import semopy.multigroup as mg

    res = mg.multigroup("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9", hs_data, "school",
                        solver="trust-constr")
    configural = hs_ladder.steps[0].result
    for school in ("Pasteur", "Grant-White"):
        ours = {}
        for r in configural.estimates:
            if r.group != school or r.kind in ("intercept", "mean"):
                continue
            if r.kind == "loading":
                ours[("loading", *r.variables)] = (r.estimate, r.se)
            else:
                a, b = sorted(r.variables if len(r.variables) == 2 else r.variables * 2)
                ours[("cov", a, b)] = (r.estimate, r.se)
        _compare(ours, _semopy_lookup(res.estimates[school]))
