"""The report's tables as plain data (title, columns, rows of text), shared by
every reporter: terminal, HTML, Markdown, LaTeX and CSV format the same tables."""

from __future__ import annotations

from dataclasses import dataclass, replace
from enum import Enum

import numpy as np

from cfa_tool.numbers import count_text, counted, cut_list, user_number
from cfa_tool.assessment.admissibility import ProblemKind, design_doubts, solution_first
from cfa_tool.assessment.identification import JUST_IDENTIFIED
from cfa_tool.assessment.fit_indices import TLI_NOT_CUT
from cfa_tool.assessment.reliability import WEAK_LINE, WITHHELD_BECAUSE, BifactorPart, Keying, miskeyed
from cfa_tool.data.labels import label_text
from cfa_tool.data.summary_stats import STANDARDIZED_ITEMS, given_with, source_words
from cfa_tool.exploration.choices import BlockErrors, FactorNaming
from cfa_tool.method import ADJUSTED_TEST, Items, MissingData, WeightKind
from cfa_tool.note_parts import Command, Note, TableReference, Text, View, capitalised, read, said, saved
from cfa_tool.language.names import names_text, written_group
from cfa_tool.options import option_in_both
from cfa_tool.model.description import CARRIED_BY_LOADINGS, parameter_words
from cfa_tool.reporting.one_item import one_item_factors, one_item_sentence
from cfa_tool.reporting.numbers import (est_num, est_unit, fit_index_text, guide_text, missing, num, p_phrase, p_value,
                                        short, unit, word_list)
from cfa_tool.reporting.paragraph import (factors_by_item_kind, form_gaps, form_gaps_sentence, group_labels,
                                         group_words, mcar_score_tests, mixed_kinds_sentence)
from cfa_tool.reporting.remedies import Remedy

GUIDE_NOTE = (
    "Guide values are common practice (Hu & Bentler 1999), not laws: they were derived for particular models and "
    "conditions, and meeting them does not prove the model right."
)
HIGH_STAKES_NOTE = (
    "If this scale is used for decisions about people (screening, hiring, diagnosis, ranking staff, wards or schools "
    "for rewards or sanctions), such use needs evidence of "
    "validity for that purpose and the judgement of a licensed professional under local rules."
)
# items of a matrix of the items (correlations, residual correlations) that the terminal shows: a wider one is cut
# into parts of a few columns each; the HTML, Markdown and Word reports and the table files show up to MAX_MATRIX
# (beyond, its cells are too small to read, and the report says where it is left out)
MAX_TERMINAL_MATRIX = 20
MAX_MATRIX = 60
HEAT_FULL = 0.15  # |value| at which a shaded cell has its full colour
HEAT_LEGEND = f"Shading: red positive, blue negative, full colour at {HEAT_FULL:g} or more in size.".replace("0.", ".")

KIND_TITLES = {
    "loading": "Loadings",
    "factor_variance": "Factor variances",
    "factor_covariance": "Factor covariances (standardized: correlations)",
    "residual_variance": "Residual (error) variances",
    "residual_covariance": "Residual covariances (standardized: residual correlations)",
    "intercept": "Intercepts",
    "mean": "Factor means",
    "threshold": "Thresholds of ordinal items (standardized: on the latent response's scale)",
}


@dataclass(frozen=True)
class ReportTable:
    """One table of a report as plain data: title, columns, rows of text and its note."""
    key: str
    title: str
    columns: tuple[str, ...]
    align: tuple[str, ...]  # "l" or "r" per column
    rows: tuple[tuple[str, ...], ...]
    note: Text | None = None  # words, or a Note whose commands and table references each view writes its own way
    flagged: tuple[int, ...] = ()  # rows that show a problem of the solution (marked in every format)
    # the same content as numbers, for data files (CSV), where a cell such as '< .001' or '[.04, .09]' would be
    # text: None when every text cell already reads as a number
    value_columns: tuple[str, ...] | None = None
    values: tuple[tuple, ...] | None = None
    faint: tuple[tuple[int, int], ...] = ()  # (row, column) cells shown faintly (e.g. small loadings)
    section: str = ""  # the heading of the part of the report the table opens or continues ('' for none)
    heat: bool = False  # numeric cells shaded by sign and size where a view can colour them (HTML, Word)
    matrix: bool = False  # a matrix of the items: left out of the terminal beyond MAX_TERMINAL_MATRIX items
    ids_column: int | None = None  # the column of respondents' ids (--id), which the Word report leaves out

    def to_dict(self) -> dict:
        """The table as JSON holds it (a saved result carries its report: see reporting.document)."""
        return {"key": self.key, "title": self.title, "columns": list(self.columns), "align": list(self.align),
                "rows": [list(r) for r in self.rows], "note": None if self.note is None else saved(self.note), "flagged": list(self.flagged),
                "value_columns": None if self.value_columns is None else list(self.value_columns),
                "values": None if self.values is None else [[_plain(v) for v in row] for row in self.values],
                "faint": [list(f) for f in self.faint], "section": self.section, "heat": self.heat,
                "matrix": self.matrix, "ids_column": self.ids_column}

    @classmethod
    def from_dict(cls, d: dict) -> "ReportTable":
        """A saved table, checked to be whole (a ValueError when a row, the alignment or a marked cell does not
        fit its columns, as after editing by hand)."""
        table = cls(str(d["key"]), str(d["title"]), tuple(map(str, d["columns"])), tuple(map(str, d["align"])),
                    tuple(tuple(map(str, r)) for r in d["rows"]), None if d.get("note") is None else read(d["note"]),
                    tuple(map(int, d.get("flagged", ()))),
                    None if d.get("value_columns") is None else tuple(map(str, d["value_columns"])),
                    None if d.get("values") is None else tuple(tuple(r) for r in d["values"]),
                    tuple((int(i), int(j)) for i, j in d.get("faint", ())), str(d.get("section", "")),
                    bool(d.get("heat", False)), bool(d.get("matrix", False)),
                    None if d.get("ids_column") is None else int(d["ids_column"]))
        width = len(table.columns)
        if (not width or len(table.align) != width or any(a not in ("l", "r") for a in table.align)
                or any(len(r) != width for r in table.rows)
                or any(not 0 <= k < len(table.rows) for k in table.flagged)
                or any(not (0 <= i < len(table.rows) and 0 <= j < width) for i, j in table.faint)
                or (table.values is not None and (table.value_columns is None or any(
                    len(r) != len(table.value_columns) for r in table.values)))
                or (table.ids_column is not None and not 0 <= table.ids_column < width)):
            raise ValueError("a table that does not fit its columns")
        return table


def _plain(value):
    """A table value as JSON holds it: numpy numbers as Python numbers, a number that is not finite as null."""
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return float(value) if np.isfinite(value) else None
    return value


def _table(key: str, title: str, columns: list[tuple[str, str]], rows: list[list[str]], note: Text | None = None,
           flagged: tuple[int, ...] = (), values: tuple[list[str], list[list]] | None = None) -> ReportTable:
    return ReportTable(key, title, tuple(c for c, _ in columns), tuple(a for _, a in columns),
                       tuple(tuple(r) for r in rows), note, flagged,
                       tuple(values[0]) if values else None, tuple(tuple(v) for v in values[1]) if values else None)


class NoticeKind(Enum):
    """What a notice's leading lines say is wrong (its other lines are cautions): the one vocabulary by which a
    document of several results heads its "Read first" notice and puts the gravest problems first
    (reporting.combined), never read from a notice's words."""

    NOT_ESTIMATED = "not estimated"  # some model could not be estimated: nothing of it is a result
    NOT_ADMISSIBLE = "not admissible"  # a solution is not admissible
    DATA_STOP_FIT = "data stop a fit"  # a check: problems in the data stop the fit (nothing was fitted)
    CAUTION = "caution"  # nothing wrong with a solution: check before interpreting it


@dataclass(frozen=True)
class ProblemNotice:
    """What every view of a result shows before anything else when the solution has problems: its ``kind`` (what its
    first ``leading`` lines say is wrong; by default, from ``inadmissible``, a not admissible solution's every line,
    or a caution's none), the other lines cautions."""

    heading: str
    lines: tuple[Text, ...]  # words, or Notes (cfa_tool.note_parts) with advice each view writes its own way
    inadmissible: bool
    kind: NoticeKind | None = None
    leading: int | None = None

    def __post_init__(self) -> None:
        if self.kind is None:
            object.__setattr__(self, "kind", NoticeKind.NOT_ADMISSIBLE if self.inadmissible else NoticeKind.CAUTION)
        if self.leading is None or self.kind is NoticeKind.CAUTION:  # a caution's lines lead nothing (a saved file's too)
            object.__setattr__(self, "leading", 0 if self.kind is NoticeKind.CAUTION else len(self.lines))


NOT_ADMISSIBLE = "This solution is not admissible: do not interpret its estimates or its fit"
CAUTION = "Check before interpreting this solution"
DATA_CAUTION = "Check the data before fitting"  # a check's cautions: nothing was fitted


def _in_group(result, label: str | None) -> str:
    """' in group north' as the notes of ``result`` name one of its groups (language.names.written_group, the rule
    of every text); '' without one."""
    return f" in group {written_group(label, group_labels(result))}" if label is not None else ""


def problem_notice(result) -> ProblemNotice | None:
    """The problems of ``result``'s solution as a heading and one line per problem (None when there are none)."""
    problems = solution_first(getattr(result, "problems", ()))
    if not problems:
        return None
    lines = tuple((f"Group {written_group(p.group, group_labels(result))}: " if p.group is not None else "") + p.line()
                  for p in problems)
    inadmissible = not result.admissible
    return ProblemNotice(NOT_ADMISSIBLE if inadmissible else CAUTION, lines, inadmissible,
                         leading=sum(p.kind.inadmissible for p in problems) if inadmissible else 0)


def problem_table(result, running: str = "") -> ReportTable | None:
    """The problems of the solution as a table (for data files, where the notice of the views cannot go), their words
    as the reader of the report of command ``running`` reads them (note_parts.View.running: compare's table does not
    advise 'cfa-tool compare', s24)."""
    notice = problem_notice(result)
    if notice is None:
        return None
    view = View(commands=True, running=running)
    problems = solution_first(result.problems)
    rows = [[p.kind.value, "yes" if p.kind.inadmissible else "no", "; ".join(p.parameter_words()),
             "" if p.value is None else est_num(p.value), p.group or "", said(p.explanation, view), said(p.advice, view)]
            for p in problems]
    values = [[p.kind.value, "yes" if p.kind.inadmissible else "no", "; ".join(p.parameter_words()), p.value, p.group or "",
               said(p.explanation, view), said(p.advice, view)] for p in problems]
    columns = [("Problem", "l"), ("Makes it inadmissible", "l"), ("Parameters", "l"), ("Value", "r"), ("Group", "l"),
               ("Explanation", "l"), ("What to try", "l")]
    return _table("problems", notice.heading, columns, rows, values=([c for c, _ in columns], values))


def row_problem(result, kind: str, variables: tuple[str, ...], group: str | None) -> str:
    """The few words a table row shows when its parameter is part of a problem ('' when it is not)."""
    for p in getattr(result, "problems", ()):
        if p.touches(kind, variables, group):
            return p.kind.short
    return ""


#: how the fit table marks the figures of the normal-theory test beside a robust or adjusted one
UNADJUSTED = "unadjusted"


def indented(cell: str) -> tuple[int, str]:
    """A cell's indent and its words: a row that belongs to the one above it is written with leading spaces ('  p',
    '  90% interval'), which each view shows as it can (HTML as padding, Markdown as no-break spaces, where plain
    spaces collapse)."""
    words = cell.lstrip(" ")
    return len(cell) - len(words), words


def unadjusted_label(label: str) -> str:
    """'RMSEA [90% interval]' -> 'RMSEA (unadjusted) [90% interval]'."""
    cut = label.find(" [")
    return f"{label} ({UNADJUSTED})" if cut < 0 else f"{label[:cut]} ({UNADJUSTED}){label[cut:]}"


@dataclass(frozen=True)
class FitRow:
    """One line of the fit table: its words (index, value, guide) and its numbers for data files, one row of
    (index, value, df, p, 90% lower, 90% upper) or more (AIC, BIC and adjusted BIC share a line of words)."""

    label: str
    text: str
    guide: str
    values: tuple[tuple, ...]

    def unadjusted(self) -> "FitRow":
        """The line among the unadjusted figures, after the robust ones: marked, without a guide value."""
        return FitRow(unadjusted_label(self.label), self.text, "for reference only",
                      tuple((unadjusted_label(v[0]), *v[1:]) for v in self.values))


def _row(label: str, text: str, guide: str, *values: tuple) -> FitRow:
    """A line whose numbers are (index, value[, df, p, 90% lower, 90% upper]), the missing ones None."""
    return FitRow(label, text, guide, tuple(tuple(v) + (None,) * (6 - len(v)) for v in values))



#: a table cell of a figure that was not computed (a robust test whose scaling factor is not positive), explained in
#: the table's note: never 'nan' and never an empty place that reads as a figure left out
NOT_COMPUTED = "\u2014"


#: the fit table's words for a robust index not computed (its scaled test's or its baseline's scaling factor not
#: positive), which the caution first explains
NOT_COMPUTED_HERE = "not computed (see the caution first)"


def robust_cell(robust, value, text: str) -> str:
    """A robust figure's cell: ``text`` (the value formatted), or :data:`NOT_COMPUTED` when the value is missing
    because ``robust``'s scaling factor (or its baseline model's) is not positive (inference.robust.robust_fit)."""
    return NOT_COMPUTED if missing(value) and getattr(robust, "not_computed", "") else text


def not_computed_words(robust) -> str:
    """What of a robust test was not computed and why, in a few words for a table's note ('' when all was): the
    caution first in every view says it in full (pipeline.continuous.scaled_test_problem)."""
    if robust is None or not robust.not_computed:
        return ""
    if missing(robust.chi_square_scaled):
        return (f"the scaled test, its p-value and the robust indices: its scaling factor "
                f"({num(robust.scaling_factor, 3)}) is not positive")
    return (f"the robust CFI and TLI: the baseline model's scaling factor ({num(robust.baseline_scaling_factor, 3)}) "
            f"is not positive")


def baseline_uninformative(result) -> bool:
    """Whether the caution first says that the baseline model nearly fits, so that CFI and TLI say little
    (assessment.admissibility.uninformative_baseline_problems): their guide is then not the one to read."""
    return any(p.kind is ProblemKind.UNINFORMATIVE_BASELINE for p in getattr(result, "problems", ()))


#: what the guide cell of CFI and TLI adds when the baseline model misfits little (:func:`baseline_uninformative`):
#: the guide stays, and the caution says how the two indices are bounded
BASELINE_BOUNDED = "bounded by the baseline: see the caution"


def fit_rows(result) -> list[FitRow]:
    """The lines of the fit table in the order of every view: with a robust test, its figures first, then SRMR,
    then the unadjusted ones marked (without the test of close fit); the baseline, the likelihood and the count
    of free parameters last."""
    f, r = result.fit, result.robust
    chi = ("Chi-square", f.chi_square, f.df, f.p_value)
    uninformative = baseline_uninformative(result)

    def incremental_guide(index: str) -> str:
        return f"{guide_text(index)}; {BASELINE_BOUNDED}" if uninformative else guide_text(index)

    if f.df == 0:  # nothing to test: CFI, TLI and RMSEA are not defined
        plain = [_row("Chi-square test", "0 df: no test", JUST_IDENTIFIED, chi)]
    else:
        low, high = f.rmsea_ci90
        plain = [_row("Chi-square test", f"{f.chi_square:.3f} on {f.df} df, p {p_phrase(f.p_value)}",
                      "p > .05 (very sensitive to N)", chi),
                 _row("CFI", fit_index_text("cfi", f.cfi), incremental_guide("cfi"), ("CFI", f.cfi)),
                 _row("TLI", fit_index_text("tli", f.tli), incremental_guide("tli"), ("TLI", f.tli)),
                 _row("RMSEA [90% interval]", _with_interval(fit_index_text('rmsea', f.rmsea), low, high),
                      guide_text("rmsea"),
                      ("RMSEA", f.rmsea, None, None, low, high))]
        if not missing(f.rmsea_p_close) and r is None:
            plain.append(_row("  test of close fit (RMSEA <= .05)", f"p {p_phrase(f.rmsea_p_close)}", "",
                              ("Test of close fit (RMSEA <= .05)", None, None, f.rmsea_p_close)))
    srmr = _row("SRMR", fit_index_text("srmr", f.srmr), guide_text("srmr"), ("SRMR", f.srmr))
    if r is None:
        rows = plain + [srmr]
    else:
        rlow, rhigh = r.rmsea_robust_ci90
        label, text, guide = _correction_row(r)
        # a value column holds figures, never a sentence: a cell wider than the terminal's room beside the labels
        # would be cut, and the figures under it with it (new-user trial s18); why it is missing goes to the guide
        rows = [_row(f"Scaled chi-square ({r.label})", f"{r.chi_square_scaled:.3f} on {r.df} df, "
                     f"p {p_phrase(r.p_value_scaled)}" if not missing(r.chi_square_scaled) else "not computed",
                     ("says little here: see the caution first" if design_doubts(result) else
                      "the test to read for these data") if not missing(r.chi_square_scaled) else
                     "its scaling factor is not positive: see the caution first",
                     (f"Scaled chi-square ({r.label})", r.chi_square_scaled, r.df, r.p_value_scaled)),
                _row(label, text, guide, *[(name.capitalize(), value) for name, value in r.pieces]),
                _row("Robust CFI / TLI", NOT_COMPUTED_HERE if missing(r.cfi_robust) and r.not_computed else
                     f"{fit_index_text('cfi', r.cfi_robust)} / {fit_index_text('tli', r.tli_robust)}",
                     incremental_guide("cfi"),
                     ("Robust CFI", r.cfi_robust), ("Robust TLI", r.tli_robust)),
                _row("Robust RMSEA [90% interval]", NOT_COMPUTED_HERE if missing(r.rmsea_robust) and r.not_computed else
                     _with_interval(fit_index_text('rmsea', r.rmsea_robust), rlow, rhigh),
                     guide_text("rmsea"), ("Robust RMSEA", r.rmsea_robust, None, None, rlow, rhigh)),
                srmr] + [row.unadjusted() for row in plain if f.df > 0]
    rows.append(_row("Baseline (independence) chi-square", f"{f.baseline_chi_square:.3f} on {f.baseline_df} df", "",
                     ("Baseline (independence) chi-square", f.baseline_chi_square, f.baseline_df)))
    if not missing(f.log_likelihood):  # least-squares estimators have no likelihood
        rows += [_row("Log-likelihood", num(f.log_likelihood), "", ("Log-likelihood", f.log_likelihood)),
                 _row("AIC / BIC / adjusted BIC", f"{num(f.aic)} / {num(f.bic)} / {num(f.sabic)}", "lower is better",
                      ("AIC", f.aic), ("BIC", f.bic), ("Adjusted BIC", f.sabic))]
    rows.append(_row("Free parameters", str(f.n_free_parameters), thresholds_counted(result),
                     ("Free parameters", f.n_free_parameters)))
    return rows


def thresholds_counted(result) -> str:
    """What an ordinal fit's free-parameter count says of its thresholds ('' without thresholds): in one group they
    count in neither its parameters nor its degrees of freedom, which weigh the model's parameters against the
    polychoric correlations ('fit' estimates them first, from each item's answers, Olsson 1979; 'compare' with the
    model, counted alike); in groups, where they may be held equal, they are counted (new-user trial s22: 'Free
    parameters 18' beside 45 thresholds, unsaid)."""
    rows = [e for e in getattr(result, "estimates", ()) if e.kind == "threshold"]
    if not rows:
        return ""
    if len(getattr(result, "groups", ()) or ()) > 1:
        return "thresholds included"
    return f"the {len(rows)} thresholds count in neither this number nor the df"


def _with_interval(text: str, low, high) -> str:
    """An index's value and its 90% interval, '.070 [.067, .073]'; the value alone when the interval has no bounds
    (never an empty '[, ]')."""
    if missing(low) and missing(high):
        return text
    return f"{text} [{unit(low)}, {unit(high)}]"


def fit_table(result) -> ReportTable:
    r = result.robust
    rows = fit_rows(result)
    note = (_unusable(result) + GUIDE_NOTE + (" " + TLI_NOT_CUT if result.fit.df > 0 else "")
            + (" " + robust_definition(r) if r is not None else ""))
    return _table("fit", "Model fit", [("Index", "l"), ("Value", "r"), ("Guide", "l")],
                  [[x.label, x.text, x.guide] for x in rows], note,
                  values=(["Index", "Value", "df", "p", "90% lower", "90% upper"],
                          [list(v) for x in rows for v in x.values]))


def _correction_row(r) -> list[str]:
    """How the corrected statistic follows from the chi-square, so that a reader can reproduce it."""
    return [f"  {r.test.correction}", correction_text(r), r.test.rule]


def correction_text(r) -> str:
    """The values of the pieces that make the corrected statistic, as every table shows them: '1.155 and 36.256'."""
    return word_list(num(value) for _, value in r.pieces)


def robust_definition(r) -> str:
    """Which definition the robust indices follow."""
    if r.scale is not None:
        return (f"Robust CFI, TLI and RMSEA: the usual formulas applied to the {ADJUSTED_TEST} statistics of the model "
                f"and of the baseline model (ordinal items); SRMR over the off-diagonal polychoric correlations. An "
                f"exploratory analysis of the same items reports another RMSEA (maximum likelihood on the polychoric "
                f"correlations, population-corrected), not comparable with this one.")
    return ("Robust CFI, TLI and RMSEA: the population-corrected definitions of Brosseau-Liard, Savalei & Li (2012) "
            "and Brosseau-Liard & Savalei (2014), not the indices of the scaled statistic.")


def _scale_phrase(result, factor: str, label: str | None = None) -> str:
    """How a factor got its scale in the group ``label`` (its own scales where they differ between groups), in a few
    words for the heading of its block."""
    d = result.description
    scales = next((own for g, own in d.group_scales if g == label), d.scales) if d is not None else ()
    scale = next((s for s in scales if s.factor == factor), None)
    if scale is None:
        return ""
    if scale.method == "marker" and scale.marker:
        return f"scale: loading of {scale.marker} fixed at {user_number(scale.marker_loading)}{_marker_reason(scale)}"
    if scale.method == "effects" and scale.counted_reversed:
        return f"scale: loadings average 1, with {', '.join(scale.counted_reversed)} (declared reversed) turned"
    return {"variance": "scale: variance fixed at 1", "effects": "scale: loadings average 1",
            "fixed by the model": "scale: fixed by the model",
            CARRIED_BY_LOADINGS: "scale: loadings held equal across groups, variance estimated"
            }.get(scale.method, f"scale: {scale.method}")


def _marker_reason(scale) -> str:
    """Why a marker is not the factor's first item or is fixed at -1 (a 'reversed' statement), in a clause
    that follows the marker's fixed loading; empty otherwise."""
    if scale.marker_loading < 0:
        return f", as every item of {scale.factor} is declared reversed"
    if scale.passed_over:
        listed = ", ".join(scale.passed_over)
        return f", not {listed}, declared reversed"
    return ""


def _interval(low: float, high: float) -> str:
    return "" if missing(low) else f"[{est_num(low, 2)}, {est_num(high, 2)}]"


def _factor_block(result, group: int, k: int, factor: str, rows: list, residual: dict, problems: list[str]
                  ) -> ReportTable:
    """One factor: each indicator's standardized loading first, then the loading with its SE, interval and p,
    the indicator's R-squared and its error variance (for a higher-order factor: the lower factor's
    disturbance variance)."""
    label = result.groups[group].label
    r_squared = result.groups[group].r_squared
    observed = set(result.observed)
    higher = any(r.variables[1] not in observed for r in rows)
    mark_any = any(problems)
    shared = _shared(result)
    columns = [("Factor" if higher else "Item", "l"), ("Std.", "r"), ("Loading", "r"), ("SE", "r"), ("95% CI", "r"),
               ("p", "r")] + ([] if higher else [("R²", "r")]) + [
        ("Disturbance" if higher else "Error variance", "r")] + ([("Problem", "l")] if mark_any else [])
    other = "disturbance" if higher else "error variance"
    body, numbers = [], []
    for r, mark in zip(rows, problems):
        target = r.variables[1]
        rest = residual.get(target)
        r2 = r_squared.get(target)
        cells = [target, est_unit(r.standardized, 2) if abs(r.standardized) <= 1 else est_num(r.standardized, 2),
                 est_num(r.estimate), est_num(r.se) if r.free else "fixed", _interval(*r.ci95), p_value(r.p_value)]
        if not higher:
            cells.append("" if r2 is None else (est_unit(r2, 2) if 0 <= r2 <= 1 else est_num(r2, 2)))
        cells.append(est_num(rest.estimate) if rest is not None else "")
        equal = [name for name, row in (("loading", r), (other, rest)) if row is not None and _key(row) in shared]
        if mark_any:
            cells.append(mark)
        body.append(cells)
        numbers.append([target, r.standardized, r.estimate, r.se if r.free else None, r.z, r.p_value, r.ci95[0],
                        r.ci95[1], "yes" if r.free else "no", r2 if not higher else None,
                        rest.estimate if rest is not None else None, rest.se if rest is not None and rest.free else None,
                        rest.p_value if rest is not None else None] + (
            ["yes" if "loading" in equal else "no", "yes" if other in equal else "no"] if shared else []) + (
            [mark] if mark_any else []))
    value_columns = [columns[0][0], "Standardized loading", "Loading", "SE", "z", "p", "95% CI lower", "95% CI upper",
                     "Free", "R²", "Error variance" if not higher else "Disturbance variance", "Its SE", "Its p"] + (
        ["Loading equal across groups", f"{other.capitalize()} equal across groups"] if shared else []) + (
        ["Problem"] if mark_any else [])
    scale = _scale_phrase(result, factor, label)
    title = f"Factor {factor}" + (f" ({scale})" if scale else "")
    suffix = "" if label is None else f"_{group}"
    both = sorted({r.variables[1] for r in rows} & {
        e.variables[1] for e in result.estimates if e.kind == "loading" and e.variables[0] != factor
        and (e.group is None or e.group == label)}, key=result.observed.index) if not higher else []
    note = (f"R² and the error variance of {word_list(both)} are each item's whole: the share of its variance all "
            f"its factors explain together, not {factor}'s alone." if both else None)
    if shared:  # in words under the table: a column would not fit beside the others
        note = " ".join(filter(None, [_shared_sentence(rows, residual, shared, other), note]))
    return _table(f"factor_{k + 1}{suffix}", title, columns, body, note,
                  flagged=tuple(i for i, m in enumerate(problems) if m), values=(value_columns, numbers))


def implied_factor_correlation(result, group: int, first: str, second: str) -> float | None:
    """The model-implied correlation of two factors (through higher-order factors too); None when the result
    does not hold the factors' implied covariance."""
    phi = result.groups[group].latent_covariance
    if phi is None:
        return None
    i, j = result.latent.index(first), result.latent.index(second)
    scale = float(np.sqrt(phi[i, i] * phi[j, j]))
    return float(phi[i, j] / scale) if scale > 0 else None


def higher_order(result) -> bool:
    """Whether some factor is an indicator of another."""
    observed = set(result.observed)
    return any(r.kind == "loading" and r.variables[1] not in observed for r in result.estimates)


def _factor_matrix(result, group: int) -> ReportTable | None:
    """The factors' variances (diagonal) and correlations (below it) as one small matrix, both implied by the
    model (with higher-order factors: the total variances and correlations, not the disturbance parameters);
    each covariance parameter with its SE and interval in the data-file version."""
    label = result.groups[group].label
    rotated = {f for block in getattr(result, "exploratory", ()) for f in block.factors}  # shown by their block
    latent = [f for f in result.latent if f not in rotated]
    if not latent:
        return None
    variance = {r.variables[0]: r for r in result.estimates if r.kind == "factor_variance" and r.group == label}
    pairs = {frozenset(r.variables): r for r in result.estimates if r.kind == "factor_covariance" and r.group == label}
    phi = result.groups[group].latent_covariance
    total = higher_order(result) and phi is not None
    body, flagged = [], []
    for i, a in enumerate(latent):
        row = [f"{i + 1} {a}"]
        bad = False
        for j, b in enumerate(latent[: i + 1]):
            if i == j:
                v = variance.get(a)
                if total:
                    k = result.latent.index(a)
                    row.append(est_num(float(phi[k, k])))
                else:
                    row.append(est_num(v.estimate) if v is not None else "")
                bad |= v is not None and bool(row_problem(result, "factor_variance", (a,), label))
            else:
                c = pairs.get(frozenset((a, b)))
                r = implied_factor_correlation(result, group, a, b) if total else (
                    c.standardized if c is not None else 0.0)
                row.append(est_unit(r, 2) if abs(r) <= 1 else est_num(r, 2))
                bad |= c is not None and bool(row_problem(result, "factor_covariance", c.variables, label))
        row += [""] * (len(latent) - i - 1)
        body.append(row)
        if bad:
            flagged.append(i)
    numbers = [[r.variables[0], r.variables[0], r.estimate, r.se if r.free else None, r.z, r.p_value, r.ci95[0],
                r.ci95[1], r.standardized] for r in variance.values()]
    numbers += [[*r.variables, r.estimate, r.se if r.free else None, r.z, r.p_value, r.ci95[0], r.ci95[1],
                 r.standardized] for r in pairs.values()]
    suffix = "" if label is None else f"_{group}"
    note = "Diagonal: variances; below: correlations." if len(latent) > 1 else None
    if total:
        note = ("Implied by the model: each factor's total variance (diagonal) and the correlations of the factors "
                "(below), through the higher-order factors. The disturbance variance of a factor that indicates a "
                "higher-order factor is in the higher-order factor's table (column Disturbance).")
    return _table(f"factors{suffix}", "Factor variances and correlations",
                  [("", "l")] + [(str(k + 1), "r") for k in range(len(latent))], body, note, tuple(flagged),
                  values=(["Factor", "With", "Estimate", "SE", "z", "p", "95% CI lower", "95% CI upper",
                           "Standardized (correlation)"], numbers))


def estimate_tables(result, group: int = 0) -> list[ReportTable]:
    """The estimates of one group: a block per factor, the factors' variance-correlation matrix, then
    residual covariances, intercepts, factor means and thresholds."""
    tables = []
    label = result.groups[group].label
    r_squared = result.groups[group].r_squared
    suffix = "" if label is None else f"_{group}"
    residual = {r.variables[0]: r for r in result.estimates if r.kind == "residual_variance" and r.group == label}
    loadings = [r for r in result.estimates if r.kind == "loading" and r.group == label]
    lower = {r.variables[1] for r in loadings} - set(result.observed)  # factors indicating a higher-order factor
    residual.update({r.variables[0]: r for r in result.estimates  # their variance parameter: the disturbance
                     if r.kind == "factor_variance" and r.group == label and r.variables[0] in lower})
    for k, factor in enumerate(result.latent):
        rows = [r for r in loadings if r.variables[0] == factor]
        if not rows:
            continue
        marks = []
        for r in rows:
            target = r.variables[1]
            # a row holds two parameters (the loading, the error variance or disturbance): the mark names its own,
            # as the table may be split with the mark beside the other one's column
            own = "disturbance" if target in lower else "error variance"
            mark = "; ".join(f"{name}: {found}" for name, found in (
                ("loading", row_problem(result, "loading", r.variables, label)),
                (own, row_problem(result, "factor_variance" if target in lower else "residual_variance", (target,),
                                  label))) if found)
            if not mark and r_squared.get(target, 0.0) > 1.0:
                mark = "R² above 1: impossible"
            marks.append(mark)
        tables.append(_factor_block(result, group, k, factor, rows, residual, marks))
    if group == 0 and getattr(result, "exploratory", ()):
        tables.extend(block_tables(result))
    matrix = _factor_matrix(result, group)
    if matrix is not None:
        tables.append(matrix)
    means = [r for r in result.estimates if r.kind == "mean" and r.group == label and r.variables[0] not in lower]
    # factor means that are all fixed at 0 hold nothing estimated: no table of zeros, one sentence under the
    # intercepts (new user s17: a manuscript's 'Factor means' table of fixed zeros)
    zero_means = bool(means) and all(not r.free and r.estimate == 0.0 for r in means)
    for kind, title in KIND_TITLES.items():
        if kind in ("loading", "factor_variance", "factor_covariance", "residual_variance"):
            continue
        rows = [r for r in result.estimates if r.kind == kind and r.group == label]
        if kind == "mean":  # a factor explained by a higher-order factor has no mean parameter: an intercept
            parts = [(kind, title, [] if zero_means else means, None),
                     ("factor_intercept", DISTURBANCE_INTERCEPTS, [r for r in rows if r.variables[0] in lower],
                      DISTURBANCE_INTERCEPTS_NOTE)]
        elif kind == "intercept" and zero_means:
            parts = [(kind, title, rows, zero_means_note([r.variables[0] for r in means], label is not None))]
        else:
            parts = [(kind, title, rows, None)]
        tables.extend(_estimates_table(result, kind, key + suffix, heading, chosen, note)
                      for key, heading, chosen, note in parts if chosen)
    return tables


def zero_means_note(factors: list[str], grouped: bool) -> str:
    """What the intercepts' table says when every factor mean of a group is fixed at 0, in place of a table of zeros:
    the factors named (a factor below a higher-order factor has an intercept, not a mean, which its own table shows);
    ``grouped``: the fit has groups, and this is one group's."""
    many = len(factors) > 1
    return (f"The mean{'s' if many else ''} of {word_list(factors)} {'are' if many else 'is'} fixed at 0"
            f"{' in this group' if grouped else ''} (not estimated), so no table shows "
            f"{'them' if many else 'it'}.")


#: the means table's rows for factors that indicate a higher-order factor: intercepts, not means (Bollen 1989)
DISTURBANCE_INTERCEPTS = "Intercepts of the factors explained by a higher-order factor"
DISTURBANCE_INTERCEPTS_NOTE = ("Each is the intercept of the factor's regression on the higher-order factor (the mean of "
                               "its disturbance), not the factor's mean: the factor's implied mean adds its loading "
                               "times the higher-order factor's mean (Bollen 1989). Std.: over the factor's implied "
                               "standard deviation.")


#: the column of a multi-group fit's estimates that says which parameters are one estimate shared by the groups
EQUAL_COLUMN = "Held equal"
EQUAL_NOTE = ("Held equal: 'yes', the parameter is held equal across the groups (one estimate, the same in every group "
              "that shares it); 'no', this group's own estimate (free to differ across groups); a fixed value has no "
              "mark.")


def _shared_sentence(rows: list, residual: dict, shared: frozenset, other: str) -> str:
    """A factor block's loadings and error variances (or disturbances) held equal across groups and those that are
    this group's own, in words (fixed ones are left out)."""
    parts = {True: [], False: []}
    for name, found in (("loadings", [(r.variables[1], r) for r in rows]),
                        (f"{other}s", [(r.variables[1], residual.get(r.variables[1])) for r in rows])):
        for equal in (True, False):
            which = [x for x, row in found if row is not None and row.free and (_key(row) in shared) is equal]
            if which:
                parts[equal].append(f"the {name if len(which) > 1 else name[:-1]} of {word_list(which)}")
    said = []
    if parts[True]:
        said.append(f"Held equal across groups (one estimate shared): {'; '.join(parts[True])}.")
    if parts[False]:
        said.append(f"This group's own (free to differ across groups): {'; '.join(parts[False])}.")
    return " ".join(said)


def _shared_thresholds(rows: list, shared: frozenset) -> str:
    """Which items' thresholds are held equal across groups and which are this group's own, in words (an item's
    thresholds are held equal or freed together: 'noninvariant threshold(ITEM)')."""
    said = []
    for equal, words in ((True, "Thresholds held equal across groups (one estimate each, shared)"),
                         (False, "This group's own thresholds (free to differ across groups)")):
        items = list(dict.fromkeys(r.variables[0] for r in rows if r.free and (_key(r) in shared) is equal))
        if items:
            said.append(f"{words}: {word_list(items)}.")
    return " ".join(said)


def _shared(result) -> frozenset:
    """The (kind, variables, group) of the free parameters held equal across groups (FitResult), or nothing when the
    fit has no equality across groups (one group, a configural model): the column is then left out."""
    held = getattr(result, "held_equal_across_groups", None)
    return held() if held is not None else frozenset()


def _key(row) -> tuple:
    return (row.kind, row.variables, row.group)


def _equal_word(row, shared: frozenset) -> str:
    return "" if not row.free else "yes" if _key(row) in shared else "no"


def _estimates_table(result, kind: str, key: str, title: str, rows: list, note: str | None) -> ReportTable:
    """One table of parameter rows of one kind (residual covariances, intercepts, factor means, thresholds)."""
    cols = [("Variable", "l")]
    if kind in ("residual_covariance", "threshold"):
        cols.append(({"threshold": "Between answers"}.get(kind, "With"), "l"))
    between = _threshold_answers(result, rows[0].group) if kind == "threshold" else {}
    # thresholds of latent responses with variance 1 (the first group; every group before their residual variances
    # are freed) are standardized already: a Std. column would repeat the estimates, so it is left out and said
    repeated = kind == "threshold" and _same_values([r.standardized for r in rows], [r.estimate for r in rows])
    if repeated:
        note = " ".join(filter(None, [note, STANDARDIZED_THRESHOLDS_NOTE]))
    cols += [("Estimate", "r"), ("SE", "r"), ("95% CI", "r"), ("p", "r")] + ([] if repeated else [("Std.", "r")])
    marks = [row_problem(result, kind, r.variables, r.group) for r in rows]
    shared = _shared(result) if any(r.free for r in rows) else frozenset()
    if shared and kind == "threshold":  # an item's thresholds are held equal or freed together: said in words
        note = " ".join(filter(None, [note, _shared_thresholds(rows, shared)]))
        shared = frozenset()
    elif shared:
        cols.append((EQUAL_COLUMN, "l"))
        note = " ".join(filter(None, [note, EQUAL_NOTE]))
    if any(marks):
        cols.append(("Problem", "l"))
    body, numbers = [], []
    previous = None
    for r, mark in zip(rows, marks):
        numbers.append(list(r.variables) + ([between.get(r.variables)] if kind == "threshold" else [])
                       + [r.estimate, r.se if r.free else None, r.z, r.p_value, r.ci95[0],
                          r.ci95[1], r.standardized, "yes" if r.free else "no"]
                       + ([_equal_word(r, shared)] if shared else []) + ([mark] if any(marks) else []))
        names = list(r.variables)
        if kind == "threshold":
            shown = names[0] if names[0] != previous else ""
            previous = names[0]
            names = [shown, between.get(r.variables, f"step {names[1]}")]
        cells = names + [est_num(r.estimate), est_num(r.se) if r.free else "fixed", _interval(*r.ci95),
                         p_value(r.p_value)] + ([] if repeated else [est_num(r.standardized, 2)])
        if shared:
            cells.append(_equal_word(r, shared))
        if any(marks):
            cells.append(mark)
        body.append(cells)
    value_columns = (["Variable", "Step", "Between answers"] if kind == "threshold"
                     else [c for c, _ in cols[:len(rows[0].variables)]]) + [
        "Estimate", "SE", "z", "p", "95% CI lower", "95% CI upper", "Standardized", "Free"] + (
        [EQUAL_COLUMN] if shared else []) + (["Problem"] if any(marks) else [])
    return _table(key, title, cols, body, note, flagged=tuple(i for i, m in enumerate(marks) if m),
                  values=(value_columns, numbers))


#: why a table of thresholds has no Std. column (:func:`_estimates_table`)
STANDARDIZED_THRESHOLDS_NOTE = ("The latent responses have variance 1 here, so these thresholds are standardized "
                                "already: their standardized values are the estimates, and no Std. column repeats "
                                "them.")


def _same_values(a, b) -> bool:
    """Whether two lists of numbers are equal value by value (to rounding in the last digits; missing values
    alike)."""
    x, y = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    return bool(len(x)) and bool(np.allclose(x, y, rtol=1e-9, atol=1e-12, equal_nan=True))


def _threshold_answers(result, label) -> dict[tuple[str, str], str]:
    """(item, step) -> the two answers a threshold lies between ('2 and 3'; the words of an 'answers' statement
    when the model gives them, else the value labels of the data file, 'never and sometimes'), from the answers the
    item's rows gave in the group ``label``: an item whose rows never gave its lowest answer has its first threshold
    between its second and third answer codes, so thresholds of the same step number can lie between different
    answers (a new-user trial compared them by step)."""
    data = next((g.data for g in result.groups if g.label == label), None)
    if data is None or not data.categories:
        return {}
    words = {(item, code): word for item, labelled in fit_answer_labels(result).items()
             for code, word in labelled.items()}
    out = {}
    for item, cats in zip(data.variables, data.categories):
        codes = [v for v, _ in cats]
        for k in range(len(codes) - 1):
            low, high = (words.get((item, c), f"{user_number(c)}") for c in (codes[k], codes[k + 1]))
            out[(item, str(k + 1))] = f"{low} and {high}"
    return out


def _code_number(code) -> float | None:
    """A value label's code as a number (the answers' codes), or None for a text code."""
    try:
        return float(code)
    except (TypeError, ValueError):
        return None


def residual_table(result, group: int = 0) -> ReportTable | None:
    """Lower triangle of the residual correlations (sample minus model)."""
    names = result.observed
    if len(names) > MAX_MATRIX or len(names) < 2 or not result.converged:
        return None
    table = _item_matrix(f"residuals_{group}", "Residual correlations (sample minus model)", names,
                         result.groups[group].residual_correlations,
                         "Positive: the model underestimates the correlation of the two items; negative: it "
                         "overestimates it.")
    return replace(table, heat=True)


def _item_matrix(key: str, title: str, names, r: np.ndarray, note: str | None) -> ReportTable:
    """The lower triangle of a matrix of the items: a row for each item, named by its number and name (the first
    row, empty, names the first column), a column numbered for each item but the last; the data-file version in
    full precision."""
    p = len(names)
    labels = [f"{_item_number(i)} {name}" for i, name in enumerate(names)]
    rows = [[labels[i]] + [unit(r[i, j], 2) for j in range(i)] + [""] * (p - 1 - i) for i in range(p)]
    values = [[labels[i]] + [float(r[i, j]) for j in range(i)] + [None] * (p - 1 - i) for i in range(p)]
    columns = [("Item", "l")] + [(_item_number(k), "r") for k in range(p - 1)]
    table = _table(key, title, columns, rows, note, values=([c for c, _ in columns], values))
    return replace(table, matrix=True)


def _item_number(k: int) -> str:
    """How a matrix of the items numbers its ``k``-th item (from 0): its rows and its columns."""
    return str(k + 1)


def matrix_row_numbers(table: ReportTable) -> list[str]:
    """The number of each row's item in a matrix of the items (the heading of that item's column); also of a
    matrix saved without a row for the first item."""
    first = len(table.columns) - len(table.rows)  # 0, or 1 when the first item has no row
    return [_item_number(k + first) for k in range(len(table.rows))]


def matrix_key(table: ReportTable) -> tuple[ReportTable, tuple[tuple[str, str], ...]] | None:
    """A matrix of the items with each row named by its item's number only, and the key that names each number's
    item (None for a table that is not such a matrix): for a view too narrow for the items' names beside the
    numbers.  Reads also the matrices saved without a row for the first item."""
    if not table.matrix or not table.rows:
        return None
    rows, key = [], []
    for row, number in zip(table.rows, matrix_row_numbers(table)):
        name = row[0][len(number) + 1:] if row[0].startswith(number + " ") else row[0]
        rows.append((number, *row[1:]))
        key.append((number, name))
    return replace(table, rows=tuple(rows)), tuple(key)


def group_table(result) -> ReportTable:
    rows = [[str(g.label), count_text(g.data.n_obs), num(g.chi_square), unit(g.srmr)] for g in result.groups]
    columns = [("Group", "l"), ("N", "r"), ("Contribution to chi-square", "r"), ("SRMR", "r")]
    values = [[str(g.label), g.data.n_obs, g.chi_square, g.srmr] for g in result.groups]  # N as a number in CSV
    return _table("groups", f"Groups ({result.group_column})", columns, rows,
                  values=([c for c, _ in columns], values))


def missing_table(result) -> ReportTable | None:
    summary = result.missing_data
    if not summary:
        return None
    form = form_gaps(summary)

    def named(items: list[str]) -> str:
        if not items:
            return "(none: complete rows)"
        # every item of the most common patterns up to 12 (new-user trial s28: a short form's 8 items were cut at
        # 'and 2 more'), and the block of a shorter form said so (data.shared_gaps)
        return cut_list(items, 12) + (" (a shorter form)" if form is not None and tuple(items) == form.items else "")

    rows = [[named(p["not_answered"]), count_text(p["rows"])] for p in summary["patterns"][:8]]
    low = sorted(summary["coverage"].items(), key=lambda kv: kv[1])[:5]
    note = f"{summary['n_patterns']} distinct patterns over all rows. Lowest coverage: " + ", ".join(f"{name} {100 * share:.1f}%" for name, share in low)
    weights = summary.get("counted_by_weights")
    if weights:
        note += f". Rows are counted by their frequency weights ('{weights}'), as N is"
    note = note + "." + form_gaps_sentence(summary) + _completely_at_random_note(result)
    # the patterns shown are the most common ones: said in the title, where a table of 8 rows out of 191 patterns
    # would otherwise read as every pattern (the Word file of a new user's workbook, re-check s17)
    more = summary["n_patterns"] > len(rows)
    return _table("missing", f"Missing answers: the {len(rows)} most common of {summary['n_patterns']} patterns"
                  if more else "Missing answers",
                  [("Items not answered", "l"), ("Rows, weighted" if weights else "Rows", "r")], rows, note,
                  values=(["Items not answered", "Rows, weighted" if weights else "Rows"],
                          [[", ".join(p["not_answered"]) or row[0], p["rows"]]
                           for row, p in zip(rows, summary["patterns"])]))


def _completely_at_random_note(result) -> Text:
    """Little's test of the fit's rows with gaps (full-information ML), with what it cannot show; '' without it."""
    from cfa_tool.assessment.missingness import LISTWISE_NEEDS, NOT_WITH_DESIGN, READING, TEST_NAME

    test = getattr(result, "completely_at_random", None)
    if test is None:
        if result.method.missing is MissingData.LISTWISE and not result.method.ordinal:
            return f" {LISTWISE_NEEDS}"
        columns = result.design.columns if getattr(result, "design", None) is not None else None
        design = columns is not None and (columns.kind is not WeightKind.FREQUENCY or columns.cluster is not None
                                          or columns.strata is not None)
        return f" {NOT_WITH_DESIGN}" if result.method.full_information and design else ""
    each = "; ".join(f"group {written_group(label, [g[0] for g in test.groups])}: chi-square {d2:.2f} on {df} df, p {p_phrase(p)}"
                     for label, d2, df, p in test.groups if df > 0)
    verdict = ("" if test.p_value >= 0.05 else " The rows with different gaps differ in their answers more than "
               "chance would make likely: evidence that the answers are not missing completely at random.")
    pooled = (result.missing_data or {}).get("n_patterns")
    within = (f"{test.patterns} patterns counted group by group, the groups added up; a pattern found in several "
              f"groups counts in each, hence more than the {pooled} distinct patterns above"
              if test.groups and pooled is not None and pooled != test.patterns
              else f"{test.patterns} patterns{', the groups added up' if test.groups else ''}")
    return (f" {TEST_NAME} (from the saturated model's EM estimates, over {within}): chi-square {test.chi_square:.2f} on {test.df} df, "
            f"p {p_phrase(test.p_value)}{f' ({each})' if each else ''}.{verdict} " + READING)


def full_information_score_tests(helpers: bool) -> Text:
    """What the modification indices of a full-information fit of rows with gaps assume (the note under their
    table), and the test that asks less: the likelihood-ratio difference of the fits with and without the parameter
    (compare; with missing-data helpers, which compare does not take, two fits with the same helpers)."""
    said = f"With rows with gaps the indices {mcar_score_tests()}; "
    if helpers:
        return (said + "refitting with the parameter freed and the same missing-data helpers and taking the difference "
                "of the two chi-squares tests it when they are missing at random.")
    # the command's name is advice to the program's user: the Word file says the test in words (advice-s16's rule)
    return Note((said + "freeing a parameter and comparing the two fits", Command(" ('cfa-tool compare')", runs="compare"),
                 " tests it when they are missing at random."))


def modification_table(result, group: int | None = None, limit: int = 10) -> ReportTable | None:
    """The largest modification indices, for one group of a fit of several (``group``, its index; each group's
    table under its own heading, as its estimates and local fit are, so that a parameter's words need not carry its
    group and the table keeps the width of a one-group fit: at 80 columns in the terminal a group named in every row
    wrapped the parameter column over two lines, differently in each part of the table), or for the fit of one
    group (``group`` None).  The data files keep the kind, the variables and the group apart."""
    label = result.groups[group].label if group is not None and result.multigroup else None

    def mine(found):
        return found if label is None else [m for m in found if m.group == label]

    key = "modification" if label is None else f"modification_{group}"
    rows = mine(result.reported_modification_indices())
    if not rows:
        computed = result.modification_indices
        if not result.converged or computed is None or not len(computed) or not mine(computed):
            return None
        # computed, none at the threshold: said, so that the section does not silently vanish
        largest = max(mine(computed), key=lambda m: m.index)
        name = parameter_words(largest.kind, tuple(largest.variables), None if label else largest.group, article=False,
                               groups=group_labels(result))
        return _table(key, f"Largest modification indices (at least {user_number(result.mi_threshold)}; none)",
                      [("Parameter that could be freed", "l"), ("Index", "r")],
                      [[f"none reaches {user_number(result.mi_threshold)}; the largest: {name}", num(largest.index, 2)]],
                      f"No parameter that could be freed{_in_group(result, label)} has a modification index of at least "
                      f"{user_number(result.mi_threshold)}: freeing any one of them alone would not improve the fit by that "
                      f"much.", values=(["Kind", "Variables", "Group", "Index"],
                                        [[largest.kind, names_text(largest.variables), largest.group or "",
                                          largest.index]]))
    shown = rows[:limit] if result.mi_top is None else rows
    reaching = rows if result.mi_top is None else mine(result.modification_indices.reported(result.mi_threshold, None))
    title = f"Largest modification indices (at least {user_number(result.mi_threshold)}; {len(shown)} of {len(reaching)} shown)"
    body = []
    for m in shown:  # parameters in words, as every table names them (the group in the section's heading)
        body.append([parameter_words(m.kind, tuple(m.variables), None if label else m.group, article=False,
                                     groups=group_labels(result)),
                     num(m.index, 2), est_num(m.expected_change), est_num(m.standardized_expected_change)])
    # under a sampling design, first: the indices are design-based score tests (s17; s16 said they left the design
    # out); ordinal fits' score tests are the robust ones of least squares, which take it in
    design = (result.design.score_test_text() if getattr(result, "design", None) is not None
              and not result.method.ordinal else None)
    note = ((design + " " if design else "")
            + "Standardized: for loadings on the fully standardized metric; for residual covariances on the residual "
              "correlation metric (the expected change over the two residual standard deviations).")
    beyond = [m for m in shown if m.kind == "residual_covariance" and abs(m.standardized_expected_change) > 1]
    if beyond:
        note += (f" {len(beyond)} expected residual correlation{'s are' if len(beyond) > 1 else ' is'} beyond +/-1: the "
                 "expected change is a linear approximation that fails this far from the current estimate, so only a "
                 "refit shows the value the parameter would take.")
    if result.method.missing is MissingData.FULL_INFORMATION and not result.method.ordinal and not design:
        # (design-based score tests take the observed information, as the robust standard errors: no MCAR to assume)
        note += " " + full_information_score_tests(bool(result.method.helpers))
    note += (" Freeing parameters because of large modification indices capitalises on chance; a model changed that "
             "way needs confirmation in new data.")
    values = [[m.kind, names_text(m.variables), m.group or "", m.index, m.expected_change, m.standardized_expected_change]
              for m in shown]
    return _table(key, title, [("Parameter that could be freed", "l"), ("Index", "r"), ("Expected change", "r"),
                               ("Standardized", "r")], body, note,
                  values=(["Kind", "Variables", "Group", "Index", "Expected change", "Standardized expected change"],
                          values))


def reliability_table(result, group: int = 0) -> ReportTable | None:
    """The reliability of the scale scores: omega (hierarchical for a higher-order factor), omega total, alpha
    and composite reliability, per factor; for ordinal items these describe the latent responses, and the omega
    of the answers' sum (Green & Yang 2009) stands beside them."""
    rows = result.groups[group].reliability
    if not rows:
        return None
    ordinal = result.method.ordinal
    columns = [("Factor", "l"), ("Items", "r"), ("Omega", "r"), ("Omega total", "r"), ("Alpha", "r"),
               ("Composite reliability", "r")]
    body = [[r.factor, str(len(r.items)), unit(r.omega), unit(r.omega_total), unit(r.alpha),
             unit(r.composite_reliability)] for r in rows]
    names = ["Factor", "Items", "Omega", "Omega total", "Alpha", "Composite reliability"]
    values = [[r.factor, len(r.items), r.omega, r.omega_total, r.alpha, r.composite_reliability] for r in rows]
    if ordinal:
        columns = columns[:2] + [("Sum omega", "r")] + columns[2:5] + [("Composite", "r")]  # fits a terminal's width
        body = [row[:2] + [unit(r.observed_sum_omega)] + row[2:] for row, r in zip(body, rows)]
        names = ["Factor", "Items", "Omega of the answers' sum", "Latent-response omega", "Latent-response omega total",
                 "Latent-response alpha", "Latent-response composite reliability"]
        values = [row[:2] + [r.observed_sum_omega] + row[2:] for row, r in zip(values, rows)]
    note = (("Sum omega: the share of the variance of the keyed sum of the answers' codes (the score a researcher "
             "computes) due to the factor (for a higher-order factor: due to it alone, its omega hierarchical), "
             "from the fitted thresholds, loadings and factor variance (Green & Yang 2009); report this one for a sum "
             "score. The other columns are ordinal versions on the latent "
             "responses behind the items, which no one observes; they usually run higher than the sum's reliability, "
             "most with few categories. " + _continuous_factors_sentence(result, rows)
             if ordinal else "") + _group_keying(result, group) +
            ("Omega hierarchical" if any(r.bifactor is not None for r in rows) else "Omega") + ": share of the " + ("variance of the keyed sum of the latent responses" if ordinal else
                                      "keyed item sum's variance") + " due "
            + ("to the factor; " if any(r.bifactor is not None for r in rows) else
               "to the factor (for a higher-order factor: omega hierarchical); ") + "omega total: due to all factors; alpha "
            "from the " + ("polychoric correlations" if ordinal else "sample covariances") + " of the keyed items"
            + ("" if ordinal or not _correlations_alone(result) else f" ({STANDARDIZED_ITEMS})") + "; "
            + ("composite" if ordinal else "composite reliability") + " from the standardized loadings.")
    delta = _with_omega_interval(rows, columns, body, names, values)
    if delta:
        note += " " + delta
    if any(r.bifactor is not None for r in rows):
        columns = [("Omega hierarchical", "r") if c == ("Omega", "r") else c for c in columns]
        for row, r in zip(body, rows):
            if r.bifactor is BifactorPart.SPECIFIC:
                row[0] = f"{r.factor} (subscale)"
        renamed = {"Omega": "Omega hierarchical (subscale for a specific factor)",
                   "Latent-response omega": "Latent-response omega hierarchical (subscale for a specific factor)",
                   "Omega total": "Omega total (omega subscale for a specific factor)",
                   "Latent-response omega total": "Latent-response omega total (subscale for a specific factor)"}
        names = ["Factor", "Bifactor part", *[renamed.get(n, n) for n in names[1:]]]
        values = [row[:1] + [r.bifactor.value if r.bifactor is not None else None] + row[1:]
                  for row, r in zip(values, rows)]
        note += " " + bifactor_reliability_sentence(rows)
    withheld = [k for k, r in enumerate(rows) if miskeyed(r)]  # the one rule that withholds them (every view's)
    if withheld:
        for k in withheld:  # every coefficient of the keyed sum; the factor and its count of items stay
            body[k] = body[k][:2] + ["withheld"] * (len(body[k]) - 2)
            # by the values' names, not their count: the delta-method interval is one column shown, three written
            values[k] = [v if name in ("Factor", "Items", "Bifactor part") else None
                         for name, v in zip(names, values[k])]
        named = [rows[k].factor for k in withheld]
        note += (f" Withheld for {word_list(named)} (see the caution on the keying above): "
                 f"{'for each, ' if len(named) > 1 else ''}{WITHHELD_BECAUSE}.")
    single = one_item_factors(result.estimates, result.observed)
    note += one_item_sentence(single, "reliability coefficients",
                              f"no coefficients are shown, and {'it takes' if len(single) == 1 else 'they take'} no "
                              f"part in the Fornell-Larcker comparison")
    methods = result.description.method_factors if result.description is not None else ()
    if methods:
        note += (f" Method factors ({', '.join(methods)}) stand for a way of answering, not a trait: they get no "
                 f"coefficients and take no part in the Fornell-Larcker and HTMT comparisons.")
    title = "Reliability of the scale scores" + (
        " (ordinal: sum omega for the answers' sum, the others for the latent responses)"
        if ordinal and result.method.items is not Items.MIXED else
        " (sum omega for the answers' sum of ordinal items)" if ordinal else "")
    return _table(f"reliability_{group}", title, columns, body, _unusable(result) + note,
                  _all_if_unusable(result, body), values=(names, values))


def _with_omega_interval(rows, columns: list, body: list, names: list, values: list) -> str:
    """The delta-method 95% interval of each factor's omega (assessment.reliability_intervals.delta_interval; Raykov
    2002) as a column right of omega's, in place in ``columns``, ``body``, ``names`` and ``values``; the note's
    sentence on it, '' when no factor has one (an ordinal fit, a fit without the estimates' covariance)."""
    from cfa_tool.assessment.reliability_intervals import delta_interval

    intervals = [delta_interval(r) for r in rows]
    if not any(intervals):
        return ""
    at = next(k for k, (c, _) in enumerate(columns) if c.startswith("Omega")) + 1
    columns.insert(at, ("Omega 95% CI (delta method)", "r"))
    for row, interval in zip(body, intervals):
        row.insert(at, f"[{unit(interval[0])}, {unit(interval[1])}]" if interval else "")
    named = names.index("Omega total")
    names[named:named] = ["Omega SE (delta method)", "Omega lower (delta method)", "Omega upper (delta method)"]
    for row, r, interval in zip(values, rows, intervals):
        row[named:named] = [r.omega_se, *(interval or (None, None))]
    beyond = [r.factor for r, i in zip(rows, intervals) if i and (i[1] > 1 or i[0] < 0)]
    return ("Omega 95% CI (delta method): omega -/+ 1.96 standard errors, the standard error from omega's analytic "
            "derivatives in the loadings, factor (co)variances and residual (co)variances and the estimates' covariance "
            "(Raykov 2002); it assumes omega's sampling distribution is normal, and the bootstrap's percentile and BCa "
            "intervals do not." + (f" The interval of {word_list(beyond)} passes the bounds of 0 and 1: the normal "
                                   f"approximation fails there, so read the bootstrap's interval instead."
                                   if beyond else ""))


def _continuous_factors_sentence(result, rows) -> str:
    """With ordinal and continuous items in one fit, which factors the ordinal reading of the reliability table does not
    describe (hostile s21: the note called every factor's figures the latent responses' while two factors had
    continuous items only): those of continuous items, whose figures are their keyed item sum's, and those mixing both
    kinds, which get no omega of the answers' sum (paragraph.factors_by_item_kind, paragraph.mixed_kinds_sentence:
    the methods paragraph's rule and words)."""
    continuous, mixed = factors_by_item_kind(result, rows)
    parts = []
    if continuous:
        many = len(continuous) > 1
        parts.append(f"The factor{'s' if many else ''} {word_list(continuous)}, whose items are continuous, "
                     f"{'have' if many else 'has'} no Sum omega: {'their' if many else 'its'} columns describe the keyed "
                     f"sum of the items' own values.")
    if mixed:
        parts.append(mixed_kinds_sentence(mixed))
    return " ".join(parts) + (" " if parts else "")


def bifactor_reliability_sentence(rows) -> str:
    """What the omega columns hold for a bifactor model's general and specific factors (assessment.reliability)."""
    general = [r.factor for r in rows if r.bifactor is BifactorPart.GENERAL]
    specific = [r.factor for r in rows if r.bifactor is BifactorPart.SPECIFIC]
    return (f"Bifactor model (a general factor on every item of specific factors, uncorrelated with them; Holzinger & "
            f"Swineford 1937; Reise 2012): for the general factor{'s' if len(general) > 1 else ''} "
            f"{word_list(general)}, omega hierarchical is the share of the keyed sum of all {'their' if len(general) > 1 else 'its'} "
            f"items due to the general factor alone and omega total the share due to all factors; for the specific "
            f"factors {word_list(specific)} (marked 'subscale'), computed on each one's own items, omega hierarchical "
            f"subscale is the share of the keyed subscale sum due to the specific factor alone, beyond the general "
            f"factor, and omega subscale (in the omega total column) the share due to both (Rodriguez, Reise & Haviland "
            f"2016). Composite reliability is not given for them: its denominator leaves out the other factor of the "
            f"same items, so it describes no score.")


def _unusable(result) -> str:
    """The first words of a note under coefficients computed from an impossible solution."""
    return ("" if result.admissible else "NOT INTERPRETABLE: the solution is not admissible, so these values come "
                                         "from impossible estimates (see the problems at the top). ")


def _all_if_unusable(result, body) -> tuple[int, ...]:
    return () if result.admissible else tuple(range(len(body)))


def distinct_table(result, group: int = 0) -> ReportTable | None:
    """Whether the factors are distinct: per pair of trait factors their correlation (with its interval when the
    factors are scaled by their variances), the heterotrait-monotrait ratio and the Fornell-Larcker comparison.
    Left out, with a note: a bifactor model's general factor with its specific factors, and pairs whose correlation
    the model fixes (at any value: 'uncorrelated', or a covariance fixed at 0 or between factors of fixed
    variances), which the data cannot show to be distinct or not."""
    g = result.groups[group]
    traits = {r.factor: r for r in g.reliability if r.average_variance_extracted is not None}
    htmt = {(h.first, h.second): h for h in g.htmt}
    if len(traits) < 2:
        return None
    correlations = {}
    for r in result.estimates:
        if r.kind == "factor_covariance" and r.group == g.label:
            correlations[frozenset(r.variables)] = r
    fixed_variance = {r.variables[0]: r.estimate for r in result.estimates
                      if r.kind == "factor_variance" and r.group == g.label and not r.free}
    unit_variance = {f for f, value in fixed_variance.items() if value == 1.0}
    body, reasons, numbers = [], [], []
    names = list(traits)
    parameters_are_correlations = not higher_order(result)  # otherwise the factors' correlations are implied ones
    nested, fixed, other_scale = [], [], set()
    for i, a in enumerate(names):
        for b in names[i + 1:]:
            if b in traits[a].shares_items_with:  # a general factor and one of its specific factors
                nested.append((a, b))
                continue
            row = correlations.get(frozenset((a, b)))
            if parameters_are_correlations and (row is None or (not row.free and (
                    row.estimate == 0 or {a, b} <= set(fixed_variance)))):  # 'uncorrelated' leaves no row
                fixed.append((a, b, 0.0 if row is None else row.standardized))
                continue
            if row is not None:
                other_scale |= {a, b} - unit_variance
            implied = implied_factor_correlation(result, group, a, b)
            r = implied if implied is not None else (row.standardized if row is not None else 0.0)
            interval = ""
            if row is not None and row.free and {a, b} <= unit_variance and parameters_are_correlations:
                # the covariance parameter is the correlation
                interval = f"[{est_unit(row.ci95[0], 2)}, {est_unit(row.ci95[1], 2)}]"
            h = htmt.get((a, b)) or htmt.get((b, a))
            ratio = "" if h is None or h.ratio is None else unit(h.ratio, 2)
            if h is not None and h.ratio is None:
                reasons.append(f"HTMT of {a} and {b}: {h.why_missing}.")
            ave_a, ave_b = traits[a].average_variance_extracted, traits[b].average_variance_extracted
            holds = ave_a ** 0.5 > abs(r) and ave_b ** 0.5 > abs(r)
            body.append([a, b, est_unit(r, 2), interval, ratio, f"{unit(ave_a, 2)} / {unit(ave_b, 2)}",
                         "yes" if holds else "no"])
            lo, hi = (row.ci95 if interval else (None, None))
            numbers.append([a, b, r, lo, hi, None if h is None else h.ratio, ave_a, ave_b, "yes" if holds else "no"])
    note = ("HTMT: heterotrait-monotrait ratio of the keyed items, in absolute value (Henseler, Ringle & Sarstedt "
            "2015); common practice reads values above .85 (or .90) as a sign that two factors are not distinct. "
            "\u221aAVE > |r|: both factors' average variance extracted exceeds their squared correlation (Fornell & "
            "Larcker 1981).")
    columns = [("Factor", "l"), ("Factor", "l"), ("r", "r"), ("95% CI", "r"), ("HTMT", "r"), ("AVE", "r"),
               ("\u221aAVE > |r|", "l")]
    if not any(row[3] for row in body):  # no interval to show (fixed correlations, or factors scaled otherwise)
        columns.pop(3)
        body = [row[:3] + row[4:] for row in body]
        note += " No interval of r is shown: " + _no_interval_reasons([n for n in names if n in other_scale],
                                                                      not parameters_are_correlations)
    else:
        note += (" The interval of a correlation is shown when both factors are scaled by their variances (then their "
                 "covariance is the correlation).")
    if reasons:
        note += " " + " ".join(reasons)
    if nested:
        note += (f" Not compared: {word_list([f'{a} with {b}' for a, b in nested])}. A general factor and its specific "
                 f"factors (a bifactor model) measure the same items, the specific factors what the items share beyond "
                 f"the general factor, so whether they are distinct is not a question these comparisons can answer.")
    if fixed:
        values = [short(v) for v in sorted({round(r, 6) for _, _, r in fixed})]
        many = len(fixed) > 1
        note += (f" Left out: {word_list([f'{a} with {b}' for a, b, _ in fixed])}, whose correlation"
                 f"{'s' if many else ''} the model fixes (at {word_list(values).replace(' and ', ' or ')}): a "
                 f"correlation the model sets is not estimated from the data, so it cannot show whether two factors "
                 f"are distinct.")
    if not body:
        return None
    return _table(f"distinct_{group}", "Distinctness of the factors: correlations, HTMT and AVE", columns, body, _unusable(result) + note,
                  _all_if_unusable(result, body),
                  values=(["Factor", "Factor", "r", "95% CI lower", "95% CI upper", "HTMT", "AVE (first)", "AVE (second)",
                           "sqrt(AVE) > |r|"], numbers))


def _no_interval_reasons(other_scale: list[str], implied: bool) -> Text:
    """Why no correlation of the distinct table has an interval: a higher-order factor implies them, or some factors
    are scaled otherwise than by their variances (the only case the advice to scale by variance fits, so that it
    never asks for what the model already does); the correlations the model fixes are left out of the table.  The
    model file's statement apart (note_parts.Command): a manuscript says it in words.  ``other_scale``: those factors
    in the model's order, as the table lists them (not sorted by name)."""
    if implied:
        return "the correlations of factors below a higher-order factor are implied by it, not parameters."
    if other_scale:
        return Note(("a correlation is a parameter of the model only when both factors are scaled by their variances",
                     Command(SCALE_BY_VARIANCE), f", and {word_list(other_scale)} "
                     f"{'are' if len(other_scale) > 1 else 'is'} scaled otherwise."))
    return "none of these correlations is a parameter of the model."


#: the model file's statement that scales every factor by its variance, as a note gives it to the program's user (a
#: manuscript's note says 'scaled by their variances' and needs no more)
SCALE_BY_VARIANCE = " ('scale latent by variance')"
#: the model file's statement of reverse-keyed items, as a note names it to the program's user
REVERSED_STATEMENT = " (its 'reversed' statement)"


def keying_sentence(rows) -> Text:
    """Which items every coefficient treats as reversed, and why; the model file's statement apart
    (note_parts.Command), which a manuscript leaves out."""
    lists = [f"{r.factor}: {', '.join(r.reversed)}" for r in rows if r.reversed]
    declared = any(r.keying is Keying.DECLARED for r in rows)
    # weak items loading against their factor: left as answered because weak (assessment.reliability.item_keys)
    faint = [f"{r.factor}: {', '.join(r.weak_against)}" for r in rows if r.weak_against]
    left = (f"Left as answered although they load against their factor's other items, because too weakly "
            f"(standardized loading below {WEAK_LINE} in size) for the sign to key them: {'; '.join(faint)}. "
            if faint else "")
    if not lists:
        return (Note(("Every item is keyed as the model declares", Command(REVERSED_STATEMENT),
                      ": none is scored in reverse. ")) if declared else
                "No item is reversed for scoring. " + left if faint else
                "Every item loads in its factor's direction, so none is reversed for scoring. ")
    why = (Note(("as the model declares", Command(" in its 'reversed' statement"))) if declared else
           "their loadings have the sign opposite to most items of their factor"
           + (f"; where half of a factor's items load each way, opposite to the half that holds its first item"
              f"{' not weak' if any(r.evenly_split and r.weak for r in rows) else ''}"
              if any(r.evenly_split for r in rows) else ""))
    return "Computed for keyed sums; reversed for scoring (" + why + f"): {'; '.join(lists)}. " + left


def _group_keying(result, group: int) -> Text:
    """The keying sentence of group ``group``'s reliability table (:func:`keying_sentence`), said once: a later
    group keyed as the first points to the first group's table instead of repeating it (s27: every group's note
    repeated the sentence); a group keyed otherwise has its own."""
    own = keying_sentence(result.groups[group].reliability)
    if group and result.multigroup and str(own) == str(keying_sentence(result.groups[0].reliability)):
        return f"Items keyed as in group {group_words(result, 0)}. "
    return own


def _fixed_alike(result) -> bool:
    """Whether a model fixing every parameter states each item's loading and intercept (threshold) alike in every
    group (review s14: such a model was said not to assume scalar invariance)."""
    values: dict[tuple, set] = {}
    for e in result.estimates:
        if e.kind in ("loading", "intercept", "threshold"):
            values.setdefault((e.kind, tuple(e.variables)), set()).add(float(e.estimate))
    return bool(values) and all(len(v) == 1 for v in values.values())


def _sums_across_groups(result, rows) -> str:
    """Whether the groups' sum-score means can be compared: only when the items' loadings and intercepts (for
    ordinal items, thresholds) are equal across groups, scalar invariance (Meredith 1993; Steinmetz 2013 shows how
    unequal intercepts bias observed-mean comparisons; both recalled from memory).  Names the items whose parameters this fit leaves free to
    differ, or says that the fit holds none equal."""
    shared = _shared(result)
    if not result.parameter_labels and _fixed_alike(result):  # every parameter stated, the same in every group
        return ("The model fixes every item's loading and intercept at the same value in every group, so under it "
                "the groups' sum means can be compared; whether it holds is its test of fit.")
    if not shared:
        return ("The groups' sum means can be compared only if the items' loadings and intercepts are equal across "
                "groups (scalar invariance), which this model does not assume: test it first (the invariance "
                "command), and until it holds do not read differences between these means as differences in the "
                "factors.")
    differ = {}
    for r in rows:
        items = set(r.items)
        own = [e for e in result.estimates if e.free and _key(e) not in shared
               and ((e.kind in ("intercept", "threshold") and e.variables[0] in items)
                    or (e.kind == "loading" and e.variables[0] == r.factor and e.variables[1] in items))]
        words = sorted({parameter_words(e.kind,
                                        e.variables[:1] if e.kind in ("intercept", "threshold") else e.variables)
                        for e in own})
        if words:
            differ[r.factor] = words
    if not differ:
        return ("These sums' means are compared across groups on the assumption, held by this model, that the items' "
                "loadings and intercepts are equal across groups (scalar invariance); the fit of that assumption is "
                "what the invariance command tests.")
    named = "; ".join(f"{factor}: {word_list(words)}" for factor, words in differ.items())
    return (f"The means of the {word_list(list(differ))} sums are not comparable across groups: this model lets "
            f"{named} differ between the groups, and a sum's mean moves with its items' loadings and intercepts as "
            f"well as with its factor (a sum needs scalar invariance of all its items); compare the factor means "
            f"instead.")


def sum_score_table(result, group: int = 0) -> ReportTable | None:
    no_means = any(g.value == "means" for g in result.data.not_given)  # summary statistics without means
    no_sds = any(g.value == "standard_deviations" for g in result.data.not_given)  # correlations without SDs
    rows = [r for r in result.groups[group].reliability
            if r.sum_score_sd is not None or no_sds and r.level == "first-order"]
    if not rows:
        return None
    body = [[r.factor, str(len(r.items)), ", ".join(r.reversed), "not given" if no_means else est_num(r.sum_score_mean, 2),
             "not given" if no_sds else est_num(r.sum_score_sd, 2), unit(min(r.item_total), 2) if r.item_total else ""]
            for r in rows]
    note = (f"The sum of each factor's items with reverse-keyed items reversed. Mean, SD (divisor N - 1) and "
            f"item-rest r come from the item means and covariances the fit analysed: {moments_source(result, group)}.")
    if no_sds:
        note += f" The item-rest r are {STANDARDIZED_ITEMS}."
    if no_means or no_sds:
        note += (f" {capitalised(source_words(result.data.source))} gives no {word_list([w for w, none in (('means', no_means), ('standard deviations', no_sds)) if none], 'or')}, "
                 f"so the sums' {word_list(w for w, none in (('means', no_means), ('SDs', no_sds)) if none)} are not shown.")
    if not no_means and any(r.sum_score_mean is None for r in rows):
        note += Note((" A mean is shown once the answer scale of the reversed items is known: declare it in the model",
                      Command(" with 'reversed ITEMS on LOWEST to HIGHEST'"), "."))
    if result.multigroup:
        note = _sums_across_groups(result, rows) + " " + note  # (a Note stays one: no f-string)
    values = [[r.factor, len(r.items), ", ".join(r.reversed), None if no_means else r.sum_score_mean, r.sum_score_sd,
               min(r.item_total) if r.item_total else None] for r in rows]
    withheld = [k for k, r in enumerate(rows) if miskeyed(r)]  # the reliability table's one rule (every view's)
    for k in withheld:  # the sum's mean and SD describe no scale; the item-rest r, the evidence, stays
        body[k][3:5] = ["withheld", "withheld"]
        values[k][3:5] = [None, None]
    if withheld:
        named = [rows[k].factor for k in withheld]
        many = len(named) > 1
        note += (f" Mean and SD withheld for {word_list(named)} (see the caution on the keying above): "
                 f"{'for each, ' if many else ''}{WITHHELD_BECAUSE}; the lowest item-rest r is shown, the item that "
                 f"runs most against the keyed sum of the others.")
    columns = [("Factor", "l"), ("Items", "r"), ("Reversed for scoring", "l"), ("Mean", "r"), ("SD", "r"),
               ("Lowest item-rest r", "r")]
    return _table(f"sum_scores_{group}", "Keyed sum scores", columns, body, note,
                  values=([c for c, _ in columns], values))


#: the caution of a table that names rows by their ids (--id): ids identify the people who answered
IDS_IDENTIFY = ("The ids identify respondents: leave this table out of anything published or shared (the row "
                "numbers find the same rows in the data file).")
#: what the Word report, written for a manuscript, says instead of showing the ids (:func:`without_ids`)
IDS_LEFT_OUT = ("Respondents' ids are left out of this document, which is written for a manuscript; the row numbers "
                "find the rows in the data file, and the terminal, HTML and JSON reports show the ids.")


def without_ids(table: ReportTable) -> ReportTable:
    """``table`` without its column of respondents' ids (a new-user trial found them in a Word report for a
    client), its note saying so; the table itself when it has none."""
    k = table.ids_column
    if k is None:
        return table

    def drop(row: tuple) -> tuple:
        return row[:k] + row[k + 1:]

    faint = tuple((i, j if j < k else j - 1) for i, j in table.faint if j != k)
    note = (table.note or "").replace(IDS_IDENTIFY, IDS_LEFT_OUT)
    return replace(table, columns=drop(table.columns), align=drop(table.align), rows=tuple(map(drop, table.rows)),
                   faint=faint, note=note if IDS_LEFT_OUT in note else f"{IDS_LEFT_OUT} {note}".strip(),
                   ids_column=None)


def case_table(result, group: int = 0) -> ReportTable | None:
    cases = result.groups[group].influential_cases
    if not cases:
        return None
    named = any(c.id is not None for c in cases)
    gaps = any(c.answered is not None for c in cases)  # full-information ML: distances on the items answered
    shown = cases[:5]
    ids = [[c.id or ""] if named else [] for c in shown]
    headers = ([result.data.row_naming.heading] + (["Id"] if named else []) + ["Contribution to chi-square"]
               + (["Items answered"] if gaps else []) + ["Squared Mahalanobis distance"]
               + (["Squared distance under the model"] if gaps else []) + ["p"])
    values = [[c.row, *i, c.chi_square_share] + ([c.answered] if gaps else []) + [c.mahalanobis]
              + ([c.model_mahalanobis] if gaps else []) + [c.p_value] for c, i in zip(shown, ids)]
    body = [[str(c.row), *i, num(c.chi_square_share, 2)] + ([str(c.answered)] if gaps else []) + [num(c.mahalanobis, 2)]
            + ([num(c.model_mahalanobis, 2)] if gaps else []) + [p_value(c.p_value)] for c, i in zip(shown, ids)]
    note = ((IDS_IDENTIFY + " ") if named else "") + (
        "Each row's contribution (in chi-square units; negative for a row the model fits better than the saturated "
        "model does) sums over all rows to the chi-square; large contributions and distances point at rows worth "
        "checking.")
    if result.design is not None and result.design.columns.weights:
        note += (f" Under the {result.design.columns.kind.label} each row's contribution is its weight times its own, "
                 "and its distances are from the weighted means and covariances.")
    if gaps:
        note += (" With missing answers each row is measured on the items it answered (Yuan & Bentler 2000; Enders "
                 "2010): the squared Mahalanobis distance from the estimated means and covariances of all rows "
                 "(saturated, by EM), whose p comes from a chi-square with as many degrees of freedom as items "
                 "answered, and the distance under the fitted model.")
    table = _table(f"cases_{group}", "Rows that contribute most to the chi-square",
                   [(h, "l" if h == "Id" else "r") for h in headers], body, note, values=(headers, values))
    return replace(table, ids_column=1) if named else table


def item_table(result) -> ReportTable:
    """The descriptives table: per item the rows answering it, mean, SD, skewness, excess kurtosis and, with
    raw rows, its factor, keying and corrected item-total correlation."""
    d = result.data if result.multigroup else result.groups[0].data
    rest: dict[str, tuple[str, float, bool]] = {}  # item -> (factor, corrected item-total r, reversed)
    if not result.multigroup:
        for r in result.groups[0].reliability:
            for item, value in zip(r.items, r.item_total):
                rest.setdefault(item, (r.factor, value, item in r.reversed))
            if r.level == "first-order" and len(r.items) == 1:  # a one-item factor: no item-rest correlation
                rest.setdefault(r.items[0], (r.factor, float("nan"), r.items[0] in r.reversed))
    shape = bool(d.skewness)
    # SDs with divisor N - 1, as descriptive tables report them (the model uses divisor N)
    stretch = (d.n_obs / (d.n_obs - 1)) ** 0.5 if d.n_obs > 1 else 1.0
    columns = [("Item", "l")] + ([("N", "r")] if shape else []) + [("Mean", "r"), ("SD", "r")]
    columns += [("Skewness", "r"), ("Excess kurtosis", "r")] if shape else []
    columns += [("Factor", "l"), ("Keying", "l"), ("Item-rest r", "r")] if rest else []
    body, values = [], []
    # summary statistics without a mean row, or correlations without an sd row: those values are not known
    no_means = any(g.value == "means" for g in result.data.not_given)
    no_sds = any(g.value == "standard_deviations" for g in result.data.not_given)
    for k, (name, m, s) in enumerate(zip(d.variables, d.means, d.sds)):
        row = [name] + ([count_text(d.answered[k])] if shape else []) + ["not given" if no_means else est_num(m, 2),
                                                                  "not given" if no_sds else est_num(s * stretch, 2)]
        numbers = [name] + ([d.answered[k]] if shape else []) + [None if no_means else m,
                                                                 None if no_sds else s * stretch]
        if shape:
            row += [num(d.skewness[k], 2), num(d.kurtosis[k], 2)]
            numbers += [d.skewness[k], d.kurtosis[k]]
        if rest:
            factor, value, flipped = rest.get(name, ("", float("nan"), False))
            row += [factor, "reversed" if flipped else "", unit(value, 2)]
            numbers += [factor, "reversed" if flipped else "", value]
        body.append(row)
        values.append(numbers)
    given = capitalised(source_words(result.data.source))  # 'The file', 'The data frame'
    note = "SD with divisor N - 1." + (f" {given} gives no means, so none are shown (the fit takes every item's mean "
                                       "as 0, which affects no estimate of this model)." if no_means else "") + (
        f" {given} gives correlations without standard deviations, so none are shown." if no_sds else "")
    if shape:
        note += (" Skewness g1 and excess kurtosis g2 (moment estimators; 0 for a normal distribution), each from "
                 "the rows answering the item.")
    if rest:
        note += (" Item-rest r: the correlation of the (keyed) item with the keyed sum of the other items of its "
                 "factor (corrected item-total correlation)" + (f", {STANDARDIZED_ITEMS}." if no_sds else "."))
    weights = _weights_column(result)
    if _estimated_for_gaps(result):
        note += f" Mean{', SD and item-rest r' if rest else ' and SD'}: {moments_source(result, 0)}."
    elif weights is not None:
        note += (f" Mean{', SD and item-rest r' if rest else ' and SD'} weighted by {weights}"
                 + ("; N, skewness and kurtosis count each row once." if shape else "."))
    title = ("Items: descriptive statistics (from the summary statistics)" if getattr(result.data, "analysed", None)
             is not None else "Items: descriptive statistics (analysed rows"
             + ("" if weights is None else f"; means and SDs weighted by {weights}") + ")")
    return _table("items", title, columns, body, note,
                  values=([c for c, _ in columns], values))


def _correlations_alone(result) -> bool:
    """Whether the fit analysed a correlation matrix without standard deviations (summary statistics), whose alpha and
    item-rest correlations are the standardized items' (data.summary_stats.STANDARDIZED_ITEMS)."""
    return any(g.value == "standard_deviations" for g in getattr(result.data, "not_given", ()))


def _estimated_for_gaps(result) -> bool:
    """Whether the fit's item means and covariances are full-information ML estimates for rows with gaps (EM)."""
    coverage = (getattr(result, "missing_data", None) or {}).get("coverage", {})
    return result.method.missing is MissingData.FULL_INFORMATION and any(share < 1 for share in coverage.values())


def moments_source(result, group: int = 0) -> str:
    """What the item means and covariances of a fit's descriptive figures (item and keyed sum means, SDs, item-rest
    correlations) are computed on, in words: the rows analysed, or with gaps under full-information ML the saturated
    model's estimates for every row (EM; Dempster, Laird & Rubin 1977), weighted or not."""
    weights = _weights_column(result)
    n = result.groups[group].data.n_obs
    weighted = f", weighted by {weights}" if weights else ""
    if _estimated_for_gaps(result):
        return (f"estimates for all {count_text(n)} rows analysed by full-information ML (the saturated model, by EM; Dempster, "
                f"Laird & Rubin 1977){weighted}, which assume answers missing at random; not the figures of the rows "
                f"that answered every item")
    if getattr(result.data, "analysed", None) is not None:  # summary statistics: no rows
        return f"the summary statistics given (N = {count_text(n)})"
    return f"the {count_text(n)} rows analysed{weighted}"


def _weights_column(result) -> str | None:
    """The column of row weights the fit used (None without weights)."""
    design = getattr(result, "design", None)
    return design.columns.weights if design is not None else None


def fit_answer_counts(result, group: int = 0):
    """The answers per category (data.answer_counts.AnswerCounts) of a fit's ordinal items in group ``group``, from
    the counts the fit kept; None without ordinal items."""
    from cfa_tool.data.answer_counts import AnswerCounts

    d = result.groups[group].data
    if not d.categories or not any(d.categories):
        return None
    shown = [(name, cats) for name, cats in zip(d.variables, d.categories) if cats]
    codes = tuple(sorted({v for _, cats in shown for v, _ in cats}))  # the columns: the answer codes themselves
    counts = tuple(tuple(dict(cats).get(v, 0) for v in codes) for _, cats in shown)
    scale = tuple(tuple(v for v in codes if cats[0][0] <= v <= cats[-1][0]) for _, cats in shown)
    names = tuple(name for name, _ in shown)
    labels = fit_answer_labels(result, names)
    return AnswerCounts(result.groups[group].label, names, codes, counts, scale,
                        tuple(tuple((v, labels[name][v]) for v in codes if v in labels.get(name, {})) for name in names),
                        tuple(result.data.missing_codes) + tuple(result.data.no_answer_words),
                        tuple(getattr(result.data, "joined_answers", ())))


def category_table(result) -> ReportTable | None:
    """Ordinal items of a fit: how many rows gave each answer (with the share), per item, in the one table of answers
    per category (:func:`answer_table`) that ``check`` shows before the fit; every group in that one table."""
    found = [a for a in (fit_answer_counts(result, g) for g in range(len(result.groups))) if a is not None]
    if not found:
        return None
    weights = _weights_column(result)
    labels = group_labels(result)
    return answer_table(tuple(found), CATEGORY_TABLE, " in each group" if len(found) > 1 else "",
                        groups=result.multigroup, group_names=tuple(written_group(a.group, labels) for a in found)
                        if result.multigroup else (),
                        analysed=" (rows analysed" + ("" if weights is None else ", each counted once: unweighted")
                        + ")", after="" if weights is None else
                        f" Rows are counted once each, unweighted; the thresholds use the shares weighted by {weights}.")


#: the key of a report's table of answers per category (one table, every group in it)
CATEGORY_TABLE = "categories"


def _two_factor_higher_order(result) -> tuple[str, ...]:
    """A note on higher-order factors that explain two first-order factors only (a lone one is refused when the
    model is read): like a factor of two indicators, each is identified only through its covariance with another
    higher-order factor (Kenny 1979), so its loadings are barely determined when that covariance is small."""
    d = getattr(result, "description", None)
    two = [(h, lower) for h, lower in (d.higher_order if d is not None else ()) if len(lower) == 2]
    if not two:
        return ()
    named = "; ".join(f"{h} explains {lower[0]} and {lower[1]}" for h, lower in two)
    one = len(two) == 1
    saved = getattr(d, "higher_order_df", None)
    # what the structure saves, counted (model.description.higher_order_saving): two such factors together save a df
    # while neither alone does (newuser-s23)
    tested = (f" Together the higher-order structure has {counted(saved, 'parameter')} fewer than the first-order "
              f"factors correlated freely, so this fit tests it with {counted(saved, 'degree')} of freedom "
              f"(Rindskopf & Rose 1988)." if saved else "")
    return (f"Higher-order {'factor' if one else 'factors'} over two factors ({named}): {'it is' if one else 'each is'}"
            f" identified only through its covariance with another higher-order factor, as a factor of two "
            f"indicators is through its correlations with other factors (Kenny 1979), so the loadings of the "
            f"first-order factors on {'it' if one else 'them'} are barely determined when that covariance is small."
            + tested,)


def _just_identified_higher_order(result) -> tuple[str, ...]:
    """A caution on higher-order factors whose part of the model is just-identified (a second-order factor over
    exactly three factors; model.description.higher_order_saving): the fit equals that of the factors
    correlated freely, so it does not test the higher-order structure (Rindskopf & Rose 1988)."""
    d = getattr(result, "description", None)
    found = [(h, lower) for h, lower in (d.higher_order if d is not None else ())
             if h in getattr(d, "just_identified_higher_order", ())]
    return tuple(f"Higher-order factor {h} over {_and(lower)}: its part of the model is just-identified (as many "
                 f"parameters as the variances and covariances of those factors), so the model fits exactly as those "
                 f"factors correlated freely would, and this fit does not test the higher-order structure (Rindskopf "
                 f"& Rose 1988)." for h, lower in found)


def _and(names) -> str:
    """Names as a sentence lists them: the one rule of a list (numbers.word_list)."""
    return word_list(list(names))


def higher_order_cautions(result) -> tuple[str, ...]:
    """The cautions on a fit's higher-order factors (over two factors; just-identified), said under the report's
    lines: by fit, and by the commands that fit the model file as it stands, the configural step of the invariance
    ladder, each fit of replicate and bootstrap's fit to the full sample (one rule, twentieth session)."""
    return _two_factor_higher_order(result) + _just_identified_higher_order(result)


def few_answers_warning(result, table: bool = True) -> Note | None:
    """A caution among an ordinal fit's first lines when some category of an item was given by few rows
    (data.answer_counts.AnswerCounts.sparse), naming them, with the table of answers per category where they are
    marked (``table``: the report holds it, as fit's does; the other commands' reports of the same fit say it without
    the table: hostile s22); None when there are none.  The table itself stays with the data, where a methods reader
    looks for the items' distributions; what it finds wrong comes first, as every problem does."""
    found, key = [], None
    for g in range(len(getattr(result, "groups", ()))):  # a fit read from its JSON (scores --from-fit) has no groups
        answers = fit_answer_counts(result, g)
        if answers is None:
            continue
        where = _in_group(result, answers.group)
        cells = [f"{name} {user_number(v)} ({c} row{'' if c == 1 else 's'}){where}" for i, name in enumerate(answers.items)
                 for j, (v, c) in enumerate(zip(answers.codes, answers.counts[i])) if answers.sparse(i, j)]
        if cells and key is None:
            key = CATEGORY_TABLE
        found += cells
    if not found:
        return None
    said = (f"Categories of ordinal items given by few rows (fewer than 5, or 1% of the item's answers when that "
            f"is more: a rule of thumb of this project): {_listed(found)}; a threshold next to such a category "
            f"rests on those few answers and is unstable; check those answers first")
    join = _join_advice(result)
    if not table:
        return Note((said, *join, "."))
    return Note((said + f" (marked '{FEW_ANSWERS_MARK}' in ", TableReference(key), ")", *join, "."))


def _join_advice(result) -> tuple:
    """The parts of a caution that advise the model's 'join answers' statements for a fit's sparse categories
    (data.answer_counts.join_advice): a statement of the model file, which the Word file says in words."""
    from cfa_tool.data.answer_counts import join_advice

    statements = join_advice([a for a in (fit_answer_counts(result, g) for g in range(len(result.groups)))
                              if a is not None])
    if not statements:
        return ()
    quoted = "; ".join(f"'{s}'" for s in statements)
    return (Command(f"; if they are real answers, the model file can join such a category with its neighbour: "
                    f"{quoted}",
                    "; if they are real answers, such a category can be joined with its neighbour in the model file"),)

def fit_answer_labels(result, items=None) -> dict[str, dict[float, str]]:
    """item -> {code: words} of a fit's answers (of ``items``, or of every item): the data file's value labels, or
    the words its 'answers' statements code, which take their place."""
    out: dict[str, dict[float, str]] = {}
    for item, codes in ((result.labels or {}).get("values") or {}).items():
        out[item] = {_code_number(code): str(text).strip() for code, text in codes.items()
                     if _code_number(code) is not None and str(text).strip()}
    for covered, answers in result.data.answer_coding:
        for item in covered:
            out[item] = {code: word for word, _, code in answers if word is not None}
    return {item: words for item, words in out.items() if words and (items is None or item in items)}


#: the marks of the cells of a table of answers per category (:func:`answer_table`)
NO_ANSWER_MARK, FEW_ANSWERS_MARK, JOINED_MARK = "none", "few", "in"


def _joining(parts) -> tuple:
    """The end of a table's advice on empty and sparse categories: the 'join answers' statements of the model file
    that join them with their neighbours (data.answer_counts.join_advice; a statement, said in words in the Word
    file), for ordinal items."""
    from cfa_tool.data.answer_counts import join_advice

    statements = join_advice(parts)
    words = "a real answer's category of an ordinal item can be joined with its neighbour's in the model file."
    if not statements:
        return (words,)
    quoted = "; ".join(f"'{s}'" for s in statements)
    return (Command(f"a real answer's category of an ordinal item can be joined with its neighbour's by the model "
                    f"file: {quoted}.", words),)


def answer_table(answers, key: str, where: str = "", groups: bool = False, analysed: str = "",
                 after: str = "", group_names: tuple[str, ...] = ()) -> ReportTable:
    """The table of answers per category of ``answers`` (data.answer_counts.AnswerCounts, or one per group): one row
    per item, one column per answer code (headed by its label when every item labels it alike), each cell the rows
    giving it and their share, an empty category marked 'none' and one given by few rows 'few', the items with either
    flagged.  Several groups make one table, a column naming the group on its first item's row (as a group's rows
    are grouped), so that fourteen groups read as one table and not fourteen (review s17); ``group_names``: each
    group as the note's sentences write it (language.names.written_group).  ``where``: the title's words on where the rows come from; ``groups``: the rows
    come in groups (an empty category then stops an ordinal fit); ``analysed``: the title's words on the rows
    counted; ``after``: the note's last words."""
    parts = (answers,) if not isinstance(answers, (tuple, list)) else tuple(answers)
    several = len(parts) > 1
    names = tuple(group_names) or tuple(str(a.group) for a in parts)
    codes = tuple(sorted({v for a in parts for v in a.codes}))
    shared = _shared_labels(parts[0])
    if any(_shared_labels(a) != shared for a in parts[1:]) or (shared and set(shared) != set(codes)):
        shared = {}
    rows, values, flagged, few, none, ends = [], [], [], [], [], set()
    joined_cells: list[str] = []
    for a, group in zip(parts, names):
        in_group = f" in group {group}" if several else ""
        for i, name in enumerate(a.items):
            total = a.answered(i) or 1
            cells, counts = [], []
            for v in codes:
                j = a.codes.index(v) if v in a.codes else None  # a code of another group only: outside this item's
                c = 0 if j is None else a.counts[i][j]
                counts.append(c if c or (j is not None and v in a.scale[i]) else None)
                into = a.joined_into(i, v)
                if into is not None:  # analysed as part of another category (a 'join answers' statement)
                    cells.append(f"{JOINED_MARK} {user_number(into)}")
                    joined_cells.append(f"{name} {user_number(v)} as {user_number(into)}")
                elif j is not None and a.empty(i, j):
                    cells.append(NO_ANSWER_MARK)
                    none.append(f"{name} {user_number(v)}{in_group}")
                elif c == 0:
                    cells.append("")
                else:
                    sparse = a.sparse(i, j)
                    cells.append(f"{c} ({100 * c / total:.0f}%)" + (f" {FEW_ANSWERS_MARK}" if sparse else ""))
                    if sparse:
                        few.append(f"{name} {user_number(v)}{in_group} ({c} row{'' if c == 1 else 's'})")
                        if v in (a.scale[i][0], a.scale[i][-1]):  # the lowest or highest answer: a stray value?
                            ends.add(v)
            if a.flagged(i):
                flagged.append(len(rows))
            first = [str(a.group) if i == 0 else ""] if several else []  # a cell holds the label as it is
            rows.append([*first, name, *cells])
            values.append([*([a.group] if several else []), name, *counts])  # the label itself, for data files
    note = ("Each column is an answer code" + (" and its label" if shared else "") + "; each cell: the rows giving it "
            "and their share of the item's answers" + ("" if not several else " in its group")
            + "; an empty cell: a code outside the item's answers.")
    if not shared:
        note += _labels_note(parts[0])
    if joined_cells:
        note += (f" {JOINED_MARK} N: a category analysed as one with category N, as the model's 'join answers' "
                 f"statements say; the counts are of the categories as analysed, those as answered are in the notes "
                 f"({_listed(list(dict.fromkeys(joined_cells)))}).")
    if few:
        note += (f" {FEW_ANSWERS_MARK}: fewer than 5 rows, or 1% of the item's answers when that is more (a rule of "
                 f"thumb of this project, not a published cutoff): a threshold next to such a category rests on those "
                 f"few answers and is unstable ({_listed(few)}).")
    if none:
        note += (f" {NO_ANSWER_MARK}: a category of the item's scale (between its lowest and highest answer"
                 + (", in any group" if groups else "") + ") that no row gave"
                 + ("; an ordinal fit of the groups stops there, since thresholds are compared across groups"
                    if groups else "; an ordinal fit estimates no threshold for it") + f" ({_listed(none)}).")
    text: Text = note
    if few or none:  # the option that reads a stray code as no answer is a command part: a manuscript names none
        from cfa_tool.data.non_answers import codes_given
        from cfa_tool.options import Interface

        stray = [f"{user_number(v)}" for v in sorted(ends)]
        given = tuple(parts[0].given) + tuple(sorted(ends))  # after the codes the run gave, which it keeps
        missing_as = "a typing error or a code for no answer can be given as missing; "
        text = Note((note + " Check such an answer first: ",
                     Command(f"if {word_list(stray, 'or')} is a typing error or a code for no answer, give "
                             + option_in_both(codes_given(given, Interface.COMMAND_LINE),
                                              codes_given(given, Interface.PYTHON)) + "; ", missing_as)
                     if ends else missing_as,
                     *_joining(parts), after))
    else:
        text = note + after
    columns = ([("Group", "l")] if several else []) + [("Item", "l")] + [
        (f"{user_number(v)} {shared[v]}" if shared else f"{user_number(v)}", "r") for v in codes]
    value_columns = (["Group"] if several else []) + ["Item"] + [f"Answer {user_number(v)} rows" for v in codes]
    return _table(key, f"Answers per category{where}{analysed}", columns, rows, text, flagged=tuple(flagged),
                  values=(value_columns, values))


def _shared_labels(answers) -> dict[float, str]:
    """code -> label when every item labels every code of the table alike; {} otherwise."""
    if not answers.labels or not all(answers.labels):
        return {}
    first = dict(answers.labels[0])
    if set(first) != set(answers.codes) or any(dict(x) != first for x in answers.labels):
        return {}
    return first


def _labels_note(answers) -> str:
    """The labels of the answer codes, items labelled alike on one line (' Labels: 1 never, 2 often (a, b); ...')."""
    lines: dict[str, list[str]] = {}
    for name, labelled in zip(answers.items, answers.labels):
        if labelled:
            lines.setdefault(", ".join(f"{user_number(v)} {text}" for v, text in labelled), []).append(name)
    if not lines:
        return ""
    whole = len(lines) == 1 and len(next(iter(lines.values()))) == len(answers.items)
    return " Labels of the answers: " + "; ".join(
        text + ("" if whole else f" ({', '.join(names)})") for text, names in lines.items()) + "."


def _listed(found: list[str], most: int = 8) -> str:
    return cut_list(found, most)


def label_tables(result) -> list[ReportTable]:
    """The labels the data file gives its variables and their values (SPSS and Stata files)."""
    labels = result.labels or {}
    out = []
    names = labels.get("variables", {})
    if names:
        out.append(_table("variable_labels", "Labels of the variables (from the data file)",
                          [("Variable", "l"), ("Label", "l")], [[k, v] for k, v in names.items()]))
    values = labels.get("values", {})
    if values:
        # codes are numbers, or text in a text variable ('a'), or Stata's '.a'
        rows = [[k, "; ".join(f"{label_text(code)} = {text}" for code, text in v.items())] for k, v in values.items()]
        shared: dict[str, list[str]] = {}  # variables labelled alike share one line (new-user trial s15: twenty
        for name, codes in rows:  # identical lines for twenty items); the data files keep one row per variable
            shared.setdefault(codes, []).append(name)
        shown = [[", ".join(names) + (f" ({len(names)} variables)" if len(names) > 3 else ""), codes]
                 for codes, names in shared.items()]
        out.append(_table("value_labels", "Labels of the values (from the data file)",
                          [("Variable", "l"), ("Codes", "l")], shown, values=(["Variable", "Codes"], rows)))
    return out


def rows_phrase(data, design=None) -> str:
    """For the data line: the rows analysed, of the rows read or of those the row filters kept (then with the
    filters and the rows in the file), and the rows per pair of items when pairs used different rows; under
    frequency weights (``design``) the rows analysed are counted by their weights (the N of the fit), and said so."""
    kept = (f"{count_text(data.rows_read)} {selection_phrase(data)}" if data.row_filters
            else f"{count_text(data.rows_read)} read")
    if design is not None and design.columns.weights is not None and design.columns.kind is WeightKind.FREQUENCY:
        return (f"{count_text(data.n_obs)} rows analysed, counted by their frequency weights ({design.columns.weights}), "
                f"of {kept}{pair_rows_phrase(data)}")
    analysed = getattr(data, "analysed", None)
    if analysed is not None:  # summary statistics: no rows were read
        return f"summary statistics ({analysed.value}), N = {count_text(data.n_obs)} as given {given_with(data.source)}"
    return f"{count_text(data.n_obs)} rows analysed of {kept}{pair_rows_phrase(data)}"


def selection_phrase(data) -> str:
    """Which row filters chose the rows, and how many rows the file held ('' without filters)."""
    if not data.row_filters:
        return ""
    from cfa_tool.data.filters import kept_by_words

    return f"kept by {kept_by_words(data.row_filters)} ({count_text(data.rows_in_file)} rows in the file)"


def pair_rows_phrase(data) -> str:
    """For the data line: how many rows the pairs of ordinal items were computed from when rows with gaps
    were kept (pairwise present rows); empty otherwise."""
    pairs = data.pair_range
    if pairs is None or pairs[0] == data.n_obs:
        return ""
    return f" ({count_text(pairs[0])} to {count_text(pairs[1])} rows per pair of items: each pair from the rows that answered both)"


def correlation_table(result, group: int = 0) -> ReportTable | None:
    """The items' sample correlations (lower triangle), with the number of rows they come from."""
    names = result.observed
    if len(names) > MAX_MATRIX or len(names) < 2:
        return None
    g = result.groups[group]
    S = g.sample_covariance
    sd = np.sqrt(np.clip(np.diag(S), 1e-300, None))
    r = S / np.outer(sd, sd)
    where = _in_group(result, g.label)
    pairs = g.data.pair_range
    rows_used = (f"N = {count_text(pairs[0])} to {count_text(pairs[1])} per pair" if pairs is not None and pairs[0] < pairs[1]
                 else f"N = {count_text(g.data.n_obs)}" if pairs is None else f"N = {count_text(pairs[0])}")
    # each sentence only when it applies to this fit (one note for both would tell of ordinal items under a
    # continuous fit with gaps)
    said = [text for applies, text in (
        (result.method.ordinal, "For ordinal items: polychoric (and polyserial) correlations."),
        (result.method.full_information,
         "With full-information estimation: the saturated model's estimates from every answer."),
    ) if applies]
    return _item_matrix(f"correlations_{group}", f"Correlations of the items{where} ({rows_used})", names, r,
                        " ".join(said) or None)


def matrices_left_out(result) -> Note | None:
    """Where the item matrices (correlations, residual correlations) are left out of every view, and why (the
    option that writes the JSON result apart: a manuscript's reader runs nothing)."""
    items = len(result.observed)
    if items <= MAX_MATRIX:
        return None
    return Note((f"The correlations of the items and the residual correlations are not shown as tables: {items} items "
                 f"are more than the {MAX_MATRIX} a matrix stays readable with. The JSON result",
                 Command(f" ({option_in_both('--json', 'result.to_dict()')})"),
                 " holds the residual correlations; the largest is named under the fit."))


def terminal_matrix_left_out(table: ReportTable) -> str | None:
    """Why a matrix of the items is not drawn in the terminal (None: it is): too many items to read there."""
    items = len(table.columns)  # a label column and a column for each item but the last
    if not table.matrix or items <= MAX_TERMINAL_MATRIX:
        return None
    return (f"{table.title}: {items} items, more than the {MAX_TERMINAL_MATRIX} a terminal shows readably; the HTML, "
            f"Markdown and Word reports and the --tables files hold it.")


def heat_colour(text: str) -> str | None:
    """The shade of a matrix cell as #rrggbb (None for a cell that is no number): red for a positive value, blue
    for a negative one, stronger with size up to HEAT_FULL."""
    try:
        value = float(text)
    except ValueError:
        return None
    strength = min(abs(value) / HEAT_FULL, 1.0) if np.isfinite(value) else 0.0
    full = (200, 40, 40) if value > 0 else (40, 80, 200)
    return "#" + "".join(f"{round(255 + (c - 255) * strength):02x}" for c in full)


def normality_lines(result) -> list[Text]:
    """The multivariate normality tests (or why there are none), with the remedy in words and its option."""
    lines = []
    for g in result.groups:
        n = g.normality
        if n is None:
            continue
        where = _in_group(result, g.label)
        if n.skewness is None:  # rows with gaps (full-information ML): the kurtosis of every row, each on its answered
            # items, and beside it Mardia's tests of the complete rows alone (s25: the skewness was lost)
            whole = n.of_complete_rows
            line = (f"Multivariate kurtosis{where} of every row, each on the items it answered ({counted(n.rows_with_gaps, 'row')} "
                    f"with gaps; Mardia 1970, for rows with gaps Yuan, Lambert & Fouladi 2004): {n.kurtosis:.3f} "
                    f"(normal: {n.kurtosis_expected:.3f}), z = {n.kurtosis_z:.2f}, p {p_phrase(n.kurtosis_p_value)}; "
                    + (f"of the {count_text(n.complete_rows)} complete rows alone (Mardia 1970): skewness "
                       f"{_mardia_figures(whole)}." if whole is not None else
                       f"Mardia's skewness needs complete rows, and the {counted(n.complete_rows, 'complete row')} "
                       f"{'are' if n.complete_rows != 1 else 'is'} too few for it (more than one beyond the items are "
                       f"needed), so it is not given."))
        else:
            line = f"Multivariate normality{where} (Mardia 1970): skewness {_mardia_figures(n)}."
        tested = [n] + ([n.of_complete_rows] if n.of_complete_rows is not None else [])
        departs = any(t.kurtosis_p_value < 0.05 or (t.skewness_p_value is not None and t.skewness_p_value < 0.05)
                      for t in tested)
        cautioned = any(c.kind is ProblemKind.NON_NORMAL_ANSWERS and c.group == (g.label if result.multigroup else None)
                        for c in getattr(result, "problems", ()))
        if cautioned:  # the caution first says what it does to the test and names the remedy: not said twice (s25)
            line += " The data depart from normality: see the caution first."
        elif departs and result.robust is None and result.method.helpers:  # the robust test is refused with helpers
            line += (" The data depart from normality, and the scaled test and robust standard errors, which would "
                     "guard against that, are not offered with missing-data helpers: the chi-square and the standard "
                     "errors rest on normal answers.")
        elif departs and result.robust is None:
            line = line + " The data depart from normality: consider " + Remedy.ROBUST.said() + "."
        design = getattr(result, "design", None)
        if design is not None and design.columns.weights is not None:
            line += (" These tests count each row as often as its frequency weight, as the fit does."
                     if design.columns.kind is WeightKind.FREQUENCY else
                     " These tests describe the rows as they are, unweighted.")
        lines.append(line)
    if getattr(result.data, "analysed", None) is not None:  # summary statistics: said, not silently left out
        lines.append("Summary statistics hold no rows of answers, so what needs them is not given: Mardia's tests of "
                     "multivariate normality and the unusual and influential rows; the reliability, the factors' "
                     "distinctness and the residuals come from the matrix.")
    elif not lines and result.method.full_information and not result.method.ordinal and result.method.helpers:
        # with missing-data helpers a fit of the complete rows only and the robust test are refused: neither advised
        lines.append(KURTOSIS_NOT_COMPUTED + ".")
    elif not lines and result.method.full_information and not result.method.ordinal:
        # said, not silently left out: both need every row complete
        guarded = (", and " + Remedy.ROBUST.said() + " guard the test and the standard errors against non-normal "
                   "answers either way" if result.robust is None else
                   ("; the scaled test and robust standard errors of this fit are meant to guard against non-normal "
                    "answers, but see the caution first" if design_doubts(result) else
                    "; the scaled test and robust standard errors of this fit guard against non-normal answers either "
                    "way"))  # advice never asks for what the fit already does
        lines.append(KURTOSIS_NOT_COMPUTED + "; " + Remedy.COMPLETE_ROWS.said() + " gives Mardia's tests for the complete "
                     "rows" + guarded + ".")
    return lines


def _mardia_figures(n) -> str:
    """Mardia's (1970) two tests of complete rows (assessment.normality.Normality) after the word 'skewness'."""
    return (f"{n.skewness:.3f}, chi-square {n.skewness_chi_square:.2f} on {n.skewness_df} df, p "
            f"{p_phrase(n.skewness_p_value)}; kurtosis {n.kurtosis:.3f} (normal: {n.kurtosis_expected:g}), z = "
            f"{n.kurtosis_z:.2f}, p {p_phrase(n.kurtosis_p_value)}")


#: why a full-information fit's report has no test of normality (assessment.normality.kurtosis_with_gaps failed, or
#: the diagnostics were not asked for)
KURTOSIS_NOT_COMPUTED = ("Mardia's tests of multivariate normality were not computed: the skewness needs complete rows, "
                         "and the kurtosis of rows with gaps (each row on the items it answered; Yuan, Lambert & "
                         "Fouladi 2004) could not be computed for these rows")


def local_fit_line(result) -> str | None:
    local = result.largest_residual_correlation()
    if not local:
        return None
    a, b, r = local
    return f"Local fit: the largest residual correlation is between {a} and {b}: {unit(r, 2)}."


def status_line(result) -> Text:
    status = (f"converged in {result.iterations} iterations" if result.converged else
              "DID NOT CONVERGE (" + result.message + ")")
    return f"Estimation: {result.estimator}, " + status


# ---------------------------------------------------------------- exploratory blocks
# the rotated loading matrix of each block (small loadings faint) with standard errors, and the rotated factors' correlations
SMALL_LOADING = 0.30  # shown faintly (common practice; the draft model's threshold too)


_BLOCK_ERRORS = {
    BlockErrors.DELTA_METHOD: "SE: delta method (implicit differentiation of the rotation's conditions).",
    BlockErrors.SINGULAR_ROTATION: "No standard errors: the rotation's conditions are singular at this solution, so the "
                                   "delta method cannot be applied.",
    BlockErrors.NO_PARAMETER_COVARIANCE: "No standard errors: the fit gave no covariance of its estimates.",
}


def _rotation_words(block) -> str:
    if len(block.factors) == 1:
        return "one factor: no rotation"
    return f"{block.rotation.value} rotation, {'oblique' if block.oblique else 'orthogonal'}"


def _block_loading_table(block, k: int) -> ReportTable:
    p, m = block.standardized.shape
    columns = [("Item", "l")]
    for f in block.factors:
        columns += [(f, "r"), ("SE", "r")]
    rows, faint, numbers = [], [], []
    for i, item in enumerate(block.items):
        cells = [item]
        for j in range(m):
            value, se = block.standardized[i, j], block.standardized_se[i, j]
            cells += [est_unit(value, 2) if abs(value) <= 1 else est_num(value, 2), est_num(se, 3) if np.isfinite(se) else ""]
            if abs(value) < SMALL_LOADING:
                faint += [(i, 1 + 2 * j), (i, 2 + 2 * j)]
            numbers.append([item, block.factors[j], value, se, block.pattern[i, j], block.pattern_se[i, j]])
        rows.append(cells)
    if m == 1:
        note = (f"Standardized loadings; below {unit(SMALL_LOADING, 2)} in absolute value shown faintly. "
                f"{'SE: delta method.' if block.errors is BlockErrors.DELTA_METHOD else _BLOCK_ERRORS[block.errors]} "
                f"The factor's variance is fixed at 1; one factor: no rotation.")
    else:
        note = (f"Standardized loadings after {_rotation_words(block)}; below {unit(SMALL_LOADING, 2)} in absolute "
                f"value shown faintly. {_BLOCK_ERRORS[block.errors]} The block was fitted unrotated (factor variances "
                f"1, factors uncorrelated, echelon zeros); the rotation does not change the fit.")
    if block.names_by is FactorNaming.ANCHOR_ITEMS:
        note += (f" Each name stays with its factor: the k-th name ({', '.join(block.factors)}) goes to the rotated "
                 f"factor on which the block's k-th item ({', '.join(block.items[:len(block.factors)])}) loads most, "
                 f"each factor signed so that this item loads positively.")
    elif block.names_by is FactorNaming.TARGET:
        note += " The names follow the target's columns."
    if not block.converged:
        note += " The rotation did not converge: these loadings are not its optimum."
    table = _table(f"exploratory_block_{k + 1}", f"Exploratory block {', '.join(block.factors)} ({_rotation_words(block)})",
                   columns, rows, note,
                   values=(["Item", "Factor", "Standardized loading", "SE", "Loading", "Its SE"], numbers))
    return replace(table, faint=tuple(faint))


def _block_correlation_table(block, k: int) -> ReportTable | None:
    m = len(block.factors)
    others = block.other_factors
    if (m < 2 or not block.oblique) and not others:
        return None
    names = list(block.factors)
    columns = [("Factor", "l"), ("With", "l"), ("Correlation", "r"), ("SE", "r")]
    rows, numbers = [], []
    pairs = [(a, names[b], block.correlations[i, b], block.correlations_se[i, b])
             for i, a in enumerate(names) for b in range(i) if block.oblique]
    pairs += [(a, g, block.other_correlations[i, j], block.other_correlations_se[i, j])
              for i, a in enumerate(names) for j, g in enumerate(others)]
    for a, b, r, se in pairs:
        rows.append([a, b, est_unit(r, 2) if abs(r) <= 1 else est_num(r, 2), est_num(se, 3) if np.isfinite(se) else ""])
        numbers.append([a, b, r, se])
    note = "SE: delta method." if block.errors is BlockErrors.DELTA_METHOD else _BLOCK_ERRORS[block.errors]
    if not block.oblique and m > 1:
        note += " The block's own factors are uncorrelated by its orthogonal rotation."
    title = f"Correlations of the rotated factors {', '.join(names)}" if m > 1 else f"Correlations of the factor {names[0]}"
    return _table(f"exploratory_correlations_{k + 1}", title,
                  columns, rows, note, values=(["Factor", "With", "Correlation", "SE"], numbers))


def block_tables(result) -> list[ReportTable]:
    out = []
    for k, block in enumerate(getattr(result, "exploratory", ())):
        out.append(_block_loading_table(block, k))
        table = _block_correlation_table(block, k)
        if table is not None:
            out.append(table)
    return out
