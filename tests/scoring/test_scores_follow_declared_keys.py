"""Scores and keyed sums follow a 'reversed' statement (one keying rule with the fit's reliability:
assessment.reliability.item_keys).  Data: the simulated traits of tests/pipeline/test_reverse_keyed_orientation.py,
whose keyed means are computed by hand there (a reversed answer counts as its negative)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from tests.pipeline.test_reverse_keyed_orientation import KEYS, STRUCTURE, keyed_answers, keyed_means


@pytest.fixture(scope="module")
def answers():
    return keyed_answers()


def test_factor_scores_rise_with_the_declared_keyed_means(answers):
    result = cfa_tool.scores(STRUCTURE + KEYS, answers, methods=["regression", "bartlett"])
    by_hand = keyed_means(answers)
    for j, factor in enumerate(("f", "g", "h")):
        for method in ("regression", "bartlett"):
            r = np.corrcoef(result.table[f"{factor}_{method}"], by_hand[:, j])[0, 1]
            assert r > 0.9, (factor, method, r)  # a flipped factor gave r near -.98 (new-user trial U2)


def test_sums_and_reliability_key_the_items_by_one_rule(answers):
    # the model's own fix turns f against its keys; the declaration still keys the sums, in the scores report as
    # in the fit's reliability
    model = STRUCTURE + KEYS + "fix loading(f, a1) = 1\n"
    fitted = {r.factor: r.reversed for r in cfa_tool.fit(model, answers).groups[0].reliability}
    sums = {s.factor: s.reversed_items for s in cfa_tool.scores(model, answers).quality[0].sums}
    assert sums == fitted == {"f": ("a1",), "g": ("b2",), "h": ("c1", "c2", "c3")}
    # without a statement both key by the loadings' signs: f's marker a1 then counts as the reversed one
    plain_fit = {r.factor: r.reversed for r in cfa_tool.fit(STRUCTURE, answers).groups[0].reliability}
    plain_sums = {s.factor: s.reversed_items for s in cfa_tool.scores(STRUCTURE, answers).quality[0].sums}
    assert plain_sums == plain_fit == {"f": ("a1",), "g": ("b2",), "h": ()}
