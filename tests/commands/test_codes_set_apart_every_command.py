"""Codes of no answer that the items share apart from their answer scale, too many for the screening's 2% (8 'don't
know' and 9 'refused' in about 5% of the cells beside answers 1 to 5), and not given with --missing-codes: one rule
(data.odd_values, OddKind.SET_APART) names them first in every command that reads rows, with their share and the
option that reads them as no answer (s20: explore warned, fit, check, compare, invariance and scores said nothing
and analysed 8 and 9 as the scale's highest answers).  Its own kind of caution, so that a reader of the JSON tells
it from the other values that look like no answers.

Check values: the cells the simulation planted, counted with pandas (a fixed seed); none on the bundled rider survey
and Holzinger & Swineford (1939), whose answers hold no codes."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import run_cli

ITEMS = [f"q{j}" for j in range(1, 13)]
MODEL = "factor f: q1, q2, q3, q4, q5, q6\nfactor g: q7, q8, q9, q10, q11, q12\n"
ONE_FACTOR = "factor h: " + ", ".join(ITEMS) + "\n"


def pupils(seed: int = 20) -> pd.DataFrame:
    """400 simulated pupils of two districts: 12 items of 1 to 5 on two factors, 8 ('don't know') and 9 ('refused')
    each in about 2.5% of every item's cells."""
    rng = np.random.default_rng(seed)
    f = rng.normal(size=(400, 2))
    data = {}
    for j in range(12):
        x = np.clip(np.round(3 + 0.9 * f[:, j // 6] + rng.normal(scale=0.8, size=400)), 1, 5)
        u = rng.random(400)
        x[u < 0.025] = 8
        x[(u >= 0.025) & (u < 0.05)] = 9
        data[f"q{j + 1}"] = x.astype(int)
    data["district"] = np.where(np.arange(400) % 2, "north", "south")
    return pd.DataFrame(data)


def _codes_named_first(problems, frame: pd.DataFrame) -> None:
    first = problems[0]
    assert first.kind is ProblemKind.CODES_SET_APART and not first.kind.inadmissible
    planted = int(frame[ITEMS].isin([8, 9]).sum().sum())  # pandas' count of the planted codes
    rows = int(frame[ITEMS].isin([8, 9]).any(axis=1).sum())
    said = str(first.explanation)
    assert said.startswith("12 item columns of <data frame> (q1, q2, q3 and 9 more) share the codes 8 and 9, set apart "
                           f"from their other answers (1 to 5): {planted} of their 4,800 answers "
                           f"({100 * planted / 4800:.1f}%), in {rows} rows"), said
    assert "missing_codes=[8, 9]" in str(first.advice)
    assert [p.kind for p in problems].count(ProblemKind.CODES_SET_APART) == 1


def test_every_command_names_the_codes_first_with_their_share_and_the_option():
    frame = pupils()
    _codes_named_first(cfa_tool.fit(MODEL, frame).problems, frame)
    _codes_named_first(cfa_tool.check(MODEL, frame).problems, frame)
    _codes_named_first(cfa_tool.compare([MODEL, ONE_FACTOR], frame).problems, frame)
    _codes_named_first(cfa_tool.invariance(MODEL, frame, "district").data_problems, frame)
    _codes_named_first(cfa_tool.scores(MODEL, frame).fit.problems, frame)
    _codes_named_first(cfa_tool.explore(frame[ITEMS], replications=5).data_problems, frame)
    # read as no answer, as the advice says: nothing left to name, in any command
    for problems in (cfa_tool.fit(MODEL, frame, missing_codes=[8, 9]).problems,
                     cfa_tool.check(MODEL, frame, missing_codes=[8, 9]).problems,
                     cfa_tool.explore(frame[ITEMS], replications=5, missing_codes=[8, 9]).data_problems):
        assert not [p for p in problems if p.kind in (ProblemKind.CODES_SET_APART, ProblemKind.VALUES_NOT_ANSWERS)]


def test_the_command_line_shows_it_first_and_the_methods_text_and_json_name_it(tmp_path, capsys):
    frame = pupils()
    data, model, saved = tmp_path / "pupils.csv", tmp_path / "m.cfa", tmp_path / "fit.json"
    frame.to_csv(data, index=False)
    model.write_text(MODEL)
    code, out, err = run_cli(["fit", model, "--data", data, "--json", saved], capsys)
    assert code == 0, err
    flat = " ".join(out.replace("│", " ").split())
    assert flat.index("share the codes 8 and 9, set apart") < flat.index("CFI")
    assert "--missing-codes 8,9" in flat
    result = json.loads(saved.read_text())
    assert result["problems"][0]["kind"] == "codes set apart from the answer scale"
    # the methods paragraph says that they were analysed as answers
    from cfa_tool.reporting.paragraph import methods_paragraph

    paragraph = " ".join(methods_paragraph(cfa_tool.fit(MODEL, data)).split())
    assert "8 and 9 in q1, q2, q3 and 9 more" in paragraph and "perhaps codes of no answer" in paragraph


def test_one_item_tail_or_data_without_codes_raise_nothing(hs_data):
    from cfa_tool.data.odd_values import OddKind, odd_values
    from cfa_tool.resources import resource_dir

    rider = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    for frame in (rider, hs_data):
        numbers = [c for c in frame.columns if pd.api.types.is_numeric_dtype(frame[c])]
        assert not [o for o in odd_values(frame, numbers) if o.kind is OddKind.SET_APART]
    # one item's own values beyond its run (a tail, not a code the items share) is left alone
    frame = pupils()
    frame[ITEMS[1:]] = frame[ITEMS[1:]].where(~frame[ITEMS[1:]].isin([8, 9]), 3)
    assert not [o for o in odd_values(frame, ITEMS) if o.kind is OddKind.SET_APART]
