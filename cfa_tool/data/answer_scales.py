"""The common answer scales whose words a column of text may hold, and the 'answers' statement a refusal of such a
column suggests (data/answer_words.py codes the words once a model states them; nothing here applies a coding)."""

from __future__ import annotations

import numpy as np

from cfa_tool.language.spec import answer_key
from cfa_tool.numbers import number as strict_number

#: the common answer scales whose words, all found in one column, let the refusal of a text column suggest the
#: statement to write (never applied without it); each scale in its order, lowest first
COMMON_SCALES: tuple[tuple[str, ...], ...] = (
    ("Strongly disagree", "Disagree", "Neither agree nor disagree", "Agree", "Strongly agree"),
    ("Strongly disagree", "Disagree", "Neutral", "Agree", "Strongly agree"),
    ("Strongly disagree", "Disagree", "Somewhat disagree", "Neither agree nor disagree", "Somewhat agree", "Agree",
     "Strongly agree"),
    ("Strongly disagree", "Disagree", "Agree", "Strongly agree"),
    ("Never", "Rarely", "Sometimes", "Often", "Always"),
    ("Never", "Sometimes", "Often", "Always"),
    ("Never", "Rarely", "Sometimes", "Often", "Very often"),
    ("Very dissatisfied", "Dissatisfied", "Neither satisfied nor dissatisfied", "Satisfied", "Very satisfied"),
    ("Very dissatisfied", "Dissatisfied", "Neutral", "Satisfied", "Very satisfied"),
)


#: a column of more distinct words than this is not shown as answer words (free text, names)
MOST_WORDS_SHOWN = 12


def distinct_words(values: np.ndarray) -> list[str]:
    """The distinct words of a column (case and surrounding spaces aside; numbers and empty cells left out), as the
    file first writes each, in the order they first appear."""
    written: dict[str, str] = {}
    for value in values:
        if isinstance(value, str) and value.strip() and strict_number(value.strip()) is None:
            written.setdefault(answer_key(value), value.strip())
    return list(written.values())


def stray_text(values: np.ndarray, few: bool = True) -> bool:
    """Whether a column's text cells look like slips among numbers (a typed 'x', a '?'), not answers recorded as
    words: at most 3 text cells (or 1% of the cells), against at least ten times as many numbers.  ``few`` False:
    text among numbers however many its cells, against ten times as many numbers (a word of no answer such as 'Weiß
    nicht' in 5 of 300 cells, which a researcher gives with --missing-codes: data.moments.stray_words, s26)."""
    texts = numbers = 0
    for value in values:
        if isinstance(value, str):
            if value.strip():
                if strict_number(value.strip()) is None:
                    texts += 1
                else:
                    numbers += 1
        elif value is not None and not (isinstance(value, float) and value != value):
            numbers += 1
    return 0 < texts and (not few or texts <= max(3, len(values) // 100)) and numbers >= 10 * texts


def _scale_numbers(values: np.ndarray, points: int) -> bool:
    """Whether some cells of a column of words hold whole numbers from 1 to ``points`` (answers typed as the scale's
    numbers; a totals row's larger numbers are no answers)."""
    for value in values:
        number = strict_number(value.strip()) if isinstance(value, str) else value
        if isinstance(number, (int, float, np.integer, np.floating)) and not isinstance(number, (bool, np.bool_)) \
                and number == number and float(number).is_integer() and 1 <= number <= points:
            return True
    return False


def suggested_statement(values: np.ndarray) -> str | None:
    """The 'answers' statement to write for a column whose words (case and surrounding spaces aside) all come from
    one common agreement, frequency or satisfaction scale, in the scale's order with the words as the file writes
    them, and the numbers 1 to k read as themselves when some cells hold them (numbers do not decide the scale); None
    otherwise.  Only a suggestion: it is never applied without the statement."""
    # numbers among the words (a means row, a bad export) do not decide the scale; the statement's own check names
    # them when it is written
    written = {answer_key(w): w for w in distinct_words(values)}
    if not written:
        return None
    ends = end_points_statement(values, list(written.values()))
    if ends is not None:  # two words beside a run of numbers: the words label the scale's ends
        return ends
    keyed = [(scale, [answer_key(w) for w in scale]) for scale in COMMON_SCALES]
    whole = [(scale, keys) for scale, keys in keyed if set(written) == set(keys)]
    holding = [(scale, keys) for scale, keys in keyed if set(written) <= set(keys)]
    found = whole or holding
    if len(written) < 2 or len(found) != 1:  # no scale, or several that would code the words differently
        return None
    scale, keys = found[0]
    listed = ", ".join(f'"{written.get(k, w)}" = {i}' for i, (k, w) in enumerate(zip(keys, scale), start=1))
    if _scale_numbers(values, len(scale)):  # answers typed as the scale's numbers beside its words: read them as
        # themselves too, or the statement's first run stops on them (new-user trial s23, 11)
        listed += ", " + ", ".join(f"{i} = {i}" for i in range(1, len(scale) + 1))
    absent = ", ".join('"' + w + '"' for k, w in zip(keys, scale) if k not in written)  # words no cell holds
    if not absent:
        return f"answers {listed}"
    return (f"answers {listed} (no cell holds {absent}: if your scale has no such answer, leave it out and number "
            f"the other answers from 1)")


def _whole_numbers(values: np.ndarray) -> list[int]:
    """The distinct whole numbers a column's cells hold (numbers or text reading as one), lowest first."""
    found = set()
    for value in values:
        number = strict_number(value.strip()) if isinstance(value, str) else value
        if isinstance(number, (int, float, np.integer, np.floating)) and not isinstance(number, (bool, np.bool_)) \
                and number == number and float(number).is_integer():
            found.add(int(number))
    return sorted(found)


def end_points_statement(values: np.ndarray, words: list[str]) -> str | None:
    """The 'answers' statement for a column whose answers are numbers with words at the two ends only, as many survey
    platforms export a scale labelled at its end points ('Never', 1, 2, 3, 4, 5, 'Always'; new-user trial s25: the
    advice coded the words from 1 up, giving 'Never' the code of the answer 1): every number listed as itself, and
    each word coded by its place on the scale, one below the lowest number and one above the highest.  The words'
    order is that of the common scales holding both (``words``: the column's two distinct words); when no common scale
    orders them, the statement says which word it takes for the lowest.  None unless the column holds exactly two
    words and at least two whole numbers in an unbroken run."""
    numbers = _whole_numbers(values)
    if len(words) != 2 or len(numbers) < 2 or numbers != list(range(numbers[0], numbers[-1] + 1)):
        return None
    first, second = (answer_key(w) for w in words)
    orders = {scale.index(first) < scale.index(second)
              for scale in ([answer_key(w) for w in s] for s in COMMON_SCALES) if first in scale and second in scale}
    low, high = (words if orders == {True} else words[::-1] if orders == {False} else words)
    listed = ", ".join([f'"{low}" = {numbers[0] - 1}'] + [f"{k} = {k}" for k in numbers]
                       + [f'"{high}" = {numbers[-1] + 1}'])
    assumed = "" if len(orders) == 1 else f" (if \"{low}\" is the lowest answer and \"{high}\" the highest)"
    return (f"answers {listed}{assumed}: the numbers {numbers[0]} to {numbers[-1]} listed as themselves, and each "
            f"word coded by its place on the scale, one below the lowest number and one above the highest; the words' "
            f"codes come from the questionnaire's scale, never from this tool")
