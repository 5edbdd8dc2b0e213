"""A search that stops at its iteration limit advises raising it (assessment.convergence: 'raise the limit
(--max-iterations)'), so every command that fits a model to data takes --max-iterations, declared once
(commands.options.add_max_iterations_option) and passed to its fits: compare, invariance, replicate, bootstrap,
cutoffs and explore --split showed the advice and refused the option (s28).  Each run stops after one iteration of
the rider survey's three-factor model, which no search finishes in (the fit's own test:
tests/commands/test_option_names_per_interface.py)."""

from __future__ import annotations

import shutil

import pytest

from cfa_tool import cli
from cfa_tool.cli import build_parser
from cfa_tool.options import TAKEN_BY, Option
from cfa_tool.pipeline.continuous import FitOptions
from tests.commands.test_cli import DATA, MODEL

ADVICE = "raise the limit (--max-iterations)"


@pytest.fixture()
def folder(tmp_path):
    shutil.copy(DATA, tmp_path / "rider.csv")
    shutil.copy(MODEL, tmp_path / "rider.cfa")
    (tmp_path / "one.cfa").write_text(
        "factor service: on_time, short_wait, accurate_info, easy_transfer, seat_available, clean, temperature, "
        "room_to_stand, greeting, helpful, respectful, clear_answers\n", encoding="utf-8")
    return tmp_path


def _parser(command: str):
    parser = build_parser(command)
    sub = next(a for a in parser._actions if a.choices and command in a.choices)  # noqa: SLF001 - argparse's own list
    return sub.choices[command]


@pytest.mark.parametrize("command", TAKEN_BY[Option.MAX_ITERATIONS])
def test_every_command_that_fits_takes_the_limit_with_the_fit_options_default(command):
    option = next((a for a in _parser(command)._actions if "--max-iterations" in a.option_strings), None)  # noqa: SLF001
    assert option is not None, command
    assert option.default == FitOptions().max_iterations  # one default, the fit options' (500)


# (command line after the program's name given the folder, exit code)
RUNS = {
    "compare": (lambda d: ["compare", str(d / "rider.cfa"), str(d / "one.cfa"), "--data", str(d / "rider.csv")], 3),
    "invariance": (lambda d: ["invariance", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--group-column",
                              "district"], 3),
    "replicate": (lambda d: ["replicate", str(d / "rider.cfa"), "--data", str(d / "rider.csv")], 3),
    "bootstrap": (lambda d: ["bootstrap", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--replications", "20",
                             "--workers", "1"], 3),
    "cutoffs": (lambda d: ["cutoffs", str(d / "rider.cfa"), "--data", str(d / "rider.csv"), "--replications", "20",
                           "--workers", "1"], 3),
}


@pytest.mark.parametrize("command", sorted(RUNS))
def test_the_advice_to_raise_the_limit_names_an_option_of_the_command_that_gives_it(command, folder, capsys):
    argv, code = RUNS[command]
    assert cli.main([*argv(folder), "--max-iterations", "1"]) == code
    err = capsys.readouterr().err
    assert "within the limit of 1 iteration" in err and ADVICE in err, err


def test_explore_limits_the_draft_models_fit_on_the_confirmation_half(folder, capsys):
    report = folder / "explore.md"
    assert cli.main(["explore", "--data", str(folder / "rider.csv"), "--split", "3", "--replications", "20",
                     "--max-iterations", "1", "--markdown", str(report)]) == 0
    text = " ".join(report.read_text(encoding="utf-8").split())
    assert "within the limit of 1 iteration" in text and ADVICE in text
    # without halves there is no fit to limit: an option that cannot apply is an error
    assert cli.main(["explore", "--data", str(folder / "rider.csv"), "--max-iterations", "1"]) == 2
    assert "--max-iterations limits the draft model's fit on the confirmation half of --split" in capsys.readouterr().err


def test_the_ladder_over_occasions_takes_the_limit():
    from cfa_tool.errors import EstimationError
    from cfa_tool.workflows.occasions import invariance_over_occasions

    import tests.workflows.test_invariance_over_occasions as population

    with pytest.raises(EstimationError, match="within the limit of 1 iteration"):  # no step's model converges
        invariance_over_occasions(population.ONE_OCCASION, population.people(300, 5), occasion_column="wave",
                                  id_column="person_id", max_iterations=1)
