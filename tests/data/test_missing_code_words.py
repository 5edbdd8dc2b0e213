"""Words typed in --missing-codes ('-99,Ne sait pas') are words of no answer for the run: read as gaps in the items,
counted and named as the words the tool knows (data.non_answers); numbers stay codes.  Before, any word made
--missing-codes an error ('missing codes must be numbers separated by commas') and the cell an error of text among
numbers.  '#NULL!' (a statistics package's export of a system-missing value) and a lone '-' are read so without the
option (hostile tester s13: refused as text).

Check values: the cells counted by hand below (the rows written into the invented answers); the fit with the words
read as gaps must equal the fit of the same file with those cells left empty (the reference, written by pandas)."""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

from cfa_tool import cli
from cfa_tool.commands import options as O
from tests.conftest import simulate_cfa

MODEL = "factor rider: q1, q2, q3, q4\n"


@pytest.fixture(scope="module")
def answers() -> pd.DataFrame:
    data = simulate_cfa(np.full((4, 1), 0.8), np.eye(1), np.diag(np.full(4, 0.5)), 300, 14, ["q1", "q2", "q3", "q4"])
    return data.apply(lambda c: np.clip(np.round(c * 1.2 + 3), 1, 5)).astype(int).astype(object)


def _files(tmp_path, answers, cells: dict):
    """The answers with ``cells`` ((row, column) -> text) written in, and the same with those cells empty."""
    written, empty = answers.copy(), answers.copy()
    for (row, column), text in cells.items():
        written.loc[row, column] = text
        empty.loc[row, column] = None
    (tmp_path / "m.cfa").write_text(MODEL)
    written.to_csv(tmp_path / "written.csv", index=False)
    empty.to_csv(tmp_path / "empty.csv", index=False)
    return str(tmp_path / "m.cfa"), str(tmp_path / "written.csv"), str(tmp_path / "empty.csv")


def _fit(argv, tmp_path, name):
    out = tmp_path / f"{name}.json"
    assert cli.main(["fit", *argv, "--json", str(out)]) == 0
    return json.loads(out.read_text())


def test_the_words_of_the_option_are_split_from_its_codes():
    args = cli.build_parser("fit").parse_args(["fit", "m.cfa", "--data", "d.csv", "--missing-codes",
                                               '-99, Ne sait pas,"No, not asked",999'])
    assert O.reading_args(args)["missing_codes"] == (-99.0, 999.0)
    assert O.no_answer_words(args) == ("Ne sait pas", "No, not asked")


@pytest.mark.parametrize("given", ["9 9", "-99,--", ","])
def test_a_value_that_is_neither_a_number_nor_a_word_is_an_error(given, capsys):
    with pytest.raises(SystemExit) as stop:
        cli.build_parser("fit").parse_args(["fit", "m.cfa", "--data", "d.csv", f"--missing-codes={given}"])
    err = capsys.readouterr().err
    assert stop.value.code == 2 and "missing codes must be numbers or words separated by commas" in err


def test_the_help_says_how_a_word_with_a_comma_is_given(capsys):
    with pytest.raises(SystemExit):
        cli.build_parser("fit").parse_args(["fit", "--help"])
    help_text = " ".join(capsys.readouterr().out.split())
    assert "a word that holds a comma goes in double quotes: '-99,\"No, not asked\"'" in help_text


def test_words_given_are_read_as_no_answer_counted_and_named(answers, tmp_path, capsys):
    cells = {(4, "q1"): "Ne sait pas", (10, "q2"): "ne sait pas", (11, "q2"): "Ne sait pas",
             (20, "q3"): "No, not asked", (30, "q4"): -99}
    model, written, empty = _files(tmp_path, answers, cells)
    refused = cli.main(["fit", model, "--data", written])  # without the option: text among numbers, an error
    assert refused == 2 and 'give them with --missing-codes \'Ne sait pas,"No, not asked"\'' in capsys.readouterr().err
    result = _fit([model, "--data", written, "--missing-codes", '-99,Ne sait pas,"No, not asked"'], tmp_path, "words")
    reference = _fit([model, "--data", empty], tmp_path, "empty")
    assert result["fit"]["chi_square"] == pytest.approx(reference["fit"]["chi_square"], rel=1e-9)
    assert result["n_obs"] == reference["n_obs"] == 300
    said = json.dumps(result)
    # each spelling named apart, as the built-in words are ('Refused' and 'refused')
    assert "'Ne sait pas' (2 cells: q1 1, q2 1); 'ne sait pas' (1 cell: q2 1); 'No, not asked' (1 cell: q3 1)" in said
    assert "treated as missing ('Ne sait pas' in q1 and q2; 'ne sait pas' in q2; 'No, not asked' in q3)" in said
    assert "the code -99, declared to mean no answer, was treated as missing" in said


def test_a_word_no_item_holds_is_a_note_as_an_unused_code_is(answers, tmp_path):
    model, written, _ = _files(tmp_path, answers, {})
    result = _fit([model, "--data", written, "--missing-codes", "-98,Ne sait pas"], tmp_path, "unused")
    said = json.dumps(result)
    assert "written.csv: no cell of the items holds any of the codes given with --missing-codes (-98)" in said
    assert "written.csv: no cell of the items holds any of the codes given with --missing-codes ('Ne sait pas')" in said


def test_a_word_an_answers_statement_codes_cannot_also_be_no_answer(tmp_path, capsys):
    (tmp_path / "m.cfa").write_text('factor f: a, b, c\nanswers "No" = 0, "Yes" = 1, "Ne sait pas" = 2\n')
    rows = ["a,b,c"] + [",".join(["Yes", "No", "Ne sait pas"][(k + j) % 3] for j in range(3)) for k in range(30)]
    (tmp_path / "d.csv").write_text("\n".join(rows) + "\n")
    code = cli.main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "d.csv"), "--missing-codes",
                     "Ne sait pas"])
    err = capsys.readouterr().err
    assert code == 2 and "--missing-codes \"Ne sait pas\" reads 'Ne sait pas' as no answer" in err
    assert "codes it as the answer 2" in err


def test_null_marks_of_a_spreadsheet_export_are_no_answer(answers, tmp_path):
    cells = {(3, "q1"): "#NULL!", (8, "q1"): "#NULL!", (9, "q3"): " - "}
    model, written, empty = _files(tmp_path, answers, cells)
    result = _fit([model, "--data", written], tmp_path, "null")
    reference = _fit([model, "--data", empty], tmp_path, "empty")
    assert result["fit"]["chi_square"] == pytest.approx(reference["fit"]["chi_square"], rel=1e-9)
    said = json.dumps(result)
    assert "'#NULL!' (2 cells: q1 2)" in said and "'-' (1 cell: q3 1)" in said


#: the cells of the tests below: words of no answer and a numeric code
WORDS_AND_CODE = {(4, "q1"): "Ne sait pas", (10, "q2"): "ne sait pas", (20, "q3"): "No, not asked", (30, "q4"): -99}


def test_python_takes_the_words_by_the_command_lines_rule(answers, tmp_path):
    # scores-s15: missing_codes= took numbers only ('missing_codes must hold numbers only'), the command line words too
    import cfa_tool
    from cfa_tool.data.missing_codes import missing_value
    from cfa_tool.errors import OptionError

    model, written, empty = _files(tmp_path, answers, WORDS_AND_CODE)
    given = ["-99", "Ne sait pas", "No, not asked"]
    result = cfa_tool.fit(model, written, missing_codes=given)
    reference = _fit([model, "--data", empty], tmp_path, "empty")  # the reference: those cells left empty
    assert result.fit.chi_square == pytest.approx(reference["fit"]["chi_square"], rel=1e-9)
    on_line = _fit([model, "--data", written, "--missing-codes", '-99,Ne sait pas,"No, not asked"'], tmp_path, "line")
    # counted and named alike, each naming the option as its caller wrote it
    assert json.dumps(result.to_dict()["warnings"]).replace("missing_codes=...", "--missing-codes").replace(
        "missing='listwise'", "--incomplete-rows listwise") == json.dumps(on_line["warnings"])
    # one rule: each value read as the command line reads the text of the same value
    assert [missing_value(v) for v in given] == [-99.0, "Ne sait pas", "No, not asked"]
    assert result.data.missing_codes == (-99.0,) and result.data.no_answer_words == ("Ne sait pas", "No, not asked")
    assert on_line["data"]["missing_codes"] == [-99.0]
    assert on_line["data"]["no_answer_words"] == ["Ne sait pas", "No, not asked"]
    for wrong in (["9 9"], [None], True):
        with pytest.raises(OptionError, match="missing_codes must"):
            cfa_tool.fit(model, written, missing_codes=wrong)
    # without the words, Python's refusal of the text names the keyword that reads them, after the code given
    # (rows-s23: the list dropped -99, which copied would have read -99 as an answer again)
    from cfa_tool.errors import DataError

    with pytest.raises(DataError, match=r"give them with missing_codes=\[-99, 'Ne sait pas', 'No, not asked'\]"):
        cfa_tool.fit(model, written, missing_codes=[-99])


def test_scores_with_an_earlier_fit_read_its_words_as_it_did(answers, tmp_path, capsys):
    # scores --from-fit kept the fit's numeric codes only: a word the fit read as no answer was text among numbers
    import cfa_tool

    model, written, empty = _files(tmp_path, answers, WORDS_AND_CODE)
    fitted = tmp_path / "fit.json"
    assert cli.main(["fit", model, "--data", written, "--missing-codes", '-99,Ne sait pas,"No, not asked"', "--json",
                     str(fitted)]) == 0
    out = tmp_path / "scores.csv"
    assert cli.main(["scores", model, "--data", written, "--from-fit", str(fitted), "--output", str(out),
                     "--json", str(tmp_path / "scores.json")]) == 0, capsys.readouterr().err
    scored = pd.read_csv(out)
    assert scored["rider_items_answered"].iloc[[4, 10, 20, 30]].tolist() == [3, 3, 3, 3]
    notes = json.loads((tmp_path / "scores.json").read_text())["notes"]
    assert any(n.startswith("The earlier fit's codes of no answer") and "-99 in " in n and "'Ne sait pas' in " in n
               for n in notes)
    assert not any("--missing-codes" in n for n in notes)  # no code was given in this run
    # the same scores as the file with those cells empty, scored with that fit
    reference = tmp_path / "reference.csv"
    assert cli.main(["scores", model, "--data", empty, "--from-fit", str(fitted), "--output", str(reference)]) == 0
    np.testing.assert_allclose(scored["rider_regression"], pd.read_csv(reference)["rider_regression"], rtol=1e-12)
    # a fit in Python keeps them too, for scoring with it
    result = cfa_tool.fit(model, written, missing_codes=["Ne sait pas", "No, not asked", -99])
    again = result.scores(written)
    np.testing.assert_allclose(again.table["rider_regression"], scored["rider_regression"], rtol=1e-9)
