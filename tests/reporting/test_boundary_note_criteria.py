"""The boundary note under compare's difference tests tells the reader to weigh the models also by AIC and BIC only
when the models have them: least-squares fits of ordinal items have no likelihood, and the table beside the note said
"not defined" (new-user trial s15, finding 7).  Data: the bundled rider survey (invented); the one-factor model
merges the three factors (their correlations at 1: several parameters on the boundary, no exact p-value)."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.reporting.workflow_tables import comparison_report
from cfa_tool.resources import resource_dir

THREE = (resource_dir("models") / "rider_three_factors.cfa").read_text()
ITEMS = ("on_time, short_wait, accurate_info, easy_transfer, seat_available, clean, temperature, room_to_stand, "
         "greeting, helpful, respectful, clear_answers")
ONE = f"factor service: {ITEMS}\n"


def _boundary_notes(comparison) -> list[str]:
    return [str(t.note) for t in comparison_report(comparison).tables if t.note and "On the boundary" in str(t.note)]


def test_aic_and_bic_advised_only_where_defined():
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").dropna()
    continuous = _boundary_notes(cfa_tool.compare([THREE, ONE], data))
    assert continuous and "weigh the models also by their fit indices, AIC and BIC." in continuous[0]
    ordinal = _boundary_notes(cfa_tool.compare([THREE, ONE], data, ordinal="all"))
    assert ordinal and "weigh the models also by their fit indices." in ordinal[0] and "AIC" not in ordinal[0]
