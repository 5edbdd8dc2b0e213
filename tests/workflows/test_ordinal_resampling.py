"""Ordinal items in simulate, power-simulation, bootstrap and cutoffs.

Check values: the normal distribution function (scipy.stats.norm) for the answer proportions that thresholds
imply; the population correlations for the polychoric correlations of simulated answers; the fit's robust
(sandwich) standard errors, an asymptotic formula (Muthén 1984; Satorra & Bentler 1994), for the bootstrap's
standard errors; the nominal level of a test for the rejection rate of the adjusted test under a true model;
the earlier fit's own estimates for a population taken from its JSON (issue 19)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.errors import OptionError
from cfa_tool.workflows.bootstrap import bootstrap
from cfa_tool.workflows.cutoffs import cutoffs
from cfa_tool.workflows.montecarlo import PowerCurve, monte_carlo_power
from cfa_tool.workflows.simulation import population_from_spec, simulate
from tests.commands.test_cli import run
from tests.workflows.test_population_from_fit import simulated_from_fit

TWO = "factor f: y1, y2, y3\nfactor g: y4, y5, y6\nordinal y1..y6\n"
ONE = "factor f: y1, y2, y3, y4\nordinal y1..y4\n"


@pytest.fixture(scope="module")
def ordinal_fit():
    data = simulate(TWO, 600, seed=11, categories=4).frame
    return cfa_tool.fit(TWO, data)


def test_a_population_from_an_ordinal_fit_reproduces_its_estimates_and_thresholds(ordinal_fit):
    # issue 19: the population taken from a fit's JSON has that fit's estimates as population values, to 1e-10
    spec = cfa_tool.parse_model(TWO)
    for source in (ordinal_fit, json.loads(json.dumps(ordinal_fit.to_dict()))):
        population = population_from_spec(spec, source)
        values = {(v["kind"], tuple(v["variables"])): v["value"] for v in population.values()}
        compared = 0
        for row in ordinal_fit.estimates:
            if row.free:  # loadings, factor (co)variances and every threshold
                assert values[(row.kind, row.variables)] == pytest.approx(row.estimate, abs=1e-10), row
                compared += 1
        assert compared == sum(r.free for r in ordinal_fit.estimates) and population.ordinal_items == spec.observed_names
        # the latent responses have unit variance: the fit's implied correlations are the population's
        assert np.allclose(population.sigma, ordinal_fit.implied_covariance, atol=1e-10)


def test_simulated_answers_follow_the_thresholds_and_the_population_correlations(ordinal_fit):
    population = population_from_spec(cfa_tool.parse_model(TWO), ordinal_fit)
    frame = simulate(TWO, 200_000, seed=5, population=ordinal_fit).frame
    for item in population.observed:
        tau = population.thresholds[item]
        # P(answer = c) = Phi(tau_c) - Phi(tau_(c-1)) (scipy.stats.norm); binomial SE at N = 200,000 is below .0012,
        # so .005 is more than four standard errors
        expected = np.diff(np.concatenate([[0.0], stats.norm.cdf(tau), [1.0]]))
        observed = frame[item].value_counts(normalize=True).sort_index().to_numpy()
        assert np.abs(observed - expected).max() < 0.005, item
    # polychoric correlations of 20,000 simulated rows against the population's (SE about .007; .03 is over 4 SE)
    moments = ordinal_moments(frame.iloc[:20_000].astype(float), population.observed, "<simulated>")
    assert np.abs(moments.correlations - population.sigma).max() < 0.03


def test_categories_give_equally_likely_answers_and_clash_with_a_fitted_population(ordinal_fit):
    frame = simulate(ONE, 100_000, seed=3, categories=5).frame
    shares = frame["y2"].value_counts(normalize=True).sort_index().to_numpy()
    assert np.abs(shares - 0.2).max() < 0.005  # five equally likely categories (binomial SE .0013)
    with pytest.raises(OptionError, match="the categories come from the thresholds of the earlier fit"):
        simulate(TWO, 100, categories=4, population=ordinal_fit)
    plain = TWO.replace("ordinal y1..y6\n", "")
    continuous = cfa_tool.fit(plain, simulate(plain, 300, seed=2).frame)
    with pytest.raises(OptionError, match="give the number of categories"):  # a continuous fit has no thresholds
        simulate(TWO, 100, population=continuous)
    assert simulate(TWO, 100, categories=3, population=continuous).frame["y1"].max() <= 3


def test_bootstrap_standard_errors_agree_with_the_sandwich_ones():
    data = simulate(ONE, 2000, seed=21, categories=4).frame
    boot = bootstrap(ONE, data, replications=200, seed=4, workers=1)
    assert boot.converged + boot.failed + (boot.replications - boot.converged - boot.failed) == 200
    assert boot.converged >= 195 and boot.bollen_stine_p is None
    se_of = {(r.kind, r.variables): r.se for r in boot.fit.estimates if r.free}
    checked = 0
    for interval in boot.intervals:
        if interval.scale != "unstandardized":
            continue
        # the bootstrap SD of 200 resamples has a relative Monte Carlo error of about 1 / sqrt(2 * 199) = 5%; the
        # sandwich is asymptotic (N = 2,000): 25% is five of those errors
        assert interval.bootstrap_se == pytest.approx(se_of[(interval.kind, interval.variables)], rel=0.25), interval
        assert interval.percentile[0] < interval.estimate < interval.percentile[1]
        checked += 1
    kinds = {i.kind for i in boot.intervals}
    assert checked >= 3 + 1 + 12 and {"loading", "factor_variance", "threshold"} <= kinds
    # same seed, same draws: two runs of 30 resamples (a resample drawn differently moves the percentiles of a run
    # of 30 as surely as of one of 200, at less than a sixth of the cost of repeating the 200)
    runs = [bootstrap(ONE, data, replications=30, seed=4, workers=1) for _ in range(2)]
    assert [i.percentile for i in runs[0].intervals] == [i.percentile for i in runs[1].intervals]


def test_bootstrap_refuses_what_cannot_apply_to_ordinal_items():
    data = simulate(ONE, 200, seed=2, categories=3).frame
    with pytest.raises(OptionError, match="Bollen-Stine"):
        bootstrap(ONE, data, replications=10, bollen_stine=True, workers=1)
    # BCa intervals asked for are refused, never dropped silently (advice round s17); by default (where they apply)
    # the percentile intervals alone, which the report says (reporting.workflow_tables.ORDINAL_BOOTSTRAP)
    with pytest.raises(OptionError, match="BCa intervals .* cannot be given here; leave out bca=True"):
        bootstrap(ONE, data, replications=10, bca=True, workers=1)
    by_default = bootstrap(ONE, data, replications=10, seed=2, workers=1)
    assert by_default.intervals and all(np.isnan(i.bca).all() for i in by_default.intervals)
    assert "Only the parameters are bootstrapped, by percentile intervals" in str(by_default)
    data["site"] = np.arange(len(data)) % 20
    with pytest.raises(OptionError, match="the bootstrap of ordinal items does not take a sampling design yet"):
        bootstrap(ONE, data, replications=10, cluster="site", workers=1)


def test_cutoffs_from_a_true_model_reject_it_at_about_the_nominal_rate():
    data = simulate(TWO, 400, seed=8, categories=4).frame
    cut = cutoffs(TWO, data, replications=100, seed=3, workers=1)
    assert cut.statistic.startswith("scale-shifted")
    assert cut.converged_correct >= 95
    # nominal .05: with 100 samples the binomial SE is .022; at most .12 is three SEs above it
    assert 0.0 <= cut.correct_rejected <= 0.12
    by_index = {(c.index, c.level): c for c in cut.cutoffs}
    assert by_index[("cfi", 0.95)].observed == pytest.approx(cut.fit.robust.cfi_robust)  # the adjusted CFI the fit reports
    assert by_index[("srmr", 0.95)].observed == pytest.approx(cut.fit.fit.srmr)
    text = cut.summary()
    assert "scale-shifted" in text and "nominal 5%" in text


def test_power_simulation_with_categories_and_by_sample_size():
    result = monte_carlo_power(TWO, 400, replications=40, seed=2, categories=4, workers=1)
    assert result.ordinal == "diagonally weighted least squares" and result.converged >= 38
    labels = {p.label for p in result.parameters}
    assert "loading(f, y2)" in labels and not any(label.startswith("variance(y") for label in labels)
    for p in result.parameters:  # the mean estimate lies within 4 Monte Carlo SEs of the population value
        assert abs(p.mean_estimate - p.population) < 4 * p.sd_estimate / np.sqrt(result.converged) + 1e-9, p
    # defaults: standardized loadings .7 and factor correlation .3 (simulation.py), so every loading differs from 0
    assert all(p.power > 0.9 for p in result.parameters if p.label.startswith("loading"))
    assert 0.0 <= result.model_rejected <= 0.2  # 40 replications: nominal .05 plus over three binomial SEs
    curve = monte_carlo_power(TWO, "150,300", replications=6, seed=2, categories=3, ordinal_estimator="unweighted",
                              workers=1)
    assert isinstance(curve, PowerCurve) and curve.results[0].ordinal == "unweighted least squares"
    assert curve.to_dict()["model_test_rejection_rate"] is not None


def test_power_simulation_from_an_ordinal_fit(ordinal_fit):
    result = monte_carlo_power(TWO, 300, replications=4, seed=3, population=ordinal_fit, workers=1)
    truth = {p.label: p.population for p in result.parameters}
    row = next(r for r in ordinal_fit.estimates if r.kind == "loading" and r.variables == ("f", "y2"))
    assert truth["loading(f, y2)"] == pytest.approx(row.estimate, abs=1e-10)


def test_command_line(tmp_path, ordinal_fit):
    model, fitted, out, population = simulated_from_fit(tmp_path, TWO, ordinal_fit, 300)
    assert any(v["kind"] == "threshold" for v in population)
    assert set(pd.read_csv(out)["y1"].unique()) <= {1, 2, 3, 4}
    proc = run("simulate", str(model), "--n", "50", "--output", str(tmp_path / "x.csv"), "--population-from",
               str(fitted), "--categories", "3")
    assert proc.returncode == 2 and "the categories come from the thresholds" in proc.stderr
    proc = run("bootstrap", str(model), "--data", str(out), "--replications", "12", "--workers", "1",
               "--json", str(tmp_path / "boot.json"))
    assert proc.returncode == 0, proc.stderr
    written = json.loads((tmp_path / "boot.json").read_text())
    assert written["result"]["bollen_stine_p_value"] is None
    assert any(i["kind"] == "threshold" for i in written["result"]["intervals"])
    proc = run("power-simulation", str(model), "--n", "200", "--replications", "3", "--categories", "3",
               "--workers", "1", "--json", str(tmp_path / "power.json"))
    assert proc.returncode == 0, proc.stderr
    assert json.loads((tmp_path / "power.json").read_text())["ordinal_items_fitted_by"] == "diagonally weighted least squares"


def test_a_refit_that_cannot_start_is_not_counted_as_answers_that_could_not_be_analysed(monkeypatch):
    # robust-s20: a sample whose answers were analysed but whose fit could not start (ImpossibleAtStart: a fixed
    # covariance beyond the variances the sample's start gives) was counted with the samples whose answers could not
    # be analysed, which the bootstrap's report explains as "an item lost an answer category, or the correlations
    # were not positive definite"; it is counted with the fits that did not converge, as the shared refit of
    # continuous items counts a start it cannot make (model.parameters.ImpossibleAtStart).  The start failure is
    # raised here by the refit's fit of the moments, after the sample's moments were made from its answers.
    import cfa_tool.workflows.ordinal_resampling as resampling
    from cfa_tool.method import Weighting
    from cfa_tool.model.parameters import ImpossibleAtStart

    data = simulate(TWO, 600, seed=11, categories=4).frame
    names = tuple(f"y{i}" for i in range(1, 7))
    rows = data[list(names)].to_numpy(float)
    fitting = resampling.OrdinalFitting(cfa_tool.parse_model(TWO), names, frozenset(), Weighting.DIAGONAL)
    key = (("loading", ("f", "y2")),)
    assert resampling.resample((fitting, rows, 1, key)).outcome is resampling.Outcome.CONVERGED
    made = []

    def cannot_start(spec, moments, options, weighting):
        made.append(moments)
        raise ImpossibleAtStart("the model cannot hold a covariance larger than the variances allow")

    monkeypatch.setattr(resampling, "fit_ordinal", cannot_start)
    assert resampling.resample((fitting, rows, 1, key)).outcome is resampling.Outcome.NOT_CONVERGED
    assert len(made) == 1  # the answers were analysed: their thresholds and correlations made
    # an item left with one answer in a sample: its answers cannot be analysed (counted so, as before)
    one_answer = rows.copy()
    one_answer[:, 0] = 1.0
    assert resampling.resample((fitting, one_answer, 1, key)).outcome is resampling.Outcome.FAILED
    assert len(made) == 1
