"""Names of data rows: an id column the user names (``--id``), or the file's row-name column.

An id column is never analysed: it must exist, and it may not be a model variable or the group
column.  Ids are kept as text, one per row of the data as read (before row filters), so outputs
can name each row by its id beside its row number.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.errors import OptionError, clipped, printable
from cfa_tool.numbers import user_number
from cfa_tool.data.renamed_columns import renamed_hint
from cfa_tool.suggest import close_names, did_you_mean
from cfa_tool.note_parts import Note, RowId, Text


def id_text(value) -> str | None:
    """A cell of an id column (or of a file's row-name column) as the id's text, None where it is empty: a number
    as the user wrote it (numbers.user_number: 7.0 is '7', the 7 it equals; 1234567890123456.0, an id of a column of
    numbers with gaps, all its digits, where the 15 significant digits of '%.15g' made '1.23456789012346e+15' of it
    and of its neighbour 1234567890123457, one id of two rows, in the repeated-id caution and the scores file alike);
    text as it stands ('007' is not 7).  The one rule of an id's text: the ids of an id column and the file's row
    names (data.readers), which the cautions, the case diagnostics and the scores file all read."""
    if value is None or (not isinstance(value, str) and pd.isna(value)):
        return None
    if isinstance(value, (float, np.floating)):
        return user_number(float(value))
    return str(value)


def row_ids(frame: pd.DataFrame, source: str, id_column: str | None, model_variables: tuple[str, ...],
            group: str | None = None, row_names: pd.Series | None = None) -> pd.Series | None:
    """The id of each row of ``frame`` (the data as read, before filters) as text (None where the cell is
    empty), on ``frame``'s index: the values of ``id_column`` when given (checked), else the file's row names,
    else None."""
    if id_column is None:
        return row_names
    if not isinstance(id_column, str):
        raise OptionError(f"the id column must be given by its name (text), not {type(id_column).__name__}")
    columns = [str(c) for c in frame.columns]
    if id_column not in columns:
        guess = close_names(id_column, columns)
        hint = renamed_hint(frame, id_column) or (did_you_mean(id_column, guess[0]) if guess else "")
        raise OptionError(f"the id column '{printable(id_column)}' is not a column of {source}{hint}")
    if id_column in model_variables:
        raise OptionError(f"'{printable(id_column)}' is a variable of the model and cannot also be the id column "
                          f"(an id column is never analysed)")
    if group is not None and id_column == group:
        raise OptionError(f"'{printable(id_column)}' is the group column and cannot also be the id column")
    values = frame[frame.columns[columns.index(id_column)]]
    return values.map(id_text).rename(None)


def id_like_column(frame: pd.DataFrame, skip) -> str | None:
    """The first column of ``frame`` (the rows as read) outside ``skip`` (the model's variables, the group and design
    columns) that could name the rows: a value in every row, no two alike, and no fractions (a code or a name, not a
    measurement); None when none does or the frame has fewer than two rows."""
    if len(frame) < 2:
        return None
    for name in frame.columns:
        if name in skip:
            continue
        values = frame[name]
        if values.isna().any() or not values.is_unique:
            continue
        if values.dtype.kind == "f" and not np.all(np.mod(values.to_numpy(), 1) == 0):
            continue
        return str(name)
    return None


def ids_by_row_number(ids: pd.Series | None, frame: pd.DataFrame) -> dict[int, str | None]:
    """Data-row number (as the case diagnostics count them) -> id."""
    if ids is None:
        return {}
    from cfa_tool.data.moments import row_numbers

    return dict(zip(row_numbers(frame).tolist(), ids.tolist()))


def ids_of_several_rows(ids: dict) -> tuple[tuple[str, tuple[int, ...]], ...]:
    """Each id that more than one row holds (``ids``: data-row number -> id, None where a row has none), with the
    numbers of its rows in order, the ids in the order of their first rows; () when every id names one row.  One rule
    for every command that takes an id column (pipeline.inputs.repeated_id_problems; new-user trial s20: a pupil id
    typed twice was named by no command, and the scores file carried it twice)."""
    try:  # every id once, the common case, without building a series (a fixed price of every fit otherwise)
        present = [v for v in ids.values() if not (v is None or v != v)]
        if len(set(present)) == len(present):
            return ()
    except TypeError:  # an id that cannot be hashed or compared (pandas' NA): the series decides
        pass
    named = pd.Series([v for v in ids.values()], index=list(ids.keys()), dtype=object).dropna()
    repeated = named[named.duplicated(keep=False)]
    if not len(repeated):
        return ()
    return tuple((str(value), tuple(int(r) for r in rows.index))
                 for value, rows in repeated.groupby(repeated.astype(str), sort=False))


def repeated_ids(ids: pd.Series | None, what: str) -> Note | None:
    """The sentence on rows that repeat an id of an earlier row (the ids then do not name one row each); None when
    none does."""
    if ids is None:
        return None
    present = ids.dropna()
    repeated = present[present.duplicated()]
    if not len(repeated):
        return None
    return Note((f"{what}: {len(repeated)} row{'s' if len(repeated) != 1 else ''} "
                 f"repeat{'' if len(repeated) != 1 else 's'} an id used by an earlier row",
                 RowId(f" (e.g. '{clipped(str(repeated.iloc[0]), 40)}')"),  # the id apart: a manuscript leaves it out
                 ", so those ids do not name one row each"))


def duplicate_note(ids: pd.Series | None, what: str, repeats: bool = True) -> list[Text]:
    """A note when ids repeat (unless ``repeats`` is False: a command that says it first) or are missing (they
    then do not name one row each)."""
    if ids is None:
        return []
    present = ids.dropna()
    notes = []
    repeated = repeated_ids(ids, what) if repeats else None
    if repeated is not None:
        notes.append(repeated)
    if len(present) < len(ids):
        missing = len(ids) - len(present)
        notes.append(f"{what}: {missing} row{' has' if missing == 1 else 's have'} no id")
    return notes
