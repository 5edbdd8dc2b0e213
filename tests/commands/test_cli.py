"""The command line, run as a user runs it: a separate process, exit codes, files."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"
DATA = resource_dir("demo") / "rider_survey.csv"


def run(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "cfa_tool", *args], capture_output=True, text=True, cwd=cwd,
                          env=_env())


def _env() -> dict:
    import os

    env = dict(os.environ)
    env.pop("CFA_TOOL_DEBUG", None)
    env["PYTHONPATH"] = str(Path(__file__).resolve().parents[2]) + os.pathsep + env.get("PYTHONPATH", "")
    return env


@pytest.fixture()
def workdir(tmp_path) -> Path:
    shutil.copy(MODEL, tmp_path / "rider.cfa")
    shutil.copy(DATA, tmp_path / "rider.csv")
    return tmp_path


def _assert_user_error(proc: subprocess.CompletedProcess, code: int, *words: str) -> None:
    assert proc.returncode == code, proc.stderr
    assert "Traceback" not in proc.stderr
    first = proc.stderr.splitlines()[0]
    assert first.startswith("cfa-tool: ")
    for word in words:
        assert word in first, first


def test_fit_prints_report_and_writes_json(workdir):
    proc = run("fit", "rider.cfa", "--data", "rider.csv", "--json", "out.json", cwd=workdir)
    assert proc.returncode == 0, proc.stderr
    for heading in ("Model fit", "Loading", "Factor variances and correlations", "Largest modification indices", "not laws"):
        assert heading in proc.stdout
    result = json.loads((workdir / "out.json").read_text())
    assert set(result) >= {"converged", "estimator", "n_obs", "fit", "estimates", "modification_indices", "warnings"}
    assert set(result["fit"]) == {
        "chi_square", "df", "p_value", "cfi", "tli", "rmsea", "rmsea_ci90", "rmsea_p_close", "srmr", "log_likelihood",
        "aic", "bic", "sabic", "baseline_chi_square", "baseline_df", "n_free_parameters"}
    row = result["estimates"][0]
    assert set(row) == {"kind", "variables", "group", "free", "estimate", "se", "z", "p_value", "ci95", "standardized",
                        "standardized_factors_only"}
    # 9 of the demo's 480 rows miss an answer: by default every row is used, by full-information ML
    assert result["n_obs"] == 480 and result["converged"] is True
    assert "full information" in result["estimator"]
    assert any("9 of 480 rows miss some answers" in w for w in result["warnings"])
    assert all(m["index"] >= 3.84 for m in result["modification_indices"])
    assert not list(workdir.glob(".*.tmp"))


def test_json_to_standard_output_is_only_json_and_deterministic(workdir):
    first = run("fit", "rider.cfa", "--data", "rider.csv", "--json", "-", cwd=workdir)
    second = run("fit", "rider.cfa", "--data", "rider.csv", "--json", "-", cwd=workdir)
    assert first.returncode == 0
    assert json.loads(first.stdout)["fit"]["df"] == 51
    assert first.stdout == second.stdout


def test_mi_options(workdir):
    proc = run("fit", "rider.cfa", "--data", "rider.csv", "--json", "-", "--mi-threshold", "0", "--mi-top", "2", cwd=workdir)
    assert len(json.loads(proc.stdout)["modification_indices"]) == 2


def test_check_command(workdir):
    proc = run("check", "rider.cfa", "--data", "rider.csv", cwd=workdir)
    assert proc.returncode == 0
    assert "model is valid" in proc.stdout


def test_demo_command():
    proc = run("demo")
    assert proc.returncode == 0, proc.stderr
    assert "Rider experience, three factors" in proc.stdout


def test_misspelled_variable_points_at_the_place(workdir):
    (workdir / "bad.cfa").write_text("factor punctuality: on_tme, short_wait, accurate_info\n")
    proc = run("fit", "bad.cfa", "--data", "rider.csv", cwd=workdir)
    _assert_user_error(proc, 2, "bad.cfa:1:21:", "unknown variable 'on_tme'", "did you mean 'on_time'?")
    assert proc.stderr.splitlines()[2] == " " * 4 + " " * 20 + "^"


def test_syntax_error_exit_code(workdir):
    (workdir / "bad.cfa").write_text("factor f a, b, c\n")
    _assert_user_error(run("check", "bad.cfa", "--data", "rider.csv", cwd=workdir), 2, "bad.cfa:1:10:")


def test_missing_files(workdir):
    _assert_user_error(run("fit", "nope.cfa", "--data", "rider.csv", cwd=workdir), 2, "nope.cfa", "does not exist")
    _assert_user_error(run("fit", "rider.cfa", "--data", "nope.csv", cwd=workdir), 2, "nope.csv", "does not exist")


def test_bad_option_is_one_line(workdir):
    proc = run("fit", "rider.cfa", "--data", "rider.csv", "--standard-errors-from", "sideways", cwd=workdir)
    assert proc.returncode == 2
    assert len(proc.stderr.strip().splitlines()) == 1


def test_refuses_to_overwrite_an_input(workdir):
    before = (workdir / "rider.cfa").read_bytes()
    proc = run("fit", "rider.cfa", "--data", "rider.csv", "--json", "rider.cfa", cwd=workdir)
    _assert_user_error(proc, 2, "refusing to write")
    assert (workdir / "rider.cfa").read_bytes() == before


def test_no_convergence_exits_3_and_writes_nothing(workdir):
    proc = run("fit", "rider.cfa", "--data", "rider.csv", "--max-iterations", "1", "--json", "out.json", cwd=workdir)
    _assert_user_error(proc, 3, "did not converge")
    assert not (workdir / "out.json").exists()


def test_a_reader_that_stops_early_gets_no_error_message():
    # 'cfa-tool demo | head -1': the pipe closes while the report is printed; the convention of shells is
    # exit status 141 (128 + SIGPIPE) and no message
    proc = subprocess.Popen([sys.executable, "-m", "cfa_tool", "demo"], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            env=_env())
    proc.stdout.readline()
    proc.stdout.close()
    err = proc.stderr.read()
    assert proc.wait() == 141 and err == b""
