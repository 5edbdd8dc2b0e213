"""Modification indices under a sampling design are design-based score tests: Satorra's (1989) generalized score test,
the squared score of a fixed parameter over its sandwich variance, the meat taken under the design (weights, clusters,
strata; Muthén & Satorra 1995; Binder 1983 for the linearization over clusters).

Checked against computations this tool does not make:

* the robust score test (assessment.robust_scores.robust_score_tests, no design) against a hand computation with
  numpy on the Holzinger & Swineford (1939) data: each row's score of the normal log-likelihood,
  s_i = 1/2 tr(Sigma^-1 (d_i d_i' - Sigma) Sigma^-1 dSigma/dtheta_k), the derivatives of Sigma = L Phi L' + Theta by
  central differences, the per-row expected information A (1/2 tr(Sigma^-1 dSigma_k Sigma^-1 dSigma_l)) and the
  meat B = the covariance of the s_i (centred: the covariance of the sample moments, Browne 1984); the statistic
  n gbar^2 / (L B L'), L = (-A_gt A_tt^-1, 1) (Satorra 1989), and the normal-theory one n gbar^2 / h,
  h = A_gg - A_gt A_tt^-1 A_tg (Sörbom 1989);
* the design-based ones with every weight 1 and each row its own cluster against the robust ones: the linearization
  estimator over C clusters carries the factor C / (C - 1) (Binder 1983; Wolter 2007), so the design-based statistic
  is the robust one times (n - 1) / n.
"""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.modification import modification_indices
from cfa_tool.assessment.robust_scores import robust_score_tests
from cfa_tool.language.checks import exogenous_factors
from cfa_tool.language.parser import parse_model
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.pipeline.inputs import moments_for
from cfa_tool.reporting.tables import modification_table

THREE_FACTORS = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ITEMS = [f"x{i}" for i in range(1, 10)]
FACTORS = {"visual": 0, "textual": 1, "speed": 2}
CANDIDATES = [("residual_covariance", ("x1", "x4")), ("loading", ("visual", "x9")),
              ("residual_covariance", ("x7", "x8")), ("loading", ("textual", "x1"))]


def _sigma(values: dict) -> np.ndarray:
    """Sigma = L Phi L' + Theta of the three-factor model, from its parameters by kind and variables."""
    L, Phi, Theta = np.zeros((9, 3)), np.zeros((3, 3)), np.zeros((9, 9))
    item = {x: i for i, x in enumerate(ITEMS)}
    for (kind, names), value in values.items():
        if kind == "loading":
            L[item[names[1]], FACTORS[names[0]]] = value
        elif kind == "factor_variance":
            Phi[FACTORS[names[0]], FACTORS[names[0]]] = value
        elif kind == "factor_covariance":
            Phi[FACTORS[names[0]], FACTORS[names[1]]] = Phi[FACTORS[names[1]], FACTORS[names[0]]] = value
        elif kind == "residual_variance":
            Theta[item[names[0]], item[names[0]]] = value
        elif kind == "residual_covariance":
            Theta[item[names[0]], item[names[1]]] = Theta[item[names[1]], item[names[0]]] = value
    return L @ Phi @ L.T + Theta


def _hand_score_tests(result, rows: np.ndarray, candidate) -> tuple[float, float]:
    """(normal-theory, robust) score test of ``candidate`` at the estimates of ``result``, by hand (module docstring)."""
    given = {(r.kind, tuple(r.variables)): r.estimate for r in result.estimates}
    free = [(r.kind, tuple(r.variables)) for r in result.estimates if r.free]
    step = 1e-6

    def moved(key, by):
        return _sigma({**given, key: given.get(key, 0.0) + by})

    dS = np.array([(moved(k, step) - moved(k, -step)) / (2 * step) for k in free + [candidate]])
    sigma = _sigma(given)
    inv = np.linalg.inv(sigma)
    n = len(rows)
    d = rows - rows.mean(axis=0)
    residual = np.einsum("ij,ik->ijk", d, d) - sigma
    s = 0.5 * np.einsum("njk,qkj->nq", np.einsum("ij,njk,kl->nil", inv, residual, inv), dS)
    A = 0.5 * np.einsum("aij,jk,bkl,li->ab", dS, inv, dS, inv)
    B = np.cov(s.T, bias=True)
    g = s.mean(axis=0)
    assert np.abs(g[:-1]).max() < 1e-6  # the free parameters' scores vanish at the estimates
    cross = np.linalg.solve(A[:-1, :-1], A[-1, :-1])
    h = A[-1, -1] - A[-1, :-1] @ cross
    L = np.concatenate([-cross, [1.0]])
    return n * g[-1] ** 2 / h, n * g[-1] ** 2 / (L @ B @ L)


def _by_name(found) -> dict:
    return {(m.kind, tuple(m.variables)): m.index for m in found}


@pytest.fixture(scope="module")
def unweighted(hs_data):
    spec = parse_model(THREE_FACTORS)
    groups, _ = moments_for(spec, hs_data, "data")
    est = estimate(spec, groups, FitOptions(test="satorra-bentler"))
    found = modification_indices(est.model, est.theta, est.likelihood, exogenous_factors(spec),
                                 [est.model.matrices(est.theta, 0)])
    return found, robust_score_tests(found, est.model, est.theta, est.likelihood)


def test_the_robust_score_tests_are_a_hand_computation_with_numpy(hs_data, unweighted):
    found, robust = unweighted
    result = cfa_tool.fit(THREE_FACTORS, hs_data, test="satorra-bentler")
    rows = hs_data[ITEMS].to_numpy(dtype=float)
    normal_by, robust_by = _by_name(found), _by_name(robust)
    for candidate in CANDIDATES:
        normal, sandwich = _hand_score_tests(result, rows, candidate)
        assert normal_by[candidate] == pytest.approx(normal, rel=1e-7), candidate
        assert robust_by[candidate] == pytest.approx(sandwich, rel=1e-7), candidate
    # recalled from memory: the widely published modification indices of this model on these data, 36.411 for the
    # loading of x9 on visual and 34.145 for the residual covariance of x7 and x8
    assert normal_by[("loading", ("visual", "x9"))] == pytest.approx(36.411, abs=1e-3)
    assert normal_by[("residual_covariance", ("x7", "x8"))] == pytest.approx(34.145, abs=1e-3)


def test_with_every_weight_one_and_each_row_a_cluster_the_indices_are_the_robust_ones(hs_data, unweighted):
    _, robust = unweighted
    n = len(hs_data)
    data = hs_data.reset_index(drop=True).assign(w=1.0, unit=np.arange(n))
    designed = cfa_tool.fit(THREE_FACTORS, data, weights="w", cluster="unit", mi_threshold=0)
    got, wanted = _by_name(designed.modification_indices), _by_name(robust)
    assert got.keys() == wanted.keys() and len(got) > 40
    for key in got:  # C / (C - 1) of the linearization estimator (Binder 1983), C = n clusters
        assert got[key] == pytest.approx(wanted[key] * (n - 1) / n, rel=1e-8), key
    plain = {(m.kind, tuple(m.variables)): m.expected_change for m in cfa_tool.fit(THREE_FACTORS, hs_data,
                                                                                    mi_threshold=0).modification_indices}
    for m in designed.modification_indices:  # the expected changes are the weighted likelihood's, here the plain ones
        assert m.expected_change == pytest.approx(plain[(m.kind, tuple(m.variables))], rel=1e-7)


def _clustered(hs_data, gaps: bool = False):
    rng = np.random.default_rng(3)
    n = len(hs_data)
    unit = np.arange(n) // 6
    data = hs_data.reset_index(drop=True).copy()
    data[ITEMS] = data[ITEMS] + rng.normal(0, 0.6, (unit.max() + 1, 9))[unit]  # rows of one cluster answer alike
    if gaps:
        data[ITEMS] = data[ITEMS].mask(rng.random((n, 9)) < 0.08)
    return data.assign(unit=unit, w=rng.uniform(0.5, 2, n), st=unit % 3)


@pytest.mark.parametrize("gaps", [False, True])
def test_a_fit_under_a_design_gives_the_design_based_score_tests(hs_data, gaps):
    # the fit's indices are Satorra's generalized score tests over the design's meat (complete rows: the moments'
    # design-based covariance; rows with gaps: the design-based meat of the rows' scores with the observed
    # information), and with clustered answers they are smaller than the normal-theory ones of the weighted likelihood
    from cfa_tool.data.sample_design import DesignColumns, check_design

    spec = parse_model(THREE_FACTORS)
    data = _clustered(hs_data, gaps)
    columns = DesignColumns("w", "unit", "st")
    frame, _ = check_design(data, columns, spec.observed_names, None, "data")
    missing = "full-information" if gaps else "listwise"
    groups, _ = moments_for(spec, frame, "data", missing=missing, design=columns)
    est = estimate(spec, groups, FitOptions(test="yuan-bentler" if gaps else "satorra-bentler", missing=missing))
    found = modification_indices(est.model, est.theta, est.likelihood, exogenous_factors(spec),
                                 [est.model.matrices(est.theta, 0)])
    wanted = _by_name(robust_score_tests(found, est.model, est.theta, est.likelihood))
    fitted = cfa_tool.fit(THREE_FACTORS, data, weights="w", cluster="unit", strata="st", mi_threshold=0)
    assert fitted.method.full_information is gaps
    got = _by_name(fitted.modification_indices)
    assert got.keys() == wanted.keys()
    for key in got:
        assert got[key] == pytest.approx(wanted[key], rel=1e-6), key
    normal = _by_name(found)
    assert np.median([normal[k] / got[k] for k in got]) > 1.2


def test_the_note_says_the_indices_take_the_design_in(hs_data):
    data = _clustered(hs_data)
    note = modification_table(cfa_tool.fit(THREE_FACTORS, data, weights="w", cluster="unit", strata="st",
                                           mi_threshold=0)).note
    assert note.startswith("These indices take the sampling design (sampling weights, clusters, and strata) into "
                           "account: each is a design-based score test (Satorra's 1989 generalized score test)")
    gaps = _clustered(hs_data, gaps=True)
    with_gaps = modification_table(cfa_tool.fit(THREE_FACTORS, gaps, cluster="unit", mi_threshold=0)).note
    assert with_gaps.startswith("These indices take the sampling design (clusters) into account")
    assert "completely at random" not in with_gaps  # the observed information, as the robust standard errors
