"""replicate reads each of its files as fit reads its data (one reading, pipeline.inputs.read_inputs_with_notes): a
hostile trial found five answers of 7 on a scale the model declares 1 to 5 refused by fit, check, compare and the
other commands but analysed by replicate, whose test of one solution then called the samples different.  Data: the
bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import pandas as pd
import pytest

from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text() + "reversed temperature on 1 to 5\n"


@pytest.fixture()
def files(tmp_path):
    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rows.iloc[:240].to_csv(tmp_path / "cal.csv", index=False)
    bad = rows.iloc[240:].copy()
    bad.loc[bad.index[:5], "clean"] = 7
    bad.to_csv(tmp_path / "val7.csv", index=False)
    whole = rows.copy()
    whole.loc[whole.index[:5], "clean"] = 7
    whole.to_csv(tmp_path / "b7.csv", index=False)
    (tmp_path / "rv.cfa").write_text(MODEL)
    return tmp_path


@pytest.mark.parametrize("arguments, file", [
    (["--calibration", "cal.csv", "--validation", "val7.csv"], "val7.csv"),
    (["--calibration", "val7.csv", "--validation", "cal.csv"], "val7.csv"),
    (["--data", "b7.csv"], "b7.csv"),
])
def test_answers_beyond_a_declared_scale_are_refused_as_fit_refuses_them(files, arguments, file, capsys, monkeypatch):
    monkeypatch.chdir(files)
    assert main(["fit", "rv.cfa", "--data", file]) == 2
    said_by_fit = capsys.readouterr().err.splitlines()[0]
    assert main(["replicate", "rv.cfa", *arguments]) == 2
    err = capsys.readouterr().err
    assert err.splitlines()[0] == said_by_fit
    assert f"{file} holds answers outside the scale 1 to 5 declared here: 'clean' 7 (5 cells" in err
    assert "Traceback" not in err


def test_no_test_of_one_solution_between_impossible_solutions(files):
    # hostile s12: a 15-row validation sample whose refit has negative residual variances (-3.74, -1.38) got the
    # test of one solution stated plainly (chi-square(27) = 51.49, p = .003: "the samples' solutions differ")
    from cfa_tool.workflows.replication import replicate

    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    model = (resource_dir("models") / "rider_three_factors.cfa").read_text()
    result = replicate(model, rows.iloc[:240], rows.iloc[240:255])
    assert not result.loose.admissible and result.calibration_result.admissible
    test = result.same_solution
    assert test.p_value != test.p_value  # not computed (NaN)
    assert test.not_computed.startswith("the validation sample's solution is not admissible, and a test between "
                                        "impossible solutions")
    assert result.to_dict()["replications"][0]["same_solution_test"]["p_value"] is None
    # an admissible pair keeps its test
    fine = replicate(model, rows.iloc[:240], rows.iloc[240:])
    assert fine.loose.admissible and fine.same_solution.p_value == fine.same_solution.p_value
