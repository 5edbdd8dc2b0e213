"""The empty category of ordinal items in groups (a category no one in a group chose), when the answers are words:
the error names the model file's own way to merge it into the nearest category answered (an 'answers' statement of
the item that gives their words one code), not a recoded copy of the data file; answers recorded as codes keep the
advice to recode a copy (the model language codes words only).  Check value: the fit with the suggested statement
equals the fit of the codes recoded by pandas (1 as 2 in q2), which this tool did not write.  Data simulated here
with a fixed seed (the rows of tests/pipeline/test_ordinal_groups.py)."""

from __future__ import annotations

import re

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import DataError
from tests.pipeline.test_ordinal_groups import MODEL, _draw

WORDS = {1: "Never", 2: "Rarely", 3: "Sometimes", 4: "Often", 5: "Always"}
SCALE = 'answers "Never" = 1, "Rarely" = 2, "Sometimes" = 3, "Often" = 4, "Always" = 5\n'


def _groups() -> pd.DataFrame:
    a, b = _draw(300, 1), _draw(300, 2)
    b.loc[b.q2 == 1, "q2"] = 2  # the south group never chose category 1 of q2 ('Never')
    return pd.concat([a.assign(site="north"), b.assign(site="south")], ignore_index=True)


def test_words_are_merged_by_a_statement_of_the_model_and_the_fit_equals_the_recoded_codes(tmp_path):
    codes = _groups()
    words = codes.copy()
    for x in ("q1", "q2", "q3", "q4", "q5", "q6"):
        words[x] = words[x].map(WORDS)
    path = tmp_path / "words.csv"
    words.to_csv(path, index=False)
    with pytest.raises(DataError) as found:
        cfa_tool.fit(MODEL + SCALE, str(path), group="site")
    message = str(found.value)
    statement = 'answers "Never" = 2, "Rarely" = 2, "Sometimes" = 3, "Often" = 4, "Always" = 5 for q2'
    assert "the answers of 'q2' are words, so the model file can give an empty category's words the code" in message
    assert statement in message
    assert "copy of the data file" not in message and "--missing-codes" not in message and "missing_codes" not in message
    merged = cfa_tool.fit(MODEL + SCALE + statement + "\n", str(path), group="site")
    assert any(re.search(r"'Never' and 'Rarely' share the code 2", str(w)) for w in merged.warnings)
    # the reference: the codes recoded by pandas, 1 as 2 in q2 (every group)
    recoded = codes.copy()
    recoded.loc[recoded.q2 == 1, "q2"] = 2
    direct = cfa_tool.fit(MODEL, recoded, group="site")
    assert merged.n_obs == direct.n_obs == 600
    assert merged.fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-8)


def test_codes_keep_the_advice_to_recode_a_copy():
    with pytest.raises(DataError) as found:
        cfa_tool.fit(MODEL, _groups(), group="site")
    message = str(found.value)
    assert ("join each empty category with its nearest category answered, in every group, by a statement of the "
            "model file: 'join answers 1, 2 as 2 for q2'") in message
    assert "answers \"" not in message
