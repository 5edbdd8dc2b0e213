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


def did_you_mean(word: str, guess: str) -> str:
    """"; did you mean 'guess'?", the one way a message suggests a near name of the data (a column, a group's label);
    when the two look alike and differ only in their Unicode form or in characters that cannot be seen (a full-width
    letter, a ligature, a no-break space, a zero-width space: :func:`look_alike`), it says so and names the characters
    that differ, since a suggestion that shows the same name would not tell the user what to change (session note
    s23, 'Noticed, left alone').  The suggestion is quoted as the user copies it into the command
    (options.quoted_word: the shell's single quotes on the command line, a Python string in the Python API), not by a
    rule of its own: "did you mean 'St Mary's'?" cut the name at its apostrophe when pasted (s26)."""
    from cfa_tool.errors import character_names, printable
    from cfa_tool.options import quoted_word

    said = f"; did you mean {printable(quoted_word(guess))}"
    if guess != word and look_alike(word, guess):
        differ = character_names(guess, word) or character_names(word, guess)
        return f"{said}{differ}?{LOOK_ALIKE}"
    return said + "?"


#: what a suggestion adds when the name suggested looks like the name given (:func:`look_alike`)
LOOK_ALIKE = (" (the two look alike and differ only in their Unicode form or in characters that cannot be seen: copy "
              "the name exactly as the data write it)")


def look_alike(one: str, other: str) -> bool:
    """Whether two texts show alike: the same in Unicode's compatibility form (NFKC: a full-width 'ａ' is 'a', a
    ligature 'ﬁ' is 'fi', a no-break space a space) once characters that cannot be seen (format characters such as a
    zero-width space or a direction mark) are taken out."""
    import unicodedata

    def shown(text: str) -> str:
        text = unicodedata.normalize("NFKC", text)
        return " ".join("".join(ch for ch in text if unicodedata.category(ch) != "Cf").split())

    return shown(one) == shown(other)


#: a span of names written with a dash (or an en or em dash, as word processors make it) instead of '..'
_DASHED_SPAN = re.compile(r"\s*(\w+)\s*[-\u2013\u2014]\s*(\w+)\s*")


def dotted_span(text: str) -> str | None:
    """'eng1..eng5' for text such as 'eng1-eng5' or 'eng1 – eng5', where a span of names was written with a dash
    instead of the tool's two dots; None for other text."""
    match = _DASHED_SPAN.fullmatch(text)
    return f"{match.group(1)}..{match.group(2)}" if match else None


