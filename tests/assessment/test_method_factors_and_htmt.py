"""Method factors (a way of answering, not a trait) get no reliability, Fornell-Larcker or HTMT rows, and
the HTMT table names every pair of trait factors or says why a pair has no ratio.

The HTMT values are checked against the formula of Henseler, Ringle & Sarstedt (2015) written out here:
the mean heterotrait correlation over the geometric mean of the two mean monotrait correlations."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.reliability import reliability
from cfa_tool.errors import ModelError
from cfa_tool.model.implied import ModelMatrices
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import simulate_cfa

WORDING = """factor a: y1, y2, y3, y4
factor b: y5, y6, y7, y8
factor wording: y2, y4, y6, y8
uncorrelated wording, a
uncorrelated wording, b
method wording
"""


@pytest.fixture(scope="module")
def wording_fit():
    # two traits (loadings .7) and a wording factor (loadings .4) on the even items, orthogonal to the traits
    L = np.zeros((8, 3))
    L[:4, 0] = L[4:, 1] = 0.7
    L[[1, 3, 5, 7], 2] = 0.4
    phi = np.array([[1.0, 0.4, 0.0], [0.4, 1.0, 0.0], [0.0, 0.0, 1.0]])
    theta = np.diag(1 - (L @ phi * L).sum(1))
    data = simulate_cfa(L, phi, theta, 3000, seed=11)
    return cfa_tool.fit(WORDING, data), data


def test_method_factor_has_no_reliability_or_htmt_rows(wording_fit):
    result, data = wording_fit
    factors = [r.factor for r in result.groups[0].reliability]
    assert factors == ["a", "b"]
    assert [(h.first, h.second) for h in result.groups[0].htmt] == [("a", "b")]
    # the HTMT of a and b from the formula (Henseler, Ringle & Sarstedt 2015)
    R = np.corrcoef(data.to_numpy().T)
    hetero = R[:4, 4:].mean()
    mono_a = R[:4, :4][np.triu_indices(4, 1)].mean()
    mono_b = R[4:, 4:][np.triu_indices(4, 1)].mean()
    assert result.groups[0].htmt[0].ratio == pytest.approx(hetero / np.sqrt(mono_a * mono_b), abs=1e-12)
    note = T.reliability_table(result).note
    assert "Method factors (wording)" in note
    text = methods_paragraph(result)
    assert "two correlated trait factors (a and b) and one method factor (wording)" in text
    assert "The factor wording stands for a way of answering, not a trait" in text
    assert "cross-loading" not in text
    assert result.to_dict()["reliability"]["factors"][-1]["factor"] == "b"


@pytest.mark.parametrize("extra, message", [
    ("method y1\n", "'y1' is an indicator; 'method' marks factors"),
    ("method wordin\n", "did you mean 'wording'?"),
    ("method wording\n", "'wording' is named as a method factor twice"),
    ("method a, b\n", "every factor is marked as a method factor"),
])
def test_method_statement_errors(extra, message):
    with pytest.raises(ModelError, match=message):
        cfa_tool.parse_model(WORDING + extra) if "a, b" not in extra else cfa_tool.parse_model(
            "factor a: y1, y2, y3\nfactor b: y4, y5, y6\n" + extra)


def test_every_trait_pair_appears_or_says_why():
    # factor c has one item of its own: no monotrait correlation, so no HTMT with it, and the table says so
    L = np.zeros((7, 3))
    L[:3, 0] = L[3:6, 1] = 0.7
    L[6, 2] = 1.0
    P = np.array([[1.0, 0.3, 0.2], [0.3, 1.0, 0.2], [0.2, 0.2, 1.0]])
    T_ = np.diag(np.r_[np.full(6, 0.51), 0.0])
    mats = ModelMatrices(L, np.zeros((3, 3)), P, T_, np.zeros(7), np.zeros(3))
    S = L @ P @ L.T + T_ + np.diag(np.r_[np.zeros(6), 0.5])
    names = tuple(f"y{i}" for i in range(1, 8))
    _, htmt = reliability(mats, names, ("a", "b", "c"), S)
    assert [(h.first, h.second) for h in htmt] == [("a", "b"), ("a", "c"), ("b", "c")]
    assert htmt[0].ratio is not None and htmt[1].ratio is None
    assert htmt[1].why_missing == "c has fewer than two items of its own, so there is no correlation within it to compare with"
