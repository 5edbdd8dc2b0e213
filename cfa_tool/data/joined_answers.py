"""Neighbouring answer categories of ordinal items analysed as one: the model's 'join answers' statements applied to
the rows read, once, after its 'answers' statements coded answer words (data.answer_words) and before any command
reads thresholds, correlations or counts of answers from them, so that fit, compare, invariance (the same join in
every group), replicate, bootstrap, scores and cutoffs analyse the same categories.

A joined category is coded as one of its codes, so it keeps its place among the item's answers: the item's
thresholds are then those of the recoded item, tau_c = Phi^-1(P(x <= c)) over its remaining categories (Olsson
1979), and its polychoric correlations those of the recoded table; the threshold between the joined categories is
no longer estimated."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from contextvars import ContextVar
from dataclasses import dataclass, field

import pandas as pd

from cfa_tool.errors import ModelError, OptionError, printable
from cfa_tool.language.spec import JoinedAnswers, Spec
from cfa_tool.numbers import count_text, counted, user_number, word_list

#: the key of ``frame.attrs`` that keeps what the joins changed (a tuple of :class:`JoinedItem`)
JOINED = "joined_answers"


@dataclass
class _HeldAcross:
    """The files read inside :func:`held_across` and, per 'join answers' statement (by its place in the model), the
    codes its items were given there."""

    sources: list[str] = field(default_factory=list)
    held: dict[int, set[float]] = field(default_factory=dict)


_ACROSS: ContextVar[_HeldAcross | None] = ContextVar("joins_held_across", default=None)


@contextmanager
def held_across(spec: Spec, check: bool = True) -> Iterator[None]:
    """Inside: each code a 'join answers' statement of ``spec`` joins need be given by some row of all the files read
    together, not of each (replicate's calibration and validation files, whose rows the command analyses together,
    as a code is joined across groups where it is held: hostile s27, a validation file without the answer 1 refused
    the join the calibration file needed); the refusal, naming every file, when the reading is done.  ``check``
    False: no such refusal, the codes having been held where the join was chosen (scores --from-fit scores rows
    by an earlier fit's categories, and a file to score need not hold every one of them)."""
    across = _HeldAcross()
    token = _ACROSS.set(across)
    try:
        yield
    finally:
        _ACROSS.reset(token)
    if check:
        for k, join in enumerate(spec.joins):
            _refuse_not_there(spec, join, across.held.get(k, set()), across.sources)


@dataclass(frozen=True)
class JoinedItem:
    """What one 'join answers' statement did to one item: the codes ``values`` analysed as ``into``, and how many of
    the rows read gave each of them (``answered``, in the order of ``values``), before the join."""

    item: str
    values: tuple[float, ...]
    into: float
    answered: tuple[int, ...]
    line: int

    @property
    def recoded(self) -> int:
        """The answers the join recoded (those of the codes other than ``into``)."""
        return sum(c for v, c in zip(self.values, self.answered) if v != self.into)

    def to_dict(self) -> dict:
        return {"item": self.item, "codes": list(self.values), "as": self.into,
                "rows_per_code": {user_number(v): c for v, c in zip(self.values, self.answered)},
                "recoded": self.recoded, "line": self.line}


def _numbers(column: pd.Series) -> pd.Series:
    """A column's cells as numbers (text cells that hold a number read as that number, the rest NaN): how the reading
    of ordinal items will read them (data.moments.numeric_columns refuses what is not a number, with its row)."""
    if column.dtype.kind in "biuf":
        return column.astype(float)
    return pd.to_numeric(column.map(lambda v: v.strip() if isinstance(v, str) else v), errors="coerce")


def _scale(spec: Spec, item: str, held: set[float]) -> list[float]:
    """The categories of ``item``'s scale: the codes the rows read hold, with the codes an 'answers' statement gives
    the item (categories of its scale even where no row chose them)."""
    coding = spec.answer_codings().get(item)
    return sorted(held | set(coding.codes() if coding is not None else ()))


def _codes(values) -> str:
    return word_list([user_number(v) for v in sorted(values)])


def join_answers(spec: Spec, frame: pd.DataFrame, source: str) -> tuple[pd.DataFrame, list[str]]:
    """``frame`` (a copy; the caller's is not changed) with the answers of each 'join answers' statement's items
    recoded (every code joined as the statement's ``as`` code), the record kept in ``frame.attrs[JOINED]``, and one
    note per statement; unchanged without such statements.

    Refused, each at the statement's line: a code no item of the statement was given in the rows read (the statement
    would join a category that is not there, a typing error such as 'join answers 5, 6' on answers 1 to 5, and the
    methods text would name a join that joined nothing); codes that are not neighbours on an item's scale (a category
    between them, answered or given by an 'answers' statement, would be joined over); a join that leaves an item
    one category."""
    if not spec.joins:
        return frame, []
    frame = frame.copy()
    record: list[JoinedItem] = []
    notes = []
    across = _ACROSS.get()
    if across is not None:
        across.sources.append(source)
    for k, join in enumerate(spec.joins):
        done = [_join_item(spec, frame, source, join, item.text) for item in join.items if item.text in frame.columns]
        held_any = {v for item in done for v, c in zip(item.values, item.answered) if c}
        if across is None:
            _refuse_not_there(spec, join, held_any, [source])
        else:  # checked over every file read together (held_across)
            across.held.setdefault(k, set()).update(held_any)
        record += done
        notes.append(_note(join, done))
    frame.attrs[JOINED] = tuple(record)
    return frame, notes


def _refuse_not_there(spec: Spec, join: JoinedAnswers, held: set[float], sources: list[str]) -> None:
    """A code of ``join`` that no row of ``sources`` (one file, or several read together) gave any of its items: an
    error at the code's place in the statement (a typing error such as 'join answers 5, 6' on answers 1 to 5, and
    the methods text would name a join that joined nothing)."""
    missing = [v for v in join.values if v not in held]
    if not missing:
        return
    at = join.value_locations[join.values.index(missing[0])] if join.value_locations else join.location
    read = list(dict.fromkeys(sources))  # two data frames are both '<data frame>'
    where = (f"{read[0]}: no row read" if len(sources) == 1 else
             f"{word_list(read)}: no row of {'either' if len(sources) == 2 else 'any'} read" if len(read) > 1 else
             f"{read[0]}: no row of {'either' if len(sources) == 2 else 'any'} read")
    raise ModelError(f"{where} gave the answer {_codes(missing)} to {_items(join.item_names)}, so 'join answers' "
                     f"would join a category that is not there; list the codes of the categories to join as the "
                     f"data hold them", at, spec.source_line(at))


def _items(names) -> str:
    shown = [f"'{printable(x)}'" for x in names]
    return shown[0] if len(shown) == 1 else "any of " + word_list(shown)


def _join_item(spec: Spec, frame: pd.DataFrame, source: str, join: JoinedAnswers, item: str) -> JoinedItem:
    """Recode ``item``'s answers in ``frame`` by ``join``, after checking that its codes neighbour each other."""
    numbers = _numbers(frame[item])
    held = {float(v) for v in pd.unique(numbers.dropna())}
    fractional = sorted(v for v in held if v != round(v))
    if fractional:  # answers on a finer scale than categories: the item is no ordinal one (data.polychoric)
        where = next(i.location for i in join.items if i.text == item)
        raise ModelError(f"{source}: 'join answers' joins categories of ordinal items, and '{printable(item)}' has "
                         f"answers that are not whole numbers ({_codes(fractional[:3])}"
                         f"{', ...' if len(fractional) > 3 else ''}), as a continuous item has; remove it from the "
                         f"statement", where, spec.source_line(where))
    low, high = min(join.values), max(join.values)
    between = [v for v in _scale(spec, item, held) if low < v < high and v not in join.values]
    if between:
        raise ModelError(f"{source}: 'join answers' joins neighbouring categories, and '{printable(item)}' has the "
                         f"{'answer' if len(between) == 1 else 'answers'} {_codes(between)} between "
                         f"{user_number(low)} and {user_number(high)}; list {'it' if len(between) == 1 else 'them'} "
                         f"too, or join categories next to each other", join.location,
                         spec.source_line(join.location))
    left = {join.into if v in join.values else v for v in held}  # the categories as analysed
    if len(held) > 1 and len(left) < 2:
        raise ModelError(f"{source}: 'join answers' would leave '{printable(item)}' a single category "
                         f"({user_number(next(iter(left)))}), since its rows hold only the answers "
                         f"{_codes(held)}; an ordinal item needs at least two categories, so join fewer", join.location,
                         spec.source_line(join.location))
    answered = tuple(int((numbers == v).sum()) for v in join.values)
    merged = numbers.isin(join.merged).to_numpy(dtype=bool)
    if merged.any():
        column = frame[item]
        column = column.astype(float) if column.dtype.kind in "biuf" else column.astype(object)
        frame[item] = column.where(~merged, join.into)
    return JoinedItem(item, join.values, join.into, answered, join.location.line)


def _note(join: JoinedAnswers, done: list[JoinedItem]) -> str:
    """The note of one statement: which answers of which items are analysed as one category, and the rows recoded."""
    per_item = "; ".join(f"{printable(d.item)} " + word_list([f"{user_number(v)} ({counted(c, 'row')})"
                                                                for v, c in zip(d.values, d.answered)])
                         for d in done)
    recoded = sum(d.recoded for d in done)
    return (f"the answers {_codes(join.values)} of {word_list([printable(x) for x in join.item_names])} are analysed "
            f"as one category coded {user_number(join.into)} (the 'join answers' statement on line "
            f"{join.location.line}; {count_text(recoded)} {'answer' if recoded == 1 else 'answers'} recoded; as "
            f"answered: {per_item}): their thresholds, correlations and counts of answers per category are those of "
            f"the joined category")


def joins_record(spec: Spec) -> tuple:
    """The model's joins as a fit keeps them (pipeline.results.DataSummary.joined_answers): per statement, its items, the
    codes it joins and their code."""
    return tuple((join.item_names, tuple(sorted(join.values)), join.into) for join in spec.joins)


def joins_json(record: tuple) -> list[dict]:
    """The JSON of a :func:`joins_record`: [{"items": [...], "codes": [...], "as": code}]."""
    return [{"items": list(items), "codes": list(values), "as": into} for items, values, into in record]


def _joins_of(spec: Spec) -> dict[str, set]:
    """Item -> the (codes, code) of the joins of its categories."""
    return {x: {(tuple(sorted(j.values)), j.into) for j in joins} for x, joins in spec.joined_items().items()}


def refuse_different_joins(specs, names) -> None:
    """Models compared on one data file analyse its categories one way: an item whose categories two models join
    differently (or one joins and another does not) is an error naming the item and the models (the rows are read
    once, with the first model's joins)."""
    first = _joins_of(specs[0])
    for spec, name in zip(specs[1:], names[1:]):
        mine = _joins_of(spec)
        for item in set(spec.observed_names) & set(specs[0].observed_names):
            if first.get(item, set()) != mine.get(item, set()):
                raise OptionError(f"the models {names[0]} and {name} join the answer categories of "
                                  f"'{printable(item)}' differently (their 'join answers' statements differ, or one "
                                  f"has none); give the models the same 'join answers' statements")
        for item in set(mine) - set(specs[0].observed_names):
            raise OptionError(f"the model {name} joins answer categories of '{printable(item)}', which the first "
                              f"model {names[0]} does not analyse; the rows are read once for every model, so join "
                              f"its categories in the first model too, or in none")


def refuse_joins_for_summary_statistics(spec: Spec, source: str) -> None:
    """A 'join answers' statement cannot apply to summary statistics (no answers to recode): an error naming it."""
    if spec.joins:
        join = spec.joins[0]
        raise ModelError(f"the 'join answers' statement joins answer categories of ordinal items, and {source} holds "
                         f"summary statistics, not answers; remove the statement or give the rows of answers",
                         join.location, spec.source_line(join.location))


def refuse_joins_without_answers(spec: Spec, command: str, instead: str) -> None:
    """A 'join answers' statement in a command that reads no answers (power plans from the model alone,
    power-simulation draws its answers in the categories it is given): an error at its line, never left unapplied
    without a word (s26: analytic power ignored it); ``instead``: what the command does in its place."""
    if spec.joins:
        join = spec.joins[0]
        raise ModelError(f"'join answers' joins categories of the answers read from a data file, and {command} "
                         f"{instead}; remove the statement", join.location, spec.source_line(join.location))


def refuse_other_joins(spec: Spec, saved: list, source: str) -> None:
    """Scores of other data with a saved fit read the rows with the model file's joins, which must be the fit's
    (``saved``: its JSON's 'joined_answers'): other joins would put the answers on categories the fitted thresholds
    do not have.  An error otherwise."""
    def key(entries) -> set:
        return {(str(x), tuple(float(v) for v in e["codes"]), float(e["as"])) for e in entries for x in e["items"]}

    if key(joins_json(joins_record(spec))) != key(saved):
        raise OptionError(f"the model's 'join answers' statements join answer categories otherwise than the earlier "
                          f"fit {source} did; give the model file the fit was made with")
