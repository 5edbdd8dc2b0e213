"""Sample-size planning for an invariance study (power-simulation --group-sizes, workflows.group_power).

Checked against what the project did not write: the binomial distribution (scipy.stats.binomtest) for the
false-alarm rate of an invariant population, an independent multi-group maximum-likelihood fit of the population
moments (the discrepancy of Jöreskog 1971 / Sörbom 1974 written out here and minimised by scipy.optimize) for the
noncentrality, and scipy.stats.ncx2 for the power it implies (Satorra & Saris 1985)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import ModelError, OptionError
from cfa_tool.workflows.group_power import StepRole, invariance_power

ONE_FACTOR = "factor f: x1, x2, x3, x4\n"
SHIFTED = ONE_FACTOR + "in group south: start intercept(x2) = .15\n"


def test_false_alarm_rate_of_an_invariant_population_is_near_alpha():
    # Groups that share every population value: every step's equalities hold, so the share of replications
    # rejecting a step is the likelihood-ratio test's type I error rate, alpha for large groups (Steiger, Shapiro &
    # Browne 1985).  600 replications give the share a binomial standard error of sqrt(.05 x .95 / 600) = .009, so a
    # rate of .08 or more (an inflation by 60%) would be found with high probability; the exact binomial test
    # (scipy) must not reject alpha at the .001 level.  Fixed seed: the same counts every run.
    result = invariance_power(ONE_FACTOR, "north=300,south=300", replications=600, seed=11, workers=2)
    design = result.designs[0]
    assert design.converged == 600
    assert [s.level for s in design.steps] == ["metric", "scalar"]
    for step in design.steps:
        assert step.role is StepRole.FALSE_ALARM
        assert step.noncentrality == 0.0 and step.approximate_power == pytest.approx(0.05)
        assert stats.binomtest(step.rejected, step.counted, 0.05).pvalue > 0.001, (step.level, step.share)
        assert step.standard_error == pytest.approx(np.sqrt(step.share * (1 - step.share) / 600))


def _independent_discrepancy(sigmas, means, weights, equal_intercepts: bool) -> float:
    """The minimum multi-group ML discrepancy of the one-factor model of four items with equal loadings (marker x1)
    and, when asked, equal intercepts with the second group's factor mean free, fitted to population moments:
    F = sum_g w_g [log|Sigma_g| + tr(S_g Sigma_g^-1) - log|S_g| - p + (m_g - mu_g)' Sigma_g^-1 (m_g - mu_g)]
    (Sörbom 1974), written here without the project's code and minimised by scipy's BFGS."""
    p = 4

    def unpack(x):
        loadings = np.concatenate([[1.0], x[:3]])
        k = 3
        out = []
        nu_shared = x[k:k + p]
        k += p
        for g in range(2):
            phi, theta = np.exp(x[k]), np.exp(x[k + 1:k + 1 + p])
            k += 1 + p
            if equal_intercepts:
                nu, alpha = nu_shared, (0.0 if g == 0 else x[-1])
            else:
                nu, alpha = (nu_shared if g == 0 else x[-p:]), 0.0
            out.append((phi * np.outer(loadings, loadings) + np.diag(theta), nu + loadings * alpha))
        return out

    def f(x):
        total = 0.0
        for (sigma, mu), s, m, w in zip(unpack(x), sigmas, means, weights):
            inv = np.linalg.inv(sigma)
            d = m - mu
            total += w * (np.linalg.slogdet(sigma)[1] + np.trace(s @ inv) - np.linalg.slogdet(s)[1] - p + d @ inv @ d)
        return total

    extra = 1 if equal_intercepts else p
    x0 = np.concatenate([np.ones(3), np.zeros(p), [np.log(0.5), *np.log(np.full(p, 0.5))] * 2, np.zeros(extra)])
    best = optimize.minimize(f, x0, method="BFGS", options={"gtol": 1e-10, "maxiter": 5000})
    return float(best.fun)


def test_noncentrality_and_power_against_an_independent_fit_and_the_noncentral_chi_square():
    # An intercept of x2 higher by .15 in the south (marker units; the loadings 1, the factor variance .49 and the
    # residual variances .51 are the standardized defaults in marker scaling): the metric model reproduces the
    # population (noncentrality 0, false alarm); the scalar one does not.  Its noncentrality is N times the rise
    # in the minimum discrepancy (Satorra & Saris 1985), here from an independent fit of the population moments,
    # and the approximate power is scipy's noncentral chi-square beyond the 95% point of the central one (3 df).
    # At 600 per group the simulated share of 400 replications must agree with it within three Monte Carlo
    # standard errors.
    result = invariance_power(SHIFTED, "north=600,south=600", replications=400, seed=4, workers=2)
    population = result.population
    weights = (0.5, 0.5)
    metric = _independent_discrepancy(population.sigmas, population.means, weights, equal_intercepts=False)
    scalar = _independent_discrepancy(population.sigmas, population.means, weights, equal_intercepts=True)
    assert metric == pytest.approx(0.0, abs=1e-9)
    reference = 1200 * (scalar - metric)
    assert reference > 5  # a difference the check can see
    metric_step, scalar_step = result.designs[0].steps
    assert metric_step.role is StepRole.FALSE_ALARM and scalar_step.role is StepRole.POWER
    assert scalar_step.df == 3 and scalar_step.noncentrality == pytest.approx(reference, rel=1e-4)
    expected = stats.ncx2.sf(stats.chi2.ppf(0.95, 3), 3, reference)
    assert scalar_step.approximate_power == pytest.approx(expected, rel=1e-4)
    assert abs(scalar_step.share - expected) < 3 * np.sqrt(expected * (1 - expected) / 400), scalar_step.share


def test_each_group_population_and_where_the_groups_differ():
    # Marker scaling with the standardized defaults: loadings 1, factor variance .49, residual variances .51 (the
    # README's rule: standardized loadings .7, item variances 1).  The south's factor variance .8 and factor mean .5
    # give it Sigma = .8 11' + .51 I and means .5 (mu = nu + Lambda alpha, Sörbom 1974); every equality of the
    # ladder still holds, so each step reports a false-alarm rate with noncentrality 0.
    model = ONE_FACTOR + "in group south: start variance(f) = .8\nin group south: start mean(f) = .5\n"
    result = invariance_power(model, "north=200,south=300", replications=2, workers=1, highest_level="strict")
    population = result.population
    ones = np.ones((4, 4))
    np.testing.assert_allclose(population.sigmas[0], 0.49 * ones + 0.51 * np.eye(4), atol=1e-6)
    np.testing.assert_allclose(population.sigmas[1], 0.8 * ones + 0.51 * np.eye(4), atol=1e-6)
    np.testing.assert_allclose(population.means[0], 0.0, atol=1e-12)
    np.testing.assert_allclose(population.means[1], 0.5, atol=1e-12)
    assert [(d.kind, d.group, round(d.value, 6), round(d.reference_value, 6)) for d in population.differences] == [
        ("factor_variance", "south", 0.8, 0.49), ("mean", "south", 0.5, 0.0)]
    steps = result.designs[0].steps
    assert [s.level for s in steps] == ["metric", "scalar", "strict"]
    assert all(s.role is StepRole.FALSE_ALARM and s.noncentrality == 0.0 for s in steps)


def test_a_step_after_a_misfitting_step_is_said_to_be_neither():
    # A loading that differs makes the metric model misfit; the scalar step then compares two misfitting models,
    # so its share is neither a power nor a false-alarm rate (the report says so among its cautions).
    model = ONE_FACTOR + "in group south: start loading(f, x3) = .5\n"
    result = invariance_power(model, "north=150,south=150", replications=4, workers=1)
    metric, scalar = result.designs[0].steps
    assert metric.role is StepRole.POWER and metric.noncentrality > 0
    assert scalar.role is StepRole.AFTER_MISFIT
    from cfa_tool.reporting.reports import report_of

    report = report_of(result)
    assert [row[1] for row in report.tables[0].rows] == ["power", "rejection rate after a misfitting step"]
    # the model statement apart (note_parts.Command): the Word file says it in words
    from cfa_tool.note_parts import WORDS, said

    assert ("The model gives no values of its own to north (no 'in group' statement names it): its population is the "
            "shared one.") in [str(line) for line in report.lines]
    assert ("The model gives no values of its own to north: its population is the shared one."
            in [said(line, WORDS) for line in report.lines])
    assert any("neither a power nor a false-alarm rate" in c for c in report.cautions)
    assert report.tables[1].rows[0][:2] == ("loading of x3 on f", "south")
    # review s11: no noncentral approximation after a misfitting step (it does not hold there), and the note says the
    # approximation is a large-sample one (100 replications at 200 per group: .80 simulated against .68)
    assert scalar.approximate_power != scalar.approximate_power  # NaN
    assert "plan by the share rejecting" in " ".join(report.tables[0].note.split())


def test_several_designs_are_sorted_and_seeded_like_the_sample_sizes_of_one_group():
    result = invariance_power(SHIFTED, "north=300/100,south=300/100", replications=20, seed=3, workers=1)
    assert [d.sizes for d in result.designs] == [(100, 100), (300, 300)]
    again = invariance_power(SHIFTED, {"north": [300, 100], "south": [300, 100]}, replications=20, seed=3, workers=1)
    assert [[s.rejected for s in d.steps] for d in again.designs] == [[s.rejected for s in d.steps]
                                                                       for d in result.designs]
    # the noncentrality grows with N at fixed proportions (N times the same discrepancy)
    assert result.designs[1].steps[1].noncentrality == pytest.approx(3 * result.designs[0].steps[1].noncentrality,
                                                                     rel=1e-3)
    payload = result.to_dict()
    assert payload["difference_test"] == "likelihood ratio" and payload["reference_group"] == "north"
    assert payload["designs"][0]["group_sizes"] == {"north": 100, "south": 100}


@pytest.mark.parametrize("model, sizes, words", [
    (SHIFTED, "north=100,east=100", "names group south in 'in group' statements, which --group-sizes does not give"),
    (ONE_FACTOR, "north=100", "needs at least two groups"),
    (ONE_FACTOR, "north=100,north=200", "group north is given twice"),
    (ONE_FACTOR, "north=100/200,south=100", "every group needs as many sizes"),
    (ONE_FACTOR, "north=100,south=many", "the size of group south must be a whole number"),
    (ONE_FACTOR, "north=5,south=100", "the size 5 of group north is too small"),
])
def test_bad_designs_are_one_line_errors(model, sizes, words, tmp_path, capsys):
    path = tmp_path / "plan.cfa"
    path.write_text(model)
    assert main(["power-simulation", str(path), "--group-sizes", sizes, "--replications", "2"]) == 2
    err = capsys.readouterr().err.strip()
    assert words in err and "\n" not in err and "Traceback" not in err


@pytest.mark.parametrize("statement, said", [
    ("ordinal x1\n", "plan.cfa:{line}:9: the model declares 'x1' ordinal"),
    ('answers "no" = 0, "yes" = 1 for x2, x3\n',
     "plan.cfa:{line}:1: the 'answers' statement on line {line} records the answers of 2 items ('x2' first) in 2 "
     "categories")])
def test_answers_in_categories_are_refused_at_their_statement_saying_why_and_what_to_do(statement, said, tmp_path,
                                                                                       capsys):
    # the plan of s22, item 2: the refusal named no line and gave no way to the power of answers in categories
    path = tmp_path / "plan.cfa"
    path.write_text(ONE_FACTOR + statement)
    assert main(["power-simulation", str(path), "--group-sizes", "north=100,south=100", "--replications", "2"]) == 2
    err = capsys.readouterr().err
    line = ONE_FACTOR.count("\n") + 1
    assert f"cfa-tool: {path.parent / said.format(line=line)}" in err and "Traceback" not in err
    assert "planning an invariance study (--group-sizes) does not simulate answers in categories yet" in err
    assert "plan continuous answers from a copy of the model file without the statement" in err
    assert "with the power of one group (without --group-sizes), which simulates and fits answers in categories" in err
    assert err.splitlines()[1].strip() == statement.strip()  # the statement's line shown under the message


WHY_AND_INSTEAD = (
    # why: the ordinal ladder is not simulated, and a continuous plan overstates answers in categories
    "does not simulate answers in categories yet: the ladder of ordinal items (thresholds held equal first; Wu & "
    "Estabrook 2016) is not simulated, and a plan of continuous answers would misstate answers in a few categories, "
    "which carry less information (its power likely too high, its group sizes too small); instead, ",
    # what instead, and how to read it
    " and take the group sizes it finds as the least the study needs, and check that each group's size estimates the "
    "model in the categories with the power of one group (without --group-sizes)")


@pytest.mark.parametrize("statement, extra, instead", [
    ("ordinal x1\n", [], "plan continuous answers from a copy of the model file without the statement (a continuous fit made with it "
     "still gives the population, --population-from)"),
    ('answers "no" = 0, "yes" = 1 for x2, x3\n', [],
     "plan continuous answers from a copy of the model file without the statement (a continuous fit made with it "
     "still gives the population, --population-from)"),
    ("", ["--categories", "4"], "plan continuous answers without --categories"),
    ("", ["--ordinal-estimator", "unweighted"], "plan continuous answers without --ordinal-estimator"),
    ("", ["--population-from", "ORDINAL"], "plan continuous answers from a continuous fit of the items"),
])
def test_every_refusal_of_answers_in_categories_says_why_and_what_to_plan_instead(statement, extra, instead, tmp_path,
                                                                                  capsys):
    # plan s23, item 2: ordinal planning over groups is refused (the ladder of ordinal items is not simulated); each
    # refusal says why, and what to plan instead and how to read it: before, the statements' refusal advised the
    # continuous plan it had just said would misstate the answers, and --categories or an ordinal fit as the
    # population said only that groups simulate continuous answers
    path = tmp_path / "plan.cfa"
    path.write_text(ONE_FACTOR + statement)
    if extra[-1:] == ["ORDINAL"]:
        rng = np.random.default_rng(3)
        factor = rng.normal(size=300)
        rows = pd.DataFrame({x: np.digitize(0.7 * factor + rng.normal(scale=0.7, size=300), [-0.5, 0.5]) + 1
                             for x in ("x1", "x2", "x3", "x4")})
        fitted = cfa_tool.fit(ONE_FACTOR, rows, ordinal="all")
        (tmp_path / "fit.json").write_text(json.dumps(fitted.to_dict()))
        extra = [extra[0], str(tmp_path / "fit.json")]
    assert main(["power-simulation", str(path), "--group-sizes", "north=100,south=100", "--replications", "2",
                 *extra]) == 2
    first = capsys.readouterr().err.splitlines()[0]
    assert WHY_AND_INSTEAD[0] + instead + WHY_AND_INSTEAD[1] in first, first


@pytest.mark.parametrize("extra, words", [
    (["--n", "100"], "--n cannot apply with --group-sizes"),
    (["--categories", "4"], "--categories cannot apply with --group-sizes"),
    (["--ordinal-estimator", "unweighted"], "--ordinal-estimator cannot apply with --group-sizes"),
])
def test_options_that_cannot_apply_with_groups_are_errors(extra, words, tmp_path, capsys):
    path = tmp_path / "plan.cfa"
    path.write_text(ONE_FACTOR)
    assert main(["power-simulation", str(path), "--group-sizes", "a=100,b=100", *extra]) == 2
    assert words in capsys.readouterr().err


def test_one_group_options_and_group_statements_point_to_each_other(tmp_path, capsys):
    path = tmp_path / "plan.cfa"
    path.write_text(SHIFTED)
    assert main(["power-simulation", str(path), "--n", "100"]) == 2
    assert "--group-sizes north=300,south=200" in capsys.readouterr().err
    assert main(["power-simulation", str(path)]) == 2
    assert "give the sample size (--n 300)" in capsys.readouterr().err
    path.write_text(ONE_FACTOR)
    assert main(["power-simulation", str(path), "--n", "100", "--highest-level", "strict"]) == 2
    assert "--highest-level is the last level of the invariance ladder" in capsys.readouterr().err
    with pytest.raises(OptionError, match="highest_level=... must be one of metric, scalar, strict"):
        invariance_power(ONE_FACTOR, "a=100,b=100", replications=2, highest_level="full")
    with pytest.raises(ModelError, match="the invariance ladder sets the equalities"):
        invariance_power(ONE_FACTOR + "invariance metric\n", "a=100,b=100", replications=2)


def test_the_command_writes_its_report_in_the_json(tmp_path, capsys):
    path = tmp_path / "plan.cfa"
    path.write_text(SHIFTED)
    out = tmp_path / "plan.json"
    assert main(["power-simulation", str(path), "--group-sizes", "north=120,south=120", "--replications", "10",
                 "--workers", "1", "--json", str(out)]) == 0
    printed = capsys.readouterr().out
    assert "Invariance power by simulation: north 120, south 120" in printed and "Only 10 replications" in printed
    saved = json.loads(out.read_text())
    assert saved["command"] == "power-simulation"
    assert saved["designs"][0]["steps"][1]["measures"] == "power"
    assert main(["report", str(out)]) == 0
    assert "Rejections of each step of the ladder" in capsys.readouterr().out


def test_a_declared_noninvariant_parameter_is_left_free_at_each_level():
    # 'noninvariant intercept(x2)' exempts the intercept that differs: the partially invariant scalar model
    # reproduces the population (noncentrality 0, a false-alarm rate) and has one equality fewer (2 df, not 3).
    model = SHIFTED + "noninvariant intercept(x2)\n"
    result = invariance_power(model, "north=200,south=200", replications=2, workers=1)
    metric, scalar = result.designs[0].steps
    assert (scalar.role, scalar.df, scalar.noncentrality) == (StepRole.FALSE_ALARM, 2, 0.0)
    assert "The model declares the intercept of x2 not equal across groups" in " ".join(result.summary().split())


def test_a_parameter_set_apart_in_one_group_is_free_there_alone_at_each_level():
    # 'in group south: noninvariant intercept(x2)' with three groups (twentieth session): south's intercept its own,
    # north's and east's held equal: the population is reproduced (noncentrality 0) with one equality fewer than the
    # full scalar step (counted: 2 x 4 equalities of the four intercepts, less the 2 means estimated, is 6 for the full
    # step; 5 with south's x2 apart)
    model = SHIFTED + "in group south: noninvariant intercept(x2)\n"
    result = invariance_power(model, "north=200,east=200,south=200", replications=2, workers=1)
    metric, scalar = result.designs[0].steps
    assert (scalar.role, scalar.df, scalar.noncentrality) == (StepRole.FALSE_ALARM, 5, 0.0)
    assert ("The model sets the intercept of x2 in group south apart ('in group ...: noninvariant')"
            in " ".join(result.summary().split()))


def test_a_value_for_every_group_and_another_for_one_group_plan_the_difference(tmp_path, capsys):
    # README: "a statement without 'in group' gives every group's value, and 'in group south: ...' the value of one
    # group".  Both on the same loading were refused as conflicting start values of a parameter the metric model
    # holds equal across groups: here they are population values, not starting values of the fits.
    model = ("factor f: x1, x2, x3, x4\nstart loading(f, x2) = .7\nstart loading(f, x3) = .7\n"
             "start loading(f, x4) = .7\nin group south: start loading(f, x3) = .45\n")
    result = invariance_power(model, "north=150,south=150", replications=4, workers=1)
    [difference] = result.population.differences
    assert (difference.kind, difference.variables, difference.group) == ("loading", ("f", "x3"), "south")
    assert (difference.value, difference.reference_value) == (pytest.approx(0.45), pytest.approx(0.7))
    metric, scalar = result.designs[0].steps
    assert metric.role is StepRole.POWER and scalar.role is StepRole.AFTER_MISFIT
    # the JSON holds the step after the misfit without an approximation (null), rather than stopping the run on a
    # number JSON cannot hold (an internal error, exit 1)
    path = tmp_path / "plan.cfa"
    path.write_text(model)
    out = tmp_path / "plan.json"
    assert main(["power-simulation", str(path), "--group-sizes", "north=150,south=150", "--replications", "4",
                 "--workers", "1", "--json", str(out)]) == 0
    steps = json.loads(out.read_text())["designs"][0]["steps"]
    assert [s["measures"] for s in steps] == ["power", "rejection rate after a misfitting step"]
    assert steps[1]["approximate_power"] is None and steps[0]["approximate_power"] > 0.05
    assert result.to_dict()["designs"][0]["steps"][1]["approximate_power"] is None
