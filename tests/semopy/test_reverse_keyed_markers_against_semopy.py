"""A 'reversed' statement orients factors: against semopy, given the marker the tool chooses.

In the Holzinger & Swineford (1939) data with x1 and x4 turned around (10 - x), x1 and x4 are reverse-keyed
first items of visual and textual.  Declared reversed, they are passed over as markers: visual takes x2 and
textual x5, so both factors point the way of their other items.  semopy fixes the first indicator it is
given, so the same model written with x2 and x5 first must give the same chi-square, estimates and standard
errors (x1 and x4 then load negatively)."""

from __future__ import annotations

import pytest

import cfa_tool
from tests.semopy.helpers import _compare, _ours_lookup, _semopy_fit, _semopy_lookup

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

KEYED = ("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
         "reversed x1, x4 on 0 to 10\n")


@pytest.fixture(scope="module")
def turned(hs_data):
    data = hs_data.copy()
    data["x1"], data["x4"] = 10 - data["x1"], 10 - data["x4"]
    return data


def test_the_first_item_not_declared_reversed_is_the_marker(turned, hs_three):
    ours = cfa_tool.fit(KEYED, turned)
    model, table = _semopy_fit("visual =~ x2 + x1 + x3\ntextual =~ x5 + x4 + x6\nspeed =~ x7 + x8 + x9", turned)
    _compare(_ours_lookup(ours), _semopy_lookup(table))
    assert ours.fit.chi_square == pytest.approx(semopy.calc_stats(model).T["Value"]["chi2"], rel=1e-4)
    # turning two items around changes no fit: the untouched data's chi-square, 85.306 for this model (recalled
    # from memory; tests/pipeline/test_holzinger_swineford_published.py holds the untouched fit to it)
    assert ours.fit.chi_square == pytest.approx(85.306, abs=5e-3)
    scales = {s.factor: s for s in ours.description.scales}
    assert (scales["visual"].marker, scales["visual"].passed_over) == ("x2", ("x1",))
    assert (scales["textual"].marker, scales["textual"].passed_over) == ("x5", ("x4",))
    # the factors point the way of the untouched data's factors: the same correlations, all positive
    ours_phi = {(r.variables): r.standardized for r in ours.estimates if r.kind == "factor_covariance"}
    plain_phi = {(r.variables): r.standardized for r in hs_three.estimates if r.kind == "factor_covariance"}
    assert ours_phi == pytest.approx(plain_phi, abs=1e-5) and min(ours_phi.values()) > 0
