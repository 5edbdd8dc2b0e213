"""--missing-codes reads codes as no answer in the model's item columns only: a group, cluster or weight column keeps
such a value (new-user trial 9: '--missing-codes 9' emptied the group 'Grade 9' and its 224 rows left an invariance
test with a note only).  Check values: counts by pandas on the simulated data below (invented answers)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from tests.conftest import simulate_cfa

MODEL = "factor a: a1..a3\nfactor b: b1..b3\n"


@pytest.fixture(scope="module")
def answers() -> pd.DataFrame:
    loadings = np.zeros((6, 2))
    loadings[:3, 0] = loadings[3:, 1] = 0.7
    data = simulate_cfa(loadings, np.array([[1, .3], [.3, 1]]), np.diag(np.full(6, .5)), 400, 9,
                        ["a1", "a2", "a3", "b1", "b2", "b3"])
    data = data.apply(lambda c: np.clip(np.round(c * 1.2 + 3), 1, 5))
    data.loc[[3, 17, 29], "a2"] = 9.0  # codes of no answer among the answers
    data["grade"] = np.repeat([6, 7, 8, 9], 100)
    # a column whose 9 is far from its other values (1 and 2): there 9 reads as a code of no answer, and the note
    # suggests a row filter; a grade of 9 beside 6 to 8 is the column's own value, suggested nothing (new-user s18)
    data["status"] = np.where(np.arange(400) < 100, 9, 1 + np.arange(400) % 2)
    return data


def test_a_group_column_keeps_a_value_given_as_a_missing_code(answers, tmp_path):
    path = tmp_path / "grades.csv"
    answers.to_csv(path, index=False)
    for data in (path, answers):
        fitted = cfa_tool.fit(MODEL, data, group="grade", missing_codes=[9])
        assert [g.label for g in fitted.groups] == ["6", "7", "8", "9"]
        assert fitted.data.rows_read == 400
        notes = " ".join(map(str, fitted.warnings))
        assert "3 cells holding a code given with missing_codes=... (9) were read as no answer (a2 3)" in notes
        assert ("missing_codes=... applies to the model's items; other columns keep such a value as it is ('grade' "
                "holds 9 in 100 rows; 'status' holds 9 in 100 rows)") in notes
        assert "keep=['status != 9']" in notes and "grade != 9" not in notes  # as a Python call writes it
    # the same fit as the data with those three cells empty (written by pandas), the grade column as it is
    gaps = answers.assign(a2=answers["a2"].replace(9.0, np.nan))
    reference = cfa_tool.fit(MODEL, gaps, group="grade")
    assert fitted.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-10)


@pytest.mark.parametrize("keep, suggested", [
    ((), True),
    (("status != 9",), False),  # the very filter the note would suggest
    (("status < 9",), False),  # another filter that leaves those rows out
    (("status != 6",), True),  # a filter on the column that keeps the rows holding 9
])
def test_the_note_suggests_a_row_filter_only_when_none_given_leaves_those_rows_out(answers, tmp_path, keep, suggested):
    # a hostile trial: '--missing-codes 9 --keep "grade != 9"' was told to give --keep "grade != 9"
    path = tmp_path / "grades.csv"
    answers.drop(columns="b3").to_csv(path, index=False)
    model = "factor a: a1..a3\nfactor b: b1, b2\n"
    for data in (path, answers.drop(columns="b3")):
        notes = " ".join(map(str, cfa_tool.fit(model, data, missing_codes=[9], keep=list(keep)).warnings))
        assert "other columns keep such a value as it is ('grade' holds 9 in 100 rows; 'status' holds 9 in 100 rows)" \
            in notes
        # a Python caller reads the keyword it writes (Option.KEEP.given)
        assert ("to leave those rows out, give a row filter such as keep=['status != 9']" in notes) is suggested


def test_the_suggested_row_filter_is_written_as_the_caller_writes_options(answers, tmp_path, capsys):
    """The row filter a note suggests is written through Option.KEEP: '--keep "status != 9"' on the command line,
    keep=['status != 9'] in Python (a Python caller read the flag)."""
    from cfa_tool.cli import main

    path, model = tmp_path / "grades.csv", tmp_path / "grades.cfa"
    answers.to_csv(path, index=False)
    model.write_text(MODEL)
    assert main(["check", str(model), "--data", str(path), "--group-column", "grade", "--missing-codes", "9"]) == 0
    said = capsys.readouterr().out
    assert 'give a row filter such as --keep "status != 9"' in " ".join(said.split())
    notes = " ".join(map(str, cfa_tool.check(MODEL, path, group="grade", missing_codes=[9]).notes))
    assert "give a row filter such as keep=['status != 9']" in notes and "--keep" not in notes
