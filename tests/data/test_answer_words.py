"""Answers recorded as words, coded by the model's 'answers' statements (data/answer_words.py).

The reference for every fit here is the same model fitted to the same answers stored as numbers: a file of words
and the 'answers' statement must give that fit exactly (the numbers' fits are themselves checked against published
analyses and semopy elsewhere).  The data are invented: a fictional transit agency's rider survey, simulated with
a fixed seed.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.data.answer_scales import suggested_statement
from cfa_tool.errors import DataError, OptionError
from cfa_tool.reporting.paragraph import methods_paragraph

WORDS = {1: "Strongly disagree", 2: "Disagree", 3: "Neither agree nor disagree", 4: "Agree", 5: "Strongly agree"}
STATEMENT = ('answers "Strongly disagree" = 1, "Disagree" = 2, "Neither agree nor disagree" = 3, "Agree" = 4,\n'
             '    "Strongly agree" = 5\n')
PLAIN = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
MODEL = PLAIN + STATEMENT
ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")


def _answers(n: int = 300, seed: int = 20261203) -> pd.DataFrame:
    """Five-point answers of two correlated traits (loadings .7), some missing."""
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    frame = pd.DataFrame({x: np.digitize(.7 * traits[:, k // 3] + rng.normal(0, .7, n), [-1.2, -.4, .4, 1.2]) + 1.0
                          for k, x in enumerate(ITEMS)})
    frame.iloc[rng.integers(0, n, 6), 2] = np.nan
    frame["line"] = rng.choice(["harbour", "hills"], n)
    return frame


def _as_words(numbers: pd.DataFrame) -> pd.DataFrame:
    words = numbers.copy()
    for x in ITEMS:
        words[x] = numbers[x].map(WORDS).astype(object)
    words.loc[3, "seat"] = "  " + WORDS[int(numbers.loc[3, "seat"])].upper() + " "  # case and spaces do not count
    return words


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("words")
    numbers = _answers()
    numbers.to_csv(folder / "numbers.csv", index=False)
    _as_words(numbers).to_csv(folder / "words.csv", index=False)
    _as_words(numbers).to_excel(folder / "words.xlsx", index=False)
    (folder / "words.cfa").write_text(MODEL)
    (folder / "plain.cfa").write_text(PLAIN)
    return folder


@pytest.mark.parametrize("name", ["words.csv", "words.xlsx"])
def test_a_fit_of_words_equals_the_fit_of_the_numbers(files, name):
    words = cfa_tool.fit(MODEL, files / name)
    numbers = cfa_tool.fit(PLAIN, files / "numbers.csv")
    assert np.allclose(words.theta, numbers.theta, rtol=0, atol=1e-10)
    assert abs(words.fit.chi_square - numbers.fit.chi_square) < 1e-10
    assert words.n_obs == numbers.n_obs == 300
    note = ("answers recorded as words in every item were coded 1 (Strongly disagree) to 5 (Strongly agree) (the "
            "'answers' statement on line 3)")
    assert note in map(str, words.warnings) and note not in map(str, numbers.warnings)
    paragraph = methods_paragraph(words)
    assert "Answers recorded as words were coded 1 (Strongly disagree) to 5 (Strongly agree)." in paragraph
    assert "recorded as words" not in methods_paragraph(numbers)
    coding = words.to_dict()["data"]["answer_coding"]
    assert coding == [{"items": list(ITEMS), "answers": [{"word": WORDS[k], "code": float(k)} for k in range(1, 6)]}]
    assert "answer_coding" not in numbers.to_dict()["data"]


def test_ordinal_fits_see_the_codes_as_their_categories(files):
    words = cfa_tool.fit(MODEL, files / "words.csv", ordinal="all")
    numbers = cfa_tool.fit(PLAIN, files / "numbers.csv", ordinal="all")
    assert np.allclose(words.theta, numbers.theta, rtol=0, atol=1e-10)
    assert words.to_dict()["data"]["category_counts"] == numbers.to_dict()["data"]["category_counts"]
    assert [c["value"] for c in words.to_dict()["data"]["category_counts"]["seat"]] == [1, 2, 3, 4, 5]


def test_compare_invariance_and_check_read_the_words_so_too(files):
    single = "factor rider: seat, clean, quiet, driver, info, punctual\n"
    words = cfa_tool.compare([MODEL, single + STATEMENT], files / "words.csv")
    numbers = cfa_tool.compare([PLAIN, single], files / "numbers.csv")
    for a, b in zip(words.results, numbers.results):
        assert abs(a.fit.chi_square - b.fit.chi_square) < 1e-10
    with pytest.raises(OptionError, match="read the answers of 'seat' differently"):
        cfa_tool.compare([MODEL, single], files / "words.csv")
    steps_w = cfa_tool.invariance(MODEL, files / "words.csv", group="line")
    steps_n = cfa_tool.invariance(PLAIN, files / "numbers.csv", group="line")
    assert [s.result.fit.chi_square for s in steps_w.steps] == pytest.approx(
        [s.result.fit.chi_square for s in steps_n.steps], abs=1e-10)
    checked = cfa_tool.check(MODEL, files / "words.csv")
    assert any("recorded as words" in n for n in checked.notes)


def test_scores_with_a_saved_fit_read_new_data_with_its_coding(files, tmp_path):
    assert main(["fit", str(files / "words.cfa"), "--data", str(files / "words.csv"), "--json",
                 str(tmp_path / "fit.json")]) == 0
    assert main(["fit", str(files / "plain.cfa"), "--data", str(files / "numbers.csv"), "--json",
                 str(tmp_path / "plain.json")]) == 0
    # the model file given to scores need not repeat the statement: the fit's JSON carries the coding
    assert main(["scores", str(files / "plain.cfa"), "--from-fit", str(tmp_path / "fit.json"), "--data",
                 str(files / "words.csv"), "--output", str(tmp_path / "w.csv")]) == 0
    assert main(["scores", str(files / "plain.cfa"), "--from-fit", str(tmp_path / "plain.json"), "--data",
                 str(files / "numbers.csv"), "--output", str(tmp_path / "n.csv")]) == 0
    w, n = pd.read_csv(tmp_path / "w.csv"), pd.read_csv(tmp_path / "n.csv")
    assert np.allclose(w.select_dtypes("number"), n.select_dtypes("number"), equal_nan=True, rtol=0, atol=1e-10)
    saved = json.loads((tmp_path / "fit.json").read_text())["data"]["answer_coding"]
    assert saved[0]["answers"][0] == {"word": "Strongly disagree", "code": 1.0}
    # numbers scored with a fit of words: the fit's coding lists no numbers
    assert main(["scores", str(files / "plain.cfa"), "--from-fit", str(tmp_path / "fit.json"), "--data",
                 str(files / "numbers.csv"), "--output", str(tmp_path / "x.csv")]) == 2
    assert not (tmp_path / "x.csv").exists()
    # a model file that codes the words otherwise than the fit did
    other = files / "other.cfa"
    other.write_text(MODEL.replace('"Strongly agree" = 5', '"Strongly agree" = 6'))
    from cfa_tool.workflows.factor_scores import score_with_saved_fit
    with pytest.raises(OptionError, match="code the answers otherwise than the earlier fit"):
        score_with_saved_fit(other, tmp_path / "fit.json", files / "words.csv")


def test_a_numbers_export_read_with_a_statement_of_words_gets_advice_that_works(files, tmp_path):
    # new-user trial s27: the advice named 'for ITEMS' though no item held a word; listing each number as itself
    # reads both exports with one model file, which the message now says, and a fit made so equals the plain fit
    with pytest.raises(DataError) as refused:
        cfa_tool.check(MODEL, files / "numbers.csv")
    message = str(refused.value)
    assert "no item of the statement holds a word in this file" in message and "for ITEMS" not in message
    assert "(..., 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5)" in message  # the statement's codes, 1 to 5 (STATEMENT above)
    both = MODEL.rstrip("\n") + ", 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5\n"
    numbers, plain = cfa_tool.fit(both, files / "numbers.csv"), cfa_tool.fit(PLAIN, files / "numbers.csv")
    assert np.allclose(numbers.theta, plain.theta, rtol=0, atol=1e-10)


def test_scores_of_a_numbers_export_with_a_fit_of_words(files, tmp_path):
    # new-user trial s27: no model file scored the numbers export with the fit of the words export; a statement that
    # codes every word as the fit did and lists each code as itself is the same answers on the same scale
    assert main(["fit", str(files / "words.cfa"), "--data", str(files / "words.csv"), "--json",
                 str(tmp_path / "fit.json")]) == 0
    both = tmp_path / "both.cfa"
    both.write_text(MODEL.rstrip("\n") + ", 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5\n")
    assert main(["scores", str(both), "--from-fit", str(tmp_path / "fit.json"), "--data", str(files / "numbers.csv"),
                 "--output", str(tmp_path / "n.csv")]) == 0
    assert main(["scores", str(files / "words.cfa"), "--from-fit", str(tmp_path / "fit.json"), "--data",
                 str(files / "words.csv"), "--output", str(tmp_path / "w.csv")]) == 0
    w, n = pd.read_csv(tmp_path / "w.csv"), pd.read_csv(tmp_path / "n.csv")
    assert np.allclose(w.select_dtypes("number"), n.select_dtypes("number"), equal_nan=True, rtol=0, atol=1e-10)
    from cfa_tool.workflows.factor_scores import score_with_saved_fit
    # a number listed as another code, or a number that is no code of the fit, is still another coding
    for extra in (", 1 = 2", ", 6 = 6"):
        other = tmp_path / "other.cfa"
        other.write_text(MODEL.rstrip("\n") + extra + "\n")
        with pytest.raises(OptionError, match="code the answers otherwise than the earlier fit"):
            score_with_saved_fit(other, tmp_path / "fit.json", files / "numbers.csv")
    # the fit's coding carried (a model file without the statement): the refusal says what works
    from cfa_tool.errors import UserInputError
    with pytest.raises(UserInputError, match="each number listed as itself at its end"):
        score_with_saved_fit(files / "plain.cfa", tmp_path / "fit.json", files / "numbers.csv")


def _fit_frame(frame: pd.DataFrame, model: str = MODEL):
    return cfa_tool.fit(model, frame)


def test_a_word_the_statement_does_not_list_is_an_error_naming_the_cell(files):
    frame = _as_words(_answers())
    frame.loc[7, "clean"] = "Agreed"  # never a partial match
    with pytest.raises(DataError) as err:
        _fit_frame(frame)
    message = str(err.value)
    assert "column 'clean', row labelled 7: the answer 'Agreed' is not one of the words of the 'answers' statement on " \
           "line 3 ('Strongly disagree', 'Disagree', 'Neither agree nor disagree', 'Agree', 'Strongly agree')" in message


def test_a_number_among_the_words_is_an_error_unless_listed(files):
    frame = _as_words(_answers())
    frame.loc[10, "info"] = 4
    with pytest.raises(DataError, match="column 'info', row labelled 10: holds the number 4 among answers recorded as "
                                        "words, and the 'answers' statement on line 3 does not list it"):
        _fit_frame(frame)
    frame.loc[10, "info"] = "3.24"  # a means row at the foot of an export
    with pytest.raises(DataError, match="a row of means or totals below the answers"):
        _fit_frame(frame)
    frame.loc[10, "info"] = 9
    listed = cfa_tool.fit(MODEL.replace("= 5\n", "= 5, 9 = 3\n"), frame)  # listed: coded as the statement says
    reference = _answers()
    reference.loc[10, "info"] = 3.0
    assert np.allclose(listed.theta, cfa_tool.fit(PLAIN, reference).theta, rtol=0, atol=1e-10)


def test_empty_cells_stay_no_answer_and_shared_codes_are_named(files):
    numbers = _answers()
    frame = _as_words(numbers)
    frame.loc[[0, 1], "quiet"] = ["", "   "]
    numbers.loc[[0, 1], "quiet"] = np.nan
    shared = MODEL.replace('"Strongly agree" = 5', '"Strongly agree" = 5, "Completely agree" = 5')
    result = cfa_tool.fit(shared, frame)
    assert np.allclose(result.theta, cfa_tool.fit(PLAIN, numbers).theta, rtol=0, atol=1e-10)
    # one note: the coding and the answers that share a code (a manuscript's without the statement and its line)
    assert ("answers recorded as words in every item were coded 1 (Strongly disagree), 2 (Disagree), 3 (Neither agree "
            "nor disagree), 4 (Agree), 5 (Strongly agree, Completely agree); 'Strongly agree' and 'Completely agree' "
            "share the code 5, so they are analysed as one answer (the 'answers' statement on line 3)"
            ) in map(str, result.warnings)


def test_statements_for_some_items_code_only_those(files):
    numbers = _answers()
    frame = numbers.copy()
    frame["punctual"] = numbers["punctual"].map({1: "never", 2: "rarely", 3: "sometimes", 4: "often", 5: "always"})
    model = PLAIN + 'answers "Never" = 1, "Rarely" = 2, "Sometimes" = 3, "Often" = 4, "Always" = 5 for punctual\n'
    result = cfa_tool.fit(model, frame)
    assert np.allclose(result.theta, cfa_tool.fit(PLAIN, numbers).theta, rtol=0, atol=1e-10)
    assert any("in 1 item (punctual) were coded 1 (Never) to 5 (Always)" in w for w in map(str, result.warnings))


def test_the_refusal_of_words_suggests_the_statement_but_never_applies_it(files, capsys):
    assert main(["fit", str(files / "plain.cfa"), "--data", str(files / "words.csv")]) == 2
    err = capsys.readouterr().err
    assert "holds text" in err and err.count("\n") == 1
    assert ('answers "Strongly disagree" = 1, "Disagree" = 2, "Neither agree nor disagree" = 3, "Agree" = 4, '
            '"Strongly agree" = 5') in err
    # words of no common scale (or of several that would code them otherwise) get no suggestion
    assert suggested_statement(np.array(["Blue", "Green"], dtype=object)) is None
    assert suggested_statement(np.array(["Disagree", "Agree"], dtype=object)) is None  # 4 or 5 points?
    # three frequency words fit the four-point scale and the five-point one, whose codes differ: no suggestion
    assert suggested_statement(np.array(["often", "Never", "Always", None, 3.5], dtype=object)) is None
    # the four-point frequency scale is not offered as the five-point one with 'Rarely' added
    assert suggested_statement(np.array(["often", "Never", "Always", "Sometimes", 3.5], dtype=object)) == \
        'answers "Never" = 1, "Sometimes" = 2, "often" = 3, "Always" = 4'
    # the agreement scale with 'Neutral' as its middle word
    assert suggested_statement(np.array(["Agree", "neutral", "Strongly agree", "Disagree", "Strongly disagree"],
                                        dtype=object)) == ('answers "Strongly disagree" = 1, "Disagree" = 2, '
                                                           '"neutral" = 3, "Agree" = 4, "Strongly agree" = 5')
    # a scale found but for one word: the statement says which word no cell holds
    four_of_five = suggested_statement(np.array(["Never", "Rarely", "Often", "Always"], dtype=object))
    assert four_of_five.startswith('answers "Never" = 1, "Rarely" = 2, "Sometimes" = 3, "Often" = 4, "Always" = 5')
    assert 'no cell holds "Sometimes"' in four_of_five


def test_replication_and_bootstrap_read_the_words_so_too(files):
    words = cfa_tool.split_half(MODEL, files / "words.csv", seed=3)
    numbers = cfa_tool.split_half(PLAIN, files / "numbers.csv", seed=3)
    for a, b in zip(words, numbers):
        assert abs(a.calibration_result.fit.chi_square - b.calibration_result.fit.chi_square) < 1e-10
    w = cfa_tool.bootstrap(MODEL, files / "words.csv", replications=20, seed=2, workers=1)
    n = cfa_tool.bootstrap(PLAIN, files / "numbers.csv", replications=20, seed=2, workers=1)
    assert w.to_dict()["result"] == n.to_dict()["result"]  # the same resamples, the same intervals
    assert any("recorded as words" in note for note in w.fit.warnings)


def test_comparison_and_invariance_paragraphs_say_how_the_words_were_coded(files, tmp_path):
    from cfa_tool.errors import ModelError
    from cfa_tool.reporting.paragraph import comparison_paragraph

    single = "factor rider: seat, clean, quiet, driver, info, punctual\n"
    sentence = "Answers recorded as words were coded 1 (Strongly disagree) to 5 (Strongly agree)."
    compared = cfa_tool.compare([MODEL, single + STATEMENT], files / "words.csv")
    assert sentence in comparison_paragraph(compared)
    assert compared.results[1].to_dict()["data"]["answer_coding"][0]["items"] == list(ITEMS)
    ladder = cfa_tool.invariance(MODEL, files / "words.csv", group="line")
    assert all(s.result.data.answer_coding for s in ladder.steps)
    # summary statistics hold no answers to code: the statement cannot apply
    stats = tmp_path / "cov.stats"
    numbers = _answers().dropna()[list(ITEMS)]
    cov = numbers.cov().to_numpy()
    lines = ["covariance," + ",".join(ITEMS)] + [f"{x}," + ",".join(f"{v:.6f}" for v in cov[i, :i + 1])
                                                 for i, x in enumerate(ITEMS)]
    stats.write_text("\n".join(lines) + f"\nn,{len(numbers)}\n")
    assert cfa_tool.fit(PLAIN, stats).converged  # the file is read without the statement
    with pytest.raises(ModelError, match="holds summary statistics, not answers; remove the statement"):
        cfa_tool.fit(MODEL, stats)


def test_missing_codes_apply_to_items_coded_from_words(tmp_path):
    # re-check 8: '-99' among the words, given with --missing-codes (and, as the error advised, listed in the
    # statement) was analysed as an answer while the paragraph said it was treated as missing.  The reference is the
    # same answers with those cells left empty.
    numbers = _answers()
    words = _as_words(numbers)
    cells = [3, 40, 77]
    words.loc[cells, "seat"] = "-99"
    blank = numbers.copy()
    blank.loc[cells, "seat"] = np.nan
    path = tmp_path / "w99.csv"
    words.to_csv(path, index=False)
    reference = cfa_tool.fit(PLAIN, blank)
    for model in (MODEL, MODEL.rstrip("\n") + ", -99 = -99\n"):
        result = cfa_tool.fit(model, path, missing_codes=[-99])
        assert result.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-10)
        assert any("3 cells of the items whose answer words the model codes holding a code given with missing_codes=..." in str(w)
                   for w in result.warnings)


def test_a_middle_not_sure_among_words_stays_an_answer(tmp_path):
    # re-check 8: 'Not sure' as the middle word of a scale, listed in the statement, was read as no answer before
    # the statement coded it (the no-answer vocabulary); among words it is an answer.  Reference: the numbers.
    numbers = _answers()
    words = _as_words(numbers).replace("Neither agree nor disagree", "Not sure")
    path = tmp_path / "notsure.csv"
    words.to_csv(path, index=False)
    statement = STATEMENT.replace("Neither agree nor disagree", "Not sure")
    result = cfa_tool.fit(PLAIN + statement, path)
    assert result.fit.chi_square == pytest.approx(cfa_tool.fit(PLAIN, numbers).fit.chi_square, rel=1e-10)


def test_the_paragraph_names_the_items_a_statement_coded_when_it_coded_only_some(tmp_path):
    # re-check 8: with 'answers ... for ITEMS' the paragraph read as if every item had been coded from words
    from cfa_tool.reporting.paragraph import methods_paragraph

    numbers = _answers()
    words = numbers.copy()
    for x in ("seat", "clean", "quiet"):
        words[x] = numbers[x].map(lambda v: WORDS.get(v) if v == v else None)
    path = tmp_path / "some_words.csv"
    words.to_csv(path, index=False)
    model = PLAIN + STATEMENT.rstrip("\n") + " for seat, clean, quiet\n"
    paragraph = " ".join(methods_paragraph(cfa_tool.fit(model, path)).split())
    assert ("Answers recorded as words were coded 1 (Strongly disagree) to 5 (Strongly agree) for seat, clean, and "
            "quiet.") in paragraph


def test_a_missing_code_that_codes_an_answer_word_is_refused(files, capsys):
    """'--missing-codes 5' with '"Strongly agree" = 5' would read every 'Strongly agree' as no answer: refused
    before any fit; a code that stands for a word of no answer ('No answer' = 9) is read as missing, as asked."""
    assert main(["fit", str(files / "words.cfa"), "--data", str(files / "words.csv"), "--missing-codes", "5"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "--missing-codes 5" in err and "'Strongly agree'" in err and "line 3" in err
    with pytest.raises(OptionError):
        cfa_tool.fit(MODEL, _as_words(_answers()), missing_codes=[5])
    frame = _as_words(_answers())
    frame.loc[:9, "punctual"] = "No answer"
    coded = cfa_tool.fit(MODEL.replace('= 5\n', '= 5, "No answer" = 9\n'), frame, missing_codes=[9])
    assert coded.data.rows_read == len(frame) and any("read as no answer (punctual 10)" in w for w in coded.warnings)


def test_words_coded_outside_a_declared_scale_name_the_statement_not_missing_codes(files, tmp_path, capsys):
    """A 'reversed ... on 1 to 4' scale and an 'answers' statement coding a word 5 disagree: the error names the
    words and the statement's line, and does not offer --missing-codes (which would drop every such answer)."""
    model = tmp_path / "scale.cfa"
    model.write_text(MODEL + "reversed quiet on 1 to 4\n")
    assert main(["fit", str(model), "--data", str(files / "words.csv")]) == 2
    err = capsys.readouterr().err
    assert "the 'answers' statement on line 3 codes answers of words.csv outside the scale 1 to 4" in err
    assert "'quiet' 5 'Strongly agree'" in err and "--missing-codes" not in err


def test_words_match_whatever_their_invisible_marks_and_kinds_of_space():
    """A no-break space inside 'Strongly agree' and a zero-width space after 'Agree' (as survey exports and
    spreadsheets leave them) are the listed words; a look-alike letter is an error that names the letter."""
    numbers = _answers()
    words = _as_words(numbers)
    words.loc[5, "clean"] = WORDS[int(numbers.loc[5, "clean"])].replace(" ", "\u00a0") + "\u200b"
    words.loc[7, "seat"] = "\ufeff" + WORDS[int(numbers.loc[7, "seat"])]
    assert np.allclose(cfa_tool.fit(MODEL, words).theta, cfa_tool.fit(PLAIN, numbers).theta, rtol=0, atol=1e-10)
    words.loc[9, "info"] = "Agr\u0435e"  # a Cyrillic 'e'
    with pytest.raises(DataError, match="U\\+0435 CYRILLIC SMALL LETTER IE"):
        cfa_tool.fit(MODEL, words)


def _dont_know(folder) -> tuple[pd.DataFrame, str]:
    """The answers as numbers, and the model whose statement codes 'Don't know' as 3, with the same answers written
    as words (3 as 'Don't know') in folder/dont_know.csv."""
    numbers = _answers()
    words = numbers.copy()
    middle = {**WORDS, 3: "Don't know"}
    for x in ITEMS:
        words[x] = numbers[x].map(middle).astype(object)
    words.to_csv(folder / "dont_know.csv", index=False)
    return numbers, MODEL.replace('"Neither agree nor disagree" = 3', '"Don\'t know" = 3')


def test_a_word_of_no_answer_the_statement_codes_is_an_answer(files, tmp_path):
    """'"Don't know" = 3' in the model file: the statement decides, the vocabulary of no-answer words does not (hostile
    trial 9: 2250 answers were read as missing against the statement); the note says the word is analysed as 3.
    Reference: the same answers stored as numbers."""
    numbers, model = _dont_know(tmp_path)
    fitted = cfa_tool.fit(model, tmp_path / "dont_know.csv")
    assert fitted.fit.chi_square == pytest.approx(cfa_tool.fit(PLAIN, numbers).fit.chi_square, rel=1e-10)
    assert any("'Don't know', a word that usually means no answer, is analysed as the answer 3" in w
               for w in fitted.warnings)
    # without the word in the statement it is no answer, as the vocabulary reads it
    assert cfa_tool.fit(model.replace('"Don\'t know" = 3, ', ''), tmp_path / "dont_know.csv").data.non_answers


def test_replication_reads_the_data_as_fit_does(tmp_path):
    """A re-check: replicate read its files its own way, so a word the 'answers' statement codes ('Don't know' = 3)
    was read as missing and a --missing-codes code on a declared scale was taken; it now reads them through fit's
    one reading of data for a model (pipeline.inputs.load_data_for).  Reference: the same answers as numbers."""
    numbers, model = _dont_know(tmp_path)
    numbers.to_csv(tmp_path / "numbers.csv", index=False)
    coded = cfa_tool.split_half(model, tmp_path / "dont_know.csv", seed=4)
    plain = cfa_tool.split_half(PLAIN, tmp_path / "numbers.csv", seed=4)
    for a, b in zip(coded, plain):
        assert a.calibration_result.fit.chi_square == pytest.approx(b.calibration_result.fit.chi_square, rel=1e-10)
    with pytest.raises(OptionError, match=r"missing_codes=\[5\] is an answer of the scale 1 to 5"):
        cfa_tool.replicate(PLAIN + "reversed quiet on 1 to 5\n", tmp_path / "numbers.csv", numbers.iloc[:150],
                           missing_codes=[5])


def test_a_statement_listing_numbers_beside_words_serves_every_command(files, tmp_path, capsys):
    """Two language versions in one file: one version's answers are words, the other's numbers, and the statement
    lists both (the numbers as their own codes).  compare and scores --from-fit compared such codings by sorting
    words and numbers together (a TypeError, exit 1); each now runs and gives the fit of the numbers."""
    numbers = _answers()
    frame = numbers.copy()
    frame["seat"] = frame["seat"].astype(object)
    half = frame.index[::2]
    frame.loc[half, "seat"] = numbers.loc[half, "seat"].map(WORDS)
    frame.to_csv(tmp_path / "mixed.csv", index=False)
    statement = ('answers "Strongly disagree" = 1, "Disagree" = 2, "Neither agree nor disagree" = 3, "Agree" = 4, '
                 '"Strongly agree" = 5, 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5 for seat\n')
    (tmp_path / "a.cfa").write_text(PLAIN + statement)
    (tmp_path / "b.cfa").write_text(PLAIN + "covary seat, clean\n" + statement)
    assert main(["compare", str(tmp_path / "a.cfa"), str(tmp_path / "b.cfa"), "--data", str(tmp_path / "mixed.csv"),
                 "--json", str(tmp_path / "cmp.json")]) == 0
    assert main(["fit", str(tmp_path / "a.cfa"), "--data", str(tmp_path / "mixed.csv"), "--json",
                 str(tmp_path / "fit.json")]) == 0
    assert main(["scores", str(tmp_path / "a.cfa"), "--from-fit", str(tmp_path / "fit.json"), "--data",
                 str(tmp_path / "mixed.csv"), "--output", str(tmp_path / "s.csv")]) == 0
    capsys.readouterr()
    result = cfa_tool.fit(PLAIN + statement, frame)
    assert np.allclose(result.theta, cfa_tool.fit(PLAIN, numbers).theta, rtol=0, atol=1e-10)
    # one note for the coding of the statement, the numbers said apart from the words; a word and the number it is
    # coded as are not said again as answers sharing a code (re-check s17, 04: the coding said twice in a row)
    coding = [str(w) for w in result.warnings if "recorded as words" in w or "share the code" in w]
    assert coding == ["answers recorded as words in 1 item (seat) were coded 1 (Strongly disagree) to 5 (Strongly "
                      "agree); the numbers 1 to 5 kept their values (the 'answers' statement on line 3)"]
    # a differing coding is still refused by compare
    (tmp_path / "c.cfa").write_text(PLAIN + statement.replace(", 5 = 5", ", 5 = 4"))
    assert main(["compare", str(tmp_path / "a.cfa"), str(tmp_path / "c.cfa"), "--data",
                 str(tmp_path / "mixed.csv")]) == 2
    assert "read the answers of 'seat' differently" in capsys.readouterr().err


def test_words_of_no_common_scale_are_pointed_to_the_statement(tmp_path, capsys):
    """Answer words of a scale the tool does not know (another language) get the pointer to the 'answers'
    statement with the column's words, never an order of its own; free text (many words) does not."""
    numbers = _answers()
    frame = numbers.copy()
    own = {1: "Nie", 2: "Selten", 3: "Manchmal", 4: "Oft", 5: "Immer"}
    frame["seat"] = numbers["seat"].map(own)
    frame.to_csv(tmp_path / "de.csv", index=False)
    (tmp_path / "m.cfa").write_text(PLAIN)
    assert main(["check", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "de.csv")]) == 2
    err = capsys.readouterr().err
    assert "code each with an 'answers' statement in the model file, from the lowest answer up" in err
    first = [own[int(v)] for v in dict.fromkeys(numbers["seat"])]
    assert "the column's words (" + ", ".join(repr(w) for w in first) + ")" in err
    frame["seat"] = [f"comment {k}" for k in range(len(frame))]
    frame.to_csv(tmp_path / "text.csv", index=False)
    assert main(["check", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "text.csv")]) == 2
    assert "'answers' statement" not in capsys.readouterr().err


def test_a_slip_among_numbers_is_a_cell_to_correct_not_a_scale_of_words(tmp_path, capsys):
    """One typed 'x' among 300 numbers: fit and explore name the cell and say to correct it (they advised recoding
    the column's words, and explore an answers file); a column of words keeps that advice."""
    from cfa_tool.data.answer_scales import stray_text

    numbers = _answers()
    numbers["seat"] = numbers["seat"].astype(object)
    numbers.loc[41, "seat"] = "x"
    numbers.to_csv(tmp_path / "slip.csv", index=False)
    (tmp_path / "m.cfa").write_text(PLAIN)
    for argv in (["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "slip.csv")],
                 ["explore", "--data", str(tmp_path / "slip.csv"), "--items", ",".join(ITEMS)]):
        assert main(argv) == 2
        err = capsys.readouterr().err
        assert "column 'seat' holds text ('x' in row 43) among numbers; correct the cell" in err  # line 43: row 42 + header
        assert "answers" not in err
    assert stray_text(np.array([1.0] * 30 + ["x"], dtype=object))
    assert not stray_text(np.array(["Agree", "Disagree"] * 20 + [1.0], dtype=object))  # a column of words
    assert not stray_text(np.array([1.0] * 5 + ["x"], dtype=object))  # too few numbers to call it a slip


def test_the_advice_on_numbers_reads_which_items_hold_words_in_the_file_as_read(tmp_path):
    # only the statement's first item holds words (seat), the next numbers (clean): the advice names the worded items
    # ('for ITEMS'), as when a later item holds them; it once read the frame being recoded, where seat's words were
    # numbers already, and said that no item of the statement holds a word in this file
    numbers = _answers()
    mixed = numbers.copy()
    mixed["seat"] = _as_words(numbers)["seat"]
    path = tmp_path / "first_worded.csv"
    mixed.to_csv(path, index=False)
    with pytest.raises(DataError) as refused:
        cfa_tool.check(MODEL, path)
    message = str(refused.value)
    assert "column 'clean' holds numbers, not the words of" in message
    assert "for ITEMS" in message and "no item of the statement holds a word" not in message
