"""Planning from a fitted model: the population of simulate and power-simulation taken from an earlier fit,
so that its signs and residual variances carry over (the check values are the fit's own estimates)."""

from __future__ import annotations

import json

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.workflows.montecarlo import monte_carlo_power
from cfa_tool.workflows.simulation import population_from_spec, simulate
from tests.commands.test_cli import run

THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


@pytest.fixture(scope="module")
def fitted(hs_data):
    return cfa_tool.fit(THREE, hs_data)


def test_population_reproduces_the_fit_estimates(fitted):
    spec = cfa_tool.parse_model(THREE)
    for source in (fitted, fitted.to_dict(), json.loads(json.dumps(fitted.to_dict()))):
        population = population_from_spec(spec, source)
        values = {(v["kind"], tuple(v["variables"])): v["value"] for v in population.values()}
        for row in fitted.estimates:
            if row.free:
                assert values[(row.kind, row.variables)] == pytest.approx(row.estimate, abs=1e-10)
        assert np.allclose(population.sigma, fitted.implied_covariance, atol=1e-10)
        assert population.defaulted == ()


def test_power_simulation_and_simulate_use_it(fitted):
    result = monte_carlo_power(THREE, 400, replications=4, seed=3, population=fitted)
    truth = {p.label: p.population for p in result.parameters}
    row = next(r for r in fitted.estimates if r.kind == "loading" and r.variables == ("visual", "x2"))
    assert truth["loading(visual, x2)"] == pytest.approx(row.estimate, abs=1e-10)
    assert result.defaulted == ()
    data = simulate(THREE, 200_000, seed=2, population=fitted).frame
    # the simulated covariance approaches the fitted implied covariance (Monte Carlo error at N = 200,000)
    assert np.abs(np.cov(data.to_numpy().T, bias=True) - fitted.implied_covariance).max() < 0.05


def test_a_different_model_or_an_impossible_fit_is_refused(fitted, hs_data):
    with pytest.raises(OptionError, match="fixes it at 1"):
        population_from_spec(cfa_tool.parse_model("scale latent by variance\n" + THREE), fitted)
    with pytest.raises(OptionError, match="no estimate of the loading of x4 on visual"):
        population_from_spec(cfa_tool.parse_model(THREE.replace("x1, x2, x3", "x1, x2, x3, x4")), fitted)
    heywood = cfa_tool.fit(THREE + "covary x7, x8\ncovary x8, x9\n", hs_data)
    with pytest.raises(OptionError, match="not admissible"):
        population_from_spec(cfa_tool.parse_model(THREE + "covary x7, x8\ncovary x8, x9\n"), heywood)


def simulated_from_fit(tmp_path, model_text: str, fitted, n: int = 50):
    """``simulate --population-from`` run on the JSON of ``fitted``: the model file, the JSON file, the CSV written
    and the population the report's JSON lists (every value checked to come from the fit, none a default)."""
    model = tmp_path / "m.cfa"
    model.write_text(model_text)
    result = tmp_path / "fit.json"
    result.write_text(json.dumps(fitted.to_dict()))
    out = tmp_path / "sim.csv"
    proc = run("simulate", str(model), "--n", str(n), "--output", str(out), "--population-from", str(result),
               "--json", str(tmp_path / "pop.json"))
    assert proc.returncode == 0, proc.stderr
    population = json.loads((tmp_path / "pop.json").read_text())["population"]
    assert not any(v["default"] for v in population)
    return model, result, out, population


def test_command_line(tmp_path, fitted):
    model, result, out, _ = simulated_from_fit(tmp_path, THREE, fitted)
    bad = tmp_path / "bad.json"
    bad.write_text("{not json")
    proc = run("simulate", str(model), "--n", "50", "--output", str(tmp_path / "sim2.csv"), "--population-from", str(bad))
    assert proc.returncode == 2 and "bad.json' is not JSON (line 1" in proc.stderr
    proc = run("simulate", str(model), "--n", "50", "--output", str(result), "--population-from", str(result))
    assert proc.returncode == 2 and json.loads(result.read_text())["estimates"]  # the input is never replaced


def test_rows_of_data_never_replace_an_existing_file(tmp_path, hs_data):
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data, index=False)
    before = data.read_bytes()
    model = tmp_path / "m.cfa"
    model.write_text(THREE)
    other = tmp_path / "someone_elses.csv"
    other.write_text("a,b\n1,2\n")
    for args in (["simulate", str(model), "--n", "20", "--output", str(other)],
                 ["scores", str(model), "--data", str(data), "--output", str(other)]):
        proc = run(*args)
        assert proc.returncode == 2 and "exists, and this output never replaces a file" in proc.stderr, args
        assert other.read_text() == "a,b\n1,2\n"
    assert data.read_bytes() == before


def test_a_fit_with_gaps_serves_as_a_population(hs_data):
    """Full-information ML estimates intercepts as well: they are the population's item means (factor means 0 in
    one group, so each item's mean is its intercept, the fit's own estimate)."""
    from cfa_tool.workflows.simulation import ItemMeans

    holed = hs_data.copy()
    rng = np.random.default_rng(2)
    for item in [f"x{i}" for i in range(1, 10)]:
        holed.loc[rng.random(len(holed)) < 0.05, item] = np.nan
    fitted = cfa_tool.fit(THREE, holed)
    population = population_from_spec(cfa_tool.parse_model(THREE), fitted)
    assert np.allclose(population.sigma, fitted.implied_covariance, atol=1e-10)
    intercepts = {r.variables[0]: r.estimate for r in fitted.estimates if r.kind == "intercept"}
    assert population.means_from is ItemMeans.INTERCEPTS
    np.testing.assert_allclose(population.means, [intercepts[x] for x in population.observed], atol=1e-12)


def test_simulated_items_keep_the_fitted_means(tmp_path, fitted, hs_data):
    """A fit without intercepts (complete rows, one group) has the item means of its rows as the maximum-likelihood
    means; the simulated items approach them (the pupils' means computed by pandas; Monte Carlo error at N =
    200,000 about sd / 450 < .01), and the report and its population table say where they come from."""
    from cfa_tool.workflows.simulation import ItemMeans

    data = simulate(THREE, 200_000, seed=5, population=fitted)
    assert data.population.means_from is ItemMeans.SAMPLE_MEANS
    items = [f"x{i}" for i in range(1, 10)]
    np.testing.assert_allclose(data.frame[items].mean().to_numpy(), hs_data[items].mean().to_numpy(), atol=0.02)
    _, _, out, population = simulated_from_fit(tmp_path, THREE, fitted, n=20)
    listed = {v["variables"][0]: v["value"] for v in population if v["kind"] == "item_mean"}
    np.testing.assert_allclose([listed[x] for x in items], hs_data[items].mean().to_numpy(), atol=1e-9)
    proc = run("report", str(tmp_path / "pop.json"))
    assert "item means of the rows the earlier fit was fitted to" in " ".join(proc.stdout.split())


def test_a_fit_without_means_simulates_centred_items_and_says_so(tmp_path, hs_data):
    from cfa_tool.workflows.simulation import ItemMeans

    x = hs_data[[f"x{i}" for i in range(1, 10)]]
    fitted = cfa_tool.fit(THREE, covariance=x.cov(), n_obs=len(x))
    data = simulate(THREE, 50, population=fitted)
    assert data.population.means is None and data.population.means_from is ItemMeans.UNKNOWN
    assert "not known to the earlier fit" in " ".join(data.summary().split())


def test_row_names_are_kept_as_written(tmp_path):
    from cfa_tool.data.readers import read_table

    path = tmp_path / "named.csv"
    path.write_text(",x1,x2\n0007,1,2\n0010,2,3\n")
    names: list = []
    read_table(path, [], names)
    assert names[0].tolist() == ["0007", "0010"]


def test_an_edited_fit_with_an_impossible_estimate_is_one_line(tmp_path, fitted):
    # found in a hostile trial: a fit JSON edited to hold a loading of 1e308 stopped simulate with an internal error
    payload = fitted.to_dict()
    loading = next(e for e in payload["estimates"] if e["kind"] == "loading" and e["free"])
    loading["estimate"] = 1e308
    (tmp_path / "huge.json").write_text(json.dumps(payload))
    (tmp_path / "m.cfa").write_text(THREE)
    proc = run("simulate", str(tmp_path / "m.cfa"), "--n", "20", "--output", str(tmp_path / "rows.csv"),
               "--population-from", str(tmp_path / "huge.json"))
    assert proc.returncode == 2 and "internal error" not in proc.stderr
    assert "not positive definite or not finite" in proc.stderr and not (tmp_path / "rows.csv").exists()


def test_what_the_earlier_fit_had_and_the_simulation_has_not_is_said(tmp_path, hs_data):
    # new-user trial: a weighted fit with gaps served as the population of power-simulation, which drew independent,
    # equally weighted, complete rows without a word; 20 replications gave coverage and bias without a caution
    data = hs_data.assign(w=1.0 + (np.arange(len(hs_data)) % 3))
    data.loc[data.index[:30], "x5"] = np.nan
    weighted = cfa_tool.fit(THREE, data, weights="w")
    (tmp_path / "fit.json").write_text(json.dumps(weighted.to_dict()))
    (tmp_path / "m.cfa").write_text(THREE)
    proc = run("power-simulation", str(tmp_path / "m.cfa"), "--n", "200", "--replications", "20", "--workers", "1",
               "--population-from", str(tmp_path / "fit.json"))
    assert proc.returncode == 0, proc.stderr
    said = " ".join(proc.stdout.split())
    assert "The earlier fit's sampling design and pattern of missing answers are not carried over" in said
    assert "Only 20 replications: a power near .80 has a Monte Carlo standard error of about .09" in said  # as the share
    plain = tmp_path / "plain.json"
    plain.write_text(json.dumps(cfa_tool.fit(THREE, hs_data).to_dict()))
    said = " ".join(run("power-simulation", str(tmp_path / "m.cfa"), "--n", "200", "--replications", "100",
                        "--workers", "1", "--population-from", str(plain)).stdout.split())
    assert "not carried over" not in said and "Only 100 replications" not in said
    # simulate draws the same rows but reports no power: its report says so without a word on power (new-user trial s8)
    proc = run("simulate", str(tmp_path / "m.cfa"), "--n", "50", "--output", str(tmp_path / "rows.csv"),
               "--population-from", str(tmp_path / "fit.json"))
    assert proc.returncode == 0, proc.stderr
    said = " ".join(proc.stdout.split())
    assert "not carried over: every simulated row is independent, equally weighted and complete (--missing" in said
    assert "power" not in said


def test_categories_with_a_continuous_fit_are_named_as_such(tmp_path):
    # hostile trial 7, H8: power-simulation --population-from a continuous fit with --categories advised to 'change
    # the 'start' values' (there are none); simulate labelled the thresholds of equally likely categories as the
    # earlier fit's. Invented data: three items of one factor on their own scales (variances far from 1).
    rng = np.random.default_rng(9)
    trait = rng.normal(size=400)
    data = {f"a{j}": 3 + j * (0.8 * trait + 0.6 * rng.normal(size=400)) for j in (1, 2, 3, 4)}
    import pandas as pd

    fitted = cfa_tool.fit("factor f: a1..a4\n", pd.DataFrame(data))
    # new-user trial s21: the refusal that stood here advised leaving out --categories, which the model's 'answers'
    # statement refused in turn; the continuous fit's values are now put on the latent responses' scale (variance 1):
    # each loading lambda_j sqrt(psi) / sd_j with the factor's variance 1 once rescaled by the marker's, i.e. the
    # fit's standardized solution by its formula (Bollen 1989, ch. 7), computed here from the raw estimates
    power = monte_carlo_power("factor f: a1..a4\n", 100, replications=2, workers=1, population=fitted, categories=4)
    raw = {(r.kind, r.variables): r.estimate for r in fitted.estimates}
    sd = np.sqrt(np.diag(fitted.implied_covariance))
    psi = raw[("factor_variance", ("f",))]
    standardized = [raw[("loading", ("f", f"a{j}"))] * np.sqrt(psi) / sd[j - 1] for j in (1, 2, 3, 4)]
    values = {(v["kind"], tuple(v["variables"])): v["value"] for v in power.population.values()}
    for j in (2, 3, 4):  # the marker a1 keeps loading 1; the others are relative to it on the standardized scale
        assert values[("loading", ("f", f"a{j}"))] == pytest.approx(standardized[j - 1] / standardized[0], abs=1e-5)
    assert values[("factor_variance", ("f",))] == pytest.approx(standardized[0] ** 2, abs=1e-5)
    assert np.allclose(np.diag(power.population.sigma), 1.0, atol=1e-8)
    text = " ".join(power.summary().split())
    assert ("Every value is an estimate of the earlier fit in the fit result given, rescaled so that every item's "
            "latent response has variance 1") in text
    simulated = simulate("factor f: a1..a4\n", 50, seed=3, categories=4, population=fitted)
    sources = {v["kind"]: v["from"] for v in simulated.population.values()}
    assert sources["threshold"] == "default" and sources["loading"] == "earlier fit"
    text = " ".join(simulated.summary().split())
    # the option named for the interface that reads the report (a Python caller was told a flag)
    assert "but the thresholds, which cut equally likely categories (as many as categories=... or the 'answers' statement gives)" in text
    from cfa_tool.options import on_command_line

    with on_command_line():
        said = " ".join(simulated.summary().split())
    assert "(as many as --categories or the 'answers' statement gives)" in said
    assert "default = the thresholds of equally likely categories" in text
