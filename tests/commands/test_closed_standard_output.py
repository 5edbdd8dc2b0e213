"""A reader of standard output that stops early ('cfa-tool simulate ... --output f.csv | head'): every file asked for
is written before the report is printed, and the closed pipe ends the run with the shells' status 141 (128 +
SIGPIPE) and no message, whatever the command (commands.common.show is the one place a command prints)."""

from __future__ import annotations

import subprocess
import sys

import pytest

from tests.commands.test_cli import _env, run, workdir  # noqa: F401 - the fixture


def _closed_early(args: list[str], cwd) -> tuple[int, bytes]:
    """Run the program with its standard output a pipe whose reader has gone before it writes a line."""
    proc = subprocess.Popen([sys.executable, "-m", "cfa_tool", *args], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            cwd=cwd, env=_env())
    proc.stdout.close()
    err = proc.stderr.read()
    return proc.wait(), err


@pytest.mark.parametrize("args, files", [
    (["simulate", "rider.cfa", "--n", "60", "--output", "simulated.csv", "--json", "simulated.json"],
     ["simulated.csv", "simulated.json"]),
    (["fit", "rider.cfa", "--data", "rider.csv", "--json", "fit.json", "--markdown", "fit.md", "--tables", "tables"],
     ["fit.json", "fit.md", "tables"]),
    (["scores", "rider.cfa", "--data", "rider.csv", "--output", "scores.csv"], ["scores.csv"]),
])
def test_a_closed_standard_output_loses_no_file_and_prints_no_traceback(args, files, workdir):  # noqa: F811
    code, err = _closed_early(args, workdir)
    assert code == 141 and err == b"", err.decode(errors="replace")
    for name in files:
        assert (workdir / name).exists(), name
    if "tables" in files:
        assert any((workdir / "tables").iterdir())


def test_report_of_a_saved_result_to_a_closed_standard_output(workdir):  # noqa: F811
    assert run("fit", "rider.cfa", "--data", "rider.csv", "--json", "fit.json", cwd=workdir).returncode == 0  # the input
    code, err = _closed_early(["report", "fit.json"], workdir)  # the terminal view only
    assert code == 141 and err == b""
    code, err = _closed_early(["report", "fit.json", "--html", "fit.html"], workdir)  # files: the problems only
    assert code in (0, 141) and err == b"" and (workdir / "fit.html").exists()
