"""Names and parameter references as the model language writes them, and such references read back.

A name that is not a plain word (letters, digits and underscores, not starting with a digit) is written in
double quotes, as a model file writes it: ``"At work, I feel full of energy."``.  A parameter reference is
``kind(name, name)`` with each name so written, and a parameter of one group adds `` [group]``.  The parameter
table's labels, the problems' parameter keys, messages that quote a reference and the drafted model all write
names this way (:func:`written_name`, :func:`reference_text`), so that a label can be read back into its kind,
its names and its group exactly (:func:`read_reference`), whatever commas, brackets or spaces the names hold.
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Callable, Sequence

from cfa_tool.errors import clipped

_PLAIN = re.compile(r"[A-Za-z_][A-Za-z0-9_]*\Z")  # the grammar's NAME (grammar/model.lark)


def composed(text: str) -> str:
    """``text`` in Unicode's composed form (NFC; Unicode Standard Annex #15): the one rule by which text written with
    decomposed accents ('e' + U+0301, as some systems save files) is the text written composed ('é'), for the model's
    names, the data's column names and the names options give, labels, and answer words alike."""
    return text if text.isascii() else unicodedata.normalize("NFC", text)


def composed_value(value):
    """An option's value that names columns, groups or words of the data in Unicode's composed form (:func:`composed`):
    a text, or each text of a list, a tuple or a dict (--rename's old and new names); anything else (a number, a row
    selection object) as given.  The one rule of the command line's options and the Python API's keywords alike
    (options.NAMING)."""
    if isinstance(value, str):
        return composed(value)
    if isinstance(value, (list, tuple)):
        return type(value)(composed_value(v) for v in value)
    if isinstance(value, dict):
        return {composed_value(k): composed_value(v) for k, v in value.items()}
    return value


def case_twins(read, columns) -> dict[str, tuple[str, ...]]:
    """For each name of ``read`` (the columns a run reads: the model's items, the group, id and design columns, a row
    filter's column) that is one of ``columns``, the other columns whose names differ from it only in upper and lower
    case ('Clean' beside 'clean', by Unicode's case folding of the composed names) and that the run does not read;
    names without such twins left out.  Names are matched exactly, capitals included, so the column of the exact name
    is the one read; its twins are for a note to name (s23: the exact match was taken without a word)."""
    read = [name for name in dict.fromkeys(read) if isinstance(name, str)]
    taken = set(read)
    folded: dict[str, list[str]] = {}
    for column in columns:
        if isinstance(column, str):
            folded.setdefault(composed(column).casefold(), []).append(column)
    present = set(columns)
    twins = {}
    for name in read:
        others = tuple(c for c in folded.get(composed(name).casefold(), ()) if c != name and c not in taken)
        if name in present and others:
            twins[name] = others
    return twins


def plain(name: str) -> bool:
    """Whether ``name`` can be written without quotes."""
    return bool(_PLAIN.match(name))


def writable(name: str) -> bool:
    """Whether the model language can write ``name`` at all (a quoted name holds no double quote or line break)."""
    return not any(c in name for c in '"\n\r')


def written_name(name: str) -> str:
    """``name`` as the model language writes it: plain, or in double quotes.  A name the language cannot write
    (see :func:`writable`) is left as it is."""
    return name if plain(name) or not writable(name) else f'"{name}"'


#: a group label a sentence can hold without quotes: one word of letters or digits, hyphens, full stops or apostrophes
#: inside it ('8', 'translated', 'grade-8', 'École'), which no comma, bracket or space runs into the sentence
_PROSE_PLAIN = re.compile(r"[^\W_](?:[\w'.-]*[^\W_])?\Z")


def written_group(label: str, labels: Sequence[str] = ()) -> str:
    """A group's label as a sentence names it among ``labels`` (every group label of the fit): the one rule of every
    text that names groups ('in group north', 'in group 8', 'groups "grade 8" and "grade 9"'), the methods paragraph,
    the notes, the titles and the messages alike (s22: a paragraph wrote 'group 8' and the note below it 'group "8"',
    two rules folded into this one).  As it is when every one of them is one word or number (new-user trial s20, where
    '"8"' read as code); else every label in double quotes, so that one text neither writes 'east' in one place and
    '"east"' in another nor quotes some groups of a list and not others (new user s14), the quotes delimiting labels
    that hold spaces, commas or brackets; a label the model language cannot write (it holds a double quote or a line
    break) in single quotes, so that its own double quotes are not read as the quoting.  Without ``labels``: the
    label alone decides.  A model file's statement writes a group as the language does (:func:`written_name`)."""
    label = str(label)
    if not writable(label):
        return f"'{label}'"
    if _PROSE_PLAIN.match(label) and all(_PROSE_PLAIN.match(str(x)) for x in labels):
        return label
    return f'"{label}"'


def names_text(names) -> str:
    """Several names as a list of the model language writes them: ``a, "b c"``."""
    return ", ".join(written_name(n) for n in names)


def reference_text(kind: str, names, group: str | None = None) -> str:
    """A parameter reference as labels and messages write it: ``loading(energy, "At work, I feel full.")``,
    ``residual_variance(x9) [north]``."""
    text = f"{kind}({names_text(names)})"
    return f"{text} [{group}]" if group is not None else text


_NAME = re.compile(r'\s*(?:"([^"\n]*)"|([^,]*))\s*(,|\Z)')


def read_reference(label: str) -> tuple[str, tuple[str, ...], str | None]:
    """A reference written by :func:`reference_text` read back into its kind, its names and its group (None
    without one): quoted names keep their commas and brackets.  A label without quotes whose names hold commas
    (as saved results of earlier versions write them) cannot be told apart and is split at each comma."""
    group = None
    kind, paren, rest = label.partition("(")
    if not paren:
        return label.strip(), (), None
    close = _closing(rest)
    inside, tail = rest[:close], rest[close + 1:]
    if tail.endswith("]") and tail.lstrip().startswith("["):
        group = tail.strip()[1:-1]
    names: list[str] = []
    position = 0 if inside.strip() else len(inside) + 1
    while position <= len(inside):
        match = _NAME.match(inside, position)
        if match is None:  # a quote that does not close: the rest as one name
            names.append(inside[position:].strip())
            break
        names.append(match.group(1) if match.group(1) is not None else match.group(2).strip())
        if not match.group(3):
            break
        position = match.end()
    return kind.strip(), tuple(names), group


def _closing(rest: str) -> int:
    """The position of the bracket that closes a reference's list of names in ``rest`` (the text after its
    opening bracket): the first ')' outside quotes after which only a group suffix follows, else the last one."""
    quoted = False
    for k, c in enumerate(rest):
        if c == '"':
            quoted = not quoted
        elif c == ")" and not quoted:
            tail = rest[k + 1:].strip()
            if not tail or (tail.startswith("[") and tail.endswith("]")):
                return k
    last = rest.rfind(")")
    return last if last >= 0 else len(rest)


def read_name_list(text: str, option: str) -> list[tuple[str | None, tuple[str, ...]]]:
    """Names separated by commas as an option takes them, written as the model language writes names: a name that
    holds a comma in double quotes, ``"At work, I feel full."..q9`` a span whose first end is quoted.  Each piece
    comes back as (its text when nothing in it is quoted, else None; its ends: one name, or the two ends of a span
    'a..b', more when the text has more '..').  A piece without quotes keeps its text, so that a column named 'a..b'
    can still be told from a span.  A quoted name keeps its spaces.  ``option`` names the option in the errors of a
    quote that is not closed or of text stuck to a quoted name."""
    from cfa_tool.errors import OptionError, printable

    pieces: list[tuple[str | None, tuple[str, ...]]] = []
    for piece in _outside_quotes(text, ",", option):
        if '"' not in piece:
            pieces.append((piece.strip(), tuple(end.strip() for end in piece.split(".."))))
            continue
        ends = []
        for end in _outside_quotes(piece, "..", option):
            bare = end.strip()
            if bare.startswith('"') and bare.endswith('"') and bare.count('"') == 2:
                ends.append(bare[1:-1])
            elif '"' in bare:
                raise OptionError(f"{option}: '{printable(bare)}' mixes quoted and unquoted text; put the whole name "
                                  f'in double quotes ("...")')
            else:
                ends.append(bare)
        pieces.append((None, tuple(ends)))
    return pieces


def _outside_quotes(text: str, separator: str, option: str) -> list[str]:
    """``text`` split at each ``separator`` that is not inside double quotes."""
    from cfa_tool.errors import OptionError, printable

    parts, start, quoted, k = [], 0, False, 0
    while k < len(text):
        if text[k] == '"':
            quoted = not quoted
        elif not quoted and text.startswith(separator, k):
            parts.append(text[start:k])
            k += len(separator)
            start = k
            continue
        k += 1
    if quoted:
        raise OptionError(f"{option}: a double quote is not closed in '{printable(text)}'; write a name that holds "
                          f'commas in double quotes, "like, this"')
    parts.append(text[start:])
    return parts


def comma_hint(part: str, columns) -> str:
    """When ``part`` (a name not found) is one of the comma-separated parts of a column's name, the advice to
    write that name in double quotes ('; a name that holds a comma is written in double quotes: "a, b"'), else ''."""
    from cfa_tool.errors import printable

    part = part.strip()
    whole = next((c for c in columns if "," in c and part in (p.strip() for p in c.split(","))), None) if part else None
    if whole is None:
        return ""
    return f"; a name that holds a comma is written in double quotes: '{printable(written_name(whole))}'"


MAX_RANGE = 2_000  # names in one range such as item1..item9


def range_names(first: str, last: str, fail: Callable[[str], Exception]) -> list[str]:
    """The names of the range ``first..last`` as the model language counts them, wherever a range is written (a
    model file's lists, ``--ordinal``): the two ends are one name but for one number, counted up ('item1..item9',
    'mood1_t2..mood5_t2'; a number written with leading zeros keeps its width, 'q01..q12').  ``fail(message)``
    is the error to raise for a range that cannot be counted."""
    shown = f"'{clipped(first, 40)}..{clipped(last, 40)}'"
    prefix, low, high, suffix = _counted_part(first, last, fail)
    if max(len(low), len(high)) > 9:
        raise fail(f"the numbers of the range {shown} are too long (at most 9 digits)")
    lo, hi = int(low), int(high)
    if lo > hi:
        raise fail(f"the range '{first}..{last}' counts down; write the smaller number first")
    if hi - lo >= MAX_RANGE:
        raise fail(f"the range '{first}..{last}' names {hi - lo + 1:,} variables; a range names at most {MAX_RANGE:,}")
    width = len(low) if low.startswith("0") else 0
    return [f"{prefix}{str(i).zfill(width)}{suffix}" for i in range(lo, hi + 1)]


def _counted_part(first: str, last: str, fail: Callable[[str], Exception]) -> tuple[str, str, str, str]:
    """The text before the counted number, the number at each end (as written) and the text after it: the one
    place where the ends differ ('mood1_t2..mood5_t2' counts 1 to 5 before '_t2'), or the last number of a
    range whose two ends are the same name."""
    parts1, parts2 = re.findall(r"\d+|\D+", first), re.findall(r"\d+|\D+", last)
    numbers = [k for k, part in enumerate(parts1) if part[0].isdigit()]
    if not numbers or not any(part[0].isdigit() for part in parts2):
        raise fail(f"a range such as 'item1..item9' needs names with a number to count; got '{first}..{last}'")
    differ = [k for k, (a, b) in enumerate(zip(parts1, parts2)) if a != b]
    if len(parts1) != len(parts2) or len(differ) > 1 or (differ and not parts1[differ[0]][0].isdigit()):
        raise fail(f"the two ends of the range '{first}..{last}' must be the same name but for one number (such as "
                   f"'item1..item9' or 'mood1_t2..mood5_t2')")
    k = differ[0] if differ else numbers[-1]
    return "".join(parts1[:k]), parts1[k], parts2[k], "".join(parts1[k + 1:])


def _numbered_end(end: str, items: Sequence[str], place: str) -> list[str]:
    """For a range's ``place`` ('start' or 'end') written as a stem and a number ('q01', 'q12') that is no item: the
    item of that stem with the lowest number (a start) or the highest (an end), as a suggestion; [] without one."""
    import re

    found = re.fullmatch(r"(.*?)(\d+)", end)
    if found is None:
        return []
    numbered = [(int(m.group(2)), x) for x in items
                if (m := re.fullmatch(r"(.*?)(\d+)", x)) and m.group(1) == found.group(1)]
    if not numbered:
        return []
    return [(min if place == "start" else max)(numbered)[1]]


def ordinal_names(given: str | Sequence[str], items: Sequence[str], among: str) -> list[str]:
    """The items that ``--ordinal`` / ``ordinal=`` names (one name or a list, 'all' handled before), each one of
    ``items`` (``among`` says what they are in an error: 'an indicator in the model').  A range such as
    'item1..item9' names the items the model language's range names (:func:`range_names`); a name that is one of
    ``items`` is that item, whatever it holds (a column may be named 'a..b'); spaces around a name or a range's end
    do not count, as the data's headers are read.  A name that is no item, a range whose end is no item and a range
    that counts a name that is no item are errors naming the option and the name."""
    from cfa_tool.errors import OptionError, printable
    from cfa_tool.options import Option
    from cfa_tool.suggest import close_names, did_you_mean, dotted_span

    names: list[str] = []
    for name in [given] if isinstance(given, str) else given:
        name = composed(name)  # as the data's column names are read
        if name not in items and name.strip() in items:
            name = name.strip()
        ends = [end.strip() for end in name.split("..")]
        if name in items or len(ends) != 2 or not all(ends):
            if name not in items:
                span = dotted_span(name)
                hint = comma_hint(name, items) or (f"; a range of items is written with two dots: '{printable(span)}'"
                                                   if span is not None else "")
                raise OptionError(f"'{printable(name)}' is given as ordinal but is not {among}{hint}")
            names.append(name)
            continue
        option = Option.ORDINAL.given(name)
        for place, end in zip(("start", "end"), ends):
            if end not in items:
                guess = _numbered_end(end, items, place) or close_names(end, items)
                raise OptionError(f"{option}: the range's {place} '{printable(end)}' is not {among}"
                                  + (did_you_mean(end, guess[0]) if guess else ""))
        counted = range_names(ends[0], ends[1], lambda message: OptionError(f"{option}: {message}"))
        missing = [x for x in counted if x not in items]
        if missing:
            raise OptionError(f"{option}: the range counts '{printable(missing[0])}', which is not {among}; name the "
                              f"ordinal items one by one, separated by commas")
        names.extend(counted)
    return names
