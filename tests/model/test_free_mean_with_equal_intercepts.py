"""A factor mean freed in one group whose origin comes from intercepts held equal within that group (newuser-s23,
finding 9).

In a longitudinal model of one group (each item at two occasions side by side), the intercepts of each item are held
equal over the occasions and the first occasion's factor mean is 0; the second occasion's mean is then estimated
against it (Little, Slegers & Card 2006; Brown 2015, ch. 7, longitudinal measurement invariance, recalled from
memory).  'free mean(f2)' was refused at a5239e97 with "every intercept of its indicators is free as well", the rule
counting equalities across groups only, and its advice, 'fix intercept(x1_2) = 0', fixed intercept(x1_1), held equal
to it, without a word.  Counting: the three items' means at two occasions (6 moments) against 3 shared intercepts and
the mean of f2 (4 parameters, the loadings given by the covariances)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.parameters import build_parameter_table
from tests.conftest import exact_cfa_rows

LONGITUDINAL = """factor f1: x1_1, x2_1, x3_1
factor f2: x1_2, x2_2, x3_2
equal loading(f1, x2_1), loading(f2, x2_2)
equal loading(f1, x3_1), loading(f2, x3_2)
equal intercept(x1_1), intercept(x1_2)
equal intercept(x2_1), intercept(x2_2)
equal intercept(x3_1), intercept(x3_2)
covary x1_1, x1_2
covary x2_1, x2_2
covary x3_1, x3_2
"""
SHIFT = 0.4  # the population's change of the factor mean from the first occasion to the second (invented)


@pytest.fixture(scope="module")
def rows():
    return longitudinal_rows()


def longitudinal_rows():
    """Rows whose covariances and means are exactly the population's (invented values): loadings 1, .8, .7 at both
    occasions, intercepts 3, 3.5, 2.8 at both, factor variances 1 and 1.2 correlated .5, the second mean SHIFT."""
    lam = np.array([1.0, 0.8, 0.7])
    L = np.zeros((6, 2))
    L[:3, 0] = L[3:, 1] = lam
    phi = np.array([[1.0, 0.5 * np.sqrt(1.2)], [0.5 * np.sqrt(1.2), 1.2]])
    theta = np.diag(np.full(6, 0.5))
    for k in range(3):
        theta[k, k + 3] = theta[k + 3, k] = 0.1
    data = exact_cfa_rows(L, phi, theta, 600, 7, names=["x1_1", "x2_1", "x3_1", "x1_2", "x2_2", "x3_2"])
    nu = np.array([3.0, 3.5, 2.8])
    return data + np.concatenate([nu, nu + lam * SHIFT])


def test_a_later_occasion_mean_is_estimated_against_the_first(rows):
    result = cfa_tool.fit(LONGITUDINAL + "free mean(f2)\n", rows, missing="full-information")  # a mean structure
    (mean,) = [r for r in result.estimates if r.kind == "mean" and r.free]
    assert mean.variables == ("f2",)
    assert mean.estimate == pytest.approx(SHIFT, abs=1e-5)  # the population value the rows hold exactly
    assert result.fit.chi_square == pytest.approx(0.0, abs=1e-6)


def test_equal_intercepts_of_items_of_free_means_set_no_origin():
    """Both occasions' means freed: the shared intercepts reach no fixed mean, so the refusal stands, and its advice
    says that fixing the intercept fixes the one held equal to it too, and what else gives the mean its origin."""
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(LONGITUDINAL + "free mean(f1)\nfree mean(f2)\n", "m.cfa"), None,
                              mean_structure=True)
    said = str(info.value)
    assert "m.cfa:11:6: 'free mean(f1)' frees the mean of 'f1', where nothing sets its origin" in said
    assert "fix an intercept of one indicator (as 'fix intercept(x1_1) = 0', which fixes intercept(x1_2) at 0 too" in said
    assert "hold an intercept of one of its indicators equal to that of an item of a factor whose mean is fixed" in said


def test_the_advice_fixes_an_intercept_held_equal_to_no_other_where_there_is_one():
    text = "factor f: x1, x2, x3\nfactor g: y1, y2, y3\nequal intercept(x1), intercept(x2)\nfree mean(f)\n"
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(text, "m.cfa"), None, mean_structure=True)
    assert "(as 'fix intercept(x3) = 0')" in str(info.value)


def test_an_intercept_held_equal_to_an_item_of_its_own_factor_sets_no_origin():
    text = "factor f: x1, x2, x3\nequal intercept(x1), intercept(x2)\nfree mean(f)\n"
    with pytest.raises(ModelError, match="nothing sets its origin"):
        build_parameter_table(parse_model(text, "m.cfa"), None, mean_structure=True)
