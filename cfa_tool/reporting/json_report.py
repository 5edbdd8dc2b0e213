"""JSON output: a result's dictionary, with stable key order, the command that made it and its report (so
that ``cfa-tool report`` can write any format later without fitting again)."""

from __future__ import annotations

import json

from cfa_tool.note_parts import RUNNING, Note, View
from cfa_tool.numerics.plain import clean
from cfa_tool.version import __version__


def to_json(result, report=None) -> str:
    """Any result object with ``to_dict()``: a fit, a comparison, an invariance ladder, a replication...;
    ``report``: its report when the caller has made it already."""
    from cfa_tool.reporting.reports import kind_of, report_of

    payload = {"tool": "cfa-tool", "version": __version__}
    # a result's problems first, after the tool's name and version; cleaned here too, so that a number no result
    # made JSON-ready (NaN, infinity, a numpy scalar) is written as JSON can hold it rather than stopping the run
    command = kind_of(result).value
    view = View(commands=True, running=command)
    payload.update(_as_read(clean(result.to_dict()), view))
    payload["command"] = command
    payload["report"] = (report if report is not None else report_of(result)).to_dict()
    return json.dumps(payload, indent=2, allow_nan=False, default=lambda value: _text(value, view)) + "\n"


def _text(value: object, view: View = RUNNING) -> str:
    """A line of a result's own (a warning that gives advice, cfa_tool.note_parts.Note) as the reader of the
    command's report reads it (``view``), with the command; the saved report keeps its parts apart."""
    if isinstance(value, Note):
        return value.said(view)
    raise TypeError(f"{type(value).__name__} is not JSON")


def _as_read(value, view: View):
    """``value`` (a result's dictionary) with each line saved beside its parts ('advice' beside 'advice_parts',
    assessment.admissibility.Problem.to_dict) written again from the parts as the reader of the command's report
    reads it (``view``): a fit inside compare's result advises no 'cfa-tool compare' (s24: the views said it right,
    the JSON's text did not)."""
    if isinstance(value, list):
        return [_as_read(v, view) for v in value]
    if not isinstance(value, dict):
        return value
    out = {k: _as_read(v, view) for k, v in value.items()}
    for key, parts in value.items():
        name = key[:-len("_parts")] if isinstance(key, str) and key.endswith("_parts") else None
        if name and isinstance(out.get(name), str) and isinstance(parts, list):
            try:
                out[name] = Note.from_dict({"parts": parts}).said(view)
            except (ValueError, TypeError, KeyError):  # parts of another kind: the line as saved
                pass
    return out
