"""Every test but the comparisons in tests/semopy/ runs without semopy: no other test module imports it
(checked over the modules' syntax trees, imports inside functions included)."""

from __future__ import annotations

import ast
from pathlib import Path

TESTS = Path(__file__).resolve().parent


def _imports_semopy(path: Path) -> list[int]:
    lines = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        names = ([a.name for a in node.names] if isinstance(node, ast.Import)
                 else [node.module or ""] if isinstance(node, ast.ImportFrom) else [])
        if any(n == "semopy" or n.startswith("semopy.") for n in names):
            lines.append(node.lineno)
        if isinstance(node, ast.Call) and getattr(node.func, "attr", "") == "importorskip" and node.args \
                and isinstance(node.args[0], ast.Constant) and node.args[0].value == "semopy":
            lines.append(node.lineno)
    return lines


def test_only_the_semopy_folder_imports_semopy():
    outside = {str(p.relative_to(TESTS)): found for p in TESTS.rglob("*.py")
               if "semopy" not in p.relative_to(TESTS).parts[:1] and (found := _imports_semopy(p))}
    assert outside == {}, f"move these comparisons into tests/semopy/: {outside}"


def test_the_check_sees_an_import_inside_a_function(tmp_path):
    sample = tmp_path / "sample.py"
    sample.write_text("def f():\n    import semopy.multigroup as mg\n", encoding="utf-8")
    assert _imports_semopy(sample) == [2]
