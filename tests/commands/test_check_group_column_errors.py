"""check names a group column that is not in the file in one line (exit 2), also when rows have gaps: the screen of
sparse answers, run with full-information ML (the default with any gap), read the column before it was checked and
stopped with an internal error (review s13).  The demo data have a few gaps."""

from __future__ import annotations

import pytest

from cfa_tool.resources import resource_dir
from tests.conftest import run_cli

DEMO = resource_dir("demo") / "rider_survey.csv"
MODEL = resource_dir("models") / "rider_three_factors.cfa"


@pytest.mark.parametrize("extra, words", [
    (["--group-column", "distrct"], "there is no group column 'distrct'; did you mean 'district'?"),
    (["--rename", "district=area", "--group-column", "district"],
     "the column 'district' was renamed to 'area' by --rename district=area: name it 'area'"),
])
def test_a_group_column_not_in_the_file_is_a_one_line_error(extra, words, capsys):
    code, _, err = run_cli(["check", MODEL, "--data", DEMO, *extra], capsys)
    assert code == 2 and "internal error" not in err
    assert words in err.splitlines()[0]
