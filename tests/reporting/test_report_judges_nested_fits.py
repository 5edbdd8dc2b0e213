"""``report`` judges every fit a saved result holds, not only a fit result's own estimates: the models of a saved
comparison and the steps of a saved invariance ladder too (problems first in every view).

Check values: the Holzinger & Swineford (1939) data (tests/datasets); the three-factor model with residual
covariances x7-x8 and x8-x9 has an inadmissible solution (a Heywood case, as the fit itself finds it: see
tests/workflows/test_edited_saved_fits.py), the plain three-factor model an admissible one.  The edits below put a
problem into a saved file whose saved report does not show it, as a file changed after the run would.
"""

from __future__ import annotations

import json

import pytest

from cfa_tool.cli import main
from tests.conftest import DATASETS, THREE_FACTORS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
HEYWOOD = THREE_FACTORS + "covary x7, x8\ncovary x8, x9\n"
PROBLEM = {"kind": "negative residual variance", "inadmissible": True, "parameters": ["residual_variance(x1)"],
           "parameters_in_words": ["the residual variance of x1"], "value": -0.5, "group": None,
           "explanation": "The residual (error) variance of x1 is negative (-0.500): impossible for a variance.",
           "advice": "fit the model again."}


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, " ".join(out.out.replace("┃", " ").replace("│", " ").split()), out.err


@pytest.fixture(scope="module")
def compared(tmp_path_factory):
    folder = tmp_path_factory.mktemp("compare")
    plain, heywood = folder / "three.cfa", folder / "heywood.cfa"
    plain.write_text(THREE_FACTORS)
    heywood.write_text(HEYWOOD.replace("three abilities", "with residual covariances"))
    saved = folder / "compare.json"
    assert main([str(a) for a in ("compare", plain, heywood, "--data", HS_FILE, "--json", saved)]) == 0
    return saved


def test_a_saved_comparison_shows_its_inadmissible_model_once(compared, capsys):
    # the saved report already says so: nothing is added twice
    payload = json.loads(compared.read_text())
    assert [m["admissible"] for m in payload["models"]] == [True, False]
    code, words, _ = _run(["report", compared], capsys)
    assert code == 0 and "does not say so" not in words
    assert words.count("with residual covariances is not admissible (a negative residual variance of x9") == 1


def test_a_problem_put_into_a_saved_comparison_is_shown_first(compared, tmp_path, capsys):
    payload = json.loads(compared.read_text())
    payload["models"][0]["problems"].append(PROBLEM)  # the admissible model, its saved report unchanged
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(payload))
    code, words, _ = _run(["report", edited], capsys)
    assert code == 0
    line = ("Holzinger-Swineford, three abilities is not admissible, and the report saved with it does not say so "
            "(changed after the run?): The residual (error) variance of x1 is negative (-0.500)")
    assert line in words and words.index(line) < words.index("Fit of each model")


def test_a_problem_put_into_a_saved_invariance_step_is_shown_first(tmp_path, capsys):
    model = tmp_path / "three.cfa"
    model.write_text(THREE_FACTORS)
    saved = tmp_path / "invariance.json"
    assert _run(["invariance", model, "--data", HS_FILE, "--group-column", "school", "--json", saved],
                capsys)[0] == 0
    code, words, _ = _run(["report", saved], capsys)
    assert code == 0 and "does not say so" not in words
    payload = json.loads(saved.read_text())
    assert payload["steps"][1]["level"] == "metric"
    payload["steps"][1]["problems"].append(PROBLEM)
    payload["steps"][1]["admissible"] = False
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(payload))
    code, words, _ = _run(["report", edited], capsys)
    assert code == 0
    line = "The metric model is not admissible, and the report saved with it does not say so (changed after the run?)"
    assert line in words and words.index(line) < words.index("Reference group")
