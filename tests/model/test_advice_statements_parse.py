"""A statement that an error message tells the researcher to write is valid model syntax: written into the model
as told, it parses (hostile trial s12: 'free loading(comfort, seat_available) in group south' was suggested, which is a
syntax error; the model language writes 'in group south: free loading(comfort, seat_available)')."""

from __future__ import annotations

import re

import pytest

from cfa_tool.errors import ModelError
from cfa_tool.language.parser import parse_model
from cfa_tool.model.parameters import build_parameter_table
from cfa_tool.pipeline.continuous import model_structure

MODEL = "factor comfort: seat_available, clean, temperature\nfactor courtesy: greeting, helpful, respectful\n"


@pytest.mark.parametrize("line, groups", [("start loading(comfort, seat_available) = 0.5", None),
                                          ("in group south: start loading(comfort, seat_available) = 0.5",
                                           ("north", "south")),
                                          ('in group "south east": start loading(comfort, seat_available) = 0.5',
                                           ("north", "south east"))])
def test_the_statement_an_error_suggests_parses(line, groups):
    text = MODEL + line + "\n"
    with pytest.raises(ModelError) as caught:
        if groups is None:
            build_parameter_table(parse_model(text))
        else:
            model_structure(parse_model(text), groups, True)
    suggested = re.findall(r"\('((?:in group [^:]+: )?free [^']+)';", str(caught.value))
    assert suggested, str(caught.value)
    for statement in suggested:
        parse_model(MODEL + statement + "\n" + line + "\n")  # no syntax error
