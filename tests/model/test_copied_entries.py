"""The model matrices at theta are the fixed values with the parameters copied in when every entry is a fixed value or one
parameter itself (model.implied.StructuredModel._copied_entries): the same numbers, bit for bit, as the general map
entries = offset + J theta (parameters.ParameterTable.mapping), which is the definition checked against here."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.language.parser import parse_model
from cfa_tool.pipeline.continuous import model_structure

MODELS = [
    "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n",
    "factor a: x1, x2, x3\nfactor b: x4, x5, x6\nequal loading(a, x2), loading(b, x5)\ncovary x1, x4\n",
    "factor a: x1, x2, x3\nfactor b: x4, x5, x6\nfactor c: x7, x8, x9\nfactor g: a, b, c\n",
    "factor a: x1, x2, x3, x4\nfactor b: x5, x6, x7, x8\nfix loading(b, x6) = 0.5\nscale latent by variance\n",
]
EFFECTS = "factor a: x1, x2, x3, x4\nfactor b: x5, x6, x7, x8\nscale a by effects\n"  # one group only


def _general(model, theta, g):
    size, take, at, pieces = model._layouts[g]
    buffer = np.zeros(size)
    buffer[at] = (model._offset[g] + model._J[g] @ theta)[take]
    return [buffer[a:b].reshape(shape) for a, b, shape in pieces]


@pytest.mark.parametrize("text, groups", [(text, groups) for text in MODELS for groups in (None, ("north", "south"))]
                         + [(EFFECTS, None)])
def test_matrices_equal_the_general_map_bit_for_bit(text, groups):
    table, model = model_structure(parse_model(text), groups, groups is not None)
    rng = np.random.default_rng(20261203)
    for _ in range(10):
        theta = rng.normal(size=table.n_free) * 3
        for g in range(table.n_groups):
            mats = model.matrices(theta, g)
            for name, expected in zip("LBPTNM", _general(model, theta, g)):
                assert np.array_equal(getattr(mats, name), expected), name


def test_the_usual_model_copies_and_a_missing_parameter_spreads_as_before():
    table, model = model_structure(parse_model(MODELS[0]), None, False)
    assert model._copies[0] is not None  # one parameter per entry: the copy applies
    theta = np.ones(table.n_free)
    theta[0] = np.nan  # the general path: NaN reaches every entry through J theta (0 * NaN)
    mats = model.matrices(theta)
    expected = _general(model, theta, 0)
    for name, want in zip("LBPTNM", expected):
        assert np.array_equal(getattr(mats, name), want, equal_nan=True), name
    assert np.isnan(mats.L[0, 0]) and np.isnan(mats.P).all()  # the fixed marker loading too
