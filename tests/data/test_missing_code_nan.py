"""NaN (or an infinity) given as a missing code is refused by the one rule of both interfaces (data.missing_codes.
missing_value; hostile trial s17, finding 8): from Python, float('nan') matched the empty cells, which the report then
counted as 'cells holding a code given' and the methods text as a declared code; on the command line 'nan' was a word
no cell holds.  No cell can hold such a code, and an empty cell is no answer already.  The data are the bundled demo
(a fictional transit agency's rider survey), whose items have empty cells (counted here by pandas)."""

from __future__ import annotations

import math

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"
DEMO = resource_dir("demo") / "rider_survey.csv"


@pytest.mark.parametrize("code", [float("nan"), math.inf, -math.inf, "nan", "NaN", "inf"])
def test_python_refuses_a_code_no_cell_can_hold(code):
    data = pd.read_csv(DEMO)
    assert int(data.isna().sum().sum()) > 0  # the empty cells a NaN code matched
    # the reason of each kind (re-check s17: an infinity was refused with NaN's reason)
    why = ("an empty cell is no answer already" if str(code).casefold() == "nan" else
           "a code of no answer is a finite number")
    with pytest.raises(OptionError, match=f"no code a cell can hold \\({why}"):
        cfa_tool.fit(MODEL.read_text(), data, missing_codes=[code])


@pytest.mark.parametrize("code", ["nan", "-99,NaN", "inf"])
def test_the_command_line_refuses_it_in_one_line(code, capsys):
    try:
        code = main(["fit", str(MODEL), "--data", str(DEMO), "--missing-codes", code])
    except SystemExit as stop:  # the argument parser's refusal
        code = stop.code
    assert code == 2
    err = capsys.readouterr().err
    assert "no code a cell can hold" in err and len(err.strip().splitlines()) == 1
