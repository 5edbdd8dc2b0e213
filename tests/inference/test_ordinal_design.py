"""Ordinal items under a sampling design: weighted thresholds and polychoric (polyserial, Pearson)
correlations as pseudo-maximum-likelihood estimates (Muthén & Satorra 1995; Asparouhov 2005), with the
design-based covariance of their influence functions (per-cluster sums within strata), then the usual
least-squares fit with robust standard errors and adjusted tests."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats
from statsmodels.regression.linear_model import WLS

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.data.sample_design import design_columns
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.inference.test_sample_design import _assert_same, _by_row

ONE_FACTOR = "factor f: a, b, c, d\n"
ITEMS = ["a", "b", "c", "d"]
CUTS = np.array([-0.8, 0.1, 0.9])
LOADINGS = np.array([0.8, 0.7, 0.6, 0.7])


def _ordinal_sample(rng, clusters: int, size: int, between: float = 0.0) -> pd.DataFrame:
    """Four items of four categories from one factor (loadings .8, .7, .6, .7 on the latent responses, unit
    total variance); ``between`` is the share of the factor's and the residuals' variance that lies between
    clusters (rows of a cluster answer alike), which leaves the total covariance, and so the model, unchanged."""
    unit = np.repeat(np.arange(clusters), size)
    n = len(unit)
    eta = (rng.normal(0, np.sqrt(between), clusters)[unit] + rng.normal(0, np.sqrt(1 - between), n))
    residual_sd = np.sqrt(1 - LOADINGS**2)
    eps = (rng.normal(0, np.sqrt(between), (clusters, 4))[unit] + rng.normal(0, np.sqrt(1 - between), (n, 4)))
    latent = eta[:, None] * LOADINGS + eps * residual_sd
    return pd.DataFrame(np.digitize(latent, CUTS) + 1, columns=ITEMS).assign(unit=unit)


@pytest.fixture(scope="module")
def survey():
    rng = np.random.default_rng(19)
    data = _ordinal_sample(rng, 80, 6, between=0.3)
    return data.assign(w=rng.uniform(0.4, 2.5, len(data)), freq=rng.integers(1, 4, len(data)), two=2.0,
                       row=np.arange(len(data)), x=data["a"] + rng.normal(0, 1, len(data)),
                       stratum=data["unit"] // 20)


# -- the weighted first step against independent estimators --------------------------------------------------------

def test_weighted_thresholds_are_normal_quantiles_of_weighted_proportions(survey):
    # tau_c = Phi^-1 of the weighted share of answers at or below c (the pseudo-ML threshold of a probit with
    # no predictors; Muthén & Satorra 1995): checked against numpy's weighted average and scipy.stats.norm.ppf.
    moments = ordinal_moments(survey, tuple(ITEMS), "<test>", design=design_columns("w"))
    w = survey["w"].to_numpy()
    for k, item in enumerate(ITEMS):
        x = survey[item].to_numpy()
        expected = [stats.norm.ppf(np.average(x <= c, weights=w)) for c in (1, 2, 3)]
        np.testing.assert_allclose(moments.thresholds[k], expected, rtol=1e-12)


def test_weighted_polychoric_maximizes_the_weighted_bivariate_normal_likelihood(survey):
    # The weighted log-likelihood sum_i w_i log P(x_i = a, y_i = b), cell probabilities written here with
    # scipy.stats.multivariate_normal's CDF, maximised by scipy.optimize at the weighted thresholds.
    moments = ordinal_moments(survey, tuple(ITEMS), "<test>", design=design_columns("w"))
    w = survey["w"].to_numpy()
    a, b = survey["a"].to_numpy() - 1, survey["b"].to_numpy() - 1
    ta = np.concatenate([[-8.0], moments.thresholds[0], [8.0]])
    tb = np.concatenate([[-8.0], moments.thresholds[1], [8.0]])

    def negative(rho):
        mvn = stats.multivariate_normal(mean=[0, 0], cov=[[1, rho], [rho, 1]])
        F = np.array([[mvn.cdf([u, v]) for v in tb] for u in ta])
        cells = F[1:, 1:] - F[:-1, 1:] - F[1:, :-1] + F[:-1, :-1]
        return -float(np.sum(w * np.log(cells[a, b])))

    best = optimize.minimize_scalar(negative, bounds=(-0.99, 0.99), method="bounded", options={"xatol": 1e-8}).x
    assert moments.correlations[1, 0] == pytest.approx(best, abs=2e-5)


def test_weighted_polyserial_and_pearson_maximize_their_weighted_likelihoods(survey):
    # Polyserial (two-step, Olsson, Drasgow & Dorans 1982): the weighted log-likelihood of the ordinal item
    # given the continuous one standardized by its weighted mean and SD, written here with scipy.stats.norm;
    # Pearson: numpy's weighted covariance (np.cov with aweights) scaled to a correlation.
    frame = survey.assign(y=survey["b"] * 0.5 + survey["x"])
    moments = ordinal_moments(frame, ("a", "x", "y"), "<test>", frozenset({"x", "y"}), design=design_columns("w"))
    w = frame["w"].to_numpy()
    x = frame["x"].to_numpy()
    z = (x - np.average(x, weights=w)) / np.sqrt(np.cov(x, aweights=w, bias=True))
    codes = frame["a"].to_numpy() - 1
    t = np.concatenate([[-np.inf], moments.thresholds[0], [np.inf]])

    def negative(rho):
        s = np.sqrt(1 - rho**2)
        prob = stats.norm.cdf((t[codes + 1] - rho * z) / s) - stats.norm.cdf((t[codes] - rho * z) / s)
        return -float(np.sum(w * np.log(prob)))

    best = optimize.minimize_scalar(negative, bounds=(-0.99, 0.99), method="bounded", options={"xatol": 1e-9}).x
    assert moments.correlations[1, 0] == pytest.approx(best, abs=1e-6)
    pearson = np.cov(np.vstack([x, frame["y"]]), aweights=w, bias=True)
    assert moments.correlations[2, 1] == pytest.approx(pearson[0, 1] / np.sqrt(pearson[0, 0] * pearson[1, 1]), rel=1e-10)


@pytest.mark.parametrize("design", ["weights", "cluster", "strata"])
def test_threshold_standard_errors_are_the_design_based_ones_of_a_weighted_proportion(survey, design):
    # The threshold's standard error is that of the weighted proportion divided by phi(tau) (delta method);
    # the proportion's design-based standard error is statsmodels' for a weighted regression on a constant:
    # HC0 with weights, cluster sums with clusters (its factor G/(G-1) (N-1)/(N-K) is G/(G-1) with K = 1),
    # and with strata each stratum's cluster sums centred (Wolter 2007, linearization; recalled from memory),
    # written out here from statsmodels' per-row scores.
    options = {"weights": dict(weights="w"), "cluster": dict(weights="w", cluster="unit"),
               "strata": dict(weights="w", cluster="unit", strata="stratum")}[design]
    result = cfa_tool.fit(ONE_FACTOR, survey, ordinal="all", **options)
    rows = {(r.variables): (r.estimate, r.se) for r in result.estimates if r.kind == "threshold"}
    w = survey["w"].to_numpy()
    for c in (1, 2, 3):
        below = (survey["c"].to_numpy() <= c).astype(float)
        ones = np.ones((len(below), 1))
        model = WLS(below, ones, weights=w)
        if design == "weights":
            se = model.fit(cov_type="HC0").bse[0]
        elif design == "cluster":
            se = model.fit(cov_type="cluster", cov_kwds={"groups": survey["unit"].to_numpy()}).bse[0]
        else:
            fitted = model.fit()
            scores = w * (below - fitted.params[0])  # weighted score of each row
            sums = pd.Series(scores).groupby(survey["unit"].to_numpy()).sum()
            strata = survey.groupby("unit")["stratum"].first().loc[sums.index].to_numpy()
            var = 0.0
            for h in np.unique(strata):
                zh = sums.to_numpy()[strata == h]
                var += len(zh) / (len(zh) - 1) * np.sum((zh - zh.mean()) ** 2)
            se = np.sqrt(var) / w.sum()
        tau, tau_se = rows[("c", str(c))]
        assert tau_se == pytest.approx(se / stats.norm.pdf(tau), rel=1e-8)


# -- the three identities the issue asks for -----------------------------------------------------------------------

def test_equal_sampling_weights_give_the_unweighted_fit(survey):
    # Sampling weights are rescaled to sum to the rows, so weights all equal to 2 are no weights at all.
    plain = cfa_tool.fit(ONE_FACTOR, survey, ordinal="all")
    weighted = cfa_tool.fit(ONE_FACTOR, survey, ordinal="all", weights="two")
    _assert_same(plain, weighted, "estimate", 1e-10)
    _assert_same(plain, weighted, "se", 1e-9)
    assert weighted.robust.chi_square_scaled == pytest.approx(plain.robust.chi_square_scaled, rel=1e-9)
    assert weighted.design is not None and plain.design is None


@pytest.mark.parametrize("case", ["ordinal", "mixed", "gaps", "groups"])
def test_frequency_weights_equal_repeated_rows(survey, case):
    # A row of frequency weight k stands for k identical rows: estimates, standard errors and the adjusted
    # test of the repeated rows exactly, with N the sum of the weights.
    data, options = survey, {"ordinal": "all"}
    if case == "mixed":
        options = {"ordinal": ["a", "b", "c"]}
        data = survey.assign(d=survey["x"])
    elif case == "gaps":
        data = survey.copy()
        data[ITEMS] = data[ITEMS].mask(np.random.default_rng(5).random((len(data), 4)) < 0.08)
    elif case == "groups":
        options = {"ordinal": "all", "group": "stratum"}
    repeated = data.loc[data.index.repeat(data["freq"])].reset_index(drop=True)
    weighted = cfa_tool.fit(ONE_FACTOR, data, weights="freq", weight_kind="frequency", **options)
    plain = cfa_tool.fit(ONE_FACTOR, repeated, **options)
    assert weighted.n_obs == len(repeated) == int(data["freq"].sum())
    _assert_same(plain, weighted, "estimate", 1e-7)
    _assert_same(plain, weighted, "se", 1e-6)
    assert weighted.robust.chi_square_scaled == pytest.approx(plain.robust.chi_square_scaled, rel=1e-6)
    assert weighted.fit.chi_square == pytest.approx(plain.fit.chi_square, rel=1e-6)


@pytest.mark.parametrize("group", [None, "stratum"])
def test_clusters_of_one_row_give_the_ordinary_robust_errors(survey, group):
    # With every row its own cluster the cluster sums are the rows' influence functions, so the covariance is
    # the ordinary one times C/(C-1), C = N rows (Cameron & Miller 2015, small-cluster correction; recalled
    # from memory); the least-squares weights scale by its inverse, which leaves the estimates as they are.
    plain = cfa_tool.fit(ONE_FACTOR, survey, ordinal="all", group=group)
    clustered = cfa_tool.fit(ONE_FACTOR, survey, ordinal="all", cluster="row", group=group)
    n = len(survey)
    _assert_same(plain, clustered, "estimate", 1e-8)
    ordinary, cluster_se = _by_row(plain, "se"), _by_row(clustered, "se")
    for key, se in ordinary.items():
        if np.isfinite(se):
            # with groups C/(C-1) is each group's own; the groups here hold about n/4 rows, so compare loosely
            factor = np.sqrt(n / (n - 1)) if group is None else cluster_se[key] / se
            assert cluster_se[key] == pytest.approx(se * factor, rel=1e-8), key
            assert abs(cluster_se[key] / se - 1) < 0.01, key
    assert clustered.method.clustered and "cluster-robust standard errors" in clustered.estimator


def test_the_report_states_the_design_and_warns_of_few_clusters(survey):
    few = survey.assign(unit=survey["unit"] // 8)  # 10 clusters
    result = cfa_tool.fit(ONE_FACTOR, few, ordinal="all", weights="w", cluster="unit")
    assert result.design.clusters == 10 and result.design.columns.weights == "w"
    assert any(p.kind is ProblemKind.FEW_CLUSTERS for p in result.problems)
    text = methods_paragraph(result)
    assert "weighted thresholds and polychoric correlations" in text and "10 clusters defined by unit" in text


@pytest.mark.parametrize("group", [None, "half"])
def test_clusters_and_strata_change_standard_errors_not_estimates(survey, group):
    # The diagonal least-squares weights come from the statistics' variances with the rows taken as independent
    # (weights applied), so clusters and strata leave the estimates of the weighted fit as they are, as they do in
    # a maximum-likelihood fit; only the standard errors and the test follow the design.  With two clusters the
    # design-based covariance is nearly singular, and weights from it moved the loadings (new-user trial 7, U2).
    data = survey.assign(half=np.where(survey["stratum"] < 2, "low", "high"))  # clusters nest in the halves
    weighted = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", weights="w", group=group)
    for design in (dict(cluster="unit"), dict(cluster="unit", strata="stratum"), dict(cluster="stratum")):
        clustered = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", weights="w", group=group, **design)
        _assert_same(weighted, clustered, "estimate", 1e-8)
        assert clustered.fit.chi_square == pytest.approx(weighted.fit.chi_square, rel=1e-8)
        assert not np.allclose([r.se for r in clustered.estimates if r.se is not None],
                               [r.se for r in weighted.estimates if r.se is not None])
    few = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", group=group, cluster="stratum")  # four clusters
    text = methods_paragraph(few)
    caution = next(p for p in few.problems if p.kind is ProblemKind.FEW_CLUSTERS)
    assert text.index(caution.explanation) < text.index("chi-square test")  # beside the design, before the fit
    assert caution.explanation.startswith("Only 4 clusters in 'stratum'")


def test_the_methods_paragraph_says_what_the_design_based_ordinal_fit_did(survey):
    """What inference/design.design_meat and data/sample_design.row_design do, in the paragraph's words: the
    least-squares weights and the standard errors from the design-based covariance of the influence functions,
    cluster sums centred within strata times C_h/(C_h - 1) (said in words, new-user trial s20), sampling weights
    rescaled within each group;
    tetrachoric correlations between two-category items."""
    binary = survey.assign(**{x: (survey[x] > 2).astype(float) + 1 for x in ITEMS})
    text = methods_paragraph(cfa_tool.fit(ONE_FACTOR, binary, ordinal="all", weights="w", cluster="unit",
                                          strata="stratum"))
    assert "least squares on tetrachoric correlations of the ordinal items" in text
    assert "weighted thresholds and tetrachoric correlations" in text and "polychoric" not in text
    assert ("The least-squares weights come from the variances of the thresholds and correlations with the rows "
            "taken as independent (weights applied), so the clusters and strata change the standard errors and the "
            "test but not the estimates") in text
    assert "influence functions" in text and "score contributions" not in text
    assert "clusters' weighted sums centred within each stratum" in text and "C_h" not in text
    assert "each stratum's multiplied by its number of clusters over that number less one" in text
    mixed = survey.assign(a=(survey["a"] > 2).astype(float) + 1)
    unweighted = cfa_tool.fit(ONE_FACTOR, mixed, ordinal="all", ordinal_estimator="unweighted", weights="w",
                              cluster="unit")
    text = methods_paragraph(unweighted)
    assert "polychoric correlations (tetrachoric between items with two categories)" in text
    assert "least-squares weights" not in text and "C/(C - 1)" not in text
    assert "(multiplied by the number of clusters over that number less one; Binder, 1983)" in text
    halves = survey.assign(half=np.where(survey["unit"] < 30, "first", "second"))
    grouped = cfa_tool.fit(ONE_FACTOR, halves, ordinal="all", group="half", weights="w", cluster="unit")
    rows = halves["half"].value_counts().sort_index().tolist()  # pandas: the rows of each group
    assert grouped.design.group_rows == tuple(rows)
    assert f"rescaled within each group to sum to its rows ({rows[0]}, {rows[1]})" in methods_paragraph(grouped)
    continuous = methods_paragraph(cfa_tool.fit(ONE_FACTOR, survey, weights="w", cluster="unit", strata="stratum"))
    assert "rows' score contributions over the clusters' weighted sums centred within each stratum" in continuous


def test_compare_and_invariance_honour_the_design(survey):
    from cfa_tool.workflows.compare import compare
    from cfa_tool.workflows.invariance import invariance

    two = "factor f: a, b\nfactor g: c, d\n"
    comparison = compare([ONE_FACTOR, two], survey, ordinal="all", weights="w", cluster="unit")
    assert all(r.design is not None and r.method.clustered for r in comparison.results)
    ladder = invariance(ONE_FACTOR, survey.assign(half=survey["unit"] % 2), "half", ordinal="all", weights="two")
    unweighted = invariance(ONE_FACTOR, survey.assign(half=survey["unit"] % 2), "half", ordinal="all")
    for step, plain in zip(ladder.steps, unweighted.steps):
        assert step.result.design is not None
        assert step.result.robust.chi_square_scaled == pytest.approx(plain.result.robust.chi_square_scaled, rel=1e-8)


# -- coverage with clustered ordinal data --------------------------------------------------------------------------

def test_cluster_robust_ordinal_intervals_cover_where_naive_ones_do_not():
    # Seeded Monte Carlo: 100 data sets of 40 clusters of 15 rows, half of every variance between clusters.
    # The loading of item b (true value .7/.8 = .875 with a's loading fixed at 1; the latent responses are
    # standardized) is covered by the cluster-robust 95% interval near the nominal rate and by the ordinary
    # robust one, which treats the 600 rows as independent, far less often (.93 and .75 with this seed).  With 100 replications a coverage
    # near .95 has a Monte Carlo standard error of about .022; the bounds allow about three.  Each data set is fitted
    # by the fit's own route for one group of ordinal items (pipeline.inputs._fit_ordinal: the moments under the
    # design, then pipeline.ordinal.fit_ordinal) without the fit's checks and descriptions of the data; the first is
    # also fitted by cfa_tool.fit, both ways, to the same estimate and standard error.
    from cfa_tool.inference.design import ordinal_design_covariance
    from cfa_tool.language import parse_model
    from cfa_tool.pipeline.continuous import FitOptions
    from cfa_tool.pipeline.inputs import ordinal_model
    from cfa_tool.pipeline.ordinal import fit_ordinal

    rng = np.random.default_rng(2026)
    true = LOADINGS[1] / LOADINGS[0]
    key = ("loading", ("f", "b"))
    hits = {"cluster": 0, "naive": 0}
    replications = 100
    light = dict(diagnostics=False, modification_indices=False)
    spec, _ = ordinal_model(parse_model(ONE_FACTOR), "all")
    designs = {"cluster": design_columns(cluster="unit"), "naive": None}
    for r in range(replications):
        data = _ordinal_sample(rng, 40, 15, between=0.5)
        for name, design in designs.items():
            moments = ordinal_design_covariance(ordinal_moments(data, spec.observed_names, "simulated", pairwise=True,
                                                                design=design))
            result = fit_ordinal(spec, moments, FitOptions(**light))
            est, se = _by_row(result)[key], _by_row(result, "se")[key]
            hits[name] += abs(est - true) <= 1.959964 * se
            if r == 0:  # the route is the fit's
                options = {"cluster": "unit"} if design is not None else {}
                fitted = cfa_tool.fit(ONE_FACTOR, data, ordinal="all", **options, **light)
                assert (_by_row(fitted)[key], _by_row(fitted, "se")[key]) == pytest.approx((est, se), rel=1e-10)
    assert 0.88 <= hits["cluster"] / replications <= 1.0
    assert hits["naive"] / replications < 0.85


# -- the design in check and scores; refused where it cannot apply ---------------------------------------------------

def test_check_states_the_design_as_the_fit_uses_it(survey):
    found = cfa_tool.check(ONE_FACTOR, survey.assign(w=survey["w"].where(survey.index != 0, 0.0)), weights="w",
                           cluster="unit", strata="stratum")
    fitted = cfa_tool.fit(ONE_FACTOR, survey.loc[survey.index != 0], weights="w", cluster="unit", strata="stratum")
    assert found.design.to_dict() == fitted.design.to_dict()
    text = found.summary()
    assert "Design: sampling weights (w; sum" in text and "1 row has weight 0 in 'w' and was left out" in text
    assert found.to_dict()["design"]["clusters"] == 80 and found.caution is None
    few = cfa_tool.check(ONE_FACTOR, survey.assign(unit=survey["unit"] // 8), cluster="unit")
    # the fit's caution, in the check's caution box as in the fit's (not in its body a second time)
    assert few.problems[0].kind is ProblemKind.FEW_CLUSTERS and few.problems[0].explanation.startswith(
        "Only 10 clusters in 'unit'") and "Only 10 clusters" not in few.summary()


def test_scores_fit_under_the_design_and_score_every_row(survey, tmp_path, capsys):
    # The parameters are the design's (those of the weighted fit); a row's score follows from its answers and
    # those parameters, so scoring the weighted fit's parameters with a plain scoring of the same rows gives the
    # same numbers: checked by giving the fit JSON of the weighted fit to --from-fit on continuous items.
    import json

    data = survey.assign(x2=survey["x"] * 0.8 + survey["b"], x3=survey["x"] * 0.5 + survey["c"],
                         x4=survey["x"] * 0.6 + survey["d"])
    model = "factor f: x, x2, x3, x4\n"
    path = tmp_path / "survey.csv"
    data.to_csv(path, index=False)
    (tmp_path / "m.cfa").write_text(model)
    weighted = cfa_tool.scores(model, data, weights="w", cluster="unit")
    plain = cfa_tool.scores(model, data)
    assert weighted.fit.design is not None and weighted.rows == len(data)
    # (the scores by name: the scores file carries the cluster column first, scores-s25)
    assert not np.allclose(weighted.table["f_regression"], plain.table["f_regression"])
    fit_json = tmp_path / "fit.json"
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(path), "--weights", "w", "--cluster", "unit",
                 "--json", str(fit_json)]) == 0
    again = tmp_path / "again.csv"
    capsys.readouterr()
    assert main(["scores", str(tmp_path / "m.cfa"), "--data", str(path), "--from-fit", str(fit_json),
                 "--output", str(again)]) == 0
    said = " ".join(capsys.readouterr().out.split())
    # the report says how the earlier fit was made (weighted, clustered), and its notes are said to be about it
    assert "Estimation of the fit: " in said and "weights (w;" in said
    saved_notes = json.loads(fit_json.read_text())["warnings"]
    assert all(f"About the fit (not the scored data): {' '.join(w.split())}" in said for w in saved_notes)
    np.testing.assert_allclose(pd.read_csv(again)["f_regression"], weighted.table["f_regression"], rtol=1e-6)
    assert json.loads(fit_json.read_text())["design"]["weights"] == "w"
    ordinal = cfa_tool.scores(ONE_FACTOR, survey, ordinal="all", weights="freq", weight_kind="frequency")
    repeated = survey.loc[survey.index.repeat(survey["freq"])].reset_index(drop=True)
    plain_ordinal = cfa_tool.scores(ONE_FACTOR, repeated, ordinal="all")
    first = repeated.drop_duplicates(subset=ITEMS).index  # same answers, same score
    by_answers = dict(zip(map(tuple, repeated.loc[first, ITEMS].to_numpy()), plain_ordinal.table.iloc[first, 0]))
    for answers, score in zip(map(tuple, survey[ITEMS].to_numpy()), ordinal.table.iloc[:, 0]):
        assert score == pytest.approx(by_answers[answers], rel=1e-6)


def test_scores_from_an_earlier_fit_refuse_a_design(survey, tmp_path, capsys):
    path = tmp_path / "survey.csv"
    survey.to_csv(path, index=False)
    (tmp_path / "m.cfa").write_text(ONE_FACTOR)
    fit_json = tmp_path / "fit.json"
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(path), "--json", str(fit_json)]) == 0
    capsys.readouterr()
    assert main(["scores", str(tmp_path / "m.cfa"), "--data", str(path), "--from-fit", str(fit_json), "--weights", "w",
                 "--output", str(tmp_path / "s.csv")]) == 2
    err = capsys.readouterr().err
    assert "--weights is about fitting the model" in err and err.count("\n") == 1


def test_the_command_line_fits_ordinal_items_under_a_design(survey, tmp_path, capsys):
    import json

    path = tmp_path / "survey.csv"
    survey.to_csv(path, index=False)
    (tmp_path / "m.cfa").write_text(ONE_FACTOR)
    out = tmp_path / "fit.json"
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(path), "--ordinal", "all", "--weights", "w",
                 "--cluster", "unit", "--strata", "stratum", "--json", str(out)]) == 0
    status = " ".join(capsys.readouterr().out.split())
    assert "polychoric correlations (ordinal items), cluster-robust standard errors; design: sampling weights (w;" in status
    assert "clusters (unit; 80; median intraclass correlation of the items" in status and "strata (stratum; 4)" in status
    saved = json.loads(out.read_text())
    assert saved["design"]["clusters"] == 80 and saved["design"]["strata"] == 4
    assert "cluster-robust standard errors" in saved["estimator"]
