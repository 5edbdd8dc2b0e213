"""The notes on values read as no answer count the cells of the rows analysed, not of the whole file (new-user
trial s22, problem 3: with two row filters keeping 267 of 1,400 rows, the note said the 870 cells of the whole file
where 188 were read so in the rows analysed), as the caution on codes set apart from the answer scale counts them:
values a file declares missing (SPSS), codes given with --missing-codes, the caution when rows leave the analysis
because of them, and codes labelled like no answer that lie between the answers and stay answers.  And the check's
count of rows grouped by thousands, as every other line writes it ('1,200 read', not '1200 read').

The data are invented (a fictional transit agency's rider survey: ride comfort c1..c3 and staff courtesy s1..s3,
answered 0 to 3, from two depots), written as SPSS files by pyreadstat, an independent writer of the format, and as
CSV by pandas.  Check values: the cells set by hand below (which rows of which depot hold the code 8), counted by
hand; the cells of the answer 2 in the rows kept, counted by numpy on the data written."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind

ITEMS = ["c1", "c2", "c3", "s1", "s2", "s3"]
MODEL = "factor comfort: c1..c3\nfactor courtesy: s1..s3\n"
ROWS = 1200  # rows 0..599 from depot 1, rows 600..1199 from depot 2
CODED = {3: "c2", 40: "s1", 700: "s3", 701: "s3", 900: "c1"}  # row position -> item holding 8: 2 in depot 1, 3 in 2


@pytest.fixture(scope="module")
def riders() -> pd.DataFrame:
    rng = np.random.default_rng(2222)
    eta = rng.normal(size=(ROWS, 2)) @ np.linalg.cholesky([[1, 0.4], [0.4, 1]]).T
    latent = np.repeat(eta, 3, axis=1) * 0.75 + rng.normal(size=(ROWS, 6)) * 0.66
    data = pd.DataFrame(np.digitize(latent, [-0.6, 0.3, 1.1]).astype(float), columns=ITEMS)
    for row, item in CODED.items():
        data.loc[row, item] = 8.0
    data.insert(0, "depot", np.repeat([1.0, 2.0], ROWS // 2))
    return data


def _notes(result, words: str) -> list[str]:
    return [str(n) for n in result.notes if words in str(n)]


def test_declared_missing_values_are_counted_in_the_rows_the_filters_kept(tmp_path, riders):
    import pyreadstat

    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(riders, str(path), missing_ranges={c: [8] for c in ITEMS})
    whole = _notes(cfa_tool.check(MODEL, path), "declares as missing")
    assert whole == ["5 cells of the items in riders.sav hold values that the file declares as missing values, read "
                     "as missing, not as answers: 8 (5 cells: s3 2, c1 1, c2 1, s1 1). To analyse one as an answer, "
                     "remove its declaration as a missing value, in a copy of the file"]  # the whole file, unchanged
    kept = _notes(cfa_tool.check(MODEL, path, keep=["depot = 1"]), "declares as missing")
    # depot 1 holds 8 in c2 (row 3) and s1 (row 40): 2 of the 5 cells (counted by hand from CODED)
    assert kept == ["2 cells of the items in the 600 rows of riders.sav that the row filters kept hold values that "
                    "the file declares as missing values, read as missing, not as answers: 8 (2 cells: c2 1, s1 1). "
                    "To analyse one as an answer, remove its declaration as a missing value, in a copy of the file"]
    # none in the rows kept: nothing to say (rows 900 and 700, 701 are of depot 2; row 3 and 40 left out here)
    assert not _notes(cfa_tool.check(MODEL, path, keep=["depot = 2", "c2 != 8", "c1 != 8", "s3 != 8"]),
                      "declares as missing")


def test_the_caution_of_rows_left_out_counts_the_cells_of_the_rows_kept(tmp_path, riders):
    import pyreadstat

    path = tmp_path / "riders.sav"
    pyreadstat.write_sav(riders, str(path), missing_ranges={c: [8] for c in ITEMS})
    result = cfa_tool.fit(MODEL, path, keep=["depot = 2"], missing="listwise")
    (caution,) = [p for p in result.problems if p.kind is ProblemKind.VALUES_READ_AS_MISSING]
    # depot 2: rows 700, 701 (s3) and 900 (c1), 3 rows and 3 cells (counted by hand from CODED)
    assert str(caution.explanation).startswith(
        "3 rows leave the analysis because values read as no answer emptied their cells (listwise deletion leaves out "
        "every row with a gap). 3 cells of the items in the 600 rows of riders.sav that the row filters kept hold "
        "values that the file declares as missing values, read as missing, not as answers: 8 (3 cells: s3 2, c1 1).")


def test_missing_codes_given_are_counted_in_the_rows_the_filters_kept(tmp_path, riders):
    path = tmp_path / "riders.csv"
    riders.to_csv(path, index=False)
    whole = _notes(cfa_tool.check(MODEL, path, missing_codes=[8]), "holding a code given")
    assert len(whole) == 1 and whole[0].startswith("riders.csv: 5 cells holding a code given")
    assert whole[0].endswith("(c1 1, c2 1, s1 1, s3 2)")
    (kept,) = _notes(cfa_tool.check(MODEL, path, missing_codes=[8], keep=["depot = 1"]), "holding a code given")
    assert kept.startswith("riders.csv: 2 cells of the items in the 600 rows that the row filters kept holding a code given")
    assert kept.endswith("were read as no answer (c2 1, s1 1)")
    (none,) = _notes(cfa_tool.check(MODEL, path, missing_codes=[8], keep=["depot = 1", "c2 != 8", "s1 != 8"]),
                     "holds any of the codes given")
    assert none.startswith("riders.csv: no cell of the items in the 598 rows that the row filters kept holds any of the "
                           "codes given")


def test_a_code_labelled_like_no_answer_between_the_answers_is_counted_in_the_rows_kept(tmp_path, riders):
    import pyreadstat

    path = tmp_path / "riders.sav"
    labels = {0: "never", 1: "sometimes", 2: "not sure", 3: "always"}  # 2 lies between answers: an answer
    pyreadstat.write_sav(riders, str(path), variable_value_labels={c: labels for c in ITEMS},
                         missing_ranges={c: [8] for c in ITEMS})
    whole = int((riders[ITEMS] == 2).to_numpy().sum())  # counted by numpy on every row: above 1,000
    (note,) = _notes(cfa_tool.check(MODEL, path), "lies between other answers")
    assert whole >= 1000 and f"and is read as an answer ({whole:,} cells: " in note
    kept = riders.iloc[: ROWS // 2]
    cells = {c: int((kept[c] == 2).sum()) for c in ITEMS}  # counted by numpy on the rows of depot 1
    (note,) = _notes(cfa_tool.check(MODEL, path, keep=["depot = 1"]), "lies between other answers")
    assert f"and is read as an answer ({sum(cells.values()):,} cells: " in note
    assert all(f"{c} {n}" in note for c, n in cells.items())


def test_the_check_counts_rows_by_thousands(tmp_path, riders):
    path = tmp_path / "riders.csv"
    riders.to_csv(path, index=False)
    # 1,200 rows, 5 with the code 8 read as no answer (CODED): 1,195 complete
    assert "Rows: 1,200 read, 1,195 complete, 5 with missing answers" in cfa_tool.check(
        MODEL, path, missing_codes=[8]).summary()
    assert "Rows: 1,200 read, 600 kept by the row filter, 598 complete, 2 with missing answers" in cfa_tool.check(
        MODEL, path, missing_codes=[8], keep=["depot = 1"]).summary()
