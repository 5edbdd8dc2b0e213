"""The caution on codes the items share set apart from their answer scale (rows-s21, CODES_SET_APART) names the codes
and carries their count of answers as its value (in the JSON and the problems table, as other counted cautions do);
the run it names is the items' answers, not a -99 another rule names; and its advice to give the codes with
--missing-codes keeps the codes the run gave already (s21: '--missing-codes 8,9' after '--missing-codes -99' would have
read -99 as an answer again).  So do the advice of a missing-value code and of a value outside the answer scale.

Check values: the cells the simulation planted (tests.commands.test_codes_set_apart_every_command.pupils, a fixed
seed), counted with pandas."""

from __future__ import annotations

import json

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.commands.test_codes_set_apart_every_command import ITEMS, MODEL, pupils
from tests.conftest import run_cli


def _planted(frame) -> int:
    return int(frame[ITEMS].isin([8, 9]).sum().sum())  # pandas' count of the planted codes


def _codes(problems):
    [caution] = [p for p in problems if p.kind is ProblemKind.CODES_SET_APART]
    return caution


def test_the_caution_names_the_codes_the_items_share_and_carries_their_count():
    frame = pupils()
    caution = _codes(cfa_tool.fit(MODEL, frame).problems)
    assert str(caution.explanation).startswith(
        f"12 item columns of <data frame> (q1, q2, q3 and 9 more) share the codes 8 and 9, set apart from their "
        f"other answers (1 to 5): {_planted(frame)} of their 4,800 answers")
    assert caution.value == _planted(frame)
    assert cfa_tool.fit(MODEL, frame).to_dict()["problems"][0]["value"] == _planted(frame)
    # one code alone is named as one code (7: a 9 alone is a missing-value code by its own rule)
    one = frame.replace({8: 7, 9: 7})
    caution = _codes(cfa_tool.check(MODEL, one).problems)
    assert "share the code 7, set apart from their other answers (1 to 5)" in str(caution.explanation)
    # in words true of a check, which analyses nothing, as of a fit; one code in the singular (session note s23,
    # 'Noticed, left alone': check said 'a value ... is analysed as answers')
    assert str(caution.explanation).endswith("it is read as an answer, beyond the scale's end.")
    assert "analysed" not in str(caution.explanation)
    assert str(_codes(cfa_tool.check(MODEL, frame).problems).explanation).endswith(
        "they are read as answers, beyond the scale's ends.")


def test_a_missing_value_code_beside_them_leaves_the_run_named_as_the_items_answers():
    frame = pupils()
    frame.loc[[3, 5], ["q1", "q2"]] = -99  # a missing-value code, which its own rule names
    problems = cfa_tool.check(MODEL, frame).problems
    assert any(p.kind is ProblemKind.VALUES_NOT_ANSWERS and "-99" in str(p.explanation) for p in problems)
    # the run of answers is 1 to 5, not -99 to 5
    assert "set apart from their other answers (1 to 5)" in str(_codes(problems).explanation)


def test_the_advice_keeps_the_codes_given_in_python_and_on_the_command_line(tmp_path, capsys):
    frame = pupils()
    frame.loc[[3, 5], ["q1", "q2"]] = -99
    advice = str(_codes(cfa_tool.fit(MODEL, frame, missing_codes=[-99]).problems).advice)
    assert "missing_codes=[-99, 8, 9]" in advice
    advice = str(_codes(cfa_tool.fit(MODEL, frame, missing_codes=[-99, "Ne sait pas"]).problems).advice)
    assert "missing_codes=[-99, 'Ne sait pas', 8, 9]" in advice
    data, model, saved = tmp_path / "pupils.csv", tmp_path / "m.cfa", tmp_path / "fit.json"
    frame.to_csv(data, index=False)
    model.write_text(MODEL)
    code, out, err = run_cli(["fit", model, "--data", data, "--missing-codes", "-99", "--json", saved], capsys)
    assert code == 0, err
    flat = " ".join(out.replace("│", " ").split())
    assert "give --missing-codes -99,8,9;" in flat
    advice = json.loads(saved.read_text())["problems"][0]["advice"]
    assert "--missing-codes -99,8,9" in advice
    # the advice followed: nothing left to name, -99 still read as no answer
    code, out, err = run_cli(["check", model, "--data", data, "--missing-codes", "-99,8,9"], capsys)
    assert code == 0, err
    assert "set apart" not in out and "-99" in out  # the note of the codes read as no answer


def test_a_missing_value_codes_advice_keeps_the_codes_given():
    frame = pupils()
    frame = frame.replace({8: 3, 9: 4})  # no codes set apart
    frame.loc[[3, 5, 7], ["q1", "q2"]] = -99
    frame.loc[[4, 6], ["q3", "q4"]] = 999
    problems = cfa_tool.check(MODEL, frame, missing_codes=[999]).problems
    [caution] = [p for p in problems if p.kind is ProblemKind.VALUES_NOT_ANSWERS]
    assert "the value -99" in str(caution.explanation)
    assert "missing_codes=[999, -99]" in str(caution.advice)


def test_explore_keeps_the_codes_given_too():
    """explore screens its items apart from the other commands (pipeline.inputs.screened): its advice keeps the codes
    given as theirs does, and a filter column holding a code given is named as one given."""
    frame = pupils()
    frame.loc[[3, 5], ["q1", "q2"]] = -99
    frame["site"] = 1
    frame.loc[:5, "site"] = 9  # 9 given as a code: beside the sites' 1 it is no code by the screening's own rule
    result = cfa_tool.explore(frame, items=ITEMS, replications=5, missing_codes=[-99, 9], keep="site <= 9")
    # 8 alone left beside the codes given (in about 2.5% of the cells): its advice keeps -99 and 9
    assert any("8" in str(p.explanation) and "missing_codes=[-99, 9, 8]" in str(p.advice)
               for p in result.data_problems)
    [kept] = [p for p in result.data_problems if p.kind is ProblemKind.CODE_KEPT_AS_VALUE]
    assert "holds 9 in 6 of the 400 rows analysed" in str(kept.explanation)  # rows 0 to 5, set above
    assert "a value given as a code of no answer" in str(kept.explanation)


def test_labelled_codes_advice_keeps_the_codes_given_and_is_said_once(tmp_path, rider_demo, rider_model):
    """A labelled code beyond the scale (7 'Other' beside labelled answers 1 to 5) is named once, by its label, not
    again as a value outside the answer scale, and its advice keeps the codes given; so does the note on a midpoint
    whose label reads like no answer (data.non_answers).  Files written by pyreadstat; counts by pandas."""
    import pytest

    pyreadstat = pytest.importorskip("pyreadstat")
    items = [c for c in rider_demo.columns if c not in ("rider_id", "district")]
    scale = {1.0: "Strongly disagree", 2.0: "Disagree", 3.0: "Neutral", 4.0: "Agree", 5.0: "Strongly agree"}
    frame = rider_demo.copy()
    frame.loc[:7, items[:4]] = 7
    path = tmp_path / "other.sav"
    pyreadstat.write_sav(frame, str(path), variable_value_labels={c: {**scale, 7.0: "Other"} for c in items})
    problems = cfa_tool.fit(rider_model, str(path), missing_codes=[-99, "Ne sait pas"]).problems
    named = [p for p in problems if "7" in str(p.explanation) and p.kind is ProblemKind.VALUES_NOT_ANSWERS]
    assert len(named) == 1, [str(p.explanation) for p in named]
    assert "hold the code 7 labelled 'Other' (32 cells" in str(named[0].explanation)  # 8 rows x 4 items
    assert "give missing_codes=[-99, 'Ne sait pas', 7]" in str(named[0].advice)
    middle = tmp_path / "middle.sav"
    pyreadstat.write_sav(rider_demo, str(middle),
                         variable_value_labels={c: {**scale, 3.0: "Not sure / neutral"} for c in items})
    notes = [str(w) for w in cfa_tool.fit(rider_model, str(middle), missing_codes=[-99, "Ne sait pas"]).warnings
             if "lies between other answers" in str(w)]
    assert len(notes) == 1 and notes[0].endswith("give missing_codes=[-99, 'Ne sait pas', 3]")
