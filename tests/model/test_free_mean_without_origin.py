"""'free mean(f)' with groups and no equal intercepts freed the factor's mean in every group, its indicators'
intercepts free there too: not identified (the mean and the intercepts trade off, Sorbom 1974), and refused only
after the fit by the information matrix's rank, naming no statement (fixnew-a-s19's notes).  Now an error at the
statement, naming the factor and the group, with the ways that identify the mean; the same in one group fitted by
full-information ML.  A mean that an intercept fixed in its group identifies stands, and a later group's mean under
'invariance scalar' is free already ('free' on it changes nothing, an error of its own).  Which models are refused
follows from counting: a mean of f and the four intercepts of its items enter the four means of the items alone."""

from __future__ import annotations

import pytest

from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.parameters import build_parameter_table

F = "factor f: x1, x2, x3, x4\n"  # line 1
GROUPS = ("audit", "east", "north")


@pytest.mark.parametrize("statements, place, group", [
    ("free mean(f)\n", (2, 6), "audit"),  # every group's: the first group's has no origin
    ("in group east: free mean(f)\n", (2, 21), "east"),
    ("invariance metric\nfree mean(f)\n", (3, 6), "audit"),
    ("equal across groups: intercepts\nfree mean(f)\n", (3, 6), "audit"),  # intercepts equal, loadings not
    # with scalar invariance the first group's mean is the origin of the others'
    ("invariance scalar\nin group audit: free mean(f)\n", (3, 22), "audit"),
])
def test_a_freed_mean_with_nothing_to_set_its_origin_is_refused_at_its_line(statements, place, group):
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(F + statements, "m.cfa"), GROUPS)
    assert (info.value.location.line, info.value.location.column) == place
    assert f"frees the mean of 'f' in group {group}, where nothing sets its origin" in str(info.value)
    assert "fix an intercept of one indicator (as 'fix intercept(x1) = 0')" in str(info.value)


def test_one_group_with_a_mean_structure_too():
    with pytest.raises(ModelError, match=r"m\.cfa:2:6: 'free mean\(f\)' frees the mean of 'f', where nothing sets its "
                                         r"origin: every intercept of its indicators is free as well"):
        build_parameter_table(parse_model(F + "free mean(f)\n", "m.cfa"), None, mean_structure=True)


@pytest.mark.parametrize("statements, groups", [
    ("fix intercept(x1) = 0\nfree mean(f)\n", GROUPS),  # an intercept fixed in every group: each mean identified
    ("in group east: fix intercept(x2) = 1\nin group east: free mean(f)\n", GROUPS),
    ("fix intercept(x1) = 0\nfree mean(f)\n", None),
])
def test_a_mean_an_intercept_identifies_stands(statements, groups):
    table = build_parameter_table(parse_model(F + statements, "m.cfa"), groups, mean_structure=True)
    assert any(p.kind == "mean" and p.free for p in table.parameters)
