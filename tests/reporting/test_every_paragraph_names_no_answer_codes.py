"""Every methods paragraph says what was read as no answer, by the one rule of fit's (pipeline.inputs.
with_missing_reading, then reporting.paragraph._read_as_missing): the paragraphs of scores and replicate left out
the codes 8 and 9 that fit's named (new-user trial s18, finding 5), though docs/data-files.md promises them in the
methods paragraph."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph, replication_paragraph, scores_paragraph
from cfa_tool.workflows.replication import Replications, replicate, split_half

SAID = "the code 9, declared to mean no answer, was treated as missing"


def _flat(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture(scope="module")
def coded(rider_demo):
    data = rider_demo.copy()
    data.loc[[3, 40, 77, 150], "clean"] = 9  # 'no answer' coded 9 on an answer scale of 1 to 5
    data.loc[[5, 90], "greeting"] = 9
    return data


def test_fit_and_scores_say_it_alike(rider_model, coded):
    assert SAID in _flat(methods_paragraph(cfa_tool.fit(rider_model, coded, missing_codes=[9])))  # the rule
    scored = cfa_tool.scores(rider_model, coded, missing_codes=[9])
    assert SAID in _flat(scores_paragraph(scored))


def test_replicate_of_halves_says_it_once(rider_model, coded):
    text = _flat(replication_paragraph(Replications(split_half(rider_model, coded, seed=3, missing_codes=[9]))))
    capital = f"{SAID[0].upper()}{SAID[1:]}"
    assert text.count(capital) == 1 and f"{capital}." in text and "In the data file," not in text


def test_replicate_of_halves_names_the_file_once(rider_model, rider_demo, tmp_path):
    """New-user trial s21: 'In the data file, values the data file marks as no answer were treated as missing'."""
    data = rider_demo.copy()
    data["clean"] = data["clean"].astype(object)
    data.loc[[3, 40, 77, 150], "clean"] = "Prefer not to say"
    data.to_csv(tmp_path / "riders.csv", index=False)
    text = _flat(replication_paragraph(Replications(split_half(rider_model, tmp_path / "riders.csv", seed=3))))
    assert "Values the data file marks as no answer were treated as missing ('Prefer not to say' in clean)" in text
    assert text.count("data file marks as no answer") == 1 and "In the data file" not in text


def test_replicate_of_two_files_says_it_of_each(rider_model, coded, tmp_path):
    paths = [tmp_path / "spring.csv", tmp_path / "autumn.csv"]
    coded.iloc[:240].to_csv(paths[0], index=False)
    coded.iloc[240:].to_csv(paths[1], index=False)
    text = _flat(replication_paragraph(Replications((replicate(rider_model, *paths, missing_codes=[9]),))))
    # every 9 sits in the first 240 rows: autumn's file held none, so nothing in it was treated as missing
    assert f"In {paths[0]}, {SAID}." in text and str(paths[1]) + ", the code 9" not in text
