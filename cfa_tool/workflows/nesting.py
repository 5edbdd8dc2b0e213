"""Nested-model tests.

Nesting is detected numerically (Bentler & Satorra 2010): model R is nested in
model G when G, fitted to the moments implied by R's estimates, reproduces
them exactly (minimum discrepancy zero) and R has more degrees of freedom.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from enum import Enum
from typing import Callable

import numpy as np

from cfa_tool.numbers import count_text, counted, cut_list, discrepancy_text, rounded_number, word_list
from cfa_tool.options import Option, taken_by
from cfa_tool.numerics import distributions as dist

from cfa_tool.assessment.method_factors import cross_cutting_factors
from cfa_tool.data.moments import SampleMoments
from cfa_tool.pipeline.continuous import Estimation, FitOptions, estimate
from cfa_tool.language.spec import Spec
from cfa_tool.method import DifferenceMethod, FitTest
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.pipeline.results import FitResult, clean

NESTING_TOLERANCE = 1e-7  # minimum discrepancy below which the implied moments count as reproduced


def heavy_tailed_groups(moments: list, labels: tuple[str, ...] | None = None, items: str = ""
                        ) -> tuple[tuple[str, ...], tuple[str, ...], tuple[tuple[str | None, object], ...]]:
    """The groups (``labels``; None: one group of rows) whose answers are heavier-tailed than normal by Mardia's
    (1970) kurtosis test at .05, each said with its z: 'group south (z = 12.3)', or 'these rows (z = 12.3)' for one
    group.  Normal-theory chi-square statistics and their differences then reject models that hold far more often than
    their level (Curran, West & Finch 1996: kurtosis, not skewness, inflates them; light tails, as a short answer
    scale has, make them conservative instead, so those are not named).  Rows with gaps (full-information ML) are
    judged each on the items it answered, at the group's saturated (EM) moments (assessment.normality.
    kurtosis_with_gaps; Yuan, Lambert & Fouladi 2004), said so: 'group south (z = 12.3, each row on the items it
    answered)' (hostile trial s23b: with a gap in every row the complete rows were too few and the caution vanished);
    the groups where even that cannot be computed are said apart, as (found, not judged, judged), the last each
    judged group's (label, or None for one group of rows; assessment.normality.Normality), from which a comparison or
    a ladder cautions on answers far from normal as fit does (assessment.admissibility.non_normal_problems).
    ``items``: which items were judged, after the rows' words ('on the items of one and two'), where a comparison's
    models hold different items and each set is judged apart."""
    from cfa_tool.assessment.normality import kurtosis_with_gaps, mardia
    from cfa_tool.errors import EstimationError
    from cfa_tool.language.names import written_group

    found, unjudged, judged = [], [], []
    for k, m in enumerate(moments):
        rows = getattr(m, "rows", None)
        if rows is None:
            continue
        where = ("these rows" if labels is None else f"group {written_group(labels[k], labels)}") + (
            f" {items}" if items else "")
        gaps = np.isnan(rows).any(axis=1)
        how = ", each row on the items it answered" if gaps.any() else ""
        try:
            if gaps.any():  # at the rows' own unweighted EM moments (the moments' may be weighted, or pairwise)
                n = kurtosis_with_gaps(rows)
            elif len(rows) > rows.shape[1] + 1:
                n = mardia(rows)
            else:
                raise np.linalg.LinAlgError("too few rows")
        except (np.linalg.LinAlgError, ValueError, EstimationError):
            unjudged.append(f"{where} ({count_text(int(gaps.sum()))} of {counted(len(rows), 'row')} with gaps)")
            continue
        judged.append((None if labels is None else labels[k], n))
        if n.kurtosis_p_value < 0.05 and n.kurtosis_z > 0:
            found.append(f"{where} (z = {n.kurtosis_z:.1f}{how})")
    return tuple(found), tuple(unjudged), tuple(judged)


#: what a comparison's difference tests decided when one rejected a restriction (the cautions on heavy tails)
REJECTED_RESTRICTION = "a restriction the difference test rejects"


def tails_said_once(heavy: tuple[str, ...], judged, tails: tuple, decided: str | None
                    ) -> tuple[tuple[str, ...], tuple]:
    """The heavy tails of :func:`heavy_tailed_groups` said once (fixleft s26: a comparison and a ladder said them
    twice, as the caution on answers far from normal, ``tails`` (assessment.admissibility.non_normal_problems of
    ``judged``), and again as the caution on the difference tests): the groups with a caution of their own among
    ``tails`` leave ``heavy``, and that caution says what the tails do to the differences, with ``decided`` (words:
    'a step that did not hold'; None: no test rejected) as :func:`heavy_tails_caution` says it.  Returns (the groups
    left for :func:`heavy_tails_caution`, ``tails`` with the differences said)."""
    covered = {p.group for p in tails if p.value > 1.0}  # heavier tails than normal ones (a ratio above 1)
    if not covered:
        return heavy, tails
    flagged = [label for label, n in judged if n.kurtosis_p_value < 0.05 and n.kurtosis_z > 0]  # heavy's order
    left = tuple(h for h, label in zip(heavy, flagged) if label not in covered)
    differences = (f" The chi-square differences inherit it, so {decided} may be an artefact of these tails."
                   if decided is not None else
                   " The chi-square differences inherit it; no test rejected a restriction here, so no decision "
                   "rests on that.")
    return left, tuple(replace(p, explanation=p.explanation + differences) if p.group in covered and p.value > 1.0
                       else p for p in tails)


#: the one rule of what heavy tails do to the tests, which the caution and the note on tails not judged both say
OVER_HEAVY_TAILS = ("normal-theory chi-square differences over heavy tails reject restrictions that hold more often "
                    "than their level")


def tails_not_judged_note(unjudged: tuple[str, ...]) -> Note:
    """The note on groups whose tails :func:`heavy_tailed_groups` could not judge: normal-theory differences assume
    normal tails, which these rows cannot show."""
    return Note((f"Whether the answers have heavier tails than normal ones (Mardia's multivariate kurtosis, of rows "
                 f"with gaps each on the items it answered) could not be judged in {cut_list(list(unjudged), 4)}: "
                 f"{OVER_HEAVY_TAILS}; the scaled differences", Command(f" ({Option.ROBUST})", takes=taken_by(Option.ROBUST)),
                 " do not assume normal tails."))


def heavy_tails_caution(found: tuple[str, ...], decided: str | None) -> Note:
    """The caution on normal-theory chi-square differences over answers heavier-tailed than normal
    (:func:`heavy_tailed_groups`), first in the report of a ladder or a comparison whose ``decided`` (words: 'a step
    that did not hold', 'a rejected restriction') rests on them (hostile trial s23: strict invariance rejected between
    two random halves of one population, p < .001, nothing said; with the scaled difference p = .135); the remedy is
    the scaled difference (Satorra & Bentler 2001).  ``decided`` None: no test rejected, so no decision rests on the
    inflation: a note on the tests' calibration, not a caution (their p-values are too small, a non-rejection
    stands)."""
    tails = (f"The answers have heavier tails than normal ones (Mardia's multivariate kurtosis) in "
             f"{cut_list(list(found), 4)}: {OVER_HEAVY_TAILS}")
    if decided is None:
        return Note((f"{tails}, so these tests' p-values tend to be smaller than they should be; no test rejected a "
                     f"restriction here, so no decision rests on that; the scaled differences", Command(f" ({Option.ROBUST})", takes=taken_by(Option.ROBUST)),
                     " do not assume normal tails."))
    return Note((f"{tails}, so {decided} may be an artefact of the answers' distribution; consider the scaled "
                 f"differences", Command(f" ({Option.ROBUST})", takes=taken_by(Option.ROBUST)), ""))


def rejects(test: DifferenceTest | None, alpha: float = 0.05) -> bool:
    """Whether a difference test was computed and rejected its restriction at ``alpha`` (by the chi-square's p or,
    one parameter on the boundary, by the mixture's)."""
    if test is None or test.not_computed or test.df_difference <= 0:
        return False
    return bool(test.p_value < alpha or test.boundary_p_value < alpha)


@dataclass(frozen=True)
class DifferenceTest:
    """The chi-square difference test of a restricted model against a general one."""
    restricted: str
    general: str
    chi_square_difference: float
    df_difference: int
    p_value: float
    method: DifferenceMethod
    delta_cfi: float
    delta_rmsea: float
    # why the statistic could not be computed ('' when it was): words, or a Note whose option a manuscript leaves out
    not_computed: Text = ""
    # what the restricted model fixes on the boundary of the general model's space (in words; empty when nothing)
    boundary: tuple[str, ...] = ()
    # p from the 50:50 mixture of chi-square(df - 1) and chi-square(df) when the reading is the mixture (one
    # parameter on the boundary, held inside it by a bound of the general model; Self & Liang 1987); NaN otherwise
    boundary_p_value: float = float("nan")
    # which p-value reads the test when something lies on the boundary (:class:`BoundaryReading`); None when nothing
    boundary_reading: BoundaryReading | None = None
    # a scaled difference: the two scaling factors its correction took (the restricted model's, the general
    # model's), the correction c_d, and how they were computed, in words (NaN and '' otherwise)
    scaling_factors: tuple[float, float] = (float("nan"), float("nan"))
    correction: float = float("nan")
    scaled_by: str = ""
    # what the reader of the report's tables reads instead when the statistic was not computed ('read the scaled
    # difference'), apart from the reason: a methods paragraph gives the whole reason and leaves the advice out
    advice: str = ""

    @property
    def read_p_value(self) -> float:
        """The p-value to read: the 50:50 mixture's where that is the boundary's reading, else ``p_value``."""
        return self.boundary_p_value if self.boundary_reading is BoundaryReading.MIXTURE else self.p_value

    def to_dict(self) -> dict:
        out = clean(dict(self.__dict__))
        out["not_computed"] = str(self.not_computed) or None  # a Note as its reader reads it
        out["scaled_by"] = self.scaled_by or None
        out["boundary_reading"] = None if self.boundary_reading is None else self.boundary_reading.value
        return out


class BoundaryReading(str, Enum):
    """Which p-value reads a difference test whose restricted model fixes a parameter of the general model on the
    boundary of its space (the value is the JSON's ``boundary_reading``).

    The 50:50 mixture of chi-square(df - 1) and chi-square(df) (Self & Liang 1987; Stoel, Garre, Dolan & van den
    Wittenboer 2006) assumes that the general model's estimate is held inside the boundary (constrained estimation).
    This tool's fits hold nothing there unless the model file bounds it: a factor correlation may go past 1 and a
    variance below 0 (an improper solution, which the reports name first), and under such unconstrained estimation
    the difference follows the usual chi-square distribution (Savalei & Kolenikov 2008, Psychological Methods 13,
    150-170; the reference recalled from memory).  Checked by simulation in
    tests/workflows/test_boundary_reading_simulated.py: with the merge true in the population the mixture rejected
    about twice as often as its level, the usual chi-square about at it; with a bound holding the parameter, the
    reverse."""

    #: exactly one parameter on the boundary held inside it by a bound of the general model ('bound variance(x) >= 0'
    #: for a variance the restricted model fixes at 0; a covariance bounded at +/-1 between two variances fixed at 1),
    #: any others there unbounded, every parameter identified: the 50:50 mixture (Self & Liang 1987: one parameter on
    #: the boundary beside interior ones; checked by simulation for three factors merged, one correlation bounded)
    MIXTURE = "50:50 mixture"
    #: parameters on the boundary, none held inside it by a bound, every parameter identified: the usual chi-square
    #: (Savalei & Kolenikov 2008; with several such parameters too: under unconstrained estimation each lies inside
    #: the space the search moves in, checked by simulation for three factors merged into one)
    CHI_SQUARE = "usual chi-square"
    #: two or more parameters on the boundary held inside it by bounds (a mixture whose weights depend on the
    #: model), or loadings the restricted model leaves unidentified (a factor left out, fewer factors than an
    #: exploratory block): no chi-square reading is exact; the p-value printed is the usual chi-square's, read as rough
    APPROXIMATE = "approximate"


@dataclass(frozen=True)
class Boundary:
    """What a restricted model fixes on the boundary of the general model's parameter space: factors merged (their
    correlation at 1, a factor covariance matrix of lower rank), a factor left out (its variance at 0), a variance
    fixed at 0 or a correlation fixed at +/-1, and which p-value reads the test then (``reading``,
    :class:`BoundaryReading`; None when nothing lies on the boundary)."""

    parts: tuple[str, ...] = ()
    reading: BoundaryReading | None = None

    def __bool__(self) -> bool:
        return bool(self.parts)

    def mark(self, test: DifferenceTest) -> DifferenceTest:
        """``test`` with the boundary and its reading said, and the mixture's p-value when that is the reading."""
        if not self.parts:
            return test
        p = (dist.boundary_mixture_sf(test.chi_square_difference, test.df_difference)
             if self.reading is BoundaryReading.MIXTURE and not test.not_computed and test.df_difference > 0
             else float("nan"))
        return replace(test, boundary=self.parts, boundary_p_value=p, boundary_reading=self.reading)


def _bounded(general_spec: Spec, kind: str, variables: tuple[str, ...], group: str | None) -> list:
    """The bound statements of the general model on ``kind(variables)`` (kind 'variance' or 'covariance') that
    apply in ``group``."""
    key = (kind, tuple(sorted(variables)) if kind == "covariance" else tuple(variables))
    return [b for b in general_spec.bounds for ref in b.refs
            if ref.key() == key and (ref.group is None or ref.group == group)]


def _variance_held(general_spec: Spec, variable: str, group: str | None) -> bool:
    """Whether the general model holds the variance of ``variable`` at or above 0 (a bound '>= 0' or higher; a
    higher one would not nest a restricted model at 0)."""
    return any(b.lower is not None and b.lower >= 0.0 for b in _bounded(general_spec, "variance", (variable,), group))


def _correlation_held(general_spec: Spec, general: FitResult, pair: tuple[str, str], group: str | None,
                      sign: float) -> bool:
    """Whether the general model holds the correlation of ``pair`` inside +/-1 (``sign``): both variances fixed
    (a factor scaled by its variance) and the covariance bounded at or within +/-sqrt(v1 v2)."""
    fixed = {}
    for e in general.estimates:
        if e.group == group and e.kind in ("factor_variance", "residual_variance") and e.variables[0] in pair:
            fixed[e.variables[0]] = None if e.free else e.estimate
    if any(fixed.get(v) is None or fixed[v] <= 0 for v in pair):
        return False
    edge = float(np.sqrt(fixed[pair[0]] * fixed[pair[1]]))
    for b in _bounded(general_spec, "covariance", pair, group):
        limit = b.upper if sign > 0 else b.lower
        if limit is not None and sign * limit <= edge * (1 + 1e-12):
            return True
    return False


def _first_order_items(spec: Spec) -> dict[str, frozenset[str]]:
    """Each factor with items among its indicators, and those items."""
    latent = set(spec.factor_names)
    out: dict[str, set[str]] = {}
    for factor in spec.factors:
        items = {i.text for i in factor.indicators if i.text not in latent}
        if items:
            out.setdefault(factor.name.text, set()).update(items)
    return {f: frozenset(items) for f, items in out.items()}


def _cross_cutting(factor: str, items: dict[str, frozenset[str]], spec: Spec) -> bool:
    """Whether ``factor`` is a method factor or one whose every item loads on another factor too (a wording factor
    beside traits, a bifactor model's factors): when the restricted model has no factor of exactly its items, it
    is left out, not merged with the factors its items also load on (the one rule:
    assessment.method_factors.cross_cutting_factors, by which a declared method factor makes no trait cross-cutting)."""
    return factor in cross_cutting_factors(items, spec.method_factors)


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}" + ("" if n == 1 else "s")


def _listed(names: list[str]) -> str:
    """Names as a sentence lists them, by the one rule of a list (numbers.word_list: 'a, b, and c'; s24: these
    lists alone wrote 'a, b and c' beside the paragraph's 'a, b, and c')."""
    return word_list(names)


def boundary_of(restricted_spec: Spec, restricted: FitResult, general_spec: Spec, general: FitResult) -> Boundary:
    """What ``restricted`` (nested in ``general``) fixes on the boundary of ``general``'s parameter space, read from
    the two models' structures and the restricted model's fixed values, never from their names or text:

    * a factor of the general model belongs to the factor of the restricted model with exactly its items, or else
      (unless it is a method factor or every item of it loads on another factor too) to the one holding more than
      half of its items; two or more factors belonging to one restricted factor are merged, which fixes their
      correlations at 1 (a factor covariance matrix of rank k - 1 lower for k merged; one merge of two factors is
      one parameter on the boundary); merged factors that are indicators of a higher-order factor in the general
      model correlate 1 only with their disturbance variances at 0, one parameter on the boundary each (two
      first-order factors merged under one higher-order factor: two, so no 50:50 mixture; Stoel et al. 2006); a
      merge in a model of several groups puts its parameters on the boundary in each group;
    * a factor belonging to none is left out: its variance is 0 and its loadings are then not identified, so no
      mixture applies; so is a factor of an exploratory block of the general model when the restricted model has
      fewer factors on the block's items (the likelihood-ratio test of the number of factors is not chi-square
      distributed then either; Hayashi, Bentler & Yuan 2007);
    * a variance the restricted model fixes at 0, or a covariance it fixes at a correlation of +/-1, where the
      general model estimates it (one parameter each; a factor's variance at 0 leaves its loadings unidentified,
      unless it is the disturbance variance of a factor under a higher-order factor).

    The reading (:class:`BoundaryReading`), every parameter identified: the usual chi-square where no bound of the
    general model holds a parameter on the boundary inside it (unconstrained estimation, however many parameters;
    Savalei & Kolenikov 2008); the 50:50 mixture where the general model's bound holds exactly one of them inside
    it (a variance bounded '>= 0'; the correlation of two factors or of a covariance between two variances fixed
    at 1, bounded at 1), whatever the others on the boundary, which the estimation leaves free to pass it (three
    factors merged with one of their three correlations bounded at 1: the space the search moves in is a half-space
    at the restricted model, so the difference is the 50:50 mixture of chi-square(df - 1) and chi-square(df); Self &
    Liang 1987, one parameter on the boundary beside interior ones); no exact reading where bounds hold two or more
    (a mixture whose weights depend on the angles between the bounds in the model's information; Shapiro 1985,
    recalled from memory) or loadings are left unidentified: the usual chi-square's p-value is then printed, marked
    as rough."""
    parts: list[str] = []
    on_boundary, identified, held = 0, True, 0
    items_r, items_g = _first_order_items(restricted_spec), _first_order_items(general_spec)
    for block in general_spec.exploratory:  # exploratory blocks: their factors all load on every item of the block
        block_items = set(block.item_names)
        kept = sum(1 for items in items_r.values() if items & block_items)
        if kept < len(block.factors):
            parts.append(f"{_count(len(block.factors) - kept, 'factor')} of the exploratory block of "
                         f"{_listed(list(block.factor_names))} left out "
                         f"({'its' if len(block.factors) - kept == 1 else 'their'} loadings at 0)")
            identified = False
        for f in block.factor_names:
            items_g.pop(f, None)
    owner: dict[str, list[str]] = {}
    exact = {items: r for r, items in items_r.items()}
    for g, items in items_g.items():
        best = max(items_r, key=lambda r: len(items & items_r[r]), default=None)
        if items in exact:
            owner.setdefault(exact[items], []).append(g)
        elif (best is not None and 2 * len(items & items_r[best]) > len(items)
              and not _cross_cutting(g, items_g, general_spec)):
            owner.setdefault(best, []).append(g)
        elif items_r:
            parts.append(f"factor {g} left out (its variance fixed at 0)")
            identified = False
    explained = {i.text for f in general_spec.factors for i in f.indicators if i.text in general_spec.factor_names}
    labels = [g.label for g in general.groups]  # a merge fixes its correlations at 1 in every group
    for r, merged in owner.items():
        if len(merged) > 1:
            below = [g for g in merged if g in explained]
            if below:  # factors under a higher-order factor correlate 1 only when their disturbances vanish
                parts.append(f"factors {_listed(merged)} merged into {r} (their correlation"
                             f"{'s' if len(merged) > 2 else ''} fixed at 1: in the general model, the disturbance "
                             f"variance{'s' if len(below) > 1 else ''} of {_listed(below)} at 0)")
                on_boundary += len(labels) * max(len(below), len(merged) - 1)
                held += sum(_variance_held(general_spec, g, label) for g in below for label in labels)
            else:
                parts.append(f"factors {_listed(merged)} merged into {r} (their correlation"
                             f"{'s' if len(merged) > 2 else ''} fixed at 1)")
                on_boundary += len(labels) * (len(merged) - 1)
                held += sum(_correlation_held(general_spec, general, (a, b), label, 1.0)
                            for k, a in enumerate(merged) for b in merged[k + 1:] for label in labels)
    free_in_general = {(e.kind, frozenset(e.variables) if "covariance" in e.kind else e.variables, e.group)
                       for e in general.estimates if e.free}
    for e in restricted.estimates:
        key = (e.kind, frozenset(e.variables) if "covariance" in e.kind else e.variables, e.group)
        if e.free or key not in free_in_general:
            continue
        where = f" in group {e.group}" if e.group is not None else ""
        if e.kind in ("factor_variance", "residual_variance") and e.estimate == 0.0:
            kind = ("residual " if e.kind == "residual_variance" else
                    "disturbance " if e.variables[0] in explained else "")  # fit's word for a factor under another
            parts.append(f"the {kind}variance of {e.variables[0]} fixed at 0{where}")
            on_boundary += 1
            # a factor's variance at 0 leaves its loadings undefined, unless it is the disturbance of a factor under
            # a higher-order factor, whose loadings the higher-order factor still defines
            identified = identified and (e.kind == "residual_variance" or e.variables[0] in explained)
            held += _variance_held(general_spec, e.variables[0], e.group)
        elif e.kind in ("factor_covariance", "residual_covariance") and abs(abs(e.standardized) - 1.0) < 1e-6:
            parts.append(f"the {'residual ' if e.kind == 'residual_covariance' else ''}correlation of "
                         f"{_listed(list(e.variables))} fixed at {'-1' if e.standardized < 0 else '1'}{where}")
            on_boundary += 1
            held += _correlation_held(general_spec, general, (e.variables[0], e.variables[1]), e.group,
                                      -1.0 if e.standardized < 0 else 1.0)
    if not parts:
        return Boundary()
    if not identified or held > 1:
        return Boundary(tuple(parts), BoundaryReading.APPROXIMATE)
    return Boundary(tuple(parts), BoundaryReading.MIXTURE if held else BoundaryReading.CHI_SQUARE)


def difference_test(restricted: FitResult, general: FitResult, restricted_name: str, general_name: str) -> DifferenceTest:
    """Likelihood-ratio chi-square difference test (Steiger, Shapiro & Browne 1985)."""
    r, g = restricted.fit, general.fit
    diff = r.chi_square - g.chi_square
    ddf = r.df - g.df
    design = getattr(general, "design", None)
    if design is not None and design.columns.robust:  # a weighted (pseudo-) likelihood or clustered rows: no test
        return DifferenceTest(restricted_name, general_name, diff, ddf, float("nan"), DifferenceMethod.LIKELIHOOD_RATIO,
                              r.cfi - g.cfi, r.rmsea - g.rmsea, PSEUDO_LIKELIHOOD, advice="read the scaled difference")
    return likelihood_ratio_difference(r.chi_square, r.df, g.chi_square, g.df, restricted_name, general_name,
                                       r.cfi - g.cfi, r.rmsea - g.rmsea)


def likelihood_ratio_difference(chi_restricted: float, df_restricted: int, chi_general: float, df_general: int,
                                restricted_name: str, general_name: str, delta_cfi: float = float("nan"),
                                delta_rmsea: float = float("nan")) -> DifferenceTest:
    """The likelihood-ratio difference of two nested fits from their chi-squares and degrees of freedom: the
    difference is chi-square on the difference in df (Steiger, Shapiro & Browne 1985); no p-value without df."""
    diff = chi_restricted - chi_general
    ddf = df_restricted - df_general
    p = float(dist.chi2_sf(max(diff, 0.0), ddf)) if ddf > 0 else float("nan")
    return DifferenceTest(restricted_name, general_name, diff, ddf, p, DifferenceMethod.LIKELIHOOD_RATIO, delta_cfi,
                          delta_rmsea)


#: why the plain likelihood-ratio difference is not a test under a sampling design
PSEUDO_LIKELIHOOD = ("under the sampling design the likelihood is a weighted pseudo-likelihood (or the rows are not "
                     "independent), so the plain difference does not follow a chi-square distribution")


@dataclass(frozen=True)
class PositiveScaling:
    """The scaling factors of the strictly positive scaled difference (Satorra & Bentler 2010), both at the
    restricted model's estimates: ``general`` the general model's there (c10; None when not defined, and
    ``why_not`` says why unless the general model has no degrees of freedom), ``restricted`` the restricted
    model's computed as that one is (None: its fit's own factor, which with complete rows is computed so)."""

    general: float | None = None
    restricted: float | None = None
    why_not: str = ""


#: why the strictly positive scaled difference is missing for a nested pair: the general model does not reproduce
#: the restricted model's implied moments by the search (M10)
NO_M10 = ("the general model could not be fitted to the restricted model's implied moments, so its scaling factor "
          "there is not defined")
#: ... or the rows' observed information there is not positive definite in the general model's parameters
NO_POSITIVE_INFORMATION = ("the rows' observed information at the restricted model's estimates is not positive "
                           "definite in the general model's parameters, so the general model's scaling factor there "
                           "is not defined")


def scaled_difference_tests(restricted: FitResult, general: FitResult, restricted_name: str, general_name: str,
                            general_scaling_at_restricted: float | None, without_positive: str = "",
                            restricted_scaling: float | None = None) -> list[DifferenceTest]:
    """Scaled difference tests for Satorra-Bentler fits.

    2001: c_d = (df0 c0 - df1 c1) / (df0 - df1), T_d = (T0 - T1) / c_d (Satorra & Bentler 2001),
    which can be negative; 2010: c1 replaced by the general model's scaling factor evaluated at
    the restricted model's estimates, which keeps c_d positive (Satorra & Bentler 2010).  ``without_positive``:
    why that factor is not at hand (the 2010 row then says so).  ``restricted_scaling``: c0 of the 2010 version
    computed at the same point and with the same information as that factor (full-information ML:
    :func:`scaling_at_restricted`); None: the restricted fit's own.
    """
    r, g = restricted.fit, general.fit
    rr, gr = restricted.robust, general.robust
    ddf = r.df - g.df
    out = []
    delta_cfi = rr.cfi_robust - gr.cfi_robust
    delta_rmsea = rr.rmsea_robust - gr.rmsea_robust
    for method, c0, c1 in ((DifferenceMethod.SATORRA_BENTLER_2001, rr.scaling_factor, gr.scaling_factor),
                           (DifferenceMethod.SATORRA_BENTLER_2010,
                            rr.scaling_factor if restricted_scaling is None else restricted_scaling,
                            general_scaling_at_restricted)):
        if c1 is None:
            if method is DifferenceMethod.SATORRA_BENTLER_2010:
                out.append(DifferenceTest(restricted_name, general_name, float("nan"), ddf, float("nan"), method,
                                          delta_cfi, delta_rmsea, without_positive or "the general model has no degrees "
                                          "of freedom, so its scaling factor at the restricted model's estimates is not "
                                          "defined"))
            continue
        first = method is DifferenceMethod.SATORRA_BENTLER_2001
        unusable = _not_positive_factor(((restricted_name, c0, first or restricted_scaling is None),
                                         (general_name, c1, first)))
        if unusable:  # a factor that is not positive scales nothing (inference.robust.robust_fit): said first
            out.append(DifferenceTest(restricted_name, general_name, float("nan"), ddf, float("nan"), method, delta_cfi,
                                      delta_rmsea, unusable))
            continue
        cd = (r.df * c0 - g.df * c1) / ddf
        if cd > 0:
            diff = (r.chi_square - g.chi_square) / cd
            out.append(DifferenceTest(restricted_name, general_name, diff, ddf, float(dist.chi2_sf(max(diff, 0.0), ddf)),
                                      method, delta_cfi, delta_rmsea, scaling_factors=(float(c0), float(c1)),
                                      correction=float(cd), scaled_by=_scaled_by(method, rr, c0, c1, cd,
                                                                                 restricted_scaling is not None)))
        else:
            first = method is not DifferenceMethod.SATORRA_BENTLER_2010
            out.append(DifferenceTest(restricted_name, general_name, float("nan"), ddf, float("nan"), method, delta_cfi,
                                      delta_rmsea, f"its scaling correction is not positive ({cd:.3f}), so the "
                                      "difference cannot be scaled" + (
                                          "" if not first else
                                          ": this version's correction can be negative, in small samples or "
                                          "when the restricted model is far from the data (Satorra & Bentler "
                                          "2010)" + ("" if general_scaling_at_restricted is not None else
                                                     "; the strictly positive version is not available either")),
                                      advice="read the strictly positive version" if first and
                                      general_scaling_at_restricted is not None else ""))
    return out


AT_RESTRICTED = " at the restricted model's estimates"


def _not_positive_factor(factors) -> str:
    """Why a scaled difference cannot be scaled by the factors it takes, '' when they are all positive.
    ``factors``: (model's name, factor, whether it is that fit's own) of the restricted and the general model; a
    factor not a fit's own is computed at the restricted model's estimates (the 2010 version).  A scaling factor is
    an estimated average of eigenvalues that must be positive, and one that is not scales nothing
    (inference.robust.robust_fit), whatever the sign of the correction made from it (Satorra & Bentler 2001: a general
    model's factor below zero made the correction positive, and the 'scaled' difference a number from nothing)."""
    bad = [(name, c, own) for name, c, own in factors if not (c is not None and np.isfinite(c) and c > 0)]
    if not bad:
        return ""
    said = word_list(f"{name}{'' if own else AT_RESTRICTED} ({rounded_number(c)})" for name, c, own in bad)
    one = len(bad) == 1
    own_test = [name for name, _, own in bad if own]
    return (f"the scaling factor{'' if one else 's'} of {said} {'is' if one else 'are'} not positive, so the "
            f"difference cannot be scaled (a scaling factor is an estimated average of eigenvalues that must be "
            f"positive" + (f"; the scaled test{'' if len(own_test) == 1 else 's'} of {word_list(own_test)} "
                           f"{'was' if len(own_test) == 1 else 'were'} not computed either" if own_test else "")
            + ")")


def _scaled_by(method: DifferenceMethod, robust, c0: float, c1: float, cd: float, recomputed: bool) -> str:
    """How a scaled difference was scaled, in words, with its factors and correction (its row's note in every view and
    the JSON's ``scaled_by``): the fits' own factors, as their table shows them, for the 2001 version (Satorra &
    Bentler 2001); for the 2010 version the general model's at the restricted model's estimates beside the
    restricted fit's own, or (``recomputed``, full-information ML) both computed alike there with the rows' observed
    information at the saturated moments (inference.robust_missing.scaling_at), the restricted one then not its
    fit's own.  The Yuan-Bentler factors of full-information fits rest on the observed information, the
    Satorra-Bentler ones on the expected: on complete rows the two differ where a model does not fit the data."""
    label = robust.label
    information = "observed" if robust.test is FitTest.YUAN_BENTLER else "expected"
    if method is DifferenceMethod.SATORRA_BENTLER_2001:
        text = (f"correction {cd:.3f} from the two fits' own scaling factors, {c0:.3f} and {c1:.3f} ({label}, on the "
                f"{information} information)")
        if robust.test is FitTest.YUAN_BENTLER:
            text += ("; on complete rows the Satorra-Bentler factors, on the expected information, differ from these "
                     "where a model does not fit the data")
    elif recomputed:
        text = (f"correction {cd:.3f} from two scaling factors computed alike at the restricted model's estimates "
                f"({label}, on the rows' observed information at the saturated moments): the restricted model's "
                f"{c0:.3f} (its fit's own is {robust.scaling_factor:.3f}) and the general model's {c1:.3f}")
    else:
        text = (f"correction {cd:.3f} from the restricted fit's own scaling factor, {c0:.3f}, and the general model's "
                f"at the restricted model's estimates, {c1:.3f} ({label}, on the {information} information at the "
                f"restricted model's implied moments)")
    if cd < WELL_BELOW_ONE:
        text += (f"; a correction below 1 makes the scaled difference larger than the unscaled one (here "
                 f"{1 / cd:.1f} times it): the rows vary less than normal rows in what the restriction tests (lighter "
                 f"tails than normal, or strata), or the correction is imprecise"
                 + (" (a difference of two factors, unstable on few df; Satorra & Bentler 2010)"
                    if method is DifferenceMethod.SATORRA_BENTLER_2001 else ""))
    return text


#: a correction of a scaled difference below which its note says why the scaled difference exceeds the unscaled one
#: (this project's line, not a published one: normal rows give about 1)
WELL_BELOW_ONE = 0.8


def scaled_difference(restricted: FitResult, general: FitResult, general_estimation: Estimation, restricted_name: str,
                      general_name: str, restricted_estimation: Estimation) -> DifferenceTest:
    """The one difference test of two nested fits that carry a robust test (the invariance ladder's steps, the
    replication's test of one solution): the scaled difference (Satorra & Bentler 2001), or its strictly positive
    version (Satorra & Bentler 2010, the general model's scaling factor at the restricted estimates from
    ``general_estimation``; with rows with gaps both factors from the two estimations, :func:`scaling_at_restricted`)
    when the 2001 correction is not positive; the likelihood-ratio difference without a robust test (or when neither
    scaled version can be computed)."""
    if restricted.robust is None or general.robust is None:
        return difference_test(restricted, general, restricted_name, general_name)
    scaled = scaled_difference_tests(restricted, general, restricted_name, general_name, None)[0]
    if not scaled.not_computed:
        return scaled
    at = scaling_at_restricted(restricted, general_estimation.table, general_estimation.model,
                               general_estimation.likelihood, general_estimation.theta, general.fit.df,
                               restricted_estimation.likelihood)
    positive = (scaled_difference_tests(restricted, general, restricted_name, general_name, at.general,
                                        restricted_scaling=at.restricted)[-1]
                if at.general is not None else None)
    if positive is not None and not positive.not_computed:
        return positive
    return difference_test(restricted, general, restricted_name, general_name)


def scaling_at_restricted(restricted: FitResult, table, model, likelihood, start, df: int,
                          restricted_likelihood=None) -> PositiveScaling:
    """The scaling factors of the strictly positive scaled difference (Satorra & Bentler 2010) at the restricted
    model's estimates: the general model (``table``, ``model``) is fitted to the restricted model's implied moments,
    which it reproduces when the two are nested (M10), and its scaling factor is computed there on the general fit's
    own ``likelihood`` (its rows, design and missing-data patterns).  Complete rows: tr(U Gamma) / df with U at M10
    (Satorra & Bentler 1994), the restricted fit's own factor being computed so at its estimates.  Rows with gaps
    (full-information ML, the Yuan-Bentler (2000) factor): both factors are computed at the one point with one
    information and one Gamma, the data's (inference.robust_missing.scaling_at: the rows' observed information in
    the moments at the saturated ones, means included, their patterns), the restricted one on
    ``restricted_likelihood`` (the restricted model's own, required then) -- the fit's bread, the observed
    information in the parameters, holds a term in the score that is not zero for the general model there, and with
    it c_d came out negative for nested models; the observed information at the restricted model's moments holds
    one in the residuals, and with it c_d fell far below 1 on normal rows when the restricted model fitted badly.
    ``start``: the general model's estimates.  ``general`` None when the general model has no degrees of freedom,
    M10 does not reproduce the restricted model's moments or the information there is not positive definite
    (``why_not`` says which)."""
    from cfa_tool.estimation.ml import NormalLikelihood
    from cfa_tool.estimation.strategy import search
    from cfa_tool.inference.robust import robust_parts
    from cfa_tool.inference.robust_missing import scaling_at
    from cfa_tool.pipeline.continuous import ordered_moments

    if df <= 0:
        return PositiveScaling()
    implied = NormalLikelihood(model, [ordered_moments(m, table.observed) for _, m in implied_moments(restricted)])
    found = search(implied, table, start, 500).result
    if not found.converged or found.value > NESTING_TOLERANCE:
        return PositiveScaling(why_not=NO_M10)
    if likelihood.complete_data:
        return PositiveScaling(robust_parts(model, found.theta, likelihood)[1] / df)
    if restricted_likelihood is None:
        raise ValueError("rows with gaps: the restricted model's own likelihood is needed for its factor")

    def saturated(on) -> list:  # each likelihood's own EM moments, in its own order of the variables
        return [(gm.mean, gm.covariance) for gm in on.groups]

    general = scaling_at(likelihood, found.theta, saturated(likelihood), df)
    own = scaling_at(restricted_likelihood, restricted.theta, saturated(restricted_likelihood), restricted.fit.df)
    if not (np.isfinite(general) and np.isfinite(own)):
        return PositiveScaling(why_not=NO_POSITIVE_INFORMATION)
    return PositiveScaling(general, own)


def same_degrees_of_freedom(first: FitResult, second: FitResult, reproduces: Callable[[], bool]) -> str:
    """Why two fits with the same degrees of freedom are not tested, for every estimator (compare of continuous and of
    ordinal items says it alike): when they have the same free parameters and differ only by a bound that holds an
    estimate of one of them (an inequality restriction), that one is a restricted form of the other, which no
    difference in degrees of freedom measures (the difference of chi-squares has none; its distribution is a
    mixture, Self & Liang 1987).  Found numerically as nesting is (Bentler & Satorra 2010): ``reproduces()`` tells
    whether the second model without its bounds reproduces the first's implied statistics (called only when a bound
    holds an estimate of one model alone).  Otherwise the models are probably equivalent when their chi-squares
    agree, and neither is a restricted form of the other when they do not."""
    from cfa_tool.assessment.admissibility import ProblemKind

    held = [(k, p) for k, r in enumerate((first, second)) for p in r.problems if p.kind is ProblemKind.ON_BOUND]
    # a bound holding estimates of one model only (bounds holding estimates of both are no restriction of one)
    if first.parameter_labels == second.parameter_labels and held and len({k for k, _ in held}) == 1 and reproduces():
        which = ("first", "second")[held[0][0]]
        held_words = [w for _, p in held for w in p.parameter_words()]
        return (f"the two models differ only by a bound, which holds {word_list(held_words)} at "
                f"{'its bound' if len(held_words) == 1 else 'their bounds'} in the {which} model: the {which} is a "
                f"restricted form of the other under an inequality restriction, which a test by degrees of freedom "
                f"cannot judge, both having the same degrees of freedom")
    return "the models have the same degrees of freedom" + (
        " and the same chi-square: they are probably equivalent models" if probably_equivalent(first, second)
        else ", so neither is a restricted form of the other")


def probably_equivalent(first: FitResult, second: FitResult) -> bool:
    """Whether two converged fits of the same rows are probably equivalent models: the same degrees of freedom and
    the same chi-square (to 1e-6 of it).  Equivalent models reproduce any data equally well (MacCallum, Wegener,
    Uchino & Fabrigar 1993), so no test and no information criterion (equal likelihoods and equal numbers of
    parameters give equal AIC and BIC) can choose between them: the one rule of the reason compare gives and of its
    advice."""
    if first.fit is None or second.fit is None or first.fit.df != second.fit.df:
        return False
    return abs(first.fit.chi_square - second.fit.chi_square) < 1e-6 * max(1.0, second.fit.chi_square)


def implied_moments(result: FitResult) -> list[tuple[str | None, SampleMoments]]:
    """Each group's model-implied moments, as if they were data of the same size."""
    out = []
    for group in result.groups:
        mean = group.implied_mean if group.implied_mean is not None else group.sample_mean
        out.append((group.label, SampleMoments(result.observed, group.implied_covariance, mean, group.data.n_obs,
                                               group.data.n_obs, 0, "implied moments")))
    return out


def general_at_implied(restricted: FitResult, spec: Spec, general: FitResult) -> Estimation:
    """The general model (``spec``, fitted as ``general``) fitted to the restricted model's implied moments (Satorra
    & Bentler's M10), from the general fit's own estimates, in that fit's layout: under full-information ML with the
    means the fit estimates, so that what the models hold of the means is compared too (a one-group model's
    intercepts held equal across factors), as the strictly positive scaled difference fits it
    (:func:`scaling_at_restricted`).  Before (newuser-s23, finding 5) the check fitted the complete-data layout,
    without means: a model whose statements name means or intercepts could not be built there (the comparison
    stopped on 'intercepts and factor means are estimated only in a fit with a mean structure'), and the general
    fit's estimates, of another length, were dropped for start values that hold the covariance of higher-order factors
    at 0, where two higher-order factors over two factors each are not identified (Rindskopf & Rose 1988): the
    check stopped at that start and missed a boundary nesting (four disturbance variances at 0) for some patterns of
    gaps."""
    implied = implied_moments(restricted)
    theta = general.theta
    if not general.method.full_information or theta is None:
        return estimate(spec, implied, FitOptions(), start=theta)
    from cfa_tool.estimation.ml import NormalLikelihood
    from cfa_tool.estimation.strategy import search
    from cfa_tool.pipeline.continuous import model_structure, ordered_moments

    table, model = model_structure(spec, tuple(label for label, _ in implied) if general.multigroup else None, True)
    if len(theta) != table.n_free:  # not the fit's own layout (missing-data helpers): the complete-data check
        return estimate(spec, implied, FitOptions())
    likelihood = NormalLikelihood(model, [ordered_moments(m, table.observed) for _, m in implied])
    found = search(likelihood, table, np.asarray(theta, dtype=float), FitOptions().max_iterations).result
    return Estimation(table, model, likelihood, found.theta, found.value, found.converged, found.iterations,
                      "converged" if found.converged else "the search did not converge")


def is_nested(restricted: FitResult, general_spec: Spec, general: FitResult) -> tuple[bool, str, Estimation | None]:
    """Whether ``restricted`` is nested in ``general``, the reason when it is not, and the
    general model fitted to the restricted model's implied moments (Satorra & Bentler's M10,
    :func:`general_at_implied`)."""
    if set(restricted.observed) != set(general.observed):
        return False, "the models use different variables, so they are not fitted to the same covariance matrix", None
    if restricted.multigroup != general.multigroup:
        return False, "one model is fitted in groups and the other is not", None
    if restricted.fit.df == general.fit.df:
        def reproduces() -> bool:  # the general model without its bounds, fitted to the restricted one's moments
            est = general_at_implied(restricted, replace(general_spec, bounds=()), general)
            return est.converged and est.value <= NESTING_TOLERANCE

        return False, same_degrees_of_freedom(restricted, general, reproduces), None
    if restricted.fit.df < general.fit.df:
        return False, "the first model does not have more degrees of freedom than the second", None
    est = general_at_implied(restricted, general_spec, general)
    if not est.converged:
        return False, "the nesting check did not converge", None
    if est.value > NESTING_TOLERANCE:
        return False, (f"the second model cannot reproduce the first model's implied covariances "
                       f"(discrepancy {discrepancy_text(est.value)}), so the first is not a special case of it"), None
    return True, "", est
