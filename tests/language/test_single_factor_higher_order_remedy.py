"""A higher-order factor over one factor: the first error gives the whole remedy (hostile s22, finding 7: its advice
'fix variance(a) = 0' alone led to a second error asking to also fix one of a's loadings).

Check value: with a's disturbance variance at 0 and a loading of a at 1, g is a itself, so the model is the
one-factor model of a's items (an equivalent model: the same implied covariance matrix; Bollen 1989, ch. 7, on
higher-order factors, recalled from memory), whose chi-square and degrees of freedom it must reproduce.
"""

from __future__ import annotations

import re

import pytest

import cfa_tool
from cfa_tool.errors import ModelError
from cfa_tool.language import parse_model

ONE = "factor a: on_time, short_wait, accurate_info, easy_transfer\n"
OVER_ONE = ONE + "factor g: a\n"


def _advice(text: str) -> str:
    with pytest.raises(ModelError) as caught:
        parse_model(text)
    return str(caught.value)


def test_the_first_error_gives_both_lines_and_they_are_enough(rider_demo):
    message = _advice(OVER_ONE)
    assert "single indicator 'a'" in message
    lines = re.findall(r"'(fix [^']*)'", message)
    assert lines == ["fix variance(a) = 0", "fix loading(a, on_time) = 1"]
    remedied = OVER_ONE + "\n".join(lines) + "\n"
    parse_model(remedied)  # no second error
    fitted, alone = cfa_tool.fit(remedied, rider_demo), cfa_tool.fit(ONE, rider_demo)
    assert fitted.converged and fitted.fit.df == alone.fit.df == 2
    assert fitted.fit.chi_square == pytest.approx(alone.fit.chi_square, rel=1e-6)


def test_an_item_as_the_one_indicator_keeps_its_one_line():
    message = _advice("factor f: on_time\nfactor b: short_wait, accurate_info, easy_transfer\n")
    assert re.findall(r"'(fix [^']*)'", message) == ["fix variance(on_time) = 0"]
    parse_model("factor f: on_time\nfactor b: short_wait, accurate_info, easy_transfer\nfix variance(on_time) = 0\n")


def test_a_factor_scaled_by_a_fixed_loading_needs_only_its_disturbance():
    message = _advice(OVER_ONE + "fix loading(a, short_wait) = 1\n")
    assert re.findall(r"'(fix [^']*)'", message) == ["fix variance(a) = 0"]
    parse_model(OVER_ONE + "fix loading(a, short_wait) = 1\nfix variance(a) = 0\n")
