"""Commands whose results would describe an exploratory block's unrotated factors refuse such a model in one
line naming the block's line (simulate and power-simulation beside bootstrap and scores): their population
values, power and bias would be of the echelon-identified loadings that no report shows."""

from __future__ import annotations

import pytest

from cfa_tool.cli import main

BLOCK = "exploratory factors f1, f2 from x1, x2, x3, x4, x5, x6\n"


@pytest.mark.parametrize("command", [["simulate", "--n", "100", "--output", "rows.csv"],
                                     ["power-simulation", "--n", "100", "--replications", "5", "--workers", "1"]])
def test_simulation_commands_refuse_a_block(tmp_path, capsys, command, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "m.cfa").write_text(BLOCK, encoding="utf-8")
    code = main([command[0], "m.cfa", *command[1:]])
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2
    assert err[0].startswith("cfa-tool: ") and "m.cfa:1:" in err[0] and "exploratory block" in err[0]
    assert not (tmp_path / "rows.csv").exists()
