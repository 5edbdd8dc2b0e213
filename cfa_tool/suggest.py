"""'Did you mean ...?': the one way every message suggests a near name."""

from __future__ import annotations

import difflib
import re
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


#: a span of names written with a dash (or an en or em dash, as word processors make it) instead of '..'
_DASHED_SPAN = re.compile(r"\s*(\w+)\s*[-\u2013\u2014]\s*(\w+)\s*")


def dotted_span(text: str) -> str | None:
    """'eng1..eng5' for text such as 'eng1-eng5' or 'eng1 – eng5', where a span of names was written with a dash
    instead of the tool's two dots; None for other text."""
    match = _DASHED_SPAN.fullmatch(text)
    return f"{match.group(1)}..{match.group(2)}" if match else None


