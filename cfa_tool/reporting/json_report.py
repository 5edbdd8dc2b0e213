"""JSON output: a result's dictionary, with stable key order, the command that made it and its report (so
that ``cfa-tool report`` can write any format later without fitting again)."""

from __future__ import annotations

import json

from cfa_tool.note_parts import Note
from cfa_tool.numerics.plain import clean
from cfa_tool.version import __version__


def to_json(result, report=None) -> str:
    """Any result object with ``to_dict()``: a fit, a comparison, an invariance ladder, a replication...;
    ``report``: its report when the caller has made it already."""
    from cfa_tool.reporting.reports import kind_of, report_of

    payload = {"tool": "cfa-tool", "version": __version__}
    # a result's problems first, after the tool's name and version; cleaned here too, so that a number no result
    # made JSON-ready (NaN, infinity, a numpy scalar) is written as JSON can hold it rather than stopping the run
    payload.update(clean(result.to_dict()))
    payload["command"] = kind_of(result).value
    payload["report"] = (report if report is not None else report_of(result)).to_dict()
    return json.dumps(payload, indent=2, allow_nan=False, default=_text) + "\n"


def _text(value: object) -> str:
    """A line of a result's own (a warning that gives advice, cfa_tool.note_parts.Note) as its reader reads it,
    with the command; the saved report keeps its parts apart."""
    if isinstance(value, Note):
        return str(value)
    raise TypeError(f"{type(value).__name__} is not JSON")
