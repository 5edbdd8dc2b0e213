"""Words and value labels that say no answer ('Not applicable', 'Prefer not to say', 9 'Unsure') are read as missing
in the model's item columns only: a group, id, weight or cluster column keeps them as written, so that a group named
'Not applicable' keeps its rows (it used to lose them silently), and a note names such a group label.

The data are invented (a fictional transit agency's rider survey: ride comfort c1..c3 and staff courtesy s1..s3,
answered 0 to 3).  Check values: the groups' row counts are counted here by pandas from the cells written below;
the SPSS file is written by pyreadstat, an independent writer of the format."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.errors import DataError, UserInputError
from tests.conftest import simulate_cfa

ITEMS = ["c1", "c2", "c3", "s1", "s2", "s3"]
MODEL = "factor comfort: c1..c3\nfactor courtesy: s1..s3\n"


@pytest.fixture(scope="module")
def answers() -> pd.DataFrame:
    loadings = np.kron(np.eye(2), np.full((3, 1), 0.8))
    latent = simulate_cfa(loadings, np.array([[1, 0.4], [0.4, 1]]), np.eye(6) * 0.36, 300, 2911, ITEMS)
    return latent.apply(lambda column: np.digitize(column, [-0.6, 0.3, 1.1]))


def _line(n: int) -> np.ndarray:
    return np.array(["Harbour line", "Not applicable", "Unsure"])[np.arange(n) % 3]


def test_a_group_named_like_no_answer_keeps_its_rows_and_is_named(tmp_path, answers):
    data = answers.astype(object)
    data["line"] = _line(len(data))
    data.loc[4, "c2"] = "Not applicable"  # in an item: no answer, read as missing and said first
    path = tmp_path / "riders.csv"
    data.to_csv(path, index=False)
    checked = cfa_tool.check(MODEL, path, group="line")
    counted = data["line"].value_counts()  # pandas, from the cells as written
    assert set(checked.groups) == {"Harbour line", "Not applicable", "Unsure"}
    assert dict(zip(checked.groups, checked.group_rows)) == {k: int(counted[k]) for k in checked.groups}
    assert not [p for p in checked.problems if p.kind is ProblemKind.VALUES_READ_AS_MISSING]  # no row lost: a note
    assert any(n.endswith("'Not applicable' (1 cell: c2 1). To analyse one as an answer, write the answer's number in "
                          "the cell, in a copy of the file") for n in checked.notes)
    said = [str(n) for n in checked.notes if "read like no answer" in n]
    assert said == ["in the group column 'line', 'Not applicable' (100 rows) and 'Unsure' (100 rows) read like no "
                    "answer, yet were kept as groups of their own (words that say no answer are read as missing in "
                    "item columns only); if such rows have no group, leave them out with a row filter such as "
                    "keep=[\"line != 'Not applicable'\"]"]
    fitted = cfa_tool.fit(MODEL, path, group="line")
    assert [g.label for g in fitted.groups] == list(checked.groups) and fitted.n_obs == len(data)
    assert any("read like no answer" in w for w in fitted.warnings)


def test_a_group_of_numbers_keeps_a_group_written_in_words(tmp_path, answers):
    data = answers.copy().astype(object)
    data["district"] = (np.arange(len(data)) % 2 + 1).astype(object)
    data.loc[:29, "district"] = "Prefer not to say"
    path = tmp_path / "riders.csv"
    data.to_csv(path, index=False)
    checked = cfa_tool.check(MODEL, path, group="district")
    assert dict(zip(checked.groups, checked.group_rows)) == {"1": 135, "2": 135, "Prefer not to say": 30}
    assert [n for n in checked.notes if "'Prefer not to say' (30 rows) reads like no answer, yet was kept as a group"]


def test_a_labelled_group_code_that_says_no_answer_stays_a_group(tmp_path, answers):
    import pyreadstat

    data = answers.astype(float)
    data["line"] = np.array([1.0, 2.0, 9.0])[np.arange(len(data)) % 3]
    path = tmp_path / "riders.sav"
    labels = {"line": {1: "Harbour line", 2: "Ridge line", 9: "Not applicable"}}
    pyreadstat.write_sav(data, str(path), variable_value_labels=labels)
    checked = cfa_tool.check(MODEL, path, group="line")
    assert dict(zip(checked.groups, checked.group_rows)) == {"Harbour line": 100, "Ridge line": 100,
                                                             "Not applicable": 100}
    assert not [p for p in checked.problems if p.kind is ProblemKind.VALUES_READ_AS_MISSING]


def test_a_weight_that_says_no_answer_is_an_error_never_a_dropped_row(tmp_path, answers):
    data = answers.astype(object)
    data["w"] = "1.5"
    data.loc[7, "w"] = "refused"
    path = tmp_path / "riders.csv"
    data.to_csv(path, index=False)
    with pytest.raises(DataError, match=r"refused"):
        cfa_tool.check(MODEL, path, weights="w")


def test_a_filter_column_keeps_its_words_and_the_error_names_the_filter_that_leaves_them_out(tmp_path, answers):
    # a column compared as numbers by a row filter holds 'Prefer not to say': it is not an item, so the word stays
    # (it was read as missing and its rows silently failed the filter); the error names the filter that leaves the
    # rows out, and the two filters keep the rows pandas counts
    data = answers.astype(object)
    data["age"] = (np.arange(len(data)) % 50 + 16).astype(object)
    data.loc[:9, "age"] = "Prefer not to say"
    path = tmp_path / "riders.csv"
    data.to_csv(path, index=False)
    # (the filter as the one writer of advice writes it, data.filter_text: a text of several words in double quotes)
    with pytest.raises(UserInputError, match="or leave its rows out first with keep=\\['age != \"Prefer not "
                                                        "to say\"'\\]"):
        cfa_tool.check(MODEL, path, keep=["age >= 18"])
    checked = cfa_tool.check(MODEL, path, keep=["age != 'Prefer not to say'", "age >= 18"])
    ages = pd.to_numeric(data["age"], errors="coerce")
    assert checked.rows == int((ages >= 18).sum())


@pytest.mark.parametrize("suffix", [".csv", ".xlsx"])
def test_a_group_written_as_a_marker_of_no_answer_is_named(tmp_path, answers, suffix):
    # 'N/A' is a marker of missing data in every column (as statistics packages write it), so its rows have no group;
    # since it may also name a group, the note on the group column says so (it said only how many rows were left out)
    data = answers.astype(object)
    data["line"] = np.where(np.arange(len(data)) % 2 == 0, "harbour", "ridge").astype(object)
    data.loc[:11, "line"] = "N/A"
    path = tmp_path / f"riders{suffix}"
    data.to_csv(path, index=False) if suffix == ".csv" else data.to_excel(path, index=False)
    checked = cfa_tool.check(MODEL, path, group="line")
    assert sum(checked.group_rows) == len(data) - 12
    assert ("in the group column 'line', cells written as 'N/A' (12 cells) were read as no answer, so their rows have "
            "no group; if such a marker names a group, write it as a word (such as 'not applicable') in a copy of the "
            "file") in checked.notes
