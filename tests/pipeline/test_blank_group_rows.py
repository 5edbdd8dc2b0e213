"""A row whose group cell holds only invisible format characters is in no group (data.groups.group_keys) and is not
analysed: its gaps do not choose full-information ML for groups whose rows are all complete (re-check s17, a
neighbour of G1/G2: such a row's one gap made the fit full-information ML with a note that 1 row misses answers)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.method import MissingData

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer"]
MODEL = "factor transit: " + ", ".join(ITEMS) + "\n"


def test_the_gaps_of_a_row_in_no_group_do_not_choose_full_information():
    frame = pd.read_csv(DATA).dropna(subset=ITEMS).reset_index(drop=True)
    frame["district"] = frame["district"].astype(object)
    frame.at[3, "district"] = "\u200b"  # no group
    frame.at[3, "on_time"] = np.nan  # the only gap, in that row
    analysed = frame.drop(index=3)
    assert analysed[ITEMS].notna().all().all()  # every row analysed is complete (pandas)
    result = cfa_tool.fit(MODEL, frame, group="district")
    assert result.method.missing is MissingData.LISTWISE
    assert not any("miss some answers" in str(w) for w in result.warnings)
    same = cfa_tool.fit(MODEL, analysed, group="district")  # the rows analysed, given alone
    assert np.isclose(result.fit.chi_square, same.fit.chi_square, rtol=1e-9)
