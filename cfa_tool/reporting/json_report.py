"""JSON output: a result's dictionary, with stable key order."""

from __future__ import annotations

import json

from cfa_tool.version import __version__


def to_json(result) -> str:
    """Any result object with ``to_dict()``: a fit, a comparison, an invariance ladder, a replication."""
    payload = {"tool": "cfa-tool", "version": __version__}
    payload.update(result.to_dict())
    return json.dumps(payload, indent=2, allow_nan=False) + "\n"
