"""The methods paragraph of a model scaled differently in different groups ('in group NAME: fix variance(f) = 1'
with the marker kept elsewhere) states each group's scaling."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.workflows.test_invariance_decisions import MODEL, groups_data


def test_each_group_scaling_is_described_as_fitted():
    result = cfa_tool.fit(MODEL + "in group g2: fix variance(f) = 1\n", groups_data(51, n=200), group="grp")
    loading = {(r.group, r.free): r.estimate for r in result.estimates if r.kind == "loading" and r.variables == ("f", "y1")}
    assert loading.get(("g1", False)) == 1.0 and ("g2", True) in loading  # the marker in g1 only, as fitted
    assert result.fit.df == 16  # hand count: 2 x (27 moments - 19 parameters); the scale moves, the count does not
    scales = dict(result.description.group_scales)
    assert [s.method for s in scales["g1"] if s.factor == "f"] == ["marker"]
    assert [s.method for s in scales["g2"] if s.factor == "f"] == ["fixed by the model"]
    text = methods_paragraph(result)
    assert "The scale of h was set by fixing the loading of one indicator to 1 (y4)." in text
    assert "In group g1, the scale of f was set by fixing the loading of one indicator to 1 (y1)." in text
    assert "In group g2, the scale of f was set by parameters the model fixes." in text
    assert "f is not on the same metric in every group" in text


def test_one_scaling_for_every_group_reads_as_before():
    result = cfa_tool.fit(MODEL, groups_data(52, n=200), group="grp")
    assert result.description.group_scales == ()
    assert "the loading of one indicator to 1 (y1 for f and y4 for h)" in methods_paragraph(result)
