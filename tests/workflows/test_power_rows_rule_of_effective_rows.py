"""power's caution of rows per parameter judges the N asked about as the independent rows it is worth under a planned
cluster sample, N / design effect (Kish 1965's effective sample size, recalled from memory), as the power at that N
is computed (s24b made the power use it; the caution still judged the N as independent rows: N = 200 under a design
effect of 2.5, worth 80 rows for 27 parameters, passed a rule that asks for 135).  The same for the difference
test's plan (power --nested-model).  The rule of 5 rows per free parameter is common practice (Bentler & Chou 1987,
recalled from memory), a convention, not a law."""

from __future__ import annotations

import pytest

from cfa_tool.reporting.reports import report_of
from cfa_tool.resources import resource_dir
from cfa_tool.workflows.power import plan
from cfa_tool.workflows.power_nested import nested_power

# the demo's three correlated factors of four items: 12 variables, 78 moments, 27 free parameters, df = 51
MODEL = resource_dir("models") / "rider_three_factors.cfa"


def test_the_rmsea_plan_judges_the_rows_a_cluster_sample_is_worth():
    independent = plan(51, "close", n_obs=200, variables=12)
    assert independent.below_rows_rule == ()  # 200 rows >= 5 x 27 = 135 (common practice)
    clustered = plan(51, "close", n_obs=200, variables=12, design_effect=2.5)
    assert clustered.effective_n == pytest.approx(80.0)  # 200 / 2.5 (Kish 1965, recalled from memory)
    assert [f.rows for f in clustered.below_rows_rule] == [pytest.approx(80.0)]
    assert clustered.below_rows_rule[0].parameters == 27
    caution = " ".join(str(line) for line in report_of(clustered).notice.lines)
    assert caution.startswith("N = 200 rows of the cluster sample, worth 80 independent rows (N / design effect, "
                              "Kish 1965) is judged by the RMSEA test of close fit alone")
    assert "80 rows for 27 parameters, 2.9 per parameter" in caution
    # what the rule asks for, as independent rows and as rows of the cluster sample: 135 x 2.5 = 337.5, so 338
    assert "135 independent rows, 338 rows of the cluster sample here" in caution
    assert "--n 80,135" in caution  # power-simulation simulates independent rows


def test_the_smallest_n_of_independent_rows_is_named_so():
    # df 51 and the test of close fit need 211 independent rows (MacCallum, Browne & Sugawara 1996; the plan's table)
    # and 60 variables have 1,830 - 51 = 1,779 free parameters: far below 5 per parameter
    result = plan(51, "close", variables=60, design_effect=2.0)
    caution = " ".join(str(line) for line in report_of(result).notice.lines)
    assert caution.startswith(f"N = {result.required_n} independent rows is judged")


def test_the_difference_tests_plan_judges_them_alike():
    from tests.workflows.test_power_nested import ONE_FACTOR as one, two_factors

    two = two_factors(0.6)  # two factors of four items, loadings .7, correlated .6
    plain = nested_power(two, one, n_obs=150)
    clustered = nested_power(two, one, n_obs=150, design_effect=3.0)
    free = plain.population.table.n_free
    assert 150 >= 5 * free > 50  # the rows alone pass the rule, the 50 they are worth do not
    assert all(f.rows != 150 for f in plain.below_rows_rule)
    # (the smallest N of the test, a few dozen independent rows, is below the rule either way)
    assert [f.rows for f in clustered.below_rows_rule][-1] == pytest.approx(50.0)  # 150 / 3 (Kish 1965)
    caution = " ".join(str(line) for line in report_of(clustered).notice.lines)
    assert "N = 150 rows of the cluster sample, worth 50 independent rows (N / design effect, Kish 1965)" in caution


def test_the_rows_a_cluster_sample_is_worth_are_written_and_judged_by_one_rule():
    """fixleft s26: 100 rows under a design effect of 2.37 are worth 42.194 rows (100 / 2.37, Kish 1965), written
    '42.2' in the table and '42.19 rows for 13 parameters' in the caution; 33 rows under 2.357 are worth 14.001,
    judged apart from a smallest N of 14 independent rows, so the caution named '14 rows for 13 parameters' twice.
    One rule: one decimal, as the table writes them, in every view and in the judgement."""
    from tests.workflows.test_power_nested import ONE_FACTOR as one, two_factors

    two = two_factors(0.6)
    result = nested_power(two, one, n_obs=100, design_effect=2.37)
    assert result.effective_n == pytest.approx(100 / 2.37)
    report = report_of(result)
    caution = " ".join(str(line) for line in report.notice.lines)
    shown = dict(report.tables[0].rows)["Independent rows N = 100 is worth (N / design effect, Kish 1965)"]
    assert shown == "42.2" and "worth 42.2 independent rows" in caution and "42.2 rows for " in caution
    assert "42.19" not in caution
    required = nested_power(two, one).required_n  # independent rows: the same under any design effect
    n_obs = 2 * required
    deff = n_obs / (required + 0.01)  # so the N asked about is worth the smallest N and a hundredth
    twice = nested_power(two, one, n_obs=n_obs, design_effect=deff)
    assert twice.required_n == required and round(twice.effective_n, 1) == required
    caution = " ".join(str(line) for line in report_of(twice).notice.lines)
    assert caution.count(f"{required} rows for ") == 1
