"""simulate, power-simulation (one group) and power have no mean structure and no option to give one: a model with
'fix mean(...)' is refused at the statement without the fit's advice of --group-column or --incomplete-rows, which
these commands do not have (hostile tester s24: advice that could not be followed)."""

from __future__ import annotations

import re

import pytest

from tests.commands.test_cli import run

MODEL = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "fix mean(comfort) = 2\n")


@pytest.mark.parametrize("command", [["simulate", "--n", "50", "--output", "o.csv"],
                                     ["power-simulation", "--n", "100", "--replications", "5"], ["power"]])
def test_refused_at_the_statement_naming_only_options_the_command_has(tmp_path, command):
    (tmp_path / "m.cfa").write_text(MODEL)
    out = run(command[0], "m.cfa", *command[1:], cwd=tmp_path)
    assert out.returncode == 2 and "m.cfa:3:5: mean(comfort)" in out.stderr
    assert "cannot apply; remove it for this command" in out.stderr
    usage = run(command[0], "--help").stdout
    for option in set(re.findall(r"--[a-z-]+", out.stderr)):
        assert option in usage, option
    assert not (tmp_path / "o.csv").exists()
