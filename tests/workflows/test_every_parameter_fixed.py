"""A model whose every parameter is fixed: a population stated in full, or published values tested on new data.

fit tests it (nothing to estimate: the chi-square of the stated covariance matrix), simulate draws from it,
power-simulation refuses it (no free parameter has a test whose power to count) and the group plan refuses an
'in group' 'fix' that makes the groups differ (every fitted model would hold it, so no step tests it).  Before,
each stopped with an internal error (hostile tester s13)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import ModelError, OptionError
from cfa_tool.workflows.group_power import StepRole, invariance_power

POPULATION = """factor f: a1, a2, a3, a4
fix loading(f, a1), loading(f, a2), loading(f, a3), loading(f, a4) = 0.7
fix variance(a1), variance(a2), variance(a3), variance(a4) = 0.51
fix variance(f) = 1
"""


def _answers(n: int = 300) -> pd.DataFrame:
    rng = np.random.default_rng(1)
    f = rng.normal(size=n)
    return pd.DataFrame({f"a{i}": 0.7 * f + rng.normal(0, 0.714, n) for i in range(1, 5)})


def test_fit_of_a_fully_fixed_model_is_the_chi_square_of_the_stated_matrix(capfd):
    # The ML discrepancy of a stated Sigma: F = log|Sigma| + tr(S Sigma^-1) - log|S| - p (Bollen 1989, eq. 4.67),
    # S the covariance matrix with divisor N (the ML estimate), chi-square N F on p(p + 1)/2 df: nothing is estimated.
    data = _answers()
    result = cfa_tool.fit(POPULATION, data)
    sigma = 0.49 * np.ones((4, 4)) + 0.51 * np.eye(4)
    x = data.to_numpy()
    S = np.cov(x, rowvar=False, bias=True)
    p, n = 4, len(x)
    F = (np.linalg.slogdet(sigma)[1] + np.trace(S @ np.linalg.inv(sigma)) - np.linalg.slogdet(S)[1] - p)
    fit = result.to_dict()["fit"]
    assert fit["chi_square"] == pytest.approx(n * F, rel=1e-9)
    assert fit["df"] == p * (p + 1) // 2
    assert result.converged
    # the methods text says what was done: nothing estimated, no standard errors (review s13)
    from cfa_tool.reporting.paragraph import methods_paragraph

    text = " ".join(methods_paragraph(result).split())
    assert ("with every parameter fixed at a stated value was tested against the data by the maximum-likelihood "
            "discrepancy, so nothing was estimated and no standard errors apply") in text
    assert "was estimated by" not in text and "Standardized loadings implied by the stated values" in text
    # LAPACK's complaint about a 0 x 0 matrix ("On entry to DTRTRI ...") never reaches the terminal
    out, err = capfd.readouterr()
    assert "DTRTRI" not in out + err and "illegal value" not in out + err


def test_simulate_draws_from_a_fully_fixed_population():
    frame = cfa_tool.simulate(POPULATION, 20_000, seed=3).frame
    S = np.cov(frame[["a1", "a2", "a3", "a4"]].to_numpy(), rowvar=False)
    # the stated Sigma (unit variances, covariances .49), within sampling error at N = 20,000 (SE about .01)
    assert np.abs(S - (0.49 * np.ones((4, 4)) + 0.51 * np.eye(4))).max() < 0.05


def test_power_of_a_model_with_nothing_free_is_an_error():
    with pytest.raises(OptionError, match="fixes every parameter; give the population values with 'start'"):
        cfa_tool.power_simulation(POPULATION, 100, replications=4, workers=1)


def test_a_group_difference_given_by_fix_is_an_error_at_its_statement():
    # 'fix' stays in every model of the ladder (only 'start' values are population values alone): the scalar step
    # would hold the intercept difference in every model and report a false-alarm rate where the groups differ
    with pytest.raises(ModelError, match=r"'fix' holds intercept\(a2\) in group south at 0.5 \(against 0 in group "
                                         r"north\) in every model the ladder fits, so no step tests") as caught:
        invariance_power(POPULATION + "in group south: fix intercept(a2) = 0.5\n", "north=150,south=150",
                         replications=4, workers=1)
    assert caught.value.location is not None and caught.value.location.line == 5


def test_a_step_that_adds_no_equality_says_so():
    # every loading fixed: the metric step holds nothing more than the configural model (0 df), so its share of
    # rejections measures nothing; the intercept difference given by 'start' is the scalar step's to find
    result = invariance_power(POPULATION + "in group south: start intercept(a2) = 0.5\n", "north=150,south=150",
                              replications=4, workers=1)
    metric, scalar = result.designs[0].steps
    assert metric.df == 0 and metric.role is StepRole.NOT_TESTED
    assert metric.approximate_power != metric.approximate_power  # NaN: no approximation of a test not made
    assert scalar.role is StepRole.POWER and scalar.df == 3
    from cfa_tool.reporting.reports import report_of

    row = report_of(result).tables[0].rows[0]
    assert row[1] == "nothing: the step adds no equality" and row[3] == "" and row[4] == ""


def test_the_bootstrap_of_a_fully_fixed_model_says_there_is_nothing_to_interval():
    # the Bollen-Stine p of the stated values is the bootstrap's one figure; the intervals table was printed empty
    from cfa_tool.reporting.reports import report_of

    boot = cfa_tool.bootstrap(POPULATION, _answers(), replications=60, seed=2, workers=1)
    report = report_of(boot)
    assert not [t for t in report.tables if t.key == "bootstrap_intervals"]
    assert any(line.startswith("The model fixes every parameter, so there are no estimates to give intervals for")
               for line in report.lines)


def test_the_methods_text_of_fully_fixed_groups_says_what_holds_across_them():
    # nothing was estimated, so "the parameters were estimated separately in each group" with "no invariance
    # constraints" was false: every parameter holds its stated value in every group (hostile tester s14)
    from cfa_tool.reporting.paragraph import methods_paragraph

    data = _answers(400).assign(grp=np.where(np.arange(400) < 200, "north", "south"))
    stated = POPULATION + ("fix intercept(a1), intercept(a2), intercept(a3), intercept(a4) = 0\nfix mean(f) = 0\n")
    text = " ".join(methods_paragraph(cfa_tool.fit(stated, data, group="grp")).split())
    assert ("Every parameter was fixed at the same stated value in every group, so the groups were held to one model "
            "(each parameter equal across groups).") in text
    assert "No invariance constraints" not in text and "estimated separately" not in text
    apart = " ".join(methods_paragraph(cfa_tool.fit(stated + "in group south: fix intercept(a2) = 0.3\n", data,
                                                    group="grp")).split())
    assert ("Every parameter was fixed at a stated value in every group, the same value in each group except the "
            "intercept of a2, stated differently for different groups.") in apart


def test_the_sums_of_fully_fixed_groups_are_not_said_to_lack_scalar_invariance():
    """Every loading and intercept stated alike in both groups: the reliability note on the groups' sum means says
    they can be compared under the model, not that it 'does not assume' scalar invariance (re-check s14)."""
    from cfa_tool.reporting.tables import _sums_across_groups

    data = _answers(400).assign(grp=np.where(np.arange(400) < 200, "north", "south"))
    stated = POPULATION + ("fix intercept(a1), intercept(a2), intercept(a3), intercept(a4) = 0\nfix mean(f) = 0\n")
    alike = _sums_across_groups(cfa_tool.fit(stated, data, group="grp"), [])
    assert alike.startswith("The model fixes every item's loading and intercept at the same value in every group")
    apart = _sums_across_groups(cfa_tool.fit(stated + "in group south: fix intercept(a2) = 0.3\n", data, group="grp"),
                                [])
    assert not apart.startswith("The model fixes every item's loading")
