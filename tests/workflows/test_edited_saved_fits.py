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
from cfa_tool.model.saved_estimates import saved_rows
from cfa_tool.cli import main
from cfa_tool.version import __version__
from tests.conftest import DATASETS, THREE_FACTORS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture(scope="module")
def saved(hs_three) -> dict:
    assert hs_three.admissible
    return hs_three.to_dict() | {"tool": "cfa-tool", "version": __version__, "report": None}


def _edited(saved: dict, kind: str, variables: list[str], value: float) -> dict:
    payload = copy.deepcopy(saved)
    row = next(e for e in payload["estimates"] if e["kind"] == kind and e["variables"] == variables)
    row["estimate"] = value
    assert payload["admissible"] is True  # the flag is left as it was
    return payload


def test_the_estimates_of_an_admissible_fit_have_no_problem(saved):
    assert estimate_row_problems(saved_rows(saved["estimates"], "the fit")) == ()


def test_a_negative_error_variance_and_a_factor_correlation_beyond_one_are_found(saved):
    edited = _edited(saved, "residual_variance", ["x1"], -0.01)
    found = estimate_row_problems(saved_rows(edited["estimates"], "the fit"))
    assert [(q.kind, q.parameters, q.value) for q in found] == [
        (ProblemKind.NEGATIVE_RESIDUAL_VARIANCE, ("residual_variance(x1)",), -0.01)]
    phi = {e["variables"][0]: e["estimate"] for e in saved["estimates"] if e["kind"] == "factor_variance"}
    # a covariance of 2 sqrt(var(visual) var(textual)): a correlation of 2
    big = 2.0 * (phi["visual"] * phi["textual"]) ** 0.5
    edited = _edited(saved, "factor_covariance", ["visual", "textual"], big)
    found = estimate_row_problems(saved_rows(edited["estimates"], "the fit"))
    assert [q.kind for q in found] == [ProblemKind.FACTOR_CORRELATION_BEYOND_ONE]
    assert found[0].value == pytest.approx(2.0)


def test_a_genuinely_inadmissible_fit_is_found_as_the_fit_itself_found_it(hs_data):
    import cfa_tool

    heywood = cfa_tool.fit(THREE_FACTORS + "covary x7, x8\ncovary x8, x9\n", hs_data)
    own = {(q.kind, q.parameters) for q in heywood.problems if q.kind.inadmissible and q.kind in (
        ProblemKind.NEGATIVE_RESIDUAL_VARIANCE, ProblemKind.NEGATIVE_FACTOR_VARIANCE,
        ProblemKind.FACTOR_CORRELATION_BEYOND_ONE, ProblemKind.RESIDUAL_CORRELATION_BEYOND_ONE,
        ProblemKind.FACTOR_COVARIANCES_NOT_POSITIVE_DEFINITE, ProblemKind.RESIDUAL_COVARIANCES_NOT_POSITIVE_DEFINITE)}
    assert own and {(q.kind, q.parameters) for q in estimate_row_problems(
        saved_rows(heywood.to_dict()["estimates"], "the fit"))} == own


def test_scores_simulate_and_power_simulation_refuse_an_edited_fit_in_one_line(tmp_path, saved, capsys):
    # one refusal, declared once (admissibility.refuse_inadmissible_saved_fit): exit 2 from every command that uses a
    # saved fit's values, as the saved file is an input the run cannot use (scores exited 3, simulate 2)
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(_edited(saved, "residual_variance", ["x1"], -0.01)))
    out, rows = tmp_path / "scores.csv", tmp_path / "rows.csv"
    words = "the fitted solution is not admissible (it has a negative residual variance of x1 (-0.01)), so "
    for argv, purpose in (
            (["scores", model, "--data", HS_FILE, "--from-fit", edited, "--output", out],
             "no factor scores are computed with it"),
            (["simulate", model, "--n", 50, "--output", rows, "--population-from", edited],
             "it cannot serve as a population"),
            (["power-simulation", model, "--n", 200, "--replications", 2, "--workers", 1, "--population-from", edited],
             "it cannot serve as a population")):
        code, _, err = _run(argv, capsys)
        assert code == 2 and len(err.strip().splitlines()) == 1, (argv[0], err)
        assert words + purpose in err, err
    assert not out.exists() and not rows.exists()


def test_a_fit_flagged_not_admissible_by_its_file_is_refused_the_same_way(tmp_path, saved, capsys):
    # the file's own flag (its estimates untouched): the same refusal and exit code from scores and simulate
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    flagged = tmp_path / "flagged.json"
    flagged.write_text(json.dumps(saved | {"admissible": False}))
    for argv in (["scores", model, "--data", HS_FILE, "--from-fit", flagged, "--output", tmp_path / "s.csv"],
                 ["simulate", model, "--n", 20, "--output", tmp_path / "r.csv", "--population-from", flagged]):
        code, _, err = _run(argv, capsys)
        assert code == 2 and "the fitted solution is not admissible, so " in err, err


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


# each edit of a saved fit and the words that name it, the same from every reader (model.saved_estimates): the
# values are the hostile trials' (text, NaN, a missing row, a row of another model) and re-check 6's marker
UNREADABLE = [
    # hostile trial: a loading typed as "0.8" was called 'the result of another model' (scores) and read as 0.8
    # without a word (simulate)
    ("text", 'the estimate of the loading of x2 on visual is "0.8", not a number'),
    # NaN written into the JSON (json.dumps writes NaN, json.loads reads it back as a float): the report let it pass
    ("nan", "the estimate of the loading of x2 on visual is NaN, not a number"),
    ("duplicate", "estimate rows 2 and 25 both give the loading of x2 on visual"),
]
UNPLACED = [
    ("missing", "has no estimate of the loading of x2 on visual, a parameter of the model"),
    ("another model", "gives the loading of x4 on visual (estimate row 25), which the model"),
    # a fit made with another marker (as fits of a declared-reversed first item were before markers skipped them)
    ("marker", "gives 0.9 for the loading of x1 on visual where the model file"),
]


def _edit(saved: dict, how: str) -> dict:
    payload = copy.deepcopy(saved)
    rows = payload["estimates"]
    x2 = next(e for e in rows if e["kind"] == "loading" and e["variables"] == ["visual", "x2"])
    if how in ("text", "nan"):
        x2["estimate"] = "0.8" if how == "text" else float("nan")
    elif how == "duplicate":
        rows.append(copy.deepcopy(x2))
    elif how == "missing":
        rows.remove(x2)
    elif how == "another model":  # a cross-loading the model does not have, as a fit of another model holds
        rows.append(copy.deepcopy(x2) | {"variables": ["visual", "x4"], "estimate": 0.3})
    elif how == "marker":
        next(e for e in rows if e["variables"] == ["visual", "x1"])["estimate"] = 0.9
    return payload


@pytest.mark.parametrize("how, words", UNREADABLE + UNPLACED)
def test_scores_and_simulate_name_the_row_they_cannot_place_in_the_same_words(tmp_path, saved, capsys, how, words):
    assert len(saved["estimates"]) == 24  # so an appended row is row 25
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(_edit(saved, how)))
    out, rows = tmp_path / "s.csv", tmp_path / "r.csv"
    for argv in (["scores", model, "--data", HS_FILE, "--from-fit", edited, "--output", out],
                 ["simulate", model, "--n", 20, "--output", rows, "--population-from", edited]):
        code, _, err = _run(argv, capsys)
        assert code == 2 and len(err.strip().splitlines()) == 1 and words in err, (argv[0], err)
        assert "Traceback" not in err
    assert not out.exists() and not rows.exists()


def test_power_simulation_names_a_missing_row_too(tmp_path, saved, capsys):
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(_edit(saved, "missing")))
    code, _, err = _run(["power-simulation", model, "--n", 200, "--replications", 2, "--workers", 1,
                         "--population-from", edited], capsys)
    assert code == 2 and dict(UNPLACED)["missing"] in err


@pytest.mark.parametrize("how, words", UNREADABLE)
def test_the_report_names_an_unreadable_row_as_the_others_do(tmp_path, capsys, how, words):
    # the report re-judges the estimates, so it reads them by the same rule: a NaN is no longer let through
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    fitted = tmp_path / "fit.json"
    assert _run(["fit", model, "--data", HS_FILE, "--json", fitted], capsys)[0] == 0
    edited = tmp_path / "edited.json"
    edited.write_text(json.dumps(_edit(json.loads(fitted.read_text()), how)))
    code, _, err = _run(["report", edited], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1 and words in err, err


def test_the_one_reader_gives_the_fit_s_own_free_values(hs_three):
    # the free parameters read back from the rows are the fit's theta, to the last digit (no recomputation)
    import numpy as np

    from cfa_tool.model.parameters import build_parameter_table
    from cfa_tool.language.parser import parse_model
    from cfa_tool.model.saved_estimates import saved_rows, values_on_model

    table = build_parameter_table(parse_model(THREE_FACTORS))
    values = values_on_model(saved_rows(hs_three.to_dict()["estimates"], "fit"), table, "fit", "hs.cfa",
                             aside=("intercept", "mean"))
    assert np.array_equal(values.theta, hs_three.theta)


def test_a_saved_fits_rows_are_read_once_by_each_command(tmp_path, saved, monkeypatch):
    """The one reader of saved estimates (model.saved_estimates.saved_rows) reads a saved fit's rows once per use:
    its problems, the scoring models, the one-item note and the population take the rows it gave (scores and
    simulate read them twice before)."""
    import cfa_tool.model.saved_estimates as reader
    from cfa_tool.workflows.factor_scores import score_with_saved_fit
    from cfa_tool.workflows.simulation import simulate

    calls = []  # one per row read: every reader of the module's rows makes its SavedRow values there
    original = reader.SavedRow

    def counted(*args):
        calls.append(args)
        return original(*args)

    monkeypatch.setattr(reader, "SavedRow", counted)
    model, fitted = tmp_path / "hs.cfa", tmp_path / "fit.json"
    model.write_text(THREE_FACTORS)
    fitted.write_text(json.dumps(saved))
    scored = score_with_saved_fit(model, fitted, HS_FILE)
    assert len(calls) == len(saved["estimates"]) and scored.rows == 301  # Holzinger & Swineford (1939): 301 children
    calls.clear()
    simulated = simulate(model, n=40, seed=1, population=fitted)
    assert len(calls) == len(saved["estimates"]) and len(simulated.frame) == 40


def test_an_inadmissible_fit_is_refused_alike_in_python_and_on_the_command_line(tmp_path, hs_data, capsys):
    """FitResult.scores (workflows.factor_scores.score_with_fit) refuses a fit whose solution is not admissible with
    the error the command line gives a saved one: OptionError, exit 2 (the fit is an input the run cannot use; it
    raised EstimationError, the exit-3 type, before).  The Heywood case of Holzinger & Swineford (1939) with two
    correlated residuals added, as above."""
    import cfa_tool
    from cfa_tool.errors import EstimationError, OptionError

    model_text = THREE_FACTORS + "covary x7, x8\ncovary x8, x9\n"
    heywood = cfa_tool.fit(model_text, hs_data)
    assert not heywood.admissible
    with pytest.raises(OptionError) as in_python:
        heywood.scores(hs_data)
    assert not isinstance(in_python.value, EstimationError)
    model, fitted = tmp_path / "heywood.cfa", tmp_path / "heywood.json"
    model.write_text(model_text)
    fitted.write_text(json.dumps(heywood.to_dict() | {"tool": "cfa-tool", "version": __version__}))
    code, _, err = _run(["scores", model, "--data", HS_FILE, "--from-fit", fitted, "--output", tmp_path / "s.csv"],
                        capsys)
    said = str(in_python.value).split(": ", 1)[1]  # the same words after the name of the fit
    assert code == 2 and said.startswith("the fitted solution is not admissible (it has ") and said in err, err


@pytest.mark.parametrize("payload", [{"a": 1}, {"tool": "cfa-tool", "version": "1", "tests": []}, [1, 2]])
def test_a_json_file_that_is_not_a_saved_fit_is_refused_in_one_wording(tmp_path, capsys, payload):
    # a hostile trial: scores --from-fit and simulate / power-simulation --population-from refused the same file in
    # two wordings; one writer (model.saved_estimates.saved_fit_payload) gives them one
    (tmp_path / "m.cfa").write_text(THREE_FACTORS)
    path = tmp_path / "other.json"
    path.write_text(json.dumps(payload))
    runs = [["scores", tmp_path / "m.cfa", "--data", HS_FILE, "--from-fit", path, "--output", tmp_path / "s.csv"],
            ["simulate", tmp_path / "m.cfa", "--population-from", path, "--n", 50, "--output", tmp_path / "d.csv"],
            ["power-simulation", tmp_path / "m.cfa", "--population-from", path, "--n", 50]]
    errors = set()
    for argv in runs:
        code, _, err = _run(argv, capsys)
        assert code == 2
        errors.add(err.strip())
    assert errors == {f"cfa-tool: '{path}' is not the JSON result of a fit by cfa-tool (fit --json, or a fit "
                      f"result's to_dict() saved as JSON)"}


def test_a_fit_saved_from_python_is_taken_by_every_reader_of_saved_fits(tmp_path, hs_data, capsys):
    """A hostile trial (sixteenth round, case 11): json.dump(result.to_dict()) was taken by simulate's
    --population-from but refused by scores --from-fit.  One rule: the scores from it equal those from the file
    fit --json wrote (to the byte), and report, which renders a saved report, says that to_dict() holds none."""
    import cfa_tool

    model = tmp_path / "m.cfa"
    model.write_text(THREE_FACTORS)
    saved, marked = tmp_path / "py.json", tmp_path / "cli.json"
    saved.write_text(json.dumps(cfa_tool.fit(model, hs_data).to_dict()))
    assert _run(["fit", model, "--data", HS_FILE, "--json", marked], capsys)[0] == 0
    for source, out in ((saved, "a.csv"), (marked, "b.csv")):
        code, _, err = _run(["scores", model, "--data", HS_FILE, "--from-fit", source, "--output", tmp_path / out],
                            capsys)
        assert code == 0, err
    assert (tmp_path / "a.csv").read_bytes() == (tmp_path / "b.csv").read_bytes()
    code, _, err = _run(["report", saved, "--html", tmp_path / "r.html"], capsys)
    assert code == 2 and "to_dict() saved from Python holds no report" in err


def test_scores_refuse_a_model_file_whose_reversed_items_differ_from_the_fit(tmp_path, capsys):
    """A hostile trial: scores --from-fit took a model file that added 'reversed x2' to the fitted model and reported
    keyed sums with x2 reversed, without a word; the keying is the fit's or the run is refused."""
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    fitted = tmp_path / "fit.json"
    assert _run(["fit", model, "--data", HS_FILE, "--json", fitted], capsys)[0] == 0
    keyed = tmp_path / "keyed.cfa"
    keyed.write_text(THREE_FACTORS + "reversed x2 on 0 to 10\n")
    out = tmp_path / "scores.csv"
    code, _, err = _run(["scores", keyed, "--data", HS_FILE, "--from-fit", fitted, "--output", out], capsys)
    assert code == 2 and err.count("\n") == 1 and not out.exists()
    assert "its line 6 ('reversed x2 on 0 to 10') is not in the fitted model" in err
    assert _run(["scores", model, "--data", HS_FILE, "--from-fit", fitted, "--output", out], capsys)[0] == 0


@pytest.mark.parametrize("version, words", [
    ("9.0.0", "written by cfa-tool 9.0.0, and this is cfa-tool 0.1.0, which reads results written by version 0.1.x or "
              "earlier"),
    # before 1.0 a newer minor version may change what a result holds (semantic versioning 2.0.0, item 4)
    ("0.2.0", "written by cfa-tool 0.2.0, and this is cfa-tool 0.1.0, which reads results written by version 0.1.x or "
              "earlier"),
    ("0", "the result names no version it can read ('0'); this is cfa-tool 0.1.0"),
    (None, "the result names no version of cfa-tool; this is cfa-tool 0.1.0"),
])
def test_a_saved_fit_of_a_newer_major_version_or_of_none_is_refused(tmp_path, saved, capsys, version, words):
    """Hostile tester s11 case 18: report and scores --from-fit read a result whose version was 9.0.0, or absent,
    without a word; a result of 0.2.0 was read by 0.1.0 (only major versions were compared).  An older file of this
    series is read (0.0.1 and 0.1.7 below)."""
    assert __version__ == "0.1.0"  # the words above name it
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS)
    payload = {k: v for k, v in saved.items() if k != "version"} | ({"version": version} if version else {})
    path = tmp_path / "fit.json"
    path.write_text(json.dumps(payload))
    out = tmp_path / "scores.csv"
    for argv in (["scores", model, "--data", HS_FILE, "--from-fit", path, "--output", out],
                 ["report", path, "--html", tmp_path / "r.html"],
                 ["simulate", model, "--n", 50, "--output", tmp_path / "rows.csv", "--population-from", path]):
        code, _, err = _run(argv, capsys)
        assert code == 2 and len(err.strip().splitlines()) == 1 and words in err, (argv[0], err)
    assert not out.exists() and not (tmp_path / "r.html").exists()
    for older in ("0.0.1", "0.1.7"):
        out.unlink(missing_ok=True)
        path.write_text(json.dumps(saved | {"version": older}))
        code, _, err = _run(["scores", model, "--data", HS_FILE, "--from-fit", path, "--output", out], capsys)
        assert code == 0 and out.exists(), (older, err)
