"""Rows identical in every column to an earlier row (an export appended to itself) are named first in every view that
analyses rows, with the pairs by row number and id; a file without copies gets no caution, and a file of answers
alone, whose respondents may answer alike, only when the copies are many (a rule of thumb of this project)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.copied_rows import copied_rows, numbering_column

MODEL = "factor f: y1, y2, y3, y4, y5, y6\n"


@pytest.fixture(scope="module")
def riders() -> pd.DataFrame:
    """300 simulated riders (seed 17): an id, a district and six answers on 1 to 5, a few left empty."""
    rng = np.random.default_rng(17)
    f = rng.normal(size=300)
    frame = pd.DataFrame({"rider": [f"R{i:04d}" for i in range(1, 301)],
                          "district": np.where(np.arange(300) % 2 == 0, "north", "south")})
    for j in range(1, 7):
        frame[f"y{j}"] = np.clip(np.round(3 + 0.9 * f + rng.normal(scale=0.8, size=300)), 1, 5)
    frame.loc[frame.index[::37], "y3"] = np.nan
    return frame


def _kinds(problems) -> list:
    return [p.kind for p in problems]


def test_copies_agree_with_pandas_duplicated(riders):
    # the outside reference: pandas' DataFrame.duplicated (keep='first') marks the same rows as copies
    doubled = pd.concat([riders, riders.iloc[[5, 40, 41, 299]]], ignore_index=True)
    numbers = np.arange(1, len(doubled) + 1)
    items = [f"y{j}" for j in range(1, 7)]
    found = copied_rows(doubled, numbers, doubled[items].to_numpy(dtype=float))
    expected = numbers[doubled.duplicated(keep="first").to_numpy()]
    assert list(found.copies) == expected.tolist() == [301, 302, 303, 304]
    assert list(found.originals) == [6, 41, 42, 300]
    assert copied_rows(doubled, numbers) == found  # without the item block: the same rows
    assert copied_rows(riders, np.arange(1, 301), riders[items].to_numpy(dtype=float)) is None
    # a row that differs from an earlier one only in its id is not a copy (the items alone agree)
    renamed = doubled.copy()
    renamed.loc[300, "rider"] = "R9999"
    assert list(copied_rows(renamed, numbers, renamed[items].to_numpy(dtype=float)).copies) == [302, 303, 304]


def test_a_row_number_column_is_left_out_of_the_comparison(riders):
    doubled = pd.concat([riders, riders], ignore_index=True)
    doubled.insert(0, "line", np.arange(1, 601))
    assert numbering_column(doubled) == "line"
    found = copied_rows(doubled, np.arange(1, 601))
    assert found.numbering == "line" and len(found) == 300 and found.copies[0] == 301 and found.originals[0] == 1
    restarted = doubled.assign(line=np.tile(np.arange(1, 301), 2))  # numbered anew in each half: not a numbering
    assert numbering_column(restarted) is None and len(copied_rows(restarted, np.arange(1, 601))) == 300


def test_a_file_appended_to_itself_is_named_first_by_fit_check_compare_and_invariance(riders, tmp_path):
    path = tmp_path / "twice.csv"
    pd.concat([riders, riders]).to_csv(path, index=False)
    fitted = cfa_tool.fit(MODEL, path)
    first = fitted.problems[0]
    assert first.kind is ProblemKind.COPIED_ROWS and not first.kind.inadmissible
    # csv rows: the header is line 1, so the first data row is row 2 and its copy row 302
    assert first.explanation.startswith("300 of the 600 rows analysed are identical in every column to an earlier "
                                        "row: row 302 repeats row 2; row 303 repeats row 3;")
    assert "and 295 more" in first.explanation
    # s20 (new-user item 12): rows identical in every column have no column a row filter could tell them apart by,
    # so the advice is only the remedy that applies; a row-number column gives a filter
    assert "keep" not in first.advice and "delete the copies in a copy of the data file" in first.advice
    numbered = tmp_path / "numbered.csv"
    pd.concat([riders, riders]).assign(line=np.arange(1, 601)).to_csv(numbered, index=False)
    advice = cfa_tool.fit(MODEL, numbered).problems[0].advice
    assert "keep" in advice and "on a column that tells them apart" in advice and "line < 301" in advice
    assert _kinds(cfa_tool.fit(MODEL, path, id_column="rider").problems)[0] is ProblemKind.COPIED_ROWS
    with_ids = cfa_tool.fit(MODEL, path, id_column="rider").problems[0].explanation
    assert "row 302 (R0001) repeats row 2 (R0001)" in with_ids
    assert ProblemKind.COPIED_ROWS in _kinds(cfa_tool.check(MODEL, path).problems)
    compared = cfa_tool.compare([MODEL, MODEL + "equal loading(f, y2), loading(f, y3)\n"], path)
    assert ProblemKind.COPIED_ROWS in _kinds(compared.problems)
    ladder = cfa_tool.invariance(MODEL, path, group="district")
    assert any("identical in every column to an earlier row" in w for w in ladder.warnings)
    explored = cfa_tool.explore(path, items=[f"y{j}" for j in range(1, 7)], factors=1)
    assert _kinds(explored.data_problems)[0] is ProblemKind.COPIED_ROWS
    clean = tmp_path / "once.csv"
    riders.to_csv(clean, index=False)
    assert ProblemKind.COPIED_ROWS not in _kinds(cfa_tool.fit(MODEL, clean).problems)


def test_answers_alone_alike_by_chance_are_not_named(riders):
    # six answers on 1 to 5 and nothing else: respondents who answered alike are not copies (in these simulated
    # answers 26 of the 300 rows repeat an earlier row, none of them in a run); rows pasted twice are named
    answers = riders.drop(columns=["rider", "district"])
    numbers = np.arange(1, 301)
    alike = copied_rows(answers, numbers)
    assert len(alike) == int(answers.duplicated().sum()) == 26 and alike.longest_run() < 5
    assert ProblemKind.COPIED_ROWS not in _kinds(cfa_tool.fit(MODEL, answers).problems)
    pasted = pd.concat([answers, answers.iloc[100:106]], ignore_index=True)  # six rows pasted again at the end
    assert copied_rows(pasted, np.arange(1, 307)).longest_run() == 6
    assert _kinds(cfa_tool.fit(MODEL, pasted).problems)[0] is ProblemKind.COPIED_ROWS


def test_answers_alike_by_chance_beside_a_district_column_are_not_named(riders):
    # review s11: a district column beside the six answers switched the rule for answers alone off, and every chance
    # agreement (rows identical in the answers and the district) became a caution that N is too large.  A column
    # that tells respondents apart (the rider id) makes identical rows copies; a district does not.
    answers = riders.drop(columns=["rider"])
    assert int(answers.duplicated().sum()) > 0  # chance agreements in the answers and the district
    assert ProblemKind.COPIED_ROWS not in _kinds(cfa_tool.fit(MODEL, answers).problems)
    appended = pd.concat([riders, riders], ignore_index=True)  # the id column repeats: still tells riders apart
    first = cfa_tool.fit(MODEL, appended).problems[0]
    assert first.kind is ProblemKind.COPIED_ROWS
    assert "row labelled 300 repeats row labelled 0;" in first.explanation  # a frame's rows, by their labels
