"""A parameter that an 'equal' statement holds equal to a fixed one is fixed too: the report's tables showed it
'fixed' with no word of why (the model file fixes only the other one).  Every fit now says so in a note; the claim is
checked against the fit of the model that fixes both by 'fix' statements (same chi-square and degrees of freedom)."""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import ModelError

TWO = "factor f1: a1, a2, a3\nfactor f2: b1, b2, b3\n"


@pytest.fixture(scope="module")
def data() -> pd.DataFrame:
    rng = np.random.default_rng(24)
    f = rng.multivariate_normal([0, 0], [[1, 0.5], [0.5, 1]], size=400)
    cols = {}
    for k, (name, load) in enumerate([("a1", .8), ("a2", .7), ("a3", .6), ("b1", .8), ("b2", .7), ("b3", .6)]):
        cols[name] = 3 + load * f[:, k // 3] + rng.normal(scale=0.6, size=400)
    return pd.DataFrame(cols)


def _notes(result) -> list[str]:
    return [w for w in result.warnings if "'equal' statement holds" in w]


def test_a_fix_reaching_an_equal_loading_is_noted_and_is_the_fit_of_both_fixed(data):
    tied = cfa_tool.fit(TWO + "equal loading(f1, a2), loading(f2, b2)\nfix loading(f1, a2) = 0.9\n", data)
    both = cfa_tool.fit(TWO + "fix loading(f1, a2) = 0.9\nfix loading(f2, b2) = 0.9\n", data)
    assert tied.fit.df == both.fit.df and tied.fit.chi_square == pytest.approx(both.fit.chi_square, rel=1e-8)
    [note] = _notes(tied)
    assert "the loading of b2 on f2" in note and "the loading of a2 on f1" in note and "0.9" in note
    assert "'fix' statement" in note
    assert not _notes(both)  # nothing held equal: nothing to say
    assert not _notes(cfa_tool.fit(TWO + "equal loading(f1, a2), loading(f2, b2)\n", data))  # both free


def test_an_equality_with_a_marker_says_the_marker_fixes_it(data):
    tied = cfa_tool.fit(TWO + "equal loading(f1, a1), loading(f2, b2)\n", data)
    [note] = _notes(tied)
    assert "the loading of b2 on f2" in note and "marker" in note and "fixed at 1" in note
    both = cfa_tool.fit(TWO + "fix loading(f2, b2) = 1\nfix loading(f2, b1) = 1\n", data)
    assert tied.fit.df == both.fit.df and tied.fit.chi_square == pytest.approx(both.fit.chi_square, rel=1e-8)


def test_an_intercept_fixed_through_its_equality_is_noted_in_a_fit_with_means(data):
    text = (TWO + "equal intercept(a1), intercept(b1)\nfix intercept(a1) = 3\nfree mean(f1)\nfree mean(f2)\n")
    tied = cfa_tool.fit(text, data, missing="full-information")
    [note] = _notes(tied)
    assert "the intercept of b1" in note and "fixed at 3" in note
    assert tied.to_dict()["warnings"] == list(tied.warnings) or note in str(tied.to_dict())


def test_a_loading_held_equal_to_a_fixed_one_sets_its_factors_scale_as_a_fix_would(data):
    """Fixed through its equality, b2 scales f2 as 'fix loading(f2, b2) = 0.9' does: no marker is added beside it
    (before, f2 kept its marker b1 at 1 as well: one restriction the model file did not state)."""
    tied = cfa_tool.fit(TWO + "equal loading(f1, a2), loading(f2, b2)\nfix loading(f1, a2) = 0.9\n", data)
    loadings = {e.variables: (e.estimate, e.free) for e in tied.estimates if e.kind == "loading"}
    assert loadings[("f2", "b1")][1] and loadings[("f2", "b2")] == (0.9, False)


def test_a_marker_held_equal_to_a_loading_fixed_at_zero_moves_to_the_next_item(data):
    """'fix loading(f1, a2) = 0' held equal to f2's first loading: that loading is 0 too, so f2's marker is its next
    item (before, b1 stayed the marker at 1 while a2 was 0: the equality the model file states did not hold)."""
    text = TWO + "fix loading(f1, a2) = 0\nequal loading(f1, a2), loading(f2, b1)\n"
    loadings = {e.variables: (e.estimate, e.free) for e in cfa_tool.fit(text, data).estimates if e.kind == "loading"}
    assert loadings[("f1", "a2")] == loadings[("f2", "b1")] == (0.0, False)
    assert loadings[("f2", "b2")] == (1.0, False)


def test_fixes_held_equal_through_a_chain_of_statements_must_agree(data):
    text = (TWO + "equal loading(f1, a2), loading(f2, b2)\nequal loading(f2, b2), loading(f2, b3)\n"
            "fix loading(f1, a2) = 0.5\nfix loading(f2, b3) = 0.7\n")
    with pytest.raises(ModelError, match="held equal but fixed at different values"):
        cfa_tool.fit(text, data)


def test_a_disturbance_held_equal_to_one_fixed_at_zero_keeps_its_marker():
    """A variance held at 0 sets no scale (a disturbance at 0 makes its factor a multiple of the one above): the
    factor held equal to it keeps its marker, and the fit is identified."""
    rng = np.random.default_rng(3)
    g = rng.normal(size=500)
    first = [0.8 * g + 0.6 * rng.normal(size=500) for _ in range(3)]
    data = pd.DataFrame({f"x{i * 3 + j + 1}": first[i] * w + rng.normal(scale=0.6, size=500)
                         for i in range(3) for j, w in enumerate((0.8, 0.7, 0.6))})
    text = ("factor a: x1, x2, x3\nfactor b: x4, x5, x6\nfactor c: x7, x8, x9\nfactor g: a, b, c\n"
            "fix variance(a) = 0\nfix loading(a, x1) = 1\nequal variance(a), variance(b)\n")
    result = cfa_tool.fit(text, data)
    assert result.converged  # (the problems name a and b correlating 1 and a poor fit: what the data give)
    loadings = {e.variables: (e.estimate, e.free) for e in result.estimates if e.kind == "loading"}
    assert loadings[("b", "x4")] == (1.0, False)
    assert any("variance of factor b" in w for w in _notes(result))


def test_bounds_on_parameters_held_equal_that_leave_no_room_are_refused(data):
    """Hostile tester s24: 'bound variance(a2) >= 0.8' and 'bound variance(b2) <= 0.3' with the two held equal were
    fitted, a2's variance reported at 0.3, under its own lower bound."""
    text = (TWO + "equal variance(a2), variance(b2)\nbound variance(a2) >= 0.8\nbound variance(b2) <= 0.3\n")
    with pytest.raises(ModelError, match="bounds leave no room.*held equal"):
        cfa_tool.fit(text, data)
    fine = cfa_tool.fit(TWO + "equal variance(a2), variance(b2)\nbound variance(a2) >= 0.1\n"
                              "bound variance(b2) <= 0.9\n", data)
    assert fine.converged


def test_a_variance_held_equal_to_one_its_scaling_fixes_scales_that_factor_too(data):
    """Hostile tester s24b: 'scale f1 by variance' with f2's variance held equal to f1's fixed f2's variance at 1 and
    kept f2's marker too (one restriction more than 'fix variance(f1) = 1' gives, the spelling the docs describe)."""
    by_scale = cfa_tool.fit(TWO + "scale f1 by variance\nequal variance(f1), variance(f2)\n", data)
    by_fix = cfa_tool.fit(TWO + "fix variance(f1) = 1\nequal variance(f1), variance(f2)\n", data)
    assert by_scale.fit.df == by_fix.fit.df
    assert by_scale.fit.chi_square == pytest.approx(by_fix.fit.chi_square, rel=1e-6)
    [note] = _notes(by_scale)
    assert "fixed to set its factor's scale" in note and "marker" not in note


def test_equal_bounds_are_refused_as_a_fix(data):
    with pytest.raises(ModelError, match="leave it one value, 0.9, so they fix it: write 'fix variance\\(a2\\) = 0.9'"):
        cfa_tool.fit(TWO + "bound variance(a2) >= 0.9\nbound variance(a2) <= 0.9\n", data)
    with pytest.raises(ModelError, match="bounds leave no room"):  # the same through an equality
        cfa_tool.fit(TWO + "equal variance(a2), variance(b2)\nbound variance(a2) >= 0.5\nbound variance(b2) <= 0.5\n",
                     data)


def test_effects_coding_names_no_marker_it_does_not_have(data):
    result = cfa_tool.fit(TWO + "scale f2 by effects\nequal loading(f1, a1), loading(f2, b2)\n", data)
    assert not any("own marker" in note for note in _notes(result))
