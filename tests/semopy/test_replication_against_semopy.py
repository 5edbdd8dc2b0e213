"""replicate's test of one solution in both samples against semopy (an independent implementation).

semopy 2.3's multi-group analysis (semopy.multigroup) fits each group on its own and holds nothing equal, so the
two-sample model with one solution is computed from its pieces: semopy fits the model to each school's rows
(the separate solutions; its default solver, SLSQP: trust-constr, which DEVELOPERS.md advises, did not converge from a covariance matrix here) and to the pooled within-school covariance matrix S_pooled = sum n_g S_g / N (the one
solution: it minimises sum_g n_g F(S_g, Sigma), workflows.replication's docstring derives it), and the two-sample
chi-square with one solution is sum_g n_g F(S_g, Sigma_hat) with numpy's F = log|Sigma| + tr(S Sigma^-1) - log|S| - p
(Jöreskog 1969) at semopy's Sigma_hat, not the closed form the tool uses."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

DESCRIPTION = "visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9"
ITEMS = [f"x{k}" for k in range(1, 10)]


def _F(S: np.ndarray, sigma: np.ndarray) -> float:
    return float(np.linalg.slogdet(sigma)[1] + np.trace(np.linalg.solve(sigma, S)) - np.linalg.slogdet(S)[1] - len(S))


def _semopy_sigma(cov: np.ndarray, n: int) -> np.ndarray:
    import pandas as pd

    model = semopy.Model(DESCRIPTION)
    model.fit(cov=pd.DataFrame(cov, index=ITEMS, columns=ITEMS), n_samples=n)
    sigma, _ = model.calc_sigma()
    order = [model.vars["observed"].index(x) for x in ITEMS]
    return sigma[np.ix_(order, order)]


def test_the_test_of_one_solution_matches_semopy_fits_of_each_sample_and_of_the_pooled_matrix(hs_data):
    samples = [hs_data[hs_data.school == s][ITEMS].to_numpy() for s in ("Pasteur", "Grant-White")]
    n = [len(x) for x in samples]
    S = [np.cov(x, rowvar=False, bias=True) for x in samples]  # divisor n, the ML estimate
    pooled = sum(k * s for k, s in zip(n, S)) / sum(n)
    one = _semopy_sigma(pooled, sum(n))
    equal = sum(k * _F(s, one) for k, s in zip(n, S))
    separate = sum(k * _F(s, _semopy_sigma(s, k)) for k, s in zip(n, S))
    rep = cfa_tool.replicate(THREE_FACTORS, hs_data[hs_data.school == "Pasteur"], hs_data[hs_data.school == "Grant-White"])
    assert rep.same_solution.chi_square_difference == pytest.approx(equal - separate, rel=1e-3)
