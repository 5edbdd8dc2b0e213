"""Rival models for ordinal items, fitted to the same rows and tested when nested.

Every model is fitted by least squares on thresholds and polychoric correlations
(one group is the one-group case of :mod:`cfa_tool.estimation.least_squares` with thresholds, with the
same fit as the single-group estimator).  Nesting is checked numerically as for
continuous items (Bentler & Satorra 2010): the general model is fitted to the
restricted model's implied thresholds and correlations and must reproduce them.
The difference of the two statistics is adjusted for its mean and variance with
U_d = U_restricted - U_general, both at the restricted estimates (Satorra 2000;
Asparouhov & Muthén 2006).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from cfa_tool.numbers import discrepancy_text
from cfa_tool.data.polychoric import ordinal_moments
from cfa_tool.assessment.admissibility import ProblemKind, estimation_failure
from cfa_tool.errors import NotIdentified, OptionError, UnboundedSolution, estimation_of
from cfa_tool.estimation.optimizer import minimise
from cfa_tool.method import DifferenceMethod
from cfa_tool.pipeline.ordinal import assess_ordinal_groups, refuse_set_residual_variances, estimate_ordinal_groups, ordinal_difference
from cfa_tool.workflows.nesting import NESTING_TOLERANCE, DifferenceTest, same_degrees_of_freedom

if TYPE_CHECKING:
    from cfa_tool.data.sample_design import DesignColumns
    from cfa_tool.language.spec import Spec
    from cfa_tool.method import Weighting
    from cfa_tool.pipeline.continuous import FitOptions
    from cfa_tool.pipeline.ordinal import OrdinalEstimation
    from cfa_tool.pipeline.results import FitResult


def fit_ordinal_models(specs: Sequence[Spec], complete: pd.DataFrame, source: str, group: str | None,
                       reference_group: str | None, fit_options: FitOptions, ordinal_items: set[str],
                       method: Weighting | str, design: DesignColumns | None = None,
                       pairwise: bool = False) -> tuple[list[OrdinalEstimation], list[FitResult]]:
    """(estimations, results) of every model on the same rows (weighted, with design-based standard errors and
    tests, under a sampling ``design``: its DesignColumns, already checked); ``pairwise``: each statistic from
    the rows that answered its items (pairwise present rows), otherwise the rows are complete ones."""
    from cfa_tool.data.sample_design import design_summary
    from cfa_tool.inference.design import ordinal_design_covariance
    from cfa_tool.pipeline.inputs import check_ordinal_options, ordinal_groups, with_design

    check_ordinal_options(fit_options)
    items = set(specs[0].observed_names)
    if any(set(spec.observed_names) != items for spec in specs[1:]):
        raise OptionError("models of ordinal items can be compared only on the same items (their thresholds and "
                          "correlations are the data); give every model the same indicators")
    estimations, results = [], []
    for spec in specs:
        if group is None:  # one group: the rule of 'fit' (pipeline.ordinal.ordinal_spec), whatever the estimator here
            refuse_set_residual_variances(spec)
            groups = [(None, ordinal_design_covariance(ordinal_moments(complete, spec.observed_names, source,
                                                                        frozenset(items - ordinal_items), design=design,
                                                                        pairwise=pairwise)))]
        else:
            groups, _ = ordinal_groups(spec, complete, source, group, reference_group, ordinal_items, pairwise,
                                       design=design)
        with estimation_of(f"model {spec.title or spec.source}"):
            # one group: every latent response at variance 1, the correlation metric 'fit' identifies them by (the
            # same estimates, a Heywood case among them)
            est = estimate_ordinal_groups(spec, groups, fit_options, method, correlation_metric=group is None)
            if group is None:  # one group: no group in its parameters' words (it said 'in group all')
                est = replace(est, table=_one_group_table(est.table))
            try:
                result = assess_ordinal_groups(spec, groups, est, fit_options, group, method, modification=False)
            except (NotIdentified, UnboundedSolution) as failure:  # reported among the others, as compare of
                # continuous items does
                result = unestimated_ordinal_result(spec, groups, est, fit_options, group, method, failure)
        estimations.append(est)
        if group is None:
            # 'fit' of one group estimates the thresholds in a first step and does not count them, nor (beside
            # continuous items) their intercepts and residual variances, which that fit does not estimate: count alike,
            # in the fit's statistics and in the rule of rows per parameter (which counted them: 59 for fit's 15)
            saturated = len({par.terms[0][0] for par in est.table.parameters if par.free and (
                par.kind == "threshold" or (par.kind in ("intercept", "residual_variance")
                                            and par.variables[0] not in ordinal_items))})
            if result.fit is not None:
                result = replace(result, fit=replace(result.fit,
                                                     n_free_parameters=result.fit.n_free_parameters - saturated))
            result = _counted_as_fit(result, est.table.n_free, est.table.n_free - saturated, groups[0][1].n_obs)
        if design is not None and result.converged:
            result = with_design(result, design_summary(complete, design, [m for _, m in groups], [g for g, _ in groups]),
                                 [m for _, m in groups])
        results.append(result)
    return estimations, results


def _counted_as_fit(result: FitResult, counted: int, free: int, rows: int) -> FitResult:
    """``result`` with the caution and note of the rule of rows per parameter made for ``free`` parameters, as 'fit' of
    one group counts them, instead of those pipeline.results.fit_result made for ``counted`` (the thresholds too)."""
    from cfa_tool.assessment.admissibility import ProblemKind, one_sample_size_problems, solution_first

    _, made = one_sample_size_problems(rows, counted, ())
    small, notes = one_sample_size_problems(rows, free, ())
    kept = tuple(p for p in result.problems if p.kind is not ProblemKind.SMALL_SAMPLE)
    warnings = tuple(w for w in result.warnings if w not in made) + notes
    return replace(result, problems=solution_first(small + kept), warnings=warnings)


def _one_group_table(table):
    """The parameter table of the one group of a comparison without groups (laid out as a group of its own,
    without a label, by the multi-group least-squares estimator) as a one-group table: its problems name no
    group."""
    return replace(table, multigroup=False)


def unestimated_ordinal_result(spec, groups, est, fit_options, group, method,
                               failure: NotIdentified | UnboundedSolution) -> FitResult:
    """A model the data do not identify, or one a Heywood case drives without bound (``failure``: the rank check's
    error), as a result that could not be estimated, that problem first, as pipeline.continuous.unestimated makes it
    for continuous items (compare's models, the invariance ladder's steps)."""
    result = assess_ordinal_groups(spec, groups, replace(est, converged=False, message=str(failure)), fit_options,
                                   group, method, modification=False)
    return replace(result, problems=tuple(estimation_failure(failure) if p.kind is ProblemKind.NOT_CONVERGED
                                          else p for p in result.problems))


def statistic_order(names_from: tuple[str, ...], names_to: tuple[str, ...], n_thresholds: dict[str, int],
                    continuous: frozenset[str] = frozenset()) -> np.ndarray:
    """Indices that reorder one group's (thresholds, [continuous items' means, their variances,] correlations)
    vector from one item order to another."""
    start, position = {}, 0
    for x in names_from:
        start[x] = position
        position += n_thresholds.get(x, 0)
    thresholds = [start[x] + k for x in names_to for k in range(n_thresholds.get(x, 0))]
    moments = []
    c_from = [x for x in names_from if x in continuous]
    c_to = [x for x in names_to if x in continuous]
    for block in range(2):  # the means, then the variances
        moments += [position + block * len(c_from) + c_from.index(x) for x in c_to]
    position += 2 * len(c_from)
    p = len(names_from)
    pair_index = {}
    for k, (i, j) in enumerate(zip(*np.tril_indices(p, -1))):
        pair_index[frozenset((names_from[i], names_from[j]))] = position + k
    pairs = [pair_index[frozenset((names_to[i], names_to[j]))] for i, j in zip(*np.tril_indices(p, -1))]
    return np.asarray(thresholds + moments + pairs, dtype=int)


def _general_at_restricted(restricted, general, bounded: bool = True):
    """The general model fitted to the restricted model's implied thresholds and correlations (M10 of Satorra &
    Bentler 2010), within the general model's bounds or (``bounded`` false) without them: (the search's result, the
    general objective with those targets, the order that takes the restricted model's statistics to the general's)."""
    obj_r = restricted.objective
    names_r, names_g = restricted.table.observed, general.table.observed
    n_thr = {x: int(np.sum(obj_r.item_of == j)) for j, x in enumerate(names_r)}
    continuous = frozenset(names_r[j] for j in getattr(obj_r, "continuous", ()))
    order = statistic_order(names_r, names_g, n_thr, continuous)  # restricted's vector -> general's order
    target = general.objective.with_targets([obj_r.statistics(restricted.theta, g)[order] for g in range(len(obj_r.weights))])
    lower, upper = ((general.table.lower, general.table.upper) if bounded
                    else (np.full(general.table.n_free, -np.inf), np.full(general.table.n_free, np.inf)))
    return minimise(target.evaluate, target.value, general.theta, lower, upper), target, order


def ordinal_difference_test(restricted, general, restricted_result, general_result, restricted_name: str,
                            general_name: str) -> tuple[DifferenceTest | None, str]:
    """The adjusted difference test when ``restricted`` is nested in ``general``; otherwise None and the reason (for
    the same degrees of freedom, the continuous path's rule and words: nesting.same_degrees_of_freedom)."""
    if restricted.df == general.df:
        def reproduces() -> bool:
            opt = _general_at_restricted(restricted, general, bounded=False)[0]
            return opt.converged and opt.value <= NESTING_TOLERANCE

        return None, same_degrees_of_freedom(restricted_result, general_result, reproduces)
    if restricted.df < general.df:
        return None, "the first model does not have more degrees of freedom than the second"
    opt, target, order = _general_at_restricted(restricted, general)
    if not opt.converged:
        return None, "the nesting check did not converge"
    if opt.value > NESTING_TOLERANCE:
        return None, (f"the second model cannot reproduce the first model's implied thresholds and correlations "
                      f"(discrepancy {discrepancy_text(opt.value)}), so the first is not a special case of it")
    D_g, *_ = target.stacked(opt.theta)
    back = np.empty_like(order)
    back[order] = np.arange(len(order))  # general's order -> restricted's
    size = len(order)
    columns = np.concatenate([g * size + back for g in range(len(restricted.objective.weights))])
    test = ordinal_difference(restricted, general, D_g[:, columns])
    return difference_record(test, restricted_name, general_name, restricted_result, general_result), ""


def difference_record(test, restricted_name: str, general_name: str, restricted_result, general_result) -> DifferenceTest:
    """The scale-shifted adjusted difference of two nested ordinal fits, as compare and the invariance ladder
    report it: without changes in CFI and RMSEA, which cannot be compared across models (method.ORDINAL_FIT_CHANGE;
    the one place that decides it)."""
    return DifferenceTest(restricted_name, general_name, test.scale_shifted, test.df, test.scale_shifted_p,
                          DifferenceMethod.SCALE_SHIFTED, float("nan"), float("nan"))
