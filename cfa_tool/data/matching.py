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
