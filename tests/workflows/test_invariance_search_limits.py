"""Limits of the partial-invariance search and steps that add nothing to test (hostile trial s11).

Data: the invented rider survey of the demo, with invented shifts of some items in one district.  Check values:
the 5% critical value of chi-square on 1 df (3.841, scipy.stats.chi2, a general-purpose library) for the score tests
the search may free; the degrees of freedom of each step counted from the model (one equality per group pair).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.workflows.invariance import STOP_LAST_EQUALITY, STOP_NOT_SIGNIFICANT, STOP_UNTESTED

THREE = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n")


def test_a_step_that_adds_no_equality_is_not_tested_and_never_held(rider_demo):
    # every non-marker intercept declared not equal: the scalar step holds only the three marker intercepts equal,
    # which the factor means (free in the second group) absorb: 0 df, no test; it was reported "held (chi2(0) = 0.00,
    # p = )"
    free = ", ".join(f"intercept({x})" for x in ("short_wait", "accurate_info", "easy_transfer", "clean", "temperature",
                                                  "room_to_stand", "helpful", "respectful", "clear_answers"))
    ladder = cfa_tool.invariance(THREE + f"noninvariant {free}\n", rider_demo, "district")
    scalar = next(s for s in ladder.steps if s.level == "scalar")
    assert scalar.versus_previous.df_difference == 0
    assert scalar.untested and not scalar.holds and scalar.stopped == ""  # no search asked for: no reason stored
    assert scalar.to_dict()["tested"] is False and scalar.to_dict()["holds"] is False
    said = " ".join(ladder.summary().split())
    assert "was not tested: its model adds no equality to the step before (0 degrees of freedom)" in said
    assert "p = ," not in said and "p = )" not in said
    assert not ladder.latent_differences  # means compared only where the scalar step held


def _scaled_loadings(data, factors: dict[str, float]):
    south = (data.district == "south").to_numpy()
    out = data.copy()
    for item, factor in factors.items():
        values = out[item].astype(float)
        centre = values[south].mean()
        out[item] = np.where(south, centre + (values - centre) * factor, values)
    return out


def test_the_search_never_frees_the_last_equality_of_a_step(rider_demo):
    # one factor, three items, two free loadings, both changed in the south: the search freed both and called the
    # metric step held on 0 df
    data = _scaled_loadings(rider_demo, {"short_wait": 3.0, "accurate_info": -1.0})
    ladder = cfa_tool.invariance("factor punctuality: on_time, short_wait, accurate_info\n", data, "district",
                                 partial="auto")
    metric = next(s for s in ladder.steps if s.level == "metric")
    assert metric.full_test.df_difference == 2 and len(metric.freed) == 1  # one equality left to test
    assert metric.versus_previous.df_difference == 1 and not metric.holds
    assert metric.stopped == STOP_LAST_EQUALITY
    # the model with every loading equal had an impossible solution: said first, and in the JSON
    assert not metric.full_result.admissible
    assert ladder.warnings[0].startswith("the metric model with every equality held has a solution that is not "
                                         "admissible")
    full = metric.to_dict()["with_every_equality"]
    assert full["admissible"] is False and any(p["kind"] == "negative variance" or "variance" in p["kind"]
                                               for p in full["problems"])


def test_the_search_frees_only_equalities_whose_score_test_is_significant(rider_demo):
    # tau-equivalent factors (every loading fixed at 1) and invented shifts, scalings and a reversal in the south:
    # the metric model meets its test (p = .61) but has a negative residual variance in the south; the search freed
    # two loadings whose score tests were 0.76 and 0.56 and called that partial invariance
    tau = THREE + "".join(f"fix loading({f}, {x}) = 1\n" for f, items in (
        ("punctuality", ("short_wait", "accurate_info", "easy_transfer")), ("comfort", ("clean", "temperature",
         "room_to_stand")), ("courtesy", ("helpful", "respectful", "clear_answers"))) for x in items)
    data = rider_demo.copy()
    south = (data.district == "south").to_numpy()
    items = list(data.columns[2:])
    for k, x in enumerate(items):
        data[x] = data[x].astype(float)
    shifts = dict(zip(items[:8], [1.5, 0, -1.0, 0.8, 0, 1.2, -0.9, 0.7]))
    for x, by in shifts.items():
        data.loc[south, x] = data.loc[south, x] + by
    for x, by in zip(items[8:], [1, 2.5, 0.4, 1]):
        data.loc[south, x] = data.loc[south, x] * by
    ladder = cfa_tool.invariance(tau, data, "district", partial="auto")
    critical = stats.chi2.ppf(0.95, 1)
    assert critical == pytest.approx(3.841, abs=1e-3)
    metric = next(s for s in ladder.steps if s.level == "metric")
    assert not metric.result.admissible and metric.versus_previous.p_value > 0.05
    assert metric.stopped == STOP_NOT_SIGNIFICANT and not metric.freed and not metric.holds
    assert metric.culprits[0].index <= critical
    for step in ladder.steps:
        assert all(f.score > critical for f in step.freed)
    assert ladder.warnings[0].startswith("the metric model's solution is not admissible")
