"""A data file's value labels against the model's 'answers' statement, and what the reports say of answers read as
numbers (new-user trial s23, findings 1 and 8).

A Stata or SPSS file stores numbers and labels them; a model's 'answers' statement says what word each code means.
When the file labels 1 'Strongly agree' and the statement codes 'Strongly agree' as 5, the two disagree about what the
numbers mean: every factor and score would point the other way, unsaid.  Such a run is refused in one line (exit 2,
no file altered).  When the file holds numbers alone, no note or methods text may say answers 'recorded as words were
coded'.  The reference of each fit is the fit of the same numbers without the statement (the statement's words with
the numbers listed as themselves change no number).  The data are invented (a fictional transit agency's rider
survey), simulated with a fixed seed.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

pyreadstat = pytest.importorskip("pyreadstat")

import cfa_tool  # noqa: E402
from cfa_tool.cli import main  # noqa: E402
from cfa_tool.errors import DataError  # noqa: E402
from cfa_tool.reporting.paragraph import methods_paragraph  # noqa: E402

ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")
PLAIN = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
WORDS = ("Strongly disagree", "Disagree", "Neither", "Agree", "Strongly agree")
STATEMENT = ("answers " + ", ".join(f'"{w}" = {k + 1}' for k, w in enumerate(WORDS))
             + ", " + ", ".join(f"{k} = {k}" for k in range(1, 6)) + "\n")


def _answers(n: int = 300, seed: int = 20261205) -> pd.DataFrame:
    """Five-point answers of two correlated traits (loadings .7)."""
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    return pd.DataFrame({x: np.digitize(.7 * traits[:, k // 3] + rng.normal(0, .7, n), [-1.2, -.4, .4, 1.2]) + 1.0
                         for k, x in enumerate(ITEMS)})


def _stata(path, frame: pd.DataFrame, reversed_labels: bool) -> None:
    order = WORDS[::-1] if reversed_labels else WORDS
    pyreadstat.write_dta(frame, str(path),
                         variable_value_labels={x: {k + 1: w for k, w in enumerate(order)} for x in ITEMS})


def test_labels_that_run_the_other_way_from_the_statement_are_refused(tmp_path, capsys):
    data = tmp_path / "wave.dta"
    _stata(data, _answers(), reversed_labels=True)
    (tmp_path / "m.cfa").write_text(PLAIN + STATEMENT)
    before = {p.name: p.read_bytes() for p in tmp_path.iterdir()}
    with pytest.raises(DataError, match=r"value labels of column 'seat' name 1 'Strongly agree', which the 'answers' "
                                        r"statement on line 3 codes as 5 \(6 columns' labels disagree so\)"):
        cfa_tool.fit(PLAIN + STATEMENT, data)
    for command in ("fit", "check"):
        assert main([command, str(tmp_path / "m.cfa"), "--data", str(data)]) == 2
        err = capsys.readouterr().err
        assert "Traceback" not in err and len(err.strip().splitlines()) == 1
        assert "the file and the statement disagree about what the numbers mean" in err
    assert {p.name: p.read_bytes() for p in tmp_path.iterdir()} == before


def test_labels_that_agree_with_the_statement_fit_as_the_numbers_do_and_say_numbers(tmp_path):
    frame = _answers()
    data = tmp_path / "wave.dta"
    _stata(data, frame, reversed_labels=False)
    coded = cfa_tool.fit(PLAIN + STATEMENT, data)
    plain = cfa_tool.fit(PLAIN, frame)  # the reference: the same numbers, no statement
    assert coded.fit.chi_square == pytest.approx(plain.fit.chi_square, rel=1e-10)
    paragraph = " ".join(methods_paragraph(coded).split())
    assert "recorded as words" not in paragraph
    assert "Answers were recorded as the numbers 1 (Strongly disagree) to 5 (Strongly agree)." in paragraph
    notes = " ".join(" ".join(str(w) for w in coded.warnings).split())
    assert "recorded as words" not in notes and "were numbers, which mean 1 (Strongly disagree)" in notes
    assert coded.to_dict()["data"]["answers_read_as_numbers"] == list(ITEMS)


def test_a_file_of_words_still_says_words_and_a_mixed_file_says_each(tmp_path):
    frame = _answers()
    words = frame.copy()
    for x in ITEMS[:3]:  # the comfort items written as words, the service items as numbers
        words[x] = frame[x].map(lambda v: WORDS[int(v) - 1])
    path = tmp_path / "mixed.csv"
    words.to_csv(path, index=False)
    result = cfa_tool.fit(PLAIN + STATEMENT, path)
    reference = cfa_tool.fit(PLAIN, frame)
    assert result.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-10)
    paragraph = " ".join(methods_paragraph(result).split())
    assert ("Answers recorded as words were coded 1 (Strongly disagree) to 5 (Strongly agree); the numbers 1 to 5 "
            "kept their values for seat, clean, and quiet.") in paragraph
    assert ("Answers were recorded as the numbers 1 (Strongly disagree) to 5 (Strongly agree) for driver, info, and "
            "punctual.") in paragraph
    notes = [" ".join(str(w).split()) for w in result.warnings if "answers" in str(w)]
    assert any(n.startswith("answers recorded as words in 3 items (seat, clean, quiet) were coded") for n in notes)
    assert any(n.startswith("the answers in 3 items (driver, info, punctual) were numbers, which mean 1 (Strongly "
                            "disagree) to 5 (Strongly agree)") for n in notes)


def test_labels_that_carry_their_code_are_checked_too(tmp_path):
    # hostile trial s23b (08): labels written '1 Strongly agree' (the code before the word, as some exports write
    # them) on a scale stored the other way round fitted with exit 0
    data = tmp_path / "coded.dta"
    pyreadstat.write_dta(_answers(), str(data), variable_value_labels={
        x: {k + 1: f"{k + 1} {w}" for k, w in enumerate(WORDS[::-1])} for x in ITEMS})
    with pytest.raises(DataError, match=r"value labels of column 'seat' name 1 '1 Strongly agree', which the 'answers' "
                                        r"statement on line 3 codes as 5"):
        cfa_tool.fit(PLAIN + STATEMENT, data)


def test_numbers_the_statement_recodes_are_said_as_coded():
    # hostile trial s23b (01): '1 = 5, ..., 5 = 1' (answers stored the other way round, recoded by the statement)
    # was said as 'recorded as the numbers 1 (Strongly disagree) to 5 (Strongly agree)', backwards
    frame = _answers()
    recoding = ("answers " + ", ".join(f'"{w}" = {k + 1}' for k, w in enumerate(WORDS)) + ", "
                + ", ".join(f"{k} = {6 - k}" for k in range(1, 6)) + "\n")
    result = cfa_tool.fit(PLAIN + recoding, frame)
    reference = cfa_tool.fit(PLAIN, 6 - frame)  # the recoded numbers themselves
    assert result.fit.chi_square == pytest.approx(reference.fit.chi_square, rel=1e-10)
    paragraph = " ".join(methods_paragraph(result).split())
    assert "recorded as the numbers 1 (Strongly disagree)" not in paragraph
    assert "Answers recorded as numbers were coded 1 (Strongly disagree, 5), 2 (Disagree, 4)" in paragraph
    notes = " ".join(" ".join(str(w).split()) for w in result.warnings)
    assert "which mean" not in notes and "were numbers, coded 1 (Strongly disagree, 5)" in notes


def test_replicate_of_numbers_and_words_says_each_file(tmp_path):
    # hostile trial s23b (05): numbers in the calibration file, words in the validation file; the notes named no
    # file and the paragraph said both samples were recorded as numbers (a coding of words alike in both files is
    # said once, unnamed)
    from cfa_tool.reporting.paragraph import replication_paragraph

    frame = _answers()
    cal, val = tmp_path / "cal.csv", tmp_path / "val.csv"
    frame.iloc[:150].to_csv(cal, index=False)
    frame.iloc[150:].apply(lambda c: c.map(lambda v: WORDS[int(v) - 1])).to_csv(val, index=False)
    found = cfa_tool.replicate(PLAIN + STATEMENT, cal, val)
    notes = [" ".join(str(n).split()) for n in found.notes]
    assert any(n.startswith(f"{cal}: the answers in every item were numbers") for n in notes)
    assert any(n.startswith("answers recorded as words in every item were coded") for n in notes)
    paragraph = " ".join(replication_paragraph(found).split())
    assert "recorded as the numbers" not in paragraph and "Answers recorded as words were coded" in paragraph


@pytest.mark.parametrize("reversed_labels, listed", [(False, "1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5"),
                                                     (True, "1 = 5, 2 = 4, 3 = 3, 4 = 2, 5 = 1")])
def test_labelled_numbers_read_with_a_statement_of_words_get_the_numbers_to_list(tmp_path, reversed_labels, listed):
    # hostile trial s23b (10): the advice was to name the items whose answers are words with 'for ITEMS', which no
    # item is; the labels say how each number is to be listed, and reversed labels show it in the list
    data = tmp_path / "wave.dta"
    _stata(data, _answers(), reversed_labels=reversed_labels)
    words_only = "answers " + ", ".join(f'"{w}" = {k + 1}' for k, w in enumerate(WORDS)) + "\n"
    with pytest.raises(DataError) as raised:
        cfa_tool.fit(PLAIN + words_only, data)
    said = str(raised.value)
    assert "holds numbers whose value labels are the words of the 'answers' statement on line 3" in said
    assert said.endswith(f"their labels' words have there: {listed}") and "for ITEMS" not in said
