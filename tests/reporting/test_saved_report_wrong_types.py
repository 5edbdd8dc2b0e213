"""`report` of a saved result whose report parts were changed by hand to other types (hostile s19, case 09): a number
as the paragraph ended in "internal error: TypeError" with --html, a text as the lines was printed one character per
line.  Both are the one-line error of a report changed by hand, exit 2, nothing written."""

from __future__ import annotations

import json

import pytest

from cfa_tool.cli import main
from tests.conftest import THREE_FACTORS, holzinger_swineford


@pytest.fixture(scope="module")
def saved(tmp_path_factory):
    folder = tmp_path_factory.mktemp("saved")
    (folder / "m.cfa").write_text(THREE_FACTORS)
    holzinger_swineford().to_csv(folder / "hs.csv", index=False)
    assert main(["fit", str(folder / "m.cfa"), "--data", str(folder / "hs.csv"), "--json", str(folder / "fit.json")]) == 0
    return json.loads((folder / "fit.json").read_text())


@pytest.mark.parametrize("part, value", [("paragraph", 123), ("lines", "Model file: x.cfa"), ("tables", {"a": 1}),
                                         ("notes", "a note")])
def test_a_part_of_another_type_is_refused_in_one_line(saved, tmp_path, capsys, part, value):
    edited = json.loads(json.dumps(saved))
    edited["report"][part] = value
    path = tmp_path / "edited.json"
    path.write_text(json.dumps(edited))
    capsys.readouterr()
    assert main(["report", str(path), "--html", str(tmp_path / "out.html")]) == 2
    err = capsys.readouterr().err
    assert "incomplete or changed by hand" in err and "internal error" not in err and len(err.strip().splitlines()) == 1
    assert not (tmp_path / "out.html").exists()
