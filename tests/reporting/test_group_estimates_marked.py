"""A multi-group fit's report: each group's tables name their group in the title, the estimates say which
parameters are held equal across groups and which are the group's own, the sum scores say when their means cannot be
compared across groups, and the missing-data note says why its pattern count differs from Little's test's.

Outside references: the Holzinger & Swineford (1939) data by school; which parameters are held equal is what the
model file declares (scalar invariance with x3's intercept exempt), read off here from the declaration, not from the
project's tables; that observed-sum means need scalar invariance is Meredith's (1993) condition (recalled from
memory)."""

from __future__ import annotations

import json

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.json_report import to_json
from tests.conftest import THREE_FACTORS, holzinger_swineford

PARTIAL = THREE_FACTORS + "invariance scalar\nnoninvariant intercept(x3)\n"


@pytest.fixture(scope="module")
def partial():
    return cfa_tool.fit(PARTIAL, holzinger_swineford(), group="school")


def test_each_group_table_names_its_group_and_no_two_share_a_title(partial):
    report = fit_report(partial)
    grouped = [t for t in report.tables if "group" in t.section]
    assert grouped
    for t in grouped:
        label = "Grant-White" if "Grant-White" in t.section else "Pasteur"
        assert f"group {label}" in t.title, (t.section, t.title)
    titles = [t.title for t in report.tables]
    assert len(titles) == len(set(titles))  # before: 'Factor visual (scale: ...)' twice, the group nowhere in it
    assert "Reliability of the scale scores, group Pasteur" in titles


def test_the_parameters_held_equal_are_those_the_model_declares(partial):
    held = partial.held_equal_across_groups()
    for group in ("Grant-White", "Pasteur"):
        # scalar invariance: every free loading and every intercept but x3's is shared
        for item in ("x1", "x2", "x4", "x5", "x6", "x7", "x8", "x9"):
            assert ("intercept", (item,), group) in held
        assert ("intercept", ("x3",), group) not in held
        assert ("loading", ("visual", "x2"), group) in held
        assert ("loading", ("visual", "x1"), group) not in held  # the marker: fixed, not a shared estimate
        assert ("residual_variance", ("x1",), group) not in held  # free in each group at the scalar level
    assert cfa_tool.fit(THREE_FACTORS, holzinger_swineford(), group="school").held_equal_across_groups() == frozenset()
    data = json.loads(to_json(partial))
    assert {"kind": "intercept", "variables": ["x3"], "group": "Pasteur"} not in data["parameters_held_equal_across_groups"]
    assert {"kind": "intercept", "variables": ["x1"], "group": "Pasteur"} in data["parameters_held_equal_across_groups"]


def test_the_estimate_tables_mark_what_is_held_equal(partial):
    report = fit_report(partial)
    intercepts = next(t for t in report.tables if t.title == "Intercepts, group Pasteur")
    column = intercepts.columns.index("Held equal")
    marks = {row[0]: row[column] for row in intercepts.rows}
    assert marks["x3"] == "no" and marks["x1"] == "yes"
    assert "Held equal" in intercepts.value_columns  # the data files and the JSON report carry it too
    visual = next(t for t in report.tables if t.title.startswith("Factor visual") and t.title.endswith("Pasteur"))
    assert "Held equal across groups (one estimate shared): the loadings of x2 and x3" in visual.note
    assert "This group's own (free to differ across groups): the error variances of x1, x2, and x3" in visual.note


def test_sum_score_means_are_said_not_comparable_when_an_item_differs(partial):
    report = fit_report(partial)
    sums = next(t for t in report.tables if t.title == "Keyed sum scores, group Pasteur")
    assert "The means of the visual sums are not comparable across groups" in sums.note
    assert "the intercept of x3" in sums.note
    configural = fit_report(cfa_tool.fit(THREE_FACTORS, holzinger_swineford(), group="school"))
    sums = next(t for t in configural.tables if t.title.startswith("Keyed sum scores"))
    assert "scalar invariance" in sums.note and "does not assume" in sums.note


def test_the_pattern_counts_of_the_table_and_of_littles_test_are_explained():
    data = holzinger_swineford()
    rng = np.random.default_rng(8)
    items = [f"x{i}" for i in range(1, 10)]
    values = data[items].to_numpy(dtype=float)
    values[rng.random(values.shape) < 0.04] = np.nan
    data[items] = values
    result = cfa_tool.fit(THREE_FACTORS, data, group="school")
    pooled = result.missing_data["n_patterns"]
    within = result.completely_at_random.patterns
    # counted by hand here: distinct patterns over all rows, and within each school added up
    gaps = data[items].isna()
    assert pooled == len({tuple(r) for r in gaps.to_numpy()})
    assert within == sum(len({tuple(r) for r in gaps[data["school"] == s].to_numpy()}) for s in ("Pasteur", "Grant-White"))
    assert within > pooled
    note = next(t for t in fit_report(result).tables if t.key == "missing").note
    note = str(note)  # as the program's user reads it (a Note: its advice names the option)
    assert f"{pooled} distinct patterns over all rows" in note
    assert f"over {within} patterns counted group by group" in note
    assert f"hence more than the {pooled} distinct patterns above" in note


TIED_WITHIN = THREE_FACTORS + "equal loading(visual, x2), loading(visual, x3)\ninvariance metric\n"


def test_the_marks_come_from_the_parameter_table_not_from_equal_estimates():
    """Which estimates are one parameter is what the model declares: 'invariance metric' holds every free loading equal
    across the schools, and the 'equal' statement ties x3's loading to x2's in each school, so x3's loading is the
    same parameter in both (before, a loading tied within its group was never marked, having no label of its own)."""
    result = cfa_tool.fit(TIED_WITHIN, holzinger_swineford(), group="school")
    held = result.held_equal_across_groups()
    for group in ("Grant-White", "Pasteur"):
        assert ("loading", ("visual", "x2"), group) in held
        assert ("loading", ("visual", "x3"), group) in held
        assert ("residual_variance", ("x3",), group) not in held  # free in each school at the metric level
    data = json.loads(to_json(result))
    assert {"kind": "loading", "variables": ["visual", "x3"], "group": "Grant-White"} in (
        data["parameters_held_equal_across_groups"])


def test_equal_estimates_by_chance_are_not_marked_and_shared_ones_stay_marked_whatever_their_digits():
    """Configural loadings that happen to share an estimate are two parameters; a loading held equal is one even if
    its two rows' numbers differ in the last digits.  The estimates are set here by hand, which the marks must not
    follow (before, they were inferred from equal estimates and moved with them)."""
    from dataclasses import replace

    one_group_tie = THREE_FACTORS + "in group Pasteur: equal loading(visual, x2), loading(visual, x3)\n"
    result = cfa_tool.fit(one_group_tie, holzinger_swineford(), group="school")
    pasteur_x3 = next(r for r in result.estimates if r.kind == "loading" and r.variables == ("visual", "x3")
                      and r.group == "Pasteur")
    chance = replace(result, estimates=tuple(
        replace(r, estimate=pasteur_x3.estimate) if r.kind == "loading" and r.variables == ("visual", "x3") else r
        for r in result.estimates))
    assert chance.held_equal_across_groups() == frozenset()  # no equality across groups in this model
    for t in fit_report(chance).tables:
        assert "Held equal" not in t.columns and "Held equal" not in str(t.note or ""), t.title
    metric = cfa_tool.fit(THREE_FACTORS + "invariance metric\n", holzinger_swineford(), group="school")
    nudged = replace(metric, estimates=tuple(
        replace(r, estimate=r.estimate * (1 + 1e-9)) if r.group == "Pasteur" and r.kind == "loading" else r
        for r in metric.estimates))
    assert ("loading", ("visual", "x2"), "Pasteur") in nudged.held_equal_across_groups()
    assert ("loading", ("visual", "x2"), "Grant-White") in nudged.held_equal_across_groups()
    table = next(t for t in fit_report(nudged).tables if t.title.startswith("Factor visual") and t.title.endswith("Pasteur"))
    assert "Held equal across groups (one estimate shared): the loadings of x2 and x3" in table.note
