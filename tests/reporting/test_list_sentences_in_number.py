"""Sentences built from a list say one thing in the singular and several in the plural (s23: 'The standardized
loadings of the factors on the higher-order factor was 1.00' of one loading): the methods paragraph's loadings of a
higher-order factor and of a method factor, the sentences on weak method factors and on factors whose keying their
loadings contradict, the difference test's words on scaled tests not computed, and the design's cautions on groups
with uneven weights or few clusters (which also name the groups by the one rule of group names,
language.names.written_group).  Data: Holzinger & Swineford (1939), the bundled copy; invented designs."""

from __future__ import annotations

from types import SimpleNamespace

import cfa_tool
from cfa_tool.assessment.admissibility import Problem, ProblemKind
from cfa_tool.data.sample_design import DesignColumns, SampleDesign, WeightKind
from cfa_tool.reporting.paragraph import _weak_factor_sentence, methods_paragraph
from cfa_tool.workflows.nesting import _not_positive_factor
from tests.conftest import THREE_FACTORS, holzinger_swineford


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_one_loading_on_a_higher_order_factor_is_said_in_the_singular():
    """A higher-order factor over one factor, its disturbance variance fixed at 0 as the tool's error advises: one
    standardized loading, 1.00 (the factor is the higher-order factor itself)."""
    model = THREE_FACTORS + "factor g: visual\nfix variance(visual) = 0\nfix loading(visual, x1) = 1\n"
    text = _flat(methods_paragraph(cfa_tool.fit(model, holzinger_swineford())))
    assert "The standardized loading of the factor on the higher-order factor was 1.00." in text
    assert "loadings of the factors on the higher-order factor was" not in text


def test_several_loadings_on_a_higher_order_factor_stay_plural():
    text = _flat(methods_paragraph(cfa_tool.fit(THREE_FACTORS + "factor g: visual, textual, speed\n",
                                                holzinger_swineford())))
    assert "The standardized loadings of the factors on the higher-order factor ranged from ." in text


def _problem(kind: ProblemKind, factor: str) -> Problem:
    return Problem(kind, (f"factor_variance({factor})",), 0.1, "", "")


def test_weak_and_turned_factors_are_said_in_their_number():
    one = SimpleNamespace(problems=[_problem(ProblemKind.FACTOR_POINTS_AGAINST_ITEMS, "a")], multigroup=False,
                          groups=())
    assert ": its correlations, mean differences and scores read the wrong way." in _weak_factor_sentence(one, "It")
    two = SimpleNamespace(problems=[_problem(ProblemKind.FACTOR_POINTS_AGAINST_ITEMS, f) for f in "ab"],
                          multigroup=False, groups=())
    assert ": their correlations, mean differences and scores read the wrong way." in _weak_factor_sentence(two, "It")
    keyed = SimpleNamespace(problems=[_problem(ProblemKind.KEYING_AGAINST_LOADINGS, f) for f in "ab"],
                            multigroup=False, groups=())
    assert ("the keyed sums add items that run against each other, so their reliability is not reported here."
            in _weak_factor_sentence(keyed, "It"))


def test_scaled_tests_not_computed_are_said_in_their_number():
    both = _not_positive_factor([("A", -0.5, True), ("B", -0.2, True)])
    assert "the scaled tests of A and B were not computed either" in both
    one = _not_positive_factor([("A", -0.5, True), ("B", 1.2, True)])
    assert "the scaled test of A was not computed either" in one


def _design(**given) -> SampleDesign:
    return SampleDesign(**({"columns": DesignColumns("w", "school", None, WeightKind.SAMPLING), "rows": 800,
                            "sum_of_weights": 800.0, "effective_n": 700.0, "clusters": 80, "strata": None,
                            "group_rows": (400, 400), "group_labels": ("east side", "north"),
                            "group_clusters": (40, 40), "group_effective": (390.0, 390.0)} | given))


def test_the_designs_cautions_on_groups_say_one_group_or_several():
    one = _design(group_effective=(120.0, 390.0)).weight_caution()
    assert 'very uneven within a group (group "east side": its 400 rows count as about 120.0;' in one
    assert "that group's estimates rest mostly on its heavily weighted rows" in one
    both = _design(group_effective=(120.0, 150.0)).weight_caution()
    assert ('very uneven within groups (group "east side": its 400 rows count as about 120.0; group "north": its 400 '
            'rows count as about 150.0;') in both
    assert "those groups' estimates rest mostly on their heavily weighted rows" in both
    few = _design(group_clusters=(12, 68)).caution(20)
    assert "Few clusters of 'school' in group \"east side\" (12): each group's estimates" in few


def test_markers_turned_for_several_factors_are_said_in_the_plural():
    """Every item of visual and of textual declared reverse-keyed: both markers' loadings fixed to -1."""
    model = THREE_FACTORS + "reversed x1, x2, x3, x4, x5, x6 on 0 to 10\n"
    text = _flat(methods_paragraph(cfa_tool.fit(model, holzinger_swineford())))
    assert ("every item of visual and textual is declared reverse-keyed, so the loadings of x1 and x4 were fixed to -1 "
            "instead") in text
    one = _flat(methods_paragraph(cfa_tool.fit(THREE_FACTORS + "reversed x1, x2, x3 on 0 to 10\n",
                                               holzinger_swineford())))
    assert "every item of visual is declared reverse-keyed, so the loading of x1 was fixed to -1 instead" in one


def test_one_code_set_apart_is_perhaps_a_code_of_no_answer():
    """The pupils of tests.commands.test_codes_set_apart_every_command with one code, 7, where 8 and 9 were planted:
    said in the singular in the methods paragraph (s23: 'perhaps codes of no answer' of one code), and the two codes
    8 and 9 in the plural ('this was analysed' of them)."""
    from tests.commands.test_codes_set_apart_every_command import MODEL, pupils

    frame = pupils().replace({8: 7, 9: 7})  # one code, 7, beside answers 1 to 5
    paragraph = _flat(methods_paragraph(cfa_tool.fit(MODEL, frame)))
    assert ("set apart from the other answers (1 to 5): perhaps a code of no answer; this was analysed as answers, as "
            "the file holds it") in paragraph
    both = _flat(methods_paragraph(cfa_tool.fit(MODEL, pupils())))  # the codes 8 and 9
    assert ("set apart from the other answers (1 to 5): perhaps codes of no answer; these were analysed as answers, as "
            "the file holds them") in both
