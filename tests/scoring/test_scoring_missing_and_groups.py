"""Scores from each row's answered items, block by block, and with each group's own parameters.

The reference values are computed row by row in this file with plain numpy: the posterior mean of
normal factors given the answered items, E[eta | x_o] = alpha + Phi L_o' Sigma_oo^-1 (x_o - mu_o), with
posterior covariance Phi - Phi L_o' Sigma_oo^-1 L_o Phi (the conditional normal distribution; e.g.
Anderson 2003, theorem 2.5.1), and Bartlett's (1937) weights from the residual variances of the
answered items, (L_o' Theta_oo^-1 L_o)^-1 L_o' Theta_oo^-1.
"""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.pipeline.inputs import moments_for, read_inputs
from cfa_tool.data.patterns import group_patterns, pattern_data
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.resources import resource_dir
from cfa_tool.scoring.linear import LinearScorer, score_blocks, score_groups, score_rows
from cfa_tool.scoring.methods import ScoreMethod, Unscored
from cfa_tool.scoring.model import ScoringModel, score_inputs

METHODS = (ScoreMethod.REGRESSION, ScoreMethod.BARTLETT, ScoreMethod.CORRELATION_PRESERVING)


def _model() -> ScoringModel:
    L = np.zeros((8, 2))
    L[:4, 0] = [0.9, 0.8, 0.7, 0.6]
    L[4:, 1] = [0.5, 0.8, 0.7, 0.6]
    L[3, 1] = 0.3  # a cross-loading
    phi = np.array([[1.2, 0.4], [0.4, 0.9]])
    theta = np.diag(np.linspace(0.3, 0.6, 8))
    theta[0, 5] = theta[5, 0] = 0.1  # a residual covariance
    return ScoringModel(tuple(f"y{i}" for i in range(8)), ("a", "b"), L, phi, np.array([0.3, -0.2]),
                        np.linspace(2, 3, 8), theta)


def _rows(model, n, share, seed):
    rng = np.random.default_rng(seed)
    x = rng.multivariate_normal(model.implied_mean, model.implied_covariance, size=n)
    x[rng.random(x.shape) < share] = np.nan
    return x


def _posterior(model, x):
    o = ~np.isnan(x)
    L, phi = model.loadings[o], model.factor_covariance
    s_oo = model.implied_covariance[np.ix_(o, o)]
    gain = phi @ L.T @ np.linalg.inv(s_oo)
    mean = model.factor_means + gain @ (x[o] - model.implied_mean[o])
    return mean, np.sqrt(np.diag(phi - gain @ L @ phi))


def test_without_missing_answers_the_scores_are_the_complete_data_regression_scores():
    model = _model()
    x = _rows(model, 500, 0.0, 1)
    scores = score_rows(model, x)[ScoreMethod.REGRESSION]
    sigma, phi, L = model.implied_covariance, model.factor_covariance, model.loadings
    complete = model.factor_means + (x - model.implied_mean) @ np.linalg.solve(sigma, L @ phi)  # Thurstone (1935)
    np.testing.assert_allclose(scores.scores, complete, rtol=0, atol=1e-10)
    posterior_sd = np.sqrt(np.diag(phi - phi @ L.T @ np.linalg.solve(sigma, L @ phi)))
    np.testing.assert_allclose(scores.standard_errors, np.broadcast_to(posterior_sd, x.shape[:1] + (2,)), atol=1e-12)


def test_with_missing_answers_each_row_is_scored_from_its_answered_items():
    model = _model()
    x = _rows(model, 400, 0.25, 2)
    x[7] = np.nan  # no answers at all
    x[8, :4] = np.nan  # nothing on the first factor's own items
    x[8, 3] = 1.0
    x[9, :4] = np.nan
    out = score_rows(model, x, METHODS, block_rows=64)
    reg, bart = out[ScoreMethod.REGRESSION], out[ScoreMethod.BARTLETT]
    theta = model.residual_covariance
    for i in range(len(x)):
        o = ~np.isnan(x[i])
        if not o.any():
            assert np.isnan(reg.scores[i]).all() and np.isnan(bart.scores[i]).all()
            continue
        mean, sd = _posterior(model, x[i])
        np.testing.assert_allclose(reg.scores[i], mean, rtol=0, atol=1e-10)
        np.testing.assert_allclose(reg.standard_errors[i], sd, rtol=0, atol=1e-10)
        L, t_inv = model.loadings[o], np.linalg.inv(theta[np.ix_(o, o)])
        info = L.T @ t_inv @ L
        if np.linalg.matrix_rank(info) < 2:
            assert np.isnan(bart.scores[i]).all()
            continue
        bartlett = np.linalg.solve(info, L.T @ t_inv @ (x[i, o] - model.intercepts[o]))
        np.testing.assert_allclose(bart.scores[i], bartlett, rtol=0, atol=1e-9)
    assert reg.unscored == {Unscored.NO_ANSWERS: pytest.approx([1, 1])}
    no_items = int(np.sum([np.isnan(r[:4]).all() and not np.isnan(r).all() for r in x]))
    assert bart.unscored[Unscored.TOO_FEW_ANSWERS][0] >= no_items >= 1


def test_blocks_and_the_weights_kept_between_them_do_not_change_the_scores():
    model = _model()
    x = _rows(model, 3000, 0.1, 3)
    whole = score_rows(model, x, METHODS, block_rows=len(x))
    parts = list(score_blocks(model, (x[i:i + 257] for i in range(0, len(x), 257)), METHODS))
    for method in METHODS:
        joined = np.vstack([p[method].scores for p in parts])
        np.testing.assert_array_equal(np.isnan(joined), np.isnan(whole[method].scores))
        np.testing.assert_allclose(joined, whole[method].scores, rtol=0, atol=1e-12)
    scorer = LinearScorer(model)
    scorer.score(x[:100])
    kept = scorer.patterns_kept
    scorer.score(x[:100])
    assert scorer.patterns_kept == kept  # the second pass computed no new pattern weights


def test_pattern_grouping_matches_numpys_grouping_of_rows():
    rng = np.random.default_rng(4)
    for p in (1, 7, 30, 64, 70):
        mask = rng.random((2000, p)) < 0.7
        patterns, index, counts = group_patterns(mask)
        expected = np.unique(mask, axis=0, return_inverse=True, return_counts=True)
        np.testing.assert_array_equal(patterns, expected[0])
        np.testing.assert_array_equal(index, expected[1].ravel())
        np.testing.assert_array_equal(counts, expected[2])
    rows = np.where(rng.random((50, 5)) < 0.8, 1.0, np.nan)
    rows[np.isnan(rows).all(axis=1), 0] = 2.0
    data = pattern_data(rows)
    np.testing.assert_array_equal(data.observed[data.index], ~np.isnan(rows))


def test_each_group_is_scored_with_its_own_intercepts_and_factor_means():
    text = (resource_dir("models") / "rider_three_factors.cfa").read_text() + "invariance scalar\n"
    spec, frame, source = read_inputs(text, resource_dir("demo") / "rider_survey.csv")
    frame = frame.dropna(subset=list(spec.observed_names))
    groups, _ = moments_for(spec, frame, source, group="district")
    est = estimate(spec, groups, FitOptions(missing="listwise"))
    models = {m.group: m for m in score_inputs(est, groups)}
    assert len(models) > 1
    rows = frame[list(spec.observed_names)].to_numpy(float)
    labels = frame["district"].to_numpy(object)
    out = score_groups(models, rows, labels)[ScoreMethod.REGRESSION]
    for g, (label, _) in enumerate(groups):
        mats = est.model.matrices(est.theta, g)  # this group's matrices, read directly
        sel = labels == label
        phi = mats.latent_covariance()
        mean = mats.N + mats.L @ mats.M
        expected = mats.M + (rows[sel] - mean) @ np.linalg.solve(mats.implied_covariance(), mats.L @ phi)
        np.testing.assert_allclose(out.scores[sel], expected, rtol=0, atol=1e-10)
    first, second = (models[label] for label, _ in groups[:2])
    # scalar invariance: the later groups' factor means are free, so they differ from the reference group's zeros
    assert np.abs(second.factor_means - first.factor_means).max() > 1e-3


def test_rows_that_answered_none_of_a_factors_items_are_marked():
    from cfa_tool.scoring.model import items_answered

    model = _model()
    rows = np.ones((3, 8))
    rows[1, :4] = np.nan  # y3 also measures b (cross-loading), so b keeps items; a has none
    rows[2, 4:] = np.nan  # b is still measured by y3
    np.testing.assert_array_equal(items_answered(model, rows) == 0, [[False, False], [True, False], [False, False]])


def test_scores_from_a_full_information_fit_use_its_intercepts_and_each_rows_answers():
    """A full-information ML fit of the demo survey (which has gaps): its estimated intercepts enter the
    scores, and rows with gaps match the row-by-row posterior mean of this file."""
    spec, frame, source = read_inputs(resource_dir("models") / "rider_three_factors.cfa",
                                      resource_dir("demo") / "rider_survey.csv")
    groups, _ = moments_for(spec, frame, source, missing="full-information")
    est = estimate(spec, groups, FitOptions(missing="full-information"))
    (model,) = score_inputs(est, groups)
    mats = est.model.matrices(est.theta, 0)
    np.testing.assert_allclose(model.intercepts, mats.N)
    rows = frame[list(spec.observed_names)].to_numpy(float)
    gaps = np.flatnonzero(np.isnan(rows).any(axis=1) & ~np.isnan(rows).all(axis=1))
    assert len(gaps) >= 5
    out = score_rows(model, rows)[ScoreMethod.REGRESSION]
    for i in gaps:
        mean, sd = _posterior(model, rows[i])
        np.testing.assert_allclose(out.scores[i], mean, atol=1e-10)
        np.testing.assert_allclose(out.standard_errors[i], sd, atol=1e-10)


def test_scores_of_groups_whose_means_the_model_fixes_are_said_not_to_compare(tmp_path):
    """Holzinger & Swineford (1939), by school.  Without intercepts held equal, the model fixes each school's factor
    means at zero, so each school's regression scores average (about) zero in that school, whatever the schools'
    true means: the scores report says first that they cannot be compared.  With 'invariance scalar' the Pasteur
    means are estimated and the schools' average scores differ; no such caution then."""
    import cfa_tool
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.cli import main
    from tests.conftest import THREE_FACTORS, holzinger_swineford

    data = holzinger_swineford()
    configural = cfa_tool.scores(THREE_FACTORS, data, group="school")
    by_school = configural.table.filter(like="_regression").groupby(data["school"].to_numpy()).mean()
    assert np.abs(by_school.to_numpy()).max() < 0.05  # pandas' group means of the written scores
    first = configural.fit.problems[0]  # a caution first, in the box before the tables (new user s21)
    assert first.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS
    assert first.explanation.startswith("The scores of different groups cannot be compared: the model fixes "
                                        "every factor's mean at zero in every group")
    assert not any("cannot be compared" in w for w in configural.warnings)
    scalar = cfa_tool.scores(THREE_FACTORS + "invariance scalar\n", data, group="school")
    by_school = scalar.table.filter(like="_regression").groupby(data["school"].to_numpy()).mean()
    assert np.abs(by_school.loc["Pasteur"] - by_school.loc["Grant-White"]).max() > 0.3
    assert not any(p.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS for p in scalar.fit.problems)
    # a saved fit scored again says so too (its means were estimated as exactly 0 in every group)
    (tmp_path / "m.cfa").write_text(THREE_FACTORS)
    data.to_csv(tmp_path / "hs.csv", index=False)
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "hs.csv"), "--group-column", "school",
                 "--json", str(tmp_path / "fit.json")]) == 0
    from cfa_tool.workflows.factor_scores import score_with_saved_fit

    again = score_with_saved_fit(tmp_path / "m.cfa", tmp_path / "fit.json", tmp_path / "hs.csv")
    assert [p.kind for p in again.fit.problems][:1] == [ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS]


def test_the_precision_note_names_the_standard_error_column_only_when_written():
    """Without standard errors asked for, the file has no _se column, and the note does not point to one."""
    import cfa_tool
    from cfa_tool.reporting.score_report import precision_table
    from tests.conftest import THREE_FACTORS, holzinger_swineford

    data = holzinger_swineford()
    without = cfa_tool.scores(THREE_FACTORS, data)
    assert not any(c.endswith("_se") for c in without.table.columns)
    assert "the _se column" not in precision_table(without, 0).note
    with_se = cfa_tool.scores(THREE_FACTORS, data, standard_errors=True)
    assert any(c.endswith("_se") for c in with_se.table.columns)
    assert "the _se column of the file" in precision_table(with_se, 0).note


def test_the_scores_table_keeps_the_index_of_the_data_frame_scored():
    """A subset, a reversed frame, a frame indexed by ids: the scores table has the frame's index, so pandas joins
    each row's scores to that row (they were numbered 0..n-1, and frame.join(table) gave rows other rows' scores).
    The reference: the scores of the whole frame, taken at the subset's index labels."""
    import cfa_tool
    from tests.conftest import THREE_FACTORS, holzinger_swineford

    data = holzinger_swineford()
    fitted = cfa_tool.fit(THREE_FACTORS, data)
    whole = fitted.scores(data).table
    subset = data[data["school"] == "Pasteur"].iloc[::-1]
    for table in (fitted.scores(subset).table, cfa_tool.scores(THREE_FACTORS, data).table.loc[subset.index]):
        assert list(table.index) == list(subset.index)
        joined = subset.join(table)
        assert np.allclose(joined["visual_regression"], whole.loc[subset.index, "visual_regression"], rtol=0, atol=0)
    by_id = cfa_tool.scores(THREE_FACTORS, data.set_index("id")).table
    assert list(by_id.index) == list(data["id"])
    assert "id" not in by_id.columns


def test_a_frame_of_no_rows_is_an_error_not_an_empty_table():
    """Scoring no rows (a filter that kept none) is said, never an empty table returned without a word."""
    import cfa_tool
    from cfa_tool.errors import DataError
    from tests.conftest import THREE_FACTORS, holzinger_swineford

    data = holzinger_swineford()
    with pytest.raises(DataError, match="has no rows to score"):
        cfa_tool.fit(THREE_FACTORS, data).scores(data[data["school"] == "none"])
