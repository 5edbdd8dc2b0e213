"""Cautions on a no-answer code held by the columns that choose or group the rows analysed: a row filter's column
(--keep), the group column and the cluster and strata columns.  Codes given with --missing-codes, and the words and
labels that say no answer, apply to the model's items only (docs/data-files.md), so these columns keep such a value
as a value: a filter 'age <= 30' keeps the rows coded -99 as aged at most 30, a cluster column's -99 makes one
cluster of every row without a school, a group column's -99 a group (hostile trial s18, finding 3).  Said first in
every view (composed by pipeline.inputs.data_problems), naming the column, the value and its rows among those
analysed, for a value given with --missing-codes that lies outside the column's other values (one between them is
the column's own: :func:`_codes`) and for one that the screening of the items and the missing-data helpers would
take for a code (data.odd_values: a negative or all-nines whole number far outside the column's other values); the
rows stay in, as the researcher may mean them."""

from __future__ import annotations

import numpy as np
import pandas as pd

from cfa_tool.numbers import user_number, word_list
from cfa_tool.assessment.admissibility import Problem, ProblemKind
from cfa_tool.data.filter_text import filter_text
from cfa_tool.data.kept_rows import rows_listed, row_naming
from cfa_tool.data.moments import row_numbers
from cfa_tool.data.odd_values import OddKind, odd_values
from cfa_tool.data.readers import LoadedData
from cfa_tool.data.sample_design import DesignColumns
from cfa_tool.errors import printable
from cfa_tool.input_files import base_name
from cfa_tool.note_parts import Command, Note
from cfa_tool.options import Option

SHOWN = 3  # rows a caution names before 'and N more'


def column_code_problems(loaded: LoadedData, group: str | None = None,
                         design: DesignColumns | None = None) -> tuple[Problem, ...]:
    """The cautions on no-answer codes in ``loaded``'s row filter columns, its ``group`` column and the cluster and
    strata columns of ``design``, among the rows analysed (``loaded.frame``, the rows the filters kept): one per
    column and value, in the order of the columns' roles (filters, group, cluster, strata)."""
    frame = loaded.frame
    roles: dict[str, list[str]] = {}
    for f in loaded.row_filters:
        roles.setdefault(str(f.column), []).append(f"row filter '{printable(str(f))}'")
    for role, name in (("group", group), ("cluster", getattr(design, "cluster", None)),
                       ("strata", getattr(design, "strata", None))):
        if isinstance(name, str):
            roles.setdefault(name, []).append(role)
    found: list[Problem] = []
    for column, said in roles.items():
        if column not in frame.columns or not _numbers(frame[column]):
            continue
        for value, mask, others, given in _codes(frame, column, loaded.missing_codes):
            found.append(_caution(loaded, column, said, value, mask, others, given))
    return tuple(found)


def _numbers(cells: pd.Series) -> bool:
    return cells.dtype.kind in "iuf"


def _codes(frame: pd.DataFrame, column: str, given: tuple[float, ...]):
    """(value, rows holding it, (lowest, highest) of the column's other values, whether given with --missing-codes)
    for each code ``column`` holds: the ``given`` codes first, then the values the screening of the items takes for a
    missing-value code (data.odd_values, OddKind.MISSING_CODE).  A code given that lies between the lowest and the
    highest of the column's other values is the column's own: depots numbered 1 to 40 hold the items' codes 8 and 9
    as depots, and no caution advises to leave two whole depots out (new-user trial s28, finding 1); one beside them
    (-9 beside depots 1 to 40, 9 beside grades 7 and 8) is named.  The note on the codes other columns keep names
    every one (data.missing_codes.kept_codes_note)."""
    values = frame[column].to_numpy(dtype=float, na_value=np.nan)
    out = []
    for code in dict.fromkeys(float(c) for c in given):
        mask = values == code
        if not mask.any():
            continue
        others = _others(values, mask)
        if others is None or not others[0] < code < others[1]:
            out.append((code, mask, others, True))
    seen = {v for v, *_ in out}
    for odd in odd_values(frame, (column,), row_numbers(frame), values.reshape(-1, 1)):
        if odd.kind is OddKind.MISSING_CODE and float(odd.values[0]) not in seen:
            out.append((float(odd.values[0]), values == odd.values[0], odd.others, False))
    return out


def _others(values: np.ndarray, mask: np.ndarray) -> tuple[float, float] | None:
    rest = values[~mask & ~np.isnan(values)]
    return (float(rest.min()), float(rest.max())) if rest.size else None


def _number(value: float) -> str:
    return f"{user_number(value)}"


def _caution(loaded: LoadedData, column: str, said: list[str], value: float, mask: np.ndarray,
             others: tuple[float, float] | None, given: bool) -> Problem:
    frame = loaded.frame
    count, n = int(mask.sum()), len(frame)
    rows = rows_listed(row_numbers(frame)[mask], SHOWN, naming=row_naming(frame))
    shown = _number(value)
    kinds = word_list(dict.fromkeys("row filter" if s.startswith("row filter") else s for s in said))
    what = (Note(("a value given as a code of no answer", Command(f" ({Option.MISSING_CODES.given(shown)})", ""),
                  ", which applies to the model's items only")) if given else
            f"far outside its other values ({_number(others[0])} to {_number(others[1])})" if others else
            "a value that looks like a missing-value code")
    did = "; ".join(_what_it_did(s, count) for s in said)
    text = (Note((f"The {kinds} column '{printable(column)}' of {base_name(loaded.source)} holds {shown} in {count} "
                  f"of the {n} rows analysed (",)) + rows + "), " + what + f": {did}. A missing-value code kept as a value?")
    keep = filter_text(column, "!=", value) or f"{printable(column)} != {shown}"  # one writer: data.filter_text
    advice = Note(("if it means no answer there, leave those rows out with a row filter",
                   Command(f" ({Option.KEEP.given(keep)})", f" keeping the rows where {keep}"),
                   "; if it is a real value, nothing needs doing."))
    return Problem(ProblemKind.CODE_KEPT_AS_VALUE, (), float(count), text, advice)


def _what_it_did(role: str, count: int) -> str:
    rows = "that row" if count == 1 else f"those {count} rows"
    if role.startswith("row filter"):
        return f"the {role} kept {rows} as meeting it"
    return {"group": f"{rows} are analysed as a group of their own",
            "cluster": f"{rows} are analysed as one cluster",
            "strata": f"{rows} are analysed as one stratum"}[role]
