"""The partial-invariance search between equal score tests: with a factor of two items whose mean is free, freeing
the intercept of either item gives the same model, so their score tests are equal but for rounding.  The search
frees the first in the model's order (never what rounding on one machine decides) and the report says that the other
could be freed instead.  Invented data (seeded): two groups of 400, two factors, the second group's y4 shifted."""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

import cfa_tool


def _data() -> pd.DataFrame:
    rng = np.random.default_rng(11)
    parts = []
    for label, shift in (("a", 0.0), ("b", 0.8)):
        factors = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=400)
        loadings = np.array([[.8, 0], [.7, 0], [.75, 0], [0, .8], [0, .7]])
        values = factors @ loadings.T + 0.6 * rng.normal(size=(400, 5))
        values[:, 3] += shift
        part = pd.DataFrame(values, columns=[f"y{i}" for i in range(1, 6)])
        part["line"] = label
        parts.append(part)
    return pd.concat(parts, ignore_index=True)


def _search(second_factor: str):
    return cfa_tool.invariance(f"factor F1: y1, y2, y3\nfactor F2: {second_factor}\n", _data(), group="line",
                               partial="auto")


def test_of_equal_score_tests_the_first_in_the_models_order_is_freed_and_the_other_named():
    for order, first, other in (("y4, y5", "y4", "y5"), ("y5, y4", "y5", "y4")):
        result = _search(order)
        [freed] = [f for f in result.freed if f.level == "scalar"]
        assert (freed.kind, freed.variables) == ("intercept", (first,))
        assert freed.equal_tests == (("intercept", (other,)),)
        assert freed.to_dict()["equal_score_tests"] == [{"kind": "intercept", "variables": [other]}]
        flat = " ".join(re.sub(r"[│╭╮╰╯─]", " ", str(result)).split())
        assert (f"the search freed the first in the model's order, the intercept of {first}; the intercept of "
                f"{other} could be freed instead") in flat
