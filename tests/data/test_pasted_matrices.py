"""A covariance or correlation matrix given as the data (saved by pandas' DataFrame.cov().to_csv(), pasted from a
paper, or passed from Python as data=frame.cov()) is refused with how to give it as summary statistics, never fitted
as a dozen rows of answers (hostile trial s12: cov.csv was fitted as N = 12 with CFI 1.000)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError
from tests.conftest import run_cli

FOUR = "factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"


@pytest.fixture(scope="module")
def answers(rider_demo) -> pd.DataFrame:
    """The demo's complete rows, item columns only (the matrices below are pandas', not the tool's)."""
    return rider_demo.dropna().iloc[:, 2:].reset_index(drop=True)


@pytest.mark.parametrize("kind", ["covariance", "correlation"])
def test_matrix_saved_by_pandas_is_refused_in_the_file_and_the_advice_fits(kind, answers, rider_model, tmp_path,
                                                                          capsys):
    matrix = answers.cov() if kind == "covariance" else answers.corr()
    path = tmp_path / f"{kind}.csv"
    matrix.to_csv(path)  # an empty first cell, each row named as its column
    for model_text in (FOUR, rider_model):  # the matrix's first items, and all of them
        model = tmp_path / "m.cfa"
        model.write_text(model_text)
        code, out, err = run_cli(["fit", model, "--data", path], capsys)
        assert code == 2 and out == ""
        assert f"{path} looks like a {kind} matrix, not rows of answers" in err
        assert f"write '{kind}' in its first cell (now empty) and add a row 'n'" in err
        assert "after the matrix come only rows" not in err  # the other items' rows are the matrix's own rows
    # the advice followed: the same numbers read as summary statistics give the fit of the rows themselves
    text = path.read_text().splitlines()
    n = len(answers)
    text[0] = kind + text[0]
    stats = tmp_path / f"{kind}_stats.csv"
    stats.write_text("\n".join(text + [f"n,{n}"] + ([] if kind == "covariance" else
                                                   ["sd," + ",".join(f"{s!r}" for s in answers.std())])) + "\n")
    from_stats = cfa_tool.fit(FOUR, stats)
    from_rows = cfa_tool.fit(FOUR, answers)
    assert from_stats.n_obs == n
    assert from_stats.fit.chi_square == pytest.approx(from_rows.fit.chi_square, rel=1e-6)


def test_matrix_frame_passed_as_data_from_python_points_to_the_keyword(answers):
    with pytest.raises(DataError, match=r"the data frame looks like a covariance matrix, not rows of answers.*"
                                        r"give it as covariance=<the matrix>, n_obs="):
        cfa_tool.fit(FOUR, answers.cov())
    with pytest.raises(DataError, match=r"the data frame looks like a correlation matrix.*matrix='correlation'"):
        cfa_tool.fit(FOUR, answers.corr())
    # the keyword named in the message fits it (n - 1 divisor, as pandas' cov() has it)
    given = cfa_tool.fit(FOUR, covariance=answers.cov(), n_obs=len(answers))
    assert given.fit.chi_square == pytest.approx(cfa_tool.fit(FOUR, answers).fit.chi_square, rel=1e-6)


def test_other_commands_refuse_a_matrix_file(answers, rider_model, tmp_path, capsys):
    path = tmp_path / "cov.csv"
    answers.cov().to_csv(path)
    rows = tmp_path / "rows.csv"
    answers.to_csv(rows, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    for argv in (["replicate", model, "--calibration", path, "--validation", rows],
                 ["scores", model, "--data", path, "--output", tmp_path / "s.csv"],
                 ["check", model, "--data", path]):
        code, _, err = run_cli(argv, capsys)
        assert code == 2 and "cov.csv looks like a covariance matrix, not rows of answers" in err, argv
    assert not (tmp_path / "s.csv").exists()


def test_rows_of_answers_are_not_taken_for_a_matrix(answers):
    from cfa_tool.data.summary_stats import _matrix_kind

    # a few rows of answers named like the items (an odd but possible index) are no symmetric block
    few = answers.iloc[:4, :4].copy()
    few.index = list(few.columns)
    assert _matrix_kind(few.to_numpy(dtype=float)) is None
    # a symmetric block with a covariance beyond the bound its variances set (correlation 1.5) is none either
    assert _matrix_kind(np.array([[1.0, 3.0], [3.0, 4.0]])) is None
    assert _matrix_kind(np.array([[2.0, 1.0], [1.0, 4.0]])) == "covariance"
    assert _matrix_kind(np.array([[2.0, np.nan], [1.0, 4.0]])) == "covariance"  # a lower triangle as printed


@pytest.mark.parametrize("kind", ["covariance", "correlation"])
def test_matrix_saved_without_row_names_is_refused_and_the_advice_fits(kind, answers, rider_model, tmp_path, capsys):
    """pandas' ``cov().to_csv(index=False)`` and R's ``write.csv(cov(x), row.names = FALSE)`` (quoted names, written
    here as R writes them: recalled from R's documentation of write.csv, not run) drop the row names: the square block
    alone is still a matrix (review s12: it was fitted as rows of answers, or refused only for its few rows)."""
    matrix = answers.cov() if kind == "covariance" else answers.corr()
    by_pandas = tmp_path / f"{kind}_pandas.csv"
    matrix.to_csv(by_pandas, index=False)
    by_r = tmp_path / f"{kind}_r.csv"
    by_r.write_text(",".join(f'"{c}"' for c in matrix.columns) + "\n"
                    + "".join(",".join(f"{v:.15g}" for v in row) + "\n" for row in matrix.to_numpy()))
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    for path in (by_pandas, by_r):
        code, out, err = run_cli(["fit", model, "--data", path], capsys)
        assert code == 2 and out == ""
        assert f"{path} looks like a {kind} matrix saved without its row names, not rows of answers" in err
        assert f"add a first column that names each row as its column, with '{kind}' in its first cell" in err
    # the advice followed gives the fit of the rows themselves
    lines = by_pandas.read_text().splitlines()
    fixed = [kind + "," + lines[0]] + [f"{name},{line}" for name, line in zip(matrix.columns, lines[1:])]
    fixed += [f"n,{len(answers)}"] + ([] if kind == "covariance" else
                                       ["sd," + ",".join(f"{s!r}" for s in answers.std())])
    stats = tmp_path / f"{kind}_stats.csv"
    stats.write_text("\n".join(fixed) + "\n")
    assert cfa_tool.fit(FOUR, stats).fit.chi_square == pytest.approx(cfa_tool.fit(FOUR, answers).fit.chi_square,
                                                                      rel=1e-6)


def test_matrix_frame_without_row_names_or_with_them_as_a_column_points_to_the_keyword(answers):
    """From Python the advice is the keyword's (covariance=, n_obs=), also for a matrix whose row names became a
    column (``cov().reset_index()``) or were dropped (a frame of its values): the file's advice (write 'covariance'
    in the first cell) fits no data frame."""
    for frame in (answers.cov().reset_index(), pd.DataFrame(answers.cov().to_numpy(), columns=answers.columns)):
        with pytest.raises(DataError) as raised:
            cfa_tool.fit(FOUR, frame)
        message = str(raised.value)
        assert message.startswith("the data frame looks like a covariance matrix, not rows of answers")
        assert "give it as covariance=<the matrix>, n_obs=" in message and "first cell" not in message
    with pytest.raises(DataError, match=r"the data frame looks like a correlation matrix.*matrix='correlation'"):
        cfa_tool.fit(FOUR, answers.corr().reset_index())


def test_a_few_rows_of_answers_as_many_as_the_columns_are_no_matrix(answers, tmp_path):
    """Twelve rows of answers for twelve columns are not symmetric: they are read as rows of answers."""
    path = tmp_path / "few.csv"
    answers.iloc[:12].to_csv(path, index=False)
    assert cfa_tool.fit(FOUR, path).n_obs == 12
