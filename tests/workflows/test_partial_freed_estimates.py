"""The partial-invariance search gives, for each parameter it frees, its estimate in each group of the step's partial
model with its standard error (new-user trial s20, item 7: only the score test was given, not how large the
difference is nor which way), in the report and the JSON; the same values as the route the docs describe, a model
file with 'invariance scalar' and 'noninvariant' fitted in groups."""

from __future__ import annotations

import json

import pytest

import cfa_tool
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.workflow_tables import invariance_report
from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS


@pytest.fixture(scope="module")
def ladder(hs_data):
    return invariance(THREE_FACTORS, hs_data, "school", partial="auto")


def test_each_freed_parameter_has_its_estimate_in_each_group(ladder, hs_data):
    # Holzinger & Swineford (1939) by school: the search frees the intercepts of x3 and x7 at the scalar step (the
    # partial scalar model widely published for these data, recalled from memory)
    assert [(f.level, f.kind, f.variables) for f in ladder.freed] == [("scalar", "intercept", ("x3",)),
                                                                       ("scalar", "intercept", ("x7",))]
    partial = cfa_tool.fit(THREE_FACTORS + "invariance scalar\nnoninvariant intercept(x3)\nnoninvariant intercept(x7)\n",
                           hs_data, group="school")
    for freed in ladder.freed:
        fitted = {r.group: (r.estimate, r.se) for r in partial.estimates
                  if r.kind == "intercept" and r.variables == freed.variables}
        assert sorted(fitted) == sorted(g for g, *_ in freed.estimates)
        for g, e, se, free in freed.estimates:
            assert free and (e, se) == pytest.approx(fitted[g], rel=1e-6)
        by_group = {g: e for g, e, _, _ in freed.estimates}
        # the direction: Pasteur's pupils score higher on x3 and x7 than Grant-White's (the items' means by school,
        # computed by pandas), and so do their freed intercepts
        means = hs_data.groupby("school")[freed.variables[0]].mean()
        assert (by_group["Pasteur"] > by_group["Grant-White"]) == (means["Pasteur"] > means["Grant-White"])
        assert means["Pasteur"] > means["Grant-White"]
        said = freed.to_dict()["estimates"]
        assert {d["group"] for d in said} == {"Pasteur", "Grant-White"} and all(d["se"] > 0 for d in said)
    saved = json.loads(json.dumps(ladder.to_dict()))
    assert saved["freed"][0]["estimates"][0]["estimate"] == pytest.approx(ladder.freed[0].estimates[0][1])


def test_the_report_shows_them_beside_the_score_test(ladder):
    text = report_text(invariance_report(ladder))
    assert "Estimate in each group (SE)" in text
    (x3,) = [f for f in ladder.freed if f.variables == ("x3",)]
    words = "; ".join(f"{g} {e:.2f} ({se:.2f})" for g, e, se, _ in x3.estimates)
    assert words in text
