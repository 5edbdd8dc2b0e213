"""Every dataclass of the package says what it holds in a docstring of its own.

Besides telling a reader what the class is, a docstring spares the command's start some work: for a dataclass
without one, Python's ``dataclasses`` writes one from ``inspect.signature`` of the new class when the module is
imported (in Python 3.11: ``_process_class``), about a tenth of the cost of making the class.  A plain ``fit``
imports about a hundred of the package's dataclasses (bench/README.md, "Eighteenth round: the cold start")."""

from __future__ import annotations

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[1] / "cfa_tool"


def _is_dataclass(node: ast.ClassDef) -> bool:
    def name(decorator: ast.expr) -> str:
        target = decorator.func if isinstance(decorator, ast.Call) else decorator
        return target.attr if isinstance(target, ast.Attribute) else getattr(target, "id", "")

    return any(name(d) == "dataclass" for d in node.decorator_list)


def test_every_dataclass_of_the_package_has_a_docstring():
    found, missing = 0, []
    for path in sorted(PACKAGE.rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ClassDef) and _is_dataclass(node):
                found += 1
                if not ast.get_docstring(node):
                    missing.append(f"{path.relative_to(PACKAGE.parent)}:{node.lineno} {node.name}")
    assert found > 100  # the walk found the package's dataclasses (well over a hundred)
    assert not missing, "dataclasses without a docstring:\n" + "\n".join(missing)


def test_a_dataclass_imported_by_a_fit_keeps_the_docstring_it_was_given():
    # (a dataclass without one gets "Name(text: 'str', location: 'Location')", built from its signature)
    from cfa_tool.language.spec import Name
    from cfa_tool.pipeline.results import FitResult

    assert Name.__doc__ and not Name.__doc__.startswith("Name(")
    assert FitResult.__doc__ and not FitResult.__doc__.startswith("FitResult(")
