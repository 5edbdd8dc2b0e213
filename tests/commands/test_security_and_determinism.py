"""User input is parsed, never run; outputs are written atomically and never over an input;
the same inputs give byte-identical JSON."""

from __future__ import annotations

import ast
import json
from pathlib import Path

import cfa_tool
from cfa_tool.errors import CfaError
from cfa_tool.output_files import write_file
from tests.conftest import THREE_FACTORS
from tests.commands.test_cli import DATA, MODEL, run_process

PACKAGE = Path(cfa_tool.__file__).parent
FORBIDDEN_CALLS = {"eval", "exec", "compile", "__import__"}
FORBIDDEN_MODULES = {"pickle", "marshal", "shelve", "dill", "cloudpickle"}


def test_no_code_execution_of_user_input_anywhere_in_the_package():
    for path in PACKAGE.rglob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Call) and isinstance(node.func, ast.Name):
                assert node.func.id not in FORBIDDEN_CALLS, f"{path}:{node.lineno} calls {node.func.id}"
            if isinstance(node, (ast.Import, ast.ImportFrom)):
                modules = [a.name for a in node.names] if isinstance(node, ast.Import) else [node.module or ""]
                for module in modules:
                    assert module.split(".")[0] not in FORBIDDEN_MODULES, f"{path}:{node.lineno} imports {module}"
            if isinstance(node, ast.Attribute) and node.attr in ("query", "eval") and isinstance(node.value, ast.Name):
                assert node.value.id not in ("pd", "frame", "data"), f"{path}:{node.lineno} uses pandas {node.attr}"


def test_atomic_write_leaves_no_partial_file(tmp_path, monkeypatch):
    target = tmp_path / "out.json"
    target.write_text("old")

    def interrupted(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr("cfa_tool.output_files.os.replace", interrupted)
    try:
        write_file(target, "new")
    except CfaError:
        pass
    assert target.read_text() == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["out.json"]


def _json(*args: str) -> str:
    """The JSON of a run in a new process: each process hashes strings with its own seed, so an order that followed
    a set's would differ between two runs."""
    proc = run_process(*args, "--json", "-")
    assert proc.returncode == 0, proc.stderr
    return proc.stdout


def test_json_is_byte_identical_across_runs(tmp_path):
    for args in (("fit", str(MODEL), "--data", str(DATA), "--robust", "--incomplete-rows", "listwise"),
                 ("invariance", str(MODEL), "--data", str(DATA), "--group-column", "district", "--partial", "auto"),
                 ("compare", str(MODEL.parent / "rider_one_factor.cfa"), str(MODEL), "--data", str(DATA)),
                 ("replicate", str(MODEL), "--data", str(DATA), "--seed", "9")):
        first, second = _json(*args), _json(*args)
        assert first == second, args
        json.loads(first)


def test_python_results_are_deterministic(hs_data):
    a = cfa_tool.fit(THREE_FACTORS, hs_data).to_dict()
    b = cfa_tool.fit(THREE_FACTORS, hs_data).to_dict()
    assert json.dumps(a) == json.dumps(b)
