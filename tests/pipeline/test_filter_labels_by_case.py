"""A row filter whose text the column also holds in other upper and lower case ('district = north' with 'North'
rows) is a caution first in every command taking --keep (hostile trial s13, H1): the filter matched exactly and left
the 'North' rows out with no word, while --group-column on the same file put a caution first.  The tool keeps the
exact match (only the researcher knows whether 'North' and 'north' are one district, as for the group column) and
says so first.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed) with every third
district label written capitalised; the rows of each label are counted with pandas, not by the tool."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from tests.conftest import run_cli


@pytest.fixture(scope="module")
def mixed(rider_demo):
    frame = rider_demo.copy()
    frame.loc[frame.index[::3], "district"] = frame.loc[frame.index[::3], "district"].str.title()
    frame.loc[frame.index[1::5], "district"] = frame.loc[frame.index[1::5], "district"] + " "  # merged already
    return frame


def test_keep_says_first_the_rows_written_in_other_case(mixed, rider_model):
    capital = int((mixed["district"].str.strip() == "North").sum())  # counted by pandas
    kept = cfa_tool.fit(rider_model, mixed, keep="district = north")
    said = (f"Row filter 'district = north' matches text exactly, upper and lower case included, and 'district' also "
            f"holds 'North' ({capital} rows), which differs from 'north' only in case: the filter left it out.")
    assert (kept.problems[0].kind, kept.problems[0].explanation) == (ProblemKind.FILTER_LABELS_BY_CASE, said)
    assert "recode 'district'" in kept.problems[0].advice
    assert kept.n_obs == int((mixed["district"].str.strip() == "north").sum())  # exact match kept
    other = cfa_tool.fit(rider_model, mixed, keep="district != north")
    assert other.problems[0].explanation.endswith("the filter kept it.")
    # a file written in one case says nothing of the kind
    plain = cfa_tool.fit(rider_model, mixed.assign(district=mixed["district"].str.lower()), keep="district = north")
    assert ProblemKind.FILTER_LABELS_BY_CASE not in [p.kind for p in plain.problems]


def test_every_command_taking_keep_says_it_first(mixed, rider_model, tmp_path, capsys):
    model, data, half = tmp_path / "m.cfa", tmp_path / "survey.csv", tmp_path / "first.csv"
    model.write_text(rider_model)
    mixed.iloc[240:].to_csv(data, index=False)
    mixed.iloc[:240].to_csv(half, index=False)
    saved = tmp_path / "r.json"
    commands = {"fit": [model, "--data", data], "check": [model, "--data", data],
                "replicate": [model, "--calibration", half, "--validation", data], "explore": ["--data", data]}
    for command, rest in commands.items():
        code, out, _ = run_cli([command, *rest, "--keep", "district = north", "--json", saved], capsys)
        words = " ".join(out.replace("│", " ").replace("┃", " ").split())
        assert (code, words.find("also holds 'North' (") in range(300)) == (0, True), command  # first
        assert ProblemKind.FILTER_LABELS_BY_CASE.value in saved.read_text(), command
