"""Target rotation from the command line: ``explore --target FILE`` (exploration.target_file).

The check value is the project's own Python entry point given the same target as a matrix, and the
anchor structure of Holzinger & Swineford (1939): target rotation aimed at zero loadings that m - 1
items per factor can reach exactly reaches them (criterion 0; Joreskog 1969's anchor items, as in
test_exploration_holzinger_swineford.py)."""

from __future__ import annotations

import json

import numpy as np
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.exploration.target_file import read_target_file
from tests.conftest import DATASETS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
ITEMS = [f"x{i}" for i in range(1, 10)]
ANCHORS = "item,visual,textual,speed\n# x1, x4 and x7 anchor their factors\nx1,,0,0\nx4,0,,0\nx7,0,0,\n"


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def test_target_file_gives_the_same_solution_as_the_matrix(tmp_path, capsys, hs_data):
    target_path = tmp_path / "target.csv"
    target_path.write_text(ANCHORS)
    out = tmp_path / "out.json"
    code, _, err = _run(["explore", "--data", HS_FILE, "--items", "x1..x9", "--target", target_path,
                         "--replications", 20, "--json", out], capsys)
    assert code == 0, err
    found = json.loads(out.read_text())
    assert found["solution"]["rotation"] == "target" and found["factor_count"]["factors_used"] == 3
    matrix = np.full((9, 3), np.nan)
    matrix[0, 1:] = matrix[3, [0, 2]] = matrix[6, :2] = 0.0
    direct = cfa_tool.explore(hs_data, items=ITEMS, factors=3, rotation="target", target=matrix, replications=20)
    np.testing.assert_allclose(np.array(found["solution"]["pattern"]), direct.exploration.rotated.pattern, atol=1e-8)
    assert direct.exploration.rotated.criterion_value < 1e-12  # the anchors' zeros are reached exactly
    assert read_target_file(target_path).factors == ("visual", "textual", "speed")


@pytest.mark.parametrize("content, message", [
    ("", "the target file is empty"),
    ("name,a,b\nx1,0,\n", ":1:1: the first line names the columns: 'item'"),
    ("item\nx1\n", ":1: the first line names no factor"),
    ("item,a,a\nx1,0,\n", "the factor name 'a' appears twice"),
    ("item,a,b\nx1,0\n", ":2: the line has 1 cells after the item name"),
    ("item,a,b\nx1,0,zero\n", ":2:6: 'zero' is not a number"),
    ("item,a,b\nx1,0,\nx1,,0\n", ":3:1: the item 'x1' is listed twice"),
    ("item,a,b\nx1,,\n", "aims at no loading"),
    ("item,a,b\nq7,0,0\n", "the target names 'q7', which is not among the items explored"),
    # Browne (2001): a target rotation of k factors is identified only with at least k - 1 targets on each factor
    ("item,a,b,c\nx1,,0,0\nx4,0,,0\nx7,0,,\n", "the factor column 'b' (column 3) aims at 1 loading, and a target "
                                               "rotation of 3 factors is identified only with at least 2 targets"),
])
def test_bad_target_files_get_one_line_errors(tmp_path, capsys, content, message):
    path = tmp_path / "target.csv"
    path.write_text(content)
    before = path.read_bytes()
    code, _, err = _run(["explore", "--data", HS_FILE, "--items", "x1..x9", "--target", path, "--factors", 2,
                         "--replications", 5], capsys)
    assert code == 2
    assert message in err and "Traceback" not in err and len(err.strip().splitlines()) == 1
    assert path.read_bytes() == before


def test_target_options_that_cannot_apply_are_errors(tmp_path, capsys):
    path = tmp_path / "target.csv"
    path.write_text(ANCHORS)
    for extra, message in ((["--rotation", "geomin"], "applies to target rotation only"),
                           (["--factors", 2], "asks for 2 factors, and the target file")):
        code, _, err = _run(["explore", "--data", HS_FILE, "--items", "x1..x9", "--target", path, *extra], capsys)
        assert code == 2 and message in err
    code, _, err = _run(["explore", "--data", HS_FILE, "--items", "x1..x9", "--rotation", "target"], capsys)
    assert code == 2 and "--target FILE" in err
    with pytest.raises(OptionError, match="not UTF-8"):
        bad = tmp_path / "latin.csv"
        bad.write_bytes("item,a\nx\xe9,0\n".encode("latin-1"))
        read_target_file(bad)
