"""The least share of rows answering an item, as the methods paragraph and the missing-data note give it, is counted
over the rows analysed (hostile s21): rows that answered nothing, which every route leaves out, took it from 99.6% to
82.4%; and under frequency weights in groups the rows answering an item were divided by the weighted group size
(190 of 191 rows read as 47.5% of 400).  The expected shares are counted here by pandas from the data themselves."""

from __future__ import annotations

import math
import re

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph

RIDER = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n")


def _least(text: str) -> float:
    return float(re.search(r"answered in at least ([\d.]+)%", " ".join(text.split())).group(1))


def _items(rows: pd.DataFrame) -> pd.DataFrame:
    return rows[[c for c in rows.columns if c not in ("rider_id", "district", "fw")]]


def test_rows_that_answer_nothing_do_not_lower_the_coverage(rider_demo):
    gaps = rider_demo.copy()
    gaps.loc[gaps.index[:5], "clean"] = np.nan
    empty = pd.DataFrame({"rider_id": [f"E{k}" for k in range(100)], "district": "north"})
    data = pd.concat([gaps, empty], ignore_index=True)
    result = cfa_tool.fit(RIDER, data.drop(columns=["district"]))
    assert result.n_obs == len(rider_demo)
    expected = _items(gaps).notna().mean().min()  # over the rows analysed: 475 of 480 answered clean
    assert _least(methods_paragraph(result)) == math.floor(1000 * expected) / 10
    assert min(result.missing_data["coverage"].values()) == expected


def test_frequency_weights_in_groups_count_rows_against_rows(rider_demo):
    data = rider_demo.copy()
    data["fw"] = np.random.default_rng(7).integers(0, 4, len(data))  # invented frequency weights
    data.loc[data.index[:3], "clean"] = np.nan
    result = cfa_tool.fit(RIDER, data, group="district", weights="fw", weight_kind="frequency")
    kept = data[data.fw > 0]
    expected = min(_items(rows).notna().mean().min() for _, rows in kept.groupby("district"))
    assert _least(methods_paragraph(result)) == math.floor(1000 * expected) / 10
    assert _least(methods_paragraph(result)) > 90
