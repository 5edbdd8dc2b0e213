"""Measurement invariance across groups: the configural-metric-scalar-strict
ladder (Meredith 1993; Vandenberg & Lance 2000), each step tested against the
one before, with an optional search for partial invariance (Byrne,
Shavelson & Muthén 1989) guided by score tests of the step's equality
constraints: with a robust or design-based test (and for ordinal items) the
generalized score tests of Satorra (1989), which do not assume normal data.

Change in CFI is read against the -.01 guide of Cheung & Rensvold (2002) and
change in RMSEA against the .015 guide of Chen (2007); both are common
practice, not tests.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.data.answer_words import coding_json
from cfa_tool.data.groups import reference_rule
from cfa_tool.data.renamed_columns import ColumnRenames
from cfa_tool.note_parts import capitalised
from cfa_tool.numbers import word_list
from cfa_tool.options import own_keywords
from cfa_tool.data.matching import chosen_columns
from cfa_tool.pipeline.inputs import (_described, rows_named, analysed_odd_values, check_ordinal_options, choose_missing_handling, design_test, few_categories, keeps_rows_with_gaps,
                                      refuse_large_robust_route,
                                      make_options, moments_for, data_problems, ordinal_estimator_option,
                                      ordinal_groups, ordinal_items_of, read_inputs_with_notes, with_design,
                                      with_design_weights, with_missing_reading, with_rows_read,
                                      refuse_groups_filtered_out)
from cfa_tool.assessment.admissibility import WHY_NOT_ESTIMATED, ProblemKind, group_size_problems, non_normal_problems
from cfa_tool.assessment.fit_indices import FIT_GUIDES
from cfa_tool.model.description import parameter_words
from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.assessment.modification import ModificationIndex, equality_score_tests
from cfa_tool.assessment.robust_scores import robust_score_tests
from cfa_tool import options as check
from cfa_tool.errors import EstimationError, ModelError, OptionError
from cfa_tool.pipeline.continuous import assess, estimate, pairwise_instead, rows_left_out
from cfa_tool.language.names import reference_text, written_group, written_name
from cfa_tool.language.spec import ParameterRef, Spec
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.data.sample_design import check_design, design_columns, design_summary
from cfa_tool.numerics.threads import blas_threads_for
from cfa_tool.workflows.nesting import (DifferenceTest, heavy_tailed_groups, heavy_tails_caution, scaled_difference,
                                       tails_said_once,
                                       tails_not_judged_note)
from cfa_tool.views import Presentable
from cfa_tool.method import ORDINAL_FIT_CHANGE, Choice, DecisionRule, MissingData  # (declared with the other choices; imported from here too)

LEVELS: tuple[tuple[str, tuple[str, ...], tuple[str, ...]], ...] = (
    # level, classes held equal, parameter kinds the step adds
    ("configural", (), ()),
    ("metric", ("loadings",), ("loading",)),
    ("scalar", ("loadings", "intercepts"), ("intercept",)),
    ("strict", ("loadings", "intercepts", "residuals"), ("residual_variance", "residual_covariance")),
)
#: The ladder for ordinal items (Wu & Estabrook 2016): thresholds first, which for items with
#: three categories or fewer fits exactly as well as the configural model.
ORDINAL_LEVELS: tuple[tuple[str, tuple[str, ...], tuple[str, ...]], ...] = (
    ("configural", (), ()),
    ("thresholds", ("thresholds",), ("threshold",)),
    ("metric", ("thresholds", "loadings"), ("loading",)),
    ("scalar", ("thresholds", "loadings", "intercepts"), ("intercept",)),
    ("strict", ("thresholds", "loadings", "intercepts", "residuals"), ("residual_variance", "residual_covariance")),
)
CFI_GUIDE = -0.01  # Cheung & Rensvold (2002)
RMSEA_GUIDE = 0.015  # Chen (2007)
#: Chen (2007): an increase in SRMR of .030 or more at the loadings step, .010 or more at the steps after it
SRMR_GUIDE = {"metric": 0.030}
SRMR_GUIDE_LATER = 0.010


#: why the partial-invariance search stopped at a step
STOP_HOLDS = "the step met its test"
STOP_OFF = "no search was asked for"
STOP_NOTHING_LEFT = ("no equality left that may be freed (one loading and one intercept per factor stay equal, so "
                     "that factor scales and means remain comparable)")
STOP_CAP = "the search reached its limit of {cap} freed parameters at this step"
#: hostile trial s11: the search freed loadings whose score tests were 0.76 and 0.56, and freed every equality of a
#: step until it had nothing left to test (0 df) and called it held.  A parameter is freed only while its score test
#: is significant at the steps' level, as specification searches for partial invariance do (Yoon & Millsap 2007)
STOP_NOT_SIGNIFICANT = ("no equality's score test is significant at the level the steps are tested at, so these data "
                        "point to none to free")
STOP_LAST_EQUALITY = "freeing another equality would leave the step nothing to test"
#: review s13: the candidates the model cannot free (_buildable_first) had made the search say that nothing was left
#: to free or that no score test was significant
STOP_PINNED = ("the equalities whose score tests remain cannot be freed in this model (an ordinal item's residual "
               "variance stays fixed while its intercept differs and it has one threshold; Wu & Estabrook 2016), and "
               "no other equality has a significant score test")
#: a step whose model adds no equality to the one before (every parameter of its class declared or freed): untested
STOP_UNTESTED = "the step adds no equality to test (0 degrees of freedom), so it cannot show that invariance holds"
#: The configural model is judged on its own fit by these indices, against the report's guide values
#: (assessment.fit_indices.FIT_GUIDES: CFI at least .95, RMSEA at most .06, SRMR at most .08)
CONFIGURAL_INDICES = ("cfi", "rmsea", "srmr")
PARTIAL_CHOICES = ("none", "auto")
MAX_FREED_PER_STEP = 10
SEARCH_WARNING = (
    "the partial-invariance search chose parameters from these data; such a data-driven search capitalises on chance "
    "(MacCallum, Roznowski & Necowitz 1992), so the freed parameters need confirmation in an independent sample"
)
#: freeing more than half of a step's equalities leaves a step that is hardly invariant (common practice asks that
#: most indicators stay invariant; Vandenberg & Lance 2000)
MANY_FREED_SHARE = 0.5


#: the score test of an equality constraint (a modification index), as every report cites it
SORBOM_1989 = "Sörbom 1989"


class ScoreTests(Choice):
    """Which score tests of a step's equalities the partial search reads (and compares with chi-square(1) to decide
    whether to go on), chosen by the tool with the test: ``value`` the JSON's word, ``phrase`` the reports'."""

    #: continuous items fitted with the normal-theory test: the score tests of the likelihood (Sörbom 1989)
    NORMAL = ("normal theory", "normal-theory", f"normal-theory score tests ({SORBOM_1989})", False)
    #: continuous items with a robust or design-based test: the score statistic over the robust (sandwich) variance
    #: of the score (Satorra 1989), chi-square(1) without normality
    ROBUST = ("robust", "robust", "robust score tests (the generalized score test of Satorra 1989), which do not "
                                  "assume normal data", False)
    #: ordinal items: the score statistic of the least-squares fit over its robust variance (Satorra 1989)
    LEAST_SQUARES = ("robust least squares", "robust",
                     "robust score tests of the least-squares fit on thresholds and polychoric correlations (the "
                     "generalized score test of Satorra 1989)", False)


#: score tests within this share of each other (relative) are equal: two freeings that give the same model (an
#: intercept of either of a factor's two items while its mean is free) have equal tests but for rounding, which
#: must not choose between them (a rule of this program: rounding errors of the tests are near 1e-12 of them)
EQUAL_SCORE_TESTS = 1e-6


@dataclass(frozen=True)
class FreedParameter:
    """A parameter freed by the partial-invariance search."""
    level: str
    kind: str
    variables: tuple[str, ...]
    group: str | None
    score: float
    #: (kind, variables) of the parameters whose score tests equalled this one's (EQUAL_SCORE_TESTS): freeing one of
    #: them instead would fit as well; this one was freed as the first of them in the model's order
    equal_tests: tuple[tuple[str, tuple[str, ...]], ...] = ()
    #: (group, estimate, standard error, free) of the freed parameter in each group in the fit of its step's partial
    #: model: how large the difference is, and which way (new-user trial s20: only the score test was given)
    estimates: tuple[tuple[str, float, float, bool], ...] = ()
    #: set apart in ``group`` alone (the other groups still equal among themselves): a parameter the model file sets
    #: apart in one group already, whose remaining equality the search frees where its score test points (hostile
    #: s21: freeing it in every group clashes with the file's statement, and the search had skipped it)
    alone: bool = False

    def words(self, article: bool = True, quoted: bool = False, groups: tuple[str, ...] = ()) -> str:
        """The freed parameter in words (model.description.parameter_words), its group named when it was set apart
        there alone ('the intercept of clean in group south alone'); one freed in every group names none (the group
        its score test pointed to is not where it was freed)."""
        if not self.alone:
            return parameter_words(self.kind, self.variables, article=article, quoted=quoted)
        return parameter_words(self.kind, self.variables, self.group, article=article, quoted=quoted,
                               groups=groups) + " alone"

    def statement(self) -> str:
        """The model file's line that frees this parameter as the search did: 'noninvariant intercept(x3)', a
        threshold for its item as a whole ('noninvariant threshold(x3)'), 'in group south: noninvariant ...' for one
        set apart in its group alone (new-user trial s22: the search's result could not be carried into fit or
        scores without guessing how to write it)."""
        ref = reference_text(ref_kind(self.kind), _ref_names(self))  # as the search freed it (search_exemption)
        return f"in group {written_name(str(self.group))}: noninvariant {ref}" if self.alone else f"noninvariant {ref}"

    def to_dict(self) -> dict:
        return clean({"level": self.level, "kind": self.kind, "variables": list(self.variables), "group": self.group,
                      "in_this_group_alone": self.alone or None, "model_statement": self.statement(),
                      "score_test": self.score,
                      "equal_score_tests": [{"kind": k, "variables": list(v)} for k, v in self.equal_tests],
                      "estimates": [{"group": g, "estimate": e, "se": se if free else None,
                                     "free": free} for g, e, se, free in self.estimates]})


def freed_estimates(result: FitResult, freed: FreedParameter) -> tuple[tuple[str, float, float, bool], ...]:
    """(group, estimate, standard error, free) of a freed parameter in each group of ``result``, the fit of the
    partial model that frees it (its estimate rows of the same kind and variables)."""
    return tuple((str(r.group), float(r.estimate), float(r.se), bool(r.free)) for r in result.estimates
                 if r.kind == freed.kind and tuple(r.variables) == tuple(freed.variables))


@dataclass(frozen=True, eq=False)
class InvarianceStep:
    """One step of the invariance ladder and its test against the step before."""
    level: str
    result: FitResult
    versus_previous: DifferenceTest | None
    holds: bool
    culprits: tuple[ModificationIndex, ...]  # score tests of this step's constraints, largest first
    # tested after a step that did not hold: the comparison is between models already rejected
    conditional: bool = False
    # the step with every equality of its class (before the partial search freed any): always reported
    full_result: FitResult | None = None
    full_test: DifferenceTest | None = None
    full_holds: bool | None = None
    freed: tuple = ()  # FreedParameter freed at this step (a partially invariant step)
    stopped: str = ""  # why the partial search stopped here
    delta_srmr: float | None = None
    # 'noninvariant' statements of the model file that exempt a parameter held equal at this step: the step
    # is partial invariance by the researcher's declaration
    declared: tuple[ParameterRef, ...] = ()
    #: why the step could not be judged by its rule ('' when it could): the robust figures the rule reads were not
    #: computed, a scaling factor not being positive (:func:`unjudged`); such a step does not hold
    unjudged: str = ""

    @property
    def untested(self) -> bool:
        """Whether the step adds no equality to the step before (its difference test has 0 degrees of freedom): it
        is then not tested and never held."""
        return self.versus_previous is not None and self.versus_previous.df_difference == 0

    @property
    def partial(self) -> bool:
        """Whether the partial-invariance search freed parameters at this step."""
        return bool(self.freed)

    @property
    def partly_equal(self) -> bool:
        """Whether some parameters of the step's classes are not held equal (searched or declared)."""
        return bool(self.freed or self.declared)

    def to_dict(self) -> dict:
        vs = _test_dict(self.versus_previous, self.delta_srmr)
        full = None
        if self.partial and self.full_result is not None:
            full = {"admissible": self.full_result.admissible,
                    "problems": [p.to_dict() for p in self.full_result.problems],
                    "fit": clean(self.full_result.fit.to_dict()) if self.full_result.fit is not None else None,
                    "robust": clean(self.full_result.robust.to_dict()) if self.full_result.robust is not None else None,
                    "versus_previous": _test_dict(self.full_test, None), "holds": self.full_holds}
        return {
            "level": self.level,
            "converged": self.result.converged,
            "admissible": self.result.admissible,
            "problems": [p.to_dict() for p in self.result.problems],
            "fit": clean(self.result.fit.to_dict()) if self.result.fit is not None else None,
            "robust": clean(self.result.robust.to_dict()) if self.result.robust is not None else None,
            "versus_previous": vs,
            # a step whose estimation did not converge is not judged (null), not one that does not hold (re-check s18)
            "holds": self.holds if self.result.converged else None,
            "tested": not self.untested,
            "judged_by": "its own fit (CFI, RMSEA and SRMR guide values)" if self.versus_previous is None
            else "the difference test against the step before",
            "not_judged_because": self.unjudged or (None if self.result.converged else "its estimation did not converge"),
            "conditional_on_a_rejected_step": self.conditional,
            "partial": self.partly_equal,
            "freed": [f.to_dict() for f in self.freed],
            "declared_not_equal": [{"kind": r.kind, "variables": list(r.names), "group": r.group} for r in self.declared],
            "with_every_equality": full,
            "search_stopped": self.stopped or None,
            "constraint_tests": [clean(c.to_dict()) for c in self.culprits[:10]],
        }


def _test_dict(t: DifferenceTest | None, delta_srmr: float | None) -> dict | None:
    if t is None:
        return None
    return clean({"chi_square_difference": t.chi_square_difference, "df_difference": t.df_difference,
                  "p_value": t.p_value, "method": t.method, "delta_cfi": t.delta_cfi, "delta_rmsea": t.delta_rmsea,
                  "delta_srmr": delta_srmr})


@dataclass(frozen=True)
class LatentDifference:
    """One factor's mean and variance in one group against the reference group, from the scalar model."""

    factor: str
    group: str
    mean: float  # the reference group's mean is 0
    se: float
    ci95: tuple[float, float]
    p_value: float
    standardized: float  # mean over the pooled latent standard deviation of the two groups (Cohen's d metric)
    variance: float
    variance_se: float
    reference_variance: float
    # the factor is explained by a higher-order factor: mean and variance are the totals the model implies, not
    # those of its disturbance
    total: bool = False

    @property
    def variance_ratio(self) -> float:
        return self.variance / self.reference_variance if self.reference_variance > 0 else float("nan")

    def to_dict(self) -> dict:
        return clean({"factor": self.factor, "group": self.group, "mean_difference": self.mean, "se": self.se,
                      "ci95": list(self.ci95), "p_value": self.p_value, "standardized_mean_difference": self.standardized,
                      "variance": self.variance, "variance_se": self.variance_se,
                      "reference_variance": self.reference_variance, "variance_ratio": self.variance_ratio,
                      "model_implied_totals": self.total})


@dataclass(frozen=True, eq=False)
class InvarianceResult(Presentable):
    """The invariance ladder across groups."""
    group_column: str
    groups: tuple[str, ...]
    steps: tuple[InvarianceStep, ...]
    freed: tuple[FreedParameter, ...]
    alpha: float
    warnings: tuple[str, ...]
    rule: DecisionRule = DecisionRule.DIFFERENCE_TEST
    latent_differences: tuple[LatentDifference, ...] = ()
    latent_note: str = ""  # which model the latent differences come from, or why there are none
    means_not_estimated: tuple[str, ...] = ()  # higher-order factors whose means stay fixed at 0 in every group
    #: what reading the data did (rows left out, labels read, missing-data handling): notes, not cautions
    notes: tuple[str, ...] = ()
    #: the cautions on the data (pipeline.inputs.data_problems), whose lines open ``warnings``
    data_problems: tuple = ()
    #: why the first group is the reference group (data.groups.ReferenceRule: chosen, or the default rule)
    reference_rule: object = None
    #: rows with gaps were fitted by full-information ML (what the normal-theory score tests then assume)
    gaps_by_full_information: bool = False

    @property
    def score_tests(self) -> ScoreTests:
        """The score tests of the steps' equalities (the search's guide): robust with a robust or design-based test
        and for ordinal items, normal-theory otherwise."""
        first = self.steps[0].result
        if first.method.ordinal:
            return ScoreTests.LEAST_SQUARES
        if first.robust is None:
            return ScoreTests.NORMAL
        return ScoreTests.ROBUST  # with full-information ML on the observed information, as the robust SEs

    @property
    def score_tests_assume_mcar(self) -> bool:
        """Whether the score tests rest on the patterns' expected information: normal-theory ones with
        full-information ML and rows with gaps (the expected information with the patterns held fixed is the limit
        of the observed one only when answers are missing completely at random; Kenward & Molenberghs 1998, recalled
        from memory as in inference.robust_missing).  The
        robust ones take the observed information (:func:`robust_score_tests`)."""
        return self.score_tests is ScoreTests.NORMAL and self.gaps_by_full_information

    def partial_statements(self) -> tuple[str, ...]:
        """The model file's lines of the last step that holds with parameters the search freed (at it or at a step
        before it): its 'invariance LEVEL' and one 'noninvariant' line per freed parameter, each once (an ordinal
        item's thresholds are freed together), beside the file's own lines; () when no such step holds.  Pasted into
        the model file they give 'fit' and 'scores' that step's partially invariant model."""
        held = [k for k, s in enumerate(self.steps) if s.holds and any(t.freed for t in self.steps[:k + 1])]
        if not held:
            return ()
        lines = [f"invariance {self.steps[held[-1]].level}"]
        for step in self.steps[:held[-1] + 1]:
            lines += [f.statement() for f in step.freed if f.statement() not in lines]
        return tuple(lines)

    def to_dict(self) -> dict:
        data = self._data_dict()
        return {
            "warnings": [str(w) for w in self.warnings],
            "data_problems": [p.to_dict() for p in self.data_problems],
            "notes": [str(x) for x in self.notes],
            "group_column": self.group_column,
            "reference_group": self.groups[0],
            "reference_group_chosen_by": self.reference_rule.value if self.reference_rule is not None else None,
            "groups": list(self.groups),
            "alpha": self.alpha,
            "decision_rule": {"name": self.rule.value, "description": self.rule.description},
            # which score tests the steps' constraint tests (and the partial search's stop rule) are
            "score_tests": {"name": self.score_tests.value, "description": self.score_tests.phrase,
                            "assume_missing_completely_at_random": self.score_tests_assume_mcar},
            # ordinal fits: the steps' delta_cfi and delta_rmsea are null, and why (as compare says it)
            "fit_index_changes_left_out": ORDINAL_FIT_CHANGE if self.steps[0].result.method.ordinal else None,
            "steps": [s.to_dict() for s in self.steps],
            "design": self.steps[0].result.design.to_dict() if self.steps[0].result.design is not None else None,
            "freed": [f.to_dict() for f in self.freed],
            "partial_model_statements": list(self.partial_statements()),
            "latent_differences": [d.to_dict() for d in self.latent_differences],
            "latent_differences_note": self.latent_note,
            "means_not_estimated": list(self.means_not_estimated),
            **({"data": data} if data else {}),
        }

    def _data_dict(self) -> dict:
        """How the model coded answers recorded as words, as fit's JSON has it, and with pairwise present rows
        (ordinal items with gaps) the rows per pair of items over the groups and in each group, where its
        polychoric correlations were computed."""
        first = self.steps[0].result
        data = {"answer_coding": coding_json(first.data.answer_coding)} if first.data.answer_coding else {}
        pairs = first.data.pair_range
        if pairs is not None and pairs[0] < first.n_obs and all(g.data.pair_range is not None for g in first.groups):
            data["rows_per_pair"] = {"all_groups": {"fewest": pairs[0], "most": pairs[1]},
                                     "groups": [{"group": g.label, "fewest": g.data.pair_range[0],
                                                 "most": g.data.pair_range[1]} for g in first.groups]}
        return data


def invariance(model: str | Path | Spec, data: pd.DataFrame | str | Path, group: str,
               reference_group: str | None = None, partial: str = "none", alpha: float | None = None,
               sheet: str | None = None, names_row: int | None = None, first_data_row: int | None = None, missing_codes: tuple[float, ...] = (), keep: tuple[str, ...] | list[str] = (),
               rename: ColumnRenames = None,
               ordinal: str | list[str] | None = None, ordinal_estimator: str | None = None,
               decide_by: str | DecisionRule = DecisionRule.DIFFERENCE_TEST, weights: str | None = None,
               cluster: str | None = None, strata: str | None = None, weight_kind: str | None = None,
               progress: Callable[..., None] | None = None, id_column: str | None = None,
               **options: object) -> InvarianceResult:
    """Fit the invariance ladder; with ``partial='auto'`` free the likeliest culprits until each step holds.
    ``decide_by`` names how each step is judged (:class:`DecisionRule`).  A sampling design (``weights``,
    ``cluster``, ``strata``, ``weight_kind``, as for ``fit``) weights every step, whose difference tests are
    then the scaled ones of the design-based statistics; so are they with ``test='robust'`` (``--robust``, as for
    ``fit``): every step is fitted with the robust test that suits its rows and tested against the one before by
    the scaled difference (Satorra & Bentler 2001; their strictly positive version of 2010 when the 2001 correction
    is not positive).  ``progress(done, more)``, when given, hears of each
    fit: the ladder's levels are announced at the start and every refit of the partial search when it is decided.

    With ordinal items (an 'ordinal' statement or ``ordinal``) the ladder is configural, thresholds,
    metric, scalar, strict, fitted by least squares on thresholds and polychoric correlations; continuous items
    beside them add their means and variances, and their intercepts and residual variances are held equal at the
    scalar and strict steps as for continuous items alone (Millsap & Yun-Tein 2004).  ``id_column``: the column that
    names each row (never analysed), beside the row numbers of the cautions about rows, as for ``fit``."""
    if not isinstance(group, str):
        raise OptionError(f"the invariance ladder needs a group column, given by its name (text), not "
                          f"{type(group).__name__}")
    if partial not in PARTIAL_CHOICES:
        raise OptionError(f"partial must be one of {', '.join(PARTIAL_CHOICES)}, not '{partial}'")
    rule = check.choice(DecisionRule, decide_by, "the decision rule")
    if alpha is not None and rule is DecisionRule.FIT_CHANGE and partial == "none":
        # the partial search's score tests use it under every rule (hostile tester s15: refused while the search used it)
        raise OptionError(f"alpha is the level of the difference tests and of the partial search's score tests, which "
                          f"the fit-change rule without a partial search does not use; give alpha with "
                          f"{check.Option.DECIDE_BY.given('difference-test')}, "
                          f"{check.Option.DECIDE_BY.given('both')} or a partial search ({check.Option.PARTIAL.given('auto')})")
    alpha = check.probability("alpha (the level of the difference tests and of the partial search's score tests)",
                              0.05 if alpha is None else alpha)
    fit_options = replace(make_options(options, INVARIANCE_KEYWORDS), diagnostics=False)
    design = design_columns(weights, cluster, strata, weight_kind)
    spec, loaded, read_notes = read_inputs_with_notes(model, data, sheet, missing_codes, keep,
                                                 (id_column,) if isinstance(id_column, str) else (),
                                                 names_row=names_row, first_data_row=first_data_row,
                                                 rename=rename, chosen=chosen_columns(group, id_column, design=design),
                                                 keeps_gaps=keeps_rows_with_gaps(fit_options.missing))
    refuse_groups_filtered_out(spec, loaded, group, reference_group)
    frame, source = loaded.frame, loaded.source
    # values that look like no answers, among the rows with a group label: first among the cautions
    # the weights parsed once, as fit parses them, for the check of the design and the groups weighted out
    analysed = with_design_weights(analysed_odd_values(loaded, spec, group), design, spec, group)
    ids, named_by = rows_named(loaded, id_column, spec.observed_names, group)
    found = data_problems(analysed, spec, group, design, ids,  # as fit gives them
                          listwise=fit_options.missing is MissingData.LISTWISE, id_column=named_by)
    data_cautions = tuple(p.line() for p in found)
    if spec.invariant:
        where = spec.equalities_location
        raise ModelError("the invariance ladder sets the equalities of each level itself; remove 'invariance' and "
                         "'equal across groups' statements from the model file", where, spec.source_line(where))
    ordinal_items = ordinal_items_of(spec, ordinal)
    ordinal_estimator = ordinal_estimator_option(ordinal_estimator, ordinal_items)
    if design is not None:
        frame, design_notes = check_design(frame, design, spec.observed_names, group, source, analysed.weights)
        read_notes = list(read_notes) + design_notes
        if not ordinal_items:  # ordinal items always get sandwich errors and adjusted tests
            fit_options = design_test(fit_options, design)
    gaps = False  # rows with gaps fitted by full-information ML
    if ordinal_items:
        from cfa_tool.pipeline.ordinal import refuse_fixed_residual_variances_in_ladder

        refuse_fixed_residual_variances_in_ladder(spec, ordinal_items)
        pairwise = check_ordinal_options(fit_options)
        if rule is not DecisionRule.DIFFERENCE_TEST:
            raise OptionError("with ordinal items the fit indices of each step come from its own adjusted statistic and "
                              "cannot be compared across steps; judge the steps by the difference tests "
                              f"({check.Option.DECIDE_BY.given('difference-test')})")
        groups, notes = ordinal_groups(spec, frame, source, group, reference_group, ordinal_items, pairwise, design)
        notes = list(read_notes) + list(notes)
        few: tuple[str, ...] = ()  # items of few answer categories analysed as continuous: none here
        ladder = OrdinalLadder(ordinal_estimator,
                               design_summary(frame, design, [m for _, m in groups], [g for g, _ in groups]) if design is not None else None)
        from cfa_tool.pipeline.ordinal import threshold_counts

        # the items' numbers of thresholds decide which of their residual variances are free (model.parameters)
        ordinal_items = threshold_counts(groups[0][1])
    else:
        # rows with gaps are kept (full-information ML), as 'fit' keeps them, unless listwise is asked for
        fit_options, missing_notes = choose_missing_handling(fit_options, frame, spec.observed_names, group,
                                                             design=design)
        gaps = (fit_options.missing is MissingData.FULL_INFORMATION
                and bool(frame[list(spec.observed_names)].isna().to_numpy().any()))
        refuse_large_robust_route(spec, fit_options, design)  # before the moments and the ladder's fits
        groups, notes = moments_for(spec, frame, source, group, reference_group, fit_options.missing, design=design)
        few, few_note = few_categories(frame, spec.observed_names)
        notes = list(missing_notes) + few_note + list(read_notes) + list(notes)
        ladder = NormalLadder(design_summary(frame, design, [m for _, m in groups], [g for g, _ in groups]) if design is not None else None)
    labels = tuple(label for label, _ in groups)
    # the model of every step, laid out before the first is fitted: a statement a later step refuses (a parameter set
    # apart in one group that leaves a factor's mean without an origin, ...) is an error before any fit
    from cfa_tool.model.parameters import build_parameter_table

    for _, classes, _ in ladder.levels:
        build_parameter_table(spec_of_level(spec, classes, spec.noninvariant), labels,
                              ordinal=ordinal_items if isinstance(ordinal_items, dict) else None)
    reference = reference_rule(frame, group, reference_group)  # the rule moments_for followed (data.groups)
    threads = blas_threads_for(len(spec.observed_names))  # the fits' matrices are small: one BLAS thread (numerics.threads)

    steps: list[InvarianceStep] = []
    freed: list[FreedParameter] = []
    exceptions: list[ParameterRef] = list(spec.noninvariant)
    previous = None  # (estimation, result) of the step below
    start = None
    if progress is not None:
        progress(0, len(ladder.levels))
    for level, classes, kinds in ladder.levels:
        full = None  # (result, test, holds) with every equality of the step
        stopped = ""
        freed_here: list[FreedParameter] = []
        while True:
            if progress is not None and freed_here:  # a refit of the partial search
                progress(0, 1)
            # exemptions apply from the level that holds their class equal
            level_spec = spec_of_level(spec, classes, exceptions)
            # the configural model with its reliability, so that the keying its loadings contradict is a problem of its
            # solution, first in the ladder as in fit (assessment.reliability.keying_problems); the later steps, their
            # loadings held equal (and refitted often by the partial search), without
            assessed = fit_options if steps else replace(fit_options, reliability=True)
            with threads:
                est = ladder.estimate(level_spec, groups, fit_options, start)
                # rows without a group label count as read, as fit counts them (the methods paragraph)
                result = with_rows_read(with_missing_reading(ladder.assess(level_spec, groups, est, assessed, group),
                                                             analysed, missing_codes), loaded)
            if not result.converged:
                why = next((p for p in result.problems if p.kind is not ProblemKind.SMALL_GROUP), None)
                # the search's message holds its own advice ('What to try: ...'): the problem's advice, which says
                # the same, is not added (re-check s18: the advice twice, and '(now 500).; the ladder stops there')
                reason = " (" + result.message + ")"
                if not steps:  # nothing to report without a configural model; a group too small for it first
                    small = tuple(f"Group {written_group(p.group, labels)}: {p.explanation}" for p in result.problems
                                  if p.kind is ProblemKind.SMALL_GROUP)
                    raise EstimationError(" ".join(map(str, data_cautions + small
                                                       + ("the configural model did not converge" + reason + ".",))))
                steps.append(InvarianceStep(level, result, None, False, ()))
                estimated_not = why is not None and why.kind in WHY_NOT_ESTIMATED
                if estimated_not:  # its words say why (a Heywood case, ...), then its advice
                    reason = ": " + why.explanation[0].lower() + why.explanation[1:].rstrip(".") + ". " + \
                        why.advice.rstrip(".")
                # what happened to the step and why, its advice once, then what it means for the ladder
                stopped = (f"the {level} model " + ("could not be estimated" if estimated_not else "did not converge")
                           + reason + ". The ladder stops there"
                           + (", and the partial search could not run at this step" if partial != "none" else "") + ".")
                left_out, left_notes = _rows_left_out(steps[0].result)
                # the impossible solutions of the steps before it, first as in a ladder that runs through (re-check s18)
                impossible = tuple(_impossible_line(s, labels) for s in steps
                                   if s.result.converged and not s.result.admissible)
                return InvarianceResult(group, labels, tuple(steps), tuple(freed), alpha,
                                        impossible + data_cautions + tuple(left_out) + (stopped,), rule,
                                        notes=tuple(notes) + tuple(left_notes), data_problems=found,
                                        reference_rule=reference, gaps_by_full_information=gaps)
            with threads:
                test = ladder.difference(est, result, previous, level, steps[-1].level) if previous is not None else None
            # an inadmissible solution (negative variances, ...) cannot show that invariance holds, whatever its fit;
            # the search goes on (a misfitting equality can itself push a variance below zero)
            untested = test is not None and test.df_difference == 0
            not_judged = unjudged(rule, (level, result), (steps[-1].level, previous[1]) if previous is not None else None)
            holds = result.admissible and not untested and not not_judged and (
                configural_fits(result) if test is None else _step_holds(rule, test, alpha, result, previous[1], level))
            if full is None:
                full = (result, test, holds)
            with threads:
                culprits = tuple(ladder.constraint_tests(est, kinds, result.robust is not None)) if kinds else ()
            culprits = _one_per_constraint(tuple(c for c in culprits if _may_free(c, exceptions, level_spec, kinds)),
                                           labels)
            pinned: tuple[ModificationIndex, ...] = ()  # the largest tests of freeings the model cannot take
            if partial != "none" and not holds:  # only a freeing the model can take is proposed
                buildable = _buildable_first(culprits, spec, classes, exceptions, labels, ordinal_items)
                pinned, culprits = culprits[:len(culprits) - len(buildable)], buildable
            significant_pinned = bool(pinned) and dist.chi2_sf(pinned[0].index, 1) < alpha
            if holds:
                stopped = STOP_HOLDS
            elif untested:
                stopped = STOP_UNTESTED
            elif partial == "none":
                stopped = STOP_OFF
            elif not culprits:
                stopped = STOP_PINNED if pinned else STOP_NOTHING_LEFT
            elif test is not None and test.df_difference <= 1:
                stopped = STOP_LAST_EQUALITY
            elif not dist.chi2_sf(culprits[0].index, 1) < alpha:  # the largest score test: not significant
                stopped = STOP_PINNED if significant_pinned else STOP_NOT_SIGNIFICANT
            elif len(freed_here) >= MAX_FREED_PER_STEP:
                stopped = STOP_CAP.format(cap=MAX_FREED_PER_STEP)
            if progress is not None:
                progress(1)
            if stopped:
                break
            top, equal = _first_of_equal(culprits, est.table)
            exemption = search_exemption(top, exceptions)
            exceptions.append(exemption)
            freed_here.append(FreedParameter(level, top.kind, _ref_names(top), top.group, top.index,
                                             tuple((c.kind, _ref_names(c)) for c in equal),
                                             alone=exemption.group is not None))
            start = None
        freed_here = [replace(f, estimates=freed_estimates(result, f)) for f in freed_here]  # in the partial model
        freed.extend(freed_here)
        if not steps:  # groups below the rule of rows per parameter of the configural model: the fit's note
            notes = list(notes) + list(group_size_problems(est.table, [m.n_obs for _, m in groups])[1])
        conditional = any(not s.holds for s in steps)
        srmr_change = (result.fit.srmr - previous[1].fit.srmr) if previous is not None else None
        # the description of exactly the model fitted at this step, for the methods paragraph
        result = _described(result, level_spec, labels, ordinal_items)
        if few:  # the methods text names them
            result = replace(result, data=replace(result.data, few_categories=few))
        steps.append(InvarianceStep(level, result, test, holds, culprits, conditional, full[0], full[1], full[2],
                                    tuple(freed_here), stopped if partial != "none" and kinds else "", srmr_change,
                                    tuple(r for r in spec.noninvariant if _exempts_a_class_of(r, classes)),
                                    not_judged))
        previous = (est, result)
        start = est.theta
    warnings = []
    if steps[0].unjudged and steps[0].result.admissible:
        warnings.insert(0, f"the configural model could not be judged by the guide values: {steps[0].unjudged}; the "
                           f"later steps are marked as conditional on it: judge its fit by the SRMR and the residual "
                           f"correlations (fit it on its own) before reading them")
    elif not steps[0].holds and steps[0].result.admissible:
        fit = _fit_values(steps[0].result)
        warnings.insert(0, "the configural model does not fit by the guide values (" + _judged(fit) + "): every "
            "later step compares models that already "
            "misfit, so its test says little about invariance; first find out why the model misfits (fit it in each "
            "group alone and read the modification indices and residuals), then test invariance")
    elif any(s.conditional for s in steps):
        first = next(s for s in steps if not s.holds)
        why = ("was not admissible" if not first.result.admissible else
               f"could not be judged ({first.unjudged})" if first.unjudged else "did not hold")
        warnings.insert(0, f"the {first.level} step {why}, so the steps after it compare models that already fail "
                           f"it; they are marked as conditional on a rejected step")
    if freed:
        warnings.append(SEARCH_WARNING)
    for step in steps:
        if step.freed and step.versus_previous is not None and step.full_test is not None \
                and len(step.freed) > MANY_FREED_SHARE * max(step.full_test.df_difference, 1):
            warnings.append(f"the search freed {len(step.freed)} of the {step.full_test.df_difference} equalities of the "
                            f"{step.level} step: with so many exceptions the step is hardly invariant, and the freed "
                            f"set is likely to fit these data by chance")
        if step.level != "configural" and not step.holds and (
                step.stopped in (STOP_NOTHING_LEFT, STOP_CAP.format(cap=MAX_FREED_PER_STEP), STOP_NOT_SIGNIFICANT,
                                 STOP_LAST_EQUALITY, STOP_UNTESTED, STOP_PINNED)):
            warnings.append(f"the search at the {step.level} step stopped without the step holding: {step.stopped}")
    # rows left out for a gap: a caution first when many were (after an inadmissible solution's), else a note
    left_out, left_notes = _rows_left_out(steps[0].result)
    warnings[:0] = left_out
    notes = list(notes) + left_notes
    impossible: list[str] = []  # impossible solutions: before the data's cautions, first in every view
    for step in reversed(steps):  # a model the search left behind: its impossible solution is said too
        full_result = step.full_result
        if step.partial and full_result is not None and full_result.converged and not full_result.admissible:
            impossible.insert(0, f"the {step.level} model with every equality held has a solution that is not admissible ("
                               + "; ".join(p.phrase(groups=labels) for p in full_result.problems if p.kind.inadmissible)
                               + "); the partial search then freed "
                               + ", ".join(f.words(groups=labels) for f in step.freed)
                               + ": read the freed parameters as a way around an impossible solution, not as evidence "
                               "that only they differ across groups")
    inadmissible = [s for s in steps if s.result.converged and not s.result.admissible]
    for step in reversed(inadmissible):  # problems first: an impossible solution outranks every other note
        impossible.insert(0, _impossible_line(step, labels))
    differences, latent_note, not_estimated = latent_differences(steps)
    # groups with fewer rows than their configural model's free parameters: every step's comparison rests on them
    # (joined, not formatted: the advice's option is a Command part the Word file leaves out; re-check s18, r05)
    small = tuple(f"Group {written_group(p.group, labels)}: " + p.line() for p in steps[0].result.problems
                  if p.kind is ProblemKind.SMALL_GROUP)
    # a normal-theory ladder over heavy-tailed answers: its differences reject too often (fit says so beside its
    # normality tests; a ladder, whose decisions are those differences, among its cautions)
    heavy, tails_unjudged, judged = (heavy_tailed_groups([m for _, m in groups], labels)
                                     if not ordinal_items and steps[0].result.robust is None else ((), (), ()))
    # each group's answers far from normal under the steps' normal-theory chi-squares and standard errors: a caution
    # of the data, as fit gives it (s25)
    tails = non_normal_problems(judged, None, steps[0].result.method)
    # a caution first only where a step did not hold (the configural model's own test included); when every step
    # held, a note on the tests' calibration
    rejected = any((not s.holds and not s.untested) or s.full_holds is False for s in steps)
    # said once: a group with a caution of its own says there what its tails do to the differences (fixleft s26)
    heavy, tails = tails_said_once(heavy, judged, tails, "a step that did not hold" if rejected else None)
    small = small + tuple(f"Group {written_group(p.group, labels)}: " + p.line() for p in tails)
    if tails_unjudged:
        notes = list(notes) + [tails_not_judged_note(tails_unjudged)]
    if heavy and not rejected:
        notes = list(notes) + [heavy_tails_caution(heavy, None)]
    return InvarianceResult(group, labels, tuple(steps), tuple(freed), alpha,
                            tuple(impossible) + data_cautions + small + tuple(warnings)
                            + ((heavy_tails_caution(heavy, "a step that did not hold"),) if heavy and rejected else ()),
                            rule,
                            differences, latent_note, not_estimated, tuple(notes), found + tails, reference, gaps)



#: the keywords of :func:`invariance` besides the fit options it passes on (an unknown keyword's near names,
#: make_options), read from its signature once
INVARIANCE_KEYWORDS = own_keywords(invariance)


def _rows_left_out(configural: FitResult) -> tuple[list[str], list[str]]:
    """(cautions, notes) on the rows the ladder left out for gaps, in fit's words (pipeline.continuous.rows_left_out),
    from its configural fit: every step is fitted to the same rows."""
    cautions, notes = rows_left_out([(g.label, g.data.rows_dropped, g.data.rows_read, g.data.n_obs)
                                     for g in configural.groups],
                                    configural.method.missing,
                                    pairwise_instead() if configural.method.ordinal else None)
    return [p.line() for p in cautions], notes


def _impossible_line(step, labels) -> str:
    """The caution, first, on a step whose solution is not admissible."""
    return (f"the {step.level} model's solution is not admissible ("
            + "; ".join(p.phrase(groups=labels) for p in step.result.problems if p.kind.inadmissible)
            + "): its fit and its difference test cannot show that invariance holds")


def unsound_basis(steps, k: int):
    """The first step before step ``k`` whose estimation did not converge, whose solution is not admissible, or
    that (after the configural one) did not hold (None when there is none): a step resting on it cannot show that
    invariance holds, even when it meets its test, since its model keeps the equalities that step rejected (strict
    invariance holds only where scalar invariance does).  A configural model that merely misfits by the guide
    values is not such a basis: the steps after it are marked as conditional and the report says so first.  The
    one rule the ladder's 'Holds' cells and the methods paragraph follow."""
    return next((s for i, s in enumerate(steps[:k])
                 if not s.result.converged or not s.result.admissible or (i > 0 and not s.holds)), None)


def spec_of_level(spec: Spec, classes: tuple[str, ...], exceptions) -> Spec:
    """The model of one level of the ladder: ``spec`` with the parameters of ``classes`` held equal across groups,
    less the exemptions among ``exceptions`` ('noninvariant' statements, parameters a partial search freed) that
    concern those classes (an exemption applies from the level that holds its class equal).  A start on a factor
    mean stands at the steps that fix the mean at 0 (``Spec.ladder_step``): it applies from the scalar step on."""
    return replace(spec, invariant=classes, noninvariant=tuple(r for r in exceptions
                                                              if _exempts_a_class_of(r, classes)), ladder_step=True)


def rejected_by_test(test: DifferenceTest, alpha: float) -> bool:
    """Whether a step's difference test rejects it at ``alpha`` (a test that could not be computed rejects
    nothing)."""
    return bool(test.p_value < alpha)


def _step_holds(rule: DecisionRule, test: DifferenceTest, alpha: float, result: FitResult, general: FitResult,
                level: str) -> bool:
    """Whether a step holds against the step before by ``rule``."""
    by_test = not rejected_by_test(test, alpha)
    if rule is DecisionRule.DIFFERENCE_TEST:
        return by_test
    restricted, before = _fit_values(result), _fit_values(general)
    # a change in a CFI that has no value (cfi_not_defined) is no evidence either way: the step is judged by the
    # other changes (and the test, under the rule of both), and the report says so (delta_cfi_not_defined)
    cfi_met = delta_cfi_not_defined(result, general) or restricted["cfi"] - before["cfi"] >= CFI_GUIDE
    by_change = (cfi_met and restricted["rmsea"] - before["rmsea"] < RMSEA_GUIDE
                 and restricted["srmr"] - before["srmr"] < SRMR_GUIDE.get(level, SRMR_GUIDE_LATER))
    return by_change if rule is DecisionRule.FIT_CHANGE else (by_change and by_test)


def latent_differences(steps) -> tuple[tuple[LatentDifference, ...], str, tuple[str, ...]]:
    """Factor means and variances of each group against the reference group, from the scalar model (partial
    when the search freed some of its equalities), with a note saying which model they come from or why
    there are none: latent means are comparable only when loadings and intercepts (thresholds) are equal.
    A factor explained by a higher-order factor is compared by the total mean and variance the model implies;
    a higher-order factor whose mean stays fixed at 0 in every group is returned by name, with no difference."""
    scalar = next((s for s in steps if s.level == "scalar"), None)
    if scalar is None:
        return (), "No latent mean differences: the ladder did not reach the scalar step.", ()
    if any(not s.holds for s in steps if s.level in ("thresholds", "metric", "scalar")):
        return (), ("No latent mean differences: the scalar step (or a step before it) did not hold, so the factor "
                    "means of the groups are not on a common scale."), ()
    if not scalar.result.admissible:
        return (), "No latent mean differences: the scalar model's solution is not admissible.", ()
    result = scalar.result
    labels = [g.label for g in result.groups]
    size = {g.label: g.data.n_obs for g in result.groups}
    rows = {(r.kind, r.variables, r.group): r for r in result.estimates if r.kind in ("mean", "factor_variance")}
    reference = labels[0]
    # a factor's means are comparable when at least two of its items keep equal loadings and intercepts
    # (Byrne, Shavelson & Muthén 1989); with fewer, its scalar equality is not tested at all
    freed = [f for s in steps if s.level in ("thresholds", "metric", "scalar") for f in s.freed]
    declared = scalar.declared  # the model file's exemptions in force at the scalar step
    items_of: dict[str, set[str]] = {}
    for r in result.estimates:
        if r.kind == "loading" and r.group == reference and r.variables[1] in result.observed:
            items_of.setdefault(r.variables[0], set()).add(r.variables[1])
    too_few = []
    for factor, items in items_of.items():
        loose = {f.variables[-1] for f in freed if f.kind in ("intercept", "threshold") and f.variables[-1] in items}
        loose |= {f.variables[1] for f in freed if f.kind == "loading" and f.variables[0] == factor}
        loose |= {r.names[-1] for r in declared if r.kind in ("intercept", "threshold") and r.names[-1] in items}
        loose |= {r.names[1] for r in declared if r.kind == "loading" and r.names[0] == factor}
        if len(items - loose) < 2:
            too_few.append(factor)
    higher = _higher_order_parents(result)
    # a higher-order factor's mean stays fixed at 0 while the means of the factors it explains are free
    fixed_means = [f for f in result.latent if f not in too_few and f in _higher_factors(higher)
                   and not any(rows.get(("mean", (f,), g)) is not None and rows[("mean", (f,), g)].free
                               for g in labels[1:])]
    out = []
    for factor in result.latent:
        if factor in too_few or factor in fixed_means:
            continue
        for label in labels[1:]:
            row = rows.get(("mean", (factor,), label))
            moments = [_total_moments(result, higher, rows, factor, g) for g in (reference, label)]
            if row is None or None in moments:
                continue
            (ref_mean, ref_var), (mean, var) = moments
            through = higher.get(factor, {})
            if through and any(getattr(rows.get(("mean", (h,), g)), "free", False) for h in _ancestors(higher, factor)
                               for g in (reference, label)):
                se, ci, p = float("nan"), (float("nan"), float("nan")), float("nan")  # not a single parameter
            else:
                se, ci, p = row.se, row.ci95, row.p_value
            pooled = (size[reference] * ref_var + size[label] * var) / (size[reference] + size[label])
            d = (mean - ref_mean) / np.sqrt(pooled) if pooled > 0 else float("nan")
            own = rows.get(("factor_variance", (factor,), label))
            out.append(LatentDifference(factor, label, mean - ref_mean, se, ci, p, float(d), var,
                                        own.se if own is not None and not through else float("nan"), ref_var,
                                        bool(through)))
    its = "its" if len(too_few) == 1 else "their"  # each sentence in the number of the factors it names (s23)
    withheld = (f" None for {', '.join(too_few)}: fewer than two of {its} items keep equal loadings and intercepts "
                f"across groups, so the equality that makes {its} means comparable is not tested (Byrne, Shavelson & "
                f"Muthén 1989)." if too_few else "")
    lower = [f for f in result.latent if f in higher and f not in too_few]
    if lower:
        withheld += (f" {_capital_first(', '.join(lower))} {'are' if len(lower) > 1 else 'is'} explained by a "
                     f"higher-order factor: {'their' if len(lower) > 1 else 'its'} mean and variance are the totals "
                     f"the model implies (Bollen 1989: means (I - B)^-1 alpha, covariances (I - B)^-1 Psi "
                     f"(I - B)^-T), not those of {'their' if len(lower) > 1 else 'its'} disturbance"
                     f"{'s' if len(lower) > 1 else ''}, and d is over the pooled total standard deviation.")
    if fixed_means:
        one = len(fixed_means) == 1
        withheld += (f" No mean difference for {', '.join(fixed_means)}: "
                     + ("its mean is fixed at 0 in every group (at this step the means of the factors it explains are "
                        "free in each group and take up any difference), so it is not estimated." if one else
                        "their means are fixed at 0 in every group (at this step the means of the factors they "
                        "explain are free in each group and take up any difference), so they are not estimated."))
    which = "the partially invariant scalar model" if any(s.partly_equal for s in steps if s.level != "strict") \
        else "the scalar model"
    return tuple(out), (f"From {which}: each group's factor means against the reference group "
                        f"{written_group(reference, labels)} (whose means "
                        f"are fixed at 0); d: the mean over the pooled latent standard deviation of the group and the reference group; "
                        f"Var. ratio: the group's factor variance over the reference group's."
                        + ("" if steps[0].holds else " The configural model could not be judged by the guide values, "
                           "so read them with caution." if steps[0].unjudged and steps[0].result.admissible else
                           " The configural model misfits, so read them with caution."
                           if steps[0].result.admissible else " The configural model's solution is not admissible, so "
                           "read them with caution.")
                        + withheld), tuple(fixed_means)


def _capital_first(text: str) -> str:
    """``text`` as a sentence, by the one rule of a line's capital (note_parts.capitalised): a name keeps its case."""
    return capitalised(text)


def _higher_order_parents(result: FitResult) -> dict[str, dict[str, dict[str, float]]]:
    """For each factor explained by higher-order factors: {parent: {group: loading}} (latent-on-latent loadings)."""
    out: dict[str, dict[str, dict[str, float]]] = {}
    latent = set(result.latent)
    for r in result.estimates:
        if r.kind == "loading" and r.variables[1] in latent:
            out.setdefault(r.variables[1], {}).setdefault(r.variables[0], {})[r.group] = r.estimate
    return out


def _higher_factors(higher: dict) -> set[str]:
    """The higher-order factors (those that explain another factor)."""
    return {parent for parents in higher.values() for parent in parents}


def _ancestors(higher: dict, factor: str) -> list[str]:
    out, todo = [], list(higher.get(factor, {}))
    while todo:
        h = todo.pop()
        if h not in out:
            out.append(h)
            todo.extend(higher.get(h, {}))
    return out


def _total_moments(result: FitResult, higher: dict, rows: dict, factor: str, group: str) -> tuple[float, float] | None:
    """A factor's total mean and variance in ``group`` as the model implies them (Bollen 1989, ch. 8: mean
    (I - B)^-1 alpha, covariance (I - B)^-1 Psi (I - B)^-T): its own mean plus its higher-order factors' means
    times its loadings on them; its variance from the group's total factor covariance matrix."""
    def mean_of(f: str) -> float | None:
        own = rows.get(("mean", (f,), group))
        if own is None:
            return None
        total = own.estimate
        for parent, loadings in higher.get(f, {}).items():
            above = mean_of(parent)
            if above is None or group not in loadings:
                return None
            total += loadings[group] * above
        return total

    g = next((x for x in result.groups if x.label == group), None)
    mean = mean_of(factor)
    if mean is None or g is None:
        return None
    if g.latent_covariance is None:  # without the total matrix: a first-order factor's own variance is its total
        own = rows.get(("factor_variance", (factor,), group))
        return (mean, own.estimate) if own is not None and factor not in higher else None
    i = result.latent.index(factor)
    return mean, float(g.latent_covariance[i, i])


def _judged(fit: dict[str, float]) -> str:
    """The indices of :func:`_fit_values` against their guides (assessment.fit_indices.FIT_GUIDES), those that miss
    theirs first: 'RMSEA .0605, above .06; CFI .951 and SRMR .046 meet theirs'; an index without a value is said to
    be not defined, never compared ('CFI nan, below .95' was printed for a CFI of 0/0)."""
    undefined = [k for k, v in fit.items() if not np.isfinite(v)]
    fit = {k: v for k, v in fit.items() if k not in undefined}
    missed = [k for k, v in fit.items() if not FIT_GUIDES[k].met_by(v)]
    said = [f"{k.upper()} {journal_decimal(fit[k], FIT_GUIDES[k].value)}, {FIT_GUIDES[k].missed_side} "
            f"{journal_decimal(FIT_GUIDES[k].value).rstrip('0')}" for k in missed]
    met = [f"{k.upper()} {journal_decimal(v, FIT_GUIDES[k].value)}" for k, v in fit.items() if k not in missed]
    if met:
        said.append(f"{word_list(met)} {'meets its' if len(met) == 1 else 'meet theirs'}")
    said += [f"{k.upper()} not defined" for k in undefined]
    return "; ".join(said)


def _fit_values(result: FitResult) -> dict[str, float]:
    """CFI, RMSEA and SRMR of a fit: the robust (adjusted) CFI and RMSEA for ordinal items."""
    fit, robust = result.fit, result.robust
    if robust is not None:
        return {"cfi": robust.cfi_robust, "rmsea": robust.rmsea_robust, "srmr": fit.srmr}
    return {"cfi": fit.cfi, "rmsea": fit.rmsea, "srmr": fit.srmr}


def cfi_not_defined(result: FitResult) -> bool:
    """Whether the CFI a step is judged by (:func:`_fit_values`) has no value because the baseline model fits these
    data no worse than the model (both noncentralities at most 0, so CFI is 0/0: assessment.fit_indices.cfi_from),
    rather than because a robust index was not computed (:func:`unjudged`).  The one rule of the ladder: such a
    model, or a step from or to it, is judged by the other indices (RMSEA and SRMR), and the report says so."""
    return (result.converged and result.fit is not None and not np.isfinite(_fit_values(result)["cfi"])
            and not (result.robust is not None and result.robust.not_computed))


def delta_cfi_not_defined(result: FitResult, general: FitResult) -> bool:
    """Whether a step's change in CFI has no value because the CFI of either model has none (:func:`cfi_not_defined`)."""
    return cfi_not_defined(result) or cfi_not_defined(general)


def unjudged(rule: DecisionRule, step: tuple[str, FitResult], before: tuple[str, FitResult] | None) -> str:
    """Why a step (``step``: its level and fit; ``before``: the step before, None for the configural model) cannot be
    judged by ``rule`` ('' when it can): the configural model by its CFI and RMSEA, a later step under the fit-change
    rule (alone or with the test) by the changes in them, which are robust figures with a robust test; when the
    robust test's scaling factor (or its baseline model's) is not positive they were not computed
    (inference.robust.robust_fit), and a step is never judged on a figure that does not exist (the comparisons of a
    missing number are all false, which read as 'misfits')."""
    fits = [step] if before is None else [before, step] if rule is not DecisionRule.DIFFERENCE_TEST else []
    missing = [level for level, r in fits if r.converged and r.robust is not None and r.robust.not_computed
               and not all(np.isfinite(_fit_values(r)[k]) for k in ("cfi", "rmsea"))]
    if not missing:
        return ""
    why = "a scaling factor of the robust test is not positive"
    if before is None:
        return f"its robust CFI and RMSEA were not computed ({why})"
    levels = word_list(f"the {level} model" for level in missing)
    return (f"the changes in robust CFI and RMSEA it is judged by need those of {levels}, which were not computed "
            f"({why})")


def configural_fits(result: FitResult) -> bool:
    """The configural model on its own fit, by :data:`CONFIGURAL_INDICES` against their guides (a perfect fit with
    0 df counts as fitting)."""
    if result.fit is None:
        return False
    if result.fit.df == 0:
        return True
    values = _fit_values(result)
    return all(FIT_GUIDES[k].met_by(values[k]) for k in CONFIGURAL_INDICES if k != "cfi" or not cfi_not_defined(result))


def _one_per_constraint(tests: tuple[ModificationIndex, ...], labels: tuple[str, ...]) -> tuple[ModificationIndex, ...]:
    """With two groups, releasing an equality in either group is the same test: keep it once (under the
    second group, where it differs from the reference)."""
    if len(labels) != 2:
        return tests
    return tuple(t for t in tests if t.group != labels[0])


class NormalLadder:
    """Continuous items: normal-theory ML and likelihood-ratio differences."""

    levels = LEVELS

    def __init__(self, design=None):
        self.design = design  # data.sample_design.SampleDesign, stated in every step's result

    def estimate(self, spec, groups, options, start):
        return estimate(spec, groups, options, start=start)

    def assess(self, spec, groups, est, options, group_column):
        result = assess(spec, groups, est, options, group_column=group_column)
        return with_design(result, self.design, [m for _, m in groups]) if self.design is not None else result

    def difference(self, est, result, previous, level, previous_level) -> DifferenceTest:
        """The scaled difference (Satorra & Bentler 2001) when the fits carry a robust test, as the report says,
        or its strictly positive version (Satorra & Bentler 2010) when the 2001 correction is not positive; the
        likelihood-ratio difference without a robust test (or when neither scaled version can be computed)."""
        general_est, general = previous
        return scaled_difference(result, general, general_est, level, previous_level, est)

    def constraint_tests(self, est, kinds, robust: bool = False):
        """Score tests of the step's equalities: with a robust (or design-based) test, Satorra's (1989) generalized
        score tests (:func:`robust_score_tests`), else the normal-theory ones."""
        found = equality_score_tests(est.model, est.theta, est.likelihood, kinds)
        return robust_score_tests(found, est.model, est.theta, est.likelihood) if robust else found


class OrdinalLadder:
    """Ordinal items: least squares on thresholds and polychoric correlations, adjusted differences."""

    levels = ORDINAL_LEVELS

    def __init__(self, method: str, design=None):
        self.method = method
        self.design = design  # data.sample_design.SampleDesign, stated in every step's result

    def estimate(self, spec, groups, options, start):
        from cfa_tool.pipeline.ordinal import estimate_ordinal_groups

        return estimate_ordinal_groups(spec, groups, options, self.method, start)

    def assess(self, spec, groups, est, options, group_column):
        from cfa_tool.errors import NotIdentified, UnboundedSolution
        from cfa_tool.pipeline.ordinal import assess_ordinal_groups
        from cfa_tool.workflows.ordinal_compare import unestimated_ordinal_result

        try:
            result = assess_ordinal_groups(spec, groups, est, options, group_column, self.method, modification=False)
        except (NotIdentified, UnboundedSolution) as failure:  # the step could not be estimated: the ladder stops
            # there with the steps before it reported, as compare reports such a model among the others
            return unestimated_ordinal_result(spec, groups, est, options, group_column, self.method, failure)
        return (with_design(result, self.design, [m for _, m in groups]) if self.design is not None
                and result.converged else result)

    def difference(self, est, result, previous, level, previous_level) -> DifferenceTest:
        from cfa_tool.pipeline.ordinal import ordinal_difference
        from cfa_tool.workflows.ordinal_compare import difference_record

        general_est, general = previous
        return difference_record(ordinal_difference(est, general_est), level, previous_level, result, general)

    def constraint_tests(self, est, kinds, robust: bool = True):
        """Robust score tests of the step's equalities (Satorra 1989; pipeline.ordinal.ordinal_score_tests): the only
        ones least squares has."""
        from cfa_tool.assessment.modification import constrained_entries
        from cfa_tool.pipeline.ordinal import ordinal_score_tests

        table = est.table
        return ordinal_score_tests(est, [constrained_entries(table, kinds, g) + _pinned_entries(table, kinds, g)
                                         for g in range(table.n_groups)])


def _pinned_entries(table, kinds: tuple[str, ...], group: int) -> list:
    """Intercepts and residual variances of ordinal items that a step fixes (at 0 and 1) in a later group:
    for ordinal items, holding them equal across groups means fixing them at the first group's values."""
    if group == 0:
        return []
    return [(par.kind, par.variables, par.matrix, par.row, par.col) for par in table.parameters
            if par.group == group and par.kind in kinds and par.kind in ("intercept", "residual_variance")
            and not par.free and par.origin == "scale"]


def _exempts_a_class_of(ref: ParameterRef, classes: tuple[str, ...]) -> bool:
    """Whether 'noninvariant REF' concerns one of the classes held equal at this level."""
    from cfa_tool.language.spec import INVARIANCE_CLASSES

    kinds = {k for c in classes for k in INVARIANCE_CLASSES[c]}
    if ref.kind in ("loading", "intercept", "mean", "threshold"):
        return ref.kind in kinds
    return bool(kinds & ({"residual_variance", "factor_variance"} if ref.kind == "variance"
                         else {"residual_covariance", "factor_covariance"}))


def search_exemption(candidate: ModificationIndex, exceptions: Sequence[ParameterRef] = ()) -> ParameterRef:
    """The exemption the partial search makes of a score test: no line of the model file (the search chose it), so
    no error about it can point at the researcher's file.  Freed in every group, unless ``exceptions`` (the model
    file's and the search's so far) set the parameter apart in some groups alone: then in the score test's group alone,
    the rest of its equality (a statement in every group beside one in a group is refused by the model language)."""
    ref = ParameterRef(ref_kind(candidate.kind), _ref_names(candidate), None)
    if candidate.group is not None and any(r.key() == ref.key() and r.group is not None for r in exceptions):
        return replace(ref, group=candidate.group)
    return ref


def _first_of_equal(culprits: tuple[ModificationIndex, ...], table) -> tuple[ModificationIndex,
                                                                             tuple[ModificationIndex, ...]]:
    """The parameter the search frees from ``culprits`` (largest score test first), and the others whose tests equal
    its (:data:`EQUAL_SCORE_TESTS`; each parameter once, whichever group points to it): of equal tests, the first in
    the model's order (the parameter table's, as the model file declares them), so that rounding, which differs
    between machines, never chooses."""
    largest = culprits[0].index
    equal: dict[tuple, ModificationIndex] = {}
    for c in culprits:
        if abs(c.index - largest) > EQUAL_SCORE_TESTS * max(abs(largest), 1.0):
            break
        equal.setdefault((c.kind, _ref_names(c)), c)  # the largest of a parameter's groups first
    if len(equal) == 1:
        return culprits[0], ()
    order = {}
    for k, par in enumerate(table.parameters):
        order.setdefault((par.kind, par.variables), k)
        order.setdefault((par.kind, par.variables[:1]), k)  # a threshold: its item
    ranked = sorted(equal.values(), key=lambda c: order.get((c.kind, _ref_names(c)), len(order)))
    return ranked[0], tuple(ranked[1:])


def _buildable_first(culprits: tuple[ModificationIndex, ...], spec: Spec, classes: tuple[str, ...],
                     exceptions: list[ParameterRef], labels: tuple[str, ...], ordinal) -> tuple[ModificationIndex, ...]:
    """``culprits`` from the first whose freeing the model can take: a score test of an entry that stays fixed once
    its equality is released (an ordinal item's residual variance while its intercept differs across groups and it has
    one threshold: Wu & Estabrook 2016, as model.parameters builds them) is dropped, as the freeing would change
    nothing.  Only the head is checked (the search frees one parameter at a time)."""
    from cfa_tool.model.parameters import build_parameter_table

    counts = ordinal if isinstance(ordinal, dict) else None
    for i, candidate in enumerate(culprits):
        try:
            build_parameter_table(spec_of_level(spec, classes, [*exceptions, search_exemption(candidate, exceptions)]),
                                  labels,
                                  ordinal=counts)
        except ModelError:
            continue
        return culprits[i:]
    return ()


def _ref_names(candidate: ModificationIndex | FreedParameter) -> tuple[str, ...]:
    # a threshold is released for its item as a whole
    return candidate.variables[:1] if candidate.kind == "threshold" else candidate.variables


def ref_kind(kind: str) -> str:
    """The word a model statement names a parameter kind by (residual and factor variances and covariances as
    variance(x), covariance(x, y))."""
    return {"residual_variance": "variance", "residual_covariance": "covariance", "factor_variance": "variance",
            "factor_covariance": "covariance"}.get(kind, kind)


def _may_free(candidate: ModificationIndex, exceptions: list[ParameterRef], spec: Spec, kinds: tuple[str, ...]) -> bool:
    """Keep at least one loading and one intercept per factor held equal, so factor scales and means stay comparable."""
    key = (ref_kind(candidate.kind), _ref_names(candidate))
    # set apart in every group, or in the candidate's group already: nothing of it left to free there (one set apart
    # in other groups alone keeps the equality of the rest, which the search may free: hostile s21)
    if any((r.kind, r.names) == key and r.group in (None, candidate.group) for r in exceptions):
        return False
    if candidate.kind == "threshold":
        key = ("threshold", (candidate.variables[0],))
    elif candidate.kind not in ("loading", "intercept"):
        return True
    freed = {(r.kind, r.names) for r in exceptions}
    for factor in spec.factors:
        items = [i.text for i in factor.indicators if i.text in spec.observed_names]
        if candidate.kind == "loading" and candidate.variables[0] == factor.name.text:
            keys = [("loading", (factor.name.text, x)) for x in items]
        elif candidate.kind in ("intercept", "threshold") and candidate.variables[0] in items:
            keys = [(candidate.kind, (x,)) for x in items]
        else:
            continue
        still_equal = [k for k in keys if k not in freed and k != key]
        if candidate.kind == "loading":
            still_equal = [k for k in still_equal if k != ("loading", (factor.name.text, items[0]))] or still_equal
        if len(still_equal) < 1:
            return False
    return True
