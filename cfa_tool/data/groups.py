"""Split a data set by a group column into per-group sample moments."""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from cfa_tool.data.labels import (code_order, distinct_cells, group_keys, label_text, listed_labels, merged_labels,
                                  ordered_labels)
from cfa_tool.data.renamed_columns import renamed_hint
from cfa_tool.suggest import close_names, did_you_mean
from cfa_tool.data.moments import SampleMoments, numeric_columns, sample_moments
from cfa_tool.errors import DataError, OptionError, check_rows_counted, printable
from cfa_tool.language.names import written_group
from cfa_tool.numbers import word_list
from cfa_tool.method import MissingData
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option

if TYPE_CHECKING:
    from cfa_tool.data.sample_design import DesignColumns


MAX_GROUPS = 100  # a multi-group fit estimates every parameter in each group


def group_labels(frame: pd.DataFrame, column: str, source: str, reference: str | None = None) -> list[str]:
    if not isinstance(column, str):
        raise OptionError(f"the group column must be given by its name (text), not {type(column).__name__}")
    if column not in frame.columns:
        guess = close_names(column, [str(c) for c in frame.columns])
        hint = renamed_hint(frame, column) or (did_you_mean(column, guess[0]) if guess else "")
        raise OptionError(f"{source}: there is no group column '{printable(column)}'{hint}")
    values = frame[column].dropna()
    labels = ordered_labels({label_text(v) for v in distinct_cells(values)[0]} - {""}, frame,  # each distinct cell once
                            column)  # "": no group (group_keys)
    refuse_look_alike_labels(values, column, source)
    if len(labels) > MAX_GROUPS:
        raise OptionError(f"{source}: the group column '{printable(column)}' has {len(labels):,} different values; a "
                          f"multi-group fit estimates the model in each group, at most {MAX_GROUPS} of them (is it the "
                          f"right column? an identifier of classes or persons is not a grouping for invariance)")
    if len(labels) < 2:  # in words, not 'has only 1 group (a)' (s26)
        merged = [texts for _, texts in merged_labels(values) if len(texts) > 1]
        read = (f" (labels that differ only by spaces at their ends, by invisible format characters or by Unicode form "
                f"are one group: {listed_labels([(labels[0], merged[0])])})") if merged and labels else ""
        said = (f"puts every row in group {printable(written_group(labels[0], labels))}" if labels else
                "is empty in every row")
        raise DataError(f"{source}: the group column '{printable(column)}' {said}{read}; a multi-group analysis needs "
                        f"at least two groups")
    if reference is None:
        reference, _ = default_reference(frame, column, labels)
    else:
        reference = label_text(reference) if isinstance(reference, str) else reference  # read as the labels are
        if reference not in labels:  # a labelled column's group may be given by its code, as row filters take it
            reference = code_order(frame, column).get(label_text(reference), reference)
        if reference not in labels:
            raise OptionError(f"{source}: {printable(written_group(str(reference), labels))} is not a group of column "
                              f"'{printable(column)}' (groups: {printable(word_list(written_group(g, labels) for g in labels))})")
    labels.remove(reference)
    labels.insert(0, reference)  # the reference group first, the others in the order of their labels
    return labels


def refuse_look_alike_labels(values: pd.Series, column: str, source: str) -> None:
    """Refuse group labels that differ only by format characters that are drawn or change what is drawn
    (data.labels.look_alike_labels: a joiner between Persian letters, a right-to-left override), which the one rule
    of labels (data.labels.label_text) neither reads as one group (they look different) nor may leave as two groups
    named alike: a one-line error naming the column, the labels with those characters spelled out and named, and
    their rows."""
    import unicodedata

    from cfa_tool.data.labels import look_alike_labels, spelled_out

    alike = look_alike_labels(values)
    if not alike:
        return
    found = alike[0]
    listed = word_list(f"'{spelled_out(label)}' ({n:,} row{'s' if n != 1 else ''})" for label, n in found)
    marks = dict.fromkeys(ch for label, _ in found for ch in label if unicodedata.category(ch) == "Cf")
    named = ", ".join(f"U+{ord(ch):04X} {unicodedata.name(ch, 'UNNAMED CHARACTER')}" for ch in marks)
    more = f" ({len(alike) - 1} more such set{'s' if len(alike) > 2 else ''} of labels)" if len(alike) > 1 else ""
    raise DataError(f"{source}: in the group column '{printable(column)}', the labels {listed} differ only by "
                    f"format characters that change how the text is drawn ({named}){more}, so they are not read as "
                    f"one group; if they are one group write them alike, if two give them different letters, in a "
                    f"copy of the data file")


class ReferenceRule(Enum):
    """Why a group is the reference group (its factor means fixed at zero, the others' means differences from it):
    ``value`` the word of the JSON, ``phrase`` the words beside the group's name in every report."""

    def __new__(cls, word: str, phrase: str):
        member = object.__new__(cls)
        member._value_ = word
        member.phrase = phrase
        return member

    GIVEN = ("given", "as chosen")
    FIRST_CATEGORY = ("first category", "the first category of the column's categories")
    LOWEST_CODE = ("lowest code", "the group of the lowest code")
    FIRST_LABEL = ("first label", "the first label in sorted order")


def default_reference(frame: pd.DataFrame, column: str, labels: list[str]) -> tuple[str, ReferenceRule]:
    """The reference group when none is chosen, by one rule for every command with groups: of a pandas categorical
    column (ordered or not), its first category that has rows; of a column of codes with value labels (SPSS, Stata),
    the group of the lowest code; otherwise the first label in sorted order (``labels`` as :func:`group_labels`
    orders them: numbers by value, text alphabetically)."""
    cells = frame[column]
    if isinstance(cells.dtype, pd.CategoricalDtype):
        present = set(labels)
        first = next((label_text(c) for c in cells.cat.categories if label_text(c) in present), None)
        if first is not None:
            return first, ReferenceRule.FIRST_CATEGORY
    coded = [label for label in code_order(frame, column).values() if label in labels]
    if coded:
        return coded[0], ReferenceRule.LOWEST_CODE
    return labels[0], ReferenceRule.FIRST_LABEL


def reference_words(label: str, rule: ReferenceRule, labels=()) -> str | Note:
    """The reference group and why, as every report says it beside the group's name: "north, the first label in
    sorted order", with, for the program's user, "; choose another with --reference-group" (a Note: a manuscript
    leaves the command out); a group chosen by the user: its name alone.  The label is written by the one rule of
    group names among ``labels`` (every group's; language.names.written_group)."""
    from cfa_tool.language.names import written_group
    from cfa_tool.options import Option, taken_by

    written = written_group(label, labels)
    if rule is ReferenceRule.GIVEN:
        return written
    return Note((f"{written}, {rule.phrase}", Command(f"; choose another with {Option.REFERENCE_GROUP}",
                                                               takes=taken_by(Option.REFERENCE_GROUP))))


def reference_rule(frame: pd.DataFrame, column: str, reference: str | None = None) -> ReferenceRule:
    """Why the first group of ``column`` is the reference group: chosen (``reference`` given), or which branch of
    :func:`default_reference` chose it."""
    if reference is not None:
        return ReferenceRule.GIVEN
    present = [label for label in dict.fromkeys(group_keys(frame[column].dropna())) if not pd.isna(label)]
    return default_reference(frame, column, present)[1]  # the branch the choice took, by the one rule


def group_rows(frame: pd.DataFrame, column: str, source: str, reference: str | None = None
               ) -> tuple[list[tuple[str, pd.DataFrame]], int]:
    """Each group's rows of ``frame`` as (label, rows), the reference group first (:func:`group_labels`), and the
    number of rows without a group label: the one split of the rows by a group column."""
    labels = group_labels(frame, column, source, reference)
    keys = group_keys(frame[column])
    return [(label, frame.loc[(keys == label).to_numpy()]) for label in labels], int(keys.isna().sum())


def has_group(frame: pd.DataFrame, group: str) -> np.ndarray:
    """Which rows of ``frame`` have a label in the group column, by the one rule of groups (:func:`group_keys`: a cell
    of invisible characters alone has none; re-check s17: such a row's gaps chose full-information ML for complete
    rows analysed), beside that rule here, below every command that asks it."""
    cells = frame[group]
    values = cells.to_numpy()
    labelled = ~pd.isna(values)
    try:  # each distinct cell read once by the rule of group_keys (the analyses call this several times per fit)
        distinct = pd.unique(values[labelled])
    except TypeError:  # an unhashable cell (a list in a data frame built in Python): every cell read
        labelled = group_keys(cells).notna().to_numpy()
    else:  # a cell of invisible characters alone has no label (group_keys: label_text gives ''); only texts can be
        # such cells, so they are compared exactly
        unlabelled = {v for v in distinct if not label_text(v)}
        if unlabelled:
            labelled &= np.array([not (isinstance(v, str) and v in unlabelled) for v in values], dtype=bool)
    return labelled


def group_words(label: str, labels, column: str) -> str:
    """A group as messages about its rows name it after the word 'group': "north of 'region'", "\"land 01\" of
    'region'" (the label by the one rule of group labels among ``labels``, language.names.written_group)."""
    return f"{printable(written_group(label, labels))} of '{printable(column)}'"


def split_moments(frame: pd.DataFrame, column: str, names: tuple[str, ...], source: str,
                  reference: str | None = None, missing: MissingData | str = MissingData.LISTWISE,
                  weights: str | None = None) -> tuple[list[tuple[str, SampleMoments]], int]:
    """Per-group moments (reference group first) and the number of rows without a group value;
    ``weights`` a column of row weights (see :func:`sample_moments`)."""
    parts, without = group_rows(frame, column, source, reference)
    where = [group_words(label, [label for label, _ in parts], column) for label, _ in parts]
    values = [numeric_columns(part, names, f"{source} (group {group})") for (_, part), group in zip(parts, where)]
    labels = [label for label, _ in parts]
    small = too_small_groups(labels, values, missing)
    if small:
        left_out = {g.label for g in small}
        complete_only = small[0].complete_only
        refuse_small_groups(small, column, source, sum(usable_rows(v, complete_only)
                                                       for label, v in zip(labels, values) if label not in left_out),
                            labels, len(labels) - len(small))
    out = [(label, sample_moments(part, names, source, group=group, missing=missing, weights=weights, values=v))
           for (label, part), group, v in zip(parts, where, values)]
    # each row in one group at most (errors.check_rows_counted)
    check_rows_counted(sum(m.rows_read for _, m in out) + without, len(frame), f"the groups of column '{column}'")
    return out, without


@dataclass(frozen=True)
class SmallGroup:
    """A group whose rows the analysis can use (``rows``: complete rows, or with full-information ML rows with any
    answer, as ``complete_only`` says) are no more than its ``variables``: its covariance matrix cannot be
    estimated."""

    label: str
    rows: int
    variables: int
    complete_only: bool

    def rows_words(self) -> str:
        """'9 rows with any answer', '1 complete row'."""
        kind = "complete row" if self.complete_only else "row"
        count = f"{self.rows:,}" if self.rows else "no"
        return f"{count} {kind}{'' if self.rows == 1 or not self.rows else 's'}" + (
            "" if self.complete_only else " with any answer")


class SmallGroupsError(DataError):
    """The refusal of groups too small to analyse (:func:`refuse_small_groups`), holding them (``groups``) and each
    one's (what, remedy) words (``words``), so that a check can report them among its findings instead of stopping."""

    def __init__(self, message: str, groups: tuple[SmallGroup, ...], words: tuple[tuple[str, str], ...]):
        super().__init__(message)
        self.groups = groups
        self.words = words


def too_small_groups(labels: list[str], values: list[np.ndarray], missing: MissingData | str = MissingData.LISTWISE
                     ) -> tuple[SmallGroup, ...]:
    """The groups (``labels``, each with its model variables' ``values``) with no more usable rows than variables:
    complete rows with listwise deletion, rows with any answer with full-information ML (the rows each analysis
    uses).  A covariance matrix of p variables from n <= p rows is singular, so such a group cannot be analysed at
    all (a factor analysis needs far more rows).  A group without any answer is left to the moments' own message."""
    complete_only = missing != MissingData.FULL_INFORMATION
    found = []
    for label, v in zip(labels, values):
        if np.isnan(v).all():  # no answer at all in the group: the moments say so in their own words
            continue
        n = usable_rows(v, complete_only)
        if n <= v.shape[1]:
            found.append(SmallGroup(label, n, v.shape[1], complete_only))
    return tuple(found)


def usable_rows(values: np.ndarray, complete_only: bool) -> int:
    """The rows of ``values`` (rows x model variables) an analysis uses: complete rows with listwise deletion, rows
    with any answer with full-information ML."""
    gaps = np.isnan(values)
    return int((~gaps.any(axis=1)).sum() if complete_only else (~gaps.all(axis=1)).sum())


def leaving_out(column: str, label: str) -> str | None:
    """The row filter (data.filters) that leaves out the rows of group ``label`` of ``column``:
    'gender != "another / prefers to describe"', 'region != north' (the label as the groups are named: a labelled
    column's filter compares with its labels, as a filter on its codes would with the codes); None when the names'
    quotes leave no way to write it, or the column is none of the file's (a name that cannot be printed)."""
    from cfa_tool.data.filter_text import filter_text

    return filter_text(column, "!=", label)  # the one writer of a filter's text, which parses back to it


def small_group_words(small: tuple[SmallGroup, ...], column: str, kept: int, named: bool = True,
                      labels=(), others: int = 2) -> tuple[str, str]:
    """(what, remedy) of groups too small to analyse (:func:`too_small_groups`) in a refusal's or a check's words: the
    groups, their rows and the rule; the exact row filter that leaves them out, then joining each with a similar
    group.  ``kept``: the rows of the other groups that the advised run analyses (complete rows with listwise
    deletion, rows with any answer with full-information ML: :func:`usable_rows`; new-user trial s19, which was
    promised the other groups' 855 rows and analysed their 251 complete ones); ``named`` False: one group, which the
    words beside them name (a check's caution of that group); ``labels``: every group's label, among which the
    groups are named by the one rule of group labels (language.names.written_group); ``others``: the groups that are
    not too small, where leaving the small ones out is advised only when two of them stay to be compared (hostile
    s25, finding 5's neighbour: two small groups beside one large one were advised the filters that leave one group)."""
    one = len(small) == 1
    only = "only " if small[0].rows else ""
    if one and not named:
        said = f"{only}{small[0].rows_words()} for the model's {small[0].variables} variables"
    elif one:
        said = (f"group {group_words(small[0].label, labels, column)} has {only}{small[0].rows_words()} for "
                f"the model's {small[0].variables} variables")
    else:
        listed = word_list(f"{printable(written_group(g.label, labels))} ({g.rows_words()})" for g in small)
        said = (f"groups {listed} of "
                f"'{printable(column)}' have too few rows for the model's {small[0].variables} variables")
    filters = [leaving_out(column, g.label) for g in small]
    them = "it" if one else "them"
    rows = SmallGroup("", kept, 0, small[0].complete_only).rows_words()  # '251 complete rows'
    rows = "no rows" if not kept else rows
    leave = (f"leave {them} out with {Option.KEEP.given([printable(f) for f in filters])}" if all(filters) else
             f"leave {them} out with a row filter ({Option.KEEP}) on '{printable(column)}'")
    join = (f"join {'it' if one else 'each'} with a similar group by recoding '{printable(column)}' in a copy of the "
            f"data file")
    if others < 2:  # leaving them out would leave one group or none: nothing to compare
        return (f"{said}, and a group needs more rows than variables (a factor analysis far more)",
                f"{join} (leaving {them} out would leave {'one group' if others == 1 else 'no group'}, with nothing "
                f"to compare)")
    return (f"{said}, and a group needs more rows than variables (a factor analysis far more)",
            f"{leave} (the other groups' {rows} stay), or {join}")


def refuse_small_groups(small: tuple[SmallGroup, ...], column: str, source: str, kept: int, labels=(),
                        others: int = 2) -> None:
    """Raise the one-line refusal of groups too small to analyse (:func:`small_group_words`), holding each group's
    own words for a check's findings; ``labels``: every group's label; ``others``: the groups that are not too small."""
    said, remedy = small_group_words(small, column, kept, labels=labels, others=others)
    raise SmallGroupsError(f"{source}: {said}: {remedy}", small,
                           tuple(small_group_words((g,), column, kept, named=False, labels=labels, others=others)
                                 for g in small))


def split_ordinal_moments(frame: pd.DataFrame, column: str, names: tuple[str, ...], source: str,
                          reference: str | None = None, pairwise: bool = False,
                          design: DesignColumns | None = None,
                          continuous: frozenset[str] = frozenset()) -> tuple[list[tuple[str, object]], int]:
    """Per-group thresholds and polychoric correlations, every group on the same categories (``pairwise``:
    from every answer; ``design``: weighted, sampling weights rescaled within each group; ``continuous``: items
    analysed beside the ordinal ones, with their means and variances; see
    :func:`cfa_tool.data.polychoric.ordinal_moments`)."""
    from cfa_tool.data.polychoric import empty_categories_in_groups, ordinal_moments, shared_levels

    split, without = group_rows(frame, column, source, reference)
    labels, parts = [label for label, _ in split], [part for _, part in split]
    levels = shared_levels(parts, names, source, pairwise, continuous)  # (a continuous item's are not used)
    # every empty category of every group and item in one message (not one per run)
    empty_categories_in_groups(parts, [f" (group {group_words(label, labels, column)})" for label in labels], names, source, levels,
                               pairwise, continuous, [leaving_out(column, label) for label in labels])
    out = [(label, ordinal_moments(part, names, source, continuous, levels=levels,
                                   where=f" (group {group_words(label, labels, column)})", pairwise=pairwise, design=design))
           for label, part in zip(labels, parts)]
    return out, without


def pooled(moments: list[SampleMoments]) -> tuple[np.ndarray, np.ndarray]:
    """Pooled within-group covariance and grand mean (for starting values)."""
    if len(moments) == 1:
        return moments[0].covariance, moments[0].means
    n = sum(m.n_obs for m in moments)
    cov = sum(m.n_obs * m.covariance for m in moments) / n
    mean = sum(m.n_obs * m.means for m in moments) / n
    return cov, mean


def ordinal_refusals(frame: pd.DataFrame, names: tuple[str, ...], source: str,
                     continuous: frozenset[str] = frozenset(), column: str | None = None,
                     reference: str | None = None, pairwise: bool = True) -> tuple[str, ...]:
    """Every refusal of the ordinal items' answers that a fit stops at first, each with its place, for a check to
    list them all at once (a researcher should not fix one at a time): fractional answers, item by item (the first
    row of each); an item of a single category or of more categories than an ordinal item may have; and, with groups
    (``column``), the categories other groups used that a group left empty (one finding naming them all, with the
    ways past them).  Among the rows a fit analyses: every answer with ``pairwise``, else the complete rows.  Empty
    when the fit would pass these checks (its correlations can still fail it)."""
    from cfa_tool.data.polychoric import category_count_refusal, check_whole_answers, empty_categories_in_groups

    ordinal = [j for j, name in enumerate(names) if name not in continuous]
    values = numeric_columns(frame, names, source)
    found, whole = [], []
    for j in ordinal:
        try:
            check_whole_answers(values[:, [j]], frame, (names[j],), source)
            whole.append(j)
        except DataError as refused:
            found.append(str(refused))
    analysed = values if pairwise else values[~np.isnan(values).any(axis=1)]
    levels = {}
    for j in whole:
        column_values = analysed[:, j]
        levels[names[j]] = tuple(float(v) for v in np.unique(column_values[~np.isnan(column_values)]))
        refused = category_count_refusal(source, "", names[j], levels[names[j]]) if levels[names[j]] else None
        if refused is not None:
            found.append(refused)
    if column is not None and levels:  # the groups' categories, of the items whose answers can be categories
        skipped = frozenset(name for name in names if name not in levels)  # continuous, or refused above
        split, _ = group_rows(frame, column, source, reference)
        labels = [label for label, _ in split]
        try:
            empty_categories_in_groups([part for _, part in split], [f" (group {group_words(label, labels, column)})" for label in labels],
                                       names, source, levels, pairwise, skipped,
                                       [leaving_out(column, label) for label in labels])
        except DataError as refused:
            found.append(str(refused))
    return tuple(found)
