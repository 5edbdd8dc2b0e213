"""compare decides which rows have a group by the one rule of groups (data.groups.group_keys, as fit does,
pipeline.inputs.has_group): a cell of invisible format characters alone (a zero-width space) is no group, so its row
is counted among those without a group, and the rows compared are those every model is fitted to.  Invented data
(one factor, four items, seeded); the counts asserted are those of the data as built here."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool

MODEL = "factor comfort: q1, q2, q3, q4\n"


def _data() -> pd.DataFrame:
    rng = np.random.default_rng(3)
    n = 240
    factor = rng.normal(size=n)
    data = pd.DataFrame(0.7 * factor[:, None] + 0.6 * rng.normal(size=(n, 4)), columns=["q1", "q2", "q3", "q4"])
    data["line"] = np.where(np.arange(n) % 2 == 0, "north", "south").astype(object)
    data.loc[:9, "line"] = "\u200b"  # 10 cells that look empty
    data.loc[10:14, "line"] = np.nan  # 5 empty cells
    return data


def test_a_group_cell_of_invisible_characters_alone_is_no_group_in_compare_as_in_fit():
    data = _data()
    compared = cfa_tool.compare([MODEL, MODEL + "covary q1, q2\n"], data, group="line")
    fitted = cfa_tool.fit(MODEL, data, group="line")
    assert compared.without_group == 10 + 5  # built above: 10 invisible cells and 5 empty ones
    assert compared.n_obs == 240 - 15 == fitted.n_obs
    assert all(r.n_obs == compared.n_obs for r in compared.results)
    assert any("10 cells holding only invisible format characters" in str(n) for n in compared.notes)
    assert any("15 of 240 rows" in str(p.explanation) for p in compared.problems)
