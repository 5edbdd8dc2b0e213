"""A scores file is merged back into the data by id: ids that name several rows are a caution first in every view
of the scores (a hostile trial found it said only in a note far down the report, while the file held two rows of
'R0005' with different scores).  Data: the bundled demo (a fictional transit agency's rider survey)."""

from __future__ import annotations

import json

import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def _riders() -> pd.DataFrame:
    rows = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rows.loc[5, "rider_id"] = rows.loc[4, "rider_id"]
    return rows


def test_a_repeated_id_is_a_caution_first_when_scoring(tmp_path, capsys):
    rows = _riders()
    result = cfa_tool.scores(MODEL, rows, id_column="rider_id")
    first = result.fit.problems[0]
    assert first.kind is ProblemKind.REPEATED_IDS and not first.kind.inadmissible
    # s20: the id and its rows named (index labels 4 and 5 of the data frame, the pair planted above)
    assert f"The id column 'rider_id' gives one id to 2 rows: '{rows.loc[4, 'rider_id']}' in rows labelled 4, 5" \
        in first.explanation
    assert not any("repeat" in note for note in result.notes)  # said once, first
    table = result.table
    assert (table["rider_id"] == rows.loc[4, "rider_id"]).sum() == 2  # both rows are scored, each its own
    # the command line: first on the terminal, and in the JSON's problems
    data, out = tmp_path / "riders.csv", tmp_path / "scores.json"
    rows.to_csv(data, index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    assert main(["scores", str(tmp_path / "m.cfa"), "--data", str(data), "--id", "rider_id", "--output",
                 str(tmp_path / "s.csv"), "--json", str(out)]) == 0
    printed = capsys.readouterr().out
    assert f"gives one id to 2 rows: '{rows.loc[4, 'rider_id']}' in rows 6, 7" in " ".join(printed.split()[:40])
    kinds = [p["kind"] for p in json.loads(out.read_text())["problems"]]
    assert kinds[0] == ProblemKind.REPEATED_IDS.value
