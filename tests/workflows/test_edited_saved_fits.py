"""A saved fit is judged by its estimates, not by its 'admissible' flag (hostile trial: a fit JSON edited to hold a
negative error variance, its flag left true, was scored with determinacy 1.011 and served as a population).

Check values and their sources: a variance below zero and a correlation beyond +/-1 are impossible by definition
(a variance is a mean of squares; |r| <= 1 by the Cauchy-Schwarz inequality); the Holzinger & Swineford (1939)
three-factor fit (tests/datasets) is admissible, and x1's error variance there is about .55 (Joreskog 1969's
solution of these data; the edit replaces it by -0.01).
"""

from __future__ import annotations

import copy
import json

import pytest

from cfa_tool.assessment.admissibility import ProblemKind, estimate_row_problems
from cfa_tool.cli import main
from tests.conftest import DATASETS, THREE_FACTORS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture(scope="module")
def saved(hs_three) -> dict:
    assert hs_three.admissible
    return hs_three.to_dict() | {"tool": "cfa-tool", "report": None}


def _edited(saved: dict, kind: str, variables: list[str], value: float) -> dict:
    payload = copy.deepcopy(saved)
    row = next(e for e in payload["estimates"] if e["kind"] == kind and e["variables"] == variables)
    row["estimate"] = value
    assert payload["admissible"] is True  # the flag is left as it was
    return payload


def test_the_estimates_of_an_admissible_fit_have_no_problem(saved):
    assert estimate_row_problems(saved["estimates"]) == ()


def test_a_negative_error_variance_and_a_factor_correlation_beyond_one_are_found(saved):
    found = estimate_row_problems(_edited(saved, "residual_variance", ["x1"], -0.01)["estimates"])
    assert [(q.kind, q.parameters, q.value) for q in found] == [
        (ProblemKind.NEGATIVE_RESIDUAL_VARIANCE, ("residual_variance(x1)",), -0.01)]
    phi = {e["variables"][0]: e["estimate"] for e in saved["estimates"] if e["kind"] == "factor_variance"}
    # a covariance of 2 sqrt(var(visual) var(textual)): a correlation of 2
    big = 2.0 * (phi["visual"] * phi["textual"]) ** 0.5
    found = estimate_row_problems(_edited(saved, "factor_covariance", ["visual", "textual"], big)["estimates"])
    assert [q.kind for q in found] == [ProblemKind.FACTOR_CORRELATION_BEYOND_ONE]
    assert found[0].value == pytest.approx(2.0)


def test_a_genuinely_inadmissible_fit_is_found_as_the_fit_itself_found_it(hs_data):
    import cfa_tool

    heywood = cfa_tool.fit(THREE_FACTORS + "covary x7, x8\ncovary x8, x9\n", hs_data)
    own = {(q.kind, q.parameters) for q in heywood.problems if q.kind.inadmissible and q.kind in (
        ProblemKind.NEGATIVE_RESIDUAL_VARIANCE, ProblemKind.NEGATIVE_FACTOR_VARIANCE,
        ProblemKind.FACTOR_CORRELATION_BEYOND_ONE, ProblemKind.RESIDUAL_CORRELATION_BEYOND_ONE,
        ProblemKind.FACTOR_COVARIANCES_NOT_POSITIVE_DEFINITE, ProblemKind.RESIDUAL_COVARIANCES_NOT_POSITIVE_DEFINITE)}
    assert own and {(q.kind, q.parameters) for q in estimate_row_problems(heywood.to_dict()["estimates"])} == own


def test_scores_simulate_and_power_simulation_refuse_an_edited_fit_in_one_line(tmp_path, saved, capsys):
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(_edited(saved, "residual_variance", ["x1"], -0.01)))
    out = tmp_path / "scores.csv"
    code, _, err = _run(["scores", model, "--data", HS_FILE, "--from-fit", edited, "--output", out], capsys)
    assert code == 3 and len(err.strip().splitlines()) == 1 and not out.exists()
    assert "not admissible (it has a negative residual variance of x1 (-0.01))" in err
    rows = tmp_path / "rows.csv"
    code, _, err = _run(["simulate", model, "--n", 50, "--output", rows, "--population-from", edited], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1 and not rows.exists()
    assert "its estimates have a negative residual variance of x1 (-0.01)" in err
    code, _, err = _run(["power-simulation", model, "--n", 200, "--replications", 2, "--workers", 1,
                         "--population-from", edited], capsys)
    assert code == 2 and "negative residual variance of x1" in err and len(err.strip().splitlines()) == 1


def test_the_report_of_an_edited_fit_shows_the_problem_first(tmp_path, hs_data, capsys):
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    fitted = tmp_path / "fit.json"
    assert _run(["fit", model, "--data", HS_FILE, "--json", fitted], capsys)[0] == 0
    payload = json.loads(fitted.read_text())
    row = next(e for e in payload["estimates"] if e["kind"] == "residual_variance" and e["variables"] == ["x1"])
    row["estimate"] = -0.01
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(payload))
    code, out, _ = _run(["report", edited], capsys)
    words = " ".join(out.replace("┃", " ").split())
    assert code == 0
    first = words.index("This solution is not admissible")
    assert first < words.index("changed after the fit?") < words.index("The residual (error) variance of x1 is negative "
                                                                        "(-0.010)") < words.index("Model file:")
    code, out, _ = _run(["report", fitted], capsys)
    assert code == 0 and "not admissible" not in out


def test_an_estimate_written_as_text_is_named(tmp_path, saved, capsys):
    # hostile trial: a loading typed as "0.8" was called 'the result of another model' (scores) and read as 0.8
    # without a word (simulate)
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    edited = tmp_path / "text.json"
    edited.write_text(json.dumps(_edited(saved, "loading", ["visual", "x2"], "0.8")))
    code, _, err = _run(["scores", model, "--data", HS_FILE, "--from-fit", edited, "--output", tmp_path / "s.csv"],
                        capsys)
    assert code == 2 and 'the estimate of loading(visual, x2) is "0.8", not a number' in err
    code, _, err = _run(["simulate", model, "--n", 20, "--output", tmp_path / "r.csv", "--population-from", edited],
                        capsys)
    assert code == 2 and 'the estimate of loading(visual, x2) is "0.8", not a number' in err
    assert not (tmp_path / "s.csv").exists() and not (tmp_path / "r.csv").exists()


@pytest.mark.parametrize("edit, words", [
    # a fit made with another marker (as fits of a declared-reversed first item were before markers skipped them)
    (("loading", ["visual", "x1"], 0.9), "the fit result has loading(visual, x1) = 0.9 where the model file fixes it "
                                         "at 1: the fit was made with another scale or other fixed values"),
    # NaN written into the JSON (json.dumps writes NaN, json.loads reads it back as a float)
    (("loading", ["visual", "x2"], float("nan")), "the fit result gives no number for loading(visual, x2)"),
])
def test_scores_name_why_a_saved_fit_does_not_match(tmp_path, saved, capsys, edit, words):
    # re-check 6: both were told 'the fit result is not of the model ...; give the model file the fit was made with'
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(_edited(saved, *edit)))
    out = tmp_path / "scores.csv"
    code, _, err = _run(["scores", model, "--data", HS_FILE, "--from-fit", edited, "--output", out], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1 and not out.exists()
    assert words in err and "is not of the model" not in err
