"""The start of ``cfa-tool fit``: the fit's report imports no workflow, exploratory analysis or scoring module
(finding which command a result belongs to once imported them all), no writer of a file it was not asked for and
not the path diagram; a run of the program collects cyclic garbage after every 200,000 new objects, while a caller
that passes the arguments keeps its own setting; and the program ends without the interpreter's teardown, its exit
steps done."""

from __future__ import annotations

import gc
import json
import subprocess
import sys
from pathlib import Path

import pytest

from cfa_tool import cli
from cfa_tool.reporting.document import ResultKind
from cfa_tool.reporting.reports import _RESULT_CLASSES, kind_of

# these tests read words with a temporary path among them in the terminal report
pytestmark = pytest.mark.usefixtures("wide_terminal")

DATA = Path(__file__).resolve().parents[1] / "datasets" / "holzinger_swineford_1939.csv"
MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"

# the program as ``cfa-tool fit`` runs it (arguments from the command line), then what it loaded and the
# collector's setting
CHILD = """
import gc, sys
from cfa_tool import cli
sys.argv = ["cfa-tool", "fit", sys.argv[1], "--data", sys.argv[2]]
code = cli.main()
print(code, gc.get_threshold()[0], sorted(m for m in sys.modules if m.startswith("cfa_tool.")), file=sys.stderr)
"""


def _run_fit(tmp_path: Path) -> tuple[int, int, list[str]]:
    model = tmp_path / "three.cfa"
    model.write_text(MODEL)
    done = subprocess.run([sys.executable, "-c", CHILD, str(model), str(DATA)], capture_output=True, text=True,
                          check=True)
    assert "Model file:" in done.stdout  # the report was shown
    code, threshold, loaded = done.stderr.strip().splitlines()[-1].split(" ", 2)
    return int(code), int(threshold), eval(loaded)  # noqa: S307 - a list of names printed by the child above


def test_a_fit_from_the_command_line_imports_only_what_its_report_uses(tmp_path):
    code, threshold, loaded = _run_fit(tmp_path)
    assert code == 0
    for package in ("cfa_tool.workflows", "cfa_tool.scoring", "cfa_tool.exploration.analysis"):
        assert not [m for m in loaded if m == package or m.startswith(package + ".")], package
    # the writers of files it was not asked for, and the path diagram, which the terminal names without drawing
    for writer in ("json_report", "html_report", "docx_report", "text_formats", "diagram", "escape"):
        assert f"cfa_tool.reporting.{writer}" not in loaded, writer
    # a complete-data fit runs nothing of fits with gaps, of many fits at once or of robust tests
    for module in ("estimation.fiml", "estimation.stacked", "inference.robust", "inference.design", "data.em",
                   "data.patterns"):
        assert f"cfa_tool.{module}" not in loaded, module
    # nor the halves of halves files (--half) or a saved fit's estimate rows: their dataclasses cost every start
    # (bench/README.md, "Eighteenth round: the cold start")
    for module in ("data.halves", "model.saved_estimates"):
        assert f"cfa_tool.{module}" not in loaded, module
    assert "cfa_tool.reporting.terminal" in loaded  # (what the report was drawn with)
    assert threshold == cli.COLLECT_EVERY


def test_a_caller_that_passes_the_arguments_keeps_its_collector_setting(tmp_path, capsys):
    before = gc.get_threshold()
    model = tmp_path / "three.cfa"
    model.write_text(MODEL)
    assert cli.main(["fit", str(model), "--data", str(DATA)]) == 0
    assert "Model file:" in capsys.readouterr().out
    assert gc.get_threshold() == before


def test_every_command_has_one_kind_and_the_fit_is_found_first(hs_three):
    assert [kind for kind, _, _ in _RESULT_CLASSES] == list(ResultKind)
    assert _RESULT_CLASSES[0][0] is ResultKind.FIT and kind_of(hs_three) is ResultKind.FIT


# the program's own end (cli.program), with a function registered at exit and, when asked, a thread still running
PROGRAM = """
import atexit, sys, threading, time
from cfa_tool import cli
atexit.register(lambda: print("registered at exit: ran", file=sys.stderr))
model, data, json_path, thread = sys.argv[1:]
fit = cli.main


def fit_then_a_thread():  # a thread still running when the program ends
    code = fit()
    if thread == "thread":
        threading.Thread(target=lambda: (time.sleep(0.3), print("thread finished", file=sys.stderr))).start()
    return code


cli.main = fit_then_a_thread
sys.argv = ["cfa-tool", "fit", model, "--data", data, "--json", json_path]
sys.exit(cli.program())
"""


def _run_program(tmp_path: Path, thread: str) -> tuple[subprocess.CompletedProcess, Path]:
    model = tmp_path / "three.cfa"
    model.write_text(MODEL)
    json_path = tmp_path / "fit.json"
    done = subprocess.run([sys.executable, "-c", PROGRAM, str(model), str(DATA), str(json_path), thread],
                          capture_output=True, text=True)
    return done, json_path


def test_the_program_does_what_an_exit_must_before_it_leaves(tmp_path):
    """Without the interpreter's teardown: the report flushed in full (its last line is the file written), the
    result file complete, the function registered at exit run, the exit code kept."""
    done, json_path = _run_program(tmp_path, "")
    assert done.returncode == 0
    assert done.stdout.startswith(str(tmp_path / "three.cfa")) and "Model file:" in done.stdout
    assert done.stdout.rstrip().splitlines()[-1] == f"JSON result written to {json_path}"
    assert json.loads(json_path.read_text())["command"] == "fit"
    assert "registered at exit: ran" in done.stderr


def test_the_program_with_another_thread_running_ends_as_usual(tmp_path):
    done, json_path = _run_program(tmp_path, "thread")
    assert done.returncode == 0 and "registered at exit: ran" in done.stderr
    assert "thread finished" in done.stderr  # waited for, as the interpreter's usual exit does
    assert json.loads(json_path.read_text())["command"] == "fit"


def test_the_program_keeps_the_exit_code_of_a_refused_input(tmp_path):
    done = subprocess.run([sys.executable, "-m", "cfa_tool", "fit", str(tmp_path / "missing.cfa"), "--data", str(DATA)],
                          capture_output=True, text=True)
    assert done.returncode == 2 and done.stdout == ""
    assert done.stderr.strip().splitlines() == [f"cfa-tool: model file '{tmp_path / 'missing.cfa'}' does not exist"]
