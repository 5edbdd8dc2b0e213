"""The same situation gets the same caution, first, in every command (fit, check, compare, invariance, replicate):
one writer composes the data's cautions (pipeline.inputs.data_problems), one the design's (design_problems), one the
rows left out listwise (pipeline.continuous.listwise_problem).  Testers found check and compare silent on uneven
weights, nearly constant items and a declared reversed scale no answer reaches, and replicate saying a 44% loss of
rows only in its body text.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), altered by hand
below; the check values are counted from the altered data with pandas and numpy (Kish's effective sample size,
(sum w)^2 / sum w^2, Kish 1965), not by the tool."""

from __future__ import annotations

import json
import re

import numpy as np
import pandas as pd
import pytest

from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.reporting.paragraph import comparison_paragraph, invariance_paragraph, methods_paragraph

REVERSED = "\nreversed short_wait, clean on 1 to 7\n"  # the answers run from 1 to 5: the scale's top is never reached
ONE_FACTOR = ("factor satisfaction: on_time, short_wait, accurate_info, easy_transfer, seat_available, clean,\n"
              "    temperature, room_to_stand, greeting, helpful, respectful, clear_answers\n")


@pytest.fixture(scope="module")
def folder(tmp_path_factory, rider_demo, rider_model):
    folder = tmp_path_factory.mktemp("cautions")
    data = rider_demo.copy()
    data["short_wait"] = 6 - data["short_wait"]  # worded against their factors, as the statement declares
    data["clean"] = 6 - data["clean"]
    data["w"] = 1.0
    data.loc[data.index[:20], "w"] = 60.0  # a few rows carry most of the weight
    # 'greeting' is 3 in all but 4 rows, two in each district (so that every group still has some spread)
    odd = [*data.index[data.district == "north"][:2], *data.index[data.district == "south"][:2]]
    data["greeting"] = 3.0
    data.loc[odd, "greeting"] = [1.0, 2.0, 4.0, 5.0]
    data.to_csv(folder / "survey.csv", index=False)
    gaps = data.assign(greeting=rider_demo["greeting"])  # spread in every half of the rows
    gaps.loc[np.random.default_rng(7).random(len(gaps)) < 0.4, "helpful"] = np.nan
    gaps.to_csv(folder / "gaps.csv", index=False)
    (folder / "three.cfa").write_text(rider_model + REVERSED)
    (folder / "one.cfa").write_text(ONE_FACTOR + REVERSED)
    return folder


def _run(capsys, *args: str) -> tuple[str, dict]:
    """The terminal text (frames and wrapping aside) and the JSON of a command."""
    json_path = args[-1]
    assert main([*args[:-1], "--json", json_path]) == 0
    text = capsys.readouterr().out
    plain = " ".join(re.sub("[\u2500-\u257f]", " ", text).split())
    with open(json_path) as saved:
        return plain, json.load(saved)


def _kinds(found) -> list[str]:
    """The kinds of every problem and caution anywhere in a command's JSON."""
    if isinstance(found, list):
        return [k for item in found for k in _kinds(item)]
    if not isinstance(found, dict):
        return []
    own = [found["kind"]] if "kind" in found and "explanation" in found else []
    return own + [k for value in found.values() for k in _kinds(value)]


def test_check_compare_and_invariance_give_fits_data_cautions_first(folder, capsys):
    data = pd.read_csv(folder / "survey.csv")
    w = data["w"].to_numpy()
    kish = w.sum() ** 2 / (w ** 2).sum()  # Kish (1965): about 38 of 480 rows, far below half of them
    assert kish < 0.5 * len(w)
    weights_said = f"the {len(w)} rows count as about {kish:.1f}"
    scale_said = "declares answers from 1 to 7 for short_wait, clean, but no answer of the items it covers reaches 7"
    constant_said = "'greeting' is 3 in all but 4 of the 480 rows"
    title = {"fit": "Rider experience, three factors", "check": "Model check", "compare": "Model comparison",
             "invariance": "Measurement invariance across district"}
    runs = {
        "fit": ("fit", str(folder / "three.cfa"), "--data", str(folder / "survey.csv"), "--weights", "w"),
        "check": ("check", str(folder / "three.cfa"), "--data", str(folder / "survey.csv"), "--weights", "w"),
        "compare": ("compare", str(folder / "three.cfa"), str(folder / "one.cfa"), "--data", str(folder / "survey.csv"),
                    "--weights", "w"),
        "invariance": ("invariance", str(folder / "three.cfa"), "--data", str(folder / "survey.csv"),
                       "--group-column", "district", "--weights", "w"),
    }
    for command, args in runs.items():
        plain, found = _run(capsys, *args, str(folder / f"{command}.json"))
        head = plain[:plain.index(title[command])]  # the caution box, before the title
        for said in (weights_said, scale_said, constant_said):
            assert said in head, (command, said)
        kinds = _kinds(found)
        for kind in (ProblemKind.SCALE_ENDS_UNREACHED, ProblemKind.NEARLY_CONSTANT, ProblemKind.SMALL_EFFECTIVE_SAMPLE):
            assert kind.value in kinds, (command, kind)


def test_rows_left_out_listwise_are_a_caution_first_in_every_command(folder, capsys):
    gaps = pd.read_csv(folder / "gaps.csv")
    items = [c for c in gaps.columns if c not in ("rider_id", "district", "w")]
    dropped = int(gaps[items].isna().any(axis=1).sum())  # counted by pandas
    assert dropped > 0.05 * len(gaps)  # over a twentieth: fit's caution (LISTWISE_WARNING_SHARE)
    said = f"Listwise deletion left out {dropped} of {len(gaps)} rows"
    half = len(gaps) // 2
    gaps.iloc[:half].to_csv(folder / "first.csv", index=False)
    gaps.iloc[half:].to_csv(folder / "second.csv", index=False)
    first_dropped = int(gaps.iloc[:half][items].isna().any(axis=1).sum())
    assert first_dropped == int(gaps.iloc[half:][items].isna().any(axis=1).sum())  # as it happens: 95 each
    model, one = str(folder / "three.cfa"), str(folder / "one.cfa")
    runs = {
        "fit": (("fit", model, "--data", str(folder / "gaps.csv")), "Rider experience, three factors", said),
        "compare": (("compare", model, one, "--data", str(folder / "gaps.csv")), "Model comparison", said),
        "halves": (("replicate", model, "--data", str(folder / "gaps.csv")), "Replication in two random halves",
                   said + " of "),
        "files": (("replicate", model, "--calibration", str(folder / "first.csv"), "--validation",
                   str(folder / "second.csv")), "Calibrated on",
                  f"Listwise deletion left out {first_dropped} of {half} rows of "),
    }
    for name, (args, title, line) in runs.items():
        plain, found = _run(capsys, *args, "--incomplete-rows", "listwise", str(folder / f"listwise-{name}.json"))
        head = plain[:plain.index(title)]
        assert line in head, (name, head[:400])
        # once (for each file of a calibration and a validation file), not again in the body
        assert plain.count(line) == (2 if name == "files" else 1), name
        assert ProblemKind.ROWS_LEFT_OUT.value in _kinds(found), name


def test_the_paragraphs_say_that_no_answer_reached_the_declared_scale(folder):
    import cfa_tool

    sentence = "No answer of the items it covers reached an end of that declared scale"
    model = (folder / "three.cfa").read_text()
    data = folder / "survey.csv"
    fitted = cfa_tool.fit(model, data)
    compared = cfa_tool.compare([model, (folder / "one.cfa").read_text()], data)
    ladder = cfa_tool.invariance(model, data, group="district")
    from cfa_tool.workflows.invariance import LEVELS

    assert sentence in methods_paragraph(fitted)
    # each model declares the scale: said of Model 1, and Model 2 is said by what differs from it (the sentence holds
    # for both)
    said = comparison_paragraph(compared)
    assert said.count(sentence) == 1 and "Model 2 (<model text>) was specified as Model 1 except as follows." in said
    assert sentence in invariance_paragraph(ladder, LEVELS)
    right = model.replace("on 1 to 7", "on 1 to 5")
    assert sentence not in methods_paragraph(cfa_tool.fit(right, data))
    assert sentence not in invariance_paragraph(cfa_tool.invariance(right, data, group="district"), LEVELS)


def test_compare_and_invariance_json_say_how_answer_words_were_coded(tmp_path):
    import cfa_tool
    from tests.data.test_answer_words import ITEMS, MODEL, _answers, _as_words

    _as_words(_answers()).to_csv(tmp_path / "words.csv", index=False)
    single = "factor rider: seat, clean, quiet, driver, info, punctual\n" + MODEL.split("\n", 2)[2]
    fitted = cfa_tool.fit(MODEL, tmp_path / "words.csv").to_dict()["data"]["answer_coding"]
    compared = cfa_tool.compare([MODEL, single], tmp_path / "words.csv").to_dict()
    ladder = cfa_tool.invariance(MODEL, tmp_path / "words.csv", group="line").to_dict()
    assert compared["data"]["answer_coding"] == fitted and ladder["data"]["answer_coding"] == fitted
    assert fitted[0]["items"] == list(ITEMS)
    plain = cfa_tool.compare([MODEL.split("answers")[0], single.split("answers")[0]],
                             pd.DataFrame(_answers()).drop(columns="line")).to_dict()
    assert "data" not in plain  # no statement, no coding
