"""Latent mean and variance differences of a higher-order model: the first-order factors compared by the total
means and variances the model implies, the higher-order factor's fixed mean not reported as a zero difference.

Check values: the implied moments written out by hand from the estimate rows (Bollen 1989, ch. 8: a first-order
factor's total variance is gamma^2 var(g) + psi, its total mean alpha + gamma kappa), and the simulation's own
population (written below), not the package."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.reporting.workflow_tables import invariance_report
from cfa_tool.workflows.invariance import invariance

# population, in the markers' metric: items load 1, .8, .7 on their factor (error variance .5); the factors load
# 1, .8, .6 on g (disturbance variance .3); var(g) = .5; g's mean is 0 in group a and .5 in group b
ITEM_LOADINGS = (1.0, 0.8, 0.7)
GAMMA = np.array([1.0, 0.8, 0.6])
VAR_G, PSI, ERROR, SHIFT = 0.5, 0.3, 0.5, 0.5
MODEL = ("factor f1: x1, x2, x3\nfactor f2: x4, x5, x6\nfactor f3: x7, x8, x9\nfactor g: f1, f2, f3\n")


def _data(seed: int = 11, n: int = 1500) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    frames = []
    for label, kappa in (("a", 0.0), ("b", SHIFT)):
        g = kappa + np.sqrt(VAR_G) * rng.standard_normal(n)
        eta = g[:, None] * GAMMA + np.sqrt(PSI) * rng.standard_normal((n, 3))
        x = np.repeat(eta, 3, axis=1) * np.tile(ITEM_LOADINGS, 3) + np.sqrt(ERROR) * rng.standard_normal((n, 9))
        frame = pd.DataFrame(x, columns=[f"x{i + 1}" for i in range(9)])
        frame["grp"] = label
        frames.append(frame)
    return pd.concat(frames, ignore_index=True)


@pytest.fixture(scope="module")
def ladder():
    return invariance(MODEL, _data(), "grp")


def test_the_higher_order_mean_is_named_as_not_estimated_not_shown_as_a_zero_difference(ladder):
    assert ladder.means_not_estimated == ("g",)
    assert {d.factor for d in ladder.latent_differences} == {"f1", "f2", "f3"}
    report = invariance_report(ladder)
    assert "[, ]" not in report.paragraph and "SE = ," not in report.paragraph
    assert "fixed at zero in every group" in report.paragraph
    assert "x1 for f1, x4 for f2, x7 for f3, and f1 for g" in report.paragraph  # the configural model's scales


def test_first_order_rows_are_the_totals_written_out_by_hand(ladder):
    scalar = next(s.result for s in ladder.steps if s.level == "scalar")
    row = {(r.kind, r.variables, r.group): r.estimate for r in scalar.estimates}
    n = {g.label: g.data.n_obs for g in scalar.groups}
    for d in ladder.latent_differences:
        f = d.factor
        total = {grp: row[("loading", ("g", f), grp)] ** 2 * row[("factor_variance", ("g",), grp)]
                 + row[("factor_variance", (f,), grp)] for grp in ("a", "b")}
        mean = {grp: row[("mean", (f,), grp)] + row[("loading", ("g", f), grp)] * row[("mean", ("g",), grp)]
                for grp in ("a", "b")}
        assert d.total
        assert d.variance == pytest.approx(total["b"], rel=1e-10)
        assert d.reference_variance == pytest.approx(total["a"], rel=1e-10)
        assert d.mean == pytest.approx(mean["b"] - mean["a"], abs=1e-12)
        pooled = (n["a"] * total["a"] + n["b"] * total["b"]) / (n["a"] + n["b"])
        assert d.standardized == pytest.approx(d.mean / np.sqrt(pooled), rel=1e-10)
        # the disturbance's variance alone is smaller: the old rows divided by it
        assert d.variance > row[("factor_variance", (f,), "b")] * 1.2


def test_first_order_rows_cover_the_population(ladder):
    d = {x.factor: x for x in ladder.latent_differences}
    total_sd = np.sqrt(GAMMA ** 2 * VAR_G + PSI)
    for k, f in enumerate(("f1", "f2", "f3")):
        assert abs(d[f].mean - GAMMA[k] * SHIFT) < 4 * d[f].se  # population mean difference gamma_k x .5
        assert d[f].standardized == pytest.approx(GAMMA[k] * SHIFT / total_sd[k], abs=0.08)  # 1500 rows per group
        assert d[f].variance_ratio == pytest.approx(1.0, abs=0.2)
