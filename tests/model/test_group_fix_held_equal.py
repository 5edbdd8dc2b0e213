"""A parameter fixed in one group while its class is held equal across groups ('in group north: fix loading(f, b) = .5'
with 'invariance metric') left the other groups' parameter free without a word: "metric invariance" was not what was
fitted.  It is an error naming the statement, what holds the class equal and the two ways out: the 'fix' for every
group (held equal at that value), or the parameter exempted ('noninvariant'), which the methods paragraph names.
The neighbours: intercepts with scalar, residual variances with strict, 'equal across groups' statements, and a step
of the invariance ladder; a start or a fix that every group shares stands.  Only which models the parameter table
refuses is checked here, read from the model text; the fits below check what the ways out fit."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.workflows.invariance import spec_of_level
from tests.conftest import THREE_FACTORS

F = "factor f: a, b, c\nfactor g: d, e, h\n"  # lines 1 and 2
GROUPS = ("north", "south")

REFUSED = [
    ("invariance metric\nin group north: fix loading(f, b) = .5\n", (4, 21),
     "loading(f, b) in group north is fixed at 0.5 in that group alone, but 'invariance metric' (line 3) holds the "
     "loadings equal across groups: the other groups' loading(f, b) would be left free, and the model would not be "
     "the metric invariance it is said to be; fix it in every group (the 'fix' statement without 'in group') to hold "
     "it equal at 0.5, set it apart in that group ('in group north: noninvariant loading(f, b)') to fix it there "
     "alone, or exempt it in every group ('noninvariant loading(f, b)')"),
    ("invariance metric\nin group south: fix loading(f, b) = .5\n", (4, 21),
     "loading(f, b) in group south is fixed at 0.5 in that group alone, but 'invariance metric' (line 3)"),
    ("invariance scalar\nin group south: fix intercept(b) = 2\n", (4, 21),
     "intercept(b) in group south is fixed at 2 in that group alone, but 'invariance scalar' (line 3) holds the "
     "intercepts equal across groups"),
    ("invariance strict\nin group south: fix variance(b) = .4\n", (4, 21),
     "variance(b) in group south is fixed at 0.4 in that group alone, but 'invariance strict' (line 3) holds the "
     "error variances equal across groups"),
    ("equal across groups: loadings, intercepts\nin group south: fix intercept(b) = 2\n", (4, 21),
     "'equal across groups: intercepts' (line 3) holds them equal across groups: the other groups' intercept(b) "
     "would be left free, and the model would not hold them equal as it says"),
    # an item set apart in one group (a loading fixed at 0) is no exception
    ("invariance metric\nin group south: fix loading(f, b) = 0\n", (4, 21),
     "loading(f, b) in group south is fixed at 0 in that group alone"),
]


@pytest.mark.parametrize("statements, place, words", REFUSED)
def test_a_fix_in_one_group_of_a_parameter_held_equal_across_groups_is_refused(statements, place, words):
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(F + statements, "m.cfa"), GROUPS)
    assert (info.value.location.line, info.value.location.column) == place
    assert words in str(info.value)


def test_a_step_of_the_invariance_ladder_names_the_step():
    spec = spec_of_level(parse_model(F + "in group south: fix loading(f, b) = .5\n", "m.cfa"), ("loadings",), ())
    with pytest.raises(ModelError, match=r"m\.cfa:3:21: loading\(f, b\) in group south is fixed at 0\.5 in that group "
                                         r"alone, but the invariance ladder holds the loadings equal across groups "
                                         r"from its metric step on"):
        build_parameter_table(spec, GROUPS)
    build_parameter_table(spec_of_level(spec, (), ()), GROUPS)  # the configural step holds nothing equal


STANDS = [
    "invariance metric\nfix loading(f, b) = .5\n",  # every group's: held equal at .5
    "invariance metric\nin group north: fix loading(f, b) = .5\nin group south: fix loading(f, b) = .5\n",
    "invariance metric\nin group south: fix loading(f, b) = .5\nnoninvariant loading(f, b)\n",  # exempted
    # set apart in that group alone (twentieth session)
    "invariance metric\nin group south: fix loading(f, b) = .5\nin group south: noninvariant loading(f, b)\n",
    "invariance metric\nin group south: start loading(f, b) = .5\n",  # a start of the loading every group shares
    "in group south: fix loading(f, b) = .5\n",  # nothing held equal
]


@pytest.mark.parametrize("statements", STANDS)
def test_a_fix_every_group_shares_or_an_exempted_one_stands(statements):
    build_parameter_table(parse_model(F + statements, "m.cfa"), GROUPS)


def test_the_ways_out_fit_what_they_say(hs_data):
    """Held equal at .5: the loading is .5 in both schools; exempted: .5 in one school, estimated in the other, and
    the methods paragraph names the exception to the metric invariance."""
    from cfa_tool.reporting.paragraph import methods_paragraph

    every = cfa_tool.fit(THREE_FACTORS + "invariance metric\nfix loading(visual, x2) = .5\n", hs_data, group="school")
    rows = [r for r in every.estimates if r.kind == "loading" and r.variables == ("visual", "x2")]
    assert len(rows) == 2 and all(not r.free and r.estimate == pytest.approx(0.5) for r in rows)
    exempt = cfa_tool.fit(THREE_FACTORS + "invariance metric\nin group Pasteur: fix loading(visual, x2) = .5\n"
                                          "noninvariant loading(visual, x2)\n", hs_data, group="school")
    rows = {r.group: r for r in exempt.estimates if r.kind == "loading" and r.variables == ("visual", "x2")}
    assert not rows["Pasteur"].free and rows["Pasteur"].estimate == pytest.approx(0.5)
    assert rows["Grant-White"].free
    assert "except" in methods_paragraph(exempt) and "x2" in methods_paragraph(exempt).split("except", 1)[1]


def test_fit_and_the_invariance_command_refuse_it_with_exit_2(hs_data, tmp_path, capsys):
    with pytest.raises(ModelError, match="'invariance metric' .* holds the loadings equal across groups"):
        cfa_tool.fit(THREE_FACTORS + "invariance metric\nin group Pasteur: fix loading(visual, x2) = .5\n", hs_data,
                     group="school")
    hs_data.to_csv(tmp_path / "hs.csv", index=False)
    (tmp_path / "m.cfa").write_text(THREE_FACTORS + "in group Pasteur: fix loading(visual, x2) = .5\n",
                                    encoding="utf-8")
    code = main(["invariance", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "hs.csv"), "--group-column",
                 "school"])
    err = capsys.readouterr().err
    assert code == 2 and "Traceback" not in err
    assert "the invariance ladder holds the loadings equal across groups from its metric step on" in err
