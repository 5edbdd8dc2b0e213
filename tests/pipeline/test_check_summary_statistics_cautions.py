"""`check` of a summary-statistics file gives what `fit` of the same file gives before it: the caution on too few
rows per free parameter and the degrees of freedom (hostile trial s20: only 'The model is valid' was printed).  The
counts are those of the model: 2 factors of 3 items, factor variances scaled by markers: 4 loadings, 2 variances,
1 covariance, 6 residual variances = 13 free parameters; 6 * 7 / 2 = 21 moments, 8 degrees of freedom."""

from __future__ import annotations

from tests.conftest import run_cli

STATS = """correlation,x1,x2,x3,x4,x5,x6
x1,1
x2,.30,1
x3,.44,.34,1
x4,.37,.15,.16,1
x5,.29,.14,.08,.73,1
x6,.36,.19,.20,.70,.72,1
n,{n}
sd,1.17,1.18,1.13,1.16,1.29,1.10
"""


def _run(command: str, n: int, tmp_path, capsys) -> str:
    """The output of ``command`` (check or fit) of the two-factor model on the summary statistics with N = ``n``,
    its lines joined."""
    model = tmp_path / "m.cfa"
    model.write_text("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n")
    stats = tmp_path / f"n{n}.stats"
    stats.write_text(STATS.format(n=n))
    code, out, err = run_cli([command, model, "--data", stats], capsys)
    assert code == 0, err
    return " ".join(out.split())


def test_check_of_summary_statistics_cautions_as_the_fit(tmp_path, capsys):
    checked, fitted = _run("check", 7, tmp_path, capsys), _run("fit", 7, tmp_path, capsys)
    said = "7 rows for the 13 free parameters of the model"
    assert said in fitted and said in checked
    assert checked.index(said) < checked.index("The model is valid")  # first, as problems are
    assert "8 degrees of freedom" in checked


def test_enough_rows_give_no_caution(tmp_path, capsys):
    checked = _run("check", 301, tmp_path, capsys)
    assert "free parameters of the model" not in checked and "8 degrees of freedom" in checked
