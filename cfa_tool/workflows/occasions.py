"""Measurement invariance over occasions: the same people answering the same items at two or more times, in one
group.  The model is written once, for one occasion; each step of the ladder is the model of every occasion side by
side (each occasion its own factors and indicators, each item's residuals correlated across the occasions, the
factors' covariances across the occasions free), with the equalities of its level held across the occasions:
configural, metric (loadings), scalar (intercepts, the later occasions' factor means freed against the first's at 0)
and strict (residual variances) (Meredith 1993; Widaman, Ferrer & Conger 2010; Little, Slegers & Card 2006 on the
first occasion's mean as the origin).  The steps are fitted to the same rows and tested against the one before by
the chi-square difference test (scaled by Satorra & Bentler 2001 with a robust test), as ``compare`` fits rival
models; each step is judged by the rule of the ladder across groups (workflows.invariance).

Data arrive in long form (one row per person and occasion: an id column and a column telling the occasions apart),
set side by side here by the id, or in wide form (one row per person, each item's column at an occasion named by the
item and that occasion's ending).  A person missing at one occasion keeps the answers of the others by
full-information ML, which the means of the scalar step need in any case.
"""

from __future__ import annotations

from collections.abc import Sequence
import re
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.moments import FEW_TOGETHER_SHARE
from cfa_tool.data.row_ids import id_text, ids_by_row_number
from cfa_tool.errors import DataError, EstimationError, ModelError, OptionError, shown_path
from cfa_tool.language.names import written_group, written_name
from cfa_tool.language.parser import parse_model
from cfa_tool.language.spec import Spec
from cfa_tool.note_parts import Command, Note
from cfa_tool.method import DecisionRule, DifferenceMethod, MissingData
from cfa_tool.numbers import count_text, counted, cut_list, number, word_list
from cfa_tool.options import Option, own_keywords, taken_by
from cfa_tool import options as check
from cfa_tool.pipeline.inputs import analysed_odd_values, data_problems, load_spec, read_inputs_with_notes
from cfa_tool.pipeline.results import clean
from cfa_tool.pipeline.same_people import OCCASIONS_AT_MOST
from cfa_tool.views import Presentable
from cfa_tool.workflows.invariance import (LEVELS, InvarianceStep, LatentDifference, ScoreTests, _fit_values, _judged,
                                           _step_holds, configural_fits, unjudged)

#: what each level holds equal across the occasions, in the words of the report and the paragraph
HELD_OVER_OCCASIONS = {"configural": "nothing (the same pattern at every occasion)", "metric": "loadings",
                       "scalar": "loadings and intercepts", "strict": "loadings, intercepts and residual variances"}


@dataclass(frozen=True)
class OccasionLayout:
    """How the occasions are laid out side by side: each occasion's label (as the data give it) and the ending of
    its columns and factors in the model of every occasion ('vig1' at occasion '2' is 'vig1_2')."""

    occasions: tuple[str, ...]
    endings: tuple[str, ...]

    def name(self, name: str, k: int) -> str:
        """``name`` (an item or a factor of the one-occasion model) at the k-th occasion."""
        return f"{name}{self.endings[k]}"

    def said(self, k: int) -> str:
        """The k-th occasion's label as a sentence names it among the occasions, by the one rule of group labels
        (language.names.written_group: 'occasion 2', or 'occasion "time, 2"' with every label quoted when one
        needs it, so that a label with a comma reads as one)."""
        return written_group(self.occasions[k], self.occasions)

    def clash(self, names: Sequence[str]) -> str:
        """The first name of the model of every occasion that two (name, occasion) pairs of ``names`` (the
        one-occasion model's items and factors) would share, in words ('' when none does): item 'a' at ending '11'
        and item 'a1' at ending '1' are both 'a11', so one column would be two items' column (hostile s27)."""
        seen: dict[str, tuple[str, int]] = {}
        for name in names:
            for k in range(len(self.endings)):
                written = self.name(name, k)
                if written in seen and seen[written] != (name, k):
                    other, j = seen[written]
                    return (f"'{written}' would be both '{other}' at occasion {self.said(j)} and '{name}' at "
                            f"occasion {self.said(k)}")
                seen.setdefault(written, (name, k))
        return ""


def _refuse_statements(spec: Spec) -> None:
    """The one-occasion model of this first version: factors of items, residual covariances and uncorrelated factors
    of one occasion; any other statement is an error at its line (not yet available over occasions)."""
    others = (("fix", spec.fixed), ("free", spec.freed), ("equal", spec.equal), ("start", spec.starts),
              ("bound", spec.bounds), ("scale", spec.scaling), ("ordinal", spec.ordinal), ("reversed", spec.reversed),
              ("method", spec.method), ("answers", spec.answers), ("exploratory block", spec.exploratory),
              ("invariance", spec.invariant or ((spec.invariance_level,) if spec.invariance_level else ())),
              ("noninvariant", spec.noninvariant))
    for word, found in others:
        if found:
            where = spec.equalities_location if word == "invariance" else _location(found[0])
            raise ModelError(f"the '{word}' statement is not yet available in a model tested over occasions (the "
                             f"ladder writes the model of every occasion from factors, their items, 'covary' and "
                             f"'uncorrelated' statements alone; see not-yet-available.md)", where,
                             spec.source_line(where) if where is not None else None)
    latent = set(spec.factor_names)
    for factor in spec.factors:
        for item in factor.indicators:
            if item.text in latent:
                raise ModelError(f"a higher-order factor ({factor.name.text} explains {item.text}) is not yet "
                                 f"available in a model tested over occasions", item.location,
                                 spec.source_line(item.location))


def _location(found):
    """Where a statement of the model file is, for its error (the first location its parts give)."""
    for part in (found, *(getattr(found, "refs", ()) or ()), *(getattr(found, "items", ()) or ()),
                 *(getattr(found, "factors", ()) or ())):
        at = getattr(part, "location", None)
        if at is not None:
            return at
    if isinstance(found, tuple) and found:
        return _location(found[0])
    return None


def step_text(spec: Spec, layout: OccasionLayout, level: str) -> str:
    """The model of every occasion side by side at ``level`` (one of :data:`invariance.LEVELS`), in the model
    language: what the step fits, which the report and the JSON give so that it can be fitted again by ``fit``.
    Each factor's first item is its marker (loading 1 at every occasion); from the metric level the other loadings
    are equal across the occasions, from the scalar level every intercept, the first occasion's factor means fixed
    at 0 and the later ones' free, from the strict level every residual variance."""
    classes = next(c for lv, c, _ in LEVELS if lv == level)
    n = len(layout.occasions)
    w = written_name
    lines = [f'name "{level} over occasions"']
    for k in range(n):
        for factor in spec.factors:
            items = ", ".join(w(layout.name(i.text, k)) for i in factor.indicators)
            lines.append(f"factor {w(layout.name(factor.name.text, k))}: {items}")
        lines += [f"covary {w(layout.name(p.first.text, k))}, {w(layout.name(p.second.text, k))}" for p in spec.covary]
        lines += [f"uncorrelated {w(layout.name(p.first.text, k))}, {w(layout.name(p.second.text, k))}"
                  for p in spec.uncorrelated]
    for item in spec.observed_names:  # each item's residuals correlated across the occasions
        lines += [f"covary {w(layout.name(item, a))}, {w(layout.name(item, b))}"
                  for a in range(n) for b in range(a + 1, n)]
    if "loadings" in classes:
        for factor in spec.factors:
            for item in factor.indicators[1:]:
                lines.append("equal " + ", ".join(
                    f"loading({w(layout.name(factor.name.text, k))}, {w(layout.name(item.text, k))})"
                    for k in range(n)))
    if "intercepts" in classes:
        for item in spec.observed_names:
            lines.append("equal " + ", ".join(f"intercept({w(layout.name(item, k))})" for k in range(n)))
        lines += [f"free mean({w(layout.name(f, k))})" for k in range(1, n) for f in spec.factor_names]
    if "residuals" in classes:
        for item in spec.observed_names:
            lines.append("equal " + ", ".join(f"variance({w(layout.name(item, k))})" for k in range(n)))
    return "\n".join(lines) + "\n"


class _OccasionWords:
    """The fits' words over occasions: each name of the model of every occasion as the report names occasions
    ('vig2 at occasion 1', never the side-by-side column 'vig2_1', which no file of long data holds), and advice that
    this route takes.  The ladder writes every step's model from the one-occasion model's factors, items, 'covary' and
    'uncorrelated' statements, each factor's first item its marker at every occasion, and takes no other statement
    (overtime s26: a step's message advised 'scale latent by variance', which the route refuses): any advice that
    names a statement or option is replaced by what works here, with the iteration limit (``limit``, which the route
    takes: --max-iterations) to raise first where a step's search reached it."""

    def __init__(self, spec: Spec, layout: OccasionLayout, limit: int | None = None) -> None:
        self.spec, self.layout, self.limit = spec, layout, limit
        wide = {layout.name(n, k): (n, layout.said(k)) for n in (*spec.observed_names, *spec.factor_names)
                for k in range(len(layout.occasions))}
        self.wide = wide
        alternatives = "|".join(re.escape(n) for n in sorted(wide, key=len, reverse=True))
        self._pattern = re.compile(rf"(?<![\w.])('?)({alternatives})\1(?![\w])") if wide else None

    def named(self, text: str) -> str:
        """``text`` with each side-by-side name as its one-occasion name at its occasion ('vigour' at occasion 1)."""
        if self._pattern is None:
            return text
        return self._pattern.sub(lambda m: f"{m.group(1)}{self.wide[m.group(2)][0]}{m.group(1)} at occasion "
                                           f"{self.wide[m.group(2)][1]}", text)

    def said(self, text):
        """A line (words or a Note) in the words of this route: names by occasion; a Note's commands kept only when
        they are the statements the one-occasion model may hold ('covary', 'uncorrelated')."""
        if isinstance(text, str):
            return self.named(text)
        parts = tuple(self.named(p) if isinstance(p, str) else
                      replace(p, text=self.named(p.text), words=self.named(p.words)) if isinstance(p, Command) else p
                      for p in text.parts)
        return Note(parts)

    @staticmethod
    def takes(advice) -> bool:
        """Whether ``advice`` names nothing this route refuses: no command but the one-occasion model's 'covary' and
        'uncorrelated' statements."""
        return not isinstance(advice, Note) or all(
            not isinstance(p, Command) or p.text.lstrip(" (").startswith(("'covary ", "'uncorrelated "))
            for p in advice.parts)

    def marker_advice(self, wide_factor: str):
        """What works over occasions for a factor whose marker hardly measures it: another item first in the
        one-occasion model, which makes it the marker at every occasion."""
        factor = self.wide.get(wide_factor, (wide_factor, ""))[0]
        first = next((f.indicators[0].text for f in self.spec.factors if f.name.text == factor), "")
        return (f"give '{factor}' the unit of an item that measures it: list that item first among the factor's items "
                f"in the one-occasion model, which makes it the marker at every occasion; and check whether {first} "
                f"belongs to '{factor}' at all.")

    GENERAL = ("check that every factor is identified (three or more items with clear loadings, or two items and a "
               "correlation with another factor) and that each factor's first item, its marker at every occasion, "
               "measures it clearly (list another item first otherwise); or fit the one-occasion model to each "
               "occasion's rows alone, where the model file's other statements are available to find the cause.")

    def problem(self, p):
        """A problem of a step's solution in this route's words, its advice one this route takes."""
        from cfa_tool.assessment.admissibility import ProblemKind

        advice = p.advice
        if not self.takes(advice):
            advice = (self.marker_advice(_loading_factor(p.parameters[0])) if p.kind is ProblemKind.WEAK_MARKER
                      and p.parameters else self.GENERAL)
        return replace(p, explanation=self.said(p.explanation), advice=self.said(advice))

    def message(self, text, limited: bool = False):
        """A search's message (assessment.convergence.nonconvergence_message) in this route's words: what happened,
        then what works here in place of advice this route refuses (``limited``: the search stopped at the iteration
        limit, which this route lets the user raise)."""
        from cfa_tool.assessment.convergence import WHAT_TO_TRY

        parts = (text,) if isinstance(text, str) else text.parts
        at = next((k for k, p in enumerate(parts) if isinstance(p, str) and WHAT_TO_TRY in p), None)
        if at is None:
            return self.said(text)
        head, _, tail = parts[at].partition(WHAT_TO_TRY)
        advice = Note((tail, *parts[at + 1:]))
        if self.takes(advice):
            return self.said(text)
        raise_limit = (("raise the limit", Command(f" ({Option.MAX_ITERATIONS})", takes=taken_by(Option.MAX_ITERATIONS)),
                        "; or ") if limited else ())
        return self.said(Note((*parts[:at], head + WHAT_TO_TRY, *raise_limit, self.GENERAL)))

    def result(self, result):
        """A step's fit in this route's words (its problems and message; the parameter labels stay the keys of the
        model of every occasion, as its JSON gives that model)."""
        return replace(result, problems=tuple(self.problem(p) for p in result.problems),
                       message=(self.message(result.message, self.limit is not None and result.iterations >= self.limit)
                                if not result.converged else result.message))


def _configural_failure(result) -> str:
    """Why the configural model over occasions could not be estimated (its message in the route's words, ``result``
    from _OccasionWords.result): the ladder stops there."""
    from cfa_tool.assessment.admissibility import WHY_NOT_ESTIMATED

    identified = not any(p.kind in WHY_NOT_ESTIMATED for p in result.problems)
    return ("the configural model over occasions did not converge, so no step can be tested: " + str(result.message)
            if identified else f"the configural model over occasions could not be estimated: {result.message}")


def _loading_factor(label: str) -> str:
    """The factor of a loading's label as the parameter table writes it ('loading(vigour_1, vig1_1)')."""
    from cfa_tool.language.names import read_reference

    return read_reference(label)[1][0]


#: the kinds of the cautions on the answers set side by side (pipeline.inputs.data_problems, the fit's tails) that
#: name items and counts, never rows: those a long file's ladder gives beside the long file's own
_ANSWERS_SIDE_BY_SIDE = frozenset({ProblemKind.FEW_ANSWERS, ProblemKind.FEW_ANSWERED_TOGETHER,
                                   ProblemKind.NEARLY_CONSTANT, ProblemKind.NON_NORMAL_ANSWERS,
                                   ProblemKind.SPARSE_ANSWERS})


def _one_row_per_person(problem, endings: Sequence[str]):
    """``problem`` with advice that fits wide data over occasions when it is the caution on ids of several rows: the
    file sets the occasions side by side already, each person one row, so the general advice (merge by the id and the
    time, set each time's answers side by side) does not apply; ids of several rows are typing errors or one
    person's occasions split over rows (hostile trial s27)."""
    if problem.kind is not ProblemKind.REPEATED_IDS:
        return problem
    return replace(problem, advice=(
        f"correct the ids in a copy of the data file (a typing error?); if the rows of one id are one person's answers "
        f"at different occasions, join them into one row of that person, each occasion's answers in its own columns "
        f"(ending {', '.join(endings)}), so that the ladder compares each person with themselves; if they are "
        f"different people, give each an id of their own."))


def _chosen(id_column: str, occasion_column: str):
    """The columns of other roles than items (data.matching.chosen_columns): the id and the occasion column."""
    from cfa_tool.data.matching import chosen_columns

    chosen = chosen_columns(None, id_column)
    chosen[occasion_column] = "the occasion column"
    return chosen


def _occasion_order(values: pd.Series, column: str, given: Sequence[str] | None, source: str) -> list:
    """The occasions in order: as ``given`` (their labels, data.row_ids.id_text), else numbers from the smallest;
    occasions named by text without a given order are an error (the first occasion is the origin of the means, and
    no order of words can be guessed: 'pre', 'post', 'follow-up')."""
    distinct = list(dict.fromkeys(values.tolist()))
    if given is not None:
        by_label = {id_text(v): v for v in distinct}
        wanted = [str(g) for g in given]
        unknown = [g for g in wanted if g not in by_label]
        left = [label for label in by_label if label not in wanted]
        if unknown or left or len(set(wanted)) < len(wanted):
            labels = [*by_label, *unknown]

            def said(texts) -> str:  # each quoted when one needs it ('time, 2' one label: written_group)
                return ", ".join(written_group(t, labels) for t in texts)

            raise OptionError(f"the order of the occasions names each occasion of '{column}' in {shown_path(source)} "
                              f"once ({said(by_label)})"
                              + (f"; not among them: {said(unknown)}" if unknown else "")
                              + (f"; left out: {said(left)}" if left else ""))
        return [by_label[g] for g in wanted]
    values = [v if isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, bool)
              else number(str(v)) for v in distinct]  # numbers, or text that reads as one (a column read as text)
    if all(v is not None for v in values):
        if len(set(values)) < len(values):  # 1 and '1.0' in a column read as text (hostile s27): one occasion?
            alike = [id_text(d) for v, d in zip(values, distinct) if values.count(v) > 1]
            raise DataError(f"{shown_path(source)}: column '{column}' holds occasions that read alike "
                            f"({', '.join(alike)}); give each occasion one value")
        return [d for _, d in sorted(zip(values, distinct), key=lambda pair: pair[0])]
    raise OptionError(f"the occasions of '{column}' are named by text ({cut_list([id_text(v) for v in distinct], 5)}), "
                      f"whose order cannot be read from the data: give it ({Option.OCCASION_ORDER} with the occasions in "
                      f"their order, comma-separated, the first first)")


def _as_read_after(keep, missing_codes) -> str:
    """What the run gave that changed the rows and answers set side by side (its row filters and codes of no answer),
    for an error of the occasions' rows, which the user may not connect with them (hostile trial s27: an occasion
    without answers after --missing-codes read them as gaps); '' when it gave neither."""
    from cfa_tool.data.non_answers import codes_given

    given = ([Option.KEEP.given([k for k in keep if isinstance(k, str)])] if any(isinstance(k, str) for k in keep)
             else []) + [k.phrase() for k in keep if not isinstance(k, str) and hasattr(k, "phrase")]
    given += [codes_given(missing_codes)] if missing_codes else []
    if not given:
        return ""
    return f" (the rows and answers as read after {word_list(given)}, which change what is set side by side)"


def _refuse_no_one_at_both(people: OccasionPeople, loaded, occasion_column: str | None, id_column: str | None) -> None:
    """No person answering at both occasions of some pair: the covariances across them have no data (hostile s27:
    ids 'P0' at wave 1 and '0' at wave 2 stopped the fit on a pair of columns of no file); an error naming the file
    and, for long data, a few ids of each occasion, which show how they are written."""
    k, j, n = people.fewest
    if n or not people.analysed:
        return
    a, b = people.occasions[k], people.occasions[j]
    said_a, said_b = (written_group(o, people.occasions) for o in (a, b))  # 'time, 2' quoted, as one label
    if occasion_column is not None:
        frame = loaded.frame
        labels = frame[occasion_column].map(id_text)
        seen = [cut_list(list(dict.fromkeys(frame.loc[labels == o, id_column].map(id_text).dropna()))[:3], 3,
                         lambda i: f"'{i}'") for o in (a, b)]
        raise DataError(f"{shown_path(loaded.source)}: no person of '{id_column}' answered at both occasions {said_a} "
                        f"and {said_b} of '{occasion_column}' (ids at {said_a} such as {seen[0]}; at {said_b} such as "
                        f"{seen[1]}); write each person's id alike at every occasion")
    raise DataError(f"{shown_path(loaded.source)}: no row answers items at both occasions {said_a} and {said_b}; each "
                    f"row holds one person's answers at every occasion")


def _refuse_split_people(loaded, id_column: str) -> None:
    """A half of a halves file (--half) drawn row by row, or by another column than the people's ids, that leaves some
    of its people's occasions in the other half: an error naming how many (hostile s27: 144 of 222 people of a half
    had their other occasion in the other half, so the halves shared people and the missing occasions read as
    skipped).  Halves drawn whole people at a time (by the id column as the cluster) keep each person in one half."""
    from cfa_tool.data.halves import HalfRows

    half = next((f for f in loaded.row_filters if isinstance(f, HalfRows)), None)
    if half is None or half.cluster_column == id_column or loaded.read_frame is None:
        return
    whole = loaded.read_frame
    ids = whole[id_column].map(id_text)
    inside = whole.index.isin(loaded.frame.index)
    people = set(ids[inside].dropna())
    split = people & set(ids[~inside].dropna())
    if not split:
        return
    drawn = f"by {half.cluster_column}" if half.cluster_column else "row by row"
    raise DataError(f"{shown_path(half.halves_file)} was drawn {drawn}, and {count_text(len(split))} of the "
                    f"{count_text(len(people))} people of {half.phrase()} have rows of other occasions in the other "
                    f"half: the halves share people, and those occasions would read as missing; draw the halves whole "
                    f"people at a time ({Option.CLUSTER.given(id_column)} beside {Option.SPLIT} or replicate's "
                    f"--halves-file)")


def wide_from_long(frame: pd.DataFrame, items: Sequence[str], id_column: str, occasion_column: str,
                   source: str, order: Sequence[str] | None = None) -> tuple[pd.DataFrame, OccasionLayout, list[str]]:
    """Rows of one person and occasion set side by side, one row per person (by ``id_column``), each item's column at
    the k-th occasion named by the layout; people missing at an occasion have gaps there.  Errors: a row without an
    id or an occasion, fewer than 2 or more than OCCASIONS_AT_MOST occasions, an id given twice at one occasion
    (naming them), an item without an answer at some occasion."""
    for column, what in ((id_column, "id"), (occasion_column, "occasion")):
        empty = frame[column].isna().to_numpy()
        if empty.any():
            rows = [str(int(i) + 1) for i in frame.index[empty]]  # as a spreadsheet shows them (moments.file_rows_index)
            many = "s" if empty.sum() > 1 else ""
            raise DataError(f"{shown_path(source)}: column '{column}' gives no {what} in "
                            f"{count_text(int(empty.sum()))} row{many} (row{many} {cut_list(rows, 5)}); each row needs "
                            f"a person's id and an occasion")
    order = _occasion_order(frame[occasion_column], occasion_column, order, source)
    if not 2 <= len(order) <= OCCASIONS_AT_MOST:
        raise DataError(f"{shown_path(source)}: column '{occasion_column}' holds {count_text(len(order))} occasion"
                        f"{'s' if len(order) != 1 else ''}; invariance over occasions needs 2 to {OCCASIONS_AT_MOST}")
    labels = [id_text(v) for v in order]  # as ids are read: wave 2.0 of a column with gaps is 2
    if len(set(labels)) < len(labels):
        raise DataError(f"{shown_path(source)}: column '{occasion_column}' holds occasions that read alike "
                        f"({', '.join(written_group(x, labels) for x in labels)}); give each occasion one value")
    ids = frame[id_column].map(id_text)  # the one rule of an id's text (data.row_ids)
    twice = frame.assign(_id=ids).duplicated(["_id", occasion_column], keep=False).to_numpy()
    if twice.any():
        pairs = list(dict.fromkeys(f"'{i}' at {id_text(o)}" for i, o in zip(ids[twice], frame[occasion_column][twice])))
        raise DataError(f"{shown_path(source)}: the id column '{id_column}' gives one id to several rows of one "
                        f"occasion of '{occasion_column}' ({cut_list(pairs, 5)}); each person answers once per "
                        f"occasion: remove the repeated rows or tell them apart")
    endings = tuple(f"_{label}" for label in labels)
    layout = OccasionLayout(tuple(labels), endings)
    people = list(dict.fromkeys(ids.tolist()))
    wide = pd.DataFrame({id_column: people})
    for k, value in enumerate(order):
        at = frame[occasion_column] == value
        part = frame.loc[at, list(items)].set_axis(ids[at].tolist())
        for item in items:
            answered = part[item].notna().any()
            if not answered:
                raise DataError(f"{shown_path(source)}: item '{item}' has no answer at occasion {layout.said(k)} of "
                                f"'{occasion_column}': every occasion needs the same items")
            wide[layout.name(item, k)] = part[item].reindex(people).to_numpy()
    clash = (f"'{id_column}' would be both the id column and an item at an occasion"
             if id_column in set(wide.columns[1:]) else layout.clash(items))
    if clash:
        raise DataError(f"{shown_path(source)}: the items' names with the occasions' endings clash: {clash}; rename "
                        f"the items or the occasions")
    counts = [int((frame[occasion_column] == v).sum()) for v in order]
    missing = len(people) * len(order) - len(frame)
    notes = [f"Rows set side by side by '{id_column}': {counted(len(frame), 'row')} of "
             f"{counted(len(people), 'person', 'people')} at {len(order)} occasions of '{occasion_column}' ("
             + ", ".join(f"{written_group(lab, labels)}: {count_text(c)}" for lab, c in zip(labels, counts)) + ")"
             + (f"; {counted(missing, 'occasion')} of people missing there {'is a gap' if missing == 1 else 'are gaps'}"
                f", kept by full-information ML" if missing else "") + "."]
    return wide, layout, notes


#: fewer people than this share of those analysed answering at both occasions of a pair: a caution first (the rule
#: of pairs of items answered together, data.moments.FEW_TOGETHER_SHARE: a rule of thumb of this project)
FEW_AT_BOTH_SHARE = FEW_TOGETHER_SHARE


@dataclass(frozen=True)
class OccasionPeople:
    """Who the ladder analyses: the people read (rows of wide data, ids of long data), those who answered some item
    at some occasion (the rest are left out, as a fit leaves out rows that answer none of the model variables), how
    many rows of a long file the people left out had, and for each pair of occasions the people who answered some
    item at both, on whom every covariance across the pair rests."""

    read: int
    analysed: int
    rows_left_out: int  # rows of the long file (0 for wide data: each person one row)
    occasions: tuple[str, ...]
    together: tuple[tuple[int, int, int], ...]  # (occasion k, occasion j, people answering at both)

    @property
    def fewest(self) -> tuple[int, int, int]:
        """The pair of occasions answered together by the fewest people."""
        return min(self.together, key=lambda t: t[2])

    def pair_words(self, pair: tuple[int, int, int]) -> str:
        """'both occasions' with two occasions, else 'both occasions 1 and 3'."""
        if len(self.occasions) == 2:
            return "both occasions"
        return (f"both occasions {written_group(self.occasions[pair[0]], self.occasions)} and "
                f"{written_group(self.occasions[pair[1]], self.occasions)}")

    def at_both(self) -> str:
        """How many of the people analysed answered at both occasions (at the pair answered by the fewest)."""
        pair = self.fewest
        fewest = "" if len(self.occasions) == 2 else ", the fewest of any pair"
        return f"{count_text(pair[2])} of them answered at {self.pair_words(pair)}{fewest}"

    def few_together(self, long: bool) -> str:
        """The caution when few of the people analysed answered at both occasions of some pair ('' otherwise)."""
        pair = self.fewest
        if not self.analysed or pair[2] >= FEW_AT_BOTH_SHARE * self.analysed:
            return ""
        cause = ("each person's id written alike at every occasion: 'P7' at one occasion and '7' at another are two "
                 "people, each missing at the other occasion" if long else
                 "each person's answers at every occasion in one row")
        return (f"only {count_text(pair[2])} of the {count_text(self.analysed)} people analysed answered at "
                f"{self.pair_words(pair)}: every covariance across the occasions, and so each step's test and the "
                f"change of the means, rests on those {count_text(pair[2])} people; check {cause}")

    def notes(self, long: bool) -> tuple[str, ...]:
        """The note on the people left out for answering no item at any occasion (none when no one was)."""
        gone = self.read - self.analysed
        if not gone:
            return ()
        rows = f" ({counted(self.rows_left_out, 'row')} of the file)" if long and self.rows_left_out else ""
        return (f"{count_text(gone)} of {count_text(self.read)} people{rows} answered none of the model's items at any "
                f"occasion and {'was' if gone == 1 else 'were'} left out.",)

    def to_dict(self) -> dict:
        return {"people_read": self.read,
                "people_at_both_occasions": [{"occasions": [self.occasions[k], self.occasions[j]], "people": n}
                                             for k, j, n in self.together]}


def occasion_people(wide: pd.DataFrame, spec: Spec, layout: OccasionLayout,
                    long: pd.DataFrame | None = None, id_column: str | None = None) -> OccasionPeople:
    """The counts of :class:`OccasionPeople` from the occasions side by side (one row per person)."""
    answered = np.column_stack([wide[[layout.name(i, k) for i in spec.observed_names]].notna().to_numpy().any(axis=1)
                                for k in range(len(layout.occasions))])
    some = answered.any(axis=1)
    rows = 0
    if long is not None and id_column is not None:
        gone = set(wide[id_column][~some].tolist())
        rows = int(long[id_column].map(id_text).isin(gone).sum())
    n = answered.shape[1]
    together = tuple((k, j, int((answered[:, k] & answered[:, j]).sum())) for k in range(n) for j in range(k + 1, n))
    return OccasionPeople(len(wide), int(some.sum()), rows, layout.occasions, together)


@dataclass(frozen=True, eq=False)
class OccasionsResult(Presentable):
    """The invariance ladder over occasions of the same people, in one group."""

    occasion_column: str | None  # long form: the column telling the occasions apart; None for wide form
    id_column: str | None
    layout: OccasionLayout
    steps: tuple[InvarianceStep, ...]
    texts: tuple[str, ...]  # each step's model of every occasion, as fitted (step_text)
    alpha: float
    rule: DecisionRule
    warnings: tuple[str, ...]
    notes: tuple[str, ...]
    data_problems: tuple = ()
    latent_changes: tuple[LatentDifference, ...] = ()  # each later occasion's factor mean and variance vs the first
    latent_note: str = ""
    people: int = 0
    #: rows with gaps were fitted by full-information ML (what the normal-theory score tests then assume)
    gaps_by_full_information: bool = False
    freed: tuple = ()  # no partial search over occasions yet (not-yet-available.md)
    people_counts: OccasionPeople | None = None
    #: the model of one occasion as the model file writes it (model.description), which the paragraph describes
    one_occasion: object | None = None
    factor_items: tuple[tuple[str, tuple[str, ...]], ...] = ()  # each factor of one occasion with its items

    @property
    def occasions(self) -> tuple[str, ...]:
        return self.layout.occasions

    @property
    def score_tests(self) -> ScoreTests:
        """The score tests of the steps' equalities: robust with a robust test, normal-theory otherwise (the ladder
        across groups' rule, workflows.invariance.InvarianceResult.score_tests)."""
        return ScoreTests.NORMAL if self.steps[0].result.robust is None else ScoreTests.ROBUST

    @property
    def score_tests_assume_mcar(self) -> bool:
        """Whether the score tests rest on the patterns' expected information (normal-theory ones with rows with
        gaps), as across groups (workflows.invariance.InvarianceResult.score_tests_assume_mcar)."""
        return self.score_tests is ScoreTests.NORMAL and self.gaps_by_full_information

    def at_occasion(self, name: str) -> tuple[str, str]:
        """A name of the model of every occasion as (the one-occasion model's name, its occasion): 'vig3_2' is
        ('vig3', '2'); by the longest ending it has."""
        k = max((k for k, e in enumerate(self.layout.endings) if name.endswith(e)),
                key=lambda k: len(self.layout.endings[k]))
        return name[:len(name) - len(self.layout.endings[k])], self.layout.occasions[k]

    def to_dict(self) -> dict:
        return {
            "warnings": [str(w) for w in self.warnings],
            "data_problems": [p.to_dict() for p in self.data_problems],
            "notes": [str(x) for x in self.notes],
            "over_occasions": True,
            "occasion_column": self.occasion_column,
            "id_column": self.id_column,
            "occasions": [{"occasion": o, "column_ending": e} for o, e in zip(self.layout.occasions,
                                                                            self.layout.endings)],
            "people": self.people,
            **({} if self.people_counts is None else self.people_counts.to_dict()),
            "alpha": self.alpha,
            "decision_rule": {"name": self.rule.value, "description": self.rule.description},
            "steps": [{**s.to_dict(), "model": text} for s, text in zip(self.steps, self.texts)],
            "latent_changes": [clean({**d.to_dict(), "occasion": d.group, "group": None,
                                      "reference_occasion": self.layout.occasions[0]}) for d in self.latent_changes],
            "latent_changes_note": self.latent_note,
            "score_tests": {"name": self.score_tests.value, "description": self.score_tests.phrase,
                            "assume_missing_completely_at_random": self.score_tests_assume_mcar},
        }


def _latent_changes(steps: Sequence[InvarianceStep], spec: Spec,
                    layout: OccasionLayout) -> tuple[tuple[LatentDifference, ...], str]:
    """Each later occasion's factor means and variances against the first occasion's (mean 0), from the scalar
    model, when the metric and scalar steps held; d: the change over the pooled latent standard deviation of the two
    occasions (the same people, so equal sizes); else none, with the reason."""
    scalar = next((s for s in steps if s.level == "scalar"), None)
    if scalar is None:
        return (), "No latent mean changes: the ladder did not reach the scalar step."
    if any(not s.holds for s in steps if s.level in ("metric", "scalar")):
        return (), ("No latent mean changes: the scalar step (or the metric step before it) did not hold, so the "
                    "factor means of the occasions are not on a common scale.")
    if not scalar.result.admissible:
        return (), "No latent mean changes: the scalar model's solution is not admissible."
    rows = {(r.kind, r.variables): r for r in scalar.result.estimates if r.kind in ("mean", "factor_variance")}
    out = []
    for factor in spec.factor_names:
        first = rows.get(("factor_variance", (layout.name(factor, 0),)))
        for k in range(1, len(layout.occasions)):
            mean = rows.get(("mean", (layout.name(factor, k),)))
            var = rows.get(("factor_variance", (layout.name(factor, k),)))
            if mean is None or var is None or first is None:
                continue
            pooled = (first.estimate + var.estimate) / 2
            d = mean.estimate / np.sqrt(pooled) if pooled > 0 else float("nan")
            out.append(LatentDifference(factor, layout.occasions[k], float(mean.estimate), float(mean.se),
                                        tuple(mean.ci95), float(mean.p_value), float(d), float(var.estimate),
                                        float(var.se), float(first.estimate)))
    return tuple(out), (f"From the scalar model: each factor's mean at a later occasion against occasion "
                        f"{layout.said(0)} (whose means are fixed at 0); d: the change over the pooled latent "
                        f"standard deviation of the two occasions; Var. ratio: the factor's variance at that occasion "
                        f"over its variance at occasion {layout.said(0)}.")


def _description(spec: Spec):
    """The one-occasion model in the terms of a methods section (model.description.describe): its factors, their
    items, its 'covary' and 'uncorrelated' statements, as each occasion holds them."""
    from cfa_tool.model.description import describe
    from cfa_tool.model.parameters import build_parameter_table

    return describe(spec, build_parameter_table(spec, mean_structure=True))


def _later_entries(table, kinds: tuple[str, ...]) -> list:
    """The entries of ``kinds`` that an equality holds to an earlier occasion's (one free parameter shared by
    several entries: the model's 'equal' statements over the occasions), each but the first of its parameter, as the
    candidates of the score tests of a step's equalities (assessment.modification.score_tests): releasing one frees
    that occasion's parameter from the first occasion's."""
    seen: set[int] = set()
    out = []
    for par in table.parameters:
        if par.kind in kinds and len(par.terms) == 1:
            index = par.terms[0][0]
            if index in seen:
                out.append((par.kind, par.variables, par.matrix, par.row, par.col))
            seen.add(index)
    return out


def _constraint_tests(step_spec: Spec, wide: pd.DataFrame, kinds: tuple[str, ...], test: str | None,
                      max_iterations: int = check.ITERATION_LIMIT) -> tuple:
    """The score tests (largest first) of a step's equalities over the occasions: the step's model fitted again to the
    rows compare fitted (those with some answer), its estimates the same, and each later occasion's equal entry
    released in turn (normal-theory score tests, Sörbom 1989; with a robust test the generalized ones of Satorra
    1989, as the ladder across groups reads them: workflows.invariance.NormalLadder.constraint_tests)."""
    from dataclasses import replace

    from cfa_tool.assessment.modification import score_tests
    from cfa_tool.assessment.robust_scores import robust_score_tests
    from cfa_tool.pipeline.continuous import estimate
    from cfa_tool.pipeline.inputs import make_options, moments_for

    answered = wide[list(step_spec.observed_names)].notna().to_numpy().any(axis=1)
    options = replace(make_options({"missing": MissingData.FULL_INFORMATION.value, "test": test,
                                    "max_iterations": max_iterations}),
                      diagnostics=False)
    groups, _ = moments_for(step_spec, wide.loc[answered], "the occasions side by side", None, None,
                            MissingData.FULL_INFORMATION)
    est = estimate(step_spec, groups, options)
    found = score_tests(est.model, est.theta, est.likelihood, [_later_entries(est.table, kinds)])
    if test is not None:
        found = robust_score_tests(found, est.model, est.theta, est.likelihood)
    return tuple(sorted(found, key=lambda c: -c.index))


def _ladder_test(tests, restricted: str, general: str):
    """The one difference test of a step against the one before among compare's tests of the pair, by the ladder's
    rule (workflows.nesting.scaled_difference): with robust fits the scaled difference (Satorra & Bentler 2001), or
    its strictly positive version (2010) when the 2001 correction is not positive; else the likelihood-ratio
    difference.  None when compare found the pair not nested."""
    pair = [t for t in tests if t.restricted == restricted and t.general == general]
    for method in (DifferenceMethod.SATORRA_BENTLER_2001, DifferenceMethod.SATORRA_BENTLER_2010):
        scaled = next((t for t in pair if t.method is method and not t.not_computed), None)
        if scaled is not None:
            return scaled
    return next((t for t in pair if t.method is DifferenceMethod.LIKELIHOOD_RATIO), None)


def invariance_over_occasions(model: str | Path | Spec, data: pd.DataFrame | str | Path,
                              occasion_column: str | None = None, id_column: str | None = None,
                              occasion_endings: Sequence[str] | None = None,
                              occasion_order: Sequence[str] | None = None, alpha: float | None = None,
                              decide_by: str | DecisionRule = DecisionRule.DIFFERENCE_TEST,
                              sheet: str | None = None, names_row: int | None = None,
                              first_data_row: int | None = None, missing_codes: tuple = (),
                              keep: tuple[str, ...] | list[str] = (), rename=None, test: str | None = None,
                              missing: str | None = None, max_iterations: int = check.ITERATION_LIMIT) -> OccasionsResult:
    """Fit the configural, metric, scalar and strict models over occasions of the same people (one group) and test
    each against the one before.  Long data: ``occasion_column`` and ``id_column`` (one row per person and occasion).
    Wide data: ``occasion_endings`` ('_t1', '_t2': the item vig1 at the first occasion is the column vig1_t1), with
    ``id_column`` optional.  ``test='robust'`` fits every step with the robust test and tests the steps by the
    scaled difference; rows with gaps are kept by full-information ML, which the scalar step's means need;
    ``max_iterations``: the iteration limit of each step's fit, as for ``fit``."""
    for given, option in ((occasion_order, Option.OCCASION_ORDER), (occasion_endings, Option.OCCASION_ENDINGS)):
        if isinstance(given, str):  # its characters would be read as the occasions (hostile s27)
            what = "labels" if given is occasion_order else "endings"
            raise OptionError(f"{option} takes a list of the occasions' {what}"
                              f", one item each (['pre', 'post']), not one text ({given!r})")
    rule = check.choice(DecisionRule, decide_by, "the decision rule")
    alpha = check.probability("alpha (the level of the difference tests)", 0.05 if alpha is None else alpha)
    if missing is not None and MissingData(missing) is MissingData.LISTWISE:
        raise OptionError(f"over occasions every step is fitted by full-information ML, which the means of the scalar "
                          f"step need in one group and which keeps a person missing at one occasion; "
                          f"{Option.INCOMPLETE_ROWS.given('listwise')} cannot apply")
    if (occasion_column is None) == (occasion_endings is None):
        raise OptionError("invariance over occasions needs either the column that tells the occasions apart (long "
                          "data, with the id column) or the endings of each occasion's columns (wide data), not "
                          + ("both" if occasion_column is not None else "neither"))
    spec = load_spec(model)
    _refuse_statements(spec)
    reading = dict(names_row=names_row, first_data_row=first_data_row, rename=rename)
    if occasion_column is not None:
        if not isinstance(id_column, str):
            raise OptionError(f"long data over occasions need the id column that names each person "
                              f"({Option.ID_COLUMN.given('COLUMN')}), to set each person's occasions side by side")
        for column, role in ((id_column, "the id column (an id column is never analysed)"),
                             (occasion_column, "the occasion column")):
            if column in spec.observed_names:  # the words of every other route (data.row_ids.row_ids)
                raise OptionError(f"'{column}' is a variable of the model and cannot also be {role}")
        if id_column == occasion_column:
            raise OptionError(f"'{id_column}' cannot be both the id column and the occasion column")
        _, loaded, read_notes = read_inputs_with_notes(spec, data, sheet, missing_codes, keep,
                                                       (id_column, occasion_column), keeps_gaps=True,
                                                       listwise_applies=False, chosen=_chosen(id_column, occasion_column), **reading)
        for column in (occasion_column, id_column):
            if column not in loaded.frame.columns:
                raise DataError(f"{shown_path(loaded.source)}: no column '{column}'")
        _refuse_split_people(loaded, id_column)
        try:
            wide, layout, shaped = wide_from_long(loaded.frame, spec.observed_names, id_column, occasion_column,
                                                  loaded.source, occasion_order)
        except (DataError, OptionError) as error:  # the same kind of error, saying what the run read the rows after
            kind = OptionError if isinstance(error, OptionError) else DataError  # (a row's error needs its row)
            raise kind(f"{error}{_as_read_after(keep, missing_codes)}") from None
        # the cautions on the rows of the long file, named by its rows and each row by its person and occasion (an id
        # repeats once per occasion by design, and no id twice at one occasion is left: wide_from_long), not those of
        # the rows set side by side, which no file holds
        frame = loaded.frame
        ids = ids_by_row_number(frame[id_column].map(id_text) + " at " + frame[occasion_column].map(id_text), frame)
        long_problems = data_problems(analysed_odd_values(loaded, spec, None), spec, ids=ids, id_column=id_column,
                                      takes_design=False)  # over occasions no --cluster applies yet
    else:
        if occasion_order is not None:  # the endings' order is the occasions' order
            raise OptionError(f"the endings of wide data give the occasions' order ({Option.OCCASION_ORDER} is for "
                              f"long data, with {Option.OCCASION_COLUMN})")
        endings = tuple(str(e) for e in occasion_endings)
        if len(endings) < 2 or len(set(endings)) < len(endings) or not all(endings):
            raise OptionError(f"wide data over occasions need two or more different column endings, one per "
                              f"occasion, not {', '.join(repr(e) for e in endings) or 'none'}")
        layout = OccasionLayout(tuple(e.strip("_ .-") or e for e in endings), endings)
        if len(set(layout.occasions)) < len(endings):  # '_1' and '-1': two occasions both called 1 (hostile s27)
            raise OptionError(f"the column endings {', '.join(repr(e) for e in endings)} name occasions that read "
                              f"alike ({', '.join(layout.occasions)}): give endings that differ in more than their "
                              f"punctuation, such as '_t1', '_t2'")
        clash = layout.clash((*spec.observed_names, *spec.factor_names))
        if clash:
            raise OptionError(f"the column endings {', '.join(repr(e) for e in endings)} make names of two items (or "
                              f"factors) at two occasions alike: {clash}; give endings that keep them apart, such as "
                              f"'_t1', '_t2'")
        wide_source = f"{spec.source} (every item at every occasion)"
        wide_spec = parse_model(step_text(spec, layout, "configural"), wide_source)
        try:
            _, loaded, read_notes = read_inputs_with_notes(wide_spec, data, sheet, missing_codes, keep,
                                                           (id_column,) if isinstance(id_column, str) else (),
                                                           keeps_gaps=True, listwise_applies=False, **reading)
        except ModelError as error:  # a column of the model of every occasion, not a line of the user's file
            if error.location is None or error.location.source != wide_source:
                raise
            raise DataError(f"wide data over occasions need a column for every item at every occasion (the item's "
                            f"name with the ending of the occasion: {', '.join(endings)}): {error.message}") from None
        wide, shaped = loaded.frame, []
        # the cautions on the file's rows, named by the file's rows (not the rows of a data frame compare reads)
        ids = (ids_by_row_number(loaded.frame[id_column].map(id_text), loaded.frame)
               if isinstance(id_column, str) and id_column in loaded.frame.columns else None)
        long_problems = tuple(_one_row_per_person(p, endings) for p in data_problems(
            analysed_odd_values(loaded, wide_spec, None), wide_spec, ids=ids,
            id_column=id_column if ids is not None else None, takes_design=False))
    people = occasion_people(wide, spec, layout, loaded.frame if occasion_column is not None else None, id_column)
    try:
        _refuse_no_one_at_both(people, loaded, occasion_column, id_column)
    except DataError as error:
        raise DataError(f"{error}{_as_read_after(keep, missing_codes)}") from None
    texts = tuple(step_text(spec, layout, level) for level, _, _ in LEVELS)
    specs = [parse_model(text, f"{spec.source} ({level} over occasions)") for text, (level, _, _) in zip(texts, LEVELS)]
    from cfa_tool.workflows.compare import NoneEstimated, compare

    words = _OccasionWords(spec, layout, max_iterations)
    try:
        found = compare(specs, wide, test=test, missing=MissingData.FULL_INFORMATION.value, id_column=id_column,
                        max_iterations=max_iterations)
    except NoneEstimated as error:  # the first step in this route's words and advice, as the ladder across groups
        # stops on a configural model it cannot estimate (s28: compare's message advised 'start' statements, which
        # this route refuses)
        raise EstimationError(_configural_failure(words.result(error.comparison.results[0]))) from None
    found = replace(found, results=tuple(words.result(r) for r in found.results),
                    notes=tuple(words.said(n) for n in found.notes))
    steps: list[InvarianceStep] = []
    for k, ((level, _, _), result) in enumerate(zip(LEVELS, found.results)):
        previous = steps[-1] if steps else None
        test_k = None if previous is None else _ladder_test(found.tests, found.names[k], found.names[k - 1])
        if not result.converged or (previous is not None and test_k is None):
            steps.append(InvarianceStep(level, result, test_k, False, (), any(not s.holds for s in steps)))
            break
        not_judged = unjudged(rule, (level, result), (previous.level, previous.result) if previous else None)
        untested = test_k is not None and test_k.df_difference == 0
        holds = bool(result.admissible and not untested and not not_judged and (
            configural_fits(result) if test_k is None else
            _step_holds(rule, test_k, alpha, result, previous.result, level)))
        srmr = None if previous is None else result.fit.srmr - previous.result.fit.srmr
        kinds = next(added for lv, _, added in LEVELS if lv == level)
        # the sources of a step's misfit: the score tests of its equalities where it did not hold (the ladder's rule)
        culprits = (_constraint_tests(specs[k], wide, kinds, test, max_iterations) if kinds and not holds and result.admissible
                    and not untested else ())
        steps.append(InvarianceStep(level, result, test_k, holds, culprits, any(not s.holds for s in steps),
                                    delta_srmr=srmr, unjudged=not_judged))
    problems = tuple(long_problems)
    named = {p.kind for p in problems}
    if occasion_column is None:  # wide data: the fit's cautions on the analysed answers (their tails, say) too, those
        # of the kinds named above by the file's rows left out
        problems += tuple(p for p in found.problems if p.kind not in named)
    else:  # long data: the cautions on each occasion's answers, which the long file's columns mix (an item nearly
        # constant at one occasion), those that name no row of the occasions side by side, which no file holds, each
        # name said by item and occasion
        problems += tuple(replace(p, explanation=words.said(p.explanation), advice=words.said(p.advice))
                          for p in found.problems if p.kind not in named and p.kind in _ANSWERS_SIDE_BY_SIDE)
    warnings: list[str] = []  # the steps' impossible solutions first, in the ladder's order, then the data's
    for step in steps:
        if step.result.converged and not step.result.admissible:
            warnings.append(f"the {step.level} model's solution is not admissible ("
                            + "; ".join(p.phrase() for p in step.result.problems if p.kind.inadmissible)
                            + "): its fit and its difference test cannot show that invariance holds")
        elif not step.result.converged:
            warnings.append(f"the {step.level} model did not converge ({step.result.message}); the ladder stops "
                            f"there")
    warnings += [p.line() for p in problems]
    few = people.few_together(occasion_column is not None)
    if few:  # before the ladder's own cautions: every covariance across the occasions rests on those people
        warnings.insert(0, few)
    if steps[0].result.admissible and steps[0].result.converged and not steps[0].holds and not steps[0].unjudged:
        warnings.insert(0, "the configural model does not fit by the guide values (" + _judged(_fit_values(
            steps[0].result)) + "): every later step compares models that already misfit, so its test says little "
            "about invariance; first find out why the model misfits (fit it at each occasion alone and read the "
            "modification indices and residuals), then test invariance")
    elif any(s.conditional for s in steps):
        first = next(s for s in steps if not s.holds)
        why = ("was not admissible" if first.result.converged and not first.result.admissible else
               f"could not be judged ({first.unjudged})" if first.unjudged else "did not hold")
        warnings.insert(0, f"the {first.level} step {why}, so the steps after it compare models that already fail "
                           f"it; they are marked as conditional on a rejected step")
    changes, note = _latent_changes(steps, spec, layout)
    gaps = bool(wide[list(specs[0].observed_names)].isna().to_numpy().any())
    return OccasionsResult(occasion_column, id_column, layout, tuple(steps), texts[:len(steps)], alpha, rule,
                           tuple(warnings),
                           tuple(read_notes) + tuple(shaped) + people.notes(occasion_column is not None)
                           + tuple(found.notes), problems, changes, note, people.analysed, gaps, people_counts=people,
                           one_occasion=_description(spec),
                           factor_items=tuple((f.name.text, tuple(i.text for i in f.indicators)) for f in spec.factors))


#: the keywords of :func:`invariance_over_occasions`
OCCASIONS_KEYWORDS = own_keywords(invariance_over_occasions)
