"""Start values and bounds on parameters that are not free (model.parameters' cannot_apply).

A parameter can be fixed without a 'fix' statement naming it in the statement's scope: through an 'equal' statement
that ties it to a fixed parameter (a fixed one or the marker that sets a factor's scale), through a tie across groups
to a fixed parameter (a factor mean held equal to the first group's, which is 0), by a 'fix' written for every group
while the start names one group, by effects coding (the last loading is given by the others), by a factor mean that
is 0 with one group, or by the first group's factor mean.  A start value or a bound there would be ignored without a
word; each is an error that names the model file, the line and column of the start or bound, the parameter, and how
it is fixed ('fixed through its tie to X').  Where the statement applies in some group, it stands.

No computation is checked here: only which statements the parameter table refuses, read from the model text."""

from __future__ import annotations

import re

import numpy as np
import pytest

from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.parameters import build_parameter_table

F = "factor f: a, b, c\nfactor g: d, e, h\n"  # lines 1 and 2
GROUPS = ("north", "south")

# the statements after F, the groups, a mean structure, the error's place (line, column) and its words
REFUSED = [
    ("equal loading(f, a), loading(f, b)\nstart loading(f, b) = 0.8\n", None, False, (4, 7),
     "m.cfa:4:7: loading(f, b) is fixed through its tie to loading(f, a) (held equal by the 'equal' statement on "
     "line 3), which is fixed at 1 to set the scale of 'f', so a start value on it has no effect; remove the start "
     "value or the tie"),
    ("fix loading(f, c) = 0.5\nequal loading(f, b), loading(f, c)\nstart loading(f, b) = 0.8\n", None, False, (5, 7),
     "loading(f, b) is fixed through its tie to loading(f, c) (held equal by the 'equal' statement on line 4), which "
     "is fixed at 0.5 by the 'fix' statement on line 3"),
    # a chain of ties: b to a, c to b; a residual variance fixed by a 'fix' statement reaches both
    ("fix variance(a) = 0.4\nequal variance(a), variance(b)\nequal variance(b), variance(c)\n"
     "start variance(c) = 0.5\n", None, False, (6, 7),
     "variance(c) is fixed through its tie to variance(a) (held equal by the 'equal' statement on line 5), which is "
     "fixed at 0.4 by the 'fix' statement on line 3"),
    ("scale latent by effects\nstart loading(f, c) = 0.8\n", None, False, (4, 7),
     "loading(f, c) is given by the other loadings of 'f' (effects coding makes them average 1), not a free "
     "parameter, so a start value on it has no effect"),
    ("start mean(f) = 0.3\n", None, True, (3, 7),
     "mean(f) is fixed at 0: with one group a factor's mean is 0, which sets the origin of its scale"),
    ("equal across groups: loadings, intercepts, factor means\nin group south: start mean(f) = 0.3\n", GROUPS, False,
     (4, 23), "mean(f) in group south is fixed through its tie to mean(f) in group north (held equal across groups "
              "(line 3)), which is fixed at 0"),
    # a plain fit with groups: a factor mean is fixed at 0 in every group until the intercepts are held equal (the
    # invariance ladder's steps read such a start later: test_a_start_on_a_factor_mean_is_not_refused_at_a_ladder_step)
    ("start mean(f) = 0.3\n", GROUPS, False, (3, 7),
     "mean(f) is fixed at 0 in every group: a factor's mean is estimated only in the groups after the first, and only "
     "when the loadings and intercepts of its indicators are held equal across groups ('invariance scalar'), which "
     "this model does not do, so a start value on it has no effect"),
    ("invariance metric\nin group south: start mean(f) = 0.3\n", GROUPS, False, (4, 23),
     "mean(f) in group south is fixed at 0 in every group: a factor's mean is estimated only"),
    # the first group's mean sets the origin of the others, also when they are estimated
    ("invariance scalar\nin group north: start mean(f) = 0.3\n", GROUPS, False, (4, 23),
     "mean(f) in group north is fixed at 0 in the first group, which sets the origin of the means"),
    # a 'fix' for every group and a start or a bound for one group: checks.py compares statements of one scope only
    ("fix loading(f, b) = 0.5\nin group south: start loading(f, b) = 0.3\n", GROUPS, False, (4, 23),
     "loading(f, b) in group south is fixed at 0.5 by the 'fix' statement on line 3, so a start value on it has no "
     "effect; remove the start value"),
]


@pytest.mark.parametrize("statements, groups, means, place, words", REFUSED)
def test_a_start_or_bound_on_a_parameter_fixed_another_way_is_refused(statements, groups, means, place, words):
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(F + statements, "m.cfa"), groups, mean_structure=means)
    assert (info.value.location.line, info.value.location.column) == place
    assert words in str(info.value)


@pytest.mark.parametrize("statements, groups, means, place, words", REFUSED)
def test_a_bound_where_a_start_is_refused_is_refused_too(statements, groups, means, place, words):
    bounded = re.sub(r"start (.*) = [\d.]+", r"bound \1 >= 0", statements)
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(F + bounded, "m.cfa"), groups, mean_structure=means)
    assert (info.value.location.line, info.value.location.column) == place
    said = words.split(", so a start value")[0].removeprefix("m.cfa:4:7: ")
    assert said in str(info.value) and "so a bound on it has no effect; remove the bound" in str(info.value)


# statements that apply in at least one group the statement names, and the free parameter whose start they give
APPLIED = [
    # the first group's variance sets the scale; the loadings held equal let the later groups' variances be free
    ("scale latent by variance\ninvariance metric\nstart variance(f) = 2\n", GROUPS, "variance(f) [south]", 2.0),
    # a factor mean beyond the first group: free once the intercepts are held equal (the invariance ladder's
    # scalar step), so a start written for it stands in the steps before that too
    ("invariance scalar\nstart mean(f) = 0.3\n", GROUPS, "mean(f) [south]", 0.3),
    ("equal loading(f, b), loading(f, c)\nstart loading(f, b) = 0.8\n", None, "loading(f, b)", 0.8),
]


@pytest.mark.parametrize("statements, groups, label, value", APPLIED)
def test_a_start_that_applies_in_some_group_stands(statements, groups, label, value):
    table = build_parameter_table(parse_model(F + statements, "m.cfa"), groups)
    assert float(table.start[table.free_labels.index(label)]) == value


@pytest.mark.parametrize("statement", ["start mean(f) = 0.3\n", "in group north: start mean(f) = 0.3\n"])
def test_a_start_on_a_factor_mean_is_not_refused_at_a_ladder_step(statement):
    """The invariance ladder fits the model file's statements at every step, and a factor mean of a later group is
    fixed at 0 until the intercepts are held equal: its start applies from that step on, so no step refuses it; a
    power study with groups reads each group's population mean, the first group's too, from such statements.  The
    steps are the model as spec_of_level makes them; the same statements in a plain fit are refused (REFUSED)."""
    from cfa_tool.workflows.invariance import spec_of_level

    table = build_parameter_table(spec_of_level(parse_model(F + statement, "m.cfa"), (), ()), GROUPS)
    assert "mean(f) [south]" not in table.free_labels
    assert np.isnan(table.start).all()


@pytest.mark.parametrize("kind, fixed", [("intercept", "fixed at 0 to give the latent response of the ordinal item "
                                                       "'a' its origin (Wu & Estabrook 2016)"),
                                         ("variance", "fixed at 1 to give the latent response of the ordinal item 'a' "
                                                      "its unit (Wu & Estabrook 2016)")])
def test_noninvariant_on_an_ordinal_items_fixed_latent_response_says_why_as_a_start_does(kind, fixed):
    """An ordinal item's latent response has its intercept fixed at 0 and its variance at 1 in every group while its
    thresholds may differ (Wu & Estabrook 2016), so exempting either from being held equal has no effect.  The
    'noninvariant' check and the start's check were two rules for 'fixed to set a scale'; the 'noninvariant' one
    took the item for a factor ('scale a by marker'), the start's one was right: both now say why as the start's
    did.  Item 'a' is the ordinal item (two thresholds), b, c and d continuous."""
    held = "intercepts" if kind == "intercept" else "error variances"
    spec = parse_model(f"factor f: a, b, c, d\nequal across groups: loadings, {held}\nnoninvariant {kind}(a)\n",
                       "m.cfa")
    with pytest.raises(ModelError) as info:
        build_parameter_table(spec, GROUPS, mean_structure=True, ordinal={"a": 2})
    assert (info.value.location.line, info.value.location.column) == (3, 14)
    # one reason in every group, said once without naming a group (new user s22: 'fixed in every group (in group
    # North Hospital: ...)' read as contradicting itself)
    assert (f"{kind}(a) is {fixed}, in every group, so 'noninvariant' on it has no effect; "
            f"remove the 'noninvariant' statement") in str(info.value)
    assert "in group north" not in str(info.value)
    assert "marker" not in str(info.value)


@pytest.mark.parametrize("statement, advice", [
    ("start mean(f) = 0.3", "so a start value on it has no effect; remove the start value (the invariance command "
                            "reads it at the step that holds the intercepts equal)"),
    ("bound mean(f) >= 0", "so a bound on it has no effect; remove the bound"),
])
def test_the_advice_follows_the_statement_refused(statement, advice):
    """The advice is the refused statement's (model.parameters.Unapplied), chosen where the statement is known, not
    read back from the first word of its phrase: only a start on a factor mean fixed at 0 in every group is read by
    the invariance ladder at a later step (test_a_start_on_a_factor_mean_is_not_refused_at_a_ladder_step)."""
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(F + statement + "\n", "m.cfa"), GROUPS)
    message = str(info.value).splitlines()[0]
    assert message.endswith(advice)
