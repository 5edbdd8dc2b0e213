"""Survey designs beyond one group of clusters: strata with a single cluster (its sum centred at the mean of all
clusters' sums) and groups that share clusters (domains of one sample: the groups' estimating equations stacked,
the cluster sums gathering every group's rows)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import DataError

ONE_FACTOR = "factor f: x1, x2, x3, x4\n"


def _domains(hs_data: pd.DataFrame, strata: bool = False) -> pd.DataFrame:
    """Holzinger-Swineford (1939) rows with invented weights and 30 neighbourhoods that both schools share
    (every fifth-row block of the file in turn), in 3 strata of 10 when ``strata``."""
    n = len(hs_data)
    unit = np.arange(n) // 5 % 30
    data = hs_data.assign(w=np.random.default_rng(21).uniform(0.5, 2.5, n), unit=unit)
    return data.assign(st=unit // 10) if strata else data


def _hand_stacked_covariance(result, data: pd.DataFrame, group: str, weights: str | None, cluster: str,
                             strata: str | None = None) -> tuple[list[str], np.ndarray]:
    """The design-based covariance of a one-factor model's estimates (marker x1, free intercepts in each group)
    from each row's score written out here: Sigma = phi l l' + diag(psi), mu = nu; the normal log-likelihood of
    row i has score S^-1 r_i in the intercepts and 1/2 [tr(S^-1 D_k S^-1 r r') - tr(S^-1 D_k)] in covariance
    parameter k, r_i = x_i - nu, and expected information S^-1 and 1/2 tr(S^-1 D_k S^-1 D_l) per row (e.g. Bollen
    1989, ch. 4).  The groups' scores are stacked (each row scores its own group's parameters), summed per cluster
    over the rows of every group, and the cluster sums z_c centred within strata: B = sum_h C_h/(C_h - 1)
    sum_c (z_c - zbar_h)(z_c - zbar_h)' (Binder 1983), a stratum with one cluster centred at the mean of all
    clusters' sums with factor 1 (Lumley 2010; recalled from memory); Cov = A^-1 B A^-1 with
    A = sum_g sum_{i in g} w_i times the information (weights rescaled to sum to each group's rows)."""
    labels = list(result.parameter_labels)
    est = {label: value for label, value in zip(labels, result.theta)}
    index = {label: k for k, label in enumerate(labels)}
    q = len(labels)
    rows = data.reset_index(drop=True)
    scores = np.zeros((len(rows), q))
    A = np.zeros((q, q))
    for name, part in rows.groupby(group):
        at = part.index.to_numpy()
        X = part[["x1", "x2", "x3", "x4"]].to_numpy()
        w = part[weights].to_numpy() if weights else np.ones(len(part))
        w = w * len(w) / w.sum()
        lam = np.array([1.0] + [est[f"loading(f, x{j}) [{name}]"] for j in (2, 3, 4)])
        phi = est[f"variance(f) [{name}]"]
        psi = np.array([est[f"variance(x{j}) [{name}]"] for j in (1, 2, 3, 4)])
        nu = np.array([est[f"intercept(x{j}) [{name}]"] for j in (1, 2, 3, 4)])
        sigma = phi * np.outer(lam, lam) + np.diag(psi)
        inv = np.linalg.inv(sigma)
        D, keys = [], []
        for j in (1, 2, 3):
            e = np.zeros(4)
            e[j] = 1.0
            D.append(phi * (np.outer(e, lam) + np.outer(lam, e)))
            keys.append(f"loading(f, x{j + 1}) [{name}]")
        D.append(np.outer(lam, lam))
        keys.append(f"variance(f) [{name}]")
        for j in range(4):
            e = np.zeros((4, 4))
            e[j, j] = 1.0
            D.append(e)
            keys.append(f"variance(x{j + 1}) [{name}]")
        r = X - nu
        cols = [index[k] for k in keys]
        scores[np.ix_(at, cols)] = np.column_stack(
            [0.5 * (np.einsum("ij,jk,ki->i", r @ inv, Dk @ inv, r.T) - np.trace(inv @ Dk)) for Dk in D]) * w[:, None]
        means = [index[f"intercept(x{j}) [{name}]"] for j in (1, 2, 3, 4)]
        scores[np.ix_(at, means)] = (r @ inv) * w[:, None]
        A[np.ix_(cols, cols)] += w.sum() * np.array([[0.5 * np.trace(inv @ Dk @ inv @ Dl) for Dl in D] for Dk in D])
        A[np.ix_(means, means)] += w.sum() * inv
    clusters = rows[cluster].to_numpy()
    layers = rows[strata].to_numpy() if strata else np.zeros(len(rows), dtype=int)
    units = sorted(set(clusters.tolist()))
    sums = {c: scores[clusters == c].sum(axis=0) for c in units}
    stratum_of = {c: layers[clusters == c][0] for c in units}
    grand = np.mean([sums[c] for c in units], axis=0)
    B = np.zeros((q, q))
    for h in sorted(set(stratum_of.values())):
        members = [c for c in units if stratum_of[c] == h]
        C = len(members)
        for c in members:
            if C == 1:
                z = sums[c] - grand
                B += np.outer(z, z)
            else:
                z = sums[c] - (np.mean([sums[m] for m in members], axis=0) if strata else 0.0)
                B += C / (C - 1) * np.outer(z, z)
    inverse = np.linalg.inv(A)
    return labels, inverse @ B @ inverse


# -- groups that share clusters --------------------------------------------------------------------------------------

@pytest.mark.parametrize("strata", [False, True])
def test_groups_sharing_clusters_match_stacked_scores_summed_by_hand(hs_data, strata):
    data = _domains(hs_data, strata)
    options = dict(group="school", weights="w", cluster="unit") | ({"strata": "st"} if strata else {})
    result = cfa_tool.fit(ONE_FACTOR, data, **options)
    labels, expected = _hand_stacked_covariance(result, data, "school", "w", "unit", "st" if strata else None)
    ours = result.parameter_covariance
    np.testing.assert_allclose(np.sqrt(np.diag(ours)), np.sqrt(np.diag(expected)), rtol=1e-6)
    # the blocks between the groups are not zero: the schools' intercepts covary through shared neighbourhoods
    a, b = labels.index("intercept(x1) [Pasteur]"), labels.index("intercept(x1) [Grant-White]")
    assert abs(expected[a, b]) > 0.05 * np.sqrt(expected[a, a] * expected[b, b])
    assert ours[a, b] == pytest.approx(expected[a, b], rel=1e-6)
    assert result.design.shared_clusters and result.design.to_dict()["groups"] == "domains sharing clusters"
    assert "The groups are domains that share clusters" in result.design.sentence()


def test_two_group_means_match_statsmodels_cluster_robust_covariance(hs_data):
    # An independent implementation: the intercepts of a model with free intercepts in each group are the groups'
    # weighted means, and their design-based covariance is that of a weighted regression on the two group dummies
    # with statsmodels' cluster-robust covariance (uncorrected, times the C/(C - 1) the tool uses; Binder 1983).
    data = _domains(hs_data)
    result = cfa_tool.fit(ONE_FACTOR, data, group="school", weights="w", cluster="unit")
    labels = list(result.parameter_labels)
    names = ["Grant-White", "Pasteur"]
    picked = [labels.index(f"intercept(x1) [{g}]") for g in names]
    ours = result.parameter_covariance[np.ix_(picked, picked)]
    dummies = np.column_stack([(data["school"] == g).to_numpy(float) for g in names])
    # the tool rescales sampling weights within each group; the means and their covariance do not depend on it
    w = data["w"].to_numpy() / data.groupby("school")["w"].transform("sum").to_numpy()
    fitted = sm.WLS(data["x1"].to_numpy(), dummies, weights=w).fit(
        cov_type="cluster", cov_kwds={"groups": data["unit"].to_numpy(), "use_correction": False})
    np.testing.assert_allclose(result.theta[picked], fitted.params, rtol=1e-8)
    C = data["unit"].nunique()
    np.testing.assert_allclose(ours, fitted.cov_params() * C / (C - 1), rtol=1e-6)
    assert ours[0, 1] != 0.0


def test_clusters_within_groups_give_the_block_diagonal_covariance(hs_data):
    # With every cluster in one group the groups are independent samples: the stacked meat's blocks between groups
    # are zero and each group's block is its own design-based Gamma_g, so robust_parts equals the sum over groups
    # written out here, sum_g w_g Delta_g' V Gamma_g V Delta_g (Satorra & Bentler 1994 per group), to 1e-12.
    from cfa_tool.inference.design import moment_covariance
    from cfa_tool.inference.robust import _group_blocks, baseline_trace, robust_parts
    from cfa_tool.language.parser import parse_model
    from cfa_tool.numerics.linalg import scaled_inverse
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.pipeline.inputs import moments_for
    from cfa_tool.data.sample_design import DesignColumns, check_design

    n = len(hs_data)
    data = hs_data.assign(w=np.random.default_rng(4).uniform(0.5, 2, n),
                          unit=hs_data["school"].astype(str) + "-" + (np.arange(n) // 6).astype(str),
                          st=(np.arange(n) // 6) % 4)
    spec = parse_model(ONE_FACTOR)
    columns = DesignColumns("w", "unit", "st")
    frame, _ = check_design(data, columns, spec.observed_names, "school", "data")
    groups, _ = moments_for(spec, frame, "data", "school", design=columns)
    est = estimate(spec, groups, FitOptions(test="satorra-bentler"))
    model, likelihood, theta = est.model, est.likelihood, est.theta
    bread = meat = 0.0
    trace = 0.0
    for g, w in enumerate(likelihood.weights):
        delta, weight = _group_blocks(model, theta, likelihood, g)
        V = weight.dense()  # the matrix of normal_weight (robust_parts applies it in its Kronecker form)
        gamma = moment_covariance(likelihood.groups[g].rows, likelihood.groups[g].design, True)
        bread = bread + w * delta.T @ V @ delta
        meat = meat + w * (V @ delta).T @ gamma @ (V @ delta)
        trace += float(np.sum(V * gamma))
    inv = scaled_inverse(bread)
    cov, trace_ug = robust_parts(model, theta, likelihood)
    np.testing.assert_allclose(cov, inv @ meat @ inv / likelihood.n_total, rtol=1e-12, atol=1e-15)
    assert trace_ug == pytest.approx(trace - float(np.sum(inv * meat)), rel=1e-12)
    assert baseline_trace(likelihood) > 0


def test_a_group_with_a_single_cluster_of_its_own_is_an_error(hs_data):
    n = len(hs_data)
    unit = np.where(hs_data["school"] == "Pasteur", "p-only", (np.arange(n) // 5).astype(str))
    with pytest.raises(DataError, match="group 'Pasteur' of 'school' has a single cluster of 'unit'"):
        cfa_tool.fit(ONE_FACTOR, hs_data.assign(unit=unit), group="school", cluster="unit")


def test_groups_sharing_clusters_are_fitted_with_full_information(hs_data):
    # s21 (new-user trial s20, item 5): full-information ML takes groups that share clusters (it refused them, and the
    # only route that kept the clusters left out every row with a gap); tests/inference/test_full_information_domains.py
    # checks its numbers by hand
    data = _domains(hs_data)
    data.loc[data.index[::7], "x2"] = np.nan
    result = cfa_tool.fit(ONE_FACTOR, data, group="school", cluster="unit", weights="w")
    assert result.method.full_information and result.design.shared_clusters
    assert sum(g.data.n_obs for g in result.groups) == len(data)  # every row kept, those with a gap too
    sentence = " ".join(result.design.sentence(full_information=True).split())
    assert "The groups are domains that share clusters" in sentence
    assert "rows with missing answers included" in sentence and "missing at random" in sentence
    a, b = (list(result.parameter_labels).index(f"intercept(x1) [{s}]") for s in ("Pasteur", "Grant-White"))
    cov = result.parameter_covariance
    assert abs(cov[a, b]) > 0.05 * np.sqrt(cov[a, a] * cov[b, b])  # the schools covary through their units


def test_the_listwise_route_of_groups_sharing_clusters_advises_full_information_with_the_clusters(hs_data, tmp_path):
    # new-user trial s16 made the caution on the rows listwise deletion left out advise full-information ML without
    # the clusters, the route that ran then; since s21 full-information ML keeps the clusters, and the advice is the
    # plain one (leave out listwise), never dropping the clusters
    data = _domains(hs_data)
    data.loc[data.index[::2], "x2"] = np.nan  # half the rows have a gap: the caution comes first
    fitted = cfa_tool.fit(ONE_FACTOR, data, group="school", cluster="unit", missing="listwise", weights="w")
    left = [p for p in fitted.problems if p.kind.name == "ROWS_LEFT_OUT"]
    assert len(left) == 2
    for problem in left:
        advice = str(problem.advice)
        assert "without the clusters" not in advice and "missing='full-information'" in advice
        assert "--" not in advice  # a Python caller's words
    from cfa_tool.workflows.invariance import invariance

    ladder = invariance(ONE_FACTOR, data, group="school", cluster="unit", missing="listwise", weights="w")
    assert ladder.steps[0].result.design.shared_clusters
    cautions = [c for c in ladder.warnings if "Listwise deletion left out" in c]
    assert cautions and not any("without the clusters" in c for c in cautions)
    assert any("missing='full-information'" in c for c in cautions)
    # the caution on cells read as no answer ('refused') advises the same route
    words = data.assign(x2=data["x2"].astype(object).where(data["x2"].notna(), "refused"))
    path = tmp_path / "refused.csv"
    words.to_csv(path, index=False)
    read = cfa_tool.fit(ONE_FACTOR, path, group="school", cluster="unit", missing="listwise", weights="w")
    marked = [str(p.advice) for p in read.problems if p.kind.name == "VALUES_READ_AS_MISSING"]
    assert len(marked) == 1 and "leave out missing='listwise'" in marked[0] and "cluster=" not in marked[0]


def test_an_invariance_ladder_of_groups_sharing_clusters(hs_data):
    # the scaled difference tests come from the same stacked meat: a metric step of a model that holds in both
    # schools has a finite scaled test, and the ladder states the domains
    from cfa_tool.workflows.invariance import invariance

    ladder = invariance(ONE_FACTOR, _domains(hs_data), group="school", cluster="unit", weights="w")
    step = ladder.steps[1]
    assert np.isfinite(step.result.robust.chi_square_scaled)
    assert step.versus_previous is not None and np.isfinite(step.versus_previous.chi_square_difference)
    assert step.result.design.shared_clusters


# -- strata with a single cluster -----------------------------------------------------------------------------------

def test_a_lone_cluster_is_centred_at_the_mean_of_all_clusters_by_hand():
    # Five rows, weights 1: stratum a holds clusters 1 = {y 1, 3} and 2 = {y 5}, stratum b the lone cluster
    # 3 = {y 2, 4}.  Contributions y - 3 (the mean is 3): cluster sums z1 = -2 + 0 = -2, z2 = 2, z3 = -1 + 1 = 0.
    # Stratum a: mean 0, C/(C - 1) = 2, 2 (4 + 4) = 16.  Stratum b: centred at the mean of all three sums, 0: 0.
    # Variance of the total 16 and design_meat = 16 / 5 (a textbook linearization, worked here by hand).
    from cfa_tool.data.sample_design import RowDesign
    from cfa_tool.inference.design import design_meat
    from cfa_tool.method import WeightKind

    y = np.array([1.0, 3.0, 5.0, 2.0, 4.0])
    design = RowDesign(np.ones(5), WeightKind.SAMPLING, np.array([0, 0, 1, 2, 2]), np.array([0, 0, 0, 1, 1]),
                       strata_names=("a", "b"))
    assert design_meat((y - 3.0)[:, None], design)[0, 0] == pytest.approx(16 / 5, rel=1e-14)
    assert design.lone_strata() == ("b",)
    # a lone cluster whose sum is not the grand mean adds its spread: y of cluster 3 now 4 and 6 (mean 3.8):
    # contributions y - 3.8: sums z1 = -2.8 - 0.8 = -3.6, z2 = 1.2, z3 = 0.2 + 2.2 = 2.4; grand mean 0;
    # stratum a: mean -1.2, 2 ((-2.4)^2 + 2.4^2) = 23.04; stratum b: (2.4 - 0)^2 = 5.76; total 28.8
    y = np.array([1.0, 3.0, 5.0, 4.0, 6.0])
    assert design_meat((y - 3.8)[:, None], design)[0, 0] == pytest.approx(28.8 / 5, rel=1e-12)


def test_a_fit_with_a_lone_cluster_says_so_and_matches_the_hand_sandwich(hs_data):
    data = _domains(hs_data, strata=True)
    data["st"] = np.where(data["unit"] == 29, 3, data["st"])  # neighbourhood 29 alone in stratum 3
    result = cfa_tool.fit(ONE_FACTOR, data, group="school", weights="w", cluster="unit", strata="st")
    labels, expected = _hand_stacked_covariance(result, data, "school", "w", "unit", "st")
    np.testing.assert_allclose(np.sqrt(np.diag(result.parameter_covariance)), np.sqrt(np.diag(expected)), rtol=1e-6)
    design = result.design
    assert design.lone_strata == ("3",)
    assert design.to_dict()["strata_with_a_single_unit"] == ["3"]
    assert "1 stratum has a single cluster ('3')" in design.sentence()
    assert "centred at the mean of all clusters' sums" in design.sentence()
    (note,) = [w for w in result.warnings if "single cluster" in w]
    assert "errs towards larger standard errors" in note and "Rust & Kalton 1987" in note


def test_a_lone_stratum_within_a_group_is_named_when_groups_are_separate_samples(hs_data):
    # clusters within schools, strata across them: Pasteur has one cluster in stratum 'north'
    n = len(hs_data)
    unit = hs_data["school"].astype(str) + "-" + (np.arange(n) // 6).astype(str)
    data = hs_data.assign(unit=unit, st="south")
    first = data.loc[data["school"] == "Pasteur", "unit"].iloc[0]
    data.loc[data["unit"] == first, "st"] = "north"
    result = cfa_tool.fit(ONE_FACTOR, data, group="school", cluster="unit", strata="st")
    assert result.design.lone_strata == ("north",) and not result.design.shared_clusters
    assert "a single cluster in a group ('north')" in result.design.sentence()


def test_the_command_line_reports_a_lone_stratum(hs_data, tmp_path, capsys):
    data = hs_data.assign(unit=np.arange(len(hs_data)) // 5, st=np.where(np.arange(len(hs_data)) < 5, "edge", "rest"))
    path = tmp_path / "rows.csv"
    data.to_csv(path, index=False)
    (tmp_path / "m.cfa").write_text(ONE_FACTOR)
    out = tmp_path / "fit.json"
    code = main(["fit", str(tmp_path / "m.cfa"), "--data", str(path), "--cluster", "unit", "--strata", "st",
                 "--json", str(out)])
    assert code == 0
    shown = " ".join(capsys.readouterr().out.split())
    assert "a single cluster ('edge')" in shown
    saved = json.loads(out.read_text())
    assert saved["design"]["strata_with_a_single_unit"] == ["edge"]
    assert saved["design"]["single_unit_centred_at"] == "the mean of all units' sums"


@pytest.mark.parametrize("how", ["full-information", "ordinal"])
def test_other_estimators_state_a_lone_stratum_too(hs_data, how):
    # the full-information likelihood's and the ordinal fit's design-based covariances come from the same
    # design_meat, so a lone cluster is centred the same way there and said in the same words
    data = hs_data.assign(unit=np.arange(len(hs_data)) // 5, st=np.where(np.arange(len(hs_data)) < 5, "edge", "rest"))
    options = {}
    if how == "ordinal":
        data[["x1", "x2", "x3", "x4"]] = data[["x1", "x2", "x3", "x4"]].round().clip(1, 6)
        options["ordinal"] = "all"
    else:
        data.loc[data.index[::9], "x3"] = np.nan
    result = cfa_tool.fit(ONE_FACTOR, data, cluster="unit", strata="st", **options)
    assert result.design.lone_strata == ("edge",)
    assert "1 stratum has a single cluster ('edge')" in result.design.sentence(
        full_information=how != "ordinal", ordinal=how == "ordinal")
    assert any("a single cluster ('edge')" in w for w in result.warnings)


def test_bootstrap_refuses_a_lone_stratum(hs_data):
    from cfa_tool.workflows.bootstrap import bootstrap

    data = hs_data.assign(unit=np.arange(len(hs_data)) // 5, st=np.where(np.arange(len(hs_data)) < 5, "edge", "rest"))
    with pytest.raises(DataError, match="stratum 'edge' of column 'st' has a single cluster among the rows analysed"):
        bootstrap(ONE_FACTOR, data, replications=10, workers=1, cluster="unit", strata="st")


def test_ordinal_groups_with_clusters_of_their_own_are_independent_samples():
    # each group's ordinal moments code its clusters apart (from 0 in every group): clusters are told apart by
    # name, so groups whose clusters differ are not taken for domains sharing clusters (a trial found them so)
    from pathlib import Path

    folder = Path(__file__).resolve().parents[1] / "commands" / "bad_inputs"
    data = pd.read_csv(folder / "data" / "ordinal_survey.csv")
    data = data.assign(unit=data["site"] + "-" + data["school"].astype(str))
    result = cfa_tool.fit((folder / "models" / "good.cfa").read_text(), data, group="site", cluster="unit",
                          ordinal="all")
    assert not result.design.shared_clusters and result.design.clusters == 60
    assert "The groups were taken as independent samples, each with its own clusters." in result.design.sentence(
        ordinal=True)


def test_check_names_a_lone_stratum_as_the_fit_would(hs_data):
    data = hs_data.assign(unit=np.arange(len(hs_data)) // 5, st=np.where(np.arange(len(hs_data)) < 5, "edge", "rest"))
    checked = cfa_tool.check(ONE_FACTOR, data, cluster="unit", strata="st")
    assert checked.design.lone_strata == ("edge",)
    assert any("a single cluster ('edge')" in note for note in checked.notes)


def test_groups_that_share_strata_are_said_to_be_treated_as_drawn_apart(hs_data):
    # new-user trial s16: "The groups are taken as independent samples, each group's part of a stratum a stratum of
    # its own." had no verb, and stated as fact an assumption that is false for groups drawn in the same districts
    from cfa_tool.reporting.paragraph import methods_paragraph

    data = _domains(hs_data, strata=True)  # both schools in every stratum (counted below by pandas)
    shared = sorted(str(s) for s, n in data.groupby("st")["school"].nunique().items() if n > 1)
    assert shared == ["0", "1", "2"]
    result = cfa_tool.fit(ONE_FACTOR, data, group="school", weights="w", strata="st")
    sentence = result.design.sentence()
    assert ("The groups were taken as independent samples; each group's rows within a stratum were treated as a "
            "stratum of their own.") in sentence
    assert list(result.design.shared_strata) == shared and result.design.to_dict()["strata_shared_by_groups"] == shared
    caution = [p for p in result.problems if p.kind.name == "GROUPS_SHARE_STRATA"]
    # first (but for the caution on a column of units not taken for clusters, a caution on the design too)
    assert len(caution) == 1 and all(p.kind.name == "UNIT_ROWS_AS_INDEPENDENT"
                                     for p in result.problems[:result.problems.index(caution[0])])
    assert "The groups share 3 strata of 'st' ('0', '1', '2')" in caution[0].explanation
    assert "as if the design had fixed how many rows of each group each stratum holds" in caution[0].explanation
    assert "--cluster" in str(caution[0].advice) or "cluster=..." in str(caution[0].advice)
    assert "The groups share 3 strata" in " ".join(methods_paragraph(result).split())
    # strata that each lie within one group: no caution, and the sentence says so
    own = data.assign(st=data["school"].astype(str) + data["st"].astype(str))
    apart = cfa_tool.fit(ONE_FACTOR, own, group="school", weights="w", strata="st")
    assert "The groups were taken as independent samples, each with its own strata." in apart.design.sentence()
    assert not apart.design.shared_strata and not any(p.kind.name == "GROUPS_SHARE_STRATA" for p in apart.problems)
    # groups that share clusters are domains of one sample: their sentence says so, with no such caution
    domains = cfa_tool.fit(ONE_FACTOR, data, group="school", weights="w", cluster="unit", strata="st")
    assert domains.design.shared_clusters and not any(p.kind.name == "GROUPS_SHARE_STRATA" for p in domains.problems)
