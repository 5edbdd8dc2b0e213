"""Text labels from data cells (group labels, filter values), read the way people mean them.

'north' and 'north ' with a trailing space, or 'cafe' with an accent stored in two Unicode
forms, look the same on screen and are the same group to the researcher; whole numbers
stored as floats (2.0) are the label 2.  One function makes every such label, so groups and
row filters agree.
"""

from __future__ import annotations

import unicodedata


def label_text(value) -> str:
    """A cell as a label: whole-number floats without '.0', text without spaces at its ends and in
    Unicode's composed form (NFC)."""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return unicodedata.normalize("NFC", str(value).strip())


def merged_labels(values) -> list[tuple[str, list[str]]]:
    """Labels that several different raw texts were read as (for a note): [(label, raw texts)]."""
    raw: dict[str, set[str]] = {}
    for v in values:
        raw.setdefault(label_text(v), set()).add(str(v))
    return [(label, sorted(texts)) for label, texts in raw.items() if len(texts) > 1]
