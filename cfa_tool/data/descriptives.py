"""Per-item description for the descriptives table every paper has: how many rows answered the item,
and the shape of its distribution."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from cfa_tool.language.names import written_name
from cfa_tool.note_parts import Command, Note
from cfa_tool.numbers import cut_list, user_number
from cfa_tool.options import option_in_both


@dataclass(frozen=True)
class ItemShape:
    """Per item: the rows answering it, its skewness and its excess kurtosis."""
    answered: tuple[int, ...]  # rows with an answer, per item
    skewness: tuple[float, ...]  # g1 = m3 / m2^(3/2)
    kurtosis: tuple[float, ...]  # excess kurtosis g2 = m4 / m2^2 - 3


def item_shape(rows: np.ndarray) -> ItemShape:
    """Sample skewness g1 and excess kurtosis g2 of each column from its answered values (the moment
    estimators with divisor N, type 1 of Joanes & Gill 1998), gaps (NaN) left out item by item."""
    totals = rows.sum(axis=0)
    complete = not np.isnan(totals).any()  # a gap (NaN) spreads through its column's sum
    answered = np.full(rows.shape[1], len(rows)) if complete else len(rows) - np.isnan(rows).sum(axis=0)
    mean = _plain_mean if complete else np.nanmean  # complete rows: the plain mean is several times faster
    with np.errstate(invalid="ignore", divide="ignore"):
        centred = rows - (totals / len(rows) if complete else mean(rows, axis=0))
        squares = centred * centred
        m2 = mean(squares, axis=0)
        # the cubes and fourth powers overwrite the arrays they come from: two arrays the size of the data, not
        # four (on a questionnaire's thousand rows, allocating each costs more than the arithmetic)
        m3 = mean(np.multiply(squares, centred, out=centred), axis=0)
        m4 = mean(np.multiply(squares, squares, out=squares), axis=0)
        skew = np.where(m2 > 0, m3 / m2 ** 1.5, np.nan)
        kurt = np.where(m2 > 0, m4 / m2 ** 2 - 3.0, np.nan)
    return ItemShape(tuple(answered.tolist()), tuple(skew.tolist()), tuple(kurt.tolist()))


def _plain_mean(rows: np.ndarray, axis: int) -> np.ndarray:
    """numpy's mean of rows without gaps (the sum divided by the count, as np.mean computes it) without its checks."""
    return rows.sum(axis=axis) / rows.shape[axis]


def answer_extremes(values: np.ndarray, answered: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """The lowest and the highest answer of each column of ``values`` (rows by items): what the few-categories note
    and the screening for values that are not answers (data.odd_values) both start from.  ``answered``: the cells
    that count as answers (default: the finite ones, gaps NaN and infinite values left out); a column without any
    gives +inf and -inf."""
    if answered is None:
        answered = np.isfinite(values)
    if answered.all():  # no gaps (the common case): reductions without a mask
        return values.min(axis=0, initial=np.inf), values.max(axis=0, initial=-np.inf)
    return (values.min(axis=0, initial=np.inf, where=answered),
            values.max(axis=0, initial=-np.inf, where=answered))


@dataclass(frozen=True, eq=False)
class AnswerExtremes:
    """Each column's lowest and highest answer of one array of item values (:func:`answer_extremes`), made once per
    fit and read by every check of that array: the screening for values that are not answers (data.odd_values),
    the few-categories note (:func:`few_category_items`) and the answer ranges of the data summary.  ``of`` is the
    array itself, so that a reader holding any other array (rows left out, columns reordered, a group's rows) takes
    its own (:meth:`for_values`)."""

    of: np.ndarray = field(repr=False)
    low: np.ndarray
    high: np.ndarray

    def for_values(self, values: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
        """(lowest, highest) of each column when ``values`` is the very array they are of, else None."""
        return (self.low, self.high) if values is self.of else None


def shared_extremes(values: np.ndarray | None) -> AnswerExtremes | None:
    """:class:`AnswerExtremes` of ``values`` over their answered cells (gaps NaN left out), or None where readers'
    rules of what counts as an answer could differ: where some extreme is not finite (an infinite value, which the
    screening for values that are not answers leaves out and the few-categories check keeps, or a column without
    any answer).  Where every extreme is finite no cell is infinite, so the finite cells are the answered ones and
    every reader's extremes are these."""
    if values is None or not values.size:
        return None
    low, high = answer_extremes(values, ~np.isnan(values))
    if not (np.isfinite(low).all() and np.isfinite(high).all()):
        return None
    return AnswerExtremes(values, low, high)


#: items answered in at most this many categories are, by common practice, analysed as ordered categories
#: rather than as continuous (Rhemtulla, Brosseau-Liard & Savalei 2012: maximum likelihood on Pearson
#: covariances does well from about five categories on)
FEW_CATEGORIES = 4


#: an answer given by fewer rows than this many (or than RARE_SHARE of the rows answering the item, whichever is more) is
#: rare: a category of so few rows leaves its threshold and the polychoric correlations it enters resting on those
#: rows (:func:`rare_answer_limit`; a rule of thumb of this project, not a published cutoff)
NEARLY_CONSTANT_ROWS = 5
RARE_SHARE = 0.01
#: an item is nearly constant when one answer is given by all the rows answering it but fewer than NEARLY_CONSTANT_ROWS,
#: or but at most this share of them (the common answer given by 98% of the rows or more: at 400 rows, up to 8 other
#: answers): its variance, and its loading's size and sign, rest on those few rows.  Where the line lies is common
#: practice, not a published cutoff: a researcher calls an item nearly constant when some 98-99% of the sample gave one
#: answer (recalled from memory; screening rules of 'near-zero variance' in data analysis draw it at about 95:5 of the
#: two most common answers, a looser line); the share extends the rule for items answered by few rows
#: (pipeline.inputs.few_answers_problems).  A tester found the former line (1%, at least 5 rows) missing items with 5 to 8
#: other answers of 400 (session note s23).
NEARLY_CONSTANT_SHARE = 0.02
#: where the line lies, in the words of the caution
NEARLY_CONSTANT_WORDS = (f"one answer given by {100 - 100 * NEARLY_CONSTANT_SHARE:.0f}% or more of the rows answering, "
                         f"or by all but fewer than {NEARLY_CONSTANT_ROWS}: a line of common practice, not a published "
                         f"cutoff")


@dataclass(frozen=True)
class NearlyConstant:
    """An item that all rows but ``others`` of the ``answered`` ones answered ``common``."""

    name: str
    common: float
    others: int
    answered: int


def rare_answer_limit(answered: int) -> float:
    """How few rows make an answer rare among ``answered`` rows: fewer than NEARLY_CONSTANT_ROWS, or than RARE_SHARE
    of them when that is more."""
    return max(NEARLY_CONSTANT_ROWS, RARE_SHARE * answered)


def few_others(others, answered):
    """Whether ``others`` answers other than an item's common one, of ``answered`` rows, leave it nearly constant
    (arrays elementwise): fewer than NEARLY_CONSTANT_ROWS, or at most NEARLY_CONSTANT_SHARE of the rows."""
    others, answered = np.asarray(others), np.asarray(answered)
    return (others < NEARLY_CONSTANT_ROWS) | (others <= NEARLY_CONSTANT_SHARE * answered + 1e-9)


def nearly_constant_items(values: np.ndarray, names: tuple[str, ...]) -> tuple[NearlyConstant, ...]:
    """The items (columns of ``values``, gaps NaN) whose answers differ from their most common answer in at
    least one row but in few enough to leave them nearly constant (:func:`few_others`), and in fewer rows than that
    answer's."""
    found = []
    answered = np.isfinite(values).sum(axis=0)
    limits = np.maximum(NEARLY_CONSTANT_ROWS, NEARLY_CONSTANT_SHARE * answered + 1)
    # an answer held by all rows but fewer than the limit holds more than half of them when the limit is below half,
    # so it is the middle answer: only such items (and those of so few rows that the limit reaches half) are counted.
    # The middle answers by a partial sort (each column's answer at its middle place found, the columns not sorted
    # through: the same values as a sort gives there; gaps, NaN, go last in both)
    half = answered // 2
    middle = (np.partition(values, np.unique(half), axis=0)[half, np.arange(values.shape[1])]
              if values.size else np.zeros(values.shape[1]))
    others = answered - (values == middle).sum(axis=0)
    candidates = (answered > 0) & ((others < limits) | (limits >= answered / 2))
    for j, name in enumerate(names):
        if not candidates[j]:
            continue
        column = values[:, j]
        column = column[np.isfinite(column)]
        if not len(column):
            continue
        levels, counts = np.unique(column, return_counts=True)
        others = len(column) - int(counts.max())
        # the common answer must also outnumber the others together: among 5 rows answered 5 ways, none is
        # "the answer of all rows but 4" (a tiny sample's limit of 5 rows reaches every row)
        if 0 < others < int(counts.max()) and few_others(others, len(column)):
            found.append(NearlyConstant(name, float(levels[counts.argmax()]), others, len(column)))
    return tuple(found)


def few_category_items(values: np.ndarray, names: tuple[str, ...],
                       extremes: AnswerExtremes | None = None) -> tuple[str, ...]:
    """The items (columns of ``values``, gaps NaN) answered in whole numbers spanning at most FEW_CATEGORIES
    values (so at most that many categories), with two categories at least; a nearly constant item
    (:func:`nearly_constant_items`) is not among them: analysed as ordered categories its rare category leaves the
    polychoric correlations undetermined, and a caution names it instead.  ``extremes``: :func:`shared_extremes`
    of ``values`` when the caller has them."""
    if not values.size:  # no rows (the reading of the data says so)
        return ()
    known = extremes.for_values(values) if extremes is not None else None
    answered = None if known is not None else ~np.isnan(values)
    low, high = known if known is not None else answer_extremes(values, answered)
    few = (high > low) & (high - low <= FEW_CATEGORIES - 1)
    if not few.any():  # no item spans so few values (the common case): no whole numbers to look for
        return ()
    if answered is None:
        answered = ~np.isnan(values)
    near = np.flatnonzero(few)  # whole numbers looked for in those items alone
    part, given = values[:, near], answered[:, near]
    with np.errstate(invalid="ignore"):
        few[near] = np.all(~given | (part == np.round(part)), axis=0)
    if not few.any():
        return ()
    candidates = tuple(name for name, flag in zip(names, few) if flag)
    constant = {c.name for c in nearly_constant_items(values[:, few], candidates)}
    return tuple(name for name in candidates if name not in constant)


#: an item of whole-number answers with more than this share of its answers in its lowest or its highest category
#: has its answers piled at one end (a ceiling or a floor): a rule of thumb of this project (common practice speaks of
#: floor and ceiling effects without one cutoff for items; half the answers in one end category leaves the item
#: few informative categories), not a published cutoff
PILED_UP_SHARE = 0.5


@dataclass(frozen=True)
class PiledUp:
    """An item whose answers pile up at one end: its name, the end's answer, the share of its answers there, and
    whether it is the highest (a ceiling) or the lowest (a floor)."""

    name: str
    answer: float
    share: float
    ceiling: bool


def piled_up_items(values: np.ndarray, names: tuple[str, ...], extremes: AnswerExtremes | None = None,
                   skip: tuple[str, ...] = ()) -> tuple[PiledUp, ...]:
    """The items (columns of ``values``, gaps NaN; not those of ``skip``: the few-category items, named by their own
    rule) answered in whole numbers over more than :data:`FEW_CATEGORIES` values with more than
    :data:`PILED_UP_SHARE` of their answers in the lowest or highest of them; a nearly constant item
    (:func:`nearly_constant_items`) is not among them, a caution names it.  Analysed as continuous by maximum
    likelihood such items give loadings that tend to be too small and a test that rejects too often (Muthén &
    Kaplan 1985; Rhemtulla, Brosseau-Liard & Savalei 2012, their asymmetric thresholds)."""
    if not values.size:
        return ()
    known = extremes.for_values(values) if extremes is not None else None
    answered = ~np.isnan(values)
    low, high = known if known is not None else answer_extremes(values, answered)
    wide = (high - low > FEW_CATEGORIES - 1) & np.isfinite(low) & np.isfinite(high)
    wide &= np.array([name not in skip for name in names], dtype=bool)
    if not wide.any():
        return ()
    counts = answered.sum(axis=0)
    with np.errstate(invalid="ignore"):
        at_low, at_high = (values == low).sum(axis=0), (values == high).sum(axis=0)
        whole = np.all(~answered | (values == np.round(values)), axis=0)
    share_low, share_high = at_low / np.maximum(counts, 1), at_high / np.maximum(counts, 1)
    piled = wide & whole & ((share_low > PILED_UP_SHARE) | (share_high > PILED_UP_SHARE))
    if not piled.any():
        return ()
    candidates = tuple(name for name, flag in zip(names, piled) if flag)
    constant = {c.name for c in nearly_constant_items(values[:, piled], candidates)}
    return tuple(PiledUp(name, float(high[k] if share_high[k] > PILED_UP_SHARE else low[k]),
                         float(max(share_high[k], share_low[k])), bool(share_high[k] > PILED_UP_SHARE))
                 for k, name in enumerate(names) if piled[k] and name not in constant)


def few_category_note(few: tuple[str, ...], names: tuple[str, ...], piled: tuple[PiledUp, ...] = ()) -> Note | None:
    """The note of a fit that treats ``few`` (:func:`few_category_items` of the items ``names``) and ``piled``
    (:func:`piled_up_items`) as continuous, with the ordinal fit of them all as the remedy: one note of the items
    whose answers are ordered categories a continuous fit describes poorly (None when there are none)."""
    if not few and not piled:
        return None
    chosen = tuple(dict.fromkeys(few + tuple(p.name for p in piled)))
    which = "all" if len(chosen) == len(names) else ",".join(written_name(x) for x in chosen)
    if which != "all" and which != ",".join(chosen):  # names written in double quotes: the list in single quotes
        which = f"'{which}'"
    parts: list[str] = []
    if few:
        one = len(few) == 1
        parts.append(f"{len(few)} of the {len(names)} items ({cut_list(few, 8)}) {'has' if one else 'have'} at most "
                     f"{FEW_CATEGORIES} answer categories and {'is' if one else 'are'} analysed here as continuous by "
                     f"maximum likelihood; with so few categories loadings tend to come out too small and the fit to "
                     f"be misjudged, and analysing the answers as ordered categories is usually preferred (Rhemtulla, "
                     f"Brosseau-Liard & Savalei 2012)")
    if piled:
        one = len(piled) == 1
        shown = cut_list(piled, 8, lambda p: f"{p.name} {round(100 * p.share)}% at {user_number(p.answer)}")
        parts.append(f"{'Of the other items, ' if few else ''}{len(piled)}{'' if few else f' of the {len(names)} items'} "
                     f"{'has' if one else 'have'} more than half of {'its' if one else 'their'} answers at {'its' if one else 'their'} "
                     f"highest or lowest answer ({shown}), a ceiling or a floor, and {'is' if one else 'are'} analysed here as "
                     f"continuous by maximum likelihood; with answers piled at one end loadings tend to come out too "
                     f"small and the test to reject too often, and analysing the answers as ordered categories is "
                     f"usually preferred (Muthén & Kaplan 1985; Rhemtulla, Brosseau-Liard & Savalei 2012; more than "
                     f"half: this project's rule of thumb)")
    return Note((". ".join(parts),
                 Command(": " + option_in_both(f"--ordinal {which}",
                                               "ordinal=" + repr("all" if which == "all" else list(chosen)))),
                 Command(ANSWERS_PER_CATEGORY)))


#: where a fit that analyses items of few categories as continuous (and so shows no table of their answers) sends
#: its reader for the rows giving each answer: check's table (data.answer_counts), before any fit
ANSWERS_PER_CATEGORY = (". The check command shows how many rows gave each answer to each item, empty and rare "
                        "categories marked: "
                        + option_in_both("cfa-tool check MODEL --data FILE", "cfa_tool.check(model, data)"))
