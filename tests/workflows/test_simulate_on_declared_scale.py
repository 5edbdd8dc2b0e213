"""simulate writes the items a 'reversed ... on MIN to MAX' statement puts on a scale (its own items and their
factor's other items) as whole answers MIN to MAX, so the file fits back with the model file it came from; the
statement's scale was ignored (continuous values around 0, which the same model file then refused as outside the
scale: hostile tester s24).  power-simulation, which fits continuous values, refuses such items up front unless they
are declared ordinal, as it refuses an 'answers' statement's.

Check values: equally likely categories cut at the normal quantiles Phi^-1(c / k) have probability 1 / k each (the
normal distribution's definition), so each of five answers' share of 20,000 rows is .2 up to Monte Carlo error
(binomial SE .0028)."""

from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import ModelError
from cfa_tool.workflows.simulation import simulate

MODEL = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "reversed clean on 1 to 5\n")
COMFORT = ["seat_available", "clean", "temperature", "room_to_stand"]


def test_items_on_the_declared_scale_are_whole_answers_that_fit_back():
    frame = simulate(MODEL, 20_000, seed=3).frame
    for x in COMFORT:
        values = frame[x].to_numpy(dtype=float)
        assert set(np.unique(values)) == {1.0, 2.0, 3.0, 4.0, 5.0}
        shares = np.bincount(values.astype(int), minlength=6)[1:] / len(values)
        assert np.allclose(shares, 0.2, atol=0.015)
    assert frame["on_time"].nunique() > 1000  # the items of no declared scale stay continuous
    # clean is reverse-keyed (its default loading is negative): it runs against its partners
    assert np.corrcoef(frame["clean"].astype(float), frame["temperature"].astype(float))[0, 1] < -0.2
    small = simulate(MODEL, 300, seed=3)
    result = cfa_tool.fit(MODEL, small.frame)  # refused before: answers outside the scale 1 to 5
    assert result.fit is not None
    assert small.scaled == tuple(COMFORT)
    from cfa_tool.reporting.reports import report_of

    assert any("are written as whole answers 1 to 5" in str(line) for line in report_of(small).lines)


@pytest.mark.parametrize("scale, words", [("on 0.5 to 5", "does not run between whole numbers"),
                                          ("on 1 to 500", "has more than 100 answers")])
def test_a_scale_that_gives_no_categories_is_refused_at_the_statement(scale, words):
    with pytest.raises(ModelError, match=words) as caught:
        simulate(MODEL.replace("on 1 to 5", scale), 100)
    assert caught.value.location.line == 3


def test_categories_that_disagree_with_the_scale_are_refused():
    with pytest.raises(ModelError, match="cuts 'seat_available' into 4 categories, and this statement declares its "
                                         "scale 1 to 5"):
        simulate(MODEL, 100, categories=4)


def test_power_simulation_refuses_continuous_values_for_items_on_a_scale():
    with pytest.raises(ModelError, match="power-simulation simulates continuous values") as caught:
        cfa_tool.power_simulation(MODEL, 200, replications=2)
    assert caught.value.location.line == 3
