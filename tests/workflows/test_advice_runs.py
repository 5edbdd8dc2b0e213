"""Advice that names an option is followed, and the run it names runs (review s17: the ordinal bootstrap of a half
of the complete rows was told to give missing='listwise', which it then refused; cutoffs of ordinal items took
missing='listwise' and fitted every answer all the same).

Each workflow is called on a half of halves drawn from the complete rows (replicate --data --incomplete-rows
listwise --halves-file): a run that keeps rows with gaps is refused with advice (data.halves.half_kept); the test
reads the option the advice gives (``give name='value'``), calls the same workflow with it, and checks that it runs
on the half's rows with the complete rows only, as the advice says.  Data: an invented rider survey (a fictional
transit agency), eight items of four answer categories simulated from a two-factor model with a fixed seed, 3% of the
answers blanked at random.
"""

from __future__ import annotations

import re

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.data.halves import RandomHalf
from cfa_tool.errors import DataError, OptionError
from cfa_tool.method import MissingData

TWO = "factor comfort: y1, y2, y3, y4\nfactor staff: y5, y6, y7, y8\n"
ONE = "factor service: y1, y2, y3, y4, y5, y6, y7, y8\n"


@pytest.fixture(scope="module")
def survey(tmp_path_factory):
    """(data file, halves file of its complete rows, the half's number of rows)."""
    from cfa_tool.workflows.simulation import simulate

    folder = tmp_path_factory.mktemp("advice")
    frame = simulate(TWO, 600, seed=3, categories=4).frame
    frame = frame.mask(np.random.default_rng(1).random(frame.shape) < 0.03)
    frame["line"] = np.where(np.arange(len(frame)) % 2 == 0, "north", "south")
    data, model, halves = folder / "riders.csv", folder / "two.cfa", folder / "halves.csv"
    frame.to_csv(data, index=False)
    model.write_text(TWO)
    assert main(["replicate", str(model), "--data", str(data), "--incomplete-rows", "listwise", "--ordinal", "all",
                 "--halves-file", str(halves)]) == 0
    saved = pd.read_csv(halves)
    complete = frame.dropna(subset=[f"y{k}" for k in range(1, 9)])
    assert len(saved) == len(complete)  # the halves split the complete rows only
    return str(data), str(halves), int((saved["half"] == "A").sum())


#: every Python workflow that fits ordinal items of the rows it reads, on a half (``keep``), with the options given
ORDINAL_WORKFLOWS = {
    "fit": lambda data, keep, **o: cfa_tool.fit(TWO, data, ordinal="all", keep=keep, **o),
    "bootstrap": lambda data, keep, **o: cfa_tool.bootstrap(TWO, data, ordinal="all", replications=10, keep=keep, **o),
    "cutoffs": lambda data, keep, **o: cfa_tool.cutoffs(TWO, data, ordinal="all", replications=20, keep=keep, **o),
    "compare": lambda data, keep, **o: cfa_tool.compare([ONE, TWO], data, ordinal="all", keep=keep, **o),
    "scores": lambda data, keep, **o: cfa_tool.scores(TWO, data, ordinal="all", keep=keep, **o),
    "split_half": lambda data, keep, **o: cfa_tool.split_half(TWO, data, ordinal="all", keep=keep, **o)[0],
    "invariance": lambda data, keep, **o: cfa_tool.invariance(TWO, data, group="line", ordinal="all", keep=keep, **o),
}


def _advice(message: str) -> dict[str, str]:
    """The options an error's advice gives, as 'give name='value'' writes them."""
    found = dict(re.findall(r"give (\w+)='([^']+)'", message))
    assert found, message
    return found


def _fitted(result):
    """The fit a workflow's result holds (the first of several)."""
    from cfa_tool.pipeline.results import FitResult

    if isinstance(result, FitResult):
        return result
    for name in ("fit", "calibration_result"):
        if hasattr(result, name):
            return getattr(result, name)
    if hasattr(result, "results"):
        return result.results[0]
    if hasattr(result, "steps"):
        return result.steps[0].result
    return result


@pytest.mark.parametrize("workflow", sorted(ORDINAL_WORKFLOWS))
def test_the_advice_on_a_half_of_complete_rows_runs_for_ordinal_items(survey, workflow):
    data, halves, half_rows = survey
    run, keep = ORDINAL_WORKFLOWS[workflow], [RandomHalf(halves, "A")]
    with pytest.raises(DataError) as refused:
        run(data, keep)
    advice = _advice(str(refused.value))
    assert advice == {"missing": "listwise"}
    fitted = _fitted(run(data, keep, **advice))
    assert fitted.method.missing is MissingData.LISTWISE  # the advice taken, not left unused
    if workflow not in ("split_half", "invariance"):  # these split the half again, into halves or groups
        assert fitted.n_obs == half_rows


@pytest.mark.parametrize("workflow", ["bootstrap", "cutoffs"])
def test_ordinal_resampling_workflows_take_the_handling_of_gaps_as_fit_does(survey, workflow):
    # the complete rows with missing='listwise' (fit's count), every answer by default; full-information ML refused
    # with fit's words, which name the route that runs for ordinal items
    data = survey[0]
    run = ORDINAL_WORKFLOWS[workflow]
    alone = cfa_tool.fit(TWO, data, ordinal="all", missing="listwise")
    assert _fitted(run(data, [], missing="listwise")).n_obs == alone.n_obs < 600
    assert _fitted(run(data, [])).method.missing is MissingData.PAIRWISE
    with pytest.raises(OptionError, match=r"ordinal items use every answer through pairwise present rows \(or only the "
                                          r"complete rows with missing='listwise'\)") as refused:
        run(data, [], missing="full-information")
    assert _fitted(run(data, [], **_advice(str(refused.value).replace("with missing=", "give missing=")))).n_obs \
        == alone.n_obs


def test_the_bollen_stine_advice_with_gaps_runs(survey):
    # continuous items with gaps: the Bollen-Stine bootstrap is refused, advising the complete rows, which run
    data = survey[0]
    with pytest.raises(OptionError, match=r"bootstrap the complete rows \(missing='listwise'\)"):
        cfa_tool.bootstrap(TWO, data, replications=10, bollen_stine=True)
    done = cfa_tool.bootstrap(TWO, data, replications=10, bollen_stine=True, missing="listwise")
    assert done.fit.method.missing is MissingData.LISTWISE and done.bollen_stine_p is not None
