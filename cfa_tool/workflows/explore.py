"""The step before confirmation: how many factors, an exploratory solution and a draft model file,
from rows of data (cfa_tool.exploration holds the mathematics).

With ``split`` (a seed), the rows are divided at random into two halves: the exploration runs on
one, and the draft model is fitted on the other through the ordinary fit (``cfa_tool.fit``), so
that the confirmation half played no part in choosing the model.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from dataclasses import dataclass, field, replace

import enum

import numpy as np
import pandas as pd

from cfa_tool.data.halves import drawn_halves, few_clusters_words, half_phrase
from cfa_tool.data.column_roles import column_role
from cfa_tool.data.kept_rows import ROW_NAMING, row_naming
from cfa_tool.data.moments import stray_word_message
from cfa_tool.data.non_answers import run_words
from cfa_tool.data.renamed_columns import ColumnRenames
from cfa_tool.assessment.admissibility import sample_size_problems
from cfa_tool.numbers import count_text, counted, cut_list, more_words, names_shown, user_number, word_list
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.errors import DataError, OptionError, clipped, printable
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.options import Interface, Option, interface
from cfa_tool.exploration import (CountNote, CountRule, Exploration, ExploreSettings, ExtractionMethod, RotationMethod,
                                  RotationSpec, explore_correlations, from_ordinal_moments, from_sample_moments)
from cfa_tool.data.answer_words import coding_json, coding_record
from cfa_tool.data.kept_rows import row_of
from cfa_tool.exploration.choices import Placement
from cfa_tool.exploration.draft import answers_statement, model_name
from cfa_tool.exploration.factor_count import CLOSE_RMSEA, FitStep, fit_sequence
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.views import Presentable

#: what each rule for the number of factors is, in plain words (with its source)
RULE_WORDS = {
    CountRule.PARALLEL_COMPONENTS: "parallel analysis of components (Horn 1965)",
    CountRule.PARALLEL_FACTORS: "parallel analysis of factors (Horn 1965; Humphreys & Ilgen 1969)",
    CountRule.AVERAGE_PARTIAL: "minimum average partial correlation (Velicer 1976)",
    CountRule.AVERAGE_PARTIAL_REVISED: "minimum average partial, fourth powers (Velicer, Eaton & Fava 2000)",
    CountRule.LOWEST_BIC: "lowest BIC of the maximum-likelihood solutions (Schwarz 1978)",
    CountRule.CLOSE_FIT: f"fewest factors with RMSEA at most {journal_decimal(CLOSE_RMSEA, digits=2)} (Browne & Cudeck 1993; a convention)",
}

NOTE_WORDS = {
    CountNote.RULES_DISAGREE: "The rules disagree about the number of factors.",
    CountNote.NEXT_EIGENVALUE_BORDERLINE: "The next eigenvalue after the recommended number is above the average of the "
                                          "random ones (though not above their 95th percentile): one more factor is "
                                          "borderline.",
    CountNote.NEXT_EIGENVALUE_ABOVE_CHANCE: "The next eigenvalue after the recommended number is above the 95th "
                                            "percentile of the random ones in at least one of the two series (see the "
                                            "eigenvalue table): one more factor deserves a look.",
    CountNote.NO_FACTOR_ABOVE_CHANCE: "No eigenvalue stands above those of random data of the same size: these items may "
                                      "share no common factor at all; one factor is shown for inspection only.",
    CountNote.POOR_FIT_AT_RECOMMENDED: "The recommended solution fits poorly (RMSEA above .08, a convention).",
    CountNote.IMPROPER_AT_RECOMMENDED: "The recommended solution has an item whose uniqueness reached its lower bound "
                                       "(a Heywood case).",
}

RULES_CAUTION = ("Rules for the number of factors often disagree in practice; the number is a judgement, and each factor "
                 "should make sense in its items.")


@dataclass(frozen=True, eq=False)
class SplitHalves:
    """The two random halves of an explore-then-confirm run."""

    seed: int
    #: the rows' numbers as the file numbers them, a data frame's index labels (data.moments.row_numbers)
    exploration_rows: tuple[int, ...]
    confirmation_rows: tuple[int, ...]
    confirmation: FitResult | None  # the draft model fitted on the confirmation half (None: no usable draft)
    note: str | None = None  # why there is no confirmation fit
    #: the columns the halves were drawn by, as replicate --data draws them (data.halves.drawn_halves): whole clusters
    #: of ``cluster`` to each half, within each stratum of ``strata``; both None: row by row
    cluster: str | None = None
    strata: str | None = None
    #: the clusters in the exploration half and in the confirmation half; () without clusters
    units: tuple[int, ...] = ()
    #: each row's cluster and stratum as read, which a halves file records (data.halves.DrawnBy); None row by row
    drawn_by: object = field(default=None, repr=False)

    def how_drawn(self) -> str:
        """How the halves were drawn when by clusters or strata, a sentence of the report ('' row by row)."""
        within = f" within each stratum of {self.strata}" if self.strata is not None else ""
        if self.cluster is not None:
            return (f"The halves were drawn cluster by cluster{within}: every row of a cluster of {self.cluster} is in "
                    f"one half ({_clusters(self.units[0])} in {half_phrase(True, 0)}, {self.units[1]} in "
                    f"{half_phrase(True, 1)}); within each half the rows are still taken as independent"
                    f"{few_clusters_words(self.units)}.")
        return f"The halves were drawn row by row{within}." if self.strata is not None else ""

    def divided_words(self) -> str:
        """How the rows were divided, after 'The rows were': 'divided at random into two halves', or, drawn from a
        handful of clusters (data.halves.few_clusters_words), what was done instead: 'divided into two halves by their
        2 clusters of district, drawn at random: north to the exploration half and south to the confirmation half'
        (hostile s24b: such halves are those clusters, not random halves)."""
        if self.cluster is None or not few_clusters_words(self.units):
            return "divided at random into two halves"
        labels = getattr(self.drawn_by, "labels", {}) or {}
        named = [word_list(dict.fromkeys(labels[r][0] for r in rows if r in labels))
                 for rows in (self.exploration_rows, self.confirmation_rows)]
        which = (f": {named[0]} to {half_phrase(True, 0)} and {named[1]} to {half_phrase(True, 1)}"
                 if all(named) else "")
        return (f"divided into two halves by their {counted(sum(self.units), 'cluster')} of {self.cluster}, drawn at "
                f"random{which}")

    def to_dict(self) -> dict:
        return {"seed": self.seed, "exploration_rows": list(self.exploration_rows),
                "confirmation_rows": list(self.confirmation_rows),
                "confirmation_half_used_to_choose_the_model": False,
                "cluster_column": self.cluster, "strata_column": self.strata,
                "clusters_per_half": list(self.units) if self.cluster is not None else None,
                "confirmation": self.confirmation.to_dict() if self.confirmation is not None else None,
                "note": self.note}


def _clusters(count: int) -> str:
    return f"{count} cluster{'' if count == 1 else 's'}"


@dataclass(frozen=True, eq=False)
class ExploreResult(Presentable):
    """An exploratory analysis of a data file's items, with its draft model."""
    source: str
    items: tuple[str, ...]
    rows_read: int
    exploration: Exploration
    fits: tuple[FitStep, ...]  # maximum-likelihood solutions of 1 .. K + 2 factors
    requested: int | None  # the number of factors asked for (None: the recommendation)
    split: SplitHalves | None = None
    notes: tuple[str, ...] = ()
    order: tuple[int, ...] = field(default=(), repr=False)  # items sorted by factor, then by loading
    #: too few rows for the solution's free parameters (the rule fit applies: assessment.admissibility
    #: .sample_size_problems), then values in the item columns that look like no answers (assessment.admissibility
    #: .Problem): first in every view
    data_problems: tuple = ()
    #: the answers file's statements for the draft model's items (the draft reads the data file as explore did)
    answer_statements: tuple[str, ...] = ()
    answer_coding: tuple = ()  # how answers recorded as words were coded (data.answer_words.coding_record)
    #: the items of at most data.descriptives.FEW_CATEGORIES answer categories analysed as continuous (a note says
    #: what that does to the loadings and how to explore them by polychoric correlations)
    few_categories: tuple[str, ...] = ()
    #: the columns of numbers left out of the items explored by default, each with why (:class:`LeftOut`): the items'
    #: note says them in words; () when the items were named
    left_out: tuple[tuple[str, LeftOut], ...] = ()
    #: how a delimited text file was read (data.readers.TextReading; None otherwise), whose convention the CSV files
    #: of the report's tables follow (data.csv_convention)
    reading: object | None = None

    @property
    def factors(self) -> int:
        return self.exploration.factors

    @property
    def recommended(self) -> int:
        return self.exploration.count.recommended

    @property
    def draft_text(self) -> str:
        text = self.exploration.draft.text
        if self.answer_statements and self.exploration.draft.usable:  # the words read as the exploration read them
            text += ("# The answers recorded as words, coded as the answers file said:\n"
                     + "".join(line + "\n" for line in self.answer_statements))
        if self.requested is None and self._middle_count() == 0:  # the one factor shown for inspection only
            count = self.exploration.count  # each rule's count as the report gives it (hostile s20: one rule gave 2)
            rules = "".join(f"#   {RULE_WORDS[r]}: {count.suggestion(r)}\n" for r in count.combined)
            text = ("# No factor was recommended: the middle value of the three rules for the number of factors was 0:\n"
                    + rules + "# These items may share no common factor. This one-factor draft is for inspection only.\n"
                    ) + text
        return text

    def _middle_count(self) -> int:
        """The middle value of the three combined rules (the recommendation before it is raised to 1)."""
        count = self.exploration.count
        return int(np.median([count.suggestion(r) for r in count.combined]))

    def problems(self) -> list[str]:
        """What makes the chosen solution doubtful, in plain words (every view shows these first)."""
        ex = self.exploration
        out = [p.line() for p in self.data_problems]
        if not ex.solution.converged:
            out.append(f"The {ex.factors}-factor extraction did not converge; its loadings are not a solution.")
        if ex.solution.at_bound:
            out.append(f"Heywood case: the uniqueness of {', '.join(ex.solution.at_bound)} reached its lower bound (the "
                       f"factors would explain all of its variance); the solution may have too many factors or too few "
                       f"rows.")
        if not ex.rotated.converged:
            out.append("The rotation did not converge; the pattern loadings are not at the criterion's optimum.")
        return out

    def reasons(self) -> list[str]:
        """Why the recommendation is what it is, in plain words."""
        count = self.exploration.count
        # the rules' counts in a sentence of their own: a rule's name holds its source in parentheses
        rules = [f"{RULE_WORDS[r]} " + ("gives no count" if count.suggestion(r) is None else f"counts {count.suggestion(r)}")
                 for r in count.combined]
        counted = word_list(rules)
        counted = counted[:1].upper() + counted[1:]
        middle = self._middle_count()
        if middle == 0:
            lines = [f"No factor recommended: the middle value of three rules is 0. {counted}."]
        else:
            lines = [f"Recommended: {count.recommended} factor{'s' if count.recommended != 1 else ''}, the middle value "
                     f"of three rules. {counted}."]
        for note in count.notes:
            if note is CountNote.RULES_DISAGREE:  # say which rules count otherwise
                other = [f"{RULE_WORDS[s.rule]}: {s.factors}" for s in count.suggestions
                         if s.factors is not None and s.factors != middle]
                agree = len({count.suggestion(r) for r in count.combined}) == 1
                lines.append((f"The three rules agree; other rules count otherwise: {'; '.join(other)}." if agree else
                              f"The rules disagree about the number of factors; other counts: {'; '.join(other)}.")
                             if other else NOTE_WORDS[note])
            elif middle == 0:  # no factor recommended: the notes about the one factor shown for inspection
                if note not in (CountNote.NEXT_EIGENVALUE_BORDERLINE, CountNote.NEXT_EIGENVALUE_ABOVE_CHANCE):
                    lines.append(NOTE_WORDS[note].replace("The recommended solution", "The one-factor solution shown"))
            else:
                lines.append(NOTE_WORDS[note])
        if self.requested is not None and self.requested != count.recommended:
            lines.append(f"The solution below has {self.requested} factor{'s' if self.requested != 1 else ''}, as "
                         f"asked, not the {count.recommended} recommended.")
        return lines

    def to_dict(self) -> dict:
        ex = self.exploration
        rotated, count = ex.rotated, ex.count
        pa = count.parallel
        out = {
            "problems": self.problems(),
            "data_problems": [p.to_dict() for p in self.data_problems],
            "data": {"source": self.source, "rows_read": self.rows_read, "rows_used": ex.data.n_obs,
                     "correlations": ex.data.kind.value, "answer_coding": coding_json(self.answer_coding),
                     "few_categories_analysed_as_continuous": list(self.few_categories),
                     **({"reading": self.reading.to_dict()} if self.reading is not None else {})},
            "items": list(self.items),
            "items_left_out": [{"column": c, "reason": why.value} for c, why in self.left_out],
            "factor_count": {
                "recommended": count.recommended,
                "factors_used": ex.factors,
                "requested": self.requested,
                "rules": [{"rule": s.rule.value, "description": RULE_WORDS[s.rule], "factors": s.factors,
                           "in_recommendation": s.rule in count.combined} for s in count.suggestions],
                "notes": [n.value for n in count.notes],
                "reasons": self.reasons(),
                "caution": RULES_CAUTION,
                "parallel_analysis": {"replications": pa.replications, "seed": pa.seed, "percentile": pa.percentile,
                                      "reference": pa.reference.value,
                                      "component_eigenvalues": pa.component_eigenvalues.tolist(),
                                      "component_reference": pa.component_reference.tolist(),
                                      "factor_eigenvalues": pa.factor_eigenvalues.tolist(),
                                      "factor_reference": pa.factor_reference.tolist()},
                "average_partial": {"squared": count.average_partial.squared.tolist(),
                                    "fourth_power": count.average_partial.fourth_power.tolist()},
            },
            "fits": [_fit_dict(step) for step in self.fits],
            "solution": {
                "extraction": ex.settings.extraction.value,
                "rotation": rotated.spec.method.value,
                "oblique": rotated.oblique,
                "rotation_converged": rotated.converged,
                "starts": rotated.starts,
                "starts_at_best": rotated.starts_at_best,
                "pattern": rotated.pattern.tolist(),
                "structure": rotated.structure.tolist() if rotated.oblique else None,
                "factor_correlations": rotated.factor_correlations.tolist(),
                "communalities": ex.communalities.tolist(),
                "uniquenesses": ex.solution.uniquenesses.tolist(),
                "at_bound": list(ex.solution.at_bound),
                "pattern_standard_errors": ex.errors.pattern.tolist() if ex.errors is not None else None,
                "standard_errors_unavailable": (ex.errors.unavailable.value if ex.errors is not None
                                                and ex.errors.unavailable is not None else None),
                "fit": _fit_dict(FitStep(ex.factors, ex.solution)),
            },
            "draft": {"text": self.draft_text, "factor_names": list(ex.draft.factor_names),
                      "usable": ex.draft.usable, "threshold": ex.draft.threshold,
                      "written": [name for name, w in zip(ex.draft.factor_names, ex.draft.written) if w],
                      "placements": [{"item": p.item, "placement": p.placement.value,
                                      "factor": ex.draft.factor_names[p.factor], "loading": p.loading}
                                     for p in ex.draft.placements]},
            "split": self.split.to_dict() if self.split is not None else None,
            "notes": [str(x) for x in self.notes],
        }
        return clean(out)


    def __str__(self) -> str:
        return self.summary()


def _fit_dict(step: FitStep) -> dict:
    f = step.solution.fit
    return {"factors": step.factors, "statistic": f.statistic.value if f.statistic is not None else None,
            "chi_square": f.chi_square, "df": f.df, "p_value": f.p_value, "rmsea": f.rmsea,
            "rmsea_ci90": list(f.rmsea_ci90), "bic": f.bic, "srmr": f.srmr, "improper": step.improper}


def item_names(text: str | list[str] | tuple[str, ...] | None, columns: list[str], source: str) -> tuple[str, ...] | None:
    """Items from a list of names, or from text: names separated by commas, where 'item1..item9' is a range the
    model language counts (:func:`cfa_tool.language.names.range_names`: the ends are one name but for one number,
    whatever the order of the columns in the file), as ``--ordinal`` and a model file count it, so that a range
    names the same items in every place it is written; a name that holds a comma is written in double quotes, as the
    model language writes it (:func:`cfa_tool.language.names.read_name_list`); a column whose name is the whole
    piece ('a..b') is that column."""
    from cfa_tool.language.names import range_names, read_name_list

    if text is None:
        return None
    if isinstance(text, (list, tuple)):
        if not all(isinstance(p, str) for p in text):
            raise OptionError(f"{Option.ITEMS} must be column names (text)")
        pieces = [(p, (p,) if p in columns else tuple(p.split(".."))) for p in text]
    elif isinstance(text, str):
        pieces = read_name_list(text, str(Option.ITEMS))
        if not all(all(ends) for _, ends in pieces):
            raise OptionError(f"{Option.ITEMS}: give column names separated by commas (item1..item9 for a numbered "
                              f'range; a name that holds a comma in double quotes, "like, this"), not '
                              f"'{printable(text)}'")
    else:
        raise OptionError(f"{Option.ITEMS} must be column names, not {type(text).__name__}")
    out: list[str] = []
    for raw, ends in pieces:
        piece = raw if raw is not None else "..".join(ends)
        if raw is not None and raw in columns:
            ends = (raw,)
        ends = tuple(_as_column(end, columns) for end in ends)
        for end in ends:
            if end not in columns:
                from cfa_tool.language.names import comma_hint
                from cfa_tool.suggest import close_names, did_you_mean, dotted_span

                span = dotted_span(end)
                if span is not None and all(e in columns for e in span.split("..")):
                    raise OptionError(f"{Option.ITEMS}: {source} has no column '{printable(end)}'; a range of "
                                      f"numbered columns is written with two dots: '{printable(span)}'")
                hint = comma_hint(end, columns)
                guess = close_names(end, columns)
                raise OptionError(f"{Option.ITEMS}: {source} has no column '{printable(end)}'"
                                  + (hint or (did_you_mean(end, guess[0]) if guess else "")))
        if len(ends) == 2:
            option = Option.ITEMS.given(piece)
            span = range_names(ends[0], ends[1], lambda message: OptionError(
                f"{option}: {message}" + ("; name columns that do not number alike one by one, separated by commas"
                                          if "same name" in message or "with a number" in message else "")))
            missing = [x for x in span if x not in columns]
            if missing:
                raise OptionError(f"{option}: the range counts '{printable(missing[0])}', which is not a column of "
                                  f"{source}; a range counts numbered names ('q1..q9' is q1, q2, ..., q9), not the "
                                  f"columns between its ends in the file: name the items one by one, separated by "
                                  f"commas")
        elif len(ends) == 1:
            span = ends
        else:
            raise OptionError(f"{Option.ITEMS}: '{printable(piece)}' is not a column name or a range item1..item9")
        for name in span:
            if name in out:
                raise OptionError(f"{Option.ITEMS}: '{printable(name)}' is named twice")
            out.append(name)
    return tuple(out)


def _as_column(name: str, columns: list[str]) -> str:
    """A name given for a column, matched as the file's header is read: spaces around it do not count."""
    return name.strip() if name not in columns and name.strip() in columns else name


def _numeric_columns(frame: pd.DataFrame) -> tuple[str, ...]:
    return tuple(str(c) for c in frame.columns if pd.api.types.is_numeric_dtype(frame[c]) and not
                 pd.api.types.is_bool_dtype(frame[c]))


#: a column whose values are not answers on the items' scale (unlike_the_items: a grouping or a record, a count of
#: years, an amount) stays an item when it correlates this much (in absolute value) with one of the items: it varies
#: with the answers, as an answer on a wider scale does (a 0-10 'recommend' question among items of 1 to 5), while a
#: grade, a year, a school's number or the years someone has worked somewhere has no such relation.  A rule of thumb
#: of this project: .30 is the loading commonly taken as salient, the draft's threshold
#: (exploration.draft.DEFAULT_THRESHOLD), not a published cutoff for this purpose
RELATED_TO_THE_ITEMS = 0.30


@dataclass(frozen=True)
class UnlikeTheItems:
    """The columns that unlike_the_items finds are not answers on the scale most columns share: ``groupings``
    [(column, lowest, highest)], a few whole values above the scale (a grade, a year, a school's number);
    ``off_scale`` [(column, lowest, highest, fractions)], values no answer on the scale takes (mostly fractions, with
    ``fractions`` True, or far more whole values over a far wider range: years of service, an income); ``scale``,
    the lowest and highest value most columns hold, or None when no scale is shared (nothing is then left out)."""

    groupings: tuple[tuple[str, float, float], ...] = ()
    off_scale: tuple[tuple[str, float, float, bool], ...] = ()
    scale: tuple[float, float] | None = None
    #: [(column, one value, the other)]: two values alone where the items answer on a scale of three values or more
    #: (a wave 1 and 2, a sex coded 0 and 1; session note s23: a 1/2 wave column was explored as an item)
    two_valued: tuple[tuple[str, float, float], ...] = ()

    @property
    def columns(self) -> tuple[str, ...]:
        return (tuple(f[0] for f in self.groupings) + tuple(f[0] for f in self.two_valued)
                + tuple(f[0] for f in self.off_scale))


def unlike_the_items(frame: pd.DataFrame, columns, others=(), codes: tuple[float, ...] = ()) -> UnlikeTheItems:
    """The columns among ``columns`` (of numbers) whose values are not answers on the answer scale that most of
    ``columns`` and ``others`` share (the lowest and highest whole value more than half of them hold, such as 1 to 4;
    ``others`` given as the numbers they code, answers recorded as words read by their 'answers' statement), and that have
    no relation to the items (no correlation of RELATED_TO_THE_ITEMS or more, in absolute value, with any of the
    other columns or of ``others``, further item columns such as answers recorded as words, each correlation from
    the rows that answered both).  Three kinds: codes of two groups, two whole values alone where the scale has three
    or more (a wave 1 and 2, a sex 0 and 1, session note s23); groupings or records, few whole values (at most
    data.polychoric.MAX_CATEGORIES), none as low as the scale begins and most of them above its end (a grade of 5 to
    9 among items answered 1 to 4, a year, a school's number); and values off the scale, most of the answered cells
    fractions (years of service as 0.5 to 30.0), or more whole values than MAX_CATEGORIES over a range more than twice
    the scale's (an income, a year of birth).  A column that reaches the scale's low end with few whole values stays
    an item (answered 0 to 10 or 1 to 7 among items of 1 to 5), as does one mostly on the scale (2 to 6), an item
    with a few missing-value codes such as 99 among its answers (few whole values), one with a fraction in some cells,
    and one whose answers go with the items' (a 0-10 'recommend' question answered 3 to 10).  ``codes``: the missing-value
    codes given (--missing-codes), which the scale and the correlations leave out (the answers 1 to 4 with codes 8
    and 9 are on a scale of 1 to 4, so that a grade of 7 to 9 is not taken for an item whose 8 and 9 are no answer)."""
    from collections import Counter

    from cfa_tool.data.polychoric import MAX_CATEGORIES

    every = list(dict.fromkeys([*columns, *others]))  # the scale is the one most of the items share, all of them
    values = {c: pd.to_numeric(frame[c], errors="coerce").dropna().to_numpy(dtype=float) for c in every}
    distinct = {c: np.unique(v) for c, v in values.items()}
    whole = {c: v for c, v in distinct.items() if len(v) and np.all(v == np.round(v))}
    stray = _stray_values(frame, list(whole), codes)
    answers = {c: np.setdiff1d(v, tuple(codes) + stray.get(c, ())) for c, v in whole.items()}
    shared = Counter((float(v[0]), float(v[-1])) for v in answers.values() if len(v)).most_common(1)
    if not shared or shared[0][1] * 2 <= len(every):
        return UnlikeTheItems()
    values = {c: values[c] for c in columns}
    distinct = {c: distinct[c] for c in columns}
    whole = {c: whole[c] for c in columns if c in whole}
    (low, high), _ = shared[0]
    groupings = [(c, float(v[0]), float(v[-1])) for c, v in whole.items() if len(v) <= MAX_CATEGORIES
                 and v[0] > low and 2 * int((v > high).sum()) > len(v)]
    # two values at the scale's low end or below it, as groups are coded (0 and 1, 1 and 2): an item answered only 4
    # or 5 of a scale of 1 to 5 is a ceiling, not a code (hostile s24b)
    two_valued = [(c, float(v[0]), float(v[-1])) for c, v in whole.items() if len(v) == 2 and high - low >= 2
                  and v[-1] <= low + 1 and c not in {f[0] for f in groupings}]
    off_scale = []
    for c, v in distinct.items():
        if len(v) < 2 or c in {f[0] for f in groupings + two_valued}:
            continue
        fractions = 2 * int((values[c] != np.round(values[c])).sum()) > len(values[c])
        wide = len(v) > MAX_CATEGORIES and v[-1] - v[0] > 2 * (high - low)
        if fractions or wide:
            off_scale.append((c, float(v[0]), float(v[-1]), bool(fractions)))
    found = [f[0] for f in groupings] + [f[0] for f in two_valued] + [f[0] for f in off_scale]
    if found:
        items = [c for c in columns if c not in found] + [c for c in others if c not in found]
        # the items' codes of no answer are no answers: those given, and the values set aside from their scales
        answered = frame if not codes and not stray else frame[items].apply(pd.to_numeric, errors="coerce").apply(
            lambda cells: cells.mask(cells.isin(tuple(codes) + stray.get(cells.name, ())))).join(frame[found])
        related = dict(zip(found, _largest_correlations(answered, found, items)))
        groupings = [f for f in groupings if not related[f[0]] >= RELATED_TO_THE_ITEMS]
        off_scale = [f for f in off_scale if not related[f[0]] >= RELATED_TO_THE_ITEMS]
        # a two-valued column that goes with another one (a yes/no subscale: its items correlate with each other) is
        # an item too (hostile s24b: four 0/1 items correlating .46 were left out as group codes)
        pairs = [f[0] for f in two_valued]
        among = dict(zip(pairs, (_largest_correlations(answered, [c], [d for d in pairs if d != c])[0] for c in pairs)))
        two_valued = [f for f in two_valued if not related[f[0]] >= RELATED_TO_THE_ITEMS
                      and not among[f[0]] >= RELATED_TO_THE_ITEMS]
    return UnlikeTheItems(tuple(groupings), tuple(off_scale), (low, high), tuple(two_valued))


def _stray_values(frame: pd.DataFrame, columns: list[str], codes: tuple[float, ...]) -> dict[str, tuple[float, ...]]:
    """The values of each of ``columns`` that the screening of odd values (data.odd_values) takes for no answers,
    missing-value codes and values outside the answer scale of the other items (an 8 'don't know' among answers 1 to
    4), the ``codes`` given read as no answer first: they are no answers of the scale, so that the scale most columns
    share is 1 to 4 and a grade of 7 to 9 is not taken for an item (re-check s18: with --missing-codes 9 alone the
    items' 8 made the scale 1 to 8, and the grade column entered the items with 411 cells emptied by the 9)."""
    from cfa_tool.data.odd_values import OddKind, beyond_the_run, odd_values

    if not columns:
        return {}
    numbers = frame[columns].apply(pd.to_numeric, errors="coerce")
    if codes:
        numbers = numbers.mask(numbers.isin(codes))
    out: dict[str, tuple[float, ...]] = {}
    for odd in odd_values(numbers.reset_index(drop=True), columns):
        if odd.kind in (OddKind.MISSING_CODE, OddKind.OUTSIDE_SCALE, OddKind.SET_APART):
            for column, value in zip(odd.columns, odd.values):
                out[column] = out.get(column, ()) + (value,)
    for column in columns:  # codes too many for the screening's 2% (8 and 9 in 5% of the cells): s20
        beyond = beyond_the_run(numbers[column].to_numpy(dtype=float, na_value=np.nan))
        if beyond:
            out[column] = tuple(dict.fromkeys(out.get(column, ()) + beyond))
    return out


def _count_values(column: pd.Series) -> int:
    """How many different numbers a column holds (its cells read as numbers, gaps aside)."""
    return int(pd.to_numeric(column, errors="coerce").dropna().nunique())


def _largest_correlations(frame: pd.DataFrame, columns: list[str], items: list[str]) -> np.ndarray:
    """For each of ``columns``, its largest absolute Pearson correlation with one of ``items``, each from the rows
    that answered both (NaN when there is none: a constant column, or fewer than three rows in common)."""
    x = frame[columns].apply(pd.to_numeric, errors="coerce").to_numpy(dtype=float)
    y = frame[items].apply(pd.to_numeric, errors="coerce").to_numpy(dtype=float)
    out = np.full(len(columns), np.nan)
    if not items:
        return out
    for j in range(len(columns)):
        both = np.isfinite(x[:, [j]]) & np.isfinite(y)  # rows x items: the pairs' rows
        n = both.sum(axis=0)
        xs, ys = np.where(both, x[:, [j]], 0.0), np.where(both, y, 0.0)
        with np.errstate(invalid="ignore", divide="ignore"):
            mx, my = xs.sum(axis=0) / n, ys.sum(axis=0) / n
            dx, dy = np.where(both, xs - mx, 0.0), np.where(both, ys - my, 0.0)
            r = (dx * dy).sum(axis=0) / np.sqrt((dx * dx).sum(axis=0) * (dy * dy).sum(axis=0))
        r = np.where(n >= 3, r, np.nan)
        if np.isfinite(r).any():
            out[j] = np.nanmax(np.abs(r))
    return out


def _text_columns_phrase(frame: pd.DataFrame, taken: tuple[str, ...], codings: tuple = ()) -> Text:
    """The columns left out because they hold text (answers written as words among them: 'yes'/'no'), named, with
    the way to explore them (new-user trial: six yes/no items left out without a word): an answers file
    (--answers); with one given, the first cell of each that is not among its words; columns of dates or times
    (an Excel date column, say) are named as dates, not as text."""
    left = [c for c in frame.columns if str(c) not in taken and frame[c].notna().any()]
    dates = [str(c) for c in left if frame[c].dtype.kind in "mM" or isinstance(frame[c].dtype, pd.DatetimeTZDtype)]
    text = [str(c) for c in left if str(c) not in dates]

    def listed(names: list[str]) -> str:
        return cut_list(names, 10, printable)

    said = f" Left out as dates or times: {listed(dates)}." if dates else ""
    if text and codings:
        general = next((c for c in codings if not c.items), None)
        unlisted = [printable(c) + (f" ('{printable(cell)}' in {row_of(frame, row)})" if cell is not None else "")
                    for c in text[:names_shown(len(text), 10)] for cell, row in [_first_unlisted(frame[c], general)]]
        said += (Note((" Left out as text holding none of the answers file's words", Command(f" ({Option.ANSWERS})"),
                       ": "))
                 + ", ".join(unlisted) + more_words(len(text) - len(unlisted)) + ".")
    elif text:
        said += f" Left out as text (not numbers): {listed(text)}; " + _answers_file_hint(frame, text) + "."
    return said


def _answers_file_hint(frame: pd.DataFrame, text: list) -> Note:
    """How answers recorded as words are explored (an answers file), with the statement the words of the text
    columns ``text`` suggest when they come from a common scale (data.answer_scales.suggested_statement)."""
    from cfa_tool.data.answer_scales import suggested_statement

    statement = next((s for s in (suggested_statement(frame[c].to_numpy(dtype=object)) for c in text) if s), None)
    return Note(("answers recorded as words (yes/no, agree) are explored with an answers file",
                 Command(f" ({Option.ANSWERS.given('FILE')}) whose 'answers' statement gives each word its code"
                         + (f", such as the line: {statement}" if statement else ""),
                         " that gives each word its code")))  # a manuscript: no option, no model-file statement


def _first_unlisted(column: pd.Series, coding) -> tuple[object, int | None]:
    """The first cell of a text column that holds a word the 'answers' statement ``coding`` does not list (None,
    None when there is none, or no statement for every item)."""
    from cfa_tool.data.moments import row_numbers
    from cfa_tool.language.spec import answer_key
    from cfa_tool.numbers import number as strict_number

    if coding is None:
        return None, None
    words = coding.codes_by_word()
    for row, cell in zip(row_numbers(column), column.to_numpy(dtype=object)):
        if isinstance(cell, str) and cell.strip() and strict_number(cell.strip()) is None \
                and answer_key(cell) not in words:
            return cell, int(row)
    return None, None


def _answer_codings(answers) -> tuple:
    """The 'answers' statements of an answers file (language.parser.read_answers_file), or () without one."""
    if answers is None:
        return ()
    if not isinstance(answers, (str, Path)):
        raise OptionError(f"answers must be the path of an answers file (a file of 'answers' statements), not "
                          f"{type(answers).__name__}")
    from cfa_tool.language.parser import read_answers_file

    return read_answers_file(answers)


def _word_columns(frame: pd.DataFrame, numeric: tuple[str, ...], codings: tuple) -> tuple[str, ...]:
    """The columns of text an answers file covers: those its statements name with 'for', and those holding a word
    the statement for every item lists (a cell it does not list is then an error naming the cell, never a column
    silently left out for a typing error)."""
    from cfa_tool.language.spec import answer_key

    named = {x for c in codings for x in c.item_names}
    general = next((c for c in codings if not c.items), None)
    absent = next((n for c in codings for n in c.items if n.text not in set(map(str, frame.columns))), None)
    if absent is not None:
        from cfa_tool.errors import ModelError

        raise ModelError(f"the data have no column '{printable(absent.text)}'", absent.location)
    out = []
    for column in frame.columns:
        name = str(column)
        if name in numeric and name not in named:
            continue
        if name in named:
            out.append(name)
            continue
        if frame[column].dtype.kind in "mM" or general is None:
            continue
        listed = general.codes_by_word()
        if any(isinstance(v, str) and answer_key(v) in listed for v in frame[column].dropna().to_numpy(dtype=object)):
            out.append(name)  # a column holding its words: any other cell is named by the statement's own reading
    return tuple(out)


def _words_as_codes(frame: pd.DataFrame, worded: tuple[str, ...], codings: tuple) -> dict[str, pd.Series]:
    """Each of the columns ``worded`` with its cells as the codes of the 'answers' statement that covers it (the
    one naming it with 'for', else the one for every item), read as data.answer_words reads them; a cell the statement
    does not list is left empty here (the reading of the items names it later)."""
    from cfa_tool.data.answer_words import _code_of

    general = next((c for c in codings if not c.items), None)
    coded = {}
    for name in worded:
        coding = next((c for c in codings if name in c.item_names), general)
        if coding is None:
            continue
        words, numbers = coding.codes_by_word(), coding.codes_by_number()
        column = frame[name]
        codes = {v: _code_of(v, words, numbers)[0] for v in pd.unique(column.dropna().to_numpy(dtype=object))}
        coded[name] = column.map(codes).astype(float)
    return coded


class LeftOut(enum.Enum):
    """Why a column of numbers is not among the items explored by default (each said in the items' note and listed in
    the JSON result, ``items_left_out``)."""

    ROW_IDS = "row numbers or ids"
    CATEGORY_CODES = "codes of categories"
    NAMED_FOR_ANOTHER_PART = "named for another part"
    GROUPING_OR_RECORD = "grouping or record"
    MEASURE_OFF_THE_SCALE = "measure off the answer scale"
    CONSTANT = "constant"
    HALVES_DESIGN = "cluster or strata of the halves"


def _kept_by_filters(scan, keep):
    """The first reading ``scan`` (data.readers.LoadedData of every row) with only the rows the row filters of
    ``keep`` keep (text filters; a half of a halves file, drawn by another run, is left to the reading that follows),
    by which the items are chosen and judged: the rows analysed, so that a filter's column, constant in them, is not
    named as codes of two groups as it would be over every row read, and a word in a row left out (a column of text
    in the rows read, of numbers in those kept) neither leaves out nor refuses the item."""
    from cfa_tool.data.filters import parse_filter
    from cfa_tool.pipeline.inputs import keep_option, rows_kept

    filters = [parse_filter(k) for k in keep_option(keep) if isinstance(k, str)]
    if not filters:
        return scan
    kept = rows_kept(scan, filters)[0]
    numbers = {}  # columns of text only for a word in rows left out: numbers in the rows analysed
    for column in kept.frame.columns:
        if kept.frame[column].dtype == object or pd.api.types.is_string_dtype(kept.frame[column]):
            try:
                numbers[column] = pd.to_numeric(kept.frame[column])
            except (ValueError, TypeError):
                continue
    return replace(kept, frame=kept.frame.assign(**numbers)) if numbers else kept


def _named_role(name: str) -> str | None:
    """The part a column plays by its name (data.column_roles.column_role), or the units of many respondents it
    names ('teams' for 'Team', data.column_roles.unit_word); None for a column that may hold answers."""
    from cfa_tool.data.column_roles import unit_plural, unit_word

    role = column_role(name)
    if role is not None:
        return role
    unit = unit_word(name)
    return None if unit is None else unit_plural(unit)


def _default_items(first, columns: list[str], codings: tuple, design: tuple[str, ...] = (),
                   codes: tuple[float, ...] = (), id_column: str | None = None
                   ) -> tuple[tuple[str, ...], str, tuple[str, ...], tuple[tuple[str, LeftOut], ...]]:
    """The items explored by default (every column holding numbers, or the words of the answers file, except row
    numbers, ids, codes of categories, columns named for another part and columns whose values are not answers on
    the items' scale, unlike_the_items), the note that says which and why, the columns of the answers file's words,
    and the columns of numbers left out with why (:class:`LeftOut`); ``design``: the cluster and strata columns the
    halves of a split are drawn by, never items; ``codes``: the missing-value codes given, which the answer scale leaves
    out (:func:`unlike_the_items`); ``id_column``: the id column given, never an item."""
    from cfa_tool.data.labels import labelled_codes, own_labels

    frame, source = first.frame.set_axis(columns, axis=1), first.source
    numeric = _numeric_columns(frame)
    drawn_by = tuple(c for c in design if c in frame.columns)  # named as such, whatever they hold
    numeric = tuple(c for c in numeric if c not in design)
    named_id = [c for c in numeric if c == id_column]  # the id column given, whatever it holds
    ids = named_id + [c for c in numeric if c != id_column and _looks_like_row_ids(frame[c])]
    # named for their part, or for a unit of many respondents ('Team', 'site': data.column_roles.unit_word, the rule by
    # which fit cautions on such a column), whatever they hold (new-user trial s27: a numeric 'Team' was explored)
    roles = [c for c in numeric if c not in ids and _named_role(c) is not None]
    coded = [c for c in labelled_codes(frame, first.value_labels) if c in numeric and c not in ids + roles
             and own_labels(c, first.value_labels)]
    worded = _word_columns(frame, numeric, codings)
    # the answers recorded as words count as the answers they code: the scale most items share and their
    # correlations are the same whether a file holds the words or the numbers (new-user trial s21: with words,
    # years of service was explored as an item, with numbers left out)
    unlike = unlike_the_items(frame.assign(**_words_as_codes(frame, worded, codings)),
                              [c for c in numeric if c not in ids + roles + coded], worded, codes)
    records = list(unlike.columns)
    _refuse_numbers_with_slips(frame, (*numeric, *worded, *drawn_by, *([id_column] if id_column else [])), source,
                               tuple(codes) + run_words())
    chosen = tuple(c for c in columns if c in worded or (c in numeric and c not in ids + roles + coded + records))
    if codings and not worded:
        raise OptionError(f"no column of {source} holds only the words of the answers file's statements "
                          f"({Option.ANSWERS}); name the items with {Option.ITEMS} to see which cells differ")
    said = f"every column of {source} that holds numbers" + (" or the words of the answers file" if worded else "")
    name_them = Command(f" (name them in {Option.ITEMS} to explore them)")  # a manuscript's reader runs nothing
    note = (Note((f"Items: {said} ({len(chosen)})", Command(f", which {Option.ITEMS} can change"), "."))
            + (f" Left out as the id column: {printable(id_column)}." if named_id else "")
            + (f" Left out as row numbers or ids (every value a different whole number): "
               f"{', '.join(printable(c) for c in ids if c not in named_id)}." if ids[len(named_id):] else "")
            + (" Left out as codes of categories (every value has a value label of its own, as a "
               "department's do; the items share their answer scale's labels): "
               + Note((f"{', '.join(printable(c) for c in coded)}", name_them, "."))
               if coded else "")
            + (" Left out by their names, as columns of the sampling design, ids, groups, "
               + ("units of many respondents such as teams or sites, " if any(column_role(c) is None for c in roles)
                  else "")
               + "the respondents' particulars or the survey's records rather than answers: "
               + ", ".join(f"{printable(c)} ({_named_role(c)})" for c in roles)
               + Note((name_them, ".")) if roles else "")
            + (f" Left out as groupings or records rather than answers (a few whole values, most of them above the "
               f"{user_number(unlike.scale[0])} to {user_number(unlike.scale[1])} that most columns hold, and no correlation of "
               f"{journal_decimal(RELATED_TO_THE_ITEMS, digits=2)} or more with any item, as a grade or a year would be): "
               + ", ".join(f"{printable(c)} ({user_number(low)} to {user_number(high)})" for c, low, high in unlike.groupings)
               + Note((name_them, ".")) if unlike.groupings else "")
            + (f" Left out as codes of two groups rather than answers (two values alone, where most columns hold "
               f"answers from {user_number(unlike.scale[0])} to {user_number(unlike.scale[1])}, and no correlation of "
               f"{journal_decimal(RELATED_TO_THE_ITEMS, digits=2)} or more with any item, as a wave or a sex would "
               f"be): " + ", ".join(f"{printable(c)} ({user_number(a)} and {user_number(b)})"
                                    for c, a, b in unlike.two_valued)
               + Note((name_them, ".")) if unlike.two_valued else "")
            + (f" Left out as measures rather than answers on the {user_number(unlike.scale[0])} to {user_number(unlike.scale[1])} scale "
               f"that most columns hold (mostly fractions, or far more values over a far wider range, and no "
               f"correlation of {journal_decimal(RELATED_TO_THE_ITEMS, digits=2)} or more with any item, as years of service or an income "
               f"would be): "
               + ", ".join(f"{printable(c)} ({user_number(low)} to {user_number(high)}, "
                           + ("mostly fractions)" if fractions else f"{_count_values(frame[c])} different values)")
                           for c, low, high, fractions in unlike.off_scale)
               + Note((name_them, ".")) if unlike.off_scale else "")
            + (f" Left out as the columns the halves are drawn by: {', '.join(printable(c) for c in drawn_by)}."
               if drawn_by else "")
            + _text_columns_phrase(frame, tuple(numeric) + tuple(worded) + drawn_by, codings))
    left_out = (tuple((c, LeftOut.HALVES_DESIGN) for c in drawn_by) + tuple((c, LeftOut.ROW_IDS) for c in ids) + tuple((c, LeftOut.CATEGORY_CODES) for c in coded)
                + tuple((c, LeftOut.NAMED_FOR_ANOTHER_PART) for c in roles)
                + tuple((c, LeftOut.GROUPING_OR_RECORD) for c, _, _ in unlike.groupings + unlike.two_valued)
                + tuple((c, LeftOut.MEASURE_OFF_THE_SCALE) for c, _, _, _ in unlike.off_scale))
    return chosen, note, worded, left_out


def _refuse_too_few(chosen: tuple[str, ...], scan, codings: tuple) -> None:
    """The error when fewer than 3 columns can be explored by default, with the way to read answers recorded as
    words (an answers file, with the statement its words suggest) when no answers file was given."""
    if len(chosen) >= 3:
        return
    found = (f"only {len(chosen)} of its columns hold{'s' if len(chosen) == 1 else ''} answers as numbers "
             f"({', '.join(printable(c) for c in chosen)})" if chosen else "none of its columns holds numbers")
    hint = scan.sheet_hint() or f"; name the items with {Option.ITEMS}"
    if not codings and not scan.sheet_hint():
        frame = scan.frame
        numeric = _numeric_columns(frame)
        text = [c for c in frame.columns if str(c) not in numeric and frame[c].dtype.kind not in "mM"
                and frame[c].notna().any()]
        if text:
            hint += "; " + _answers_file_hint(frame, text)
    raise DataError(f"{scan.source}: {found}, and an exploratory factor analysis needs at least 3 items{hint}")


def _refuse_too_few_named(chosen: tuple[str, ...]) -> None:
    """The error when the items named are too few for a factor: a factor of one or two items alone is not
    identified (Bollen 1989, ch. 7: the three-indicator rule), so an exploratory factor analysis needs at least three
    items for each factor."""
    if len(chosen) >= 3:
        return
    named = word_list(f"'{printable(c)}'" for c in chosen)
    raise OptionError(f"{Option.ITEMS} names {'one item' if len(chosen) == 1 else 'two items'} ({named}), too few "
                      f"for a factor: an exploratory factor analysis needs at least three items for each factor; name "
                      f"more items")


def _refuse_numbers_with_slips(frame: pd.DataFrame, taken: tuple[str, ...], source: str, given: tuple = ()) -> None:
    """A column of numbers with a few text slips ('?' in 2 of 480 cells: data.answer_scales.stray_text) is an item
    whose cells need correcting, not a text column to leave out: explore's default items stop on it as fit does
    (hostile trial s23: the item was dropped from the exploration and the draft, said only as 'text (not numbers)');
    columns named for another part (an id, an age) are left to the note; ``given``: the codes and words of no answer
    the run gave, which the advice keeps."""
    from cfa_tool.data.answer_scales import stray_text
    from cfa_tool.data.kept_rows import cell_words
    from cfa_tool.data.moments import row_numbers
    from cfa_tool.numbers import number as strict_number

    for name in frame.columns:
        column = frame[name]
        if (name in taken or _named_role(str(name)) is not None or pd.api.types.is_numeric_dtype(column)
                or column.dtype.kind in "mM"):
            continue
        values = column.to_numpy(dtype=object)
        if not stray_text(values, few=False):  # however many cells, as fit reads them (data.moments.stray_words)
            continue
        row, cell = next((r, v) for r, v in zip(row_numbers(column), values) if isinstance(v, str) and v.strip()
                         and strict_number(v.strip()) is None)
        raise DataError(stray_word_message(source, str(name), clipped(cell.strip(), 40),
                                           cell_words(column, str(name), row), cell.strip(), given, values)
                        + f"; or leave the column out by naming the items with {Option.ITEMS}")


def _refuse_text_items(frame: pd.DataFrame, chosen: tuple[str, ...], source: str, codings: tuple,
                       given: tuple = ()) -> None:
    """An item named in --items that holds words no answers file codes: an error naming the column, the cell and
    what explore takes (an answers file, with the statement the words suggest); cells holding digits or other
    values are left to the reading of the items (data.moments), which names them; ``given``: the codes and words of
    no answer the run gave, which advice to give a word keeps."""
    from cfa_tool.data.answer_scales import stray_text, suggested_statement
    from cfa_tool.data.kept_rows import cell_words
    from cfa_tool.data.moments import row_numbers
    from cfa_tool.numbers import number as strict_number

    named = {x for c in codings for x in c.item_names}
    if any(not c.items for c in codings):
        return  # a statement for every item: its own reading names any cell it does not list
    for name in chosen:
        column = frame[name]
        if name in named or pd.api.types.is_numeric_dtype(column) or column.dtype.kind in "mM":
            continue
        values = column.to_numpy(dtype=object)
        for row, cell in zip(row_numbers(column), values):
            if not (isinstance(cell, str) and cell.strip() and strict_number(cell.strip()) is None
                    and not any(ch.isdigit() for ch in cell) and cell.strip().lower() not in ("true", "false")):
                continue
            shown = clipped(cell.strip(), 40)
            if stray_text(values, few=False):  # text among numbers, as fit reads it (data.moments.stray_words)
                raise DataError(stray_word_message(source, name, shown, cell_words(column, name, row), cell.strip(),
                                                   given, values))
            statement = suggested_statement(values)
            where = (f"{source}: column '{printable(name)}' holds words ('{shown}' in {row_of(column, row)}), "
                     f"and explore analyses numbers")
            if codings:
                raise DataError(f"{where}: add the column to an 'answers' statement of the answers file "
                                f"({Option.ANSWERS}) with 'for', or take it out of {Option.ITEMS}")
            raise DataError(f"{where}: give explore an answers file ({Option.ANSWERS.given('FILE')}) whose 'answers' "
                            f"statement says "
                            f"what each word means" + (f", such as the line: {statement}" if statement else "")
                            + "; or recode the answers as numbers")


def _explored_spec(chosen: tuple[str, ...], codings: tuple, answers, worded: tuple[str, ...] | None):
    """The items explored as the model fit reads data for (pipeline.inputs.read_inputs_with_notes): one factor
    of them, with the answers file's statements; with ``worded`` (items chosen by default: the columns of text the
    file covers) a statement for every item covers those columns only (the others hold numbers)."""
    from dataclasses import replace

    from cfa_tool.errors import Location, ModelError
    from cfa_tool.exploration.draft import factor_names
    from cfa_tool.language.checks import check_spec
    from cfa_tool.language.spec import Factor, Name, Spec

    where = Location(str(answers) if answers is not None else "<explore>", 1, 1)
    for coding in codings:
        for name in coding.items:
            if name.text not in chosen:
                raise ModelError(f"'{printable(name.text)}' is not one of the items explored"
                                 + (f"; name it in {Option.ITEMS}, or take it out of the statement" if worded is None else
                                    " (the data have no such column)"), name.location)
    factor = Factor(Name(factor_names(1, chosen)[0], where), tuple(Name(c, where) for c in chosen))
    spec = Spec(source=where.source, text="", title=None, factors=(factor,), answers=codings)
    check_spec(spec)  # the statements' own checks: each word once, each item once, one statement for every item
    if worded is not None and codings:
        named = {x for c in codings for x in c.item_names}
        codings = tuple(replace(c, items=tuple(Name(x, c.location) for x in worded if x not in named))
                        if not c.items else c for c in codings)
        spec = replace(spec, answers=tuple(c for c in codings if c.items))
    text = "\n".join(answer_lines(spec, chosen, every=False) + [f"factor {factor.name.text}: "
                                                                  + ", ".join(model_name(c) for c in chosen)])
    return replace(spec, text=text + "\n")


def answer_lines(spec, items: tuple[str, ...], every: bool = True) -> list[str]:
    """The model's 'answers' statements for ``items`` (those of a draft model, say), in the model language: each
    statement with the items it covers among them ('for' left out when it covers all of them and ``every``)."""
    coverage = spec.answer_codings()
    out = []
    for coding in spec.answers:
        covered = tuple(x for x in items if coverage.get(x) is coding)
        if covered:
            out.append(answers_statement(coding, None if every and len(covered) == len(items) else covered))
    return out


def _looks_like_row_ids(column: pd.Series) -> bool:
    """A column whose values are all different whole numbers: an id or a row number, not answers to an item."""
    values = column.dropna().to_numpy()
    if len(values) < 10 or not np.all(np.mod(values, 1) == 0):
        return False
    return len(np.unique(values)) == len(values)


def _factor_choice(factors) -> int | None:
    if factors is None or (isinstance(factors, str) and factors.strip() == "auto"):
        return None
    if isinstance(factors, str):
        try:
            factors = int(factors.strip())
        except ValueError:
            raise OptionError(f"the number of factors must be a whole number or 'auto', not '{printable(factors)}'") from None
    return factors


def explore(data: pd.DataFrame | str | Path, *, items: str | list[str] | tuple[str, ...] | None = None,
            factors: int | str | None = None, rotation: str | RotationMethod | None = None,
            extraction: str | ExtractionMethod = ExtractionMethod.MAXIMUM_LIKELIHOOD,
            ordinal: str | list[str] | None = None, split: int | None = None, sheet: str | None = None,
            names_row: int | None = None, first_data_row: int | None = None, missing_codes: tuple[float, ...] = (),
            keep: tuple[str, ...] | list[str] = (), rename: ColumnRenames = None, replications: int = 100,
            seed: int = 0, threshold: float = 0.30, target: np.ndarray | Sequence[Sequence[float]] | str | Path | None = None,
            answers: str | Path | None = None, cluster: str | None = None, strata: str | None = None,
            id_column: str | None = None, max_iterations: int | None = None) -> ExploreResult:
    """How many factors, an exploratory solution and a draft model file for ``items`` of ``data``.

    ``items``: column names, or text 'a, b, c' with 'q1..q9' for a numbered range, counted as a model file counts
    it (default: every column that
    holds numbers, except row numbers or ids and columns whose names say they are weights, clusters, strata, ids
    or groups, see :func:`column_role`, and columns whose values are not answers on the scale most columns share and
    that correlate with no item, see :func:`unlike_the_items`); ``factors``: a whole number, or None / 'auto' for the recommended number; ``rotation``:
    varimax, quartimin (default), oblimin, geomin, promax, target (with ``target``: a matrix with NaN where
    unspecified, or the path of a target file, exploration.target_file, whose columns give the number of
    factors) or none; None (the default) is quartimin, or target rotation with a ``target``; a rotation turns several
    factors, so one chosen with one factor asked for is an error, and one chosen when the rules recommend one factor
    is not applied, with a note first saying so; ``extraction``: maximum-likelihood (default) or least-squares; ``ordinal``: 'all' or
    items to analyse by polychoric correlations (ranges such as 'item1..item9' among them); ``split``: a seed: explore one random half of the rows and fit
    the draft model on the other; ``replications`` and ``seed``: of parallel analysis and the rotation's random
    starts; ``threshold``: the loading at which an item counts on a factor in the draft model; ``answers``: the
    path of an answers file, whose 'answers' statements (as a model file writes them) code answers recorded as
    words; the draft model carries them.  The data are read for the items as fit reads them for a model's;
    ``rename`` reads columns under new names ({'SL3r': 'SL3_r'}) before ``items`` and the rest name them.
    ``cluster`` and ``strata``, with ``split``: the halves are drawn as replicate draws them (data.halves.drawn_halves),
    whole clusters of the column ``cluster`` to each half, within each stratum of ``strata``; those columns are never
    items.  ``id_column``: a column that names each row (never an item), which the caution about copies of earlier
    rows shows beside the row numbers, as fit shows it (without it, a row-name column of the file does).
    ``max_iterations``, with ``split``: the iteration limit of the draft model's fit on the confirmation half, as for ``fit``.
    """
    from cfa_tool import options
    from cfa_tool.pipeline import inputs as api
    from cfa_tool.data.moments import row_numbers

    if api.summary_source(data):
        raise OptionError(f"'{data}' holds summary statistics; explore needs the rows of answers (a correlation "
                          f"matrix alone can be explored from Python: 'from cfa_tool.exploration import "
                          f"explore_correlations, from_correlations')")
    if split is None and (cluster is not None or strata is not None):
        given = Option.CLUSTER if cluster is not None else Option.STRATA
        # (a half given by --half was drawn by the run that wrote the halves file, by its clusters: re-check s18)
        raise OptionError(f"{given} draws the random halves of {Option.SPLIT} by cluster, and this run draws no "
                          f"halves: give {Option.SPLIT.given('SEED')} or leave {given} out")
    if split is None and max_iterations is not None:
        raise OptionError(f"{Option.MAX_ITERATIONS} limits the draft model's fit on the confirmation half of "
                          f"{Option.SPLIT}, and this run draws no halves: give {Option.SPLIT.given('SEED')} or leave "
                          f"{Option.MAX_ITERATIONS} out")
    codings = _answer_codings(answers)
    # a first reading names the columns and chooses the default items; the data are then read for those items as
    # fit reads them for a model's (pipeline.inputs.read_inputs_with_notes): --missing-codes and words or labels
    # that say no answer in the item columns only, the answers file's words coded, row filters, odd values
    scan = api.load_data(data, sheet, names_row=names_row, first_data_row=first_data_row, rename=rename)
    source = scan.source
    columns = [str(c) for c in scan.frame.columns]
    if len(set(columns)) != len(columns):
        raise OptionError(f"{source}: the column name '{next(c for c in columns if columns.count(c) > 1)}' appears twice")
    chosen = item_names(items, columns, source)
    by_default = chosen is None
    if not by_default:
        _refuse_too_few_named(chosen)
    item_note = None
    # the items are chosen and judged on the rows the row filters keep, the rows analysed (rows-s25: a filter's column
    # constant in them was named as codes of two groups, a word in a row left out refused an item named)
    try:
        kept = _kept_by_filters(scan, keep)
    except DataError:  # the first reading takes no-answer words in every column ('Not applicable' in a filter's
        # column read as no answer): the reading below, which reads them in the items only, applies the filters
        kept = scan
    if by_default:
        chosen, item_note, worded, left_out = _default_items(kept, columns, codings,
                                                             tuple(c for c in (cluster, strata) if c is not None),
                                                             api.missing_values_option(missing_codes)[0],
                                                             id_column if isinstance(id_column, str) else None)
        _refuse_too_few(chosen, scan, codings)
    spec = _explored_spec(chosen, codings, answers, worded if by_default else None)
    if not by_default:
        _refuse_text_items(kept.frame.set_axis(columns, axis=1), chosen, source, codings,
                           sum(api.missing_values_option(missing_codes), ()) + run_words())
    spec, loaded, notes = api.read_inputs_with_notes(spec, data, sheet, missing_codes, api.keep_option(keep),
                                                     (id_column,) if isinstance(id_column, str) else (),
                                                     names_row=names_row, first_data_row=first_data_row, rename=rename)
    frame = loaded.frame
    # the id column given (checked as fit checks it), or row names, and the column a row filter names them by
    ids, named_by = api.rows_named(loaded, id_column, chosen)
    rows_read = len(loaded.read_frame) if loaded.read_frame is not None else len(frame)
    empty = next((c for c in chosen if not frame[c].notna().any()), None)
    if empty is not None and not by_default:  # the reading of the items would say 'take it out of the model'
        raise DataError(f"{source}: column '{printable(empty)}' has no answers"
                        + (" in the rows the row filters kept" if loaded.read_frame is not None else " at all")
                        + f" (every cell is empty); take it out of {Option.ITEMS}, or check the data file")
    if by_default:
        constant = [c for c in chosen if frame[c].nunique(dropna=True) <= 1]
        chosen = tuple(c for c in chosen if c not in constant)
        left_out += tuple((c, LeftOut.CONSTANT) for c in constant)
        notes.append(item_note + (f" Left out as constant (one value in every row, which says nothing of the other "
                                  f"answers): {', '.join(printable(c) for c in constant)}." if constant else "")
                     + " Check that no other column (age, grade, a code) is among the items.")
        _refuse_too_few(chosen, scan, codings)
    requested = _factor_choice(factors)
    chosen_rotation = rotation is not None or target is not None  # the caller's choice, not the default
    if rotation is None:
        rotation = RotationMethod.TARGET if target is not None else RotationMethod.QUARTIMIN
    rotation_method = options.choice(RotationMethod, rotation, "the rotation")
    extraction_method = options.choice(ExtractionMethod, extraction, "the extraction")
    if rotation_method is RotationMethod.TARGET and target is None:
        raise OptionError(f"target rotation needs a target: a target file ({Option.TARGET.given('FILE')}; items by "
                          f"factors, 0 where a loading is aimed at zero, empty where free)"
                          + (", or a matrix (target=...)" if interface() is Interface.PYTHON else ""))
    if target is not None and rotation_method is not RotationMethod.TARGET:
        raise OptionError(f"a target applies to target rotation only, not to {rotation_method.value}")
    target_file = None
    if isinstance(target, (str, Path)):
        from cfa_tool.exploration.target_file import read_target_file

        target_file = read_target_file(target)
        target = target_file.matrix(tuple(chosen))
        if requested is None:
            requested = len(target_file.factors)
            notes.append(f"Factors: {requested}, the columns of the target file {target_file.source} "
                         f"({', '.join(target_file.factors)}).")
        elif requested != len(target_file.factors):
            raise OptionError(f"{Option.FACTORS.given(requested)} asks for {requested} factors, and the target file "
                              f"{target_file.source} has "
                              f"{len(target_file.factors)} factor columns")
    turning = chosen_rotation and rotation_method is not RotationMethod.NONE
    if turning and requested == 1:
        _refuse_rotation_of_one_factor(rotation_method, target_file)
    ordinal_items = _ordinal_items(ordinal, chosen)
    # values that look like no answers among the rows read (both halves of a split): first in every view
    # and items answered alike by all rows but a few, as fit names them (pipeline.inputs.few_answers_problems)
    screened = api.screened(frame, tuple(chosen), source, loaded.non_answers, loaded.cautions)
    # the cautions every command composes once (pipeline.inputs.data_problems): a row filter's selection on an item,
    # rows pasted twice, ids of several rows (s20: explore named copies but not repeated ids), codes kept in a filter's
    # column, values that look like no answers (codes set apart from the scale among them) and items answered by few
    # the codes given (advice adding a code keeps them; a filter or group column holding one is named); judged on the
    # items explored (``chosen``, the columns left out as constant aside: new-user s24, a --keep column constant after
    # its filter was called 'an item of factor1'), without the placeholder model of one factor of them all, whose
    # factor is no factor of the exploration
    data_problems = api.data_problems(replace(screened, row_filters=loaded.row_filters, read_frame=loaded.read_frame,
                                              missing_codes=loaded.missing_codes, missing_words=loaded.missing_words),
                                      None, ids=ids, names=tuple(chosen), id_column=named_by, takes_design=False,
                                      halves=split is not None and cluster is None)  # --split's halves by --cluster
    halves = None
    if split is not None:
        split = options.seed(split)
        numbers = row_numbers(frame)
        # the one rule of every split (replicate --data's too), which a halves file is checked by
        first, second, units, drawn_by = drawn_halves(frame, cluster, strata, tuple(chosen), source, split,
                                                      "split the file into two samples by hand, explore one and fit "
                                                      "the draft model on the other")
        explored, confirming = frame.iloc[first], frame.iloc[second]
        # fitted as a data frame, its rows named as explore read them (a file's rows, not index labels one less)
        confirming.attrs[ROW_NAMING] = row_naming(frame)
        halves = (tuple(int(v) for v in numbers[first]), tuple(int(v) for v in numbers[second]), confirming)
        design_split = dict(cluster=cluster, strata=strata, units=units, drawn_by=drawn_by)
        from cfa_tool.pipeline.row_filter_cautions import few_clusters_problems

        # halves of a handful of clusters first: they are those clusters, not random halves (hostile s24b)
        data_problems = few_clusters_problems(units, cluster, True, strata) + tuple(data_problems)
        frame = explored
    names = tuple(chosen)
    if by_default and ordinal_items:
        _refuse_fractions_of_default_items(frame, ordinal_items, source)
    correlations = _correlations(frame, names, source, ordinal_items, notes)
    few = _few_categories(frame, names, ordinal_items, source)
    if few:
        notes.append(few_categories_note(few, names, ordinal_items))
    settings = ExploreSettings(factors=requested, extraction=extraction_method,
                               rotation=RotationSpec(rotation_method, target=target), replications=replications,
                               seed=seed, count=True, threshold=threshold,
                               factor_names=target_file.factors if target_file is not None else None)
    exploration = explore_correlations(correlations, settings)
    if turning and exploration.factors == 1:  # the rules chose one factor: the rotation asked for cannot apply
        notes.insert(0, f"No rotation: the rules for the number of factors recommend one factor, and a rotation turns "
                        f"several factors towards a simpler pattern; the {rotation_method.value} rotation asked for "
                        f"does not apply, and the loadings shown are the one factor's, unrotated.")
    sample_problems, sample_notes = sample_size_problems([exploration.data.n_obs],
                                                         [exploratory_parameters(len(names), exploration.factors)])
    notes.extend(sample_notes)
    fits = exploration.count.fits
    largest = exploration.factors + 2
    if max((f.factors for f in fits), default=0) < largest:
        from cfa_tool.numerics.threads import blas_threads_for

        with blas_threads_for(correlations.p):
            fits = fit_sequence(correlations, largest)
    fits = tuple(f for f in fits if f.factors <= max(largest, exploration.count.recommended + 2))
    drafted = tuple(p.item for p in exploration.draft.placements
                    if p.placement is Placement.ON_FACTOR and exploration.draft.written[p.factor])
    statements = tuple(answer_lines(spec, drafted))
    split_result = None
    if halves is not None:
        split_result = replace(_confirm(exploration, halves, split, source, statements, id_column, max_iterations),
                               **design_split)
    return ExploreResult(source, names, rows_read, exploration, fits, requested, split_result, tuple(notes),
                         sorted_items(exploration), sample_problems + data_problems, statements, coding_record(spec),
                         few, left_out if by_default else (), loaded.reading)


def _few_categories(frame: pd.DataFrame, names: tuple[str, ...], ordinal_items: tuple[str, ...],
                    source: str) -> tuple[str, ...]:
    """The items analysed as continuous whose answers take at most FEW_CATEGORIES whole values (the rule a fit
    names them by: data.descriptives.few_category_items)."""
    from cfa_tool.data.descriptives import few_category_items
    from cfa_tool.data.moments import _numeric_rows

    continuous = tuple(x for x in names if x not in ordinal_items)
    return few_category_items(_numeric_rows(frame, continuous, source), continuous) if continuous else ()


def few_categories_note(few: tuple[str, ...], names: tuple[str, ...], ordinal_items: tuple[str, ...] = ()) -> Note:
    """The note of an exploration that analyses ``few`` (of the items ``names``), answered in at most FEW_CATEGORIES
    categories, as continuous: what its correlations then are, what that does to the loadings, and the option that
    analyses them by polychoric correlations (with the items ``ordinal_items`` analysed so already).  Four categories, not five: treating answers as continuous does about
    as well as treating them as ordered categories from five categories on, and understates the loadings below
    that (Rhemtulla, Brosseau-Liard & Savalei 2012, recalled from memory; the rule fit's note uses,
    data.descriptives.FEW_CATEGORIES)."""
    from cfa_tool.data.descriptives import FEW_CATEGORIES
    from cfa_tool.language.names import written_name

    listed = cut_list(few, 8, printable)
    subject = (f"All {len(names)} items ({listed}) have" if len(few) == len(names) else
               f"{len(few)} of the {len(names)} items ({listed}) {'has' if len(few) == 1 else 'have'}")
    ordinal = tuple(x for x in names if x in few or x in ordinal_items)  # those of the option, in the items' order
    if len(ordinal) == len(names):
        option = Option.ORDINAL.given("all")
    elif interface() is Interface.COMMAND_LINE:
        option = Option.ORDINAL.given(",".join(written_name(x) for x in ordinal))
    else:
        option = Option.ORDINAL.given(list(ordinal))
    how = ("explore's correlations of these answers are Pearson correlations, which treat them as continuous"
           if not ordinal_items else
           "explore treats these answers as continuous (Pearson correlations among them, polyserial ones with the "
           "items analysed as ordinal)")
    return Note((f"{subject} at most {FEW_CATEGORIES} answer categories, and {how}: with so few categories these "
                 f"correlations, and with them the loadings and communalities, tend to come out smaller than those of "
                 f"the responses behind the answers, so that items can seem weaker than they are (Rhemtulla, "
                 f"Brosseau-Liard & Savalei 2012). Polychoric correlations estimate the correlations of those "
                 f"responses", Command(f": {option} explores the items by them"), "."))


def _refuse_rotation_of_one_factor(method: RotationMethod, target_file) -> None:
    """The error of a rotation chosen for one factor (an option that cannot apply): a rotation turns several factors,
    and one factor's loadings are the same under every rotation."""
    if target_file is not None:
        raise OptionError(f"{target_file.source}: the target file has one factor column, and a target rotation turns "
                          f"several factors (one factor's loadings are the same under every rotation); explore one "
                          f"factor without {Option.TARGET}, or give the target file a column for each factor")
    raise OptionError(f"{Option.ROTATION.given(method.value)} turns several factors, and {Option.FACTORS.given(1)} "
                      f"asks for one (its loadings are the same under every rotation); leave out {Option.ROTATION}"
                      + (f" and {Option.TARGET}" if method is RotationMethod.TARGET else "")
                      + ", or ask for more factors")


def exploratory_parameters(items: int, factors: int) -> int:
    """The free parameters of an exploratory factor model of ``items`` items and ``factors`` factors: the loadings and
    uniquenesses, less the factors * (factors - 1) / 2 that the rotation leaves undetermined, so that its degrees of
    freedom are ((items - factors)^2 - (items + factors)) / 2 (Lawley & Maxwell 1971)."""
    return items * factors + items - factors * (factors - 1) // 2


def _ordinal_items(ordinal, items: tuple[str, ...]) -> tuple[str, ...]:
    if ordinal is None:
        return ()
    if ordinal == "all":
        from cfa_tool.pipeline.inputs import refuse_item_named_all

        refuse_item_named_all(items)
        return tuple(items)
    from cfa_tool.language.names import ordinal_names

    return tuple(dict.fromkeys(ordinal_names(ordinal, items, "one of the items explored")))


def _refuse_fractions_of_default_items(frame: pd.DataFrame, ordinal_items: tuple[str, ...], source: str) -> None:
    """The error of an ordinal item with a fractional answer (data.polychoric.check_whole_answers) when the items
    were chosen by default, with the way to leave the column out: a column of measures the default choice kept
    (new-user trial s21: the run stopped on years of service without saying how to name the items)."""
    from cfa_tool.data.moments import numeric_columns
    from cfa_tool.data.polychoric import check_whole_answers
    from cfa_tool.errors import RowDataError

    try:
        check_whole_answers(numeric_columns(frame, ordinal_items, source), frame, ordinal_items, source)
    except RowDataError as error:
        raise RowDataError(f"{error}; the items were chosen by default (every column of numbers that looks like "
                           f"answers): if it is not an item, name the items with {Option.ITEMS}", error.row) from None


def _correlations(frame, names, source, ordinal_items, notes):
    from cfa_tool.data.moments import _numeric_rows, sample_moments

    if ordinal_items:
        from cfa_tool.data.polychoric import ordinal_moments

        continuous = frozenset(x for x in names if x not in ordinal_items)
        moments = ordinal_moments(frame, names, source, continuous, pairwise=True)
        if moments.gaps:
            counts = moments.pair_counts[np.tril_indices(len(names), -1)]
            notes.append(f"Rows with gaps are kept: each polychoric correlation comes from the rows that answered both "
                         f"items ({count_text(int(counts.min()))} to {count_text(int(counts.max()))} rows per pair), as fit computes "
                         f"them; N is the {count_text(moments.n_obs)} rows with at least one answer.")
        if len(frame) > moments.n_obs:
            notes.append(_empty_rows_note(frame, frame[list(names)].isna().to_numpy().all(axis=1)))
        return from_ordinal_moments(moments)
    values = _numeric_rows(frame, names, source)
    absent = np.isnan(values)
    empty = absent.all(axis=1)  # rows that answered none of the items: left out, as fit leaves them out
    gaps = int(absent.any(axis=1).sum()) - int(empty.sum())
    missing = "full-information" if gaps else "listwise"
    moments = sample_moments(frame, names, source, missing=missing)
    if gaps:
        notes.append(f"{count_text(gaps)} {'row misses' if gaps == 1 else 'rows miss'} some answers; the correlations are "
                     f"the maximum-likelihood (EM) estimates from every answer, and N is the {count_text(moments.n_obs)} rows with at "
                     f"least one answer.")
    if empty.any():
        notes.append(_empty_rows_note(frame, empty))
    return from_sample_moments(moments)


def _empty_rows_note(frame: pd.DataFrame, empty: np.ndarray) -> str:
    """The note on the rows (``empty``: a mask of ``frame``'s rows) that answered none of the items, named as the
    file numbers them (data.kept_rows.rows_listed), as fit names them."""
    from cfa_tool.data.kept_rows import row_naming, rows_listed, text_lines
    from cfa_tool.data.moments import row_numbers

    n = int(empty.sum())
    listed = rows_listed(row_numbers(frame)[empty], naming=row_naming(frame), lines=text_lines(frame))
    return (f"{count_text(n)} of {count_text(len(frame))} {'row' if len(frame) == 1 else 'rows'} answered none of the items and "
            f"{'was' if n == 1 else 'were'} left out ({listed}).")


def _confirm(exploration: Exploration, halves, seed: int, source: str, statements: tuple[str, ...],
             id_column: str | None = None, max_iterations: int | None = None) -> SplitHalves:
    """The draft model fitted on the confirmation half.  Its rows were read once, with the answers file's words
    coded, so the draft is fitted to their codes, and the fit keeps the coding that the draft model file's
    ``statements`` state (its methods paragraph says how the words were coded, as a fit of that file does); its rows
    named by ``id_column`` as the exploration names them; ``max_iterations``: the fit's iteration limit (None: fit's
    own)."""
    from dataclasses import replace

    from cfa_tool.pipeline import inputs as api
    from cfa_tool.errors import CfaError
    from cfa_tool.language.parser import parse_model

    first, second, confirming = halves
    if not exploration.draft.usable:
        return SplitHalves(seed, first, second, None, "the draft model has no factor with enough items, so there is "
                                                      "nothing to confirm")
    try:
        fitted = api.fit(exploration.draft.text, confirming, id_column=id_column,  # its index keeps the row numbers
                         **({} if max_iterations is None else {"max_iterations": max_iterations}))
    except CfaError as exc:
        return SplitHalves(seed, first, second, None, f"the draft model could not be fitted on the confirmation half: "
                                                      f"{exc}")
    fitted = replace_source(fitted, f"{source} ({half_phrase(True, 1, False)}, {count_text(len(second))} rows)")
    if statements:
        written = parse_model(exploration.draft.text + "".join(line + "\n" for line in statements), "draft model")
        fitted = replace(fitted, data=replace(fitted.data, answer_coding=coding_record(written)))
    return SplitHalves(seed, first, second, fitted)


def replace_source(result: FitResult, source: str) -> FitResult:
    from dataclasses import replace

    return replace(result, data=replace(result.data, source=source), model_name="Draft model from the exploration",
                   model_source=f"draft model ({half_phrase(True, 0, False)})")


def sorted_items(exploration: Exploration) -> tuple[int, ...]:
    """Item positions sorted by the factor of their largest absolute pattern loading, then by that loading's size."""
    pattern = exploration.rotated.pattern
    top = np.argmax(np.abs(pattern), axis=1)
    size = np.abs(pattern[np.arange(len(pattern)), top])
    return tuple(int(i) for i in np.lexsort((-size, top)))

