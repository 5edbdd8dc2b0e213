"""Population values at their edges (hostile trial s20): a factor given a population variance of 0 is refused at its
statement as 'fix variance(f) = 0' is (its loadings' defaults divide by the factor's SD: 700,000 was printed); an item
whose given loadings explain more than the variance 1 of its standardized default is refused rather than given a
residual variance of 0.1 that the report's 'item variances 1' contradicts; a defaulted residual covariance is 0
exactly (the fit converting the defaults left -4.2e-18, and power-simulation printed an estimate bias of 2e17 %), and
the power table says that its power column counts false rejections there."""

from __future__ import annotations

import json

import pytest

from tests.conftest import run_cli


@pytest.mark.parametrize("command", [["simulate", "{m}", "--n", "50", "--output", "{out}"],
                                     ["power-simulation", "{m}", "--n", "200", "--replications", "2"]])
def test_a_factor_without_population_variance_is_refused_at_its_line(command, tmp_path, capsys):
    model = tmp_path / "v0.cfa"
    model.write_text("factor f: a, b, c, d\nstart variance(f) = 0\n")
    args = [a.format(m=model, out=tmp_path / "s.csv") for a in command]
    code, out, err = run_cli(args, capsys)
    assert code in (2, 3) and out == "" and "Traceback" not in err
    assert f"{model}:2:7: variance(f) is given a population value of 0: a factor without variance measures nothing" in err
    assert not (tmp_path / "s.csv").exists()


@pytest.mark.parametrize("residual, refused", [("", True), ("start variance(b) = 0.5\n", False)])
def test_a_given_loading_beyond_the_items_variance_is_refused(residual, refused, tmp_path, capsys):
    """Refused unless the item's residual variance is given too."""
    model = tmp_path / "pop.cfa"
    model.write_text("factor f: a, b, c, d\nstart loading(f, b) = 3\n" + residual)
    code, out, err = run_cli(["simulate", model, "--n", "50", "--output", tmp_path / "s.csv"], capsys)
    if not refused:
        assert code == 0, err
        return
    assert code in (2, 3) and out == ""
    # the default factor variance is .49 (loadings .7 of standardized items): 3 * .7 = 2.1, 2.1 ** 2 = 4.41
    assert "the factors of item 'b' explain 4.41 of its variance" in err and "would be -3.41" in err
    assert "variance(b) with a 'start' statement" in err


def test_a_defaulted_residual_covariance_is_zero_and_its_power_is_read_as_false_rejections(tmp_path, capsys):
    model = tmp_path / "p0.cfa"
    model.write_text("factor f: a, b, c, d, e\ncovary a, b\nfactor g: h, i, j\n")
    code, out, err = run_cli(["simulate", model, "--n", "10", "--output", tmp_path / "s.csv",
                              "--json", tmp_path / "s.json"], capsys)
    assert code == 0, err

    def walk(node):
        if isinstance(node, dict):
            if node.get("kind") == "residual_covariance" and "value" in node:
                yield node["value"]
            for value in node.values():
                yield from walk(value)
        elif isinstance(node, list):
            for value in node:
                yield from walk(value)

    assert list(walk(json.loads((tmp_path / "s.json").read_text()))) == [0.0]
    code, out, err = run_cli(["power-simulation", model, "--n", "200", "--replications", "3", "--workers", "1"], capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    assert "Where the population value is 0 (1 parameter), the power column is the share of false rejections" in flat
    row = next(line for line in out.splitlines() if line.strip().startswith("residual covariance of a and b"))
    assert len(row.split()) == 6 + 3  # the label, power, coverage and SE bias: no estimate bias beside a population of 0


@pytest.mark.parametrize("loading, explained, residual", [
    # the default factor variance .49 (module above): 1.43 ** 2 * .49 = 1.002001, residual 1 - 1.002001
    ("1.43", "explain 1.002 of its variance, more than the 1", "would be -0.002;"),
    # 14286 ** 2 * .49 = 100,004,000.04: three significant digits in plain digits (numbers.rounded_number)
    ("14286", "explain 100000000 of its variance, more than the 1", "would be -100000000;")])
def test_the_share_beyond_the_items_variance_is_told_from_it_in_plain_digits(loading, explained, residual, tmp_path,
                                                                             capsys):
    # the plan of s22, item 4: '.2f' wrote 1.002 as '1.00 of its variance, more than the 1' and its residual -0.00,
    # and 1e8 as 100004000.04
    model = tmp_path / "pop.cfa"
    model.write_text(f"factor f: a, b, c, d\nstart loading(f, b) = {loading}\n")
    code, out, err = run_cli(["simulate", model, "--n", "50", "--output", tmp_path / "s.csv"], capsys)
    assert code in (2, 3) and out == ""
    assert f"the factors of item 'b' {explained} its standardized default allows" in err and residual in err
