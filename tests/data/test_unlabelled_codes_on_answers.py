"""A code given with --missing-codes that lies between the answers an unlabelled file's items were given (3 among
answers 1 to 5 of a CSV file or a data frame) is a caution first, as the same code labelled 'Neutral' in an SPSS
file is (hostile trial s17, finding 1): its cells become gaps missing because of their own value.

The data are the bundled demo (a fictional transit agency's rider survey, answers 1 to 5).  Check values: the cells
and rows holding 3, counted here by pandas from the CSV file; the scale's ends, the lowest and highest answer pandas
finds in the items."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.resources import resource_dir


@pytest.fixture(scope="module")
def rider():
    path = resource_dir("demo") / "rider_survey.csv"
    data = pd.read_csv(path)
    items = [c for c in data.columns if c not in ("rider_id", "district")]
    return path, data, items, (resource_dir("models") / "rider_three_factors.cfa").read_text()


@pytest.mark.parametrize("source", ["file", "frame"])
def test_a_missing_code_between_unlabelled_answers_is_a_caution_first(rider, source):
    path, data, items, model = rider
    threes = data[items] == 3
    cells, rows = int(threes.sum().sum()), int(threes.any(axis=1).sum())
    assert (cells, rows) == (2250, 475)  # counted by pandas from the CSV file
    low, high = int(data[items].min().min()), int(data[items].max().max())
    assert (low, high) == (1, 5)
    result = cfa_tool.fit(model, path if source == "file" else data, missing_codes=[3])
    first = result.problems[0]
    assert first.kind is ProblemKind.ANSWERS_GIVEN_AS_MISSING
    text = str(first.explanation)
    assert text.startswith("missing_codes=[3] read as no answer the code 3, which lies in ")
    assert f"between the other answers ({low} to {high}) of 12 items holding it: {cells:,} cells " \
           f"(on_time {int(threes.on_time.sum())}, " in text
    assert f") in {rows} rows became gaps, analysed as missing answers, not as the answer 3." in text
    assert str(first.advice).startswith("If 3 is an answer, leave 3 out of missing_codes")


def test_a_missing_code_outside_the_answers_is_no_caution(rider, tmp_path):
    path, data, items, model = rider
    coded = data.copy()
    coded.loc[[0, 5], "on_time"] = -99
    coded.loc[[7], "clean"] = 9
    result = cfa_tool.fit(model, coded, missing_codes=[-99, 9])
    assert not any(p.kind is ProblemKind.ANSWERS_GIVEN_AS_MISSING for p in result.problems)
    assert any("3 cells holding a code given" in str(n) for n in result.warnings)


def test_the_command_line_says_it_before_the_report(rider, capsys):
    path, data, items, model = rider
    model_path = resource_dir("models") / "rider_three_factors.cfa"
    code = main(["fit", str(model_path), "--data", str(path), "--missing-codes", "3"])
    out = capsys.readouterr().out
    assert code == 0
    head = out.split("Rider experience, three factors")[0]
    assert "--missing-codes 3 read as no answer the code 3" in " ".join(head.replace("│", " ").split())
