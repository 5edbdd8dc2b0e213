"""Under frequency weights N sums weights, not rows: with a row filter the paragraph named it as a part of the file's
rows ('N = 623 of the 480 rows in the data file', hostile s21).  Now it names the rows it sums; the counts here are
pandas' own of the demo data."""

from __future__ import annotations

import re

import numpy as np

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph

RIDER = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n")


def test_n_names_the_rows_whose_weights_it_sums(rider_demo):
    data = rider_demo.copy()
    rng = np.random.default_rng(7)
    data["fw"], data["age"] = rng.integers(0, 4, len(data)), rng.integers(18, 70, len(data))  # invented columns
    result = cfa_tool.fit(RIDER, data, weights="fw", weight_kind="frequency", keep=["age > 30"])
    kept = data[(data.age > 30) & (data.fw > 0)]
    text = " ".join(methods_paragraph(result).split())
    assert (f"N = {int(kept.fw.sum())}, the sum of the frequency weights of {len(kept)} of the {len(data)} rows in the "
            f"data file, those where age was above 30") in text
    assert not re.search(r"N = [\d,]+ of the", text)  # no weighted N as a part of the rows
