"""Check a model's variable names against the columns of a data set."""

from __future__ import annotations

from cfa_tool.suggest import close_names
from cfa_tool.errors import ModelError
from cfa_tool.language.spec import Spec
from cfa_tool.data.odd_values import code_like


def check_columns(spec: Spec, columns: list[str], data_source: str, sheet_hint: str = "") -> None:
    """Every observed indicator must be a column; no factor may share a column's name.  ``sheet_hint``: which
    sheet of a workbook of several was read (``LoadedData.sheet_hint``), said when a variable is not found."""
    available = set(columns)
    data_name = data_source.replace("\\", "/").rsplit("/", 1)[-1]
    for factor in spec.factors:
        if factor.name.text in available:
            loc = factor.name.location
            raise ModelError(
                f"'{factor.name}' is declared as a factor but is also a column of {data_name}; give the factor another name",
                loc,
                spec.source_line(loc),
            )
    for name in spec.observed_names:
        if name not in available:
            loc = spec.first_mention(name)
            guess = close_names(name, columns)
            hint = f"; did you mean '{guess[0]}'?" if guess else sheet_hint
            raise ModelError(
                f"unknown variable '{name}' (not a column of {data_name}{hint})",
                loc,
                spec.source_line(loc),
            )


def check_declared_ranges(spec: Spec, frame, data_source: str) -> None:
    """Answers of items declared with 'reversed ... on MIN to MAX' must lie on that scale."""
    import numpy as np
    import pandas as pd

    data_name = data_source.replace("\\", "/").rsplit("/", 1)[-1]
    for keying in spec.reversed:
        for name in keying.items:
            if name.text not in frame.columns:
                continue
            values = pd.to_numeric(frame[name.text], errors="coerce").to_numpy(dtype=float)
            outside = values[np.isfinite(values) & ((values < keying.minimum) | (values > keying.maximum))]
            if len(outside):
                found = (f"the answer {outside.min():g}" if outside.min() == outside.max()
                         else f"answers from {outside.min():g} to {outside.max():g}")
                codes = sorted(set(outside.tolist()))
                advice = (f"if {' and '.join(f'{c:g}' for c in codes[:3])} "
                          f"{'means' if len(codes) == 1 else 'mean'} 'no answer', give --missing-codes "
                          f"{','.join(f'{c:g}' for c in codes[:3])}; otherwise give the scale's real lowest and highest "
                          f"answers" if len(codes) <= 3 and all(code_like(c) for c in codes)
                          else "give the scale's real lowest and highest answers")
                raise ModelError(
                    f"'{name}' has {found} in {data_name}, outside the scale {keying.minimum:g} to {keying.maximum:g} "
                    f"declared here; {advice}",
                    name.location,
                    spec.source_line(name.location),
                )


def answer_range_notes(spec: Spec, frame, data_source: str, value_labels: dict | None = None,
                       values=None) -> list[str]:
    """Answers that look impossible without being refused, named first in every view (column, value, rows):

    * answers of the other items of a factor that a 'reversed ... on MIN to MAX' statement keys, outside that
      scale (the statement's items themselves are refused by :func:`check_declared_ranges`; their partners may
      be answered on another scale, so they are named, not refused);
    * values of an item that has value labels (SPSS, Stata) but not for that value, such as an 8 in an item
      labelled 1 to 7.

    ``values``: the model's items (``spec.observed_names``) of ``frame`` as ``data.moments.item_values`` takes them
    out, when it could (None: each column judged is read on its own).  Only the columns a declared scale or value
    labels judge are read: a model without either costs nothing here."""
    import numpy as np

    labels = value_labels or {}
    scale_of = _declared_scales(spec, frame) if spec.reversed else {}
    judged = [x for x in spec.observed_names if x in scale_of or (labels.get(x) and x in frame.columns)]
    if not judged:
        return []
    from cfa_tool.data.moments import row_numbers

    data_name = data_source.replace("\\", "/").rsplit("/", 1)[-1]
    columns = _answer_columns(frame, judged, spec.observed_names, values)
    out = []
    rows = None

    def listed(mask) -> str:
        nonlocal rows
        rows = row_numbers(frame) if rows is None else rows
        where = rows[mask]
        shown = ", ".join(str(r) for r in where[:5])
        return f"data row{'s' if len(where) > 1 else ''} {shown}" + (f" and {len(where) - 5} more" if len(where) > 5 else "")

    for x in judged:
        column = columns.get(x)
        if column is None:  # not numbers to compute with: the reading of the items says so
            continue
        answered = np.isfinite(column)
        if x in scale_of:
            low, high, factor = scale_of[x]
            for v in np.unique(column[answered & ((column < low) | (column > high))]).tolist():
                out.append(f"{data_name}: '{x}' has the answer {v:g} ({listed(column == v)}), outside the scale "
                           f"{low:g} to {high:g} that the 'reversed' statement declares for the items of {factor}; "
                           f"check the answer, or give --missing-codes if it means 'no answer'")
            continue
        known = [float(k) for k in labels[x] if isinstance(k, (int, float))]
        if known:
            for v in np.unique(column[answered & ~np.isin(column, known)]).tolist():
                out.append(f"{data_name}: '{x}' has the value {v:g} ({listed(column == v)}), which has no value "
                           f"label, while its other values are labelled; check the answer, or give --missing-codes "
                           f"if it means 'no answer'")
    return out


def _declared_scales(spec: Spec, frame) -> dict[str, tuple[float, float, str]]:
    """Item -> (min, max, factor) for the items of a factor whose reversed items declare one scale, other than
    those reversed items themselves (and other than the items of method and exploratory factors)."""
    declared = spec.reverse_keyed
    unkeyed = spec.method_factors | spec.exploratory_factors
    scale_of: dict[str, tuple[float, float, str]] = {}
    for factor in spec.factors:
        if factor.name.text in unkeyed:
            continue
        names = [i.text for i in factor.indicators]
        keyed = [declared[x] for x in names if x in declared]
        if len(set(keyed)) == 1:  # one declared scale for the factor's reversed items
            for x in names:
                if x not in declared and x in frame.columns:
                    scale_of.setdefault(x, (*keyed[0], factor.name.text))
    return scale_of


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
