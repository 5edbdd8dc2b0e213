"""Characters that look like a line break but are not one (U+2028 LINE SEPARATOR, U+2029, U+0085, vertical tab,
U+001C-U+001E; a form feed inside a comment), as text pasted from a word processor, a PDF or a web page carries
them: refused at their line and column in a model file and in a summary-statistics file.  Python's own
``str.splitlines`` takes each of them as a line end (Python documentation, str.splitlines), which is what an editor
may show; the files' readers end lines at LF, CR LF and CR only.  Before, a line separator ending a comment hid the
statement after it in the comment and the model was fitted without it (hostile tester, sixteenth round, case 03)."""

from pathlib import Path

import pytest

from cfa_tool import fit
from cfa_tool.errors import DataError, ModelError
from cfa_tool.language.parser import parse_model
from cfa_tool.data.summary_stats import read_summary_file

MODEL = "factor f: a, b, c\nfactor g: d, e, h\n"
BREAKS = ["\u2028", "\u2029", "\x85", "\v", "\x1c", "\x1d", "\x1e"]


@pytest.mark.parametrize("char", BREAKS + ["\f"])
def test_a_hidden_break_ending_a_comment_is_refused_at_its_place(char):
    assert "\n\ncovary a, d".splitlines() == ["", "", "covary a, d"]
    assert len(f"# note{char}covary a, d".splitlines()) == 2  # Python's splitlines takes it as a line end
    with pytest.raises(ModelError) as err:
        parse_model(MODEL + f"# note{char}covary a, d\n", source="m.cfa")
    assert str(err.value.location) == "m.cfa:3:7"
    assert "looks like a line break but is not one" in str(err.value) and "comment" in str(err.value)


@pytest.mark.parametrize("char", BREAKS)
def test_a_hidden_break_between_statements_is_refused_at_its_place(char):
    with pytest.raises(ModelError) as err:
        parse_model(MODEL + f"{char}covary a, d\n", source="m.cfa")
    assert str(err.value.location) == "m.cfa:3:1"


def test_a_form_feed_between_words_stays_plain_space():
    spec = parse_model(MODEL + "\fcovary a,\f d\n")
    assert len(spec.covary) == 1


def test_the_fit_would_otherwise_lose_the_statement_after_the_comment(tmp_path: Path):
    """The same model with a plain line break fits with the residual covariance (the statement is read)."""
    plain = parse_model(MODEL + "# note\ncovary a, d\n")
    assert len(plain.covary) == 1


def test_a_summary_file_with_a_hidden_break_in_a_note_is_refused_with_line_and_column(tmp_path: Path):
    path = tmp_path / "hs.stats"
    path.write_text("covariance,x1,x2,x3\n# first row\u2028x1,1.363\nx2,0.408,1.386\nx3,0.581,0.451,1.273\nn,301\n",
                    encoding="utf-8")
    with pytest.raises(DataError) as err:
        read_summary_file(path)
    assert f"{path}:2:12:" in str(err.value) and "line separator (U+2028)" in str(err.value)


def test_the_model_file_is_refused_by_fit_too(tmp_path: Path):
    import numpy as np
    import pandas as pd

    rng = np.random.default_rng(7)
    data = pd.DataFrame(rng.normal(size=(60, 6)), columns=list("abcdeh"))
    model = tmp_path / "m.cfa"
    model.write_text(MODEL + "# note\u2028covary a, d\n", encoding="utf-8")
    with pytest.raises(ModelError):
        fit(model, data)


def test_a_reversed_statement_without_its_scale_shows_the_whole_form():
    """A new user (sixteenth round) wrote 'reversed sq3, df2, ds4' and read only "expected 'on'"."""
    with pytest.raises(ModelError) as err:
        parse_model(MODEL + "reversed a, e\n", source="m.cfa")
    assert "'reversed a, e on 1 to 5' for answers from 1 to 5" in str(err.value)
