"""compare with models that could not be estimated (hostile trial 11): such a model is reported as such among the
others, problems first (the box of every view, and the problems table of the data files, as an inadmissible model's
are), and the run stops with exit 3 only when no model could be estimated, as fit stops on a model it cannot
estimate.

Check values: the first 15 rows of the bundled demo data (a fictional rider survey, simulated with a fixed seed)
are fewer than the 27 free parameters of its three-factor model, whose estimation does not converge there (as fit
finds on the same rows); the four-item one-factor model (8 free parameters) converges on them.  A factor measured
by two items only and correlated with no other factor is not identified (Bollen 1989, ch. 7: a factor of two
indicators needs a correlation with another factor, 'two-indicator rule').
"""

from __future__ import annotations

import json
import re

import pytest

from cfa_tool.resources import resource_dir
from tests.conftest import run_cli

PUNCTUALITY = 'name "punctuality only"\nfactor punctuality: on_time, short_wait, accurate_info, easy_transfer\n'


def _flat(text: str) -> str:
    """The terminal's box as one line of words (its borders and line breaks left out)."""
    return re.sub(r"[\u2503\s]+", " ", text)


@pytest.fixture(scope="module")
def few_rows(tmp_path_factory):
    folder = tmp_path_factory.mktemp("few")
    lines = (resource_dir("demo") / "rider_survey.csv").read_text().splitlines()
    data = folder / "r15.csv"
    data.write_text("\n".join(lines[:16]) + "\n")
    (folder / "p1.cfa").write_text(PUNCTUALITY)
    (folder / "m3.cfa").write_text((resource_dir("models") / "rider_three_factors.cfa").read_text())
    (folder / "m1.cfa").write_text((resource_dir("models") / "rider_one_factor.cfa").read_text())
    return folder


def test_a_model_that_did_not_converge_comes_first_in_every_view(few_rows, tmp_path, capsys):
    result, tables = tmp_path / "c.json", tmp_path / "tables"
    code, out, err = run_cli(["compare", few_rows / "p1.cfa", few_rows / "m3.cfa", "--data", few_rows / "r15.csv",
                           "--json", result, "--tables", tables], capsys)
    assert code == 0, err
    first = out.lstrip().splitlines()[0]
    assert "Some models could not be estimated" in first  # the box opens the report
    box = _flat(out[:out.index("Model comparison")])
    assert "Rider experience, three factors could not be estimated: its estimation did not converge" in box
    assert "Rider experience, three factors: 15 rows for the 27 free parameters" in box  # its cause, beside it
    # what to try said once: the search's message holds it, its problem's advice is the same (re-check s18, R3)
    line = box[box.index("Rider experience, three factors could not be estimated"):]
    line = line[:line.index("no model is tested against it.") + 60]
    assert line.count("What to try") == 1 and "Check the model for the problems named" not in line
    report = json.loads(result.read_text())["report"]
    assert report["notice"]["heading"].startswith("Some models could not be estimated")
    table = report["problem_table"]
    assert table is not None and table["columns"][0] == "Model"
    kinds = [(row[0], row[1]) for row in table["rows"]]
    assert ("Rider experience, three factors", "not converged") in kinds
    assert ("Rider experience, three factors", "fewer rows than parameters") in kinds
    assert "Rider experience, three factors" in (tables / "problems.csv").read_text()


def test_no_model_estimated_stops_with_exit_3_naming_each(few_rows, tmp_path, capsys):
    result = tmp_path / "c.json"
    code, out, err = run_cli(["compare", few_rows / "m1.cfa", few_rows / "m3.cfa", "--data", few_rows / "r15.csv",
                           "--json", result], capsys)
    assert code == 3 and err.count("\n") == 1 and not result.exists(), err
    assert "no model could be estimated" in err
    assert "model Rider experience, one factor: 15 rows for the 24 free parameters" in err
    assert "model Rider experience, three factors: 15 rows for the 27 free parameters" in err


def test_a_model_that_is_not_identified_is_reported_among_the_others(rider_demo, rider_model, tmp_path, capsys):
    folder = tmp_path
    (folder / "m3.cfa").write_text(rider_model)
    (folder / "method2.cfa").write_text(rider_model.replace('name "Rider experience, three factors"',
                                                            'name "Three factors and a two-item factor"')
                                        + "\nfactor a: on_time, short_wait\n")
    data = resource_dir("demo") / "rider_survey.csv"
    result, html = folder / "c.json", folder / "c.html"
    code, out, err = run_cli(["compare", folder / "m3.cfa", folder / "method2.cfa", "--data", data, "--json", result,
                           "--html", html], capsys)
    assert code == 0 and result.exists() and html.exists(), err
    box = _flat(out[:out.index("Model comparison")])
    assert "Three factors and a two-item factor could not be estimated" in box and "not identified" in box
    saved = json.loads(result.read_text())
    models = {m["name"]: m for m in saved["models"]}
    assert models["Rider experience, three factors"]["converged"] and models["Rider experience, three factors"]["fit"]
    failed = models["Three factors and a two-item factor"]
    assert not failed["converged"] and failed["fit"] is None
    assert any("not identified" in p["explanation"] for p in failed["problems"])


def test_a_model_not_identified_by_summary_statistics_is_reported_among_the_others(tmp_path, capsys):
    # the correlations of the first six Holzinger & Swineford (1939) tests (tests/datasets, two decimals), N = 301
    stats = tmp_path / "stats.csv"
    stats.write_text("covariance,x1,x2,x3,x4,x5,x6\nx1,1\nx2,.30,1\nx3,.44,.34,1\nx4,.37,.15,.16,1\n"
                     "x5,.29,.14,.08,.73,1\nx6,.36,.19,.20,.70,.72,1\nn,301\n")
    (tmp_path / "two.cfa").write_text("factor a: x1, x2, x3\nfactor b: x4, x5, x6\n")
    (tmp_path / "pair.cfa").write_text('name "With a pair factor"\nfactor a: x1, x2, x3\nfactor b: x4, x5, x6\n'
                                       "factor c: x1, x2\n")
    code, out, err = run_cli(["compare", tmp_path / "two.cfa", tmp_path / "pair.cfa", "--data", stats], capsys)
    assert code == 0, err
    assert "With a pair factor could not be estimated: the model is not identified" in _flat(out)
    assert run_cli(["fit", tmp_path / "pair.cfa", "--data", stats], capsys)[0] == 3  # as fit finds it alone
