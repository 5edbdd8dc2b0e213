"""A model scaled by the factors' variances with its loadings held equal across groups estimates the later groups'
factor variances (their scale carried by the loadings held equal): every view says so (hostile s21: the methods
paragraph said each factor's variance was fixed at 1, and the later group's tables were headed 'variance fixed at 1'
beside a variance of 0.869).  Holzinger & Swineford (1939) by school."""

from __future__ import annotations

import cfa_tool
from cfa_tool.model.description import CARRIED_BY_LOADINGS
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.workflow_tables import invariance_report
from tests.conftest import THREE_FACTORS

SCALED = THREE_FACTORS + "scale latent by variance\n"


def _flat(text: str) -> str:
    return " ".join(text.split()).replace('"', "")


def test_the_fit_says_which_groups_fix_the_variances_and_which_estimate_them(hs_data):
    result = cfa_tool.fit(SCALED + "invariance metric\n", hs_data, group="school")
    first, second = result.groups[0].label, result.groups[1].label
    free = [r.variables[0] for r in result.estimates if r.kind == "factor_variance" and r.free]
    assert sorted(free) == ["speed", "textual", "visual"] and {r.group for r in result.estimates
                                                               if r.kind == "factor_variance" and r.free} == {second}
    text = _flat(methods_paragraph(result))
    assert f"The scale of each factor was set by fixing its variance to 1 in group {first}." in text
    assert (f"In group {second}, the variances of the factors were estimated, the loadings held equal across groups "
            f"carrying the scale set in group {first}.") in text
    assert "not on the same metric" not in text
    report = _flat(report_text(fit_report(result)))
    assert f"(scale: variance fixed at 1), group {second}" not in report
    assert f"(scale: loadings held equal across groups, variance estimated), group {second}" in report
    assert [s.method for g, own in result.description.group_scales if g == second for s in own] == \
        [CARRIED_BY_LOADINGS] * 3


def test_without_equal_loadings_every_group_fixes_them(hs_data):
    result = cfa_tool.fit(SCALED, hs_data, group="school")
    assert not [r for r in result.estimates if r.kind == "factor_variance" and r.free]
    text = _flat(methods_paragraph(result))
    assert "The scale of each factor was set by fixing its variance to 1." in text and "estimated, the loadings" not in text


def test_the_ladder_says_from_which_step_the_later_groups_estimate_them(hs_data):
    ladder = cfa_tool.invariance(SCALED, hs_data, "school")
    text = _flat(report_text(invariance_report(ladder)))
    assert (f"From the metric step on, in group {ladder.groups[1]}, the variances of the factors were estimated")\
        in text
