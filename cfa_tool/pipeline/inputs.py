"""The Python entry points: ``fit`` and ``check``."""

from __future__ import annotations

from numbers import Real
import os
from typing import TYPE_CHECKING
from collections import Counter
from contextlib import contextmanager
from dataclasses import dataclass, replace
from types import SimpleNamespace
from functools import lru_cache
from pathlib import Path

import numpy as np
import pandas as pd

if TYPE_CHECKING:  # the cautions' type, for the hints only (the module imports it where it makes one)
    from cfa_tool.assessment.admissibility import Problem
    from cfa_tool.data.halves import RandomHalf

from cfa_tool.numbers import (count_text, counted, cut_list, more_words, names_shown, rounded_number, user_number,
                              word_list)
from cfa_tool.data.answer_words import NUMBERS_ONLY, code_answer_words, coding_record, refuse_for_summary_statistics
from cfa_tool.data.joined_answers import join_answers, refuse_joins_for_summary_statistics
from cfa_tool.data.filter_text import filter_text
from cfa_tool.data.groups import SmallGroupsError, has_group, split_moments
from cfa_tool.data.kept_rows import (ROW_NAMES_COLUMN, RowNaming, line_words, named_by_index_label, row_naming, row_of, text_lines,
                                     unfinished_rows_note)
from cfa_tool.data.labels import (CODED_LABELS, cells_as_labels, label_notes, label_text, labelled_codes, nominal_items_note,
                                  refuse_container_cells)
from cfa_tool.data.matching import (answer_range_notes, refuse_name_twins, check_codes_off_scales, check_columns, check_declared_ranges,
                                    chosen_columns)
from cfa_tool.data.moments import (ItemColumns, SampleMoments, column_dtypes, item_values, missing_summary, row_numbers,
                                   sample_moments)
from cfa_tool.data.kept_counts import analysed_rows, kept_non_answers, kept_reading_notes
from cfa_tool.data.non_answers import also_no_answer, beyond_scale, non_answer_caution, run_words
from cfa_tool.data.descriptives import AnswerExtremes, few_category_items, few_category_note, piled_up_items
from cfa_tool.data.odd_values import odd_values
from cfa_tool.data.filters import apply_filters, parse_filter
from cfa_tool.data.notes_rows import drop_notes_lines
from cfa_tool.data.readers import (LoadedData, blank_text_as_missing, drop_blank_rows,
                                   first_data_option, read_data, with_no_answers_read)
from cfa_tool.data.renamed_columns import column_renames, rename_note, renamed_frame, renamed_hint
from cfa_tool.data.row_ids import duplicate_note, ids_by_row_number, row_ids
from cfa_tool.data.sample_design import (DOMINANT_SHARE, DOMINANT_TIMES, DesignColumns, apply_design, check_design,
                                         design_columns, design_summary, design_weights, few_clusters_advice)
from cfa_tool.data.summary_stats import (SUMMARY_SUFFIX, NotGiven, by_variable, holds_summary, pasted_matrix,
                                         read_summary_file, summary_in_other_text, summary_moments)
from cfa_tool import options as opt
from cfa_tool.note_parts import Command, Note, RowId, Text, joined
from cfa_tool.options import Option, option_in_both, own_keywords, taken_by
from cfa_tool.errors import (DataError, EstimationError, ModelError, OptionError, RowDataError,
                             check_rows_counted, clipped, printable)
from cfa_tool.input_files import DATA_FRAME
from cfa_tool.numerics.threads import blas_threads_for
from cfa_tool.pipeline.continuous import LISTWISE_WARNING_SHARE, FitOptions, fit_moments
from cfa_tool.language.parser import MODEL_SUFFIX, parse_model, read_model_file
from cfa_tool.language.checks import refuse_continuous_joins
from cfa_tool.language.spec import Spec, with_ordinal_levels
from cfa_tool.language.names import case_twins, composed
from cfa_tool.method import ADJUSTED_TEST, FitTest, MissingData, WeightKind, Weighting
from cfa_tool.pipeline.results import CheckResult, FitResult
from cfa_tool.suggest import close_names, did_you_mean


def load_spec(model: str | os.PathLike | Spec) -> Spec:
    """A Spec from model text, a model file or a parsed Spec, by explicit rules (the file system
    is never tried on arbitrary text):

    * a ``pathlib.Path`` (or other path object) is a model file;
    * a string of one line ending in the model extension ``.cfa`` is a model file;
    * any other string is model text.
    """
    if isinstance(model, Spec):
        return model
    if isinstance(model, os.PathLike):
        return read_model_file(model)
    if isinstance(model, str):
        if "\n" not in model and model.strip().lower().endswith(MODEL_SUFFIX):
            return read_model_file(model.strip())
        try:
            return parse_model(model, source="<model text>")
        except ModelError as exc:
            one_line = model.strip()
            if one_line and not any(ch.isspace() or ch == ":" for ch in one_line):  # one word: a file name?
                raise ModelError(f"{exc.message} (the text was read as model text; to read a model file, pass a "
                                 f"pathlib.Path or give the file the {MODEL_SUFFIX} extension)",
                                 exc.location, exc.source_line) from None
            raise
    raise OptionError(f"model must be model text, a path or a parsed specification, not {type(model).__name__}")


def refuse_row_options(source: str, sheet: str | None = None, missing_codes=(), keep=(), group: str | None = None,
                       id_column: str | None = None, names_row: int | None = None,
                       first_data_row: int | None = None, rename=None) -> None:
    """Options about rows and columns of raw data cannot apply to summary statistics: each is an
    error rather than silently ignored."""
    keep = keep_option(keep)
    halves = _halves(keep)  # a half of a halves file is named as the option that gave it (hostile s19: '--keep')
    filters = [k for k in keep if k not in halves]
    given = [f"{name} ({option})" for name, option, value in (
        ("a sheet", Option.SHEET, sheet), ("missing-value codes", Option.MISSING_CODES, missing_codes),
        ("row filters", Option.KEEP, filters), ("a random half of the rows", Option.HALF, halves),
        ("groups", Option.GROUP_COLUMN, group),
        ("an id column", Option.ID_COLUMN, id_column), ("a row of column names", Option.NAMES_ROW, names_row),
        ("a first row of data", Option.FIRST_DATA_ROW, first_data_row),
        ("columns read under new names", Option.RENAME, rename))
        if value]
    if given:
        raise OptionError(f"{source} holds summary statistics, not rows of data, so {given[0]} cannot apply; "
                          f"remove the option or give the raw data")


def summary_source(data) -> bool:
    """Whether ``data`` names a summary-statistics file: by its extension (.stats), or a .csv file whose first
    cell says it holds a covariance or correlation matrix."""
    if not isinstance(data, (str, os.PathLike)):
        return False
    suffix = Path(data).suffix.lower()
    return suffix == SUMMARY_SUFFIX or (suffix == ".csv" and holds_summary(data))


def missing_values_option(codes) -> tuple[tuple[float, ...], tuple[str, ...]]:
    """``missing_codes=`` as (codes, words): values that mean 'no answer', a list of them or one, each a number (a
    code) or a word of no answer for the run, by the command line's rule (data.missing_codes.missing_value)."""
    from cfa_tool.data.missing_codes import codes_and_words

    if codes is None:
        return (), ()
    if isinstance(codes, (int, float, str)) and not isinstance(codes, bool):
        codes = (codes,)
    if isinstance(codes, bytes) or not hasattr(codes, "__iter__"):
        raise OptionError(f"missing_codes must be a list of numbers and words, not {type(codes).__name__}")
    try:
        return codes_and_words(codes)
    except ValueError as error:
        raise OptionError(clipped(f"missing_codes must hold numbers (codes) and words (of no answer): {error}",
                                  200)) from None


def missing_codes_option(codes) -> tuple[float, ...]:
    """The numbers of ``missing_codes=`` (:func:`missing_values_option`; its words are read as no answer where the
    data are read, :func:`read_inputs_with_notes`)."""
    return missing_values_option(codes)[0]


def of_summary_statistics(result, moments, notes) -> object:
    """A fit of summary statistics with what every view says of them: the reading notes first among the warnings,
    the matrix analysed and what the file did not give (means, standard deviations: without means the keyed sums'
    means are unknown too, without standard deviations their standard deviations)."""
    groups = result.groups
    if NotGiven.MEANS in moments.not_given:  # no means: the keyed sums' means are not known either
        groups = tuple(replace(g, reliability=tuple(replace(r, sum_score_mean=None) for r in g.reliability))
                       for g in groups)
    if NotGiven.STANDARD_DEVIATIONS in moments.not_given:  # correlations alone: a sum of standardized items' SD is
        # no sum of the answers' (hostile tester s24), so the sums' SDs are not known either
        groups = tuple(replace(g, reliability=tuple(replace(r, sum_score_sd=None) for r in g.reliability))
                       for g in groups)
    return replace(result, warnings=tuple(notes) + result.warnings, groups=groups,
                   data=replace(result.data, not_given=moments.not_given, analysed=moments.analysed))


def _refuse_reordered_numbers(frame: pd.DataFrame, items, old_names: dict[str, str]) -> None:
    """An item given as an ordered categorical of numbers whose declared order is not the numbers' order
    (categories [5, 4, 3, 2, 1], ordered: 5 the lowest answer) is refused, naming the column and how to recode it:
    the model reads an item's numbers as its answers, and taking them in another order than the one the frame
    declares would silently contradict it, as an ordered categorical of words is refused rather than ordered by the
    tool (data.moments).  An unordered categorical, or one whose order is its numbers', is read by its numbers
    (hostile trial s26, 04).  ``items``: the columns read as the model's items (None: none named yet), by their names
    after a rename; ``old_names``: the frame's own name of each renamed column (new name: old), which the recoding
    example names."""
    if items is None:
        return
    # the frame's column types read once (data.moments.column_dtypes), without a Series of each item (each copied the
    # frame's attrs, every fit)
    types = dict(zip(frame.columns.tolist(), column_dtypes(frame)))
    for name in (x for x in items if x in types):
        dtype = types[name]
        if not isinstance(dtype, pd.CategoricalDtype) or not dtype.ordered:
            continue
        categories = dtype.categories
        if not pd.api.types.is_numeric_dtype(categories.dtype) or categories.is_monotonic_increasing:
            continue
        shown = [user_number(float(c)) for c in categories]
        recode = ", ".join(f"{c}: {i}" for i, c in enumerate(shown[:MOST_CODES_SHOWN], start=1))
        more = ", ..." if len(shown) > MOST_CODES_SHOWN else ""
        own = printable(str(old_names.get(name, name)))
        raise DataError(f"{DATA_FRAME}: column '{own}' is an ordered categorical whose declared order "
                        f"({', '.join(shown[:MOST_CODES_SHOWN])}{more}, lowest first) is not the order of its numbers, "
                        f"and an item's numbers are read as its answers: recode it so the numbers follow the order "
                        f"(such as frame['{own}'].map({{{recode}{more}}}).astype(float)), or, if the "
                        f"numbers are the answers, drop the declared order with .astype(float)")


#: the categories an ordered categorical's refusal shows (and recodes in its example)
MOST_CODES_SHOWN = 10


def load_data(data: pd.DataFrame | str | Path, sheet: str | None = None, missing_codes: tuple[float, ...] = (),
              text_columns: tuple[str, ...] = (), items=None, listed=None, filters=(),
              names_row: int | None = None, names_option: Option = Option.NAMES_ROW,
              first_data_row: int | None = None, rename=None, rename_option: Option = Option.RENAME) -> LoadedData:
    """The data as read (see data.readers.read_data; ``items``: the columns no-answer words and labels apply to;
    ``filters``: the row filters applied next, which the notes do not suggest again; ``names_option``: the option
    that gave ``names_row``, and whose first row of data is ``first_data_row``; ``rename``: columns read under new
    names, as ``rename_option`` gives them (data.renamed_columns.column_renames), renamed before anything looks at
    the names)."""
    missing_codes = missing_codes_option(missing_codes)
    renames = column_renames(rename, rename_option)
    if isinstance(data, pd.DataFrame):
        if sheet is not None:
            raise OptionError(f"a sheet ('{printable(sheet)}') picks a sheet of an Excel file, and the data are a data "
                              f"frame; leave the sheet out")
        if names_row is not None:
            raise OptionError(f"a row of column names ({names_option}) is read from a file, and the "
                              f"data are a data frame, whose columns have their names; leave it out")
        if isinstance(data.columns, pd.MultiIndex):  # the model names one column by one name
            raise DataError(f"the data frame's columns have {data.columns.nlevels} levels of names (such as "
                            f"{printable(repr(data.columns[0]))}), and a model names each column by one name: "
                            f"flatten them first, e.g. frame.columns = ['_'.join(map(str, c)) for c in frame.columns], "
                            f"or drop a level with frame.droplevel(0, axis=1)")
        if first_data_row is not None:
            raise OptionError(f"a first row of data ({first_data_option(names_option)}) is read from a file, and the "
                              f"data are a data frame, whose rows are all data; leave it out")
        frame = named_by_index_label(blank_text_as_missing(data))  # '' and '  ' are no answer, as an empty cell is
        # column names in Unicode's composed form, as a file's are read (names.composed: a column named with
        # decomposed accents is the model's name written composed; diagram-s22: "did you mean" the same name)
        columns = frame.columns.tolist()  # (a list: iterating the frame's Index of text cost 3x as much, every fit)
        names = [composed(c) if isinstance(c, str) else c for c in columns]
        if names != columns:  # set anew only when a name changes (set_axis copies the frame, every fit)
            frame = frame.set_axis(names, axis=1)
        frame = renamed_frame(frame, renames, DATA_FRAME, rename_option)
        _refuse_reordered_numbers(frame, items, {r.new: r.old for r in renames})  # the names the model reads
        frame, notes_lines = drop_notes_lines(frame, DATA_FRAME)  # the readers' rules: notes lines under the data,
        frame, blank = drop_blank_rows(frame, DATA_FRAME)  # then blank rows
        blank = notes_lines + blank
        renamed = (rename_note(renames, DATA_FRAME, rename_option),) if renames else ()
        by_position = row_naming(frame) is RowNaming.POSITION  # indexed by position: the caller's labels kept
        return with_no_answers_read(LoadedData(frame, DATA_FRAME, notes=renamed + blank, renamed=renames,
                                               frame_index=data.index if by_position else None),
                                    missing_codes, DATA_FRAME, text_columns, items, listed,
                                    filters)  # as a file's cells are read
    if isinstance(data, (str, Path)):
        if summary_source(data):
            raise OptionError(f"'{data}' holds summary statistics, and this needs raw data (rows of answers); "
                              f"summary statistics work with fit, check and compare")
        summary_in_other_text(data)
        return read_data(data, sheet=sheet, missing_codes=tuple(missing_codes), text_columns=text_columns, items=items,
                         listed=listed, filters=filters, names_row=names_row, names_option=names_option,
                         first_data_row=first_data_row, renames=renames, renames_option=rename_option)
    raise OptionError(f"data must be a data frame or a path to a data file, not {type(data).__name__}")


def read_inputs(model: str | Path | Spec, data: pd.DataFrame | str | Path, sheet: str | None = None,
                missing_codes: tuple[float, ...] = (), keep: tuple[str, ...] | list[str] = ()) -> tuple[Spec, pd.DataFrame, str]:
    """Parse the model, read the data, apply row filters and check the model against the columns."""
    spec, loaded, notes = read_inputs_with_notes(model, data, sheet, missing_codes, keep)
    return spec, loaded.frame, loaded.source


def keeps_rows_with_gaps(missing) -> bool:
    """Whether a run whose handling of rows with missing answers is ``missing`` (MissingData, its words as given in
    Python, or None: the default, full-information ML or pairwise present rows) keeps the rows with gaps: every
    handling but listwise.  The one rule by which every workflow given a half of halves drawn from the complete rows
    reads it (a run that leaves the rows with gaps out, whose notes say it) or refuses it (data.halves.half_kept);
    a handling that cannot be read counts as keeping them, and the workflow names it on its own."""
    if isinstance(missing, str):
        try:
            missing = MissingData.parse(missing, "the handling of rows with missing answers")
        except OptionError:
            return True
    return missing is not MissingData.LISTWISE


def keep_option(keep) -> list:
    """Row selections: one filter as text (or one half of a halves file, data.halves.RandomHalf), or a list of
    them."""
    if keep is None:
        return []
    if isinstance(keep, (list, tuple)):
        return list(keep)
    if isinstance(keep, str) or _halves([keep]):
        return [keep]
    raise OptionError(f"keep must be a row filter (text) or a list of them, not {type(keep).__name__}")


def _halves(keep: list) -> list:
    """The halves of halves files (data.halves.RandomHalf) among the row selections ``keep``: filters are text, so
    that a run given none of anything else does not import the halves' module."""
    if all(isinstance(k, str) for k in keep):
        return []
    from cfa_tool.data.halves import RandomHalf

    return [k for k in keep if isinstance(k, RandomHalf)]


def load_data_for(spec: Spec, data, sheet=None, missing_codes=(), text_columns: tuple[str, ...] = (),
                  items=None, filters=(), names_row: int | None = None,
                  names_option: Option = Option.NAMES_ROW, first_data_row: int | None = None, rename=None,
                  rename_option: Option = Option.RENAME) -> LoadedData:
    """The data read for the model ``spec``, as every command reads them: a missing-value code on a declared scale
    refused, no-answer words and labels read as missing in ``items`` only (None: the model's items), and the words
    its 'answers' statements code kept as answers whatever they say; ``filters``: the row filters applied next;
    ``rename``: columns read under new names (:func:`load_data`).  A correlation or covariance matrix given as the
    data is refused (data.summary_stats.pasted_matrix)."""
    check_codes_off_scales(spec, missing_codes_option(missing_codes))
    listed = {x: frozenset(c.codes_by_word()) for x, c in spec.answer_codings().items()}  # answers, whatever they say
    loaded = load_data(data, sheet, missing_codes, text_columns, spec.observed_names if items is None else items,
                       listed, filters, names_row, names_option, first_data_row, rename, rename_option)
    pasted_matrix(loaded.frame, loaded.row_names, spec.observed_names, loaded.source)  # a matrix is no rows of answers
    return loaded


def read_inputs_with_notes(model, data, sheet=None, missing_codes=(), keep=(),
                           text_columns: tuple[str, ...] = (), items=None,
                           names_row: int | None = None, names_option: Option = Option.NAMES_ROW,
                           first_data_row: int | None = None, name_the_file: bool = False, rename=None,
                           rename_option: Option = Option.RENAME, chosen: dict[str, str] | None = None,
                           keeps_gaps: bool | None = None,
                           listwise_applies: bool = True) -> tuple[Spec, LoadedData, list[str]]:
    """The model and the data read for it, as every command that reads rows reads each of its files; no-answer
    words and labels are read as missing in ``items`` only (None: the model's items), never in a group, id or design
    column; ``names_option``: the option that gave ``names_row`` (replicate's validation file has its own);
    ``name_the_file``: the row filters' notes name the file (one of several files filtered alike); ``rename``:
    columns read under new names (the option --rename, data.renamed_columns), before anything looks at the names;
    ``chosen``: the columns the run chooses for other roles (data.matching.chosen_columns), which may not share a
    factor's name (a column that does and that the run does not read is named in a note); ``keeps_gaps``: whether the
    fit keeps rows with gaps (None: no fit says), by which a half of halves of the complete rows is read or refused
    (data.halves.half_kept); ``listwise_applies`` False: the route cannot leave them out, which that refusal's advice
    then leaves out."""
    words = missing_values_option(missing_codes)[1]
    if words:  # words given in Python: read as no answer as the command line's are (commands.run)
        with also_no_answer(run_words() + words):
            return read_inputs_with_notes(model, data, sheet, missing_codes_option(missing_codes), keep, text_columns,
                                          items, names_row, names_option, first_data_row, name_the_file, rename,
                                          rename_option, chosen, keeps_gaps, listwise_applies)
    keep = keep_option(keep)
    spec = load_spec(model)
    halves = _halves(keep)
    if len(halves) > 1:
        raise OptionError(f"one half of a halves file at a time, not {len(halves)} ({', '.join(f'{h.name} of {h.path}' for h in halves)})")
    filters = [parse_filter(k) for k in keep if all(k is not h for h in halves)]
    loaded = load_data_for(spec, data, sheet, missing_codes, text_columns, items, filters, names_row, names_option,
                           first_data_row, rename, rename_option)
    frame = loaded.frame
    labels = frame.columns.tolist()  # as Python objects at once (iterating an Index boxes each label)
    columns = [c if type(c) is str else str(c) for c in labels]
    refuse_name_twins(columns, loaded.source)  # the same name twice, or twins that look the same
    if not all(type(c) is str for c in labels):  # column labels as text (a renamed copy only when needed)
        frame = frame.set_axis(columns, axis=1)
    notes: list[str] = list(loaded.notes)
    # a list or a dict in a group, design, id or filter column: refused as in an item column (re-check s17, N7)
    refuse_container_cells(frame, [*(chosen or {}), *(f.column for f in filters if f.column is not None)])
    loaded, filter_notes = rows_kept(replace(loaded, frame=frame) if frame is not loaded.frame else loaded, filters)
    if halves:  # the halves were drawn from the rows the filters kept
        loaded = half_of(loaded, halves[0], data, sheet, spec.observed_names, keeps_gaps, listwise_applies)
        notes.append(loaded.row_filters[-1].note())
    frame, cautions, filters = loaded.frame, loaded.cautions, loaded.row_filters
    analysed, among = rows_analysed(loaded, getattr(chosen, "group", None))  # a fit of groups leaves some out
    if among is not None:  # the reading's counts of cells read as no answer, over the rows analysed
        notes = kept_reading_notes(notes, loaded.counts, analysed, kept_non_answers(loaded.non_answers, analysed), among)
    notes += [f"{loaded.source}: {note}" for note in filter_notes] if name_the_file else filter_notes
    unfinished = unfinished_rows_note(frame, loaded.source)
    if unfinished:
        notes.append(unfinished)
    numbers = getattr(chosen, "numbers", frozenset())  # columns of a role that takes numbers (matching.ChosenColumns)
    # a row filter reads its column too (review s14: a filter on a factor-named total was said to leave it unused)
    chosen = {**{f.column: f"the column of the row filter '{f}'" for f in filters if f.column is not None},
              **(chosen or {})}
    notes += check_columns(spec, columns, loaded.source, loaded.column_hint(), chosen)
    notes += case_twin_notes([*spec.observed_names, *(items or ()), *text_columns, *chosen], columns, loaded.source)
    notes += nominal_items_note(frame, spec.observed_names, loaded.source)  # an SPSS file's measure levels
    frame, coding_notes = code_answer_words(spec, frame, loaded.source,  # 'answers' statements: words as codes
                                            missing_codes=missing_codes_option(missing_codes),
                                            value_labels=loaded.value_labels)
    # a file of several read alike (replicate's) whose answers are numbers: its note names it, since the other file's
    # may be words (hostile s23b); a coding of words, alike in both files, is said once
    notes += ([f"{loaded.source}: " + n for n in coding_notes] if name_the_file and frame.attrs.get(NUMBERS_ONLY)
              else coding_notes)
    frame, joined_notes = join_answers(spec, frame, loaded.source)  # 'join answers': categories analysed as one
    notes += joined_notes
    check_declared_ranges(spec, frame, loaded.source, loaded.value_labels)
    values = item_values(frame, spec.observed_names)  # taken out once: the screening, gaps and moments read it
    notes += answer_range_notes(spec, frame, loaded.source, loaded.value_labels, values)
    beyond = beyond_scale(frame, spec.observed_names, loaded.value_labels, row_numbers(frame)) \
        if loaded.value_labels else ()
    # said where used (labels.label_notes); the columns whose role takes numbers (weights, helpers) keep their codes
    frame = _codes_as_labels(frame, loaded.value_labels, (*spec.observed_names, *sorted(numbers)))
    items = ItemColumns(frame, spec.observed_names, values)  # the items' codes are kept as they are
    return spec, replace(loaded, frame=frame, cautions=cautions + beyond, items=items,
                         odd_values=_screened_items(loaded, frame, spec, items.values, items.extremes)), notes


def case_twin_notes(read, columns, source: str) -> list[str]:
    """A note for each column the run reads (``read``: the model's items, the group, id, design and helper columns,
    a row filter's column) beside which ``source`` holds columns whose names differ from it only in capital letters
    (language.names.case_twins): names are matched exactly, so the exact one is read, and the note says which one and
    that the others are not, every command alike (s23: 'clean' beside 'Clean' was read without a word)."""
    notes = []
    for name, twins in case_twins(read, columns).items():
        shown = cut_list(twins, 3, lambda twin: f"'{printable(twin)}'")
        others = (f"the column {shown}, whose name differs from it only in capital letters, is" if len(twins) == 1
                  else f"the columns {shown}, whose names differ from it only in capital letters, are")
        notes.append(f"{source}: the column '{printable(name)}' is read, as named; {others} not read (names are "
                     f"matched exactly, capitals included)")
    return notes


def _screened_items(loaded: LoadedData, frame: pd.DataFrame, spec: Spec, values: np.ndarray | None = None,
                    extremes: AnswerExtremes | None = None) -> tuple:
    """The values of the model's items among ``frame``'s rows that look like no answers (data.odd_values), those on a
    scale the model declares left out (:func:`_within_declared_scales`), with the rows of sums or means of the whole
    file that the row filters kept (:func:`summary_rows_kept`): one screen for the rows read and, with groups, for
    the rows with a group label (:func:`analysed_odd_values`)."""
    found = _within_declared_scales(odd_values(frame, spec.observed_names, row_numbers(frame), values, extremes), spec,
                                    frame)
    return found + summary_rows_kept(loaded, frame, spec.observed_names, found)


def _within_declared_scales(found: tuple, spec: Spec, frame: pd.DataFrame) -> tuple:
    """``found`` (data.odd_values) without the values outside the answers' own run that lie on the scale a
    'reversed ... on MIN to MAX' statement declares for every column holding them (a 7 among answers 1 to 5 of an
    item declared on 1 to 7 is an answer the model file names; review s13).  Values beyond a declared scale are an
    error before this (data.matching.check_declared_ranges)."""
    from cfa_tool.data.matching import declared_scales
    from cfa_tool.data.odd_values import OddKind

    apart = (OddKind.OUTSIDE_SCALE, OddKind.SET_APART)  # values judged by a scale, which the model may declare
    if not spec.reversed or not any(o.kind in apart for o in found):
        return found
    scales = declared_scales(spec, frame)

    def declared(o) -> bool:
        return all(c in scales and scales[c][0] <= v <= scales[c][1] for c, v in zip(o.columns, o.values))

    return tuple(o for o in found if not (o.kind in apart and declared(o)))


def summary_rows_kept(loaded: LoadedData, frame: pd.DataFrame, names: tuple[str, ...], found: tuple) -> tuple:
    """Rows of totals or means of the whole file (data.odd_values, judged against every row read) that the row
    filters kept in ``frame`` and the screening of the rows kept did not find (hostile trial s13, H5): a means row
    labelled 'Average' passes 'district != south', and against the kept rows alone its values are not their means."""
    from cfa_tool.data.odd_values import OddKind

    if loaded.read_frame is None or not loaded.row_filters:
        return ()
    kept = set(row_numbers(frame).tolist())
    said = {int(r) for o in found for r in o.rows}
    whole = loaded.read_frame
    if not all(name in whole.columns for name in names):
        return ()
    return tuple(o for o in odd_values(whole, names, row_numbers(whole))
                 if o.kind in (OddKind.SUMS_ROW, OddKind.MEANS_ROW) and o.rows[0] in kept and o.rows[0] not in said)


def rows_kept(loaded: LoadedData, filters) -> tuple[LoadedData, list[str]]:
    """``loaded`` with only the rows the row filters (data.filters.RowFilter, parsed) keep, the rows read before them
    and the filters (with the rows each left out for an empty cell) kept for the reports, and the filters' notes;
    unchanged without filters."""
    if not filters:
        return loaded, []
    frame, notes, filters = apply_filters(loaded.frame, list(filters), loaded.source, loaded.value_labels,
                                          loaded.row_names, decimal_comma=loaded.reading is not None
                                          and loaded.reading.decimal == ",")
    return replace(loaded, frame=frame, cautions=kept_cautions(loaded.cautions, frame), read_frame=loaded.frame,
                   non_answers=kept_non_answers(loaded.non_answers, frame), row_filters=tuple(filters)), notes


def rows_analysed(loaded: LoadedData, group: str | None = None) -> tuple[pd.DataFrame, str | None]:
    """The rows of ``loaded`` that an analysis takes (those the row filters kept; of a fit of groups, those with a
    value in the ``group`` column), and the words that name them, None when they are every row read: the one rule
    by which the reading's counts are written over the rows analysed (data.kept_counts)."""
    frame = loaded.frame
    labelled = has_group(frame, group) if group is not None and group in frame.columns else None
    return analysed_rows(frame, loaded.read_frame is not None, group, labelled)


def half_of(loaded: LoadedData, choice: RandomHalf, data, sheet: str | None = None, items: tuple[str, ...] = (),
            keeps_gaps: bool | None = None, listwise_applies: bool = True) -> LoadedData:
    """``loaded`` with only the rows of one half of a halves file (data.halves.half_kept, checked against the data
    file ``data``, the ``sheet`` asked for and the sheet read, and the model's ``items`` with the handling of rows
    with gaps), the half joining the row filters that the reports name."""
    from cfa_tool.data.halves import half_kept

    frame, half = half_kept(loaded.frame, choice, data, loaded.source, sheet, loaded.sheet_read, items, keeps_gaps,
                            loaded.value_labels, listwise_applies)
    return replace(loaded, frame=frame, cautions=kept_cautions(loaded.cautions, frame),
                   non_answers=kept_non_answers(loaded.non_answers, frame),
                   read_frame=loaded.read_frame if loaded.read_frame is not None else loaded.frame,
                   row_filters=tuple(loaded.row_filters) + (half,))


def kept_cautions(cautions: tuple, frame: pd.DataFrame) -> tuple:
    """``LoadedData.cautions`` of the rows row filters kept in ``frame``: rows a workbook hides, cells read as gaps
    (data.missing_codes.CodeOnAnswer) count when kept."""
    kept = set(row_numbers(frame).tolist())
    return tuple(c for c in (c.among(kept) if hasattr(c, "among") else c for c in cautions) if c)


def _codes_as_labels(frame: pd.DataFrame, value_labels: dict, items) -> pd.DataFrame:
    """Columns other than the model's items whose every code has a value label (SPSS, Stata), as those labels:
    a group column of codes 1..5 labelled 'Dispatch', 'Fleet', ... gives groups named so.  ``items`` keep their codes:
    the model's items (the answers are numbers) and the columns whose role takes numbers (weights, missing-data
    helpers: data.matching.ChosenColumns); a column with unlabelled codes stays as it is."""
    labelled = labelled_codes(frame, value_labels, items)
    if not labelled:
        return frame
    frame = frame.copy()
    coded = dict(frame.attrs.get(CODED_LABELS, {}))
    for column in labelled:
        labels = value_labels[column]
        frame[column] = cells_as_labels(frame[column], labels)
        coded[column] = {label_text(code): label_text(labels[code]) for code in sorted(labels, key=_code_key)}
    frame.attrs[CODED_LABELS] = coded  # groups keep the file's order of codes and can be named by code
    return frame


def _code_key(code) -> tuple:
    """Codes in their order: numbers by value, then text."""
    return (0, float(code), "") if isinstance(code, (int, float)) else (1, 0.0, str(code))


def moments_for(spec: Spec, frame: pd.DataFrame, source: str, group: str | None = None,
                reference_group: str | None = None, missing: MissingData | str = MissingData.LISTWISE,
                design: DesignColumns | None = None,
                values: np.ndarray | None = None,
                extremes: AnswerExtremes | None = None) -> tuple[list[tuple[str | None, SampleMoments]], list[str]]:
    """Per-group (or single) sample moments of the model variables, with notes on rows left out;
    weighted, and carrying each row's weight, cluster and stratum, under a sampling ``design``.  ``values``:
    the model variables' columns of ``frame`` already taken out (data.moments.item_values), ``extremes`` their
    answers' extremes (data.moments.ItemColumns.extremes)."""
    notes: list[str] = []
    weights = design.weights if design is not None else None
    if group is None:
        if reference_group is not None:
            raise OptionError("a reference group needs a group column")
        groups = [(None, sample_moments(frame, spec.observed_names, source, missing=missing, weights=weights,
                                        values=values, extremes=extremes))]
    else:
        _check_group_column(spec, group)
        groups, no_group = split_moments(frame, group, spec.observed_names, source, reference_group, missing, weights)
        notes = _no_group_notes(no_group, group, len(frame)) + label_notes(frame, group)
    if design is not None:
        groups = apply_design(groups, frame, group, spec.observed_names, source, design, missing)
    return groups, notes


def _check_group_column(spec: Spec, group: str) -> None:
    opt.group_column(group)
    if group in spec.observed_names:
        raise OptionError(f"'{group}' is an indicator in the model and cannot also be the group column")


def _no_group_notes(no_group: int, group: str, read: int) -> list[str]:
    """The note on the ``no_group`` of ``read`` rows left out for having no value in the group column, unless
    :func:`without_group_problem` cautions about them (first in every view: the caution says it)."""
    if not no_group or without_group_problem(no_group, read, group) is not None:
        return []
    return [f"{no_group} {'row has' if no_group == 1 else 'rows have'} no value in the group column '{group}' and "
            f"{'was' if no_group == 1 else 'were'} left out"]


def fit(model: str | Path | Spec, data: pd.DataFrame | str | Path | None = None, *, group: str | None = None,
        reference_group: str | None = None, sheet: str | None = None, names_row: int | None = None,
        first_data_row: int | None = None, missing_codes: tuple[float, ...] = (), keep: tuple[str, ...] | list[str] = (), rename=None,
        covariance=None, n_obs: int | None = None, means=None,
        variables: list[str] | None = None, matrix: str = "covariance", sds=None, divisor: str = "n-1",
        ordinal: str | list[str] | None = None, ordinal_estimator: str | None = None, id_column: str | None = None,
        weights: str | None = None, cluster: str | None = None, strata: str | None = None,
        weight_kind: str | None = None, **options) -> FitResult:
    """Fit a confirmatory factor model by maximum likelihood.

    ``model``: model text, a path to a model file, or a parsed Spec.
    ``data``: a DataFrame or a path to a data file (CSV/TSV, .xlsx, .sav/.por, .dta, or a
    ``.stats`` summary-statistics file); ``sheet`` picks an Excel sheet; ``names_row``: the row (of a sheet) or
    line (of a text file) that holds the column names, the rows above it not read; ``first_data_row``: the row (or
    line) where the rows of data start, the rows between it and the column names not read (question texts under
    the item codes); ``missing_codes``
    are values that mean 'no answer'; ``keep`` are row filters such as 'district = north'; ``rename`` reads columns
    under new names, {'SL3r': 'SL3_r'}, before anything else looks at the names (the model, ``group``, ``keep``,
    ``weights``, ``id_column``, ``ordinal``), and every report says so.
    Instead of data: ``covariance`` (a matrix, or a DataFrame with variable names), ``n_obs``
    and optionally ``means``, ``variables``, ``matrix='correlation'`` with ``sds``, and
    ``divisor`` ('n-1' as published, or 'n').
    ``group``: a column whose values define groups (multi-group fit with a mean structure);
    ``reference_group``: the group whose factor means are fixed at zero.
    ``ordinal``: 'all' or a list of items to treat as ordinal, ranges such as 'item1..item9' among them (as does
    an 'ordinal' statement in the model): thresholds and polychoric correlations, fitted by ``ordinal_estimator``
    ('diagonally-weighted' or 'unweighted' least squares) with robust standard errors.
    ``id_column``: a column that names each row (never analysed; not a model variable or the group
    column): the case diagnostics name their rows by it beside the row number; without it, a
    row-name column of the file (a first column without a name in the header) does.
    ``weights``: a column of sampling weights (rescaled to sum to the number of rows; pseudo-maximum
    likelihood, Muthén & Satorra 1995, and the weighted full-information likelihood, Asparouhov 2005),
    or of frequency weights with ``weight_kind='frequency'`` (each row counted as often as its weight);
    ``cluster``: a column naming each row's cluster (cluster-robust standard errors and test);
    ``strata``: a column naming each row's stratum (clusters nested in strata).  Sampling weights and
    clusters make the standard errors sandwich ones and the chi-square a scaled one.  With ordinal items
    the thresholds and correlations are weighted (pseudo-maximum likelihood) and their asymptotic
    covariance is the design-based one of the rows' influence functions, summed by cluster within strata.
    ``options``: ``information``, ``test``, ``missing``, ``mi_threshold``, ``mi_top``, ``max_iterations``,
    ``missing_helpers`` (numeric columns outside the model, a list or one text separated by commas: auxiliary
    variables of full-information ML in Graham's 2003 saturated-correlates form, which leave the model, its degrees
    of freedom and fit indices as they are; estimation/auxiliary.py);
    ``diagnostics=False`` and ``modification_indices=False`` skip the extras (normality tests,
    reliability, residual and case diagnostics; score tests) in loops that only need estimates,
    standard errors and fit indices.

    A model that does not converge raises :class:`~cfa_tool.errors.EstimationError` (the error the
    command line reports with exit code 3), whose message says what happened, which parameters
    misbehaved and what to try; a returned result has always converged, so its ``fit`` is always set.
    """
    opt.group_column(group)
    fit_options = make_options(options, FIT_KEYWORDS, helpers=True)
    design = design_columns(weights, cluster, strata, weight_kind)
    if covariance is None:
        given = [name for name, value in (("n_obs", n_obs), ("means", means), ("variables", variables), ("sds", sds))
                 if value is not None] + [name for name, value, default in (("matrix", matrix, "covariance"),
                                                                          ("divisor", divisor, "n-1")) if value != default]
        if given:
            raise OptionError(f"{given[0]} goes with a covariance matrix (covariance=...), and none is given")
    if covariance is not None or summary_source(data):
        refuse_row_options("a covariance matrix" if covariance is not None else f"'{data}'", sheet, missing_codes, keep, group,
                           id_column, names_row, first_data_row, rename)
        if reference_group is not None:
            raise OptionError("a reference group needs groups, and summary statistics describe one group")
        if design is not None:
            raise OptionError(f"summary statistics hold no rows, so a {design.names[0][0]} column cannot apply; give the "
                              f"raw data")
        spec = load_spec(model)
        refuse_for_summary(spec, "a covariance matrix" if covariance is not None else f"'{data}'", ordinal,
                           ordinal_estimator)
        if covariance is not None:
            if data is not None:
                raise OptionError("give either data or a covariance matrix, not both")
            moments, notes = _api_summary(covariance, n_obs, means, variables, matrix, sds, divisor)
        else:
            moments, notes = read_summary_file(data)
        notes = list(notes) + list(check_columns(spec, list(moments.names), moments.source))
        if fit_options.missing_helpers:
            raise OptionError(f"summary statistics hold no rows, so missing-data helpers ({Option.MISSING_HELPERS}), "
                              f"which enter the likelihood of the rows with gaps, cannot apply; give the raw data")
        if fit_options.missing is not None:  # a matrix has no rows, so how rows with gaps are handled cannot apply
            raise OptionError(f"summary statistics hold no rows, so the handling of missing answers "
                              f"({Option.INCOMPLETE_ROWS}) cannot apply; remove the option")
        if fit_options.test is not FitTest.NORMAL:
            raise OptionError("summary statistics allow only the normal-theory test: robust tests and standard errors "
                              f"need the rows of answers ({Option.ROBUST} cannot apply)")
        result = converged(fit_moments(spec, moments, fit_options))
        return _described(of_summary_statistics(result, moments, notes), spec, None)
    if data is None:
        raise OptionError("give data (a data frame or a file) or a covariance matrix with n_obs")
    spec = load_spec(model)
    helpers = helper_columns(spec, fit_options.missing_helpers)
    spec, loaded, notes = read_inputs_with_notes(spec, data, sheet, missing_codes, keep,
                                                 (id_column,) if isinstance(id_column, str) else (), names_row=names_row,
                                                 first_data_row=first_data_row, rename=rename,
                                                 items=spec.observed_names + helpers if helpers else None,
                                                 chosen=chosen_columns(group, id_column, design,
                                                                       fit_options.missing_helpers),
                                                 keeps_gaps=keeps_rows_with_gaps(fit_options.missing))
    frame, source = loaded.frame, loaded.source
    # the id names rows in every fit of rows: the caution about copies of earlier rows (any model, any items), the
    # one about rows with one answer throughout, and the case tables of a fit with its diagnostics (one rule for
    # every command that reads rows: commands.options.add_id_option)
    ids = row_ids(frame, source, id_column, spec.observed_names, group, loaded.row_names)
    if fit_options.missing_helpers:
        check_helper_columns(fit_options.missing_helpers, frame, source, spec, group, id_column, design)
        loaded = with_helper_codes(loaded, helpers)
        loaded, notes = with_labelled_helpers(loaded, helpers, notes)
    loaded = with_design_weights(analysed_odd_values(loaded, spec, group), design, spec, group)
    by_row = ids_by_row_number(ids, frame)
    with odd_values_named(loaded):
        result = named_cases(_fit_read_rows(spec, loaded, notes, group, reference_group, fit_options, ordinal,
                                            ordinal_estimator, design, ids), by_row)
    reference_group_applies(result, reference_group)
    result = with_missing_reading(with_odd_values(result, loaded, group, spec, design, by_row,
                                                  id_filter_column(id_column, loaded)), loaded, missing_codes)
    repeated = reference_note(result, frame, group, reference_group) + duplicate_note(  # repeated ids: a caution first
        ids, "id column" if id_column is not None else "row names", False)
    return replace(result, warnings=result.warnings + tuple(repeated)) if repeated else result


#: the keywords of :func:`fit` besides the fit options it passes on (an unknown keyword's near names,
#: make_options), read from its signature once
FIT_KEYWORDS = own_keywords(fit)


def reference_group_applies(results, reference_group: str | None) -> None:
    """A reference group given for fits in groups in none of which it sets anything (every group's parameters free
    or fixed alike: the factor means fixed at zero in every group, as a configural model has them) is an option
    that cannot apply: an error, not a silently reordered report.  ``results``: one fit, or the fits compared."""
    results = results if isinstance(results, (list, tuple)) else (results,)
    if reference_group is None or not any(r.multigroup for r in results) or reference_sets_something(results):
        return
    raise OptionError(f"{Option.REFERENCE_GROUP.given(printable(reference_group))} sets nothing in "
                      f"{'this model' if len(results) == 1 else 'these models'}: every group's factor means are fixed "
                      f"at zero and no other parameter is set by the reference group; it applies when factor means "
                      f"are estimated (intercepts held equal, as 'invariance scalar' or the invariance command hold "
                      f"them): leave it out")


def reference_sets_something(results) -> bool:
    """Whether the reference group sets anything in any of these fits in groups: some group's parameters are free or
    fixed unlike another's (the factor means fixed at zero in the reference group alone)."""
    for result in results:
        patterns: dict = {}
        for r in result.estimates:
            patterns.setdefault(r.group, set()).add((r.kind, r.variables, r.free, None if r.free else r.estimate))
        if len({frozenset(p) for p in patterns.values()}) > 1:
            return True
    return False


def reference_note(results, frame: pd.DataFrame, group: str | None, reference_group: str | None) -> list[str]:
    """The note naming the reference group of fits in groups and the rule that chose it (data.groups: the first
    category, the lowest code or the largest group) when the user chose none and it sets something (the other
    groups' factor means are differences from it); [] otherwise."""
    results = results if isinstance(results, (list, tuple)) else (results,)
    if (group is None or reference_group is not None or not results or not results[0].multigroup
            or not reference_sets_something(results)):
        return []
    from cfa_tool.data.groups import reference_rule, reference_words

    return ["the reference group (its factor means fixed at zero, the other groups' means differences from it) is "
            + reference_words(results[0].groups[0].label, reference_rule(frame, group),
                              [g.label for g in results[0].groups])]


def with_missing_reading(result, loaded: LoadedData, missing_codes=()):
    """``result`` (a fit of rows) with what was read as no answer kept in its data (and which items an 'answers'
    statement covers held numbers alone, data.answer_words.NUMBERS_ONLY): the ``missing_codes`` given
    (scores of other data with the fit read them so too) and the values of its items that the file itself marks as
    no answer (``loaded.non_answers``), which the methods paragraph names; and the values of its items that look like
    no answers but were analysed as answers (``loaded.odd_values``), and the row filters that chose its rows
    (:func:`with_row_filters`), which it names too, with how a text file was read (``loaded.reading``); how its rows are
    named (a data frame's by their index labels, data.kept_rows.RowNaming)."""
    result = with_row_filters(result, loaded)
    read = {}  # what the reading adds to the result's data, put in with one copy of the result
    if loaded.renamed:
        read["renamed"] = loaded.renamed
    naming = row_naming(loaded.frame)
    if naming is not RowNaming.FILE_ROW:
        read["row_naming"] = naming
    numbers_only = tuple(x for x in loaded.frame.attrs.get(NUMBERS_ONLY, ()) if x in result.observed)
    if numbers_only:  # items an 'answers' statement covers whose answers held no word
        read["numbers_only"] = numbers_only
    codes, words = missing_values_option(missing_codes)
    # the words of no answer too, given in Python or on the command line (there, the run's words): scoring other data
    # with the fit reads them so too
    words = tuple(dict.fromkeys(words + run_words()))
    # the missing-data helpers' cells read as missing too: they enter the likelihood as the items do (review s13)
    items = set(result.observed) | set(getattr(result.method, "helpers", None) or ())
    # what the rows analysed held (those the row filters kept, with a group label): the methods paragraph names it
    analysed, among = rows_analysed(loaded, getattr(result, "group_column", None))
    held = kept_non_answers(loaded.non_answers, analysed) if among else loaded.non_answers
    found = loaded.counts.codes_among(analysed) if among and loaded.counts is not None else loaded.codes_found
    marked = tuple(f for f in held if f.column in items)
    odd = tuple(o for o in loaded.odd_values if items.intersection(o.columns))
    if codes or words or marked or odd:
        read.update(missing_codes=codes, no_answer_words=words, non_answers=marked, odd_values=odd,
                    codes_found=tuple(c for c in codes if c in found))
    declared = tuple(r for r in loaded.declared_ranges if r.column in items)  # scoring other data reads them so
    if declared:
        read["declared_ranges"] = declared
    scales = labelled_scales(loaded, result.observed)  # and judges answers by the scale the labels declare
    if scales:
        read["labelled_scales"] = scales
    return replace(result, data=replace(result.data, **read)) if read else result


def labelled_scales(loaded: LoadedData, items) -> tuple[tuple[str, float, float], ...]:
    """(item, lowest, highest) of each of ``items`` whose value labels declare answers (data.missing_codes.
    labelled_scale), the codes the file marks as no answer or declares missing aside."""
    from cfa_tool.data.missing_codes import labelled_scale

    out = []
    for item in items:
        labels = loaded.value_labels.get(item)
        if not labels:
            continue
        skip = {n.value for n in loaded.non_answers if n.column == item} | {
            k for k in labels for r in loaded.declared_ranges
            if r.column == item and isinstance(k, float) and r.low <= k <= r.high}
        scale = labelled_scale(labels, skip)
        if scale is not None:
            out.append((item, *scale))
    return tuple(out)


def with_design_weights(loaded: LoadedData, design: DesignColumns | None, spec: Spec, group: str | None) -> LoadedData:
    """``loaded`` carrying its rows' weights, parsed and checked once (data.sample_design.design_weights), for the
    check of the design and the caution about groups weighted out alike (unchanged without weights)."""
    if design is None or design.weights is None:
        return loaded
    return replace(loaded, weights=design_weights(loaded.frame, design, spec.observed_names, group, loaded.source))


def weighted_out_problems(loaded: LoadedData, group: str | None, design: DesignColumns | None) -> tuple:
    """A caution naming the groups every row of which has weight 0 under ``design``: they leave a multi-group
    analysis, which the title's list of groups shows only by their absence.  The weights are those ``loaded``
    carries (:func:`with_design_weights`); read from its frame when it carries none."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.data.sample_design import groups_weighted_out, weighted_out_words

    if design is None or design.weights is None:
        return ()
    gone, _ = groups_weighted_out(loaded.frame, design.weights, group, loaded.weights)
    if not gone:
        return ()
    one = len(gone) == 1
    said = weighted_out_words(gone, group, design.weights)
    return (Problem(ProblemKind.GROUP_WEIGHTED_OUT, (), float(len(gone)),
                    f"{said[0].upper()}{said[1:]}, so {'it is' if one else 'they are'} not in this analysis.",
                    f"if {'that group' if one else 'those groups'} should be compared, give {'its' if one else 'their'} "
                    f"rows their weights; otherwise leave {'it' if one else 'them'} out with a row filter so that the "
                    f"report says why."),)


def odd_value_problems(loaded: LoadedData, group: str | None = None, design: DesignColumns | None = None,
                       helpers: tuple[str, ...] = (), listwise: bool = False, labelled_by: str | None = None) -> tuple:
    """Values in the item columns that look like no answers (a missing-value code, a totals row), and those the
    file marks as no answer and that were read as missing when rows leave the analysis because of them
    (data.non_answers.non_answer_caution; ``listwise``: rows with gaps are left out), as cautions that come first in
    every view (assessment.admissibility.Problem); with a ``group`` column, the groups the sampling ``design``'s
    weights leave out (:func:`weighted_out_problems`) and its labels that differ only in case
    (:func:`group_case_problems`) first.  ``helpers``: the missing-data helpers, whose cells read as missing are
    named in the same caution as the items' (they enter the likelihood as items do; review s13: they were in the
    methods text only); ``labelled_by``: the group column, whose rows without a value leave the analysis for want of
    one, not for values read as no answer (:func:`rows_analysed`)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    if group is not None or (design is not None and (design.cluster or design.strata)):
        design_columns = ((("cluster", ("cluster", "clusters"), design.cluster),
                           ("strata", ("stratum", "strata"), design.strata)) if design is not None else ())
        return (weighted_out_problems(loaded, group, design)
                + (group_case_problems(loaded.frame, group) if group is not None else ())
                + tuple(p for part, unit, name in design_columns if name is not None
                        for p in group_case_problems(loaded.frame, name, part, unit))
                + odd_value_problems(loaded, helpers=helpers, listwise=listwise, labelled_by=group))

    items = (tuple(loaded.items.names) + tuple(helpers)) if loaded.items is not None else tuple(loaded.frame.columns)
    analysed, among = rows_analysed(loaded, labelled_by)  # rows without a group label leave for want of one
    marked = non_answer_caution(kept_non_answers(loaded.non_answers, analysed) if among else loaded.non_answers,
                                loaded.source, items, analysed, listwise, len(analysed) if among else None,
                                among or "")
    # a code already named as labelled beyond the scale of the same items is not named again (as a missing-value code,
    # a value outside the answer scale or a code set apart)
    from cfa_tool.data.non_answers import BeyondScale
    from cfa_tool.data.odd_values import OddKind

    labelled = {(c.value, column) for c in loaded.cautions if isinstance(c, BeyondScale) for column in c.columns}
    odd = tuple(o for o in loaded.odd_values if not (o.kind in (OddKind.MISSING_CODE, OddKind.OUTSIDE_SCALE,
                                                                OddKind.SET_APART) and all(
        (v, column) in labelled for v, column in zip(o.values, o.columns))))
    given = tuple(loaded.missing_codes) + tuple(loaded.missing_words)  # advice adding a code keeps those given
    odd = tuple(replace(o, given=given) for o in odd) if given else odd
    cautions = tuple(replace(c, given=given) if given and isinstance(c, BeyondScale) else c for c in loaded.cautions)
    return ((Problem(ProblemKind.VALUES_READ_AS_MISSING, (), None, *marked),) if marked else ()) + tuple(
        Problem(ProblemKind(getattr(odd, "problem_kind", ProblemKind.VALUES_NOT_ANSWERS.value)), (),
                getattr(odd, "problem_value", None), odd.caution(loaded.source), odd.advice())
        for odd in cautions + odd)


def group_case_problems(frame: pd.DataFrame, group: str, part: str = "group",
                        unit: tuple[str, str] = ("group", "groups")) -> tuple:
    """A caution naming the labels of the group column that differ only in upper and lower case ('north' and
    'North'), with the rows of each: they are analysed as different groups, and only the user knows whether they
    are one (they are not merged silently, as labels differing by spaces at their ends are); with ``part`` and
    ``unit`` (one, several) the same rule for a cluster or strata column ('School A' and 'school a' are two clusters)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.data.labels import case_variants

    if group not in frame.columns:
        return ()
    labels = frame[group].dropna()
    if not _may_differ_by_case(labels):
        return ()
    found = case_variants(labels)
    if not found:
        return ()
    listed = cut_list(found, CASE_VARIANTS_SHOWN, lambda variants: word_list(
        f"'{printable(label)}' ({counted(n, 'row')})" for label, n in variants), sep="; ", lead="; and ", noun="such set")
    kind = ProblemKind.GROUP_LABELS_BY_CASE if part == "group" else ProblemKind.DESIGN_LABELS_BY_CASE
    return (Problem(kind, (), float(len(found)),
                    f"In the {part} column '{printable(group)}', labels that differ only in upper and lower case are "
                    f"analysed as different {unit[1]}: {listed}.",
                    f"if they are one {unit[0]}, recode the column so that they are written alike; if they are "
                    f"different {unit[1]}, give them labels that differ in more than case."),)


CASE_VARIANTS_SHOWN = 5  # sets of labels differing only in case that a caution names before 'and N more'


def _may_differ_by_case(cells: pd.Series) -> bool:
    """Whether some labels of ``cells`` (a column's cells, gaps left out) can differ only in upper and lower case
    (data.labels.case_variants), judged without reading every cell as a label: numbers and truth values have labels
    without two such (digits, a point, 'e' and 'inf'; 'True' and 'False'), and a column of text only when two of its
    distinct texts read so; any other column is left to case_variants."""
    if cells.dtype.kind in "biuf":
        return False
    values = cells.tolist()
    if set(map(type, values)) != {str}:
        return True
    labels = {label_text(v) for v in set(values)}
    return len({label.casefold() for label in labels}) < len(labels)


def screened(frame: pd.DataFrame, names: tuple[str, ...], source: str, non_answers: tuple = (),
             cautions: tuple = ()) -> LoadedData:
    """``frame`` as loaded data holding the values among the columns ``names`` that look like no answers, and
    those of ``non_answers`` (``LoadedData.non_answers``, read as missing) in them, for the commands that read
    their data without :func:`read_inputs_with_notes` (replicate, explore): their cautions
    (:func:`odd_value_problems`) and :func:`odd_values_named` then work as for every other command, and a totals
    row among them is refused as every other command refuses it (:func:`refuse_totals_rows`)."""
    return refuse_totals_rows(LoadedData(frame, source, odd_values=odd_values(frame, tuple(names), row_numbers(frame)),
                                         non_answers=tuple(f for f in non_answers if f.column in set(names)),
                                         cautions=cautions))


def data_problems(loaded: LoadedData, spec: Spec | None = None, group: str | None = None,
                  design: DesignColumns | None = None, ids: dict | None = None, names: tuple[str, ...] | None = None,
                  coverage: dict | None = None, n_obs: int | None = None, where: str = "",
                  helpers: tuple[str, ...] = (), listwise: bool = False, by_loadings: tuple[str, ...] = (),
                  id_column: str | None = None, takes_design: bool = True, halves: bool = False) -> tuple:
    """The cautions on the data that come first in every view, composed here once for every command (fit, check,
    compare, invariance, replicate, scores, bootstrap, cutoffs, align), in this order: what the row filters did to
    the sample (pipeline.row_filter_cautions: a selection on a model item, a label several codes carry); rows that are copies of
    earlier rows (:func:`copied_row_problems`); a 'reversed' statement's
    declared scale that no answer reaches (:func:`scale_ends_problems`) and rows with one answer throughout
    (:func:`same_answer_problems`, ``ids``: data-row number -> id), both with a ``spec`` that declares reversed
    items; the groups the weights leave out, group labels differing by case and values that look like no answers
    (:func:`odd_value_problems`); items answered by few rows (``coverage``: item -> share of the ``n_obs`` rows
    analysed answering it) and nearly constant items (:func:`few_answers_problems`) among ``names`` (the model's
    items by default).  ``listwise``: rows with gaps leave the analysis.  The data are not refused: the user may
    know better.  ``where``: which of several files filtered alike the row filters' cautions are about (replicate's
    ' on the calibration data (spring.csv)'); ``helpers``: the missing-data helpers, whose values read as missing are
    named with the items' ones; ``id_column``: the column ``ids`` are read from (:func:`id_filter_column`), by which
    advice writes a row filter; ``takes_design`` False: the command takes no sampling design (replicate, explore:
    their --cluster draws halves), so no advice offers one; ``halves``: with it, random halves of the rows are drawn,
    by clusters where the command is given them (replicate --data), which advice on rows of teams or schools offers."""
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.pipeline.row_filter_cautions import row_filter_problems

    names = names if names is not None else (spec.observed_names if spec is not None else ())
    found: tuple = row_filter_problems(loaded, spec, names, where=where) + copied_row_problems(loaded, group, design, names, ids or {})
    # ids of several rows: no merge by id one to one, and the same people's rows taken as independent cases
    repeated = repeated_id_problems(loaded, ids or {}, id_column, group, names, design, fitted=True,
                                    takes_design=takes_design)
    repeated = repeated or named_id_problems(loaded, id_column, group, design, names, takes_design)
    if not any(p.kind is ProblemKind.REPEATED_IDS for p in repeated):  # no id of several rows: the teams' rows
        repeated += _unit_rows_problems(loaded.frame, {group, id_column, *names,
                                                       *(n for _, n in (design.names if design else ()))},
                                        design, takes_design, halves)
    found += repeated
    if spec is not None and spec.reversed:  # rows with one answer throughout contradict reverse-worded items
        frame = _labelled(loaded.frame, group)
        found += scale_ends_problems(frame, spec) + same_answer_problems(frame, spec, ids or {}, id_column=id_column)
    elif spec is not None and by_loadings:  # ... and items a fit's loadings key as reversed, without a statement
        found += same_answer_problems(_labelled(loaded.frame, group), spec, ids or {}, by_loadings=by_loadings,
                                      id_column=id_column)
    from cfa_tool.pipeline.column_codes import column_code_problems

    found += column_code_problems(loaded, group, design)  # no-answer codes kept in the columns choosing rows
    found += odd_value_problems(loaded, group, design, helpers, listwise) + few_answers_problems(names, coverage or {}, n_obs, loaded,
                                                                              group, listwise)
    found += shifted_scale_problems(loaded, group, names)  # an item coded on shifted codes in some group
    if group is not None and group in loaded.frame.columns:  # rows without a group label: the rule of _labelled
        without = without_group_problem(len(loaded.frame) - len(_labelled(loaded.frame, group)), len(loaded.frame),
                                        group)
        found += (without,) if without is not None else ()
    return tuple(dict.fromkeys(found))  # each once


def shifted_scale_problems(loaded: LoadedData, group: str | None, names: tuple[str, ...]) -> tuple:
    """A caution, first, naming the items whose answers lie on shifted codes in different groups (0 to 4 in one, 1
    to 5 in another: data.shifted_scales, the one rule), with each group's range and the recoding that undoes the
    shift: a coding slip reads as a difference of the item's intercept (or thresholds) between the groups, and
    the search of partial invariance frees it (hostile trial s25, finding 4).  () without groups or shifts."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.data.groups import group_keys, group_labels, group_rows
    from cfa_tool.data.shifted_scales import shifted_scales
    from cfa_tool.language.names import written_group

    if group is None or group not in loaded.frame.columns:
        return ()
    items = [name for name in names if name in loaded.frame.columns]
    if not items:
        return ()
    frame = _labelled(loaded.frame, group)
    values = loaded.items.of(frame, items) if loaded.items is not None else None
    values = values if values is not None else item_values(frame, items)  # numbers: taken out once, split by rows
    if values is not None:
        labels = group_labels(frame, group, loaded.source)
        keys = group_keys(frame[group]).to_numpy(object)
        parts = [(label, values[keys == label]) for label in labels]
    else:  # cells that are not numbers: read as numbers where they are, group by group
        split, _ = group_rows(frame, group, loaded.source)
        parts = [(label, part[items].apply(pd.to_numeric, errors="coerce").to_numpy(float)) for label, part in split]
    groups = [(f"group {written_group(label, [x for x, _ in parts])}", part) for label, part in parts]
    found = shifted_scales(items, groups)
    if not found:
        return ()
    one = len(found) == 1
    listed = "; ".join(f.ranges_words() for f in found)
    return (Problem(ProblemKind.SHIFTED_CODES_IN_GROUPS, (), float(len(found)),
                    f"{'An item has' if one else 'Items have'} answers on shifted codes in different groups: {listed}. "
                    f"One answer scale coded otherwise in some group (0 to 4 against 1 to 5, as two exports merged "
                    f"into one file may be) reads as a difference between the groups in {'its' if one else 'their'} "
                    f"intercepts (thresholds, of ordinal items), that is as non-invariance, and shifts "
                    f"{'its' if one else 'their'} means in those groups.",
                    f"check how each group's answers are coded; if the groups share one scale, undo the shift in a "
                    f"copy of the data file ({'; '.join(f.undoing_words() for f in found)}) before comparing the "
                    f"groups."),)


def id_filter_column(id_column: str | None, loaded: LoadedData) -> str | None:
    """The column a row filter names the rows' ids by: the id column given, else the file's row names
    (data.kept_rows.ROW_NAMES_COLUMN, which a filter compares when the file has no column of that name), else None."""
    if isinstance(id_column, str):
        return id_column
    return ROW_NAMES_COLUMN if loaded.row_names is not None and ROW_NAMES_COLUMN not in loaded.frame.columns else None


def rows_named(loaded: LoadedData, id_column: str | None, model_variables, group: str | None = None
               ) -> tuple[dict, str | None]:
    """(data-row number -> id, the column a row filter names them by: :func:`id_filter_column`) of ``loaded``'s rows,
    which the cautions about rows name beside their numbers (copies of earlier rows, one answer throughout): the id
    column given (``--id``, checked as fit checks it: data.row_ids.row_ids) or the file's row names; ({}, None)
    without either.  Every command that names rows reads them so (new-user trial s19: invariance, check, compare
    and replicate named row numbers only)."""
    ids = row_ids(loaded.frame, loaded.source, id_column, tuple(model_variables), group, loaded.row_names)
    if ids is None:
        return {}, None
    return ids_by_row_number(ids, loaded.frame), id_filter_column(id_column, loaded)


def with_odd_values(result, loaded: LoadedData, group: str | None = None, spec: Spec | None = None,
                    design: DesignColumns | None = None, ids: dict | None = None, id_column: str | None = None):
    """``result`` (a fit: anything with ``problems``, ``observed``, ``n_obs`` and ``missing_data``) with the
    cautions about its data (:func:`data_problems`, the few answers judged by its own coverage) before its own,
    each once (scores of the fitted file, say), and how its text file was read (:func:`with_reading`: every workflow
    decorates its fit so, its CSV files following the data file's convention)."""
    result = with_reading(result, loaded)
    coverage = (getattr(result, "missing_data", None) or {}).get("coverage", {})
    helpers = tuple(getattr(getattr(result, "method", None), "helpers", None) or ())  # read as the items are
    listwise = getattr(getattr(result, "method", None), "missing", None) is MissingData.LISTWISE
    found = tuple(p for p in data_problems(loaded, spec, group, design, ids, tuple(getattr(result, "observed", ()) or ()),
                                           coverage, getattr(result, "n_obs", None), helpers=helpers, listwise=listwise,
                                           by_loadings=reversed_by_loadings(result), id_column=id_column)
                  if p not in result.problems)
    from cfa_tool.assessment.admissibility import solution_first

    return replace(result, problems=solution_first(found + tuple(result.problems))) if found else result


def reversed_by_loadings(result) -> tuple[str, ...]:
    """The items a fit's loadings key as reversed in its first-order factors' keyed sums (assessment.reliability.
    item_keys, named in its report), in every group; () for a model with a 'reversed' statement (its keys are the
    statement's) or a result without reliabilities."""
    from cfa_tool.assessment.reliability import Keying

    groups = getattr(result, "groups", None) or (result,)
    return tuple(dict.fromkeys(x for g in groups for r in (getattr(g, "reliability", None) or ())
                               if getattr(r, "level", "") == "first-order" and r.keying is Keying.SIGNS
                               for x in r.reversed))


COPIED_ROWS_SHOWN = 5  # pairs of a copied row and its original that the caution names before 'and N more'
#: without a column that tells respondents apart (an id, a time stamp, free text: see :func:`_identifying_column`),
#: respondents who answered alike look like copies (in simulated answers on 1 to 5 to six items, 26 of 300 rows
#: repeated an earlier one by chance, also beside a district or gender column); their identical rows are named only
#: when at least this many consecutive rows repeat consecutive earlier rows in order, as rows pasted twice or a file
#: appended to itself leave them (a rule of thumb of this project, not a published one)
COPIED_RUN_OF_ANSWERS_ALONE = 5
#: a column tells respondents apart when it holds at least this share as many distinct values as the rows that are
#: not copies (an id column of a file appended to itself holds each id twice, and still tells the respondents apart)
IDENTIFYING_SHARE = 0.9


def _identifying_column(frame: pd.DataFrame, skip: set, copies: int) -> bool:
    """Whether a column of ``frame`` other than those in ``skip`` (the model's items, groups, design, a row-number
    column) tells respondents apart, so that rows identical in it too are unlikely to agree by chance (review s11: a
    district column beside six items made every chance agreement a caution)."""
    distinct_rows = len(frame) - copies
    for name in frame.columns:
        if name in skip:
            continue
        if frame[name].nunique(dropna=True) >= IDENTIFYING_SHARE * distinct_rows:
            return True
    return False


def copied_row_problems(loaded: LoadedData, group: str | None, design: DesignColumns | None, names: tuple[str, ...],
                        ids: dict) -> tuple:
    """A caution naming the rows analysed that are identical in every column of the file to an earlier row (a
    row-number column left out: data.copied_rows), by row number and id (``ids``: row number -> id), the first
    :data:`COPIED_ROWS_SHOWN` pairs; () when there are none.  In a file holding only the model's items and the
    group and design columns, identical rows may be respondents who answered alike: named only when
    :data:`COPIED_RUN_OF_ANSWERS_ALONE` of them or more in a row repeat earlier rows in the same order."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.data.column_roles import id_named_column
    from cfa_tool.data.copied_rows import copied_rows, time_stamp_column

    frame = _labelled(loaded.frame, group)
    items = [x for x in names if x in frame.columns]
    block = loaded.items.of(loaded.frame, items) if loaded.items is not None else None  # taken out once per fit
    if block is None and items:
        block = item_values(frame, tuple(items))
    elif block is not None and frame is not loaded.frame:
        block = block[has_group(loaded.frame, group)]  # the rows _labelled keeps
    described = set(names) | {group} | {name for _, name in (design.names if design is not None else ())}
    # without an id (given or named so), a survey platform's time stamp left out: a second submission differs from
    # the first there alone (new-user trial s27); with one, the caution on ids names such rows by their id
    stamp = (time_stamp_column(frame, described) if not ids and id_named_column(frame, described) is None
             else None)
    found = copied_rows(frame, row_numbers(frame), block, stamp)
    if found is None:
        return ()
    if found.longest_run() < COPIED_RUN_OF_ANSWERS_ALONE and not found.few_stamped and not _identifying_column(
            frame, described | {found.numbering, found.time_stamp}, len(found)):  # (a few resubmissions: named)
        return ()
    def row(r: int) -> Text:  # the id apart: a manuscript names rows by number alone (note_parts.RowId)
        return row_of(frame, r) + (Note((RowId(f" ({printable(ids[r])})"),)) if ids.get(r) is not None else "")

    n = len(found)
    few = names_shown(n, COPIED_ROWS_SHOWN)
    pairs = joined([row(c) + " repeats " + row(o) for c, o in list(zip(found.copies, found.originals))[:few]], "; ")
    more = more_words(n - few, "; and ")
    numbering = (f" but the row-number column '{printable(found.numbering)}'" if found.numbering else "") + (
        f"{' and' if found.numbering else ' but'} the time stamp '{printable(found.time_stamp)}'" if found.time_stamp else "")
    stamped = False
    if found.time_stamp is not None:  # a later submission, not a copy: the time stamp differs from its original's
        # each row number's stamp, read once (the first row of a number, as row_of names it)
        stamp = dict(zip(row_numbers(frame)[::-1].tolist(), frame[found.time_stamp].to_numpy(object)[::-1]))
        stamped = any(stamp[c] != stamp[o] for c, o in zip(found.copies, found.originals))
    # a row filter can leave the copies out only by a column in which they differ from their originals: a row-number
    # column, or row names (``ids`` not read from a column of the file, which the copies repeat); rows identical in
    # every column have none (new-user trial s20: the advice named a filter that no column could write)
    same_ids = any(ids.get(c) is not None and ids.get(c) == ids.get(o) for c, o in zip(found.copies, found.originals))
    apart = found.numbering is not None or any(ids.get(c) != ids.get(o) for c, o in zip(found.copies, found.originals))
    example = ""
    if found.numbering and set(found.copies) == set(row_numbers(frame)[len(frame) - n:].tolist()):  # a block at the end
        first = frame[found.numbering].iloc[len(frame) - n]
        # a number as the one writer takes numbers (numpy's too: Real), anything else as its label's text
        number = isinstance(first, Real) and not isinstance(first, bool)
        written = filter_text(found.numbering, "<", first if number else label_text(first))
        example = f" (here {Option.KEEP.given(written)})" if written else ""  # the one writer (data.filter_text)
    if stamped:  # the filter that leaves the later submissions out, by the time stamp
        written = _later_rows_filter(tuple((None, (o, c)) for c, o in zip(found.copies, found.originals)), frame,
                                     None, tuple(names))
        example = f" (here {Option.KEEP.given(written)})" if written else example
        apart = True
    return (Problem(ProblemKind.COPIED_ROWS, (), float(n),
                    f"{count_text(n)} of the {count_text(len(frame))} rows analysed {'is' if n == 1 else 'are'} identical in every column"
                    f"{numbering} to an earlier row: " + pairs + f"{more}"
                    + (" (submitted twice?)" if stamped else "")
                    + f". If they are copies (a file appended to itself, "
                    f"rows pasted twice{', a second submission' if stamped else ''}), each is counted as another "
                    f"respondent, so N is too large, the standard "
                    f"errors too small and the chi-square too large." + (
                        " Each copy repeats its original's id too, so a file merged by the ids (a scores file, say) "
                        "cannot be matched to the rows one to one while the copies are there." if same_ids else ""),
                    Note(("delete the copies in a copy of the data file and analyse that",)
                         + ((", or leave them out with ", Command(f"{Option.KEEP}", "a row filter"),
                             " on a column that tells them apart", Command(example)) if apart else ())
                         + ("." if same_ids else  # the same ids: not different respondents
                            "; if they are different respondents who answered alike, nothing needs to change.",))),)


REPEATED_IDS_SHOWN = 5  # ids of several rows that the caution names before 'and N more'


def repeated_id_problems(loaded: LoadedData, ids: dict, id_column: str | None, group: str | None = None,
                         items: tuple[str, ...] = (), design: DesignColumns | None = None, fitted: bool = False,
                         by_name: bool = False, takes_design: bool = True, by_values: bool = False) -> tuple:
    """A caution naming the ids that several rows hold (``ids``: data-row number -> id; ``id_column``: the column
    they are read from, data.kept_rows.ROW_NAMES_COLUMN for the file's row names: :func:`id_filter_column`), each with
    its rows, the first :data:`REPEATED_IDS_SHOWN`; () when every id names one row.  One rule for every command that
    takes an id column (data.row_ids.ids_of_several_rows): a caution, never a refusal, since the rows are analysed
    and scored alike whatever their ids, and data in long form hold a person's id once per wave by design (merged by
    the id and the wave); a scores file is written all the same, its lines in the order of the data's rows.  Rows that
    copy an earlier row in every column repeat its id too: named here as well, for a merge by id fails on them alike
    (new-user trial s20: the caution on copies showed the ids without saying that they repeat).  With a ``group``
    column, ids whose rows lie in more than one group are said to be the same people in several groups, which the
    multi-group fit and its tests take for independent samples (new-user trial s23: two waves of one staff stacked
    and compared as groups), with the model of both occasions side by side as the way to test invariance over time.
    Where a column other than the id and the ``items`` tells each id's later rows from every other row (a survey
    platform's submission time), the advice writes the row filter that keeps each id's first row, for a person who
    submitted twice (new-user trial s24: only 'correct the ids in a copy' was advised).  ``fitted``: the rows are
    analysed (every command but the scoring of other data with an earlier fit), so that the caution says what the
    analysis does with one person's rows in one group too (taken as independent cases, unless each id's rows lie in
    one cluster of the ``design``), with the ways to allow for them (pipeline.same_people); the groups' sentence,
    likewise, says that the design's sandwich allows for ids whose rows lie in one cluster the groups share
    (new-user trial s25: two waves of one staff under team clusters were said to be taken for independent samples).
    ``by_name``: ``id_column`` was not given but named as an id (data.column_roles.id_named_column), which the
    caution says, leaving out the merge by id that no id given implies; nothing then when the design allows for
    the rows and no groups hold them.  ``by_values`` (with ``by_name``): the column was taken for the id not by its
    name but by its values, one per row in each group and shared across the groups (data.column_roles.id_across_groups)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.pipeline.same_people import (allow_for_them, groups_taken_as_independent, ids_outside_one_cluster,
                                               occasion_filter, taken_as_independent)
    from cfa_tool.data.kept_rows import rows_listed
    from cfa_tool.data.row_ids import ids_of_several_rows

    found = ids_of_several_rows(ids)
    if not found:
        return ()
    frame = loaded.read_frame if loaded.read_frame is not None else loaded.frame  # the rows the ids were read for
    found = _without_copies(found, frame)
    if not found:
        return ()
    naming, lines = row_naming(frame), text_lines(frame)
    twice, found = _same_answers_again(found, frame, items)
    first = _submitted_twice_problem(twice, frame, id_column, items, naming, lines, by_name and not by_values)
    if not found:
        return first
    by_column = id_column is not None and (id_column != ROW_NAMES_COLUMN or loaded.row_names is None)
    holder = (f"The column '{printable(id_column)}', an id by its values (none twice in one group)," if by_values else
              f"The column '{printable(id_column)}', an id by its name," if by_name else
              f"The id column '{printable(id_column)}'" if by_column else f"The row names of {loaded.source}")
    few = names_shown(len(found), REPEATED_IDS_SHOWN)
    shown = joined([Note((RowId(f"'{clipped(value, 40)}' in "),)) + rows_listed(rows, 4, naming=naming, lines=lines)
                    for value, rows in found[:few]], "; ")
    more = more_words(len(found) - few, "; and ", "id")
    rows = sum(len(r) for _, r in found)
    what, gives = ("ids", "gives") if by_column else ("names", "give")
    across = _ids_across_groups(found, frame, group)
    cluster = design.cluster if design is not None else None
    outside = ids_outside_one_cluster(found, frame, cluster) if fitted else None
    if by_name and not across and outside == 0:  # the design allows for them, and no merge by id was asked for
        return ()
    several = len(found) > 1
    if across:
        spread = (f" {'It' if len(found) == 1 else f'{count_text(across)} of these {what}'} name{'s' if across == 1 else ''} "
                  f"rows in more than one group of '{printable(group)}': the same people in several groups?"
                  + groups_taken_as_independent(across, several, outside, cluster))
        # the ladder over occasions of one group sets each person's times side by side (workflows.occasions)
        over_time = (Option.OCCASION_COLUMN.given(group)
                     + (f" {Option.ID_COLUMN.given(id_column)}" if by_column or by_name else ""))
        advice = Note(("for the same people at several times, test invariance over time in one group, with one model "
                       "of both times side by side (each item at each time its own indicator, its residuals "
                       "correlated across the times)", Command(f" (the invariance command with {over_time})"),
                       (", which compares each person with themselves" if outside == 0 else "")
                       + "; if the groups hold different people, correct the ids in a copy of the data file."))
    else:
        spread = taken_as_independent(outside, cluster, several) if fitted else ""
        skip = {id_column, group, *(name for _, name in (design.names if design else ()))} | set(items)
        allow = (allow_for_them(id_column, occasion_filter(found, frame, skip), outside, takes_design)
                 if fitted and outside != 0 else None)
        advice = (allow + "." if by_name else
                  Note(("correct the ids in a copy of the data file (a typing error?), or name the rows by a "
                        "column whose values differ in every row", Command(f" ({Option.ID_COLUMN.given('COLUMN')})"),
                        "; if the rows are one person's at several times, merge by the id and the time together "
                        "(a scores file carries beside the id the columns its run's row filters, groups, clusters "
                        "and strata read, named as in the data file), or set a scores file beside the data line by "
                        "line: its lines follow the data's rows in order")
                       + (_first_rows_only(found, frame, id_column, items) or ("",)))
                  + (("; and in the analysis, " + allow) if allow is not None else "") + ".")
    merge = ("" if by_name else
             f" These {what} do not stand for one row each, so a file merged by them (a scores file, say) cannot be "
             f"matched to the rows one to one: a merge that expects one row per {what[:-1]} refuses, and one that "
             f"allows several gives a row another row's values.")
    return first + (Problem(ProblemKind.REPEATED_IDS, (), float(len(found)),
                    Note((f"{holder} {gives} one {what[:-1]} to {count_text(rows)} rows: " if len(found) == 1 else
                          f"{holder} {gives} {count_text(len(found))} {what} each to more than one row "
                          f"({count_text(rows)} rows in all): ",))
                    + shown + f"{more}." + merge + spread,
                    advice),)


def named_id_problems(loaded: LoadedData, id_column: str | None, group: str | None, design: DesignColumns | None,
                      items: tuple[str, ...], takes_design: bool = True) -> tuple:
    """The caution on repeated ids (:func:`repeated_id_problems`) by the column the tool takes for the rows' id when
    no id column was given (``id_column`` None or the file's row names): by the one rule of names explore leaves out
    as ids (data.column_roles.id_named_column), over the rows analysed (new-user trial s25: 4,303 rows of 2,400
    employees in long form were fitted as independent without a word, while explore knew 'employee_id' for an id)."""
    from cfa_tool.data.column_roles import id_across_groups, id_named_column
    from cfa_tool.data.row_ids import id_text

    frame = loaded.frame
    if id_column is not None and id_column in frame.columns:  # an id column given: its own caution
        return ()
    named = id_named_column(frame, {group, *items})
    by_values = False
    if named is None and group is not None:  # whatever its name, a column of the people's ids shared by the groups
        named = id_across_groups(frame, group, {*items, *(n for _, n in (design.names if design else ()))})
        by_values = named is not None
    if named is None:  # the caution on units of many respondents, if any, is data_problems'
        return ()
    ids = ids_by_row_number(frame[named].map(id_text), frame)
    return repeated_id_problems(loaded, ids, named, group, items, design, fitted=True, by_name=True,
                                takes_design=takes_design, by_values=by_values)


def _unit_rows_problems(frame: pd.DataFrame, skip, design: DesignColumns | None, takes_design: bool,
                        halves: bool = False) -> tuple:
    """The caution on a column named as the id of teams, schools or classes, or for them alone ('Team', 'TeamID':
    data.column_roles.unit_id_column; new-user trial s27: only 'team_id' was read so), which
    is not the rows' id, when the design has no clusters: the rows of one unit are taken for independent cases, with
    the units as the design's clusters for the remedy (where the command takes them: a fit of the model in the reports
    of cutoffs and align, options.TAKEN_BY), or, with ``halves`` (replicate's random halves of one file), as the
    clusters the halves are drawn by."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.data.column_roles import IDS, column_role, unit_id_column, unit_plural

    found = unit_id_column(frame, skip)
    if found is None or (design is not None and design.cluster is not None):
        return ()
    name, word = found
    try:
        units = int(frame[name].nunique())
    except TypeError:  # cells pandas cannot hash (a list in a cell): counted as their text
        units = int(frame[name].dropna().astype(str).nunique())
    rows = int(frame[name].notna().sum())
    plural = unit_plural(word)
    named = f"an id of {plural}" if column_role(name) == IDS else f"a column of {plural}"  # 'team_id' or 'Team'
    explanation = (f"The column '{printable(name)}', {named} by its name, gives {counted(units, word, plural)} "
                   f"to {count_text(rows)} rows ({rounded_number(rows / units)} rows each on average): the analysis "
                   f"takes the rows of one {word} for independent cases, so if its members answer alike the standard "
                   f"errors are too small and the tests reject too readily.")
    cluster = Option.CLUSTER.given(name)
    advice = (Note((f"take the {plural} for the clusters of the sampling design",
                    Command(f" ({cluster})", takes=taken_by(Option.CLUSTER),  # cutoffs and align take none
                            elsewhere=f" (a fit of the model with {cluster})"),
                    f" so that the standard errors and tests allow for the rows of one {word}.")) if takes_design else
              Note((f"draw the halves cluster by cluster, the {plural} for the clusters", Command(f" ({cluster})"),
                    f", so that the rows of one {word} are all in one half; within each half the fits still take the "
                    f"rows as independent, so read the standard errors and tests as those of independent rows, which "
                    f"the members of one {word} may not be.")) if halves else
              Note((f"read the standard errors and tests as those of independent rows, which the members of one "
                    f"{word} may not be.",)))
    return (Problem(ProblemKind.UNIT_ROWS_AS_INDEPENDENT, (), float(units), explanation, advice),)


#: the most values a row filter written for the user lists (beyond it the advice names no filter)
FILTER_VALUES_LISTED = 60


def _first_rows_only(found: tuple, frame: pd.DataFrame, id_column: str | None, items: tuple[str, ...]) -> tuple:
    """The advice's parts for a person who submitted twice: the row filter that keeps each repeated id's first row
    (``found``: (id, its rows' numbers, file order)) by a column, not the id's nor an item, whose values on the later
    rows are held by no other row ('submitted not in "2026-03-01 11:30", ...'), the first such column of the file;
    () when none does or the filter would list more than :data:`FILTER_VALUES_LISTED` values."""
    written = _later_rows_filter(found, frame, id_column, items)
    if written is None:
        return ()
    return ("; if some people submitted twice, keep each one's first row with the row filter on the column that "
            "tells the later rows apart", Command(f" ({Option.KEEP.given(written)})"))


def _later_rows_filter(found: tuple, frame: pd.DataFrame, id_column: str | None, items) -> str | None:
    """The text of the row filter of :func:`_first_rows_only` (None when none can be written)."""
    later = [r for _, rows in found for r in rows[1:]]
    if not later or len(later) > FILTER_VALUES_LISTED:
        return None
    numbers = row_numbers(frame)
    at_later = np.isin(numbers, later)
    for column in frame.columns:
        if column == id_column or column in items or frame[column].dtype.kind not in "OUiuf":
            continue
        values = frame[column]
        chosen = values[at_later]
        if chosen.isna().any():
            continue
        distinct = list(dict.fromkeys(chosen.tolist()))
        if not np.array_equal(values.isin(distinct).to_numpy(), at_later):
            continue
        written = filter_text(str(column), "not in", distinct)  # the one writer of a filter's text
        if written is not None:
            return written
    return None


def _ids_across_groups(found: tuple, frame: pd.DataFrame, group: str | None) -> int:
    """How many of the repeated ids ``found`` (id, its rows' numbers) have rows in more than one group of ``group``
    (0 without a group column)."""
    if group is None or group not in frame.columns:
        return 0
    label = dict(zip(row_numbers(frame).tolist(), frame[group].tolist()))
    return sum(len({label[r] for r in rows if r in label and label[r] == label[r]}) > 1 for _, rows in found)


def _same_answers_again(found: tuple, frame: pd.DataFrame, items) -> tuple[tuple, tuple]:
    """``found`` (id, its rows' numbers) split in two: (id, an earlier row, the later rows that give the same answers
    to every item in ``items`` as it, empty cells alike) for each id that has such rows (a respondent who submitted
    twice), and the ids left to several rows without those later rows."""
    items = [x for x in items if x in frame.columns]
    if not items:
        return (), found
    placed = _rows_of_each_id(found, frame)
    if placed is None:
        return (), found
    answers = frame[items]
    repeats = _repeats_within(answers, placed)
    twice, rest = [], []
    for (value, rows), (at, numbers) in zip(found, placed.each):
        if len(at) < 2:
            rest.append((value, rows))
            continue
        again = repeats[at] if repeats is not None else _repeats_of(answers.iloc[at])
        later = tuple(int(r) for r in numbers[again])
        if later:
            original = int(numbers[~again][0])
            twice.append((value, original, later))
        left = tuple(r for r in rows if r not in later)
        if len(left) > 1:
            rest.append((value, left))
    return tuple(twice), tuple(rest)


@dataclass(frozen=True)
class _PlacedIds:
    """The rows of each repeated id (:func:`ids_of_several_rows`) placed in the frame they were read for: every id's
    rows that the frame holds, one block after another (``positions``, ``owners``: the id's place in ``found``), and
    for each id its positions in the frame and its rows' numbers (``each``; in the order ``found`` lists them)."""

    positions: np.ndarray
    owners: np.ndarray
    each: list


def _rows_of_each_id(found: tuple, frame: pd.DataFrame) -> _PlacedIds | None:
    """:class:`_PlacedIds` of ``found`` in ``frame``; None when the frame's row numbers repeat (rows cannot be told
    apart by number)."""
    numbers = pd.Index(row_numbers(frame))
    if not numbers.is_unique:
        return None
    listed = [r for _, rows in found for r in rows]
    where = numbers.get_indexer(listed) if listed else np.zeros(0, dtype=np.intp)
    listed = np.asarray(listed, dtype=object)
    each, positions, owners, start = [], [], [], 0
    for k, (_, rows) in enumerate(found):
        at = where[start:start + len(rows)]
        held = at >= 0
        each.append((at[held], listed[start:start + len(rows)][held]))
        positions.append(at[held])
        owners.append(np.full(int(held.sum()), k))
        start += len(rows)
    return _PlacedIds(np.concatenate(positions) if positions else np.zeros(0, dtype=np.intp),
                      np.concatenate(owners) if owners else np.zeros(0, dtype=np.intp), each)


def _repeats_of(block: pd.DataFrame) -> np.ndarray:
    """Which rows of ``block`` are identical in every column to an earlier row of it (cells pandas cannot hash
    compared as text)."""
    try:
        return block.duplicated(keep="first").to_numpy()
    except TypeError:
        return block.astype(str).duplicated(keep="first").to_numpy()


def _repeats_within(columns: pd.DataFrame, placed: _PlacedIds) -> np.ndarray | None:
    """For every row of the frame, whether it is identical in ``columns`` to an earlier row of the same repeated id
    (:class:`_PlacedIds`), by one comparison of every id's rows with the id beside them (a comparison per id took
    seconds at 600 ids); None when a cell cannot be hashed (each id's rows are then compared apart, as text)."""
    block = columns.iloc[placed.positions].set_axis(range(columns.shape[1]), axis=1)
    block[columns.shape[1]] = placed.owners
    try:
        again = block.duplicated(keep="first").to_numpy()
    except TypeError:
        return None
    out = np.zeros(len(columns), dtype=bool)
    out[placed.positions] = again
    return out


def _submitted_twice_problem(twice: tuple, frame: pd.DataFrame, id_column: str | None, items, naming, lines,
                             by_name: bool) -> tuple:
    """The caution on rows of one id that give the same answers to every item as an earlier row of it
    (:func:`_same_answers_again`: a respondent who submitted twice, counted as two people; new-user trial s27: only
    'a typing error?' was said), with the row filter that leaves out the later rows where a column tells them apart
    (:func:`_first_rows_only`); the rows stay in the analysis (defaults keep data)."""
    if not twice:
        return ()
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    from cfa_tool.data.kept_rows import rows_listed

    later = sum(len(rows) for _, _, rows in twice)
    few = names_shown(len(twice), REPEATED_IDS_SHOWN)
    shown = joined([rows_listed((o, *rows), 4, naming=naming, lines=lines) + Note((RowId(f" ('{clipped(value, 40)}')"),))
                    for value, o, rows in twice[:few]], "; ")
    more = more_words(len(twice) - few, "; and ", "id")
    holder = (f"the column '{printable(id_column)}', an id by its name" if by_name else
              f"the id column '{printable(id_column)}'" if id_column not in (None, ROW_NAMES_COLUMN) else "the row names")
    whose = "each such" if later > 1 else "the"
    explanation = (Note(("Submitted twice? In ",)) + shown
                   + f"{more}, {'the later row gives' if later == 1 else f'{count_text(later)} later rows give'} the "
                     f"same id ({holder}) and the same answers to every item as an earlier row. If so, {whose} "
                     f"respondent is counted as "
                     f"{'two people' if later == 1 else 'several people'}, so N is too large and the standard errors "
                     f"too small; the rows stay in the analysis.")
    written = _later_rows_filter(tuple((v, (o, *rows)) for v, o, rows in twice), frame, id_column, items)
    advice = Note(("if they are second submissions, leave the later rows out with the row filter on the column that "
                   "tells them apart", Command(f" ({Option.KEEP.given(written)})"), ", or delete them in a copy of "
                   "the data file.") if written is not None else
                  ("if they are second submissions, delete the later rows in a copy of the data file.",))
    return (Problem(ProblemKind.SUBMITTED_TWICE, (), float(later), explanation, advice),)


def _without_copies(found: tuple, frame: pd.DataFrame) -> tuple:
    """``found`` (id, its rows' numbers) without the rows identical in every column (a row-number column aside, as
    data.copied_rows compares them) to an earlier row of the same id: the caution on copies names them with their
    ids, and deleting the copies mends their ids too; the ids left to several rows after that."""
    from cfa_tool.data.copied_rows import numbering_column

    placed = _rows_of_each_id(found, frame)
    if placed is None:
        return found
    numbering = numbering_column(frame)
    compared = frame.drop(columns=[numbering]) if numbering is not None else frame
    repeats = _repeats_within(compared, placed)
    kept = []
    for (value, rows), (at, numbers) in zip(found, placed.each):
        copies: set = set()
        if len(at) > 1:
            repeat = repeats[at] if repeats is not None else _repeats_of(compared.iloc[at])
            copies = set(numbers[repeat].tolist())
        rest = tuple(r for r in rows if r not in copies)
        if len(rest) > 1:
            kept.append((value, rest))
    return tuple(kept)


SAME_ANSWER_ROWS_SHOWN = 10  # rows a caution about same-answer rows names before 'and N more'


def same_answer_problems(frame: pd.DataFrame, spec: Spec, ids: dict, scored_only: bool = False,
                         by_loadings: tuple[str, ...] = (), id_column: str | None = None) -> tuple:
    """A caution naming the rows of ``frame`` (the rows analysed) that gave one answer to every item, the items of
    the model's 'reversed' statement included (data.same_answers: careless responding, Johnson 2005; Curran 2016),
    by row number and id (``ids``: row number -> id); () when the model declares no reversed items or no
    row did.  The rows stay in the analysis (``scored_only``: rows scored with an earlier fit, which they did not
    enter: they are scored like every row).  ``by_loadings``: without a 'reversed' statement, the items the fit's
    loadings key as reversed (assessment.reliability.item_keys, which the fit's report names), judged so instead,
    each with the middle of its answers in ``frame`` as the answer its reversal leaves unchanged (new-user trial
    s18: the draft model explore writes declares no reversal, and its fit never named the careless rows the
    hand-written model's fit named first).  ``id_column``: the column whose values ``ids`` are (the id column, or
    data.kept_rows.ROW_NAMES_COLUMN for the file's row names), by which the advice writes the one row filter that
    leaves the rows out (data.filters.list_filter; new-user trial s19: a filter per row, 30 clauses in the methods
    paragraph)."""
    if not spec.reversed and not by_loadings:
        return ()
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.data.same_answers import same_answer_rows

    items = [x for x in spec.observed_names if x in frame.columns]
    if len(items) < 2:
        return ()
    values = frame[items].apply(pd.to_numeric, errors="coerce").to_numpy(dtype=float)
    if spec.reversed:
        declared = spec.reverse_keyed
        reversed_noun = ("reverse-worded item", "reverse-worded items")
    else:  # the ends of each such item's answers in the rows analysed: its scale as answered
        with np.errstate(all="ignore"):
            ends = {x: (float(np.nanmin(values[:, k])), float(np.nanmax(values[:, k])))
                    for k, x in enumerate(items) if x in by_loadings and not np.isnan(values[:, k]).all()}
        declared = ends
        reversed_noun = ("item loading against its factor (reversed in the keyed sums)",
                         "items loading against their factors (reversed in the keyed sums)")
    middles = np.array([sum(declared[x]) / 2 if x in declared else np.nan for x in items])
    found = same_answer_rows(values, row_numbers(frame), np.array([x in declared for x in items]), middles)
    if found is None:
        return ()
    # the items in the number their count takes (numbers.counted; hostile s25b case 10: 'the 1 reverse-worded items')
    reversed_words = reversed_noun[found.reversed_items != 1]
    reversed_count = counted(found.reversed_items, *reversed_noun)

    lines = text_lines(frame)

    def listed(which: list[int], skipped: bool = False) -> str:
        """The rows by row number or index label (and id); ``skipped``: say of a row that left reverse-worded items out how
        many of them it answered."""
        def one_row(k: int) -> Text:  # the id apart: a manuscript names rows by number alone (note_parts.RowId)
            r = found.rows[k]
            number = f"{r}{line_words(r, lines)}"  # a text file's row on a line of another number: both
            answered = (f"{found.reversed_answered[k]} of the {reversed_count} answered"
                        if skipped and found.reversed_answered[k] < found.reversed_items else "")
            if ids.get(r) is None:
                return f"{number} ({answered})" if answered else number
            if not answered:
                return Note((number, RowId(f" ({printable(ids[r])})")))
            return Note((f"{number} (", RowId(f"{printable(ids[r])}; "), f"{answered})"))
        shown = [one_row(k) for k in which[:names_shown(len(which), SAME_ANSWER_ROWS_SHOWN)]]
        return joined([f"{row_naming(frame).of(len(which))} ", joined(shown, ", "), more_words(len(which) - len(shown))],
                      "")

    def gave(which: list[int]) -> str:
        answers = sorted({found.answers[k] for k in which})
        return (f"the answer {user_number(answers[0])}" if len(answers) == 1 else
                "one answer each (" + ", ".join(f"{user_number(a)}" for a in answers) + ")")

    def rows_gave(which: list[int], what: str) -> str:
        one = len(which) == 1
        return f"{len(which)} {'row' if one else 'rows'} gave {what} to every item {'it' if one else 'they'} answered"

    against = [k for k, c in enumerate(found.contradicts) if c]
    middle = [k for k, c in enumerate(found.contradicts) if not c]
    parts = []
    if against:
        # what each row answered: a row that skipped a reverse-worded item is not said to have answered it
        every = all(found.reversed_answered[k] == found.reversed_items for k in against)
        included = f"the {reversed_count} included" if every else f"{reversed_words} included"
        parts.append(f"{rows_gave(against, gave(against))}, {included} (" + listed(against, skipped=True)
                     + "): agreeing alike with an item and its reversal suggests careless responding (a long string of "
                       "identical answers; Johnson 2005, Curran 2016).")
    if middle:
        one = len(middle) == 1
        parts.append(f"{rows_gave(middle, gave(middle))} (" + listed(middle)
                     + f"): the middle of the scale, which reversing leaves unchanged, so "
                       f"{'it agrees' if one else 'they agree'} with the {reversed_words}, but a long string of "
                       f"identical answers can still mean careless responding (Johnson 2005, Curran 2016).")
    n = len(found.rows)
    one = n == 1
    return (Problem(ProblemKind.SAME_ANSWER_ROWS, (), float(n),
                    joined(parts) + (f" {'It is' if one else 'They are'} scored like every row." if scored_only else
                                       f" {'It is' if one else 'They are'} kept in this analysis."),
                    f"check {'this row' if one else 'these rows'} in the data; if {'it was' if one else 'they were'} "
                    f"not answered with care, " + (f"leave {'its' if one else 'their'} scores out of what follows." if
                                                   scored_only else
                    Note((f"fit again without {'it' if one else 'them'} (", *_leaving_out_rows(found.rows, ids, id_column),
                          f"; or deleting {'it' if one else 'them'} from a copy of the file) and compare the "
                          f"results.")))),)


def _leaving_out_rows(rows, ids: dict, id_column: str | None) -> tuple:
    """The words of advice that name the one row filter leaving ``rows`` out: by their ids when ``id_column`` holds
    an id for each (data.filters.list_filter, the exact filter, as Command), else the filter's form with a list."""
    from cfa_tool.data.filters import list_filter

    named = [ids.get(int(r)) for r in rows]
    exact = list_filter(id_column, named) if id_column is not None and all(i is not None for i in named) else None
    their = "its id" if len(rows) == 1 else "their ids"
    if exact is not None:
        return (f"a row filter that lists {their}", Command(f": {Option.KEEP.given(exact)}"))
    return (f"a row filter on an id column that lists {their}",
            Command(f", {option_in_both('--keep', 'keep=[...]')}, such as 'ID_COLUMN not in ID1, ID2, ...'"))


def scale_ends_problems(frame: pd.DataFrame, spec: Spec) -> tuple:
    """A caution for each 'reversed ... on MIN to MAX' statement whose declared scale no answer reaches, at either
    end, among the rows analysed (``frame``) of the items it covers (its own and their factors' other items,
    data.matching.declared_scales; a partner with answers outside the scale is answered on another one and left
    out): a reversed answer x counts as MIN + MAX - x in the keyed sums, so a scale declared wider than the one
    answered shifts the keyed sums' means silently (their spread, correlations and omega do not change)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.data.matching import declared_scales

    by_statement: dict[int, tuple[object, list[str]]] = {}
    for name, (low, high, keying, named) in declared_scales(spec, frame).items():
        by_statement.setdefault(id(keying), (keying, []))[1].append(name)
    out = []
    for keying, names in by_statement.values():
        values = item_values(frame, [x for x in spec.observed_names if x in names])
        if values is None or not np.isfinite(values).any():
            continue
        answered = np.isfinite(values)
        inside = ~np.any(answered & ((values < keying.minimum) | (values > keying.maximum)), axis=0)
        own = np.array([x in {i.text for i in keying.items} for x in spec.observed_names if x in names])
        values, answered = values[:, inside | own], answered[:, inside | own]
        low, high = float(values[answered].min()), float(values[answered].max())
        if low <= keying.minimum and high >= keying.maximum:
            continue
        unreached = [f"{user_number(v)}" for v in (keying.minimum, keying.maximum)
                     if (v < low if v == keying.minimum else v > high)]
        reversed_items = ", ".join(i.text for i in keying.items)
        shift = round((keying.minimum + keying.maximum) - (low + high), 9)  # no float noise (6 - 5.9 = 0.0999...)
        effect = (f"if the answer scale is {user_number(low)} to {user_number(high)}, each reversed answer counts {rounded_number(abs(shift), 6)} too "
                  f"{'high' if shift > 0 else 'low'}, and each keyed sum's mean by as much for every reversed item in it "
                  f"(their spread, correlations and omega do not change)" if shift else
                  f"the keyed sums would be the same on {user_number(low)} to {user_number(high)}")
        out.append(Problem(
            ProblemKind.SCALE_ENDS_UNREACHED, (), float(len(unreached)),
            # the model file's statement apart (note_parts.Command): a manuscript's reader edits no model file
            Note(("The model", Command(f" (its 'reversed' statement on line {keying.location.line})"),
                  f" declares answers from {user_number(keying.minimum)} to {user_number(keying.maximum)} for {reversed_items}, but no answer "
                  f"of the items it covers reaches {word_list(unreached, 'or')}: they run from {user_number(low)} to {user_number(high)} in "
                  f"{len(values)} rows. A reversed answer x counts as {rounded_number(keying.minimum + keying.maximum, 6)} - x in the "
                  f"keyed sums; {effect}.")),
            Note(("declare the questionnaire's own lowest and highest answers",
                  Command(" in the 'reversed' statement"), f" (on {user_number(low)} to {user_number(high)} if that is the scale); if the "
                  f"scale really runs from {user_number(keying.minimum)} to {user_number(keying.maximum)}, the keyed sums are right as they "
                  f"are."))))
    return tuple(out)


#: an item answered by fewer than this share of the rows analysed is named in a caution first: its variance and
#: covariances rest on those few answers (a rule of thumb of this project, not a published cutoff)
FEW_ANSWERS_SHARE = 0.10


def few_answers_problems(names: tuple[str, ...], coverage: dict, n_obs: int | None, loaded: LoadedData | None = None,
                         group: str | None = None, listwise: bool = False) -> tuple:
    """Cautions naming the items whose variance rests on few rows: those answered by fewer than
    :data:`FEW_ANSWERS_SHARE` of the rows analysed (the result's missing-data coverage; an item answered by 5 of 480
    rows can drive the fit indices alone), with a ``group`` column judged in each group (:func:`_few_answers_in_groups`:
    a group estimates its own loading, intercept and variance of the item, so 3 answers of a group's 230 rows rest on
    those 3 however many other groups answer it), and, from the rows of ``loaded`` analysed (with a ``group``
    column, those with a label), those answered alike by all rows but a few (data.descriptives.nearly_constant_items:
    the few rows set the size and the sign of the item's loading, and so whether the keyed sums reverse it).
    ``names``: the items; ``coverage``: item -> share of the ``n_obs`` rows analysed answering it; ``listwise``:
    rows with gaps leave the analysis, so every item is answered by every row analysed."""
    constant = _nearly_constant_problems(names, loaded, group)
    if group is not None and loaded is not None and group in loaded.frame.columns:
        # under listwise deletion too: an item few rows answer leaves the others out (hostile s23b: an item of 3%
        # of the rows, which left 97% of each group out, was named with one group and not with groups)
        return _few_answers_in_groups(names, loaded, group) + constant
    few = {x: share for x, share in coverage.items() if share < FEW_ANSWERS_SHARE}
    together = () if listwise or loaded is None else _few_together_problems(names, loaded, None, tuple(few))
    if not few or not n_obs:
        return together + constant
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    n, rows = n_obs, "rows"
    if listwise and loaded is not None:  # the shares are of the rows read, of which listwise deletion kept n_obs
        # (hostile trial s23: '2 of 28 rows' for an item that each of the 28 rows kept answers, 28 of 480 read)
        n, rows = int(loaded.frame[[x for x in names if x in loaded.frame.columns]].notna().any(axis=1).sum()), "rows read"
    listed = cut_list(list(few.items()), 5, lambda f: f"'{printable(f[0])}' ({round(f[1] * n):,} of {n:,} {rows})")
    one = len(few) == 1
    return (Problem(ProblemKind.FEW_ANSWERS, (), min(few.values()),
                    f"Few rows answer {'the item' if one else 'the items'} {listed}: {'its' if one else 'their'} "
                    f"variance, covariances and loading rest on those answers alone, and can drive the fit indices.",
                    f"leave {'it' if one else 'them'} out of the model, or check why so few rows answer "
                    f"{'it' if one else 'them'} (a question put to a few respondents only, an import that lost answers)."),
            ) + together + constant


def _few_together_problems(names: tuple[str, ...], loaded: LoadedData, group: str | None,
                           few: tuple[str, ...] = ()) -> tuple:
    """The caution on pairs of items answered together by fewer than data.moments.FEW_TOGETHER_SHARE of the rows
    analysed (the rows of ``loaded`` with a model item answered; each group's apart, :func:`_pairs_answered_by_few`):
    their correlation (a polychoric one, or with full-information ML the covariance) rests on those rows alone,
    however many answer each item (hostile trial s16, case 06: 3 of 471 rows answered both clean and temperature,
    said only inside a note).  Pairs with an item of ``few`` (answered by few rows, said by its own caution) are
    left out.  One caution naming each pair, its rows answering both and, for the fewest, those rows."""
    names = tuple(names)
    frame = _labelled(loaded.frame, group)
    values = loaded.items.of(frame, names) if loaded.items is not None else None
    if values is None:
        values = item_values(frame, names)
    return _pairs_answered_by_few(names, frame, values, few)


def _pairs_answered_by_few(names: tuple[str, ...], frame: pd.DataFrame, values: np.ndarray | None,
                           few: tuple[str, ...] = (), label: str | None = None, rows_of: np.ndarray | None = None
                           ) -> tuple:
    """The caution of :func:`_few_together_problems` from the items' ``values`` (None: not plain numbers) of the
    rows analysed of ``frame``, or of those ``rows_of`` selects (a group's, whose values ``values`` then are): the
    frame's rows are taken out only when the caution names them."""
    from cfa_tool.data.kept_rows import rows_listed
    from cfa_tool.data.moments import FEW_TOGETHER_SHARE, pairs_answered_together

    if values is None or len(names) < 2:  # not plain numbers: the reading of the items names what is wrong
        return ()
    answered = ~np.isnan(values)
    rows = answered.any(axis=1)
    found = pairs_answered_together(answered[rows], names, FEW_TOGETHER_SHARE, few)
    if not found:
        return ()
    if rows_of is not None:
        frame = frame.loc[rows_of]
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    n = int(rows.sum())
    a, b, both = found[0]
    i, j = names.index(a), names.index(b)
    which = row_numbers(frame)[rows & answered[:, i] & answered[:, j]]
    first = f"'{printable(a)}' and '{printable(b)}' ({both} of {n} rows" + (
        f": {rows_listed(which, naming=row_naming(frame))})" if both else ")")
    others = cut_list(found[1:], 4, lambda f: f"'{printable(f[0])}' and '{printable(f[1])}' ({f[2]} of {n} rows)",
                      sep="; ", lead="; and ")
    one = len(found) == 1
    whose = "this group's rows" if label is not None else "the rows"
    return (Problem(
        ProblemKind.FEW_ANSWERED_TOGETHER, (), both / n,
        f"Few of {whose} answer both items of {'the pair' if one else 'the pairs'} {first}"
        f"{'; ' + others if others else ''}: {'its' if one else 'each'} correlation rests on those rows alone, "
        f"whatever each item's own answers, and can drive the fit indices (fewer than a tenth of the rows: a rule "
        f"of thumb of this project, not a published cutoff).",
        f"take one item of {'the pair' if one else 'each pair'} out of the model, or check why so few rows answer "
        f"both (questions put to different respondents, as in a split-ballot survey or a routing error).",
        group=label),)


def _few_answers_in_groups(names: tuple[str, ...], loaded: LoadedData, group: str) -> tuple:
    """The caution of :func:`few_answers_problems` judged in each group: per group (in the order of its labels), the
    items answered by fewer than :data:`FEW_ANSWERS_SHARE` of the group's rows analysed (its rows with a model item
    answered, as full-information ML analyses them), one caution per group naming the group, each item and its
    answers (hostile trial s16, case 12: 3 of south's 230 rows answered 'clean', and the pooled share, 52.7%, said
    nothing)."""
    from cfa_tool.data.groups import group_keys
    from cfa_tool.data.labels import ordered_labels

    names = tuple(names)
    frame = _labelled(loaded.frame, group)
    values = loaded.items.of(frame, names) if loaded.items is not None else None
    if values is None:
        values = item_values(frame, names)
    if values is None or not names:  # not plain numbers: the reading of the items names what is wrong
        return ()
    keys = group_keys(frame[group]).to_numpy(object)
    labels = ordered_labels({k for k in keys if not pd.isna(k)}, frame, group)  # missing: no group (group_keys)
    answered = ~np.isnan(values)
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    found, few_items = [], {}
    for label in labels:
        mine = answered[(keys == label) & answered.any(axis=1)]
        n = len(mine)
        if not n:
            continue
        counts = mine.sum(axis=0)
        few = [(names[j], int(c)) for j, c in enumerate(counts) if c < FEW_ANSWERS_SHARE * n]
        if not few:
            continue
        few_items[label] = tuple(x for x, _ in few)
        one = len(few) == 1
        listed = cut_list(few, 5, lambda f: f"'{printable(f[0])}' ({f[1]:,} of {n:,} rows)")
        found.append(Problem(  # the views name the group first ('Group south: '), and the JSON its 'group'
            ProblemKind.FEW_ANSWERS, (), min(c / n for _, c in few),
            f"Few of this group's rows answer {'the item' if one else 'the items'} {listed}: the group's "
            f"estimates of {'its' if one else 'their'} loading, intercept and variance rest "
            f"on those answers alone, whatever the other groups answered, and can drive the fit indices.",
            f"leave {'it' if one else 'them'} out of the model, or the group out with a row filter ({Option.KEEP}), or "
            f"check why so few of the group's rows answer {'it' if one else 'them'} (a question put to some groups "
            f"only, an import that lost answers).", group=label))
    for label in labels:  # then the pairs answered together by few of a group's rows, without the items said
        mine = keys == label
        found.extend(_pairs_answered_by_few(names, frame, values[mine], few_items.get(label, ()), label, mine))
    return tuple(found)


def _nearly_constant_problems(names: tuple[str, ...], loaded: LoadedData | None, group: str | None) -> tuple:
    """The caution of :func:`few_answers_problems` on items answered alike by all rows but a few."""
    from cfa_tool.data.descriptives import NEARLY_CONSTANT_WORDS, nearly_constant_items

    names = tuple(names)
    if loaded is None or not names:
        return ()
    frame = _labelled(loaded.frame, group)
    values = loaded.items.of(frame, names) if loaded.items is not None else None  # taken out once per fit
    if values is None:
        values = item_values(frame, names)
    if values is None:  # not plain numbers: the reading of the items names what is wrong
        return ()
    found = nearly_constant_items(values, names)
    if not found:
        return ()
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    one = len(found) == 1
    listed = cut_list(found, 5, lambda c: f"'{printable(c.name)}' is {user_number(c.common)} in all but {c.others} of "
                      f"the {c.answered} rows answering it", sep="; ", lead="; and ")
    return (Problem(ProblemKind.NEARLY_CONSTANT, (), float(min(c.others for c in found)),
                    f"Nearly constant {'item' if one else 'items'} ({NEARLY_CONSTANT_WORDS}): {listed}. "
                    f"{'Its' if one else 'Their'} variance, "
                    f"and the size and sign of {'its' if one else 'their'} loading, rest on those few rows alone, and "
                    f"so does whether the keyed sum scores reverse {'it' if one else 'them'}; analysed as ordered "
                    f"categories, a category of so few rows leaves the polychoric correlations undetermined.",
                    f"leave {'it' if one else 'them'} out of the model, or check the data ({'it' if one else 'they'} "
                    f"may have been recoded or imported wrongly, or the question asked of few respondents)."),)


def analysed_odd_values(loaded: LoadedData, spec: Spec, group: str | None) -> LoadedData:
    """``loaded`` with the values that look like no answers among the rows analysed: with groups, the rows with a
    group label (a totals row without one is left out, and named in a note); a totals row among them is refused
    (:func:`refuse_totals_rows`)."""
    if group is None or not isinstance(group, str) or group not in loaded.frame.columns or not loaded.odd_values:
        return refuse_totals_rows(loaded)
    analysed = _labelled(loaded.frame, group)
    if len(analysed) == len(loaded.frame):
        return refuse_totals_rows(loaded)
    return refuse_totals_rows(replace(loaded, odd_values=_screened_items(loaded, analysed, spec)))


def refuse_totals_rows(loaded: LoadedData) -> LoadedData:
    """``loaded``, unless a row it analyses holds the sums of the other rows' answers in every item column it
    answers (data.odd_values: a spreadsheet's totals row): that is bad input, refused with a one-line data error
    naming the file and the row and how to leave it out (exit 2; hostile trial s13: the fit stopped with exit 3,
    "the model cannot be estimated", naming the row only as a likely cause).  Called where the rows analysed are
    known, before any estimation: by :func:`analysed_odd_values` and on entering :func:`odd_values_named` (a means
    row, which moves the estimates little, stays a caution)."""
    from cfa_tool.data.odd_values import OddKind

    odd = next((o for o in loaded.odd_values if o.kind is OddKind.SUMS_ROW), None)
    if odd is None:
        return loaded
    raise DataError(odd.totals_refusal(loaded.source, loaded.frame))


@contextmanager
def odd_values_named(loaded: LoadedData):
    """An estimation that fails on data holding values that look like no answers says so first: they are the
    likelier cause than the iterations or the identification the failure's own advice names; a data error about a
    row that the reading found to look like a row of totals or means (a fractional answer of an ordinal item in it)
    says that first, with the way to leave the row out.  A totals row among the rows is refused on entering
    (:func:`refuse_totals_rows`)."""
    refuse_totals_rows(loaded)
    try:
        yield
    except RowDataError as exc:  # a data row the reading already found to look like no one's answers: said first
        from cfa_tool.data.odd_values import OddKind

        odd = next((o for o in loaded.odd_values if o.kind not in (OddKind.MISSING_CODE, OddKind.SET_APART)
                    and exc.row in o.rows), None)  # a row's finding, not a code's
        if odd is None:
            raise
        raise DataError(f"{odd.caution(loaded.source)} What to try first: {odd.advice()} "
                        f"Then: {exc}") from None
    except EstimationError as exc:
        if not loaded.odd_values:
            raise
        from cfa_tool.data.odd_values import OddKind

        # a row far beyond the others in several item columns (a spreadsheet's COUNT or totals row of other rows)
        # is bad input, the likelier cause of the failure: a data error (exit 2), that row named first
        row = next((o for o in loaded.odd_values if o.kind is OddKind.FAR_BEYOND and len(o.columns) > 1), None)
        first = replace(row or loaded.odd_values[0], given=tuple(loaded.missing_codes) + tuple(loaded.missing_words))
        more = f" ({more_words(n, 'and ', 'such finding')})" if (n := len(loaded.odd_values) - 1) else ""
        raise (DataError if row is not None else EstimationError)(
            f"{first.caution(loaded.source)}{more} What to try first: {first.advice()} Then: {exc}") from None


def named_cases(result: FitResult, ids: dict) -> FitResult:
    """The result with each case diagnostic named by its row's id (unchanged without ids)."""
    if not ids:
        return result
    groups = tuple(replace(g, unusual_cases=g.unusual_cases.named(ids) if g.unusual_cases else g.unusual_cases,
                           influential_cases=g.influential_cases.named(ids) if g.influential_cases else
                           g.influential_cases) for g in result.groups)
    return replace(result, groups=groups)


def with_rows_read(result: FitResult, loaded: LoadedData) -> FitResult:
    """``result`` (a fit of rows with groups or a sampling design) counting as read the rows without a group label
    and the rows of weight 0 (each said in a note), so that the methods paragraph gives the rows left out of all
    the rows read, as ``fit``, ``compare`` and ``invariance`` read them."""
    check_rows_counted(result.data.rows_read, len(loaded.frame), f"{loaded.source}: the rows of the groups")
    if result.data.rows_read == len(loaded.frame):
        return result
    extra = len(loaded.frame) - result.data.rows_read
    group = result.group_column
    # the rows without a group label, and the rest: those the design left out (weight 0, or no answer and no weight,
    # cluster or stratum), which the methods paragraph must not call rows without a group (re-check s18)
    without = min(extra, int((~has_group(loaded.frame, group)).sum())) if group is not None else 0
    return replace(result, data=replace(result.data, rows_read=len(loaded.frame),
                                        rows_dropped=result.data.rows_dropped + extra, without_group=without,
                                        by_design=extra - without))


def without_group_problem(without: int, read: int, group: str | None) -> Problem | None:
    """The caution on rows left out for having no value in the group column, first in every view as listwise
    deletion's is (the same share, :data:`~cfa_tool.pipeline.continuous.LISTWISE_WARNING_SHARE`: hostile tester
    s15 had 192 of 480 rows left out in a note); None for fewer."""
    if group is None or without <= LISTWISE_WARNING_SHARE * read:
        return None
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    return Problem(ProblemKind.ROWS_LEFT_OUT, (), float(without),
                   f"{count_text(without)} of {count_text(read)} rows ({100 * without / read:.0f}%) "
                   f"{'has' if without == 1 else 'have'} no value in the group column '{group}' and "
                   f"{'was' if without == 1 else 'were'} left out, and the "
                   f"{'row' if without == 1 else 'rows'} left out may differ from those kept.",
                   "find out why they have no group: give rows that belong to a group its label, and say in the "
                   "report why the others were left out.")


def _fit_rows(spec, loaded, notes, group, reference_group, fit_options, ordinal, ordinal_estimator,
             design: DesignColumns | None = None, ids: pd.Series | None = None) -> FitResult:
    """The fit of rows of raw data (after reading, filters and model checks), its data summary naming the
    row filters and the rows the file held before them (``ids``: each row's id, data.row_ids, which name the rows
    left out).  fit itself takes :func:`_fit_read_rows`: :func:`with_missing_reading` names the filters with the
    rest of the reading."""
    return with_row_filters(_fit_read_rows(spec, loaded, notes, group, reference_group, fit_options, ordinal,
                                           ordinal_estimator, design, ids), loaded)


def _fit_read_rows(spec, loaded, notes, group, reference_group, fit_options, ordinal, ordinal_estimator,
                   design: DesignColumns | None = None, ids: pd.Series | None = None) -> FitResult:
    """:func:`_fit_rows` without the row filters in its data summary."""
    result = _fit_kept_rows(spec, loaded, notes, group, reference_group, fit_options, ordinal, ordinal_estimator, design,
                            ids)
    if group is not None or design is not None:
        result = with_rows_read(result, loaded)
    return result


def with_row_filters(result, loaded: LoadedData):
    """``result`` (a fit of rows) with the row filters that chose its rows and the rows the file held before them
    in its data summary, which the reports and the methods paragraph name, and how a text file was read
    (``loaded.reading``), whose convention the CSV files the run writes follow (data.csv_convention): every fit of
    rows, a workflow's too (bootstrap, cutoffs), carries it (unchanged without filters and reading)."""
    result = with_reading(result, loaded)
    if not loaded.row_filters:
        return result
    return replace(result, data=replace(result.data, row_filters=loaded.row_filters,
                                        rows_in_file=len(loaded.read_frame)))


def with_reading(result, loaded: LoadedData):
    """``result`` (a fit of rows) with how its text file was read (``loaded.reading``: data.readers.TextReading) in its
    data summary: the notes and the JSON say it, and the CSV files of the run follow its convention
    (data.csv_convention); unchanged for other files."""
    data = getattr(result, "data", None)
    if loaded.reading is None or not hasattr(data, "reading") or data.reading is not None:
        return result
    return replace(result, data=replace(data, reading=loaded.reading))


def refuse_groups_filtered_out(spec: Spec, loaded: LoadedData, group: str | None,
                               reference_group: str | None = None) -> None:
    """An error naming the row filter when a group that the model's 'in group' statements or the reference group name
    has rows in the file but none among the rows the filters kept (hostile s21: 'there is no group 'east side' in
    the data' sent the user looking for a typo in a group the filter had left out on purpose)."""
    if group is None or not loaded.row_filters or loaded.read_frame is None or group not in loaded.read_frame.columns:
        return
    from cfa_tool.data.filters import kept_by_words
    from cfa_tool.data.groups import group_keys
    from cfa_tool.language.checks import all_refs
    from cfa_tool.language.names import written_group

    named = [r.group for r in all_refs(spec) if r.group is not None]
    if reference_group is not None:
        named.append(label_text(reference_group) if isinstance(reference_group, str) else reference_group)
    kept = set(group_keys(loaded.frame[group]).dropna())
    before = set(group_keys(loaded.read_frame[group]).dropna())
    for name in dict.fromkeys(named):
        if name not in kept and name in before:
            reference = name == reference_group
            what = "the reference group" if reference else "a group the model file names"
            instead = "choose another reference group" if reference else "remove the statements naming that group"
            label = printable(written_group(str(name), [str(x) for x in before]))  # the one rule of group labels
            raise OptionError(f"{loaded.source}: group {label} ({what}) has rows in the file but none among those "
                              f"{kept_by_words(loaded.row_filters)} kept; change the filter, or {instead}")


def _fit_kept_rows(spec, loaded, notes, group, reference_group, fit_options, ordinal, ordinal_estimator,
                   design: DesignColumns | None = None, ids: pd.Series | None = None) -> FitResult:
    refuse_groups_filtered_out(spec, loaded, group, reference_group)
    frame, source = loaded.frame, loaded.source
    spec, ordinal_items = ordinal_model(spec, ordinal)
    ordinal_estimator = ordinal_estimator_option(ordinal_estimator, ordinal_items)
    if design is not None:
        frame, design_notes = check_design(frame, design, spec.observed_names, group, source, loaded.weights)
        notes = list(notes) + design_notes
    if ordinal_items and fit_options.missing_helpers:
        raise OptionError(f"missing-data helpers ({Option.MISSING_HELPERS}) enter the full-information likelihood of "
                          f"continuous items; ordinal items are fitted by least squares on polychoric correlations, "
                          f"where they cannot apply; leave them out")
    if ordinal_items:
        with blas_threads_for(len(spec.observed_names)):
            result = _fit_ordinal(spec, frame, source, ordinal_items, group, reference_group, fit_options, ordinal_estimator,
                                  design)
        labels = tuple(g.label for g in result.groups) if group is not None else None
        summary = missing_summary(_answering(_labelled(frame, group), spec.observed_names),  # as for continuous items
                                  spec.observed_names, frequency_weights=counted_by(design))
        gaps = summary["n_patterns"] > 1 or not all(summary["coverage"].values())
        return _described(replace(converged(result), warnings=tuple(notes) + result.warnings,
                                  missing_data=summary if gaps else None, labels=_file_labels(loaded, spec)),
                          spec, labels, ordinal_items)
    values = loaded.items.of(frame, spec.observed_names) if loaded.items is not None else None
    if design is not None:  # a chosen information is refused for the design before the missing rows' reason
        design_test(fit_options, design)
    if fit_options.missing_helpers:
        helpers_can_apply(fit_options, frame, spec.observed_names, group, values)
    fit_options, missing_notes = choose_missing_handling(fit_options, frame, spec.observed_names, group, values, design)
    notes = missing_notes + notes
    extremes = loaded.items.extremes if values is not None else None  # made once, by the screening of odd values
    few, few_note = few_categories(frame, spec.observed_names, values, extremes)
    notes += few_note
    if design is not None:
        fit_options = design_test(fit_options, design)
    refuse_large_robust_route(spec, fit_options, design)
    # EM on thousands of rows: one thread beats several on small p; the moments and the fit in one context (the
    # fit's own then finds one thread already and sets nothing)
    with blas_threads_for(len(spec.observed_names)):
        groups, group_notes = moments_for(spec, frame, source, group, reference_group, fit_options.missing, design,
                                          values, extremes)
        notes += group_notes
        if fit_options.missing_helpers:
            groups = [(label, with_helpers(m, frame, fit_options.missing_helpers, source, design))
                      for label, m in groups]
        if ids is not None:  # the rows that answer nothing named by their ids too (a footer: its text)
            by_row = ids_by_row_number(ids, ids)  # row numbers by the one rule (data.moments.row_numbers)
            groups = [(label, replace(m, unanswered_ids=tuple(by_row.get(int(r)) for r in m.unanswered_rows)))
                      if m.unanswered_rows is not None and len(m.unanswered_rows) else (label, m) for label, m in groups]
        result = converged(fit_moments(spec, groups, fit_options, group_column=group))
    if design is not None:
        result = with_design(result, design_summary(frame, design, [m for _, m in groups], [g for g, _ in groups]),
                             [m for _, m in groups])
    analysed = _labelled(frame, group)
    every_row_complete = (sum(m.n_obs for _, m in groups) == len(analysed)
                          and not any(m.rows is not None and np.isnan(m.rows).any() for _, m in groups))
    summary = None if every_row_complete else missing_summary(_answering(analysed, spec.observed_names),
                                                              spec.observed_names, frequency_weights=counted_by(design))
    group_labels = tuple(label for label, _ in groups) if group is not None else None
    return replace(result, warnings=tuple(notes) + result.warnings,  # with _described's description: one replace
                   missing_data=summary if summary is not None and (summary["n_patterns"] > 1
                                                                    or not all(summary["coverage"].values())) else None,
                   labels=_file_labels(loaded, spec), data=replace(_with_coding(result.data, spec), few_categories=few),
                   description=_description(spec, group_labels, None if group_labels is None else ()))


def _file_labels(loaded, spec: Spec) -> dict | None:
    """The data file's variable and value labels of the model's items (SPSS, Stata), for the JSON and the HTML
    report of continuous and ordinal fits alike; None when the file has none."""
    labels = {
        "variables": {k: v for k, v in loaded.variable_labels.items() if k in spec.observed_names},
        "values": {k: v for k, v in loaded.value_labels.items() if k in spec.observed_names},
    }
    return labels if labels["variables"] or labels["values"] else None


def counted_by(design: DesignColumns | None) -> str | None:
    """The column of frequency weights, by which rows are counted (in N and in the missing-data table), if any."""
    if design is None or design.weights is None or design.kind is not WeightKind.FREQUENCY:
        return None
    return design.weights


def _answering(frame: pd.DataFrame, names: tuple[str, ...]) -> pd.DataFrame:
    """The rows that answered some model variable: those every route analyses (a row answering none is left out, with
    its own note), over which the coverage of each item is counted (hostile s21: 100 rows answering nothing took the
    least coverage from 99.6% to 82.4%)."""
    answering = frame[list(names)].notna().any(axis=1)
    return frame if answering.all() else frame.loc[answering]


def _labelled(frame: pd.DataFrame, group: str | None) -> pd.DataFrame:
    """The rows analysed: with groups, those with a group label (the others are left out, with a note)."""
    if group is None or group not in frame.columns:
        return frame
    labelled = has_group(frame, group)
    return frame if labelled.all() else frame.loc[labelled]


def refuse_large_robust_route(spec: Spec, fit_options, design) -> None:
    """The one check, before the moments (the EM) and the fit, of a full-information robust route (a robust test, or
    the design-based one, with rows with gaps) whose matrices of the moments by themselves would exceed the tool's
    one limit of a matrix (:func:`cfa_tool.inference.robust_missing.refuse_moment_matrices`, exit 3): called by every
    route that fits with those options (fit, compare for each model, invariance, bootstrap), with ``fit_options`` as
    the fit will take them (after :func:`design_test` and :func:`choose_missing_handling`)."""
    if fit_options.missing is MissingData.FULL_INFORMATION and fit_options.test in (FitTest.YUAN_BENTLER, FitTest.ROBUST):
        from cfa_tool.inference.robust_missing import refuse_moment_matrices

        refuse_moment_matrices(len(spec.observed_names), design is not None)


def design_test(fit_options, design: DesignColumns):
    """Under sampling weights or clusters the standard errors are sandwich ones and the test a scaled one
    (Muthén & Satorra 1995; Asparouhov 2005): the design-based scaled test is the test when none was chosen, and a
    test or an information chosen is refused, never replaced (the normal-theory test takes the rows as independent and
    equally weighted, which they are not)."""
    if not design.robust:
        return fit_options
    if fit_options.information is not None:
        raise OptionError("with sampling weights, clusters or strata the standard errors are sandwich ones, so the "
                          f"information they come from ({Option.STANDARD_ERRORS_FROM}) cannot be chosen; remove that "
                          f"option")
    if fit_options.test_chosen and fit_options.test is FitTest.NORMAL:  # it was replaced by the scaled test (s17)
        raise OptionError(f"with sampling weights, clusters or strata the normal-theory test is not valid (it takes the "
                          f"rows as independent and equally weighted): the test is the design-based scaled one, with "
                          f"sandwich standard errors; leave out {Option.ROBUST.given(FitTest.NORMAL.value)}, or leave "
                          f"out the design for a fit of unweighted, independent rows")
    if fit_options.test is not FitTest.NORMAL:  # hostile trial s16: accepted, where '--ordinal all --robust' is refused
        chosen = Option.ROBUST if fit_options.test is FitTest.ROBUST else Option.ROBUST.given(fit_options.test.value)
        raise OptionError(f"with sampling weights, clusters or strata the standard errors are already sandwich ones and "
                          f"the test a design-based scaled one, so {chosen} cannot apply; remove it")
    return replace(fit_options, test=FitTest.ROBUST)  # resolved for the rows as --robust is (FitOptions, assess)


def design_problems(design, free: int, thresholds: int = 0, dominant=None, robust=None, ordinal: bool = False) -> tuple:
    """The cautions of a sampling ``design`` (data.sample_design.SampleDesign) on a model of ``free`` parameters
    (and ``thresholds`` estimated in a first step, of an ordinal fit in one group), first in every view, the same
    for fit, check, compare and invariance: too few clusters for cluster-robust standard errors, one cluster that
    holds most of the design effect of the statistics (``dominant``, a data.sample_design.DominantCluster; the
    fit's scaled test ``robust`` then described by it), weights so uneven that Kish's effective sample size is
    below half the rows, and frequency weights so large that they look like expansion (sampling) weights
    (first).  Each advice names only a route the run's estimator accepts (``ordinal``: a least-squares fit of
    ordinal items, whose advice on few clusters differs; :func:`few_clusters_advice`)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    problems: tuple = ()
    dominated = dominant_cluster_problem(design, dominant, robust) if design.columns.cluster else None
    if dominated is not None:  # the standard errors and test describe one cluster, or the test is degenerate: first
        problems += (dominated,)
    caution = design.caution(free, thresholds)
    if caution:  # the standard errors and tests themselves are in doubt
        problems += (Problem(ProblemKind.FEW_CLUSTERS, (), float(design.judged_clusters), caution,
                             few_clusters_advice(ordinal or thresholds > 0)),)
    counts = design.frequency_caution()
    if counts:  # N itself is in doubt: first
        problems = (Problem(ProblemKind.FREQUENCY_WEIGHTS_LARGE, (), float(design.sum_of_weights), counts,
                            Note(("if they are expansion or other sampling weights, ",
                                  Command(f"leave out {Option.WEIGHT_KIND.given(WeightKind.FREQUENCY.value)}",
                                          "fit again with them read as sampling weights"),
                                  ": weights are read as sampling weights by default, rescaled to the rows, with "
                                  "sandwich standard errors; if every row really stands for that many identical "
                                  "respondents, nothing needs to change."))),) + problems
    across = design.shared_strata_caution()
    if across:
        problems += (Problem(ProblemKind.GROUPS_SHARE_STRATA, (), float(len(design.shared_strata)), across,
                             Note(("if rows of the groups share households or other clusters, ",)
                                  + shared_clusters_route().parts
                                  + ("; otherwise say in the report that the groups were treated as drawn apart "
                                     "within strata.",))),)
    uneven = design.weight_caution()
    if uneven:
        problems += (Problem(ProblemKind.SMALL_EFFECTIVE_SAMPLE, (), round(float(design.judged_effective_n), 1), uneven,
                             "check the weights (a few rows may carry most of them), trim extreme weights by the survey's "
                             "rules, or report the unweighted fit beside the weighted one."),)
    return problems


def shared_clusters_route() -> Note:
    """The route that takes clusters shared by groups (domains of one cluster sample) into account: giving them.
    Every estimator takes such groups since s21 (continuous items with complete rows or by full-information ML,
    ordinal items by least squares: inference.design.groups_meat joins the groups' rows' contributions), so the
    advice is the same for every run (new-user trials s18 and s20 found it sending ordinal runs to a refusal)."""
    return Note((Command(f"give them with {Option.CLUSTER}", "give those clusters too", takes=taken_by(Option.CLUSTER),
                         elsewhere=f"give them to a fit of the model with {Option.CLUSTER}"),
                 ": groups that share clusters are then analysed as domains of one sample, rows with gaps included"))


def extreme_scaling(robust) -> str:
    """Why a design-based scaled test is extreme, in a researcher's words (empty when it is not): a scale-shifted
    statistic whose effective degrees of freedom, (df - shift)^2 / df = tr(U Gamma)^2 / tr((U Gamma)^2) (the
    mean-and-variance adjusted df, Satorra & Bentler 1994), are below :data:`FEW_EFFECTIVE_DF` of its df, or a
    scaling factor tr(U Gamma) / df below :data:`LOW_SCALING` (rules of thumb of this tool, not laws)."""
    if robust is None or not robust.df:
        return ""
    if robust.scale is not None:
        if not (np.isfinite(robust.scale) and np.isfinite(robust.shift)):
            return ""
        effective = (robust.df - robust.shift) ** 2 / robust.df
        if effective >= FEW_EFFECTIVE_DF * robust.df:
            return ""
        return (f"The design-based scale-shifted test is degenerate: its scale is {rounded_number(robust.scale)} and its shift "
                f"{robust.shift:.1f} of {robust.df} degrees of freedom, so its statistic varies like a chi-square on "
                f"about {effective:.1f} degrees of freedom (the mean-and-variance adjusted df, Satorra & Bentler "
                f"1994; below {FEW_EFFECTIVE_DF:.0%} of the df is taken as degenerate, a rule of thumb of this tool, "
                f"not a law): it is nearly the shift whatever the model's misfit, and its p-value and the robust "
                f"RMSEA, CFI and TLI made from it say little.")
    c = robust.scaling_factor
    if not (np.isfinite(c) and 0 < c < LOW_SCALING):
        return ""
    return (f"The design-based scaling factor is {rounded_number(c)}: the scaled chi-square is {1 / c:.1f} times the unscaled "
            f"one, whereas clusters usually make the statistics vary more than rows taken as independent (a factor "
            f"above 1); below {user_number(LOW_SCALING)} is taken as extreme (a rule of thumb of this tool, not a law), and its "
            f"p-value and the robust RMSEA, CFI and TLI made from it say little.")


#: a scale-shifted test whose effective df are below this share of its df is degenerate (a rule of thumb of this tool)
FEW_EFFECTIVE_DF = 0.05
#: a design-based scaling factor below this is extreme (a rule of thumb of this tool: clusters inflate variances)
LOW_SCALING = 0.5


def dominant_cluster_problem(design, dominant, robust=None):
    """The caution on a design-based covariance that one cluster dominates (data.sample_design.DominantCluster.large)
    or a design-based test whose scaling is extreme (:func:`extreme_scaling`): why, and the cluster with the largest
    share of the design effect of the statistics, with that share; None when neither holds."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.language.names import written_name

    extreme = extreme_scaling(robust)  # under clusters every robust test is a design-based one
    large = dominant is not None and dominant.large
    if not extreme and not large:
        return None
    column = design.columns.cluster
    cluster = ""
    if dominant is not None:
        cluster = (f"{' ' if extreme else ''}Of the {dominant.clusters} clusters of '{column}', '{dominant.name}' "
                   f"holds {rounded_number(100 * dominant.share, 2)}% of the design effect of the statistics the fit rests on (each "
                   f"statistic's design-based variance over its variance with the rows taken as independent, summed; "
                   f"mean design effect {rounded_number(dominant.design_effect)}), where each would hold about "
                   f"{rounded_number(100 / dominant.clusters, 2)}% if they were alike")
        cluster += (f" (more than {DOMINANT_SHARE:.0%}, more than all the other clusters together, is taken as "
                    f"dominating, a rule of thumb of this tool, not a law): the cluster-robust standard errors and the "
                    f"design-based test describe mostly that one cluster's rows." if large else ".")
    singled = dominant is not None and dominant.share > DOMINANT_TIMES / dominant.clusters
    if singled:
        keep = f"{written_name(column)} != {dominant.name}"
        advice = Note(("look at that cluster's rows (the same answer throughout, a block of careless or wrongly "
                       "entered answers); fit again without it (", Command(f'{Option.KEEP} "{keep}"',
                                                                          "leaving that cluster out"),
                       ") and compare, and report both fits if its rows are genuine answers."))
    else:
        advice = Note(("judge the fit by the SRMR and the residual correlations, and compare with a fit without ",
                       Command(f"{Option.CLUSTER}", "the clusters", takes=taken_by(Option.CLUSTER), elsewhere="the clusters"),
                       "."))
    return Problem(ProblemKind.DESIGN_DOMINATED, (), round(dominant.share, 3) if dominant is not None else None,
                   extreme + cluster, advice)


def _dominant(moments, result: FitResult):
    """The cluster holding the largest share of the design effect of the fit's statistics, over its groups'
    ``moments`` (inference.design.dominant_cluster): ordinal moments carry theirs from their influence
    functions; rows of continuous items give theirs from the rows' contributions to the covariances, or with
    gaps from their scores in the saturated means and covariances (inference.robust_missing.moment_scores)."""
    from cfa_tool.inference.design import dominant_cluster, moment_contributions

    found = []
    for m in moments:
        if getattr(m, "dominant_cluster", None) is not None:
            found.append(m.dominant_cluster)
            continue
        rows, design = getattr(m, "rows", None), getattr(m, "design", None)
        if rows is None or design is None or design.clusters is None:
            continue
        if np.isnan(rows).any():  # the rows' scores in the saturated moments, as the Yuan-Bentler meat reads them
            from cfa_tool.data.patterns import pattern_data
            from cfa_tool.inference.robust_missing import moment_scores

            contributions = moment_scores(pattern_data(rows), np.asarray(m.means), np.asarray(m.covariance))
        else:
            contributions = moment_contributions(rows, design, False)
        found.append(dominant_cluster(contributions, design))
    found = [d for d in found if d is not None]
    return max(found, key=lambda d: d.share) if found else None


def with_design(result: FitResult, design, moments=()) -> FitResult:
    """The result stating the design it was fitted under (status line, JSON, methods paragraph, cautions);
    ``moments``: each group's moments the fit was made from, for the cautions that read the rows' statistics
    (one cluster dominating the design effect) and an ordinal fit's thresholds.  The thresholds of one group are
    carried by the design-based covariance whether a first step estimates them (fit) or the model does (compare's
    fits, whose count of free parameters leaves them out as fit's does: workflows.ordinal_compare), and counted so
    in every command (new-user trial s25: the ordinal compare dropped the few-clusters caution that fit gave); in
    several groups they are among the free parameters."""
    from cfa_tool.assessment.admissibility import free_parameters

    thresholds = (sum(len(t) for t in moments[0].thresholds) if result.method.ordinal
                  and len(moments) == 1 and hasattr(moments[0], "thresholds") else 0)
    problems = result.problems + design_problems(design, free_parameters(result), thresholds,
                                                 _dominant(moments, result) if design.columns.cluster else None,
                                                 result.robust, result.method.ordinal)  # one count for every command
    lone = design.lone_caution()  # conservative, not optimistic: a note, and the methods paragraph says it
    warnings = result.warnings + ((lone,) if lone and lone not in result.warnings else ())
    fit = result.fit
    if fit is not None and design.columns.weights is not None and design.columns.kind is WeightKind.SAMPLING:
        # a weighted log-likelihood is a pseudo-likelihood: information criteria built on it would mislead
        fit = replace(fit, log_likelihood=None, aic=None, bic=None, sabic=None)
    # the sandwich's middle is summed by cluster: the method says so, and the status line follows from it
    method = replace(result.method, clustered=design.columns.cluster is not None,
                     design_based=design.columns.robust and not result.method.ordinal)
    robust = (replace(result.robust, design=True) if result.robust is not None and method.design_based
              else result.robust)  # its scaled test is a design-based one, and named so in every view
    return replace(result, design=design, fit=fit, method=method, warnings=warnings, robust=robust,
                   estimator=f"{method.sentence(len(result.groups))}; {design.status()}", problems=problems)


def check_helper_columns(helpers: tuple[str, ...], frame: pd.DataFrame, source: str, spec: Spec, group: str | None,
                         id_column: str | None, design: DesignColumns | None) -> None:
    """Missing-data helpers (auxiliary variables) must be columns of the data other than the model's variables and
    the group, id and design columns, and hold numbers; a design that makes the standard errors robust ones is
    refused with them (:data:`~cfa_tool.pipeline.continuous.HELPERS_NOT_ROBUST`)."""
    columns = [str(c) for c in frame.columns]
    taken = {**{name: "the group column" for name in [group] if name is not None},
             **{name: "the id column" for name in [id_column] if isinstance(name, str)},
             **{name: f"the {what} column" for what, name in (design.names if design is not None else ())}}
    for name in helpers:
        if name not in columns:
            guess = close_names(name, columns)
            hint = renamed_hint(frame, name) or (did_you_mean(name, guess[0]) if guess else "")
            raise OptionError(f"the missing-data helper '{printable(name)}' ({Option.MISSING_HELPERS}) is not a column "
                              f"of {source}{hint}")
        if name in spec.observed_names:
            raise OptionError(f"'{printable(name)}' is a variable of the model and cannot also be a missing-data helper "
                              f"({Option.MISSING_HELPERS}: columns outside the model)")
        if name in taken:
            raise OptionError(f"'{printable(name)}' is {taken[name]} and cannot also be a missing-data helper "
                              f"({Option.MISSING_HELPERS})")
        helper_not_numbers(frame[frame.columns[columns.index(name)]], name, source, frame)
    if design is not None and design.robust:
        from cfa_tool.pipeline.continuous import HELPERS_NOT_ROBUST

        raise OptionError(f"missing-data helpers ({Option.MISSING_HELPERS}) cannot be used with sampling weights, "
                          f"clusters or strata, whose standard errors are robust ones: {HELPERS_NOT_ROBUST}. To fit "
                          f"with the design, leave out {Option.MISSING_HELPERS} (answers are then assumed missing at "
                          f"random given the items only); to use the helpers, leave out the design (the standard errors "
                          f"then take the rows as independent and equally weighted). Frequency weights "
                          f"({Option.WEIGHT_KIND.given('frequency')}) can be used with helpers.")


def helper_columns(spec: Spec, helpers) -> tuple[str, ...]:
    """The missing-data helpers that are not the model's items: read as the items are (--missing-codes and the
    words and labels that say no answer apply to them, data.readers), since a helper enters the full-information
    likelihood as an item does (Graham 2003) and a code such as -99 read as a value would move the estimates."""
    return tuple(h for h in (helpers or ()) if h not in spec.observed_names)


def with_helper_codes(loaded: LoadedData, helpers: tuple[str, ...]) -> LoadedData:
    """``loaded`` with the values of the missing-data ``helpers`` that look like missing-value codes (-99 among
    ages: data.odd_values, screened as the items are) among its cautions, after the items' own."""
    from cfa_tool.data.odd_values import OddKind

    found = tuple(replace(o, role="missing-data helper") for o in odd_values(loaded.frame, helpers,
                                                                             row_numbers(loaded.frame))
                  if o.kind is OddKind.MISSING_CODE)
    return replace(loaded, odd_values=loaded.odd_values + found) if found else loaded


def with_labelled_helpers(loaded: LoadedData, helpers: tuple[str, ...], notes: list[str]
                          ) -> tuple[LoadedData, list[str]]:
    """``loaded`` and ``notes`` with what a file's value labels on the missing-data ``helpers`` call for: the note
    naming the codes read and their labels (data.labels.helper_codes_notes), and a caution first for a helper its
    SPSS file measures as nominal (data.labels.unordered_helpers)."""
    from cfa_tool.data.labels import helper_codes_notes, unordered_helpers

    if not loaded.value_labels:
        return loaded, notes
    notes = list(notes) + helper_codes_notes(loaded.frame, loaded.value_labels, helpers, loaded.source)
    unordered = unordered_helpers(loaded.frame, loaded.value_labels, helpers)
    return (replace(loaded, cautions=loaded.cautions + unordered) if unordered else loaded), notes


def helper_not_numbers(column: pd.Series, name: str, source: str, frame: pd.DataFrame) -> None:
    """A missing-data helper that holds anything but numbers is refused in its own role's words (not an
    indicator's), naming what it holds and its first such cell as every message names a cell (data.kept_rows.
    cell_words: a file's row, a sheet's cell, a data frame's index label) and how many more there are."""
    import datetime

    from cfa_tool.data.kept_rows import cell_words

    kind = column.dtype.kind
    if kind in "iuf" and str(column.dtype) != "boolean":
        return
    if kind == "b" or str(column.dtype) == "boolean":
        what, odd = "TRUE/FALSE values", column.notna()
    elif kind in "mM" or isinstance(column.dtype, pd.DatetimeTZDtype):
        what, odd = "dates or times", column.notna()
    else:
        odd = column.notna() & pd.to_numeric(column, errors="coerce").isna()
        if not odd.any():
            return
        first_value = column[odd].iloc[0]
        what = ("TRUE/FALSE values" if isinstance(first_value, (bool, np.bool_)) else
                "dates or times" if isinstance(first_value, (datetime.date, pd.Timestamp, np.datetime64)) else "text")
    if not odd.any():
        return
    position = int(np.flatnonzero(odd.to_numpy())[0])
    value = column.iloc[position]
    shown = ("TRUE" if value else "FALSE") if isinstance(value, (bool, np.bool_)) else clipped(str(value), 40)
    more = int(odd.sum()) - 1
    cells = more_words(more, ", and ", "such cell")
    where = cell_words(frame, column.name, int(row_numbers(frame)[position]))
    advice = ("code them as 0 and 1" if what.startswith("TRUE") else
              "give a number such as the days since the first date, in a copy of the file" if what.startswith("dates")
              else "a helper of categories needs them coded as numbers, one 0/1 column per category but one")
    raise OptionError(f"{source}: the missing-data helper '{printable(name)}' ({Option.MISSING_HELPERS}) holds "
                      f"{what} ('{shown}' in {where}{cells}); helpers must be numbers ({advice})")


def helpers_can_apply(fit_options, frame: pd.DataFrame, names: tuple[str, ...], group: str | None,
                      values: np.ndarray | None = None) -> None:
    """Missing-data helpers need rows with gaps in the model's items (an error otherwise: with every row complete
    the likelihood of items and helpers factors into the items' own and the helpers' given the items, so the
    helpers change no estimate, standard error or fit index, and an option that cannot apply is refused).  A row
    that answers no item but a helper counts: it enters the helpers' part of the likelihood (:func:`with_helpers`)."""
    gap = analysed_gaps(fit_options, frame, names, values)
    if group is not None and group in frame.columns:
        gap &= has_group(frame, group)
    if not gap.any():
        raise OptionError(f"the model's items have no missing answers in the rows analysed, so missing-data helpers "
                          f"({Option.MISSING_HELPERS}) change nothing: with complete rows the estimates, standard "
                          f"errors and fit are those without them; leave them out")


def with_helpers(moments: SampleMoments, frame: pd.DataFrame, helpers: tuple[str, ...], source: str,
                 design: DesignColumns | None = None) -> SampleMoments:
    """``moments`` (a full-information fit's rows) with the helpers' columns beside the items, for the rows that
    answer some item or some helper, and the EM estimates of the means and covariances of items and helpers together
    (the saturated model of the joint likelihood).  A row that answers no item but a helper is kept: under Graham's
    (2003) saturated-correlates model the likelihood is that of items and helpers together, to which such a row adds
    the density of its helpers' values; through the helpers' covariances with the items it moves the items' means
    and covariances (and the model's estimates) as rows with some answers do (Enders 2010, ch. 5, recalled from
    memory).  Left out, the rows that answer nothing when the helpers say why (a low helper, say) would leave the
    rows kept a selected sample, which the helpers are there to prevent.  ``design``: the frequency weights (the one
    design helpers take), whose weights the rows kept carry."""
    from cfa_tool.data.moments import moments_with_gaps, numeric_columns

    values = numeric_columns(frame, helpers, source)
    infinite = np.argwhere(np.isinf(values))
    if len(infinite):
        from cfa_tool.data.kept_rows import cell_words

        row, col = infinite[0]
        raise DataError(f"{source}: the missing-data helper '{printable(helpers[col])}' has an infinite value in "
                        f"{cell_words(frame, helpers[col], row_numbers(frame)[row])}")
    numbers = pd.Index(row_numbers(frame))
    where = numbers.get_indexer(moments.row_numbers)
    unanswered = (numbers.get_indexer(moments.unanswered_rows) if moments.unanswered_rows is not None
                  else np.zeros(0, dtype=int))
    helped = unanswered[~np.isnan(values[unanswered]).all(axis=1)]  # no item answered, some helper
    kept = np.sort(np.concatenate([where, helped]))  # the file's order
    items = np.full((len(kept), moments.rows.shape[1]), np.nan)
    items[np.searchsorted(kept, where)] = moments.rows
    rows = np.hstack([items, values[kept]])
    where_said = source if moments.group is None else f"{source} (group {moments.group})"
    row_design = moments.design
    if row_design is not None and design is not None and design.weights is not None:  # frequency weights
        counts = pd.to_numeric(frame[design.weights]).to_numpy(dtype=float)[kept]
        row_design = replace(row_design, weights=counts, given=(float(counts.sum()), float(counts @ counts)))
    weights = row_design.weights if row_design is not None else None
    joint = moments_with_gaps(rows, moments.names + helpers, where_said, weights)
    left = unanswered[~np.isin(unanswered, kept)]
    return replace(moments, names=joint.names, covariance=joint.covariance, means=joint.means, rows=rows,
                   design=row_design, n_obs=int(round(row_design.total)) if weights is not None else len(kept),
                   rows_dropped=moments.rows_dropped - len(helped), row_numbers=np.asarray(numbers[kept]),
                   unanswered_rows=np.asarray(numbers[left]) if moments.unanswered_rows is not None else None)


def analysed_gaps(fit_options, frame: pd.DataFrame, names: tuple[str, ...], values: np.ndarray | None = None
                  ) -> np.ndarray:
    """Which rows miss an answer on one of ``names`` and are analysed all the same: rows that answer nothing are left
    out and said apart (as the check counts them), but with missing-data helpers a row that answers no item and some
    helper is analysed (:func:`with_helpers`)."""
    gap = rows_with_gaps(frame, names, values)
    if gap.any():
        kept = ~(np.isnan(values).all(axis=1) if values is not None else frame[list(names)].isna().all(axis=1).to_numpy())
        if getattr(fit_options, "missing_helpers", ()):
            kept |= frame[list(fit_options.missing_helpers)].notna().any(axis=1).to_numpy()
        gap &= kept
    return gap


def rows_with_gaps(frame: pd.DataFrame, names: tuple[str, ...], values: np.ndarray | None = None) -> np.ndarray:
    """Which rows miss an answer on one of ``names`` (column by column: a sub-frame of the model variables costs
    more; ``values``: the columns already taken out, data.moments.item_values)."""
    if values is not None:
        if not np.isnan(values.sum()):  # a gap (NaN) spreads through the sum: without one, no mask of every cell
            return np.zeros(len(values), dtype=bool)
        return np.isnan(values).any(axis=1)
    gap = np.zeros(len(frame), dtype=bool)
    for name in names:
        values = frame[name].to_numpy()
        gap |= np.isnan(values) if values.dtype.kind == "f" else pd.isna(values)
    return gap


def choose_missing_handling(fit_options, frame: pd.DataFrame, names: tuple[str, ...],
                            group: str | None, values: np.ndarray | None = None,
                            design: DesignColumns | None = None) -> tuple[object, list[str]]:
    """Rows with missing answers are kept by default: full-information ML when a model variable has
    a gap, listwise deletion only when asked for (or when nothing is missing, where the two agree).  Under a
    ``design`` whose errors are robust ones the note adds that missing-data helpers cannot be used with it
    (:func:`check_helper_columns`), so what full-information ML assumes rests on the items alone."""
    if fit_options.missing is not None:
        return fit_options, []
    if fit_options.test is FitTest.YUAN_BENTLER:  # the robust test of full-information ML
        return replace(fit_options, missing=MissingData.FULL_INFORMATION), []
    robust = fit_options.test is FitTest.ROBUST
    gap = analysed_gaps(fit_options, frame, names, values)
    rows = len(frame)
    if group is not None and group in frame.columns:
        labelled = has_group(frame, group)
        gap &= labelled
        rows = int(labelled.sum())
    gaps = int(gap.sum())
    if not gaps:
        return replace(fit_options, missing=MissingData.LISTWISE), []
    if fit_options.test is FitTest.SATORRA_BENTLER:
        raise OptionError(f"{counted(gaps, 'row')} {'has' if gaps == 1 else 'have'} missing answers on model "
                          f"variables, so the fit uses full-information ML, "
                          f"whose robust test is Yuan-Bentler ({Option.ROBUST} chooses it); for the Satorra-Bentler test "
                          f"of the complete rows only, choose {Option.INCOMPLETE_ROWS.given('listwise')}")
    note = Note((f"{count_text(gaps)} of {count_text(rows)} rows {'misses' if gaps == 1 else 'miss'} some answers on "
                 f"model variables; every answer is "
                 f"used by full-information ML, the default when answers are missing; a fit of the complete rows only",
                 Command(f" ({Option.INCOMPLETE_ROWS.given('listwise')})", takes=taken_by(Option.INCOMPLETE_ROWS)),
                 f" would leave {'that row' if gaps == 1 else 'those rows'} out"
                 + (("; under the sampling design the test is design-based, with the Yuan-Bentler scaling of "
                     "full-information ML" if design is not None and design.robust else
                     "; the robust test with full-information ML is the Yuan-Bentler one") if robust else "")))
    if design is not None and design.robust and not fit_options.missing_helpers:
        note += Note(("; missing-data helpers (auxiliary variables that predict the gaps",
                      Command(f", {Option.MISSING_HELPERS}", takes=taken_by(Option.MISSING_HELPERS)),
                      ") cannot be used with sampling weights, clusters or strata, so answers are assumed missing at "
                      "random given the items only"))
    return replace(fit_options, missing=MissingData.FULL_INFORMATION), [note]


def _described(result: FitResult, spec: Spec, groups: tuple[str, ...] | None, ordinal_items=()) -> FitResult:
    """The result with the description of exactly the model fitted (for the methods paragraph).  ``ordinal_items``:
    the ordinal items' names, or a mapping of each to its number of thresholds (pipeline.ordinal.threshold_counts),
    which decides whether a later group's residual variance is free (model.parameters); for names alone, the
    thresholds the fit estimated in its first group (one when it has none: a fit of one group)."""
    if isinstance(ordinal_items, dict):
        counts = ordinal_items
    else:  # names alone: the thresholds the fit estimated say how many each item has (fit and compare pass names)
        first = groups[0] if groups else None
        fitted = Counter(r.variables[0] for r in result.estimates if r.kind == "threshold" and r.group == first)
        counts = {x: fitted.get(x) or 1 for x in ordinal_items}
    items = tuple(sorted(counts.items())) if groups is not None else None
    return replace(result, description=_description(spec, groups, items), data=_with_coding(result.data, spec))


def _with_coding(data, spec: Spec):
    """A fit's data summary with how the model coded answers recorded as words (its 'answers' statements), kept with
    the fit as the missing-value codes are: the methods paragraph says it, and scores of other data read so too."""
    from cfa_tool.data.joined_answers import joins_record

    if spec.joins:
        data = replace(data, joined_answers=joins_record(spec))
    return replace(data, answer_coding=coding_record(spec)) if spec.answers else data


@lru_cache(maxsize=16)
def _description(spec: Spec, groups: tuple[str, ...] | None, ordinal_items: tuple[tuple[str, int], ...] | None):
    """The description depends only on the model, the groups and the ordinal items' numbers of thresholds (all
    immutable), so refits of one model (loops, resampling) build it once."""
    from cfa_tool.model.description import describe
    from cfa_tool.model.parameters import build_parameter_table

    ordinal = dict(ordinal_items) if ordinal_items is not None else None
    # the description reads the factors' scales, which the mean structure does not change; with it, a model that
    # names intercepts or factor means (fitted with a mean structure, else the fit refused it) is described too
    return describe(spec, build_parameter_table(spec, groups, mean_structure=True, ordinal=ordinal))


def converged(result: FitResult) -> FitResult:
    """``result`` if its estimation converged; otherwise the EstimationError that says why."""
    if not result.converged:
        from cfa_tool.assessment.admissibility import ProblemKind
        from cfa_tool.language.names import written_group

        # a group with fewer rows than its model's parameters: the likeliest cause, said first (its label by the rule
        # of every text)
        labels = tuple(g.label for g in result.groups) if result.multigroup else ()
        small = "".join(f"group {written_group(p.group, labels)}: {p.explanation} " for p in result.problems
                        if p.kind is ProblemKind.SMALL_GROUP)
        raise EstimationError(f"{small[:1].upper()}{small[1:]}the estimation did not converge: {result.message}")
    return result


def _fit_ordinal(spec: Spec, frame: pd.DataFrame, source: str, ordinal_items: set[str], group: str | None,
                 reference_group: str | None, fit_options, method: str, design: DesignColumns | None = None) -> FitResult:
    """The fit of ordinal items (beside continuous ones in one group), weighted and with design-based standard
    errors and tests under a sampling ``design`` (its columns already checked)."""
    from cfa_tool.pipeline import ordinal as ordinal_fitting

    pairwise = check_ordinal_options(fit_options)
    if group is None:
        if reference_group is not None:
            raise OptionError("a reference group needs a group column")
        from cfa_tool.data.polychoric import ordinal_moments
        from cfa_tool.inference.design import ordinal_design_covariance

        continuous = frozenset(x for x in spec.observed_names if x not in ordinal_items)
        moments = ordinal_design_covariance(ordinal_moments(frame, spec.observed_names, source, continuous,
                                                            pairwise=pairwise, design=design))
        result = ordinal_fitting.fit_ordinal(spec, moments, fit_options, method)
        groups = [(None, moments)]
    else:
        groups, notes = ordinal_groups(spec, frame, source, group, reference_group, ordinal_items, pairwise, design)
        result = ordinal_fitting.fit_ordinal_groups(spec, groups, fit_options, method, group)
        result = replace(result, warnings=tuple(notes) + result.warnings)
    if design is not None and result.converged:
        result = with_design(result, design_summary(frame, design, [m for _, m in groups], [g for g, _ in groups]),
                             [m for _, m in groups])
    return result


def continuous_only(spec: Spec, command: str) -> Spec:
    """Workflows that fit by normal-theory ML refuse a model that declares ordinal items rather
    than silently treating them as continuous."""
    if spec.ordinal:
        name = spec.ordinal[0]
        raise ModelError(f"'{command}' treats every item as continuous, but the model declares '{name.text}' ordinal; "
                         f"remove the 'ordinal' statement to analyse the items as continuous (the other commands, "
                         f"'invariance' across a few groups among them, handle ordinal items)", name.location,
                         spec.source_line(name.location))
    if spec.joins:
        join = spec.joins[0]
        raise ModelError(f"'{command}' treats every item as continuous, and 'join answers' joins categories of ordinal "
                         f"items; remove the statement (the other commands analyse ordinal items)", join.location,
                         spec.source_line(join.location))
    return spec


def few_categories(frame: pd.DataFrame, names: tuple[str, ...], values: np.ndarray | None = None,
                   extremes: AnswerExtremes | None = None) -> tuple[tuple[str, ...], list[str]]:
    """For a command that treats ``names`` as continuous: the items of few answer categories
    (data.descriptives.few_category_items), which the methods paragraph names, and the note on them and on the items
    whose answers pile up at one end (data.descriptives.piled_up_items: new-user trial s25, about 60% at the top of
    four items passed without a word), one note with the ordinal fit as the remedy
    (data.descriptives.few_category_note), empty when there are none (``values``: the items taken out already)."""
    values = item_values(frame, names) if values is None else values
    if values is None:  # not plain numbers: the reading of the items names what is wrong
        return (), []
    few = few_category_items(values, names, extremes)
    note = few_category_note(few, names, piled_up_items(values, names, extremes, skip=few))
    return few, [note] if note else []


def few_category_notes(frame: pd.DataFrame, names: tuple[str, ...], values: np.ndarray | None = None) -> list[str]:
    """The note of :func:`few_categories` alone."""
    return few_categories(frame, names, values)[1]


def refit_missing_handling(frame: pd.DataFrame, names: tuple[str, ...], missing) -> tuple[MissingData, list[str]]:
    """How a command that refits many samples of continuous items (bootstrap, cutoffs, replicate) treats rows
    with gaps, with fit's note: as fit does, full-information ML when a model variable has gaps (or when asked),
    the complete rows when ``missing='listwise'`` (--incomplete-rows listwise)."""
    missing = None if missing is None else MissingData.parse(missing, "the handling of rows with missing answers")
    options, notes = choose_missing_handling(FitOptions(missing=missing), frame, names, None)
    return options.missing, notes + few_category_notes(frame, names)


def without_exploratory_blocks(spec: Spec, command: str, why: str) -> Spec:
    """Workflows whose results would describe an exploratory block's unrotated factors refuse such a model."""
    if spec.exploratory:
        block = spec.exploratory[0]
        raise ModelError(f"'{command}' is not available for a model with an exploratory block: {why}; declare the "
                         f"factors with 'factor' lines to use it", block.location, spec.source_line(block.location))
    return spec


def check_ordinal_options(fit_options) -> bool:
    """Refuse the options that cannot apply to ordinal items; whether rows with gaps are kept (pairwise
    present rows, the default) rather than left out (listwise, when asked)."""
    if fit_options.test is FitTest.ROBUST:
        raise OptionError(f"ordinal items always get robust (sandwich) standard errors and the {ADJUSTED_TEST} test "
                          f"from the least-squares fit, so {Option.ROBUST} cannot apply; remove it")
    if fit_options.test_chosen and fit_options.test is FitTest.NORMAL:  # it was replaced by the adjusted test (s17)
        raise OptionError(f"ordinal items are fitted by least squares on polychoric correlations, whose test is the "
                          f"{ADJUSTED_TEST} one, with robust (sandwich) standard errors: the normal-theory test of "
                          f"maximum likelihood cannot apply; leave out {Option.ROBUST.given(FitTest.NORMAL.value)}")
    if fit_options.missing is MissingData.FULL_INFORMATION or fit_options.test is not FitTest.NORMAL:
        raise OptionError(f"ordinal items use every answer through pairwise present rows (or only the complete rows with "
                          f"{Option.INCOMPLETE_ROWS.given('listwise')}) and their own adjusted test; full-information ML and the "
                          "Satorra-Bentler and Yuan-Bentler tests are for continuous items")
    if fit_options.information is not None:
        raise OptionError("ordinal items get robust (sandwich) standard errors from the least-squares fit, so an "
                          "information matrix cannot be chosen; remove that option")
    return fit_options.missing is not MissingData.LISTWISE


def ordinal_groups(spec: Spec, frame: pd.DataFrame, source: str, group: str, reference_group: str | None,
                   ordinal_items: set[str], pairwise: bool = False,
                   design: DesignColumns | None = None) -> tuple[list, list[str]]:
    """Per-group ordinal moments (items not in ``ordinal_items`` are continuous ones beside them), with notes on
    rows left out: the ordinal counterpart of :func:`moments_for`; ``pairwise`` keeps rows with gaps (pairwise
    present); under a sampling ``design`` weighted, with the design-based covariance (ordinal items only)."""
    _check_group_column(spec, group)
    from cfa_tool.data.groups import split_ordinal_moments
    from cfa_tool.inference.design import ordinal_domains

    continuous = frozenset(x for x in spec.observed_names if x not in ordinal_items)
    if continuous and design is not None:
        raise OptionError(f"continuous items beside ordinal ones in several groups are not yet fitted with a sampling "
                          f"design, so the {design.names[0][0]} column '{design.names[0][1]}' cannot apply; declare "
                          f"every item ordinal, fit the groups without the design, or fit one group at a time")
    groups, no_group = split_ordinal_moments(frame, group, spec.observed_names, source, reference_group, pairwise,
                                             design, continuous)
    # groups that share clusters: their statistics' covariance joined over the clusters (s21)
    groups = list(zip([label for label, _ in groups], ordinal_domains([m for _, m in groups])))
    return groups, _no_group_notes(no_group, group, len(frame)) + label_notes(frame, group)


def ordinal_estimator_option(method: str | None, ordinal_items, declared_by: str | None = None) -> str:
    """The least-squares estimator for ordinal items (default diagonally weighted); naming one for a model
    without ordinal items is an error, since it could not apply.  ``declared_by``: how the command run declares
    ordinal items (its own options only)."""
    if method is None:
        return Weighting.DIAGONAL
    method = Weighting.parse(method, "the ordinal estimator")
    if not ordinal_items:
        declared_by = declared_by or f"an 'ordinal' statement or {Option.ORDINAL}"
        raise OptionError(f"an estimator for ordinal items is chosen, but the model has no ordinal items (declare them "
                          f"with {declared_by}), so it cannot apply")
    return method


def refuse_item_named_all(items) -> None:
    """'all' given as the ordinal items while an item is named 'all': an error, since it could mean either."""
    if "all" in items:
        raise OptionError("'all' is both the word for every item and an item's name, so ordinal='all' (--ordinal all) "
                          "could mean either; to make the item 'all' ordinal alone give it as a list "
                          "(ordinal=['all'], or --ordinal '\"all\"' on the command line), or rename it")


def refuse_for_summary(spec: Spec, source: str, ordinal=None, ordinal_estimator=None) -> None:
    """The one gate of a model fitted to summary statistics (``source``: them as a message names them, a file or 'a
    covariance matrix'), called once by each route that takes them (fit, check, compare): what the model or the
    options ask that a matrix cannot give is an error, at the statement where a statement asks it: ordinal items
    (by the ``ordinal`` option, an ordinal estimator or an 'ordinal' statement), intercepts and factor means, and
    'answers' statements (data.answer_words.refuse_for_summary_statistics)."""
    _refuse_ordinal_for_summary(spec, ordinal, ordinal_estimator)
    _refuse_means_for_summary(spec)
    refuse_for_summary_statistics(spec, source)
    refuse_joins_for_summary_statistics(spec, source)


def _refuse_ordinal_for_summary(spec: Spec, ordinal, ordinal_estimator) -> None:
    """Ordinal items, named by the ``ordinal`` option (or an ordinal estimator chosen) or by an 'ordinal' statement of
    the model, need the rows of answers (their thresholds and polychoric correlations): with summary statistics an
    error, naming the statement's file and line when the model asks for them."""
    message = "ordinal items need the raw answers, not summary statistics"
    if ordinal or ordinal_estimator is not None:
        raise OptionError(message)
    if spec.ordinal:
        first = spec.ordinal[0]
        raise ModelError(f"the 'ordinal' statement names '{printable(first.text)}': {message}; remove the statement or "
                         f"give the rows of answers", first.location, spec.source_line(first.location))


def _refuse_means_for_summary(spec: Spec) -> None:
    """A statement about an intercept or a factor mean cannot apply to summary statistics, which are fitted by their
    covariances alone (no groups, no full-information ML): an error at the statement that says so, rather than the
    general error's advice to give groups or full-information ML, both refused for summary statistics (hostile s20)."""
    from cfa_tool.language.checks import all_refs

    ref = next((r for r in all_refs(spec) if r.kind in ("intercept", "mean")), None)
    if ref is not None:
        raise ModelError(f"{ref}: intercepts and factor means are estimated only in a fit with a mean structure, and "
                         f"summary statistics are fitted by their covariances alone; remove the statement, or give "
                         f"the rows of answers", ref.location, spec.source_line(ref.location))


def ordinal_model(spec: Spec, ordinal) -> tuple[Spec, set[str]]:
    """The model as a fit with ordinal items reads it, and those items: the items of its 'ordinal' statements and of
    the ``ordinal`` option (the command line's --ordinal) alike, and with them the thresholds held equal from the
    metric level on (language.spec.with_ordinal_levels; Wu & Estabrook 2016).  The one route of every command that
    takes ordinal items with a model (fit, scores, bootstrap, cutoffs, replicate), before it checks the model: new
    user s22, 'scores --ordinal all' checked 'noninvariant intercept(x)' against a model without equal thresholds and
    refused what 'fit --ordinal all' fits, which the same items declared by an 'ordinal' statement passed."""
    items = ordinal_items_of(spec, ordinal)
    return with_ordinal_levels(spec, items), items


def ordinal_items_of(spec: Spec, ordinal) -> set[str]:
    """The items a run analyses as ordinal: those of the model's 'ordinal' statements and of the ``ordinal`` option
    (--ordinal); a 'join answers' statement naming any other item is an error at its name
    (language.checks.refuse_continuous_joins)."""
    items = _ordinal_items(spec, ordinal)
    refuse_continuous_joins(spec, items)
    return items


def _ordinal_items(spec: Spec, ordinal) -> set[str]:
    items = {n.text for n in spec.ordinal}
    if ordinal is not None and not isinstance(ordinal, str) and not (
            isinstance(ordinal, (list, tuple, set)) and all(isinstance(x, str) for x in ordinal)):
        raise OptionError(f"ordinal must be 'all' or a list of item names, not {type(ordinal).__name__}")
    if isinstance(ordinal, str) and ordinal != "all" and ordinal.strip() in ("", ","):
        raise OptionError("ordinal names no items: give 'all' or item names")
    if ordinal == "all":
        refuse_item_named_all(spec.observed_names)
        items |= set(spec.observed_names)
    elif ordinal:
        from cfa_tool.language.names import ordinal_names

        items.update(ordinal_names(ordinal, spec.observed_names, "an indicator in the model"))
    return items


def _variables_agree(given: list[str], labels: list[str]) -> None:
    """``variables`` given with a covariance matrix whose data frame labels its variables: an error naming the first
    place where the list and the labels disagree (the labels would otherwise win without a word)."""
    if given == labels:
        return
    k = next((k for k, (a, b) in enumerate(zip(given, labels)) if a != b), min(len(given), len(labels)))
    if k < min(len(given), len(labels)):
        found = f"variables names '{printable(given[k])}' as variable {k + 1}, where the frame's labels name " \
                f"'{printable(labels[k])}'"
    else:
        found = f"variables names {len(given)} variables and the frame's labels {len(labels)}"
    raise OptionError(f"the covariance matrix is a data frame whose labels name its variables, and {found}; leave "
                      f"variables out, or give the list in the frame's order")


def _api_summary(covariance, n_obs, means, variables, matrix, sds, divisor):
    if n_obs is None:
        raise OptionError("a covariance matrix needs the number of observations (n_obs)")
    n_obs = opt.observations(n_obs, "n_obs (the number of observations)")
    if isinstance(covariance, pd.DataFrame):
        names = [str(c) for c in covariance.columns]
        if [str(i) for i in covariance.index] != names and not isinstance(covariance.index, pd.RangeIndex):
            raise OptionError("the covariance matrix's row names differ from its column names; give the rows in the "
                              "order of the columns")
        values = covariance.to_numpy()
        if variables is not None:
            _variables_agree([str(v) for v in variables], names)
    else:
        values = covariance
        if variables is None:
            raise OptionError("name the variables of the covariance matrix (variables=[...]) or pass a DataFrame")
        names = [str(v) for v in variables]
    if matrix not in ("covariance", "correlation"):
        raise OptionError(f"matrix must be 'covariance' or 'correlation', not '{matrix}'")
    if len(set(names)) != len(names):
        duplicate = next(n for n in names if names.count(n) > 1)
        raise OptionError(f"the variable '{printable(duplicate)}' is named twice in the covariance matrix")
    if np.iscomplexobj(values if not isinstance(values, pd.DataFrame) else values.to_numpy()):
        raise OptionError("the covariance matrix holds complex numbers; it must hold real numbers")
    if divisor not in ("n-1", "n"):
        raise OptionError(f"divisor must be 'n-1' or 'n', not '{divisor}'")
    sds, means = by_variable(sds, names, "the standard deviations (sds)"), by_variable(means, names, "the means")
    from cfa_tool.data.summary_stats import ARRAY_SOURCE, FRAME_SOURCE

    source = FRAME_SOURCE if isinstance(covariance, pd.DataFrame) else ARRAY_SOURCE  # 'as given with the data frame'
    return summary_moments(names, values, n_obs, matrix, sds, means, divisor, source)


#: keywords a researcher may reach for that name no option, and what asks for the same
KEYWORDS_BY_OTHER_NAMES = {"robust": "a robust test is asked for with test='robust' (or test='satorra-bentler' or "
                                     "test='yuan-bentler')"}


def make_options(options: dict, own: tuple[str, ...] = (), helpers: bool = False) -> FitOptions:
    """The fit options of the keywords a public function passed on (``options``); an unknown keyword is an error
    naming it and the nearest keyword of that function (``own``, its keywords as declared beside it, such as
    :data:`FIT_KEYWORDS`) or of the fit options (difflib), or what asks for the same
    (:data:`KEYWORDS_BY_OTHER_NAMES`).  ``helpers``: whether the function takes missing-data helpers (fit alone so
    far; elsewhere they are refused, never ignored)."""
    from dataclasses import fields

    if not helpers and options.get("missing_helpers"):
        raise OptionError(f"missing-data helpers ({Option.MISSING_HELPERS}) are offered by fit only so far; leave "
                          f"them out here")

    known = [f.name for f in fields(FitOptions) if f.metadata.get("keyword", True)]
    unknown = next((k for k in options if k not in known), None)
    if unknown is not None:
        near = close_names(str(unknown), [*own, *known])
        flags = {o.flag.lstrip("-").replace("-", "_"): o for o in Option}  # a command-line flag written as a keyword
        named = flags.get(unknown)
        hint = (KEYWORDS_BY_OTHER_NAMES.get(unknown)
                or (f"the command line's {named.flag} is {named.keyword}=... in Python" if named is not None
                    and named.keyword != unknown else None)
                or (f"did you mean {near[0]}=...?" if near else f"the fit options are {', '.join(known)}"))
        raise OptionError(f"unknown keyword '{printable(str(unknown))}': {hint}")
    return FitOptions(**options)


def _group_parts(spec: Spec, frame: pd.DataFrame, source: str, group: str | None,
                 reference_group: str | None) -> tuple[list[tuple[str | None, np.ndarray]], int]:
    """Each group's (label, model items' values in its rows that answer some item), as data.groups splits the rows
    (one part without groups), and the number of rows without a group label."""
    from cfa_tool.data.groups import group_rows
    from cfa_tool.data.moments import numeric_columns

    split, without = [(None, frame)], 0
    if group is not None:
        _check_group_column(spec, group)
        split, without = group_rows(frame, group, source, reference_group)  # a column not in the file: its error
    parts = []
    for label, part in split:
        values = numeric_columns(part, spec.observed_names, source)
        parts.append((label, values[~np.isnan(values).all(axis=1)]))
    return parts, without


def _sparse_answers(spec: Spec, parts: list[tuple[str | None, np.ndarray]], source: str) -> tuple:
    """The cautions of a check whose rows with gaps leave full-information ML's saturated model without an estimate
    (assessment.missingness.sparse_answers_problem), in each group (``parts``: :func:`_group_parts`): a pair of
    items no row answers together, or the EM iterations finding no maximum; () when the saturated model can be
    estimated (or its failure has another cause, which the moments then report as a fit would).  Asked only when
    the moments could not be estimated (:func:`check`), so that every group that fails is named."""
    from cfa_tool.assessment.missingness import never_together, sparse_answers_problem
    from cfa_tool.data.moments import TooFewAnswers, moments_with_gaps

    found = []
    for label, values in parts:
        if not np.isnan(values).any() or len(values) <= len(spec.observed_names):
            continue  # complete rows, or too few rows: not the saturated model's gaps (the moments say so)
        if never_together(values, spec.observed_names):
            found.append(sparse_answers_problem(values, spec.observed_names, group=label))
            continue
        try:
            moments_with_gaps(values, spec.observed_names, source)
        except EstimationError:  # the EM iterations found no maximum (the answers given together are too few)
            found.append(sparse_answers_problem(values, spec.observed_names, "its EM iterations found no maximum of "
                                                "the likelihood", label))
        except TooFewAnswers as few:  # an item answered by no more rows than the variables (data.moments.fewest_answers)
            found.append(sparse_answers_problem(
                values, spec.observed_names, f"only {few.answers} row{'s' if few.answers != 1 else ''} answer "
                f"'{printable(few.item)}', and it needs more answers than the {few.variables} variables analysed",
                label))
        except DataError:  # another cause (a constant item, an exact combination): the moments name it, as for a fit
            continue
    return tuple(found)


def _rows_answering(parts: list[tuple[str | None, np.ndarray]], without: int, frame: pd.DataFrame,
                    group: str | None, complete_only: bool = False
                    ) -> tuple[list[tuple[str | None, SimpleNamespace]], list[str]]:
    """Each group's rows that answer some model item (``complete_only``: every one; ``parts`` and ``without``:
    :func:`_group_parts`), for a check whose moments cannot be estimated (:func:`_sparse_answers`, a group too small
    to analyse): (label, an object with ``n_obs``) as :func:`moments_for` gives moments, and its notes on rows
    without a group label."""
    counted = [(label, SimpleNamespace(n_obs=int((~np.isnan(values).any(axis=1)).sum()) if complete_only
                                       else len(values))) for label, values in parts]
    if group is None:
        return counted, []
    return counted, _no_group_notes(without, group, len(frame)) + label_notes(frame, group)


def _small_group_problems(refused: SmallGroupsError) -> tuple:
    """A check's findings of the groups a fit refuses as too small to analyse (data.groups.refuse_small_groups):
    one caution per group, its words and remedy (the exact row filter first) as the refusal gives them."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind

    return tuple(Problem(ProblemKind.SMALL_GROUP, (), float(g.rows),
                         f"{said[:1].upper()}{said[1:]}: a fit with this group stops here.",
                         f"{remedy[:1].upper()}{remedy[1:]}.", g.label)
                 for g, (said, remedy) in zip(refused.groups, refused.words))


def check(model: str | Path | Spec, data: pd.DataFrame | str | Path, group: str | None = None, *,
          sheet: str | None = None, names_row: int | None = None, first_data_row: int | None = None,
          missing_codes: tuple[float, ...] = (), keep: tuple[str, ...] | list[str] = (), rename=None, reference_group: str | None = None, weights: str | None = None, cluster: str | None = None,
          strata: str | None = None, weight_kind: str | None = None, ordinal=None,
          id_column: str | None = None) -> CheckResult:
    """Parse and validate a model against data without fitting it; the result says how many rows
    are complete, how many have gaps (kept by default) and each item's
    coverage.  A sampling design (``weights``, ``cluster``, ``strata``, ``weight_kind``, as for :func:`fit`) is
    checked as the fit checks it and stated: the sum of the weights, Kish's effective sample size, the
    clusters and strata, with the caution a fit would give about too few clusters.  ``ordinal`` ('all' or item
    names, as for :func:`fit`) checks those items as an ordinal fit would, beside those the model declares ordinal;
    every refusal of their answers that such a fit stops at first is listed (``refusals``), and for ordinal items or
    items of few answer categories the answers per category of every item (``answers``, per group).  ``id_column``:
    the column that names each row (never analysed), beside the row numbers of the cautions about rows, as for
    :func:`fit`.  The model is read by the fit's own rules (:func:`ordinal_model`, pipeline.ordinal.one_group_model
    and groups_model), so that check refuses what fit refuses on the model and the data, with the same words, and
    accepts what fit accepts; where a fit of continuous items would stop on the data, its line is ``stops_fit``."""
    from cfa_tool.assessment.admissibility import group_parameter_counts, group_size_problems, one_sample_size_problems
    from cfa_tool.assessment.identification import check_counting_rule, moments_count
    from cfa_tool.model.parameters import build_parameter_table

    opt.group_column(group)
    read_options = {"sheet": sheet, "missing_codes": missing_codes, "keep": keep, "names_row": names_row,
                    "first_data_row": first_data_row,
                    "rename": rename}
    design = design_columns(weights, cluster, strata, weight_kind)
    if summary_source(data):
        refuse_row_options(f"'{data}'", group=group, id_column=id_column, **read_options)  # in fit's order, its words
        if reference_group is not None:
            raise OptionError("a reference group needs groups, and summary statistics describe one group")
        if design is not None:
            raise OptionError(f"summary statistics hold no rows, so a {design.names[0][0]} column cannot apply; give the "
                              f"raw data")
        spec = load_spec(model)
        refuse_for_summary(spec, f"'{data}'", ordinal)
        moments, _ = read_summary_file(data)
        check_columns(spec, list(moments.names), moments.source)
        table = build_parameter_table(spec)
        check_counting_rule(spec, table)
        # the rows per parameter and the degrees of freedom, as the fit of the same file gives them (hostile s20)
        small, small_notes = one_sample_size_problems(moments.n_obs, table.n_free, table.free_labels)
        return CheckResult(spec, moments.source, moments.n_obs, moments.n_obs, 0, 0, {}, None, notes=tuple(small_notes),
                           problems=small, analysed=moments.analysed,
                           degrees_of_freedom=moments_count(table) - table.n_free)
    spec, loaded, notes = read_inputs_with_notes(model, data, **read_options,
                                                 text_columns=(id_column,) if isinstance(id_column, str) else (),
                                                 chosen=chosen_columns(group, id_column, design=design))
    frame, source = loaded.frame, loaded.source
    ids, named_by = rows_named(loaded, id_column, spec.observed_names, group)
    loaded = with_design_weights(analysed_odd_values(loaded, spec, group), design, spec, group)
    if design is not None:
        frame, design_notes = check_design(frame, design, spec.observed_names, group, source, loaded.weights)
        notes += design_notes
    spec, ordinal_items = ordinal_model(spec, ordinal)  # the model as fit reads it, and its rules below
    refusals = ()
    if ordinal_items:  # every refusal of the answers' categories at once, then the fit's other data checks
        from cfa_tool.data.groups import ordinal_refusals

        if group is not None:
            _check_group_column(spec, group)
        refusals = ordinal_refusals(frame, spec.observed_names, source,
                                    frozenset(x for x in spec.observed_names if x not in ordinal_items), group,
                                    reference_group)
    thresholds = 0  # of an ordinal fit in one group, estimated first: the design-based covariance carries them too
    ordinal_small = ((), ())  # the rule of rows per parameter as the ordinal fit judges it (its rows, its model)
    ordinal_table = None  # the model an ordinal fit estimates, read and refused by the fit's own rules
    if ordinal_items and not refusals:  # the same data checks as the fit (correlations, duplicates, the design's)
        from cfa_tool.pipeline import ordinal as ordinal_fitting

        if group is not None:
            ordinal_parts, _ = ordinal_groups(spec, frame, source, group, reference_group, ordinal_items,
                                              pairwise=True, design=design)
            ordinal_table = ordinal_fitting.groups_model(spec, ordinal_parts)[0]
            ordinal_small = group_size_problems(ordinal_table, [m.n_obs for _, m in ordinal_parts])
        else:
            from cfa_tool.data.polychoric import ordinal_moments

            first_step = ordinal_moments(
                frame, spec.observed_names, source, frozenset(x for x in spec.observed_names if x not in ordinal_items),
                pairwise=True, design=design)
            thresholds = sum(len(t) for t in first_step.thresholds)
            # judged as the fit's result judges it (pipeline.results.fit_result): the parameters of the model it
            # estimates
            ordinal_table = ordinal_fitting.one_group_model(spec)[2]  # its thresholds estimated first, outside it
            ordinal_small = one_sample_size_problems(first_step.n_obs, ordinal_table.n_free, ordinal_table.free_labels)
    options, _ = choose_missing_handling(FitOptions(), frame, spec.observed_names, group)
    sparse, too_small = (), ()
    stops = ""  # the refusal a fit of continuous items stops with, which a check names after its findings
    try:  # the saturated (EM) moments once; where they cannot be estimated, whether the gaps are why
        groups, group_notes = moments_for(spec, frame, source, group, reference_group, missing=options.missing,
                                          design=design)
    except SmallGroupsError as refused:  # a fit stops there; a check names those groups among its findings
        parts, without = _group_parts(spec, frame, source, group, reference_group)
        groups, group_notes = _rows_answering(parts, without, frame, group,
                                              complete_only=options.missing is not MissingData.FULL_INFORMATION)
        too_small = _small_group_problems(refused)
        stops = "" if ordinal_items else str(refused)
    except (DataError, EstimationError) as refused:
        if options.missing is not MissingData.FULL_INFORMATION or design is not None:
            raise
        parts, without = _group_parts(spec, frame, source, group, reference_group)
        # an ordinal fit keeps rows with gaps pairwise (its moments checked above): no saturated model to estimate
        sparse = () if ordinal_items else _sparse_answers(spec, parts, source)
        if not sparse and not ordinal_items:  # another cause (a constant item, an exact combination): as a fit says it
            raise
        # the rows are reported, with the caution that a fit of them stops (no saturated model to estimate)
        groups, group_notes = _rows_answering(parts, without, frame, group)
        stops = str(refused) if isinstance(refused, DataError) and not ordinal_items else ""
    notes += group_notes
    labels = tuple(label for label, _ in groups) if group is not None else None
    table = ordinal_table  # an ordinal fit's model was read and checked by its own rules above
    if not ordinal_items:
        table = build_parameter_table(spec, labels, mean_structure=options.missing is MissingData.FULL_INFORMATION)
        check_counting_rule(spec, table)
        if not stops and not sparse:  # a fixed covariance beyond the variances at the search's start: as fit stops
            from cfa_tool.pipeline.continuous import refuse_impossible_start

            refuse_impossible_start(spec, groups, options.missing is MissingData.FULL_INFORMATION)
    # the rows per parameter of the sample or of each group, by the fit's rule (an ordinal fit's thresholds: counted
    # by the fit)
    small, small_notes = ordinal_small if ordinal_items else group_size_problems(table, [m.n_obs for _, m in groups]) \
        if labels else one_sample_size_problems(groups[0][1].n_obs, table.n_free, table.free_labels)
    named = {p.group for p in too_small}  # those groups' rows per parameter: their caution says more
    small = too_small + tuple(p for p in small if p.group not in named)
    notes += small_notes
    sample_design = design_summary(frame, design, [m for _, m in groups], [g for g, _ in groups]) if design is not None else None
    # the parameters a design-based covariance carries, counted as the fit counts them (an ordinal fit's: its own
    # model's, in one group the latent responses' residual variances not free)
    carried = table.n_free if table is not None else 0
    answered = _labelled(frame, group)[list(spec.observed_names)].notna()
    every_item = answered.all(axis=1).to_numpy()
    # complete rows that are complete only by values that look like no answers (the cautions' rows)
    odd_rows = {row for odd in loaded.odd_values for row in odd.rows}
    odd_complete = int(np.isin(row_numbers(answered)[every_item], list(odd_rows)).sum()) if odd_rows else 0
    complete = int(every_item.sum()) - odd_complete
    unanswered = ~answered.any(axis=1).to_numpy()
    empty = int(unanswered.sum())
    coverage = {name: float(v) for name, v in answered.mean(axis=0).items()} if len(answered) else {}
    counted = None
    if design is not None and design.kind is WeightKind.FREQUENCY:  # the rows as the fit counts them (its N)
        w = pd.to_numeric(frame.loc[answered.index, design.weights]).to_numpy(dtype=float)
        whole = every_item & ~np.isin(row_numbers(answered), list(odd_rows)) if odd_rows else every_item
        none = ~answered.any(axis=1).to_numpy()
        counted = (float(w.sum()), float(w[whole].sum()), float(w[~whole & ~every_item & ~none].sum()),
                   float(w[none].sum()))
    return CheckResult(spec, source, len(answered), complete, len(answered) - complete - odd_complete - empty, empty,
                       coverage, labels, bool(ordinal_items), sample_design,
                       sample_design.caution(carried, thresholds) if sample_design is not None else None,
                       tuple(notes) + ((sample_design.lone_caution(),) if sample_design and sample_design.lone_strata else ())
                       + ((sample_design.similarity.note(sample_design.columns.cluster),)  # each item's, for planning
                          if sample_design is not None and sample_design.similarity is not None else ()),
                       sparse + data_problems(loaded, spec, group, design, ids, coverage=coverage,
                                              n_obs=len(answered), id_column=named_by)
                       + small
                       + (design_problems(sample_design, carried, thresholds, ordinal=bool(ordinal_items))
                          if sample_design is not None else ()),
                       len(frame) - len(answered), odd_complete,
                       len(loaded.read_frame) if loaded.read_frame is not None else None, counted=counted,
                       group_rows=tuple(m.n_obs for _, m in groups) if labels else (),
                       group_parameters=tuple(group_parameter_counts(table)) if labels and not ordinal_items else (),
                       zero_weight=len(loaded.frame) - len(frame),
                       empty_rows=tuple(int(r) for r in row_numbers(answered)[unanswered]),
                       row_naming=row_naming(frame), text_lines=dict(text_lines(frame)),
                       answers=_answers_per_category(spec, frame, source, group, reference_group, ordinal_items,
                                                     loaded),
                       refusals=refusals, stops_fit=stops, reading=loaded.reading,
                       group_coverage=_group_coverage(spec, frame, source, group, reference_group),
                       degrees_of_freedom=None if ordinal_items else moments_count(table) - table.n_free)


def _group_coverage(spec: Spec, frame: pd.DataFrame, source: str, group: str | None,
                    reference_group: str | None) -> tuple[tuple[str, float], ...]:
    """Each group's share of the model variables' cells its rows answered (data.groups splits the rows, as a fit
    does), in the groups' order; () without groups."""
    if group is None:
        return ()
    from cfa_tool.data.groups import group_rows

    split, _ = group_rows(frame, group, source, reference_group)
    items = list(spec.observed_names)
    return tuple((str(label), float(part[items].notna().to_numpy().mean())) for label, part in split if len(part))


def _answers_per_category(spec: Spec, frame: pd.DataFrame, source: str, group: str | None,
                          reference_group: str | None, ordinal_items: set[str], loaded: LoadedData) -> tuple:
    """A check's answers per category (data.answer_counts) of every item whose answers are few whole numbers (at
    most as many as an ordinal item may have), in each group, when some item is ordinal or has few answer
    categories (data.descriptives.few_category_items); () otherwise.  The categories are named by the data file's
    value labels, or by the words an 'answers' statement codes."""
    from cfa_tool.data.answer_counts import answer_counts, category_items
    from cfa_tool.data.answer_words import CODED_BY_STATEMENT
    from cfa_tool.data.polychoric import MAX_CATEGORIES

    parts, _ = _group_parts(spec, frame, source, group, reference_group)
    values = np.vstack([v for _, v in parts]) if parts else np.zeros((0, len(spec.observed_names)))
    if not ordinal_items and not few_category_items(values, spec.observed_names):
        return ()
    items = category_items(values, spec.observed_names, MAX_CATEGORIES)
    labels = {name: dict(codes) for name, codes in loaded.value_labels.items() if name in items}
    for name, coded in frame.attrs.get(CODED_BY_STATEMENT, {}).items():
        if name in items:
            labels[name] = {code: word for word, _, code in coded if word is not None}
    from cfa_tool.data.non_answers import given_codes

    from cfa_tool.data.joined_answers import joins_record

    return answer_counts(parts, spec.observed_names, items, labels, given_codes(frame), joins_record(spec)) if items else ()

