"""power-simulation's advice on a model with an 'answers' statement leads to a run that works (new-user trial s21,
finding 7: planned from a continuous fit, the statement was refused with advice to give --categories, which then
refused the continuous fit with advice to leave --categories out).  The test follows the advice as a user would:
it reads the option the refusal names, runs it, and checks what the run's population is.  Invented data: a fictional
transit agency's rider survey, five items answered in four words, simulated with a fixed seed."""

from __future__ import annotations

import json
import re

import numpy as np
import pytest

from cfa_tool.workflows.simulation import simulate
from tests.commands.test_cli import run

MODEL = ('factor comfort: q1..q5\n'
         'answers "Never" = 1, "Sometimes" = 2, "Often" = 3, "Always" = 4\n')


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    folder = tmp_path_factory.mktemp("advice_route")
    model, data, fit = folder / "comfort.cfa", folder / "riders.csv", folder / "fit.json"
    model.write_text(MODEL)
    simulate(MODEL, 400, seed=21).frame.to_csv(data, index=False)  # the statement's words
    proc = run("fit", str(model), "--data", str(data), "--json", str(fit))  # continuous: the answers as 1 to 4
    assert proc.returncode == 0, proc.stderr
    return model, fit


def test_the_advice_on_the_answers_statement_names_a_run_that_works(fitted, tmp_path):
    model, fit = fitted
    refused = run("power-simulation", str(model), "--n", "150", "--replications", "4", "--workers", "1",
                  "--population-from", str(fit))
    assert refused.returncode == 2
    advised = re.search(r"--categories (\d+)", refused.stderr)
    assert advised is not None and advised.group(1) == "4"  # the statement's four codes
    out = tmp_path / "power.json"
    followed = run("power-simulation", str(model), "--n", "150", "--replications", "4", "--workers", "1",
                   "--population-from", str(fit), "--categories", advised.group(1), "--json", str(out))
    assert followed.returncode == 0, followed.stderr
    said = " ".join(followed.stdout.split())
    assert "rescaled so that every item's latent response has variance 1" in said
    result = json.loads(out.read_text())
    values = {(v["kind"], tuple(v["variables"])): v for v in result["population"]}
    # on the latent responses' scale a residual variance is 1 less the communality, its standardized value, and
    # every item's variance is 1 (the parameterization of ordinal items; Muthen 1984, recalled from memory)
    for j in range(1, 6):
        residual = values[("residual_variance", (f"q{j}",))]
        assert residual["value"] == pytest.approx(residual["standardized"], abs=1e-6)
        loading = values[("loading", ("comfort", f"q{j}"))]["standardized"]
        assert residual["value"] == pytest.approx(1 - loading ** 2, abs=1e-6)
    assert np.all([t["from"] == "default" for t in result["population"] if t["kind"] == "threshold"])
