"""Ordinal items beside continuous ones in several groups (thresholds, and the continuous items' means
and variances, as statistics of one least-squares fit).

Checks against what the project did not write:

* one group in this parametrisation is an equivalent model to the one-group mixed fit on polychoric,
  polyserial and Pearson correlations (Millsap & Yun-Tein 2004, Wu & Estabrook 2016: the parametrisations
  differ only in the latent responses' scale), so the statistic, the adjusted test and every standardized
  value must agree;
* a block of three continuous indicators of one factor, uncorrelated with the ordinal block, is exactly
  identified, so its estimates in every group are the closed-form three-indicator solution from the
  sample covariances (Bollen 1989, ch. 7: lambda_2 = s_23 / s_13, lambda_3 = s_23 / s_12,
  psi = s_12 s_13 / s_23, theta_j = s_jj - lambda_j^2 psi, nu_j = the sample mean), computed here with numpy;
* the ordinal block of that model then separates from the rest, so its estimates equal those of the
  all-ordinal multi-group fit of the ordinal items alone;
* the degrees of freedom of each invariance step are counted by hand (Wu & Estabrook 2016 for the ordinal
  items, Millsap & Yun-Tein 2004 for the continuous ones).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.errors import DataError
from cfa_tool.pipeline.continuous import FitOptions
from cfa_tool.pipeline.inputs import load_spec
from cfa_tool.pipeline.ordinal import assess_ordinal_groups, estimate_ordinal_groups
from cfa_tool.workflows.invariance import invariance

CUTS = (-1.2, -0.3, 0.5, 1.3)


def _draw(n: int, seed: int, factor_mean: float = 0.0, correlation: float = 0.4, y_shift: float = 0.0) -> pd.DataFrame:
    """q1..q3 ordinal on f1, y1..y3 continuous on f2 (any scale), two correlated factors."""
    rng = np.random.default_rng(seed)
    eta = factor_mean + rng.multivariate_normal([0, 0], [[1, correlation], [correlation, 1]], n)
    out = {}
    for j in range(3):
        latent = 0.7 * eta[:, 0] + rng.normal(size=n) * np.sqrt(0.51)
        out[f"q{j + 1}"] = np.searchsorted(CUTS, latent) + 1
    for j, (scale, mean) in enumerate(((4.0, 20.0), (2.5, 10.0), (1.5, 0.0))):
        out[f"y{j + 1}"] = mean + (y_shift if j == 2 else 0.0) + scale * (0.8 * eta[:, 1] + 0.6 * rng.normal(size=n))
    return pd.DataFrame(out)


MODEL = "factor f1: q1, q2, q3\nfactor f2: y1, y2, y3\nordinal q1, q2, q3\n"


def _groups(a: pd.DataFrame, b: pd.DataFrame) -> pd.DataFrame:
    return pd.concat([a.assign(site="north"), b.assign(site="south")], ignore_index=True)


@pytest.mark.parametrize("gaps", [False, True])
def test_one_group_equals_the_one_group_mixed_fit(gaps):
    data = _draw(900, 1)
    if gaps:  # pairwise present rows: the means and variances come from the rows that answered each item
        rng = np.random.default_rng(2)
        for column in ("q2", "y1", "y3"):
            data.loc[rng.random(len(data)) < 0.15, column] = np.nan
    one = cfa_tool.fit(MODEL, data)
    spec = load_spec(MODEL)
    moments = ordinal_moments(data, spec.observed_names, "data", frozenset({"y1", "y2", "y3"}), pairwise=True)
    est = estimate_ordinal_groups(spec, [("all", moments)], FitOptions())
    mine = assess_ordinal_groups(spec, [("all", moments)], est, FitOptions(), "group")
    assert mine.fit.df == one.fit.df
    assert mine.fit.chi_square == pytest.approx(one.fit.chi_square, rel=1e-8)
    assert mine.robust.chi_square_scaled == pytest.approx(one.robust.chi_square_scaled, rel=1e-7)
    assert mine.robust.cfi_robust == pytest.approx(one.robust.cfi_robust, abs=1e-8)
    theirs = {(r.kind, r.variables): r for r in one.estimates}
    compared = 0
    for row in mine.estimates:
        if (row.kind, row.variables) in theirs and row.kind != "intercept":
            assert row.standardized == pytest.approx(theirs[(row.kind, row.variables)].standardized, abs=1e-6), row
            compared += 1
    assert compared >= 15
    # a continuous item keeps its metric: its unstandardized loading is the one-group (SD-unit) one times its SD
    sd = float(data["y2"].std(ddof=0))
    sd1 = float(data["y1"].dropna().std(ddof=0))
    ratio = {r.variables: r.estimate for r in mine.estimates if r.kind == "loading"}
    assert ratio[("f2", "y2")] == pytest.approx(theirs[("loading", ("f2", "y2"))].estimate * sd / sd1, rel=1e-5)


def _three_indicator_solution(frame: pd.DataFrame) -> dict:
    """The exactly identified one-factor model of three indicators (marker y1), from the sample covariances
    with divisor N (Bollen 1989, ch. 7)."""
    x = frame[["y1", "y2", "y3"]].to_numpy(float)
    s = np.cov(x, rowvar=False, bias=True)
    lam2, lam3 = s[1, 2] / s[0, 2], s[1, 2] / s[0, 1]
    psi = s[0, 1] * s[0, 2] / s[1, 2]
    lam = np.array([1.0, lam2, lam3])
    out = {("loading", ("f2", "y2")): lam2, ("loading", ("f2", "y3")): lam3, ("factor_variance", ("f2",)): psi}
    for j, name in enumerate(("y1", "y2", "y3")):
        out[("residual_variance", (name,))] = s[j, j] - lam[j] ** 2 * psi
        out[("intercept", (name,))] = x[:, j].mean()
    return out


def test_continuous_block_is_the_closed_form_solution_and_the_ordinal_block_the_all_ordinal_fit():
    a, b = _draw(700, 2, correlation=0.0), _draw(600, 3, factor_mean=0.4, correlation=0.0)
    model = MODEL + "uncorrelated f1, f2\n"
    result = cfa_tool.fit(model, _groups(a, b), group="site")
    assert result.converged
    values = {(r.kind, r.variables, r.group): r.estimate for r in result.estimates}
    for label, frame in (("north", a), ("south", b)):
        for (kind, variables), expected in _three_indicator_solution(frame).items():
            assert values[(kind, variables, label)] == pytest.approx(expected, rel=1e-6), (label, kind, variables)
    ordinal_only = cfa_tool.fit("factor f1: q1, q2, q3\nordinal q1, q2, q3\n",
                                _groups(a[["q1", "q2", "q3"]], b[["q1", "q2", "q3"]]), group="site")
    for row in ordinal_only.estimates:
        assert values[(row.kind, row.variables, row.group)] == pytest.approx(row.estimate, abs=1e-6), row


def test_invariance_ladder_with_mixed_items_counts_its_steps_and_finds_a_shifted_intercept():
    a, b = _draw(1500, 4), _draw(1500, 5, factor_mean=0.3, y_shift=1.2)
    result = invariance(MODEL, _groups(a, b), group="site", partial="auto")
    steps = {s.level: s for s in result.steps}
    # per group: 3 x 4 thresholds + 3 means + 3 variances + 15 correlations = 33 statistics;
    # configural parameters per group: 4 loadings, 2 factor variances, 1 covariance, 12 thresholds,
    # 3 intercepts and 3 residual variances of the continuous items = 25
    assert steps["configural"].full_result.fit.df == 2 * (33 - 25)
    # thresholds: 12 tied, the second group's 3 latent intercepts and 3 residual variances freed
    assert steps["thresholds"].full_result.fit.df - steps["configural"].full_result.fit.df == 12 - 6
    assert steps["metric"].full_result.fit.df - steps["thresholds"].full_result.fit.df == 4
    # scalar: 3 latent intercepts fixed again, 3 continuous intercepts tied, 2 factor means freed
    assert steps["scalar"].full_result.fit.df - steps["metric"].full_result.fit.df == 3 + 3 - 2
    # strict (after the partial search freed one intercept at the scalar step): 3 + 3 residual variances
    assert steps["strict"].full_result.fit.df - steps["scalar"].result.fit.df == 3 + 3
    assert not steps["scalar"].full_holds and steps["strict"].holds
    freed = [(f.kind, f.variables) for f in result.freed]
    assert ("intercept", ("y3",)) in freed  # the one intercept shifted in the south group


def test_a_continuous_item_constant_in_one_group_is_named():
    a, b = _draw(300, 6), _draw(300, 7)
    b["y2"] = 3.0
    with pytest.raises(DataError, match=r"\(group south of 'site'\): column 'y2' has the same value in every row"):
        cfa_tool.fit(MODEL, _groups(a, b), group="site")


def _posterior_mean(row: pd.Series, values: dict, group: str, items: tuple[str, ...]) -> float:
    """E[eta | answers] of a one-factor model by scipy.integrate.quad over the normal prior times the answers'
    probabilities: ordinal items by their categories on the latent-response scale, continuous items by their
    normal densities (Muthén 1984; Bock & Aitkin 1981)."""
    from scipy import integrate
    from scipy.special import ndtr
    from scipy.stats import norm

    def par(kind, *names):
        return values[(kind, names, group)]

    alpha, phi = par("mean", "f"), par("factor_variance", "f")

    def density(eta, power):
        out = norm.pdf(eta, alpha, np.sqrt(phi)) * eta**power
        for x in items:
            loading, nu, theta = par("loading", "f", x), par("intercept", x), par("residual_variance", x)
            mean = nu + loading * eta
            if x.startswith("q"):
                cuts = [-np.inf] + [par("threshold", x, str(k)) for k in range(1, 5)] + [np.inf]
                c = int(row[x]) - 1
                out *= ndtr((cuts[c + 1] - mean) / np.sqrt(theta)) - ndtr((cuts[c] - mean) / np.sqrt(theta))
            else:
                out *= norm.pdf(row[x], mean, np.sqrt(theta))
        return out

    lo, hi = alpha - 10 * np.sqrt(phi), alpha + 10 * np.sqrt(phi)
    total = integrate.quad(density, lo, hi, args=(0,), epsabs=0, epsrel=1e-12, limit=200)[0]
    return integrate.quad(density, lo, hi, args=(1,), epsabs=0, epsrel=1e-12, limit=200)[0] / total


def test_posterior_means_of_mixed_items_in_groups_are_the_integrals():
    a, b = _draw(500, 8), _draw(400, 9, factor_mean=0.5)
    items = ("q1", "q2", "q3", "y1", "y2")
    model = "factor f: q1, q2, q3, y1, y2\nordinal q1, q2, q3\ninvariance scalar\n"
    data = _groups(a, b)[list(items) + ["site"]]
    result = cfa_tool.scores(model, data, group="site")
    values = {(r.kind, r.variables, r.group): r.estimate for r in result.fit.estimates}
    assert values[("mean", ("f",), "south")] != 0.0
    for i in (0, 7, 450, 800):
        row = data.iloc[i]
        expected = _posterior_mean(row, values, row["site"], items)
        assert result.table["f_posterior_mean"].iloc[i] == pytest.approx(expected, abs=1e-6), i


def test_compare_mixed_models_in_groups_and_in_one_group():
    # the general model lists the items in another order, so its statistics (thresholds, the continuous items'
    # means and variances, correlations) are reordered for the nesting check
    data = _groups(_draw(600, 10), _draw(500, 11, factor_mean=0.3))
    restricted = MODEL + "uncorrelated f1, f2\n"
    general = "factor f2: y1, y2, y3\nfactor f1: q1, q2, q3\nordinal q1, q2, q3\n"
    for group, extra_df in ((None, 1), ("site", 2)):
        frame = data if group is not None else data.drop(columns="site")
        result = cfa_tool.compare([restricted, general], frame, group=group)
        assert len(result.tests) == 1 and result.tests[0].df_difference == extra_df
        assert result.tests[0].p_value < 1e-6  # the factors correlate .4 in both groups
        if group is None:  # one group: the same statistics and parameter counts as 'fit'
            for text, fitted in zip((restricted, general), result.results):
                own = cfa_tool.fit(text, frame)
                assert fitted.fit.chi_square == pytest.approx(own.fit.chi_square, rel=1e-7)
                assert fitted.fit.n_free_parameters == own.fit.n_free_parameters


def test_asymptotic_covariance_of_a_continuous_items_mean_and_variance():
    # the sample mean and variance (divisor N) of an item: N Var(m) -> mu_2, N Cov(m, s^2) -> mu_3,
    # N Var(s^2) -> mu_4 - mu_2^2 (the large-sample moments of sample moments, e.g. Kendall & Stuart, The Advanced
    # Theory of Statistics, vol. 1, the chapter on standard errors; the reference is recalled from memory),
    # with the central moments computed here by numpy
    data = _draw(700, 12)
    data["y1"] = np.exp(data["y1"] / 10.0)  # skewed, so that mu_3 is not 0
    spec = load_spec(MODEL)
    moments = ordinal_moments(data, spec.observed_names, "data", frozenset({"y1", "y2", "y3"}))
    values, gamma = moments.statistics()
    K = len(moments.stacked_thresholds)
    x = data["y1"].to_numpy(float)
    d = x - x.mean()
    mu2, mu3, mu4 = (d**2).mean(), (d**3).mean(), (d**4).mean()
    mean_at, variance_at = K, K + 3  # y1 is the first continuous item: its mean, then (after 3 means) its variance
    assert values[mean_at] == pytest.approx(x.mean(), rel=1e-12)
    assert values[variance_at] == pytest.approx(mu2, rel=1e-12)
    assert gamma[mean_at, mean_at] == pytest.approx(mu2, rel=1e-10)
    assert gamma[mean_at, variance_at] == pytest.approx(mu3, rel=1e-10)
    assert gamma[variance_at, variance_at] == pytest.approx(mu4 - mu2**2, rel=1e-10)
    assert gamma.shape == (len(values), len(values))
