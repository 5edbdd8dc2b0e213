"""An ordinal invariance ladder whose configural model is estimated but not admissible and whose thresholds step does
not converge: the configural model's impossible solution is said first, as in a ladder that runs through, and the step
that did not converge is not judged ('holds' null in the JSON, 'not judged (did not converge)' in the table), not a
step that does not hold (re-check s18, r03).  Simulated data (a correlation of .8 that leaves x1's residual near zero;
the Heywood case reproduced by an independent least-squares minimisation in
tests/pipeline/test_ordinal_heywood_without_bound.py)."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.reporting.workflow_tables import invariance_report
from tests.heywood_data import ITEMS, heywood_draws


def _two_groups() -> pd.DataFrame:
    X = heywood_draws(np.random.default_rng(1))
    data = pd.DataFrame(np.digitize(X, [-1.5, -.5, .5, 1.5]) + 1, columns=ITEMS)
    data["g"] = np.where(np.arange(400) % 2, "p", "q")
    return data


def test_the_configural_models_impossible_solution_comes_first_and_the_unconverged_step_is_not_judged():
    result = cfa_tool.invariance("factor a: x1, x2, x3\nfactor b: y1, y2, y3\n", _two_groups(), group="g",
                                 ordinal="all")
    configural, thresholds = result.steps[:2]
    assert configural.result.converged and not configural.result.admissible and not thresholds.result.converged
    assert str(result.warnings[0]).startswith("the configural model's solution is not admissible (a negative residual "
                                              "variance of x1")
    assert thresholds.to_dict()["holds"] is None
    assert thresholds.to_dict()["not_judged_because"] == "its estimation did not converge"
    [steps] = [t for t in invariance_report(result).tables if t.key == "steps"]
    assert [row[-1] for row in steps.rows if row[0] == "thresholds"] == ["not judged (did not converge)"]
