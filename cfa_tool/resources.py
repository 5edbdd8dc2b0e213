"""Locate files that ship with the tool: the grammar, the demo data and the example models.

In a source checkout they sit at the top of the repository; in an installed wheel
they are copied under ``cfa_tool/_bundled/`` (see ``pyproject.toml``).
"""

from __future__ import annotations

from pathlib import Path

_PACKAGE_DIR = Path(__file__).resolve().parent


def resource_dir(name: str) -> Path:
    """Return the directory ``name`` ('grammar', 'demo' or 'models')."""
    for candidate in (_PACKAGE_DIR / "_bundled" / name, _PACKAGE_DIR.parent / name):
        if candidate.is_dir():
            return candidate
    raise FileNotFoundError(f"the bundled '{name}' folder is missing from this installation")
