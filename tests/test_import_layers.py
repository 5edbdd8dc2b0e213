"""The package's layers, read from its source: data flow one way (the contributor guide's module table).

Every import of a package module (at the top of a file or inside a function) is read from the syntax
tree, and a module may import only modules of its own layer or of the layers before it:

    shared numerics and errors -> language -> data -> model -> estimation -> inference/assessment
    -> pipeline -> workflows -> reporting -> command line

Modules also must not import each other in a circle, even within a layer.
"""

from __future__ import annotations

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[1] / "cfa_tool"

# (layer, the modules and subpackages in it); a name covers the module and everything below it
LAYERS: tuple[tuple[str, tuple[str, ...]], ...] = (
    ("shared numerics and errors", ("numerics", "errors", "version", "method", "views", "options", "note_parts",
                                    "numbers", "suggest", "resources", "input_files")),
    ("language", ("language",)),
    ("data", ("data",)),
    ("model", ("model",)),
    ("estimation", ("estimation",)),
    ("inference and assessment", ("inference", "assessment")),
    ("pipeline", ("pipeline", "exploration")),
    ("workflows", ("workflows", "scoring")),
    ("reporting", ("reporting", "output_files")),
    ("command line", ("cli", "__main__", "commands", "")),  # "": the package's top module, the public entry points
)


def module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE).with_suffix("").parts
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def layer_of(module: str) -> int:
    """The layer of a module given without the package prefix ("" is the package's top module)."""
    best, found = -1, None
    for index, (_, names) in enumerate(LAYERS):
        for name in names:
            if name == "" and module == "":
                return index
            if name and (module == name or module.startswith(name + ".")) and len(name) > best:
                best, found = len(name), index
    if found is None:
        raise AssertionError(f"module cfa_tool.{module} is in no layer: add it to LAYERS and to DEVELOPERS.md")
    return found


def _exists(module: str) -> bool:
    base = PACKAGE.joinpath(*module.split(".")) if module else PACKAGE
    return base.with_suffix(".py").is_file() or (base / "__init__.py").is_file()


def imports_of(path: Path) -> list[tuple[str, int]]:
    """(imported package module without the prefix, line) for every import of a package module in ``path``."""
    return imports_in(path.read_text(encoding="utf-8"), module_name(path), path.name == "__init__.py")


def imports_in(source: str, own: str, is_package: bool) -> list[tuple[str, int]]:
    """The imports of package modules in the source of module ``own`` (a package's __init__ when ``is_package``)."""
    package_parts = own.split(".") if own else []
    if not is_package:
        package_parts = package_parts[:-1]
    found = []
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, ast.Import):
            for alias in node.names:
                if alias.name == "cfa_tool" or alias.name.startswith("cfa_tool."):
                    found.append((alias.name[len("cfa_tool."):] if "." in alias.name else "", node.lineno))
        elif isinstance(node, ast.ImportFrom):
            if node.level:  # relative import
                base = package_parts[: len(package_parts) - node.level + 1]
                target = ".".join(base + ([node.module] if node.module else []))
            elif node.module == "cfa_tool" or (node.module or "").startswith("cfa_tool."):
                target = node.module[len("cfa_tool."):] if "." in node.module else ""
            else:
                continue
            for alias in node.names:  # a submodule named in the list is imported itself
                sub = f"{target}.{alias.name}" if target else alias.name
                found.append((sub if _exists(sub) else target, node.lineno))
    return found


def import_graph() -> dict[str, list[tuple[str, int]]]:
    return {module_name(path): imports_of(path) for path in sorted(PACKAGE.rglob("*.py"))}


def test_every_import_follows_the_layer_order():
    backward = []
    for module, imports in import_graph().items():
        own = layer_of(module)
        for target, line in imports:
            if layer_of(target) > own:
                backward.append(f"cfa_tool/{module.replace('.', '/') or '__init__'}.py:{line}: {module or 'cfa_tool'} "
                                f"({LAYERS[own][0]}) imports {target or 'cfa_tool'} ({LAYERS[layer_of(target)][0]})")
    assert not backward, "imports against the layer order:\n" + "\n".join(backward)


def test_no_modules_import_each_other_in_a_circle():
    graph = {module: sorted({t for t, _ in imports if t != module}) for module, imports in import_graph().items()}
    # a package's __init__ re-exporting its modules is not a circle with them
    graph = {m: [t for t in targets if not (m.startswith(t + ".") or t == "")] for m, targets in graph.items()}
    state: dict[str, int] = {}
    circles = []

    def visit(module: str, path: list[str]) -> None:
        state[module] = 1
        for target in graph.get(module, ()):
            if state.get(target) == 1:
                circles.append(" -> ".join(path[path.index(target):] + [target]) if target in path else target)
            elif target not in state:
                visit(target, path + [target])
        state[module] = 2

    for module in graph:
        if module not in state:
            visit(module, [module])
    assert not circles, "modules that import each other:\n" + "\n".join(circles)


def test_the_reader_finds_every_form_of_import():
    source = ("import numpy\nfrom cfa_tool.numerics import linalg\nfrom cfa_tool.errors import OptionError\n"
              "from cfa_tool import options as check\nimport cfa_tool.language.spec\n\n"
              "def later():\n    from cfa_tool.reporting.terminal import render_text\n    from . import implied\n"
              "    from ..data.moments import SampleMoments\n    import cfa_tool\n")
    assert imports_in(source, "model.starts", False) == [
        ("numerics.linalg", 2), ("errors", 3), ("options", 4), ("language.spec", 5), ("reporting.terminal", 8),
        ("model.implied", 9), ("data.moments", 10), ("", 11)]
    assert layer_of("reporting.terminal") > layer_of("pipeline.results") > layer_of("model.starts") > layer_of("numerics.linalg")
    assert layer_of("inference.robust") == layer_of("assessment.fit_indices")
    assert layer_of("") == len(LAYERS) - 1
