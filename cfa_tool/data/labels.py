"""Text labels from data cells (group, cluster and stratum labels, filter values), read the way people mean them.

'north' and 'north ' with a trailing space, 'north' with an invisible zero-width space (U+200B) copied from a web
form, or 'cafe' with an accent stored in two Unicode forms, look the same on screen and are the same group to the
researcher; whole numbers stored as floats (2.0) are the label 2.  One function makes every such label
(:func:`label_text`), so groups, cluster and stratum labels and row filters agree, and the notes
(:func:`label_notes`) say the same rule.
"""

from __future__ import annotations

import unicodedata
from dataclasses import dataclass
from collections.abc import Iterable
from typing import TYPE_CHECKING

from cfa_tool.numbers import cut_list, more_words, names_shown, user_number, word_list
from cfa_tool.errors import printable
from cfa_tool.language.names import composed
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.options import Option

if TYPE_CHECKING:
    import numpy as np
    import pandas as pd


#: format characters (Unicode category Cf) that are drawn as signs, not invisible: the prepended concatenation marks
#: (Unicode's PropList.txt, Prepended_Concatenation_Mark: the Arabic number sign U+0600 and its kin); a label keeps them
DRAWN_FORMAT = frozenset("\u0600\u0601\u0602\u0603\u0604\u0605\u06dd\u070f\u0890\u0891\u08e2\U000110bd\U000110cd")
#: format characters that change how the characters beside them are drawn: the joiners U+200C and U+200D (the joined
#: or separate forms of Arabic and Indic letters, emoji sequences), the direction marks and controls (the order of
#: right-to-left text), the tags (flag emoji).  Beside plain ASCII text they change nothing drawn and are read as the
#: other invisible characters are; in a label with other characters a label keeps them
SHAPING_FORMAT = frozenset("\u200c\u200d\u200e\u200f\u061c\u202a\u202b\u202c\u2066\u2067\u2068\u2069") | frozenset(
    chr(c) for c in [0xE0001, *range(0xE0020, 0xE0080)])
#: direction overrides, which reverse even plain ASCII text ('north' drawn as 'htron'): a label always keeps them
OVERRIDES = frozenset("\u202d\u202e")


def label_text(value) -> str:
    """A cell as a label, by the one rule of every label (groups, clusters, strata, row filters' values): whole-number
    floats without '.0'; text without its invisible format characters (Unicode category Cf: a zero-width space
    U+200B, a soft hyphen U+00AD, a byte-order mark U+FEFF, a left-to-right mark U+200E...), then without spaces at
    its ends (a no-break space too), in Unicode's composed form (NFC; Unicode Standard Annex #15).  Format characters
    that are drawn or change what is drawn stay (:data:`DRAWN_FORMAT`, :data:`OVERRIDES`, and :data:`SHAPING_FORMAT`
    in a label with other characters than plain ASCII): labels that differ only by them look different, and
    :func:`look_alike_labels` finds them."""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    text = str(value)
    if not text.isascii():
        text = _without_invisible(text)
    return composed(text.strip())


def distinct_cells(values) -> tuple[list, "np.ndarray"]:
    """Each distinct cell of ``values`` (a column's cells, in their order) once, and the place of every cell's among
    them: (cells, places), ``values[i]`` alike ``cells[places[i]]``, the cells in order of first sight.  Cells are
    alike when of one type with one text (``str``): all that :func:`label_text` and the notes on labels read of a
    cell, so a rule applied to the distinct cells gives what it gives cell by cell (1 and True, or 0.0 and -0.0,
    which a hash table takes as one value, stay apart).  Columns of text alone and of numpy's numbers (without -0.0)
    are read by pandas' hash table; others cell by cell as iterating them gives the cells."""
    import numpy as np
    import pandas as pd

    array = None
    if isinstance(values, (pd.Series, np.ndarray)) and values.dtype.kind in "fiubO" and (
            isinstance(values.dtype, np.dtype) or values.dtype == "str"):  # not pandas' nullable types: pd.NA is a cell
        array = values.to_numpy() if isinstance(values, pd.Series) else values
        if array.ndim != 1 or (array.dtype.kind == "O" and pd.api.types.infer_dtype(array, skipna=False) != "string") \
                or (array.dtype.kind == "f" and bool(np.any(np.signbit(array) & (array == 0)))):
            array = None
    if array is not None:
        places, uniques = pd.factorize(array, use_na_sentinel=False)  # NaN, the one missing value of numbers: a cell
        cells = np.asarray(uniques, dtype=object).tolist() if array.dtype.kind != "O" else list(uniques)
        return cells, places.astype(np.intp, copy=False)
    index: dict = {}
    cells = []
    places = np.empty(len(values), dtype=np.intp)
    for i, v in enumerate(values):
        key = (type(v), str(v))
        k = index.get(key)
        if k is None:
            k = index[key] = len(cells)
            cells.append(v)
        places[i] = k
    return cells, places


def group_keys(cells: pd.Series) -> pd.Series:
    """Each cell of a group column as its group's label (data.labels.label_text), missing for an empty cell and for a
    cell of spaces and invisible format characters alone (a zero-width space), which the data file's reader leaves
    as text but shows as empty as a cell of spaces, which it reads as empty.  Missing is the missing value of the
    result's type (NaN in a column of text, pd.NA in pandas' 'string'), never None: test it with pd.isna or
    Series.isna, not ``is None`` (re-check s17: a scored file's empty group cells were counted as a group the fit
    lacks).  Each distinct cell is read once
    (data.labels.distinct_cells) where the column holds numbers, text (pandas' 'str') or Python objects; other columns
    (categories, nullable types, dates) cell by cell by Series.map, whose result keeps their kind.  The one rule of
    groups (data.groups), and of the sampling design's clusters and strata (data.sample_design)."""
    import numpy as np
    import pandas as pd

    def key(v):
        return None if pd.isna(v) else (label_text(v) or None)

    if not len(cells) or not ((isinstance(cells.dtype, np.dtype) and cells.dtype.kind in "fiubO")
                              or cells.dtype == "str"):
        return cells.map(key)
    distinct, places = distinct_cells(cells)
    keys = np.empty(len(distinct), dtype=object)
    keys[:] = [key(v) for v in distinct]
    # the constructor infers the labels' type as Series.map does (text, or object when no cell has a label)
    return pd.Series(keys[places], index=cells.index, name=cells.name).__finalize__(cells)


def cell_counts(values) -> list[tuple[object, int]]:
    """Each distinct cell of ``values`` (:func:`distinct_cells`) with its number of cells, in order of first sight."""
    import numpy as np

    cells, places = distinct_cells(values)
    return list(zip(cells, np.bincount(places, minlength=len(cells)).tolist()))


def refuse_container_cells(frame: "pd.DataFrame", columns) -> None:
    """Refuse a cell holding a list, a dict, a set or an array (what a data frame built in Python may hold, never a
    file's cell) in any of ``columns`` of ``frame`` that it has: the group, cluster, strata, weights, id and row
    filter columns, by the rule of the item columns (data.non_answers, which refuses them in the items): one line
    naming the column and the row.  Such a cell is no label (a group named "['north']"), no weight, and no cluster
    (a TypeError from hashing it, re-check s17, N7)."""
    from cfa_tool.data.non_answers import CONTAINERS, refuse_containers  # the one rule and message of item columns

    for column in dict.fromkeys(columns):
        if column not in frame.columns or frame[column].dtype != object:
            continue
        series = frame[column]
        if any(isinstance(v, CONTAINERS) for v in series.tolist()):
            refuse_containers(series, column)


def _without_invisible(text: str) -> str:
    """``text`` without the format characters :func:`label_text` removes."""
    if not any(unicodedata.category(ch) == "Cf" for ch in text):
        return text
    kept = DRAWN_FORMAT | OVERRIDES
    rest = "".join(ch for ch in text if unicodedata.category(ch) != "Cf")
    if not rest.isascii():
        kept = kept | SHAPING_FORMAT
    return "".join(ch for ch in text if unicodedata.category(ch) != "Cf" or ch in kept)


def invisible_characters(text: str) -> str:
    """The format characters that :func:`label_text` removes from ``text``, each once in order of first sight."""
    read = _without_invisible(text)
    if read == text:
        return ""
    kept = set(read)
    return "".join(dict.fromkeys(ch for ch in text if unicodedata.category(ch) == "Cf" and ch not in kept))


def spelled_out(text: str) -> str:
    """``text`` for a message, its control and format characters written as escapes ('north\\u200b'): printable, with
    the invisible format characters (Unicode category Cf) shown too."""
    return "".join(f"\\u{ord(ch):04x}" if unicodedata.category(ch) == "Cf" and ord(ch) <= 0xFFFF
                   else f"\\U{ord(ch):08x}" if unicodedata.category(ch) == "Cf" else ch for ch in printable(text))


def look_alike_labels(values) -> list[list[tuple[str, int]]]:
    """Labels (as :func:`label_text` reads ``values``) that differ only by format characters a label keeps because
    they are drawn or change what is drawn (a joiner between Persian letters, a right-to-left override): [[(label,
    cells), ...], ...], each list of two labels or more.  Read as one they would join labels that look different;
    kept apart they would split what may be one group; only the user knows."""
    from collections import Counter

    by_letters: dict[str, list[tuple[str, int]]] = {}
    labels: Counter = Counter()
    for v, n in cell_counts(values):  # each distinct cell read once
        labels[label_text(v)] += n
    for label, n in labels.items():
        bare = "".join(ch for ch in label if unicodedata.category(ch) != "Cf")
        by_letters.setdefault(bare, []).append((label, n))
    return [sorted(found) for _, found in sorted(by_letters.items()) if len(found) > 1]


def merged_labels(values) -> list[tuple[str, list[tuple[str, int]]]]:
    """Labels read from cells written otherwise (for a note): several different raw texts read as one label
    ('north' and 'north ', 'north' and 'north' with a zero-width space), or text cells with spaces at their ends,
    invisible format characters or in another Unicode form read without them ('manager ' as 'manager'), each raw
    text with its number of cells: [(label, [(raw text, cells), ...])] (:func:`label_text`'s rule)."""
    from collections import Counter

    raw: dict[str, Counter] = {}
    trimmed = set()
    for v, n in cell_counts(values):  # each distinct cell read once
        label = label_text(v)
        raw.setdefault(label, Counter())[str(v)] += n
        if isinstance(v, str) and v != label:
            trimmed.add(label)
    return [(label, sorted(texts.items())) for label, texts in raw.items() if len(texts) > 1 or label in trimmed]


def case_variants(values: Iterable[object]) -> list[list[tuple[str, int]]]:
    """Labels (as :func:`label_text` reads them) that differ only in upper and lower case ('north', 'North'), each
    with its number of cells: [[(label, cells), ...], ...].  They stay different groups, since only the user knows
    whether they are one."""
    return [sorted(found) for _, found in sorted(_by_case(values).items()) if len(found) > 1]


def other_case(values: Iterable[object], label: str) -> tuple[tuple[str, int], ...]:
    """The labels among ``values`` (as :func:`label_text` reads them) that differ from ``label`` only in upper and
    lower case, each with its number of cells: (('North', 63),) for 'north'; the rule of :func:`case_variants` for
    one label (a row filter's text)."""
    return tuple(sorted(found for found in _by_case(values).get(label.casefold(), ()) if found[0] != label))


def _by_case(values) -> dict[str, list[tuple[str, int]]]:
    """The labels of ``values`` (read by :func:`label_text`) with their numbers of cells, by their case-folded text."""
    from collections import Counter

    by_fold: dict[str, list[tuple[str, int]]] = {}
    labels: Counter = Counter()
    for v, n in cell_counts(values):  # each distinct cell read once
        labels[label_text(v)] += n
    for label, n in labels.items():
        by_fold.setdefault(label.casefold(), []).append((label, n))
    return by_fold


def label_notes(frame: pd.DataFrame, column: str, shown: int = 5, part: str = "group",
                unit: str | tuple[str, str] = "group") -> list[Text]:
    """Notes on how the labels of ``column`` were read: a column of codes read as their value labels (SPSS, Stata),
    and labels that differed only by spaces at their ends, invisible format characters or Unicode form and were read
    as one (:func:`label_text`), each raw text with its rows and the invisible characters named (U+200B ZERO WIDTH
    SPACE): of the group column (every command with groups gives it through
    :func:`cfa_tool.pipeline.inputs.moments_for` or :func:`cfa_tool.pipeline.inputs.ordinal_groups`), or with
    ``part`` and ``unit`` of a cluster or strata column (cfa_tool.data.sample_design); ``unit``: one word, or (one,
    several) where the plural is not the word with an 's' ('stratum', 'strata')."""
    unit, units = unit if isinstance(unit, tuple) else (unit, f"{unit}s")
    values = frame[column].dropna()
    notes = []
    coded = code_order(frame, column)
    if coded:
        pairs = list(coded.items())
        listed = cut_list(pairs, shown, lambda pair: f"{printable(pair[0])} as '{printable(pair[1])}'")
        notes.append(f"the {part} column '{printable(column)}' holds codes with value labels in the data file; its "
                     f"{units} are named by those labels ({listed})")
        for label, codes in shared_labels(coded):
            said = word_list(printable(c) for c in codes)
            notes.append(f"in the {part} column '{printable(column)}', codes {said} carry the same value label "
                         f"'{printable(label)}' and were read as one {unit}; if they are different {units}, give them "
                         f"different value labels in the data file")
    spelled = spelled_labels(frame, column, values)
    if spelled:
        notes.append(f"in the {part} column '{printable(column)}', numbers written in different ways were read as one "
                     f"{unit}: {listed_labels(spelled, shown)}"
                     f" (if they are different {units}, give them labels that are not plain numbers, such as 'D01')")
    found = merged_labels(values)
    blank = [texts for label, texts in found if not label]
    if blank and part == "group":  # cells that look empty are no group (data.groups.group_keys)
        cells = sum(n for texts in blank for _, n in texts)
        named = dict.fromkeys(f"U+{ord(ch):04X} {unicodedata.name(ch, 'UNNAMED CHARACTER')}"
                              for texts in blank for text, _ in texts for ch in invisible_characters(text))
        notes.append(f"in the {part} column '{printable(column)}', {cells} cell{'s' if cells != 1 else ''} holding "
                     f"only invisible format characters ({', '.join(named)}) or spaces look empty and were read as "
                     f"no value, so their rows have no {unit}")
        found = [(label, texts) for label, texts in found if label]
    merged = [(label, texts) for label, texts in found if len(texts) > 1]
    if merged:
        notes.append(f"in the {part} column '{printable(column)}', labels that differ only by spaces at their ends, "
                     f"by invisible format characters or by Unicode form were read as one {unit}: "
                     f"{listed_labels(merged, shown)}")
    alone = [(label, texts) for label, texts in found if len(texts) == 1]
    if alone:
        notes.append(f"in the {part} column '{printable(column)}', labels written with spaces at their ends, with "
                     f"invisible format characters or in another Unicode form were read without them: "
                     f"{listed_labels(alone, shown)}")
    from cfa_tool.data.readers import MARKED, MeasureLevel, measure_levels

    marked = frame.attrs.get(MARKED, {}).get(column)
    if marked:  # 'N/A' read as no answer: a marker of missing data, or the name of a group?
        listed = word_list(f"'{printable(m)}' ({n} cell{'s' if n != 1 else ''})" for m, n in marked.items())
        notes.append(f"in the {part} column '{printable(column)}', cells written as {listed} were read as no answer, "
                     f"so their rows have no {unit}; if such a marker names a {unit}, write it as a word (such as 'not "
                     f"applicable') in a copy of the file")
    if part == "group" and not coded and measure_levels(frame).get(column) is MeasureLevel.SCALE:
        count = values.nunique()
        notes.append(f"the group column '{printable(column)}' is measured as a scale (amounts) in the SPSS file and "
                     f"has no value labels: each of its {count} different values is a group of its own; if its values "
                     f"are amounts (an age, a count), make a column of the groups meant (such as ranges of values) in "
                     f"a copy of the file")
    said = no_answer_labels(values)
    if said:
        few = names_shown(len(said), shown)
        named = [f"'{printable(label)}' ({n} row{'s' if n != 1 else ''})" for label, n in said[:few]]
        listed = (", ".join(named) + more_words(len(said) - few) if few < len(said) else
                  word_list(named))
        first = printable(said[0][0]).replace("'", "")
        filter_text = f"{printable(column)} != '{first}'"
        notes.append(f"in the {part} column '{printable(column)}', {listed} read{'s' if len(said) == 1 else ''} "
                     f"like no answer, yet {'was' if len(said) == 1 else 'were'} kept as "
                     f"{f'a {unit}' if len(said) == 1 else units} of {'its' if len(said) == 1 else 'their'} own (words that say no "
                     f"answer are read as missing in item columns only); if such rows have no {unit}, leave them out "
                     f"with a row filter" + Note((Command(f" such as {Option.KEEP.given(filter_text)}"),)))
    return notes


def nominal_items_note(frame: "pd.DataFrame", items, source: str) -> list[str]:
    """The note naming the model's items that the SPSS file measures as nominal (categories without an order) while
    it measures other items as ordinal or scale: the model analyses every item's codes as ordered answers, so an item
    of unordered categories among them (a district code) is no answer on a scale.  Items all nominal say nothing
    (SPSS sets that level on its own for numeric columns of few values)."""
    from cfa_tool.data.readers import MeasureLevel, measure_levels

    levels = measure_levels(frame)
    nominal = [x for x in items if levels.get(x) is MeasureLevel.NOMINAL]
    others = sorted({levels[x].value for x in items if x in levels and levels[x] is not MeasureLevel.NOMINAL})
    if not nominal or not others:
        return []
    one = len(nominal) == 1
    named = word_list(f"'{printable(x)}'" for x in nominal)
    return [f"{source}: the SPSS file measures the item{'' if one else 's'} {named} as nominal (categories without "
            f"an order) and the other items as {word_list(others, 'or')}; the model analyses every item's codes as "
            f"ordered answers: check that {'its' if one else 'their'} codes are answers on the scale of the others, "
            f"or leave {'it' if one else 'them'} out of the model"]


def no_answer_labels(values) -> list[tuple[str, int]]:
    """The labels among ``values`` (a column's cells) whose words say no answer ('N/A', 'Prefer not to say';
    data.non_answers.says_no_answer), each with its number of cells: [(label, cells)], in order of first sight."""
    from collections import Counter

    from cfa_tool.data.non_answers import says_no_answer

    counts: Counter = Counter()
    for v, n in cell_counts(values):  # each distinct cell read once
        if isinstance(v, str):
            counts[label_text(v)] += n
    return [(label, n) for label, n in counts.items() if says_no_answer(label)]


def spelled_labels(frame: pd.DataFrame, column: str, values) -> list[tuple[str, list[str]]]:
    """Labels of a number column that the file wrote in several ways ('1', '01', '1.0'), among ``values`` (the
    column's cells still in ``frame``), as the reader kept them (cfa_tool.data.readers, DataFrame.attrs)."""
    from cfa_tool.data.readers import SPELLINGS

    spellings = frame.attrs.get(SPELLINGS, {}).get(column)
    if not spellings:
        return []
    present = set(values.tolist())
    return [(label_text(float(value)), list(texts)) for value, texts in sorted(spellings.items()) if value in present]


def listed_labels(merged: list[tuple[str, list]], shown: int = 5) -> str:
    """"'north' (120 rows) and 'north ' (30 rows) as 'north'; ...": each label's raw texts, with their rows when
    counted ((text, rows) pairs, :func:`merged_labels`), invisible format characters spelled out and named
    ("'north\\u200b' (30 rows; U+200B ZERO WIDTH SPACE)")."""
    def named(text: str) -> str:
        found = invisible_characters(text)
        return "".join(f"; U+{ord(ch):04X} {unicodedata.name(ch, 'UNNAMED CHARACTER')}" for ch in found)

    def written(text) -> str:
        if isinstance(text, tuple):
            said = f"{text[1]} row{'s' if text[1] != 1 else ''}{named(str(text[0]))}"
            return f"'{spelled_out(str(text[0]))}' ({said})"
        return f"'{spelled_out(str(text))}'"

    return cut_list(merged, shown, lambda m: f"{word_list(written(t) for t in m[1])} as '{printable(m[0])}'",
                    sep="; ", lead="; and ")


def labelled_codes(frame: pd.DataFrame, value_labels: dict, items=()) -> list[str]:
    """Columns of ``frame`` other than ``items`` whose every code has a value label (SPSS, Stata): codes of
    categories, such as a department coded 1..5 and labelled 'Dispatch', 'Fleet', ...; a column with unlabelled
    codes (weights, say) is not one."""
    out = []
    for column, labels in value_labels.items():
        if column in items or column not in frame.columns or not labels:
            continue
        values = frame[column].dropna()
        if len(values) and values.isin(list(labels)).all():
            out.append(column)
    return out


def cells_as_labels(cells: pd.Series, labels: dict) -> pd.Series:
    """A column of labelled codes (:func:`labelled_codes`) as its value labels, empty cells kept: the one reading of
    such a column as the data name its values (groups, clusters and strata, and the halves drawn by them)."""
    return cells.map(lambda v: labels.get(v, v)).where(cells.notna(), cells)


def own_labels(column: str, value_labels: dict) -> bool:
    """Whether no other column has the value labels of ``column``: the items of a questionnaire share their answer
    scale's labels ('Strongly disagree' ... 'Strongly agree'), a code column's labels (departments) are its own."""
    labels = value_labels.get(column)
    return bool(labels) and not any(other != column and theirs == labels for other, theirs in value_labels.items())


#: the key of DataFrame.attrs that keeps, for each column read as its value labels, each code (as text) and its
#: label, in the order of the codes: groups are ordered and named by code as the file orders them
CODED_LABELS = "coded_labels"


def shared_labels(coded: dict) -> list[tuple[str, list]]:
    """The value labels that several codes carry ({code: label}, as :func:`code_order` gives it or as a data file's
    value labels hold it; labels read by :func:`label_text`), each with its codes in the order given:
    [(label, [code, ...])]; such codes are one group."""
    codes: dict[str, list] = {}
    for code, label in coded.items():
        codes.setdefault(label_text(label), []).append(code)
    return [(label, found) for label, found in codes.items() if len(found) > 1]


def code_order(frame, column: str) -> dict[str, str]:
    """{code as text: label} of a column read as its value labels, in code order ({} for other columns)."""
    return frame.attrs.get(CODED_LABELS, {}).get(column, {})


def ordered_labels(labels, frame, column: str) -> list[str]:
    """Group labels in a reader's order: a labelled column's by its codes; numbers by value; other text sorted."""
    labels = set(labels)
    # two codes with one label (1 and 3 both 'north') are one group, named once (said by :func:`label_notes`)
    coded = list(dict.fromkeys(label for label in code_order(frame, column).values() if label in labels))
    rest = labels - set(coded)

    def number(text: str):
        try:
            return float(text)
        except ValueError:
            return None

    if rest and all(number(x) is not None for x in rest):
        return coded + sorted(rest, key=number)
    return coded + sorted(rest)



def refuse_moved_labels(fitted: dict | None, value_labels: dict, items, source: str, fit_source: str) -> None:
    """Refuse to score data whose value labels sit on other codes than in the data of the fit that scores them
    (hostile trial s15, finding 3: 1 = 'Strongly agree' in the file scored, 1 = 'Strongly disagree' in the fit's
    data, every score of the wrong sign).  ``fitted``: the fit's labels (FitResult.labels, or 'labels' of its JSON:
    {'values': {item: {code: label}}}, codes as numbers or as text); ``value_labels``: the scored file's.  An item
    labelled on both sides with one label text (as :func:`label_text` reads it, case aside) on different codes is
    a DataError naming the item, the label, both codes and the recoding that gives each label the fit's code; labels
    missing on one side, carried by several codes, or saying no answer (read as missing on both sides: 8 'Refused'
    there, 9 'Refused' here; data.non_answers.says_no_answer), say nothing."""
    from cfa_tool.errors import DataError
    from cfa_tool.input_files import base_name

    theirs = (fitted or {}).get("values") or {}
    moved: list[tuple[str, list[tuple[str, float, float]]]] = []
    for item in items:
        here, there = _codes_by_label(value_labels.get(item)), _codes_by_label(theirs.get(item))
        pairs = [(label, code, there[key][1]) for key, (label, code) in here.items()
                 if key in there and there[key][1] != code]
        if pairs:
            moved.append((item, sorted(pairs, key=lambda p: p[1])))
    if not moved:
        return
    item, pairs = moved[0]
    label, code, their_code = pairs[0]
    recode = word_list(f"{user_number(c)} as {user_number(t)}" for _, c, t in pairs)
    others = [printable(i) for i, _ in moved[1:]]
    more = (f"; {len(others)} more item{'s' if len(others) != 1 else ''} ({cut_list(others, 5)}) {'has' if len(others) == 1 else 'have'} labels on other "
            f"codes too") if others else ""
    raise DataError(f"{base_name(source)}: the value label '{printable(label)}' of {printable(item)} is code {user_number(code)} "
                    f"here but code {user_number(their_code)} in the fit's data ({base_name(fit_source)}), so its answers would "
                    f"be scored as other answers{more}; recode {printable(item)} in a copy of {base_name(source)} "
                    f"({recode}) so that each label has the fit's code, then score it")


def _codes_by_label(labels: dict | None) -> dict[str, tuple[str, float]]:
    """{label as compared (:func:`label_text`, case aside): (label, code)} of one item's numeric codes whose label no
    other code carries and does not say no answer (data.non_answers.says_no_answer, loosely_none); codes written as text ('1.0', as a fit's JSON keeps them) read as
    numbers."""
    from cfa_tool.data.non_answers import loosely_none, says_no_answer
    from cfa_tool.numbers import number

    found: dict[str, list[tuple[str, float]]] = {}
    numeric = {}
    for code, text in (labels or {}).items():
        value = number(code) if isinstance(code, str) else code
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            numeric[float(value)] = text
    for value, text in numeric.items():
        if isinstance(text, str) and text.strip() and not says_no_answer(text, explained=True) \
                and not loosely_none(value, numeric):
            found.setdefault(label_text(text).casefold(), []).append((text, value))
    return {key: codes[0] for key, codes in found.items() if len(codes) == 1}


#: labelled codes a note on a missing-data helper read as its codes names before 'and N more'
HELPER_CODES_SHOWN = 8


def helper_codes_notes(frame: "pd.DataFrame", value_labels: dict, helpers, source: str) -> list[str]:
    """The note on each missing-data helper whose codes the data file labels (SPSS, Stata: a tenure band coded 1 to
    4): it is read as its codes, not as its labels as a group column is (data.matching.ChosenColumns), and the note
    names each code with its label, so that a reader sees the order the number gives the categories.  A helper enters
    the saturated-correlates likelihood as one number (Graham 2003), related to the answers and to their gaps by a
    straight line only: codes that order the categories carry that order, two categories are carried whole (as a
    0/1 column is); codes of unordered categories carry an arbitrary order (:func:`unordered_helpers`)."""
    notes = []
    for name in helpers:
        labels = value_labels.get(name) or {}
        if name not in frame.columns or not labels:
            continue
        present = sorted({float(v) for v in frame[name].dropna()})
        named = [(code, labels[code]) for code in present if code in labels]
        if not named:
            continue
        shown = cut_list(named, HELPER_CODES_SHOWN, lambda n: f"{label_text(n[0])} '{printable(str(n[1]))}'")
        what = ("with two values the number carries the whole distinction, as a 0/1 column would" if len(present) == 2
                else "its codes stand for an order of its categories: categories without an order (departments, say) "
                     "need one 0/1 column per category but one instead")
        notes.append(f"{source}: the missing-data helper '{printable(name)}' is read as its codes, which the file "
                     f"labels {shown}; a helper enters the likelihood as one number, related to the answers by a "
                     f"straight line, so {what}")
    return notes


def unordered_helpers(frame: "pd.DataFrame", value_labels: dict, helpers) -> tuple["HelperCategories", ...]:
    """The missing-data helpers of more than two labelled codes that their SPSS file measures as nominal (categories
    without an order: data.readers.MeasureLevel, a hint the file gives): entered as one number, their codes carry
    an order the file says they have not, so the answers are taken as missing at random given that order only.  A
    caution first in every view, with the way out (one 0/1 column per category but one; or the file's measure level
    set to ordinal when the codes do order the categories)."""
    from cfa_tool.data.readers import MeasureLevel, measure_levels

    levels = measure_levels(frame)
    out = []
    for name in helpers:
        if levels.get(name) is not MeasureLevel.NOMINAL or not value_labels.get(name) or name not in frame.columns:
            continue
        codes = sorted({float(v) for v in frame[name].dropna()})
        if len(codes) > 2 and all(c in value_labels[name] for c in codes):
            out.append(HelperCategories(name, len(codes)))
    return tuple(out)


@dataclass(frozen=True)
class HelperCategories:
    """A missing-data helper whose SPSS file measures it as nominal, with ``categories`` codes among its rows
    (:func:`unordered_helpers`): a caution that every view names first."""

    column: str
    categories: int
    problem_kind: str = "missing-data helper of unordered categories"

    def caution(self, source: str) -> str:
        name = source.replace("\\", "/").rsplit("/", 1)[-1]
        return (f"{name} measures the missing-data helper '{printable(self.column)}' as nominal (categories without "
                f"an order), yet a helper enters the likelihood as one number: its {self.categories} codes were "
                f"used as if they ordered its categories, so the answers are taken as missing at random given that "
                f"order only, not given the categories.")

    def advice(self) -> str:
        return ("give one 0/1 column per category but one as helpers instead (in a copy of the file); if the codes "
                "do order the categories, set the variable's measure level to ordinal in the file.")
