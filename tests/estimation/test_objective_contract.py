"""The contract every objective keeps (:class:`cfa_tool.estimation.objective.Objective`), checked for each:
complete-data maximum likelihood (one group and two), full-information maximum likelihood, and the one
least-squares objective for ordinal items (latent responses of unit variance in one group; thresholds as
parameters in one group and in two).

* the analytic gradient equals central differences of the discrepancy (numerical differentiation
  as in Nocedal & Wright 2006, sec. 8.1), and ``evaluate`` gives the same value and gradient;
* the information (the expected second derivatives used by scoring) is symmetric and positive
  semi-definite: it is 2 D'WD for least squares and the Fisher information for maximum likelihood;
* F is zero where the model reproduces the statistics: at the minimum of a just-identified model
  (as many parameters as statistics, degrees of freedom n_statistics - q = 0, the saturated fit) and,
  for the multi-group objectives, at statistics the model implies exactly (gradient zero there too);
* F is the weighted sum of the groups' own discrepancies, weights N_g / N.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data.groups import split_ordinal_moments
from cfa_tool.data.moments import sample_moments
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.estimation.least_squares import OrdinalLeastSquares, group_statistics
from cfa_tool.estimation.ml import GroupMoments, NormalLikelihood
from cfa_tool.estimation.objective import Objective, ScoreRoute
from cfa_tool.estimation.optimizer import minimise
from cfa_tool.language import parse_model
from cfa_tool.language.spec import ParameterRef, ValueSetting
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.model.starts import starting_values
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.pipeline.ordinal import estimate_ordinal_groups

TWO_FACTORS = "factor f: y1, y2, y3, y4\nfactor g: y5, y6, y7\n"
SATURATED = "factor f: y1, y2, y3\n"  # 3 indicators of one factor: as many parameters as statistics


def _normal_rows(n: int, seed: int, p: int = 7, shift: float = 0.0) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    L = np.zeros((p, 2))
    L[:4, 0] = [0.8, 0.7, 0.6, 0.7]
    L[4:, 1] = [0.7, 0.6, 0.8][: p - 4]
    eta = rng.multivariate_normal([0, 0], [[1, 0.4], [0.4, 1]], n)
    x = shift + eta @ L.T + rng.normal(size=(n, p)) * 0.6
    return pd.DataFrame(x, columns=[f"y{j + 1}" for j in range(p)])


def _ordinal(frame: pd.DataFrame, cuts=(-0.8, 0.1, 0.9)) -> pd.DataFrame:
    return frame.apply(lambda column: np.searchsorted(np.asarray(cuts), column.to_numpy()) + 1)


# ---------------------------------------------------------------- the objectives, each with estimates


def complete_ml(text: str, groups: int = 1):
    spec = parse_model(text)
    names = spec.observed_names
    data = [sample_moments(_normal_rows(400 + 100 * g, 1 + g, shift=0.2 * g)[list(names)], names, "simulated")
            for g in range(groups)]
    labelled = [(None, data[0])] if groups == 1 else [(f"group{g}", m) for g, m in enumerate(data)]
    est = estimate(spec, labelled, FitOptions())
    return est.likelihood, est.theta, est.table


def full_information_ml(text: str):
    spec = parse_model(text)
    names = spec.observed_names
    frame = _normal_rows(500, 3)[list(names)]
    rng = np.random.default_rng(4)
    frame = frame.mask(rng.uniform(size=frame.shape) < 0.12)  # about 12% of the answers missing at random
    moments = sample_moments(frame, names, "simulated", missing="full-information")
    est = estimate(spec, [(None, moments)], FitOptions(missing="full-information"))
    return est.likelihood, est.theta, est.table


def least_squares_unit_variances(text: str):
    # as the one-group ordinal fit sets it up: residual variances fixed (they follow from unit latent variances)
    spec = parse_model(text)
    refs = tuple(ParameterRef("variance", (x,), spec.first_mention(x)) for x in spec.observed_names)
    table = build_parameter_table(replace(spec, fixed=spec.fixed + (ValueSetting(refs, 1.0),)))
    names = table.observed
    moments = ordinal_moments(_ordinal(_normal_rows(600, 5)[list(names)]), names, "simulated")
    pairs = np.tril_indices(len(names), -1)
    objective = OrdinalLeastSquares(StructuredModel(table), [group_statistics(moments.correlations[pairs], moments.gamma,
                                                                               moments.n_obs, True)], thresholds=False)
    found = minimise(objective.evaluate, objective.value, starting_values(table, moments.correlations, None),
                     table.lower, table.upper)
    assert found.converged
    return objective, found.theta, table


def least_squares_thresholds(text: str, groups: int = 1):
    spec = parse_model(text + "ordinal " + ", ".join(parse_model(text).observed_names) + "\n")
    names = spec.observed_names
    frame = pd.concat([_ordinal(_normal_rows(500 + 100 * g, 6 + g, shift=0.3 * g)[list(names)]).assign(site=f"s{g}")
                       for g in range(groups)], ignore_index=True)
    if groups == 1:
        data = [("all", ordinal_moments(frame[list(names)], names, "simulated"))]
    else:
        data, _ = split_ordinal_moments(frame, "site", names, "simulated")
    est = estimate_ordinal_groups(spec, data, FitOptions())
    assert est.converged
    return est.objective, est.theta, est.table


OBJECTIVES = {
    "complete-data ML, one group": lambda text: complete_ml(text),
    "complete-data ML, two groups": lambda text: complete_ml(text, 2),
    "full-information ML": full_information_ml,
    "least squares, unit latent variances": least_squares_unit_variances,
    "least squares, thresholds, one group": lambda text: least_squares_thresholds(text),
    "least squares, thresholds, two groups": lambda text: least_squares_thresholds(text, 2),
}


@pytest.fixture(scope="module", params=list(OBJECTIVES))
def fitted(request):
    return OBJECTIVES[request.param](TWO_FACTORS)


def _away(theta: np.ndarray, seed: int = 11) -> np.ndarray:
    """A point near the estimates but not at the minimum, where the gradient is not zero."""
    return theta + 0.03 * np.random.default_rng(seed).normal(size=len(theta))


def test_every_objective_implements_the_interface(fitted):
    objective, theta, table = fitted
    assert isinstance(objective, Objective)
    assert objective.n_statistics > table.n_free  # the two-factor model is over-identified
    # the score tests' route is declared, and the rank-two one has its candidates' scores
    assert isinstance(objective.score_route, ScoreRoute)
    assert objective.score_route is not ScoreRoute.RANK_TWO or callable(objective.candidate_scores)
    assert sum(objective.weights) == pytest.approx(1.0)


def test_gradient_equals_central_differences_of_the_discrepancy(fitted):
    objective, theta, _ = fitted
    point = _away(theta)
    h = 1e-6
    numeric = np.array([(objective.value(point + h * e) - objective.value(point - h * e)) / (2 * h)
                        for e in np.eye(len(point))])
    scale = np.abs(numeric).max()
    assert scale > 1e-4  # away from the minimum: there is a gradient to compare
    np.testing.assert_allclose(objective.gradient(point), numeric, rtol=0, atol=1e-6 * scale + 1e-9)
    evaluation = objective.evaluate(point)
    assert evaluation.value == pytest.approx(objective.value(point), rel=1e-12)
    np.testing.assert_allclose(evaluation.gradient, objective.gradient(point), rtol=0, atol=1e-10 * scale)


def test_information_is_symmetric_and_positive_semi_definite(fitted):
    objective, theta, _ = fitted
    for point in (theta, _away(theta)):
        information = objective.evaluate(point).information
        assert information.shape == (len(point), len(point))
        np.testing.assert_allclose(information, information.T, rtol=0, atol=1e-12 * np.abs(information).max())
        assert np.linalg.eigvalsh(information)[0] >= -1e-10 * np.abs(information).max()


def test_discrepancy_is_the_weighted_sum_of_the_groups(fitted):
    objective, theta, _ = fitted
    point = _away(theta)
    total = sum(w * objective.group_discrepancy(point, g) for g, w in enumerate(objective.weights))
    assert objective.value(point) == pytest.approx(total, rel=1e-12)


@pytest.mark.parametrize("name", [n for n in OBJECTIVES if "two groups" not in n])
def test_discrepancy_is_zero_at_a_saturated_fit(name):
    objective, theta, table = OBJECTIVES[name](SATURATED)
    assert objective.n_statistics == table.n_free  # just identified: zero degrees of freedom
    assert objective.value(theta) == pytest.approx(0.0, abs=1e-9)
    assert objective.value(_away(theta)) > 1e-6  # and F is not zero elsewhere


def test_discrepancy_and_gradient_are_zero_where_the_statistics_are_the_implied_ones():
    # two groups: the model reproduces statistics it implies itself exactly
    likelihood, theta, _ = complete_ml(TWO_FACTORS, 2)
    model = likelihood.model
    implied = []
    for g, gm in enumerate(likelihood.groups):
        mats = model.matrices(theta, g)
        implied.append(GroupMoments(mats.implied_covariance(), mats.implied_mean(), gm.n_obs))
    exact = NormalLikelihood(model, implied)
    assert exact.value(theta) == pytest.approx(0.0, abs=1e-10)
    np.testing.assert_allclose(exact.gradient(theta), 0.0, atol=1e-9)

    objective, theta, _ = least_squares_thresholds(TWO_FACTORS, 2)
    exact = objective.with_targets([objective.statistics(theta, g) for g in range(len(objective.weights))])
    assert exact.value(theta) == pytest.approx(0.0, abs=1e-14)
    np.testing.assert_allclose(exact.gradient(theta), 0.0, atol=1e-12)
    assert exact.value(_away(theta)) > 1e-6
