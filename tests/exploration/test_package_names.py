"""The exploration package's public names load their modules on first use (a fit's report imports only the
package's vocabulary, ``exploration.choices``), and each name is the object its module defines."""

from __future__ import annotations

import importlib
import subprocess
import sys

import cfa_tool.exploration as exploration


def test_every_public_name_is_its_modules_object():
    for name in exploration.__all__:
        home = importlib.import_module(f"cfa_tool.exploration.{exploration._HOME[name]}")
        assert getattr(exploration, name) is getattr(home, name), name
    assert set(exploration.__all__) <= set(dir(exploration))


def test_the_function_loading_errors_is_not_shadowed_by_a_module():
    """Importing every submodule first must leave the package's ``loading_errors`` the function."""
    import cfa_tool.exploration.analysis  # noqa: F401  imports the standard errors' module
    from cfa_tool.exploration import loading_errors

    assert callable(loading_errors) and loading_errors.__module__ == "cfa_tool.exploration.rotated_errors"


def test_unknown_name_is_an_attribute_error():
    try:
        exploration.no_such_name  # noqa: B018
    except AttributeError as error:
        assert "no_such_name" in str(error)
    else:
        raise AssertionError("no AttributeError")


def test_the_fit_report_does_not_import_the_exploratory_analysis():
    code = ("import sys, cfa_tool.reporting.terminal, cfa_tool.pipeline.inputs; "
            "print(sorted(m for m in sys.modules if m.startswith('cfa_tool.exploration')))")
    loaded = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip()
    assert loaded == "['cfa_tool.exploration', 'cfa_tool.exploration.choices']"
