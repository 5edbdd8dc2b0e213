"""The one reader of a saved fit's estimate rows (cfa_tool.model.saved_estimates).

Check values: a round trip.  The rows are those the tool's own fit of Holzinger & Swineford (1939, tests/datasets)
writes, and what is read back must be that fit's free parameters exactly (the values written are the values read;
the estimates themselves are checked against published solutions in tests/estimation).  The edits are the ways a
saved file goes wrong by hand: each must be named, none read as something else.
"""

from __future__ import annotations

import copy
import re

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.language.parser import parse_model
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.model.saved_estimates import saved_rows, values_on_model
from tests.conftest import THREE_FACTORS

EQUAL = THREE_FACTORS + "equal loading(visual, x2), loading(visual, x3)\n"


@pytest.fixture(scope="module")
def equal_fit(hs_data):
    return cfa_tool.fit(EQUAL, hs_data)


def _read(rows, text=EQUAL, **kw):
    table = build_parameter_table(parse_model(text))
    return values_on_model(saved_rows(rows, "fit.json"), table, "fit.json", "m.cfa", **kw)


def test_the_rows_give_back_the_fit_s_own_values_whatever_their_order(equal_fit):
    rows = equal_fit.to_dict()["estimates"]
    values = _read(rows, aside=("intercept", "mean"))
    assert np.array_equal(values.theta, equal_fit.theta)
    shuffled = copy.deepcopy(rows[::-1])
    for row in shuffled:  # a covariance names its two variables in either order
        if row["kind"].endswith("covariance"):
            row["variables"] = row["variables"][::-1]
    assert np.array_equal(_read(shuffled, aside=("intercept", "mean")).theta, equal_fit.theta)


@pytest.mark.parametrize("value, shown", [(None, "null"), (True, "true"), (float("inf"), "Infinity"),
                                          ([0.8], "[0.8]"), (float("nan"), "NaN")])
def test_an_estimate_that_is_not_a_finite_number_is_named(equal_fit, value, shown):
    rows = copy.deepcopy(equal_fit.to_dict()["estimates"])
    rows[1]["estimate"] = value
    with pytest.raises(OptionError, match=re.escape(f"fit.json: the estimate of the loading of x2 on visual is {shown}, "
                                                    f"not a number")):
        saved_rows(rows, "fit.json")


def test_rows_that_are_not_rows_are_named_by_their_place(equal_fit):
    rows = copy.deepcopy(equal_fit.to_dict()["estimates"])
    rows[2] = {"kind": "loading", "estimate": 0.5}
    with pytest.raises(OptionError, match="estimate row 3 lacks its kind, variables or group"):
        saved_rows(rows, "fit.json")
    with pytest.raises(OptionError, match="'estimates' is not a list of rows"):
        saved_rows({"kind": "loading"}, "fit.json")


def test_values_the_model_holds_equal_must_be_equal(equal_fit):
    rows = copy.deepcopy(equal_fit.to_dict()["estimates"])
    x3 = next(r for r in rows if r["variables"] == ["visual", "x3"])
    x3["estimate"] += 0.1
    with pytest.raises(OptionError, match="for the loading of x3 on visual where the model m.cfa makes it .* holds it "
                                          "equal to another parameter"):
        _read(rows, aside=("intercept", "mean"))


def test_rows_the_caller_does_not_set_aside_are_rows_of_another_model(equal_fit):
    rows = equal_fit.to_dict()["estimates"]
    if not any(r["kind"] == "intercept" for r in rows):
        rows = rows + [{"kind": "intercept", "variables": ["x1"], "group": None, "estimate": 4.9}]
    with pytest.raises(OptionError, match="gives the intercept of x1 .* which the model m.cfa does not have"):
        _read(rows)


def test_a_row_of_another_group_is_not_placed(equal_fit):
    rows = copy.deepcopy(equal_fit.to_dict()["estimates"])
    rows[1]["group"] = "Pasteur"
    with pytest.raises(OptionError, match="has no estimate of the loading of x2 on visual"):
        _read(rows, aside=("intercept", "mean"))


def test_thresholds_set_aside_are_read_per_item_in_step_order():
    rows = [{"kind": "threshold", "variables": ["x1", step], "group": None, "estimate": value}
            for step, value in (("2", 0.5), ("1", -0.5))]
    base = [{"kind": k, "variables": v, "group": None, "estimate": e} for k, v, e in (
        ("loading", ["f", "x1"], 1.0), ("loading", ["f", "x2"], 0.8), ("loading", ["f", "x3"], 0.7),
        ("factor_variance", ["f"], 0.5), ("residual_variance", ["x1"], 0.5), ("residual_variance", ["x2"], 0.6),
        ("residual_variance", ["x3"], 0.7))]
    values = _read(base + rows, "factor f: x1, x2, x3\n", aside=("threshold",))
    assert values.thresholds() == {"x1": pytest.approx([-0.5, 0.5])}
    gap = base + [dict(rows[0], variables=["x1", "3"]), rows[1]]
    with pytest.raises(OptionError, match="the thresholds of x1 are not numbered 1, 2"):
        _read(gap, "factor f: x1, x2, x3\n", aside=("threshold",)).thresholds()
    with pytest.raises(OptionError, match="gives threshold 1 of x9 .* which the model m.cfa does not have"):
        _read(base + [dict(rows[1], variables=["x9", "1"])], "factor f: x1, x2, x3\n", aside=("threshold",))
