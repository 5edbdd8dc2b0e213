"""The closed-form observed Hessian of models with higher-order factors (model.rank_two.path_second_derivatives): the
second derivatives of Sigma = L A P A' L' + T and mu = N + L A M (A = (I - B)^-1) in the paths B, by the matrix
differential rules of Neudecker & Satorra (1991).  Checked against central differences of each estimator's analytic
gradient (a handbook rule, Nocedal & Wright 2006, section 8.1), away from the minimum where the residual terms count:
maximum likelihood in one group and in two groups with a mean structure (Holzinger & Swineford 1939), full-information
ML with answers removed at random, and least squares on ordinal items (unit-variance latent responses in one group,
thresholds as parameters in two).  The standard errors of a fit with the observed information are compared with
semopy's in tests/semopy/test_higher_order_observed_information_against_semopy.py."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data.groups import split_ordinal_moments
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.estimation.least_squares import OrdinalLeastSquares, group_statistics
from cfa_tool.language import parse_model
from cfa_tool.method import MissingData
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.model.rank_two import mean_second_derivatives, path_second_derivatives, second_derivative_contraction
from cfa_tool.model.starts import starting_values
from cfa_tool.numerics.linalg import difference_hessian
from cfa_tool.pipeline.continuous import FitOptions, estimate
from cfa_tool.pipeline.inputs import moments_for
from cfa_tool.pipeline.ordinal import correlations_in_order, estimate_ordinal_groups, ordinal_spec

HIGHER = ("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
          "factor g: visual, textual, speed\n")
ITEMS = [f"x{i}" for i in range(1, 10)]


def _away(theta: np.ndarray) -> np.ndarray:
    return theta + 0.05 * np.random.default_rng(5).normal(size=len(theta))


def _assert_closed_form_equals_differences(objective, theta: np.ndarray) -> None:
    point = _away(theta)
    closed = objective.observed_hessian(point)
    assert closed is not None, "no closed form for a model with a higher-order factor"
    numeric = difference_hessian(objective.gradient, point, central=True)
    # central differences of step 1e-5 are good to about 1e-9 of the largest entry here (2e-9 to 3e-9 when this test
    # was written); 1e-6 leaves room
    np.testing.assert_allclose(closed, numeric, rtol=0, atol=1e-6 * np.abs(numeric).max())


def _with_gaps(frame: pd.DataFrame) -> pd.DataFrame:
    values = frame[ITEMS].to_numpy(float).copy()
    values[np.random.default_rng(3).random(values.shape) < 0.1] = np.nan
    return frame.drop(columns=ITEMS).join(pd.DataFrame(values, columns=ITEMS, index=frame.index))


@pytest.mark.parametrize("group, invariant, missing", [
    (None, (), MissingData.LISTWISE),
    ("school", (), MissingData.LISTWISE),
    # equal loadings and intercepts: the lower factors' means free in the second group (the paths' mean terms)
    ("school", ("loadings", "intercepts"), MissingData.LISTWISE),
    (None, (), MissingData.FULL_INFORMATION),
    ("school", ("loadings", "intercepts"), MissingData.FULL_INFORMATION),
], ids=["one group", "two groups", "two groups, scalar", "full information", "full information, two groups, scalar"])
def test_closed_form_hessian_with_a_higher_order_factor_equals_differences(hs_data, group, invariant, missing):
    spec = parse_model(HIGHER)
    if invariant:
        spec = replace(spec, invariant=invariant, ladder_step=True)
    frame = _with_gaps(hs_data) if missing is MissingData.FULL_INFORMATION else hs_data
    groups, _ = moments_for(spec, frame, "hs", group=group, missing=missing)
    est = estimate(spec, groups, FitOptions(missing=missing))
    assert est.converged and est.model.higher_order
    _assert_closed_form_equals_differences(est.likelihood, est.theta)


def _ordinal_rows(n: int, seed: int, shift: float) -> pd.DataFrame:
    """Nine four-category items, three facets under one general trait (simulated)."""
    rng = np.random.default_rng(seed)
    general = rng.standard_normal(n) + shift
    facets = np.column_stack([0.8 * general, 0.7 * general, 0.6 * general]) + 0.6 * rng.standard_normal((n, 3))
    x = np.repeat(facets, 3, axis=1) * 0.75 + 0.6 * rng.standard_normal((n, 9))
    x[:, 3] += 0.3 * facets[:, 2]  # a cross-loading the model leaves out: the residuals are not small
    return pd.DataFrame(np.searchsorted([-0.8, 0.1, 0.9], x) + 1, columns=ITEMS)


def test_closed_form_hessian_of_ordinal_least_squares_with_a_higher_order_factor():
    # one group: correlations of latent responses of unit variance (the path of fit_ordinal)
    spec, _ = ordinal_spec(parse_model(HIGHER + "ordinal x1..x9\n"))
    table = build_parameter_table(spec)
    moments = ordinal_moments(_ordinal_rows(800, 20, 0.0), tuple(ITEMS), "simulated")
    R, gamma = correlations_in_order(moments, table.observed)
    pairs = np.tril_indices(9, -1)
    model = StructuredModel(table)
    objective = OrdinalLeastSquares(model, [group_statistics(R[pairs], gamma, moments.n_obs, True)], thresholds=False)
    _assert_closed_form_equals_differences(objective, starting_values(table, R, None))
    # two groups: thresholds as parameters
    frame = pd.concat([_ordinal_rows(600 + 200 * g, 21 + g, 0.3 * g).assign(site=f"s{g}") for g in range(2)],
                      ignore_index=True)
    data, _ = split_ordinal_moments(frame, "site", ITEMS, "simulated")
    est = estimate_ordinal_groups(parse_model(HIGHER + "ordinal x1..x9\ninvariance metric\n"), data, FitOptions())
    assert est.converged and est.model.higher_order
    _assert_closed_form_equals_differences(est.objective, est.theta)


def test_without_paths_the_general_rule_gives_the_first_order_factor_rule(hs_data):
    # the same numbers from the two closed forms where both apply (a model without higher-order factors, with means)
    spec = replace(parse_model("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"),
                   invariant=("loadings", "intercepts"), ladder_step=True)
    groups, _ = moments_for(spec, hs_data, "hs", group="school")
    est = estimate(spec, groups, FitOptions())
    model = est.model
    rng = np.random.default_rng(8)
    for g in range(2):
        mats = model.matrices(_away(est.theta), g)
        M = rng.normal(size=(model.p, model.p))
        M = M + M.T
        m = rng.normal(size=model.p)
        codes, rows, cols = model._codes[g], model._rows[g], model._cols[g]
        first_order = (second_derivative_contraction(model.all_second_orders[g], M, mats.L, mats.P)
                       + mean_second_derivatives(codes, rows, cols, m))
        np.testing.assert_allclose(path_second_derivatives(codes, rows, cols, M, mats, m), first_order,
                                   rtol=0, atol=1e-12 * np.abs(first_order).max())
