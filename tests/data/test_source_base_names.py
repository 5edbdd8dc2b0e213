"""Messages about a data file name it by its own name, without its folders, by one rule
(cfa_tool.input_files.base_name), whichever separator its path uses: a path written on Windows ('\\') and one
written elsewhere ('/') give the same name in every message that names the file."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.data.matching import check_columns
from cfa_tool.data.non_answers import NonAnswer, NonAnswerKind, non_answer_note
from cfa_tool.data.odd_values import odd_values
from cfa_tool.errors import ModelError
from cfa_tool.input_files import base_name
from cfa_tool.language.parser import parse_model

PATHS = ("C:\\surveys\\2026\\riders.csv", "/home/analyst/surveys/riders.csv", "surveys/riders.csv", "riders.csv")


@pytest.mark.parametrize("path", PATHS)
def test_base_name_drops_the_folders_of_either_kind_of_path(path):
    assert base_name(path) == "riders.csv"


def test_a_source_that_is_no_file_keeps_its_name():
    assert base_name("<data frame>") == "<data frame>"


@pytest.mark.parametrize("path", PATHS[:2])
def test_every_message_naming_the_data_file_uses_its_base_name(path):
    spec = parse_model("factor comfort: q1, q2, q9\n")
    with pytest.raises(ModelError) as unknown:
        check_columns(spec, ["q1", "q2", "q3"], path)
    rng = np.random.default_rng(3)
    frame = pd.DataFrame(np.clip(np.round(3 + rng.standard_normal((60, 3))), 1, 5), columns=["q1", "q2", "q3"])
    frame.loc[[2, 7], "q2"] = -99  # a missing-value code read as answers
    caution = odd_values(frame, ["q1", "q2", "q3"])[0].caution(path)
    refused = non_answer_note((NonAnswer(NonAnswerKind.LABELLED, "q1", 8.0, "refused", (4,)),), path)
    for text in (str(unknown.value), caution, refused):
        assert "riders.csv" in text and "surveys" not in text, text
