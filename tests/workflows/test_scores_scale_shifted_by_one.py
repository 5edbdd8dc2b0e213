"""A follow-up clinic exports 0-3 items coded 1-4 (new-user trial s26).  Scoring it with the earlier fit offered
--missing-codes 4 first (the top answer, about a tenth of every item's answers, read as no answer), and followed, the
run finished without a caution.  Now: the fit-to-data comparison and the model's declared scale recognise a scale
moved by one (data.shifted_scales.scale_shift, the rule that names shifted scales across groups) and advise the
recode in a copy, never a code of no answer that lies on the answers' scale; and an ordinal item whose lowest answer
the fit expects in many rows scored but none gives is a caution first.  The expected counts are checked against the
fit's file's own share of that answer (pandas), which a one-group ordinal fit's first threshold reproduces
(tau_1 = Phi^-1(share of the lowest answer); Muthen 1984)."""
from __future__ import annotations

import re

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.shifted_scales import scale_shift
from cfa_tool.errors import DataError, ModelError

ITEMS = ("q1", "q2", "q3", "q4", "q5")
MODEL = "factor f: q1, q2, q3, q4, q5\nordinal q1..q5\n"


def _answers(n: int, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    e = rng.standard_normal(n)
    return pd.DataFrame({x: np.digitize(.7 * e + .7 * rng.standard_normal(n), [-.6, .4, 1.3]) for x in ITEMS})


@pytest.fixture(scope="module")
def fitted():
    first = _answers(400, 12)
    return cfa_tool.fit(MODEL, first), first


def test_scale_shift_is_the_one_rule():
    assert scale_shift((0, 3), (1, 4)) == 1 and scale_shift((1, 5), (0, 4)) == -1
    assert scale_shift((0, 3), (0, 3)) is None  # on the scale
    assert scale_shift((0, 3), (1, 3)) is None and scale_shift((0, 3), (0, 4)) is None  # an end unused, a wider one


def test_scored_file_coded_one_higher_is_refused_with_the_recode(fitted):
    fit, _ = fitted
    with pytest.raises(DataError) as refused:
        fit.scores(_answers(150, 13) + 1)
    said = str(refused.value)
    assert "'q1', 'q2', 'q3', 'q4', and 'q5' run 1 to 4" in said and "moved by 1" in said
    assert "subtract 1 from their answers in a copy of the file" in said and "missing" not in said


def test_an_answer_off_the_categories_alone_keeps_the_plain_refusal(fitted):
    fit, _ = fitted
    other = _answers(150, 13)
    other.loc[5, "q2"] = 7
    with pytest.raises(DataError, match=r"'q2' has the answer 7 .*; recode it or leave it out$"):
        fit.scores(other)


def test_declared_scale_moved_by_one_is_refused_with_the_recode():
    model = "factor f: q1, q2, q3, q4, q5\nreversed q5 on 0 to 3\nordinal q1..q5\n"
    with pytest.raises(ModelError) as refused:
        cfa_tool.fit(model, _answers(150, 13) + 1)
    said = str(refused.value)
    assert "run 1 to 4, the scale 0 to 3 declared here moved by 1" in said
    assert "subtract 1 from their answers in a copy of the file" in said and "missing-codes" not in said


def test_lowest_answer_never_given_is_a_caution_first(fitted):
    fit, first = fitted
    shifted = _answers(150, 13) + 1
    scored = fit.scores(shifted, missing_codes=[4])  # the top answer read as no answer: 1 to 3 left, as 0 to 2
    problem = scored.fit.problems[0]
    assert problem.kind is ProblemKind.END_ANSWERS_UNUSED
    said = str(problem.explanation)
    for x in ITEMS:
        answered = int((shifted[x] != 4).sum())
        expected = (first[x] == 0).mean() * answered  # the fit's file's share of the answer 0 (pandas)
        shown = re.search(rf"'{x}' never has its lowest answer 0, which the fit expects in about (\d+) of its "
                          rf"{answered} answers", said)
        assert shown and abs(int(shown.group(1)) - expected) <= 1.5, (x, expected, said)
    assert "recode" in str(problem.advice)


def test_a_file_on_the_fits_categories_has_no_such_caution(fitted):
    fit, _ = fitted
    scored = fit.scores(_answers(150, 14))
    assert not any(p.kind is ProblemKind.END_ANSWERS_UNUSED for p in scored.fit.problems)


@pytest.fixture(scope="module")
def fitted_continuous():
    first = _answers(400, 12)
    return cfa_tool.fit("factor f: q1, q2, q3, q4, q5\n", first), first


def test_continuous_items_get_the_same_caution_once(fitted_continuous):
    # items of a 0-3 scale analysed as continuous, scored on a file coded 1 higher with its top answer 4 given as a
    # code of no answer (new-user trial s26): 1 to 3 lie inside the fitted range, so only the unused end shows it
    fit, first = fitted_continuous
    shifted = _answers(150, 13) + 1
    scored = fit.scores(shifted, missing_codes=[4])
    unused = [p for p in scored.fit.problems if p.kind is ProblemKind.END_ANSWERS_UNUSED]
    assert len(unused) == 1 and scored.fit.problems[0] is unused[0]
    said = str(unused[0].explanation)
    for x in ITEMS:
        answered = int((shifted[x] != 4).sum())
        # the fitted normal's share below 0.5 (this tool's approximation of the share of the answer 0), checked
        # loosely against the fit's file's own share of that answer (pandas): the same order of rows
        shown = re.search(rf"'{x}' never has its lowest answer 0, which the fit expects in about (\d+) of its "
                          rf"{answered} answers", said)
        expected = (first[x] == 0).mean() * answered
        assert shown and abs(int(shown.group(1)) - expected) <= 0.35 * expected, (x, expected, said)


def test_a_top_answer_given_as_no_answer_is_a_caution_for_continuous_items(fitted_continuous):
    # the same coding as the fit's, its top answer 3 given with --missing-codes: the highest answer never given
    fit, _ = fitted_continuous
    scored = fit.scores(_answers(150, 14), missing_codes=[3])
    unused = [p for p in scored.fit.problems if p.kind is ProblemKind.END_ANSWERS_UNUSED]
    assert unused and "never has its highest answer 3" in str(unused[0].explanation)
    plain = fit.scores(_answers(150, 14))
    assert not any(p.kind is ProblemKind.END_ANSWERS_UNUSED for p in plain.fit.problems)
