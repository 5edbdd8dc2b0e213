"""The Python API refuses option values of the wrong type with the one-line OptionError the command line would give
(a hostile trial found a bare TypeError for ``group=['district']`` and ``sheet=`` silently ignored with a data frame:
"an option that cannot apply is an error, never silently ignored")."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from tests.conftest import THREE_FACTORS

CALLS = {
    "fit": lambda data, **kw: cfa_tool.fit(THREE_FACTORS, data, **kw),
    "check": lambda data, **kw: cfa_tool.check(THREE_FACTORS, data, **kw),
    "compare": lambda data, **kw: cfa_tool.compare([THREE_FACTORS, THREE_FACTORS + "covary x1, x4\n"], data, **kw),
    "scores": lambda data, **kw: cfa_tool.scores(THREE_FACTORS, data, **kw),
}


@pytest.mark.parametrize("call", sorted(CALLS))
@pytest.mark.parametrize("group", [["school"], ("school",), 3])
def test_a_group_column_that_is_not_a_name_is_refused(hs_data, call, group):
    with pytest.raises(OptionError, match=f"the group column must be given by its name \\(text\\), not "
                                          f"{type(group).__name__}"):
        CALLS[call](hs_data, group=group)


@pytest.mark.parametrize("call", ["fit", "scores"])
def test_a_sheet_with_a_data_frame_is_refused(hs_data, call):
    with pytest.raises(OptionError, match="picks a sheet of an Excel file, and the data are a data frame"):
        CALLS[call](hs_data, sheet="answers")
    with pytest.raises(OptionError, match="picks a sheet of an Excel file"):
        cfa_tool.explore(hs_data, sheet="answers")
