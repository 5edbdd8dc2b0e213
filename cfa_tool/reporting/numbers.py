"""Number formatting shared by the reporters."""

from __future__ import annotations

import math
import re

from cfa_tool.assessment.fit_indices import FIT_GUIDES
from cfa_tool.note_parts import Command, Note, Text, View, said
from cfa_tool import numbers as _shared
from cfa_tool.numbers import rounded_number, user_number
from cfa_tool.numerics.plain import decimals_beside


def missing(value) -> bool:
    return value is None or (isinstance(value, float) and not math.isfinite(value))


def num(value, digits: int = 3) -> str:
    """A value to ``digits`` decimals; a value that rounds to zero has no minus sign (never '-0.00')."""
    if missing(value):
        return ""
    text = f"{value:.{digits}f}"
    return text.lstrip("-") if float(text) == 0.0 else text


def est_num(value, digits: int = 3) -> str:
    """An estimate, a standard error, an interval's end or another value the tool computed for a table, to ``digits``
    decimals as :func:`num` prints it, but never a rounded zero for a value that is not zero: one smaller in size than
    the last decimal's unit (10 ** -digits), which ``digits`` decimals would print as 0.000 or to less than one
    significant digit, in plain digits to two significant digits (cfa_tool.numbers.rounded_number: a loading fixed at
    1e-6 as '0.000001', an error variance of 4.8e-7 as '0.00000048'; s23: an item scaled in the thousands printed every
    loading and standard error as 0.000).  The one rule of every table cell that holds such a value, so that an
    estimate of 0.00055 ('0.00055', not '0.001') stands inside its interval [0.00036, 0.00075]; a value that is zero
    stays '0.000'."""
    if missing(value):
        return ""
    if value != 0 and abs(value) < 10.0 ** -digits:
        return rounded_number(value, 2)
    return num(value, digits)


def est_unit(value, digits: int = 2) -> str:
    """A value bounded by 1 in size (a standardized estimate, a correlation, an R²) as :func:`unit` prints it, without
    its leading zero, by :func:`est_num`'s rule: never a rounded zero for a value that is not zero ('.000001')."""
    if missing(value):
        return ""
    if value != 0 and abs(value) < 10.0 ** -digits:
        text = rounded_number(value, 2)
        return text[1:] if text.startswith("0.") else "-" + text[2:]
    return unit(value, digits)

def explored_unit(value, digits: int = 2) -> str:
    """An entry of an exploratory solution (a pattern or structure loading, a factor correlation, a communality) as
    :func:`unit` prints it, to ``digits`` decimals in every cell, a value that rounds to zero as '.00' without a sign.
    Every entry of an exploratory solution is an estimate (none is fixed), so a rounded zero cannot be taken for a
    fixed one, which is why :func:`est_unit` keeps a confirmatory table's free estimate from printing as zero; the
    sign of a loading of -.0004 says nothing, and a reader of a pattern matrix scans columns of two decimals (new-user
    trial s25: '-.00038' among two-decimal loadings).  The one rule of the values of every view of ``explore``; its
    data files (CSV) keep the full numbers."""
    return unit(value, digits)


#: words joined as a sentence lists them ('a, b, and c'): the one list rule, declared in cfa_tool.numbers for the
#: workflows' notes too
word_list = _shared.word_list


def needed_decimals(value: float, fewest: int = 0, most: int = 9, within: float = 0.0) -> int:
    """The fewest decimals, from ``fewest`` up to ``most``, that print ``value`` neither as 0 nor further from it than
    ``within`` of its size: 0 for a number the user gave, printed exactly with as many decimals as it has (a target
    power of .825 as '.825', of .8 as '.80' with ``fewest`` 2), or a share of itself for a computed one (2/3 as '67%'
    within half a percent of itself, a share of .0001 as '0.01%', never '0%').  The one rule of 'as many decimals as
    it needs'; ``most`` where none fewer does.  (2/3 as 67%: 67 is 0.5% of 66.67 away, to the last binary digit.)"""
    for digits in range(fewest, most):
        shown = round(value, digits)
        if shown != 0 and abs(shown - value) <= within * abs(value) + 1e-12:  # the slack of binary fractions
            return digits
    return most


def unit(value, digits: int = 3, beside: float | None = None) -> str:
    """A value bounded by 1 in size without its leading zero (.931), as journals print indices; ``beside``: a guide
    value the reader compares it with, which it then prints on the right side of (:func:`decimals_beside`)."""
    if missing(value):
        return ""
    digits = decimals_beside(value, beside, digits)
    text = f"{value:.{digits}f}"
    if float(text) == 0.0:
        text = text.lstrip("-")
    if text.startswith("0."):
        return text[1:]
    if text.startswith("-0."):
        return "-" + text[2:]
    return text


def index_text(value, digits: int = 3, beside: float | None = None) -> str:
    """A fit index as :func:`unit` prints it, or 'not defined' where its formula has no value (e.g. a TLI whose
    baseline model fits no worse per degree of freedom than the model), never an empty place in a sentence."""
    return "not defined" if missing(value) else unit(value, digits, beside)


def fit_index_text(index: str, value, digits: int = 3) -> str:
    """A fit index's value ('cfi', 'tli', 'rmsea', 'srmr') printed on the side of its guide value it lies on
    (assessment.fit_indices.FIT_GUIDES; :func:`unit`), or 'not defined' where its formula has no value
    (:func:`index_text`): the one way every report prints a fit index read against its guide."""
    return index_text(value, digits, FIT_GUIDES[index].value)


# The one typographic rule of the views a reader prints (the Word file, the HTML page, the path diagram that both
# show): a minus sign before a number, and the minus of a formula, is the true minus (U+2212, which is as wide as a
# plus and after which no line breaks, where a hyphen-minus is narrower and may end a line), and a relation written with two characters before a
# number is its mathematical sign ('>= .95' as '\u2265 .95').  Values are formatted once, with the plain hyphen-minus
# (:func:`unit`, :func:`num`): the terminal, Markdown and the data files (CSV, where '\u2212.63' would not read as a
# number) keep them so, and the printed views pass their text through :func:`printed`.
_MINUS = re.compile(r"(?<![\w.\u2212])-(?=[\d.])")  # a hyphen before a number that is not inside a word
# ... and the minus of a formula ('1 - (RMSEA / baseline RMSEA)\u00b2', '1 + (m - 1) ICC', 'N F - c df'): a hyphen
# between spaces with an operand on each side, a number, a bracket, a square or a one-letter symbol, never a word
# (so that a name such as 'wave - two' keeps its hyphen)
_OPERATOR_MINUS = re.compile(r"((?<![\w.])[A-Za-z]|[\d)\u00b2]) - (?=(?:[A-Za-z](?![\w'])|[\d(.]))")
_RELATION = re.compile(r"(?<![<>=!])([<>])=(?=\s?[\d.\u2212-])")  # '>= .95', '(RMSEA <= .05)'
PRINTED_RELATIONS = {">": "\u2265", "<": "\u2264"}


def printed(text: str) -> str:
    """``text`` as a printed view sets it (the rule above): '-.63' as '\u2212.63', '1 - (a / b)' as '1 \u2212 (a / b)',
    '>= .95' as '\u2265 .95'."""
    text = _OPERATOR_MINUS.sub("\\1 \u2212 ", _MINUS.sub("\u2212", text))
    return _RELATION.sub(lambda m: PRINTED_RELATIONS[m.group(1)], text)


def printed_line(text: Text, view: View) -> str:
    """A report's line (a problem, a note, a caution) as a printed view says it in ``view``: its words by
    :func:`printed` ('(p ≥ .05)'), what the program's user runs or writes (note_parts.Command: an option, a model
    file's statement) as written, so that it can be copied ('--missing-codes -99'); a view without commands (a
    manuscript's) says their words, which are printed as words are."""
    if isinstance(text, str):
        return printed(text)
    return "".join(said(Note((part,)), view) if isinstance(part, Command) and view.commands
                   else printed(said(Note((part,)), view)) for part in text.parts)


def guide_text(index: str, signs: bool = False) -> str:
    """A fit index's guide as the reports print it: '>= .95', '<= .06' (assessment.fit_indices.FIT_GUIDES);
    ``signs``: with the mathematical signs ('\u2265 .95') of the printed views' rule (:func:`printed`), as a
    paragraph for a journal writes it in every view."""
    guide = FIT_GUIDES[index]
    text = f"{guide.relation} {short(guide.value)}"
    return printed(text) if signs else text


def guides_text(indices, signs: bool = False) -> str:
    """Fit indices with their guides: 'CFI >= .95, RMSEA <= .06, SRMR <= .08' (:func:`guide_text`)."""
    return ", ".join(f"{index.upper()} {guide_text(index, signs)}" for index in indices)


def p_value(value) -> str:
    if missing(value):
        return ""
    if value > 0.999:  # APA style: a p-value of 1 is never exact
        return "> .999"
    return "< .001" if value < 0.001 else unit(value, 3)


def p_phrase(p) -> str:
    """A p-value after 'p': '< .001', '> .999' or '= .167'."""
    text = p_value(p)
    return text if text.startswith(("<", ">")) else f"= {text}"


def signed(value: float | None, digits: int = 3, beside: float | None = None) -> str:
    """A change bounded by 1 in size with its sign and without its leading zero (+.026, -.035); ``beside`` as for
    :func:`unit`.  A change that rounds to zero has no sign (.000, as a paper prints it: new-user trial s19, where
    '-.000' and '+.000' stood in the tables and the methods text; a sign is never the wrong one, which new-user s14
    found of '+.000' for -0.0002): the one rule of every signed difference (:func:`signed_num` for others)."""
    if missing(value):
        return ""
    return _with_sign(unit(value, digits, beside))


def signed_num(value: float | None, digits: int = 1) -> str:
    """A change of any size to ``digits`` decimals with its sign (+2.3, -0.4), one that rounds to zero without one
    (0.0): :func:`signed`'s rule for values not bounded by 1 (:func:`num`)."""
    if missing(value):
        return ""
    return _with_sign(num(value, digits))


def _with_sign(text: str) -> str:
    """A number as text (its minus kept, none where it rounds to zero) with a plus before a positive one."""
    return text if text.startswith("-") or float(text) == 0.0 else "+" + text


def short(value) -> str:
    """A value below 1 as given (no trailing zeros) without its leading zero (.05, .08): a user's number
    (cfa_tool.numbers.user_number, never rounded: a significance level of .005 was printed '.01', an intraclass
    correlation of .0625 '0.062') or a guide value."""
    if missing(value):
        return ""
    text = user_number(value)
    return text[1:] if text.startswith("0.") else ("-" + text[2:] if text.startswith("-0.") else text)
