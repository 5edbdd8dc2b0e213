"""The fitting pipeline: Spec + sample moments (one or several groups) -> FitResult.

Each step is a call into its own module; nothing here computes statistics
itself.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import lru_cache
from typing import TYPE_CHECKING

import numpy as np

from cfa_tool.assessment.admissibility import (Problem, ProblemKind, group_size_problems, not_identified,
                                               solution_problems)
from cfa_tool.data.descriptives import answer_extremes, item_shape
from cfa_tool.assessment.convergence import nonconvergence_message, two_item_factors
from cfa_tool.assessment.diagnostics import case_diagnostics, incomplete_case_diagnostics, normalized_residuals
from cfa_tool.assessment.fit_indices import (baseline_chi_square, cfi_value, fit_indices, normal_theory_parts,
                                             rmsea_value, srmr, srmr_value)
from cfa_tool.assessment.identification import check_counting_rule, check_information_rank
from cfa_tool.assessment.modification import NO_INDICES, helper_modification_indices, modification_indices
from cfa_tool.assessment.robust_scores import robust_score_tests, sampling_design
from cfa_tool.assessment.normality import Normality, Whitened, mardia, whitened_rows
from cfa_tool.assessment.reliability import group_keying_warnings, keying_warnings, reliability
from cfa_tool.assessment.residuals import correlation_residuals
from cfa_tool.assessment.standardized import r_squared, standardization, standardize_entries
from cfa_tool.data.kept_rows import RowNaming, rows_listed
from cfa_tool.data.groups import pooled
from cfa_tool.data.moments import SampleMoments, moments_with_gaps
from cfa_tool.errors import CfaError, EstimationError, NotIdentified, OptionError
from cfa_tool.language.names import written_group
from cfa_tool.numbers import count_text, counted
from cfa_tool.estimation.ml import GroupMoments, NormalLikelihood, SingularMoments
from cfa_tool.estimation.optimizer import Outcome
from cfa_tool.estimation.strategy import Alternative, search
from cfa_tool.inference.standard_errors import observed_information, parameter_covariance, wald_inference
from cfa_tool.language.checks import exogenous_factors
from cfa_tool.language.spec import Spec
from cfa_tool.method import Estimator, FitMethod, FitTest, Information, MissingData, WeightKind
from cfa_tool.model.description import factor_scales
from cfa_tool.model.implied import StructuredModel
from cfa_tool.model.parameters import ImpossibleAtStart, ParameterTable, build_parameter_table, fixed_values_at_start
from cfa_tool.model.rescale import variance_scaled
from cfa_tool.model.starts import starting_values
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.numerics.linalg import scaled_factor
from cfa_tool.numerics.threads import blas_threads_for
from cfa_tool.options import ITERATION_LIMIT, Option, taken_by
from cfa_tool.pipeline.results import DEFAULT_MI_THRESHOLD, DataSummary, EstimateRow, FitResult, GroupResult, fit_result

if TYPE_CHECKING:  # the full-information likelihood is imported by the fits that use it
    from cfa_tool.estimation.auxiliary import AuxiliaryFit
    from cfa_tool.estimation.fiml import MissingDataLikelihood


LISTWISE_WARNING_SHARE = 0.05  # more rows lost than this to listwise deletion: a prominent warning (common practice)


@dataclass(frozen=True)
class FitOptions:
    """How a model is fitted and what the fit computes beside the estimates."""
    # source of the standard errors: None means the estimator's own (expected information for complete
    # data, observed information with full-information ML); robust tests use the sandwich
    information: Information | None = None
    mi_threshold: float | None = None  # None: not given, DEFAULT_MI_THRESHOLD (set in __post_init__)
    mi_top: int | None = None
    max_iterations: int = ITERATION_LIMIT
    # the test of fit; None (not chosen) is the normal-theory test, and under a sampling design the design-based scaled
    # one (pipeline.inputs.design_test)
    test: FitTest | None = None
    diagnostics: bool = True  # Mardia's tests, reliability, normalized residuals, case diagnostics
    modification_indices: bool = True  # (workflows and loops that refit many times turn these off)
    # rows with missing answers: full information or listwise; None lets cfa_tool.fit decide from the
    # data (full information when a model variable has a gap), and means listwise elsewhere
    missing: MissingData | None = None
    # columns beside the model in the full-information likelihood (auxiliary variables, Graham 2003:
    # estimation/auxiliary.py); full-information ML only
    missing_helpers: tuple[str, ...] = ()
    # whether the caller chose the test (False: the default above, the tool's choice), so that a test that cannot apply
    # (the normal-theory one under a sampling design or to ordinal items) is refused, never replaced; kept as it is by
    # dataclasses.replace, and set from ``test`` when not given
    test_chosen: bool | None = field(default=None, metadata={"keyword": False})  # not a keyword of the public functions
    # the factors' reliability without the other diagnostics, so that the keying the loadings contradict is a problem
    # of the solution as in fit (assessment.reliability.keying_problems): for workflows that report their models'
    # problems (compare, the invariance ladder's configural model); not a keyword of the public functions
    reliability: bool = field(default=False, metadata={"keyword": False})
    # the options of the modification indices the caller gave (--mi-threshold, --mi-top), refused for a model with
    # nothing to free (0 df: pipeline.results.fit_result); set from mi_threshold and mi_top when not given
    mi_chosen: tuple | None = field(default=None, metadata={"keyword": False})

    def __post_init__(self) -> None:
        if self.test_chosen is None:
            object.__setattr__(self, "test_chosen", self.test is not None)
        object.__setattr__(self, "test", FitTest.NORMAL if self.test is None else FitTest.parse(self.test, "test"))
        if self.information is not None:
            object.__setattr__(self, "information", Information.parse(self.information, "information"))
        if self.information is not None and self.test is not FitTest.NORMAL:
            raise OptionError(f"with a robust test the standard errors are robust (sandwich) ones, so the information "
                              f"they come from ('{self.information}', {Option.STANDARD_ERRORS_FROM}) cannot be chosen; remove "
                              f"that option")
        if self.missing is not None:
            object.__setattr__(self, "missing", MissingData.parse(self.missing, "missing"))
            object.__setattr__(self, "test", self.test.for_rows(self.missing))
        if self.information is Information.EXPECTED and self.missing is MissingData.FULL_INFORMATION:
            raise OptionError("with full-information ML the standard errors use the observed information, the one that "
                              "stays valid when answers are missing at random (Kenward & Molenberghs 1998); the expected "
                              "information assumes they are missing completely at random, so it is not offered")
        from cfa_tool import options as check

        if self.mi_chosen is None:  # which of the two options of the modification indices the caller gave
            object.__setattr__(self, "mi_chosen", tuple(o for o, value in ((Option.MI_THRESHOLD, self.mi_threshold),
                                                                            (Option.MI_TOP, self.mi_top))
                                                        if value is not None))
        if self.mi_threshold is None:
            object.__setattr__(self, "mi_threshold", DEFAULT_MI_THRESHOLD)
        object.__setattr__(self, "mi_threshold", check.real_number("the modification-index threshold", self.mi_threshold, 0.0))
        if self.mi_top is not None:
            object.__setattr__(self, "mi_top", check.whole_number("the number of modification indices to show", self.mi_top, 1))
        object.__setattr__(self, "max_iterations",
                           check.whole_number("the iteration limit", self.max_iterations, 1, check.MAX_ITERATIONS))
        for name in ("diagnostics", "modification_indices"):
            object.__setattr__(self, name, check.yes_or_no(name, getattr(self, name)))
        object.__setattr__(self, "missing_helpers", helper_names(self.missing_helpers))
        if self.missing_helpers:
            if self.missing is MissingData.LISTWISE:
                raise OptionError(f"missing-data helpers ({Option.MISSING_HELPERS}) enter the full-information "
                                  f"likelihood, and {Option.INCOMPLETE_ROWS.given('listwise')} fits the complete rows "
                                  f"only, where they change nothing; leave one of the two out")
            if self.test is not FitTest.NORMAL:
                raise OptionError(f"robust tests and standard errors ({Option.ROBUST}) are not offered with missing-data "
                                  f"helpers ({Option.MISSING_HELPERS}): {HELPERS_NOT_ROBUST}; leave one of the two out")
        if self.missing is MissingData.FULL_INFORMATION and self.test is FitTest.SATORRA_BENTLER:
            raise OptionError("the Satorra-Bentler test needs complete rows; the robust test of full-information ML is "
                              f"the Yuan-Bentler one ({Option.ROBUST} chooses the test that suits the rows)")
        if self.test is FitTest.YUAN_BENTLER and self.missing is MissingData.LISTWISE:
            raise OptionError(f"the Yuan-Bentler test goes with full-information ML "
                              f"({Option.INCOMPLETE_ROWS.given('full-information')}); the robust test of complete rows "
                              f"is the Satorra-Bentler one ({Option.ROBUST} chooses the test that suits the rows)")


#: why missing-data helpers are not offered with robust standard errors (also sampling weights, clusters, strata)
HELPERS_NOT_ROBUST = ("robust standard errors and the scaled test with helpers would need each row's scores in the "
                      "likelihood of the items and helpers together, which the tool does not compute yet")


def helper_names(value) -> tuple[str, ...]:
    """The missing-data helpers' column names as a tuple: one name, names separated by commas, or a list of names."""
    if value is None:
        return ()
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, (list, tuple)) or not all(isinstance(v, str) for v in value):
        raise OptionError(f"{Option.MISSING_HELPERS} takes column names (a list of them, or one text of names "
                          f"separated by commas), not {type(value).__name__}")
    names = tuple(part.strip() for v in value for part in v.split(","))
    if any(not name for name in names):
        raise OptionError(f"{Option.MISSING_HELPERS} has an empty column name; name each column once, separated by "
                          f"commas")
    if len(set(names)) != len(names):
        twice = next(name for name in names if names.count(name) > 1)
        raise OptionError(f"{Option.MISSING_HELPERS} names the column '{twice}' twice")
    return names


@dataclass(frozen=True)
class Estimation:
    """The fitted model before any assessment: what workflows need to reuse a fit."""

    table: ParameterTable
    model: StructuredModel
    likelihood: NormalLikelihood
    theta: np.ndarray
    value: float
    converged: bool
    iterations: int
    message: Text  # 'converged', or why not: words, or a Note whose option a manuscript leaves out
    # with missing-data helpers: the joint fit of items and helpers (estimation.auxiliary.AuxiliaryFit), of which
    # theta and value above are the model's part and the joint discrepancy; likelihood is then the model's alone
    auxiliary: AuxiliaryFit | None = None


def ordered_moments(moments: SampleMoments, observed: tuple[str, ...]) -> GroupMoments:
    if tuple(moments.names) == tuple(observed):
        return GroupMoments(moments.covariance, moments.means, moments.n_obs, moments.rows, moments.design,
                            moments.factor)
    order = [moments.names.index(n) for n in observed]
    rows = moments.rows[:, order] if moments.rows is not None else None
    return GroupMoments(moments.covariance[np.ix_(order, order)], moments.means[order], moments.n_obs, rows,
                        moments.design)


def estimate(spec: Spec, groups: list[tuple[str | None, SampleMoments]], options: FitOptions = FitOptions(),
             start: np.ndarray | None = None) -> Estimation:
    """Build the model and minimise the ML discrepancy (no standard errors, no indices)."""
    if options.missing_helpers:
        return _estimate_with_helpers(spec, groups, options, start)
    multi = len(groups) > 1 or groups[0][0] is not None
    fiml = options.missing is MissingData.FULL_INFORMATION
    labels = tuple(label for label, _ in groups) if multi else None
    table, model = model_structure(spec, labels, fiml)
    moments = [ordered_moments(m, table.observed) for _, m in groups]
    rows = full_information_data(moments) if fiml else None  # the data's patterns: built once for every model

    def likelihood_of(model: StructuredModel) -> NormalLikelihood | MissingDataLikelihood:
        if fiml:
            from cfa_tool.estimation.fiml import MissingDataLikelihood

            return MissingDataLikelihood(model, *rows)
        return NormalLikelihood(model, moments)

    def pooled_moments() -> tuple[np.ndarray, np.ndarray]:
        return pooled_in_order(groups, table.observed)

    def variance_scaled_problem() -> Alternative | None:
        alt_spec = variance_scaled(spec, table)
        try:
            alt_table, alt_model = model_structure(alt_spec, labels, fiml)
        except CfaError:  # e.g. a freed factor variance, which variance scaling would fix
            return None
        return Alternative(alt_table, alt_model, likelihood_of(alt_model), starting_values(alt_table, *pooled_moments()))

    likelihood = likelihood_of(model)
    if start is None or len(start) != table.n_free:
        start = starting_values(table, *pooled_moments())
    found = search(likelihood, table, start, options.max_iterations, variance_scaled_problem)
    opt = found.result
    if opt.outcome is Outcome.BAD_START:  # a fixed covariance beyond the variances the data give: named at its line
        fixed_values_at_start(spec, table, model.entry_values(start), labels)
    message = "converged" if opt.converged else nonconvergence_message(
        found, table.free_labels, options.max_iterations, table.lower, table.upper, table.observed,
        two_item_factors(spec, table.free_labels))
    return Estimation(table, model, likelihood, opt.theta, opt.value, opt.converged, opt.iterations, message)


def pooled_in_order(groups: list[tuple[str | None, SampleMoments]], observed: tuple[str, ...]
                    ) -> tuple[np.ndarray, np.ndarray]:
    """The groups' pooled covariance matrix and means (data.groups.pooled) in the order of ``observed``: what a fit's
    start values are computed from."""
    cov, mean = pooled([m for _, m in groups])
    if tuple(groups[0][1].names) != tuple(observed):
        order = [groups[0][1].names.index(n) for n in observed]
        cov, mean = cov[np.ix_(order, order)], mean[order]
    return cov, mean


def refuse_impossible_start(spec: Spec, groups: list[tuple[str | None, SampleMoments]], fiml: bool) -> None:
    """The error a fit of ``groups``' moments stops with before its search when a 'fix' statement's covariance lies
    beyond what the variances at the start allow (model.parameters.fixed_values_at_start, named at its line), for a
    check that does not fit: the start values :func:`estimate` takes (model.starts.starting_values at the pooled
    moments), judged as the search judges them (a start whose implied covariance matrix is not positive definite in
    some group cannot begin; estimation.optimizer's bad start)."""
    multi = len(groups) > 1 or groups[0][0] is not None
    labels = tuple(label for label, _ in groups) if multi else None
    table, model = model_structure(spec, labels, fiml)
    start = starting_values(table, *pooled_in_order(groups, table.observed))
    for g in range(table.n_groups):
        try:
            np.linalg.cholesky(model.matrices(start, g).implied_covariance())
        except np.linalg.LinAlgError:
            fixed_values_at_start(spec, table, model.entry_values(start), labels)
            return


def _estimate_with_helpers(spec: Spec, groups: list[tuple[str | None, SampleMoments]], options: FitOptions,
                           start: np.ndarray | None) -> Estimation:
    """The model fitted with missing-data helpers in the saturated-correlates form (estimation.auxiliary): the
    model without them first (its full-information fit, the start of the joint search and the model's own
    likelihood for what the helpers do not change: identification, case diagnostics), then the joint search over
    items and helpers.  ``groups``' moments hold the items and the helpers, their covariance the EM estimate of
    both."""
    from copy import copy

    from cfa_tool.data.em import em_saturated
    from cfa_tool.data.patterns import pattern_data
    from cfa_tool.estimation.auxiliary import AuxiliaryFit, AuxiliaryLikelihood, JointModel, joint_start
    from cfa_tool.estimation.optimizer import minimise

    helpers = options.missing_helpers
    if any(h not in m.names for _, m in groups for h in helpers):
        raise OptionError(f"missing-data helpers ({Option.MISSING_HELPERS}) are offered by fit only so far; "
                          f"leave them out here")
    multi = len(groups) > 1 or groups[0][0] is not None
    table, model = model_structure(spec, tuple(label for label, _ in groups) if multi else None, True)
    p, r = len(table.observed), len(helpers)
    joint = [ordered_moments(m, table.observed + helpers) for _, m in groups]
    weights = [gm.design.weights if gm.design is not None else None for gm in joint]
    # the model without helpers fits the rows that answer some item; rows answering only helpers enter the joint fit
    answered = [~np.isnan(gm.rows[:, :p]).all(axis=1) for gm in joint]
    items_saturated = [em_saturated(pattern_data(gm.rows[a, :p], w if w is None else w[a]))[:2]
                       for gm, w, a in zip(joint, weights, answered)]
    items_only = [(label, replace(m, names=table.observed, covariance=sigma, means=mu, rows=gm.rows[a, :p],
                                  n_obs=int(a.sum()) if w is None else int(round(w[a].sum())),
                                  row_numbers=None if m.row_numbers is None else m.row_numbers[a],
                                  design=None if m.design is None else replace(m.design, weights=m.design.weights[a])))
                  for (label, m), gm, (mu, sigma), a, w in zip(groups, joint, items_saturated, answered, weights)]
    first = estimate(spec, items_only, replace(options, missing_helpers=()), start)
    if not first.converged:
        return first
    # the joint N: the chi-square is N times the joint discrepancy (estimation.auxiliary)
    # (the design of the rows answering some item: each of them has a case diagnostic)
    summaries = [GroupMoments(gm.covariance[:p, :p], gm.mean[:p], gm.n_obs, design=m.design)
                 for gm, (_, m) in zip(joint, items_only)]
    items = copy(first.likelihood)  # its patterns and EM moments, whose pieces are computed once
    items.groups = summaries
    joint_model = JointModel(model, r, len(joint))
    patterns, saturated, joint_summaries = full_information_data(joint)  # of the p + r columns
    likelihood = AuxiliaryLikelihood(joint_model, patterns, saturated, joint_summaries)
    free = np.full(joint_model.n_free - joint_model.q, np.inf)
    found = minimise(likelihood.evaluate, likelihood.value, np.concatenate([first.theta, joint_start(
                         p, r, saturated, [first.model.matrices(first.theta, g).implied_covariance()
                                           for g in range(len(joint))])]),
                     np.concatenate([table.lower, -free]), np.concatenate([table.upper, free]),
                     max(1, options.max_iterations - first.iterations), gradient=likelihood.gradient,
                     hessian=likelihood.observed_hessian)
    iterations = first.iterations + found.iterations
    message = ("converged" if found.converged else
               Note((f"the fit with the missing-data helpers {', '.join(helpers)} did not converge in {iterations} "
                     f"iterations (the model without them did); the helpers may go with the items too closely (a "
                     f"helper that nearly repeats an item), or the iteration limit",
                     Command(f" ({Option.MAX_ITERATIONS})", f" ({options.max_iterations})",
                             takes=taken_by(Option.MAX_ITERATIONS), elsewhere=f" ({options.max_iterations})"),
                     " may be too low")))
    return Estimation(table, model, items, found.theta[: joint_model.q].copy(), found.value, found.converged,
                      iterations, message, AuxiliaryFit(helpers, likelihood, found.theta, tuple(items_saturated),
                                                        tuple(answered)))


def full_information_data(moments: list[GroupMoments]) -> tuple[list, list, list[GroupMoments]]:
    """What a full-information discrepancy takes of each group's data, whatever the model: the rows by
    missing-data pattern, the EM (saturated) means and covariances, and those as the groups' summaries."""
    from cfa_tool.data.patterns import pattern_data

    patterns = [pattern_data(gm.rows, gm.design.weights if gm.design is not None else None) for gm in moments]
    saturated = [(gm.mean, gm.covariance) for gm in moments]
    summaries = [GroupMoments(gm.covariance, gm.mean, gm.n_obs, design=gm.design) for gm in moments]
    return patterns, saturated, summaries


def full_information_likelihood(model: StructuredModel, moments: list[GroupMoments]) -> MissingDataLikelihood:
    """The full-information discrepancy of ``model`` for each group's rows, ``moments`` holding the rows and
    their EM (saturated) means and covariances."""
    from cfa_tool.estimation.fiml import MissingDataLikelihood

    return MissingDataLikelihood(model, *full_information_data(moments))


@lru_cache(maxsize=16)
def model_structure(spec: Spec, groups: tuple[str, ...] | None, mean_structure: bool) -> tuple[ParameterTable, StructuredModel]:
    """The parameter table (checked by the counting rule) and its index arrays.  Both are fixed once
    built and depend only on their arguments, so refits of one model (resampling, simulations,
    loops over data sets) build them once."""
    table = build_parameter_table(spec, groups, mean_structure=mean_structure)
    check_counting_rule(spec, table)
    return table, StructuredModel(table)


def fit_moments(spec: Spec, moments: SampleMoments | list[tuple[str | None, SampleMoments]],
                options: FitOptions = FitOptions(), group_column: str | None = None) -> FitResult:
    """Fit ``spec`` by normal-theory maximum likelihood to one or several groups' moments."""
    groups = [(None, moments)] if isinstance(moments, SampleMoments) else list(moments)
    with blas_threads_for(len(spec.observed_names)):
        est = estimate(spec, groups, options)
        return assess(spec, groups, est, options, group_column)


def unestimated(spec: Spec, moments: SampleMoments | list[tuple[str | None, SampleMoments]], options: FitOptions,
                group_column: str | None, failure: NotIdentified) -> FitResult:
    """A model the data do not identify (``failure``: :func:`fit_moments`'s error that said so) as a result that could
    not be estimated, that problem first: for a workflow that reports it among models that could be (compare)."""
    groups = [(None, moments)] if isinstance(moments, SampleMoments) else list(moments)
    with blas_threads_for(len(spec.observed_names)):
        est = estimate(spec, groups, options)
        result = assess(spec, groups, replace(est, converged=False, message=str(failure)), options, group_column,
                        identification_known=True)
    return replace(result, problems=tuple(not_identified(failure.parameters) if p.kind is ProblemKind.NOT_CONVERGED
                                          else p for p in result.problems))


def scaled_test_problem(robust) -> Problem:
    """The caution on a robust test whose scaling factor is not positive (inference.robust.robust_fit): what could
    not be computed and why, and what the report still gives."""
    explanation = robust.not_computed[0].upper() + robust.not_computed[1:] + "."
    return Problem(ProblemKind.SCALED_TEST_NOT_COMPUTED, (), float(robust.scaling_factor), explanation,
                   "The robust standard errors do not use it and are given. Judge the fit by the SRMR and the residual "
                   "correlations, and read the normal-theory chi-square, which assumes normally distributed answers, "
                   "with caution; more rows make the estimate steadier.")


def full_information_instead() -> Note:
    """What keeps the rows listwise deletion leaves out of a fit of continuous items: full-information ML, its option
    named as the caller writes it (options.on_command_line; built per run, never once at import)."""
    return Note(("full-information ML", Command(f" ({Option.INCOMPLETE_ROWS.given('full-information')})",
                                                takes=taken_by(Option.INCOMPLETE_ROWS),
                                                elsewhere=" (a fit of the model with "
                                                          f"{Option.INCOMPLETE_ROWS.given('full-information')})")))


def pairwise_instead() -> Note:
    """What keeps them for ordinal items: pairwise present rows, the default."""
    return Note(("pairwise present rows (the default for ordinal items",
                 Command(f", without {Option.INCOMPLETE_ROWS.given('listwise')}", takes=taken_by(Option.INCOMPLETE_ROWS)),
                 ")"))


def listwise_problem(dropped: int, read: int, where: str = "",
                     instead: Note | None = None, unanswered: int = 0) -> Problem | None:
    """The caution on rows that listwise deletion left out for a missing answer, first in every view of every
    command: more than :data:`LISTWISE_WARNING_SHARE` of the rows read, whose loss may bias the estimates unless the
    answers are missing completely at random (Little & Rubin 2002); None for fewer.  ``instead`` names what would
    use every answer they have (None: :func:`full_information_instead`); ``unanswered``: how many of the rows left
    out answered no model variable, which it would leave out too, so that the advice counts only the rows it keeps
    (hostile tester s28: 'would use every answer they have' of 336 break-offs of 337 rows)."""
    if dropped <= LISTWISE_WARNING_SHARE * read:
        return None
    instead = full_information_instead() if instead is None else instead
    unanswered = min(max(int(unanswered), 0), dropped)
    with_gaps = dropped - unanswered
    none = "" if not unanswered else (
        f" ({'all of them answered' if not with_gaps else f'{count_text(unanswered)} of them answered'} "
        f"no model variable at all)")
    if not unanswered:
        advice = instead + " would use every answer they have."
    elif not with_gaps:
        advice = ("find out why these rows answered nothing (break-offs, rows of another questionnaire) and say in "
                  "the report which rows were analysed; " + instead + " would leave them out too: they have no answer "
                  "to use.")
    else:
        advice = instead + (f" would keep the {counted(with_gaps, 'row')} with some answers and use every answer "
                            f"{'it has' if with_gaps == 1 else 'they have'}; the {count_text(unanswered)} that answered "
                            f"no model variable stay out whatever the method: find out why they answered nothing.")
    return Problem(ProblemKind.ROWS_LEFT_OUT, (), float(dropped),
                   f"Listwise deletion left out {count_text(dropped)} of {count_text(read)} rows{where} ({100 * dropped / read:.0f}%) because "
                   f"they miss an answer on a model variable{none}, and the rows left out may differ from those kept.",
                   advice)


def unanswered_problem(unanswered: int, read: int, where: str = "", listed: str = "",
                       what: str = "no model variable") -> Problem | None:
    """The caution on the rows a method that keeps every row with an answer (full-information ML, pairwise present
    rows) left out because they answered no model variable, first in every view as listwise deletion's is: more
    than the same share of the rows read (:data:`LISTWISE_WARNING_SHARE`; hostile tester s28: 336 of 480 rows
    that held only an id and a district were said in the second note), since the rows analysed may then differ from
    the sample read; None for fewer, which a note says.  ``listed``: the first of them named (' (rows 2, 3, ...)');
    ``what`` they answered none of (compare: 'none of some model's variables')."""
    if unanswered <= LISTWISE_WARNING_SHARE * read:
        return None
    return Problem(ProblemKind.ROWS_WITHOUT_ANSWERS, (), float(unanswered),
                   f"{count_text(unanswered)} of {count_text(read)} rows{where} ({100 * unanswered / read:.0f}%) "
                   f"answered {what} and were left out{listed}, so the "
                   f"{count_text(read - unanswered)} rows analysed may differ from the rows read.",
                   "find out why these rows answered nothing (break-offs, rows of another questionnaire, a wrong "
                   "sheet or filter), and say in the report which rows were analysed and why the others were left out.")


def listwise_line(dropped: int, read: int, analysed: int, where: str = "") -> str:
    """The note on fewer rows left out listwise than :func:`listwise_problem` cautions about."""
    return (f"{count_text(dropped)} of {count_text(read)} rows{where} had a missing answer on a model variable and were left out "
            f"(listwise deletion); {count_text(analysed)} rows were analysed")


def rows_left_out(groups, missing: MissingData | None,
                  instead: Note | None = None) -> tuple[tuple[Problem, ...], list[str]]:
    """(cautions, notes) on the rows a fit left out, from ``groups``: (label or None, rows left out, rows read,
    rows analysed[, the row numbers of the rows that answer nothing[, their ids[, how they name rows[, their text
    lines (data.kept_rows.text_lines)]]]]) of each group;
    listwise deletion by :func:`listwise_problem` (or, for few rows, :func:`listwise_line`), otherwise (full-information ML, pairwise
    present rows) the rows that answered none of the model variables, in a note naming the first of them."""
    cautions: list[Problem] = []
    notes: list[str] = []
    labels = [g[0] for g in groups if g[0] is not None]  # each named by the one rule of group names among them
    for label, dropped, read, analysed, *named in groups:
        if not dropped:
            continue
        where = f" in group {written_group(label, labels)}" if label is not None else ""
        if missing is MissingData.LISTWISE or missing is None:
            unanswered = len(named[0]) if named and named[0] is not None else 0
            caution = listwise_problem(dropped, read, where, instead, unanswered)
            if caution is not None:
                cautions.append(caution)
            else:
                notes.append(listwise_line(dropped, read, analysed, where))
        else:
            rows = named[0] if named and named[0] is not None and len(named[0]) == dropped else ()
            ids = named[1] if len(named) > 1 else ()
            naming = named[2] if len(named) > 2 else RowNaming.FILE_ROW
            lines = named[3] if len(named) > 3 else None  # a text file's rows on lines of other numbers
            listed = " (" + rows_listed(rows, ids=ids, naming=naming, lines=lines) + ")" if len(rows) else ""
            caution = unanswered_problem(dropped, read, where, listed)
            if caution is not None:
                cautions.append(caution)
                continue
            notes.append(f"{count_text(dropped)} of {count_text(read)} {'row' if read == 1 else 'rows'}{where} answered none of the model "
                         f"variables and {'was' if dropped == 1 else 'were'} left out" + listed)
    return tuple(cautions), notes


def assess(spec: Spec, groups: list[tuple[str | None, SampleMoments]], est: Estimation, options: FitOptions,
           group_column: str | None = None, identification_known: bool = False) -> FitResult:
    """Standard errors, fit indices, standardized values, modification indices and warnings; ``identification_known``:
    the estimation is one that the rank check already found not identified (:func:`unestimated`)."""
    table, model, likelihood, theta = est.table, est.model, est.likelihood, est.theta
    if options.test is FitTest.ROBUST:  # the robust test that suits the rows fitted (FitTest.for_rows)
        rows = MissingData.LISTWISE if likelihood.complete_data else MissingData.FULL_INFORMATION
        options = replace(options, test=FitTest.ROBUST.for_rows(rows))
    multi = table.multigroup
    means = table.mean_structure
    # with helpers the joint likelihood's N, which counts the rows that answer only helpers (its discrepancy's)
    n_total = likelihood.n_total if est.auxiliary is None else est.auxiliary.likelihood.n_total
    values = model.entry_values(theta)
    standardized = np.empty_like(values)
    factors_standardized = np.empty_like(values)
    mats = [likelihood.matrices(theta, g) for g in range(table.n_groups)]  # the estimation's, implied moments and all
    for g, (sel, codes, rows, cols, layout) in enumerate(_entry_standardization(model)):
        standardized[sel], factors_standardized[sel] = standardize_entries(mats[g], codes, rows, cols, values[sel],
                                                                           layout)

    left_out, warnings = rows_left_out([(label, m.rows_dropped, m.rows_read, m.n_obs, m.unanswered_rows,
                                         m.unanswered_ids, m.row_naming, m.text_lines) for label, m in groups],
                                       options.missing)  # cautions first in every view, notes among the warnings
    # with helpers, the rows that answer no item but a helper (inputs.with_helpers keeps them)
    helpers_only = ([int((~a).sum()) for a in est.auxiliary.answered] if est.auxiliary is not None
                    else [0] * len(groups))
    if sum(helpers_only):
        warnings.append(helpers_only_note(sum(helpers_only), sum(m.rows_read for _, m in groups)))
    fit = None
    robust = None
    inference = None
    mis = NO_INDICES
    robust_wanted = options.test is FitTest.SATORRA_BENTLER
    yuan_bentler = options.test is FitTest.YUAN_BENTLER
    if robust_wanted and any(gm.rows is None for gm in likelihood.groups):
        raise OptionError("the Satorra-Bentler test needs the raw data rows, not only a covariance matrix")
    group_srmr = None
    if est.converged:
        overall_srmr, group_srmr = srmr([(gm.covariance, mats[g].implied_covariance(), gm.n_obs)
                                         for g, gm in enumerate(likelihood.groups)])
        evaluation = likelihood.evaluate(theta)
        information = evaluation.information
        factor = scaled_factor(information)  # read by the rank check, the standard errors and the score tests
        check_information_rank(information, table.free_labels, factor, lambda: two_item_factors(spec, table.free_labels))
        per_group = []
        for g, gm in enumerate(likelihood.groups):
            dev = gm.mean - mats[g].implied_mean() if means else None
            per_group.append((gm.covariance, mats[g].implied_covariance(), gm.n_obs, dev))
        if likelihood.complete_data:
            # the factorisations of Sigma and S the discrepancy made at the estimates: the same numbers, made once
            base_chi, base_df, loglik = normal_theory_parts(per_group, [(likelihood.sigma_inverse(theta, g), logdet_s)
                                                                        for g, logdet_s in enumerate(likelihood.logdet_S)])
        elif est.auxiliary is not None:
            (base_chi, base_df), loglik = _helper_baseline(est.auxiliary, options), est.auxiliary.log_likelihood()
        else:
            from cfa_tool.estimation.fiml import fiml_baseline, fiml_log_likelihood

            (base_chi, base_df), loglik = fiml_baseline(likelihood), fiml_log_likelihood(likelihood, theta)
        fit = fit_indices(chi_square=n_total * est.value, df=likelihood.n_statistics - table.n_free,
                          baseline_chi_square=base_chi, baseline_df=base_df, n_obs=n_total, n_free=table.n_free,
                          srmr=overall_srmr, groups=table.n_groups, log_likelihood=loglik)
        if robust_wanted or yuan_bentler:
            from cfa_tool.inference.robust import baseline_trace, moment_sandwich, robust_fit, robust_parts
        sandwich = None  # Omega and each group's Delta and V at the estimates: made once, read by every robust part
        if robust_wanted:
            sandwich = moment_sandwich(model, theta, likelihood)
            cov_theta, trace_ug = robust_parts(model, theta, likelihood, sandwich)
            robust = robust_fit(fit.chi_square, fit.df, trace_ug, fit.baseline_chi_square, fit.baseline_df,
                                baseline_trace(likelihood, sandwich), n_total, table.n_groups)
        elif yuan_bentler:
            from cfa_tool.inference.robust_missing import robust_missing

            saturated = [(gm.mean, gm.covariance) for gm in likelihood.groups]
            cov_theta, c, c_base = robust_missing(likelihood, theta, saturated, fit.df, fit.baseline_df)
            robust = robust_fit(fit.chi_square, fit.df, c * fit.df, fit.baseline_chi_square, fit.baseline_df,
                                c_base * fit.baseline_df, n_total, table.n_groups, test=FitTest.YUAN_BENTLER)
        elif est.auxiliary is not None:  # the model's block of the joint inverse (the helpers' parameters free)
            joint = est.auxiliary
            hessian = joint.observed_hessian()
            if hessian is None:  # higher-order factors: differences of the analytic gradient
                hessian = observed_information(joint.likelihood.gradient, joint.theta, central=False)
            cov_theta = parameter_covariance(hessian, n_total)[: table.n_free, : table.n_free]
        else:
            if options.information is Information.OBSERVED or not likelihood.complete_data:
                # with incomplete data the observed information is the one valid under MAR (Kenward & Molenberghs 1998)
                closed_form = likelihood.observed_hessian(theta)  # None where there is no closed form (Objective)
                information = closed_form if closed_form is not None else observed_information(
                    likelihood.gradient, theta, central=likelihood.complete_data)
            cov_theta = parameter_covariance(information, n_total,
                                             factor if information is evaluation.information else None)
        inference = wald_inference(values, model.J, cov_theta)
        if options.modification_indices and est.auxiliary is None:
            design_based = options.test.robust and sampling_design(likelihood)
            # the rows the report and the JSON show (at least the threshold) computed now, the others when read; the
            # design-based tests change every index, so they read them all
            mis = modification_indices(model, theta, likelihood, exogenous_factors(spec), mats, factor,
                                       None if design_based else options.mi_threshold, evaluation.information)
            if design_based:  # design-based score tests (Satorra 1989)
                mis = robust_score_tests(mis, model, theta, likelihood, sandwich)
        elif options.modification_indices:  # the joint likelihood's score tests, the helpers' parameters free
            joint = est.auxiliary
            mis = helper_modification_indices(model, joint.likelihood.model, joint.theta, joint.likelihood,
                                              exogenous_factors(spec), mats)
    else:
        # a model that is not identified often shows itself by not converging: say so when it is the cause
        evaluation = likelihood.evaluate(theta)
        if not identification_known and evaluation is not None and np.all(np.isfinite(evaluation.information)):
            check_information_rank(evaluation.information, table.free_labels,
                                   two_items=two_item_factors(spec, table.free_labels))
    small, small_notes = group_size_problems(table, [m.n_obs for _, m in groups])
    warnings.extend(small_notes)
    problems = left_out + small + tuple(solution_problems(
        table, mats, theta, cov_theta if est.converged else None, est.converged, est.message, options.max_iterations))
    if robust is not None and robust.not_computed:  # a scaling factor that is not positive: said first, not NaN alone
        problems += (scaled_test_problem(robust),)

    estimates = estimate_rows(table, values, inference, standardized, factors_standardized)

    group_results = []
    for g, ((label, m), gm) in enumerate(zip(groups, likelihood.groups)):
        sigma = mats[g].implied_covariance()
        # shared below; unweighted rows are those the sample moments were computed from
        rows = gm.rows if gm.rows is not None else _complete_pattern_rows(likelihood, g, est.auxiliary)
        whitened = (whitened_rows(rows, (gm.mean, gm.covariance) if gm.design is None else None,
                                  likelihood.sample_factors[g] if likelihood.complete_data else None)
                    if options.diagnostics and rows is not None else None)
        share = (None if not est.converged else est.auxiliary.group_chi_square(g) if est.auxiliary is not None else
                 likelihood.n_total * likelihood.weights[g] * likelihood.group_discrepancy(theta, g))
        group_results.append(
            GroupResult(
                label=label,
                data=replace(_summary(m, table.observed, gm), helpers_only=helpers_only[g]),
                chi_square=share,
                srmr=group_srmr[g] if est.converged else None,
                r_squared=dict(zip(table.observed, (float(v) for v in r_squared(mats[g])))),
                sample_covariance=gm.covariance,
                implied_covariance=sigma,
                residual_correlations=correlation_residuals(gm.covariance, sigma),
                sample_mean=gm.mean,
                implied_mean=mats[g].implied_mean() if means else None,
                latent_covariance=mats[g].latent_covariance(),
                normality=(mardia(rows, whitened, _frequency_weights(gm)) if whitened is not None else
                           _kurtosis_with_gaps(likelihood, g, est.auxiliary)
                           if options.diagnostics and rows is None and not likelihood.complete_data else None),
                **_group_diagnostics(mats[g], table, gm, _answering_items(m, est.auxiliary.answered[g])
                                     if est.auxiliary is not None else m, sigma,
                                     est.converged and (options.diagnostics or options.reliability),
                                     spec.reverse_keyed or None, spec.method_factors | spec.exploratory_factors, whitened,
                                     likelihood.sigma_inverse(theta, g) if likelihood.complete_data else None,
                                     None if likelihood.complete_data else likelihood.patterns[g].rows,
                                     reliability_only=not options.diagnostics),
            )
        )
    scales = factor_scales(spec, table)  # what decides the way a factor points (keying_warnings)
    warnings.extend(group_keying_warnings([(table.groups[g], r.reliability) for g, r in enumerate(group_results)],
                                          scales) if multi else keying_warnings(group_results[0].reliability, "",
                                                                                scales))
    first = groups[0][1]
    if multi:
        pooled_cov, pooled_mean = pooled([m for _, m in groups])
        item_means = tuple(float(v) for v in pooled_mean)
        item_sds = tuple(float(v) for v in np.sqrt(np.diag(pooled_cov)))
    else:
        item_means, item_sds = group_results[0].data.means, group_results[0].data.sds
    if options.test.robust:
        information = Information.SANDWICH
    elif options.information is not None:
        information = options.information
    else:
        information = Information.EXPECTED if likelihood.complete_data else Information.OBSERVED
    method = FitMethod(Estimator.MAXIMUM_LIKELIHOOD, options.test, information,
                       MissingData.LISTWISE if likelihood.complete_data else MissingData.FULL_INFORMATION,
                       helpers=est.auxiliary.names if est.auxiliary is not None else ())
    each = [r.data.ranges for r in group_results]
    if all(each):  # every group's (lowest, highest) answer per item: the lowest and highest over the groups
        extremes = np.array(each)
        ranges = tuple(zip(extremes[:, :, 0].min(axis=0).tolist(), extremes[:, :, 1].max(axis=0).tolist()))
    else:
        ranges = ()
    overall = DataSummary(first.source, sum(m.rows_read for _, m in groups), sum(m.rows_dropped for _, m in groups),
                          n_total, table.observed, item_means, item_sds, ranges=ranges, helpers_only=sum(helpers_only))
    missingness = (_completely_at_random(likelihood, table.groups if multi else (None,),
                                         est.auxiliary.items_saturated if est.auxiliary is not None else None)
                   if options.diagnostics and not likelihood.complete_data else None)
    return fit_result(spec=spec, method=method, converged=est.converged, iterations=est.iterations, message=est.message,
                      theta=theta, n_obs=n_total, data=overall, observed=table.observed, latent=table.latent, fit=fit,
                      robust=robust, estimates=estimates, modification_indices=mis, groups=group_results,
                      warnings=warnings, options=options, group_column=group_column, problems=problems,
                      parameter_covariance=cov_theta if est.converged else None, parameter_labels=table.free_labels, model=model,
                      completely_at_random=missingness, group_matrices=mats)


def helpers_only_note(count: int, read: int) -> str:
    """The note on the rows that answer no item but a missing-data helper: analysed, and why."""
    one = count == 1
    return (f"{count_text(count)} of {count_text(read)} rows {'answers' if one else 'answer'} none of the model's "
            f"items but a missing-data helper: {'it is' if one else 'they are'} analysed and counted in N, entering "
            f"the likelihood of items and helpers through the helpers' values (Graham's 2003 saturated-correlates "
            f"model), which moves the items' estimated means and covariances as the helpers' correlations with the "
            f"items imply; left out, {'it' if one else 'they'} would leave a sample selected by the helpers")


def _answering_items(moments: SampleMoments, answered: np.ndarray) -> SampleMoments:
    """A fit with missing-data helpers: ``moments`` with the row numbers of the rows that answer some item only
    (``answered``: AuxiliaryFit.answered), in the order of the items' own full-information patterns, which the case
    diagnostics read (a row answering only helpers has no distance on the items)."""
    if moments.rows is None or moments.row_numbers is None:
        return moments
    return replace(moments, row_numbers=moments.row_numbers[answered])


def _completely_at_random(likelihood: MissingDataLikelihood, labels, saturated=None):
    """Little's (1988) test from the full-information likelihood's patterns and EM moments (None with sampling
    weights, clusters or strata, for which its chi-square reference does not hold: rows are not independent draws
    counted once each)."""
    from cfa_tool.assessment.missingness import completely_at_random_test

    designs = [gm.design for gm in likelihood.groups]
    if any(d is not None and (d.kind is not WeightKind.FREQUENCY or d.clusters is not None or d.strata is not None)
           for d in designs):
        return None
    saturated = saturated or [(gm.mean, gm.covariance) for gm in likelihood.groups]  # the items' own EM estimates
    return completely_at_random_test([(label, data, mu, sigma)
                                      for label, data, (mu, sigma) in zip(labels, likelihood.patterns, saturated)])


def _helper_baseline(auxiliary: AuxiliaryFit, options: FitOptions) -> tuple[float, int]:
    """The baseline chi-square and df with missing-data helpers (Savalei & Bentler 2009: estimation.auxiliary);
    an EstimationError when its search does not converge (the incremental indices would have no baseline)."""
    from cfa_tool.errors import EstimationError
    from cfa_tool.estimation.auxiliary import auxiliary_baseline

    joint = auxiliary.likelihood
    found = auxiliary_baseline(joint.patterns, joint.groups,
                               joint.model.items, joint.model.r, options.max_iterations)
    if found is None:
        raise EstimationError("the baseline model of the fit with missing-data helpers (the items uncorrelated, the "
                              "helpers free) did not converge, so CFI and TLI cannot be computed; try without helpers")
    return found


def _entry_standardization(model: StructuredModel) -> list:
    """Per group: (its entries' positions, their codes, rows and columns, their standardization), fixed by the
    model: laid out at its first fit and kept for its refits."""
    if "entry standardization" not in model.derived:
        table = model.table
        codes, rows, cols = table.entry_arrays()
        group_of = table.group_array()
        out = []
        for g in range(table.n_groups):
            sel = np.flatnonzero(group_of == g)
            out.append((sel, codes[sel], rows[sel], cols[sel], standardization(codes[sel], rows[sel], cols[sel], model.p,
                                                                               model.m)))
        model.derived["entry standardization"] = out
    return model.derived["entry standardization"]


def _complete_pattern_rows(likelihood, g: int, auxiliary) -> np.ndarray | None:
    """Group ``g``'s rows under a full-information fit when every one of them is complete (one pattern, no gap), for
    Mardia's tests, which need complete rows (hostile s20: a full-information fit of complete rows said they need
    complete rows and left them out); None where a row has a gap or missing-data helpers join the items."""
    if likelihood.complete_data or auxiliary is not None:
        return None
    rows = likelihood.patterns[g].rows
    return rows if rows is not None and not np.isnan(rows).any() else None


def _kurtosis_with_gaps(likelihood, g: int, auxiliary) -> Normality | None:
    """Mardia's multivariate kurtosis of group ``g``'s rows with gaps under a full-information fit, each row on the
    items it answered (assessment.normality.kurtosis_with_gaps; Yuan, Lambert & Fouladi 2004), at the saturated (EM)
    moments of those rows: the fit's own (with missing-data helpers, those of the items alone), estimated again
    unweighted under sampling weights, which the tests do not use (as for complete rows); None where it cannot be
    computed (the report then says that the tails were not judged).  (Complete rows have both of Mardia's tests
    before this: _complete_pattern_rows; helpers over complete items are refused.)"""
    from cfa_tool.assessment.normality import kurtosis_with_gaps

    gm, data = likelihood.groups[g], likelihood.patterns[g]
    moments = (auxiliary.items_saturated[g] if auxiliary is not None else (gm.mean, gm.covariance))
    frequencies = _frequency_weights(gm)
    try:
        return kurtosis_with_gaps(data.rows, moments if gm.design is None or frequencies is not None else None,
                                  frequencies)
    except (np.linalg.LinAlgError, ValueError, EstimationError):
        return None


def _frequency_weights(gm: GroupMoments) -> np.ndarray | None:
    """The rows' frequency weights (each row counted as often as its weight, as the fit counts it), or None."""
    design = gm.design
    return design.weights if design is not None and design.kind is WeightKind.FREQUENCY else None


def _row_weights(gm: GroupMoments) -> np.ndarray | None:
    """Each row's weight as the fit counts it (frequency weights as given, sampling weights rescaled to sum to the
    rows: data.sample_design.RowDesign), or None without a design: the weights of the rows' shares of the
    chi-square, which then sum to it."""
    return gm.design.weights if gm.design is not None else None


def estimate_rows(table: ParameterTable, values: np.ndarray, inference, standardized: np.ndarray,
                  factors_standardized: np.ndarray,
                  derived: frozenset = frozenset()) -> tuple[EstimateRow, ...]:
    """One row per matrix entry; fixed entries (and ``derived`` ones, which follow from others) have no SE.
    Arrays are turned into lists first: indexing numpy arrays element by element is slow."""
    nan = float("nan")
    n = len(values)
    if inference is not None:
        se, z, p = inference.se.tolist(), inference.z.tolist(), inference.p_value.tolist()
        low, high = inference.ci_low.tolist(), inference.ci_high.tolist()
    else:
        se = z = p = low = high = [nan] * n
    values_l, all_l, lv_l = values.tolist(), standardized.tolist(), factors_standardized.tolist()
    multi = table.multigroup
    rows = []
    for e, par in enumerate(table.parameters):
        free = par.free and e not in derived
        if e in derived:
            se_e = z_e = p_e = nan
        else:
            se_e, z_e, p_e = se[e], z[e], p[e]
        ci = (low[e], high[e]) if free else (nan, nan)
        rows.append(EstimateRow(par.kind, par.variables, free, values_l[e], se_e, z_e, p_e, ci, all_l[e], lv_l[e],
                                "derived" if e in derived else par.origin, table.groups[par.group] if multi else None))
    return tuple(rows)


def _group_diagnostics(mats, table, gm: GroupMoments, m: SampleMoments, sigma: np.ndarray, wanted: bool,
                       declared: dict[str, tuple[float, float]] | None, not_traits: frozenset[str] = frozenset(),
                       whitened: Whitened | None = None,
                       inverse: tuple[np.ndarray, float] | None = None, gap_rows: np.ndarray | None = None,
                       reliability_only: bool = False) -> dict:
    """Reliability, normalized residuals and case diagnostics of one group (skipped by workflows that refit often;
    ``reliability_only``: the reliability alone, FitOptions.reliability);
    ``gap_rows``: under full-information ML, the group's rows with their gaps (NaN), in the order of its row numbers;
    ``declared``: the reverse-keyed items of a 'reversed' statement, if any; ``whitened`` and ``inverse``: the
    whitened rows and (Sigma^-1, log|Sigma|), shared with Mardia's tests and the estimation."""
    if not wanted:
        return {}
    factors, htmt = reliability(mats, table.observed, table.latent, gm.covariance, gm.mean, declared, gm.n_obs,
                                not_traits=not_traits)
    if reliability_only:
        return {"reliability": tuple(factors), "htmt": tuple(htmt)}
    out = {"reliability": tuple(factors), "htmt": tuple(htmt),
           "normalized_residuals": normalized_residuals(gm.covariance, sigma, gm.n_obs)}
    if gm.rows is not None and not np.isnan(gm.rows).any():
        frequencies = _row_weights(gm)  # each row's share weighted, from the weighted moments the fit used
        if frequencies is not None:
            whitened = whitened_rows(gm.rows, (gm.mean, gm.covariance))
        unusual, influential = case_diagnostics(gm.rows, sigma, m.row_numbers, whitened=whitened, inverse=inverse,
                                                frequencies=frequencies)
        out.update(unusual_cases=unusual, influential_cases=influential)
    elif gap_rows is not None:  # full-information ML: distances on the items each row answered
        unusual, influential = incomplete_case_diagnostics(gap_rows, mats.implied_mean(), sigma, (gm.mean, gm.covariance),
                                                           m.row_numbers, frequencies=_row_weights(gm))
        out.update(unusual_cases=unusual, influential_cases=influential)
    return out


def _summary(m: SampleMoments, observed: tuple[str, ...], gm: GroupMoments) -> DataSummary:
    rows = gm.rows if gm.rows is not None else m.rows  # with gaps: the rows of the sample moments, in their order
    if rows is not None and rows is m.rows and tuple(m.names) != tuple(observed):
        rows = rows[:, [m.names.index(x) for x in observed]]
    shape = item_shape(rows) if rows is not None else None
    known = m.extremes.for_values(rows) if m.extremes is not None and rows is not None else None  # made by the reading
    ranges = () if rows is None or not len(rows) else tuple(zip(*(e.tolist() for e in known or answer_extremes(rows))))
    return DataSummary(m.source, m.rows_read, m.rows_dropped, m.n_obs, observed,
                       tuple(gm.mean.tolist()), tuple(np.sqrt(np.diag(gm.covariance)).tolist()),
                       *((shape.answered, shape.skewness, shape.kurtosis) if shape is not None else ()), ranges=ranges,
                       answered_of=None if rows is None else len(rows))


@dataclass(frozen=True)
class ReplicateFit:
    """What a replication (bootstrap, Monte Carlo) keeps of one fit."""

    converged: bool
    theta: np.ndarray
    values: np.ndarray  # every table entry
    standardized: np.ndarray  # every table entry, fully standardized
    se: np.ndarray | None
    chi_square: float
    cfi: float
    rmsea: float
    srmr: float


def replicate_fit(spec: Spec, moments: SampleMoments, start: np.ndarray | None = None, standard_errors: bool = False,
                  fit_indices_wanted: bool = True, max_iterations: int = 200) -> ReplicateFit:
    """A light fit for replications: estimates, standardized values, optionally SEs and the main indices."""
    options = FitOptions(max_iterations=max_iterations, diagnostics=False)
    with blas_threads_for(len(moments.names)):
        return _replicate_fit(spec, moments, options, start, standard_errors, fit_indices_wanted)


def replicate_fits(spec: Spec, samples: list[SampleMoments], start: np.ndarray | None, standard_errors: bool = False,
                   fit_indices_wanted: bool = True, max_iterations: int = 200,
                   full_information: bool = False) -> list[ReplicateFit]:
    """:func:`replicate_fit` of each sample from ``start``, the searches of a model that
    :mod:`cfa_tool.estimation.stacked` covers run together in stacked arrays.  A replication the stacked
    search does not bring to convergence is refitted alone by :func:`replicate_fit` (restarts, fallbacks
    and all), so that it converges, or is counted as not converged, exactly as a single fit would.
    ``full_information``: samples of rows with gaps (:func:`moments_from_rows` with ``full_information``),
    each fitted by full-information ML as ``fit`` fits them (one at a time: the stacked search has no
    casewise likelihood)."""
    options = FitOptions(max_iterations=max_iterations, diagnostics=False,
                         missing=MissingData.FULL_INFORMATION if full_information else None)
    table, model = model_structure(spec, None, full_information)
    from cfa_tool.estimation.stacked import fit_stacked, stackable

    with blas_threads_for(len(spec.observed_names)):
        if (not samples or start is None or len(start) != table.n_free or not stackable(model)
                or full_information):
            return [_replicate_fit(spec, m, options, start, standard_errors, fit_indices_wanted) for m in samples]
        groups = [ordered_moments(m, table.observed) for m in samples]
        found = fit_stacked(model, np.array([gm.covariance for gm in groups]), start, max_iterations)
        ok = np.flatnonzero(found.converged)
        done = dict(zip(ok.tolist(), _replicate_results(table, model, [groups[r] for r in ok], found.theta[ok],
                                                        found.value[ok], found.information[ok], standard_errors,
                                                        fit_indices_wanted)))
        return [done[r] if r in done else _replicate_fit(spec, m, options, start, standard_errors, fit_indices_wanted)
                for r, m in enumerate(samples)]


def _replicate_fit(spec, moments, options, start, standard_errors, fit_indices_wanted) -> ReplicateFit:
    nan = float("nan")
    full_information = options.missing is MissingData.FULL_INFORMATION
    try:
        est = estimate(spec, [(None, moments)], options, start=start)
    except (SingularMoments, ImpossibleAtStart):  # a resample with too few distinct rows, or whose variances at a
        # start from its data leave a fixed covariance impossible: counted as not converged
        table, model = model_structure(spec, None, full_information)
        theta = np.full(table.n_free, nan) if start is None else np.asarray(start, dtype=float)
        values = model.entry_values(theta)
        return ReplicateFit(False, theta, values, np.full_like(values, np.nan), None, nan, nan, nan, nan)
    if not est.converged:
        values = est.model.entry_values(est.theta)
        return ReplicateFit(False, est.theta, values, np.full_like(values, np.nan), None, nan, nan, nan, nan)
    if full_information:  # standard errors from the observed information, as fit's (Kenward & Molenberghs 1998)
        information = est.likelihood.observed_hessian(est.theta) if standard_errors else None
        if standard_errors and information is None:
            information = observed_information(est.likelihood.gradient, est.theta, central=False)
        information = information[None] if standard_errors else None
        from cfa_tool.estimation.fiml import fiml_baseline

        baseline = fiml_baseline(est.likelihood) if fit_indices_wanted else None  # only the indices use it
    else:
        information = est.likelihood.evaluate(est.theta).information[None] if standard_errors else None
        baseline = None
    return _replicate_results(est.table, est.model, est.likelihood.groups, est.theta[None], np.array([est.value]),
                              information, standard_errors, fit_indices_wanted, baseline)[0]


def _replicate_results(table: ParameterTable, model: StructuredModel, groups: list[GroupMoments], theta: np.ndarray,
                       value: np.ndarray, information: np.ndarray | None, standard_errors: bool,
                       fit_indices_wanted: bool, full_information: tuple[float, int] | None = None
                       ) -> list[ReplicateFit]:
    """What each replication keeps of converged single-group fits to ``groups`` with discrepancies ``value``
    at ``theta`` (R, q) (``information`` (R, q, q) the information there, wanted for standard
    errors): the chi-square always, the other indices when wanted.  ``full_information``: the one fit is a
    full-information one whose indices are wanted, with this (baseline chi-square, its df); its ``groups`` hold the
    saturated (EM) moments, and its indices are computed as ``fit`` computes them."""
    nan = float("nan")
    values = model.offset + theta @ model.J.T
    mats = model.matrices(theta)
    codes, rows, cols = table.entry_arrays()
    std, _ = standardize_entries(mats, codes, rows, cols, values)
    sigmas = mats.implied_covariance()
    p = model.p
    out = []
    for r, gm in enumerate(groups):
        se = None
        if standard_errors:
            try:
                cov = parameter_covariance(information[r], gm.n_obs)
                se = wald_inference(values[r], model.J, cov).se
            except np.linalg.LinAlgError:
                se = np.full(values.shape[1], nan)
        chi, cfi, rmsea, srmr_ = gm.n_obs * float(value[r]), nan, nan, nan
        if fit_indices_wanted:  # the indices a replication keeps, as fit_indices computes them (not its RMSEA
            # interval, close-fit test or information criteria, which root-finding and a log-likelihood would cost)
            S, sigma = gm.covariance, sigmas[r]
            base_chi, base_df = baseline_chi_square(S, gm.n_obs) if full_information is None else full_information
            df = p * (p + 1) // 2 + (p if table.mean_structure else 0) - table.n_free
            chi = max(chi, 0.0)  # rounding can leave a just-identified model a hair below zero (fit_indices)
            cfi, rmsea, srmr_ = (cfi_value(chi, df, base_chi, base_df), rmsea_value(chi, df, gm.n_obs),
                                 float(srmr_value(S, sigma)))
        out.append(ReplicateFit(True, theta[r], values[r], std[r], se, chi, cfi, rmsea, srmr_))
    return out


def moments_from_rows(rows: np.ndarray, names: tuple[str, ...], source: str = "<replication>",
                      weights: np.ndarray | None = None, n_obs: int | None = None,
                      full_information: bool = False, weight_kind: WeightKind = WeightKind.SAMPLING) -> SampleMoments:
    """Moments of complete ``rows``; with ``weights`` the weighted means and covariance (divisor the sum of
    the weights) and ``n_obs`` the N of the test statistic (default the number of rows).  With
    ``full_information`` the rows may have gaps (each answering some item): their saturated moments by EM,
    the rows kept for the casewise likelihood, which ``weights`` (of ``weight_kind``) weight, carried as the
    rows' design (Asparouhov 2005); a DataError where the moments cannot be estimated."""
    if full_information:
        moments = moments_with_gaps(rows, names, source, weights)
        if weights is None:
            return moments
        from cfa_tool.data.sample_design import RowDesign

        return replace(moments, n_obs=moments.n_obs if n_obs is None else n_obs, design=RowDesign(weights, weight_kind))
    n = len(rows) if n_obs is None else n_obs
    if weights is None:
        mean = rows.mean(axis=0)
        dev = rows - mean
        return SampleMoments(tuple(names), dev.T @ dev / len(rows), mean, n, len(rows), 0, source, None, rows)
    mean = weights @ rows / weights.sum()
    dev = rows - mean
    cov = (dev * weights[:, None]).T @ dev / weights.sum()
    return SampleMoments(tuple(names), cov, mean, n, len(rows), 0, source, None, rows)
