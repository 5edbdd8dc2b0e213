"""What an invariance report says about a step that did not hold: the score tests it names as likely sources of
misfit, the words for a two-group difference, the pointer to partial invariance, and the label of the score tests.

Outside references: the Holzinger & Swineford (1939) data by school, whose scalar step does not hold (as published
analyses of these data report; recalled from memory: the intercepts of x3 and x7 differ between the schools); each
score test is judged here with scipy's chi-square(1) survival function, not the project's."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS, holzinger_swineford


def _flat(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture(scope="module")
def no_search():
    return invariance(THREE_FACTORS, holzinger_swineford(), "school")


def _note(text: str, level: str) -> str:
    start = text.index(f"at the {level} step (")
    return text[start:text.index(". ", text.index("):", start))]


def test_only_significant_score_tests_are_named_as_sources_and_between_the_two_groups(no_search):
    text = _flat(no_search.summary(width=200))
    scalar = next(s for s in no_search.steps if s.level == "scalar")
    assert not scalar.holds
    significant = [c for c in scalar.culprits if stats.chi2.sf(c.index, 1) < 0.05]
    other = [c for c in scalar.culprits if stats.chi2.sf(c.index, 1) >= 0.05]
    assert significant and other
    note = _note(text, "scalar")
    for c in significant[:5]:
        assert f"the intercept of {c.variables[0]} ({c.index:.2f})" in note
    for c in other:
        assert f"({c.index:.2f})" not in note  # before the fix the five largest were listed, 0.43 among them
    assert "in group" not in note  # two groups: the difference is between them, not in one
    assert "each a difference between Grant-White and Pasteur" in note


def test_a_failed_step_without_a_search_points_to_partial_invariance(no_search):
    text = _flat(no_search.summary(width=200))
    assert "To test partial invariance" in text
    assert "(partial='auto')" in text  # the option as the caller gives it (Python here; --partial auto on the command line)
    top = next(s for s in no_search.steps if s.level == "scalar").culprits[0]
    assert f"'noninvariant intercept({top.variables[0]})'" in text


def test_a_search_run_has_no_pointer_to_itself():
    searched = invariance(THREE_FACTORS, holzinger_swineford(), "school", partial="auto")
    assert "To test partial invariance" not in _flat(searched.summary(width=200))


def test_normal_theory_score_tests_cite_sorbom_with_his_spelling(no_search):
    text = no_search.summary(width=200)
    assert "Sörbom 1989" in text and "Sorbom" not in text
    assert "Sörbom 1989" in no_search.to_dict()["score_tests"]["description"]


def test_ordinal_score_tests_are_said_to_be_those_of_least_squares():
    rng = np.random.default_rng(3)
    cuts = np.array([-1.0, 0.0, 1.0])

    def draw(n, shift):
        eta = rng.normal(size=(n, 1))
        x = eta * 0.7 + rng.normal(size=(n, 4)) * np.sqrt(0.51)
        x[:, 1] += shift
        return pd.DataFrame(np.column_stack([np.searchsorted(cuts, x[:, j]) + 1 for j in range(4)]).astype(float),
                            columns=["q1", "q2", "q3", "q4"])

    data = pd.concat([draw(600, 0.0).assign(site="north"), draw(600, 0.9).assign(site="south")], ignore_index=True)
    result = invariance("factor f: q1..q4\nordinal q1..q4\n", data, "site")
    text = _flat(result.summary(width=200))
    assert "least-squares fit on thresholds and polychoric correlations" in text
    assert "full-information" not in text and "expected information" not in text
    assert result.to_dict()["score_tests"]["name"] == "robust least squares"
