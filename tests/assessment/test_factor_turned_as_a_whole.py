"""A factor every item of which loads negatively (hostile trial s23, finding 7): its caution named no item ("Factor
'comfort' points the way of , against most of its items ... declare them ... 'reversed  on LOWEST to HIGHEST'").
Such a factor is turned as a whole by its scale, a marker fixed at -1 or start values below 0 under variance scaling:
an equivalent solution turned round (Bollen 1989, ch. 7), which the caution names with what turns it back.

Data: the bundled demo (a fictional transit agency's rider survey, simulated from a known population with every
loading positive: demo/make_demo_data.py), so that comfort's negative loadings are the scale's doing by construction."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()
ITEMS = ("seat_available", "clean", "temperature", "room_to_stand")
TURNED = {
    "variance, starts below 0": MODEL + "scale latent by variance\nstart " + ", ".join(
        f"loading(comfort, {x})" for x in ITEMS) + " = -0.8\n",
    "marker fixed at -1": MODEL + "fix loading(comfort, seat_available) = -1\n",
}


@pytest.fixture(scope="module")
def data():
    import pandas as pd

    return pd.read_csv(resource_dir("demo") / "rider_survey.csv")


def _flat(text) -> str:
    return " ".join(str(text).replace("\u2502", " ").split())


@pytest.mark.parametrize("how", list(TURNED))
def test_the_caution_names_the_items_and_how_to_turn_the_factor_round(data, how):
    result = cfa_tool.fit(TURNED[how], data)
    plain = cfa_tool.fit(MODEL, data)
    # the same solution turned round: the same chi-square (the fit does not see a factor's direction)
    assert result.fit.chi_square == pytest.approx(plain.fit.chi_square, rel=1e-6)
    loadings = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[0] == "comfort"]
    assert len(loadings) == 4 and max(loadings) < 0
    found = [p for p in result.problems if p.kind is ProblemKind.FACTOR_POINTS_AGAINST_ITEMS]
    assert len(found) == 1
    said = _flat(found[0].line())
    assert ("Every item of factor 'comfort' loads negatively (seat_available, clean, temperature, room_to_stand), so "
            "the factor points against all of them") in said
    assert "fix its marker's loading at 1 rather than below 0" in said and "start its loadings above 0" in said
    assert "the way of ," not in said and "reversed  on" not in said and "if  " not in said


def test_compare_names_it_alike(data):
    comparison = cfa_tool.compare([TURNED["marker fixed at -1"], MODEL], data)
    flat = _flat(report_text(report_of(comparison), 3000)).split("Fit of each model")[0]
    assert "Every item of factor 'comfort' loads negatively" in flat and "the way of ," not in flat
