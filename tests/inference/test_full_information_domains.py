"""Full-information ML of groups that share clusters (domains of one cluster sample: pupils of two grades in every
school, rows with gaps kept): the groups' rows' scores stacked, each cluster's sums gathering its rows of every group
(inference.robust_missing.groups_scores_meat through inference.design.groups_meat; Binder 1983; Skinner, Holt &
Smith 1989, recalled from memory), the observed information as the bread (Yuan & Bentler 2000; Kenward &
Molenberghs 1998, recalled from memory).

Check values:
* the covariance of the estimates and the Yuan-Bentler scaling factor summed by hand here from each row's normal
  log-density of its answered items (score in the implied mean and covariance: S^-1 r and (S^-1 r r' S^-1 - S^-1)/2,
  e.g. Little & Rubin 2002, ch. 11; chained to the parameters by differences of the implied moments, which are at
  most quadratic in them, so central differences are exact to rounding), the observed information by central
  differences of the summed scores, and the linearization estimator of survey statistics over clusters within strata
  (Binder 1983; Wolter 2007): B = sum_h C_h/(C_h - 1) sum_c (z_c - zbar_h)(z_c - zbar_h)';
* with every cluster inside one group, the groups' own meats as the fits computed them before (session start:
  sum_g w_g D_g' B_g D_g, B_g each group's design-based meat, to 1e-10);
* with complete rows and a just-identified model (observed = expected information at the estimates), the
  complete-data route's sandwich of the stacked moments (Browne 1984; Satorra & Bentler 1994);
* a small Monte Carlo study under cluster sampling with domains (seeded): the standard errors track the empirical
  spread of the estimates, and the groups taken as independent samples do not.

Data: invented (pupils of a fictional school district), simulated with fixed seeds."""

from __future__ import annotations

import functools
import re

import numpy as np
import pandas as pd
import pytest

import cfa_tool

ITEMS = ("x1", "x2", "x3", "x4")
MODEL = "factor f: x1, x2, x3, x4\n"


def _schools(seed: int, schools: int = 24, per_grade: int = 8, gaps: float = 0.08, school_sd: float = 0.5,
             items: tuple[str, ...] = ITEMS) -> pd.DataFrame:
    """Pupils of grades 5 and 6 in every school (the grades share the schools: domains), schools in 3 regions
    (strata), a school effect on the factor shared by both grades, sampling weights, and answers missing at
    random (more gaps in the later items when the first item is high; the first item always answered)."""
    rng = np.random.default_rng(seed)
    school = np.repeat(np.arange(schools), 2 * per_grade)
    grade = np.tile(np.repeat(["5", "6"], per_grade), schools)
    f = rng.normal(size=len(school)) + rng.normal(scale=school_sd, size=schools)[school] + (grade == "6") * 0.3
    loadings = np.array([1.0, 0.8, 0.9, 0.7, 0.8])[: len(items)]
    y = 3.0 + f[:, None] * loadings + rng.normal(scale=0.7, size=(len(f), len(items)))
    high = y[:, 0] > 3.5
    for j in range(1, len(items)):
        y[rng.random(len(f)) < np.where(high, 2 * gaps, gaps / 2), j] = np.nan
    frame = pd.DataFrame(y, columns=list(items))
    return frame.assign(grade=grade, school=[f"S{s:02d}" for s in school], region=school % 3,
                        w=rng.uniform(0.5, 2.0, len(f)))


# -- the hand computation --------------------------------------------------------------------------------------------

LABEL = re.compile(r"(\w+)\(([^)]*)\)(?: \[(.+)\])?$")


@functools.lru_cache(maxsize=None)
def _places(labels: tuple[str, ...], group: str, items: tuple[str, ...],
            common: tuple[str, ...]) -> tuple[tuple[int, str, int], ...]:
    """Each parameter of ``group`` read from its label once: (its position in theta, its kind -- 'loading',
    'factor variance', 'variance', 'intercept' or 'mean' -- and its item's position, -1 for the factor's)."""
    out = []
    for at, label in enumerate(labels):
        kind, inside, where = LABEL.match(label).groups()
        if where is not None and where != group and kind not in common:
            continue
        names = [s.strip() for s in inside.split(",")]
        if kind == "loading":
            out.append((at, kind, items.index(names[1])))
        elif kind == "variance" and names[0] == "f":
            out.append((at, "factor variance", -1))
        elif kind in ("variance", "intercept"):
            out.append((at, kind, items.index(names[0])))
        elif kind == "mean":
            out.append((at, kind, -1))
    return tuple(out)


def _group_moments(labels: list[str], theta: np.ndarray, group: str, items: tuple[str, ...],
                   common: tuple[str, ...] = ()):
    """(mu, Sigma) of a one-factor model in ``group`` from the parameters by their labels (marker the first item,
    factor mean 0 unless a 'mean(f)' of the group is free): Sigma = phi l l' + diag(psi), mu = nu + l kappa;
    ``common``: the kinds held equal across groups, labelled with the first group only."""
    p = len(items)
    lam, psi, nu = np.ones(p), np.zeros(p), np.zeros(p)
    phi = kappa = 0.0
    for at, kind, j in _places(tuple(labels), group, items, common):
        value = theta[at]
        if kind == "loading":
            lam[j] = value
        elif kind == "factor variance":
            phi = value
        elif kind == "variance":
            psi[j] = value
        elif kind == "intercept":
            nu[j] = value
        else:
            kappa = value
    return nu + lam * kappa, phi * np.outer(lam, lam) + np.diag(psi)


def _row_scores(rows: np.ndarray, mu: np.ndarray, sigma: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each row's score of its answered items' normal log-density in mu (n x p) and Sigma (n x p x p, the
    derivative by each entry taken as free, symmetric entries counted once each); the rows of one pattern of
    answers share their Sigma_oo^-1 (numpy.unique), the rest row by row as the formula reads."""
    n, p = rows.shape
    s_mu, s_sigma = np.zeros((n, p)), np.zeros((n, p, p))
    answered = ~np.isnan(rows)
    patterns, index = np.unique(answered, axis=0, return_inverse=True)
    for k, o in enumerate(patterns):
        at = np.flatnonzero(index.ravel() == k)
        inv = np.linalg.inv(sigma[np.ix_(o, o)])
        u = (rows[np.ix_(at, o)] - mu[o]) @ inv  # inv symmetric: each row's S^-1 r
        s_mu[np.ix_(at, o)] = u
        s_sigma[np.ix_(at, o, o)] = 0.5 * (u[:, :, None] * u[:, None, :] - inv)
    return s_mu, s_sigma


def _hand(data: pd.DataFrame, labels: list[str], theta: np.ndarray, points=None, items=ITEMS,
          strata: str | None = "region") -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(A, B, scores): the observed information of the weighted log-likelihood sum_g sum_i w_i l_i (weights rescaled
    to each group's rows), the design-based meat of the stacked weighted scores over the schools within strata, and
    the rows' scores.  ``points``: the moments of each group as a function of theta (default: the one-factor
    model's by its labels)."""
    rows = data.reset_index(drop=True)
    q = len(theta)
    groups = sorted(rows["grade"].unique())
    points = points or (lambda t, g: _group_moments(labels, t, g, items))

    def scores_at(t: np.ndarray) -> np.ndarray:
        out = np.zeros((len(rows), q))
        for g in groups:
            at = np.flatnonzero(rows["grade"].to_numpy() == g)
            part = rows.iloc[at]
            w = part["w"].to_numpy()
            w = w * len(w) / w.sum()
            mu, sigma = points(t, g)
            s_mu, s_sigma = _row_scores(part[list(items)].to_numpy(), mu, sigma)
            h = 1e-4
            for k in range(q):
                e = np.zeros(q)
                e[k] = h
                (mu_p, sig_p), (mu_m, sig_m) = points(t + e, g), points(t - e, g)
                d_mu, d_sigma = (mu_p - mu_m) / (2 * h), (sig_p - sig_m) / (2 * h)  # exact: quadratic in theta
                out[at, k] = w * (s_mu @ d_mu + np.einsum("ijk,jk->i", s_sigma, d_sigma))
        return out

    scores = scores_at(theta)
    h = 1e-5
    A = np.zeros((q, q))
    for k in range(q):
        e = np.zeros(q)
        e[k] = h
        A[:, k] = -(scores_at(theta + e).sum(axis=0) - scores_at(theta - e).sum(axis=0)) / (2 * h)
    A = 0.5 * (A + A.T)
    clusters = rows["school"].to_numpy()
    layers = rows[strata].to_numpy() if strata else np.zeros(len(rows), dtype=int)
    units = sorted(set(clusters.tolist()))
    sums = {c: scores[clusters == c].sum(axis=0) for c in units}
    stratum_of = {c: layers[clusters == c][0] for c in units}
    B = np.zeros((q, q))
    for s in sorted(set(stratum_of.values())):
        members = [c for c in units if stratum_of[c] == s]
        C = len(members)
        centre = np.mean([sums[m] for m in members], axis=0)
        for c in members:
            z = sums[c] - centre
            B += C / (C - 1) * np.outer(z, z)
    return A, B, scores


def test_full_information_groups_sharing_clusters_match_stacked_scores_summed_by_hand():
    data = _schools(21)
    assert data[list(ITEMS)].isna().any(axis=1).mean() > 0.1  # rows with gaps are kept
    result = cfa_tool.fit(MODEL, data, group="grade", weights="w", cluster="school", strata="region")
    assert result.method.full_information and result.design.shared_clusters
    labels, theta = list(result.parameter_labels), np.asarray(result.theta)
    A, B, _ = _hand(data, labels, theta)
    inverse = np.linalg.inv(A)
    expected = inverse @ B @ inverse
    ours = result.parameter_covariance
    np.testing.assert_allclose(ours, expected, rtol=1e-5, atol=1e-7 * np.abs(expected).max())
    # the blocks between the grades are not zero: their intercepts covary through the schools they share
    a, b = labels.index("intercept(x1) [5]"), labels.index("intercept(x1) [6]")
    assert expected[a, b] > 0.2 * np.sqrt(expected[a, a] * expected[b, b])
    # the Yuan-Bentler factor: [tr(A_s^-1 B_s) - tr(A^-1 B)] / df, the saturated model's (each grade's free means
    # and covariances at their EM estimates, which the fit reports as its saturated moments) summed the same way
    p = len(ITEMS)
    I, J = np.tril_indices(p)
    saturated = []
    for g in result.groups:
        saturated += list(np.asarray(g.sample_mean)) + list(np.asarray(g.sample_covariance)[I, J])
    saturated = np.array(saturated)
    k = p + len(I)

    def free_moments(t: np.ndarray, group: str):
        part = t[(0 if group == "5" else k):][:k]
        sigma = np.zeros((p, p))
        sigma[I, J] = part[p:]
        sigma[J, I] = part[p:]
        return part[:p], sigma

    A_s, B_s, scores_s = _hand(data, labels, saturated, points=free_moments)
    assert np.abs(scores_s.sum(axis=0)).max() < 1e-6 * np.abs(scores_s).max()  # the EM moments: the scores sum to 0
    df = result.fit.df
    factor = (np.trace(np.linalg.solve(A_s, B_s)) - np.trace(np.linalg.solve(A, B))) / df
    assert result.robust.scaling_factor == pytest.approx(factor, rel=1e-5)


def _old_meats(result, data):
    """The session start's computation (cadd83a7), for groups whose clusters are their own: sum_g w_g D_g' B_g D_g,
    B_g each group's design-based meat of its rows' scores (inference.robust_missing.scores_meat), and the saturated
    model's trace sum_g tr(H_s,g^-1 B_s,g)."""
    from cfa_tool.data.sample_design import DesignColumns
    from cfa_tool.inference.robust_missing import _model_directions, _unstructured_trace, scores_meat
    from cfa_tool.language import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for

    spec = parse_model(MODEL)
    design = DesignColumns(weights="w", cluster="school", strata="region")
    groups, _ = moments_for(spec, data, "simulated", "grade", None, "full-information", design)
    est = estimate(spec, groups, FitOptions(missing="full-information", diagnostics=False, modification_indices=False))
    likelihood, theta = est.likelihood, est.theta
    q = len(theta)
    meat, trace_sat = np.zeros((q, q)), 0.0
    for g, data_g in enumerate(likelihood.patterns):
        D = _model_directions(likelihood, theta, g)
        mats = likelihood.model.matrices(theta, g)
        design_g = likelihood.groups[g].design
        meat += likelihood.weights[g] * D.T @ scores_meat(data_g, mats.implied_mean(), mats.implied_covariance(),
                                                          design_g) @ D
        B_s = scores_meat(data_g, likelihood.groups[g].mean, likelihood.groups[g].covariance, design_g)
        trace_sat += _unstructured_trace(data_g, likelihood.groups[g].mean, likelihood.groups[g].covariance, B_s)
    inv = np.linalg.inv(likelihood.observed_hessian(theta))
    df = likelihood.n_statistics - q
    return inv @ meat @ inv / likelihood.n_total, (trace_sat - float(np.sum(inv * meat.T))) / (2.0 * df)


def test_with_every_cluster_inside_one_group_the_groups_own_meats_are_kept():
    data = _schools(22)
    own = data.assign(school=data["grade"] + "-" + data["school"])  # each grade its own schools
    result = cfa_tool.fit(MODEL, own, group="grade", weights="w", cluster="school", strata="region")
    assert not result.design.shared_clusters
    cov, factor = _old_meats(result, own)
    np.testing.assert_allclose(result.parameter_covariance, cov, rtol=1e-10, atol=1e-14)
    assert result.robust.scaling_factor == pytest.approx(factor, rel=1e-10)
    # the same rows with the schools shared: the blocks between the grades enter, zero for the grades apart (every
    # school has rows of both grades in each region, so each grade's own block is the same here)
    shared = cfa_tool.fit(MODEL, data, group="grade", weights="w", cluster="school", strata="region")
    np.testing.assert_allclose(shared.theta, result.theta, rtol=1e-8)  # the clusters change no estimate
    labels = list(result.parameter_labels)
    a, b = labels.index("intercept(x1) [5]"), labels.index("intercept(x1) [6]")
    assert cov[a, b] == 0.0 and shared.parameter_covariance[a, b] > 0.2 * np.sqrt(cov[a, a] * cov[b, b])


def test_with_complete_rows_a_just_identified_model_matches_the_complete_data_route():
    # one factor, three items, free intercepts: just-identified in each grade, so its implied moments are the sample
    # moments and the observed information equals the expected one (the residuals are zero): the full-information
    # sandwich of the rows' scores and the complete-data sandwich of the stacked moments (Browne 1984) coincide
    items = ("x1", "x2", "x3")
    data = _schools(23, gaps=0.0, items=items)
    assert not data[list(items)].isna().any().any()
    model = "factor f: x1, x2, x3\n"
    options = dict(group="grade", weights="w", cluster="school", strata="region")
    full = cfa_tool.fit(model, data, missing="full-information", **options)
    complete = cfa_tool.fit(model, data, missing="listwise", **options)
    assert full.method.full_information and not complete.method.full_information
    assert full.design.shared_clusters and complete.design.shared_clusters
    np.testing.assert_allclose(full.theta, complete.theta, rtol=1e-6)
    np.testing.assert_allclose(np.sqrt(np.diag(full.parameter_covariance)),
                               np.sqrt(np.diag(complete.parameter_covariance)), rtol=1e-5)
    labels = list(full.parameter_labels)
    a, b = labels.index("loading(f, x2) [5]"), labels.index("loading(f, x2) [6]")
    assert full.parameter_covariance[a, b] == pytest.approx(complete.parameter_covariance[a, b], rel=1e-4)


# -- Monte Carlo: cluster sampling with domains ----------------------------------------------------------------------

REPLICATIONS = 200  # about 20 s of processor time: one tiny model (3 items, 640 rows) fitted once per replication
#: the grades taken apart are computed in every APART-th replication only (50 of 200): their check is of the mean of
#: the standard errors of the latent mean difference, whose Monte Carlo error over 50 replications (their
#: coefficient of variation, .096 in this design, over sqrt(50): 1.4%) is small beside that of the empirical SD over
#: all 200 (5%), which it shares; the ratio was 1.80 over all 200 and 1.79 over every fourth with these seeds (s28),
#: the bound 1.4
APART = 4


def test_standard_errors_track_the_spread_of_estimates_under_cluster_sampling_with_domains():
    """40 schools in 3 regions, 8 pupils of each of two grades per school, a school effect on the factor (sd .6
    against 1 within schools: intraclass correlation about .26) shared by both grades, 8% of the later items' answers
    missing at random (on the first item), sampling weights; the scalar model, true.  Over R = 200 replications the
    Monte Carlo error of an empirical SD is about SD / sqrt(2 (R - 1)), 5% of it (normal-theory approximation), so
    the mean standard error should lie within 15% of the SD; the grades taken as independent samples (each grade's
    schools its own) leave out that the school effect moves both grades' means together, which cancels in their
    difference: the standard error of the latent mean difference then comes out far too large (1.8 times the SD in
    this design; computed in every fourth replication, see APART).  The scaled test's rejections at .05 lie within the central 99.9% of Binomial(200, .05)."""
    import copy
    from dataclasses import replace

    from scipy import stats

    from cfa_tool.data.sample_design import DesignColumns
    from cfa_tool.inference.robust_missing import robust_missing
    from cfa_tool.language import parse_model
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for

    spec = parse_model("factor f: x1, x2, x3\ninvariance scalar\n")
    design = DesignColumns(weights="w", cluster="school", strata="region")
    options = FitOptions(missing="full-information", diagnostics=False, modification_indices=False)
    wanted = ("loading(f, x2) [5]", "intercept(x2) [5]", "mean(f) [6]")  # held equal, held equal, the difference
    estimates, shared_se, apart_se, p_values = [], [], [], []
    for r in range(REPLICATIONS):
        data = _schools(1000 + r, schools=40, per_grade=8, items=("x1", "x2", "x3"), school_sd=0.6)
        groups, _ = moments_for(spec, data, "simulated", "grade", None, "full-information", design)
        est = estimate(spec, groups, options)
        assert est.converged
        likelihood, theta = est.likelihood, est.theta
        at = [list(est.table.free_labels).index(label) for label in wanted]
        df = likelihood.n_statistics - len(theta)
        saturated = [(g.mean, g.covariance) for g in likelihood.groups]
        cov, c, _ = robust_missing(likelihood, theta, saturated, df, None)
        if r % APART == 0:
            apart = copy.copy(likelihood)  # the same rows, each grade's schools named apart: independent samples
            apart.groups = [replace(g, design=replace(g.design, cluster_names=tuple(f"{k}:{name}" for name in
                                                                                     g.design.cluster_names)))
                            for k, g in enumerate(likelihood.groups)]
            cov_apart, _, _ = robust_missing(apart, theta, saturated, df, None)
            apart_se.append(np.sqrt(np.diag(cov_apart)[at]))
        estimates.append(theta[at])
        shared_se.append(np.sqrt(np.diag(cov)[at]))
        p_values.append(stats.chi2.sf(likelihood.n_total * est.value / c, df))
    spread = np.std(estimates, axis=0, ddof=1)
    ratio = np.mean(shared_se, axis=0) / spread
    assert np.all((ratio > 0.85) & (ratio < 1.15)), ratio
    assert len(apart_se) == REPLICATIONS // APART
    assert np.mean(apart_se, axis=0)[2] / spread[2] > 1.4  # the grades apart: the mean difference's SE far too large
    rejected = int(np.sum(np.array(p_values) < 0.05))
    assert stats.binom.ppf(0.0005, REPLICATIONS, 0.05) <= rejected <= stats.binom.ppf(0.9995, REPLICATIONS, 0.05)


def test_design_based_score_tests_join_the_groups_sharing_clusters():
    """The modification indices of full-information ML under the design are Satorra's (1989) generalized score
    tests, the score s of the freed parameter over L B L', L = (-A_gt A_tt^-1, 1) (assessment.robust_scores): summed
    by hand here with B the stacked groups' meat over the shared schools (so a residual covariance of grade 6 feels
    grade 5's rows through the loadings and intercepts held equal and the schools they share).  The tool takes L from
    the observed information in the moments without the curvature of the moments in the parameters (the same
    convention with the grades apart differs from this exact form by up to 10% in this design), so the check allows
    5%; the grades taken apart (each grade's schools its own) move these two tests by more than 20%."""
    data = _schools(24)
    model = "factor f: x1, x2, x3, x4\ninvariance scalar\n"
    result = cfa_tool.fit(model, data, group="grade", weights="w", cluster="school", strata="region")
    labels, theta = list(result.parameter_labels), np.asarray(result.theta)
    tool = {(tuple(row["variables"]), row["group"]): row["index"] for row in result.modification_indices.dicts()
            if row["kind"] == "residual_covariance"}
    q = len(theta)
    for a, b in ((1, 3), (2, 3)):
        def points(t, g, a=a, b=b):
            mu, sigma = _group_moments(labels, t[:-1], g, ITEMS, common=("loading", "intercept"))
            if g == "6":
                sigma = sigma.copy()
                sigma[a, b] += t[-1]
                sigma[b, a] += t[-1]
            return mu, sigma

        A, B, scores = _hand(data, labels, np.append(theta, 0.0), points=points)
        assert np.abs(scores[:, :q].sum(axis=0)).max() < 1e-6  # the restricted estimates: their scores sum to 0
        L = np.append(-A[q, :q] @ np.linalg.inv(A[:q, :q]), 1.0)
        score = scores[:, q].sum()
        shared = score ** 2 / (L @ B @ L)
        apart_units = data.assign(school=data["grade"] + data["school"])
        _, B_apart, _ = _hand(apart_units, labels, np.append(theta, 0.0), points=points)
        apart = score ** 2 / (L @ B_apart @ L)
        found = tool[((ITEMS[a], ITEMS[b]), "6")]
        assert found == pytest.approx(shared, rel=0.05)
        assert abs(apart - shared) > 0.2 * shared
