"""Sample-size planning, simulation, Monte Carlo power, the bootstrap and model-specific cutoffs."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.language import parse_model
from cfa_tool.workflows.montecarlo import monte_carlo_power
from cfa_tool.workflows.power import required_sample_size, rmsea_power
from cfa_tool.workflows.simulation import population_from_spec, simulate
from tests.commands.test_cli import run
from tests.conftest import THREE_FACTORS

# MacCallum, Browne & Sugawara (1996), Table 4: minimum N for power .80 at alpha .05, tests of
# close fit (.05 vs .08) and not-close fit (.05 vs .01), by df.  Recalled from memory; our exact
# noncentral chi-square computation differs from the printed values by at most 0.7% (the original
# used its own numerical routines).
MBS_TABLE_4 = {2: (3488, 2382), 4: (1807, 1426), 6: (1238, 1069), 8: (954, 875), 10: (782, 750), 20: (435, 474),
               30: (314, 366), 40: (252, 307), 50: (214, 268), 75: (161, 210), 100: (132, 178)}


@pytest.mark.parametrize("df", sorted(MBS_TABLE_4))
def test_required_sample_sizes_match_the_published_table(df):
    close, not_close = MBS_TABLE_4[df]
    assert required_sample_size(df, 0.05, 0.08) == pytest.approx(close, rel=0.007)
    assert required_sample_size(df, 0.05, 0.01) == pytest.approx(not_close, rel=0.007)


def test_power_rises_with_n_and_the_required_n_reaches_the_target():
    assert rmsea_power(40, 100, 0.05, 0.08) < rmsea_power(40, 200, 0.05, 0.08) < rmsea_power(40, 400, 0.05, 0.08)
    n = required_sample_size(40, 0.0, 0.05)
    assert rmsea_power(40, n, 0.0, 0.05) >= 0.80 > rmsea_power(40, n - 1, 0.0, 0.05)


POPULATION = """
factor f: y1, y2, y3, y4
factor g: y5, y6, y7, y8
start loading(f, y2), loading(f, y3), loading(g, y6) = 0.8
start covariance(f, g) = 0.15
"""


def test_simulation_recovers_population_values():
    spec = parse_model(POPULATION)
    population = population_from_spec(spec)
    data = simulate(spec, 20000, seed=4).frame
    result = cfa_tool.fit(spec, data)
    assert "loading(g, y7)" in population.defaulted and "loading(f, y2)" not in population.defaulted
    got = {r.variables: r.estimate for r in result.estimates if r.kind in ("loading", "factor_covariance")}
    assert got[("f", "y2")] == pytest.approx(0.8, abs=0.03)
    # a default: standardized loading .7 like its marker's, so 1 in the marker's units
    assert got[("g", "y7")] == pytest.approx(1.0, abs=0.04)
    standardized = {r.variables: r.standardized for r in result.estimates if r.kind == "loading"}
    assert standardized[("g", "y7")] == pytest.approx(0.7, abs=0.02)
    assert got[("f", "g")] == pytest.approx(0.15, abs=0.03)
    variances = data.var(ddof=0)
    assert np.allclose(variances[["y4", "y7", "y8"]], 1.0, atol=0.05)  # defaults give unit item variances


@pytest.mark.parametrize("scaling", ["", "scale latent by variance\n", "scale latent by effects\n"])
def test_default_population_is_standardized_whatever_the_scaling(scaling):
    """Defaults are defined on the standardized metric (loadings .7, correlations .3, item variances
    1) and converted to the model's scaling: refitting 20,000 simulated rows recovers them."""
    text = "factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\nfactor c: y9, y10, y11, y12\n" + scaling
    data = simulate(parse_model(text), 20_000, seed=7).frame
    result = cfa_tool.fit(text, data)
    loadings = [r.standardized for r in result.estimates if r.kind == "loading"]
    assert len(loadings) == 12 and all(abs(v - 0.7) < 0.02 for v in loadings)
    correlations = [r.standardized for r in result.estimates if r.kind == "factor_covariance"]
    assert all(abs(v - 0.3) < 0.03 for v in correlations)
    assert np.allclose(data.var(ddof=0), 1.0, atol=0.04)


def test_reverse_keyed_items_take_negative_default_loadings():
    # a is reverse-keyed, so the marker of f is b, the first item worded with the trait, and f points the
    # trait's way: a and c load negatively on it, d positively; h is reversed in g, whose marker e is not
    # (signs by construction of the defaults)
    spec = parse_model("factor f: a, b, c, d\nfactor g: e, h, i\nreversed a, c, h on 1 to 5\n")
    theta = dict(zip(*[(population := population_from_spec(spec)).table.free_labels, population.theta]))
    # standardized defaults of -.7 for reverse-keyed items, .7 for the rest, in the markers' units: +-1
    loadings = {k: round(v, 8) for k, v in theta.items() if k.startswith("loading")}
    assert loadings == {"loading(f, a)": -1.0, "loading(f, c)": -1.0, "loading(f, d)": 1.0, "loading(g, h)": -1.0,
                        "loading(g, i)": 1.0}
    standardized = {(v["variables"][0], v["variables"][1]): v["standardized"] for v in population.values()
                    if v["kind"] == "loading"}
    assert standardized[("f", "a")] == pytest.approx(-0.7) and standardized[("g", "h")] == pytest.approx(-0.7)


def test_simulated_ordinal_and_missing_data():
    data = simulate(parse_model(POPULATION), 3000, seed=5, categories=5, missing=0.1).frame
    assert all(str(t) == "Int64" for t in data.dtypes)  # whole-number answers, written as 4, not 4.0
    values = data.to_numpy(dtype=float, na_value=np.nan)
    assert set(np.unique(values[~np.isnan(values)])) == {1.0, 2.0, 3.0, 4.0, 5.0}
    assert np.isnan(values).mean() == pytest.approx(0.1, abs=0.01)
    counts = data["y1"].value_counts(normalize=True)
    assert np.allclose(counts.to_numpy(), 0.2, atol=0.03)  # equally likely categories by construction


def test_monte_carlo_power_agrees_with_the_analytic_value():
    # For the factor covariance, power of the Wald z test is about Phi(|cov| / SE - 1.96), with SE from
    # the expected information at the population values ((2/N) H^-1; Satorra & Saris 1985 style).
    from scipy import stats

    from cfa_tool.estimation.ml import GroupMoments, NormalLikelihood
    from cfa_tool.model.implied import StructuredModel

    # a factor correlation of .15; with factor variances 1 the markers' items (loading 1) have no variance left for
    # a residual within the default item variance 1, so theirs are given (the value the default once took silently)
    spec = parse_model(POPULATION + "start variance(f), variance(g) = 1\nstart variance(y1), variance(y5) = 0.1\n")
    population = population_from_spec(spec)
    n = 150
    model = StructuredModel(population.table)
    likelihood = NormalLikelihood(model, [GroupMoments(population.sigma, np.zeros(8), n)])
    info = likelihood.evaluate(population.theta).information
    k = population.table.free_labels.index("covariance(f, g)")
    se = np.sqrt(2 / n * np.linalg.inv(info)[k, k])
    analytic = stats.norm.cdf(0.15 / se - 1.96) + stats.norm.cdf(-0.15 / se - 1.96)
    result = monte_carlo_power(spec, n, replications=300, seed=2, workers=1)
    row = [p for p in result.parameters if p.label == "covariance(f, g)"][0]
    mc_error = np.sqrt(analytic * (1 - analytic) / result.converged)
    assert abs(row.power - analytic) < 3.5 * mc_error
    assert result.converged >= 295
    assert abs(row.relative_bias) < 0.1 and 0.9 < row.coverage < 0.99


def test_power_by_sample_size_agrees_with_the_analytic_values():
    # the same analytic power as above (Phi(|cov| / SE - 1.96) + Phi(-|cov| / SE - 1.96), SE from the expected
    # information at the population values; Satorra & Saris 1985 style) at each sample size of a curve
    from scipy import stats

    from cfa_tool.estimation.ml import GroupMoments, NormalLikelihood
    from cfa_tool.model.implied import StructuredModel
    from cfa_tool.workflows.montecarlo import PowerCurve

    spec = parse_model(POPULATION + "start variance(f), variance(g) = 1\nstart variance(y1), variance(y5) = 0.1\n")
    population = population_from_spec(spec)
    model = StructuredModel(population.table)
    k = population.table.free_labels.index("covariance(f, g)")
    curve = monte_carlo_power(spec, "100,300", replications=200, seed=4, workers=1)
    assert isinstance(curve, PowerCurve) and curve.sample_sizes == (100, 300)
    for result in curve.results:
        n = result.n_obs
        info = NormalLikelihood(model, [GroupMoments(population.sigma, np.zeros(8), n)]).evaluate(population.theta).information
        se = np.sqrt(2 / n * np.linalg.inv(info)[k, k])
        analytic = stats.norm.cdf(0.15 / se - 1.96) + stats.norm.cdf(-0.15 / se - 1.96)
        row = [p for p in result.parameters if p.label == "covariance(f, g)"][0]
        assert abs(row.power - analytic) < 3.5 * np.sqrt(analytic * (1 - analytic) / result.converged)
    out = curve.to_dict()
    assert out["sample_sizes"] == [100, 300]
    assert [p["power"] for p in out["power"] if p["label"] == "covariance(f, g)"][0] == [
        [p.power for p in r.parameters if p.label == "covariance(f, g)"][0] for r in curve.results]
    # the report shows coverage and bias at each size beside power (new-user trial 6: they were in the JSON only),
    # the same figures as the single-size result's
    from cfa_tool.reporting.workflow_tables import power_curve_report

    trust = next(t for t in power_curve_report(curve).tables if t.key == "coverage_and_bias_by_sample_size")
    heads, values = trust.value_columns, trust.values
    assert list(heads[1:4]) == ["Coverage at N = 100", "Estimate bias % at N = 100", "SE bias % at N = 100"]
    row = next(v for v in values if v[0] == "covariance of factors f and g")
    last = [p for p in curve.results[1].parameters if p.label == "covariance(f, g)"][0]
    assert list(row[4:]) == [last.coverage, last.relative_bias, last.se_bias]
    # one size in a list is the single-size result, seeds included
    assert monte_carlo_power(spec, [100], replications=5, seed=4, workers=1) == monte_carlo_power(
        spec, 100, replications=5, seed=4, workers=1)


@pytest.mark.parametrize("sizes, words", [("100,x", "separated by commas"), ("100,100", "twice"), ("100,0", "at least 1")])
def test_power_by_sample_size_refuses_bad_lists(sizes, words):
    from cfa_tool.errors import OptionError

    with pytest.raises(OptionError, match=words):
        monte_carlo_power(parse_model(POPULATION), sizes, replications=5, workers=1)


def test_bootstrap_is_reproducible_and_covers_the_estimate(hs_data):
    from cfa_tool.workflows.bootstrap import bootstrap

    first = bootstrap(THREE_FACTORS, hs_data, replications=40, seed=11, workers=1)
    result = first.fit
    again = bootstrap(THREE_FACTORS, hs_data, replications=40, seed=11, workers=2)
    assert first.to_dict() == again.to_dict()  # same seed, same answer, however many workers
    assert first.converged == 40
    for interval in first.intervals:
        assert interval.percentile[0] <= interval.estimate <= interval.percentile[1]
    # the three-factor model misfits these data (chi-square 85 on 24 df): Bollen-Stine rejects it too
    assert first.bollen_stine_p < 0.05


def test_bca_acceleration_from_influence_values_matches_the_jackknife(hs_data):
    """The BCa acceleration from each row's analytic influence equals, to first order, the
    jackknife's (Efron & Tibshirani 1993, ch. 14: a = sum d^3 / (6 (sum d^2)^(3/2)), d the
    differences of the leave-one-out estimates from their mean), computed here by brute force."""
    from cfa_tool.pipeline.continuous import moments_from_rows, replicate_fit
    from cfa_tool.workflows.bootstrap import acceleration, influence_values

    spec = parse_model(THREE_FACTORS)
    rows = hs_data[[f"x{i}" for i in range(1, 10)]].to_numpy(dtype=float)
    names = tuple(f"x{i}" for i in range(1, 10))
    full = replicate_fit(spec, moments_from_rows(rows, names))
    influence, influence_std = influence_values(spec, rows, names, full.theta)
    assert influence.shape == (301, len(full.values))
    jack = np.array([replicate_fit(spec, moments_from_rows(np.delete(rows, i, axis=0), names), start=full.theta).values
                     for i in range(len(rows))])
    jack_std = np.array([replicate_fit(spec, moments_from_rows(np.delete(rows, i, axis=0), names),
                                       start=full.theta).standardized for i in range(len(rows))])
    varying = np.ptp(jack, axis=0) > 0
    d = jack.mean(axis=0) - jack
    exact = np.sum(d[:, varying] ** 3, axis=0) / (6 * np.sum(d[:, varying] ** 2, axis=0) ** 1.5)
    np.testing.assert_allclose(acceleration(influence)[varying], exact, atol=2e-3)
    # each row's influence is (n - 1) times its jackknife difference, to first order
    for e in np.flatnonzero(varying):
        assert np.corrcoef(influence[:, e], d[:, e])[0, 1] > 0.99
        assert np.std(influence[:, e]) / 300 == pytest.approx(np.std(d[:, e]), rel=0.03)
    varying_std = np.ptp(jack_std, axis=0) > 1e-12
    d_std = jack_std.mean(axis=0) - jack_std
    exact_std = np.sum(d_std[:, varying_std] ** 3, axis=0) / (6 * np.sum(d_std[:, varying_std] ** 2, axis=0) ** 1.5)
    np.testing.assert_allclose(acceleration(influence_std)[varying_std], exact_std, atol=2e-3)


def test_bootstrap_cost_does_not_grow_with_rows_times_fits(monkeypatch, hs_data):
    """BCa needs no refit per row: a 100,000-row bootstrap fits the model once per resample only."""
    import cfa_tool.workflows.bootstrap as B
    from cfa_tool.workflows.bootstrap import bootstrap

    calls = []
    original = B.replicate_fits
    monkeypatch.setattr(B, "replicate_fits", lambda spec, samples, *a, **k: calls.extend(samples) or original(spec, samples, *a, **k))
    big = hs_data.sample(n=20_000, replace=True, random_state=1).reset_index(drop=True)
    bootstrap(THREE_FACTORS, big, replications=10, seed=1, workers=1, bollen_stine=False)
    assert len(calls) == 10


def test_bollen_stine_p_is_roughly_uniform_under_a_true_model():
    from cfa_tool.workflows.bootstrap import bootstrap

    spec = parse_model(POPULATION)
    ps = []
    for rep in range(12):
        data = simulate(spec, 200, seed=100 + rep).frame
        boot = bootstrap(spec, data, replications=40, seed=rep, bca=False, workers=1)
        ps.append(boot.bollen_stine_p)
    # a uniform p has mean .5 and SD .29; with 12 draws the mean's SE is .08
    assert 0.25 < np.mean(ps) < 0.75
    assert np.mean(np.array(ps) < 0.05) <= 0.25


def test_model_specific_cutoffs(hs_data):
    from cfa_tool.workflows.cutoffs import cutoffs

    cut = cutoffs(THREE_FACTORS, hs_data, replications=60, seed=3, workers=1)
    result = cut.fit
    assert "cross-loading" in cut.misspecification
    rmsea95 = [c for c in cut.cutoffs if c.index == "rmsea" and c.level == 0.95][0]
    if rmsea95.cutoff is not None:
        assert 0.0 < rmsea95.cutoff < 0.2
    assert {c.index for c in cut.cutoffs} == {"cfi", "rmsea", "srmr"}
    for c in cut.cutoffs:  # where no cutoff exists at N = 301, the search says at what N or size one does
        if c.cutoff is None:
            assert c.separating_n is None or c.separating_n in (602, 1204, 2408, 4816)
            assert c.separating_size is None or c.separating_size > cut.misspecification_size
            assert c.separating_n is not None or c.separating_size is not None
    again = cutoffs(THREE_FACTORS, hs_data, replications=60, seed=3, workers=2)
    assert cut.to_dict() == again.to_dict()


def test_cutoff_rule_on_distributions_of_known_overlap():
    """The rule (a cutoff exists when 95% of misspecified samples lie beyond it and 95% of correct ones do
    not; McNeish & Wolf 2023) on samples drawn from distributions whose overlap is known by construction."""
    from cfa_tool.workflows.cutoffs import _cutoffs

    rng = np.random.default_rng(0)
    correct = np.column_stack([1 - np.abs(rng.normal(0, 0.02, 100)), np.abs(rng.normal(0, 0.02, 100)),
                               np.abs(rng.normal(0.02, 0.005, 100))])
    wrong = np.column_stack([0.97 - np.abs(rng.normal(0, 0.02, 100)), 0.03 + np.abs(rng.normal(0, 0.02, 100)),
                             0.05 + np.abs(rng.normal(0, 0.005, 100))])
    found = _cutoffs(correct, wrong)
    assert found[("srmr", 0.95)] is not None  # SRMR distributions 0.02 +- .005 and 0.05+: well apart
    assert found[("cfi", 0.95)] is None  # CFI distributions overlap


def test_cluster_gives_the_same_result_as_local_processes():
    distributed = pytest.importorskip("distributed")
    spec = parse_model(POPULATION)
    local = monte_carlo_power(spec, 120, replications=40, seed=6, workers=2)
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, host="127.0.0.1", dashboard_address=None,
                                  processes=True) as cluster:
        remote = monte_carlo_power(spec, 120, replications=40, seed=6, scheduler=cluster.scheduler_address)
    assert remote.to_dict() == local.to_dict()


def test_cli_planning_commands(tmp_path):
    from tests.commands.test_cli import run

    model = tmp_path / "pop.cfa"
    model.write_text(POPULATION)
    proc = run("simulate", str(model), "--n", "300", "--seed", "3", "--output", str(tmp_path / "sim.csv"))
    assert proc.returncode == 0, proc.stderr
    assert (tmp_path / "sim.csv").read_text().splitlines()[0] == "y1,y2,y3,y4,y5,y6,y7,y8"
    proc = run("power", "--df", "40", "--n", "200", "--json", "-")
    assert proc.returncode == 0 and '"required_n": 252' in proc.stdout  # MBS (1996) Table 4, df = 40 (from memory)
    proc = run("power-simulation", str(model), "--n", "100", "--replications", "20", "--workers", "1", "--json", "-")
    assert proc.returncode == 0, proc.stderr
    proc = run("bootstrap", str(model), "--data", str(tmp_path / "sim.csv"), "--replications", "20", "--workers", "1")
    assert proc.returncode == 0 and "Bollen-Stine" in proc.stdout, proc.stderr


def test_bootstrap_with_frequency_weights_resamples_the_rows_they_count(hs_data):
    # A row of frequency weight k is k identical rows (the README's rule), so bootstrapping the weighted file
    # must spread the estimates as bootstrapping the expanded file does (Efron & Tibshirani 1993: resampling
    # the observations).  A hostile trial found intervals 1.6 times too wide when records were resampled.
    data = hs_data.assign(count=np.random.default_rng(5).integers(1, 5, len(hs_data)))
    expanded = data.loc[data.index.repeat(data["count"])].reset_index(drop=True)
    weighted = cfa_tool.bootstrap(THREE_FACTORS, data, replications=300, seed=3, bca=False, bollen_stine=False,
                                  weights="count", weight_kind="frequency")
    plain = cfa_tool.bootstrap(THREE_FACTORS, expanded, replications=300, seed=4, bca=False, bollen_stine=False)
    se = {(i.kind, i.variables, i.scale): i.bootstrap_se for i in plain.intervals}
    pairs = [(i.bootstrap_se, se[(i.kind, i.variables, i.scale)]) for i in weighted.intervals
             if (i.kind, i.variables, i.scale) in se and i.kind == "loading"]
    ratios = np.array([a / b for a, b in pairs])
    # two independent bootstraps of 300: each SE has about 4% Monte Carlo error, so the median ratio is near 1
    assert len(ratios) >= 6 and 0.85 < np.median(ratios) < 1.15, ratios


@pytest.mark.parametrize("gaps", [False, True])
def test_bca_acceleration_with_frequency_weights_is_that_of_the_expanded_rows(hs_data, gaps):
    # A record of frequency weight k is k identical rows (the README's rule), and the bootstrap resamples those rows,
    # so the BCa acceleration (Efron 1987) is a sum over rows: each record's influence counted k times.  The
    # expanded file's acceleration is the reference (itself checked against the jackknife above).  Summing the
    # weighted records' influence as if each record were one unit gave other accelerations (a re-check found it).
    from cfa_tool.data.sample_design import RowDesign
    from cfa_tool.method import WeightKind
    from cfa_tool.workflows.bootstrap import _row_counts, acceleration, influence_values

    spec = parse_model(THREE_FACTORS)
    names = tuple(f"x{i}" for i in range(1, 10))
    rows = hs_data[list(names)].to_numpy(dtype=float)
    if gaps:
        rows[np.random.default_rng(8).random(rows.shape) < 0.05] = np.nan
    counts = np.random.default_rng(5).integers(1, 5, len(rows)).astype(float)
    expanded = np.repeat(rows, counts.astype(int), axis=0)
    design = RowDesign(weights=counts, kind=WeightKind.FREQUENCY)
    start = cfa_tool.fit(THREE_FACTORS, pd.DataFrame(expanded, columns=list(names))).theta
    plain, plain_std = influence_values(spec, expanded, names, start)
    weighted, weighted_std = influence_values(spec, rows, names, start, design)
    assert weighted.shape[0] == len(rows)
    np.testing.assert_allclose(np.repeat(weighted, counts.astype(int), axis=0), plain, rtol=1e-5, atol=1e-8)
    for ours, theirs in ((weighted, plain), (weighted_std, plain_std)):
        np.testing.assert_allclose(acceleration(ours, _row_counts(design)), acceleration(theirs), atol=1e-7)
    # with clusters, each cluster is one unit of the resampling: no counts
    assert _row_counts(RowDesign(weights=counts, kind=WeightKind.FREQUENCY, clusters=np.arange(len(rows)) // 3)) is None


def test_power_simulation_counts_negative_variance_estimates():
    # An item whose residual variance is small (.05, loading 1 on a factor of variance .9) at N = 60: its estimate is
    # negative in a share of samples near Phi(-theta / SE), SE from the expected information at the population values
    # (the estimate's asymptotic normal distribution).  The count is reported, not hidden (hostile trial).
    from scipy import stats

    from cfa_tool.estimation.ml import GroupMoments, NormalLikelihood
    from cfa_tool.model.implied import StructuredModel
    from cfa_tool.reporting.reports import report_of

    spec = parse_model("factor f: y1, y2, y3, y4\nstart variance(f) = 0.9\nstart loading(f, y2), loading(f, y3) = 0.7\n"
                       "start loading(f, y4) = 1\nstart variance(y4) = 0.05\n"
                       "start variance(y1), variance(y2), variance(y3) = 0.5\n")
    population = population_from_spec(spec)
    n = 60
    info = NormalLikelihood(StructuredModel(population.table),
                            [GroupMoments(population.sigma, np.zeros(4), n)]).evaluate(population.theta).information
    k = population.table.free_labels.index("variance(y4)")
    share = stats.norm.cdf(-population.theta[k] / np.sqrt(2 / n * np.linalg.inv(info)[k, k]))  # about .22
    result = monte_carlo_power(spec, n, replications=400, seed=3, workers=1)
    expected = share * result.converged
    assert abs(result.inadmissible - expected) < 4 * np.sqrt(expected * (1 - share))
    report = report_of(result)
    assert report.notice.lines[0].startswith(f"{result.inadmissible} of the {result.converged} converged replications "
                                             f"(negative residual variance")
    # said once: the notice, not again among the lines (power reports said it twice)
    said = " ".join(result.summary(width=400).split())
    assert said.count("not admissible, as a single fit would judge it") == 1
    assert "not admissible" not in " ".join(report.lines)
    assert result.to_dict()["inadmissible"] == result.inadmissible
    assert monte_carlo_power(spec, 3000, replications=20, seed=3, workers=1).inadmissible == 0
    # held at a bound of zero instead ('bound variance(y4) >= 0'), the same samples' estimates are inadmissible as a
    # fit judges one held at its bound: the mass at the boundary is the share that would fall below it (Self & Liang
    # 1987), so the same count as without the bound, named first in the report (hostile trial: it counted none)
    bounded = monte_carlo_power(parse_model("\n".join(spec.lines) + "\nbound variance(y4) >= 0\n"), n, replications=400, seed=3,
                                workers=1)
    assert abs(bounded.inadmissible - expected) < 4 * np.sqrt(expected * (1 - share))
    assert abs(bounded.inadmissible - result.inadmissible) <= 2
    assert bounded.inadmissible_named == f"the residual variance of y4 held at a bound in {bounded.inadmissible}"
    notice = report_of(bounded).notice
    assert notice is not None and not notice.inadmissible
    assert f"{bounded.inadmissible} of the {bounded.converged} converged replications" in notice.lines[0]
    assert "negative residual variance (the residual variance of y4)" in result.inadmissible_named


def test_a_population_beyond_the_models_own_bound_is_refused():
    # the start values of a simulation are the population's: one that the model's own bound forbids would hold every
    # replication's estimate at the bound (hostile trial: coverage 0%, an SE bias of 1e18 %, said without a word)
    from cfa_tool.errors import ModelError

    spec = parse_model("factor f: y1, y2, y3, y4\nbound variance(y4) <= 0.1\nstart variance(y4) = 0.9\n")
    with pytest.raises(ModelError, match=r"0.9 of variance\(y4\).*outside the model's own bound on it \(at most "
                                         r"0.1, line 2\)") as caught:
        monte_carlo_power(spec, 300, replications=5, workers=1)
    assert caught.value.location.line == 3
    with pytest.raises(ModelError, match="outside the model's own bound"):
        simulate(spec, 50)
    population_from_spec(parse_model("factor f: y1, y2, y3, y4\nbound variance(y4) <= 0.1\n"
                                      "start variance(y4) = 0.05\n"))  # within the bound: taken


def test_a_start_value_beyond_a_bound_on_a_parameter_held_equal_is_called_a_start_value():
    # the start values were checked against the bounds twice (statement by statement, then the table), and the
    # table's check called a start value shared through an 'equal' statement a default, advising a 'start' statement;
    # one check now names what the model file gave
    from cfa_tool.errors import ModelError

    spec = parse_model("factor f: y1, y2, y3, y4\nequal variance(y3), variance(y4)\nbound variance(y4) <= 0.1\n"
                       "start variance(y3) = 0.9\n")
    for run_it in (lambda: simulate(spec, 50), lambda: monte_carlo_power(spec, 300, replications=5, workers=1)):
        with pytest.raises(ModelError) as caught:
            run_it()
        said = str(caught.value)
        assert "the population value 0.9 of variance(y3) (a 'start' value" in said and "at most 0.1" in said
        assert "default" not in said and "give its population value with a 'start' statement" not in said


def test_a_default_population_value_held_at_the_models_own_bound_is_refused():
    # the standardized default residual variance of y4 is 1 - .7^2 = .51 (this module's documented defaults,
    # computed by hand), beyond 'bound variance(y4) <= 0.1': the conversion to the model's scaling stopped it at 0.1
    # and moved the other defaults (0.696 instead of .51), and every sample was drawn from a population on the
    # boundary without a word; it is refused as a default beyond the bound is
    from cfa_tool.errors import ModelError

    spec = parse_model("factor f: y1, y2, y3, y4\nbound variance(y4) <= 0.1\n")
    for run_it in (lambda: simulate(spec, 50), lambda: monte_carlo_power(spec, 300, replications=5, workers=1)):
        with pytest.raises(ModelError, match=r"the default population value of variance\(y4\) lies beyond the "
                                             r"model's own bound \(at most 0.1\) and is held at it"):
            run_it()
    # a bound the default stays within, and a start value on the bound (a population on the boundary, asked for)
    assert [v["value"] for v in simulate(parse_model("factor f: y1, y2, y3, y4\nbound variance(y4) <= 0.6\n"), 50)
            .population.values() if v["kind"] == "residual_variance"] == pytest.approx([0.51] * 4)
    simulate(parse_model("factor f: y1, y2, y3, y4\nbound variance(y4) <= 0.1\nstart variance(y4) = 0.1\n"), 50)


def test_the_power_report_says_what_the_plan_assumes_and_what_ordinal_items_change(tmp_path):
    # new-user trial: 'power' of a model whose items are all ordinal, fitted under a cluster design, gave the
    # normal-theory plan without a word about either
    from cfa_tool.options import on_command_line
    from cfa_tool.reporting.workflow_tables import POWER_ORDINAL, power_assumptions

    with on_command_line():
        POWER_ASSUMES = str(power_assumptions())

    model = tmp_path / "m.cfa"
    model.write_text("factor f: a, b, c, d\nordinal a, b, c, d\n")
    proc = run("power", str(model), "--n", "300")
    assert proc.returncode == 0, proc.stderr
    said = " ".join(proc.stdout.split())
    assert " ".join(POWER_ASSUMES.split()) in said and " ".join(POWER_ORDINAL.split()) in said
    model.write_text("factor f: a, b, c, d\n")
    said = " ".join(run("power", str(model), "--n", "300").stdout.split())
    assert " ".join(POWER_ASSUMES.split()) in said and "declares ordinal items" not in said
    # new-user trial s15: the note said power-simulation does not model non-normal data, yet it simulates ordinal
    # answers (from an ordinal fit's thresholds, or equally likely categories) and fits them as an ordinal fit does
    assert "nor power-simulation models them" not in said
    assert ("power-simulation simulates ordinal answers, cut from normal latent responses at the thresholds of an "
            "earlier ordinal fit (--population-from fit.json) or into equally likely categories (--categories 4)") \
        in said
    assert "population='fit.json'" in power_assumptions() and "categories=4" in power_assumptions()  # from Python


def test_too_few_resamples_or_samples_bring_a_caution(hs_data):
    # hostile trial: 10 resamples gave 95% intervals and a Bollen-Stine p without a word; each 2.5% tail of 10
    # draws holds a quarter of one
    from cfa_tool.reporting.workflow_tables import bootstrap_report, cutoffs_report, few_draws

    assert few_draws(400, 0.025, "resamples", "x") == "" and few_draws(200, 0.05, "samples", "x") == ""
    boot = cfa_tool.bootstrap(THREE_FACTORS, hs_data, replications=20, workers=1)
    (caution,) = bootstrap_report(boot).warnings
    assert caution.startswith("Only 20 converged resamples: each 2.5% tail holds about 0.5 of them, so the interval "
                              "ends and the Bollen-Stine p-value move with the seed; give 400 or more")
    cut = cfa_tool.cutoffs(THREE_FACTORS, hs_data, replications=50, workers=1)
    assert cutoffs_report(cut).warnings[0].startswith("Only 50 samples: each 5% tail holds about 2.5 of them, so the "
                                                      "cutoffs move with the seed; give 200 or more")


def test_sample_sizes_are_tabled_from_the_smallest_whatever_the_order_typed():
    # hostile trial 7, H10b: '--n 200,50,100' gave the columns N = 200, N = 50, N = 100
    from cfa_tool import options

    assert options.sample_sizes("200,50,100") == (50, 100, 200)
    assert options.sample_sizes([300, 100]) == (100, 300)
    with pytest.raises(OptionError, match="the sample size 50 is given twice"):
        options.sample_sizes("200,50,50")


def test_the_ordinal_bootstrap_handles_gaps_as_fit_does(tmp_path, capsys):
    """The ordinal bootstrap fits and refits from pairwise present rows by default; a choice of how rows with gaps
    are handled was once silently ignored, then refused (s16), which left the advice to read a half of the complete
    rows with missing='listwise' no route that ran (s17): now it takes the complete rows as fit does, and refuses
    full-information ML as fit does, naming the option as the caller wrote it."""
    import cfa_tool
    from cfa_tool.cli import main
    from cfa_tool.errors import OptionError
    from tests.conftest import THREE_FACTORS, holzinger_swineford

    data = holzinger_swineford()
    ordinal = data.copy()
    for x in [f"x{i}" for i in range(1, 10)]:
        ordinal[x] = np.digitize(data[x], np.quantile(data[x], [0.25, 0.5, 0.75]))
    ordinal.loc[[3, 7], "x2"] = np.nan
    done = cfa_tool.bootstrap(THREE_FACTORS, ordinal, ordinal="all", missing="listwise", replications=10)
    assert done.fit.n_obs == len(ordinal) - 2 and done.fit.method.missing.value == "listwise"
    with pytest.raises(OptionError, match=r"or only the complete rows with missing='listwise'"):
        cfa_tool.bootstrap(THREE_FACTORS, ordinal, ordinal="all", missing="full-information", replications=10)
    ordinal.to_csv(tmp_path / "o.csv", index=False)
    (tmp_path / "m.cfa").write_text(THREE_FACTORS)
    assert main(["bootstrap", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "o.csv"), "--ordinal", "all",
                 "--incomplete-rows", "listwise", "--replications", "10"]) == 0
    assert main(["bootstrap", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "o.csv"), "--ordinal", "all",
                 "--incomplete-rows", "full-information", "--replications", "10"]) == 2
    assert "or only the complete rows with --incomplete-rows listwise" in capsys.readouterr().err


def test_the_cutoff_reading_says_what_a_simulated_cutoff_means_and_rows_left_out_come_first(hs_data):
    # a cutoff at 95% is a value 95% of the misspecified model's samples pass (McNeish & Wolf 2023): a value beyond it
    # does not make misfit that large 'likely' (new-user trial), it fails to rule it out; and the rows listwise
    # deletion left out (counted by pandas) came after the cautions at the very end
    from cfa_tool.reporting.reports import report_of
    from cfa_tool.reporting.workflow_tables import CUTOFF_BEYOND, CUTOFF_WITHIN

    data = hs_data.copy()
    data.loc[data.index[::7], "x4"] = np.nan
    left_out = int(data["x4"].isna().sum())
    cut = cfa_tool.cutoffs(THREE_FACTORS, data, replications=30, seed=2, workers=1, missing="listwise")
    report = report_of(cut)
    assert str(report.notice.lines[0]).startswith(f"Listwise deletion left out {left_out} of {len(data)} rows")
    assert not any(f"left out {left_out} of" in note for note in report.notes)
    readings = {(c.index.upper(), f"{100 * c.level:.0f}%"): c for c in cut.cutoffs}
    checked = 0
    for row in report.tables[0].rows:
        c = readings[(row[0], row[1])]
        if c.cutoff is None:
            continue
        misfit_side = c.observed < c.cutoff if c.index == "cfi" else c.observed > c.cutoff  # the rule's two sides
        assert row[-1] == (CUTOFF_BEYOND if misfit_side else CUTOFF_WITHIN)
        checked += 1
    assert checked  # at least one cutoff exists with these seeds
    assert "likely" not in " ".join(r[-1] for r in report.tables[0].rows).replace("unlikely", "")
    assert "95% of the samples from the model with" in report.tables[0].note
    assert "does not show that misfit that large is present" in report.tables[0].note


NEAR_ZERO_MODEL = "factor f: y1, y2, y3, y4\n"


def _near_zero_rows():
    """80 rows of NEAR_ZERO_MODEL whose item y4 has a residual variance near zero (.05; invented population values)."""
    return simulate(parse_model(NEAR_ZERO_MODEL + "start variance(f) = 0.9\nstart loading(f, y2), loading(f, y3) = 0.7\n"
                                "start loading(f, y4) = 1\nstart variance(y4) = 0.05\n"
                                "start variance(y1), variance(y2), variance(y3) = 0.5\n"), 80, seed=5).frame


def test_bootstrap_counts_resamples_whose_solution_is_not_admissible():
    # an item whose residual variance is near zero (.05 in the population, N = 80): its estimate falls below zero in
    # a share of resamples near Phi(-estimate / SE) (the estimate's asymptotic normal distribution, by scipy); held
    # at a bound of zero instead, the same resamples hold it there, which a fit calls not admissible as well
    from scipy import stats

    from cfa_tool.reporting.reports import report_of

    model, data = NEAR_ZERO_MODEL, _near_zero_rows()
    row = next(r for r in cfa_tool.fit(model, data).estimates if r.kind == "residual_variance"
               and r.variables == ("y4",))
    free = cfa_tool.bootstrap(model, data, replications=200, seed=4, workers=1)
    bounded = cfa_tool.bootstrap(model + "bound variance(y4) >= 0\n", data, replications=200, seed=4, workers=1)
    assert free.inadmissible / free.converged == pytest.approx(stats.norm.cdf(-row.estimate / row.se), abs=0.1)
    assert abs(bounded.inadmissible - free.inadmissible) <= 2
    assert free.inadmissible_named == f"negative residual variance (the residual variance of y4) in {free.inadmissible}"
    assert bounded.inadmissible_named == f"the residual variance of y4 held at a bound in {bounded.inadmissible}"
    assert report_of(bounded).warnings[0] == (
        f"{bounded.inadmissible} of the {bounded.converged} converged resamples ({bounded.inadmissible_named}) have a "
        f"solution that is not admissible, as a single fit would judge it; they are kept in the intervals, which are of "
        f"the estimates' sampling distribution, such solutions included")
    assert " ".join(bounded.summary(width=400).split()).count("not admissible, as a single fit would judge it") == 1
    assert bounded.to_dict()["result"]["inadmissible"] == bounded.inadmissible


def test_bootstrap_workers_judge_admissibility_as_one_process_does():
    # the resamples' admissibility is judged in the worker processes (as the ordinal path judges it): 1,000
    # resamples in two batches on two processes give the count and the words of one process
    model, data = NEAR_ZERO_MODEL, _near_zero_rows()
    one = cfa_tool.bootstrap(model, data, replications=1000, seed=4, workers=1, bollen_stine=False)
    two = cfa_tool.bootstrap(model, data, replications=1000, seed=4, workers=2, bollen_stine=False)
    assert one.inadmissible > 0 and one.inadmissible_named.startswith("negative residual variance")
    assert (two.converged, two.inadmissible, two.inadmissible_named) == (one.converged, one.inadmissible,
                                                                        one.inadmissible_named)


def test_cutoffs_count_samples_whose_solution_is_not_admissible():
    # an item whose residual variance is estimated near zero (.020, admissible; the seed-1 rows of the population of
    # _near_zero_rows): in samples of N = 80 drawn from the fitted model its estimate falls below zero in a share near
    # Phi(-estimate / SE) (the estimate's asymptotic normal distribution, by scipy); a fit calls such a solution not
    # admissible, and the cutoffs' report says how many samples so, in its first box as power-simulation says its
    # replications' (hostile tester s14: it was a plain note)
    from scipy import stats

    from cfa_tool.reporting.reports import report_of

    data = simulate(parse_model(NEAR_ZERO_MODEL + "start variance(f) = 0.9\nstart loading(f, y2), loading(f, y3) = 0.7\n"
                                "start loading(f, y4) = 1\nstart variance(y4) = 0.05\n"
                                "start variance(y1), variance(y2), variance(y3) = 0.5\n"), 80, seed=1).frame
    cut = cfa_tool.cutoffs(NEAR_ZERO_MODEL, data, replications=100, seed=2, workers=1)
    assert cut.fit.admissible
    y4 = next(r for r in cut.fit.estimates if r.kind == "residual_variance" and r.variables == ("y4",))
    assert 0 < y4.estimate < 0.05
    (count, named), _ = cut.inadmissible
    expected = stats.norm.cdf(-y4.estimate / y4.se)  # about .34
    assert count / cut.converged_correct == pytest.approx(expected, abs=0.2)  # 4 binomial SDs of 100 samples
    assert named == f"negative residual variance (the residual variance of y4) in {count}"
    report = report_of(cut)
    said = (f"{count} of the {cut.converged_correct} converged samples from the fitted model (negative residual "
            f"variance (the residual variance of y4) in {count}) have a solution that is not admissible")
    assert report.notice is not None and any(line.startswith(said) for line in report.notice.lines)
    assert not any("not admissible" in w for w in report.warnings)
    assert " ".join(cut.summary(width=400).split()).count("not admissible, as a single fit would judge it") == 1
    assert cut.to_dict()["result"]["inadmissible_correct"] == count


def test_cutoffs_refuse_a_fitted_population_that_is_not_admissible():
    # the fitted model is the population the samples are drawn from: one whose residual variance of y4 is held at
    # its bound of zero (or negative) is no population, as power-simulation --population-from refuses it, in the
    # same words (hostile tester s14: cutoffs simulated from it)
    model, data = NEAR_ZERO_MODEL, _near_zero_rows()
    words = (r"the fitted solution is not admissible \(it has {}\), so it cannot serve as a population; fit a model "
             r"whose solution is admissible and simulate its cutoffs")
    with pytest.raises(OptionError, match=words.format(r"a negative residual variance of y4 \(-0.07\)")):
        cfa_tool.cutoffs(model, data, replications=20, seed=2, workers=1)
    with pytest.raises(OptionError, match=words.format(r"the residual variance of y4 held at a bound")):
        cfa_tool.cutoffs(model + "bound variance(y4) >= 0\n", data, replications=20, seed=2, workers=1)


def test_cutoffs_of_a_model_without_degrees_of_freedom_are_refused():
    # three items on one factor: 0 df, so every sample's CFI is 1 and SRMR 0 whatever the population, and no N can
    # separate the two (hostile tester s14: it simulated up to 16 times N and advised more data)
    data = _near_zero_rows()
    with pytest.raises(OptionError, match="the model has no degrees of freedom .* has no fit to judge"):
        cfa_tool.cutoffs("factor f: y1, y2, y3\n", data, replications=20, seed=2, workers=1)


def test_ordinal_power_simulation_counts_estimates_held_at_a_bound():
    # a loading whose population value (.7) is its upper bound: on the boundary, an estimate lands on the bound in
    # about half of the samples (Self & Liang 1987); each ordinal refit judges itself as a fit does
    spec = parse_model("factor f: y1, y2, y3, y4\nordinal y1, y2, y3, y4\nscale f by variance\n"
                       "bound loading(f, y2) <= 0.7\nstart loading(f, y1), loading(f, y2), loading(f, y3), "
                       "loading(f, y4) = 0.7\n")
    result = monte_carlo_power(spec, 200, replications=40, seed=1, workers=1, categories=4)
    assert result.inadmissible / result.converged == pytest.approx(0.5, abs=0.32)  # 4 binomial SDs of 40 samples
    assert result.inadmissible_named == f"the loading of y2 on f held at a bound in {result.inadmissible}"
