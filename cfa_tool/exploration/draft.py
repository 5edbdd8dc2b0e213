"""A draft confirmatory model, in this program's model language, from an exploratory solution.

Each item goes on the factor of its largest pattern loading in absolute value.  Items with
loadings at or above the threshold (.30 by default, common practice) on two or more factors,
or on none, are not placed: they are listed in comments for the researcher to decide.  Within a
factor the items are listed by loading, largest first, so that the first item, which scales the
factor by default, is the one that loads most strongly.  Factor names are generic (factor1, ...)
with a comment asking for real names.  A factor left with fewer than three items is written as a
comment saying why: one item cannot identify a factor, and a factor of two items is identified only
through its correlations with the other factors, which on a new sample (the confirmation half)
often gives an inadmissible solution (a loading above 1, a negative error variance; Anderson &
Gerbing 1984 on small numbers of indicators).  The text parses
with ``cfa_tool.language.parser.parse_model`` whenever at least one factor could be written.
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass

import numpy as np

from cfa_tool.errors import DataError, OptionError, printable
from cfa_tool.exploration.choices import Placement
from cfa_tool.language.names import writable, written_name
from cfa_tool.numerics.plain import journal_decimal

DEFAULT_THRESHOLD = 0.30  # common practice
MIN_ITEMS = 3  # items a drafted factor needs (see the module's docstring)
_LINE = 78


@dataclass(frozen=True)
class ItemPlacement:
    """Where the draft model places one item, and why."""
    item: str
    placement: Placement
    factor: int  # factor of the largest absolute loading (0-based, in the solution's order)
    loading: float  # that loading, with its sign
    salient: tuple[int, ...]  # factors with a loading at or above the threshold in absolute value


@dataclass(frozen=True)
class DraftModel:
    """A model text drafted from a rotated solution, with each item's placement."""
    text: str
    factor_names: tuple[str, ...]  # one per factor of the solution
    written: tuple[bool, ...]  # whether each factor became a statement (False: too few items, left as a comment)
    placements: tuple[ItemPlacement, ...]
    threshold: float
    #: the sentence on factors that correlate negatively, which may be a trait split by its items' keying
    #: (:func:`keying_sentence`: its words before and after the method statement's name; empty when none do)
    keying: tuple[str, str] = ("", "")

    @property
    def usable(self) -> bool:
        """Whether the text declares at least one factor (and so can be fitted)."""
        return any(self.written)


def model_name(name: str) -> str:
    """A name as the model language writes it: plain, or in double quotes."""
    if not writable(name):
        raise DataError(f"the column name '{printable(name)}' contains a double quote or a line break, which the model "
                        f"language cannot write; rename the column")
    return written_name(name)


def answers_statement(coding, items: tuple[str, ...] | None = None) -> str:
    """An 'answers' statement (language.spec.AnswerCoding) written in the model language, for ``items`` (None: for
    every item), so that a draft model reads the answers recorded as words as the exploration did."""
    from cfa_tool.data.answer_words import answers_statement as written

    for name in items or ():
        model_name(name)  # a name the model language cannot write is refused
    return written([(a.word, a.number, a.code) for a in coding.answers], items)


def factor_names(count: int, items: tuple[str, ...]) -> tuple[str, ...]:
    """factor1, factor2, ...; an underscore is added while a name would equal an item's."""
    taken = {name.casefold() for name in items}
    stem = "factor"
    while any(f"{stem}{k + 1}".casefold() in taken for k in range(count)):
        stem += "_"
    return tuple(f"{stem}{k + 1}" for k in range(count))


def place_items(names: tuple[str, ...], pattern: np.ndarray, threshold: float = DEFAULT_THRESHOLD) -> tuple[ItemPlacement, ...]:
    """Where each item goes (module docstring)."""
    out = []
    for name, row in zip(names, np.asarray(pattern, dtype=float)):
        top = int(np.argmax(np.abs(row)))
        salient = tuple(int(k) for k in np.flatnonzero(np.abs(row) >= threshold))
        kind = Placement.ON_FACTOR if len(salient) == 1 else (Placement.NO_LOADING if not salient
                                                                else Placement.SEVERAL_LOADINGS)
        out.append(ItemPlacement(name, kind, top, float(row[top]), salient))
    return tuple(out)


def _two(value: float) -> str:
    return journal_decimal(value, digits=2)  # without the leading zero below 1 in size (numerics.plain)


def _statement(head: str, items: list[str], prefix: str = "") -> list[str]:
    lines, line = [], f"{prefix}{head}"
    for k, item in enumerate(items):
        piece = item + ("," if k < len(items) - 1 else "")
        if len(line) + 1 + len(piece) > _LINE and line.strip() != f"{prefix}{head}".strip():
            lines.append(line)
            line = prefix + "    " + piece
        else:
            line = f"{line} {piece}"
    lines.append(line)
    return lines


def _comment(text: str, indent: str = "") -> list[str]:
    """``text`` as comment lines of at most _LINE characters ('# ' and ``indent`` before each; later lines indented
    two more), so that the draft printed on an 80-column terminal is copied without lines broken out of a comment."""
    return textwrap.wrap(text, _LINE, initial_indent="# " + indent, subsequent_indent="# " + indent + "  ",
                         break_long_words=False, break_on_hyphens=False)


#: the least size of a negative correlation of two factors of an oblique solution that is named as a possible split
#: by keying (a rule of thumb of this tool: .10, a small correlation by Cohen 1988's conventions, recalled)
NEGATIVE_CORRELATION = 0.10


#: how the draft's comment names the model language's method factors, where the report names the statement
METHOD_WORDS = " (a 'method' statement of the model language)"


def keying_sentence(labels: tuple[str, ...], correlations: np.ndarray | None) -> tuple[str, str]:
    """What factors that correlate negatively (by at least :data:`NEGATIVE_CORRELATION`, each factor turned so that
    most of its salient loadings are positive) may be (new-user trial s24: a trait of two positively and two
    reverse-worded items, with acquiescence on every item, came out as two factors of two items each, marked only
    'reverse-worded item?'): items that run against each other, as reverse-worded items not recoded run against
    the others, and a trait split into its positively and its reverse-worded items is the known pattern of keying
    and acquiescence (Marsh 1996), modelled by one trait factor with a method factor beside it.  The sentence's
    words before and after the place where the method statement is named (:data:`METHOD_WORDS` in the draft);
    ('', '') when no pair correlates so."""
    if correlations is None or len(labels) < 2:
        return "", ""
    phi = np.asarray(correlations, dtype=float)
    pairs = [(labels[i], labels[j], phi[i, j]) for i in range(len(labels)) for j in range(i + 1, len(labels))
             if phi[i, j] <= -NEGATIVE_CORRELATION]
    if not pairs:
        return "", ""
    listed = "; ".join(f"{a} and {b}, {_two(r)}" for a, b, r in pairs)
    return (f"Factors that correlate negatively ({listed}) hold items that run against each other, as reverse-worded "
            f"items not recoded run against the others. When one such factor holds the reverse-worded items of an "
            f"item set and another its positively worded ones, the split may be the known pattern of keying and "
            f"acquiescence (a way of answering that items worded the same way share; Marsh 1996), not two traits: "
            f"fit the items as one trait factor with a method factor beside it",
            " and compare the two models on other data.")


def draft_model(names: tuple[str, ...], pattern: np.ndarray, threshold: float = DEFAULT_THRESHOLD,
                ordinal: tuple[str, ...] = (), description: str = "",
                given_names: tuple[str, ...] | None = None, correlations: np.ndarray | None = None) -> DraftModel:
    """The draft model text (module docstring); ``description`` (one line, e.g. the extraction and
    rotation used) goes into the first comment; ``ordinal`` names items to declare ordinal; ``given_names``:
    the factors' names (a target file's columns), else placeholders; ``correlations``: the factors' correlations
    of an oblique solution, whose negative ones the draft's last comment names (:func:`keying_sentence`)."""
    from cfa_tool import options

    threshold = options.real_number("the loading threshold", threshold, 0.0, 1.0, open_low=True, open_high=True)
    names = tuple(names)
    pattern = np.asarray(pattern, dtype=float)
    m = pattern.shape[1]
    written_names = {name: model_name(name) for name in names}
    if given_names is not None and len(given_names) == m:
        clash = [f for f in given_names if f.casefold() in {x.casefold() for x in names}]
        if clash:
            raise OptionError(f"the factor name '{printable(clash[0])}' is also an item's name; a model cannot use one "
                              f"name for both: rename the factor")
        labels = tuple(model_name(f) for f in given_names)
    else:
        given_names = None
        labels = factor_names(m, names)
    placements = place_items(names, pattern, threshold)
    members: list[list[ItemPlacement]] = [[] for _ in range(m)]
    for item in placements:
        if item.placement is Placement.ON_FACTOR:
            members[item.factor].append(item)
    for group in members:
        group.sort(key=lambda item: -item.loading)
    sizes = [len(group) for group in members]
    written = [size >= MIN_ITEMS for size in sizes]
    cut = _two(threshold)
    about = printable(description).strip()
    heading = "Draft model from an exploratory factor analysis" + (f": {about}" if about else "") + "."
    lines = _comment(heading)
    lines += _comment("The factor names are placeholders: rename each factor for what its items have in common."
                      if given_names is None else "The factor names are those of the target.")
    lines += _comment("Each item is on the factor of its largest pattern loading (in absolute value); items are listed "
                      "by loading, largest first, so the first item, which sets the factor's scale, loads most "
                      f"strongly. Items with loadings of {cut} or more on several factors, or on none, are listed at "
                      "the end for you to decide. Fit this model to data other than those explored, or its fit will "
                      "look better than it is.")
    lines.append("")
    for k in range(m):
        group = members[k]
        items = [written_names[item.item] for item in group]
        negative = [written_names[item.item] for item in group if item.loading < 0]
        if written[k]:
            lines.extend(_statement(f"factor {labels[k]}:", items))
            if negative:
                lines += _comment(f"{labels[k]}: negative loading{'s' if len(negative) > 1 else ''} for "
                                  f"{', '.join(negative)} (reverse-worded item{'s' if len(negative) > 1 else ''}?)")
        elif group:
            why = ("one item cannot identify a factor" if len(group) == 1 else
                   "a factor of two items is identified only through its correlations with other factors and often "
                   "fails as inadmissible on new data")
            lines += _comment(f"{labels[k]} is left out: it has {len(group)} item{'s' if len(group) > 1 else ''} "
                              f"({', '.join(items)}), fewer than {MIN_ITEMS}; {why}. Decide whether to add items or "
                              f"drop it.")
            lines.extend(_statement(f"factor {labels[k]}:", items, prefix="# "))
        else:
            lines += _comment(f"{labels[k]} has no item of its own (each item's largest loading is on another factor)")
    undecided = [item for item in placements if item.placement is not Placement.ON_FACTOR]
    if undecided:
        lines += ["", "# For you to decide (not in the model above):"]
        for item in undecided:
            row = pattern[names.index(item.item)]
            if item.placement is Placement.SEVERAL_LOADINGS:
                loads = ", ".join(f"{labels[k]} {_two(row[k])}" for k in item.salient)
                lines += _comment(f"{written_names[item.item]}: {loads} (loadings of {cut} or more on several factors)",
                                  "  ")
            else:
                lines += _comment(f"{written_names[item.item]}: largest loading {_two(item.loading)} on "
                                  f"{labels[item.factor]} (no loading of {cut} or more)", "  ")
    placed = [item.item for k, group in enumerate(members) if written[k] for item in group]
    declared = [written_names[name] for name in names if name in set(ordinal) and name in set(placed)]
    if declared:
        lines += [""]
        lines.extend(_statement("ordinal", declared))
    keying = keying_sentence(labels, correlations)
    if keying[0]:
        lines += [""] + _comment(keying[0] + METHOD_WORDS + keying[1])
    return DraftModel("\n".join(lines) + "\n", labels, tuple(written), placements, threshold, keying)
