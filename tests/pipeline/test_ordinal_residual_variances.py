"""An ordinal item's residual variance in a fit of one group follows from its latent response's unit variance (the
correlation metric; Muthén & Asparouhov 2002: 1 minus the variance its factors explain), so a statement on it cannot apply.  Before
(hostile tester s14), 'fix variance(a1) = 0.3' was silently ignored: the same chi-square and df as without it, the
table printing 0.300 beside an R-squared that implied 0.58, and the methods text saying it was fixed; 'equal' was
ignored alike.  Every command that fits one group of ordinal items refuses it now, naming the line.  With groups
the latent responses are identified as Wu & Estabrook (2016) set out (residual variance 1 in the first group, a
parameter in the others once thresholds are held equal), where such a statement is a parameter's constraint and
is kept."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import ModelError
from cfa_tool.reporting.paragraph import methods_paragraph

ITEMS = "factor f: a1, a2, a3, a4\n"
# each statement on a residual variance, the word the error quotes and the statement's column
STATEMENTS = [
    ("fix variance(a1) = 0.3", "fix", 5),
    ("start variance(a1) = 0.3", "start", 7),
    ("bound variance(a1) >= 0.1", "bound", 7),
    ("equal variance(a1), variance(a2)", "equal", 7),
    ("free variance(a2)", "free", 6),
]


def _answers(n: int = 400, groups: bool = False) -> pd.DataFrame:
    rng = np.random.default_rng(1)
    f = rng.normal(size=n)
    frame = pd.DataFrame({f"a{i}": np.clip(np.round((0.7 * f + rng.normal(0, 0.714, n)) * 1.2 + 3), 1, 5)
                          for i in range(1, 5)})
    if groups:
        frame["grp"] = np.where(np.arange(n) < n // 2, "north", "south")
    return frame


@pytest.mark.parametrize("statement, word, column", STATEMENTS)
def test_a_statement_on_an_ordinal_items_residual_variance_is_an_error_at_its_line(statement, word, column):
    with pytest.raises(ModelError, match=rf"'{word} variance\(a\d\)': the residual variance of 'a\d' cannot be set "
                                         r"with ordinal items in one group: every latent response has variance 1 "
                                         r"there \(the correlation metric") as caught:
        cfa_tool.fit(ITEMS + statement + "\n", _answers(), ordinal="all")
    assert (caught.value.location.line, caught.value.location.column) == (2, column)


def test_compare_replicate_and_power_simulation_refuse_it_alike():
    data = _answers()
    fixed = ITEMS + "fix variance(a1) = 0.3\n"
    words = r"'fix variance\(a1\)': the residual variance of 'a1' cannot be set"
    with pytest.raises(ModelError, match=words):  # compare fits one group by the estimator with thresholds
        cfa_tool.compare([ITEMS, fixed], data, ordinal="all")
    with pytest.raises(ModelError, match=words):
        cfa_tool.replicate(fixed, data.iloc[:200], data.iloc[200:], ordinal="all")
    # loadings .7 with a residual variance of .51 make the latent response's variance 1: still a statement that
    # cannot apply, named at its line (before, "not parameters" without a line)
    population = ITEMS + "start loading(f, a1), loading(f, a2), loading(f, a3), loading(f, a4) = 0.7\nfix variance(f) = 1\n"
    with pytest.raises(ModelError, match=r"'start variance\(a1\)': the residual variance of 'a1' cannot be set") as caught:
        cfa_tool.power_simulation(population + "start variance(a1) = 0.51\n", 100, replications=20, workers=1,
                                  categories=5)
    assert caught.value.location.line == 4


@pytest.mark.parametrize("statement, word, column", STATEMENTS)
@pytest.mark.parametrize("ordinal", ["ordinal a1, a2, a3, a4\n", 'answers "Low" = 1, "Mid" = 2, "High" = 3\n', ""])
def test_simulate_refuses_it_as_the_fit_does(statement, word, column, ordinal):
    # simulate cut the latent response at its thresholds after standardizing it, so 'fix variance(a1) = 0.3' made a1's
    # standardized loading .79 (.7 / sqrt(.49 + .3)) while the population table said 0.3 on a scale the answers do
    # not have, and the fit of the rows refused the same model file (session note s14).  Ordinal items by an
    # 'ordinal' statement, by an 'answers' statement (written as its words) or by a number of categories alike.
    categories = None if ordinal.startswith("answers") else 4
    lines = ITEMS.count("\n") + ordinal.count("\n")
    with pytest.raises(ModelError, match=rf"'{word} variance\(a\d\)': the residual variance of 'a\d' cannot be set "
                                         r"with ordinal items in one group") as caught:
        cfa_tool.simulate(ITEMS + ordinal + statement + "\n", 100, categories=categories)
    assert (caught.value.location.line, caught.value.location.column) == (lines + 1, column)


def test_simulate_keeps_a_residual_variance_of_continuous_items():
    # no item cut: the statement is the population's residual variance (loading .7, factor variance 1)
    simulated = cfa_tool.simulate(ITEMS + "fix variance(a1) = 0.3\n", 50_000, seed=3)
    value = {(v["kind"], tuple(v["variables"])): v["value"] for v in simulated.population.values()}
    assert value[("residual_variance", ("a1",))] == 0.3
    # a1 is the marker (loading 1): its variance is the factor's variance plus .3 (Bollen 1989, ch. 7)
    assert simulated.frame["a1"].var() == pytest.approx(value[("factor_variance", ("f",))] + 0.3, rel=0.03)


def test_the_rmsea_power_plan_of_an_ordinal_model_refuses_it():
    # 'power' gave 4 degrees of freedom (a fixed residual variance one more) for a model the ordinal fit refuses
    from cfa_tool.language.parser import parse_model
    from cfa_tool.workflows.power import model_degrees_of_freedom

    assert model_degrees_of_freedom(parse_model(ITEMS + "ordinal a1, a2, a3, a4\n")) == (2, 4)  # 10 - 8, by hand
    assert model_degrees_of_freedom(parse_model(ITEMS + "fix variance(a1) = 0.3\n")) == (3, 4)  # continuous: kept
    with pytest.raises(ModelError, match=r"'fix variance\(a1\)': the residual variance of 'a1' cannot be set") as caught:
        model_degrees_of_freedom(parse_model(ITEMS + "ordinal a1, a2, a3, a4\nfix variance(a1) = 0.3\n"))
    assert caught.value.location.line == 3


def test_with_groups_a_fixed_residual_variance_is_a_constraint_and_is_kept():
    # Wu & Estabrook (2016): once the thresholds are held equal, the later groups' residual variances of items with
    # two or more thresholds are parameters; fixing them at the first group's value adds one constraint per group
    data = _answers(600, groups=True)
    free = cfa_tool.fit(ITEMS + "invariance thresholds\n", data, ordinal="all", group="grp")
    held = cfa_tool.fit(ITEMS + "invariance thresholds\nfix variance(a1) = 1\n", data, ordinal="all", group="grp")
    assert held.fit.df == free.fit.df + 1
    assert held.fit.chi_square > free.fit.chi_square


def test_a_fully_fixed_ordinal_model_names_the_least_squares_discrepancy():
    # loadings and factor variance fixed: the residual variances follow (1 - .49 = .51), nothing is estimated, and
    # the statistic is least squares on the polychoric correlations, not maximum likelihood (hostile tester s14)
    result = cfa_tool.fit(ITEMS + "fix loading(f, a1), loading(f, a2), loading(f, a3), loading(f, a4) = 0.7\n"
                          "fix variance(f) = 1\n", _answers(), ordinal="all")
    assert not result.parameter_labels
    residual = [r.estimate for r in result.estimates if r.kind == "residual_variance"]
    assert residual == pytest.approx([0.51] * 4, abs=1e-12)  # 1 - 0.7^2, by hand
    text = " ".join(methods_paragraph(result).split())
    assert ("with every parameter fixed at a stated value was tested against the data by the diagonally weighted "
            "least-squares discrepancy from the polychoric correlations, so nothing was estimated") in text
    assert "maximum-likelihood" not in text


def test_the_methods_text_says_which_residual_variances_a_fit_in_groups_fixed():
    # every residual variance fixed (at 1 by the identification, a1's at 0.3 by the file): it said "partly estimated"
    data = _answers(600, groups=True)
    text = " ".join(methods_paragraph(cfa_tool.fit(ITEMS + "fix variance(a1) = 0.3\n", data, ordinal="all",
                                                   group="grp")).split())
    assert ("had intercepts fixed at 0 and residual variances fixed at 1 (a1's at 0.3) in every group") in text
    held = " ".join(methods_paragraph(cfa_tool.fit(ITEMS + "fix variance(a1) = 0.3\ninvariance thresholds\n", data,
                                                   ordinal="all", group="grp")).split())
    assert "residual variances estimated (except a1 fixed at 0.3) in group south" in held  # named as every sentence names a group (s22)
    assert "partly estimated" not in text + held


def test_the_invariance_ladder_refuses_a_fixed_residual_variance_of_an_ordinal_item():
    # the ladder frees the later groups' residual variances once thresholds are held equal; a fix held a1's equal
    # across groups from the thresholds step on (its df 9 where 8, strict's 3 where 4), a strict constraint unsaid
    with pytest.raises(ModelError, match=r"'fix variance\(a1\)': the invariance ladder sets the residual variances "
                                         r"of the ordinal items' latent responses itself") as caught:
        cfa_tool.invariance(ITEMS + "fix variance(a1) = 0.3\n", _answers(600, groups=True), "grp", ordinal="all")
    assert caught.value.location.line == 2
