"""A method factor (declared, or one whose every item loads on another factor too) whose standardized loadings are all
below .20 in size (common practice) gets a caution naming it, with its share of its items' common variance (explained
common variance; Reise 2012), in fit and in the reports of compare, invariance and replicate."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.numbers import unit
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.workflow_tables import comparison_report, invariance_report
from cfa_tool.workflows.compare import compare
from cfa_tool.workflows.invariance import invariance
from tests.conftest import exact_cfa_rows

TRAITS = "factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\n"
METHOD = "factor m: y2, y4, y6, y8\nmethod m\nuncorrelated m, a\nuncorrelated m, b\nscale m by variance\n"


def _data(method_loading: float, n: int = 800, seed: int = 20261203) -> pd.DataFrame:
    """Two traits correlating .4 with loadings .7, and a method factor on items 2, 4, 6, 8 (invented values), in rows
    whose covariance matrix is the population's exactly (a random sample's method loadings of .05 reached .22 with a
    newer numpy's draws, and the premise of a weak method factor failed)."""
    L = np.zeros((8, 3))
    L[:4, 0] = L[4:, 1] = 0.7
    L[[1, 3, 5, 7], 2] = method_loading
    phi = np.eye(3)
    phi[0, 1] = phi[1, 0] = 0.4
    return exact_cfa_rows(L, phi, np.diag(1.0 - np.diag(L @ phi @ L.T)), n, seed)


def _weak(result):
    return [p for p in result.problems if p.kind is ProblemKind.WEAK_METHOD_FACTOR]


@pytest.fixture(scope="module")
def weak_fit():
    data = _data(0.05)
    return cfa_tool.fit(TRAITS + METHOD, data), data


def test_a_method_factor_with_small_loadings_gets_a_caution(weak_fit):
    result, _ = weak_fit
    (problem,) = _weak(result)
    assert result.admissible  # a caution, not a reason to reject the solution
    loadings = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[0] == "m"]
    assert max(map(abs, loadings)) < 0.20  # the rule (common practice)
    assert "method factor m" in problem.explanation and "share little beyond" in problem.explanation
    # explained common variance of m in its items (Reise 2012), from the implied covariance with numpy:
    # R^2 of item i = 1 - theta_ii / sigma_ii; with m uncorrelated with a and b, m's part is lambda_im^2 (standardized)
    sigma = result.groups[0].implied_covariance
    theta = {r.variables[0]: r.estimate for r in result.estimates if r.kind == "residual_variance"}
    items = ["y2", "y4", "y6", "y8"]
    index = {x: k for k, x in enumerate(result.observed)}
    r2 = [1 - theta[x] / sigma[index[x], index[x]] for x in items]
    raw = {r.variables[1]: r.estimate for r in result.estimates if r.kind == "loading" and r.variables[0] == "m"}
    own = [raw[x] ** 2 / sigma[index[x], index[x]] for x in items]  # variance of m fixed at 1
    share = sum(own) / sum(r2)
    assert f"It explains {100 * share:.0f}% of its items' common variance" in problem.explanation
    assert any("method factor m" in line for line in fit_report(result).notice.lines)
    assert "(m) whose standardized loadings are all below .20 in size" in methods_paragraph(result)


def test_a_method_factor_that_carries_something_gets_none():
    result = cfa_tool.fit(TRAITS + METHOD, _data(0.5))
    assert result.converged and not _weak(result)


def test_an_undeclared_factor_beside_the_traits_is_judged_alike():
    # not declared a method factor, but every item of m loads on a trait too (bifactor-like)
    result = cfa_tool.fit(TRAITS + METHOD.replace("method m\n", ""), _data(0.05))
    (problem,) = _weak(result)
    assert "factor m, whose every item loads on another factor too," in problem.explanation


def test_trait_factors_with_small_loadings_are_not_method_factors():
    # a trait factor whose items load on it alone is not judged here (its small loadings are a different matter)
    rng = np.random.default_rng(5)
    data = pd.DataFrame(rng.standard_normal((300, 6)), columns=[f"y{i}" for i in range(1, 7)])
    result = cfa_tool.fit("factor a: y1, y2, y3\nfactor b: y4, y5, y6\n", data)
    assert not _weak(result)


def test_compare_and_invariance_reports_carry_the_caution(weak_fit):
    _, data = weak_fit
    comparison = compare([TRAITS, TRAITS + METHOD], data)
    lines = comparison_report(comparison).notice.lines
    assert any("method factor m" in line and "share little beyond" in line for line in lines)
    assert ("The solution of Model 2 has a factor beside the traits (m) whose standardized loadings are all below .20"
            in comparison_report(comparison).paragraph)
    # the restricted model leaves m out: its variance on the boundary (said beside the test)
    assert comparison.tests[0].boundary == ("factor m left out (its variance fixed at 0)",)
    # invariance: the configural model's caution (per group; 2000 rows a group, so that the weak factor stays small)
    grouped = pd.concat([_data(0.05, n=2000).assign(site="east"), _data(0.05, n=2000, seed=7).assign(site="west")],
                        ignore_index=True)
    ladder = invariance(TRAITS + METHOD, grouped, group="site")
    text = invariance_report(ladder).notice.lines
    # (every step's, once with the steps that have it, s23: 'The configural, metric, ... models: group east: ...')
    assert any(str(line).startswith("The configural") and "group east: " in line and "method factor m" in line
               for line in text)


def test_the_paragraph_names_a_method_factors_items_and_keeps_its_loadings_apart():
    # the traits' loading range no longer takes in the method factor's (.28 widened a .56-.74 range; new-user
    # trial), and the method factor's items are named: both read from the result's own estimates
    result = cfa_tool.fit(TRAITS + METHOD, _data(0.3))
    text = " ".join(methods_paragraph(result).split())
    traits = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[0] in ("a", "b")]
    method = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[0] == "m"]
    assert f"Standardized loadings ranged from {unit(min(traits), 2)} to {unit(max(traits), 2)}." in text
    assert (f"The method factor m was indicated by y2, y4, y6, and y8; its standardized loadings ranged from "
            f"{unit(min(method), 2)} to {unit(max(method), 2)}.") in text


def test_a_higher_order_factor_that_also_takes_an_item_is_judged_on_all_its_loadings():
    # g over a, b, c (standardized loadings .7: invented population values, recovered exactly by rows whose covariance
    # matrix is the population's) that also takes y1, which loads on a too, with a population loading of 0.  Its one
    # item loading is small, its loadings on a, b, c are not: g carries much (hostile trial: the caution and the
    # methods paragraph called it negligible, 'all below .20', judged by the item's loading alone)
    L = np.zeros((12, 3))
    for f in range(3):
        L[4 * f:4 * f + 4, f] = 0.7
    phi = np.full((3, 3), 0.49) + np.diag([0.51] * 3)  # first-order factors: .7 x .7 through g, variance 1
    data = exact_cfa_rows(L, phi, np.diag(1.0 - np.diag(L @ phi @ L.T)), 800, 20261203)
    model = ("factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\nfactor c: y9, y10, y11, y12\n"
             "factor g: a, b, c, y1\n")
    result = cfa_tool.fit(model, data)
    assert result.converged and not _weak(result)
    rows = {(r.kind, r.variables): r for r in result.estimates}
    # the standardized loading of g on a from the raw estimates (numpy): B * sd(g) / sd(a), var(a) = B^2 var(g) + psi
    var_g = rows[("factor_variance", ("g",))].estimate
    b_a = rows[("loading", ("g", "a"))].estimate
    total_a = b_a ** 2 * var_g + rows[("factor_variance", ("a",))].estimate
    std_a = b_a * np.sqrt(var_g / total_a)
    assert std_a == pytest.approx(rows[("loading", ("g", "a"))].standardized, abs=1e-6)
    assert std_a == pytest.approx(0.7, abs=0.01)  # the population value
    assert abs(rows[("loading", ("g", "y1"))].standardized) < 0.20  # the item's loading alone would be 'negligible'
    assert "below .20" not in methods_paragraph(result)
    notice = fit_report(result).notice
    assert notice is None or not any("small standardized loadings" in line for line in notice.lines)
