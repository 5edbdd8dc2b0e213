"""A group label in a message is written by the one rule of group labels (language.names.written_group): in double
quotes when it holds a space, so that 'in group land 01 is fixed' cannot be read as a group 'land' (s24: ParameterRef
wrote 'in group land 01' bare, the groups' refusals quoted labels in single quotes, some messages left them bare)."""

import pytest

import cfa_tool
from cfa_tool.errors import CfaError, DataError, ModelError, OptionError
from cfa_tool.language.names import written_group
from cfa_tool.language.parser import parse_model as parse
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.workflows.group_population import designs_of

LABEL = "land 01"
WRITTEN = written_group(LABEL)  # '"land 01"'


def test_the_rule_quotes_a_label_with_a_space():
    assert WRITTEN == '"land 01"'


def test_a_parameter_reference_names_its_group_by_the_rule():
    spec = parse('factor f: a, b, c\nin group "land 01": start loading(f, b) = .5\n')
    ref = spec.starts[0].refs[0]
    assert ref.group == LABEL
    assert str(ref) == f"loading(f, b) in group {WRITTEN}"


def _message(error: CfaError) -> str:
    text = str(error)
    assert f"'{LABEL}'" not in text  # no second rule (single quotes) beside the one
    return text


def test_the_parameter_table_names_an_unknown_group_by_the_rule():
    spec = parse('factor f: a, b, c\nin group "far coast": start loading(f, b) = .5\n')
    with pytest.raises(ModelError) as caught:
        build_parameter_table(spec, ("land 01", "north"))
    text = _message(caught.value)  # every label quoted, as one of them needs quotes
    assert 'there is no group "far coast" in the data; the groups are "land 01" and "north"' in text


def test_a_set_apart_marker_is_named_in_its_group_by_the_rule():
    spec = parse('factor f: a, b, c\ninvariance metric\nin group "land 01": noninvariant loading(f, a)\n')
    with pytest.raises(ModelError) as caught:
        build_parameter_table(spec, ("north", "land 01"))
    assert f"apart in group {WRITTEN} alone" in _message(caught.value)


def test_the_group_sizes_name_a_group_by_the_rule():
    with pytest.raises(OptionError) as caught:
        designs_of("land 01=100,land 01=200")
    assert f"group {WRITTEN} is given twice" in _message(caught.value)
    with pytest.raises(OptionError) as caught:
        designs_of("land 01=100,north=many")
    assert 'the size of group "north"' in _message(caught.value)  # quoted as its neighbour is


def test_the_power_plan_names_a_small_group_by_the_rule():
    with pytest.raises(OptionError) as caught:
        cfa_tool.invariance_power("factor f: a, b, c, d\n", "land 01=5,north=100", replications=2, workers=1)
    assert f"the size 5 of group {WRITTEN} is too small" in _message(caught.value)


def test_the_data_name_a_small_group_by_the_rule(hs_data):
    from tests.conftest import THREE_FACTORS

    data = hs_data.copy()
    data["school"] = data["school"].astype(object)
    data.loc[data.index[:3], "school"] = LABEL
    with pytest.raises(DataError) as caught:
        cfa_tool.fit(THREE_FACTORS, data, group="school")
    assert f"group {WRITTEN} of 'school' has only 3 complete rows" in _message(caught.value)
    with pytest.raises(OptionError) as caught:
        cfa_tool.fit(THREE_FACTORS, hs_data, group="school", reference_group=LABEL)
    assert f"{WRITTEN} is not a group of column 'school'" in _message(caught.value)
