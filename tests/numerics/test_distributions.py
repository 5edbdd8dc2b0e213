"""The distribution functions of numerics/distributions.py (numpy and math only) against scipy.special (and, for
the noncentral chi-square's upper tail, which scipy.special has only as 1 - cdf, against scipy.stats.ncx2.sf), over
wide grids: relative 1e-10 wherever the reference value is above 1e-300."""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy import special, stats

from cfa_tool.assessment.fit_indices import rmsea_interval
from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.roots import increasing_root

ROOT = Path(__file__).resolve().parents[2]
RELATIVE = 1e-10
SMALLEST = 1e-300

#: degrees of freedom from half a degree to those of a model of 240 items, whole and not (scaled tests)
DFS = [0.5, 0.7, 1.0, 1.3, 2.0, 3.0, 7.5, 24.0, 50.5, 100.0, 333.3, 1000.0, 5000.0, 12345.6, 30000.0]


def close(mine, reference, relative=RELATIVE, smallest=SMALLEST):
    """Both arrays equal within ``relative`` where the reference is above ``smallest`` (below it scipy's values
    underflow to 0 where the true ones do not: test_far_lower_tail_of_the_noncentral_chi_square)."""
    mine, reference = np.asarray(mine, dtype=float), np.asarray(reference, dtype=float)
    assert mine.shape == reference.shape
    big = reference > smallest
    assert big.sum() >= len(big) // 2
    error = np.abs(mine[big] - reference[big]) / reference[big]
    assert error.max(initial=0.0) < relative, (error.max(), reference[big][np.argmax(error)])


def chi_square_points(df: float) -> np.ndarray:
    """x from 1e-8 to far into both tails: fractions and multiples of df and steps of its standard deviation."""
    sd = math.sqrt(2 * df)
    x = np.concatenate([[1e-8, 1e-6, 1e-4, 0.01, 0.5], np.geomspace(1e-3, 3, 25) * df,
                        df + np.linspace(-15, 40, 56) * sd, [5 * df, 10 * df + 100, 30 * df + 700]])
    return x[x > 0]


@pytest.mark.parametrize("df", DFS)
def test_chi_square_tails_as_scipy(df):
    x = chi_square_points(df)
    close(dist.chi2_sf(x, df), special.chdtrc(df, x))
    close(dist.chi2_cdf(x, df), special.chdtr(df, x))


def test_chi_square_upper_tail_of_arrays_with_whole_df_as_scipy():
    """Arrays with whole df (rows' Mahalanobis distances on as many df as items answered) take the finite sums at
    once: the same values as scipy's and as the one-at-a-time sums."""
    rng = np.random.default_rng(20261204)
    df = rng.integers(1, dist.WHOLE_DF_SUMMED + 1, 3000)
    x = df * rng.uniform(0.0, 4.0, 3000) + rng.uniform(0.0, 1e-3, 3000)
    x[:40] = np.geomspace(1e-8, 1e3, 40)
    close(dist.chi2_sf(x, df), special.chdtrc(df, x))
    few = slice(0, 3000, 37)
    close(dist.chi2_sf(x[few], df[few]), [dist.chi2_sf(float(a), int(b)) for a, b in zip(x[few], df[few])],
          relative=1e-12)
    for df in range(1, dist.WHOLE_DF_SUMMED + 1, 13):  # one df for every x (complete rows): its own route
        x = chi_square_points(df)
        close(dist.chi2_sf(x, df), special.chdtrc(df, x))
        assert np.array_equal(dist.chi2_sf(x, df), dist.chi2_sf(x, np.full(len(x), df)))  # the same numbers
    edges = dist.chi2_sf(np.array([np.nan, np.inf, -2.0, 0.0]), np.array([3, 3, 4, 5]))
    assert math.isnan(edges[0]) and edges[1] == 0.0 and edges[2] == edges[3] == 1.0


@pytest.mark.parametrize("df", [0.5, 1.0, 2.7, 24.0, 1000.0, 30000.0])
def test_chi_square_quantiles_as_scipy(df):
    lower = np.array([1e-300, 1e-100, 1e-20, 1e-8, 1e-3, 0.05, 0.3, 0.5])
    # the lower quantiles from the inverse of the regularized lower incomplete gamma function (exact in the far
    # lower tail, where 1 - q rounds to 1); the upper ones from the inverse of the upper tail
    close(dist.chi2_ppf(lower, df), 2 * special.gammaincinv(df / 2, lower))
    tails = np.array([0.3, 0.05, 1e-3, 1e-8, 1e-12])
    close(dist.chi2_ppf(1 - tails, df), special.chdtri(df, 1 - (1 - tails)))


NONCENTRALITIES = [1e-6, 0.3, 1.0, 10.0, 87.3, 1000.0, 1e4, 1e5]


@pytest.mark.parametrize("df", [0.5, 1.0, 2.7, 5.0, 24.0, 100.5, 1000.0, 30000.0])
@pytest.mark.parametrize("nc", NONCENTRALITIES)
def test_noncentral_chi_square_as_scipy(df, nc):
    mean, sd = df + nc, math.sqrt(2 * (df + 2 * nc))
    x = np.concatenate([[1e-8, 1e-3, 0.5], mean + np.linspace(-15, 15, 31) * sd, [3 * mean, 10 * mean]])
    x = x[x > 0]
    close(dist.ncx2_cdf(x, df, nc), special.chndtr(x, df, nc))
    # the upper tail: scipy.special has it only as 1 - cdf, exact to 1e-10 where it is above 1e-4 ...
    reference = 1 - special.chndtr(x, df, nc)
    kept = reference > 1e-4
    close(dist.ncx2_sf(x[kept], df, nc), reference[kept])
    # ... and scipy.stats computes it as the complement of the mixture (checked where that is above 1e-250; it
    # overflows at x = 1e-8 for large noncentralities, where the upper tail is 1)
    close(dist.ncx2_sf(x[1:], df, nc), stats.ncx2.sf(x[1:], df, nc), smallest=1e-250)


@pytest.mark.parametrize("nc", [1.0, 100.0, 1000.0, 1200.0])
def test_far_lower_tail_of_the_noncentral_chi_square(nc):
    # with 2 df the cdf is the sum over j of Poisson(nc / 2) weights times P(j + 1, x / 2) (Johnson, Kotz &
    # Balakrishnan 1995, eq. 29.2), P(j + 1, y) = e^-y sum over k of y^(j+1+k) / (j+1+k)! (Abramowitz & Stegun 1964,
    # 6.5.29): here summed term by term in logarithms, down to 1e-261, where scipy's cdf underflows to 0
    mu = nc / 2
    for x in (1e-8, 1e-3):
        y = x / 2
        expected = math.fsum(math.exp(-mu + j * math.log(mu) - math.lgamma(j + 1) - y + (j + 1 + k) * math.log(y)
                                      - math.lgamma(j + 2 + k)) for j in range(60) for k in range(12))
        assert expected > 1e-300
        assert float(dist.ncx2_cdf(x, 2.0, nc)) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("df", [0.5, 1.0, 3.5, 24.0, 1500.0, 28000.0])
def test_noncentrality_for_a_cdf_value_as_scipy(df):
    for x in (0.5 * df, df, df + 3 * math.sqrt(2 * df), 2 * df + 10, 5 * df + 50):
        for p in (1e-12, 1e-6, 0.05, 0.5, 0.95, 1 - 1e-6):
            reference = special.chndtrinc(x, df, p)
            mine = dist.ncx2_noncentrality(x, df, p)
            if special.chdtr(df, x) < p:  # no noncentrality gives p: scipy returns a number near 0
                assert math.isnan(mine) and reference < 1e-300
            else:
                assert mine == pytest.approx(reference, rel=RELATIVE, abs=1e-10), (x, p)


@pytest.mark.parametrize("df", [1.0, 2.5, 24.0, 1000.0, 28000.0])
@pytest.mark.parametrize("nc", [0.7, 30.0, 1000.0, 1e4])
def test_noncentral_quantiles_as_scipy(df, nc):
    q = np.array([1e-6, 1e-3, 0.05, 0.5, 0.95, 1 - 1e-3, 1 - 1e-6])
    close(dist.ncx2_ppf(q, df, nc), special.chndtrix(q, df, nc), relative=1e-9)
    # far into the tails scipy's inverse is not exact; the quantiles are checked by their cdf there
    for tiny in (1e-300, 1e-100, 1e-20):
        assert float(dist.ncx2_cdf(dist.ncx2_ppf(tiny, df, nc), df, nc)) == pytest.approx(tiny, rel=1e-9)
    for tail in (1e-12, 1e-20):
        assert float(dist.ncx2_sf(dist.ncx2_ppf(1 - tail, df, nc), df, nc)) == pytest.approx(tail, rel=1e-3)


def test_normal_as_scipy():
    x = np.concatenate([np.linspace(-38, 38, 761), [-1e-300, 0.0, 1e-300, 1e-8]])
    close(dist.norm_cdf(x), special.ndtr(x), relative=1e-13)
    close(dist.norm_sf(x), special.ndtr(-x), relative=1e-13)
    p = np.concatenate([[1e-300, 1e-200, 1e-50, 1e-20, 1e-10], np.linspace(1e-6, 1 - 1e-6, 199),
                        [1 - 1e-10, 1 - 1e-15, 0.5]])
    mine, reference = dist.norm_ppf(p), special.ndtri(p)
    assert np.allclose(mine, reference, rtol=1e-13, atol=1e-15)
    assert dist.norm_ppf(0.0) == -np.inf and dist.norm_ppf(1.0) == np.inf


def test_scalars_arrays_and_nan():
    assert isinstance(dist.chi2_sf(3.0, 2), np.floating) and isinstance(dist.norm_ppf(0.3), np.floating)
    assert dist.chi2_sf(np.ones((2, 3)), np.array([1, 2, 3])).shape == (2, 3)
    assert dist.norm_cdf(np.zeros((4, 2))).shape == (4, 2)
    for value in (dist.chi2_sf(np.nan, 3), dist.chi2_cdf(2.0, np.nan), dist.chi2_ppf(np.nan, 3),
                  dist.ncx2_cdf(np.nan, 3, 1.0), dist.ncx2_sf(2.0, 3, np.nan), dist.ncx2_ppf(0.5, 3, np.nan),
                  dist.ncx2_noncentrality(np.nan, 3, 0.5), dist.norm_cdf(np.nan), dist.norm_sf(np.nan),
                  dist.norm_ppf(np.nan), dist.chi2_ppf(1.5, 3), dist.norm_ppf(-0.1)):
        assert math.isnan(value)
    out = dist.chi2_sf(np.array([1.0, np.nan, 4.0]), 2)
    assert math.isnan(out[1]) and out[0] == pytest.approx(math.exp(-0.5), rel=1e-15)  # chi-square(2): e^(-x/2)
    assert dist.chi2_sf(np.inf, 3) == 0.0 and dist.chi2_cdf(0.0, 3) == 0.0 and dist.chi2_sf(-1.0, 3) == 1.0
    assert dist.ncx2_cdf(5.0, 3, np.inf) == 0.0 and dist.ncx2_sf(5.0, 3, np.inf) == 1.0


def test_chi_square_of_one_and_two_df_in_closed_form():
    # upper tails of chi-square(1) at x: erfc(sqrt(x / 2)); of chi-square(2): exp(-x / 2) (Abramowitz & Stegun
    # 1964, section 26.4)
    for x in (1e-6, 0.3, 3.84, 40.0, 1000.0):
        assert float(dist.chi2_sf(x, 1)) == pytest.approx(math.erfc(math.sqrt(x / 2)), rel=1e-14)
        assert float(dist.chi2_sf(x, 2)) == pytest.approx(math.exp(-x / 2), rel=1e-14)
    # the 95% point of chi-square(1) is 1.959964^2 (common tables)
    assert float(dist.chi2_ppf(0.95, 1)) == pytest.approx(1.959963984540054**2, rel=1e-13)


def test_rmsea_interval_of_the_published_check_unchanged():
    # Holzinger & Swineford (1939), three factors: chi-square 85.306 on 24 df, N = 301; RMSEA 90% interval
    # (0.071, 0.114) (recalled from memory of widely published analyses; tests/pipeline/
    # test_holzinger_swineford_published.py).  The interval as scipy.special's inverse in the noncentrality gave it.
    low, high = rmsea_interval(85.306, 24, 301)
    scale = 24 * 301
    assert low == pytest.approx(math.sqrt(special.chndtrinc(85.306, 24, 0.95) / scale), rel=1e-12)
    assert high == pytest.approx(math.sqrt(special.chndtrinc(85.306, 24, 0.05) / scale), rel=1e-12)
    assert (round(low, 3), round(high, 3)) == (0.071, 0.114)


def test_roots_of_increasing_functions():
    root = increasing_root(lambda x: (math.log(x) - math.log(7.0), 1.0 / x), 1e-3, low=0.0, largest_step=10.0)
    assert root == pytest.approx(7.0, rel=1e-14)
    assert increasing_root(lambda x: (x**3 - 8.0, 3 * x * x), 100.0) == pytest.approx(2.0, rel=1e-14)


def test_importing_and_calling_them_leaves_scipy_special_unloaded():
    """The report's p-values and intervals cost no import of scipy.special (about 0.1 s at every start)."""
    code = ("import sys\n"
            "from cfa_tool.numerics import distributions as d\n"
            "d.chi2_sf(3.0, 2); d.chi2_cdf(3.0, 2); d.chi2_ppf(0.9, 2); d.ncx2_cdf(3.0, 2, 1.0)\n"
            "d.ncx2_sf(3.0, 2, 1.0); d.ncx2_ppf(0.9, 2, 1.0); d.ncx2_noncentrality(9.0, 2, 0.5)\n"
            "d.norm_cdf(0.3); d.norm_sf([0.3]); d.norm_ppf(0.3); d.norm_pdf(0.3); d.boundary_mixture_sf(2.0, 2)\n"
            "slow = ('scipy.special', 'scipy.stats', 'scipy.optimize')\n"
            "print(sorted(m for m in sys.modules if m.startswith(slow)))\n")
    done = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "[]"


def test_the_noncentrality_always_has_newtons_root_where_one_exists():
    """The RMSEA's bounds have one root-finder (Brent's fallback behind it was dropped: no case reached it): over a
    grid from a hundredth of a degree of freedom to 1e5, x from 1e-10 to 1e6 and p from 1e-300 to 1 - 1e-15,
    wherever the central cdf at x is above p (else no noncentrality gives p), Newton's root is finite and the cdf
    there is p; scipy.special's inverse is not exact that far out, so the root is checked by the cdf (the cdf
    itself is checked against scipy above)."""
    found = 0
    for df in (0.01, 0.5, 1.0, 7.5, 24.0, 1000.0, 1e5):
        for x in (1e-10, 1e-4, 1.0, 100.0, 1e4, 1e6):
            for p in (1e-300, 1e-8, 0.05, 0.5, 0.95, 1 - 1e-8, 1 - 1e-15):
                central = float(dist.chi2_cdf(x, df))
                if not central > p:
                    continue
                nc = dist.ncx2_noncentrality(x, df, p)
                assert math.isfinite(nc) and nc > 0.0, (x, df, p)
                assert nc == dist.ncx2_noncentrality(x, df, p, central)  # the central cdf given: the same root
                if p < 0.5:
                    assert float(dist.ncx2_cdf(x, df, nc)) == pytest.approx(p, rel=1e-8), (x, df, p)
                else:
                    assert float(dist.ncx2_sf(x, df, nc)) == pytest.approx(1 - p, rel=1e-8), (x, df, p)
                found += 1
    assert found > 150


def test_the_noncentrality_at_the_ends():
    """p = 0: the cdf at x > 0 falls to 0 only as the noncentrality grows without bound, so the root is its limit,
    infinity (a 100 % interval of the RMSEA reaches infinity); at x = 0 the cdf is 0 whatever the noncentrality,
    and at x = infinity it is 1: no root, NaN.  A chi-square that is NaN gives an interval of NaN, no error."""
    assert dist.ncx2_noncentrality(5.0, 3.0, 0.0) == math.inf
    assert math.isnan(dist.ncx2_noncentrality(0.0, 3.0, 0.0))
    assert math.isnan(dist.ncx2_noncentrality(math.inf, 3.0, 0.05))
    assert rmsea_interval(85.306, 24, 301, level=1.0) == (0.0, math.inf)
    low, high = rmsea_interval(float("nan"), 24, 301)
    assert math.isnan(low) and math.isnan(high)


def test_the_central_terms_shared_by_a_roots_steps_change_nothing():
    """A root's steps in the noncentrality reuse the central terms of their window (the memo of
    _poisson_mixture): the same sums, to the last digit, as computed afresh."""
    y, a = 85.306 / 2, 12.0
    for upper in (False, True):
        memo: dict = {}
        for mu in (18.0, 18.4, 18.42, 18.4235, 46.7, 46.68):
            assert dist._poisson_mixture(y, a, mu, upper, memo) == dist._poisson_mixture(y, a, mu, upper)
        assert len(memo) < 6  # nearby noncentralities share a window


def test_newton_root_without_convergence_is_nan():
    # a root never reached in the iterations allowed (a step of at most 1 towards a root at 1000): NaN, which the
    # RMSEA bound's caller takes for "no direct answer"
    assert math.isnan(increasing_root(lambda x: (x - 1000.0, 1.0), 0.0, largest_step=1.0, iterations=10))
