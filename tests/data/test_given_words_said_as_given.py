"""A word given with --missing-codes ('k.A.') was said in the notes to be one "that the file writes as no answer" and in
the methods paragraph one that "the data file marks as no answer", while the code 999 given in the same option was
"declared to mean no answer" (new-user trial s26): the run declared it, not the file, and a reviewer would look for
such a declaration in the file.  Now the word is said as a code given is; a word the file itself writes ('refused',
one of the phrases the tool reads as no answer) keeps its words.  Cell counts are pandas' own of the same file."""
from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph

MODEL = "factor f: q1, q2, q3, q4, q5\n"


def _flat(text: str) -> str:
    return " ".join(str(text).split())


def _file(tmp_path, refused: bool = False):
    rng = np.random.default_rng(4)
    e = rng.standard_normal(300)
    rows = {f"q{k}": np.digitize(.7 * e + .7 * rng.standard_normal(300), [-.6, .4, 1.3]).astype(object)
            for k in range(1, 6)}
    frame = pd.DataFrame(rows)
    frame.loc[frame.index % 40 == 1, "q2"] = "k.A."
    frame.loc[frame.index % 45 == 2, "q4"] = 999
    if refused:
        frame.loc[frame.index % 50 == 3, "q3"] = "refused"
    path = tmp_path / "d.csv"
    frame.to_csv(path, index=False)
    return path


def test_a_word_given_is_said_as_declared_in_notes_and_methods(tmp_path):
    path = _file(tmp_path)
    assert (pd.read_csv(path)["q2"] == "k.A.").sum() == 8  # pandas' count of the word's cells
    result = cfa_tool.fit(MODEL, str(path), missing_codes=[999, "k.A."])
    notes = [_flat(w) for w in result.warnings if "k.A." in str(w)]
    assert notes and not any("file writes" in n or "file marks" in n for n in notes)
    assert any("8 cells of the items in d.csv hold words given as codes of no answer" in n
               and "leave its word out of the codes of no answer given" in n and "copy of the file" not in n for n in notes)
    text = _flat(methods_paragraph(result))
    assert "the code 999, declared to mean no answer, was treated as missing" in text
    assert "the word declared to mean no answer was treated as missing ('k.A.' in q2)" in text
    assert "data file marks" not in text


def test_a_word_the_file_writes_keeps_its_words_beside_one_given(tmp_path):
    path = _file(tmp_path, refused=True)
    result = cfa_tool.fit(MODEL, str(path), missing_codes=[999, "k.A."])
    [note] = [_flat(w) for w in result.warnings if "k.A." in str(w)]
    assert "hold values that the file writes as no answer or words given as codes of no answer" in note
    assert "in a copy of the file" in note  # the file's own word is undone there
    text = _flat(methods_paragraph(result))
    assert "the word declared to mean no answer was treated as missing ('k.A.' in q2); values the data file marks as " \
           "no answer were treated as missing ('refused' in q3)" in text
