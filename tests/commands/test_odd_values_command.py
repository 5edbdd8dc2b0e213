"""Values that are not answers in a data file (a forgotten -99 code, a totals row): check and fit show the caution
first, before any table, and fit still fits; rows without a group label are counted as read."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo" / "rider_survey.csv"
MODEL = ROOT / "models" / "rider_three_factors.cfa"


def _run(argv, capsys) -> tuple[int, str, str]:
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def _with_code(tmp_path: Path) -> Path:
    frame = pd.read_csv(DEMO)
    frame.loc[[2, 30, 99], "clean"] = -99  # lines 4, 32, 101 of the file
    path = tmp_path / "coded.csv"
    frame.to_csv(path, index=False)
    return path


def _with_totals(tmp_path: Path) -> Path:
    frame = pd.read_csv(DEMO)
    items = [c for c in frame.columns if pd.api.types.is_numeric_dtype(frame[c])]
    totals = {c: frame[c].sum() for c in items} | {"rider_id": "Total"}  # no district: no group label
    frame = pd.concat([frame, pd.DataFrame([totals])], ignore_index=True)
    path = tmp_path / "totals.csv"
    frame.to_csv(path, index=False)
    return path


def test_check_shows_a_forgotten_code_before_its_tables(tmp_path, capsys):
    data = _with_code(tmp_path)
    code, out, _ = _run(["check", MODEL, "--data", data, "--json", tmp_path / "check.json"], capsys)
    assert code == 0
    out = " ".join(out.replace("│", " ").split())
    caution = out.index("the value -99")
    assert caution < out.index("Model check") < out.index("Share of rows answering")
    assert "rows 4, 32, 101" in out and "--missing-codes -99" in out
    assert "values that look like no answers" in (tmp_path / "check.json").read_text()
    # the counts agree with the caution: the three rows are complete only if -99 is an answer
    frame = pd.read_csv(DEMO)
    items = [c for c in frame.columns if c not in ("rider_id", "district")]
    complete = int(frame[items].notna().all(axis=1).sum())  # the demo file's complete rows (pandas' count)
    saved = json.loads((tmp_path / "check.json").read_text())
    coded_complete = int(frame.loc[[2, 30, 99], items].notna().all(axis=1).sum())
    assert coded_complete and saved["complete_rows"] == complete - coded_complete
    assert saved["complete_rows_by_values_not_answers"] == coded_complete
    # the odd values whatever the cautions call them (codes for no answer, typing errors, a totals row; review s13)
    assert (f"{complete - coded_complete} complete (and {coded_complete} complete only if the odd values named above "
            f"are answers)") in " ".join(out.split())
    assert "counts as an answer here, as the fit would count it" in out
    code, out, _ = _run(["check", MODEL, "--data", data, "--missing-codes", "-99"], capsys)
    assert code == 0 and "complete only if" not in out and "looks like no answer" not in out


def test_fit_cautions_first_and_still_fits(tmp_path, capsys):
    data = _with_code(tmp_path)
    code, out, _ = _run(["fit", MODEL, "--data", data], capsys)
    assert code == 0
    out = " ".join(out.replace("│", " ").split())  # the notice's frame and line breaks aside
    caution = out.index("The item column clean of coded.csv holds the value -99")
    assert caution < out.index("Missing answers") < out.index("Model fit")


def test_a_totals_row_is_refused_naming_its_row(tmp_path, capsys):
    # it was exit 3 (the estimation failed, the row named as its likely cause); a totals row is bad input: exit 2
    # (every command: tests/commands/test_totals_row_refused.py)
    data = _with_totals(tmp_path)
    code, _, err = _run(["fit", MODEL, "--data", data], capsys)
    rows = len(pd.read_csv(DEMO)) + 2  # the totals row's line in the file (the header is line 1)
    assert code == 2
    err = " ".join(err.split())
    assert err.startswith(f"cfa-tool: Row {rows} of totals.csv holds the sums of the other rows' answers")


def test_rows_without_a_group_label_are_counted_as_read(tmp_path, capsys):
    data = _with_totals(tmp_path)
    rows = len(pd.read_csv(DEMO))
    code, out, _ = _run(["fit", MODEL, "--data", data, "--group-column", "district", "--json", tmp_path / "fit.json"],
                        capsys)
    assert code == 0
    assert f"{rows} rows analysed of {rows + 1} read" in " ".join(out.split())
    saved = json.loads((tmp_path / "fit.json").read_text())
    text = json.dumps(saved)
    assert "values that look like no answers" not in text  # the totals row has no group label: it is not analysed
    code, out, _ = _run(["check", MODEL, "--data", data, "--group-column", "district"], capsys)
    assert f"{rows + 1} read, 1 without a group label (left out), {rows} with one" in " ".join(out.split())


def test_compare_and_scores_caution_first(tmp_path, capsys):
    data = _with_code(tmp_path)
    one = ROOT / "models" / "rider_one_factor.cfa"
    code, out, _ = _run(["compare", one, MODEL, "--data", data], capsys)
    out = " ".join(out.replace("│", " ").split())
    assert code == 0 and out.index("holds the value -99") < out.index("Model comparison") < out.index("Fit of each model")
    code, out, _ = _run(["scores", MODEL, "--data", data, "--output", tmp_path / "scores.csv"], capsys)
    out = " ".join(out.replace("│", " ").split())
    assert code == 0 and out.index("holds the value -99") < out.index("Factor scores:")


@pytest.mark.parametrize("command, title", [
    (["bootstrap", "--replications", "20", "--seed", "1"], "Bootstrap of"),
    (["cutoffs", "--replications", "20", "--seed", "1"], "Model-specific fit cutoffs"),
    (["invariance", "--group-column", "district"], "Measurement invariance across"),
    (["align", "--group-column", "district"], "Alignment across"),
    (["replicate", "--seed", "2"], "Replication in two random halves"),
], ids=["bootstrap", "cutoffs", "invariance", "align", "replicate"])
def test_every_command_that_reads_the_data_cautions_first(command, title, tmp_path, capsys):
    data = _with_code(tmp_path)
    code, out, _ = _run([command[0], MODEL, "--data", data, *command[1:]], capsys)
    out = " ".join(out.replace("│", " ").split())
    assert code == 0 and out.index("The item column clean of coded.csv holds the value -99") < out.index(title)


def test_explore_and_replicate_of_two_files_caution_first(tmp_path, capsys):
    data = _with_code(tmp_path)
    code, out, err = _run(["explore", "--data", data, "--json", tmp_path / "explore.json"], capsys)
    out = " ".join(out.replace("┃", " ").split())
    assert code == 0, err
    assert out.index("The item column clean of coded.csv holds the value -99") < out.index("Exploratory factor analysis")
    saved = json.loads((tmp_path / "explore.json").read_text())
    assert saved["data_problems"][0]["kind"] == "values that look like no answers"
    assert "rows 4, 32, 101" in saved["problems"][0]
    other = tmp_path / "other.csv"  # new rows (replicate refuses a validation file of the calibration rows)
    demo = pd.read_csv(DEMO)
    items = [c for c in demo.columns if pd.api.types.is_numeric_dtype(demo[c])]
    rng = np.random.default_rng(3)
    drawn = rng.multivariate_normal(demo[items].mean(), demo[items].cov(), size=len(demo))
    pd.DataFrame(np.clip(np.round(drawn), 1, 5), columns=items).to_csv(other, index=False)
    code, out, err = _run(["replicate", MODEL, "--calibration", data, "--validation", other, "--json",
                           tmp_path / "replicate.json"], capsys)
    out = " ".join(out.replace("│", " ").split())
    assert code == 0, err
    assert out.index("The item column clean of coded.csv holds the value -99") < out.index("Replication")
    saved = json.loads((tmp_path / "replicate.json").read_text())
    odd = [p for p in saved["replications"][0]["data_problems"] if p["kind"] == "values that look like no answers"]
    assert len(odd) == 1  # the calibration file's; the validation file has none (its -99s also make its answers far
    # from normal, a caution of its own under plain ML)
    code, out, err = _run(["replicate", MODEL, "--calibration", data, "--validation", other, "--missing-codes", "-99"],
                          capsys)
    assert code == 0 and "holds the value -99" not in out  # the advice's option is there
