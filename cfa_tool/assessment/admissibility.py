"""Is the solution possible at all?  One admissibility assessment per solution.

An estimate outside its admissible range (a Heywood case; Dillon, Kumar & Mulani 1987)
makes a solution impossible for a population, whatever its fit indices say: negative
variances, correlations beyond +/-1, factor or residual covariance matrices that are not
positive definite, standardized loadings or R-squared above 1.  So are estimates held at
a bound the model sets, a search that did not converge, and a model that the data
cannot identify empirically (an information matrix that is singular in practice).
Each problem is reported with the parameters involved, the value, a plain-words
explanation and what the researcher can try; every view shows them first.
"""

from __future__ import annotations

import enum
import functools
import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from cfa_tool.numbers import count_text, counted, cut_list, rounded_number, user_number, word_list
from cfa_tool.errors import OptionError
from cfa_tool.language.names import reference_text, written_group, written_name
from cfa_tool.model.description import label_words, split_label
from cfa_tool.model.implied import ModelMatrices
from cfa_tool.model.parameters import ParameterTable
from cfa_tool.note_parts import Command, Note, Text, capitalised
from cfa_tool.numerics.linalg import cholesky_log_det
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.options import Option, taken_by

if TYPE_CHECKING:  # a saved fit's estimate rows, for the hints only (a fit that reads none does not import them)
    from cfa_tool.model.saved_estimates import SavedRow


class ProblemKind(enum.Enum):
    """What is wrong; ``value`` is the word the JSON uses, ``short`` the words a table row shows,
    ``inadmissible`` says whether the solution is impossible (True) or only needs a caution (False), and
    ``solution_caution`` whether that caution is one on a solution that is admissible but needs care in reading, which
    every view of several solutions (a comparison, a ladder, a replication) says first, as fit does
    (reporting.workflow_tables.SOLUTION_CAUTIONS, read from here: a new kind is declared one with its other words,
    s23: the list was kept by hand)."""

    def __new__(cls, word: str, short: str, inadmissible: bool, solution_caution: bool = False):
        member = object.__new__(cls)
        member._value_ = word
        member.short = short
        member.inadmissible = inadmissible
        member.solution_caution = solution_caution
        return member

    @classmethod
    def _missing_(cls, value):
        """A kind by the word an earlier version wrote into a saved fit's JSON (:data:`EARLIER_WORDS`), so that
        such a file is still read (report, scores --from-fit); None for any other word."""
        name = EARLIER_WORDS.get(value)
        return cls[name] if name is not None else None

    NOT_CONVERGED = ("not converged", "not converged", True)
    # the information matrix is singular at the solution: no unique estimates (a workflow reporting several models)
    NOT_IDENTIFIED = ("not identified", "not identified", True)
    # a Heywood case that drives the estimates without bound (errors.UnboundedSolution: ordinal items with thresholds,
    # whose residual variances are held at 1): no finite solution (a workflow reporting several models)
    UNBOUNDED_HEYWOOD = ("Heywood case without finite estimates", "not admissible: no finite estimates", True)
    NEGATIVE_RESIDUAL_VARIANCE = ("negative residual variance", "negative variance: impossible", True)
    NEGATIVE_FACTOR_VARIANCE = ("negative factor variance", "negative variance: impossible", True)
    FACTOR_CORRELATION_BEYOND_ONE = ("factor correlation beyond +/-1", "correlation beyond +/-1: impossible", True)
    RESIDUAL_CORRELATION_BEYOND_ONE = ("residual correlation beyond +/-1", "correlation beyond +/-1: impossible", True)
    FACTOR_COVARIANCES_NOT_POSITIVE_DEFINITE = ("factor covariance matrix not positive definite",
                                                "in a matrix that is not positive definite", True)
    RESIDUAL_COVARIANCES_NOT_POSITIVE_DEFINITE = ("residual covariance matrix not positive definite",
                                                  "in a matrix that is not positive definite", True)
    # with cross-loadings or correlated factors a standardized loading above 1 is possible (Joreskog 1999)
    STANDARDIZED_LOADING_ABOVE_ONE = ("standardized loading above 1", "standardized above 1", False, True)
    ON_BOUND = ("estimate on a bound", "held at a bound", True)
    EMPIRICALLY_UNDERIDENTIFIED = ("empirically under-identified", "barely determined by the data", True)
    # not of the solution but of its standard errors: a sampling design with too few clusters
    FEW_CLUSTERS = ("too few clusters", "too few clusters", False)
    # nor of a solution: random halves drawn cluster by cluster from a handful of clusters, which are those clusters
    # rather than samples of them (replicate --data, explore --split: data.halves.few_clusters_caution)
    HALVES_OF_FEW_CLUSTERS = ("halves of few clusters", "halves are the clusters", False)
    # nor of the solution: a design-based test whose scaling is extreme (pipeline.inputs.extreme_scaling) or one
    # cluster holding most of the design effect of the statistics (data.sample_design.DominantCluster), so the
    # cluster-robust standard errors and the design-based test describe that cluster
    DESIGN_DOMINATED = ("design-based test extreme or dominated by one cluster", "one cluster dominates", False)
    # sampling weights so uneven that the rows count as few (Kish's effective sample size)
    SMALL_EFFECTIVE_SAMPLE = ("small effective sample", "small effective sample", False)
    # frequency weights that make N many times the rows: likely expansion (sampling) weights read as counts
    FREQUENCY_WEIGHTS_LARGE = ("frequency weights far above the rows", "weights count many rows", False)
    # groups with rows in the same strata, their design-based errors computed as if each group were drawn apart
    GROUPS_SHARE_STRATA = ("groups share strata", "groups share strata", False)
    # not of the solution but of the data: values in item columns that look like no answers (data.odd_values)
    VALUES_NOT_ANSWERS = ("values that look like no answers", "values that look like no answers", False)
    # the same of codes the items share, set apart from their answer scale in more cells than a typing error leaves
    # (data.odd_values, OddKind.SET_APART: 8 'don't know' and 9 'refused' beside answers 1 to 5), analysed as answers
    CODES_SET_APART = ("codes set apart from the answer scale", "codes beside the scale", False)
    # not of the answers but of the reading: the row given as the row of column names looks like a row of answers
    # below a row of names (data.readers.AnswersAsNames): a respondent left out, the columns named by answers
    ANSWERS_READ_AS_NAMES = ("a row of answers read as the column names", "answers read as names", False)
    # ... rows that the first row of data given left unread though they hold answers (data.readers.SkippedAnswers)
    ANSWERS_LEFT_UNREAD = ("rows of answers left unread", "answers left unread", False)
    # not of the solution but of the data: a no-answer code that a row filter's, group, cluster or strata column keeps
    # as a value (pipeline.column_codes; --missing-codes applies to the items only)
    CODE_KEPT_AS_VALUE = ("no-answer code kept in a column choosing rows", "code kept as a value", False)
    # not of the solution but of the data: a missing-data helper of more than two categories that its SPSS file
    # measures as nominal, whose codes enter the likelihood as one number (data.labels.HelperCategories)
    HELPER_UNORDERED = ("missing-data helper of unordered categories", "unordered categories as a number", False)
    # values the data file itself marks as no answer, read as missing (data.non_answers): said, not a problem
    VALUES_READ_AS_MISSING = ("values the file marks as no answer", "read as missing", False)
    # not of the solution but of the data: fewer rows than the model has free parameters (one group)
    SMALL_SAMPLE = ("fewer rows than parameters", "fewer rows than parameters", False, True)
    # not of the solution but of the data: group labels that differ only in case ('north', 'North'), kept apart
    GROUP_LABELS_BY_CASE = ("group labels differing only in case", "labels differing only in case", False)
    # the same of a cluster or strata column ('School A', 'school a'): two clusters, so clustering understated
    DESIGN_LABELS_BY_CASE = ("cluster or stratum labels differing only in case", "labels differing only in case",
                             False)
    # not of the solution but of the data: an item whose answers lie on shifted codes in different groups (0 to 4 in
    # one, 1 to 5 in another: data.shifted_scales), which reads as non-invariance of its intercept or thresholds
    SHIFTED_CODES_IN_GROUPS = ("answers on shifted codes in different groups", "codes shifted between groups", False)
    # not of the solution but of the data: an item answered by few of the rows (pipeline.inputs.with_odd_values)
    FEW_ANSWERS = ("item answered by few rows", "answered by few rows", False)
    # not of the solution but of the data: a pair of items answered together by few of the rows, whose correlation
    # rests on those rows (pipeline.inputs.few_answers_problems)
    FEW_ANSWERED_TOGETHER = ("pair of items answered together by few rows", "answered together by few rows", False)
    # not of the solution but of the data: an item answered alike by all rows but a few (the same rule, extended:
    # its variance rests on those rows; pipeline.inputs.few_answers_problems)
    NEARLY_CONSTANT = ("item answered alike by nearly every row", "nearly constant", False)
    # a method or bifactor-like factor whose standardized loadings are all small (assessment.method_factors)
    WEAK_METHOD_FACTOR = ("weak method factor", "small loadings only", False, True)
    # a factor whose loadings mostly run against its items' keying (assessment.reliability.keying_problems): its
    # correlations, mean differences and scores read the wrong way
    FACTOR_POINTS_AGAINST_ITEMS = ("factor points against its items", "points against its items", False, True)
    # a 'reversed' statement that the loadings' signs contradict (assessment.reliability.keying_problems): items
    # declared reversed that load with the factor's other items, or items not declared that load against them (a
    # typing error in the statement, or answers coded the other way), so the factor's keyed sum adds items running
    # against each other and its omega and alpha describe no scale
    KEYING_AGAINST_LOADINGS = ("declared keying contradicted by the loadings", "against the declared keying", False,
                               True)
    # a factor's marker whose standardized loading is negligible (assessment.markers): the other loadings' values,
    # standard errors and tests depend on it, and the factor takes its direction from it
    WEAK_MARKER = ("marker that hardly measures its factor", "marker hardly loads", False, True)
    # not of the solution but of the data: rows that gave one answer to every item, reverse-worded ones included
    # (data.same_answers), kept in the analysis
    SAME_ANSWER_ROWS = ("same answer to every item", "same answer throughout", False)
    # not of the data's answers but of its rows: rows identical in every column to an earlier row (data.copied_rows),
    # kept in the analysis; copies count twice, so N is too large and the standard errors too small
    COPIED_ROWS = ("rows identical to earlier rows", "copies of rows", False)
    # not of the solution but of the data: a 'reversed ... on MIN to MAX' scale that no answer reaches at one end
    # (pipeline.inputs.scale_ends_problems): the keyed sums' means depend on the scale declared
    SCALE_ENDS_UNREACHED = ("declared scale wider than the answers", "scale ends unreached", False)
    # not of the solution but of the data: more than a share of the rows left out listwise for a missing answer
    # (pipeline.continuous.listwise_problem): the rows kept may differ from those left out
    ROWS_LEFT_OUT = ("rows left out listwise", "rows left out", False)
    # not of the solution but of the data: more than the same share of the rows left out because they answered no
    # model variable (pipeline.continuous.unanswered_problem: survey break-offs, say), by full-information ML or
    # pairwise present rows, which keep every row with an answer
    ROWS_WITHOUT_ANSWERS = ("rows that answered no model variable", "rows without answers", False)
    # not of the solution but of the data: a group with fewer rows than its model has free parameters
    SMALL_GROUP = ("group smaller than its model", "fewer rows than parameters", False)
    # not of the solution but of the data: a group every row of which has weight 0, so not in the analysis
    GROUP_WEIGHTED_OUT = ("group whose rows all have weight 0", "group weighted out", False)
    # not of the solution but of the data scored with an earlier fit (workflows.factor_scores): rows in groups the fit
    # does not have (no scores), and answers outside those of the rows the fit analysed (scores extrapolate)
    # not an impossible solution but a model these data do not support: CFI or RMSEA beyond the bounds of poor fit
    # (assessment.fit_indices.POOR_FIT_BOUNDS, read from the figures the report says to read)
    POOR_FIT = ("poor fit", "poor fit", False)
    # not of the solution but of its fit indices: a baseline (independence) model whose own RMSEA is below the rule of
    # thumb (assessment.fit_indices.UNINFORMATIVE_BASELINE_RMSEA), so that CFI and TLI are bounded by how little it
    # misfits and are read beside RMSEA, SRMR and the residuals; ranked after every other problem (solution_first)
    # (its word, a kind like the others' and no advice, s23: 'baseline model misfits little: read CFI and TLI beside
    # RMSEA and SRMR'; the kind's own name, s26: 'weakly correlated items', which the caution no longer says of items
    # that correlate well within their factors; a saved fit of earlier versions still lists either: EARLIER_WORDS)
    UNINFORMATIVE_BASELINE = ("uninformative baseline", "CFI and TLI bounded by the baseline", False)
    # not of the solution but of the sample: a row filter that selects rows by their answers to a model item
    # (pipeline.row_filter_cautions): the item's range is restricted, its correlations changed
    SELECTED_ON_ITEM = ("rows selected on a model item", "selected on an item", False)
    # a row filter comparing a label that several codes of a coded column carry: it keeps the rows of them all
    FILTER_LABEL_OF_SEVERAL_CODES = ("row filter label of several codes", "label of several codes", False)
    # a row filter comparing text that the column also holds in other upper and lower case ('North' for 'north')
    FILTER_LABELS_BY_CASE = ("row filter text differing only in case", "labels differing only in case", False)
    # not of the solution but of the data: a workbook read without a sheet named whose other sheets hold the model's
    # items too (data.readers.OtherSheets): only one sheet of a survey split over sheets was analysed
    OTHER_SHEETS_WITH_ITEMS = ("other sheets with the model's items", "other sheets hold the items", False)
    # not of the answers but of the rows: rows a workbook hides (by its filter or by hand), read and analysed as the
    # file holds them (data.readers.HiddenRows); their own kind, not the values that look like no answers (s21)
    HIDDEN_ROWS = ("rows the workbook hides", "hidden rows analysed", False)
    # ... rows an SPSS file's saved case filter marks 'Not Selected', read and analysed as the file holds them
    # (data.case_filter.FilterVariable)
    DESELECTED_ROWS = ("rows a saved case filter deselects", "deselected rows analysed", False)
    # not of the solution but of the data: a code given with --missing-codes that lies between the items' other
    # answers, labelled or not (data.missing_codes.CodeOnAnswer): its answers were read as gaps
    ANSWERS_GIVEN_AS_MISSING = ("answers given as missing codes", "answers read as gaps", False)
    # the data file's own declaration of missing values on an answer between the items' other answers
    ANSWERS_DECLARED_MISSING = ("answers the file declares missing", "answers read as gaps", False)
    UNKNOWN_GROUPS_SCORED = ("rows in groups the fit does not have", "groups the fit lacks", False)
    # not of the solution but of the rows: ids of the id column (or row names) that name several rows, so nothing
    # merged by them (a scores file) matches the rows one to one (pipeline.inputs.repeated_id_problems)
    REPEATED_IDS = ("ids that name several rows", "repeated ids", False)
    # ... and rows of one id that give the same answers to every item as an earlier row of it: a respondent who
    # submitted twice, counted twice (new-user trial s27), named apart and before the other repeated ids
    SUBMITTED_TWICE = ("rows of one id with the same answers to every item", "submitted twice", False)
    # ... and a column named as the id of teams, schools or classes (data.column_roles.unit_id_column) whose units the
    # design does not take for clusters: their members' rows analysed as independent cases (s26: said as people
    # answering twice)
    UNIT_ROWS_AS_INDEPENDENT = ("rows of one team or school as independent cases", "units not clusters", False)
    ANSWERS_BEYOND_FITTED = ("answers beyond the fitted rows", "answers beyond the fit's", False)
    # not of the solution but of the rows scored: an item that runs against its factor in the scored file while its
    # loading in the earlier fit runs with it (coded the other way round: workflows.factor_scores)
    # not of the solution but of the scores: item sums or means of a factor whose items' intercepts, loadings or
    # thresholds the model sets apart between groups while it compares the factor's means (partial invariance): the
    # groups' sums differ by those items' own shifts (scoring.item_sums.group_shifts)
    ITEM_SUMS_ACROSS_GROUPS = ("item sums that do not compare across groups", "item sums across groups", False)
    # not of the solution but of the scores: factor scores of several groups whose factor means the model fixes at
    # zero in every group, so that each group's scores are centred at 0 (workflows.factor_scores
    # .not_comparable_problems)
    SCORES_NOT_COMPARABLE_ACROSS_GROUPS = ("scores that do not compare across groups", "groups not comparable", False)
    ITEM_AGAINST_FITTED_LOADING = ("item against its fitted loading", "coded the other way?", False)
    # not of the solution but of the rows scored: an ordinal item's lowest or highest answer, which the earlier fit's
    # thresholds expect in many rows scored, in none of them (a file coded 1 higher with its top answer read as no
    # answer: workflows.factor_scores)
    END_ANSWERS_UNUSED = ("end answers the fit expects, never given", "end answer unused", False)
    # not of the solution but of the rows scored: a factor score of a row that answered none of the factor's items,
    # which rests on the other factors' items alone (through the factors' correlations)
    SCORED_WITHOUT_OWN_ANSWERS = ("scores without the factor's own answers", "scored without its items", False)
    # the same rows' scores of such a factor left empty, as asked (scoring.methods.UnansweredFactor.LEAVE_EMPTY)
    FACTOR_SCORES_LEFT_EMPTY = ("factor scores left empty: none of the factor's items answered", "left empty", False)
    # not of the solution but of the scores: their reliability below what decisions about individuals usually need
    SCORES_LESS_RELIABLE = ("scores less reliable than decisions about individuals need", "less reliable scores",
                            False)
    # not of the solution but of the scores: two scored factors whose correlation in the model is near 1, handed out
    # as two traits while their scores measure nearly the same thing
    SCORED_FACTORS_HARDLY_DISTINCT = ("scored factors hardly distinct", "hardly distinct", False)
    # a possible solution whose two trait factors correlate nearly 1 (:data:`HARDLY_DISTINCT` or more in size): the
    # data hardly tell them apart, so reading them as two traits may mislead (:func:`indistinct_problems`)
    FACTORS_HARDLY_DISTINCT = ("factors that correlate nearly 1", "nearly the same factor", False, True)
    # not of a solution but of the rows a check screened: gaps that leave full-information ML's saturated model
    # without an estimate (pairs of items no row answers together, or too few answers together), which a fit stops at
    # (assessment.missingness.sparse_answers_problem)
    SPARSE_ANSWERS = ("answers too sparse for full-information ML", "too few answers together", False)
    # not of the solution but of its test: a scaling factor of the robust test that is not positive, so the scaled
    # statistic (or the robust CFI and TLI) cannot be computed (inference.robust.robust_fit)
    SCALED_TEST_NOT_COMPUTED = ("scaled test not computed", "no scaled test", False, True)
    # not of the solution but of the answers: tails so far from normal ones (assessment.normality.departs_materially)
    # that the normal-theory chi-square and standard errors of a fit without the robust ones are off
    # (:func:`non_normal_problems`)
    NON_NORMAL_ANSWERS = ("answers far from multivariate normal", "non-normal answers", False)


#: problems not of the solution but of the sampling design it was fitted under (the methods paragraph states them
#: beside the design)
DESIGN_CAUTIONS = frozenset({ProblemKind.FEW_CLUSTERS, ProblemKind.DESIGN_DOMINATED, ProblemKind.SMALL_EFFECTIVE_SAMPLE,
                             ProblemKind.FREQUENCY_WEIGHTS_LARGE, ProblemKind.GROUPS_SHARE_STRATA})

#: the design's cautions whose figures differ between models of the same rows by each model's count of free parameters
#: alone (too few clusters for them), which the first box of rival models says once, naming the models it concerns,
#: as their methods paragraph does (new-user trial s28); a cluster that dominates the design-based test has each model's
#: own figures (its scaling factor), said of that model
SAID_ONCE_FOR_RIVALS = frozenset({ProblemKind.FEW_CLUSTERS})

#: the design's cautions that say its scaled test and robust indices mean little (too few clusters for the parameters,
#: a design-based test whose scaling is extreme or dominated by one cluster): the fit table then recommends none of
#: them, and the invariance paragraph calls no step held or not held by such a test alone
DOUBTED_BY_THE_DESIGN = frozenset({ProblemKind.FEW_CLUSTERS, ProblemKind.DESIGN_DOMINATED})


def design_doubts(result) -> bool:
    """Whether a caution of the sampling design says that the fit's scaled test means little (re-check s18: the table
    still called it 'the test to read for these data')."""
    return any(p.kind in DOUBTED_BY_THE_DESIGN for p in getattr(result, "problems", ()))


#: the size of a correlation of two trait factors at or above which they are said to be hardly distinct (a line of
#: this tool, above the .85 to .90 that common practice reads as a sign that two factors are not distinct: Henseler,
#: Ringle & Sarstedt 2015 for the HTMT, recalled); the fit's caution and the scores' use it
HARDLY_DISTINCT = 0.95


#: rows per free parameter a common rule of thumb asks for (Bentler & Chou 1987, recalled from memory: as low as 5
#: under normal theory when loadings are large and factors have many items, better 10); a note below it, not a cutoff
#: of its own.  It is common practice, not a finding: simulation studies (Jackson 2003; Wolf, Harrington, Clark &
#: Miller 2013, both recalled from memory) found the rows a model needs to depend more on its loadings, its items
#: per factor and the whole N than on this ratio.
ROWS_PER_PARAMETER = 5
#: the rule in words, in the cautions of a small sample and of a small group alike
ROWS_RULE = (f"a common rule of thumb, after Bentler & Chou 1987, asks for at least {ROWS_PER_PARAMETER} rows "
             f"per parameter; a convention, not a law")  # (no parenthesis: the cautions say it inside theirs)


@dataclass(frozen=True)
class RowsPerParameter:
    """The facts of the rule of rows per parameter for the sample (``group`` None) or one group of several: its rows,
    its model's free parameters as the rule counts them (:func:`counted_parameters`, :func:`group_parameter_counts`)
    and the item means a full-information fit estimates beside them, or a group's item intercepts, that the count
    leaves out (``uncounted``), and a group's thresholds of ordinal items, which it leaves out too (``thresholds``).
    The one record that the report's caution and note and the methods paragraph each only word."""

    rows: float
    parameters: int
    group: str | None = None
    uncounted: int = 0
    thresholds: int = 0

    @property
    def per_parameter(self) -> float:
        """Rows per free parameter."""
        return self.rows / self.parameters

    def ratio(self) -> str:
        """Rows per parameter to one decimal, cut rather than rounded, so that 104 rows for 21 parameters (4.95)
        read '4.9', not the '5.0' the rule asks for."""
        return f"{math.floor(self.per_parameter * 10) / 10:.1f}"

    @property
    def fewer_rows_than_parameters(self) -> bool:
        """Below one row per parameter: the caution that opens every view (else, below the rule, a note)."""
        return self.rows < self.parameters

    def figures(self) -> str:
        """'165 rows for 54 parameters, 3.1 per parameter': the figures, plainly."""
        return f"{count_text(self.rows)} rows for {self.parameters} parameters, {self.ratio()} per parameter"

    def besides(self) -> str:
        """The item means a one-group count leaves out, named (' (not counting the 9 item means that
        full-information ML estimates beside them)'), or a group's item intercepts and thresholds (' (not counting its
        9 item intercepts)', ' (not counting its 72 thresholds)'); '' without."""
        n = self.uncounted
        if (n or self.thresholds) and self.group is not None:
            return f" (not counting its {left_out_words(n, self.thresholds)})"
        return (f" (not counting the {n} item mean{'s' if n != 1 else ''} that full-information ML estimates beside "
                f"{'them' if n != 1 else 'it'})" if n else "")

    def to_dict(self) -> dict:
        return {"rows": self.rows, "parameters": self.parameters, "group": self.group, "uncounted": self.uncounted,
                "thresholds": self.thresholds}


def left_out_words(intercepts: int | None, thresholds: int | None) -> str:
    """What a group's count of parameters leaves out, in words ('9 item intercepts', '72 thresholds', '9 item
    intercepts and 72 thresholds'); a count None is one the groups do not share ('item intercepts')."""
    parts = [(f"{intercepts} " if intercepts is not None else "") + f"item intercept{'s' if intercepts != 1 else ''}"
             if intercepts != 0 else "",
             (f"{thresholds} " if thresholds is not None else "") + f"threshold{'s' if thresholds != 1 else ''}"
             if thresholds != 0 else ""]
    return word_list(p for p in parts if p)


def rows_per_parameter(rows: Sequence[float], free: Sequence[int], groups: Sequence[str] | None = None,
                       uncounted: int | Sequence[int] = 0,
                       thresholds: Sequence[int] = ()) -> tuple[RowsPerParameter, ...]:
    """The sample (``groups`` None; ``rows`` and ``free`` then hold one number each) or the groups of several
    (``groups`` their labels, ``rows`` and ``free`` one number per group) below :data:`ROWS_PER_PARAMETER` rows per
    free parameter of their model (a model without free parameters is below nothing).  Which groups are named: each
    group of several is judged on its own model's parameters, those its rows estimate (a parameter held equal across
    groups counts in each), because in a multi-group model each group's rows estimate their own covariance structure
    and means (Sorbom 1974, recalled from memory); so every group below the rule is named with its figures, large or
    small (departments of 165 to 260 people under a 54-parameter model are 3.0 to 4.8 rows per parameter, and the
    note says those figures, not that the groups are small).  The counts leave out the item means, in one group and
    in each of several alike (:func:`counted_parameters`, :func:`counted_group_parameters`): the same rows under the
    same model are judged alike whether they are a sample or a group (new-user trial s17: a group of 311 rows was
    below the rule and a sample of 300 rows was not); ``uncounted``: the means left out, one number for the sample
    or one per group, which the note names; ``thresholds``: each group's thresholds of ordinal items, left out as a
    one-group ordinal fit leaves them out (they are its first-step statistics, not among its free parameters: new-user
    trial s21, a group of 360 rows counted 93 parameters with its 72 thresholds and the same rows alone 21).  The rule
    is a rule of thumb, common practice, not a finding (see :data:`ROWS_PER_PARAMETER`)."""
    several = groups is not None
    left_out = tuple(uncounted) if isinstance(uncounted, Sequence) else (uncounted,) * len(rows)
    steps = tuple(thresholds) or (0,) * len(rows)
    return tuple(RowsPerParameter(n, q, label, u, k)
                 for label, n, q, u, k in zip(groups if several else (None,), rows, free, left_out, steps)
                 if q > 0 and n < ROWS_PER_PARAMETER * q)


def sample_size_problems(rows: Sequence[float], free: Sequence[int], groups: Sequence[str] | None = None,
                         uncounted: int | Sequence[int] = 0,
                         thresholds: Sequence[int] = ()) -> tuple[tuple["Problem", ...], tuple[str, ...]]:
    """The one rule of rows per parameter (:func:`rows_per_parameter`) in the report's words: a caution (first in
    every view) for a sample or group with fewer rows than its model's free parameters, and a note naming those with
    fewer than :data:`ROWS_PER_PARAMETER` rows per parameter (a common rule of thumb; Bentler & Chou 1987, recalled
    from memory: a convention, not a law), with their figures.  ``free`` counts the model's parameters the same way
    whatever the estimator (:func:`counted_parameters`); ``uncounted``: the item means a one-group fit estimates
    beside them and the count leaves out, named so that the count agrees with the fit's table of free parameters;
    ``thresholds``: each group's thresholds of ordinal items, left out and named too.  Returns (problems, notes)."""
    several = groups is not None
    below = rows_per_parameter(rows, free, groups, uncounted, thresholds)
    problems = tuple(_small_sample_problem(facts, several) for facts in below if facts.fewer_rows_than_parameters)
    noted = [facts for facts in below if not facts.fewer_rows_than_parameters]
    if not noted:
        return problems, ()
    if not several:
        (facts,) = noted
        return problems, (f"{count_text(facts.rows)} rows for the {facts.parameters} free parameters of the model"
                          f"{facts.besides()}, fewer than {ROWS_PER_PARAMETER} per parameter ({facts.ratio()} per "
                          f"parameter; {ROWS_RULE}): with fewer rows per parameter, estimates and fit indices vary "
                          f"more from sample to sample",)
    labels = tuple(groups)
    each = [f"{written_group(f.group, labels)} ({f.figures()})" for f in noted]
    listed = word_list(each)
    means, steps = {f.uncounted for f in noted}, {f.thresholds for f in noted}
    shared = left_out_words(means.pop() if len(means) == 1 else None if 0 not in means else 0,
                            steps.pop() if len(steps) == 1 else None if 0 not in steps else 0)
    besides = f", not counting its {shared}" if shared else ""
    return problems, (f"group{'s' if len(each) > 1 else ''} {listed}: fewer than {ROWS_PER_PARAMETER} rows per "
                      f"free parameter of the group's model{besides} ({ROWS_RULE}): with fewer rows per parameter, a "
                      f"group's estimates, and every comparison with the other groups, vary more from sample to "
                      f"sample",)


def _small_sample_problem(facts: RowsPerParameter, several: bool) -> "Problem":
    """The caution of a sample or group with fewer rows than its model's free parameters, in the report's words."""
    whose = "this group's model" if several else "the model"
    also = "its estimates, and every comparison with the other groups," if several else "every estimate and fit index"
    return Problem(
        ProblemKind.SMALL_GROUP if several else ProblemKind.SMALL_SAMPLE, (), float(facts.rows),
        f"{count_text(facts.rows)} rows for the {facts.parameters} free parameters of {whose}{facts.besides()}: {also} "
        f"rest{'' if several else 's'} on too few answers"
        + ("" if several else ", and a CFI of 1 or a TLI above 1 then says little about fit")
        + f" (fewer rows than parameters; {ROWS_RULE}).",
        Note(("gather more rows for this group, join it with a similar group by recoding the group column, or leave "
              "it out with a row filter", Command(f" ({Option.KEEP})"), ".")) if several else
        "gather more rows, or fit a smaller model (fewer items or factors); do not judge this fit against the guide "
        "values of the fit indices.", facts.group, facts)


def counted_parameters(free: int, labels: Iterable[str]) -> int:
    """The free parameters of a one-group model as the rule of rows per parameter counts them: ``free`` (as the fit
    counts them) less the item intercepts among ``labels`` (the free parameters' labels), which only full-information
    ML adds to a one-group model, as the items' saturated means (a one-group model has no mean structure of its
    own): so one missing cell does not change the count.  Groups of several keep their intercepts, part of every
    multi-group model whatever the estimator."""
    return free - sum(1 for label in labels if label.startswith("intercept("))  # a label begins with its kind


def solution_first(problems: Iterable["Problem"]) -> tuple["Problem", ...]:
    """``problems`` with those that make the solution not admissible first (a fit's data cautions, which it puts
    before its own problems, after them: a new-user trial found a harmless note on missing-value words above a
    negative variance), each kind's order kept; the caution on a baseline model that misfits little
    (:func:`uninformative_baseline_problems`), which says how to read two indices rather than what is wrong with the
    solution or the data, last (it stood above a poor fit's caution on a realistic 25-item scale, s19)."""
    return tuple(sorted(problems, key=lambda p: (not p.kind.inadmissible,
                                                 p.kind is ProblemKind.UNINFORMATIVE_BASELINE)))


def one_sample_size_problems(rows: float, free: int, labels: Sequence[str]) -> tuple[tuple["Problem", ...],
                                                                                     tuple[str, ...]]:
    """:func:`sample_size_problems` of a one-group model with ``free`` parameters as the fit counts them and
    ``labels`` their labels: counted by :func:`counted_parameters`, the item means it leaves out named."""
    counted = counted_parameters(free, labels)
    return sample_size_problems((rows,), (counted,), uncounted=free - counted)


def free_parameters(result) -> int:
    """The free parameters of a fit as its views count them (an ordinal fit's thresholds, first-step statistics in
    one group and parameters in a comparison's or ladder's groups, are not among them): the count the design's
    cautions weigh."""
    return result.fit.n_free_parameters if result.fit is not None else len(result.parameter_labels)


def design_cautions(results) -> tuple[object | None, tuple]:
    """(the fit, its design cautions) among fits of the same rows under one design: those of the fit with the most
    free parameters, which they weigh on most; (None, ()) when no fit has one."""
    doubted = [r for r in results if any(p.kind in DESIGN_CAUTIONS for p in getattr(r, "problems", ()))]
    if not doubted:
        return None, ()
    most = max(doubted, key=free_parameters)
    return most, tuple(p for p in most.problems if p.kind in DESIGN_CAUTIONS)


def design_cautions_by_kind(results) -> list[tuple[object, Problem, list]]:
    """The design cautions of fits of the same rows whose cautions differ in their figures (each model its own count
    of free parameters), each kind once: (the fit whose words say it, the caution, the other fits it concerns), in the
    words of the fit with the most free parameters that has it, which it weighs on most.  The one rule of the
    methods paragraph and of the first box of several models (new-user trials s27 and s28: three models of one design
    repeated the same caution of too few clusters three times)."""
    own = [(r, tuple(p for p in getattr(r, "problems", ()) if p.kind in DESIGN_CAUTIONS)) for r in results]
    said: set = set()
    out = []
    for r, found in sorted(((r, found) for r, found in own if found), key=lambda pair: free_parameters(pair[0]),
                           reverse=True):
        for p in found:
            if p.kind in said:
                continue
            said.add(p.kind)
            out.append((r, p, [o for o, theirs in own if o is not r and any(q.kind is p.kind for q in theirs)]))
    return out


@dataclass(frozen=True)
class Problem:
    """One problem of a solution.  ``parameters`` are parameter labels as the parameter table writes them
    (``residual_variance(x9)``, ``factor_covariance(F1, F2)``, ``loading(F1, x1)``): stable keys for
    programs; :meth:`parameter_words` gives them in the words every view prints.  ``group`` names the
    group when the model has several."""

    kind: ProblemKind
    parameters: tuple[str, ...]
    value: float | None
    explanation: Text  # words, or a Note naming an option the user gave (a data file's codes of no answer)
    advice: Text  # words, or a Note whose command the views whose reader runs the program show (note_parts)
    group: str | None = None
    # the facts of a sample or group with fewer rows than its model's parameters (SMALL_SAMPLE, SMALL_GROUP), which
    # the methods paragraph words in its own voice
    rows_per_parameter: RowsPerParameter | None = None

    def to_dict(self) -> dict:
        value = None if self.value is None or not np.isfinite(self.value) else float(self.value)
        facts = {} if self.rows_per_parameter is None else {"rows_per_parameter": self.rows_per_parameter.to_dict()}
        return {"kind": self.kind.value, "inadmissible": self.kind.inadmissible, "parameters": list(self.parameters),
                "parameters_in_words": list(self.parameter_words()), "value": value, "group": self.group,
                "explanation": str(self.explanation), "advice": str(self.advice)} | facts | {
                    # the words with their commands apart, so that a view of a saved fit (scores from it) writes them
                    # as a fresh fit's views do: a manuscript without options and statements of the model file
                    f"{name}_parts": text.to_dict()["parts"] for name, text in (("explanation", self.explanation),
                                                                               ("advice", self.advice))
                    if isinstance(text, Note)}

    def parameter_words(self) -> tuple[str, ...]:
        """The parameters in plain words ('the loading of helpful on courtesy in group north')."""
        return tuple(label_words(label) for label in self.parameters)

    def line(self) -> Text:
        """The problem as the views list it: the explanation, then what to try."""
        return self.explanation + " What to try: " + self.advice

    def phrase(self, quoted: bool = False, groups: Sequence[str] = ()) -> str:
        """The problem in the words of a methods paragraph, e.g. 'a negative residual variance of x9 (-1.02)';
        ``quoted`` writes its names in double quotes unless plain (language.names.written_name), for the paragraph's
        lists, in which a name's commas would run into the list's; ``quoted`` or ``groups`` (the fit's labels) write
        its group as every text names a group among them (language.names.written_group)."""
        written = written_name if quoted else str
        names = tuple(written(n) for n in _names(self.parameters[0])) if self.parameters else ()
        v = f"{self.value:.2f}" if self.value is not None and np.isfinite(self.value) else ""
        keyed = [written(_names(label)[-1]) for label in self.parameters]  # the items of loadings, for their kinds
        rows = counted(int(self.value), "row") if v else "rows"  # a count of rows, where the problem is one
        K = ProblemKind
        text = {
            K.NOT_CONVERGED: "the estimation did not converge",
            K.NOT_IDENTIFIED: "a model that the data do not identify",
            K.NEGATIVE_RESIDUAL_VARIANCE: f"a negative residual variance of {', '.join(names)} ({v})",
            K.NEGATIVE_FACTOR_VARIANCE: f"a negative variance of factor {', '.join(names)} ({v})",
            K.FACTOR_CORRELATION_BEYOND_ONE: f"a correlation of factors {word_list(names)} of {v}",
            K.RESIDUAL_CORRELATION_BEYOND_ONE: f"a residual correlation of {word_list(names)} of {v}",
            K.FACTOR_COVARIANCES_NOT_POSITIVE_DEFINITE: "a factor covariance matrix that is not positive definite",
            K.RESIDUAL_COVARIANCES_NOT_POSITIVE_DEFINITE: "a residual covariance matrix that is not positive definite",
            K.STANDARDIZED_LOADING_ABOVE_ONE: f"a standardized loading of {names[-1] if names else ''} above 1 ({v})",
            K.ON_BOUND: f"{word_list(label_words(label, quoted=quoted, groups=tuple(groups)) for label in self.parameters)} "
                        f"held at a bound",
            K.EMPIRICALLY_UNDERIDENTIFIED: "parameters that the data barely determine",
            K.FEW_CLUSTERS: f"cluster-robust standard errors from only {v.split('.')[0]} clusters",
            K.HALVES_OF_FEW_CLUSTERS: f"halves drawn from only {v.split('.')[0]} clusters, which are those clusters "
                                      f"rather than samples of them",
            K.DESIGN_DOMINATED: "a design-based test whose scaling is extreme or a design effect that one cluster "
                                "dominates, so that the cluster-robust standard errors and test say little",
            K.SMALL_EFFECTIVE_SAMPLE: f"very uneven weights (Kish's effective sample size {v})",
            K.FREQUENCY_WEIGHTS_LARGE: f"frequency weights counting {v.split('.')[0]} rows, far more than the rows "
                                       f"analysed (expansion weights read as counts?)",
            K.GROUPS_SHARE_STRATA: "groups sharing strata, whose standard errors treat each group as drawn apart "
                                   "within each stratum",
            K.SMALL_SAMPLE: f"fewer rows ({v.split('.')[0]}) than free parameters of the model",
            K.GROUP_LABELS_BY_CASE: "group labels that differ only in upper and lower case, analysed as different "
                                    "groups",
            K.DESIGN_LABELS_BY_CASE: "cluster or stratum labels that differ only in upper and lower case, analysed "
                                     "as different clusters or strata",
            K.VALUES_NOT_ANSWERS: "values in the data that look like no answers (a missing-value code or a totals row)",
            K.CODES_SET_APART: "values that the items share apart from their answer scale, as codes of no answer are "
                               "given, analysed as answers",
            K.ANSWERS_READ_AS_NAMES: "a row that looks like a respondent's answers, read as the column names",
            K.ANSWERS_LEFT_UNREAD: "rows that look like respondents' answers, left unread above the first row of data",
            K.CODE_KEPT_AS_VALUE: "a no-answer code kept as a value in a column that chooses or groups the rows",
            K.VALUES_READ_AS_MISSING: "values that the data file marks as no answer (by their value labels, as declared "
                                      "missing values, or as text such as 'refused') were treated as missing",
            K.SHIFTED_CODES_IN_GROUPS: "items whose answers lie on shifted codes in different groups (0 to 4 in one, "
                                       "1 to 5 in another), read as differences between the groups",
            K.FEW_ANSWERS: "items answered by few of the rows",
            K.FEW_ANSWERED_TOGETHER: "pairs of items answered together by few of the rows",
            K.ROWS_LEFT_OUT: f"{rows} left out listwise for a missing answer",
            K.ROWS_WITHOUT_ANSWERS: f"{rows} left out because they answered no model variable",
            K.SCALE_ENDS_UNREACHED: "a scale declared for reverse-keyed items whose ends no answer reaches",
            K.NEARLY_CONSTANT: "items answered alike by all rows but a few",
            K.SELECTED_ON_ITEM: "a row filter selecting rows by their answers to a model item (range restriction)",
            K.FILTER_LABEL_OF_SEVERAL_CODES: "a row filter on a value label that several codes carry, whose rows it "
                                             "took together",
            K.OTHER_SHEETS_WITH_ITEMS: "a workbook whose other sheets hold the model's items too, of which one sheet "
                                       "was analysed",
            K.HIDDEN_ROWS: "rows that the workbook hides, analysed with the others as the file holds them",
            K.DESELECTED_ROWS: "rows that the data file's saved case filter marks as not selected, analysed with the "
                               "selected ones as the file holds them",
            K.ANSWERS_GIVEN_AS_MISSING: "a missing-value code that the data file labels as an answer between the "
                                        "items' other answers, whose answers were treated as missing",
            K.ANSWERS_DECLARED_MISSING: "a missing value the data file declares on an answer it labels between the "
                                        "items' other answers, whose answers were treated as missing",
            K.FILTER_LABELS_BY_CASE: "a row filter whose text the column also holds in other upper and lower case, "
                                     "which it treated as another value",
            K.KEYING_AGAINST_LOADINGS: f"a declared keying of reverse-scored items contradicted by the loadings of "
                                       f"{word_list(keyed)} on {names[0] if names else ''}",
            K.WEAK_MARKER: f"a marker of factor {names[0] if names else ''}, {keyed[0] if keyed else ''}, whose "
                           f"standardized loading ({journal_decimal(self.value or 0.0, digits=2)}) is below the .20 in "
                           f"size that common practice reads as negligible, on which the unstandardized loadings and "
                           f"their tests depend",
            K.WEAK_METHOD_FACTOR: f"a factor beside the traits ({', '.join(names)}) whose standardized loadings are "
                                  f"all below .20 in size",
            K.SMALL_GROUP: f"fewer rows ({v.split('.')[0]}) than free parameters of the group's model",
            K.GROUP_WEIGHTED_OUT: "a group every row of which has weight 0, left out of the analysis",
            K.UNKNOWN_GROUPS_SCORED: "rows in groups the earlier fit does not have, which get no scores",
            K.ANSWERS_BEYOND_FITTED: "answers outside the range of the rows the earlier fit analysed",
            K.ITEM_AGAINST_FITTED_LOADING: "items of the scored file that run against their factor, unlike their "
                                           "loadings in the earlier fit (coded the other way round?)",
            K.END_ANSWERS_UNUSED: "an item's lowest or highest answer, which the earlier fit's thresholds expect in "
                                  "many rows scored, given in none of them (the answers coded otherwise?)",
            K.SCORED_WITHOUT_OWN_ANSWERS: "factor scores of rows that answered none of the factor's items",
            K.FACTOR_SCORES_LEFT_EMPTY: "factor scores left empty, as asked, for rows that answered none of the "
                                        "factor's items",
            K.SCORES_LESS_RELIABLE: "scores less reliable than decisions about individuals usually need",
            K.SCORED_FACTORS_HARDLY_DISTINCT: "scores of factors that correlate nearly 1 in the model",
            K.FACTORS_HARDLY_DISTINCT: f"a correlation of factors {word_list(names)} of "
                                       f"{journal_decimal(self.value or 0.0, digits=2)}, nearly 1",
            K.SPARSE_ANSWERS: "rows with gaps that answer too few items together for the saturated model of "
                              "full-information ML",
            K.COPIED_ROWS: f"{rows} identical in every column to earlier rows (kept in the analysis)",
            K.SAME_ANSWER_ROWS: "rows that gave the same answer to every item, reverse-worded ones included (kept in "
                                "the analysis)",
            K.FACTOR_POINTS_AGAINST_ITEMS: f"factor {', '.join(names)} pointing against its items (a higher score "
                                           f"means less of what most of them ask)",
            K.NON_NORMAL_ANSWERS: f"answers whose multivariate kurtosis is {v} times that of normal answers",
        }[self.kind]
        where = written_group(self.group, groups) if quoted or groups else str(self.group)
        return text + (f" in group {where}" if self.group is not None else "")

    def touches(self, kind: str, variables: tuple[str, ...], group: str | None = None) -> bool:
        """Whether the parameter ``kind(variables)`` (of ``group``) is one of this problem's.  Covariances
        match whichever order their two variables were written in."""
        if self.group is not None and group is not None and self.group != group:
            return False
        ordered = kind in ("loading", "threshold")
        for label in self.parameters:
            k, names, owner = split_label(label)  # a free parameter's label names its group
            if owner is not None and group is not None and owner != group:
                continue
            if k == kind and (names == tuple(variables) if ordered else sorted(names) == sorted(variables)):
                return True
        return False

    def one_line(self) -> str:
        where = f" (group {self.group})" if self.group is not None else ""
        return f"{self.explanation}{where} {self.advice}"


def _names(label: str) -> tuple[str, ...]:
    """The variables of a parameter label such as 'factor_covariance(F1, F2)' (a group suffix dropped)."""
    return split_label(label)[1]


def group_parameter_counts(table: ParameterTable) -> list[int]:
    """The free parameters of each group's model: the distinct elements of theta its entries depend on (a
    parameter held equal across groups counts in each group it appears in)."""
    used: list[set[int]] = [set() for _ in range(table.n_groups)]
    for par in table.parameters:
        used[par.group].update(index for index, _ in par.terms)
    return [len(u) for u in used]


def counted_group_parameters(table: ParameterTable) -> tuple[list[int], list[int], list[int]]:
    """(the free parameters of each group's model as the rule of rows per parameter counts them, the item intercepts
    and the thresholds it leaves out): :func:`group_parameter_counts` less the group's item intercepts, as
    :func:`counted_parameters` leaves out a one-group model's item means (the item means of each group's rows, which
    the intercepts, free or held equal, reproduce beside the covariance structure), and less its thresholds of
    ordinal items, which a one-group ordinal fit estimates as first-step statistics outside its free parameters:
    the same rows under the same model are counted alike, a sample or a group."""
    whole = group_parameter_counts(table)
    means: list[set[int]] = [set() for _ in range(table.n_groups)]
    steps: list[set[int]] = [set() for _ in range(table.n_groups)]
    for par in table.parameters:
        if par.kind in ("intercept", "threshold"):
            (means if par.kind == "intercept" else steps)[par.group].update(index for index, _ in par.terms)
    return ([n - len(m | k) for n, m, k in zip(whole, means, steps)], [len(m) for m in means],
            [len(k) for k in steps])


def group_size_problems(table: ParameterTable, rows: Sequence[float]) -> tuple[tuple[Problem, ...], tuple[str, ...]]:
    """:func:`sample_size_problems` for each group of a model of several (``rows``, one per group, as the fit counts
    them; the parameters of :func:`counted_group_parameters`); ((), ()) for one group, which the fit's result weighs
    as a whole (pipeline.results.fit_result)."""
    if not table.multigroup:
        return (), ()
    counted, means, steps = counted_group_parameters(table)
    return sample_size_problems(rows, counted, table.groups, means, steps)


HEYWOOD_ADVICE = ("Look for what the model leaves out near it (a residual covariance or cross-loading the modification "
                  "indices point to), for outlying rows, and whether the sample is small for the model; do not simply fix "
                  "the value at a boundary to hide the problem.")


def _capital(text: str) -> str:
    """``text`` as a sentence, by the one rule of a line's capital (note_parts.capitalised): a name keeps its case."""
    return capitalised(text)


def _fmt(value: float) -> str:
    """An estimate in a problem's words: three decimals, a smaller one to three significant digits in plain digits
    (numbers.rounded_number: '-0.0000123', never '-1.23e-05')."""
    return f"{value:.3f}" if abs(value) >= 0.001 else rounded_number(value)


def matrix_problems(mats: ModelMatrices, observed: tuple[str, ...], latent: tuple[str, ...],
                    group: str | None = None, se_of: dict[str, float] | None = None) -> list[Problem]:
    """Problems visible in one group's model matrices (see the module's list).  ``se_of`` maps
    'variance(x)' labels to standard errors, to say whether a negative variance could be sampling error."""
    out: list[Problem] = []
    se_of = se_of or {}
    sigma = mats.implied_covariance()
    total = sigma.diagonal()
    t_diag = mats.T.diagonal()
    for i in np.flatnonzero(t_diag < 0).tolist():
        x, theta = observed[i], t_diag[i]
        r2 = 1.0 - theta / total[i] if total[i] > 0 else float("nan")
        label = reference_text("residual_variance", (x,))
        se = se_of.get(label)
        chance = (f" Its standard error is {_fmt(se)}, so it is {'not ' if theta / se > -1.96 else ''}clearly below "
                  f"zero (z = {theta / se:.2f}).") if se and np.isfinite(se) and se > 0 else ""
        out.append(Problem(
            ProblemKind.NEGATIVE_RESIDUAL_VARIANCE, (label,), float(theta),
            f"The residual (error) variance of {x} is negative ({_fmt(theta)}), so the factors would explain more than "
            f"all of its variance (R-squared {r2:.3f}): impossible for real data.{chance}",
            HEYWOOD_ADVICE, group))
    for j in np.flatnonzero(mats.P.diagonal() < 0).tolist():
        f = latent[j]
        out.append(Problem(
            ProblemKind.NEGATIVE_FACTOR_VARIANCE, (reference_text("factor_variance", (f,)),), float(mats.P[j, j]),
            f"The variance of factor {f} is negative ({_fmt(mats.P[j, j])}): impossible for a real trait.",
            "Check that its indicators measure one thing (their correlations should be clearly positive after "
            "reversing reverse-keyed items) and that the factor has enough indicators.", group))
    phi = mats.latent_covariance()
    d = phi.diagonal()
    if len(latent) > 1 and np.all(d > 0):
        corr = phi / np.sqrt(np.outer(d, d))
        # a tolerance of rounding: a factor below a higher-order one whose disturbance is fixed at 0 is a multiple
        # of it (a correlation of exactly 1 and a singular matrix by the model's constraint, not a Heywood case)
        beyond = np.abs(corr) > 1.0 + 1e-10
        pairs = np.nonzero(np.tril(beyond, -1)) if beyond.any() else ((), ())  # (tril only when some entry is)
        for i, j in zip(*(np.asarray(k).tolist() for k in pairs)):  # pairs i > j, row by row
            out.append(Problem(
                ProblemKind.FACTOR_CORRELATION_BEYOND_ONE, (reference_text("factor_covariance", (latent[j], latent[i])),),
                float(corr[i, j]),
                f"The correlation of factors {latent[j]} and {latent[i]} is {corr[i, j]:.3f}, beyond +/-1: impossible.",
                "The two factors are not distinct in these data: consider one factor for both item sets, or "
                "look for cross-loadings and residual covariances that the model leaves out.", group))
        if (not any(p.kind is ProblemKind.FACTOR_CORRELATION_BEYOND_ONE for p in out)
                and cholesky_log_det(phi) is None and np.linalg.eigvalsh(corr)[0] < -1e-10):  # a factorisation: positive definite
            out.append(Problem(
                ProblemKind.FACTOR_COVARIANCES_NOT_POSITIVE_DEFINITE, tuple(reference_text("factor_variance", (f,)) for f in latent),
                float(np.linalg.eigvalsh(corr)[0]),
                "The factor covariance matrix is not positive definite (its smallest eigenvalue is below zero): some "
                "combination of the factors would have a negative variance.",
                "Some factors are nearly linear combinations of others; look at the factor correlations close to 1 in size "
                "and consider merging factors.", group))
    off = []  # residual covariances: pairs i > j, row by row
    if np.count_nonzero(mats.T) > np.count_nonzero(t_diag):
        off = list(zip(*(k.tolist() for k in np.nonzero(np.tril(mats.T, -1)))))
    for i, j in off:
        if t_diag[i] > 0 and t_diag[j] > 0:
            r = mats.T[i, j] / np.sqrt(t_diag[i] * t_diag[j])
            if abs(r) > 1.0:
                out.append(Problem(
                    ProblemKind.RESIDUAL_CORRELATION_BEYOND_ONE, (reference_text("residual_covariance", (observed[j], observed[i])),), float(r),
                    f"The residual correlation of {observed[j]} and {observed[i]} is {r:.3f}, beyond +/-1: impossible.",
                    "The residual covariance leaves the two items' residuals more alike than identical; remove it or "
                    "model what the two items share as a factor.", group))
    if off and np.all(t_diag > 0) and not any(p.kind is ProblemKind.RESIDUAL_CORRELATION_BEYOND_ONE for p in out):
        scale = 1.0 / np.sqrt(t_diag)
        if np.linalg.eigvalsh(mats.T * np.outer(scale, scale))[0] < -1e-10:
            out.append(Problem(
                ProblemKind.RESIDUAL_COVARIANCES_NOT_POSITIVE_DEFINITE, tuple(reference_text("residual_covariance", (observed[j], observed[i]))
                                                                               for i, j in off), None,
                "The residual covariance matrix is not positive definite: the residual covariances together imply a "
                "negative variance for some combination of the items.",
                "Too many or too large residual covariances: remove those the theory does not call for.", group))
    sd_obs = np.sqrt(np.maximum(total, 1e-300))
    sd_lat = np.sqrt(np.maximum(d, 1e-300))
    std = mats.L * sd_lat[None, :] / sd_obs[:, None]
    negative = set(np.flatnonzero(t_diag < 0).tolist())
    for i, j in zip(*np.nonzero(np.abs(std) > 1.0)):
        if i in negative:  # the same problem as the negative residual variance, already reported
            continue
        out.append(Problem(
            ProblemKind.STANDARDIZED_LOADING_ABOVE_ONE, (reference_text("loading", (latent[j], observed[i])),), float(std[i, j]),
            f"The standardized loading of {observed[i]} on {latent[j]} is {std[i, j]:.3f}, above 1 in size.",
            "With a cross-loading or correlated factors this can be legitimate; otherwise treat it as "
            "a Heywood case. " + HEYWOOD_ADVICE, group))
    return out


def bound_problems(labels: tuple[str, ...], theta: np.ndarray, lower: np.ndarray, upper: np.ndarray) -> list[Problem]:
    """Free parameters held at a bound that the model sets: the unrestricted estimate lies beyond it."""
    out = []
    with np.errstate(invalid="ignore"):  # infinite bounds are no bounds
        near = [np.isfinite(limit) & (np.abs(theta - limit) <= 1e-8 * np.maximum(1.0, np.abs(limit)))
                for limit in (lower, upper)]
    for k in np.flatnonzero(near[0] | near[1]).tolist():
        label = labels[k]
        for limit, word in ((lower[k], "lower"), (upper[k], "upper")):
            if np.isfinite(limit) and abs(theta[k] - limit) <= 1e-8 * max(1.0, abs(limit)):
                out.append(Problem(
                    ProblemKind.ON_BOUND, (label,), float(theta[k]),
                    f"{_capital(label_words(label))} is held at its {word} bound ({user_number(limit)}): without the bound the estimate would lie beyond it, "
                    f"so the reported fit and standard errors describe a restricted solution.",
                    "Report the bound; the standard errors and tests near a bound are not reliable (the estimate's "
                    "sampling distribution is cut off there).", None))
    return out


def identification_problems(labels: tuple[str, ...], se: np.ndarray, estimates: np.ndarray) -> list[Problem]:
    """Empirical under-identification: standard errors so large relative to the estimates that the data
    barely determine those parameters (Kenny 1979 describes the typical cases: a factor with two indicators
    whose correlation with other factors is near zero, or a loading near zero on a factor with three)."""
    ratio = np.abs(se) / np.maximum(np.abs(estimates), 1e-8)
    weak = np.flatnonzero(np.isfinite(ratio) & (ratio > 100) & (se > 10)).tolist()
    if not weak:
        return []
    return [Problem(
        ProblemKind.EMPIRICALLY_UNDERIDENTIFIED, tuple(labels[k] for k in weak), float(np.max(se[weak])),
        "The data barely determine " + cut_list(weak, 5, lambda k: label_words(labels[k]))
        + ": their standard errors are huge, so the model is close to not identified with these data.",
        "Check factors with two indicators (they need a clear correlation with another factor) and loadings near zero; "
        "fix or drop what the data cannot inform.", None)]


def not_identified(parameters: tuple[str, ...]) -> Problem:
    """A model whose information matrix is singular at its solution (assessment.identification), reported as a
    model that could not be estimated (Bollen 1989, ch. 4: its parameters have no unique values)."""
    return Problem(ProblemKind.NOT_IDENTIFIED, tuple(parameters), None,
                   "The model is not identified with these data (the information matrix is singular), so its "
                   "parameters have no unique values; no estimate, fit index or test of it can be interpreted.",
                   "Fix one of the parameters involved or add constraints (a factor of two items needs a clear "
                   "correlation with another factor).")


def unbounded_heywood(failure) -> Problem:
    """A solution driven without bound by a Heywood case (``failure``: errors.UnboundedSolution, whose words name the
    item, the group and the estimates that grow), reported as a model that could not be estimated, with the advice
    a negative residual variance gets: not as a model the data do not identify."""
    text = str(failure)
    return Problem(ProblemKind.UNBOUNDED_HEYWOOD, tuple(failure.parameters), None,
                   _capital(text.split("; look for")[0]) + ".", HEYWOOD_ADVICE)


def estimation_failure(failure) -> Problem:
    """The problem of a model whose assessment stopped on ``failure`` (errors.NotIdentified or
    errors.UnboundedSolution), for a workflow that reports it among models that could be estimated."""
    from cfa_tool.errors import UnboundedSolution

    return unbounded_heywood(failure) if isinstance(failure, UnboundedSolution) else not_identified(failure.parameters)


#: the problems of a model that could not be estimated whose words say why (the rest: its search did not converge)
WHY_NOT_ESTIMATED = (ProblemKind.NOT_IDENTIFIED, ProblemKind.UNBOUNDED_HEYWOOD)


def failure_words(result) -> str:
    """Why a result could not be estimated, in the few words a table cell or a paragraph shows."""
    if any(p.kind is ProblemKind.UNBOUNDED_HEYWOOD for p in result.problems):
        return "not admissible (Heywood case)"
    return ("not identified" if any(p.kind is ProblemKind.NOT_IDENTIFIED for p in result.problems)
            else "did not converge")


def not_converged(message: Text, max_iterations: int) -> Problem:
    return Problem(ProblemKind.NOT_CONVERGED, (), None,
                   "The estimation did not converge (" + message + "); no estimate, fit index or test of it can be "
                   "interpreted.",
                   f"Check the model for the problems named, give start values closer to the expected solution, or raise "
                   f"the iteration limit (now {max_iterations}).")


def solution_problems(table: ParameterTable, mats: list[ModelMatrices], theta: np.ndarray,
                      cov_theta: np.ndarray | None, converged: bool, message: str, max_iterations: int,
                      standardized_loadings: bool = True) -> tuple[Problem, ...]:
    """The one admissibility assessment of a solution, for every estimator: non-convergence, the problems
    of each group's matrices, estimates held at a bound, and empirical under-identification.
    ``cov_theta`` is the covariance matrix of the free parameters (None when there are no standard errors).
    ``standardized_loadings`` False skips that check (ordinal items: latent responses have variance 1 by
    construction, so the residual-variance check covers it)."""
    if not converged:
        return (not_converged(message, max_iterations),)
    se = (np.sqrt(np.clip(np.diag(cov_theta), 0.0, None)) if cov_theta is not None
          else np.full(len(theta), np.nan))
    out: list[Problem] = []
    layout = table.derived("admissibility labels", _labels_of)
    for g, m in enumerate(mats):
        label = table.groups[g] if table.multigroup else None
        se_of = {}
        if (np.diag(m.T) < 0).any():  # standard errors are read only of negative residual variances
            se_of = {name: float(se[k] * c) for name, k, c in layout.single_terms[g]}
        found = matrix_problems(m, table.observed, table.latent, label, se_of)
        out.extend(p for p in found if standardized_loadings or p.kind is not ProblemKind.STANDARDIZED_LOADING_ABOVE_ONE)
        if not any(p.kind.inadmissible for p in found):
            out.extend(indistinct_problems(table, m, g))
    if table.n_free:
        if layout.bounded:
            out.extend(bound_problems(layout.free_names, theta, table.lower, table.upper))
        if cov_theta is not None:
            out.extend(identification_problems(layout.free_names, se, theta))
    return tuple(out)


def indistinct_problems(table: ParameterTable, mats: ModelMatrices, group: int = 0) -> list[Problem]:
    """Pairs of trait factors of one group whose correlation is at least :data:`HARDLY_DISTINCT` in size (and not
    beyond 1, which :func:`matrix_problems` calls impossible): factors measured by items, sharing none (a bifactor
    model's general and specific factors are another question), whose correlation the data estimate: a free
    covariance, or one implied through higher-order factors; a correlation the model fixes (at 1, to test whether
    two factors are one) is not the data's finding.  A possible solution, so a caution, not a reason to call it
    inadmissible (hostile s20: a correlation of .998 was said in the scores' cautions but not in the fit's)."""
    phi = mats.latent_covariance()
    d = phi.diagonal()
    if len(d) < 2:
        return []
    with np.errstate(divide="ignore", invalid="ignore"):  # the common case ends here, in a few array operations
        squared = phi * phi / np.outer(d, d)
    np.fill_diagonal(squared, 0.0)
    if not squared.max() >= HARDLY_DISTINCT ** 2:
        return []
    L, B = mats.L, mats.B
    traits = np.flatnonzero((L != 0).any(axis=0) & (d > 0))
    if len(traits) < 2:
        return []
    corr = phi[np.ix_(traits, traits)] / np.sqrt(np.outer(d[traits], d[traits]))
    close = np.abs(np.tril(corr, -1)) >= HARDLY_DISTINCT
    if not close.any():
        return []
    latent = table.latent
    free = {frozenset(par.variables) for par in table.parameters
            if par.group == group and par.kind == "factor_covariance" and par.terms}
    higher = (B != 0).any(axis=1)  # factors that load on another factor
    label = table.groups[group] if table.multigroup else None
    out = []
    for i, j in zip(*(k.tolist() for k in np.nonzero(close))):  # pairs i > j, row by row
        a, b = int(traits[j]), int(traits[i])
        shared = bool(((L[:, a] != 0) & (L[:, b] != 0)).any())
        if shared or abs(corr[i, j]) > 1.0 + 1e-10 or not (frozenset((latent[a], latent[b])) in free
                                                            or (higher[a] and higher[b])):
            continue
        r = float(corr[i, j])
        out.append(Problem(
            ProblemKind.FACTORS_HARDLY_DISTINCT, (reference_text("factor_covariance", (latent[a], latent[b])),), r,
            f"The factors {latent[a]} and {latent[b]} correlate {journal_decimal(r)}: nearly 1, so the data hardly tell them "
            f"apart, and read as two traits they may mislead.",
            Note(("compare this model with one in which they are one factor",
                  Command(" (cfa-tool compare)", runs="compare", inside=" (among the models compared here, or added to "
                                                                        "them)"),
                  ", and read the distinctness of the factors (HTMT, AVE); common practice reads correlations above "
                  ".85 or .90 as a sign that two factors are not distinct, a convention, not a law.")), label))
    return out


def replicated_problems(table: ParameterTable, model, thetas: np.ndarray,
                        standardized_loadings: bool = True) -> tuple[tuple[str, ...], ...]:
    """Why each replicated solution (a row of ``thetas``: the free parameters of a converged refit of ``table``,
    ``model`` its :class:`~cfa_tool.model.implied.StructuredModel`) is not admissible, judged by the rule a single fit
    is judged by (:func:`solution_problems`: negative variances, correlations beyond +/-1, matrices that are not
    positive definite, estimates held at a bound; without standard errors, which a replication need not have): per
    row, the problems that make it inadmissible in the words of :func:`replicated_problem_words` (empty: admissible).
    Power simulations, bootstraps and simulated cutoffs count them with these words.  Only the rows that
    :func:`could_have_problems` cannot clear are judged one at a time; the others are admissible by that rule."""
    thetas = np.atleast_2d(thetas)
    out: list[tuple[str, ...]] = [()] * len(thetas)
    for r in np.flatnonzero(could_have_problems(table, model, thetas, standardized_loadings)).tolist():
        theta = thetas[r]
        mats = [model.matrices(theta, g) for g in range(table.n_groups)]
        with np.errstate(all="ignore"):
            found = solution_problems(table, mats, theta, None, True, "", 0, standardized_loadings)
        out[r] = inadmissible_words(found)
    return tuple(out)


CLEAR = 1e-8  # how far inside the admissible region a replicated solution must lie to be cleared without a closer look


def could_have_problems(table: ParameterTable, model, thetas: np.ndarray, standardized_loadings: bool = True
                        ) -> np.ndarray:
    """For each row of ``thetas`` (R, q), False where :func:`solution_problems` (without standard errors) can find
    nothing, judged for the whole stack at once, True where it must look (a screen: the rows it flags are judged one
    at a time, so it may flag rows that turn out admissible, never clear one that is not).  A row is cleared when
    every value is finite; every residual and factor variance is positive; the factors' correlation matrix and the
    residuals' correlation matrix have smallest eigenvalues above :data:`CLEAR` (positive definite, so every
    correlation is inside +/-1: a 2 x 2 principal submatrix's eigenvalues are 1 +/- r, and a principal submatrix's
    smallest eigenvalue is at least the whole matrix's, Cauchy's interlacing theorem; Horn & Johnson 2013, 4.3.28);
    every standardized loading is below 1 - :data:`CLEAR` in size (when they are judged); and no free parameter is
    within 1e-8 (relative) of a bound.  The margins stand far above the rounding by which these stacked
    computations can differ from :func:`matrix_problems`' one-matrix ones."""
    thetas = np.atleast_2d(np.asarray(thetas, dtype=float))
    flagged = ~np.isfinite(thetas).all(axis=1)
    with np.errstate(all="ignore"):
        for g in range(table.n_groups):
            mats = model.matrices(np.where(flagged[:, None], 0.0, thetas), g)  # rows already flagged: any value
            t_diag = np.diagonal(mats.T, axis1=1, axis2=2)
            flagged |= (t_diag <= 0).any(axis=1) | (np.diagonal(mats.P, axis1=1, axis2=2) < 0).any(axis=1)
            phi = mats.latent_covariance()
            d = np.diagonal(phi, axis1=1, axis2=2)
            flagged |= ~np.isfinite(phi).all(axis=(1, 2)) | (d <= 0).any(axis=1)
            flagged |= _smallest_eigenvalue(phi, d, flagged) <= CLEAR
            flagged |= _smallest_eigenvalue(mats.T, t_diag, flagged) <= CLEAR
            if standardized_loadings:
                total = np.diagonal(mats.implied_covariance(), axis1=1, axis2=2)
                std = mats.L * np.sqrt(np.abs(d))[:, None, :] / np.sqrt(np.abs(total))[:, :, None]
                flagged |= ~(np.abs(std) < 1.0 - CLEAR).all(axis=(1, 2))
        if table.derived("admissibility labels", _labels_of).bounded:  # as bound_problems finds them
            for limit in (table.lower, table.upper):
                flagged |= (np.isfinite(limit) & (np.abs(thetas - limit) <= 1e-8 * np.maximum(1.0, np.abs(limit)))).any(axis=1)
    return flagged


def _smallest_eigenvalue(matrix: np.ndarray, diagonal: np.ndarray, skipped: np.ndarray) -> np.ndarray:
    """The smallest eigenvalue of each matrix of the stack scaled to unit diagonal (its correlation matrix), with
    ``diagonal`` its diagonal: 1 for a matrix of one row and for the ``skipped`` ones (already flagged: their
    scaling may not exist), -inf where the scaled matrix is not finite."""
    if matrix.shape[-1] < 2:
        return np.ones(len(matrix))
    scale = 1.0 / np.sqrt(np.where(skipped[:, None], 1.0, diagonal))
    corr = matrix * scale[:, :, None] * scale[:, None, :]
    finite = np.isfinite(corr).all(axis=(1, 2))
    out = np.linalg.eigvalsh(np.where((skipped | ~finite)[:, None, None], np.eye(matrix.shape[-1]), corr))[:, 0]
    return np.where(finite | skipped, out, -np.inf)


def inadmissible_words(problems: Iterable[Problem]) -> tuple[str, ...]:
    """The problems that make one replicated solution inadmissible, each once, in the words of
    :func:`replicated_problem_words` (empty: admissible)."""
    return tuple(dict.fromkeys(replicated_problem_words(p) for p in problems if p.kind.inadmissible))


def replicated_problem_words(problem: Problem) -> str:
    """A problem of a replicated solution in words that are the same in every replication that has it (its kind and
    parameters, without the value): 'the residual variance of on_time held at a bound'."""
    if problem.kind is ProblemKind.ON_BOUND:
        return problem.phrase()
    words = problem.kind.value + (f" ({'; '.join(problem.parameter_words())})" if problem.parameters and len(
        problem.parameters) <= 2 else "")
    return words + (f" in group {problem.group}" if problem.group is not None else "")


def counted_problems(per_replication: Iterable[tuple[str, ...]], shown: int = 4) -> tuple[int, str]:
    """(how many replications have a problem, the problems named with their counts, most frequent first:
    'the residual variance of on_time held at a bound in 39'); (0, '') when none has one."""
    per_replication = list(per_replication)
    count = sum(1 for found in per_replication if found)
    if not count:
        return 0, ""
    tally: dict[str, int] = {}
    for found in per_replication:
        for words in found:
            tally[words] = tally.get(words, 0) + 1
    ranked = sorted(tally.items(), key=lambda kv: -kv[1])
    named = "; ".join(f"{words} in {n}" for words, n in ranked[:shown])
    return count, named + (f"; and {len(ranked) - shown} other kinds" if len(ranked) > shown else "")


def not_admissible_sentence(counts: Iterable[tuple[int, int, str, str]], samples: str, kept_in: str) -> str:
    """The one sentence every report of refitted samples (bootstrap resamples, samples of simulated cutoffs, power
    simulations' replications) says of its converged samples whose solution is not admissible as a single fit would
    judge it: each of ``counts`` is (how many, of how many converged, their problems named by
    :func:`counted_problems`, where: '' or ' at N = 200', ' from the fitted model'), ``samples`` what they are
    ('resamples'), ``kept_in`` the figures that keep them ('the intervals').  '' when no count is above 0."""
    counts = [(n, converged, named, where) for n, converged, named, where in counts if n]
    if not counts:
        return ""
    parts = [f"{n} of the {converged} converged {samples}{where} ({named or 'problems not recorded'})"
             for n, converged, named, where in counts]
    one = len(counts) == 1 and counts[0][0] == 1
    return (f"{word_list(parts)} {'has' if one else 'have'} a solution that is not admissible, as a single fit "
            f"would judge it; {'it is' if one else 'they are'} kept in {kept_in}")


@dataclass(frozen=True)
class _Labels:
    """What the assessment reads of a table's labels, laid out once per table."""

    single_terms: tuple[tuple[tuple[str, int, float], ...], ...]  # per group: (label, theta index, |coefficient|)
    free_names: tuple[str, ...]  # each free parameter named as its table row does: residual_variance(x9) [group]
    bounded: bool  # some free parameter has a finite bound (else no estimate can be held at one)


def _labels_of(table: ParameterTable) -> _Labels:
    single = [[] for _ in table.groups]
    labels = list(table.free_labels)
    for par in table.parameters:
        if len(par.terms) == 1:
            index, coefficient = par.terms[0]
            single[par.group].append((par.label, index, abs(coefficient)))
            if labels[index] == table.free_labels[index]:
                suffix = f" [{table.groups[par.group]}]" if table.multigroup else ""
                labels[index] = par.label + suffix
    return _Labels(tuple(tuple(s) for s in single), tuple(labels),
                   bool(np.isfinite(table.lower).any() or np.isfinite(table.upper).any()))


_MATRIX_KINDS = ("loading", "factor_variance", "factor_covariance", "residual_variance", "residual_covariance")


def estimate_row_problems(rows: tuple[SavedRow, ...]) -> tuple[Problem, ...]:
    """The inadmissible problems of a saved result's estimates themselves (the rows of a ``--json`` file's
    'estimates' as the one reader of saved estimates gives them, :func:`~cfa_tool.model.saved_estimates.saved_rows`,
    which names a row it cannot read), whatever its 'admissible' flag says: each group's matrices are rebuilt from
    them and judged
    by :func:`matrix_problems`, the rule a fresh fit is judged by (negative variances, correlations beyond +/-1,
    covariance matrices not positive definite).  Rows that are not of a loading, variance or covariance are left
    to the reader of the model's values."""
    groups: dict = {}
    for row in rows:
        if row.kind in _MATRIX_KINDS and len(row.variables) in (1, 2):
            groups.setdefault(row.group, []).append((row.kind, row.variables[0], row.variables[-1], row.estimate))
    out: list[Problem] = []
    for group, entries in groups.items():
        latent = tuple(dict.fromkeys(a for k, a, _, _ in entries if k in ("loading", "factor_variance",
                                                                            "factor_covariance")))
        observed = tuple(dict.fromkeys(b for k, a, b, _ in entries if k == "loading" and b not in latent))
        observed += tuple(x for x in dict.fromkeys(a for k, a, _, _ in entries if k.startswith("residual"))
                          if x not in observed and x not in latent)
        if not observed or not latent:
            continue
        obs, lat = {x: i for i, x in enumerate(observed)}, {f: j for j, f in enumerate(latent)}
        p, m = len(observed), len(latent)
        L, B, P, T = np.zeros((p, m)), np.zeros((m, m)), np.zeros((m, m)), np.zeros((p, p))
        for kind, a, b, value in entries:
            if kind == "loading":
                if b in lat:
                    B[lat[b], lat[a]] = value
                else:
                    L[obs[b], lat[a]] = value
            elif kind.startswith("factor") and a in lat and b in lat:
                P[lat[a], lat[b]] = P[lat[b], lat[a]] = value
            elif kind.startswith("residual") and a in obs and b in obs:
                T[obs[a], obs[b]] = T[obs[b], obs[a]] = value
        mats = ModelMatrices(L, B, P, T, np.zeros(p), np.zeros(m))
        with np.errstate(all="ignore"):
            found = matrix_problems(mats, observed, latent, group)
        out.extend(q for q in found if q.kind.inadmissible)
    return tuple(out)


def saved_fit_problems(payload: dict, rows: tuple[SavedRow, ...], source: str) -> tuple[Problem, ...]:
    """The problems of a saved fit (the dict of its ``fit --json`` result, and its estimate rows as
    :func:`~cfa_tool.model.saved_estimates.saved_rows` read them once): first those of its estimates themselves
    (:func:`estimate_row_problems`, whatever the file's flag says), then those its file lists."""
    return estimate_row_problems(rows) + listed_problems(payload.get("problems", []), source)


def listed_problems(listed: list, source: str) -> tuple[Problem, ...]:
    """The problems a saved result lists (the 'problems' of a fit in its JSON) as :class:`Problem` values."""
    try:
        return tuple(Problem(ProblemKind(q["kind"]), tuple(q["parameters"]), q["value"], _parted(q, "explanation"),
                             _parted(q, "advice"), q["group"], RowsPerParameter(**q["rows_per_parameter"])
                             if q.get("rows_per_parameter") is not None else None) for q in listed)
    except (ValueError, KeyError, TypeError):
        from cfa_tool.model.saved_estimates import AGAIN

        raise OptionError(f"{source}: its list of problems is incomplete or changed by hand; {AGAIN}") from None


def _parted(saved: dict, name: str):
    """A saved problem's explanation or advice: the Note its parts make (``name``_parts, written since the views of a
    saved fit say its commands each their own way), else the text as saved; a ValueError when neither is there."""
    parts = saved.get(f"{name}_parts")
    if isinstance(parts, list):
        note = Note.from_dict({"parts": parts})
        if str(note) == saved[name]:  # the parts of these words, not of words changed by hand
            return note
    return saved[name]


def refuse_inadmissible_saved_fit(payload: dict, problems: tuple[Problem, ...], source: str, purpose: str) -> None:
    """The one refusal of a saved fit whose solution is not admissible (``problems`` from
    :func:`saved_fit_problems`, or its file says so), by every command that uses a saved fit's values: scores from
    it, simulation and power simulation from it as a population.  Exit 2 (:class:`OptionError`): the run estimates
    no model, and the saved file is an input it cannot use; exit 3 stays for a model that a run cannot estimate.
    ``purpose`` ends the message: 'no factor scores are computed with it'."""
    flagged = payload.get("admissible", True) is False or payload.get("converged", True) is False
    refuse_inadmissible_fit(problems, source, purpose, flagged)


def refuse_inadmissible_fit(problems, source: str, purpose: str, flagged: bool = False,
                            remedy: str = "use that result") -> None:
    """The one refusal of a fitted solution that is not admissible as the values of something else (a population
    for simulated samples, the model of factor scores), whether the fit was saved (:func:`refuse_inadmissible_saved_fit`)
    or made by the same run (the cutoffs' population): exit 2 (:class:`OptionError`), the first serious problem
    named; ``flagged``: the fit says it is not admissible where no problem is listed."""
    first = next((p for p in problems if p.kind.inadmissible), None)
    if first is None and not flagged:
        return
    why = f" (it has {first.phrase()})" if first is not None else ""
    raise OptionError(f"{source}: the fitted solution is not admissible{why}, so {purpose}; fit a model whose solution "
                      f"is admissible and {remedy}")


#: the words earlier versions wrote as a problem's kind into a saved fit's JSON -> the kind's member name
#: (ProblemKind._missing_)
EARLIER_WORDS = {"baseline model misfits little: read CFI and TLI beside RMSEA and SRMR": "UNINFORMATIVE_BASELINE",
                 "weakly correlated items": "UNINFORMATIVE_BASELINE"}


#: the average correlation of the items of one factor below which items correlate weakly: the lower end of the
#: range of average inter-item correlations recommended for a scale, .15 to .50 (Clark & Watson 1995, recalled from
#: memory; a rule of thumb)
WEAK_ITEM_CORRELATION = 0.15


@functools.lru_cache(maxsize=64)
def _upper_pairs(size: int) -> tuple[np.ndarray, np.ndarray]:
    """The places above the diagonal of a matrix of ``size`` rows (numpy.triu_indices with offset 1), made once per
    size (they cost more than the means they pick, every fit)."""
    rows, cols = np.triu_indices(size, 1)
    rows.setflags(write=False)
    cols.setflags(write=False)
    return rows, cols


def within_factor_correlation(spec, observed: tuple[str, ...], covariances) -> float | None:
    """The average absolute correlation of the items that share a factor (each factor's pairs averaged, then the
    factors and ``covariances``' groups averaged; the sample covariances over the items ``observed``), the factors
    of substance alone (method and exploratory factors left out); None when no factor has two items."""
    index = {name: k for k, name in enumerate(observed)}
    apart = spec.method_factors | spec.exploratory_factors
    blocks = [[index[i.text] for i in f.indicators if i.text in index] for f in spec.factors
              if f.name.text not in apart]
    blocks = [b for b in blocks if len(b) > 1]
    means = []
    for cov in covariances:
        cov = np.asarray(cov, dtype=float)
        sd = np.sqrt(np.diag(cov))
        if not len(sd) or not np.all(sd > 0):
            continue
        corr = cov / np.outer(sd, sd)
        for block in blocks:
            part = np.abs(corr[np.ix_(block, block)])
            means.append(float(part[_upper_pairs(len(block))].mean()))
    return float(np.mean(means)) if means else None


def uninformative_baseline_problems(fit, robust, n_obs: int, groups: int = 1,
                                    within: float | None = None) -> tuple[Problem, ...]:
    """A caution when the baseline (independence) model's own RMSEA, from the baseline chi-square of the test the
    report says to read (``fit``: assessment.fit_indices.FitIndices; ``robust``: inference.robust.RobustFit or None),
    lies below :data:`cfa_tool.assessment.fit_indices.UNINFORMATIVE_BASELINE_RMSEA` (hostile s19: pure noise printed
    CFI 1.000 beside its guide, and weakly correlated items TLI 1.574).  What it means, in measured words (s20: a
    realistic 25-item scale with a baseline RMSEA of .144 was told its CFI and TLI 'say little ..., high or low'):
    CFI and TLI compare the model with that baseline, so they are bounded by how badly it fits.  For TLI the bound is
    exact: with both noncentralities positive, TLI = 1 - (RMSEA / baseline RMSEA)^2 (Tucker & Lewis 1973's index and
    Steiger & Lind's RMSEA, each with its own df and the same N, written in one another's terms), so the caution
    gives the TLI a model of RMSEA .05 would have with this baseline.  ``within``: the average correlation of the
    items that share a factor (:func:`within_factor_correlation`): the caution says the items correlate weakly only
    when it lies below :data:`WEAK_ITEM_CORRELATION`; otherwise that the low figure is the baseline index's, which
    averages its misfit over every pair of items (new-user trial s25: 36 items of two waves correlating .45 within
    their factors were said to correlate weakly); without it, nothing about the items."""
    from cfa_tool.assessment.fit_indices import UNINFORMATIVE_BASELINE_RMSEA as BOUND
    from cfa_tool.assessment.fit_indices import baseline_fits_words, rmsea_value
    from cfa_tool.numerics.plain import journal_decimal

    if fit is None or fit.df <= 0 or fit.baseline_df <= 0:
        return ()
    base_chi = fit.baseline_chi_square if robust is None else robust.baseline_chi_square_scaled
    if not np.isfinite(base_chi):
        return ()
    value = rmsea_value(base_chi, fit.baseline_df, n_obs, groups)
    if value >= BOUND:
        return ()
    which = "" if robust is None else f" (from its {robust.statistic()})"
    prefix = "" if robust is None else "robust "
    close = 0.05  # the RMSEA of close fit (Browne & Cudeck 1993, recalled from memory; a convention)
    about = "" if robust is None else "about "  # exact for the normal-theory indices, near for the robust ones
    fits = baseline_fits_words(fit, robust)  # its chi-square at most its df: TLI not defined, CFI 0/0 or 0 (s22)
    bound = (f"here a model with an RMSEA of {journal_decimal(close).rstrip('0')} would have a TLI of {about}"
             f"{journal_decimal(1 - (close / value) ** 2, 0.95)}" if value > close else
             f"here {fits}" if fits else
             f"here the baseline model itself fits closely (RMSEA at most {journal_decimal(close).rstrip('0')}), so "
             f"CFI and TLI compare the model with one that already fits and can take almost any value, or none")
    shared = "" if within is None else f"the items that share a factor correlate {journal_decimal(within, digits=2)} on average"
    if within is not None and within < WEAK_ITEM_CORRELATION:
        opening, apart = "The items correlate weakly: t", (
            f", and {shared} (below {journal_decimal(WEAK_ITEM_CORRELATION, digits=2)}, the lower end of the average "
            f"inter-item correlations recommended for a scale by Clark & Watson 1995, recalled from memory)")
    else:  # the figure is the index's: nothing about the items unless their correlations say it (s25)
        opening, apart = "T", ("" if within is None else
                               f"; {shared}, so the low figure is the baseline index's (its misfit averaged over every "
                               f"pair of items), not a sign of weak correlations among the items")
    return (Problem(ProblemKind.UNINFORMATIVE_BASELINE, (), float(value),
                    f"{opening}he baseline model, in which no two items correlate, has an "
                    f"RMSEA{which} of {journal_decimal(value, BOUND)}, below {journal_decimal(BOUND)} (a rule of "
                    f"thumb recalled from Kenny, Kaniskan & McCoach 2015, not a law){apart}. The {prefix}CFI and TLI compare "
                    f"the model with that baseline, so with a baseline that misfits this little a small "
                    f"change in the model's own misfit moves them a long way: TLI is {about}1 - (RMSEA / baseline "
                    f"RMSEA)\u00b2, and {bound}. The solution is not at fault: this is about how to read the "
                    f"{prefix}CFI and TLI.",
                    f"judge the fit by the RMSEA, the SRMR and the residual correlations: the {prefix}CFI and TLI "
                    f"give no reading here." if fits else
                    f"read the {prefix}CFI and TLI beside the RMSEA, the SRMR and the residual correlations rather "
                    f"than alone."),)


def poor_fit_problems(read) -> tuple[Problem, ...]:
    """A caution when the fit figures the report says to read (assessment.fit_indices.IndicesToRead, or None) lie
    beyond the bounds of poor fit (:data:`cfa_tool.assessment.fit_indices.POOR_FIT_BOUNDS`): the loadings, reliability
    and scores then describe a model the data do not support, and a reader of those tables should hear it first."""
    from cfa_tool.assessment.fit_indices import POOR_FIT_BOUNDS as BOUND
    from cfa_tool.numerics.plain import journal_decimal

    if read is None or read.df <= 0:
        return ()
    prefix = "" if read.test == "normal" else "robust "
    missed = []
    if np.isfinite(read.cfi) and read.cfi < BOUND["cfi"]:
        missed.append(f"{prefix}CFI {journal_decimal(read.cfi, BOUND['cfi'])}, below "
                      f"{journal_decimal(BOUND['cfi'], digits=2)}")
    if np.isfinite(read.rmsea) and read.rmsea > BOUND["rmsea"]:
        missed.append(f"{prefix}RMSEA {journal_decimal(read.rmsea, BOUND['rmsea'])}, above "
                      f"{journal_decimal(BOUND['rmsea'], digits=2)}")
    if not missed:
        return ()
    rmsea_missed = np.isfinite(read.rmsea) and read.rmsea > BOUND["rmsea"]
    # the RMSEA's source only beside an RMSEA it judges (re-check s18: cited beside a robust RMSEA of .023)
    source = "; an RMSEA above .10 is poor fit in MacCallum, Browne & Sugawara 1996" if rmsea_missed else ""
    return (Problem(ProblemKind.POOR_FIT, (), None,
                    f"The model fits these data poorly ({'; '.join(missed)}: bounds of common practice, not laws"
                    f"{source}), so its loadings, "
                    f"reliability and any scores describe a model the data do not support.",
                    "read the largest residual correlations and modification indices and compare rival models before "
                    "interpreting the estimates; a model changed because of these data needs new data to confirm it."),)


def non_normal_problems(judged: Sequence[tuple[str | None, object]], robust, method, where: str = "") -> tuple[Problem, ...]:
    """A caution for each group (``judged``: its label, None for one group of rows, and its answers'
    assessment.normality.Normality, or None where not computed) whose answers' tails depart from normal ones enough
    to matter (assessment.normality.departs_materially), in a fit whose chi-square and standard errors assume normal
    answers: none when the fit has the robust ones (``robust``: inference.robust.RobustFit or None) and none of
    ordinal items (``method``: method.FitMethod), whose least squares assume no normal answers.  The remedy is named:
    the scaled test and robust standard errors (with missing-data helpers, with which they are not offered, a fit
    without the helpers).  Fit, compare and invariance give it alike (s25: a kurtosis z of 131 was a note under the
    fit table).  ``where``: the rows or items judged, after 'The answers' (' of the calibration sample (a.csv)',
    ' on the items of models one and two'), where a report judges several sets of them."""
    from cfa_tool.assessment.normality import (NORMALIZED_KURTOSIS_BOUND, RELATIVE_KURTOSIS_BOUND,
                                               departs_materially)

    if robust is not None or method.ordinal:
        return ()
    found = []
    for label, n in judged:
        if n is None or not departs_materially(n):
            continue
        ratio = n.relative_kurtosis
        heavy = ratio > 1.0
        each = (f"; {counted(n.rows_with_gaps, 'row')} with gaps judged each on the items it answered, Yuan, Lambert & "
                f"Fouladi 2004" if n.rows_with_gaps else "")
        effect = ("so it rejects models that hold more often than its level, and the standard errors tend to be too "
                  "small" if heavy else
                  "so it passes models that misfit more often than its level says, and the standard errors tend to be "
                  "too large")
        explanation = (
            f"The answers{where} depart from multivariate normality: their tails are {'heavier' if heavy else 'lighter'} than "
            f"normal ones, with Mardia's multivariate kurtosis {n.kurtosis:.1f} where normal answers give "
            f"{n.kurtosis_expected:.1f}, {ratio:.2f} times as much (z = {n.kurtosis_z:.1f}; Mardia 1970{each}). Under "
            f"such tails a normal-theory chi-square is about {ratio:.2f} times its value under normality (for "
            f"elliptical distributions; Browne 1984, recalled from memory), {effect}. (Judged by a z beyond "
            f"{NORMALIZED_KURTOSIS_BOUND:g}, a rule of thumb after Bentler 2006, recalled from memory, and a kurtosis "
            f"at least {journal_decimal(RELATIVE_KURTOSIS_BOUND).rstrip('0')} away from its normal value as a ratio, "
            f"a line of this tool: conventions, not laws.)")
        found.append(Problem(ProblemKind.NON_NORMAL_ANSWERS, (), float(ratio), explanation,
                             _robust_advice(bool(method.helpers)), label))
    return tuple(found)


def _robust_advice(helpers: bool) -> Note:
    """What to try about answers far from normal: the scaled test and robust standard errors (the words of
    reporting.remedies.Remedy.ROBUST, its option a Command, which the Word file leaves out); with missing-data
    helpers, with which they are not offered, a fit without the helpers beside this one."""
    robust = Command(f" ({Option.ROBUST})", takes=taken_by(Option.ROBUST), elsewhere=f" (a fit of the model with {Option.ROBUST})")
    if helpers:
        return Note(("the scaled test and robust standard errors, which do not assume normal answers, are not offered "
                     "with missing-data helpers: fit the model again without the helpers and with the scaled test and "
                     "robust standard errors", robust, ", and read the two fits side by side."))
    return Note(("fit with the scaled test and robust standard errors", robust,
                 ", which do not assume normal answers, and read their chi-square, fit indices and standard errors."))
