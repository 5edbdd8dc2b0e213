"""What a researcher reads when an estimation did not converge: what happened, which parameters
misbehaved, and what to try."""

from __future__ import annotations

import numpy as np

from cfa_tool.numbers import user_number
from cfa_tool.estimation.optimizer import Outcome
from cfa_tool.language.names import reference_text, written_group, written_name
from cfa_tool.model.description import label_words, split_label
from cfa_tool.estimation.strategy import Restart, Search
from cfa_tool.note_parts import Command, Note, Text, joined
from cfa_tool.options import Option, taken_by

#: where a message of a search that did not converge turns from what happened to what to try (a workflow that writes
#: the model itself gives its own remedies there: workflows.occasions)
WHAT_TO_TRY = ". What to try: "
IDENTIFICATION_HINT = ("check that every factor is identified (three or more items with clear loadings, or two items "
                       "and a correlation with another factor)")


def two_item_factors(spec, labels: tuple[str, ...]) -> tuple[tuple[str, tuple[str, str]], ...]:
    """The factors of ``spec`` measured by exactly two items whose loadings are not all fixed or held equal (a free
    loading among ``labels``, the free parameters' names): each is identified only through its covariances with the
    other factors, and where those are near zero it is not identified in the data (empirical under-identification;
    Kenny 1979, as recalled; Bollen 1989, ch. 7)."""
    observed = set(spec.observed_names)
    # the free loadings (factor, item), read by the language's rules (a group's label carries its group, a quoted
    # name its own brackets), and the loadings the model file holds equal
    free = {names for kind, names, _ in map(split_label, labels) if kind == "loading"}
    held = {tuple(str(n) for n in ref.names) for group in spec.equal for ref in group if ref.kind == "loading"}
    out = []
    for each in spec.factors:
        factor, items = str(each.name), tuple(str(x) for x in each.indicators)
        loadings = [(factor, x) for x in items]
        if len(items) == 2 and all(x in observed for x in items) and any(k in free for k in loadings) \
                and not any(k in held for k in loadings):
            out.append((factor, items))
    return tuple(out)


def nonconvergence_message(found: Search, labels: tuple[str, ...], limit: int, lower: np.ndarray | None = None,
                           upper: np.ndarray | None = None, observed: tuple[str, ...] = (),
                           two_items: tuple[tuple[str, tuple[str, str]], ...] = ()) -> Text:
    """One paragraph for a search that did not converge; ``labels`` name the free parameters and ``limit``
    is the iteration limit in force; ``lower`` and ``upper``: the free parameters' bounds (the model file's
    'bound' statements), so that a search that ended against a bound says so; ``observed``: the model's items, which
    tell an item's residual variance from a factor's variance in words.  The option that raises the limit and the
    model file's statements apart (note_parts.Command): a manuscript's reader runs nothing and edits no model file;
    the parameters too, as the model file writes them ('variance(a) [p]') for the program's user, in words for a
    manuscript ('the variance of factor a in group p', model.description.label_words; re-check s18).  ``two_items``:
    the factors of two items whose loadings are free (:func:`two_item_factors`), named first with the language's own
    remedy (hostile trial s23: 'raise the limit' failed at 5,000 iterations, and the factor went unnamed)."""
    result = found.result
    used = result.iterations
    outcome = Outcome.ITERATION_LIMIT if used >= limit and result.outcome is not Outcome.BAD_START else result.outcome
    parts: list[Text] = [{
        Outcome.ITERATION_LIMIT: f"no convergence within the limit of {_iterations(limit)}",
        Outcome.STALLED: f"the search stopped making progress after {_iterations(used)} (the limit is {limit})",
        Outcome.NO_DECREASE: f"no step lowered the discrepancy any further after {_iterations(used)} "
                             f"(the limit is {limit})",
        Outcome.LEFT_REGION: f"after {_iterations(used)} the estimates reached values at which the implied "
                             f"covariance matrix is not positive definite",
        Outcome.BAD_START: "the starting values imply a covariance matrix that is not positive definite",
    }[outcome]]
    drift = result.drift
    for indices, words in ((drift.growing, "kept growing"), (drift.shrinking, "shrank towards zero"),
                           (drift.oscillating, "swung back and forth")):
        if indices:
            names = [_named(labels[k], observed) for k in indices]
            parts.append(_and_list(names) + f" {words}")
    advice: list[Text] = []
    held = _held_at_bounds(result.theta, labels, lower, upper, observed)
    if held:
        parts.append(_and_list(held) + f" {'was' if len(held) == 1 else 'were'} held at the model file's "
                     f"bound{'s' if len(held) > 1 else ''}")
        advice.append("check that the bounds leave room for the data (a variance bounded above the item's own "
                      "variance, say, cannot be met)")
    if found.restart is Restart.FAILED:
        parts.append("a restart with every factor's variance fixed at 1 did not converge either")
    elif found.restart is Restart.UNSCALABLE:
        bad = found.unscalable
        where = f" in group {written_group(bad.group)}" if bad.group is not None else ""  # the one rule of group names
        if bad.indicator is not None:
            parts.append(f"with every factor's variance fixed at 1 the model converged, but there the marker "
                         f"'{bad.indicator}' of factor '{bad.factor}'{where} has a loading of about zero, so it cannot "
                         f"set the factor's scale")
            freed = reference_text("loading", (bad.factor, bad.indicator))
            advice.append(Note((f"let another indicator set the scale of '{bad.factor}'",
                                Command(f" ('free {freed}' makes the next one the marker)"), " or ",
                                Command("write 'scale latent by variance'", "fix every factor's variance at 1"))))
        else:
            parts.append(f"with every factor's variance fixed at 1 the model converged, but there the loadings of "
                         f"factor '{bad.factor}'{where} sum to about zero (items keyed in opposite directions), so "
                         f"effects coding cannot set its scale")
            advice.append(Note((f"scale '{bad.factor}' by its variance",
                                Command(f" ('scale {written_name(bad.factor)} by variance')"))))
    elif found.restart is Restart.NOT_CONFIRMED:
        parts.append("with every factor's variance fixed at 1 the model converged, but the search in the model's own "
                     "scaling did not confirm that minimum")
        advice.append(Note((Command("write 'scale latent by variance'", "fix every factor's variance at 1"),)))
    general = not advice  # no remedy of the search's own ending: the general advice, each line once
    if two_items and general:  # named first, with the language's own remedy (the limit does not help)
        named = ", ".join(f"'{f}' ({a}, {b})" for f, (a, b) in two_items)
        one = len(two_items) == 1
        parts.append(f"{'the factor' if one else 'the factors'} {named} {'has' if one else 'have'} two items and "
                     f"{'is' if one else 'are'} identified only through {'its' if one else 'their'} covariances with "
                     f"the other factors: where those are near zero, {'it is' if one else 'they are'} not identified "
                     f"in these data (empirical under-identification)")
        f, (a, b) = two_items[0]
        advice.append(Note(("hold its two loadings equal, which identifies a two-item factor" if one else
                            "hold each one's two loadings equal, which identifies a two-item factor",
                            Command(f" ('equal {reference_text('loading', (f, a))}, "
                                    f"{reference_text('loading', (f, b))}')"))))
    elif general and outcome is Outcome.ITERATION_LIMIT:
        advice.append(Note(("raise the limit", Command(f" ({Option.MAX_ITERATIONS})", takes=taken_by(Option.MAX_ITERATIONS),
                                                       elsewhere=f" (a fit of the model with {Option.MAX_ITERATIONS})"))))
    if general:
        advice += [IDENTIFICATION_HINT,
                   Note(("give start values near the expected solution", Command(" ('start ...')")))]
    return joined(parts, "; ") + WHAT_TO_TRY + _or_list(advice)  # type: ignore[operator]


def _named(label: str, observed: tuple[str, ...]) -> Note:
    """A free parameter as the model file writes it, for the program's user (who may give it a start value), and in
    words for a manuscript (model.description.label_words, the one way parameters are put in words)."""
    return Note((Command(label, label_words(label, observed=observed or None)),))


def _iterations(n: int) -> str:
    return f"{n} iteration" if n == 1 else f"{n} iterations"


def _and_list(words: list[Text]) -> Text:
    return words[0] if len(words) == 1 else joined(words[:-1], ", ") + " and " + words[-1]  # type: ignore[operator]


def _or_list(words: list[Text]) -> Text:
    return words[0] if len(words) == 1 else joined(words[:-1], ", ") + ", or " + words[-1]  # type: ignore[operator]


def _held_at_bounds(theta, labels: tuple[str, ...], lower, upper, observed: tuple[str, ...] = ()) -> list[Text]:
    """The free parameters at a finite bound of the model file, with the bound ('variance(x) (at least 5)'; in
    words for a manuscript, :func:`_named`)."""
    if lower is None or upper is None or theta is None or len(theta) != len(labels):
        return []
    theta = np.asarray(theta, dtype=float)
    out = []
    for k, label in enumerate(labels):
        for bound, word in ((lower[k], "at least"), (upper[k], "at most")):
            if np.isfinite(bound) and abs(theta[k] - bound) <= 1e-8 * max(1.0, abs(bound)):
                out.append(_named(label, observed) + f" ({word} {user_number(bound)})")
    return out
