"""The Word file says the model in words, not in the model language (new user s17, S4b): a note that quoted
'scale latent by variance' or "the 'reversed' statement" reached a manuscript.  The statement is a part of the note
apart from its words (note_parts.Command), which the terminal and HTML views, whose reader edits the model file,
keep, and the Word file leaves out or says in words.

The data are the bundled rider survey (invented, simulated with a fixed seed): once as it is with the model declaring
'clean' reverse-keyed (its loading then points against the declared keying: a caution), once with 'clean' scored in
reverse (6 - answer) as declared (the reliability table's note names it reversed for scoring)."""

from __future__ import annotations

import io

import docx
import pandas as pd

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.resources import resource_dir

DECLARED = (resource_dir("models") / "rider_three_factors.cfa").read_text() + "reversed clean on 1 to 5\n"
SYNTAX = ("'scale latent by variance'", "'reversed'", "'reversed ... on", "'start ...'")


def _word(report) -> str:
    document = docx.Document(io.BytesIO(report_docx(report)))
    return " ".join(" ".join([p.text for p in document.paragraphs]
                             + [c.text for t in document.tables for r in t.rows for c in r.cells]).split())


def _flat(text: str) -> str:
    return " ".join(text.replace("│", " ").split())


def test_a_declared_keying_the_loadings_contradict_is_said_in_words_in_word():
    result = cfa_tool.fit(DECLARED, resource_dir("demo") / "rider_survey.csv")
    report = report_of(result)
    word, terminal, page = _word(report), _flat(report_text(report, 120)), _flat(report_html(report))
    assert not [s for s in SYNTAX if s in word], [s for s in SYNTAX if s in word]
    # the keying contradicted by the loadings, a problem first (new-user trial s17): words for the manuscript, the
    # statement for the program's user
    assert "point the other way from the keying the model declares: clean" in word
    assert "check the declared keying for a typing error" in word
    assert "point the other way from the keying the model declares (its 'reversed' statement): clean" in terminal
    assert "check the declared keying (its 'reversed' statement) for a typing error" in terminal
    # the distinct table's note: the scaling in words, the statement where the user edits the model
    assert "scaled by their variances, and punctuality, comfort, and courtesy are scaled otherwise" in word
    for view in (terminal, page.replace("&#x27;", "'")):
        assert "scaled by their variances ('scale latent by variance'), and punctuality" in view


def test_items_scored_in_reverse_as_declared_are_named_without_the_statement(tmp_path):
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data["clean"] = 6 - data["clean"]
    data.to_csv(tmp_path / "reversed.csv", index=False)
    report = report_of(cfa_tool.fit(DECLARED, tmp_path / "reversed.csv"))
    word, terminal = _word(report), _flat(report_text(report, 120))
    assert "reversed for scoring (as the model declares): comfort: clean." in word
    assert "reversed for scoring (as the model declares in its 'reversed' statement): comfort: clean." in terminal
    assert not [s for s in SYNTAX if s in word]


def test_the_advice_of_a_search_that_did_not_converge_says_its_statements_in_words():
    # the message of an estimation that did not converge comes first in every view, the Word file's too: its advice
    # names the model file's statements only where the reader edits the model file
    import numpy as np

    from cfa_tool.assessment.convergence import nonconvergence_message
    from cfa_tool.estimation.optimizer import OptimizerResult, Outcome
    from cfa_tool.estimation.strategy import Restart, Search
    from cfa_tool.note_parts import WORDS, said

    stopped = OptimizerResult(np.zeros(2), 1.0, np.ones(2), 40, Outcome.STALLED)
    for found, statement, words in (
            (Search(stopped, Restart.NOT_CONFIRMED), "write 'scale latent by variance'",
             "fix every factor's variance at 1"),
            (Search(stopped), "give start values near the expected solution ('start ...')",
             "or give start values near the expected solution")):
        message = nonconvergence_message(found, ("a", "b"), 500)
        assert statement in str(message)
        manuscript = said(message, WORDS)
        assert manuscript.endswith(words) and not [s for s in SYNTAX if s in manuscript], manuscript


def test_a_declared_scale_no_answer_reaches_is_said_in_words_in_word(tmp_path):
    # the caution first in every view (tests/data/test_same_answers.py has the hostile trial): the statement and its
    # line only where the reader edits the model file
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data["clean"] = 6 - data["clean"]
    data.to_csv(tmp_path / "reversed.csv", index=False)
    model = (resource_dir("models") / "rider_three_factors.cfa").read_text() + "reversed clean on 1 to 7\n"
    report = report_of(cfa_tool.fit(model, tmp_path / "reversed.csv"))
    word, terminal = _word(report), _flat(report_text(report, 120))
    assert "The model declares answers from 1 to 7 for clean, but no answer of the items it covers reaches 7" in word
    assert "declare the questionnaire's own lowest and highest answers (on 1 to 5 if that is the scale)" in word
    assert not [s for s in SYNTAX if s in word] and "on line" not in word
    assert "The model (its 'reversed' statement on line 7) declares answers from 1 to 7 for clean" in terminal
