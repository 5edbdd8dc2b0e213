"""compare, invariance and scores parse the sampling weights once, as fit and check do
(tests/inference/test_sample_design.py): the check of the design, the caution about groups weighted out and the
rows the scoring model comes from all read the weights parsed when the data are read."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import THREE_FACTORS


def _problems(command, result):
    if command == "compare":
        return result.problems
    if command == "invariance":
        return result.data_problems
    return result.fit.problems


@pytest.mark.parametrize("command", ["compare", "invariance", "scores"])
def test_the_weights_are_parsed_once_by_compare_invariance_and_scores(hs_data, monkeypatch, command):
    from cfa_tool.data import sample_design

    k = np.arange(len(hs_data))
    data = hs_data.assign(grp=np.where(k % 3 == 0, "c", np.where(k % 3 == 1, "a", "b")),
                          w=np.where(k % 3 == 0, 0.0, 1.0 + (k % 2)))
    parsed, unparsed = [], []
    parse, weighted_out = sample_design._weights, sample_design.groups_weighted_out
    monkeypatch.setattr(sample_design, "_weights", lambda *a: parsed.append(1) or parse(*a))
    monkeypatch.setattr(sample_design, "groups_weighted_out",
                        lambda frame, weights, group, w=None: unparsed.append(w is None) or weighted_out(frame, weights,
                                                                                                          group, w))
    if command == "compare":
        result = cfa_tool.compare([THREE_FACTORS, THREE_FACTORS + "covary x1, x4\n"], data, group="grp", weights="w")
    elif command == "invariance":
        result = cfa_tool.invariance(THREE_FACTORS, data, "grp", weights="w", partial="none")
    else:
        result = cfa_tool.scores(THREE_FACTORS, data, group="grp", weights="w")
    assert len(parsed) == 1 and unparsed and not any(unparsed)
    # the caution as before: the group 'c' of weight 0 named, its row count taken from the data (every third row)
    said = f"very row of group 'c' ({int((k % 3 == 0).sum())} rows) of 'grp' has weight 0 in 'w'"
    assert any(p.kind is ProblemKind.GROUP_WEIGHTED_OUT and said in p.explanation for p in _problems(command, result))


def test_compare_reads_each_compared_row_s_own_weight(hs_data):
    """The weights parsed for every row read are matched to the rows compared (rows without a group value and rows
    without answers left out first): the comparison's first model is the fit of the same rows with their weights."""
    k = np.arange(len(hs_data))
    data = hs_data.assign(grp=np.where(k % 2 == 0, "a", "b"), w=1.0 + (k % 5) / 2)
    data.loc[data.index[::7], "grp"] = None
    data.loc[data.index[3::11], "x1"] = np.nan
    compared = cfa_tool.compare([THREE_FACTORS, THREE_FACTORS + "covary x1, x4\n"], data, group="grp", weights="w",
                                missing="listwise")
    alone = cfa_tool.fit(THREE_FACTORS, data, group="grp", weights="w", missing="listwise")
    assert compared.results[0].fit.chi_square == pytest.approx(alone.fit.chi_square, rel=1e-8)
