"""Populations with values fixed in the model file (hostile trial): impossible fixed values are one-line errors
naming them, and the population table lists every value with where it came from.

Check values and their sources: a variance is at least 0 and a correlation matrix is positive semi-definite, so
are its principal submatrices (Horn & Johnson 2013, Observation 7.1.2); the correlations .95, .95 and -.95 of three
variables cannot hold together: the determinant of that matrix is 1 - 3(.95^2) + 2(.95)(.95)(-.95) < 0 (computed by
hand: 1 - 2.7075 - 1.71475 = -3.42)."""

from __future__ import annotations

import json

import pytest

from cfa_tool.cli import main


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


THREE = "factor f1: a1, a2, a3\nfactor f2: b1, b2, b3\nfactor f3: c1, c2, c3\nscale latent by variance\n"


@pytest.mark.parametrize("command", ["simulate", "power-simulation"])
@pytest.mark.parametrize("text, words", [
    (THREE + "fix covariance(f1, f2) = 0.95\nfix covariance(f2, f3) = 0.95\nfix covariance(f1, f3) = -0.95\n",
     # re-check 6: each value named with its pair (the values and the factors were listed apart)
     "the factor correlations fixed at .95 (f1 with f2), -.95 (f1 with f3), and .95 (f2 with f3) cannot hold together "
     # since hostile tester s15 every fit refuses fixed values no population has, before the population check:
     # semi-definite (a fit's fixed correlations of 1 are possible, a population's rows need a definite matrix)
     "(their matrix is not positive semi-definite)"),
    (THREE + "fix covariance(f1, f2) = 1.2\n", "covariance(f1, f2) is fixed at 1.2, beyond what the variances"),
    # the same with 'start' values (a negative one was simulated without a word; a correlation of 1.5 was said to be
    # a model that 'may not be identified')
    ("factor f1: a1, a2, a3\nstart variance(a2) = -0.01\n",
     "the start values make the population covariance matrix impossible: variance(a2) is given the start value -0.01"),
    (THREE + "start covariance(f1, f2) = 1.5\n", "covariance(f1, f2) is given the start value 1.5, beyond what the "
                                                 "variances of f1 (1) and f2 (1) allow"),
])
def test_impossible_fixed_values_are_one_line_naming_them(tmp_path, capsys, command, text, words):
    model = tmp_path / "m.cfa"
    model.write_text(text)
    out = tmp_path / "rows.csv"
    argv = ([command, model, "--n", 50, "--output", out] if command == "simulate" else
            [command, model, "--n", 200, "--replications", 2, "--workers", 1])
    code, _, err = _run(argv, capsys)
    # one line naming the file (hostile trial s12: and the statement's line and column, with the statement and a
    # caret below, as fit shows a model error, where one statement holds the value)
    lines = err.strip().splitlines()
    assert code == 2 and lines[0].startswith(f"cfa-tool: {model}:") and words in lines[0] and len(lines) in (1, 3)
    assert "may not be identified" not in err and not out.exists()


@pytest.mark.parametrize("command", ["simulate", "power-simulation", "fit"])
def test_a_variance_fixed_below_zero_is_an_error_of_the_model_file(tmp_path, capsys, command):
    # since hostile trial 8 the model-file check names it with its line, for every command (it reached the
    # population check of simulate and power-simulation, and the estimation of fit, before)
    model = tmp_path / "m.cfa"
    model.write_text("factor f1: a1, a2, a3\nfix variance(a2) = -0.01\n")
    out = tmp_path / "rows.csv"
    argv = ([command, model, "--n", 50, "--output", out] if command == "simulate" else
            [command, model, "--n", 200, "--replications", 2, "--workers", 1] if command == "power-simulation" else
            [command, model, "--data", tmp_path / "none.csv"])
    code, _, err = _run(argv, capsys)
    assert code == 2 and err.startswith(f"cfa-tool: {model}:2:5: variance(a2) is fixed to -0.01, but a variance "
                                        f"cannot be negative"), err
    assert not out.exists()


def test_possible_fixed_values_still_simulate(tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text(THREE + "fix covariance(f1, f2) = 0.5\nfix covariance(f2, f3) = 0.5\nfix covariance(f1, f3) = 0.2\n"
                     "fix variance(a2) = 0\n")
    code, _, err = _run(["simulate", model, "--n", 20, "--output", tmp_path / "rows.csv"], capsys)
    assert code == 0, err


def test_the_population_table_lists_fixed_values_and_says_where_each_came_from(tmp_path, capsys):
    model = tmp_path / "fx.cfa"
    model.write_text("factor f1: a1, a2, a3\nfix loading(f1, a3) = 0.8\nfix variance(a2) = 0.3\n")
    saved = tmp_path / "pop.json"
    code, out, err = _run(["simulate", model, "--n", 50, "--output", tmp_path / "rows.csv", "--json", saved], capsys)
    assert code == 0, err
    population = {(v["kind"], tuple(v["variables"])): v for v in json.loads(saved.read_text())["population"]}
    # the values the model file fixes, as written there
    assert population[("loading", ("f1", "a3"))]["value"] == 0.8 and population[("loading", ("f1", "a3"))]["from"] == "fix"
    assert population[("residual_variance", ("a2",))]["value"] == 0.3
    assert population[("residual_variance", ("a2",))]["from"] == "fix"
    assert population[("loading", ("f1", "a1"))]["from"] == "default"
    words = " ".join(out.split())
    assert words.index("Values fixed in the model file hold as written") < words.index("their standardized values can "
                                                                                         "differ from .7 and .3")
    assert words.index("loading of a3 on f1 0.800") < words.index("residual variance of a2 0.300 0.308 fix")
    assert "fix = a value the model file fixes (a 'fix' statement)" in words


@pytest.mark.parametrize("sizes", ["200", "100,200"])
def test_power_simulation_shows_the_population_it_drew_from(tmp_path, capsys, sizes):
    # re-check 6: the fixed loading .8 and residual variance .3, and the defaults beside them, were shown nowhere in
    # power-simulation's report or JSON: the population table of simulate, one builder for both
    model = tmp_path / "fx.cfa"
    model.write_text("factor f1: a1, a2, a3\nfix loading(f1, a3) = 0.8\nfix variance(a2) = 0.3\n")
    saved = tmp_path / "power.json"
    code, out, err = _run(["power-simulation", model, "--n", sizes, "--replications", 10, "--workers", 1,
                           "--json", saved], capsys)
    assert code == 0, err
    words = " ".join(out.split())
    assert "Population values used" in words and "residual variance of a2 0.300 0.308 fix" in words
    assert "loading of a3 on f1 0.800" in words  # parameters in the words of every other table (parameter_words)
    assert "Values fixed in the model file hold as written" in words
    result = json.loads(saved.read_text())
    first = result["by_sample_size"][0] if "by_sample_size" in result else result
    population = {(v["kind"], tuple(v["variables"])): v for v in first["population"]}
    assert population[("loading", ("f1", "a3"))]["value"] == 0.8 and population[("loading", ("f1", "a3"))]["from"] == "fix"


def test_values_that_set_a_factors_scale_are_listed(tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text("factor f1: a1, a2, a3\n")
    saved = tmp_path / "pop.json"
    assert _run(["simulate", model, "--n", 20, "--output", tmp_path / "rows.csv", "--json", saved], capsys)[0] == 0
    population = {(v["kind"], tuple(v["variables"])): v for v in json.loads(saved.read_text())["population"]}
    marker = population[("loading", ("f1", "a1"))]
    # the default standardized loading .7 (this module's documented default), through the marker fixed at 1
    assert marker["from"] == "scale (fixed)" and marker["value"] == 1.0 and marker["standardized"] == pytest.approx(0.7)


def test_fixed_values_no_default_population_can_hold_are_named(tmp_path, capsys):
    # re-check 6: a covariance fixed at 5 between marker-scaled factors (variances about .49 by the defaults, so a
    # correlation near 10) got "the model may not be identified"; the error names the fixed value instead
    model = tmp_path / "cov5.cfa"
    model.write_text("factor f1: a1, a2, a3\nfactor f2: b1, b2, b3\nfix covariance(f1, f2) = 5\n")
    code, out, err = _run(["simulate", model, "--n", 50, "--output", tmp_path / "rows.csv"], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert "has the values fixed in the model file (covariance(f1, f2) = 5)" in err
    assert "not be identified" not in err and not (tmp_path / "rows.csv").exists()


@pytest.mark.parametrize("command", ["simulate", "power-simulation"])
def test_parameters_held_equal_are_listed_with_the_one_they_equal(command, tmp_path, capsys):
    # the population table left out every parameter an 'equal' statement holds equal to an earlier one (loading of
    # a3, residual variances of b2 and b3 here): each is listed with its value, marked as held equal to which
    model = tmp_path / "m.cfa"
    model.write_text("factor f1: a1, a2, a3\nfactor f2: b1, b2, b3\nequal loading(f1, a2), loading(f1, a3)\n"
                     "equal variance(b1), variance(b2), variance(b3)\nstart loading(f1, a2) = 0.9\n")
    saved = tmp_path / "pop.json"
    rest = (["--output", tmp_path / "rows.csv"] if command == "simulate"
            else ["--n", 100, "--replications", 4, "--workers", 1])
    code, out, err = _run([command, model, *([] if command == "power-simulation" else ["--n", 50]), *rest,
                           "--json", saved], capsys)
    assert code == 0, err
    result = json.loads(saved.read_text())
    first = result["by_sample_size"][0] if "by_sample_size" in result else result
    population = {(v["kind"], tuple(v["variables"])): v for v in first["population"]}
    a3 = population[("loading", ("f1", "a3"))]
    assert a3["from"] == "equal" and a3["equal_to"] == {"kind": "loading", "variables": ["f1", "a2"]}
    assert a3["value"] == pytest.approx(0.9, abs=1e-12)  # the start value the equal statement shares
    assert population[("loading", ("f1", "a2"))]["from"] == "start"
    # the defaults (this module's documented ones): standardized loading .7 through a marker at 1 gives the factor
    # variance .49 and the residual variance 1 - .49 = .51 of b1 (computed by hand), which b2 and b3 share
    for item in ("b2", "b3"):
        row = population[("residual_variance", (item,))]
        assert row["from"] == "equal" and row["equal_to"] == {"kind": "residual_variance", "variables": ["b1"]}
        assert row["value"] == pytest.approx(0.51, abs=1e-6)
    assert population[("residual_variance", ("b1",))]["from"] == "default"
    words = " ".join(out.split())
    assert "loading of a3 on f1 0.900 0.630 equal to loading of a2 on f1" in words  # .9 x sqrt(.49) = .63 by hand
    assert "equal to = held equal by the model file (an 'equal' statement) to the parameter named" in words
