"""The boundary note under compare's difference tests tells the reader to weigh the models also by AIC and BIC only
when the models have them: least-squares fits of ordinal items have no likelihood, and the table beside the note said
"not defined" (new-user trial s15, finding 7).  Data: the bundled rider survey (invented); the one-factor model
merges the three factors (their correlations at 1: several parameters on the boundary), and the three-factor model
bounds two of them at 1, so the reading is no exact p-value (workflows.nesting.boundary_of; without the bounds, the
usual chi-square: lead s25; with one bound, the 50:50 mixture: fixleft s26)."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool.reporting.workflow_tables import comparison_report
from cfa_tool.resources import resource_dir

THREE = (resource_dir("models") / "rider_three_factors.cfa").read_text()
ITEMS = ("on_time, short_wait, accurate_info, easy_transfer, seat_available, clean, temperature, room_to_stand, "
         "greeting, helpful, respectful, clear_answers")
ONE = f"factor service: {ITEMS}\n"
HELD = (THREE + "scale latent by variance\nbound covariance(punctuality, comfort) <= 1\n"
        "bound covariance(punctuality, courtesy) <= 1\n")


def _boundary_notes(comparison) -> list[str]:
    return [str(t.note) for t in comparison_report(comparison).tables if t.note and "On the boundary" in str(t.note)]


def test_aic_and_bic_advised_only_where_defined():
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").dropna()
    continuous = _boundary_notes(cfa_tool.compare([HELD, ONE], data))
    assert continuous and "weigh the models also by their fit indices, AIC and BIC." in continuous[0]
    ordinal = _boundary_notes(cfa_tool.compare([HELD, ONE], data, ordinal="all"))
    # ordinal fits: the note refers to the one statement after the tables (test_ordinal_decision_is_one_statement)
    assert ordinal and "AIC" not in ordinal[0] and "weigh the models also by their fit indices" not in ordinal[0]


def test_ordinal_decision_is_one_statement():
    """Compare of ordinal fits with values on the boundary (re-check s15, R5): the boundary note said to weigh the
    models also by their fit indices, the next note that their changes cannot be compared and to judge by the
    adjusted difference test, the rough one.  Now the boundary note refers to one statement after the tables, which
    names each thing that can decide (the adjusted difference test of Satorra & Bentler 2001 and Asparouhov & Muthén
    2006, rough on the boundary; each model's own indices; their changes, no test: Sass, Schmitt & Marsh 2014) and
    how rough each is, and no note sends the reader to the rough test alone."""
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").dropna()
    report = comparison_report(cfa_tool.compare([HELD, ONE], data, ordinal="all"))
    boundary = [str(t.note) for t in report.tables if t.note and "On the boundary" in str(t.note)]
    assert boundary and "the note after the tables" in boundary[0]
    notes = [str(n) for n in report.notes]
    deciding = [n for n in notes if n.startswith("Deciding between nested models of ordinal items")]
    assert len(deciding) == 1
    statement = deciding[0]
    for source in ("Satorra & Bentler 2001", "Asparouhov & Muthén 2006", "Sass, Schmitt & Marsh 2014"):
        assert source in statement
    assert "its p-value is rough" in statement and "neither decides alone" in statement
    # no note (nor the boundary note) advises judging by the difference test alone, which it calls rough
    assert not any("judge nested models by the adjusted difference test" in n for n in notes + boundary)
    # without a boundary (loadings held equal: no value at the edge of the general model's space), the statement
    # names the same parts without calling the test rough
    equal = THREE + "equal loading(punctuality, short_wait), loading(punctuality, accurate_info)\n"
    report = comparison_report(cfa_tool.compare([THREE, equal], data, ordinal="all"))
    plain = [str(n) for n in report.notes if str(n).startswith("Deciding between nested models")]
    assert len(plain) == 1 and "Satorra & Bentler 2001" in plain[0] and "rough" not in plain[0]
    assert "Sass, Schmitt & Marsh 2014" in plain[0]
