"""Which way a factor points in one group or sample relative to another.

A factor's direction is not a property of the data: it follows its scale (a marker's sign, or start values under
variance scaling; Bollen 1989, ch. 7), so one group's or sample's solution may be the other's turned round, every
loading of the factor with the other sign, and fit the same.  Comparing the signs of an item's loadings across groups
or samples (an item recoded in one of them, whose loading alone changes sign) must first put the factor the same way
round in both; and that is decided by the factor's items *together*, against each other, never by the signs within
one group alone: a scale of as many reverse-worded items as others (new-user trial s24: four of eight openness items
worded against the trait) has no majority sign within a group, and a direction read from each group's own signs
turned one group round by chance and called every item coded the other way round.
"""

from __future__ import annotations

import numpy as np


def relative_direction(reference, other) -> float:
    """+1, or -1 when the factor points the other way in ``other`` than in ``reference`` (its loadings on the same
    items, in the same order, in two groups or samples): when more of its items' loadings change sign between them
    than keep it, the factor as a whole is turned round (which turns no item); ties by the sum of the products of
    the loadings (their agreement, as a cosine's numerator)."""
    products = np.asarray(reference, dtype=float) * np.asarray(other, dtype=float)
    vote = float(np.sign(products).sum())
    deciding = vote if vote != 0 else float(products.sum())
    return -1.0 if deciding < 0 else 1.0
