"""The degrees of freedom a higher-order structure saves over its first-order factors correlated freely, and which of
its parts are said not to be tested (model.description.higher_order_saving).

The rule (Rindskopf & Rose 1988; Brown 2015, ch. 8, recalled from memory): a second-order factor over three
first-order factors is just-identified at that level (3 loadings, one fixed, its variance and 3 disturbances for 3
variances and 3 covariances); one over two first-order factors is identified only through its covariance with another
factor, and the structure it shares with that factor can then be over-identified.  The new-user trial of session 23
(finding 4) fitted two correlated second-order factors over two first-order factors each: the notes and the methods
paragraph called each part just-identified and untested, while the fit had one df more than the four correlated
factors' (chi-square(247) against chi-square(246)).

Every count below is checked against the fits themselves: the model with the higher-order factors taken out (their
first-order factors correlated freely) fitted to the same rows, whose df minus the higher-order model's df is the
saving; and a part said untested fits exactly as the model without it (equal chi-square).  The hand counts beside each
layout are the rule's: free covariances of the first-order factors minus the structure's parameters."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import simulate_cfa

FIRST = "".join(f"factor f{k + 1}: {', '.join(f'y{3 * k + j + 1}' for j in range(3))}\n" for k in range(6))
SAID = "does not test the higher-order structure"

# (higher-order statements, first-order factors in the model, the df saved and the parts said untested, by hand)
LAYOUTS = [
    # 3 variances and 3 covariances; 2 loadings, 1 variance, 3 disturbances: 0 saved, the part untested
    ("factor g: f1, f2, f3\n", 3, 0, ("g",)),
    # 10; 2 loadings, 2 variances, 1 covariance, 4 disturbances: 1 saved, though neither part alone saves one
    ("factor g1: f1, f2\nfactor g2: f3, f4\n", 4, 1, ()),
    # 10; 3 loadings, 1 variance, 4 disturbances: 2 saved
    ("factor g: f1, f2, f3, f4\n", 4, 2, ()),
    # 15; 3 loadings, 2 variances, 1 covariance, 5 disturbances: 4 saved; g2 alone saves none beside g1 (its
    # factors' 2 variances, 1 covariance and 2 covariances with g1 against 1 loading, 1 variance, 2 disturbances and
    # its covariance with g1), so g2's part is untested
    ("factor g1: f1, f2, f3\nfactor g2: f4, f5\n", 5, 4, ("g2",)),
    # 10 with f4 outside; 2 loadings, 1 variance, 3 disturbances, f4's variance and its covariance with g: 2 saved
    # (f4's 3 covariances with f1-f3 go through g's one)
    ("factor g: f1, f2, f3\n", 4, 2, ()),
    # 21; 3 loadings, 3 variances, 3 covariances, 6 disturbances: 6 saved
    ("factor g1: f1, f2\nfactor g2: f3, f4\nfactor g3: f5, f6\n", 6, 6, ()),
]


@pytest.fixture(scope="module")
def rows():
    """Six factors of three items (loadings .7, residual variances .51), correlated .3 to .6 (invented values)."""
    L = np.zeros((18, 6))
    for k in range(6):
        L[3 * k:3 * k + 3, k] = 0.7
    phi = np.full((6, 6), 0.35)
    phi[:2, :2] = phi[2:4, 2:4] = phi[4:, 4:] = 0.6
    np.fill_diagonal(phi, 1.0)
    return simulate_cfa(L, phi, np.diag(np.full(18, 0.51)), 800, 2312)


def _first(count: int) -> str:
    return "".join(FIRST.splitlines(keepends=True)[:count])


@pytest.mark.parametrize("higher, count, saved, untested", LAYOUTS)
def test_the_saving_is_the_df_the_fits_give(rows, higher, count, saved, untested):
    model = cfa_tool.fit(_first(count) + higher, rows)
    free = cfa_tool.fit(_first(count), rows)
    d = model.description
    assert d.higher_order_df == saved
    assert model.fit.df - free.fit.df == saved  # the fits' own count
    assert d.just_identified_higher_order == untested
    if untested:  # what 'does not test' rests on: the model without those parts fits exactly as this one
        kept = "".join(line + "\n" for line in higher.splitlines() if line.split()[1].rstrip(":") not in untested)
        without = cfa_tool.fit(_first(count) + kept, rows)
        assert without.fit.df == model.fit.df
        assert without.fit.chi_square == pytest.approx(model.fit.chi_square, rel=1e-5, abs=1e-6)
        assert SAID in methods_paragraph(model)
    else:
        assert SAID not in methods_paragraph(model) and SAID not in " ".join(model.summary().split())
    assert model.description.to_dict()["higher_order_df_saved"] == saved


def test_two_parts_over_two_factors_each_say_the_df_they_save_together(rows):
    """The note on higher-order factors over two factors counts what the structure saves (newuser-s23, finding 4)."""
    model = cfa_tool.fit(_first(4) + LAYOUTS[1][0], rows)
    text = " ".join(model.summary().split())
    assert ("Together the higher-order structure has 1 parameter fewer than the first-order factors correlated "
            "freely, so this fit tests it with 1 degree of freedom") in text
    assert "just-identified" not in text


def test_no_saving_is_said_where_a_higher_order_factor_cannot_be_taken_out(rows):
    """A statement naming the higher-order loadings ties the parts: taking a factor out would change its meaning, so
    nothing is counted and the note says no df."""
    model = cfa_tool.fit(_first(4) + LAYOUTS[1][0] + "equal loading(g1, f2), loading(g2, f4)\n", rows)
    assert model.description.higher_order_df is None
    assert "Together the higher-order structure" not in " ".join(model.summary().split())
