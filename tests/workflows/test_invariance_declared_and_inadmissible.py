"""What an invariance ladder says about its steps: partial invariance declared in the model file ('noninvariant')
is called partial in every view and names the parameters left free; an inadmissible step does not hold.

Check values: degrees of freedom counted by hand (written below); the simulation's own population
(tests.workflows.test_invariance_decisions)."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest

from cfa_tool.reporting.workflow_tables import invariance_report
from cfa_tool.workflows.invariance import invariance
from tests.workflows.test_invariance_decisions import MODEL, groups_data

DEMO = Path(__file__).resolve().parents[2] / "demo" / "rider_survey.csv"
THREE = Path(__file__).resolve().parents[2] / "models" / "rider_three_factors.cfa"


@pytest.fixture(scope="module")
def declared():
    # y5's intercept is .5 higher in the second group (the population's one non-invariant parameter)
    return invariance(MODEL + "noninvariant intercept(y5)\n", groups_data(31, shift=(1, 4), mean_last=(0.5, 0.0)), "grp")


def test_a_declared_exemption_makes_the_step_partial_in_the_result_and_its_json(declared):
    by = {s.level: s for s in declared.steps}
    assert by["metric"].declared == () and [str(r) for r in by["scalar"].declared] == ["intercept(y5)"]
    # hand count, 2 groups of 6 items and 2 factors: configural 2 x (27 moments - 19 parameters) = 16; metric
    # + 4 loadings = 20; scalar + 6 intercepts - 2 factor means - 1 intercept left free = 23
    assert [s.result.fit.df for s in declared.steps[:3]] == [16, 20, 23]
    steps = declared.to_dict()["steps"]
    assert [s["partial"] for s in steps] == [False, False, True, True]
    assert steps[2]["declared_not_equal"] == [{"kind": "intercept", "variables": ["y5"], "group": None}]
    assert declared.latent_note.startswith("From the partially invariant scalar model")
    d = {x.factor: x for x in declared.latent_differences}
    assert abs(d["f"].mean - 0.4) < 4 * d["f"].se  # marker y1 loads .8: the population's .5 is .4 in its metric


def test_every_view_calls_the_declared_step_partial_and_names_the_parameter(declared):
    report = invariance_report(declared)
    steps = next(t for t in report.tables if t.key == "steps")
    assert [row[0] for row in steps.rows] == ["configural", "metric", "scalar (partial)", "strict (partial)"]
    assert any("declared in the model file" in n and "the intercept of y5 (from the scalar step)" in n
               for n in report.notes)
    # the paper's words: the specification, not the tool's file (new-user trial s13: "as the model file declares")
    assert "the intercept of y5 specified as not held equal across groups" in report.paragraph
    assert "model file" not in report.paragraph
    assert "from the partially invariant scalar model" in report.paragraph
    # the configural model as fitted: its scales too
    assert "The scale of each factor was set by fixing the loading of one indicator to 1 (y1 for f and y4 for h)." \
        in report.paragraph


@pytest.fixture(scope="module")
def small_group():
    # the demo data's last 15 rows as a third group: too few rows for 12 items, its solution has negative
    # residual variances (the hostile trial's case)
    frame = pd.read_csv(DEMO)
    frame.loc[frame.index[-15:], "district"] = "harbor"
    return invariance(THREE.read_text(), frame, "district", reference_group="harbor")


def test_an_inadmissible_step_does_not_hold_and_says_why(small_group):
    first = small_group.steps[0]
    assert not first.result.admissible and not first.holds
    assert all(s.conditional for s in small_group.steps[1:])
    assert not any("does not fit by the guide values" in w for w in small_group.warnings)  # it fits; it is impossible
    report = invariance_report(small_group)
    steps = next(t for t in report.tables if t.key == "steps")
    assert steps.rows[0][-1] == "inadmissible"
    assert "'inadmissible': the step's solution is not admissible" in steps.note
    assert "The configural model did not hold: its solution was not admissible" in report.paragraph
