"""The 'n' row of a summary-statistics file written as a spreadsheet writes a whole number ('n,301.0') is read as 301,
as the Python API reads n_obs=301.0 (hostile s24: the file was refused, the keyword accepted); a fraction is still
refused.  The fit of the file equals the fit of the same matrix given to the API (the tool against itself only for
the reading; the fit itself is checked elsewhere against Joreskog's 1969 formulas)."""
from __future__ import annotations

import numpy as np
import pytest

import cfa_tool
from cfa_tool.errors import DataError

MODEL = "factor f: q1, q2, q3\nfactor g: q4, q5, q6\n"
MATRIX = """correlation,q1,q2,q3,q4,q5,q6
q1,1
q2,.5,1
q3,.5,.5,1
q4,.3,.3,.3,1
q5,.3,.3,.3,.5,1
q6,.3,.3,.3,.5,.5,1
"""


def test_a_whole_n_written_with_a_decimal_point_is_read(tmp_path):
    plain, dotted = tmp_path / "a.stats", tmp_path / "b.stats"
    plain.write_text(MATRIX + "n,301\n")
    dotted.write_text(MATRIX + "n,301.0\n")
    a, b = cfa_tool.fit(MODEL, str(plain)), cfa_tool.fit(MODEL, str(dotted))
    assert b.n_obs == 301 and np.isclose(a.fit.chi_square, b.fit.chi_square, rtol=1e-12)


@pytest.mark.parametrize("written", ["301.5", "0", "-4", "3e400", "301,302"])
def test_a_fraction_or_an_impossible_n_is_still_refused(tmp_path, written):
    path = tmp_path / "c.stats"
    path.write_text(MATRIX + f"n,{written}\n")
    with pytest.raises(DataError, match="the number of observations must be one whole number"):
        cfa_tool.fit(MODEL, str(path))
