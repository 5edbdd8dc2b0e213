"""The rule of rows per parameter counts the same rows under the same model alike whether they are a sample or a
group, for ordinal items too (new-user trial s21, finding 6: 360 rows fitted alone with ordinal items counted 21
free parameters and got no note, while as a group of an ordinal invariance run they counted 93, their 72 thresholds
included).  A one-group ordinal fit estimates its thresholds as first-step statistics outside its free parameters,
so a group's thresholds are left out of its count and named, as its item intercepts are.  The counts by hand for the
three-factor model of Holzinger & Swineford (1939), answers cut at their quartiles into four categories: 6 free
loadings, 3 factor variances and 3 factor covariances = 12 (the latent responses' intercepts 0 and residual
variances 1 in every group while the thresholds may differ: Wu & Estabrook 2016), beside 9 x 3 = 27 thresholds."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from tests.conftest import THREE_FACTORS

ITEMS = [f"x{i}" for i in range(1, 10)]


@pytest.fixture(scope="module")
def four_categories(hs_data):
    data = hs_data.reset_index(drop=True)[ITEMS + ["school"]].copy()
    for item in ITEMS:
        data[item] = pd.qcut(data[item], 4, labels=False, duplicates="drop") + 1
    return data


def _said(result) -> list[str]:
    return [str(w) for w in result.warnings if "per parameter" in str(w)]


def test_a_groups_thresholds_are_left_out_of_its_count_as_in_a_fit_of_its_rows_alone(four_categories):
    both = cfa_tool.fit(THREE_FACTORS, four_categories, group="school", ordinal="all")
    # 145 and 156 rows for 12 parameters each (more than 5 per parameter): no note, as for each school fitted alone
    assert _said(both) == []
    for school in ("Grant-White", "Pasteur"):
        alone = cfa_tool.fit(THREE_FACTORS, four_categories[four_categories.school == school], ordinal="all")
        assert alone.fit.n_free_parameters == 12 and _said(alone) == []  # 12 by hand (module docstring)


def test_a_small_ordinal_group_is_named_with_the_count_of_its_rows_alone_and_its_thresholds_named(four_categories):
    data = four_categories.drop(four_categories.index[four_categories.school == "Grant-White"][55:])
    (said,) = _said(cfa_tool.fit(THREE_FACTORS, data, group="school", ordinal="all"))
    # 55 rows for 12 parameters: 4.5 per parameter (4.58 cut, not rounded), below the common rule of thumb of 5
    # (Bentler & Chou 1987, recalled from memory)
    assert said.startswith('group Grant-White (55 rows for 12 parameters, 4.5 per parameter): fewer than 5 rows '
                           "per free parameter of the group's model, not counting its 27 thresholds (")
    (alone,) = _said(cfa_tool.fit(THREE_FACTORS, data[data.school == "Grant-White"], ordinal="all"))
    assert alone.startswith("55 rows for the 12 free parameters of the model, fewer than 5 per parameter (4.5 per")


def _checked(found) -> list[str]:
    return [str(n) for n in found.notes if "per parameter" in str(n)]


def test_check_of_ordinal_items_in_groups_says_what_their_fit_says(four_categories):
    # the plan of s22, item 1: check skipped the rule for ordinal items, in groups and alone, where the fit judged it
    data = four_categories.drop(four_categories.index[four_categories.school == "Grant-White"][55:])
    (said,) = _said(cfa_tool.fit(THREE_FACTORS, data, group="school", ordinal="all"))
    found = cfa_tool.check(THREE_FACTORS, data, group="school", ordinal="all")
    # the same note: 55 rows for the 12 parameters counted by hand (module docstring), its 27 thresholds named
    assert _checked(found) == [said] and "55 rows for 12 parameters" in said and "27 thresholds" in said
    alone = data[data.school == "Grant-White"]
    (said,) = _said(cfa_tool.fit(THREE_FACTORS, alone, ordinal="all"))
    assert _checked(cfa_tool.check(THREE_FACTORS, alone, ordinal="all")) == [said]
    assert said.startswith("55 rows for the 12 free parameters of the model")

