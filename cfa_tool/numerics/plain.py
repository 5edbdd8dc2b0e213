"""Plain Python values for JSON: what every result's ``to_dict()`` passes its numbers through."""

from __future__ import annotations

import math

import numpy as np


def clean(value):
    """JSON-safe: NaN and infinities become None, numpy scalars become Python numbers, tuples lists."""
    if isinstance(value, (float, np.floating)):
        value = float(value)
        return value if math.isfinite(value) else None
    if isinstance(value, np.integer):
        return int(value)
    if isinstance(value, (list, tuple)):
        return [clean(v) for v in value]
    if isinstance(value, dict):
        return {k: clean(v) for k, v in value.items()}
    return value
