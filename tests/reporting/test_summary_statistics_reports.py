"""A fit (and a check) of summary statistics says what was analysed (hostile trial): the methods paragraph names the
matrix and N given with it, and for correlations without standard deviations what that means for the estimates
(Cudeck 1989: correlations analysed as covariances give estimates in standard-deviation units and approximate
standard errors); means and SDs the file does not give are shown as not given, never as 0 or 1; no rows are
counted for a matrix file.  The matrix is the correlations of the first six Holzinger & Swineford (1939) tests
(tests/datasets, rounded to two decimals), with their standard deviations and means."""

from __future__ import annotations

import json

import pytest

from cfa_tool.cli import main

# these tests read words with a temporary path among them in the terminal report
pytestmark = pytest.mark.usefixtures("wide_terminal")

MATRIX = """x1,1
x2,.30,1
x3,.44,.34,1
x4,.37,.15,.16,1
x5,.29,.14,.08,.73,1
x6,.36,.19,.20,.70,.72,1
n,301
"""
SDS = "sd,1.17,1.18,1.13,1.16,1.29,1.10\n"
MEANS = "mean,4.9,6.1,2.3,3.1,4.3,2.2\n"


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def _words(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture()
def model(tmp_path):
    path = tmp_path / "six.cfa"
    path.write_text("factor a: x1, x2, x3\nfactor b: x4, x5, x6\n")
    return path


@pytest.mark.parametrize("rows, said", [
    # the means given are not fitted (the fit is the same without them), so they are not among what was fitted
    # (hostile tester s24: "..., with the items' means, and N = 301")
    (SDS + MEANS, "fitted to summary statistics, not to rows of answers: a correlation matrix and standard deviations "
                  "(covariances rebuilt from them), and N = 301 as given in the file. The items' means given with the "
                  "matrix were not fitted (the model has no means); they give only the means of the keyed sum scores."),
    ("", "fitted to summary statistics, not to rows of answers: a correlation matrix without standard deviations, "
         "and N = 301 as given in the file; the correlations were analysed as if they were covariances, so the "
         "unstandardized estimates are in standard-deviation units and their standard errors are only approximate"),
])
def test_the_methods_paragraph_says_which_matrix_was_analysed(tmp_path, model, capsys, rows, said):
    stats = tmp_path / "hs.stats"
    stats.write_text("correlation,x1,x2,x3,x4,x5,x6\n" + MATRIX + rows)
    code, out, err = _run(["fit", model, "--data", stats], capsys)
    words = _words(out)
    assert code == 0, err
    start = words.index("A confirmatory factor analysis with six indicators")
    assert start < words.index("(N = 301).") < words.index(said) < words.index("The model fit was")


def test_a_fit_of_raw_rows_says_nothing_of_a_matrix(hs_three):
    from cfa_tool.reporting.paragraph import methods_paragraph

    assert "summary statistics" not in methods_paragraph(hs_three)


def test_means_and_sds_not_given_are_shown_as_not_given_and_no_rows_are_counted(tmp_path, model, capsys):
    stats = tmp_path / "cov.stats"
    stats.write_text("covariance,x1,x2,x3,x4,x5,x6\n" + MATRIX.replace("x1,1\n", "x1,4\n").replace("n,301", "n,10"))
    saved = tmp_path / "fit.json"
    code, out, err = _run(["fit", model, "--data", stats, "--json", saved], capsys)
    words = _words(out)
    assert code == 0, err
    assert f"Data: {stats}; summary statistics (a covariance matrix), N = 10 as given in the file" in words
    assert "rows analysed" not in words and "Mean 0.00" not in words
    # the SD of x1 is sqrt(4 * 10 / 9) with divisor N - 1 after the file's divisor N - 1 was taken out: sqrt(4) = 2
    assert "Items: descriptive statistics (from the summary statistics)" in words
    assert "x1 not given 2.00" in words and "The file gives no means, so none are shown" in words
    data = json.loads(saved.read_text())["data"]
    assert data["means"] is None and data["not_given"] == ["means"] and data["matrix_analysed"] == "covariance"
    stats.write_text("correlation,x1,x2,x3,x4,x5,x6\n" + MATRIX)
    code, out, err = _run(["fit", model, "--data", stats], capsys)
    assert code == 0 and "x1 not given not given" in _words(out)
    code, out, err = _run(["check", model, "--data", stats, "--json", saved], capsys)
    words = _words(out)
    assert code == 0 and "N = 301 as given in the file; it holds no rows of answers, so there are no row counts or " \
                         "coverage" in words
    assert "Rows:" not in words and "complete" not in words and "Share of rows answering" not in words
    assert json.loads(saved.read_text())["n_obs"] == 301 and json.loads(saved.read_text())["rows"] is None



def test_the_json_data_block_of_a_matrix_says_its_divisor_and_counts_no_rows(tmp_path, model, capsys):
    # re-check 6: a covariance file declaring divisor n gave JSON sds with divisor N without saying so (the views
    # show N - 1), and rows_read 10 for a file that holds no rows. The variance of x1 is 4 with divisor N = 10 as
    # given: SD 2 with divisor N (the JSON, labelled), sqrt(4 * 10 / 9) = 2.108 with divisor N - 1 (the table)
    stats = tmp_path / "covn.stats"
    stats.write_text("covariance,x1,x2,x3,x4,x5,x6\n" + MATRIX.replace("x1,1\n", "x1,4\n").replace("n,301", "n,10")
                     + "divisor,n\n")
    saved = tmp_path / "fit.json"
    code, out, err = _run(["fit", model, "--data", stats, "--json", saved], capsys)
    assert code == 0, err
    assert "x1 not given 2.11" in _words(out) and "SD with divisor N - 1" in _words(out)
    data = json.loads(saved.read_text())["data"]
    assert data["sd_divisor"] == "N" and data["sds"][0] == pytest.approx(2.0, abs=1e-12)
    assert data["rows_read"] is None and data["rows_dropped"] is None and data["n_obs"] == 10
    stats.write_text("correlation,x1,x2,x3,x4,x5,x6\n" + MATRIX)  # no sd row: no SDs known
    code, out, err = _run(["fit", model, "--data", stats, "--json", saved], capsys)
    data = json.loads(saved.read_text())["data"]
    assert code == 0 and data["sds"] is None and data["not_given"] == ["means", "standard_deviations"]

def test_a_saved_fit_of_summary_statistics_without_means_is_still_read(tmp_path, model, capsys):
    """A fit whose JSON holds no means (null) is refused for scores for the lack of means, not as no fit result."""
    stats = tmp_path / "cov.stats"
    stats.write_text("covariance,x1,x2,x3,x4,x5,x6\n" + MATRIX)
    saved = tmp_path / "fit.json"
    assert _run(["fit", model, "--data", stats, "--json", saved], capsys)[0] == 0
    rows = tmp_path / "rows.csv"
    rows.write_text("x1,x2,x3,x4,x5,x6\n1,2,3,4,5,6\n2,3,4,5,6,7\n")
    code, _, err = _run(["scores", model, "--data", rows, "--from-fit", saved, "--output", tmp_path / "s.csv"], capsys)
    assert code == 2 and "without the items' means" in err


def test_compare_of_summary_statistics_says_so(tmp_path, model, capsys):
    # re-check 6: compare of a correlation matrix without SDs said "All models fitted to the same 301 rows" and its
    # paragraph read as if rows of answers were analysed, without the standard-deviation-units caution
    stats = tmp_path / "hs.stats"
    stats.write_text("correlation,x1,x2,x3,x4,x5,x6\n" + MATRIX)
    one = tmp_path / "one.cfa"
    one.write_text("factor g: x1, x2, x3, x4, x5, x6\n")
    code, out, err = _run(["compare", model, one, "--data", stats], capsys)
    assert code == 0, err
    words = _words(out)
    assert ("All models fitted to the same summary statistics (a correlation matrix without standard deviations), "
            "N = 301 as given in the file.") in words
    assert "same 301 rows" not in words
    assert words.index("were compared on the same summary statistics (N = 301)") < words.index(
        "The models were fitted to summary statistics, not to rows of answers: a correlation matrix without standard "
        "deviations") < words.index("Model 1 (six) had six indicators")
    assert "standard errors are only approximate (Cudeck, 1989)" in words
