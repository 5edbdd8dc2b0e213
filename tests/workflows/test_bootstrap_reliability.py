"""The bootstrap's intervals of the reliability a fit reports (workflows.bootstrap, assessment.reliability_intervals).

Check values come from outside the code under test: Cronbach's (1951) alpha by numpy's direct formula
k / (k - 1) (1 - sum of item variances / variance of the sum) on each resample's rows; the BCa acceleration against
the jackknife's, a = sum d^3 / (6 (sum d^2)^(3/2)) with d the mean of the leave-one-out values minus each (Efron &
Tibshirani 1993, eq. 14.15), alpha's leave-one-out values again by numpy's formula; Holzinger & Swineford's (1939)
data as the worked example, whose alphas (.63 visual, .88 textual, .69 speed) are recalled from memory of widely
published analyses.  The comparison of each resample's omega with an independent fit is in
tests/semopy/test_bootstrap_reliability_against_semopy.py.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from cfa_tool.assessment.reliability_intervals import Coefficient, Withheld, of_fit_sums
from cfa_tool.workflows.bootstrap import _replicate, bootstrap, fit_keys
from tests.conftest import THREE_FACTORS

ITEMS = {"visual": ["x1", "x2", "x3"], "textual": ["x4", "x5", "x6"], "speed": ["x7", "x8", "x9"]}


def _alpha(x: np.ndarray) -> float:
    """Cronbach's (1951) alpha by its direct formula (numpy)."""
    k = x.shape[1]
    return k / (k - 1) * (1 - x.var(axis=0, ddof=1).sum() / x.sum(axis=1).var(ddof=1))


@pytest.fixture(scope="module")
def hs_boot(hs_data):
    return bootstrap(THREE_FACTORS, hs_data, replications=200, seed=5)


def test_holzinger_swineford_alphas_and_intervals(hs_boot):
    found = {(i.factor, i.coefficient): i for i in hs_boot.reliability}
    # alpha recalled from memory of published analyses of these data: .63, .88, .69
    for factor, recalled in (("visual", 0.63), ("textual", 0.88), ("speed", 0.69)):
        alpha = found[(factor, Coefficient.ALPHA)]
        assert alpha.estimate == pytest.approx(recalled, abs=0.005)
        omega = found[(factor, Coefficient.OMEGA)]
        for i in (alpha, omega):
            assert i.available
            assert i.percentile[0] < i.estimate < i.percentile[1]
            assert i.bca[0] < i.estimate < i.bca[1]
            assert 0 < i.bootstrap_se < 0.1
    # the fit's own reliability rows are the estimates
    for r in hs_boot.fit.groups[0].reliability:
        assert found[(r.factor, Coefficient.OMEGA)].estimate == r.omega
        assert found[(r.factor, Coefficient.ALPHA)].estimate == r.alpha


def test_each_resample_alpha_is_numpys_on_its_rows_and_intervals_are_their_percentiles(hs_data, hs_boot):
    """Each resample's alpha, from its refit by the fit's own function, against numpy's formula on the resample's
    rows (drawn from the resample's seed as the bootstrap draws them); the percentile interval of 200 of them."""
    from cfa_tool.language.parser import parse_model

    spec = parse_model(THREE_FACTORS)
    rows = hs_data[[x for items in ITEMS.values() for x in items]].to_numpy(float)
    names = tuple(hs_boot.fit.observed)
    keys = fit_keys(spec, hs_boot.fit)
    seeds = np.random.SeedSequence(5).generate_state(400)[:200]
    tasks = [(spec, rows, names, int(s), hs_boot.fit.theta, None, False, True, keys) for s in seeds]
    draws = _replicate(tasks)
    assert all(d[0] for d in draws)
    for factor, items in ITEMS.items():
        cols = [names.index(x) for x in items]
        mine = np.array([d[6][(factor, Coefficient.ALPHA)] for d in draws])
        direct = np.array([_alpha(rows[np.random.default_rng(int(s)).integers(0, len(rows), len(rows))][:, cols])
                           for s in seeds])
        np.testing.assert_allclose(mine, direct, rtol=1e-10)
        interval = next(i for i in hs_boot.reliability if i.factor == factor and i.coefficient is Coefficient.ALPHA)
        assert interval.percentile == pytest.approx(tuple(np.percentile(direct, [2.5, 97.5])), rel=1e-10)
        assert interval.bootstrap_se == pytest.approx(np.std(direct, ddof=1), rel=1e-10)


def test_alpha_acceleration_is_the_jackknifes(hs_data, hs_boot):
    """BCa's acceleration of alpha from each row's influence (the chain rule through vech(S)) against the
    jackknife's (Efron & Tibshirani 1993, eq. 14.15), leave-one-out alphas by numpy's formula: the influence is the
    jackknife's limit, equal to O(1/N)."""
    from cfa_tool.language.parser import parse_model
    from cfa_tool.workflows.bootstrap import _influences, reliability_acceleration

    spec = parse_model(THREE_FACTORS)
    fit = hs_boot.fit
    rows = hs_data[list(fit.observed)].to_numpy(float)
    _, _, influence_theta, influence_moments = _influences(spec, rows, tuple(fit.observed), fit.theta)
    accel = reliability_acceleration(spec, rows, tuple(fit.observed), fit.theta, None, False, influence_theta,
                                     influence_moments, fit)
    n = len(rows)
    for factor, items in ITEMS.items():
        x = hs_data[items].to_numpy(float)
        leave_out = np.array([_alpha(np.delete(x, i, axis=0)) for i in range(n)])
        d = leave_out.mean() - leave_out
        jackknife = (d**3).sum() / (6 * (d**2).sum() ** 1.5)
        assert accel[(factor, Coefficient.ALPHA)] == pytest.approx(jackknife, rel=0.05, abs=2e-3)


def test_omega_acceleration_is_the_jackknifes(hs_data, hs_boot):
    """BCa's acceleration of omega (the chain rule through the estimates) against the jackknife's, each
    leave-one-out omega from a refit of the other 300 rows (Efron & Tibshirani 1993, eq. 14.15)."""
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import model_structure, moments_from_rows, ordered_moments, replicate_fits
    from cfa_tool.workflows.bootstrap import _influences, reliability_acceleration, resample_reliability

    spec = parse_model(THREE_FACTORS)
    fit = hs_boot.fit
    names = tuple(fit.observed)
    rows = hs_data[list(names)].to_numpy(float)
    _, _, influence_theta, influence_moments = _influences(spec, rows, names, fit.theta)
    accel = reliability_acceleration(spec, rows, names, fit.theta, None, False, influence_theta, influence_moments,
                                     fit)
    samples = [moments_from_rows(np.delete(rows, i, axis=0), names) for i in range(len(rows))]
    fits = replicate_fits(spec, samples, fit.theta, fit_indices_wanted=False)
    table, model = model_structure(spec, None, False)
    keys = fit_keys(spec, fit)
    omegas = [resample_reliability(spec, table, model, f.theta, ordered_moments(m, table.observed).covariance, keys)
              for f, m in zip(fits, samples)]
    for factor in ITEMS:
        leave_out = np.array([o[(factor, Coefficient.OMEGA)] for o in omegas])
        d = leave_out.mean() - leave_out
        jackknife = (d**3).sum() / (6 * (d**2).sum() ** 1.5)
        assert accel[(factor, Coefficient.OMEGA)] == pytest.approx(jackknife, rel=0.05, abs=2e-3)


def test_a_resample_of_the_rows_themselves_gives_the_fits_reliability_with_gaps(hs_data):
    """One rule: the function each resample's coefficients come from gives, at the fit's estimates and moments, the
    fit's own coefficients, for a full-information fit too (rows with gaps, the saturated moments by EM)."""
    import cfa_tool
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import model_structure
    from cfa_tool.workflows.bootstrap import resample_reliability

    data = hs_data.copy()
    rng = np.random.default_rng(11)
    for x in ("x2", "x5", "x9"):
        data.loc[rng.choice(len(data), 15, replace=False), x] = np.nan
    fit = cfa_tool.fit(THREE_FACTORS, data)
    spec = parse_model(THREE_FACTORS)
    table, model = model_structure(spec, None, True)
    found = resample_reliability(spec, table, model, fit.theta, fit.groups[0].sample_covariance, fit_keys(spec, fit))
    for r in fit.groups[0].reliability:
        assert found[(r.factor, Coefficient.OMEGA)] == pytest.approx(r.omega, rel=1e-12)
        assert found[(r.factor, Coefficient.ALPHA)] == pytest.approx(r.alpha, rel=1e-12)


def test_with_gaps_alphas_acceleration_is_the_jackknifes_of_the_em_covariances(hs_data):
    """Rows with gaps: alpha comes from the saturated EM covariances; BCa's acceleration from each row's influence on
    them (workflows.bootstrap.saturated_influence) against the jackknife's, each leave-one-out alpha by numpy's
    formula on the EM covariances of the other rows (Efron & Tibshirani 1993, eq. 14.15); and the bootstrap of such
    rows gives every coefficient a BCa interval."""
    from cfa_tool.data.moments import moments_with_gaps
    from cfa_tool.language.parser import parse_model
    from cfa_tool.workflows.bootstrap import _influences, reliability_acceleration

    data = hs_data.copy()
    rng = np.random.default_rng(3)
    for x in ("x2", "x4", "x8"):
        data.loc[rng.choice(len(data), 25, replace=False), x] = np.nan
    spec = parse_model(THREE_FACTORS)
    boot = bootstrap(THREE_FACTORS, data, replications=20, seed=2, bollen_stine=False)
    fit = boot.fit
    names = tuple(fit.observed)
    rows = data[list(names)].to_numpy(float)
    _, _, influence_theta, influence_moments = _influences(spec, rows, names, fit.theta)
    accel = reliability_acceleration(spec, rows, names, fit.theta, None, True, influence_theta, influence_moments, fit)
    left_out = [moments_with_gaps(np.delete(rows, i, axis=0), names, "<jackknife>").covariance
                for i in range(len(rows))]
    for factor, items in ITEMS.items():
        idx = [names.index(x) for x in items]
        leave_out = np.array([len(idx) / (len(idx) - 1) * (1 - np.trace(S[np.ix_(idx, idx)]) / S[np.ix_(idx, idx)].sum())
                              for S in left_out])
        d = leave_out.mean() - leave_out
        jackknife = (d**3).sum() / (6 * (d**2).sum() ** 1.5)
        assert accel[(factor, Coefficient.ALPHA)] == pytest.approx(jackknife, rel=0.05, abs=2e-3)
    for i in boot.reliability:
        assert i.available and i.percentile[0] < i.percentile[1] and i.bca[0] < i.bca[1]


def _tables(boot):
    from cfa_tool.reporting.workflow_tables import bootstrap_report

    return bootstrap_report(boot).tables


MISKEYED = THREE_FACTORS + "reversed x2 on 0 to 10\n"


def test_a_reliability_the_fit_withholds_is_withheld_with_the_reason(hs_data):
    """x2 loads with x1 and x3 but is declared reversed: the fit names the contradiction first and its keyed sum
    describes no scale, so visual's omega and alpha get no interval; the other factors keep theirs."""
    from cfa_tool.assessment.admissibility import ProblemKind

    boot = bootstrap(MISKEYED, hs_data, replications=20, seed=4, bollen_stine=False)
    assert any(p.kind is ProblemKind.KEYING_AGAINST_LOADINGS for p in boot.fit.problems)
    for i in boot.reliability:
        if i.factor == "visual":
            assert i.withheld is Withheld.KEYING and not i.available and math.isnan(i.percentile[0])
        else:
            assert i.withheld is None and i.available
    table = next(t for t in _tables(boot) if t.key == "bootstrap_reliability")
    assert [row[4] for row in table.rows if row[0] == "visual"] == ["withheld", "withheld"]
    assert "Withheld for visual, as the fit withholds its reliability: its loadings contradict" in str(table.note)
    out = boot.to_dict()["result"]["reliability_intervals"]
    assert [d["withheld"] for d in out if d["factor"] == "visual"] == [Withheld.KEYING.value] * 2
    # no value of a withheld coefficient in any view (hostile s24b: the estimate column printed omega and alpha)
    assert [row[2] for row in table.rows if row[0] == "visual"] == ["withheld", "withheld"]
    assert [d.get("estimate") for d in out if d["factor"] == "visual"] == [None, None]


def test_a_resample_keyed_otherwise_gives_no_value():
    """An ordinal resample keys its sums by its own loadings' signs: a coefficient of a sum keyed otherwise than the
    fit's is not a value of the fit's (of_fit_sums)."""
    from cfa_tool.assessment.reliability import FactorReliability

    fit_rows = [FactorReliability("a", ("u", "v", "w"), "first-order", .8, .8, None, .8, .5, .7, None, None, ("w",))]
    same = of_fit_sums((("a", Coefficient.OMEGA, 0.75, ("w",)),), fit_rows)
    other = of_fit_sums((("a", Coefficient.OMEGA, 0.2, ()),), fit_rows)
    assert same[("a", Coefficient.OMEGA)] == 0.75 and math.isnan(other[("a", Coefficient.OMEGA)])


def test_ordinal_bootstrap_gives_the_omega_of_the_answers_sum(hs_data):
    data = hs_data[[x for items in ITEMS.values() for x in items]].copy()
    for x in data:  # each item cut into four answers at its quartiles
        data[x] = np.searchsorted(np.quantile(data[x], [0.25, 0.5, 0.75]), data[x], side="right") + 1
    boot = bootstrap(THREE_FACTORS, data, replications=20, seed=6, ordinal="all")
    kinds = {(i.factor, i.coefficient) for i in boot.reliability}
    assert ("textual", Coefficient.SUM_OMEGA) in kinds and ("textual", Coefficient.ALPHA) in kinds
    sums = {r.factor: r.observed_sum_omega for r in boot.fit.groups[0].reliability}
    for i in boot.reliability:
        if i.coefficient is Coefficient.SUM_OMEGA:
            assert i.estimate == sums[i.factor]
            assert i.percentile[0] < i.estimate < i.percentile[1] or not i.available
    table = next(t for t in _tables(boot) if t.key == "bootstrap_reliability")
    assert "BCa" not in table.columns and "latent-response omega" in [row[1] for row in table.rows]
