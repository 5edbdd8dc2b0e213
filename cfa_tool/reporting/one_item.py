"""Factors measured by one item: the one detector and the one wording every note about them uses.

With one indicator, a factor's share of its item's variance follows from the item's error variance, which the
model must fix to be identified (Bollen 1989, ch. 7, on single indicators; the chapter recalled from memory): the
figures that rest on it (reliability coefficients, score determinacy and precision) restate that fixed value, an
assumption rather than evidence from the data.
"""

from __future__ import annotations


def one_item_factors(rows, observed) -> tuple[str, ...]:
    """The factors with exactly one item among their loadings, in the order of their first loading.  ``rows``: a
    fit's estimate rows (``kind`` and ``variables``), as a fit result holds them or as the one reader of a saved fit
    gives them back (model.saved_estimates.SavedRow); ``observed``: the model's items (a loading on a factor is not
    an item's)."""
    items: dict[str, set[str]] = {}
    for row in rows:
        kind, names = row.kind, row.variables
        if kind == "loading" and len(names) == 2 and names[1] in observed:
            items.setdefault(names[0], set()).add(names[1])
    return tuple(f for f, xs in items.items() if len(xs) == 1)


def one_item_sentence(factors, figures: str, consequence: str = "") -> str:
    """The note about ``factors`` (from :func:`one_item_factors`; empty text without any), beginning with a space:
    which ``figures`` of theirs restate the fixed error variance, then ``consequence`` (what the table therefore
    leaves out), as '... not evidence from the data; no coefficients are shown'."""
    if not factors:
        return ""
    one = len(factors) == 1
    return (f" {', '.join(factors)}: measured by one item, whose error variance the model fixes, so "
            f"{'its' if one else 'their'} {figures} restate that fixed value (Bollen 1989, ch. 7), not evidence from "
            f"the data{'; ' + consequence if consequence else ''}.")
