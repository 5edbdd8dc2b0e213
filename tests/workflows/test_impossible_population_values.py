"""A population value that no population can have is refused at its statement (file, line and column, with the
parameter and the value), whether it is given for every group or in one group (hostile trial s12: 'in group south:
start variance(clean) = -0.05' was simulated, and a group covariance beyond its variances was refused naming no line,
parameter or value).  A covariance matrix has variances of at least 0 and each covariance within the product of the
two standard deviations (Horn & Johnson 2013, Observation 7.1.2)."""

from __future__ import annotations

import pytest

from tests.conftest import run_cli

SIZES = ["--group-sizes", "north=300,south=300", "--replications", "2"]


def _model(tmp_path, rider_model, line: str):
    path = tmp_path / "m.cfa"
    path.write_text(rider_model.rstrip("\n") + "\n" + line + "\n")
    return path, len(rider_model.rstrip("\n").splitlines()) + 1


@pytest.mark.parametrize("line, column, said", [
    ("in group south: start variance(clean) = -0.05", 23,
     "the start values make the population covariance matrix of group south impossible: variance(clean) in group "
     "south is given the start value -0.05, and a variance cannot be negative"),
    # the factors' population variances are .49 (loadings .7 of standardized items): .9 is a correlation of 1.84
    ("in group south: start covariance(punctuality, comfort) = 0.9", 23,
     "covariance(punctuality, comfort) in group south is given the start value 0.9, beyond what the variances of "
     "punctuality (0.49) and comfort (0.49) allow, a correlation of 1.84"),
])
def test_a_group_value_no_population_has_is_refused_at_its_line(line, column, said, tmp_path, rider_model, capsys):
    path, number = _model(tmp_path, rider_model, line)
    code, out, err = run_cli(["power-simulation", path, *SIZES], capsys)
    assert code == 2 and out == ""
    assert f"{path}:{number}:{column}: " in err and said in err


@pytest.mark.parametrize("command", [["power-simulation", "{m}", "--n", "300", "--replications", "2"],
                                     ["power-simulation", "{m}", *SIZES],
                                     ["simulate", "{m}", "--n", "300", "--output", "{out}"]])
def test_a_shared_value_no_population_has_is_refused_at_its_line(command, tmp_path, rider_model, capsys):
    for line, said in (("start variance(clean) = -0.05", "variance(clean) is given the start value -0.05, and a "
                                                         "variance cannot be negative"),
                       ("start covariance(punctuality, comfort) = 0.9",
                        "covariance(punctuality, comfort) is given the start value 0.9, beyond what the variances of "
                        "punctuality (0.49) and comfort (0.49) allow, a correlation of 1.84")):
        path, number = _model(tmp_path, rider_model, line)
        argv = [a.format(m=path, out=tmp_path / "s.csv") for a in command]
        code, _, err = run_cli(argv, capsys)
        assert code == 2 and f"{path}:{number}:7: " in err and said in err, (argv, err)
    assert not (tmp_path / "s.csv").exists()


def test_group_values_that_only_together_are_impossible_are_listed_with_their_lines(tmp_path, rider_model, capsys):
    # correlations of .92, .92 and -.92 (each within +/-1) cannot hold together: their matrix has determinant
    # 1 - 3(.918^2) - 2(.918^3) < 0 (each of .45/.49)
    path, number = _model(tmp_path, rider_model, "in group south: start covariance(punctuality, comfort) = 0.45\n"
                                                 "in group south: start covariance(punctuality, courtesy) = 0.45\n"
                                                 "in group south: start covariance(comfort, courtesy) = -0.45")
    code, _, err = run_cli(["power-simulation", path, *SIZES], capsys)
    assert code == 2 and f"{path}:{number}:23: " in err
    assert (f"line {number}: start covariance(punctuality, comfort) in group south = 0.45; line {number + 1}: start "
            f"covariance(punctuality, courtesy) in group south = 0.45; line {number + 2}: start covariance(comfort, "
            f"courtesy) in group south = -0.45") in err
