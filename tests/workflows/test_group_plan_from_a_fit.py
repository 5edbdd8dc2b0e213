"""Planning an invariance study from a one-group fit (new-user trial s21, finding 8): power-simulation --group-sizes
refused --population-from even for a fit of one group of the same model, and planned in silence from the standardized
defaults (loadings .7, every factor correlation +.3, where the fit found -.5).  Every group now shares the fit's
estimates, with the 'in group' statements giving the differences; a plan from defaults says so above its tables.
Check values: the fit's own estimates of Holzinger & Swineford's (1939) three-factor model (the population is that
fit), and a group's population covariance matrix by the model's formula Sigma = L P L' + T (Joreskog 1969) written
out here."""

from __future__ import annotations

import json

import numpy as np
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.workflows.group_power import invariance_power
from tests.conftest import THREE_FACTORS

DIFFERENCE = "in group east: start loading(visual, x2) = .3\n"


@pytest.fixture(scope="module")
def fitted(hs_data):
    return cfa_tool.fit(THREE_FACTORS, hs_data)


def test_every_group_shares_the_fits_estimates_and_the_in_group_value_differs(fitted):
    result = invariance_power(THREE_FACTORS + DIFFERENCE, "west=200,east=200", replications=2, seed=5, workers=1,
                              population=fitted)
    shared = result.population.shared
    assert shared.defaulted == () and shared.fitted_from is not None
    values = {(v["kind"], tuple(v["variables"])): v["value"] for v in shared.values()}
    for row in fitted.estimates:
        if row.free:
            assert values[(row.kind, row.variables)] == pytest.approx(row.estimate, abs=1e-10)  # the fit's own
    (difference,) = result.population.differences
    assert (difference.kind, difference.variables, difference.group) == ("loading", ("visual", "x2"), "east")
    assert difference.value == pytest.approx(0.3)
    assert difference.reference_value == pytest.approx(values[("loading", ("visual", "x2"))], abs=1e-10)
    # the reference group's covariance matrix is the fit's implied one, L P L' + T written out (Joreskog 1969)
    est = {(r.kind, r.variables): r.estimate for r in fitted.estimates}
    items, factors = [f"x{i}" for i in range(1, 10)], ["visual", "textual", "speed"]
    L = np.zeros((9, 3))
    L[[0, 3, 6], [0, 1, 2]] = 1.0  # the markers x1, x4, x7
    for (kind, names), value in est.items():
        if kind == "loading":
            L[items.index(names[1]), factors.index(names[0])] = value
    P = np.array([[est[("factor_variance", (f,))] if f == g else
                   est.get(("factor_covariance", (f, g)), est.get(("factor_covariance", (g, f))))
                   for g in factors] for f in factors])
    T = np.diag([est[("residual_variance", (x,))] for x in items])
    np.testing.assert_allclose(result.population.sigmas[0], L @ P @ L.T + T, atol=1e-8)
    text = " ".join(result.summary().split())
    assert "standardized defaults" not in text
    assert "Every value is an estimate of the earlier fit in the fit result given" in text


def test_a_plan_from_defaults_says_so_above_its_tables():
    result = invariance_power(THREE_FACTORS + DIFFERENCE, "west=200,east=200", replications=2, seed=5, workers=1)
    assert len(result.population.shared.defaulted) == 21  # 6 loadings, 3 + 3 factor (co)variances, 9 residuals
    text = " ".join(result.summary().split())
    caution = ("21 of the population values shared by the groups are the standardized defaults (loadings .7, -.7 for "
               "reverse-keyed items, factor correlations .3, residual covariances 0, item variances 1; listed in the "
               "population table), not values of this scale")
    assert caution in text and text.index(caution) < text.index("Rejections of each step of the ladder")
    assert "(population='FIT.json')" in text  # the way to give them from a fit, for the interface that reads it


def test_a_fit_of_groups_and_an_ordinal_fit_are_refused(hs_data, fitted):
    grouped = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    with pytest.raises(OptionError, match="the fit has groups; population values are taken from a fit of one group"):
        invariance_power(THREE_FACTORS, "west=200,east=200", replications=2, workers=1, population=grouped)
    cut = hs_data.copy()
    for x in [f"x{i}" for i in range(1, 10)]:
        cut[x] = np.digitize(cut[x], np.quantile(cut[x], [.25, .5, .75])) + 1
    ordinal = cfa_tool.fit(THREE_FACTORS, cut, ordinal="all")
    with pytest.raises(OptionError, match="the fit is of ordinal items, and planning an invariance study .* does not simulate answers in categories"):
        invariance_power(THREE_FACTORS, "west=200,east=200", replications=2, workers=1, population=ordinal)


def test_the_command_plans_from_a_fits_json(fitted, tmp_path, capsys):
    model, fit = tmp_path / "plan.cfa", tmp_path / "fit.json"
    model.write_text(THREE_FACTORS + DIFFERENCE)
    fit.write_text(json.dumps(fitted.to_dict()))
    assert main(["power-simulation", str(model), "--group-sizes", "west=200,east=200", "--replications", "2",
                 "--workers", "1", "--population-from", str(fit)]) == 0
    said = " ".join(capsys.readouterr().out.split())
    assert "Every value is an estimate of the earlier fit in" in said and "standardized defaults" not in said


def test_the_fits_item_means_are_every_groups_intercepts_so_a_stated_intercept_is_in_its_units(fitted, hs_data):
    """New-user trial s24: a plan from a fit left every intercept at 0, so 'in group east: start intercept(x2) = 6.5'
    (the fit's mean of x2, about 6.09, plus the shift to detect) was planned as a shift of 6.5.  Every group's
    intercepts are now the fit's item means (the fit has no mean structure: the means of the rows it fitted, the
    maximum-likelihood means; Holzinger & Swineford 1939 data) unless a statement gives them."""
    mean_x2 = float(hs_data["x2"].mean())
    result = invariance_power(THREE_FACTORS + f"in group east: start intercept(x2) = {mean_x2 + 0.4}\n",
                              "west=200,east=200", replications=2, seed=5, workers=1, population=fitted)
    (difference,) = result.population.differences
    assert (difference.kind, difference.variables) == ("intercept", ("x2",))
    assert difference.reference_value == pytest.approx(mean_x2, abs=1e-10)
    assert difference.value - difference.reference_value == pytest.approx(0.4)
    np.testing.assert_allclose(result.population.means[0], hs_data[[f"x{i}" for i in range(1, 10)]].mean().to_numpy(),
                               atol=1e-10)
    assert "the items' means are the item means of the rows the earlier fit was fitted to" in " ".join(
        result.summary().split())


def test_an_intercept_written_as_a_shift_is_a_caution_first(fitted, hs_data):
    """New-user trial s27: 'in group east: start intercept(x2) = .4', written for '.4 higher', planned the intercept
    .4 against the fit's mean of x2 (about 6.09), several of the item's standard deviations away, and the report said
    nothing.  A caution now comes first, with the intercept that the shift meant; a plain shift of .4 added to the
    mean (the test above) gets none."""
    from cfa_tool.workflows.group_population import FAR_INTERCEPT_SDS

    result = invariance_power(THREE_FACTORS + "in group east: start intercept(x2) = .4\n", "west=200,east=200",
                              replications=2, seed=5, workers=1, population=fitted)
    (difference,) = result.population.differences
    # the item's SD in the reference population is its implied variance's root: the ML variance of x2 (divisor N),
    # which a saturated mean and covariance reproduce only approximately, so checked against the data to 10%
    sd = float(hs_data["x2"].std(ddof=0))
    assert difference.reference_sd == pytest.approx(sd, rel=0.1)
    assert difference.far() and difference.standard_deviations() > FAR_INTERCEPT_SDS
    text = " ".join(result.summary().replace("\u2502", " ").split())  # the box's sides aside
    mean_x2 = float(hs_data["x2"].mean())
    start = f"Group east's intercept of x2 is 0.40 against {mean_x2:.2f} in west"
    assert start in text and text.index(start) < text.index("Invariance power by simulation")
    assert f"If you meant a shift of 0.40, give the intercept {mean_x2 + .4:.2f}" in text
    near = invariance_power(THREE_FACTORS + f"in group east: start intercept(x2) = {mean_x2 + 0.4}\n",
                            "west=200,east=200", replications=2, seed=5, workers=1, population=fitted)
    assert not near.population.differences[0].far() and "If you meant a shift" not in near.summary()
