"""The methods paragraph names the items a 'reversed' statement declares (with their answer scale), says how a method
factor of such items was scaled (a declaration does not orient method factors: its first item's loading is fixed to
+1), and gives the reliability of each factor's keyed sum the fit computed: omega (McDonald 1999) for continuous
items, omega hierarchical for a higher-order factor, and for ordinal items the omega of the observed sum of the
answers' codes (Green & Yang 2009), never a coefficient the fit did not compute.  Facts are read from the fit's own
typed fields (its model description and reliability rows); omega is checked by hand from the estimates."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.numbers import unit
from cfa_tool.reporting.paragraph import _delta_brackets, comparison_paragraph, methods_paragraph
from tests.conftest import THREE_FACTORS, holzinger_swineford, simulate_cfa

ITEMS = [f"q{i}" for i in range(1, 10)]
KEYED = ("q2", "q5", "q8")  # worded against their traits
TRAITS = "factor a: q1, q2, q3\nfactor b: q4, q5, q6\nfactor c: q7, q8, q9\n"
REVERSED = "reversed q2, q5, q8 on 1 to 5\n"
METHOD = ("factor wording: q2, q5, q8\nmethod wording\n"
          "uncorrelated wording, a\nuncorrelated wording, b\nuncorrelated wording, c\n")


def _answers(seed: int = 20261203, n: int = 600) -> pd.DataFrame:
    """Three traits (loadings .7; .7 against the trait for q2, q5, q8, which share a wording factor loading .4;
    trait correlations .4), answers cut into five categories 1..5 (invented population values)."""
    L = np.zeros((9, 4))
    for k in range(3):
        L[3 * k:3 * k + 3, k] = 0.7
    for i in (1, 4, 7):
        L[i, i // 3] = -0.7
        L[i, 3] = 0.4
    phi = np.eye(4)
    phi[:3, :3] = 0.4
    np.fill_diagonal(phi, 1.0)
    latent = simulate_cfa(L, phi, np.diag(1.0 - np.diag(L @ phi @ L.T)), n, seed, ITEMS)
    return latent.apply(lambda x: np.digitize(x, [-1.3, -0.45, 0.45, 1.3]) + 1).astype(float)


def _flat(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture(scope="module")
def answers():
    return _answers()


def test_the_declared_items_and_their_scale_are_named(answers):
    result = cfa_tool.fit(TRAITS + REVERSED, answers)
    assert result.description.reverse_keyed == ((KEYED, 1.0, 5.0),)
    text = _flat(methods_paragraph(result))
    assert ("The items q2, q5, and q8 were declared reverse-keyed (worded against their factors; answers from 1 to 5)."
            in text)


def test_without_the_statement_no_item_is_called_declared(answers):
    text = methods_paragraph(cfa_tool.fit(TRAITS, answers))
    assert "declared reverse-keyed" not in text
    # the keyed sums still reverse them, by the signs of their loadings, and the paragraph says why
    assert "with q2, q5, and q8 reversed in the sums (as their loadings run against the other items of their factors)" \
        in _flat(text)


def test_a_method_factor_of_declared_items_says_how_it_was_scaled(answers):
    result = cfa_tool.fit(TRAITS + METHOD + REVERSED, answers)
    scale = next(s for s in result.description.scales if s.factor == "wording")
    assert (scale.method, scale.marker, scale.marker_loading) == ("marker", "q2", 1.0)
    fixed = next(r for r in result.estimates if r.kind == "loading" and r.variables == ("wording", "q2"))
    assert not fixed.free and fixed.estimate == 1.0  # the fit's own parameter: +1, not -1
    text = _flat(methods_paragraph(result))
    assert ("The reverse-keyed declaration does not orient method factors: the loading of wording's first item, q2, "
            "was fixed to +1, so that wording points the way of its items' raw answers.") in text


def test_the_comparison_describes_each_models_keying(answers):
    compared = cfa_tool.compare([TRAITS + REVERSED, TRAITS + METHOD + REVERSED], answers)
    text = _flat(comparison_paragraph(compared))
    # both models declare the same items: said once (new user s14: once per model read as a repetition)
    assert text.count("were declared reverse-keyed") == 1
    assert "In every model, the items q2, q5, and q8 were declared reverse-keyed" in text
    assert text.count("does not orient method factors") == 1  # the second model only


def _omega_by_hand(result, factor: str, keys: dict[str, int]) -> float:
    """McDonald's (1999) omega of a factor's keyed sum from the fit's estimates (no residual covariances):
    (sum k_i l_i)^2 phi / ((sum k_i l_i)^2 phi + sum theta_i)."""
    own = {r.variables[1]: r.estimate for r in result.estimates if r.kind == "loading" and r.variables[0] == factor}
    phi = next(r.estimate for r in result.estimates if r.kind == "factor_variance" and r.variables == (factor,))
    theta = {r.variables[0]: r.estimate for r in result.estimates if r.kind == "residual_variance"}
    common = sum(keys.get(x, 1) * value for x, value in own.items()) ** 2 * phi
    return common / (common + sum(theta[x] for x in own))


def test_continuous_omega_is_the_fits_own_and_agrees_with_the_formula():
    result = cfa_tool.fit(THREE_FACTORS, holzinger_swineford())
    rows = {r.factor: r for r in result.groups[0].reliability}
    for factor in ("visual", "textual", "speed"):
        assert rows[factor].omega == pytest.approx(_omega_by_hand(result, factor, {}), rel=1e-6)
    # recalled from memory, not a cited table: semTools' reliability() on this model gives omega near .61, .88, .69
    assert [round(rows[f].omega, 1) for f in ("visual", "textual", "speed")] == [0.6, 0.9, 0.7]
    text = _flat(methods_paragraph(result))
    assert (f"For the reliability of the factors' keyed sum scores, omega (McDonald, 1999) was "
            f"{unit(rows['visual'].omega, 2)}{_delta_brackets(rows['visual'])} for visual, "
            f"{unit(rows['textual'].omega, 2)}{_delta_brackets(rows['textual'])} for textual, and "
            f"{unit(rows['speed'].omega, 2)}{_delta_brackets(rows['speed'])} for speed (in brackets, 95% delta-method "
            f"intervals; Raykov, 2002).") in text


def test_declared_reverse_keyed_items_enter_omega_turned(answers):
    result = cfa_tool.fit(TRAITS + REVERSED, answers)
    rows = {r.factor: r for r in result.groups[0].reliability}
    assert rows["a"].reversed == ("q2",)
    assert rows["a"].omega == pytest.approx(_omega_by_hand(result, "a", {"q2": -1}), rel=1e-6)
    text = _flat(methods_paragraph(result))
    assert f"omega (McDonald, 1999) was {unit(rows['a'].omega, 2)}{_delta_brackets(rows['a'])} for a" in text
    assert "with q2, q5, and q8 reversed in the sums (as declared)" in text


def test_a_higher_order_factor_gets_omega_hierarchical():
    model = THREE_FACTORS + "factor g: visual, textual, speed\n"
    result = cfa_tool.fit(model, holzinger_swineford())
    top = next(r for r in result.groups[0].reliability if r.factor == "g")
    assert top.level == "higher-order" and top.omega_hierarchical is not None
    assert (f"omega hierarchical (Zinbarg, Revelle, Yovel & Li, 2005) was {unit(top.omega_hierarchical, 2)}{_delta_brackets(top)} for g"
            in _flat(methods_paragraph(result)))


def test_the_ordinal_paragraph_gives_the_observed_sum_omega_and_the_declared_items(answers):
    result = cfa_tool.fit(TRAITS + REVERSED, answers, ordinal="all")
    rows = result.groups[0].reliability
    assert all(r.observed_sum_omega is not None for r in rows)
    values = ", ".join(f"{unit(r.observed_sum_omega, 2)} for {r.factor}" for r in rows[:2])
    text = _flat(methods_paragraph(result))
    assert "The items q2, q5, and q8 were declared reverse-keyed" in text
    assert (f"The reliability of the factors' keyed sums of the answers' codes (the omega of the observed sum, from the "
            f"fitted thresholds, loadings and factor variances; Green & Yang, 2009) was {values}, and "
            f"{unit(rows[2].observed_sum_omega, 2)} for {rows[2].factor}, with q2, q5, and q8 reversed in the sums "
            f"(as declared).") in text
    # the omega of the latent responses is not the one given for a sum of answers
    assert "McDonald" not in text


def _higher_order_sum_omega_by_hand(result, top: str, keys: dict) -> float:
    """The share of the variance of the keyed sum X = sum_i k_i x_i of the answers' codes (1..5) due to the
    higher-order factor ``top`` alone, Var(E[X | g]) / Var(X), from the fit's estimates, with scipy's normal
    distributions: E[x_i | g] = 1 + sum_c P(y*_i > tau_ic | g), y*_i | g normal with mean Cov(y*_i, g) g / Var(g) and
    variance Var(y*_i) - Cov(y*_i, g)^2 / Var(g), integrated over g by Gauss-Hermite quadrature; Var(X) from the
    bivariate normal probabilities of each pair of thresholds, P(y*_i > a, y*_j > b) (Green & Yang 2009, eq. 19, the
    definition of the covariance of two cut normal variables; Zinbarg et al. 2005 for the share due to the general
    factor alone)."""
    from scipy import stats

    est = {(r.kind, tuple(r.variables)): r.estimate for r in result.estimates}
    items = list(result.observed)
    factor_of = {v[1]: v[0] for k, v in est if k == "loading" and v[1] in items}
    lam = {x: est[("loading", (factor_of[x], x))] for x in items}
    gamma = {f: est[("loading", (top, f))] for f in set(factor_of.values())}
    var_g = est[("factor_variance", (top,))]
    var_f = {f: gamma[f] ** 2 * var_g + est[("factor_variance", (f,))] for f in gamma}
    var_y = {x: lam[x] ** 2 * var_f[factor_of[x]] + est[("residual_variance", (x,))] for x in items}
    with_g = {x: lam[x] * gamma[factor_of[x]] * var_g for x in items}
    tau = {x: [est[("threshold", (x, str(c)))] for c in range(1, 5)] for x in items}
    k = {x: keys.get(x, 1.0) for x in items}

    nodes, weights = np.polynomial.hermite_e.hermegauss(80)  # g = sqrt(Var g) z, z standard normal
    weights = weights / weights.sum()
    g = np.sqrt(var_g) * nodes
    expected = sum(k[x] * sum(stats.norm.sf((t - with_g[x] / var_g * g) / np.sqrt(var_y[x] - with_g[x] ** 2 / var_g))
                              for t in tau[x]) for x in items)
    due = float(weights @ (expected - weights @ expected) ** 2)

    def covariance(x, y) -> float:
        if x == y:
            return sum(stats.norm.sf(max(a, b) / np.sqrt(var_y[x])) - stats.norm.sf(a / np.sqrt(var_y[x]))
                       * stats.norm.sf(b / np.sqrt(var_y[x])) for a in tau[x] for b in tau[x])
        sx, sy = np.sqrt(var_y[x]), np.sqrt(var_y[y])
        rho = lam[x] * lam[y] * (var_f[factor_of[x]] if factor_of[x] == factor_of[y] else
                                 gamma[factor_of[x]] * gamma[factor_of[y]] * var_g) / (sx * sy)
        law = stats.multivariate_normal(mean=[0.0, 0.0], cov=[[1.0, rho], [rho, 1.0]])
        return sum(law.cdf([-a / sx, -b / sy]) - stats.norm.sf(a / sx) * stats.norm.sf(b / sy)
                   for a in tau[x] for b in tau[y])

    total = sum(k[x] * k[y] * covariance(x, y) for x in items for y in items)
    return due / total


def test_an_ordinal_higher_order_factor_gets_the_omega_hierarchical_of_its_items_sum(answers):
    """s23: the reliability table showed the higher-order factor's latent-response omega and the paragraph said
    nothing of it (the observed-sum omega was computed for first-order factors only); now the share of the keyed sum
    of the answers' codes due to it alone is computed, shown in the table's sum column and said in the paragraph, and
    checked here against scipy's normal distributions (by hand, as the docstring of the helper says)."""
    result = cfa_tool.fit(TRAITS + "factor g: a, b, c\n", answers, ordinal="all")
    top = next(r for r in result.groups[0].reliability if r.factor == "g")
    assert top.level == "higher-order" and top.reversed == KEYED  # the items worded against their traits
    by_hand = _higher_order_sum_omega_by_hand(result, "g", {x: -1.0 for x in KEYED})
    assert top.observed_sum_omega == pytest.approx(by_hand, abs=1e-6)
    assert top.observed_sum_omega < top.omega_hierarchical  # the sum of codes below its latent responses' (Green &
    # Yang 2009: categories lose reliability)
    text = _flat(methods_paragraph(result))
    first = text.split("Green & Yang, 2009) was ")[1].split(", with")[0]
    assert " for a" in first and " for c" in first and "for g" not in first  # not among the first-order factors
    assert ("For the higher-order factor, omega hierarchical of the keyed sum of the answers' codes of the items below "
            "it, the share of that sum's variance due to the higher-order factor alone (from the fitted thresholds, "
            "loadings and factor variances; Green & Yang, 2009; Zinbarg, Revelle, Yovel & Li, 2005), was "
            f"{unit(top.observed_sum_omega, 2)} for g, with q2, q5, and q8 reversed in the sums") in text
    from cfa_tool.reporting.tables import reliability_table

    table = reliability_table(result)
    assert {row[0]: row[2] for row in table.rows}["g"] == unit(top.observed_sum_omega)