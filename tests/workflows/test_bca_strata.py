"""BCa's acceleration when the resamples draw within strata: each unit's influence is centred within its stratum
(the stratified influence values of Davison & Hinkley 1997, sec. 3.7; the acceleration of sec. 5.3), not over all
units (a resample keeps each stratum's share of the rows, so a stratum's mean influence never varies).

Check values: (1) scipy.stats.bootstrap's BCa interval (its acceleration from the jackknife, which for a mean is
exactly the influence-value form) on the same resamples, for one stratum; (2) a stratified jackknife by brute force
(Davison & Hinkley 1997, sec. 3.7 and 5.3, recalled from memory: unit j of stratum h left out and the rest of its
stratum weighted up to keep the stratum's share, l_hj = (n_h - 1)(mean_j t_-hj - t_-hj), a = sum_h n_h^-3 sum_j
l_hj^3 / (6 (sum_h n_h^-2 sum_j l_hj^2)^(3/2))) of the three-factor model of Holzinger & Swineford (1939)."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.language.parser import parse_model
from tests.conftest import THREE_FACTORS


def test_one_stratum_matches_scipys_bca_on_the_same_resamples():
    from scipy import stats

    from cfa_tool.workflows.bootstrap import _bca, acceleration

    x = np.random.default_rng(41).gamma(2.0, size=80)  # skewed, so the acceleration is clearly not zero
    found = stats.bootstrap((x,), np.mean, method="BCa", n_resamples=1999, rng=np.random.default_rng(7))
    influence = (x - x.mean())[:, None]  # the mean's influence values
    a = acceleration(influence, strata=np.zeros(len(x), dtype=int))[0]
    assert a == acceleration(influence)[0] and a > 0.01
    low, high = _bca(found.bootstrap_distribution, float(x.mean()), a)
    assert (low, high) == pytest.approx((found.confidence_interval.low, found.confidence_interval.high), rel=1e-12)


def test_strata_centre_the_influence_within_each_stratum_as_the_stratified_jackknife_does(hs_data):
    from cfa_tool.data.sample_design import RowDesign
    from cfa_tool.method import WeightKind
    from cfa_tool.pipeline.continuous import moments_from_rows, replicate_fit
    from cfa_tool.workflows.bootstrap import acceleration, influence_values, unit_strata

    names = tuple(f"x{i}" for i in range(1, 10))
    rows = hs_data[list(names)].to_numpy(dtype=float)
    spread = np.abs(rows[:, 0] - rows[:, 0].mean())
    strata = (spread > np.quantile(spread, 0.75)).astype(int)  # strata that differ in x1's spread: its variance's
    # influence has a different mean in each, which centring over all units wrongly keeps
    spec = parse_model(THREE_FACTORS)
    full = replicate_fit(spec, moments_from_rows(rows, names))
    design = RowDesign(weights=np.ones(len(rows)), kind=WeightKind.SAMPLING, strata=strata)
    influence, _ = influence_values(spec, rows, names, full.theta, design)
    n = len(rows)
    jack = np.empty((n, len(full.values)))
    for i in range(n):
        mine = strata == strata[i]
        weights = np.where(mine, mine.sum() / (mine.sum() - 1), 1.0)
        keep = np.arange(n) != i
        jack[i] = replicate_fit(spec, moments_from_rows(rows[keep], names, weights=weights[keep]),
                                start=full.theta).values
    varying = np.ptp(jack, axis=0) > 0
    cubes = squares = 0.0
    for h in np.unique(strata):
        n_h = int((strata == h).sum())
        part = jack[strata == h][:, varying]
        l = (n_h - 1) * (part.mean(axis=0) - part)
        cubes, squares = cubes + (l**3).sum(axis=0) / n_h**3, squares + (l**2).sum(axis=0) / n_h**2
    exact = cubes / (6 * squares**1.5)
    ours = acceleration(influence, None, unit_strata(design))[varying]
    np.testing.assert_allclose(ours, exact, atol=3e-3)  # first order, as without strata (the jackknife test's 2e-3)
    # centred over all units, the acceleration of x1's variance is off by far more than that
    assert np.abs(acceleration(influence)[varying] - exact).max() > 3 * 3e-3


def test_unit_strata_follow_the_units_of_the_resampling():
    from cfa_tool.data.sample_design import RowDesign
    from cfa_tool.method import WeightKind
    from cfa_tool.workflows.bootstrap import sampling_units, unit_strata

    strata = np.array([2, 0, 2, 1, 0, 2])
    clusters = np.array([5, 1, 5, 3, 4, 6])
    design = RowDesign(weights=np.ones(6), kind=WeightKind.SAMPLING, clusters=clusters, strata=strata)
    units = [rows for stratum in sampling_units(design) for rows in stratum]
    assert unit_strata(design).tolist() == [int(strata[rows[0]]) for rows in units] == [0, 0, 1, 2, 2]
    counted = RowDesign(weights=np.array([1.0, 2, 1, 3, 1, 1]), kind=WeightKind.FREQUENCY, strata=strata)
    assert unit_strata(counted).tolist() == strata.tolist()  # records are the lines, each counted by its weight
    assert unit_strata(RowDesign(weights=np.ones(6), kind=WeightKind.SAMPLING)) is None
