"""Scores assign each row its group by the one rule the fit reads groups by (data.groups.group_keys): a group cell
of invisible format characters alone is no group, and one with such characters beside a label is that label's
group (re-check s17, G2: a zero-width space alone was a group '' the fit does not have)."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

import cfa_tool
from cfa_tool.workflows.factor_scores import NotScored, score_with_fit

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
MODEL = "factor transit: on_time, short_wait, accurate_info, easy_transfer\n"


def marked() -> pd.DataFrame:
    frame = pd.read_csv(DATA)
    frame["district"] = frame["district"].astype(object)
    frame.at[7, "district"] = "\u200b"  # looks empty: no group
    frame.at[8, "district"] = "north\u200b"  # looks like north: north
    return frame


def test_scores_of_a_fit_read_the_groups_as_the_fit_does():
    frame = marked()
    scored = cfa_tool.scores(MODEL, frame, group="district")
    assert scored.not_scored == {NotScored.NO_GROUP: 1}  # row 7 alone, by construction
    # the fit: row 7 in no group, row 8 in north (the demo's 250 north rows less row 7)
    assert [(g.label, g.data.n_obs) for g in scored.fit.groups] == [("north", 249), ("south", 230)]


def test_scores_of_other_data_with_an_earlier_fit_read_them_alike():
    fitted = cfa_tool.fit(MODEL, pd.read_csv(DATA), group="district")
    scored = score_with_fit(fitted, marked())
    assert scored.not_scored == {NotScored.NO_GROUP: 1}  # not 'a group the fit does not have'
