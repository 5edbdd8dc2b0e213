"""Messages about data files that name what is wrong where it is (hostile tester s8, cases 07, 13, 17, 20).

The look-alike characters are named by their Unicode code points and names as the Unicode Character Database
gives them (Python's unicodedata, which the project did not write).  The data are invented (a fictional transit
agency's rider survey)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import ModelError, OptionError, character_names

MODEL = "factor comfort: seat, clean, cool\nfactor courtesy: greet, helpful, polite\n"


@pytest.fixture(scope="module")
def riders() -> pd.DataFrame:
    rng = np.random.default_rng(808)
    eta = rng.normal(size=(200, 2)) @ np.linalg.cholesky([[1, 0.4], [0.4, 1]]).T
    answers = np.repeat(eta, 3, axis=1) * 0.8 + rng.normal(size=(200, 6)) * 0.6
    return pd.DataFrame(np.clip(np.round(answers + 3), 1, 5),
                        columns=["seat", "clean", "cool", "greet", "helpful", "polite"])


@pytest.mark.parametrize("header, named", [
    ("\u0441lean", "U+0441 CYRILLIC SMALL LETTER ES"),  # a Cyrillic es for the Latin c
    ("clean\u200b", "U+200B ZERO WIDTH SPACE"),
    ("clean\u200f", "U+200F RIGHT-TO-LEFT MARK"),
])
def test_a_look_alike_column_name_is_named_by_its_code_points(riders, tmp_path, header, named):
    path = tmp_path / "riders.csv"
    riders.rename(columns={"clean": header}).to_csv(path, index=False)
    with pytest.raises(ModelError) as caught:
        cfa_tool.check(MODEL, str(path))
    assert f"did you mean '{header}' ({named})?" in caught.value.message


def test_an_invisible_character_in_the_model_is_named():
    with pytest.raises(ModelError) as caught:
        cfa_tool.parse_model(MODEL.replace("clean,", "clean\u200b,"))
    assert "unexpected character" in caught.value.message and "(U+200B ZERO WIDTH SPACE)" in caught.value.message


def test_character_names_name_only_what_differs():
    assert character_names("température", "température") == ""
    assert character_names("clean", "clean") == ""
    assert character_names("\u0441lean", "clean") == " (U+0441 CYRILLIC SMALL LETTER ES)"


def test_a_filter_on_numbers_names_the_text_cell(riders, tmp_path):
    data = riders.assign(age=[str(18 + k % 60) for k in range(len(riders))])
    data.loc[3, "age"] = "65+"
    path = tmp_path / "riders.csv"
    data.to_csv(path, index=False)
    with pytest.raises(OptionError) as caught:
        cfa_tool.check(MODEL, str(path), keep="age >= 30")
    assert "'65+' in row 5" in str(caught.value)


def test_explore_leaves_out_a_constant_column_and_platform_records(riders, tmp_path):
    rng = np.random.default_rng(5)
    data = riders.copy()
    data.insert(0, "Progress", 100)
    data.insert(1, "Duration (in seconds)", rng.integers(60, 900, len(data)))
    data.insert(2, "form", 2)  # one version of the questionnaire for every row
    data.insert(3, "Finished", (np.arange(len(data)) % 9 != 0).astype(int))  # 0/1: explored as an item before s14
    path = tmp_path / "export.csv"
    data.to_csv(path, index=False)
    result = cfa_tool.explore(str(path), factors=2, replications=5)
    assert list(result.items) == list(riders.columns)
    note = next(str(n) for n in result.notes if str(n).startswith("Items:"))
    assert "Left out as constant (one value in every row, which says nothing of the other answers): form." in note
    assert "Progress (survey records)" in note and "Duration (in seconds) (survey records)" in note
    assert "Finished (survey records)" in note
