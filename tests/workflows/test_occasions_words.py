"""The words of the ladder over occasions (workflows.occasions._OccasionWords): names of the model of every occasion
said as item and occasion ('vig1 at occasion 1', never the side-by-side column 'vig1_1' that no long file holds), and
advice that the route takes: it writes every step's model from the one-occasion model's factors, items, 'covary' and
'uncorrelated' statements and refuses every other statement (test_invariance_over_occasions: the refusals)."""

from __future__ import annotations

import numpy as np

from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.assessment.convergence import WHAT_TO_TRY
from cfa_tool.note_parts import Command, Note, said
from cfa_tool.workflows import occasions
from cfa_tool.workflows.occasions import invariance_over_occasions

import tests.workflows.test_invariance_over_occasions as population

REFUSED = ("by variance", "free loading", "'start", "equal loading", "max-iterations")


def test_a_weak_marker_is_named_by_occasion_with_advice_the_route_takes(monkeypatch):
    # a population whose marker vig1 hardly measures the factor (loading .02 against .7 to .9: people() of the
    # ladder's tests, its other values as there); the weak-marker caution's threshold .20 is common practice
    monkeypatch.setattr(population, "LOADINGS", np.array([0.02, 0.8, 0.9, 0.7]))
    long = population.people(300, 5)
    result = invariance_over_occasions(population.ONE_OCCASION, long, occasion_column="wave", id_column="person_id")
    lines = [str(p.line()) for s in result.steps for p in s.result.problems if p.kind is ProblemKind.WEAK_MARKER]
    assert lines, "the population's weak marker is cautioned"
    for line in lines:
        assert not any(word in line for word in REFUSED), line
        assert "vig1_1" not in line and "vigour_1" not in line
        assert "list that item first" in line and "one-occasion model" in line
    assert any("vig1 at occasion 1" in line and "'vigour' at occasion 1" in line for line in lines)


def test_a_search_that_did_not_converge_gets_the_routes_advice():
    # a message as assessment.convergence.nonconvergence_message writes one (its parts: what happened, then advice
    # naming statements of the model file and an option this command does not have)
    layout = occasions.OccasionLayout(("1", "2"), ("_1", "_2"))
    spec = occasions.parse_model(population.ONE_OCCASION, "one")
    words = occasions._OccasionWords(spec, layout)
    message = Note(("no convergence within the limit of 500 iterations; ", Command("variance(vigour_2)", "x"),
                    " kept growing" + WHAT_TO_TRY + "raise the limit", Command(" (--max-iterations)"),
                    ", or write ", Command("'scale latent by variance'", "fix every factor's variance at 1")))
    text = said(words.message(message))
    assert text.startswith("no convergence within the limit of 500 iterations; variance(vigour at occasion 2)")
    assert not any(word in text for word in REFUSED), text
    assert "one-occasion model" in text or "each occasion's rows alone" in text
    # advice of words alone is kept as it is
    plain = "the estimation did not converge" + WHAT_TO_TRY + "check the data"
    assert words.message(plain) == plain
