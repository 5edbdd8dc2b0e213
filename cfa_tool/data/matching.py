"""Check a model's variable names against the columns of a data set."""

from __future__ import annotations

from cfa_tool.numbers import count_text, more_words, names_shown, user_number, word_list
from cfa_tool.suggest import LOOK_ALIKE, close_names, look_alike
from cfa_tool.errors import DataError, ModelError, OptionError, character_names, printable
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option
from cfa_tool.language.spec import Spec
from cfa_tool.data.non_answers import advice_codes, says_no_answer
from cfa_tool.data.odd_values import FEW_SHARE, SHOWN, code_like
from cfa_tool.input_files import base_name


def refuse_name_twins(columns: list[str], source: str) -> None:
    """Refuse two columns whose names differ only by what cannot be seen, by the one rule of labels
    (data.labels.label_text: spaces at their ends, invisible format characters such as a zero-width space U+200B, a
    byte-order mark or a soft hyphen, another Unicode form of the same letters): 'clean' and U+200B 'clean' look the
    same in every program, so which one a model's name means cannot be told (hostile trial s17, finding 5: the exact
    one was taken without a word, while twins differing by a trailing space were refused).  The same name twice is
    refused too."""
    from cfa_tool.data.labels import label_text

    seen: dict[str, str] = {}
    for name in columns:
        key = label_text(name)
        if key not in seen:
            seen[key] = name
            continue
        other = seen[key]
        if other == name:
            raise OptionError(f"{source}: the column name '{printable(name)}' appears more than once")
        marks = character_names(name, other) or character_names(other, name)
        raise OptionError(f"{source}: the column names '{printable(other)}' and '{printable(name)}' look the same "
                          f"(they differ only by invisible characters{marks}, spaces at their ends or Unicode form), "
                          f"so which one is meant cannot be told; rename one of them in the data")


def check_columns(spec: Spec, columns: list[str], data_source: str, sheet_hint: str = "",
                  chosen: dict[str, str] | None = None) -> tuple[str, ...]:
    """Every observed indicator must be a column; a column that shares a factor's name is left unused, with a note
    (a precomputed 'comfort' score beside the items of factor comfort: :func:`factor_named_columns`), unless the
    run would read it (an error).  ``sheet_hint``: which sheet of a workbook of several was read
    (``LoadedData.sheet_hint``), said when a variable is not found; ``chosen``: the columns the run chooses for
    another role (column -> the role's words, 'the group column'), :func:`chosen_columns`.  Returns the notes."""
    notes = factor_named_columns(spec, columns, data_source, chosen)
    available = set(columns)
    data_name = base_name(data_source)
    for name in spec.observed_names:
        if name not in available:
            loc = spec.first_mention(name)
            guess = close_names(name, columns)
            # the sheet, the renames and the row of names read after a guess too: a guess among a row of answers
            # read as names ('1' for 'q1') is no help without the row that holds the names (s20)
            hint = (f"; did you mean '{guess[0]}'{character_names(guess[0], name)}?" + (
                _spaces_only(name, guess[0]) or (LOOK_ALIKE if look_alike(name, guess[0]) else ""))
                if guess else "") + sheet_hint
            raise ModelError(
                f"unknown variable '{name}' (not a column of {data_name}{hint})",
                loc,
                spec.source_line(loc),
            )
    return notes


class ChosenColumns(dict):
    """The columns a run chooses for a role other than an item, {column: the role's words}, and ``numbers``, those of
    them whose role takes numbers (the weights, the missing-data helpers): read as the file's codes whatever value
    labels it gives them, where a group or cluster column is read as its labels (pipeline.inputs._codes_as_labels);
    ``group``: the group column, whose rows without a value are left out of the analysis (the reading's counts are
    then written over the others, data.kept_counts)."""

    numbers: frozenset[str] = frozenset()
    group: str | None = None


def chosen_columns(group: str | None = None, id_column: str | None = None, design=None,
                   helpers=()) -> ChosenColumns:
    """The columns a run chooses for a role other than an item, by name: {column: 'the group column', ...}
    (``design``: data.sample_design.DesignColumns; ``helpers``: the missing-data helpers), with those whose role
    takes numbers (:class:`ChosenColumns`)."""
    out = ChosenColumns({name: f"the {what} column" for what, name in (design.names if design is not None else ())})
    out.numbers = frozenset([*(helpers or ()), *([design.weights] if design is not None and design.weights else [])])
    out.update({name: "a missing-data helper" for name in helpers or ()})
    if isinstance(id_column, str):
        out[id_column] = "the id column"
    if isinstance(group, str):
        out[group] = "the group column"
        out.group = group
    return out


def factor_named_columns(spec: Spec, columns, data_source: str, chosen: dict[str, str] | None = None) -> tuple[str, ...]:
    """The columns of the data that share a factor's name (hostile trial s13: a precomputed 'comfort' total beside
    the items of factor comfort was refused though the model never reads it): a note for each that the run does
    not read ('the column 'comfort' in survey.csv is not used: the model's factor has the same name'); a
    :class:`ModelError` at the factor's name when the run would read it, since the name would then mean two
    things: the factor is also named as an indicator of another factor (where the column's name reads as the
    factor), or the column is chosen for another role (``chosen``: column -> the role's words)."""
    available = set(columns)
    data_name = base_name(data_source)
    indicators = {ind.text: f.name.text for f in spec.factors for ind in f.indicators}
    notes = []
    for factor in spec.factors:
        name = factor.name.text
        if name not in available:
            continue
        loc = factor.name.location
        if name in indicators:
            why = (f"and the model names it as an indicator of '{indicators[name]}' (read there as the factor, not "
                   f"the column)")
        elif chosen and name in chosen:
            why = f"chosen as {chosen[name]}"
        else:
            notes.append(f"the column '{printable(name)}' in {data_name} is not used: the model's factor has the same "
                         f"name")
            continue
        raise ModelError(
            f"'{factor.name}' is declared as a factor but is also a column of {data_name}, {why}; give the factor "
            f"another name",
            loc,
            spec.source_line(loc),
        )
    return tuple(notes)


def _spaces_only(name: str, guess: str) -> str:
    """What to add to a suggestion that differs from the name only in its spaces, which look alike when printed."""
    if name.split() != guess.split():
        return ""
    if guess != guess.strip():
        return (" (it differs only in spaces at its ends, which the model language does not keep: rename the column "
                "in the data)")
    return " (the two differ only in their spaces, which look alike when printed: copy the column's name exactly)"


#: an item with more distinct values than this outside a declared scale (or with more than OTHER_SCALE_SHARE of its
#: answers outside it, not all of them labelled or code-like, as a standardized item's) is not answered on that
#: scale (a wrong 'on MIN to MAX', or a measure rather than answers on a scale), and its values are not offered as
#: codes for no answer: the project's own rule (hostile tester s24: 331 values of a 0-100 slider were advised as --missing-codes)
CODES_AT_MOST = 5

#: a partner item (not named in the 'reversed' statement) with more than this share of its answers outside the
#: statement's scale is read as answered on another scale (named in a note), not as holding stray values (refused);
#: the project's own rule: typing errors and codes for no answer are a few cells, another scale's answers many
OTHER_SCALE_SHARE = 0.2


def declared_scales(spec: Spec, frame) -> dict[str, tuple[float, float, object, bool]]:
    """The items a 'reversed ... on MIN to MAX' statement gives a scale: {item: (min, max, statement, named)},
    ``named`` for the statement's own items; the other items of a factor whose reversed items all share one
    statement's scale are its partners (answered on the same scale, as a questionnaire's items are)."""
    declared = {item.text: keying for keying in spec.reversed for item in keying.items}
    unkeyed = spec.method_factors | spec.exploratory_factors
    out: dict[str, tuple[float, float, object, bool]] = {
        x: (k.minimum, k.maximum, k, True) for x, k in declared.items() if x in frame.columns}
    for factor in spec.factors:
        if factor.name.text in unkeyed:
            continue
        names = [i.text for i in factor.indicators]
        keyed = {(declared[x].minimum, declared[x].maximum): declared[x] for x in names if x in declared}
        if len(keyed) == 1:  # one declared scale for the factor's reversed items
            keying = next(iter(keyed.values()))
            for x in names:
                if x not in declared and x in frame.columns:
                    out.setdefault(x, (keying.minimum, keying.maximum, keying, False))
    return out


def declared_answer_scales(spec: Spec, frame) -> dict[str, tuple[float, float]]:
    """The lowest and highest answer the model declares for each item of ``frame`` it declares one for: a
    'reversed ... on MIN to MAX' statement's scale (its items and their partners, :func:`declared_scales`), else
    the codes of the 'answers' statement that covers it (language.spec.AnswerCoding.codes: 'answers "Never" = 0,
    ..., "Always" = 6').  What an answer is judged by before the answers a fit's rows happened to give (new-user
    trial s25: an answer 0 of an item declared on 0 to 6 was called outside the fitted rows' 1 to 6)."""
    out = {name: (low, high) for name, (low, high, _, _) in declared_scales(spec, frame).items()}
    for name, coding in spec.answer_codings().items():
        codes = coding.codes()
        if name not in out and name in frame.columns and codes:
            out[name] = (codes[0], codes[-1])
    return out


def check_codes_off_scales(spec: Spec, missing_codes: tuple[float, ...]) -> None:
    """A code given with --missing-codes must not be an answer of a scale a 'reversed ... on MIN to MAX' statement
    declares (a whole number from MIN to MAX): '--missing-codes 5' with 'reversed short_wait on 1 to 5' would read
    every top answer of those items as no answer."""
    for keying in spec.reversed:
        on_scale = [c for c in missing_codes if keying.minimum <= c <= keying.maximum and float(c).is_integer()]
        if on_scale:
            raise OptionError(
                f"{Option.MISSING_CODES.given(f'{user_number(on_scale[0])}')} is an answer of the scale {user_number(keying.minimum)} to "
                f"{user_number(keying.maximum)} declared by the 'reversed' statement on line {keying.items[0].location.line} "
                f"(every such answer would be read as no answer): leave {user_number(on_scale[0])} out of "
                f"{Option.MISSING_CODES}, or correct the scale")


def _outside(frame, name: str, low: float, high: float):
    """(the item's values as floats, which lie outside low..high, whether all are whole numbers, whether those
    outside are at most OTHER_SCALE_SHARE of its answers); None when the column is not numbers (the reading of
    the items names the cell).  A partner's answers are on the scale when both hold (else it is a measure, or
    answered on another scale); the statement's own items are on it by declaration."""
    import numpy as np
    import pandas as pd

    if not pd.api.types.is_numeric_dtype(frame[name]):
        return None
    values = frame[name].to_numpy(dtype=float, na_value=np.nan)
    answered = np.isfinite(values)
    outside = answered & ((values < low) | (values > high))
    whole = bool(np.all(values[answered] == np.round(values[answered])))
    return values, outside, whole, outside.sum() <= OTHER_SCALE_SHARE * answered.sum()


def check_declared_ranges(spec: Spec, frame, data_source: str, value_labels: dict | None = None) -> None:
    """Answers of the items a 'reversed ... on MIN to MAX' statement covers (:func:`declared_scales`) must lie on
    that scale: one error naming every such item, value (with its value label) and row, and --missing-codes as the
    remedy (a value beyond the scale is a typing error or a code for no answer); a wider scale is offered second,
    only when no such value has a value label or looks like a code (data.odd_values.code_like).  Items whose answers
    all lie on the scale moved by one amount are refused with the recoding instead (:func:`_shifted_refusal`)."""
    if not spec.reversed:  # no statement declares a scale (the common case): nothing to judge
        return
    import numpy as np

    from cfa_tool.data.moments import row_numbers

    from cfa_tool.data.kept_rows import row_naming

    data_name = base_name(data_source)
    rows = row_numbers(frame)
    naming = row_naming(frame)
    found: dict[object, list[tuple[str, float, np.ndarray, str | None]]] = {}
    codings = spec.answer_codings()
    spans: dict[str, tuple[float, float]] = {}  # item -> its lowest and highest answer, of items with answers outside
    for name, (low, high, keying, named) in declared_scales(spec, frame).items():
        judged = _outside(frame, name, low, high)
        if judged is None:
            continue
        values, outside, whole, few = judged
        if not outside.any() or not (named or whole and few):  # a partner measured otherwise or on another scale
            continue
        labels = (value_labels or {}).get(name) or {}
        coding = codings.get(name)  # answers recorded as words: each code's word is its label
        if coding is not None:
            labels = {}
            for a in coding.answers:
                labels[a.code] = labels[a.code] + " / " + a.shown if a.code in labels else a.shown
        distinct = sorted(set(values[outside].tolist()))
        if coding is None and (len(distinct) > CODES_AT_MOST or not few and not all(
                labels.get(v) or code_like(v) for v in distinct)):  # too many values, or many cells of non-codes
            _refuse_off_scale(spec, keying, name, named, values, outside, distinct, data_name)
        for v in distinct:
            found.setdefault(keying, []).append((name, v, rows[values == v], labels.get(v)))
        spans[name] = (float(np.nanmin(values)), float(np.nanmax(values)))
    if found:
        _summary_row_first(frame, spec, data_source, {int(r) for stray in found.values() for *_, where, _ in stray
                                                      for r in where})
    for keying, stray in found.items():
        shown = []
        for name, v, where, label in stray[:names_shown(len(stray), 6)]:
            cells = (naming.one_row(where[0]) if len(where) == 1 else
                     f"{len(where)} cells: {naming.several} {', '.join(str(r) for r in where[:3])}"
                     + (" and more" if len(where) > 3 else ""))
            shown.append(f"'{name}' {user_number(v)}" + (f" '{label}'" if label else "") + f" ({cells})")
        more = more_words(len(stray) - len(shown))
        codes = sorted({v for _, v, _, _ in stray})
        wider = not any(label or code_like(v) for _, v, _, label in stray)  # answers, perhaps, of a wider scale
        strays = {name for name, *_ in stray}
        location = next((i.location for i in keying.items if i.text in strays), keying.items[0].location)
        lines = sorted({codings[n].location.line for n in strays if n in codings and codings[n].carried_from is None})
        if lines and all(n in codings for n in strays):  # the codes are words' codes: the two statements disagree
            raise ModelError(
                f"the 'answers' {'statement' if len(lines) == 1 else 'statements'} on line "
                f"{word_list(str(n) for n in lines)} {'codes' if len(lines) == 1 else 'code'} answers of "
                f"{data_name} outside the scale {user_number(keying.minimum)} to {user_number(keying.maximum)} declared here: "
                f"{'; '.join(shown)}{more}; number the words to match this scale, or give the scale's true lowest "
                f"and highest answers here",
                location, spec.source_line(location))
        order = list(spec.observed_names) + list(spans)
        _shifted_refusal(spec, keying, sorted(strays, key=order.index), spans, data_name, location)
        raise ModelError(
            f"{data_name} holds answers outside the scale {user_number(keying.minimum)} to {user_number(keying.maximum)} declared here: "
            f"{'; '.join(shown)}{more}; if they are typing errors or codes for no answer, give "
            f"{advice_codes(frame, codes)} (or correct them in a copy of the file)"
            + ("; if the scale really runs wider, give its lowest and highest answers here" if wider else ""),
            location,
            spec.source_line(location),
        )


def _shifted_refusal(spec: Spec, keying, strays: list[str], spans: dict, data_name: str, location) -> None:
    """The refusal of items whose answers all lie on the declared scale moved by one amount (1 to 4 against 0 to 3:
    data.shifted_scales.scale_shift), a file exported with other codes: recoding in a copy is the remedy, never
    reading the top answer as a code of no answer, which lies on the file's own answer scale (new-user trial s26)."""
    from cfa_tool.data.shifted_scales import scale_shift, shift_words

    scale = (keying.minimum, keying.maximum)
    shifts = {scale_shift(scale, spans[name]) for name in strays}
    if len(shifts) != 1 or None in shifts:
        return
    shift = shifts.pop()
    moved = f"{user_number(scale[0] + shift)} to {user_number(scale[1] + shift)}"
    one, named = len(strays) == 1, word_list([f"'{printable(n)}'" for n in strays])
    raise ModelError(
        f"{data_name}: the answers of {named} run {moved}, the scale "
        f"{user_number(scale[0])} to {user_number(scale[1])} declared here moved by {user_number(shift)}: if the file "
        f"codes the same answers {user_number(abs(shift))} {'higher' if shift > 0 else 'lower'} (an export's "
        f"setting), {shift_words(shift)} {'its' if one else 'their'} answers in a copy of the file; if the scale "
        f"really runs {moved}, give that here",
        location, spec.source_line(location))


def _refuse_off_scale(spec: Spec, keying, name: str, named: bool, values, outside, distinct: list[float],
                      data_name: str) -> None:
    """The refusal of an item with more than CODES_AT_MOST distinct values outside the scale a 'reversed' statement
    declares, or many cells outside it that are neither labelled nor code-like: too many to be typing errors or codes for no answer, so the statement's scale is wrong for it or it is
    not answered on a scale; one short line naming the item and the range of its values, no list of them."""
    import numpy as np

    answered = int(np.isfinite(values).sum())
    lowest, highest = float(np.nanmin(values)), float(np.nanmax(values))
    scale = f"{user_number(keying.minimum)} to {user_number(keying.maximum)}"
    whose = ("" if named else f" (the scale of its factor's reversed items, which '{printable(name)}' is read as "
                              f"answered on too)")
    remedy = ("or leave it out of this statement if it is a measure rather than answers on a scale" if named else
              "or check the scale its factor's other items share")
    location = next((i.location for i in keying.items if i.text == name), keying.items[0].location)
    raise ModelError(
        f"{data_name}: '{printable(name)}' is not answered on the scale {scale} declared here{whose}: "
        f"{count_text(len(distinct))} different values lie outside it, in {count_text(int(outside.sum()))} of its "
        f"{count_text(answered)} answers "
        f"(its values run from {user_number(lowest)} to {user_number(highest)}), too many to be typing errors or "
        f"codes for no answer; give here the scale it is answered on, {remedy}",
        location, spec.source_line(location))


def _summary_row_first(frame, spec: Spec, data_source: str, strays: set[int]) -> None:
    """The refusal of a spreadsheet's totals row (data.odd_values: its values equal the other rows' sums) when every
    answer outside a declared scale is in such rows (new-user trial s13, U2), in the words every command refuses it
    with (OddValues.totals_refusal): the scale's check would otherwise advise giving the column sums as
    --missing-codes, which the methods paragraph would then report as codes of no answer."""
    from cfa_tool.data.moments import row_numbers
    from cfa_tool.data.odd_values import OddKind, odd_values

    found = [o for o in odd_values(frame, spec.observed_names, row_numbers(frame)) if o.kind is OddKind.SUMS_ROW]
    if found and strays <= {int(r) for o in found for r in o.rows}:
        raise DataError(found[0].totals_refusal(data_source, frame))


def _read_as_none(value: float, frame) -> Note:
    """Advice to read ``value`` as no answer after the codes the run gave (``frame``: the rows read,
    data.non_answers.advice_codes), the option apart (note_parts.Command): a manuscript runs nothing."""
    return Note((Command(f"give {advice_codes(frame, (value,))}", f"read {user_number(value)} as no answer"),))


def answer_range_notes(spec: Spec, frame, data_source: str, value_labels: dict | None = None,
                       values=None) -> list[str]:
    """Answers that look impossible without being refused, named first in every view (column, value, rows):

    * answers of the other items of a factor that a 'reversed ... on MIN to MAX' statement keys, outside that
      scale, when so many (more than OTHER_SCALE_SHARE of its answers, all whole numbers) that the item is read
      as answered on another scale; fewer are refused by :func:`check_declared_ranges`, as the statement's own
      items' are; an item whose values are not whole numbers is a measure, not answers on the scale (no note);
    * values of an item that has value labels (SPSS, Stata) but not for that value, such as an 8 in an item
      labelled 1 to 7.

    ``values``: the model's items (``spec.observed_names``) of ``frame`` as ``data.moments.item_values`` takes them
    out, when it could (None: each column judged is read on its own).  Only the columns a declared scale or value
    labels judge are read: a model without either costs nothing here."""
    import numpy as np

    labels = value_labels or {}
    scales = declared_scales(spec, frame) if spec.reversed else {}
    judged = [x for x in spec.observed_names if x in scales or (labels.get(x) and x in frame.columns)]
    if not judged:
        return []
    from cfa_tool.data.kept_rows import row_naming, rows_listed
    from cfa_tool.data.moments import row_numbers

    data_name = base_name(data_source)
    scale_of: dict[str, tuple[float, float, str]] = {}  # partners answered on another scale -> (min, max, factor)
    for x, (low, high, _, named) in scales.items():
        found = None if named else _outside(frame, x, low, high)
        if found is not None and found[2] and not found[3]:  # whole numbers, many outside: another scale
            factor = next(f.name.text for f in spec.factors if x in {i.text for i in f.indicators})
            scale_of[x] = (low, high, factor)
    columns = _answer_columns(frame, judged, spec.observed_names, values)
    out = []
    beyond: dict[tuple[float, float], list[tuple[str, float]]] = {}  # labelled scale -> (item, value) beyond it, often
    rows = None

    def listed(mask) -> str:
        nonlocal rows
        rows = row_numbers(frame) if rows is None else rows
        return rows_listed(rows[mask], naming=row_naming(frame))

    for x in judged:
        column = columns.get(x)
        if column is None:  # not numbers to compute with: the reading of the items says so
            continue
        answered = np.isfinite(column)
        if x in scale_of:
            low, high, factor = scale_of[x]
            for v in np.unique(column[answered & ((column < low) | (column > high))]).tolist():
                out.append(f"{data_name}: '{x}' has the answer {user_number(v)} ({listed(column == v)}), outside the scale "
                           f"{user_number(low)} to {user_number(high)} that the 'reversed' statement declares for the items of {factor}; "
                           f"so many of its answers lie outside that it is read as answered on another scale; if "
                           f"{user_number(v)} is a typing error or means 'no answer', " + _read_as_none(v, frame))
            continue
        known = {float(k): text for k, text in (labels.get(x) or {}).items() if isinstance(k, (int, float))}
        # the answers the labels name (a label saying no answer names none): a value between them is an answer, as
        # a labelled code between answers is (non_answers.between_answers); only values beyond them are judged, and
        # only when the labels name a scale (hostile s25: labels on the two ends only, or on 9 'Refused' only, had
        # every middle answer called a possible typing error, 36 and 60 notes)
        named = [k for k, text in known.items() if not says_no_answer(text, explained=True)]
        if len(named) < 2:
            continue
        low, high = min(named), max(named)
        given = column[answered]
        for v in sorted(set(given.tolist()) - set(known)):
            if low < v < high:
                continue
            if np.mean(given == v) > FEW_SHARE:  # too many for typing errors: labels of another coding (0 to 4 on 1 to 5)
                beyond.setdefault((low, high), []).append((x, v))
                continue
            out.append(f"{data_name}: '{x}' has the value {user_number(v)} ({listed(column == v)}), which has no value "
                       f"label, {'below' if v < low else 'above'} its labelled answers {user_number(low)} to "
                       f"{user_number(high)}; if it is a typing error or means 'no answer', " + _read_as_none(v, frame)
                       + " (or correct it in a copy of the file)")
    for (low, high), found in beyond.items():  # one note per labelled scale, the values analysed as answers
        items = [x for x, _ in found]
        values = sorted({v for _, v in found})
        k = names_shown(len(items), SHOWN)
        shown = ", ".join(f"'{x}'" for x in items[:k]) + more_words(len(items) - k)
        out.append(f"{data_name}: the value labels of {shown} name the answers {user_number(low)} to {user_number(high)}, "
                   f"but more than {FEW_SHARE:.0%} of {'their' if len(items) > 1 else 'its'} answers are "
                   f"{word_list(user_number(v) for v in values)}, beyond them: too many for typing errors, so they "
                   f"are analysed as answers; the labels may belong to another coding of the scale (labels of 0 to 4 "
                   f"on answers 1 to 5, say), so check them against the questionnaire before reading the labels table")
    return out


def _answer_columns(frame, judged: list[str], items, values) -> dict:
    """The ``judged`` columns as float arrays: from the items' array ``values`` when given, else each converted on
    its own (text that is not a number as NaN); a column that cannot be converted is left out."""
    import numpy as np
    import pandas as pd

    if values is not None:
        where = {x: j for j, x in enumerate(items)}
        return {x: values[:, where[x]] for x in judged}
    out = {}
    for x in judged:
        try:
            out[x] = np.asarray(pd.to_numeric(frame[x], errors="coerce").to_numpy(dtype=float))
        except (OverflowError, TypeError, ValueError):
            continue
    return out
