"""A factor a row answered none of the items of: its regression score or posterior mean written as a prediction from
the row's other answers (the default) or left empty (``unanswered_factors='leave-empty'``, --unanswered-factors).

Check values and their sources:
* the regression scores that remain are the conditional normal mean of the factors given the answered items,
  E[eta | x_o] = alpha + Phi L_o' Sigma_oo^-1 (x_o - mu_o), and their standard errors the square roots of the
  diagonal of Phi - Phi L_o' Sigma_oo^-1 L_o Phi (Anderson 2003, theorem 2.5.1), computed row by row here with
  numpy from the fitted matrices;
* the cells left empty are exactly those of a factor the row answered none of the items of, counted here with
  pandas (DataFrame.notna().sum());
* posterior means of ordinal items that remain equal those of the default run cell for cell (the same computation;
  their own check against numerical integration is tests/scoring/test_scoring_ordinal.py).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.errors import OptionError
from cfa_tool.reporting.score_report import scores_report
from cfa_tool.scoring.methods import UnansweredFactor, Unscored
from cfa_tool.workflows.factor_scores import NotScored, models_of_fit
from tests.conftest import THREE_FACTORS

FACTORS = {"visual": ["x1", "x2", "x3"], "textual": ["x4", "x5", "x6"], "speed": ["x7", "x8", "x9"]}


@pytest.fixture(scope="module")
def blanked():
    from tests.conftest import holzinger_swineford

    data = holzinger_swineford().copy()
    data.loc[data.index[[7, 20]], FACTORS["visual"]] = np.nan
    data.loc[data.index[30], FACTORS["textual"]] = np.nan
    data.loc[data.index[40], ["x1", "x5"]] = np.nan  # gaps, but an answer to each factor: scored in full
    return data


def _posterior(model, x):
    o = ~np.isnan(x)
    L, phi = model.loadings[o], model.factor_covariance
    gain = phi @ L.T @ np.linalg.inv(model.implied_covariance[np.ix_(o, o)])
    return model.factor_means + gain @ (x[o] - model.implied_mean[o]), np.sqrt(np.diag(phi - gain @ L @ phi))


def test_left_empty_cells_are_those_of_unanswered_factors_and_the_rest_are_the_posterior_means(blanked):
    kept = cfa_tool.scores(THREE_FACTORS, blanked, standard_errors=True)
    empty = cfa_tool.scores(THREE_FACTORS, blanked, standard_errors=True, unanswered_factors="leave-empty")
    assert kept.unanswered is UnansweredFactor.PREDICT and empty.unanswered is UnansweredFactor.LEAVE_EMPTY
    (model,) = models_of_fit(empty.fit)[0]
    rows = blanked[sum(FACTORS.values(), [])].to_numpy(float)
    for f, (name, items) in enumerate(FACTORS.items()):
        unanswered = (blanked[items].notna().sum(axis=1) == 0).to_numpy()
        score, se = empty.table[f"{name}_regression"].to_numpy(float), empty.table[f"{name}_regression_se"].to_numpy(float)
        np.testing.assert_array_equal(np.isnan(score), unanswered)
        np.testing.assert_array_equal(np.isnan(se), unanswered)
        # the default writes a prediction there, and the same score everywhere else
        assert not kept.table[f"{name}_regression"].isna().any()
        np.testing.assert_array_equal(score[~unanswered], kept.table[f"{name}_regression"].to_numpy(float)[~unanswered])
        for i in np.flatnonzero(~unanswered & np.isnan(rows).any(axis=1)):
            mean, sd = _posterior(model, rows[i])
            assert score[i] == pytest.approx(mean[f], abs=1e-10) and se[i] == pytest.approx(sd[f], abs=1e-10)
    # why_not_scored names the lines with a factor left empty; they are scored lines all the same
    why = empty.table["why_not_scored"]
    assert why.iloc[[7, 20, 30]].tolist() == [NotScored.FACTOR_LEFT_EMPTY.value] * 3
    assert why.drop(why.index[[7, 20, 30]]).isna().all() and kept.table["why_not_scored"].isna().all()
    assert empty.rows_scored == kept.rows_scored == len(blanked) and empty.lines_left_partly_empty == 3
    assert empty.not_scored == {} and empty.to_dict()["unanswered_factors"] == "leave-empty"
    # counted by reason, beside the other empty cells
    assert (Unscored.LEFT_EMPTY.value, "regression", (2, 1, 0)) in empty.unscored
    assert not [r for r, _, _ in kept.unscored if r == Unscored.LEFT_EMPTY.value]


def test_the_caution_and_the_precision_table_count_what_was_left_empty(blanked):
    empty = cfa_tool.scores(THREE_FACTORS, blanked, unanswered_factors="leave-empty")
    (caution,) = [p for p in empty.fit.problems if p.kind is ProblemKind.FACTOR_SCORES_LEFT_EMPTY]
    assert caution.explanation.startswith("2 rows answered none of the items of visual; 1 row answered none of the "
                                          "items of textual: these scores, predictions from the other factors' items "
                                          "alone, are left empty, as asked;")
    assert "unanswered_factors='predict'" in caution.advice
    assert not [p for p in empty.fit.problems if p.kind is ProblemKind.SCORED_WITHOUT_OWN_ANSWERS]
    report = scores_report(empty)
    assert any("answered none of the items of visual" in line for line in report.notice.lines)
    (precision,) = [t for t in report.tables if t.title.startswith("Precision of one person's score")]
    assert ("Left empty, as asked (unanswered_factors='leave-empty'): the regression scores of rows that answered "
            "none of the factor's items, visual 2, textual 1;") in precision.note
    # the default: the scores are written, the caution says what they rest on and how to leave them empty
    kept = cfa_tool.scores(THREE_FACTORS, blanked)
    (said,) = [p for p in kept.fit.problems if p.kind is ProblemKind.SCORED_WITHOUT_OWN_ANSWERS]
    assert "unanswered_factors='leave-empty'" in said.advice
    (precision,) = [t for t in scores_report(kept).tables if t.title.startswith("Precision of one person's score")]
    assert "Left empty" not in precision.note


def test_an_earlier_fit_scores_other_data_with_the_same_choice(blanked, hs_data):
    fit = cfa_tool.fit(THREE_FACTORS, hs_data)
    empty = fit.scores(blanked, methods=["regression", "item-sum"], unanswered_factors="leave-empty")
    kept = fit.scores(blanked, methods=["regression", "item-sum"])
    column = empty.table["visual_regression"]
    assert column.iloc[[7, 20]].isna().all() and kept.table["visual_regression"].notna().all()
    np.testing.assert_array_equal(column.dropna(), kept.table["visual_regression"].drop(kept.table.index[[7, 20]]))
    assert empty.table["why_not_scored"].iloc[30] == NotScored.FACTOR_LEFT_EMPTY.value


@pytest.mark.parametrize("methods", ["item-sum", ["bartlett", "item-mean"], "correlation-preserving"])
def test_the_choice_cannot_apply_without_a_regression_score_or_posterior_mean(hs_data, methods):
    with pytest.raises(OptionError, match=r"unanswered_factors=\.\.\. says what to do with a regression score or posterior "
                                          "mean .* so it cannot apply; remove it"):
        cfa_tool.scores(THREE_FACTORS, hs_data, methods=methods, unanswered_factors="predict")


def test_an_unknown_choice_is_an_error_naming_the_words(hs_data):
    with pytest.raises(OptionError, match=r"unanswered_factors=\.\.\. must be one of predict, leave-empty, not 'empty'"):
        cfa_tool.scores(THREE_FACTORS, hs_data, unanswered_factors="empty")


def test_posterior_means_of_ordinal_items_left_empty():
    from cfa_tool.resources import resource_dir

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    model = (resource_dir("models") / "rider_three_factors.cfa").read_text()
    data = data.copy()
    data.loc[data.index[[3, 9]], ["seat_available", "clean", "temperature", "room_to_stand"]] = np.nan
    kept = cfa_tool.scores(model, data, ordinal="all")
    empty = cfa_tool.scores(model, data, ordinal="all", unanswered_factors="leave-empty")
    column = "comfort_posterior_mean"
    assert empty.table[column].iloc[[3, 9]].isna().all() and empty.table["comfort_posterior_sd"].iloc[[3, 9]].isna().all()
    assert kept.table[column].iloc[[3, 9]].notna().all()
    np.testing.assert_array_equal(empty.table[column].drop(data.index[[3, 9]]), kept.table[column].drop(data.index[[3, 9]]))
    assert (Unscored.LEFT_EMPTY.value, "expected-a-posteriori", (0, 2, 0)) in empty.unscored
    # the quality figures are those of the scores computed, the same under either choice
    assert empty.quality[0].reliability == kept.quality[0].reliability
