"""The 'answers' statement in the commands other than fit: each codes the words as fit does and says so.

The reference of every figure here is the same analysis of the same answers stored as numbers (with -99 where the
words file holds '-99'), whose fits are checked against published analyses and semopy elsewhere; the data are the
invented rider survey of tests/data/test_answer_words.py (a fictional transit agency, fixed seed).
"""

from __future__ import annotations

import json

import numpy as np
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.note_parts import read
from tests.data.test_answer_words import ITEMS, MODEL, PLAIN, STATEMENT, _answers, _as_words

CODING = ("answers recorded as words in every item were coded 1 (Strongly disagree) to 5 (Strongly agree) (the "
          "'answers' statement on line 3)")


@pytest.fixture(scope="module")
def coded(tmp_path_factory):
    """A file of words with '-99' (no answer) in one cell, the same answers as numbers, and a second sample."""
    folder = tmp_path_factory.mktemp("coded")
    numbers = _answers()
    numbers.loc[10, "seat"] = -99.0
    words = _as_words(_answers())
    words.loc[10, "seat"] = "-99"
    numbers.to_csv(folder / "numbers.csv", index=False)
    words.to_csv(folder / "words.csv", index=False)
    _as_words(_answers(seed=5)).to_csv(folder / "words2.csv", index=False)
    _answers(seed=5).to_csv(folder / "numbers2.csv", index=False)
    (folder / "words.cfa").write_text(MODEL)
    return folder


def test_split_half_reads_missing_codes_among_words_as_fit_does_and_says_how_it_coded(coded, tmp_path, capsys):
    # before: the halves were coded without --missing-codes ('-99' among words was an error) and said nothing
    words = cfa_tool.split_half(MODEL, coded / "words.csv", seed=3, missing_codes=(-99,))
    numbers = cfa_tool.split_half(PLAIN, coded / "numbers.csv", seed=3, missing_codes=(-99,))
    for a, b in zip(words, numbers):
        assert abs(a.calibration_result.fit.chi_square - b.calibration_result.fit.chi_square) < 1e-10
        assert abs(a.same_solution.chi_square_difference - b.same_solution.chi_square_difference) < 1e-8
        assert CODING in map(str, a.notes) and not any("recorded as words" in n for n in b.notes)
    out = tmp_path / "split.json"
    assert main(["replicate", str(coded / "words.cfa"), "--data", str(coded / "words.csv"), "--missing-codes=-99",
                 "--json", str(out)]) == 0
    report = " ".join(capsys.readouterr().out.split())
    assert "Answers recorded as words in every item were coded 1 (Strongly disagree) to 5" in report
    assert "(-99) was read as no answer (seat 1)" in report
    first = json.loads(out.read_text())["replications"][0]
    assert first["answer_coding"][0]["items"] == list(ITEMS)
    assert CODING in first["notes"]


def test_replication_on_new_data_codes_both_files_and_says_so(coded):
    words = cfa_tool.replicate(MODEL, coded / "words2.csv", coded / "words.csv", missing_codes=(-99,))
    numbers = cfa_tool.replicate(PLAIN, coded / "numbers2.csv", coded / "numbers.csv", missing_codes=(-99,))
    assert abs(words.same_solution.chi_square_difference - numbers.same_solution.chi_square_difference) < 1e-8
    assert abs(words.cvi - numbers.cvi) < 1e-10
    assert list(map(str, words.notes)).count(CODING) == 1  # one coding, said once for both files
    assert "answer_coding" in words.entry() and "answer_coding" not in numbers.entry()


def test_compare_codes_each_later_models_items_once_with_the_missing_codes(coded, tmp_path):
    # an item only the second and third models have ('extra'), with '-99' in it: before, the third model coded the
    # second's coded numbers again (an error) and the later models' words were coded without --missing-codes
    rng = np.random.default_rng(3)
    numbers = _answers()
    numbers["extra"] = numbers["info"].where(rng.random(len(numbers)) < .6, numbers["punctual"])
    numbers.loc[20, "extra"] = -99.0
    words = _as_words(numbers)
    words["extra"] = numbers["extra"].map({**{k: v for k, v in zip(range(1, 6), _WORDS)}, -99.0: "-99"})
    numbers.to_csv(tmp_path / "numbers.csv", index=False)
    words.to_csv(tmp_path / "words.csv", index=False)
    base = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
    second = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual, extra\n"
    third = "factor comfort: seat, clean, quiet, extra\nfactor service: driver, info, punctual\n"
    coded_fits = cfa_tool.compare([base + STATEMENT, second + STATEMENT, third + STATEMENT], tmp_path / "words.csv",
                                  missing_codes=(-99,))
    number_fits = cfa_tool.compare([base, second, third], tmp_path / "numbers.csv", missing_codes=(-99,))
    for w, n in zip(coded_fits.results, number_fits.results):
        assert abs(w.fit.chi_square - n.fit.chi_square) < 1e-8
    assert any("read as no answer (extra 1)" in note for note in coded_fits.notes)


_WORDS = ("Strongly disagree", "Disagree", "Neither agree nor disagree", "Agree", "Strongly agree")


def test_the_one_reader_of_saved_fits_reads_their_coding_of_answer_words(coded, tmp_path):
    from cfa_tool.errors import OptionError
    from cfa_tool.workflows.factor_scores import read_saved_fit

    fitted = cfa_tool.fit(MODEL, coded / "words.csv", missing_codes=(-99,))
    saved = tmp_path / "fit.json"
    assert main(["fit", str(coded / "words.cfa"), "--data", str(coded / "words.csv"), "--missing-codes=-99",
                 "--json", str(saved)]) == 0
    # before: read_saved_fit left the coding out of the fit's data summary (scores read it from the JSON apart)
    assert read_saved_fit(saved).data.answer_coding == fitted.data.answer_coding
    assert read_saved_fit(saved).data.answer_coding[0][1][0] == ("Strongly disagree", None, 1.0)
    payload = json.loads(saved.read_text())
    payload["data"]["answer_coding"] = [{"items": ["seat"], "answers": [{"word": "Agree"}]}]  # no code: changed
    broken = tmp_path / "broken.json"
    broken.write_text(json.dumps(payload))
    with pytest.raises(OptionError, match="broken.json'?: the coding of answer words .* cannot be read"):
        read_saved_fit(broken)


def test_cells_read_as_no_answer_are_said_in_one_shape_by_the_reader_and_the_coding(tmp_path):
    # one writer of the note (data.missing_codes): the coding of words named every column, the reader eight and a
    # count of the rest; both now name eight and count the rest, in the same words
    rng = np.random.default_rng(11)
    items = [f"q{k}" for k in range(1, 11)]
    traits = rng.normal(size=(200, 1))
    numbers = np.digitize(.7 * traits + rng.normal(0, .7, (200, 10)), [-1.2, -.4, .4, 1.2]) + 1
    scale = ("Strongly disagree", "Disagree", "Neither agree nor disagree", "Agree", "Strongly agree")
    words = [[scale[v - 1] for v in row] for row in numbers]
    for k in range(10):
        words[k][k] = "-99"
        numbers[k, k] = -99
    import pandas as pd

    pd.DataFrame(words, columns=items).to_csv(tmp_path / "words.csv", index=False)
    pd.DataFrame(numbers, columns=items).to_csv(tmp_path / "numbers.csv", index=False)
    model = "factor f: " + ", ".join(items) + "\n"
    coded = cfa_tool.fit(model + STATEMENT, tmp_path / "words.csv", missing_codes=(-99,))
    read = cfa_tool.fit(model, tmp_path / "numbers.csv", missing_codes=(-99,))
    assert abs(coded.fit.chi_square - read.fit.chi_square) < 1e-8  # the same cells read as no answer
    # (the keyword as a Python call writes it: the notes name the option from the one vocabulary of options)
    listed = "(q1 1, q2 1, q3 1, q4 1, q5 1, q6 1, q7 1, q8 1 and 2 more columns)"
    assert ("numbers.csv: 10 cells holding a code given with missing_codes=... (-99) were read as no answer "
            + listed) in map(str, read.warnings)
    assert ("words.csv: 10 cells of the items whose answer words the model codes holding a code given with "
            "missing_codes=... (-99) were read as no answer " + listed) in map(str, coded.warnings)


def test_simulate_writes_the_statements_words_which_read_back_through_it(tmp_path):
    from cfa_tool.workflows.simulation import simulate

    # reference: the same population cut into five equally likely categories as numbers (--categories 5)
    words = simulate(MODEL, 300, seed=4).frame
    numbers = simulate(PLAIN, 300, seed=4, categories=5).frame
    scale = {w: k for k, w in enumerate(_WORDS, start=1)}
    assert set(words.stack().unique()) <= set(_WORDS)
    assert (words.apply(lambda c: c.map(scale)).astype(int) == numbers.astype(int)).all().all()
    # before: simulate wrote continuous numbers, which the model file's statement refused to read
    path = tmp_path / "simulated.csv"
    out = tmp_path / "sim.json"
    (tmp_path / "m.cfa").write_text(MODEL)
    assert main(["simulate", str(tmp_path / "m.cfa"), "--n", "300", "--seed", "4", "--output", str(path), "--json",
                 str(out)]) == 0
    saved = json.loads(out.read_text())
    assert saved["written_as_words"] == list(ITEMS) and saved["answer_coding"][0]["items"] == list(ITEMS)
    assert any("written as the words of the 'answers' statement on line 3" in str(read(line))
               for line in saved["report"]["lines"])
    back = cfa_tool.fit(MODEL, path)
    numbers.to_csv(tmp_path / "numbers.csv", index=False)
    assert abs(back.fit.chi_square - cfa_tool.fit(PLAIN, tmp_path / "numbers.csv").fit.chi_square) < 1e-10


def test_a_number_of_categories_other_than_the_statements_is_an_error_naming_it():
    from cfa_tool.errors import ModelError
    from cfa_tool.workflows.simulation import simulate

    with pytest.raises(ModelError, match="categories=4 cuts 'seat' into 4 categories, and the 'answers' statement on "
                                         "line 3 lists 5 codes for it") as caught:
        simulate(MODEL, 100, categories=4)
    assert caught.value.location.line == 3


def test_power_simulation_takes_the_statements_categories_for_ordinal_items_and_refuses_continuous_ones(tmp_path,
                                                                                                     capsys):
    from cfa_tool.workflows.montecarlo import monte_carlo_power

    ordinal = "ordinal " + ", ".join(ITEMS) + "\n"
    # reference: the same ordinal model cut into five categories by --categories 5 (before: an error asking for it)
    stated = monte_carlo_power(MODEL + ordinal, 200, replications=3, seed=2, workers=1)
    given = monte_carlo_power(PLAIN + ordinal, 200, replications=3, seed=2, workers=1, categories=5)
    assert [p.mean_estimate for p in stated.parameters] == [p.mean_estimate for p in given.parameters]
    # items the model fits as continuous: the statement's categories cannot apply (before: silently simulated normal)
    (tmp_path / "m.cfa").write_text(MODEL)
    assert main(["power-simulation", str(tmp_path / "m.cfa"), "--n", "200", "--replications", "3"]) == 2
    error = capsys.readouterr().err
    assert "m.cfa:3:1: the 'answers' statement on line 3 records the answers of 'seat' in 5 categories, and " \
           "power-simulation simulates continuous answers" in error
    assert error.count("\n") <= 3  # one line, with the model's line and a caret under it


def test_errors_naming_the_statement_quote_names_with_braces_as_written():
    # the statement's place is put into the message by name, never by str.format (braces in an item's name)
    from cfa_tool.errors import ModelError
    from cfa_tool.workflows.simulation import simulate

    model = ('factor f: "a{1}", a2, a3\n'
             'answers "No" = 0, "Sometimes" = 1, "Often" = 2\n')
    with pytest.raises(ModelError, match=r"categories=4 cuts 'a\{1\}' into 4 categories, and the 'answers' "
                                         r"statement on line 2 lists 3 codes for it"):
        simulate(model, 50, categories=4)


# A column mixing numbers and a few typed words needs a statement listing the numbers with their codes beside the
# words (new-user trial s17, finding 1): its answer categories are the statement's distinct codes, five here, as the
# fit reads them, not the two codes of the words.
MIXED = PLAIN + 'answers 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5, "Agree" = 4, "Strongly agree" = 5\n'


def test_a_statement_of_numbers_and_words_gives_its_distinct_codes_as_categories_to_simulate(tmp_path):
    from cfa_tool.workflows.simulation import answer_categories, simulate

    assert answer_categories(cfa_tool.parse_model(MIXED))["seat"] == (1.0, 2.0, 3.0, 4.0, 5.0)
    # reference: the same population cut into five equally likely categories as numbers (--categories 5); before,
    # every item came out as 'Agree' or 'Strongly agree' (two categories)
    mixed = simulate(MIXED, 300, seed=4).frame
    numbers = simulate(PLAIN, 300, seed=4, categories=5).frame
    assert (mixed.astype(int) == numbers.astype(int)).all().all()
    path, out = tmp_path / "simulated.csv", tmp_path / "sim.json"
    (tmp_path / "m.cfa").write_text(MIXED)
    assert main(["simulate", str(tmp_path / "m.cfa"), "--n", "300", "--seed", "4", "--output", str(path), "--json",
                 str(out)]) == 0
    assert any("written in the 5 answer categories of the 'answers' statement on line 3, each as the answer it lists "
               "first with that code (1, 2, 3, 4, 5)" in str(read(line))
               for line in json.loads(out.read_text())["report"]["lines"])
    back = cfa_tool.fit(MIXED, path)  # the file reads back through the same statement, as the numbers do
    numbers.to_csv(tmp_path / "numbers.csv", index=False)
    assert abs(back.fit.chi_square - cfa_tool.fit(PLAIN, tmp_path / "numbers.csv").fit.chi_square) < 1e-10


def test_power_simulation_and_a_population_from_an_ordinal_fit_take_the_mixed_statements_categories(tmp_path):
    from cfa_tool.workflows.montecarlo import monte_carlo_power
    from cfa_tool.workflows.simulation import simulate

    ordinal = "ordinal " + ", ".join(ITEMS) + "\n"
    # reference: the same ordinal model without the statement, cut into five categories by --categories 5 (before:
    # "--categories 5 cuts 'seat' into 5 categories, and the 'answers' statement ... lists 2 codes for it")
    stated = monte_carlo_power(MIXED + ordinal, 200, replications=3, seed=2, workers=1, categories=5)
    given = monte_carlo_power(PLAIN + ordinal, 200, replications=3, seed=2, workers=1, categories=5)
    assert [p.mean_estimate for p in stated.parameters] == [p.mean_estimate for p in given.parameters]
    # an ordinal fit of a file mixing numbers and words, made with this very statement, is a population for it
    # (before: "the earlier fit ... has 5 answer categories of 'seat', and the 'answers' statement ... lists 2 codes")
    data = _answers()
    data[list(ITEMS)] = data[list(ITEMS)].astype(object)
    data.loc[data["seat"] == 5, "seat"] = "Strongly agree"
    data.to_csv(tmp_path / "mixed.csv", index=False)
    fitted = cfa_tool.fit(MIXED + ordinal, tmp_path / "mixed.csv")
    drawn = simulate(MIXED + ordinal, 200, seed=3, population=fitted).frame
    assert set(drawn["seat"].astype(int)) <= {1, 2, 3, 4, 5} and drawn["seat"].nunique() == 5


def test_a_fit_whose_rows_left_a_code_unanswered_is_refused_saying_so(tmp_path):
    from cfa_tool.errors import ModelError
    from cfa_tool.workflows.simulation import simulate

    ordinal = "ordinal " + ", ".join(ITEMS) + "\n"
    data = _answers()
    data.loc[data["seat"] == 1, "seat"] = 2  # no row answers 1: the fit has 4 categories of seat, the statement 5
    data.to_csv(tmp_path / "no_ones.csv", index=False)
    fitted = cfa_tool.fit(MIXED + ordinal, tmp_path / "no_ones.csv")
    with pytest.raises(ModelError, match="has 4 answer categories of 'seat', and the 'answers' statement on line 3 "
                                         "lists 5 codes for it; give the model file the fit was made with \\(if it is "
                                         "that file, the fit's rows answered only 4 of those codes"):
        simulate(MIXED + ordinal, 100, seed=3, population=fitted)
