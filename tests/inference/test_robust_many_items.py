"""The Satorra-Bentler statistics of a complete-data fit without a matrix of the moments by the moments (hostile
tester s19, case 11: --robust on 200 items built 20,100 x 20,100 matrices, 3 GiB each, and ended in a MemoryError).

The normal-theory weight W = 1/2 D'(A (x) A) D (Browne 1974; D the duplication matrix, A = Sigma^-1) is applied in its
Kronecker form and tr(V Gamma) is summed over the rows; the checks here write the dense formulas out (Satorra &
Bentler 1994: (D'VD)^-1 D'V Gamma V D (D'VD)^-1 / N and tr(U Gamma), U = V - V D (D'VD)^-1 D'V) with W built from an
explicit duplication matrix and np.kron, and Gamma the covariance of the rows' moment contributions (Browne 1984)."""

from __future__ import annotations

import tracemalloc

import numpy as np
import pandas as pd
import pytest

import cfa_tool

from cfa_tool.numerics.linalg import scaled_inverse


def _duplication(p: int) -> np.ndarray:
    """D with vec(X) = D vech(X) for symmetric X, vech the lower triangle column by column (Magnus & Neudecker
    1980's duplication matrix), built from its definition."""
    columns = [(i, j) for j in range(p) for i in range(j, p)]
    D = np.zeros((p * p, len(columns)))
    for k, (i, j) in enumerate(columns):
        D[i + j * p, k] = 1.0
        D[j + i * p, k] = 1.0
    return D


@pytest.mark.parametrize("with_means", [False, True])
def test_the_kronecker_form_applies_the_normal_weight(with_means):
    from cfa_tool.inference.robust import NormalWeight

    rng = np.random.default_rng(3)
    p = 7
    B = rng.normal(size=(p, p))
    A = np.linalg.inv(B @ B.T + p * np.eye(p))
    D = _duplication(p)
    W = 0.5 * D.T @ np.kron(A, A) @ D  # Browne (1974), written from its definition
    V = np.block([[A, np.zeros((p, len(W)))], [np.zeros((len(W), p)), W]]) if with_means else W
    X = rng.normal(size=(len(V), 11))
    weight = NormalWeight(A, with_means)
    np.testing.assert_allclose(weight @ X, V @ X, rtol=1e-12, atol=1e-14)
    np.testing.assert_allclose(weight.dense(), V, rtol=1e-12, atol=1e-16)  # normal_weight, the dense reference below
    np.testing.assert_allclose(weight @ X[:, 0], V @ X[:, 0], rtol=1e-12, atol=1e-14)


def _many_items(p: int, n: int, seed: int, design: bool) -> pd.DataFrame:
    """Heavy-tailed answers to p items of four factors (loadings .6, factors correlated .3; t with 6 degrees of
    freedom), with invented sampling weights, clusters of five rows and two groups (the halves of the rows, each
    cluster in one) when ``design``; a test helper."""
    rng = np.random.default_rng(seed)
    factors = rng.multivariate_normal(np.zeros(4), 0.7 * np.eye(4) + 0.3, size=n)
    scale = np.sqrt(rng.chisquare(6, size=(n, 1)) / 6)
    X = 0.6 * factors[:, np.arange(p) * 4 // p] + 0.8 * rng.normal(size=(n, p)) / scale
    frame = pd.DataFrame(X, columns=[f"q{j + 1}" for j in range(p)])
    if design:
        frame["w"] = rng.uniform(0.5, 2.0, n)
        frame["unit"] = np.arange(n) // 5
        frame["half"] = np.where(np.arange(n) < n // 2, "first", "second")
    return frame


def _fitted(p: int, n: int, design: bool):
    from cfa_tool.data.sample_design import DesignColumns, check_design
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for

    block = p // 4
    spec = parse_model("".join(f"factor F{k + 1}: q{block * k + 1}..q{block * k + block}\n" for k in range(4)))
    frame = _many_items(p, n, 11, design)
    columns = None
    if design:
        columns = DesignColumns("w", "unit", None)
        frame, _ = check_design(frame, columns, spec.observed_names, "half", "data")
    groups, _ = moments_for(spec, frame, "data", "half" if design else None, design=columns)
    return estimate(spec, groups, FitOptions(test="satorra-bentler"))


def _dense_reference(est) -> tuple[np.ndarray, float, float]:
    """(covariance, tr(U Gamma), the baseline's tr(U Gamma)) by the dense formulas of the module docstring, each
    group's terms weighted by its share of the rows (independent groups: every cluster in one group)."""
    from cfa_tool.inference.design import moment_covariance
    from cfa_tool.inference.robust import normal_weight, vech_indices

    model, likelihood, theta = est.model, est.likelihood, est.theta
    means, p = likelihood.means, model.p
    I, J = vech_indices(p)
    start = p if means else 0
    bread = meat = 0.0
    trace = base = 0.0
    for g, (group, w) in enumerate(zip(likelihood.groups, likelihood.weights)):
        A = np.linalg.inv(model.implied(theta, g))
        W = normal_weight(A)  # 1/2 D'(A (x) A) D, as the duplication matrix writes it (checked above)
        d_sigma, d_mu = model.jacobian(theta, g)
        delta = d_sigma[:, I, J].T
        if means:
            delta = np.vstack([d_mu.T, delta])
            W = np.block([[A, np.zeros((p, len(W)))], [np.zeros((len(W), p)), W]])
        gamma = moment_covariance(group.rows, group.design, means)  # Gamma_g; its share of Omega is Gamma_g / w_g
        VD = W @ delta
        bread = bread + w * delta.T @ VD
        meat = meat + w * VD.T @ gamma @ VD
        trace += float(np.sum(W * gamma))  # tr(V Gamma_g): w_g tr(V Omega_gg)
        # the independence model: Sigma = diag(S), its variances free, V of A = diag(1/s_ii)
        gamma_cov = gamma[start:, start:]
        A0 = np.diag(1.0 / np.diag(group.covariance))
        W0 = normal_weight(A0)
        delta0 = (I == J)[:, None] * (I[:, None] == np.arange(p)[None, :]).astype(float)
        VD0 = W0 @ delta0
        base += (float(np.sum(W0 * gamma_cov))
                     - float(np.sum(np.linalg.inv(delta0.T @ VD0) * (VD0.T @ gamma_cov @ VD0))))
    inv = scaled_inverse(bread)
    return inv @ meat @ inv / likelihood.n_total, trace - float(np.sum(inv * meat)), base


@pytest.mark.parametrize("p, n, design", [(40, 300, False), (32, 240, True)])
def test_the_robust_statistics_equal_the_dense_formulas(p, n, design):
    from cfa_tool.inference.robust import baseline_trace, moment_sandwich, robust_parts

    est = _fitted(p, n, design)
    assert est.likelihood.means == design  # two groups have a mean structure: the means' block is checked too
    cov_dense, trace_dense, base_dense = _dense_reference(est)
    sandwich = moment_sandwich(est.model, est.theta, est.likelihood)
    cov, trace = robust_parts(est.model, est.theta, est.likelihood, sandwich)
    np.testing.assert_allclose(cov, cov_dense, rtol=1e-10, atol=1e-10 * np.abs(cov_dense).max())
    assert trace == pytest.approx(trace_dense, rel=1e-10)
    assert baseline_trace(est.likelihood, sandwich) == pytest.approx(base_dense, rel=1e-10)
    assert baseline_trace(est.likelihood) == pytest.approx(base_dense, rel=1e-10)


def test_the_robust_statistics_of_60_items_hold_no_matrix_of_the_moments():
    # 60 items: 1,830 moments, one 1,830 x 1,830 matrix 26.8 MB (the dense route made several: V, Omega and their
    # product); the rows' contributions (300 x 1,830) are 4.4 MB, the model's derivatives (126 x 60 x 60) 3.6 MB
    from cfa_tool.inference.robust import baseline_trace, moment_sandwich, robust_parts

    est = _fitted(60, 300, False)
    moments = 60 * 61 // 2
    tracemalloc.start()
    try:
        sandwich = moment_sandwich(est.model, est.theta, est.likelihood)
        robust_parts(est.model, est.theta, est.likelihood, sandwich)
        baseline_trace(est.likelihood, sandwich)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert peak < moments * moments * 8


def test_the_full_information_robust_route_refuses_matrices_too_large_before_making_them(monkeypatch, tmp_path):
    # the Yuan-Bentler route (inference.robust_missing) needs matrices of the k = p + p(p+1)/2 moments by themselves
    # (200 items: 20,300 x 20,300, 3.3 GB each; until large-s22 also 6.5 GB of directions); beyond its limit it is
    # refused in one line (exit 3, a model that cannot be estimated so), before any is made.  The limit is lowered
    # here so that 8 items (44 moments, 15 KB a matrix) cross it.
    import cfa_tool.inference.robust_missing as robust_missing
    from cfa_tool.cli import main
    from cfa_tool.errors import EstimationError
    from cfa_tool.numerics import sizes

    made = []
    original = robust_missing.moment_hessian
    monkeypatch.setattr(robust_missing, "moment_hessian", lambda *args: made.append(args) or original(*args))
    monkeypatch.setattr(sizes, "MATRIX_BYTES", 44 * 44 * 8 - 1)
    frame = _many_items(8, 300, 4, False)
    frame.iloc[::7, 2] = np.nan
    model = "factor F1: q1..q4\nfactor F2: q5..q8\n"
    with pytest.raises(EstimationError, match=r"44 means, variances and covariances of the 8 items.*"
                                              r"missing='listwise'.*leave out test='robust'"):
        cfa_tool.fit(model, frame, missing="full-information", test="robust")
    assert made == []
    (tmp_path / "m.cfa").write_text(model)
    frame.to_csv(tmp_path / "d.csv", index=False)
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "d.csv"), "--robust"]) == 3
    monkeypatch.setattr(sizes, "MATRIX_BYTES", 44 * 44 * 8)  # at the limit: computed
    assert cfa_tool.fit(model, frame, missing="full-information", test="robust").robust is not None


def _design_score_ratio_dense(est, found) -> np.ndarray:
    """h / (L B L') of Satorra's (1989) generalized score test by its dense formulas: X = [Delta, candidates'
    derivatives] (moments x (q + k)), A = X' V X, B = X' V Omega V X over the groups (Satorra & Bentler 1994's meat),
    L = (-A_ct A_tt^-1, 1), h = A_cc - A_ct A_tt^-1 A_tc (Sörbom 1989)."""
    from cfa_tool.assessment.modification import candidate_arrays
    from cfa_tool.inference.robust import moment_sandwich, vech_indices
    from cfa_tool.model.implied import entry_derivatives

    model, likelihood, theta = est.model, est.likelihood, est.theta
    sandwich = moment_sandwich(model, theta, likelihood)
    q, k = len(theta), len(found)
    I, J = vech_indices(model.p)
    A = np.zeros((q + k, q + k))
    weighted = []
    for g, w in enumerate(likelihood.weights):
        delta, weight = sandwich.blocks[g]
        mine = np.flatnonzero(found.groups == g)
        c_sigma, c_mu = entry_derivatives(model.matrices(theta, g),
                                          *candidate_arrays([found.candidates[r] for r in found.rows[mine]]))
        X = np.zeros((delta.shape[0], q + k))
        X[:, :q] = delta
        X[:, q + mine] = np.vstack([c_mu.T, c_sigma[:, I, J].T]) if likelihood.means else c_sigma[:, I, J].T
        VX = weight.dense() @ X
        A += w * X.T @ VX
        weighted.append(w * VX)
    B = sandwich.omega.middle(weighted)
    K = A[q:, :q] @ scaled_inverse(A[:q, :q])
    h = np.diag(A)[q:] - np.einsum("cq,cq->c", K, A[q:, :q])
    L = np.hstack([-K, np.eye(k)])
    return h / np.einsum("cq,qr,cr->c", L, B, L)


@pytest.mark.parametrize("shared", [False, True])
def test_the_design_based_score_tests_equal_their_dense_formulas(shared):
    # the modification indices of a fit under a sampling design (assessment.robust_scores), computed in chunks of
    # candidates from their sparse derivatives: equal to the dense formulas to 1e-10, with two groups (means) whose
    # clusters lie within them or, ``shared``, cross them (domains of one sample: Omega's blocks between groups)
    from cfa_tool.assessment.modification import modification_indices
    from cfa_tool.assessment.robust_scores import _score_variance_ratio
    from cfa_tool.language.checks import exogenous_factors
    from cfa_tool.data.sample_design import DesignColumns, check_design
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for

    spec = parse_model("".join(f"factor F{k + 1}: q{4 * k + 1}..q{4 * k + 4}\n" for k in range(4)))
    frame = _many_items(16, 240, 8, True)  # four items a factor (with three, a residual covariance within a factor
    # makes its block just identified: h = A_cc - A_ct A_tt^-1 A_tc cancels to 1e-8 of A_cc, and both routes' rounding
    # with it)
    if shared:
        frame["unit"] = np.arange(len(frame)) % 40
    columns = DesignColumns("w", "unit", None)
    frame, _ = check_design(frame, columns, spec.observed_names, "half", "data")
    groups, _ = moments_for(spec, frame, "data", "half", design=columns)
    est = estimate(spec, groups, FitOptions(test="satorra-bentler"))
    found = modification_indices(est.model, est.theta, est.likelihood, exogenous_factors(spec))
    assert len(found) > 100
    np.testing.assert_allclose(_score_variance_ratio(est.model, est.theta, est.likelihood, found),
                               _design_score_ratio_dense(est, found), rtol=1e-10)


def test_the_design_based_score_tests_of_60_items_hold_no_matrix_of_the_moments():
    # 60 items under a design: 1,950 candidates, whose derivatives at once (1,950 x 60 x 60) were 56 MB and the
    # moments x (parameters + candidates) products 30 MB each; one 1,830 x 1,830 matrix is 26.8 MB (200 items: a
    # MemoryError allocating 6.1 GiB of derivatives, robust-s20 on hostile s19's case 11 with --weights --cluster)
    from cfa_tool.assessment.modification import modification_indices
    from cfa_tool.assessment.robust_scores import robust_score_tests
    from cfa_tool.data.sample_design import DesignColumns, check_design
    from cfa_tool.inference.robust import moment_sandwich
    from cfa_tool.language.checks import exogenous_factors
    from cfa_tool.language.parser import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for

    spec = parse_model("".join(f"factor F{k + 1}: q{15 * k + 1}..q{15 * k + 15}\n" for k in range(4)))
    frame = _many_items(60, 300, 9, True)
    columns = DesignColumns("w", "unit", None)
    frame, _ = check_design(frame, columns, spec.observed_names, None, "data")
    groups, _ = moments_for(spec, frame, "data", design=columns)
    est = estimate(spec, groups, FitOptions(test="satorra-bentler"))
    found = modification_indices(est.model, est.theta, est.likelihood, exogenous_factors(spec))
    sandwich = moment_sandwich(est.model, est.theta, est.likelihood)  # the fit's, made before (its own test above)
    tracemalloc.start()
    try:
        tests = robust_score_tests(found, est.model, est.theta, est.likelihood, sandwich)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert len(found) == 1950 and len(tests) == len(found) and np.all(tests.index >= 0)
    moments = 60 * 61 // 2
    assert peak < moments * moments * 8
