"""Omega of a keyed sum whose items also load on another, correlated factor (hostile trial s22: an item reversed in a
factor's sum for a cross-loading of -.07 gave omega .86 beside omega total .66 for the same sum, in the table, the
methods paragraph and the item sums' standard error of measurement).

Omega is the share of the keyed sum's variance that its factor accounts for, Var(E[X | f]) / Var(X), the squared
correlation of the sum X with f; for items that measure f alone it is McDonald's (1999) (sum k lambda)^2 phi / Var(X).
Checked against a Monte Carlo draw of the population (numpy's own normal generator and corrcoef, 400,000 rows: the
squared correlation of the keyed sum with the factor to about +-0.003) and against McDonald's formula by hand; and
never above omega total (Raykov & Shrout 2002's share due to all factors) nor the sum's validity squared."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.reliability import reliability
from cfa_tool.model.implied import ModelMatrices
from cfa_tool.resources import resource_dir

ITEMS = ("a1", "a2", "a3", "a4", "b1", "b2", "b3")
FACTORS = ("a", "b")


def _population(cross: float) -> ModelMatrices:
    """Two factors correlated .5; a4 loads .6 on b and ``cross`` on a; residual variances make items of variance 1
    (unit factor variances)."""
    L = np.zeros((7, 2))
    L[:3, 0] = [0.7, 0.6, 0.65]
    L[3] = [cross, 0.6]
    L[4:, 1] = [0.7, 0.6, 0.5]
    P = np.array([[1.0, 0.5], [0.5, 1.0]])
    common = np.einsum("ij,jk,ik->i", L, P, L)
    T = np.diag(1.0 - common)
    return ModelMatrices(L, np.zeros((2, 2)), P, T, np.zeros(7), np.zeros(2))


def _monte_carlo_share(mats: ModelMatrices, keys: np.ndarray, factor: int, n: int = 400_000) -> float:
    rng = np.random.default_rng(2026)
    eta = rng.multivariate_normal(np.zeros(2), mats.P, size=n)
    e = rng.multivariate_normal(np.zeros(7), mats.T, size=n)
    x = eta @ mats.L.T + e
    return float(np.corrcoef(x @ keys, eta[:, factor])[0, 1] ** 2)


def test_a_reversed_cross_loading_item_lowers_omega_as_the_population_does():
    # a cross-loading of -.25: large enough for its sign to key the item (one of -.07, s22's, is a weak item's now,
    # below .20 in size, and keeps its answers as given: tests/assessment/test_keying_split_and_weak_items.py)
    mats = _population(-0.25)
    found = {r.factor: r for r in reliability(mats, ITEMS, FACTORS, None)[0]}
    a = found["a"]
    assert a.reversed == ("a4",)  # reversed in a's sum by the sign of its cross-loading
    keys = np.array([1.0, 1.0, 1.0, -1.0, 0.0, 0.0, 0.0])
    assert a.omega == pytest.approx(_monte_carlo_share(mats, keys, 0), abs=0.004)
    assert a.omega <= a.omega_total + 1e-12
    # what the old formula gave: (sum k lambda_a)^2 phi_aa / Var, above omega total
    sigma = mats.implied_covariance()
    old = (keys @ mats.L[:, 0]) ** 2 / (keys @ sigma @ keys)
    assert old > a.omega_total > a.omega


def test_items_of_one_factor_keep_mcdonalds_omega():
    mats = _population(0.0)  # a4 measures b alone
    a = next(r for r in reliability(mats, ITEMS, FACTORS, None)[0] if r.factor == "a")
    lam = np.array([0.7, 0.6, 0.65])
    by_hand = lam.sum() ** 2 / (lam.sum() ** 2 + (1 - lam**2).sum())  # McDonald (1999), items of variance 1
    assert a.omega == pytest.approx(by_hand, rel=1e-12)


@pytest.mark.parametrize("ordinal", [False, True])
def test_the_demo_with_a_cross_loading_reports_no_omega_above_omega_total(ordinal):
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")  # invented data (fictional transit agency)
    model = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer, clean\n"
             "factor comfort: seat_available, clean, temperature, room_to_stand\n")
    result = cfa_tool.fit(model, data, ordinal="all" if ordinal else None)
    fitted = result.groups[0].reliability
    for r in fitted:
        assert r.omega <= r.omega_total + 1e-9, (r.factor, r.omega, r.omega_total)
    if not ordinal:  # the item sums' reliability is the fit's
        sums = {s.factor: s for s in cfa_tool.scores(model, data).quality[0].sums}
        for r in fitted:
            assert sums[r.factor].omega == pytest.approx(r.omega, rel=1e-9)
            assert sums[r.factor].omega <= sums[r.factor].validity ** 2 + 1e-9


def test_ordinal_sums_of_a_higher_order_model_correlate_with_their_factors_below_one():
    # the sums' validity took the items' covariances with the factors as G Phi, which counts a first-order factor's
    # share of the higher-order factor twice: 1.22 to 1.58 on these data.  Under the model the sum's squared linear
    # correlation with its factor cannot exceed the share of its variance the factor accounts for (Green & Yang's
    # omega, Var(E[X | f]) / Var(X): the correlation ratio bounds the squared linear correlation; Pearson 1905)
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    model = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
             "factor comfort: seat_available, clean, temperature, room_to_stand\n"
             "factor courtesy: greeting, helpful, respectful, clear_answers\n"
             "factor service: punctuality, comfort, courtesy\n")
    for s in cfa_tool.scores(model, data, ordinal="all").quality[0].sums:
        assert 0 < s.validity < 1
        assert s.validity ** 2 <= s.omega + 1e-9, (s.factor, s.validity, s.omega)
