"""The keying contradiction is named whatever the order of the factor's items (hostile trial s23, finding 4): with the
item coded the other way (and not declared reversed) listed first, it became the marker, the factor pointed its way,
the only caution advised fixing an item not declared reversed at 1 (the marker already was), and the paragraph
printed an omega of .35 (alpha negative) for the keyed sum that the other order withholds.

Data: the bundled demo (a fictional transit agency's rider survey, simulated from a known population with every
loading positive: demo/make_demo_data.py), with clean and helpful recoded 6 - x; helpful is declared reversed, clean
is not, so which declaration is missing is known by construction."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.resources import resource_dir

MODEL = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: {items}\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n"
         "reversed helpful on 1 to 5\n")
ORDERS = {"clean second": "seat_available, clean, temperature, room_to_stand",
          "clean first, the marker": "clean, seat_available, temperature, room_to_stand"}


@pytest.fixture(scope="module")
def fits() -> dict:
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data["clean"], data["helpful"] = 6 - data["clean"], 6 - data["helpful"]
    return {order: cfa_tool.fit(MODEL.format(items=items), data) for order, items in ORDERS.items()}


def _flat(text) -> str:
    return " ".join(str(text).split())


@pytest.mark.parametrize("order", list(ORDERS))
def test_the_contradiction_is_named_and_the_reliability_withheld(fits, order):
    result = fits[order]
    comfort = next(r for r in result.groups[0].reliability if r.factor == "comfort")
    assert comfort.against_keying == ("clean",)
    # the same cautions in either order: the keying contradiction, naming clean, and no advice to fix a marker
    assert [p.kind for p in result.problems] == [ProblemKind.KEYING_AGAINST_LOADINGS]
    problem = result.problems[0]
    assert problem.parameters == ("loading(comfort, clean)",)
    assert "clean loads against the factor's other items but is not declared reversed" in _flat(problem.explanation)
    paragraph = _flat(methods_paragraph(result))
    assert ("The solution has a declared keying of reverse-scored items contradicted by the loadings of clean on "
            "comfort: the keyed sum adds items that run against each other, so its reliability is not reported "
            "here") in paragraph
    omega = paragraph[paragraph.index("omega (McDonald, 1999) was"):]
    assert "for comfort" not in omega and "for punctuality and" in omega


def test_with_clean_as_marker_the_factors_direction_is_said_with_it(fits):
    result = fits["clean first, the marker"]
    said = _flat(result.problems[0].line())
    assert ("The factor points the way of clean too: seat_available, temperature, room_to_stand load negatively, so a "
            "higher 'comfort' means lower answers on them") in said
    assert "fix the loading of an item not declared reversed at 1" not in said
    assert "the wrong way too" in _flat(methods_paragraph(result))
    # the other order: comfort points the way of its items (clean's own loading negative), and nothing says otherwise
    assert "points the way of clean" not in _flat(fits["clean second"].problems[0].line())
