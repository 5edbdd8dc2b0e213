"""Full-information refits of rows with gaps in bootstrap, cutoffs and replicate: each refit is the fit of its
sample, the bootstrap's spread matches the observed-information standard errors, the influence values match
the jackknife, and the cross-validation index of replicate matches a likelihood maximised by scipy."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.language.parser import parse_model
from cfa_tool.method import MissingData
from cfa_tool.pipeline.continuous import moments_from_rows, replicate_fits
from tests.conftest import simulate_cfa

TWO_FACTORS = "factor f1: y1, y2, y3\nfactor f2: y4, y5, y6\n"
NAMES = tuple(f"y{k}" for k in range(1, 7))


def with_gaps(n: int, seed: int, share: float = 0.12) -> pd.DataFrame:
    """Normal data from a true two-factor model, a share of the answers removed completely at random (seeded)."""
    loadings = np.zeros((6, 2))
    loadings[:3, 0] = (0.8, 0.7, 0.6)
    loadings[3:, 1] = (0.75, 0.65, 0.7)
    phi = np.array([[1.0, 0.4], [0.4, 1.0]])
    theta = np.diag(1.0 - np.sum(loadings**2, axis=1))
    data = simulate_cfa(loadings, phi, theta, n, seed) + 3.0
    values = data.to_numpy().copy()
    values[np.random.default_rng(seed + 1).random(values.shape) < share] = np.nan
    values = values[~np.isnan(values).all(axis=1)]
    return pd.DataFrame(values, columns=list(NAMES))


@pytest.fixture(scope="module")
def gappy() -> pd.DataFrame:
    return with_gaps(300, 5)


def test_a_refit_of_one_resample_is_fit_on_that_resample(gappy):
    full = cfa_tool.fit(TWO_FACTORS, gappy)
    assert full.method.missing is MissingData.FULL_INFORMATION
    rows = gappy.to_numpy()[np.random.default_rng(2).integers(0, len(gappy), len(gappy))]
    [refit] = replicate_fits(parse_model(TWO_FACTORS), [moments_from_rows(rows, NAMES, full_information=True)],
                             full.theta, standard_errors=True, full_information=True)
    direct = cfa_tool.fit(TWO_FACTORS, pd.DataFrame(rows, columns=list(NAMES)))
    assert refit.converged and direct.method.missing is MissingData.FULL_INFORMATION
    free = np.array([r.free for r in direct.estimates])
    np.testing.assert_allclose(refit.values, [r.estimate for r in direct.estimates], atol=1e-6)
    np.testing.assert_allclose(refit.se[free], [r.se for r in direct.estimates if r.free], atol=1e-6)
    np.testing.assert_allclose(refit.standardized, [r.standardized for r in direct.estimates], atol=1e-6)
    for ours, theirs in ((refit.chi_square, direct.fit.chi_square), (refit.cfi, direct.fit.cfi),
                         (refit.rmsea, direct.fit.rmsea), (refit.srmr, direct.fit.srmr)):
        assert ours == pytest.approx(theirs, abs=1e-6)


def agrees_with_the_jackknife(influence: np.ndarray, jack: np.ndarray, rows_left: int, correlation: float,
                              atol: float) -> None:
    """Influence values against leave-one-out estimates ``jack``: each column's differences from the jackknife
    mean are the influence over the rows left, to first order, and the BCa accelerations agree."""
    from cfa_tool.workflows.bootstrap import acceleration

    varying = np.ptp(jack, axis=0) > 0
    d = jack.mean(axis=0) - jack
    for e in np.flatnonzero(varying):
        assert np.corrcoef(influence[:, e], d[:, e])[0, 1] > correlation
        assert np.std(influence[:, e]) / rows_left == pytest.approx(np.std(d[:, e]), rel=0.05)
    exact = np.sum(d[:, varying] ** 3, axis=0) / (6 * np.sum(d[:, varying] ** 2, axis=0) ** 1.5)
    np.testing.assert_allclose(acceleration(influence)[varying], exact, atol=atol)


def test_influence_of_rows_with_gaps_matches_the_jackknife():
    """Each row's analytic influence on the full-information estimate is, to first order, (N - 1) times its
    leave-one-out difference, computed here by brute force; so are the BCa accelerations (Efron & Tibshirani
    1993, ch. 11 and 14).  The second-order gap shrinks with N (at N = 150 up to 10%, at 300 within 3.5%, as
    for complete rows), so N = 300 and 5% (a tolerance set here)."""
    from cfa_tool.workflows.bootstrap import influence_values

    data = with_gaps(300, 8, share=0.15)
    rows = data.to_numpy()
    spec = parse_model(TWO_FACTORS)
    full = cfa_tool.fit(TWO_FACTORS, data)
    influence, _ = influence_values(spec, rows, NAMES, full.theta)
    jack = np.array([replicate_fits(spec, [moments_from_rows(np.delete(rows, i, axis=0), NAMES, full_information=True)],
                                    full.theta, fit_indices_wanted=False, full_information=True)[0].values
                     for i in range(len(rows))])
    agrees_with_the_jackknife(influence, jack, len(rows) - 1, correlation=0.99, atol=5e-3)


def test_bootstrap_spread_matches_the_observed_information_standard_errors():
    """On normal data with answers missing completely at random the bootstrap SEs of a full-information fit
    estimate the same sampling spread as its observed-information SEs (Kenward & Molenberghs 1998): at 500
    resamples the Monte Carlo error of a bootstrap SE is about 1/sqrt(2 * 500) = 3%, so each of the 19 free
    parameters agrees within 12% and their median ratio within 5% (tolerances set here, not published; seen:
    ratios 0.955 to 1.104, median 1.032, with 57% of the rows missing some answer)."""
    data = with_gaps(500, 21)
    boot = cfa_tool.bootstrap(TWO_FACTORS, data, replications=500, seed=4, bca=False, workers=1)
    assert boot.fit.method.missing is MissingData.FULL_INFORMATION and boot.converged == 500
    se = {(r.kind, r.variables): r.se for r in boot.fit.estimates if r.free}
    ratios = np.array([i.bootstrap_se / se[(i.kind, i.variables)] for i in boot.intervals
                       if i.scale == "unstandardized"])
    assert len(ratios) == len(se) == 19  # 4 loadings, 2 variances, 1 covariance, 6 residual variances, 6 intercepts
    assert np.all(np.abs(ratios - 1) < 0.12), ratios
    assert abs(np.median(ratios) - 1) < 0.05


def test_the_bootstrap_of_gaps_refuses_bollen_stine_and_says_why(gappy):
    from cfa_tool.reporting.workflow_tables import bootstrap_report

    with pytest.raises(OptionError, match="transformation of rows with gaps .*Enders 2002; Savalei & Yuan 2009.*listwise"):
        cfa_tool.bootstrap(TWO_FACTORS, gappy, replications=10, bollen_stine=True)
    boot = cfa_tool.bootstrap(TWO_FACTORS, gappy, replications=20, seed=2)
    assert boot.bollen_stine_p is None and "not built yet" in boot.bollen_stine_not_computed
    assert boot.to_dict()["result"]["bollen_stine_not_computed"] == boot.bollen_stine_not_computed
    lines = bootstrap_report(boot).lines
    assert "with their gaps, each refitted by full-information ML" in lines[0]
    assert any(line.startswith("No Bollen-Stine p-value: ") for line in lines)
    assert all(np.isfinite(i.bca).all() for i in boot.intervals if i.scale == "unstandardized")
    quiet = cfa_tool.bootstrap(TWO_FACTORS, gappy, replications=20, seed=2, bollen_stine=False)
    assert quiet.bollen_stine_not_computed is None  # not asked for: nothing to explain
    listwise = cfa_tool.bootstrap(TWO_FACTORS, gappy, replications=20, seed=2, missing="listwise")
    assert listwise.fit.method.missing is MissingData.LISTWISE and listwise.bollen_stine_p is not None


def test_resamples_whose_saturated_model_cannot_be_estimated_are_counted_apart(gappy):
    from cfa_tool.workflows.bootstrap import _replicate

    start = cfa_tool.fit(TWO_FACTORS, gappy).theta
    rows = gappy.to_numpy().copy()
    rows[4:, 5] = np.nan  # y6 answered by few rows: many resamples hold fewer than the three answers an item needs
    rows = rows[~np.isnan(rows).all(axis=1)]
    spec = parse_model(TWO_FACTORS)
    draws = _replicate([(spec, rows, NAMES, seed, start, None, True, True) for seed in range(6)])
    assert any(d[4] for d in draws)
    assert all(d[5] == () for d in draws if d[4])  # nothing judged of a resample that could not be analysed
    assert all(not d[0] and d[1] is None for d in draws if d[4])  # counted apart, never as converged


def test_cutoffs_carry_the_missing_data_pattern_over(gappy):
    from cfa_tool.reporting.workflow_tables import cutoffs_report

    cut = cfa_tool.cutoffs(TWO_FACTORS, gappy, replications=20, seed=2, workers=1)
    assert cut.fit.method.missing is MissingData.FULL_INFORMATION and cut.pattern_rows == len(gappy)
    assert cut.converged_correct >= 18
    assert any("The missing-data pattern was carried over" in line for line in cutoffs_report(cut).lines)
    assert cut.to_dict()["result"]["missing_data_patterns_from_rows"] == len(gappy)
    from cfa_tool.workflows.cutoffs import fit_cutoffs

    with pytest.raises(OptionError, match="carry the data's missing-data patterns over"):
        fit_cutoffs(parse_model(TWO_FACTORS), cut.fit, replications=20)
    # the simulated samples hold the data's gaps: every row one of the data's patterns, in their proportions
    from cfa_tool.workflows.cutoffs import carried_gaps

    patterns = gappy.notna().to_numpy()
    simulated = carried_gaps(np.zeros((20000, 6)), patterns, np.random.default_rng(9))
    answered = ~np.isnan(simulated)
    assert {tuple(row) for row in answered} <= {tuple(row) for row in patterns}
    np.testing.assert_allclose(answered.mean(axis=0), patterns.mean(axis=0), atol=0.01)
    complete = answered.all(axis=1).mean()
    assert complete == pytest.approx(patterns.all(axis=1).mean(), abs=0.01)


def test_fixed_covariance_discrepancy_without_gaps_is_the_normal_theory_one(gappy):
    from cfa_tool.data.patterns import pattern_data
    from cfa_tool.estimation.fiml import fixed_covariance_discrepancy
    from cfa_tool.workflows.replication import discrepancy

    rows = gappy.dropna().to_numpy()
    mean = rows.mean(axis=0)
    S = (rows - mean).T @ (rows - mean) / len(rows)
    sigma = 0.5 * np.eye(6) + 0.5
    assert fixed_covariance_discrepancy(pattern_data(rows), sigma, (mean, S)) == pytest.approx(discrepancy(S, sigma),
                                                                                              rel=1e-10)


def _minus_two_log_likelihood(rows: np.ndarray, mean: np.ndarray, sigma: np.ndarray) -> float:
    """-2 log L of rows with gaps, row by row with scipy's multivariate normal (independent of the tool)."""
    from scipy.stats import multivariate_normal

    total = 0.0
    answered = ~np.isnan(rows)
    for o in np.unique(answered, axis=0):  # the rows of one pattern at once
        same = rows[(answered == o).all(axis=1)][:, o]
        total += np.sum(np.atleast_1d(multivariate_normal(mean[o], sigma[np.ix_(o, o)]).logpdf(same)))
    return -2.0 * total


def test_replicate_with_gaps_fits_each_sample_as_fit_does_and_its_cross_validation_index_is_a_likelihood_ratio():
    from scipy.optimize import minimize

    calibration, validation = with_gaps(250, 31), with_gaps(200, 41)
    rep = cfa_tool.replicate(TWO_FACTORS, calibration, validation)
    for result, data in ((rep.calibration_result, calibration), (rep.loose, validation)):
        direct = cfa_tool.fit(TWO_FACTORS, data)
        assert result.method.missing is MissingData.FULL_INFORMATION
        assert result.fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-6)
    # N times the cross-validation index: -2 log L with Sigma fixed at the calibration's and the means maximised, minus that of the
    # saturated model (both maximised here by scipy, from the tool's estimates as starts only)
    rows = validation.to_numpy()
    sigma = rep.calibration_result.implied_covariance
    fixed = minimize(lambda m: _minus_two_log_likelihood(rows, m, sigma), np.nanmean(rows, axis=0), method="BFGS")
    S, m = rep.loose.sample_covariance, rep.loose.groups[0].sample_mean
    lower = np.tril_indices(6)

    def saturated(x: np.ndarray) -> float:
        chol = np.zeros((6, 6))
        chol[lower] = x[6:]
        return _minus_two_log_likelihood(rows, x[:6], chol @ chol.T)

    best = minimize(saturated, np.concatenate([m, np.linalg.cholesky(S)[lower]]), method="BFGS")
    assert best.fun <= _minus_two_log_likelihood(rows, m, S) + 1e-6
    assert rep.loose.n_obs * rep.cvi == pytest.approx(fixed.fun - best.fun, rel=1e-4)
    # the test of one solution in both samples: the two-sample full-information fit against the separate ones, on
    # q = 13 df (4 free loadings, 6 error variances, 2 factor variances and 1 covariance: 21 moments - 8 df)
    assert rep.same_solution.df_difference == 13 and rep.calibration_result.fit.df == 8
    assert rep.same_solution.method == 'likelihood ratio' and 0 < rep.same_solution.p_value < 1
    from cfa_tool.reporting.workflow_tables import replication_report

    assert any(note.startswith("Rows with gaps: a sample whose rows have gaps is fitted by full-information ML")
               for note in replication_report(rep).notes)


def test_split_half_with_gaps_splits_every_row_with_an_answer(gappy):
    first, second = cfa_tool.workflows.replication.split_half(TWO_FACTORS, gappy, seed=3)
    assert first.calibration_result.n_obs + first.loose.n_obs == len(gappy)
    assert first.loose.method.missing is MissingData.FULL_INFORMATION
    assert second.calibration_result.n_obs == first.loose.n_obs


def clustered(clusters: int, size: int, seed: int) -> pd.DataFrame:
    """Rows with gaps in clusters of ``size`` rows sharing a random shift of every item (seeded)."""
    data = with_gaps(clusters * size, seed).iloc[: clusters * size].copy()
    data["school"] = np.repeat(np.arange(clusters), size)[: len(data)]
    shift = np.random.default_rng(seed + 2).normal(0.0, 0.5, clusters)
    data[list(NAMES)] = data[list(NAMES)].add(shift[data["school"].to_numpy()], axis=0)
    return data


def test_a_weighted_refit_of_rows_with_gaps_is_the_fit_of_those_rows_with_their_weights(gappy):
    from cfa_tool.data.sample_design import RowDesign
    from cfa_tool.method import WeightKind
    from cfa_tool.workflows.bootstrap import _resample

    full = cfa_tool.fit(TWO_FACTORS, gappy)
    design = RowDesign(np.ones(len(gappy)) * 2.0, WeightKind.FREQUENCY)  # every record stands for two rows
    sample = _resample(gappy.to_numpy(), NAMES, 5, design, gaps=True)
    [refit] = replicate_fits(parse_model(TWO_FACTORS), [sample], full.theta, full_information=True)
    records = pd.DataFrame(sample.rows, columns=list(NAMES)).assign(count=sample.design.weights)
    direct = cfa_tool.fit(TWO_FACTORS, records, weights="count", weight_kind="frequency")
    assert sample.n_obs == direct.n_obs == 2 * len(gappy)
    np.testing.assert_allclose(refit.values, [r.estimate for r in direct.estimates], atol=1e-6)


def test_cluster_influence_of_rows_with_gaps_matches_the_delete_one_cluster_jackknife():
    """Under clusters each cluster's influence is its rows' weighted influences summed; to first order it is
    the rows left (N - 5) times the cluster's delete-one-cluster jackknife difference (Efron & Tibshirani 1993,
    ch. 11), and the BCa accelerations agree (tolerances set here)."""
    from cfa_tool.data.sample_design import design_columns, row_design
    from cfa_tool.workflows.bootstrap import influence_values

    data = clustered(60, 5, 12)
    rows = data[list(NAMES)].to_numpy()
    design = row_design(data, design_columns(cluster="school"), np.ones(len(data), dtype=bool))
    spec = parse_model(TWO_FACTORS)
    full = cfa_tool.fit(TWO_FACTORS, data, cluster="school")
    assert full.method.missing is MissingData.FULL_INFORMATION
    influence, _ = influence_values(spec, rows, NAMES, full.theta, design)
    assert influence.shape[0] == 60
    schools = data["school"].to_numpy()
    jack = np.array([replicate_fits(spec, [moments_from_rows(rows[schools != c], NAMES, full_information=True)],
                                    full.theta, fit_indices_wanted=False, full_information=True)[0].values
                     for c in range(60)])
    agrees_with_the_jackknife(influence, jack, len(rows) - 5, correlation=0.98, atol=0.01)


def test_a_cluster_bootstrap_of_rows_with_gaps_refits_every_row():
    data = clustered(40, 5, 4)
    boot = cfa_tool.bootstrap(TWO_FACTORS, data, replications=20, seed=3, cluster="school")
    assert boot.fit.method.missing is MissingData.FULL_INFORMATION and boot.fit.n_obs == len(data)
    assert boot.fit.design is not None and boot.converged == 20 and boot.bollen_stine_not_computed
    from cfa_tool.reporting.workflow_tables import bootstrap_report

    # the test that remains is the one the fit reports under the design: the scaled one, with its p-value
    [line] = [x for x in bootstrap_report(boot).lines if x.startswith("No Bollen-Stine p-value")]
    # named as every view names the scaled test under a design (new-user trial s16)
    assert line.endswith(f"the fit's design-based statistic (Yuan-Bentler scaling) "
                         f"(p = .{round(1000 * boot.fit.robust.p_value_scaled):03d}).")


@pytest.mark.parametrize("command", ["bootstrap", "cutoffs", "replicate"])
def test_the_help_of_the_refitting_commands_says_how_rows_with_gaps_are_refitted(command, capsys):
    from cfa_tool.cli import main

    with pytest.raises(SystemExit) as done:  # a bare percent sign in a help text once broke --help
        main([command, "--help"])
    assert done.value.code == 0
    assert "every refit treats the rows as the fit does" in " ".join(capsys.readouterr().out.split())
