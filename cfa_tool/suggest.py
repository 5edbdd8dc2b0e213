"""'Did you mean ...?': the one way every message suggests a near name."""

from __future__ import annotations

import difflib
from collections.abc import Iterable


def close_names(word: str, candidates: Iterable[str], n: int = 1, cutoff: float = 0.6) -> list[str]:
    """The candidates closest to ``word``: a name that differs only in upper and lower case first
    (SPSS portable files, for one, store names in capitals), then near spellings (difflib's ratio)."""
    candidates = [str(c) for c in candidates]
    folded = word.casefold()
    same = [c for c in candidates if c.casefold() == folded and c != word]
    if same:
        return same[:n]
    lowered = {c.casefold(): c for c in candidates}
    return [lowered[m] for m in difflib.get_close_matches(folded, list(lowered), n=n, cutoff=cutoff)]
