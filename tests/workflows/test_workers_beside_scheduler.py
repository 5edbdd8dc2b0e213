"""--workers beside --scheduler: the scheduler's own workers run the tasks, so local processes cannot apply, and an
option that cannot apply is an error (the project's rule).  Hostile trial s25, finding 8: cutoffs, bootstrap and
power-simulation accepted both and ignored --workers.  The refusal comes before any fit or connection: the address
below names no scheduler, and nothing is created."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"
DATA = resource_dir("demo") / "rider_survey.csv"
NOWHERE = "tcp://127.0.0.1:1"  # no scheduler listens there: a run that tried it would fail otherwise


@pytest.mark.parametrize("run", [
    lambda: cfa_tool.cutoffs(MODEL, DATA, replications=20, workers=2, scheduler=NOWHERE),
    lambda: cfa_tool.bootstrap(MODEL, DATA, replications=20, workers=2, scheduler=NOWHERE),
])
def test_the_resampling_commands_refuse_both(run):
    with pytest.raises(OptionError, match="workers=... and scheduler=... cannot be given together"):
        run()


def test_power_simulation_refuses_both():
    from cfa_tool.workflows.group_power import invariance_power
    from cfa_tool.workflows.montecarlo import monte_carlo_power

    with pytest.raises(OptionError, match="cannot be given together"):
        monte_carlo_power(MODEL, 200, replications=10, workers=2, scheduler=NOWHERE)
    with pytest.raises(OptionError, match="cannot be given together"):
        invariance_power(MODEL, "north=200,south=200", replications=10, workers=2, scheduler=NOWHERE)


@pytest.mark.parametrize("command", [["cutoffs", str(MODEL), "--data", str(DATA)],
                                     ["bootstrap", str(MODEL), "--data", str(DATA)],
                                     ["power-simulation", str(MODEL), "--n", "200"]])
def test_the_command_line_names_both_options(command, capsys, tmp_path, monkeypatch):
    from cfa_tool.cli import main

    monkeypatch.chdir(tmp_path)
    assert main(command + ["--workers", "2", "--scheduler", NOWHERE]) == 2
    err = capsys.readouterr().err
    assert "--workers and --scheduler cannot be given together" in err and len(err.strip().splitlines()) == 1
    assert list(tmp_path.iterdir()) == []
