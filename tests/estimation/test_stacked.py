"""Many fits at once (estimation.stacked, pipeline.continuous.replicate_fits) against one fit at a time and
against a general-purpose minimiser of the ML discrepancy written here."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.estimation.stacked import fit_stacked, stackable
from cfa_tool.language import parse_model
from cfa_tool.pipeline.continuous import model_structure, moments_from_rows, replicate_fit, replicate_fits
from tests.conftest import THREE_FACTORS

NAMES = tuple(f"x{i}" for i in range(1, 10))


@pytest.fixture(scope="module")
def resamples(hs_data, hs_three):
    rows = hs_data[list(NAMES)].to_numpy(float)
    rng = np.random.default_rng(20)
    return [moments_from_rows(rows[rng.integers(0, len(rows), len(rows))], NAMES) for _ in range(60)]


def _same(a, b, tol: float = 1e-6) -> None:
    assert a.converged == b.converged
    if not a.converged:
        return
    for name in ("theta", "values", "standardized"):
        np.testing.assert_allclose(getattr(a, name), getattr(b, name), rtol=1e-9, atol=tol, err_msg=name)
    if a.se is not None or b.se is not None:
        np.testing.assert_allclose(a.se, b.se, rtol=0, atol=tol)
    for name in ("chi_square", "cfi", "rmsea", "srmr"):
        assert getattr(a, name) == pytest.approx(getattr(b, name), abs=tol, nan_ok=True), name


def test_stacked_refits_equal_one_fit_at_a_time(resamples, hs_three):
    spec = parse_model(THREE_FACTORS)
    together = replicate_fits(spec, resamples, hs_three.theta, standard_errors=True)
    alone = [replicate_fit(spec, m, start=hs_three.theta, standard_errors=True) for m in resamples]
    assert sum(f.converged for f in together) == len(resamples)
    for a, b in zip(together, alone):
        _same(a, b)
    # the resamples really were fitted in stacked arrays, not one by one
    table, model = model_structure(spec, None, False)
    assert stackable(model)
    found = fit_stacked(model, np.array([m.covariance for m in resamples]), hs_three.theta)
    assert found.converged.all() and (found.iterations > 0).all()


def test_a_replication_does_not_depend_on_the_others_in_its_batch(resamples, hs_three):
    spec = parse_model(THREE_FACTORS)
    whole = replicate_fits(spec, resamples, hs_three.theta, standard_errors=True)
    pieces = [f for k in range(0, len(resamples), 7)
              for f in replicate_fits(spec, resamples[k:k + 7], hs_three.theta, standard_errors=True)]
    for a, b in zip(whole, pieces):
        _same(a, b, tol=1e-12)


def _discrepancy(S: np.ndarray):
    """F_ML = log|Sigma| + tr(S Sigma^-1) - log|S| - p (Joreskog 1969) of the three-factor model, written
    here from the model's definition (markers x1, x4, x7 fixed to 1), for a general-purpose minimiser."""
    p = 9
    logdet_S = np.linalg.slogdet(S)[1]

    def sigma_of(x):
        L = np.zeros((9, 3))
        L[[0, 3, 6], [0, 1, 2]] = 1.0
        L[[1, 2, 4, 5, 7, 8], [0, 0, 1, 1, 2, 2]] = x[:6]
        Phi = np.array([[x[6], x[9], x[10]], [x[9], x[7], x[11]], [x[10], x[11], x[8]]])
        return L @ Phi @ L.T + np.diag(x[12:21])

    def f(x):
        sigma = sigma_of(x)
        sign, logdet = np.linalg.slogdet(sigma)
        if sign <= 0:
            return 1e10
        return logdet + np.trace(np.linalg.solve(sigma, S)) - logdet_S - p

    return f, sigma_of


def test_stacked_refits_reach_the_minimum_a_general_minimiser_finds(resamples, hs_three):
    """scipy's BFGS on the discrepancy written above reaches the same minimum and implied covariance."""
    from scipy.optimize import minimize

    spec = parse_model(THREE_FACTORS)
    table, model = model_structure(spec, None, False)
    fits = replicate_fits(spec, resamples[:3], hs_three.theta)
    for m, fit in zip(resamples[:3], fits):
        f, sigma_of = _discrepancy(m.covariance)
        x0 = np.concatenate([np.full(6, 1.0), np.full(3, 0.5), np.zeros(3), np.diag(m.covariance) / 2])
        found = minimize(f, x0, method="BFGS", options={"gtol": 1e-9, "maxiter": 5000})
        assert fit.converged
        assert fit.chi_square / m.n_obs == pytest.approx(found.fun, rel=1e-7, abs=1e-9)
        ours = model.matrices(fit.theta).implied_covariance()
        np.testing.assert_allclose(ours, sigma_of(found.x), atol=1e-4)


def test_replications_that_fail_fail_as_they_do_one_at_a_time(hs_three):
    """Resamples of 11 rows: some have a singular covariance matrix, some leave the region or do not
    converge; each is judged as the one-at-a-time fit judges it."""
    spec = parse_model(THREE_FACTORS)
    from tests.conftest import holzinger_swineford

    rows = holzinger_swineford()[list(NAMES)].to_numpy(float)
    rng = np.random.default_rng(3)
    samples = [moments_from_rows(rows[rng.choice(len(rows), 12, replace=False)][rng.integers(0, 12, 12)], NAMES)
               for _ in range(40)]
    together = replicate_fits(spec, samples, hs_three.theta, fit_indices_wanted=True)
    alone = [replicate_fit(spec, m, start=hs_three.theta) for m in samples]
    converged = [f.converged for f in alone]
    assert 0 < sum(converged) < len(samples)  # the case has failures to count
    assert [f.converged for f in together] == converged
    for a, b in zip(together, alone):
        _same(a, b)


def test_models_the_stacked_search_does_not_cover_are_fitted_one_at_a_time(resamples, hs_three):
    spec = parse_model(THREE_FACTORS + "bound variance(x3) >= 0.1\n")  # bounds: left to the full search
    table, model = model_structure(spec, None, False)
    assert not stackable(model)
    together = replicate_fits(spec, resamples[:5], None)
    for m, a in zip(resamples[:5], together):
        _same(a, replicate_fit(spec, m), tol=0)


HIGHER = THREE_FACTORS + "factor g: visual, textual, speed\n"


@pytest.fixture(scope="module")
def higher_fit(hs_data):
    import cfa_tool

    return cfa_tool.fit(HIGHER, hs_data)


def test_stacked_refits_of_a_higher_order_model_equal_one_fit_at_a_time(resamples, higher_fit):
    """Session 23: higher-order factors (second-order loadings, paths in B) run in the stacked search, to the
    estimates, standard errors and fit indices of the one-at-a-time search within 1e-8."""
    spec = parse_model(HIGHER)
    table, model = model_structure(spec, None, False)
    assert model.higher_order and stackable(model)
    assert (table.entry_arrays()[0] == 1).sum() == 3  # g -> visual fixed at 1, two free paths
    found = fit_stacked(model, np.array([m.covariance for m in resamples]), higher_fit.theta)
    assert found.converged.all() and (found.iterations > 0).all()  # in stacked arrays, not one by one
    together = replicate_fits(spec, resamples, higher_fit.theta, standard_errors=True)
    alone = [replicate_fit(spec, m, start=higher_fit.theta, standard_errors=True) for m in resamples]
    assert sum(f.converged for f in together) == len(resamples)
    for a, b in zip(together, alone):
        _same(a, b, tol=1e-8)


def test_the_stacked_derivatives_of_a_higher_order_model_are_the_closed_form_ones_and_the_differences(resamples,
                                                                                                      higher_fit):
    """Away from the minimum, where the second-derivative terms count: the stacked gradient, expected information and
    observed Hessian equal the one-fit closed forms (estimation.ml.NormalLikelihood), and the Hessian equals
    central differences of the stacked gradient (a handbook rule, Nocedal & Wright 2006, section 8.1)."""
    from cfa_tool.estimation.ml import GroupMoments, NormalLikelihood
    from cfa_tool.estimation.stacked import StackedNormal

    _, model = model_structure(parse_model(HIGHER), None, False)
    samples = resamples[:4]
    stacked = StackedNormal(model, np.array([m.covariance for m in samples]))
    rng = np.random.default_rng(9)
    theta = higher_fit.theta + 0.05 * rng.normal(size=(len(samples), len(higher_fit.theta)))
    rows = np.arange(len(samples))
    value, gradient, information, hessian, ok = stacked.evaluate(theta, rows)
    assert ok.all()
    for r, m in enumerate(samples):
        one = NormalLikelihood(model, [GroupMoments(m.covariance, m.means, m.n_obs)])
        ev = one.evaluate(theta[r])
        assert value[r] == pytest.approx(ev.value, rel=1e-12)
        np.testing.assert_allclose(gradient[r], ev.gradient, rtol=1e-9, atol=1e-11)
        np.testing.assert_allclose(information[r], ev.information, rtol=1e-9, atol=1e-11)
        np.testing.assert_allclose(hessian[r], one.observed_hessian(theta[r]), rtol=1e-9, atol=1e-10)
    h = 1e-5
    for k in range(theta.shape[1]):
        step = np.zeros_like(theta)
        step[:, k] = h
        difference = (stacked.evaluate(theta + step, rows)[1] - stacked.evaluate(theta - step, rows)[1]) / (2 * h)
        np.testing.assert_allclose(difference, hessian[:, :, k], rtol=1e-5, atol=1e-6)


def test_stack_factorisations_mark_the_matrices_that_fail_and_solve_the_others_as_numpy_does_one_by_one():
    """A stack mixing positive definite, indefinite and singular matrices: the stacked Cholesky factors and
    solutions of the good ones equal numpy's one-matrix np.linalg.cholesky and solve (an independent
    implementation, LAPACK through numpy's public calls); the bad ones are marked, not raised for the stack."""
    from cfa_tool.estimation.stacked import _cholesky, _solve

    rng = np.random.default_rng(5)
    A = rng.normal(size=(12, 6, 18))
    A = A @ np.swapaxes(A, 1, 2)
    A[3, 0, 0] = -1.0  # indefinite
    A[7] = np.outer(np.arange(1.0, 7.0), np.arange(1.0, 7.0))  # singular, positive semidefinite
    b = rng.normal(size=(12, 6))
    factor, ok = _cholesky(A)
    assert ok.tolist() == [r not in (3, 7) for r in range(12)]
    for r in range(12):
        expected = np.linalg.cholesky(A[r]) if ok[r] else np.eye(6)
        np.testing.assert_allclose(factor[r], expected, rtol=1e-12, atol=1e-12)
    for positive_definite, bad in ((True, (3, 7)), (False, (7,))):
        x, found = _solve(A, b, positive_definite=positive_definite)
        assert found.tolist() == [r not in bad for r in range(12)]
        assert np.isnan(x[~found]).all()
        for r in np.flatnonzero(found):
            np.testing.assert_allclose(x[r], np.linalg.solve(A[r], b[r]), rtol=1e-9)


def test_the_one_matrix_fallback_gives_what_the_stacked_kernels_give(monkeypatch):
    # the stacked kernels are numpy internals: without them the factors and solutions come one matrix at a time
    import cfa_tool.estimation.stacked as stacked

    rng = np.random.default_rng(1)
    A = rng.normal(size=(5, 4, 4))
    A = A @ A.transpose(0, 2, 1)
    A[2] = -A[2]  # not positive definite
    b = rng.normal(size=(5, 4))
    kernel_factor, kernel_ok = stacked._cholesky(A.copy())
    kernel_x, kernel_found = stacked._solve(A.copy(), b)
    monkeypatch.setattr(stacked, "LAPACK_KERNELS", None)
    factor, ok = stacked._cholesky(A.copy())
    x, found = stacked._solve(A.copy(), b)
    assert ok.tolist() == kernel_ok.tolist() == [True, True, False, True, True]
    assert found.tolist() == kernel_found.tolist()
    np.testing.assert_allclose(factor[ok], kernel_factor[ok], rtol=1e-12)
    np.testing.assert_allclose(x[found], kernel_x[found], rtol=1e-12)


def test_a_resample_of_fewer_distinct_rows_than_items_is_never_fitted():
    # A bootstrap resample of 7 rows drawn from 5 distinct ones has a sample covariance matrix of rank 4 < 6 items
    # (numpy.linalg.matrix_rank, an independent computation, says so), for which the ML discrepancy's log|S| does not
    # exist.  Rounding leaves a Cholesky pivot of about 1e-16 that LAPACK may pass (this one did, see below): on
    # a new machine 1 of 10 such resamples was 'fitted'.  The full-rank check refuses them in the stacked search and
    # in a single fit alike.
    from pathlib import Path

    import pandas as pd
    from cfa_tool.estimation.ml import GroupMoments, NormalLikelihood, SingularMoments
    from cfa_tool.estimation.stacked import StackedNormal

    names = ["q1", "q2", "q3", "q4", "q5", "q6"]
    data = pd.read_csv(Path(__file__).parents[1] / "commands" / "bad_inputs" / "data" / "good.csv")[names]
    rows = data.to_numpy(dtype=float)
    resample = rows[[6, 4, 4, 5, 1, 2, 1]]
    centred = resample - resample.mean(axis=0)
    S = centred.T @ centred / len(resample)
    assert np.linalg.matrix_rank(S) == 4  # LAPACK's dpotrf passed it (info 0) with the OpenBLAS of numpy 2.4
    good = np.cov(rows, rowvar=False, bias=True)
    _, model = model_structure(parse_model("factor f: q1, q2, q3\nfactor g: q4, q5, q6\n"), None, False)
    stacked = StackedNormal(model, np.stack([good, S, good]))
    assert stacked.usable.tolist() == [True, False, True]
    with pytest.raises(SingularMoments):
        NormalLikelihood(model, [GroupMoments(S, resample.mean(axis=0), len(resample))])
