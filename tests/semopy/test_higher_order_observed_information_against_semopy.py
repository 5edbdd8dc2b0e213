"""Standard errors of a second-order model (Holzinger & Swineford 1939's three abilities under one general factor)
from the observed information, now in closed form for higher-order factors (model.rank_two.path_second_derivatives),
against semopy's observed information, an independent implementation (numdifftools' differences of its gradient,
semopy.stats.calc_se).  Both programs scale each factor by its first indicator."""

from __future__ import annotations

import pytest

import cfa_tool
from tests.semopy.helpers import _semopy_lookup, observed_information_compared

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

HIGHER = ("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
          "factor g: visual, textual, speed\n")


def test_second_order_observed_information_standard_errors_match_semopy(hs_data):
    ours = cfa_tool.fit(HIGHER, hs_data, information="observed", diagnostics=False, modification_indices=False)
    model = semopy.Model("visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9\n"
                         "g =~ visual + textual + speed")
    model.fit(hs_data, solver="trust-constr")
    theirs = _semopy_lookup(model.inspect(information="observed"))
    # (the largest relative difference of the standard errors was 3.3e-7 when this test was written, semopy 2.3.11)
    compared = observed_information_compared([r for r in ours.estimates if r.se == r.se], theirs)
    assert compared == 21  # 6 + 2 loadings, 9 residual variances, 4 factor variances (3 of them disturbances)
