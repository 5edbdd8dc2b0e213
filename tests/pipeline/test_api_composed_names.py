"""Names and words of the data in Unicode's forms (session note s23, 'Noticed, left alone'):

- the Python API's naming keywords (group=, id_column=, keep=, missing_codes= words ...) follow the command line's one
  rule: a name written with decomposed accents ('re' + 'gion' with U+0301) is the column written composed;
- a 'did you mean' whose suggestion looks like the name given (a ligature, a full-width letter, an invisible mark)
  says that the two differ only in their Unicode form or in characters that cannot be seen, naming them;
- the words of no answer are compared with their accents, in whatever form they came: a word that differs by an
  accent is another word ('avó', grandmother, and 'avô', grandfather), where a decomposed accent was dropped and the
  two were read as one.

Check values: the fit of the composed names' run (the same data, the same model) is the reference; row counts by
pandas.  Invented data, fixed seed.
"""

from __future__ import annotations

import unicodedata

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.non_answers import also_no_answer, says_no_answer
from cfa_tool.errors import OptionError

MODEL = "factor f: a, b, c\n"


def _nfd(text: str) -> str:
    return unicodedata.normalize("NFD", text)


def _frame(n: int = 240, seed: int = 3) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    eta = rng.normal(size=(n, 1))
    frame = pd.DataFrame(np.round(3 + eta + 0.7 * rng.normal(size=(n, 3))), columns=["a", "b", "c"])
    frame["région"] = rng.choice(["nord", "sud"], n)
    frame["numéro"] = [f"R{i:03d}" for i in range(n)]
    return frame


def test_the_python_keywords_that_name_columns_are_read_composed():
    frame = _frame()
    assert _nfd("région") != "région"
    composed = cfa_tool.fit(MODEL, frame, group="région")
    decomposed = cfa_tool.fit(MODEL, frame, group=_nfd("région"))
    assert decomposed.fit.chi_square == pytest.approx(composed.fit.chi_square, rel=1e-12)
    kept = cfa_tool.fit(MODEL, frame, keep=[_nfd("région") + " = nord"])
    assert kept.n_obs == int((frame["région"] == "nord").sum())  # pandas' count
    scores = cfa_tool.scores(MODEL, frame, id_column=_nfd("numéro"))
    assert scores.table.columns[0] == "numéro"
    again = composed.scores(frame, id_column=_nfd("numéro"))  # a result's own entry point too
    assert again.table.columns[0] == "numéro"


def test_a_suggestion_that_looks_like_the_name_says_how_the_two_differ():
    frame = _frame().rename(columns={"région": "\ufb01liale"})  # a ligature 'fi', as some word processors write it
    with pytest.raises(OptionError) as raised:
        cfa_tool.fit(MODEL, frame, group="filiale")
    message = str(raised.value)
    assert "did you mean '\ufb01liale' (U+FB01 LATIN SMALL LIGATURE FI)?" in message
    assert "the two look alike and differ only in their Unicode form or in characters that cannot be seen" in message
    # a suggestion that does not look alike says nothing of the kind
    with pytest.raises(OptionError) as raised:
        cfa_tool.fit(MODEL, frame, group="filial")
    assert "look alike" not in str(raised.value)


def test_words_of_no_answer_keep_their_accents_in_every_form():
    with also_no_answer((_nfd("Avô"),)):  # given decomposed
        assert says_no_answer("avô") and says_no_answer(_nfd("AVÔ"))  # the same word, composed or not
        assert not says_no_answer("avó") and not says_no_answer(_nfd("avó"))  # another word: an answer
        assert not says_no_answer("avo")
