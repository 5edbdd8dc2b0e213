"""'free' statements that change nothing were accepted without a word (new-user trial, nineteenth session):

- 'in group Audit: free intercept(vig2)' under 'invariance scalar' (partial invariance in one department, what a
  researcher writes after the ladder names that group's intercept) fitted the full scalar model: the same chi-square
  and degrees of freedom, the intercept still marked as held equal, while every report listed the line as part of
  the model.  'free' releases what is fixed and leaves equalities as they are, so the statement is an error at its
  line naming what holds the class equal and the statements that set a parameter apart: in that group alone ('in
  group south: noninvariant intercept(b)', twentieth session) or in every group ('noninvariant'), as a 'fix' in one
  group of such a parameter already is (tests/model/test_group_fix_held_equal.py).
- 'free loading(vigour, vig2)', a loading that is free already (vig1 sets the scale), ran with no word that the line
  did nothing.  A start value or a bound on a parameter that is not free is an error at its line; so is a 'free' that
  frees nothing.

Only what the parameter table refuses or accepts is checked here, from the model text; the degrees of freedom of the
accepted ones follow from counting (Bollen 1989, ch. 7: a factor's scale from one fixed loading)."""

from __future__ import annotations

import pytest

from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.workflows.invariance import spec_of_level

F = "factor f: a, b, c\nfactor g: d, e, h\n"  # lines 1 and 2
GROUPS = ("north", "south", "east")


def _refused(statements: str, groups=GROUPS, mean_structure=False) -> ModelError:
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(F + statements, "m.cfa"), groups, mean_structure=mean_structure)
    return info.value


IN_ONE_GROUP = [
    ("invariance scalar\nin group south: free intercept(b)\n", (4, 22),
     "'in group south: free intercept(b)' does not set intercept(b) apart in group south: 'invariance scalar' "
     "(line 3) holds the intercepts equal across groups, and 'free' leaves that equality as it is; write 'in group "
     "south: noninvariant intercept(b)' to estimate it freely in group south while the other groups' stay equal, or "
     "'noninvariant intercept(b)' to let it differ in every group"),
    # the first group, whose parameters the others are tied to
    ("invariance scalar\nin group north: free intercept(b)\n", (4, 22),
     "write 'in group north: noninvariant intercept(b)'"),
    ("invariance metric\nin group east: free loading(f, b)\n", (4, 21),
     "'invariance metric' (line 3) holds the loadings equal across groups"),
    # a marker loading freed in one group: that group's scale would pass to the next indicator, apart from the others';
    # a marker cannot be set apart in one group either, so the advice makes another indicator the marker first
    ("invariance metric\nin group east: free loading(f, a)\n", (4, 21),
     "cannot set loading(f, a) apart in group east: 'invariance metric' (line 3) holds the loadings equal across "
     "groups, and loading(f, a) is the marker that sets the scale of 'f' in every group; make another indicator the "
     "marker ('free loading(f, a)': the next indicator then sets the scale) and write 'in group east: noninvariant "
     "loading(f, a)'"),
    ("equal across groups: loadings, intercepts\nin group east: free intercept(h)\n", (4, 21),
     "'equal across groups: intercepts' (line 3) holds them equal across groups"),
    ("invariance strict\nin group south: free variance(c)\n", (4, 22), "holds the error variances equal"),
]


@pytest.mark.parametrize("statements, place, words", IN_ONE_GROUP)
def test_a_free_in_one_group_of_a_parameter_held_equal_across_groups_is_refused(statements, place, words):
    error = _refused(statements)
    assert (error.location.line, error.location.column) == place
    assert words in str(error)


def test_a_step_of_the_invariance_ladder_names_the_step():
    spec = spec_of_level(parse_model(F + "in group south: free intercept(b)\n", "m.cfa"), ("loadings", "intercepts"), ())
    with pytest.raises(ModelError, match=r"m\.cfa:3:22: 'in group south: free intercept\(b\)' does not set "
                                         r"intercept\(b\) apart in group south: the invariance ladder holds the "
                                         r"intercepts equal across groups from its scalar step on"):
        build_parameter_table(spec, GROUPS)
    # at the configural step too, where the intercept is free already: the ladder's later step is what it is about
    configural = spec_of_level(spec, (), ())
    with pytest.raises(ModelError, match=r"the invariance ladder holds the intercepts equal across groups from its "
                                         r"scalar step on"):
        build_parameter_table(configural, GROUPS)


def test_the_way_out_frees_the_parameter_in_every_group():
    """'noninvariant intercept(b)': one intercept per group instead of one for all, two more free parameters with
    three groups (counting: G - 1)."""
    scalar = build_parameter_table(parse_model(F + "invariance scalar\n", "m.cfa"), GROUPS)
    partial = build_parameter_table(parse_model(F + "invariance scalar\nnoninvariant intercept(b)\n", "m.cfa"), GROUPS)
    assert partial.n_free == scalar.n_free + len(GROUPS) - 1


FREE_ALREADY = [
    ("free loading(f, b)\n", None, (3, 6),
     "loading(f, b) is free already ('a' sets the scale of 'f'), so 'free' changes nothing"),
    ("free variance(a)\n", None, (3, 6), "variance(a) is free already, so 'free' changes nothing"),
    ("free variance(f)\n", None, (3, 6), "variance(f) is free already"),
    ("free covariance(f, g)\n", None, (3, 6), "covariance(f, g) is free already"),
    ("scale latent by variance\nfree loading(f, a)\n", None, (4, 6), "loading(f, a) is free already, so"),
    ("free intercept(c)\n", None, (3, 6), "intercept(c) is free already"),
    # in one group, under no equality across groups
    ("in group south: free loading(f, c)\n", GROUPS, (3, 22), "loading(f, c) in group south is free already"),
    # a later group's factor mean that equal intercepts identify
    ("invariance scalar\nin group south: free mean(f)\n", GROUPS, (4, 22), "mean(f) in group south is free already"),
    # fixed whatever 'free' says: the loading effects coding gives
    ("scale latent by effects\nfree loading(f, c)\n", None, (4, 6),
     "loading(f, c) is given by the other loadings of 'f' (effects coding makes them average 1), not a free "
     "parameter, so 'free' on it has no effect; remove the statement"),
]


@pytest.mark.parametrize("statements, groups, place, words", FREE_ALREADY)
def test_a_free_that_frees_nothing_is_refused(statements, groups, place, words):
    error = _refused(statements, groups, mean_structure="intercept" in statements)
    assert (error.location.line, error.location.column) == place
    assert words in str(error)


STANDS = [
    ("free loading(f, a)\n", None, 0),  # the marker: b sets the scale instead, same count
    ("free loading(f, a), loading(f, b)\n", None, 0),  # c sets it
    ("in group south: free loading(f, a)\n", GROUPS, 0),  # configural: south's scale from b
    # fixed at 0 by default with a mean structure; freed, it needs an origin: here an intercept fixed in every group
    # (a freed mean with none is refused at its line: tests/model/test_free_mean_without_origin.py)
    ("fix intercept(a) = 0\nfree mean(f)\n", None, 1),
    # the first group's mean, fixed at 0 otherwise, with an intercept fixed (held equal at 0 across groups)
    ("invariance scalar\nfix intercept(a) = 0\nin group north: free mean(f)\n", GROUPS, 1),
]


@pytest.mark.parametrize("statements, groups, more", STANDS)
def test_a_free_that_frees_a_fixed_parameter_stands(statements, groups, more):
    """The count of free parameters: a freed marker passes the scale on (the same count); a freed mean adds one."""
    plain = F + ("invariance scalar\n" if "invariance" in statements else "") + (
        "fix intercept(a) = 0\n" if "fix intercept" in statements else "")
    means = groups is None and "mean" in statements
    before = build_parameter_table(parse_model(plain, "m.cfa"), groups, mean_structure=means)
    after = build_parameter_table(parse_model(F + statements, "m.cfa"), groups, mean_structure=means)
    assert after.n_free == before.n_free + more
