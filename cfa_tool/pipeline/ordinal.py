"""The fitting pipeline for ordinal items: thresholds and polychoric correlations -> FitResult.

One group: least squares on the polychoric correlations with the latent responses
standardized (their residual variances follow from unit total variances).
Several groups: least squares on each group's thresholds and correlations, with
thresholds as parameters so that they can be held equal across groups
(:mod:`cfa_tool.estimation.least_squares`, one objective for both).  Both give robust standard errors, the
mean-and-variance adjusted and scale-shifted tests, and modification indices as
robust score tests.
"""

from __future__ import annotations

from collections.abc import Collection
from dataclasses import dataclass
from dataclasses import replace as dc_replace

import numpy as np

from cfa_tool.assessment.admissibility import group_size_problems, solution_problems
from cfa_tool.assessment.convergence import nonconvergence_message, two_item_factors
from cfa_tool.assessment.fit_indices import fit_indices, srmr
from cfa_tool.assessment.identification import check_bounded_responses, check_information_rank
from cfa_tool.assessment.ordinal_reliability import with_observed_sum_omega
from cfa_tool.assessment.modification import (ModificationIndices, candidate_arrays, candidate_entries,
                                               collected_indices, least_squares_score_tests)
from cfa_tool.assessment.reliability import group_keying_warnings, keying_warnings, reliability
from cfa_tool.assessment.standardized import r_squared, standardize_entries
from cfa_tool.errors import CfaError, ModelError, NotIdentified, OptionError
from cfa_tool.language.names import written_group
from cfa_tool.numbers import count_text
from cfa_tool.estimation.least_squares import MixedLeastSquares, OrdinalLeastSquares, group_statistics
from cfa_tool.estimation.optimizer import Outcome
from cfa_tool.estimation.strategy import Alternative, search
from cfa_tool.inference.adjusted import (AdjustedTest, adjusted_fit, adjusted_from_traces, adjusted_test, residual_traces,
                                         robust_covariance)
from cfa_tool.inference.standard_errors import wald_inference
from cfa_tool.language.checks import exogenous_factors
from cfa_tool.language.spec import ParameterRef, Spec, ValueSetting
from cfa_tool.method import ADJUSTED_TEST, MISSING_COMPLETELY_AT_RANDOM, Estimator, FitMethod, FitTest, Information, Items, MissingData, Weighting
from cfa_tool.model.description import factor_scales
from cfa_tool.model.implied import StructuredModel, entry_derivatives
from cfa_tool.model.parameters import ParameterTable, build_parameter_table, fixed_values_at_start
from cfa_tool.model.rescale import variance_scaled
from cfa_tool.model.starts import starting_values
from cfa_tool.note_parts import Text
from cfa_tool.pipeline.continuous import (FitOptions, estimate_rows, pairwise_instead, listwise_line, listwise_problem,
                                          unanswered_problem)
from cfa_tool.numerics import distributions as dist
from cfa_tool.pipeline.results import DataSummary, EstimateRow, FitResult, GroupResult, fit_result

ORDINAL_NOTE = (f"With ordinal items the fit indices come from the {ADJUSTED_TEST} statistic; they were developed "
                "for continuous data and tend to look better with ordinal data at the same misfit, so read them with care.")
GROUPS_NOTE = ("Ordinal items in several groups: the latent responses have intercept 0 and residual variance 1 in the first "
               "group (and wherever an item's thresholds differ across groups); loadings and residual variances are in "
               "that metric; standardized values compare across groups (identification after Wu & Estabrook 2016).")
MIXED_GROUPS_NOTE = ("Continuous items beside the ordinal ones keep their own metric in every group: their means and "
                     "variances are fitted with the thresholds and correlations, and their intercepts and residual "
                     "variances are free in each group until held equal, as for continuous items alone (Millsap & "
                     "Yun-Tein 2004).")
MI_NOTE = "modification indices for ordinal items are robust score tests (Satorra 1989)"


def _check_method(method: Weighting | str) -> Weighting:
    return Weighting.parse(method, "the ordinal estimator")


def _fit_method(weighting: Weighting, items: Items, thresholds: bool, pairwise: bool) -> FitMethod:
    return FitMethod(Estimator.LEAST_SQUARES, FitTest.SCALE_SHIFTED, Information.SANDWICH,
                     MissingData.PAIRWISE if pairwise else MissingData.LISTWISE, weighting, items, thresholds)


def _least_squares_fit(T: float, df: int, T_base: float, base_df: int, n: int, n_free: int, srmr_value: float,
                       groups: int = 1):
    """Fit indices of a least-squares statistic: no likelihood, no test of close fit."""
    return fit_indices(chi_square=T, df=df, baseline_chi_square=T_base, baseline_df=base_df, n_obs=n, n_free=n_free,
                       srmr=srmr_value, groups=groups, close_fit_test=False)


def _modification_rows(candidates: list[list], mi: np.ndarray, epc: np.ndarray, mats_of, label_of) -> ModificationIndices:
    """The modification indices from per-candidate statistics, ``candidates[g]`` being group g's
    candidates and ``mi``, ``epc`` their statistics in that order."""
    std = np.full(len(epc), np.nan)
    start = 0
    for g, cands in enumerate(candidates):
        if not cands:
            continue
        sl = slice(start, start + len(cands))
        start = sl.stop
        codes, rows, cols = candidate_arrays(cands)
        std[sl], _ = standardize_entries(mats_of(g), codes, rows, cols, epc[sl])
    mi, epc = np.asarray(mi, dtype=float), np.asarray(epc, dtype=float)
    return collected_indices(candidates, tuple(label_of(g) for g in range(len(candidates))), mi, epc, std,
                             np.isfinite(mi))


# ---------------------------------------------------------------- one group


def _residual_variance_statements(spec: Spec):
    """Each (statement word, reference) of the model file that names an item's residual variance: 'fix', 'free',
    'start', 'bound' and 'equal', in the order written."""
    observed = set(spec.observed_names)
    named = ([("fix", r) for s in spec.fixed for r in s.refs] + [("free", r) for r in spec.freed]
             + [("start", r) for s in spec.starts for r in s.refs] + [("bound", r) for s in spec.bounds for r in s.refs]
             + [("equal", r) for group in spec.equal for r in group])
    found = [(word, r) for word, r in named if r.kind == "variance" and r.names[0] in observed]
    return sorted(found, key=lambda wr: (wr[1].location.line, wr[1].location.column))


def refuse_set_residual_variances(spec: Spec) -> None:
    """The one rule on residual variances of a model with ordinal items in one group, read by every command that fits
    such items (fit, compare, replicate, bootstrap, cutoffs, scores: by :func:`ordinal_spec` or directly) or draws them
    (simulate and power-simulation, through ``workflows.simulation.with_categories``).  A one-group ordinal fit
    analyses every item in the correlation metric of its latent response (each latent response has variance 1;
    Muthén & Asparouhov 2002), and a simulation cuts each ordinal item's latent response at its thresholds after
    standardizing it, so an item's residual variance is 1 minus the variance its factors explain and no statement can
    fix, free, start, bound or equate it: the first such statement is an error naming its line (a fit would otherwise
    ignore it while the report repeated it; a simulation would change the item's standardized loading while its
    population table showed a value on a scale the answers do not have)."""
    found = _residual_variance_statements(spec)
    if not found:
        return
    word, ref = found[0]
    item = ref.names[0]
    raise ModelError(f"'{word} {ref}': the residual variance of '{item}' cannot be set with ordinal items in one "
                     f"group: every latent response has variance 1 there (the correlation metric, in which the "
                     f"thresholds cut it), so an item's residual variance follows from its loadings as 1 minus the "
                     f"variance its factors explain; remove the statement (fix or start the loadings instead)",
                     ref.location, spec.source_line(ref.location))


def refuse_fixed_residual_variances_in_ladder(spec: Spec, ordinal_items: Collection[str]) -> None:
    """The invariance ladder of ordinal items sets their latent responses' residual variances itself (1 in the first
    group, and in every group while the item's thresholds may differ; estimated in the other groups once thresholds
    are held equal, and held equal at the strict level; Wu & Estabrook 2016): a 'fix' of one would hold it equal
    across groups from the thresholds step on, so that step would test a constraint of the strict step unsaid (its
    df one more, strict's one fewer).  An error naming the line."""
    found = [(word, r) for word, r in _residual_variance_statements(spec) if word == "fix" and r.names[0] in ordinal_items]
    if not found:
        return
    ref = found[0][1]
    raise ModelError(f"'fix {ref}': the invariance ladder sets the residual variances of the ordinal items' latent "
                     f"responses itself (1 in the first group and wherever the thresholds may differ, estimated in the "
                     f"other groups once the thresholds are held equal, held equal at the strict step; Wu & Estabrook "
                     f"2016): a fixed value would hold it equal across groups from the thresholds step on, testing part "
                     f"of the strict step there; remove the statement", ref.location, spec.source_line(ref.location))


def ordinal_spec(spec: Spec) -> tuple[Spec, set[str]]:
    """The model a one-group ordinal fit estimates: the residual variances of the latent responses fixed
    (they are not parameters: the latent responses have unit variance), and the items whose residual
    variance follows from that.  A statement on an item's residual variance is an error
    (:func:`refuse_set_residual_variances`)."""
    refuse_set_residual_variances(spec)
    refs = tuple(ParameterRef("variance", (x,), spec.first_mention(x)) for x in spec.observed_names)
    derived_items = {r.names[0] for r in refs}  # residual variances that follow from unit latent-response variances
    return dc_replace(spec, fixed=spec.fixed + ((ValueSetting(refs, 1.0),) if refs else ())), derived_items


def _refuse_means_in_one_group(spec: Spec) -> None:
    """A statement on an intercept or a factor mean in a one-group fit of ordinal items: an error at the statement
    that names only what works, not the continuous fit's advice (groups or full-information ML), of which
    full-information ML is refused for ordinal items and groups are other people (new-user trial s26: equal intercepts
    of one item answered twice by the same people, test and retest, sent the researcher in a circle)."""
    from cfa_tool.language.checks import all_refs
    from cfa_tool.options import Option

    ref = next((r for r in all_refs(spec) if r.kind in ("intercept", "mean")), None)
    if ref is None:
        return
    raise ModelError(
        f"{ref}: a fit of ordinal items in one group has no intercepts or factor means to estimate (each item's "
        f"thresholds place its answers), and holding thresholds or intercepts equal across repeated measures of the "
        f"same people is not available yet (docs/not-yet-available.md); remove the statement; groups of different "
        f"people take it ({Option.GROUP_COLUMN.given('COLUMN')}), and so do continuous items in one group, fitted "
        f"by full-information ML (without the 'ordinal' statements, {Option.INCOMPLETE_ROWS.given('full-information')})",
        ref.location, spec.source_line(ref.location))


def one_group_model(spec: Spec) -> tuple[Spec, set[str], ParameterTable]:
    """The model a one-group ordinal fit estimates (:func:`ordinal_spec`), the items whose residual variance follows
    from it, and its parameter table, refused as that fit refuses it: a statement on an item's residual variance,
    more free parameters than the items' correlations.  The one reading of the model that :func:`fit_ordinal` and a
    check of the same model and options (pipeline.inputs.check) share, so that check refuses what fit refuses, with
    the same line, and accepts what fit accepts."""
    _refuse_means_in_one_group(spec)
    fixed_spec, derived_items = ordinal_spec(spec)
    table = build_parameter_table(fixed_spec)
    p = table.p
    n_corr = p * (p - 1) // 2
    if table.n_free > n_corr:
        raise OptionError(f"the model has {table.n_free} free parameters but {p} ordinal items give only {n_corr} "
                          f"correlations, so it cannot be identified")
    return fixed_spec, derived_items, table


def _category_counts(moments, order: list[int]) -> tuple:
    """Per item (in model order), each answer value with the number of rows giving it (empty for continuous
    items analysed beside the ordinal ones)."""
    out = []
    for k in order:
        if moments.names[k] in moments.continuous:
            out.append(())
            continue
        codes = moments.codes[:, k]
        counts = np.bincount(codes[codes >= 0], minlength=len(moments.categories[k]))
        out.append(tuple((float(v), int(c)) for v, c in zip(moments.categories[k], counts)))
    return tuple(out)


def _pair_rows(moments, order: list[int]) -> tuple[tuple[str, str, int], ...]:
    """(item, item, rows answering both) for each pair in model order, with pairwise present rows."""
    if moments.pair_counts is None:
        return ()
    return tuple((moments.names[order[i]], moments.names[order[j]], int(moments.pair_counts[order[i], order[j]]))
                 for i in range(len(order)) for j in range(i + 1, len(order)))


def _left_out(moments, where: str = "") -> tuple:
    """The caution on the rows listwise deletion left out (pipeline.continuous.listwise_problem), or with pairwise
    present rows on those that answered no model variable (pipeline.continuous.unanswered_problem), first in every
    view; () for few rows left out (:func:`_rows_notes` then says them)."""
    if not moments.rows_dropped:
        return ()
    if moments.pairwise:  # the rows left out answered no model variable: a caution when many (as fit's, s28)
        found = unanswered_problem(moments.rows_dropped, moments.rows_read, where)
    else:
        found = listwise_problem(moments.rows_dropped, moments.rows_read, where, pairwise_instead(),
                                 getattr(moments, "unanswered", 0))
    return (found,) if found is not None else ()


def _rows_notes(moments, order: list[int], where: str = "") -> list[str]:
    """What happened to rows with missing answers, in one line (nothing when no analysed row has a gap, or when
    :func:`_left_out` cautions about them)."""
    if not moments.pairwise:
        if not moments.rows_dropped or _left_out(moments, where):
            return []
        return [listwise_line(moments.rows_dropped, moments.rows_read, len(moments.codes), where)]
    out = []
    if moments.rows_dropped and not _left_out(moments, where):
        out.append(f"{count_text(moments.rows_dropped)} of {count_text(moments.rows_read)} rows{where} answered no model "
                   f"variable and {'was' if moments.rows_dropped == 1 else 'were'} left out")
    if moments.gaps:
        pairs = _pair_rows(moments, order)
        low, high = min(pairs, key=lambda t: t[2]), max(pairs, key=lambda t: t[2])
        complete = int((moments.codes >= 0).all(axis=1).sum())
        out.append(f"missing answers{where}: every answer is used (pairwise present rows): each item's thresholds come "
                   f"from the rows that answered it, each correlation from the rows that answered both items, from "
                   f"{count_text(low[2])} rows ({low[0]}, {low[1]}) to {count_text(high[2])} ({high[0]}, {high[1]}) of {count_text(len(moments.codes))}; "
                   f"pairwise present rows assume that {MISSING_COMPLETELY_AT_RANDOM} (whether an answer is missing "
                   f"does not depend on the person's answers, given or not; Little & Rubin 2002; full-information estimation, "
                   f"valid when answers are missing at random, is not available for ordinal items); the standard errors and tests allow for the differing numbers "
                   f"of rows; a fit of only the {count_text(complete)} complete rows would leave the others out and assume the same")
    return out


def _first_step_thresholds(moments, order: list[int]) -> tuple[EstimateRow, ...]:
    """The thresholds of a one-group ordinal fit, estimated in its first step (Olsson 1979), as rows of the
    estimates (on the latent response's scale, variance 1), with standard errors when the first step's
    asymptotic covariance covers them."""
    nan = float("nan")
    gamma = moments.joint_gamma
    position = np.cumsum([0] + [len(t) for t in moments.thresholds])
    rows = []
    for k in order:
        for step, value in enumerate(np.asarray(moments.thresholds[k], dtype=float)):
            se = nan
            if gamma is not None and position[k] + step < len(gamma):
                se = float(np.sqrt(max(gamma[position[k] + step, position[k] + step], 0.0) / moments.n_obs))
            z = value / se if se > 0 else nan
            p = float(2 * dist.norm_sf(abs(z))) if se > 0 else nan
            ci = (value - 1.959963984540054 * se, value + 1.959963984540054 * se) if se > 0 else (nan, nan)
            rows.append(EstimateRow("threshold", (moments.names[k], str(step + 1)), True, float(value), se, z, p, ci,
                                    float(value), float(value), "first step"))
    return tuple(rows)


def unit_variance_matrices(mats):
    """A one-group ordinal model's matrices with each latent response's residual variance 1 - its common variance,
    so that every latent response has variance 1 (what ``ordinal_spec`` fixes at 1 while estimating)."""
    return mats.with_unit_variances()


def _pairs_in_order(moments, observed: tuple[str, ...]) -> tuple[list[int], list[int]]:
    """(the items' positions in ``moments`` in the order ``observed``, the positions of their correlations below
    the diagonal, in np.tril_indices order of ``observed``, among the correlations of ``moments``)."""
    order = [moments.names.index(n) for n in observed]
    full_pairs = np.tril_indices(len(moments.names), -1)
    index_of = {(int(a), int(b)): k for k, (a, b) in enumerate(zip(*full_pairs))}
    take = [index_of[tuple(sorted((order[i], order[j]), reverse=True))] for i, j in zip(*np.tril_indices(len(order), -1))]
    return order, take


def correlations_in_order(moments, observed: tuple[str, ...]) -> tuple[np.ndarray, np.ndarray]:
    """(R, Gamma): the correlation matrix of ``moments`` with its items in the order ``observed``, and the
    asymptotic covariance of its correlations below the diagonal in np.tril_indices order."""
    order, take = _pairs_in_order(moments, observed)
    return moments.correlations[np.ix_(order, order)], moments.gamma[np.ix_(take, take)]


def _weight_variances(moments, observed: tuple[str, ...] | None = None) -> np.ndarray | None:
    """The variances the diagonal weights come from when they are not diag(Gamma) (under clusters or strata;
    inference.design.ordinal_design_covariance): of the correlations in the order ``observed``, or of all the
    statistics (thresholds, then correlations) when ``observed`` is None."""
    apart = moments.weight_variances
    if apart is None or observed is None:
        return apart
    _, take = _pairs_in_order(moments, observed)
    return apart[len(apart) - len(moments.pairs[0]):][take]


def fit_ordinal(spec: Spec, moments, options, method: Weighting | str = Weighting.DIAGONAL) -> FitResult:
    """Least squares on polychoric correlations, with robust standard errors and adjusted tests."""
    method = _check_method(method)
    fixed_spec, derived_items, table = one_group_model(spec)
    p = table.p
    n_corr = p * (p - 1) // 2
    order = [moments.names.index(n) for n in table.observed]
    R, gamma = correlations_in_order(moments, table.observed)
    pairs = np.tril_indices(p, -1)
    statistics = [group_statistics(R[pairs], gamma, moments.n_obs, method is Weighting.DIAGONAL,
                                   _weight_variances(moments, table.observed))]
    weights = statistics[0].weights
    model = StructuredModel(table)
    ls = OrdinalLeastSquares(model, statistics, thresholds=False)

    def variance_scaled_problem() -> Alternative | None:
        try:
            alt_table = build_parameter_table(variance_scaled(fixed_spec, table))
        except CfaError:  # e.g. a freed factor variance, which variance scaling would fix
            return None
        alt_model = StructuredModel(alt_table)
        return Alternative(alt_table, alt_model, OrdinalLeastSquares(alt_model, statistics, thresholds=False),
                           starting_values(alt_table, R, None))

    start = starting_values(table, R, None)
    found = search(ls, table, start, options.max_iterations, variance_scaled_problem)
    opt = found.result
    if opt.outcome is Outcome.BAD_START:  # a fixed covariance beyond the variances at the start: named at its line
        fixed_values_at_start(fixed_spec, table, model.entry_values(start))
    message = "converged" if opt.converged else nonconvergence_message(
        found, table.free_labels, options.max_iterations, table.lower, table.upper, table.observed,
        two_item_factors(spec, table.free_labels))
    theta = opt.theta
    n = moments.n_obs
    final = unit_variance_matrices(model.matrices(theta))
    T_final = final.T
    values = model.entry_values(theta)
    codes, rows, cols = table.entry_arrays()
    for e, par in enumerate(table.parameters):
        if par.kind == "residual_variance" and par.variables[0] in derived_items:
            values[e] = T_final[par.row, par.row]
    standardized, factors_standardized = standardize_entries(final, codes, rows, cols, values)
    warnings = []
    warnings.extend(_rows_notes(moments, order))
    fit = robust = inference = None
    sigma = final.implied_covariance()
    modification = ModificationIndices()
    if opt.converged:
        D = ls.jacobian(theta)
        check_information_rank(D @ (D.T * weights[:, None]), table.free_labels)
        cov_theta = robust_covariance(D, weights, gamma, n)
        inference = wald_inference(values, model.J, cov_theta)
        df = n_corr - table.n_free
        T = n * opt.value
        T_base = n * float(R[pairs] @ (weights * R[pairs]))
        test = adjusted_test(T, df, D, weights, gamma)
        base = adjusted_test(T_base, n_corr, None, weights, gamma)
        fit = _least_squares_fit(T, df, T_base, n_corr, n, table.n_free, srmr([(R, sigma, n)], correlations=True)[0])
        robust = adjusted_fit(test, base, df, n_corr, n)
        cands = candidate_entries(table, exogenous_factors(spec), 0)
        if cands and df > 0 and options.modification_indices:
            D_cand = entry_derivatives(final, *candidate_arrays(cands))[0][:, pairs[0], pairs[1]]
            mi, epc = least_squares_score_tests(D, D_cand, R[pairs] - sigma[pairs], weights, gamma, n)
            modification = _modification_rows([cands], mi, epc, lambda g: final, lambda g: None)
        warnings.append(ORDINAL_NOTE)
    problems = _left_out(moments) + tuple(solution_problems(table, [final], theta, cov_theta if opt.converged else None,
                                                            opt.converged, message, options.max_iterations))
    derived = frozenset(e for e, par in enumerate(table.parameters)
                        if par.kind == "residual_variance" and par.variables[0] in derived_items)
    estimates = estimate_rows(table, values, inference, standardized, factors_standardized, derived) + _first_step_thresholds(moments,
                                                                                                          order)
    factors, htmt = reliability(final, table.observed, table.latent, R, declared=spec.reverse_keyed or None,
                                sum_scores=False, not_traits=spec.method_factors | spec.exploratory_factors)
    ordinal_items = [k for k in order if moments.names[k] not in moments.continuous]
    factors = with_observed_sum_omega(factors, final, table.observed, table.latent,
                                      {moments.names[k]: np.asarray(moments.thresholds[k], float) for k in ordinal_items},
                                      {moments.names[k]: np.asarray(moments.categories[k], float) for k in ordinal_items})
    if opt.converged:
        warnings.extend(keying_warnings(factors, "", factor_scales(spec, table)))
    summary = DataSummary(moments.source, moments.rows_read, moments.rows_dropped, n, table.observed,
                          tuple(float(moments.means[k]) for k in order), tuple(float(moments.sds[k]) for k in order),
                          categories=_category_counts(moments, order), pair_rows=_pair_rows(moments, order))
    if moments.continuous:
        warnings.append("continuous items are analysed beside the ordinal ones in the correlation metric (polyserial and "
                        "Pearson correlations): their unstandardized estimates are in standard-deviation units")
    group = GroupResult(label=None, data=summary, chi_square=fit.chi_square if fit else None, srmr=fit.srmr if fit else None,
                        r_squared=dict(zip(table.observed, (float(v) for v in r_squared(final)))), sample_covariance=R,
                        implied_covariance=sigma, residual_correlations=R - sigma, sample_mean=np.zeros(p),
                        implied_mean=None, normality=None, reliability=tuple(factors), htmt=tuple(htmt),
                        latent_covariance=final.latent_covariance())
    fit_method = _fit_method(method, Items.MIXED if moments.continuous else Items.ORDINAL, thresholds=False,
                             pairwise=moments.pairwise)
    return fit_result(spec=spec, method=fit_method, converged=opt.converged, iterations=opt.iterations, message=message,
                      theta=theta, n_obs=n, data=summary, observed=table.observed, latent=table.latent, fit=fit,
                      robust=robust, estimates=estimates, modification_indices=modification, groups=(group,),
                      warnings=warnings, options=options, problems=problems,
                      parameter_covariance=cov_theta if opt.converged else None, parameter_labels=table.free_labels,
                      model=model, unit_variance_items=frozenset(derived_items))


# ---------------------------------------------------------------- several groups


@dataclass(frozen=True, eq=False)
class OrdinalEstimation:
    """A multi-group ordinal fit before assessment (what the invariance ladder reuses)."""

    table: ParameterTable
    model: StructuredModel
    objective: OrdinalLeastSquares
    theta: np.ndarray
    value: float
    converged: bool
    iterations: int
    message: Text  # 'converged', or why not (a Note whose option a manuscript leaves out)

    @property
    def statistic(self) -> float:
        return self.objective.n_total * self.value

    @property
    def df(self) -> int:
        return self.objective.n_statistics - self.table.n_free


def _in_model_order(groups: list, observed: tuple[str, ...]) -> list:
    moments = [m for _, m in groups]
    if any(tuple(m.names) != tuple(observed) for m in moments):
        raise ValueError("ordinal moments must list the items in the model's order")
    return moments


def threshold_counts(moments) -> dict[str, int]:
    """The ordinal items of a multi-group fit with their numbers of thresholds (continuous items beside them have
    none and keep their own metric)."""
    return {x: len(t) for x, t in zip(moments.names, moments.thresholds) if x not in moments.continuous}


def _objective(model: StructuredModel, statistics: list, continuous: np.ndarray,
               unit_variances: tuple[np.ndarray, ...] | None = None) -> OrdinalLeastSquares:
    """Least squares with thresholds as parameters; beside continuous items their means and variances too."""
    if len(continuous):
        return MixedLeastSquares(model, statistics, continuous, unit_variances)
    return OrdinalLeastSquares(model, statistics, thresholds=True, unit_variances=unit_variances)


def _scale_only_residuals(objective: OrdinalLeastSquares, table: ParameterTable, theta: np.ndarray) -> np.ndarray:
    """Per group and item, whether the item's residual variance there is fixed at 1 only to set the scale of its
    latent response (the identification of Wu & Estabrook 2016), so that holding the latent response's variance at
    1 instead is the same model in another metric: the residual variance, were it free, would move the statistics
    only along directions the free parameters move them already (its column of derivatives lies in their span, at
    ``theta``).  Not so where it carries a constraint, e.g. equal across groups at the strict step."""
    codes, rows, cols = table.entry_arrays()
    group_of = table.group_array()
    fixed_one = np.array([not par.free and par.matrix == "T" and par.row == par.col for par in table.parameters])
    out = np.zeros((table.n_groups, table.p), dtype=bool)
    if any(objective.statistics(theta, g) is None for g in range(table.n_groups)):
        return out  # no statistics there (an implied variance not positive): nothing is known to be a scale only
    D, *_ = objective.stacked(theta)  # (q, statistics)
    slices = objective.group_slices()
    continuous = set(getattr(objective, "continuous", ()))
    for e in np.flatnonzero(fixed_one):
        g, j = int(group_of[e]), int(rows[e])
        if j in continuous:
            continue
        column = np.zeros(D.shape[1])
        column[slices[g]] = objective.entry_jacobian(theta, g, codes[[e]], rows[[e]], cols[[e]])[0]
        size = float(np.linalg.norm(column))
        if size == 0.0:
            continue
        coef, *_ = np.linalg.lstsq(D.T, column, rcond=None)
        out[g, j] = float(np.linalg.norm(D.T @ coef - column)) <= 1e-6 * size
    return out


def _heywood_responses(objective: OrdinalLeastSquares, theta: np.ndarray) -> np.ndarray:
    """Per group and item, whether the latent response's residual is a share of its variance below
    UNBOUNDED_RESIDUAL_SHARE at ``theta`` (a search driven towards a negative residual variance in the correlation
    metric, which residual variances held at 1 cannot reach but only approach without bound)."""
    from cfa_tool.assessment.identification import UNBOUNDED_RESIDUAL_SHARE

    out = []
    for g in range(objective.model.n_groups):
        mats = objective.unit_variance_matrices(theta, g)
        total = np.diag(mats.implied_covariance())
        with np.errstate(divide="ignore", invalid="ignore"):
            share = np.diag(mats.T) / total
        held = objective.unit_variances[g] if objective.unit_variances is not None else False
        out.append(np.isfinite(share) & (share >= 0) & (share < UNBOUNDED_RESIDUAL_SHARE) & ~held)
    return np.array(out)


def groups_model(spec: Spec, groups: list) -> tuple[ParameterTable, list, list]:
    """The parameter table an ordinal fit of several groups estimates (each ordinal item's thresholds among its
    parameters), refused as that fit refuses it: the model's statements on thresholds and on the ordinal items'
    intercepts and residual variances (model.parameters.build_parameter_table), more free parameters than the groups'
    statistics; with each group's moments in the model's order and their statistics.  ``groups``: (label, ordinal
    moments), as pipeline.inputs.ordinal_groups gives them.  The one reading of the model that
    :func:`estimate_ordinal_groups` and a check of the same model and groups (pipeline.inputs.check) share."""
    labels = tuple(label for label, _ in groups)
    moments = _in_model_order(groups, spec.observed_names)
    if any(m.continuous != moments[0].continuous for m in moments[1:]):
        raise ValueError("every group must treat the same items as continuous")
    table = build_parameter_table(spec, labels, ordinal=threshold_counts(moments[0]))
    data = [m.statistics() for m in moments]
    n_stats = sum(len(values) for values, _ in data)
    if table.n_free > n_stats:
        what = "thresholds, means, variances" if len(moments[0].continuous_positions) else "thresholds"
        raise OptionError(f"the model has {table.n_free} free parameters but the groups' {what} and correlations "
                          f"give only {n_stats} statistics, so it cannot be identified")
    return table, moments, data


def estimate_ordinal_groups(spec: Spec, groups: list, options, method: Weighting | str = Weighting.DIAGONAL,
                            start: np.ndarray | None = None, correlation_metric: bool = False) -> OrdinalEstimation:
    """Build the multi-group ordinal model and minimise its least-squares discrepancy.  Continuous items
    beside the ordinal ones keep their metric in every group (their means and variances are statistics, their
    intercepts and residual variances parameters; :class:`~cfa_tool.estimation.least_squares.MixedLeastSquares`).

    The latent responses are identified by residual variances of 1 (Wu & Estabrook 2016), which cannot reach a
    solution with a negative residual variance in the correlation metric (a Heywood case): the search only
    approaches it as the estimates grow without bound.  Where it does and the residual variance at 1 only sets the
    scale, the model is fitted again with those latent responses at variance 1 (the same model in the correlation
    metric of a one-group fit, Muthén & Asparouhov 2002), which reaches the solution: an estimate with its problem
    shown, as ``fit`` of one group gives it.  ``correlation_metric``: every ordinal item's latent response at
    variance 1 from the start (one group, as that fit identifies it: the same estimates)."""
    method = _check_method(method)
    labels = tuple(label for label, _ in groups)
    observed = spec.observed_names
    table, moments, data = groups_model(spec, groups)
    n_thresholds = threshold_counts(moments[0])
    continuous = moments[0].continuous_positions
    model = StructuredModel(table)
    statistics = [group_statistics(values, gamma, m.n_obs, method is Weighting.DIAGONAL, _weight_variances(m),
                                   m.domains_gamma) for (values, gamma), m in zip(data, moments)]
    objective = _objective(model, statistics, continuous)
    weights = objective.weights
    R = sum(w * m.correlations for w, m in zip(weights, moments))
    tau = sum(w * m.stacked_thresholds for w, m in zip(weights, moments))
    scale, location = np.ones(len(observed)), np.zeros(len(observed))
    if len(continuous):  # continuous items start in their own metric (pooled over the groups)
        scale[continuous] = np.sqrt(sum(w * m.sds[continuous] ** 2 for w, m in zip(weights, moments)))
        location[continuous] = sum(w * m.means[continuous] for w, m in zip(weights, moments))
    S = R * np.outer(scale, scale)

    def variance_scaled_problem(unit_variances=None) -> Alternative | None:
        try:
            alt_table = build_parameter_table(variance_scaled(spec, table), labels, ordinal=n_thresholds)
        except CfaError:  # e.g. a freed factor variance, which variance scaling would fix
            return None
        alt_model = StructuredModel(alt_table)
        return Alternative(alt_table, alt_model, _objective(alt_model, statistics, continuous, unit_variances),
                           starting_values(alt_table, S, location, thresholds=tau))

    usual_start = starting_values(table, S, location, thresholds=tau)
    if start is None or len(start) != table.n_free:
        start = usual_start
    if correlation_metric:
        unit = np.ones((len(groups), len(observed)), dtype=bool)
        unit[:, continuous] = False
        objective = objective.with_unit_variances(tuple(unit))
    found = search(objective, table, start, options.max_iterations,
                   lambda: variance_scaled_problem(objective.unit_variances))
    opt = found.result
    if opt.outcome is Outcome.BAD_START:  # a fixed covariance beyond the variances at the start: named at its line
        fixed_values_at_start(spec, table, model.entry_values(start), labels)
    if not correlation_metric:
        heywood = _heywood_responses(objective, opt.theta)
        if heywood.any():
            # the item's scale is set where its residual variance is fixed at 1 (in the first group, say), and its
            # residual may be driven to zero in another group where it is free: its latent response at variance 1
            # wherever that residual variance only sets the scale
            unit = heywood.any(axis=0)[None, :] & _scale_only_residuals(objective, table, usual_start)
            if unit.any():  # fitted again in the correlation metric of those latent responses
                again = objective.with_unit_variances(tuple(unit))
                refit = search(again, table, usual_start, options.max_iterations,
                               lambda: variance_scaled_problem(again.unit_variances))
                if refit.result.converged:
                    objective, found, opt = again, refit, refit.result
    message = "converged" if opt.converged else nonconvergence_message(
        found, table.free_labels, options.max_iterations, table.lower, table.upper, table.observed,
        two_item_factors(spec, table.free_labels))
    return OrdinalEstimation(table, model, objective, opt.theta, opt.value, opt.converged, opt.iterations, message)


def _unit_variance_entries(table: ParameterTable, unit_variances: tuple[np.ndarray, ...] | None) -> frozenset[int]:
    """The residual-variance entries of the items whose latent responses are held at variance 1 (they follow
    from the other estimates, as in a one-group fit)."""
    if unit_variances is None:
        return frozenset()
    return frozenset(e for e, par in enumerate(table.parameters)
                     if par.matrix == "T" and par.row == par.col and unit_variances[par.group][par.row])


def _unit_variance_note(table: ParameterTable, unit_variances: tuple[np.ndarray, ...]) -> str:
    """What the metric of a multi-group ordinal fit is where latent responses were held at variance 1."""
    held = "; ".join(f"{', '.join(table.observed[j] for j in np.flatnonzero(u))} in group "
                     f"{written_group(table.groups[g], table.groups)}"
                     for g, u in enumerate(unit_variances) if u.any())
    return (f"Latent responses held at variance 1 rather than residual variance 1 (the same model in the correlation "
            f"metric of a one-group fit): {held}. With residual variance 1 the estimates grew without bound towards a "
            f"negative residual variance, which this metric reaches; such a residual variance follows as 1 minus the "
            f"variance the factors explain, and the item's loadings are in that metric")


def ordinal_score_tests(est: OrdinalEstimation, candidates: list[list]) -> ModificationIndices:
    """Robust score tests for each group's candidate entries (``candidates[g]``) of a multi-group ordinal fit."""
    obj, theta, table = est.objective, est.theta, est.table
    D, e, w, gamma = obj.stacked(theta)
    slices = obj.group_slices()
    blocks = []
    for g, cands in enumerate(candidates):
        if not cands:
            continue
        block = np.zeros((len(cands), D.shape[1]))
        block[:, slices[g]] = obj.entry_jacobian(theta, g, *candidate_arrays(cands))
        blocks.append(block)
    if not blocks:
        return []
    mi, epc = least_squares_score_tests(D, np.vstack(blocks), e, w, gamma, obj.n_total)
    return _modification_rows(candidates, mi, epc, lambda g: est.model.matrices(theta, g), lambda g: table.groups[g])


def ordinal_difference(restricted: OrdinalEstimation, general: OrdinalEstimation,
                       general_derivatives: np.ndarray | None = None) -> AdjustedTest:
    """Adjusted difference test of two nested ordinal fits with the same weights.

    T_d = N (F_0 - F_1), adjusted with U_d = U_0 - U_1, both evaluated at the restricted
    estimates (Satorra 2000; Asparouhov & Muthén 2006).  ``general_derivatives``: the general
    model's derivatives there, with the statistics in the restricted model's order; by default
    the general model's parameters are found from the restricted model's matrix entries, which
    the two share when they differ only in constraints (the invariance ladder), read in the restricted model's metric
    (its latent responses held at variance 1, if any: ``estimate_ordinal_groups``)."""
    D0, _, w, gamma = restricted.objective.stacked(restricted.theta)
    if general_derivatives is None:
        entries = restricted.model.entry_values(restricted.theta)
        J = general.model.J  # of full column rank: the normal equations give the least-squares solution
        theta1 = np.linalg.solve(J.T @ J, J.T @ (entries - general.model.offset))
        general_objective = general.objective.with_unit_variances(restricted.objective.unit_variances)
        general_derivatives = general_objective.stacked(theta1)[0]
    # U_d = U_restricted - U_general: the weights W cancel
    traces = residual_traces(w, gamma, [(1.0, D0), (-1.0, general_derivatives)], False,
                             restricted.objective.gamma_blocks())
    diff = restricted.statistic - general.statistic
    return adjusted_from_traces(max(diff, 0.0), restricted.df - general.df, *traces)


def assess_ordinal_groups(spec: Spec, groups: list, est: OrdinalEstimation, options: FitOptions, group_column: str,
                          method: Weighting | str = Weighting.DIAGONAL, modification: bool = True) -> FitResult:
    """Robust standard errors, adjusted tests, indices and score tests of a multi-group ordinal fit."""
    method = _check_method(method)
    table, model, obj, theta = est.table, est.model, est.objective, est.theta
    G = len(groups)
    n = obj.n_total
    p = table.p
    pairs = np.tril_indices(p, -1)
    moments = _in_model_order(groups, table.observed)
    values = model.entry_values(theta)
    codes, rows, cols = table.entry_arrays()
    group_of = table.group_array()
    standardized, factors_standardized = np.full(len(values), np.nan), np.full(len(values), np.nan)
    mats = [obj.unit_variance_matrices(theta, g) for g in range(G)]
    derived = _unit_variance_entries(table, obj.unit_variances)
    for e in derived:  # residual variances that follow from latent responses held at variance 1
        values[e] = mats[group_of[e]].T[rows[e], rows[e]]
    for g in range(G):
        sel = group_of == g
        standardized[sel], factors_standardized[sel] = standardize_entries(mats[g], codes[sel], rows[sel], cols[sel],
                                                                           values[sel])
        sigma = mats[g].implied_covariance()
        mu = mats[g].implied_mean()
        thr = np.flatnonzero(sel & (codes == 6))
        item = obj.item_of[rows[thr]]
        standardized[thr] = factors_standardized[thr] = (values[thr] - mu[item]) / np.sqrt(np.diag(sigma)[item])
    warnings = []
    dropped = sum(m.rows_dropped for m in moments)
    model_order = list(range(p))  # the groups' moments are in model order
    labels = [label for label, _ in groups]  # each named by the one rule of group names among them
    for (label, _), m in zip(groups, moments):
        warnings.extend(_rows_notes(m, model_order, f" in group {written_group(label, labels)}"))
    fit = robust = inference = None
    modification_rows = ModificationIndices()
    shares = [None] * G
    srmrs = [None] * G
    if est.converged:
        D, e, w, gamma = obj.stacked(theta)
        try:
            check_information_rank(D @ (D.T * w[:, None]), table.free_labels)
        except NotIdentified:  # a Heywood case drives the estimates without bound: said so, not 'not identified'
            check_bounded_responses(mats, table.observed, tuple(label for label, _ in groups) if table.multigroup
                                    else (None,) * G, table.free_labels, theta)
            raise
        slices = obj.group_slices()
        blocks = obj.gamma_blocks()  # None: groups that share clusters, Gamma not block-diagonal
        cov_theta = robust_covariance(D, w, gamma, n, blocks)
        inference = wald_inference(values, model.J, cov_theta)
        df = est.df
        T = est.statistic
        K = obj.n_thresholds + 2 * len(getattr(obj, "continuous", ()))  # the baseline leaves these saturated
        base_df = G * len(pairs[0])
        T_base = 0.0
        D_base = np.zeros((G * K, D.shape[1]))
        for g in range(G):
            r = moments[g].correlations[pairs]
            T_base += n * obj.weights[g] * float(r @ (obj.w[g][K:] * r))
            D_base[g * K:(g + 1) * K, slices[g].start:slices[g].start + K] = np.eye(K)
            eg = e[slices[g]]
            shares[g] = float(moments[g].n_obs * eg @ (obj.w[g] * eg))
        latent_correlations = []
        for g in range(G):
            sigma = mats[g].implied_covariance()
            sd = np.sqrt(np.diag(sigma))
            latent_correlations.append((moments[g].correlations, sigma / np.outer(sd, sd), moments[g].n_obs))
        overall_srmr, srmrs = srmr(latent_correlations, correlations=True)
        test = adjusted_test(T, df, D, w, gamma, blocks)
        base = adjusted_test(T_base, base_df, D_base, w, gamma, blocks)
        fit = _least_squares_fit(T, df, T_base, base_df, n, table.n_free, overall_srmr, G)
        robust = adjusted_fit(test, base, df, base_df, n, G)
        if modification and df > 0 and options.modification_indices:
            exo = exogenous_factors(spec)
            modification_rows = ordinal_score_tests(est, [candidate_entries(table, exo, g) for g in range(G)])
        warnings.append(GROUPS_NOTE)
        if obj.unit_variances is not None and table.multigroup:
            warnings.append(_unit_variance_note(table, obj.unit_variances))
        if moments[0].continuous:
            warnings.append(MIXED_GROUPS_NOTE)
        warnings.append(ORDINAL_NOTE)
    small, small_notes = group_size_problems(table, [m.n_obs for m in moments])
    warnings.extend(small_notes)
    left_out = sum((_left_out(m, f" in group {written_group(label, labels)}") for (label, _), m in zip(groups, moments)),
                   ())
    problems = left_out + small + tuple(solution_problems(
        table, list(mats), theta, cov_theta if est.converged else None, est.converged, est.message, options.max_iterations))
    estimates = estimate_rows(table, values, inference, standardized, factors_standardized, derived)
    group_results, keyed = [], []
    for g, (lab, m) in enumerate(groups):
        mg = moments[g]
        sigma = mats[g].implied_covariance()
        sd = np.sqrt(np.clip(np.diag(sigma), 1e-300, None))
        rho = sigma / np.outer(sd, sd)
        summary = DataSummary(mg.source, mg.rows_read, mg.rows_dropped, mg.n_obs, table.observed,
                              tuple(float(v) for v in mg.means), tuple(float(v) for v in mg.sds),
                              categories=_category_counts(mg, [mg.names.index(x) for x in table.observed]),
                              pair_rows=_pair_rows(mg, list(range(p))))
        factors, htmt = reliability(mats[g], table.observed, table.latent, mg.correlations,
                                    declared=spec.reverse_keyed or None, sum_scores=False, not_traits=spec.method_factors)
        tau = model.thresholds(theta, g)
        ordinal_items = [j for j, x in enumerate(table.observed) if x not in mg.continuous]
        factors = with_observed_sum_omega(factors, mats[g], table.observed, table.latent,
                                          {table.observed[j]: tau[obj.item_of == j] for j in ordinal_items},
                                          {table.observed[j]: np.asarray(mg.categories[j], float) for j in ordinal_items},
                                          mats[g].implied_mean())
        keyed.append((lab, factors))
        group_results.append(GroupResult(label=lab, data=summary, chi_square=shares[g], srmr=srmrs[g],
                                         r_squared=dict(zip(table.observed, (float(v) for v in r_squared(mats[g])))),
                                         sample_covariance=mg.correlations, implied_covariance=rho,
                                         residual_correlations=mg.correlations - rho, sample_mean=np.zeros(p),
                                         implied_mean=None, normality=None, reliability=tuple(factors), htmt=tuple(htmt),
                                         latent_covariance=mats[g].latent_covariance()))
    if est.converged:  # each caution on a factor's direction once, naming the groups where it differs
        warnings.extend(group_keying_warnings(keyed, factor_scales(spec, table)))
    per_group = [_pair_rows(m, list(range(p))) for m in moments]
    total_pairs = tuple((a, b, sum(rows[k][2] for rows in per_group)) for k, (a, b, _) in enumerate(per_group[0]))
    per_group_counts = [_category_counts(m, list(range(p))) for m in moments]  # every group has every category
    total_counts = tuple(tuple((value, sum(counts[j][c][1] for counts in per_group_counts))
                               for c, (value, _) in enumerate(per_group_counts[0][j])) for j in range(p))
    total = DataSummary(moments[0].source, sum(m.rows_read for m in moments), dropped, n, table.observed,
                        tuple(float(v) for v in sum(m.n_obs * m.means for m in moments) / n),
                        tuple(float(v) for v in moments[0].sds), categories=total_counts, pair_rows=total_pairs)
    items = Items.MIXED if moments[0].continuous else Items.ORDINAL
    return fit_result(spec=spec, method=_fit_method(method, items, thresholds=True,
                                                    pairwise=all(m.pairwise for m in moments)), converged=est.converged,
                      iterations=est.iterations, message=est.message, theta=theta, n_obs=n, data=total,
                      observed=table.observed, latent=table.latent, fit=fit, robust=robust, estimates=estimates,
                      modification_indices=modification_rows, groups=group_results, warnings=warnings, options=options,
                      group_column=group_column, problems=problems,
                      parameter_covariance=cov_theta if est.converged else None, parameter_labels=table.free_labels,
                      table=table)


def fit_ordinal_groups(spec: Spec, groups: list, options, method: Weighting | str = Weighting.DIAGONAL,
                       group_column: str = "group") -> FitResult:
    est = estimate_ordinal_groups(spec, groups, options, method)
    return assess_ordinal_groups(spec, groups, est, options, group_column, method)
