"""check with a group column gives each group's share of the model's answers (new-user trial s17: one department
answered 87% of the items and the others 96%; check showed only the overall share per item, so the difference that
matters for the missing-at-random assumption and for per-group feedback was shown nowhere).  Check values: pandas'
own count of the non-empty cells per group.  Data: Holzinger & Swineford (1939), tests/datasets, with gaps written
in by this test (every 4th row of one school misses x2 and x5)."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from tests.conftest import DATASETS

MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ITEMS = [f"x{k}" for k in range(1, 10)]


def test_check_gives_each_groups_share_of_answers_lowest_first():
    frame = pd.read_csv(DATASETS / "holzinger_swineford_1939.csv")
    school = frame["school"] == "Pasteur"
    frame.loc[school & (np.arange(len(frame)) % 4 == 0), ["x2", "x5"]] = np.nan
    found = cfa_tool.check(MODEL, frame, group="school")
    expected = frame.groupby("school")[ITEMS].apply(lambda g: g.notna().to_numpy().mean())
    shares = dict(found.group_coverage)
    assert set(shares) == set(expected.index)
    for label, share in shares.items():
        assert share == expected[label]
    assert shares["Pasteur"] < 1 and shares["Grant-White"] == 1
    text = " ".join(found.summary().split())
    assert (f"Share of the model variables' answers given, by group (lowest first): Pasteur "
            f"{round(100 * shares['Pasteur'])}%, Grant-White 100%.") in text
    assert found.to_dict()["group_coverage"] == shares
    assert cfa_tool.check(MODEL, frame).group_coverage == ()  # without groups: nothing said
