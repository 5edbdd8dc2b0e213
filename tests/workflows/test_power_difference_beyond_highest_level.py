"""power-simulation with a population difference that only a step beyond --highest-level tests is refused at the
statement (hostile trial s12: an intercept difference with --highest-level metric was simulated and the metric
step's false-alarm rate reported, exit 0).  Up to metric, intercepts are free in each group in every model fitted (and
residual variances up to scalar), so such a difference changes no step's test: an option that cannot apply."""

from __future__ import annotations

import pytest

from tests.conftest import run_cli

SIZES = ["--group-sizes", "north=300,south=300", "--replications", "2"]


@pytest.mark.parametrize("line, highest, level", [("in group south: start intercept(clean) = 0.5", "metric", "scalar"),
                                                  ("in group south: start variance(clean) = 0.8", "scalar", "strict"),
                                                  ("in group south: start variance(clean) = 0.8", "metric", "strict")])
def test_a_difference_no_fitted_step_tests_is_refused_at_its_statement(line, highest, level, tmp_path, rider_model,
                                                                       capsys):
    path = tmp_path / "m.cfa"
    path.write_text(rider_model.rstrip("\n") + "\n" + line + "\n")
    number = len(rider_model.rstrip("\n").splitlines()) + 1
    code, out, err = run_cli(["power-simulation", path, *SIZES, "--highest-level", highest], capsys)
    assert code == 2 and out == ""
    assert f"{path}:{number}:23: " in err
    assert f"which only the {level} step tests, and --highest-level {highest} stops before it" in err
    assert f"give --highest-level {level} to plan for it" in err
    # the level named tests it: the plan runs
    code, out, _ = run_cli(["power-simulation", path, *SIZES, "--highest-level", level], capsys)
    assert code == 0 and "The populations of the groups differ" in out
