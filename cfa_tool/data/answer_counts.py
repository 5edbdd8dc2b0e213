"""How many rows gave each answer to each item of few answer categories, in the whole sample or in each group: what a
researcher reads before an ordinal fit (which categories are empty, which answered by so few rows that a threshold
beside them rests on those few answers), shown by ``check`` and by the ordinal fit's report from this one count."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cfa_tool.numbers import user_number
from cfa_tool.data.descriptives import rare_answer_limit
from cfa_tool.language.spec import join_statement


@dataclass(frozen=True)
class AnswerCounts:
    """The rows giving each answer code (``codes``, ascending: the table's columns) to each item (``items``), in the
    group ``group`` (None: the whole sample).  ``counts[i][j]``: rows of item i that gave code j; ``scale[i]``: the
    codes of item i's scale, from its lowest to its highest answer in any group (a code there that no row of this
    group gave is an empty category; outside it the item has no such answer); ``labels[i]``: (code, words) of item i
    from the data file's value labels or the model's 'answers' statements."""

    group: str | None
    items: tuple[str, ...]
    codes: tuple[float, ...]
    counts: tuple[tuple[int, ...], ...]
    scale: tuple[tuple[float, ...], ...]
    labels: tuple[tuple[tuple[float, str], ...], ...] = ()
    #: the codes and words of no answer the run gave (--missing-codes), which advice to give another keeps
    #: (data.non_answers.codes_given)
    given: tuple = ()
    #: the model's 'join answers' statements (data.joined_answers.joins_record): (items, codes joined, their code);
    #: the counts are of the categories as analysed, so a code joined into another holds none of its own
    joined: tuple = ()

    def joined_into(self, i: int, code: float) -> float | None:
        """The code that ``code`` of item ``i`` was joined into by a 'join answers' statement (None: not joined)."""
        for items, values, into in self.joined:
            if self.items[i] in items and code in values and code != into:
                return into
        return None

    def answered(self, i: int) -> int:
        """Rows that answered item ``i``."""
        return sum(self.counts[i])

    def empty(self, i: int, j: int) -> bool:
        """Code ``j`` is on item ``i``'s scale but no row here gave it."""
        return self.counts[i][j] == 0 and self.codes[j] in self.scale[i] and self.joined_into(i, self.codes[j]) is None

    def sparse(self, i: int, j: int) -> bool:
        """Code ``j`` of item ``i`` was given by fewer rows than :func:`data.descriptives.rare_answer_limit` of the
        item's answers (fewer than 5, or than 1% of them when that is more: a rule of thumb of this project, not a
        published cutoff), but by some."""
        return 0 < self.counts[i][j] < rare_answer_limit(self.answered(i))

    def flagged(self, i: int) -> bool:
        """Item ``i`` has an empty or a sparse category."""
        return any(self.empty(i, j) or self.sparse(i, j) for j in range(len(self.codes)))

    def to_dict(self) -> dict:
        return {"group": self.group, "codes": list(self.codes),
                "items": {name: {user_number(code): count for code, count, in_scale in
                                 zip(self.codes, counts, [c in scale for c in self.codes]) if in_scale or count}
                          for name, counts, scale in zip(self.items, self.counts, self.scale)}} | (
            {"joined_answers": [{"items": list(items), "codes": list(values), "as": into}
                                for items, values, into in self.joined]} if self.joined else {})


def category_items(values: np.ndarray, names: tuple[str, ...], most: int) -> tuple[str, ...]:
    """The items (columns of ``values``, gaps NaN) whose answers are whole numbers of at most ``most`` different
    values: those a table of answers per category can show (the others are measured on a finer scale)."""
    out = []
    for j, name in enumerate(names):
        column = values[:, j]
        column = column[np.isfinite(column)]
        if len(column) and (column == np.round(column)).all() and len(np.unique(column)) <= most:
            out.append(name)
    return tuple(out)


def answer_counts(parts: list[tuple[str | None, np.ndarray]], names: tuple[str, ...], items: tuple[str, ...],
                  labels: dict[str, dict] | None = None, given: tuple = (), joined: tuple = ()) -> tuple[AnswerCounts, ...]:
    """The :class:`AnswerCounts` of ``items`` in each part of the rows (``parts``: (group label or None, the values
    of ``names`` in its rows, gaps NaN)), every part on the same columns: the codes any part gave to any of the
    items.  An item's scale runs from its lowest to its highest answer over all parts, so that a category one group
    never gave while another did shows as empty.  ``labels``: item -> {code: words} (value labels of the file, or
    the words of 'answers' statements); ``given``: the codes and words of no answer the run gave; ``joined``: the
    model's 'join answers' statements, whose joins ``parts`` hold already (data.joined_answers.joins_record)."""
    labels = labels or {}
    columns = [names.index(x) for x in items]
    seen = [np.concatenate([v[:, j][np.isfinite(v[:, j])] for _, v in parts]) for j in columns]
    codes = np.unique(np.concatenate(seen)) if seen else np.zeros(0)
    scale = tuple(tuple(float(c) for c in codes if len(s) and s.min() <= c <= s.max()) for s in seen)
    named = tuple(tuple((float(c), str(labels[x][key])) for c in codes for key in _keys(labels.get(x, {}), c))
                  for x in items)
    out = []
    for label, values in parts:
        counts = []
        for j in columns:
            column = values[:, j]
            found = column[np.isfinite(column)]
            counts.append(tuple(int(n) for n in (found[:, None] == codes[None, :]).sum(axis=0)))
        out.append(AnswerCounts(label, tuple(items), tuple(float(c) for c in codes), tuple(counts), scale, named,
                                tuple(given), tuple(joined)))
    return tuple(out)


def _keys(item_labels: dict, code: float) -> list:
    """The key of ``code`` among an item's value labels (a float, an int or its text), as a list of at most one."""
    for key in (code, int(code) if float(code).is_integer() else code, user_number(code), f"{code:g}"):
        if key in item_labels:
            return [key]
    return []


def join_advice(parts) -> tuple[str, ...]:
    """The 'join answers' statements that join each empty or sparse category of ``parts`` (:class:`AnswerCounts`, one
    per group, on the same items) with its neighbours (:func:`joins_of_marked`), items joined alike in one statement
    (language.spec.join_statement, the one writer, so that the advice parses: tests/language); () when no category is
    marked or none can be joined."""
    parts = tuple(parts)
    if not parts:
        return ()
    joins: dict[tuple[tuple[float, ...], float], list[str]] = {}
    for i, name in enumerate(parts[0].items):
        scale = sorted({c for a in parts for c in a.scale[i]})
        total = {c: sum(a.counts[i][a.codes.index(c)] for a in parts if c in a.codes) for c in scale}
        marked = {c for a in parts for j, c in enumerate(a.codes)
                  if c in scale and (a.empty(i, j) or a.sparse(i, j))}
        for join in joins_of_marked(scale, marked, total):
            joins.setdefault(join, []).append(name)
    return joined_statements(joins)


def joined_statements(joins: dict) -> tuple[str, ...]:
    """(codes, code) -> items, as 'join answers' statements."""
    return tuple(join_statement(values, into, items) for (values, into), items in joins.items())


def joins_of_marked(scale, marked, total) -> list[tuple[tuple[float, ...], float]]:
    """The joins (codes, their code) of an item of the categories ``scale`` that join each ``marked`` category (empty
    or rare) with its neighbours towards the middle of the scale up to the first category not marked, whose code the
    joined category takes (so it keeps its place); at the middle, towards the neighbour given by more rows
    (``total``: rows per category).  Runs that share a code are one join; none when fewer than two categories would
    be left unmarked (the item's answers are too few to join: leaving it out is the way)."""
    scale = sorted(scale)
    if not marked or len(scale) < 3 or len(marked) >= len(scale) - 1:
        return []
    middle = (scale[0] + scale[-1]) / 2
    runs: list[set[float]] = []
    for c in sorted(marked):
        k = scale.index(c)
        step = 1 if c < middle else -1 if c > middle else (
            1 if total.get(scale[min(k + 1, len(scale) - 1)], 0) >= total.get(scale[max(k - 1, 0)], 0) else -1)
        run = [c]
        while 0 <= k + step < len(scale) and scale[k] in marked:
            k += step
            run.append(scale[k])
        if scale[k] not in marked:
            runs.append(set(run))
    merged: list[set[float]] = []
    for run in runs:
        for m in merged:
            if m & run:
                m |= run
                break
        else:
            merged.append(set(run))
    return [(tuple(sorted(m)), next(c for c in sorted(m, key=lambda c: -total.get(c, 0)) if c not in marked))
            for m in merged]
