"""Result objects of a fit: frozen, serialisable, free of formatting."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from cfa_tool.assessment.admissibility import solution_first
from cfa_tool.assessment.diagnostics import Cases, case_dicts
from cfa_tool.assessment.fit_indices import FitIndices, IndicesToRead
from cfa_tool.assessment.identification import JUST_IDENTIFIED
from cfa_tool.assessment.modification import ModificationIndices
from cfa_tool.assessment.normality import Normality
from cfa_tool.assessment.reliability import factor_dicts
from cfa_tool.data.kept_rows import RowNaming, rows_listed
from cfa_tool.errors import EstimationError, check_rows_counted
from cfa_tool.language.names import names_text
from cfa_tool.method import FitMethod
from cfa_tool.note_parts import Text
from cfa_tool.numbers import count_text, cut_list, names_shown
from cfa_tool.numerics.plain import clean, clean_list, plain_array
from cfa_tool.views import Presentable, scorer

if TYPE_CHECKING:  # the robust test's module is imported by the fits that compute one
    from cfa_tool.inference.robust import RobustFit
    from cfa_tool.data.filters import RowFilter

DEFAULT_MI_THRESHOLD = 3.84  # chi-square(1) critical value at alpha = .05


@dataclass(frozen=True)
class EstimateRow:
    """One parameter's estimate with its standard error, test, interval and standardized values."""
    kind: str
    variables: tuple[str, ...]
    free: bool
    estimate: float
    se: float
    z: float
    p_value: float
    ci95: tuple[float, float]
    standardized: float
    standardized_factors_only: float
    origin: str
    group: str | None = None

    def to_dict(self) -> dict:
        return estimate_dicts((self,))[0]


def estimate_dicts(rows: tuple[EstimateRow, ...] | list[EstimateRow]) -> list[dict]:
    """Estimate rows as JSON-ready dictionaries, their numbers checked a column at a time (NaN and infinities as
    None): a column whose sum is finite holds no NaN or infinity and is used as it is."""
    columns = [_json_numbers([r.estimate for r in rows]), _json_numbers([r.se for r in rows]),
               _json_numbers([r.z for r in rows]), _json_numbers([r.p_value for r in rows]),
               _json_numbers([r.ci95[0] for r in rows]), _json_numbers([r.ci95[1] for r in rows]),
               _json_numbers([r.standardized for r in rows]), _json_numbers([r.standardized_factors_only for r in rows])]
    return [{"kind": r.kind, "variables": list(r.variables), "group": r.group, "free": r.free, "estimate": estimate,
             "se": se, "z": z, "p_value": p, "ci95": [low, high], "standardized": std, "standardized_factors_only": lat}
            for r, estimate, se, z, p, low, high, std, lat in zip(rows, *columns)]


def _json_numbers(column: list) -> list[float | None]:
    """A column of numbers as Python floats, NaN and infinities as None.  A column of Python floats whose sum is
    finite is used as it is (a NaN or an infinity makes the sum one; numpy numbers make it a numpy one); any other
    goes through value by value."""
    total = sum(column)
    if type(total) is float:  # Python floats, or numpy numbers after a Python float's NaN (then value by value below)
        if total - total == 0.0:
            return column
        if all(type(v) is float for v in column):  # as float(v) gives them, without a call per number
            return [v if v - v == 0.0 else None for v in column]
    return [float(v) if v - v == 0.0 else None for v in column]


def _percent_below_all(share: float) -> str:
    """A share below 1 as a percentage that never reads as 100% (99.96% is '99.96%', not '100%')."""
    for digits in (0, 1, 2, 3):
        text = f"{100 * share:.{digits}f}"
        if float(text) < 100:
            return text + "%"
    return "under 100%"


@dataclass(frozen=True)
class CheckResult(Presentable):
    """What ``check`` found: the parsed model and how the data cover its variables (``summary()`` the text the
    command prints; a notebook shows its report)."""

    spec: object  # the parsed model (language.spec.Spec)
    source: str
    rows: int  # rows read (with a group, rows with a group label)
    complete: int  # rows that answer every model variable
    with_gaps: int  # rows that answer some but not all (used by full-information ML)
    empty: int  # rows that answer none (left out)
    coverage: dict  # share of rows answering each model variable
    groups: tuple[str, ...] | None
    ordinal: bool = False  # ordinal items: rows with gaps are used through pairwise present rows
    design: object = None  # the sampling design (data.sample_design.SampleDesign) when one is given
    caution: str | None = None  # too few clusters for cluster-robust standard errors (the fit's Problem)
    notes: tuple[str, ...] = ()  # row filters, rows the design leaves out (weight 0), group labels read as one
    #: values in the item columns that look like no answers (assessment.admissibility.Problem): first in every view
    problems: tuple = ()
    without_group: int = 0  # rows without a group label (left out)
    #: rows that answer every model variable only if the values that look like no answers (``problems``) are answers
    complete_by_odd_values: int = 0
    rows_in_file: int | None = None  # rows read before the row filters (None when no filter was given)
    #: under frequency weights, (read, complete, with gaps, with no answer) each row counted as often as its weight,
    #: as the fit counts them (its N); None otherwise
    counted: tuple[float, float, float, float] | None = None
    #: summary statistics (data.summary_stats.AnalysedMatrix): no rows, so no row counts or coverage; ``rows`` is N
    analysed: object | None = None
    #: with groups, the rows each group would be fitted with (as ``groups``), and the free parameters of each group's
    #: model
    group_rows: tuple[int, ...] = ()
    group_parameters: tuple[int, ...] = ()
    #: rows of weight 0 under sampling or frequency weights: read, and left out before every count above
    zero_weight: int = 0
    #: the row numbers of the rows that answer no model variable (``empty``), as the file numbers them
    empty_rows: tuple[int, ...] = ()
    #: how the rows are named (data.kept_rows.RowNaming: a file's row numbers, a data frame's index labels)
    row_naming: RowNaming = RowNaming.FILE_ROW
    #: the text lines of a text file's rows that start on a line of another number (data.kept_rows.text_lines)
    text_lines: dict[int, int] = field(default_factory=dict, compare=False)
    #: the answers per category of the items of few answer categories (data.answer_counts.AnswerCounts), one per
    #: group (one without groups); () when no item is ordinal or of few categories
    answers: tuple = ()
    #: what stops an ordinal fit of these data, each refusal with its place, all of them (a fit stops at the first)
    refusals: tuple[str, ...] = ()
    #: the one line a fit of these rows (continuous items) stops with, its refusal's words, "" when none: the groups
    #: too small to analyse, rows with gaps that leave the saturated model without an estimate; their cautions are
    #: among ``problems``
    stops_fit: str = ""
    #: each group's share of the model variables' cells its rows answered, (label, share) in the groups' order; ()
    #: without groups
    group_coverage: tuple[tuple[str, float], ...] = ()
    #: the model's degrees of freedom for continuous items (variances, covariances and means less the free
    #: parameters; assessment.identification.moments_count); None for ordinal items, whose fit counts thresholds too
    degrees_of_freedom: int | None = None
    #: how a delimited text file was read (data.readers.TextReading; None otherwise): the report's CSV tables follow
    #: its convention (data.csv_convention)
    reading: object | None = None

    @property
    def admissible(self) -> bool:
        return True  # nothing was fitted: its problems are cautions about the data

    def summary(self) -> str:
        return "\n".join(str(line) for line in self.summary_lines())

    def summary_lines(self) -> list:
        """The lines of :meth:`summary`, each note as it was made (a note_parts.Note keeps its commands apart, which
        each view writes its own way: the Word file names no option and no statement of the model file)."""
        spec = self.spec
        # the design's cautions (too few clusters, uneven weights) are among ``problems``, first as in the fit's views
        df = self.degrees_of_freedom
        lines = [f"The model is valid: {len(spec.factors)} factor{'s' if len(spec.factors) != 1 else ''}, "
                 f"{len(spec.observed_names)} indicators, all found in {self.source}"
                 + ("." if df is None else f"; {df} degree{'s' if df != 1 else ''} of freedom."
                    if df else f"; 0 degrees of freedom: {JUST_IDENTIFIED}.")]
        if self.groups and self.group_rows:
            lines.append(f"Groups: {len(self.groups)} (" + ", ".join(
                f"{g}: {count_text(n)} row{'s' if n != 1 else ''}" for g, n in zip(self.groups, self.group_rows))
                + (f"; the model has {self.group_parameters[0]} free parameters in each group"
                   if len(set(self.group_parameters)) == 1 else "") + ").")
        elif self.groups:
            lines.append(f"Groups: {len(self.groups)} ({', '.join(self.groups)}).")
        if self.analysed is not None:
            from cfa_tool.data.summary_stats import given_with

            lines.append(f"Data: summary statistics, {self.analysed.value}, with N = {self.rows} as given "
                         f"{given_with(self.source)}; "
                         f"it holds no rows of answers, so there are no row counts or coverage.")
            lines.extend("Note: " + note + "." for note in self.notes)
            return lines
        kept = self.rows + self.without_group + self.zero_weight
        # counts grouped by thousands as every other line writes them (numbers.count_text; new-user trial s22)
        read = (f"{count_text(kept)} read" if self.rows_in_file is None else
                f"{count_text(self.rows_in_file)} read, {count_text(kept)} kept by the row filter")
        if self.zero_weight:
            read += f", {count_text(self.zero_weight)} of weight 0 (left out)"
        read = (f"{read}, {count_text(self.without_group)} without a group label (left out), {count_text(self.rows)} "
                f"with one:" if self.without_group else f"{read},")
        # codes for no answer, typing errors or a totals row: whatever the cautions above call them (review s13)
        odd = (f" (and {count_text(self.complete_by_odd_values)} complete only if the odd values named above are answers)"
               if self.complete_by_odd_values else "")
        lines.append(f"Rows: {read} {count_text(self.complete)} complete{odd}, {count_text(self.with_gaps)} with missing answers "
                     f"({'used through pairwise present rows for ordinal items' if self.ordinal else 'used by full-information ML'}, "
                     f"the default), {count_text(self.empty)} with no answer to any model variable"
                     + (f" ({rows_listed(self.empty_rows, naming=self.row_naming, lines=self.text_lines)})."
                        if self.empty_rows else "."))
        if self.counted is not None:
            read, complete, gaps, empty = (f"{v:,.10g}" for v in self.counted)
            lines.append(f"Rows counted by their frequency weights, as the fit counts them: {read} read, {complete} "
                         f"complete, {gaps} with missing answers, {empty} with no answer.")
        low = sorted((v, k) for k, v in self.coverage.items() if v < 1)
        if low:
            rest = "; every other item 100%" if len(low) < len(self.coverage) else ""
            lines.append("Coverage (share of rows answering): "
                         + cut_list(low, 10, lambda vk: f"{vk[1]} {_percent_below_all(vk[0])}", lead=", and ")
                         + (" below 100%" if len(low) > names_shown(len(low), 10) else "") + rest + ".")
        if len(self.group_coverage) > 1:  # new-user trial s17: a department's gaps (87% against 96%) shown nowhere
            shares = sorted(self.group_coverage, key=lambda g: g[1])
            lines.append("Share of the model variables' answers given, by group (lowest first): " + ", ".join(
                f"{g} {'100%' if v >= 1 else _percent_below_all(v)}" for g, v in shares) + ".")
        if self.design is not None:
            lines.append(self.design.status()[0].upper() + self.design.status()[1:] + "; "
                         + ("sandwich standard errors and a scaled test in the fit" if self.design.columns.robust else
                            "each row counted as often as its weight in the fit") + ".")
        lines.extend("Note: " + note + "." for note in self.notes)
        return lines

    def to_dict(self) -> dict:
        if self.analysed is not None:  # summary statistics: N, and no rows to count
            return {"valid": True, "source": self.source, "factors": list(self.spec.factor_names),
                    "indicators": list(self.spec.observed_names), "n_obs": self.rows,
                    "matrix_analysed": self.analysed.name.lower(), "rows": None, "coverage": None,
                    "problems": [p.to_dict() for p in self.problems], "notes": [str(x) for x in self.notes],
                    "stops_fit": None}
        return {"valid": True, "source": self.source, "factors": list(self.spec.factor_names),
                "indicators": list(self.spec.observed_names), "degrees_of_freedom": self.degrees_of_freedom,
                "rows": self.rows, "complete_rows": self.complete,
                "rows_with_gaps": self.with_gaps, "rows_without_answers": self.empty,
                "rows_without_answers_at": list(self.empty_rows),
                "complete_rows_by_values_not_answers": self.complete_by_odd_values, "coverage": dict(self.coverage),
                "groups": list(self.groups) if self.groups else None,
                "group_rows": dict(zip(self.groups, self.group_rows)) if self.groups and self.group_rows else None,
                "group_coverage": dict(self.group_coverage) if self.group_coverage else None,
                "group_free_parameters": (dict(zip(self.groups, self.group_parameters))
                                          if self.groups and self.group_parameters else None),
                "design": self.design.to_dict() if self.design is not None else None, "caution": self.caution,
                "rows_without_group": self.without_group, "rows_of_weight_zero": self.zero_weight,
                "rows_in_file": self.rows_in_file,
                "problems": [p.to_dict() for p in self.problems],
                "rows_counted_by_frequency_weights": None if self.counted is None else dict(zip(
                    ("read", "complete", "with_gaps", "without_answers"), self.counted)),
                "notes": [str(x) for x in self.notes],
                "stops_an_ordinal_fit": list(self.refusals),
                # the one line a fit of these rows (continuous items) stops with, as the check's exit gives it
                "stops_fit": self.stops_fit or None,
                "answers_per_category": [a.to_dict() for a in self.answers],
                **({"reading": clean(self.reading.to_dict())} if self.reading is not None else {})}


@dataclass(frozen=True)
class DataSummary:
    """The data a fit analysed: rows read and left out, and each item's summary."""
    source: str
    rows_read: int
    rows_dropped: int
    n_obs: int
    variables: tuple[str, ...]
    means: tuple[float, ...]
    sds: tuple[float, ...]
    answered: tuple[int, ...] = ()  # rows answering each item (empty when the raw rows are not at hand)
    skewness: tuple[float, ...] = ()
    kurtosis: tuple[float, ...] = ()  # excess kurtosis
    # ordinal items: per item, (answer value, rows giving it) for each category, in order
    categories: tuple[tuple[tuple[float, int], ...], ...] = ()
    # ordinal items with pairwise present rows: (item, item, rows answering both) for each pair
    pair_rows: tuple[tuple[str, str, int], ...] = ()
    # row filters (--keep) as parsed (data.filters.RowFilter: the text as written and the words of a methods section),
    # and the rows the file held before them (None without filters)
    row_filters: tuple[RowFilter, ...] = ()
    rows_in_file: int | None = None
    # summary statistics: what the file did not give (data.summary_stats.NotGiven), so the fit does not know it
    not_given: tuple = ()
    # values read as no answer (--missing-codes), which scoring other data with this fit reads so too
    missing_codes: tuple[float, ...] = ()
    # the codes of ``missing_codes`` that some item cell held, which the methods paragraph names (None: not known,
    # as a fit of a data frame given without the file's reading has it: every code given is named)
    codes_found: tuple[float, ...] | None = None
    # the words of no answer the run added (--missing-codes 'Ne sait pas', data.non_answers.also_no_answer), which
    # scoring other data with this fit reads so too (the values read so are named by ``non_answers``)
    no_answer_words: tuple[str, ...] = ()
    # values of the model's items that the data file itself marks as no answer, read as missing
    # (data.non_answers.NonAnswer): the methods paragraph names them
    non_answers: tuple = ()
    # the ranges of values the data file declares missing in the model's items (data.non_answers.DeclaredRange: SPSS
    # '90 thru 99') and the codes its value labels mark as no answer there (data.non_answers.LabelledNoAnswer), held by
    # the rows or not, every value of which scoring other data with this fit reads as no answer
    declared_ranges: tuple = ()
    # summary statistics: which matrix was analysed (data.summary_stats.AnalysedMatrix); None for rows of answers
    analysed: object | None = None
    # per item, the lowest and highest answer of the rows analysed (empty without rows), so that scoring other data
    # with this fit can name answers outside them (a file coded 0-4 scored with a fit of answers coded 1-5)
    ranges: tuple[tuple[float, float], ...] = ()
    # per item whose data file's value labels declare its answers, (item, lowest, highest) of the labelled answers
    # (data.missing_codes.labelled_scale), so that scoring other data with this fit judges answers by the scale the
    # file declared, as it does by an 'answers' statement's codes, not only by those its rows happened to give
    labelled_scales: tuple[tuple[str, float, float], ...] = ()
    # the rows the ``answered`` counts are of (None: N), which frequency weights make fewer than N (hostile s21: 190
    # rows answering an item of a group of 191 rows counted as 400 read as 47.5%)
    answered_of: int | None = None
    # rows left out for having no value in the group column (counted in rows_dropped, for another reason than gaps)
    without_group: int = 0
    # rows the sampling design's columns left out (counted in rows_dropped): a weight of 0, or a row that answers no
    # item and has no weight, cluster or stratum (data.sample_design.check_design, each said in a note)
    by_design: int = 0
    # the model's coding of answers recorded as words (data.answer_words.coding_record), which scoring other data with
    # this fit reads so too
    answer_coding: tuple = ()
    # the model's 'join answers' statements (data.joined_answers.joins_record): categories of ordinal items analysed as
    # one, which the methods paragraph names and scoring other data with this fit applies too
    joined_answers: tuple = ()
    # the items of answer_coding whose answers in the data held no word, numbers alone (data.answer_words.NUMBERS_ONLY):
    # the methods paragraph says their numbers were read, not that words were coded
    numbers_only: tuple[str, ...] = ()
    # values of the model's items that look like no answers (data.odd_values.OddValues: a missing-value code, a totals
    # or means row) but were analysed as answers, as the file holds them: the methods paragraph says so
    odd_values: tuple = ()
    # how a delimited text file was read (data.readers.TextReading: encoding, separator, decimal mark); None otherwise
    reading: object | None = None
    # how the rows are named (data.kept_rows.RowNaming: a file's row numbers, a data frame's index labels)
    row_naming: RowNaming = RowNaming.FILE_ROW
    # columns read under new names (data.renamed_columns.ColumnRename: --rename), which every view names
    renamed: tuple = ()
    # with missing-data helpers: the rows analysed (in n_obs) that answer no item but a helper, which enter the
    # helpers' part of the joint likelihood (estimation.auxiliary)
    helpers_only: int = 0
    # items of at most a few answer categories analysed as continuous (data.descriptives.few_category_items): the
    # methods paragraph says so
    few_categories: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        """No count of rows is negative and none exceeds the rows read (errors.check_rows_counted): a report of
        '-325 of 480 rows' is a bug, stopped here."""
        check_rows_counted(self.without_group + self.by_design, self.rows_dropped,
                           f"{self.source}: the rows without a group label or left out by the design")
        check_rows_counted(self.rows_dropped, self.rows_read, f"{self.source}: the rows left out")

    @property
    def pair_range(self) -> tuple[int, int] | None:
        """The smallest and largest number of rows a pair of items was computed from (pairwise present rows)."""
        if not self.pair_rows:
            return None
        counts = [c for _, _, c in self.pair_rows]
        return min(counts), max(counts)

    def to_dict(self) -> dict:
        """The data block of a fit's JSON.  ``sds`` are those of the moments the model analyses (divisor N, as
        ``sd_divisor`` says; the reports' tables show SDs with divisor N - 1), null when the file gave none (a
        correlation matrix alone), as ``means`` are; summary statistics hold no rows, so their ``rows_read`` and
        ``rows_dropped`` are null (N is ``n_obs``, as given in the file)."""
        rows = self.analysed is None
        # each value as clean() (numerics.plain) makes it, the lists of numbers checked at once (clean_list)
        out = {
            "source": clean(self.source),
            "rows_read": clean(self.rows_read) if rows else None,
            "rows_dropped": clean(self.rows_dropped) if rows else None,
            "n_obs": clean(self.n_obs),
            "variables": clean_list(self.variables),
            "means": None if any(g.value == "means" for g in self.not_given) else clean_list(self.means),
            "sds": None if any(g.value == "standard_deviations" for g in self.not_given) else clean_list(self.sds),
            "sd_divisor": "N",
        }
        if self.skewness:
            out.update(answered=clean_list(self.answered), skewness=clean_list(self.skewness),
                       excess_kurtosis=clean_list(self.kurtosis))
        if self.categories:
            out["category_counts"] = _category_counts(self.variables, self.categories)
        if self.pair_rows:
            out["pair_rows"] = _pair_rows(self.pair_rows)
        if self.row_filters:
            out.update(row_filters=clean([f.text for f in self.row_filters]), rows_in_file=clean(self.rows_in_file))
        if self.not_given:
            out["not_given"] = clean([g.value for g in self.not_given])
        if self.missing_codes:
            out["missing_codes"] = clean(list(self.missing_codes))
        if self.no_answer_words:
            out["no_answer_words"] = list(self.no_answer_words)
        if self.non_answers:  # what the data file declared missing or labelled so: scores of other data read it so
            from cfa_tool.data.non_answers import saved_non_answers

            marked = saved_non_answers(self.non_answers)
            if marked:
                out["marked_no_answer_by_the_file"] = clean(marked)
        if self.declared_ranges:
            from cfa_tool.data.non_answers import LabelledNoAnswer

            for key, kept in (("missing_ranges_declared_by_the_file",
                               [r for r in self.declared_ranges if not isinstance(r, LabelledNoAnswer)]),
                              ("codes_labelled_no_answer_by_the_file",
                               [r for r in self.declared_ranges if isinstance(r, LabelledNoAnswer)])):
                if kept:
                    out[key] = clean([r.to_dict() for r in kept])
        if self.reading is not None:
            out["reading"] = clean(self.reading.to_dict())
        if self.renamed:
            out["renamed_columns"] = clean([r.to_dict() for r in self.renamed])
        if self.analysed is not None:
            out["matrix_analysed"] = clean(self.analysed.name.lower())
        if self.without_group:
            out["rows_without_group"] = clean(self.without_group)
        if self.by_design:
            out["rows_left_out_by_the_design"] = clean(self.by_design)
        if self.helpers_only:
            out["rows_answering_only_helpers"] = clean(self.helpers_only)
        if self.few_categories:
            out["few_categories_analysed_as_continuous"] = list(self.few_categories)
        if self.answer_coding:
            from cfa_tool.data.answer_words import coding_json

            out["answer_coding"] = clean(coding_json(self.answer_coding))
            if self.numbers_only:
                out["answers_read_as_numbers"] = list(self.numbers_only)
        if self.joined_answers:
            from cfa_tool.data.joined_answers import joins_json

            out["joined_answers"] = clean(joins_json(self.joined_answers))
        if self.ranges:
            out["answer_ranges"] = _answer_ranges(self.variables, self.ranges)
        if self.labelled_scales:
            out["answer_scales_labelled_by_the_file"] = {item: clean_list((low, high))
                                                         for item, low, high in self.labelled_scales}
        return out


def _category_counts(variables: tuple[str, ...], categories: tuple) -> dict:
    """``clean({name: [{"value": v, "rows": c}, ...]})`` (numerics.plain.clean) of each item's categories: built as it
    is when every value is a finite Python float and every count a Python int (what clean leaves as it is)."""
    if all(type(v) is float and v - v == 0.0 and type(c) is int for cats in categories for v, c in cats):
        return {name: [{"value": v, "rows": c} for v, c in cats] for name, cats in zip(variables, categories)}
    return clean({name: [{"value": v, "rows": c} for v, c in cats] for name, cats in zip(variables, categories)})


def _pair_rows(pair_rows: tuple) -> list:
    """``clean([{"items": [a, b], "rows": c}, ...])``: built as it is when the names are text and the counts Python
    ints (what clean leaves as it is)."""
    if all(type(a) is str and type(b) is str and type(c) is int for a, b, c in pair_rows):
        return [{"items": [a, b], "rows": c} for a, b, c in pair_rows]
    return clean([{"items": [a, b], "rows": c} for a, b, c in pair_rows])


def _answer_ranges(variables: tuple[str, ...], ranges: tuple) -> dict:
    """Each item's lowest and highest answer as ``clean_list`` (numerics.plain) gives them: checked at once, the
    pairs copied as they are when every value is a Python float and their sum finite."""
    values = [v for r in ranges for v in r]
    if all(type(v) is float for v in values) and math.isfinite(sum(values)):
        return {name: list(r) for name, r in zip(variables, ranges)}
    return {name: clean_list(r) for name, r in zip(variables, ranges)}


def saved_categories(data: dict) -> tuple[tuple[tuple[float, int], ...], ...]:
    """The answer categories of a saved fit's data block (:meth:`DataSummary.to_dict`, its ``category_counts``) read
    back: per variable, each answer value with the rows giving it, lowest first (empty for a continuous item and for
    every item of a fit that recorded none).  The one reader of them, for scores and simulate alike; a block changed
    by hand raises KeyError, TypeError, ValueError or AttributeError, which the caller names."""
    counts = data.get("category_counts") or {}
    return tuple(tuple((float(c["value"]), int(c["rows"])) for c in counts.get(x, ())) for x in data["variables"])


@dataclass(frozen=True, eq=False)
class GroupResult:
    """What is specific to one group (the only group of a single-group fit)."""

    label: str | None
    data: DataSummary
    chi_square: float | None  # this group's share of the chi-square
    srmr: float | None
    r_squared: dict[str, float]
    sample_covariance: np.ndarray = field(repr=False)
    implied_covariance: np.ndarray = field(repr=False)
    residual_correlations: np.ndarray = field(repr=False)
    sample_mean: np.ndarray = field(repr=False)
    implied_mean: np.ndarray | None = field(repr=False, default=None)
    normality: Normality | None = None
    reliability: tuple = ()  # FactorReliability per factor
    htmt: tuple = ()  # Htmt per pair of first-order factors
    normalized_residuals: np.ndarray | None = field(repr=False, default=None)
    unusual_cases: Cases | tuple = ()  # assessment.diagnostics.Cases, largest Mahalanobis distances (() without)
    influential_cases: Cases | tuple = ()  # the same, largest shares of the chi-square
    # the factors' model-implied (total) covariance matrix, in the order of FitResult.latent: with higher-order
    # factors it differs from the factor (co)variance parameters, which are then disturbance (co)variances
    latent_covariance: np.ndarray | None = field(repr=False, default=None)

    def reliability_dict(self) -> dict:
        """The reliability rows as JSON; a factor whose loadings contradict the declared keying (reliability.miskeyed)
        has its coefficients withheld, null with the reason beside them, as every view withholds them (s24: the JSON
        and the report's table gave the omega the methods paragraph and the scores withhold)."""
        from cfa_tool.assessment.reliability import WITHHELD_BECAUSE, WITHHELD_COEFFICIENTS, miskeyed

        factors = factor_dicts(self.reliability)
        for d, r in zip(factors, self.reliability):
            if miskeyed(r):
                d.update({key: None for key in WITHHELD_COEFFICIENTS if key in d}, withheld=WITHHELD_BECAUSE)
        return {"factors": factors, "htmt": [clean(h.to_dict()) for h in self.htmt]}


    def diagnostics_dict(self, naming: RowNaming = RowNaming.FILE_ROW) -> dict:
        """``naming``: how the fit names its rows (DataSummary.row_naming), which each case row's JSON says."""
        return {
            "normalized_residuals": plain_array(self.normalized_residuals) if self.normalized_residuals is not None else None,
            "unusual_cases": case_dicts(self.unusual_cases, naming),
            "influential_cases": case_dicts(self.influential_cases, naming),
        }

    def residuals_dict(self, observed: tuple[str, ...]) -> dict:
        out = {
            "variables": list(observed),
            "covariance": plain_array(self.sample_covariance - self.implied_covariance),
            "correlation": plain_array(self.residual_correlations),
        }
        if self.implied_mean is not None:
            out["mean"] = plain_array(self.sample_mean - self.implied_mean)
        return out


@dataclass(frozen=True, eq=False)
class FitResult(Presentable):
    """Everything one fit found, as every view shows it."""
    model_name: str
    model_source: str
    model_text: str
    estimator: str  # how the model was fitted, in one line (the report's status line, the JSON's "estimator")
    method: FitMethod  # the same, typed: what code reads
    converged: bool
    iterations: int
    message: Text  # 'converged', or why not (a Note whose option a manuscript leaves out)
    n_obs: int
    data: DataSummary
    observed: tuple[str, ...]
    latent: tuple[str, ...]
    fit: FitIndices | None  # normal-theory: "for reference only" beside a robust test; fit_to_read is what to read
    estimates: tuple[EstimateRow, ...]
    # every one, largest first (rows built when read; those below the threshold computed when read: ScreenedIndices)
    modification_indices: ModificationIndices
    groups: tuple[GroupResult, ...]
    robust: RobustFit | None = None
    group_column: str | None = None
    warnings: tuple[str, ...] = ()
    mi_threshold: float = DEFAULT_MI_THRESHOLD
    mi_top: int | None = None
    theta: np.ndarray | None = field(repr=False, default=None)
    missing_data: dict | None = None  # coverage per item and missing-data patterns
    labels: dict | None = None  # variable and value labels from SPSS/Stata files
    description: object | None = None  # model.description.ModelDescription: what exactly was fitted
    problems: tuple = ()  # assessment.admissibility.Problem: what makes the solution impossible or doubtful
    parameter_covariance: np.ndarray | None = field(repr=False, default=None)  # of the free parameters (theta)
    parameter_labels: tuple[str, ...] = ()  # one per free parameter
    exploratory: tuple = ()  # exploration.blocks.RotatedBlock per exploratory block of the model
    design: object | None = None  # data.sample_design.SampleDesign: weights, clusters and strata used, if any
    #: assessment.missingness.CompletelyAtRandomTest: Little's test of rows with gaps under full-information ML
    completely_at_random: object | None = None
    #: (kind, variables, group) of the free estimates held equal across groups (held_equal_entries of the model's
    #: parameter table): every group's tables and the JSON read it
    held_equal: frozenset = frozenset()

    def cov_params(self):
        """The covariance matrix of the free parameters' estimates (the one the standard errors come from:
        model-based, or robust with a robust test or ordinal items), labelled, as a DataFrame."""
        import pandas as pd

        if self.parameter_covariance is None:
            raise EstimationError("no standard errors: the estimation did not converge")
        labels = list(self.parameter_labels)
        return pd.DataFrame(self.parameter_covariance, index=labels, columns=labels)

    def held_equal_across_groups(self) -> frozenset[tuple]:
        """(kind, variables, group) of each free estimate of a multi-group fit that is one parameter shared with
        another group (an 'invariance' level or an 'equal across groups' statement), as the parameter table says
        (:func:`held_equal_entries`, read once where the result is built); empty with one group."""
        return self.held_equal

    def conf_int(self, level: float = 0.95):
        """Wald intervals of the free parameters' estimates at ``level`` (estimate +/- z SE), one row per
        estimate row, as a DataFrame with kind, variables, group, estimate, lower and upper."""
        import pandas as pd

        from cfa_tool import options as check
        from cfa_tool.numerics.distributions import norm_ppf

        level = check.probability("the confidence level", level)
        z = float(norm_ppf(0.5 + level / 2))
        rows = [{"kind": r.kind, "variables": names_text(r.variables), "group": r.group, "estimate": r.estimate,
                 "lower": r.estimate - z * r.se, "upper": r.estimate + z * r.se}
                for r in self.estimates if r.free and np.isfinite(r.se)]
        return pd.DataFrame(rows, columns=["kind", "variables", "group", "estimate", "lower", "upper"])

    @property
    def fit_to_read(self) -> IndicesToRead | None:
        """The fit figures the report tells researchers to read: the robust test's (``robust``) when there is one,
        the normal-theory ones (``fit``, then marked "for reference only" in every report) otherwise."""
        return None if self.fit is None else IndicesToRead.of(self.fit, self.robust)

    @property
    def admissible(self) -> bool:
        """Whether the solution is possible at all: converged, and no problem that makes it inadmissible
        (negative variances, correlations beyond +/-1, matrices not positive definite, estimates on a bound,
        parameters the data barely determine)."""
        return self.converged and not any(p.kind.inadmissible for p in self.problems)

    # -- single-group conveniences (the first group when there are several)
    @property
    def r_squared(self) -> dict[str, float]:
        return self.groups[0].r_squared

    @property
    def sample_covariance(self) -> np.ndarray:
        return self.groups[0].sample_covariance

    @property
    def implied_covariance(self) -> np.ndarray:
        return self.groups[0].implied_covariance

    @property
    def residual_correlations(self) -> np.ndarray:
        return self.groups[0].residual_correlations

    @property
    def multigroup(self) -> bool:
        return self.group_column is not None

    # -- views
    def reported_modification_indices(self) -> ModificationIndices:
        return self.modification_indices.reported(self.mi_threshold, self.mi_top)

    def largest_residual_correlation(self, group: int = 0) -> tuple[str, str, float] | None:
        r = self.groups[group].residual_correlations
        if r.shape[0] < 2:
            return None
        lower = np.tril(np.abs(r), k=-1)
        i, j = np.unravel_index(np.argmax(lower), lower.shape)
        return self.observed[j], self.observed[i], float(r[i, j])

    def estimates_frame(self):
        import pandas as pd

        return pd.DataFrame(estimate_dicts(self.estimates))

    def reliability_scale(self) -> str:
        """What the JSON's reliability coefficients describe."""
        if not self.method.ordinal:
            return "observed items"
        return ("latent responses (ordinal), except observed_sum_omega: the keyed sum of the answers' codes "
                "(Green & Yang 2009)")

    def to_dict(self) -> dict:
        out = {
            "admissible": self.admissible,
            "problems": [p.to_dict() for p in self.problems],
            "converged": self.converged,
            "estimator": self.estimator,
            "ordinal_items": self.method.ordinal,
            "n_obs": self.n_obs,
            "model": {"name": self.model_name, "source": self.model_source},
            "data": self.data.to_dict(),
            "fit_to_read": clean(self.fit_to_read.to_dict()) if (self.fit is not None and self.converged) else None,
            "fit": clean(self.fit.to_dict()) if (self.fit is not None and self.converged) else None,
            "robust": clean(self.robust.to_dict()) if (self.robust is not None and self.converged) else None,
            "estimates": estimate_dicts(self.estimates),
        }
        if self.method.helpers:  # the auxiliary variables of the full-information likelihood (estimation.auxiliary)
            out["missing_helpers"] = list(self.method.helpers)
        if self.multigroup:
            out["group_column"] = self.group_column
            # the free parameters held equal across groups (one estimate shared); every other free one is the group's own
            out["parameters_held_equal_across_groups"] = [{"kind": k, "variables": list(v), "group": g}
                                                          for k, v, g in sorted(self.held_equal_across_groups(), key=str)]
            out["groups"] = [
                {
                    "name": g.label,
                    "n_obs": g.data.n_obs,
                    "chi_square": clean(g.chi_square) if self.converged else None,
                    "srmr": clean(g.srmr) if self.converged else None,
                    "r_squared": clean(dict(g.r_squared)),
                    "residuals": g.residuals_dict(self.observed),
                    "normality": clean(g.normality.to_dict()) if g.normality is not None else None,
                    "reliability": {**g.reliability_dict(), "scale": self.reliability_scale()},
                    "diagnostics": g.diagnostics_dict(self.data.row_naming),
                    **({"pair_rows": g.data.to_dict()["pair_rows"]} if g.data.pair_rows else {}),
                }
                for g in self.groups
            ]
        else:
            out["r_squared"] = clean(dict(self.r_squared))
            out["residuals"] = self.groups[0].residuals_dict(self.observed)
            normality = self.groups[0].normality
            out["normality"] = clean(normality.to_dict()) if normality is not None else None
            out["reliability"] = self.groups[0].reliability_dict()
            out["reliability"]["scale"] = self.reliability_scale()
            out["diagnostics"] = self.groups[0].diagnostics_dict(self.data.row_naming)
        out["missing_data"] = clean(self.missing_data) if self.missing_data is not None else None
        if self.completely_at_random is not None:
            out["missing_data"] = {**(out["missing_data"] or {}),
                                   "completely_at_random_test": clean(self.completely_at_random.to_dict())}
        out["design"] = clean(self.design.to_dict()) if self.design is not None else None
        if self.labels is not None:
            out["labels"] = {"variables": self.labels["variables"],
                             "values": {k: {str(code): text for code, text in v.items()} for k, v in self.labels["values"].items()}}
        if self.exploratory:
            out["exploratory_blocks"] = [block.to_dict() for block in self.exploratory]
        out["modification_indices"] = self.modification_indices.reported_dicts(self.mi_threshold, self.mi_top)
        if self.mi_top is not None:  # the list cut: how many reach the threshold (re-check s18: 1 kept of 5, no count)
            out["modification_indices_reaching_threshold"] = self.modification_indices.count_reaching(
                self.mi_threshold)
        out["warnings"] = [str(w) for w in self.warnings]  # a Note as its reader reads it
        return out

    def scores(self, data, **options):
        """Factor scores of the rows of ``data`` (other data as well) with this fit's parameters; ``options``:
        ``methods``, ``standard_errors``, ``id_column``, ``sheet``, ``missing_codes``, ``keep``,
        ``rename``, ``least_answered``, ``unanswered_factors`` (see cfa_tool.workflows.factor_scores.score_with_fit)."""
        return scorer()(self, data, **options)


def held_equal_entries(table) -> frozenset[tuple]:
    """(kind, variables, group label) of each free entry of a multi-group parameter table (model.parameters
    .ParameterTable) that is one parameter with the same entry of another group: the same free parameters with the same
    coefficients (``Parameter.terms``, indices into theta) and the same offset, so that its value is that entry's
    whatever the estimates (a loading shared by an invariance level; under effects coding also the loading that the
    shared others determine).  Estimates that merely happen to be equal are not held equal; empty with one group."""
    if not table.multigroup:
        return frozenset()
    groups_of: dict[tuple, set[int]] = {}
    for par in table.parameters:
        if par.terms:
            groups_of.setdefault((par.kind, par.variables, par.terms, par.offset), set()).add(par.group)
    return frozenset((kind, variables, table.groups[g]) for (kind, variables, _, _), groups in groups_of.items()
                     if len(groups) > 1 for g in groups)


def fit_result(*, spec, method: FitMethod, converged: bool, iterations: int, message: Text, theta: np.ndarray | None,
               n_obs: int, data: DataSummary, observed: tuple[str, ...], latent: tuple[str, ...], fit: FitIndices | None,
               robust: RobustFit | None, estimates, modification_indices, groups, warnings, options,
               group_column: str | None = None, problems: tuple = (), parameter_covariance: np.ndarray | None = None,
               parameter_labels: tuple[str, ...] = (), model=None,
               unit_variance_items: frozenset[str] = frozenset(), completely_at_random=None, table=None,
               group_matrices=None) -> FitResult:
    """The one place a FitResult is assembled, for every estimator (continuous, incomplete and ordinal
    items, one group or several), from the estimation's and the assessment's pieces.  The model's
    names and text come from ``spec``, the estimator line from ``method``, the display settings of
    modification indices from ``options``.  ``model`` (model.implied.StructuredModel) is needed when the model has
    exploratory blocks: they are rotated here (``unit_variance_items``: the items whose model-implied variance is 1,
    as the latent responses of ordinal items), and the modification indices that name their factors are left out
    (they would test the unrotated factors, which the report does not show).
    ``completely_at_random``: Little's test of the rows with gaps (assessment.missingness), when computed.
    ``table``: the model's parameter table (model.parameters.ParameterTable; ``model.table`` when not given), from
    which the estimates held equal across groups are read (:func:`held_equal_entries`).  ``group_matrices``: each
    group's model matrices at ``theta`` (model.implied.ModelMatrices, as the fit made them), which the intervals of
    omega read when given (else they are made again)."""
    groups = tuple(groups)
    chosen = getattr(options, "mi_chosen", ())
    if chosen and fit is not None and fit.df == 0:  # an option that cannot apply is an error, never ignored
        from cfa_tool.errors import OptionError

        raise OptionError(f"the model has 0 degrees of freedom: it reproduces the covariances exactly, so no parameter "
                          f"can be freed and there are no modification indices to show; {chosen[0]} cannot apply, "
                          f"remove it")
    if table is None and model is not None:
        table = model.table
    if table is not None and table.fixed_through_equality:  # a fix that reaches further than its statement: said
        from cfa_tool.assessment.identification import fixed_through_equality_notes

        warnings = tuple(warnings) + fixed_through_equality_notes(table)
    held = held_equal_entries(table) if table is not None and group_column is not None else frozenset()
    blocks = ()
    if spec.exploratory:
        from cfa_tool.exploration.blocks import rotate_blocks

        blocks = rotate_blocks(model, spec, theta if converged else None, parameter_covariance, unit_variance_items)
        inside = spec.exploratory_factors
        modification_indices = modification_indices.without(frozenset(inside))
        # the block's unrotated loadings and factor covariances, and coefficients computed from them, describe an
        # arbitrary orientation: the rotated block (``exploratory``) stands in for them
        estimates = [r for r in estimates if not inside.intersection(r.variables)]
        from dataclasses import replace

        groups = tuple(replace(g, reliability=tuple(r for r in g.reliability if r.factor not in inside),
                               htmt=tuple(h for h in g.htmt if not inside.intersection((h.first, h.second))))
                       for g in groups)
    if converged:  # a method factor that carries next to nothing: a caution
        from cfa_tool.assessment.method_factors import weak_factor_problems

        from cfa_tool.assessment.reliability import apart_from_weak_markers, keying_problems

        from cfa_tool.assessment.admissibility import (non_normal_problems, poor_fit_problems,
                                                       uninformative_baseline_problems)

        from cfa_tool.assessment.markers import weak_item_notes, weak_items, weak_markers

        weak = weak_markers(estimates, spec.exploratory_factors)  # markers that hardly measure their factors
        faint = weak_items(estimates, spec.exploratory_factors)  # items that hardly measure theirs, markers too
        if weak or faint:  # their signs judge no keying (assessment.reliability.apart_from_weak_markers)
            from dataclasses import replace

            warnings = tuple(warnings) + tuple(weak_item_notes(
                tuple(w for w in faint if (w.group, w.factor, w.item) not in {(m.group, m.factor, m.item) for m in weak}),
                [(g.label, g.reliability) for g in groups], len(groups) > 1))
            groups = tuple(replace(g, reliability=apart_from_weak_markers(
                g.reliability, [w for w in weak + faint if w.group is None or w.group == g.label])) for g in groups)
        problems = tuple(problems) + tuple(weak_factor_problems(estimates, latent, observed, groups, spec.method_factors,
                                                                spec.exploratory_factors)) + tuple(
            keying_problems(groups, weak, estimates))
        if fit is not None:
            from cfa_tool.assessment.admissibility import within_factor_correlation

            within = within_factor_correlation(spec, tuple(observed), [g.sample_covariance for g in groups])
            problems += uninformative_baseline_problems(fit, robust, n_obs, max(len(groups), 1), within)
            # tails the normal-theory test cannot bear: before the poor fit, which that test may have judged
            problems += non_normal_problems([(g.label if len(groups) > 1 else None, g.normality) for g in groups],
                                            robust, method)
            problems += poor_fit_problems(IndicesToRead.of(fit, robust))
    if (converged and parameter_covariance is not None and model is not None and not method.ordinal
            and any(g.reliability for g in groups)):  # (fits for loops have no reliability rows: nothing to add)
        # the delta-method standard error of each factor's omega (Raykov 2002), from the estimates' covariance
        from dataclasses import replace

        from cfa_tool.assessment.reliability_intervals import with_omega_errors

        groups = tuple(replace(g, reliability=with_omega_errors(g.reliability, model, theta, parameter_covariance, k,
                                                                     spec.reverse_keyed or None,
                                                                     group_matrices[k] if group_matrices else None))
                       for k, g in enumerate(groups))
    if len(groups) <= 1:  # one group: the rule of rows per parameter (groups of several: each group's, by the same rule)
        from cfa_tool.assessment.admissibility import one_sample_size_problems

        small, notes = one_sample_size_problems(n_obs, fit.n_free_parameters if fit is not None
                                                else len(parameter_labels), parameter_labels)
        problems, warnings = small + tuple(problems), tuple(warnings) + notes
    problems = solution_first(problems)  # an impossible solution before the cautions on rows and groups
    return FitResult(
        model_name=spec.title or spec.source, model_source=spec.source, model_text=spec.text,
        estimator=method.sentence(len(groups)), method=method, converged=converged, iterations=iterations,
        message=message, n_obs=n_obs, data=data, observed=observed, latent=latent, fit=fit, robust=robust,
        estimates=tuple(estimates), modification_indices=modification_indices, groups=groups,
        group_column=group_column, warnings=tuple(warnings), mi_threshold=options.mi_threshold, mi_top=options.mi_top,
        theta=theta, problems=tuple(problems), parameter_covariance=parameter_covariance,
        parameter_labels=tuple(parameter_labels), exploratory=blocks, completely_at_random=completely_at_random,
        held_equal=held,
    )
