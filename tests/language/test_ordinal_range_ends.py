"""--ordinal / ordinal= with a range whose start or end is no item: the message names which end it is and suggests
the item of the same stem at that end (hostile trial s12: 'q01..q09' was said to have the end 'q01', and 'q1..q12'
got the suggestion 'q2')."""

from __future__ import annotations

import pytest

from cfa_tool.errors import OptionError
from cfa_tool.language.names import ordinal_names

ITEMS = [f"q{i}" for i in range(1, 10)]


@pytest.mark.parametrize("given, said", [
    ("q01..q09", "the range's start 'q01' is not an indicator in the model; did you mean 'q1'?"),
    ("q1..q12", "the range's end 'q12' is not an indicator in the model; did you mean 'q9'?"),
    ("q0..q9", "the range's start 'q0' is not an indicator in the model; did you mean 'q1'?"),
])
def test_the_end_that_is_no_item_is_named_as_start_or_end(given, said):
    with pytest.raises(OptionError) as caught:
        ordinal_names(given, ITEMS, "an indicator in the model")
    assert said in str(caught.value)
    assert ordinal_names("q2..q4", ITEMS, "an indicator in the model") == ["q2", "q3", "q4"]
