"""Full-information ML for incomplete rows, the EM saturated model, and missing-data summaries."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.data.em import em_saturated
from cfa_tool.data.patterns import pattern_data
from cfa_tool.method import FitTest, MissingData
from tests.conftest import THREE_FACTORS
from tests.commands.test_cli import DATA, MODEL, run

ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture(scope="module")
def hs_holes(hs_data):
    """Holzinger-Swineford with 10% of the test scores removed completely at random (seeded)."""
    data = hs_data.copy()
    values = data[ITEMS].to_numpy().copy()
    values[np.random.default_rng(1).random(values.shape) < 0.10] = np.nan
    data[ITEMS] = values
    return data


def test_without_missing_values_fiml_is_ml(hs_data, hs_three):
    full = cfa_tool.fit(THREE_FACTORS, hs_data, missing="full-information")
    assert full.fit.chi_square == pytest.approx(hs_three.fit.chi_square, rel=1e-8)
    assert full.fit.df == hs_three.fit.df
    assert full.fit.log_likelihood == pytest.approx(hs_three.fit.log_likelihood, rel=1e-10)
    assert full.fit.baseline_chi_square == pytest.approx(hs_three.fit.baseline_chi_square, rel=1e-8)
    ml = {(r.kind, r.variables): r.estimate for r in hs_three.estimates}
    for r in full.estimates:
        if r.kind in ml:
            assert r.estimate == pytest.approx(ml[(r.kind, r.variables)], rel=1e-6, abs=1e-9)
    intercepts = {r.variables[0]: r.estimate for r in full.estimates if r.kind == "intercept"}
    assert intercepts["x1"] == pytest.approx(hs_data["x1"].mean(), rel=1e-8)


def test_fiml_with_groups(hs_data, hs_holes):
    # no gaps: full-information ML by school is the configural multi-group ML fit, 115.851 on 48 df
    # (Holzinger-Swineford configural model; value recalled from memory, as in test_groups_and_invariance)
    full = cfa_tool.fit(THREE_FACTORS, hs_data, group="school", missing="full-information")
    assert full.fit.chi_square == pytest.approx(115.851, abs=2e-3) and full.fit.df == 48
    # with gaps, each group's full-information fit is that group's separate fit (the groups share nothing)
    joint = cfa_tool.fit(THREE_FACTORS, hs_holes, group="school", missing="full-information", test="yuan-bentler")
    parts = [cfa_tool.fit(THREE_FACTORS, hs_holes[hs_holes.school == s].drop(columns="school"), missing="full-information")
             for s in ("Grant-White", "Pasteur")]
    assert joint.converged and joint.robust is not None
    assert joint.fit.chi_square == pytest.approx(sum(p.fit.chi_square for p in parts), rel=1e-6)
    assert joint.fit.log_likelihood == pytest.approx(sum(p.fit.log_likelihood for p in parts), rel=1e-8)


def test_em_matches_complete_data_moments_when_nothing_is_missing(hs_data):
    rows = hs_data[ITEMS].to_numpy(dtype=float)
    mu, sigma, _ = em_saturated(pattern_data(rows))
    assert np.allclose(mu, rows.mean(axis=0), rtol=1e-10)
    assert np.allclose(sigma, np.cov(rows.T, bias=True), rtol=1e-9)


def test_em_matches_the_closed_form_for_monotone_data():
    # Two variables, y missing for part of the rows: the ML estimates have a closed form
    # (Anderson 1957; Little & Rubin 2002, sec. 7.2).
    rng = np.random.default_rng(2)
    x = rng.normal(size=400)
    y = 0.6 * x + rng.normal(scale=0.8, size=400)
    y[rng.random(400) < 0.3 + 0.3 * (x > 0)] = np.nan  # missing at random given x
    rows = np.column_stack([x, y])
    mu, sigma, _ = em_saturated(pattern_data(rows))
    seen = ~np.isnan(y)
    xc, yc = x[seen], y[seen]
    beta = np.cov(xc, yc, bias=True)[0, 1] / np.var(xc)
    resid = np.var(yc - beta * xc)
    mu_x, var_x = x.mean(), x.var()
    assert mu[0] == pytest.approx(mu_x)
    assert mu[1] == pytest.approx(yc.mean() + beta * (mu_x - xc.mean()), rel=1e-7)
    assert sigma[0, 1] == pytest.approx(beta * var_x, rel=1e-7)
    assert sigma[1, 1] == pytest.approx(resid + beta**2 * var_x, rel=1e-7)


def test_fiml_is_less_biased_than_listwise_under_mar():
    # Missing at random: y4..y6 are removed more often when y1 is high.  Listwise deletion
    # biases the factor means and variances; FIML does not (Enders 2010, ch. 3).
    rng = np.random.default_rng(12)
    n = 4000
    f = rng.normal(size=n)
    data = pd.DataFrame({f"y{i}": l * f + rng.normal(scale=0.6, size=n) for i, l in enumerate([1.0, 0.9, 0.8, 1.1, 0.7, 1.0], 1)})
    drop = rng.random(n) < np.where(data["y1"] > 0.5, 0.7, 0.05)
    data.loc[drop, ["y4", "y5", "y6"]] = np.nan
    model = "factor f: y1..y6\n"
    fiml = cfa_tool.fit(model, data, missing="full-information")
    listwise = cfa_tool.fit(model, data, missing="listwise")
    var_fiml = [r.estimate for r in fiml.estimates if r.kind == "factor_variance"][0]
    var_listwise = [r.estimate for r in listwise.estimates if r.kind == "factor_variance"][0]
    assert abs(var_fiml - 1.0) < 0.08
    assert abs(var_listwise - 1.0) > 0.2
    assert any("Listwise deletion" in p.explanation for p in listwise.problems)


def test_modification_indices_with_incomplete_data(hs_holes):
    result = cfa_tool.fit(THREE_FACTORS, hs_holes, missing="full-information")
    top = result.modification_indices[0]
    # the same local misfit as in the complete data leads the list
    assert top.variables in (("visual", "x9"), ("x7", "x8"))
    assert top.index > 20


def test_missing_data_summary_and_cli():
    proc = run("fit", str(MODEL), "--data", str(DATA), "--incomplete-rows", "full-information", "--json", "-")
    assert proc.returncode == 0, proc.stderr
    out = json.loads(proc.stdout)
    assert out["n_obs"] == 480
    assert "full information" in out["estimator"]
    summary = out["missing_data"]
    assert sum(p["rows"] for p in summary["patterns"]) == 480
    assert summary["patterns"][0]["not_answered"] == [] and summary["patterns"][0]["rows"] == 471
    assert all(set(p["not_answered"]) <= set(summary["coverage"]) for p in summary["patterns"])
    assert 0.97 < min(summary["coverage"].values()) < 1.0


def test_frequency_weights_count_rows_in_the_missing_data_table(hs_holes):
    """Under frequency weights the table counts rows as N does: the same patterns, counts and coverage as the
    data set with every row repeated as often as its weight (expanded by pandas, an independent count)."""
    weighted = hs_holes.assign(copies=1 + np.arange(len(hs_holes)) % 3)
    expanded = weighted.loc[weighted.index.repeat(weighted["copies"])].reset_index(drop=True)
    by_weight = cfa_tool.fit(THREE_FACTORS, weighted, weights="copies", weight_kind="frequency")
    repeated = cfa_tool.fit(THREE_FACTORS, expanded)
    assert by_weight.n_obs == repeated.n_obs == int(weighted["copies"].sum())
    assert by_weight.missing_data["patterns"] == repeated.missing_data["patterns"]
    assert by_weight.missing_data["coverage"] == pytest.approx(repeated.missing_data["coverage"], abs=1e-12)
    assert by_weight.missing_data["counted_by_weights"] == "copies"
    assert "counted_by_weights" not in repeated.missing_data
    from cfa_tool.reporting.tables import missing_table

    table = missing_table(by_weight)
    assert table.columns[1] == "Rows, weighted"
    assert "counted by their frequency weights ('copies'), as N is" in table.note
    sampling = cfa_tool.fit(THREE_FACTORS, weighted, weights="copies")  # sampling weights: N is the rows
    assert sampling.missing_data["patterns"][0]["rows"] == int((~hs_holes[ITEMS].isna().any(axis=1)).sum())


def test_satorra_bentler_is_refused_with_fiml(hs_holes):
    from cfa_tool.errors import OptionError

    with pytest.raises(OptionError, match="complete rows"):
        cfa_tool.fit(THREE_FACTORS, hs_holes, missing="full-information", test="satorra-bentler")


def test_yuan_bentler_with_complete_rows_and_a_just_identified_model_gives_the_sandwich_standard_errors(hs_data):
    # The Yuan-Bentler sandwich's bread is the observed information.  With complete rows and a just-identified
    # model the estimates reproduce the sample moments (Sigma = S, mu = the means), where the observed and the
    # expected information are equal, and the row scores give Browne's (1984) sandwich exactly: the robust
    # standard errors equal the Satorra-Bentler ones (whose bread is the expected information; they match
    # semopy's, tests/semopy/test_robust_against_semopy.py).  Over-identified models: the observed-information
    # sandwich is checked against semopy's in tests/semopy/test_robust_against_semopy.py.
    one = "factor visual: x1, x2, x3\n"
    sb = cfa_tool.fit(one, hs_data, test="satorra-bentler")
    yb = cfa_tool.fit(one, hs_data, test="yuan-bentler", missing="full-information")
    se = {(r.kind, r.variables): r.se for r in sb.estimates if r.free}
    compared = 0
    for r in yb.estimates:
        if (r.kind, r.variables) in se:
            assert r.se == pytest.approx(se[(r.kind, r.variables)], rel=1e-6), r.variables
            compared += 1
    assert compared == 6 and yb.fit.df == 0
    assert yb.robust.test is FitTest.YUAN_BENTLER


def test_yuan_bentler_scaling_with_complete_rows_from_the_observed_information(hs_data):
    # Holzinger-Swineford three-factor model, complete rows: lavaan's robust maximum likelihood ("MLR", its
    # Yuan-Bentler correction with observed information) reports 85.306 scaled to 87.132, a factor of 0.979 (values
    # recalled from memory, not checked here).  The expected-information (Satorra-Bentler) factor of the same
    # data is 1.055: the two estimate the same limit, apart here by the model's misfit (chi-square 85 on 24 df).
    yb = cfa_tool.fit(THREE_FACTORS, hs_data, test="yuan-bentler", missing="full-information")
    assert yb.fit.chi_square == pytest.approx(85.306, abs=1e-3)
    assert yb.robust.chi_square_scaled == pytest.approx(87.132, abs=2e-3)
    assert yb.robust.scaling_factor == pytest.approx(0.979, abs=5e-4)
    sb = cfa_tool.fit(THREE_FACTORS, hs_data, test="satorra-bentler")
    assert sb.robust.scaling_factor == pytest.approx(yb.robust.scaling_factor, rel=0.1)


def test_every_view_names_the_information_of_the_robust_standard_errors(hs_data, hs_holes):
    # the Yuan-Bentler sandwich is built on the observed information, the Satorra-Bentler one on the expected
    from cfa_tool.reporting.paragraph import methods_paragraph

    yb = cfa_tool.fit(THREE_FACTORS, hs_holes, test="robust")
    assert yb.robust.test is FitTest.YUAN_BENTLER
    assert yb.estimator.endswith("robust (Huber-White) standard errors from the observed information "
                                 "(full information, incomplete rows included)")
    assert json.loads(json.dumps(yb.to_dict()))["estimator"] == yb.estimator
    assert ("full-information maximum likelihood with the Yuan-Bentler scaled test and robust standard errors whose "
            "sandwich is built on the observed information") in methods_paragraph(yb)
    sb = cfa_tool.fit(THREE_FACTORS, hs_data, test="robust")
    assert ("maximum likelihood with the Satorra-Bentler scaled test and robust standard errors whose sandwich is "
            "built on the expected information") in methods_paragraph(sb)


def test_yuan_bentler_scaling_is_near_one_for_normal_data_with_gaps():
    rng = np.random.default_rng(21)
    n = 3000
    f = rng.normal(size=(n, 2))
    data = pd.DataFrame({f"y{i}": f[:, i // 3] + rng.normal(scale=0.7, size=n) for i in range(6)})
    values = data.to_numpy().copy()
    values[rng.random(values.shape) < 0.15] = np.nan
    data[:] = values
    result = cfa_tool.fit("factor f: y0, y1, y2\nfactor g: y3, y4, y5\n", data, missing="full-information", test="yuan-bentler")
    assert result.robust.scaling_factor == pytest.approx(1.0, abs=0.15)
    assert result.robust.p_value_scaled > 0.001


@pytest.mark.parametrize("group, extra", [(None, "covary x1, x4\n"), ("school", "invariance scalar\n")])
def test_closed_form_fiml_hessian_matches_differences_of_the_gradient(hs_holes, group, extra):
    # the observed information used for standard errors under MAR, in closed form, against central
    # differences of the row-by-row gradient (with groups: free factor means, whose second derivatives enter)
    from cfa_tool.pipeline.inputs import moments_for
    from cfa_tool.numerics.linalg import difference_hessian
    from cfa_tool.pipeline.continuous import FitOptions, estimate
    from cfa_tool.language import parse_model

    spec = parse_model(THREE_FACTORS + extra)
    groups, _ = moments_for(spec, hs_holes, "hs", group, None, "full-information")
    est = estimate(spec, groups, FitOptions(missing="full-information"))
    theta = est.theta + 0.01 * np.random.default_rng(2).normal(size=len(est.theta))
    closed = est.likelihood.observed_hessian(theta)
    numeric = difference_hessian(est.likelihood.gradient, theta, central=True)
    assert np.abs(closed - numeric).max() < 1e-6 * np.abs(numeric).max()


def test_rows_with_gaps_are_kept_by_default(hs_holes):
    """With about 10% of answers missing at random, the default fit uses all 301 rows by full-information
    ML (the same estimates as asking for it), and says so; listwise deletion, asked for, keeps about a
    third of the rows and warns first."""
    default = cfa_tool.fit(THREE_FACTORS, hs_holes)
    explicit = cfa_tool.fit(THREE_FACTORS, hs_holes, missing="full-information")
    assert default.n_obs == 301 and default.method.missing is MissingData.FULL_INFORMATION
    np.testing.assert_allclose([r.estimate for r in default.estimates], [r.estimate for r in explicit.estimates],
                               rtol=1e-10)
    assert default.fit.chi_square == pytest.approx(explicit.fit.chi_square, rel=1e-10)
    assert any("rows miss some answers on model variables; every answer is used by full-information ML" in w
               for w in default.warnings)
    listwise = cfa_tool.fit(THREE_FACTORS, hs_holes, missing="listwise")
    assert listwise.n_obs < 130
    assert listwise.problems[0].explanation.startswith(f"Listwise deletion left out {301 - listwise.n_obs} of 301 rows")
    found = cfa_tool.check(THREE_FACTORS, hs_holes)
    assert (found.rows, found.complete, found.with_gaps, found.empty) == (301, listwise.n_obs, 301 - listwise.n_obs, 0)
    assert all(0.8 < share < 1 for share in found.coverage.values())
    assert "Rows: 301 read, " in found.summary() and found.rows_in_file is None
    # with a row filter the rows line says how many were read and how many kept (new-user trial: "300 read" of 2000)
    kept = cfa_tool.check(THREE_FACTORS, hs_holes.assign(half=np.arange(301) % 2), keep=["half = 1"])
    assert kept.rows_in_file == 301 and kept.rows == 150
    assert "Rows: 301 read, 150 kept by the row filter, " in " ".join(kept.summary().split())


def test_satorra_bentler_with_gaps_needs_a_choice(hs_holes):
    with pytest.raises(OptionError, match="whose robust test is Yuan-Bentler"):
        cfa_tool.fit(THREE_FACTORS, hs_holes, test="satorra-bentler")
    assert cfa_tool.fit(THREE_FACTORS, hs_holes, test="satorra-bentler", missing="listwise").robust is not None


def _too_few_complete_rows() -> np.ndarray:
    """8 items with one common factor: 6 complete rows (fewer than the items) and 6 rows that miss one or two items."""
    rng = np.random.default_rng(1)
    rows = rng.normal(size=(12, 1)) * rng.uniform(.5, .8, size=8) + rng.normal(size=(12, 8)) * 0.6
    for r in range(6, 12):
        rows[r, rng.choice(8, size=1 + r % 2, replace=False)] = np.nan
    return rows


def test_a_saturated_model_without_a_maximum_is_named_with_its_group():
    rows = _too_few_complete_rows()
    # Independent of the EM code: the normal log-likelihood of the observed answers (scipy) grows without bound
    # along covariance matrices that become singular in a direction v orthogonal to the complete rows' span,
    # so the saturated model has no maximum.
    from scipy.stats import multivariate_normal

    complete = rows[:6]
    mu = complete.mean(axis=0)
    _, _, vt = np.linalg.svd(complete - mu)
    v = vt[-1]  # the centred complete rows have rank 5 of 8: v is orthogonal to them
    for row in rows[6:]:  # every incomplete row misses an item that v touches, so its density stays bounded
        assert np.abs(v[np.isnan(row)]).max() > 1e-2

    def loglik(eps: float) -> float:
        sigma = np.eye(8) - np.outer(v, v) + eps * np.outer(v, v)
        total = 0.0
        for row in rows:
            seen = ~np.isnan(row)
            total += multivariate_normal(mu[seen], sigma[np.ix_(seen, seen)]).logpdf(row[seen])
        return total

    values = [loglik(eps) for eps in (1e-4, 1e-6, 1e-8)]
    # each step of eps by 1/100 adds 6 x 0.5 x log(100) = 13.8 from the complete rows; the others change little
    assert all(b > a + 12 for a, b in zip(values, values[1:]))

    with pytest.raises(cfa_tool.errors.EstimationError, match="becoming singular"):
        em_saturated(pattern_data(rows))
    frame = pd.DataFrame(rows, columns=[f"y{i}" for i in range(1, 9)])
    from cfa_tool.data.moments import sample_moments

    with pytest.raises(cfa_tool.errors.EstimationError) as caught:
        sample_moments(frame, tuple(frame.columns), "small.csv", group="'Audit' of department",
                       missing=MissingData.FULL_INFORMATION)
    message = str(caught.value)
    assert message.startswith("small.csv (group 'Audit' of department): ")
    assert "6 of its 12 rows answer all 8 items" in message and "leave this group out" in message


@pytest.mark.parametrize("change, words", [
    (lambda d: d.assign(x5=3.0), r"column 'x5' has the same value \(3\) in every row used"),
    (lambda d: d.assign(x5=d["x4"]), "the covariance matrix is singular: the columns"),
])
def test_a_constant_or_collinear_item_with_gaps_is_named_not_a_traceback(hs_holes, change, words):
    # With complete rows these errors come from the sample covariance matrix; with gaps from the EM iterate, which
    # is exactly singular at its first step (a constant column has variance 0; x5 = x4 among the answers given).
    data = change(hs_holes.copy())
    data.loc[data["x4"].isna(), "x5"] = np.nan  # where x4 is missing, so is its copy
    with pytest.raises(cfa_tool.errors.DataError, match=words):
        cfa_tool.fit(THREE_FACTORS, data, missing="full-information")


def test_a_fit_with_gaps_names_its_own_way_to_complete_rows(hs_holes):
    # fit has --incomplete-rows, so its note names it (scores from an earlier fit drop it: see the scores tests), as
    # the caller writes it: missing='listwise' from Python, the flag on the command line
    result = cfa_tool.fit(THREE_FACTORS, hs_holes)
    assert any("a fit of the complete rows only (missing='listwise') would leave those rows out" in w
               for w in result.warnings)
    from cfa_tool.options import on_command_line

    with on_command_line():
        result = cfa_tool.fit(THREE_FACTORS, hs_holes)
    assert any("a fit of the complete rows only (--incomplete-rows listwise) would leave those rows out" in w
               for w in result.warnings)


def test_an_item_that_is_the_sum_of_two_others_is_named_whatever_the_path_for_gaps(tmp_path):
    # hostile trial 7, H5: with some answers missing, full-information ML stopped (exit 3) blaming the gaps ('the rows
    # do not carry enough answers together'); the complete rows named the exact combination (exit 2). Invented data:
    # 'total' is the sum of 'a' and 'b' in every row that answers all three.
    rng = np.random.default_rng(5)
    trait = rng.normal(size=200)
    data = pd.DataFrame({name: np.round(3 + trait + rng.normal(scale=0.7, size=200)) for name in "abcd"})
    data["total"] = data["a"] + data["b"]
    data.loc[[3, 17, 40], "c"] = np.nan
    data.loc[[8, 90], "total"] = np.nan
    path = tmp_path / "sum.csv"
    data.to_csv(path, index=False)
    model = "factor f: a, b, c, d, total\n"
    named = r"the columns '(a|b|total)', '(a|b|total)', '(a|b|total)' are exact linear combinations of each other"
    with pytest.raises(cfa_tool.errors.DataError, match=named + " in the 195 rows that answer all 5 items"):
        cfa_tool.fit(model, path)
    with pytest.raises(cfa_tool.errors.DataError, match=named + r" \(for example"):
        cfa_tool.fit(model, path, missing="listwise")
    for command in (["fit", str(tmp_path / "m.cfa")], ["explore"]):
        (tmp_path / "m.cfa").write_text(model)
        done = run(*command, "--data", str(path))
        assert done.returncode == 2, done.stderr
        assert "exact linear combinations" in done.stderr and len(done.stderr.strip().splitlines()) == 1


def test_an_item_answered_by_few_rows_is_named_first():
    # hostile trial 7, H10d: an item answered by 5 of 480 rows drove SRMR .171 and CFI .897, and the only word was
    # '(each item answered in at least 1% of the rows)' in the paragraph. Invented data: 'e' answered by 15 of 200
    # rows, 'd' by half of them (no caution for it).
    from cfa_tool.assessment.admissibility import ProblemKind

    rng = np.random.default_rng(3)
    trait = rng.normal(size=200)
    data = pd.DataFrame({name: trait + rng.normal(scale=0.8, size=200) for name in "abcde"})
    data.loc[15:, "e"] = np.nan
    data.loc[100:, "d"] = np.nan
    result = cfa_tool.fit("factor f: a, b, c, d, e\n", data)
    first = result.problems[0]
    assert first.kind is ProblemKind.FEW_ANSWERS and not first.kind.inadmissible and result.admissible
    assert "Few rows answer the item 'e' (15 of 200 rows)" in first.explanation and "'d'" not in first.explanation
    assert sum(p.kind is ProblemKind.FEW_ANSWERS for p in result.problems) == 1
    assert result.to_dict()["problems"][0]["kind"] == "item answered by few rows"
    assert not any(p.kind is ProblemKind.FEW_ANSWERS for p in cfa_tool.fit("factor f: a, b, c, d\n", data).problems)
    # hostile trial s23 (8): with listwise deletion the 15 rows kept all answer 'e'; the caution said '1 of 15 rows',
    # the whole file's share applied to the rows kept: it counts the rows read
    listwise = cfa_tool.fit("factor f: a, b, c, d, e\n", data, missing="listwise")
    assert listwise.n_obs == 15
    said = next(p.explanation for p in listwise.problems if p.kind is ProblemKind.FEW_ANSWERS)
    assert "Few rows answer the item 'e' (15 of 200 rows read)" in said
    # and with groups (hostile trial s23b, 07: the caution was dropped under listwise deletion with a group column),
    # counts past 999 with their separator (06)
    grouped = pd.concat([data] * 12, ignore_index=True).assign(site=["east"] * 1200 + ["west"] * 1200)
    found = cfa_tool.fit("factor f: a, b, c, d, e\n", grouped, missing="listwise", group="site")
    said = [p.explanation for p in found.problems if p.kind is ProblemKind.FEW_ANSWERS]
    assert len(said) == 2 and all("'e' (90 of 1,200 rows)" in " ".join(str(s).split()) for s in said)


@pytest.mark.parametrize("order", ["C", "F"])
def test_em_with_weights_and_many_patterns_maximises_the_observed_data_likelihood(order):
    """EM's moments (each pattern's conditional covariance inverted once and weighted by the sum of its rows'
    weights) are the maximum of the weighted observed-data log-likelihood sum_i w_i log phi(x_io; mu_o, Sigma_oo)
    (Little & Rubin 2002, sec. 8.2 and 11.2), each row's density by scipy.stats: its derivative along every mean and
    every (co)variance, by central differences, is zero, and a step either way lowers it.  The rows in Fortran order
    too, as a data frame's values come out of pandas (the E-step once wrote each row's conditional means into a copy of
    such rows, and EM stopped at moments that are no maximum)."""
    from scipy import stats

    rng = np.random.default_rng(8)
    n, p = 240, 4
    rows = rng.normal(size=(n, 1)) * np.array([1.0, 0.8, 0.6, 0.9]) + rng.normal(scale=0.7, size=(n, p))
    rows[rng.random((n, p)) < np.array([0.0, 0.15, 0.3, 0.2])] = np.nan  # many patterns, one to three gaps
    weights = rng.uniform(0.3, 3.0, n)
    data = pattern_data(np.asarray(rows, order=order), weights)
    assert len(data.counts) >= 7 and data.observed.sum(axis=1).min() == 1
    mu, sigma, _ = em_saturated(data)

    patterns = [(o, ~np.isnan(rows) == o) for o in {tuple(~np.isnan(x)) for x in rows}]
    patterns = [(np.array(o), same.all(axis=1)) for o, same in patterns]

    def log_likelihood(m, s):  # each pattern's rows at once
        return sum(weights[at] @ np.atleast_1d(stats.multivariate_normal.logpdf(rows[np.ix_(at, o)], m[o], s[np.ix_(o, o)]))
                   for o, at in patterns)

    at = log_likelihood(mu, sigma)
    h = 1e-5
    for j in range(p):
        e = np.zeros(p)
        e[j] = h
        up, down = log_likelihood(mu + e, sigma), log_likelihood(mu - e, sigma)
        assert abs(up - down) / (2 * h) < 1e-5 * weights.sum() and up < at and down < at
    for j in range(p):
        for k in range(j + 1):
            E = np.zeros((p, p))
            E[j, k] = E[k, j] = h
            up, down = log_likelihood(mu, sigma + E), log_likelihood(mu, sigma - E)
            assert abs(up - down) / (2 * h) < 1e-5 * weights.sum() and up < at and down < at
