"""The command line, run as a user runs it: exit codes, the words on standard output and error, files.

:func:`run` runs a command in this process (cfa_tool.cli.main, about 0.1 s), :func:`run_process` in a new one
(``python -m cfa_tool``, about 2 s of importing numpy, pandas, scipy ... each time): the tests of what only a process
shows (a pipe closed early, runs with different string hashing) use the latter."""

from __future__ import annotations

import contextlib
import io
import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"
DATA = resource_dir("demo") / "rider_survey.csv"


def run(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    """The command line on ``args`` run in this process, in the folder ``cwd``, without CFA_TOOL_DEBUG (as
    :func:`run_process` runs it): its exit code (the parser's too: '--help', a mistaken option) and what it wrote on
    standard output and error, as a finished process's."""
    from cfa_tool.cli import main

    out, err = _Captured(), _Captured()
    debug = os.environ.pop("CFA_TOOL_DEBUG", None)
    try:
        with contextlib.chdir(cwd or os.getcwd()), contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            try:
                code = main(list(args))
            except SystemExit as stop:
                code = stop.code if isinstance(stop.code, int) else 0 if stop.code is None else 1
    finally:
        if debug is not None:
            os.environ["CFA_TOOL_DEBUG"] = debug
    return subprocess.CompletedProcess(["cfa-tool", *args], code, out.text(), err.text())


class _Captured(io.TextIOWrapper):
    """What a command writes to standard output or error: text in UTF-8 with a byte buffer beneath (the tool writes
    a binary output to standard output's), as pytest's own capture holds it; no terminal."""

    def __init__(self) -> None:
        super().__init__(io.BytesIO(), encoding="utf-8", newline="", write_through=True)

    def text(self) -> str:
        self.flush()
        return self.buffer.getvalue().decode("utf-8").replace("\r\n", "\n")


def run_process(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    """The command line on ``args`` run as a new process (``python -m cfa_tool``) in the folder ``cwd``."""
    return subprocess.run([sys.executable, "-m", "cfa_tool", *args], capture_output=True, text=True, cwd=cwd,
                          env=_env())


def _env() -> dict:
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
    # two processes: each hashes strings with its own seed, so an order that follows a set's would differ
    first = run_process("fit", "rider.cfa", "--data", "rider.csv", "--json", "-", cwd=workdir)
    second = run_process("fit", "rider.cfa", "--data", "rider.csv", "--json", "-", cwd=workdir)
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
