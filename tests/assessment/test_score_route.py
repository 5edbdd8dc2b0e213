"""The score tests take the route the objective declares (estimation.objective.ScoreRoute), not the one an attribute's
presence suggests: full-information ML declared general goes the general route of (q, p, p) derivatives, never
reading its candidate_scores, and both routes give the same indices (the rank-two formulas are the general ones,
Sorbom 1989's statistic; model/rank_two.py).  Holzinger & Swineford (1939) data, the three-factor model, with gaps
drawn at random (a fixed seed)."""

import numpy as np
import pytest

import cfa_tool
from cfa_tool.estimation import fiml
from cfa_tool.estimation.objective import ScoreRoute
from tests.conftest import THREE_FACTORS


def test_a_likelihood_declared_general_takes_the_general_route(hs_data, monkeypatch):
    gaps = hs_data.copy()
    rng = np.random.default_rng(11)
    for column in [f"x{i}" for i in range(1, 10)]:
        gaps.loc[rng.random(len(gaps)) < 0.08, column] = np.nan
    rank_two = cfa_tool.fit(THREE_FACTORS, gaps, missing="full-information", diagnostics=False).modification_indices

    def refused(self):
        raise AssertionError("the rank-two route was taken")

    monkeypatch.setattr(fiml.MissingDataLikelihood, "score_route", ScoreRoute.GENERAL)
    monkeypatch.setattr(fiml.MissingDataLikelihood, "candidate_scores", property(refused))
    general = cfa_tool.fit(THREE_FACTORS, gaps, missing="full-information", diagnostics=False).modification_indices
    assert len(general) == len(rank_two) == 54  # 18 cross-loadings, 36 residual covariances
    found = {(r.kind, r.variables): r.index for r in general}
    for row in rank_two:
        assert found[(row.kind, row.variables)] == pytest.approx(row.index, rel=1e-8, abs=1e-10)
    assert rank_two[0].index > 20  # x9 on visual leads, as with complete rows (36.4 there, recalled from memory)
