"""Scores of data whose value labels sit on other codes than in the fit's data are refused (hostile trial s15,
finding 3: a second sample coded 1 = 'Strongly agree', scored with a fit of data coded 1 = 'Strongly disagree', got
scores correlating -.80 with the right ones).  The data are the bundled demo (a fictional transit agency's rider
survey) split in two and written as SPSS files by pyreadstat, an independent writer of the format; the second half
reversed (6 - code) with its labels."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import DataError
from cfa_tool.resources import resource_dir

FORWARD = {1.0: "Strongly disagree", 2.0: "Disagree", 3.0: "Neutral", 4.0: "Agree", 5.0: "Strongly agree"}
REVERSED = {k: FORWARD[6 - k] for k in FORWARD}


@pytest.fixture(scope="module")
def samples(tmp_path_factory):
    import pyreadstat

    folder = tmp_path_factory.mktemp("samples")
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv").drop(columns="district")
    items = [c for c in data.columns if c != "rider_id"]
    pyreadstat.write_sav(data.iloc[:240], str(folder / "cal.sav"), variable_value_labels={c: FORWARD for c in items})
    second = data.iloc[240:].copy()
    second[items] = 6 - second[items]
    pyreadstat.write_sav(second, str(folder / "val.sav"), variable_value_labels={c: REVERSED for c in items})
    pyreadstat.write_sav(data.iloc[240:], str(folder / "same.sav"), variable_value_labels={c: FORWARD for c in items})
    pyreadstat.write_sav(second, str(folder / "unlabelled.sav"))
    model = resource_dir("models") / "rider_three_factors.cfa"
    return folder, model


def test_labels_on_other_codes_are_refused_with_the_recoding():
    from cfa_tool.data.labels import refuse_moved_labels

    message = "val.sav: the value label 'Strongly agree' of q1 is code 1 here but code 5 in the fit's data (cal.sav)"
    with pytest.raises(DataError, match="recode q1 in a copy of val.sav .1 as 5, 2 as 4, 4 as 2, and 5 as 1.") as caught:
        refuse_moved_labels({"values": {"q1": {"1.0": "Strongly disagree", "5.0": "Strongly agree", "4.0": "Agree",
                                               "2.0": "Disagree", "3.0": "Neutral"}}},
                            {"q1": REVERSED}, ["q1"], "data/val.sav", "cal.sav")
    assert str(caught.value).startswith(message)
    # labels missing on one side, the same codes, or a label several codes carry: nothing
    refuse_moved_labels(None, {"q1": REVERSED}, ["q1"], "val.sav", "cal.sav")
    refuse_moved_labels({"values": {"q1": FORWARD}}, {}, ["q1"], "val.sav", "cal.sav")
    refuse_moved_labels({"values": {"q1": FORWARD}}, {"q1": {**FORWARD, 9.0: "Refused"}}, ["q1"], "val.sav", "c.sav")
    refuse_moved_labels({"values": {"q1": {1.0: "x", 2.0: "x"}}}, {"q1": {3.0: "x"}}, ["q1"], "val.sav", "c.sav")
    refuse_moved_labels({"values": {"q1": {**FORWARD, 8.0: "Refused"}}}, {"q1": {**FORWARD, 9.0: "Refused"}}, ["q1"],
                        "val.sav", "c.sav")


def test_scores_with_a_saved_fit_refuse_data_coded_the_other_way(samples, tmp_path, capsys):
    folder, model = samples
    fit_json = tmp_path / "cal.json"
    assert main(["fit", str(model), "--data", str(folder / "cal.sav"), "--json", str(fit_json)]) == 0
    capsys.readouterr()
    out = tmp_path / "s.csv"
    code = main(["scores", str(model), "--data", str(folder / "val.sav"), "--from-fit", str(fit_json),
                 "--output", str(out)])
    err = capsys.readouterr().err
    assert code == 2 and not out.exists()
    assert len(err.strip().splitlines()) == 1
    assert ("the value label 'Strongly agree' of on_time is code 1 here but code 5 in the fit's data (cal.sav)"
            in err)
    # the same coding, or no labels on one side: scored
    for name in ("same.sav", "unlabelled.sav"):
        assert main(["scores", str(model), "--data", str(folder / name), "--from-fit", str(fit_json),
                     "--output", str(tmp_path / f"{name}.csv")]) == 0


def test_scores_with_a_fit_in_python_refuse_them_too(samples):
    folder, model = samples
    fit = cfa_tool.fit(model, folder / "cal.sav")
    with pytest.raises(DataError, match="'Strongly agree' of on_time is code 1 here but code 5 in the fit's data"):
        fit.scores(folder / "val.sav")
    assert len(fit.scores(folder / "same.sav").table) == 240
