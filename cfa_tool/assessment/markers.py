"""Markers that hardly measure their factor.

Under marker scaling a factor takes its unit from one loading fixed at 1 (Bollen 1989, ch. 7): the other loadings are
estimated relative to the marker's, and the factor's variance is the marker's common variance.  A marker whose
standardized loading is small (below .20 in absolute value: common practice, the size below which a loading is read
as negligible, the one level of :data:`cfa_tool.assessment.method_factors.SMALL_LOADING`) gives the factor a unit of
next to nothing: the factor's variance is near zero, the other loadings are large ratios, and their standard errors and
Wald tests, which are not invariant to the choice of the scaling (Gonzalez & Griffin 2001), describe the marker rather
than the items (hostile trial s23: a random-answer item listed first made items of standardized loadings .51 to .79
read as 'not significant', p = .46).  The standardized solution, the fit and every reliability coefficient are the
same under any scaling; the marker also gives the factor its direction, so a marker that hardly loads may turn the
factor against its items for no reason the data give.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from cfa_tool.assessment.admissibility import Problem, ProblemKind
from cfa_tool.assessment.method_factors import SMALL_LOADING, loading_size
from cfa_tool.language.names import reference_text, written_group, written_name
from cfa_tool.note_parts import Command, Note
from cfa_tool.numbers import user_number
from cfa_tool.numerics.plain import journal_decimal


@dataclass(frozen=True)
class WeakMarker:
    """A factor's marker whose standardized loading is below :data:`SMALL_LOADING` in size, in one group (``group``:
    its label, None with one group): its loading's fixed value, whether the model file fixed it (``by_model``; else the
    automatic marker), and the other loadings of the factor: (standardized loading, p) of each."""

    factor: str
    item: str
    group: str | None
    standardized: float
    fixed_at: float
    by_model: bool
    others: tuple[tuple[float, float], ...]


def weak_markers(estimates, leave_out: frozenset[str] = frozenset()) -> tuple[WeakMarker, ...]:
    """The markers of the estimate rows (``estimates``: EstimateRow) whose standardized loading is below
    :data:`SMALL_LOADING` in size.  A factor's marker: the one loading of it fixed at a value other than zero while its
    variance is estimated (the automatic marker, origin 'scale', or a 'fix' statement's); judged only where some other
    loading of the factor is not small (a factor whose every loading is small is a weak factor, which another marker
    would not mend).  ``leave_out``: factors not to judge (exploratory blocks)."""
    loadings: dict[tuple[str | None, str], list] = {}
    free_variance = set()
    for r in estimates:
        if r.kind == "loading" and r.variables[0] not in leave_out:
            loadings.setdefault((r.group, r.variables[0]), []).append(r)
        elif r.kind == "factor_variance" and r.free:
            free_variance.add((r.group, r.variables[0]))
    out = []
    for (group, factor), rows in loadings.items():
        fixed = [r for r in rows if not r.free and r.estimate != 0.0]
        if len(fixed) != 1 or (group, factor) not in free_variance:
            continue
        marker = fixed[0]
        if not math.isfinite(marker.standardized) or abs(marker.standardized) >= SMALL_LOADING:
            continue
        others = tuple((r.standardized, r.p_value) for r in rows if r.free)
        if not any(math.isfinite(s) and abs(s) >= SMALL_LOADING for s, _ in others):
            continue
        out.append(WeakMarker(factor, marker.variables[1], group, marker.standardized, marker.estimate,
                              marker.origin != "scale", others))
    return tuple(out)


@dataclass(frozen=True)
class WeakItem:
    """An item whose standardized loading on a factor is below :data:`SMALL_LOADING` in size, in one group
    (``group``: its label, None with one group), on a factor some other loading of which is not small: a weak item,
    which hardly measures the factor, whichever its sign."""

    factor: str
    item: str
    group: str | None
    standardized: float


def weak_items(estimates, leave_out: frozenset[str] = frozenset()) -> tuple[WeakItem, ...]:
    """The items of the estimate rows (``estimates``: EstimateRow) whose standardized loading is below
    :data:`SMALL_LOADING` in size, the markers' included, on factors with a loading that is not small (a factor whose
    every loading is small is a weak factor, assessment.method_factors).  The sign of a loading that small says nothing
    of how the item is keyed: sampling error alone turns it (s23's closing note: a weak item not declared reversed,
    standardized -.08, was called a contradiction of the declared keying and its factor's omega withheld).
    ``leave_out``: factors not to judge (exploratory blocks)."""
    loadings: dict[tuple[str | None, str], list] = {}
    for r in estimates:
        if r.kind == "loading" and r.variables[0] not in leave_out and (r.free or r.estimate != 0.0):
            loadings.setdefault((r.group, r.variables[0]), []).append(r)
    out = []
    for (group, factor), rows in loadings.items():
        sizes = [abs(r.standardized) if math.isfinite(r.standardized) else math.nan for r in rows]
        if not any(s >= SMALL_LOADING for s in sizes):
            continue
        out += [WeakItem(factor, r.variables[1], group, float(r.standardized)) for r, s in zip(rows, sizes)
                if s < SMALL_LOADING]
    return tuple(out)


def weak_item_notes(weak: tuple[WeakItem, ...], judged, several_groups: bool) -> list[str]:
    """A note on each weak item (``weak``) whose sign ran against the declared keying (``judged``: the groups'
    reliability rows before the weak items were taken out of ``against_keying``, as (label, rows) pairs): what the
    evidence is, a loading too small for its sign to say how the item is keyed, so a weak item, not a contradiction of
    the keying (assessment.reliability.apart_from_weak_markers takes it out of the judgement)."""
    out = []
    labels = [label for label, _ in judged if label is not None]
    for label, rows in judged:
        against = {(r.factor, x) for r in rows for x in r.against_keying}
        for w in weak:
            if (w.group is None or w.group == label) and (w.factor, w.item) in against:
                where = f" in group {written_group(label, labels)}" if several_groups and label is not None else ""
                out.append(f"{w.item} hardly measures factor '{w.factor}'{where} (standardized loading "
                           f"{'-' if w.standardized < 0 else ''}{loading_size(abs(w.standardized))}, below the "
                           f"{loading_size(SMALL_LOADING)} in size that common practice reads as negligible): a weak "
                           f"item, whose sign says nothing of how it is keyed, so it is not taken as evidence against "
                           f"the declared keying; check whether {w.item} belongs to '{w.factor}'")
    return out


def weak_marker_problem(w: WeakMarker, several_groups: bool, turned_from: tuple[str, ...] = ()) -> Problem:
    """The caution of one weak marker, first in every view: what it does to the other loadings' values and tests;
    ``turned_from``: the items the factor points against when its marker turns it against most of them (the keying
    of assessment.reliability, whose keyed sums never reverse a weak item for its sign: item_keys).
    What to try: another marker, or the factor's variance as its scale (model statements apart, note_parts.Command)."""
    f, x = w.factor, w.item
    sizes = [abs(s) for s, _ in w.others if math.isfinite(s)]
    ps = [p for _, p in w.others if math.isfinite(p)]
    here = ""
    if ps and sizes and max(ps) > 0.05:  # the tests read as 'not significant' (conventional .05 level)
        largest = "> .999" if max(ps) > 0.999 else f"up to {journal_decimal(max(ps), digits=3)}"
        here = (f" (here p {largest} for items whose standardized loadings reach {journal_decimal(max(sizes), digits=2)} "
                f"in size)")
    said = (f"The marker of factor '{f}', {x}, hardly measures it (standardized loading "
            f"{loading_size(abs(w.standardized))} in size, below the {loading_size(SMALL_LOADING)} that common "
            f"practice reads as negligible), yet its loading, fixed at {user_number(w.fixed_at)}, sets the factor's "
            f"unit: the unstandardized loadings of the factor's other items, their standard errors and their tests "
            f"depend on that marker{here}; the standardized loadings do not.")
    if turned_from:
        said += (f" The factor's direction follows {x} too: a higher '{f}' means lower answers on "
                 f"{', '.join(turned_from)}, so its correlations, mean differences and scores read the wrong way.")
    ref = reference_text("loading", (f, x))
    by_variance = Command(f" ('scale {written_name(f)} by variance')")
    if w.by_model:  # the model file's 'fix' sets it: the automatic scale is the model file's to restore
        advice = Note((f"fix the loading of an item that measures '{f}' at 1 in place of {x}'s, or drop that fix and "
                       f"scale the factor by its variance", by_variance, f"; and check whether {x} belongs to '{f}' "
                       f"at all."))
    else:
        advice = Note((f"give '{f}' the unit of an item that measures it: list that item first, or free the marker's "
                       f"loading", Command(f" ('free {ref}': the next item then sets the scale)"),
                       ", or scale the factor by its variance", by_variance,
                       f"; and check whether {x} belongs to '{f}' at all."))
    return Problem(ProblemKind.WEAK_MARKER, (ref,), float(w.standardized), said, advice,
                   w.group if several_groups else None)
