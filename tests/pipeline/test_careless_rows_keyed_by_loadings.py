"""Rows that gave one answer to every item are named first also when the model declares no 'reversed' statement
but the fit's loadings key some items as reversed (assessment.reliability.item_keys, which the fit's report names):
the draft model explore writes declares none, and its fit never named the careless rows that the hand-written
model's fit named first (new-user trial s18, finding 13).  Careless responding as a long string of identical answers:
Johnson 2005; Curran 2016 (the rule is the project's own, data.same_answers)."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import simulate_cfa

NAMES = ["a1", "a2", "a3", "a4", "b1", "b2", "b3", "b4"]
DRAFT = "factor a: a1, a2, a3, a4\nfactor b: b1, b2, b3, b4\n"  # no 'reversed' statement, as explore's draft


def _answers() -> pd.DataFrame:
    loadings = np.zeros((8, 2))
    loadings[:4, 0] = (0.8, 0.7, -0.7, 0.6)  # a3 reverse-worded
    loadings[4:, 1] = (0.7, -0.6, 0.8, 0.7)  # b2 reverse-worded
    phi = np.array([[1.0, 0.3], [0.3, 1.0]])
    theta = np.diag(1 - (loadings**2).sum(axis=1))
    data = simulate_cfa(loadings, phi, theta, 400, 7, names=NAMES)
    answers = np.clip(np.round(data * 1.1 + 3), 1, 5)
    answers.iloc[:12] = 1.0  # twelve rows answering 1 throughout, the reversed items included
    return answers


def test_the_fit_of_a_model_without_reversed_statement_names_the_same_answer_rows():
    result = cfa_tool.fit(DRAFT, _answers())
    [said] = [str(p.explanation) for p in result.problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
    assert "12 rows gave the answer 1 to every item they answered" in said
    assert "the 2 items loading against their factors (reversed in the keyed sums) included" in said
    assert "(rows labelled 0, 1, 2, 3, 4, 5, 6, 7, 8, 9 and 2 more)" in said  # a data frame names rows so


def test_a_model_whose_loadings_all_point_one_way_says_nothing_of_it(rider_demo, rider_model):
    data = rider_demo.copy()
    data.iloc[:12, 2:14] = 1  # one answer throughout, but no item keyed against the others: no contradiction
    assert not [p for p in cfa_tool.fit(rider_model, data).problems if p.kind is ProblemKind.SAME_ANSWER_ROWS]
