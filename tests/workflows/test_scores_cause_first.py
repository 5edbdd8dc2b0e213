"""In the report of factor scores the cautions on the data come before the cautions on the rows scored that follow
from them, as a fit puts its data's cautions before its own problems (pipeline.inputs.with_odd_values): a code given
with --missing-codes that lies between the answers (3 among 1 to 5) empties 2,250 cells, and rows left without any
answer of a factor are its consequence, said after it (re-check s17, finding 08: the consequence came first).

The data are the bundled demo (a fictional transit agency's rider survey, answers 1 to 5).  Check values: the rows
whose answers to punctuality's items are all 3, counted here by pandas from the CSV file."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

K = ProblemKind


@pytest.fixture(scope="module")
def rider():
    path = resource_dir("demo") / "rider_survey.csv"
    return path, pd.read_csv(path), resource_dir("models") / "rider_three_factors.cfa"


def _kinds(problems):
    return [p.kind for p in problems]


def test_scores_say_the_missing_code_before_the_rows_it_left_without_answers(rider):
    path, data, model = rider
    punctuality = ["on_time", "short_wait", "accurate_info", "easy_transfer"]
    all_threes = int((data[punctuality] == 3).all(axis=1).sum())
    assert all_threes == 18  # counted by pandas from the CSV file: the rows the caution names
    result = cfa_tool.scores(model.read_text(), path, missing_codes=[3])
    kinds = _kinds(result.fit.problems)
    assert kinds[0] is K.ANSWERS_GIVEN_AS_MISSING
    assert K.SCORED_WITHOUT_OWN_ANSWERS in kinds
    assert kinds.index(K.ANSWERS_GIVEN_AS_MISSING) < kinds.index(K.SCORED_WITHOUT_OWN_ANSWERS)
    assert f"{all_threes} rows answered none of the items of punctuality" in str(
        next(p for p in result.fit.problems if p.kind is K.SCORED_WITHOUT_OWN_ANSWERS).explanation)
    assert result.to_dict()["fit"]["problems"][0]["kind"] == K.ANSWERS_GIVEN_AS_MISSING.value


def test_scores_of_other_data_say_the_missing_code_first(rider):
    path, data, model = rider
    fitted = cfa_tool.fit(model.read_text(), data)  # no code given: the fit itself has no caution
    result = fitted.scores(data, missing_codes=[3])
    kinds = _kinds(result.fit.problems)
    assert kinds[0] is K.ANSWERS_GIVEN_AS_MISSING
    assert kinds.index(K.ANSWERS_GIVEN_AS_MISSING) < kinds.index(K.SCORED_WITHOUT_OWN_ANSWERS)


def test_the_scores_box_starts_with_the_missing_code(rider, tmp_path, capsys):
    path, data, model = rider
    code = main(["scores", str(model), "--data", str(path), "--missing-codes", "3",
                 "--output", str(tmp_path / "s.csv")])
    assert code == 0
    out = capsys.readouterr().out
    box = out[out.index("Check before using these scores"):]
    assert box.index("--missing-codes 3 read as no answer") < box.index("rows answered none of the items")
