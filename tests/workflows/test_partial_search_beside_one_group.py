"""The partial-invariance search beside a parameter the model file sets apart in one group (hostile s21: with clean's
intercept set apart in group 'east side' and clean shifted in north as well, the search skipped clean's remaining
north = south equality, the one source of misfit, and freed two innocent intercepts instead, calling partial scalar
invariance held).  Now it frees the rest of that equality where its score test points, in that group alone, and the
ladder's partial model is the model file with that statement added (its chi-square the same), every view saying
'alone'."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import invariance_paragraph
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.workflow_tables import invariance_report
from cfa_tool.workflows.invariance import LEVELS, invariance

MODEL = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n")
SET_APART = 'in group "east side": noninvariant intercept(clean)\n'


@pytest.fixture(scope="module")
def shifted(rider_demo):
    d = rider_demo.drop(columns=["district"]).copy()
    d["g3"] = np.array(["north", "south", "east side"])[np.arange(len(d)) % 3]  # invented groups of the demo rows
    d.loc[d.g3 == "east side", "clean"] = np.clip(d.loc[d.g3 == "east side", "clean"] + 1, 1, 5)
    d.loc[d.g3 == "north", "clean"] = np.clip(d.loc[d.g3 == "north", "clean"] - 1, 1, 5)
    return d


@pytest.fixture(scope="module")
def ladder(shifted):
    return invariance(MODEL + SET_APART, shifted, "g3", partial="auto")


def test_the_search_frees_the_rest_of_the_equality_in_one_group(ladder, shifted):
    scalar = [f for f in ladder.freed if f.level == "scalar"]
    assert [(f.kind, f.variables, f.alone) for f in scalar][:1] == [("intercept", ("clean",), True)]
    first = scalar[0]
    assert first.group in ("north", "south") and first.to_dict()["in_this_group_alone"] is True
    # the same model written by hand: the metric step's freed loadings, the file's statement and the search's
    metric = "".join(f"noninvariant loading({f.variables[0]}, {f.variables[1]})\n" for f in ladder.freed
                     if f.level == "metric")
    by_hand = cfa_tool.fit(MODEL + "invariance scalar\n" + metric + SET_APART
                           + f"in group {first.group}: noninvariant intercept(clean)\n", shifted, group="g3")
    step = next(s for s in ladder.steps if s.level == "scalar")
    if len(scalar) == 1:  # the step's final partial model is that model
        assert step.result.fit.chi_square == pytest.approx(by_hand.fit.chi_square, rel=1e-8)
    assert step.result.admissible and step.holds
    # the innocent intercepts the skipped equality had pushed the search to
    assert ("intercept", ("seat_available",)) not in [(f.kind, f.variables) for f in scalar]


def test_every_view_says_alone(ladder):
    words = f"intercept of clean in group {ladder.freed[[f.level for f in ladder.freed].index('scalar')].group}"
    assert words + " alone" in " ".join(report_text(invariance_report(ladder)).split()).replace('"', "")
    assert words + " alone" in " ".join(invariance_paragraph(ladder, LEVELS).split()).replace('"', "")
