"""compare of ordinal items with a model the data do not identify, and of one group (review s12).

* A model that is not identified is reported among the others, problems first, as compare of continuous items reports
  it (tests/workflows/test_compare_models_not_estimated.py); the run stops with exit 3 only when no model could be
  estimated.  Check value: a factor measured by two items only and correlated with no other factor's items beyond
  what they share is not identified (Bollen 1989, ch. 7, the two-indicator rule): here a fourth factor 'a' on two
  items of the first, which leaves the first factor's parameters without unique values.
* Without groups, a parameter is named without a group: the one-group comparison is laid out internally as one
  group called 'all', which the words 'in group all' leaked into the report.

Data: the bundled demo data (a fictional rider survey, simulated with a fixed seed), its items read as ordinal.
"""

from __future__ import annotations

import json
import re

from cfa_tool.resources import resource_dir
from tests.conftest import run_cli

DATA = resource_dir("demo") / "rider_survey.csv"


def _flat(text: str) -> str:
    """The terminal's box as one line of words (its borders and line breaks left out)."""
    return re.sub(r"[\u2503\s]+", " ", text)


def _models(folder, rider_model):
    (folder / "m3.cfa").write_text(rider_model)
    (folder / "pair.cfa").write_text(rider_model.replace('name "Rider experience, three factors"',
                                                         'name "With a pair factor"')
                                     + "\nfactor a: on_time, short_wait\n")
    (folder / "bound.cfa").write_text(rider_model.replace('name "Rider experience, three factors"', 'name "Bounded"')
                                      + "\nbound loading(punctuality, short_wait) <= 0.3\n")


def test_an_ordinal_model_not_identified_is_reported_among_the_others(rider_model, tmp_path, capsys):
    _models(tmp_path, rider_model)
    result = tmp_path / "c.json"
    code, out, err = run_cli(["compare", tmp_path / "m3.cfa", tmp_path / "pair.cfa", "--data", DATA,
                              "--ordinal", "all", "--json", result], capsys)
    assert code == 0 and result.exists(), err
    assert out.lstrip().startswith("\u250f\u2501 Some models could not be estimated")  # the box opens the report
    box = _flat(out[:out.index("Model comparison")])
    assert "With a pair factor could not be estimated: the model is not identified" in box
    models = {m["name"]: m for m in json.loads(result.read_text())["models"]}
    assert models["Rider experience, three factors"]["converged"] and models["Rider experience, three factors"]["fit"]
    failed = models["With a pair factor"]
    assert not failed["converged"] and failed["fit"] is None
    assert [p["kind"] for p in failed["problems"]] == ["not identified"]
    assert "variance(punctuality)" in failed["problems"][0]["parameters"]


def test_no_ordinal_model_estimated_stops_with_exit_3(rider_model, tmp_path, capsys):
    _models(tmp_path, rider_model)
    result = tmp_path / "c.json"
    (tmp_path / "pair2.cfa").write_text((tmp_path / "pair.cfa").read_text().replace("With a pair factor", "Another"))
    code, out, err = run_cli(["compare", tmp_path / "pair.cfa", tmp_path / "pair2.cfa", "--data", DATA,
                              "--ordinal", "all", "--json", result], capsys)
    assert code == 3 and err.count("\n") == 1 and not result.exists(), err
    assert "no model could be estimated" in err and "not identified" in err


def test_one_group_names_no_group(rider_model, tmp_path, capsys):
    _models(tmp_path, rider_model)
    result = tmp_path / "c.json"
    code, out, err = run_cli(["compare", tmp_path / "m3.cfa", tmp_path / "bound.cfa", "--data", DATA,
                              "--ordinal", "all", "--json", result], capsys)
    assert code == 0, err
    assert "the loading of short_wait on punctuality held at a bound" in _flat(out)
    assert "in group" not in out and "[all]" not in out
    saved = result.read_text()
    assert "in group" not in saved and "[all]" not in saved
    bounded = {m["name"]: m for m in json.loads(saved)["models"]}["Bounded"]
    on_bound = [p for p in bounded["problems"] if p["kind"] == "estimate on a bound"]
    assert on_bound and on_bound[0]["parameters"] == ["loading(punctuality, short_wait)"]
    assert on_bound[0]["group"] is None


def test_one_group_of_few_rows_gets_the_verdict_of_fit_naming_no_group(rider_model, tmp_path, capsys):
    """The first 40 rows are fewer than the 59 free parameters of the three-factor ordinal model.  compare of one
    group fits it as fit does (the correlation metric; re-check s17 finding 1: before, thresholds as parameters, whose
    search did not converge here): fit's negative residual variance of on_time, named without a group, and the rule of
    rows per parameter as fit applies it (its parameters without the thresholds; not those of a group 'all')."""
    _models(tmp_path, rider_model)
    rows = tmp_path / "r40.csv"
    rows.write_text("\n".join(DATA.read_text().splitlines()[:41]) + "\n")
    code, out, err = run_cli(["compare", tmp_path / "m3.cfa", tmp_path / "bound.cfa", "--data", rows,
                              "--ordinal", "all"], capsys)
    assert code == 0, err
    flat = _flat(out)
    alone = run_cli(["fit", tmp_path / "m3.cfa", "--data", rows, "--ordinal", "all"], capsys)
    assert alone[0] == 0 and "The residual (error) variance of on_time is negative (-0.139)" in _flat(alone[1])
    assert "not admissible (a negative residual variance of on_time (-0.14))" in flat
    assert "[all]" not in out and "in group" not in out
    # rows per parameter counted as fit counts them, without the thresholds its first step estimates (15, not 59):
    # 40 rows are more than 15, so neither gives the caution of fewer rows than parameters
    assert "free parameters" not in " ".join(out.replace("┃", " ").split())
    assert "free parameters" not in _flat(alone[1]).split("Notes and warnings")[0]
    assert "group all" not in flat and "group 'all'" not in flat