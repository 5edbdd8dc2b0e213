"""Every message that advises --missing-codes (missing_codes= in Python) gives a list that adds to the codes and words
the run gave, never one that replaces them (rows-s23): a researcher who copies '--missing-codes "Ne sait pas"' after
running with '--missing-codes -99' would have -99 read as an answer again.  The messages far from the options keep
them too: a word among numbers (one cell and several), an answer outside a scale a 'reversed' statement declares
(the refusal and the note on a partner item answered on another scale), and a category that no one in a group
answered.  The one writer of the list is data.non_answers.codes_given (advice_codes adds the codes the reading
recorded).

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with cells set here,
and ordinal answers simulated here with a fixed seed; the expected lists are the codes given followed by the codes
the message names, as written in this file."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError, ModelError
from tests.conftest import run_cli


def _with_words(rider_demo) -> pd.DataFrame:
    frame = rider_demo.astype(object)
    frame.loc[[3, 5], ["on_time", "clean"]] = "Ne sait pas"
    frame.loc[[9, 11], "greeting"] = -99
    return frame


def test_words_among_numbers_keep_the_codes_given(rider_demo, rider_model, tmp_path, capsys):
    frame = _with_words(rider_demo)
    data, model = tmp_path / "survey.csv", tmp_path / "m.cfa"
    frame.to_csv(data, index=False)
    model.write_text(rider_model)
    code, _, err = run_cli(["check", model, "--data", data, "--missing-codes=-99,refus"], capsys)
    assert code == 2
    assert 'if the word means no answer, give it with --missing-codes "-99,refus,Ne sait pas"' in err
    # the advice followed: the words read as no answer, -99 still read so
    code, out, err = run_cli(["check", model, "--data", data, "--missing-codes", "-99,refus,Ne sait pas"], capsys)
    assert code == 0, err
    with pytest.raises(DataError) as caught:
        cfa_tool.fit(rider_model, frame, missing_codes=[-99])
    assert "give it with missing_codes=[-99, 'Ne sait pas']" in str(caught.value)
    # one cell: its own message, which keeps them too
    one = rider_demo.astype(object)
    one.loc[3, "on_time"] = "Ne sait pas"
    with pytest.raises(DataError) as caught:
        cfa_tool.fit(rider_model, one, missing_codes=[-99, 8])
    assert "holds text ('Ne sait pas' in row labelled 3) among numbers" in str(caught.value)
    assert "give it with missing_codes=[-99, 8, 'Ne sait pas']" in str(caught.value)
    # explore reads a word among numbers by the same message
    with pytest.raises(DataError) as caught:
        cfa_tool.explore(one, items=[c for c in rider_demo.columns if c not in ("rider_id", "district")],
                         missing_codes=[-99])
    assert "give it with missing_codes=[-99, 'Ne sait pas']" in str(caught.value)
    # the caller's data frame keeps no mark of the run
    assert one.attrs == {} and frame.attrs == {}


def test_answers_outside_a_declared_scale_keep_the_codes_given(rider_demo, rider_model):
    frame = rider_demo.copy()
    frame.loc[[4, 8], "short_wait"] = 9
    frame.loc[[2], "clean"] = -99
    with pytest.raises(ModelError) as caught:
        cfa_tool.check(rider_model + "reversed short_wait on 1 to 5\n", frame, missing_codes=[-99, "Ne sait pas"])
    assert "give missing_codes=[-99, 'Ne sait pas', 9] (or correct them in a copy of the file)" in str(caught.value)
    # a partner item answered mostly outside the scale: named, with the same list
    doubled = rider_demo.assign(accurate_info=rider_demo["accurate_info"] * 2)
    result = cfa_tool.fit(rider_model + "reversed on_time on 1 to 5\n", doubled, missing_codes=[-99])
    named = [str(w) for w in result.warnings if "'accurate_info' has the answer 6" in str(w)]
    assert len(named) == 1 and named[0].endswith("give missing_codes=[-99, 6]")


def _ordinal(n: int, seed: int) -> pd.DataFrame:
    """Four ordinal items of one factor (loadings .7 on the latent responses), cut into answers 1 to 4."""
    rng = np.random.default_rng(seed)
    x = rng.normal(size=(n, 1)) * 0.7 + rng.normal(size=(n, 4)) * np.sqrt(0.51)
    return pd.DataFrame(np.searchsorted([-0.8, 0.0, 0.8], x) + 1, columns=["q1", "q2", "q3", "q4"])


def test_a_category_no_one_in_a_group_answered_keeps_the_codes_given():
    a, b = _ordinal(300, 1), _ordinal(300, 2)
    a.loc[[5, 6], "q2"] = 9  # a code no one in the other group gave
    a.loc[[7], "q3"] = -99
    data = pd.concat([a.assign(site="north"), b.assign(site="south")], ignore_index=True)
    with pytest.raises(DataError) as caught:
        cfa_tool.fit("factor f: q1..q4\nordinal q1..q4\n", data, group="site", missing_codes=[-99])
    message = str(caught.value)
    assert "no one answered category 9 on ordinal item 'q2'" in message
    assert "give missing_codes=[-99, 9]; if real" in message


def test_the_table_of_answers_per_category_keeps_the_codes_given(rider_demo, rider_model, tmp_path, capsys):
    """The note of the table of answers per category (check's and an ordinal fit's) advises giving an answer at the
    end of the scale given by one row as a code of no answer: after the codes the run gave."""
    from cfa_tool.reporting.tables import category_table

    frame = rider_demo.copy()
    frame.loc[140, "on_time"] = 0  # one row's answer below the scale 1 to 5
    frame.loc[141, "clean"] = -99
    advice = "if 0 is a typing error or a code for no answer, give --missing-codes -99,0; from Python, " \
             "missing_codes=[-99, 0];"
    table = category_table(cfa_tool.fit(rider_model, frame, missing_codes=[-99], ordinal="all"))
    assert advice in " ".join(str(table.note).split())
    data, model = tmp_path / "survey.csv", tmp_path / "m.cfa"
    frame.to_csv(data, index=False)
    model.write_text(rider_model)
    code, out, _ = run_cli(["check", model, "--data", data, "--missing-codes=-99", "--ordinal", "all"], capsys)
    assert code == 0 and advice in " ".join(out.replace("│", " ").split())
