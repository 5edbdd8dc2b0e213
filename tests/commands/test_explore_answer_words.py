"""``explore`` reads the data as ``fit`` reads them for a model's items: answers recorded as words (an answers file,
--answers), --missing-codes and words that say no answer in the item columns only, nearly constant items named
first, and a draft model that reads the same data file back with ``fit`` unchanged.

Check values and their sources:
* the correlations explored from the words equal pandas' own Pearson correlations (``DataFrame.corr``, a library
  this project did not write) of the codes the answers file gives the words;
* the Holzinger & Swineford (1939) tests x1..x9, cut into five ordered answers at fixed points, keep the three
  abilities the tests were designed for (visual x1-x3, textual x4-x6, speed x7-x9; recalled from memory, as in
  test_explore_command.py).
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from tests.conftest import DATASETS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
ITEMS = [f"x{i}" for i in range(1, 10)]
WORDS = ("Strongly disagree", "Disagree", "Neither agree nor disagree", "Agree", "Strongly agree")
STATEMENT = "answers " + ", ".join(f'"{w}" = {k}' for k, w in enumerate(WORDS, start=1))


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture(scope="module")
def coded() -> pd.DataFrame:
    """x1..x9 cut into five answers 1..5 at each test's quintiles (fixed by the data), with an id and a district."""
    data = pd.read_csv(HS_FILE)[ITEMS]
    codes = pd.DataFrame({x: pd.qcut(data[x].rank(method="first"), 5, labels=False).astype(int) + 1 for x in ITEMS})
    codes.insert(0, "respondent", np.arange(1, len(codes) + 1))
    codes["district"] = np.where(np.arange(len(codes)) % 3 == 0, "north", "south")
    return codes


@pytest.fixture(scope="module")
def words_file(coded, tmp_path_factory):
    folder = tmp_path_factory.mktemp("words")
    words = coded.copy()
    for x in ITEMS:
        words[x] = [WORDS[k - 1] for k in coded[x]]
    words.loc[4, "x2"] = "  agree "  # case and surrounding spaces do not count
    coded.loc[4, "x2"] = 4
    path = folder / "words.csv"
    words.to_csv(path, index=False)
    answers = folder / "scale.cfa"
    answers.write_text("# the survey's agreement scale\n" + STATEMENT + "\n")
    return folder, path, answers


def test_answers_recorded_as_words_are_explored_with_an_answers_file(words_file, coded, capsys):
    folder, path, answers = words_file
    draft, js = folder / "draft.cfa", folder / "explore.json"
    code, out, err = _run(["explore", "--data", path, "--answers", answers, "--draft", draft, "--json", js], capsys)
    assert code == 0, err
    result = json.loads(js.read_text())
    assert result["items"] == ITEMS  # the words' columns, without the id and the district
    said = " ".join(result["notes"])
    assert "respondent" in said and "district ('north' in row 2)" in said  # left out, and why
    assert "answers recorded as words in every item were coded 1 (Strongly disagree) to 5 (Strongly agree)" in said
    assert result["data"]["answer_coding"][0]["answers"][0] == {"word": "Strongly disagree", "code": 1.0}
    explored = cfa_tool.explore(str(path), answers=str(answers))
    reference = coded[ITEMS].astype(float).corr().to_numpy()  # pandas' Pearson correlations of the codes
    np.testing.assert_allclose(explored.exploration.data.correlations, reference, atol=1e-12)
    assert result["factor_count"]["recommended"] == 3  # Holzinger & Swineford (1939): three abilities


def test_the_draft_model_reads_the_words_back_with_fit_unchanged(words_file, capsys):
    folder, path, answers = words_file
    draft, js = folder / "draft_split.cfa", folder / "split.json"
    code, out, err = _run(["explore", "--data", path, "--answers", answers, "--items", "x1..x9", "--draft", draft,
                           "--split", 11, "--json", js], capsys)
    assert code == 0, err
    confirmation = json.loads(js.read_text())["split"]["confirmation"]
    assert confirmation["data"]["answer_coding"][0]["answers"][-1] == {"word": "Strongly agree", "code": 5.0}
    text = draft.read_text()
    assert STATEMENT in text
    fitted = cfa_tool.fit(draft, str(path))  # the draft as written, on the data file as it is
    assert fitted.data.answer_coding and fitted.n_obs == 301
    code, out, err = _run(["fit", draft, "--data", path], capsys)
    assert code == 0, err


def test_words_without_an_answers_file_are_an_error_naming_what_explore_takes(words_file, capsys):
    folder, path, _ = words_file
    for extra in ([], ["--items", "x1..x9"]):
        code, out, err = _run(["explore", "--data", path] + extra, capsys)
        assert code == 2 and "Traceback" not in err
        assert "--answers FILE" in err and STATEMENT in err  # the statement to write, in the file explore takes
        assert "model file" not in err  # explore takes no model file


def test_an_answers_file_holds_answers_statements_only(words_file, capsys):
    folder, path, _ = words_file
    model = folder / "model.cfa"
    model.write_text(STATEMENT + "\nfactor visual: x1, x2, x3\n")
    code, out, err = _run(["explore", "--data", path, "--answers", model], capsys)
    assert code == 2 and f"{model}:2:1:" in err and "'factor' statement" in err
    unknown = folder / "unknown.cfa"
    unknown.write_text(STATEMENT + " for x1, x99\n")
    code, out, err = _run(["explore", "--data", path, "--answers", unknown], capsys)
    assert code == 2 and f"{unknown}:1:" in err and "no column 'x99'" in err
    code, out, err = _run(["explore", "--data", path, "--answers", unknown, "--items", "x2..x9"], capsys)
    assert code == 2 and "'x1' is not one of the items explored" in err


def test_missing_codes_and_no_answer_words_apply_to_the_item_columns_only(coded, tmp_path):
    """fit reads --missing-codes and words saying no answer in the model's items only; so does explore: a grade
    column's 9 and a district called 'Not applicable' stay values that --keep can choose."""
    data = coded.drop(columns="respondent").copy()
    data["grade"] = np.where(np.arange(len(data)) % 2 == 0, 9, 10)
    data["district"] = np.where(np.arange(len(data)) % 4 == 0, "Not applicable", data["district"])
    data.loc[[2, 3], "x4"] = 9  # a code of no answer in an item
    path = tmp_path / "grades.csv"
    data.to_csv(path, index=False)
    result = cfa_tool.explore(str(path), items=ITEMS, missing_codes=[9], keep=["grade = 9"])
    grade_nine = data[data["grade"] == 9]
    assert result.exploration.data.n_obs == len(grade_nine)  # no item has a gap: every row of grade 9 analysed
    expected = grade_nine[ITEMS].replace(9, np.nan)
    assert int(expected["x4"].isna().sum()) == 1  # of the two coded rows, the first has grade 9
    kept = cfa_tool.explore(str(path), items=ITEMS, keep=["district = Not applicable"])
    assert kept.exploration.data.n_obs == int((data["district"] == "Not applicable").sum())


def test_nearly_constant_items_are_named_first_as_fit_names_them(coded, tmp_path):
    data = coded[ITEMS].copy()
    data["x10"] = 3
    data.loc[[0, 1], "x10"] = [1, 5]  # all rows but two answer 3
    path = tmp_path / "constant.csv"
    data.to_csv(path, index=False)
    result = cfa_tool.explore(str(path), items=ITEMS + ["x10"])
    first = result.problems()[0]
    assert first.startswith("Nearly constant item (one answer given by 98% or more of the rows answering, or by all "
                            "but fewer than 5: a line of common practice, not a published cutoff): 'x10' is 3 in all "
                            "but 2 of the 301 rows")


def test_a_typing_error_among_the_words_is_named_not_a_column_left_out(words_file, coded, tmp_path, capsys):
    _, path, answers = words_file
    words = pd.read_csv(path)
    words.loc[6, "x5"] = "Agre"
    typo = tmp_path / "typo.csv"
    words.to_csv(typo, index=False)
    code, out, err = _run(["explore", "--data", typo, "--answers", answers], capsys)
    assert code == 2 and "column 'x5', row 8: the answer 'Agre' is not one of the words" in err


def test_an_empty_item_is_an_error_naming_items_not_a_model(coded, tmp_path, capsys):
    data = coded[ITEMS].copy()
    data["x10"] = np.nan
    path = tmp_path / "empty.csv"
    data.to_csv(path, index=False)
    code, out, err = _run(["explore", "--data", path, "--items", "x1..x10"], capsys)
    assert code == 2 and "column 'x10' has no answers at all" in err
    assert "take it out of --items" in err and "model" not in err


def test_rows_that_answered_no_item_are_said_to_be_left_out_not_to_miss_some_answers(coded, tmp_path):
    """fit says '40 of 300 rows answered none of the model variables and were left out'; explore counted such rows
    among the rows that 'miss some answers'."""
    data = coded[ITEMS].astype(float)
    data.iloc[:40] = np.nan
    data.iloc[50, 0] = np.nan  # one row with a gap
    data.insert(0, "respondent", [f"r{k}" for k in range(len(data))])  # so the rows are not blank (read as no rows)
    path = tmp_path / "empty_rows.csv"
    data.to_csv(path, index=False)
    result = cfa_tool.explore(str(path), items=ITEMS)
    assert result.exploration.data.n_obs == 301 - 40
    # the rows are lines 2-41 of the file (the header is line 1)
    assert "40 of 301 rows answered none of the items and were left out (rows 2, 3, 4, 5, 6 and 35 more)." \
        in result.notes
    assert any(n.startswith("1 row misses some answers;") for n in result.notes)


def test_numbers_beside_words_draft_a_statement_for_the_words_items_only(words_file, coded, tmp_path, capsys):
    _, path, answers = words_file
    mixed = pd.read_csv(path)
    mixed[["x4", "x5", "x6"]] = coded[["x4", "x5", "x6"]]  # three items exported as numbers
    data = tmp_path / "mixed.csv"
    mixed.to_csv(data, index=False)
    draft = tmp_path / "mixed_draft.cfa"
    code, out, err = _run(["explore", "--data", data, "--answers", answers, "--draft", draft], capsys)
    assert code == 0, err
    statement = next(line for line in draft.read_text().splitlines() if line.startswith("answers "))
    covered = statement.split(" for ")[1].split(", ")
    # the draft declares x1..x3 (words) and x4..x6 (numbers); x7, x8 (a two-item factor) and x9 (two loadings of
    # .30 or more) are comments, so the statement names only the words' items the model declares
    assert "factor factor1: x5, x6, x4" in draft.read_text() and sorted(covered) == ["x1", "x2", "x3"]
    fitted = cfa_tool.fit(draft, str(data))
    assert set(fitted.data.answer_coding[0][0]) == set(covered)
