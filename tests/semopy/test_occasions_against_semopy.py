"""The configural and metric steps of the ladder over occasions (workflows.occasions) against the same wide models
fitted by semopy, an independent implementation: with complete rows and every intercept free, the full-information
fit of the tool has the chi-square of the covariance structure alone, which semopy fits by maximum likelihood."""

from __future__ import annotations

import pytest

from cfa_tool.workflows.occasions import invariance_over_occasions
from tests.workflows.test_invariance_over_occasions import ONE_OCCASION, people, widened

semopy = pytest.importorskip("semopy", reason="the comparisons with semopy need semopy (pip install '.[test]')")

CONFIGURAL = """vigour_t1 =~ vig1_t1 + vig2_t1 + vig3_t1 + vig4_t1
vigour_t2 =~ vig1_t2 + vig2_t2 + vig3_t2 + vig4_t2
vig1_t1 ~~ vig1_t2
vig2_t1 ~~ vig2_t2
vig3_t1 ~~ vig3_t2
vig4_t1 ~~ vig4_t2
"""
# semopy's own syntax for equal loadings: one label on both
METRIC = CONFIGURAL.replace("vig2_t1 + vig3_t1 + vig4_t1", "l2*vig2_t1 + l3*vig3_t1 + l4*vig4_t1").replace(
    "vig2_t2 + vig3_t2 + vig4_t2", "l2*vig2_t2 + l3*vig3_t2 + l4*vig4_t2")


def test_configural_and_metric_chi_squares_match_semopy():
    long = people(400, 20261205, (0.0, 0.0, 0.5, 0.0))
    ours = invariance_over_occasions(ONE_OCCASION, long, occasion_column="wave", id_column="person_id")
    wide = widened(long).drop(columns=["person_id"])
    for step, description in zip(ours.steps, (CONFIGURAL, METRIC)):
        model = semopy.Model(description)
        model.fit(wide, solver="trust-constr")
        stats = semopy.calc_stats(model).T["Value"]
        assert step.result.fit.df == int(stats["DoF"])
        assert step.result.fit.chi_square == pytest.approx(float(stats["chi2"]), rel=1e-6, abs=1e-6)
