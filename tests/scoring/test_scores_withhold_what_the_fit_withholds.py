"""The scores' report withholds the reliability of a keyed sum that the fit withholds (hostile trial s23, finding 6):
with the loadings contradicting the declared keying, the scores' first box said that comfort's keyed sum describes no
scale and then quoted its omega (.35) and built the precision advice on it.  One rule: the fit's
(assessment.reliability.withheld_sums, read from its problems, saved or not).

Data: the bundled demo (a fictional transit agency's rider survey, simulated from a known population with every
loading positive: demo/make_demo_data.py), with clean and helpful recoded 6 - x and only helpful declared reversed,
so that comfort's keyed sum adds clean against the other items by construction."""

from __future__ import annotations

import json
import math

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.score_report import precision_cautions, quality_table, sum_table
from cfa_tool.reporting.terminal import report_text
from cfa_tool.resources import resource_dir
from cfa_tool.scoring.methods import Unscored
from cfa_tool.workflows.factor_scores import score_with_saved_fit

MODEL = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
         "factor comfort: seat_available, clean, temperature, room_to_stand\n"
         "factor courtesy: greeting, helpful, respectful, clear_answers\n"
         "reversed helpful on 1 to 5\n")


@pytest.fixture(scope="module")
def data() -> pd.DataFrame:
    frame = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    frame["clean"], frame["helpful"] = 6 - frame["clean"], 6 - frame["helpful"]
    return frame


def _flat(text) -> str:
    return " ".join(str(text).replace("\u2502", " ").split())


def _check_withheld(result) -> None:
    assert ProblemKind.KEYING_AGAINST_LOADINGS in {p.kind for p in result.fit.problems}  # the setup: the fit says it
    sums = {s.factor: s for s in result.quality[0].sums}
    assert math.isnan(sums["comfort"].omega) and sums["punctuality"].omega > 0.5
    summary = dict(zip(result.item_sums[0].factors, result.item_sums[0].omega))
    # comfort gets no item sum at all (below: its cells left empty); the others keep theirs with their omega
    assert "comfort" not in summary and not math.isnan(summary["courtesy"])
    cautions = " ".join(precision_cautions(result))
    assert "punctuality ." in cautions and "comfort" not in cautions
    box = _flat(report_text(report_of(result), 3000)).split("Factor scores:")[0]
    assert "describe no scale" in box and "comfort ." not in box
    for table in (quality_table(result, 0), sum_table(result, 0)):
        assert "No item sum ω is given for comfort: the loadings of its items contradict the keying" in _flat(
            table.note)


def test_scores_withhold_the_omega_the_fit_withholds(data):
    result = cfa_tool.scores(MODEL, data, methods="item-sum")
    fitted = next(r for r in result.fit.groups[0].reliability if r.factor == "comfort")
    # the fit's omega of that keyed sum, which its paragraph does not report: the one the scores quoted
    assert 0.3 < fitted.omega < 0.4
    _check_withheld(result)


def test_scores_with_a_saved_fit_withhold_it_too(data, tmp_path):
    fitted = cfa_tool.fit(MODEL, data)
    path = tmp_path / "fit.json"
    path.write_text(to_json(fitted), encoding="utf-8")
    _check_withheld(score_with_saved_fit(MODEL, path, data, methods="item-sum"))


def test_with_the_keying_right_the_omega_is_given(data):
    right = MODEL.replace("reversed helpful", "reversed clean, helpful")
    result = cfa_tool.scores(right, data, methods="item-sum")
    sums = {s.factor: s for s in result.quality[0].sums}
    assert sums["comfort"].omega > 0.7 and sums["comfort"].reversed_items == ("clean",)
    assert "comfort ." in " ".join(precision_cautions(result))


def _check_file_withholds(result) -> None:
    """keying-s25 noticed: the scores file still wrote comfort's item sums and means, whose keying the fit withholds
    (its caution: they describe no scale).  Its cells are now empty in the same columns (the file's layout does not
    vary), counted by that reason, and the report's line on factors without a sum says why."""
    table = result.table
    for column in ("comfort_item_sum", "comfort_item_mean"):
        assert column in table.columns and table[column].isna().all()
    for column in ("punctuality_item_sum", "courtesy_item_mean"):
        assert table[column].notna().sum() > 470  # of the demo's 480 rows: a few answered too few items
    assert dict(result.item_sums[0].not_summed)["comfort"] is Unscored.KEYING_WITHHELD
    counted = {(reason, method): rows for reason, method, rows in result.unscored}
    assert counted[(Unscored.KEYING_WITHHELD.value, "item-sum")] == (0, 480, 0)
    notes = _flat(report_text(report_of(result), 3000))
    assert f"No item sum or mean for comfort ({Unscored.KEYING_WITHHELD.value})" in notes
    saved = json.loads(to_json(result))
    assert {"factor": "comfort", "reason": Unscored.KEYING_WITHHELD.value} in saved["item_sums"][0]["not_summed"]


def test_the_scores_file_leaves_the_withheld_sums_empty(data, tmp_path):
    _check_file_withholds(cfa_tool.scores(MODEL, data, methods=["item-sum", "item-mean"]))
    fitted = cfa_tool.fit(MODEL, data)
    path = tmp_path / "fit.json"
    path.write_text(to_json(fitted), encoding="utf-8")
    _check_file_withholds(score_with_saved_fit(MODEL, path, data, methods=["item-sum", "item-mean"]))


def test_with_the_keying_right_the_file_writes_every_sum(data):
    right = MODEL.replace("reversed helpful", "reversed clean, helpful")
    table = cfa_tool.scores(right, data, methods="item-sum").table
    assert table["comfort_item_sum"].notna().sum() > 470
