"""power-simulation with --group-sizes: a factor scaled differently in some group, and an 'in group' 'fix' of any kind
that makes the groups differ, are errors at their statements (hostile tester s14).

Before, 'in group south: free loading(f, a1)' (south's scale then from a2) planted a "difference" in the loading of
a2 (south 1.00, north 0.70) that is the scales' difference: the metric step, blind to it, was labelled a false-alarm
rate.  And 'in group south: fix variance(f) = 1.5' or a fixed factor covariance was accepted, while the same 'fix' of
an intercept was refused: the factor kinds' statement words were not matched (ref_kind knew residual kinds only)."""

from __future__ import annotations

import pytest

from cfa_tool.errors import ModelError
from cfa_tool.workflows.group_power import invariance_power

ONE = "factor f: a1, a2, a3, a4\nstart loading(f, a2), loading(f, a3), loading(f, a4) = 0.7\n"
TWO = ONE + "factor g: b1, b2, b3\n"


def _refused(model: str) -> ModelError:
    with pytest.raises(ModelError) as caught:
        invariance_power(model, "north=200,south=200", replications=2, workers=1)
    return caught.value


def test_another_marker_in_one_group_is_an_error_at_its_statement():
    error = _refused(ONE + "in group south: free loading(f, a1)\n")
    assert str(error).startswith("<model text>:3:22: factor 'f' is scaled differently in different groups (by the loading of a1 in "
                                 "group north; by the loading of a2 in group south), so it is not on the same "
                                 "metric in every group")
    assert "no step tests it" in str(error)
    assert (error.location.line, error.location.column) == (3, 22)


@pytest.mark.parametrize("statement, words", [
    ("in group south: fix covariance(f, g) = 0.1", r"'fix' holds covariance\(f, g\) in group south at 0.1 "),
    ("in group south: fix intercept(a2) = 0.5", r"'fix' holds intercept\(a2\) in group south at 0.5 "),
    ("covary a1, a2\nin group south: fix covariance(a1, a2) = 0.1", r"'fix' holds covariance\(a1, a2\) in group "),
])
def test_an_in_group_fix_that_makes_the_groups_differ_is_an_error_whatever_its_kind(statement, words):
    error = _refused(TWO + statement + "\n")
    assert error.location is not None and error.location.line == TWO.count("\n") + statement.count("\n") + 1
    with pytest.raises(ModelError, match=words + r".* in every model the ladder fits, so no step tests the difference"):
        raise error


def test_a_fixed_factor_variance_in_one_group_is_an_error():
    # the variance fixed in south alone scales f there (the marker is then south's free loading of a1): refused
    error = _refused(ONE + "in group south: fix variance(f) = 1.5\n")
    assert "by a value the model fixes in group south" in str(error) and error.location.line == 3


def test_the_same_difference_given_by_start_is_planned():
    # the population value alone (the fitted models estimate it): the plan runs, with the difference in the loading
    plan = invariance_power(ONE + "in group south: start loading(f, a3) = 0.5\n", "north=200,south=200",
                            replications=2, workers=1, seed=1)
    [difference] = plan.population.differences
    assert (difference.kind, difference.variables, difference.group) == ("loading", ("f", "a3"), "south")
    assert difference.value == pytest.approx(0.5) and difference.reference_value == pytest.approx(0.7)
