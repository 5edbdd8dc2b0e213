"""Keyed sums that no majority or no loading size can key (assessment.reliability.item_keys).

1. A weak item (standardized loading below .20 in size, common practice's line of a negligible loading) has a sign
   that sampling error turns: it must neither be reversed in a sum keyed by the loadings' signs nor vote on the
   factor's direction, in the fit's reliability and in the scores' sums alike (words s24's closing note).
2. A balanced scale's halves are keyed and named in one order in every group (the model's), not by the sign of each
   group's sum of loadings.

Data: simulated here with fixed seeds from populations stated beside them; the check values are the constructions
(which items load which way, which are weak) and numpy's keyed sums."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import simulate_cfa


def _weak_item_answers() -> pd.DataFrame:
    """Two factors correlating .4; a1..a4 load .7, a5 -.05 (a weak item, by construction), b1..b4 .7 (invented)."""
    L = np.zeros((9, 2))
    L[:5, 0] = [0.7, 0.7, 0.7, 0.7, -0.05]
    L[5:, 1] = 0.7
    names = ["a1", "a2", "a3", "a4", "a5", "b1", "b2", "b3", "b4"]
    return simulate_cfa(L, np.array([[1.0, 0.4], [0.4, 1.0]]), np.diag(1.0 - (L**2).sum(axis=1)), 500, 2512, names)


def test_a_weak_item_is_not_reversed_by_its_sign_in_the_fit_and_the_scores():
    data = _weak_item_answers()
    model = "factor a: a1..a5\nfactor b: b1..b4\n"
    result = cfa_tool.scores(model, data, methods="item-sum")
    fit = result.fit
    [a5] = [e.standardized for e in fit.estimates if e.kind == "loading" and e.variables == ("a", "a5")]
    assert -0.2 < a5 < 0  # the case: weak, and its sign below zero
    (row,) = [r for r in fit.groups[0].reliability if r.factor == "a"]
    assert row.reversed == () and not row.points_against
    sums = {s.factor: s for s in result.quality[0].sums}
    assert sums["a"].reversed_items == ()
    # the scores' keyed sum is the plain sum of a1..a5 (numpy), and its omega the fit's
    np.testing.assert_allclose(result.table["a_item_sum"].to_numpy(),
                               data[["a1", "a2", "a3", "a4", "a5"]].sum(axis=1).to_numpy(), rtol=1e-12)
    assert sums["a"].omega == pytest.approx(row.omega, rel=1e-10)


def test_weak_items_do_not_split_a_factor_against_the_declared_keying():
    # a1, a2 load .7, a3 and a4 -.08 (weak, by construction); b2 of the other factor is declared reversed, so the
    # model keys by its statement: the weak items' signs made a tie of two against two, which is a contradiction of
    # the declared keying; without their votes the keying holds and the reliability is given (invented population)
    L = np.zeros((7, 2))
    L[:4, 0] = [0.7, 0.7, -0.08, -0.08]
    L[4:, 1] = [0.7, -0.7, 0.7]
    names = ["a1", "a2", "a3", "a4", "b1", "b2", "b3"]
    data = simulate_cfa(L, np.array([[1.0, 0.3], [0.3, 1.0]]), np.diag(1.0 - (L**2).sum(axis=1)), 500, 2513, names)
    fit = cfa_tool.fit("factor a: a1..a4\nfactor b: b1..b3\nreversed b2 on -9 to 9\n", data)
    weak = [e.standardized for e in fit.estimates if e.kind == "loading" and e.variables in (("a", "a3"), ("a", "a4"))]
    assert all(-0.2 < v < 0 for v in weak)  # the case: both weak, both below zero
    row = next(r for r in fit.groups[0].reliability if r.factor == "a")
    assert not row.evenly_split and row.against_keying == ()
    assert not [p for p in fit.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
    assert not [w for w in fit.warnings if "half of its items" in str(w)]
    # the population's omega of the sum keyed as declared (every key +1), by McDonald's (1999) formula with numpy:
    # (sum lambda)^2 / ((sum lambda)^2 + sum theta) = 1.24^2 / (1.24^2 + 3.007) = .34; the fit's within sampling error
    lam = L[:4, 0]
    population = lam.sum() ** 2 / (lam.sum() ** 2 + (1.0 - lam**2).sum())
    assert row.omega == pytest.approx(population, abs=0.1)


def test_a_balanced_scale_is_keyed_in_one_order_in_every_group():
    # loadings .7 with signs -, +, -, + in three groups (invented); the sign of each group's sum of loadings varies
    L = np.array([[-0.7], [0.7], [-0.7], [0.7]])
    frames = []
    for seed, label in ((31, "east"), (32, "west"), (33, "north")):
        frame = simulate_cfa(L, np.eye(1), np.diag(np.full(4, 0.51)), 600, seed, ["d1", "d2", "d3", "d4"])
        frames.append(frame.assign(site=label))
    result = cfa_tool.fit("factor k: d1..d4\n", pd.concat(frames, ignore_index=True), group="site")
    assert {g.reliability[0].reversed for g in result.groups} == {("d2", "d4")}
    said = [str(w) for w in result.warnings if "half of its items load each way" in str(w)]
    assert len(said) == 3 and all("(d1, d3 against d2, d4)" in w for w in said)
