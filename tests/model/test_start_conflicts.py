"""Start values of parameters that end up as one free parameter (model.parameters' start loop).

Parameters tied by 'equal', by 'invariance LEVEL' or by 'equal across groups: ...' are one parameter, which can
start at one value only: two different start values for them leave one unused without a word (and simulate would
draw its population from the other), so they are an error naming both lines.  A start value given in one group
('in group north: start ...') replaces the start for every group there, whatever the order of the statements.

No computation is checked here: only which start value each free parameter gets, read from the model text."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model
from cfa_tool.model.parameters import build_parameter_table

GROUPS = ("north", "south")
F = "factor f: a, b, c\nfactor g: d, e, h\n"  # lines 1 and 2


def _error(text: str, groups=None) -> ModelError:
    with pytest.raises(ModelError) as info:
        build_parameter_table(parse_model(text, "m.cfa"), groups)
    return info.value


def _start_of(text: str, label: str, groups=None) -> float:
    table = build_parameter_table(parse_model(text, "m.cfa"), groups)
    return float(table.start[table.free_labels.index(label)])


# the model's statements after F, the place of the error (line, column) and what it says
ACROSS_GROUPS = {
    "invariance metric\nstart loading(f, b) = 0.5\nin group north: start loading(f, b) = 0.7\n": (
        (5, 23), "loading(f, b) and loading(f, b) in group north are held equal across groups (line 3) but given "
                 "different start values: 0.5 on line 4 and 0.7 on line 5; give them one, or let them differ across "
                 "groups with 'noninvariant loading(f, b)'"),
    "equal across groups: loadings\nin group south: start loading(f, b) = 0.9\nin group north: start loading(f, b) = 0.7\n":
        ((5, 23), "loading(f, b) in group south and loading(f, b) in group north are held equal across groups (line 3)"),
    # a group's start written before the start for every group: still two values for one parameter
    "invariance scalar\nin group north: start intercept(a) = 3\nstart intercept(a) = 2.5\n": ((5, 7), "3 on line 4 and 2.5 on line 5"),
    # 'equal' and the groups together: two parameters of two groups that are one parameter
    "invariance metric\nequal loading(f, b), loading(f, c)\nin group north: start loading(f, b) = 0.5\n"
    "in group south: start loading(f, c) = 0.8\n": ((6, 23), "loading(f, b) in group north and loading(f, c) in group "
                                                            "south are held equal (line 4) and across groups (line 3)"),
    "in group north: start variance(d) = 1\nin group north: start variance(d) = 2\n": (
        (4, 23), "variance(d) in group north is given the start value 2 here but 1 on line 3; give it one"),
}
# checks._check_start_values' cases (hostile trial 10, 06) with their lines and words, and the ties across groups
# (the last start won before)
CASES = [("factor f: a, b, c\nequal loading(f, b), loading(f, c)\nstart loading(f, b) = 0.5\nstart loading(f, c) = 1.5\n",
          None, (4, 7), "loading(f, b) and loading(f, c) are held equal (line 2) but given different start values: 0.5 on "
                        "line 3 and 1.5 on line 4; give them one"),
         ("factor f: a, b, c\nstart variance(a) = 0.5\nstart variance(a) = 2\n", None, (3, 7),
          "variance(a) is given the start value 2 here but 0.5 on line 2; give it one")] + [
    (F + statements, GROUPS, place, words) for statements, (place, words) in ACROSS_GROUPS.items()]


@pytest.mark.parametrize("text, groups, place, words", CASES)
def test_two_start_values_for_one_parameter_are_refused(text, groups, place, words):
    err = _error(text, groups)
    assert words in err.message, err.message
    assert (err.location.source, err.location.line, err.location.column) == ("m.cfa", *place)


def test_one_start_value_for_tied_parameters_is_accepted():
    text = F + "invariance metric\nstart loading(f, b) = 0.6\nin group north: start loading(f, b) = 0.6\n"
    assert _start_of(text, "loading(f, b) [north]", GROUPS) == 0.6
    text = "factor f: a, b, c\nequal loading(f, b), loading(f, c)\nstart loading(f, b), loading(f, c) = 0.8\n"
    assert _start_of(text, "loading(f, b)") == 0.8


@pytest.mark.parametrize("order", ["general first", "group first"])
def test_a_group_start_replaces_the_start_for_every_group_there(order):
    # without a tie the groups' loadings are two parameters: north starts at 0.7, south at 0.5, in either order
    # of the statements (the statement written last won in north before when it was the one for every group)
    general, north = "start loading(f, b) = 0.5\n", "in group north: start loading(f, b) = 0.7\n"
    text = F + (general + north if order == "general first" else north + general)
    table = build_parameter_table(parse_model(text, "m.cfa"), GROUPS)
    starts = dict(zip(table.free_labels, table.start))
    assert starts["loading(f, b) [north]"] == 0.7
    assert starts["loading(f, b) [south]"] == 0.5
    assert np.isnan(starts["loading(f, c) [north]"])
