"""The likeliest sources of misfit of an invariance step: an item's thresholds whose score tests come out as one
statistic (an item of few answer categories, whose thresholds' equalities the identification ties together; Wu &
Estabrook 2016) are one source, named once with their numbers, so that they do not fill the list of the five largest
(new-user trial s18, 09: 'threshold 1 / 2 / 3 of belonging_acceptance_04 (10.53)' three times).  The significance
rule is the chi-square(1) tail at the step's level, checked against scipy."""

from __future__ import annotations

from types import SimpleNamespace

from scipy import stats

from cfa_tool.assessment.modification import ModificationIndex
from cfa_tool.reporting.workflow_tables import _misfit_sources


def _test(kind, variables, index, group=None):
    return ModificationIndex(kind, variables, index, 0.1, 0.1, group)


def test_one_items_thresholds_with_one_test_are_one_source():
    culprits = (_test("threshold", ("acc4", "1"), 10.53), _test("threshold", ("acc4", "2"), 10.53),
                _test("threshold", ("acc4", "3"), 10.53 + 1e-9), _test("threshold", ("peer2", "1"), 9.1),
                _test("loading", ("peer", "peer3"), 8.0), _test("threshold", ("peer2", "2"), 7.5),
                _test("intercept", ("teach1",), 6.9), _test("threshold", ("eng1", "1"), 6.0),
                _test("threshold", ("eng1", "2"), 2.0))
    assert stats.chi2.sf(6.0, 1) < 0.05 < stats.chi2.sf(2.0, 1)  # eight of the nine are significant at .05
    result = SimpleNamespace(groups=("female", "male"), alpha=0.05, score_tests=SimpleNamespace(phrase="score tests"))
    step = SimpleNamespace(culprits=culprits, level="thresholds", stopped=True)
    text = str(_misfit_sources(step, result))
    assert text == ("Likeliest sources of misfit at the thresholds step (score tests; the 5 largest of the 6 significant "
                    "at .05, each a difference between female and male): thresholds 1, 2 and 3 of acc4 (10.53, one "
                    "score test for the 3); threshold 1 of peer2 (9.10); the loading of peer3 on peer (8.00); threshold 2 of "
                    "peer2 (7.50); the intercept of teach1 (6.90).")
