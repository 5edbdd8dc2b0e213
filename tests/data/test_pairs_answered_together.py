"""A pair of items answered together by few rows (a split-ballot survey, a routing error) is a caution first naming
the pair and its rows, and the failure of full-information ML's saturated model names the pair (hostile trial s16,
case 06: 3 of 471 rows answered both clean and temperature; the ordinal fit said so only inside a note, the
continuous one failed saying 'analyse fewer items')."""

from __future__ import annotations

from itertools import combinations
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.data.moments import FEW_TOGETHER_SHARE, pairs_answered_together
from cfa_tool.errors import EstimationError
from tests.commands.test_cli import run

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "demo" / "rider_survey.csv"  # invented rider survey, simulated with a fixed seed
MODEL = ROOT / "models" / "rider_three_factors.cfa"


def split(overlap: int) -> pd.DataFrame:
    """The demo's complete rows, 'clean' answered by the first half and ``overlap`` more rows, 'temperature' by the
    second half: ``overlap`` rows answer both."""
    frame = pd.read_csv(DATA).dropna().reset_index(drop=True)
    half = len(frame) // 2
    frame.loc[half + overlap:, "clean"] = np.nan
    frame.loc[:half - 1, "temperature"] = np.nan
    return frame


def test_the_pairs_are_counted_as_pandas_counts_them():
    rng = np.random.default_rng(5)
    frame = pd.DataFrame(rng.normal(size=(200, 5)), columns=list("abcde"))
    frame.loc[rng.random(200) < 0.9, "a"] = np.nan  # a: about 20 answers
    frame.loc[frame.index[:150], "b"] = np.nan
    frame.loc[frame.index[40:], "c"] = np.nan  # b and c: no row answers both
    expected = sorted(((x, y, int((frame[x].notna() & frame[y].notna()).sum()))
                       for x, y in combinations(frame.columns, 2)
                       if (frame[x].notna() & frame[y].notna()).sum() < 0.1 * len(frame)), key=lambda t: t[2])
    assert expected  # the check checks something
    assert pairs_answered_together(frame.notna().to_numpy(), list(frame.columns)) == expected
    assert [p[:2] for p in pairs_answered_together(frame.notna().to_numpy(), list(frame.columns), skip=("a",))] == [
        (x, y) for x, y, _ in expected if "a" not in (x, y)]
    assert pairs_answered_together(np.ones((10, 3), bool), list("xyz")) == []


def test_an_ordinal_fit_names_the_pair_and_its_rows_first():
    frame = split(3)
    both = frame.index[frame["clean"].notna() & frame["temperature"].notna()]
    assert len(both) == 3 and len(frame) == 471
    result = cfa_tool.fit(MODEL, frame, ordinal="all")
    first = result.problems[0]
    assert first.kind is ProblemKind.FEW_ANSWERED_TOGETHER and not first.kind.inadmissible
    rows = ", ".join(str(i) for i in both)  # a data frame's rows are named by their index labels
    assert first.explanation.startswith(f"Few of the rows answer both items of the pair 'clean' and 'temperature' "
                                        f"(3 of 471 rows: rows labelled {rows}): its correlation rests on those rows")
    assert "a rule of thumb of this project" in first.explanation
    assert sum(p.kind is ProblemKind.FEW_ANSWERED_TOGETHER for p in result.problems) == 1


def test_the_line_is_a_tenth_of_the_rows():
    # 471 rows: 47 answering both are a tenth (no caution), 46 fewer
    assert FEW_TOGETHER_SHARE == 0.10
    for overlap, said in ((46, True), (48, False)):
        problems = cfa_tool.fit(MODEL, split(overlap), ordinal="all").problems
        assert any(p.kind is ProblemKind.FEW_ANSWERED_TOGETHER for p in problems) is said


def test_the_failure_of_full_information_ml_names_the_pair(tmp_path):
    frame = split(3)
    rows = ", ".join(str(i) for i in frame.index[frame["clean"].notna() & frame["temperature"].notna()])
    with pytest.raises(EstimationError, match=rf"only 3 \(rows labelled {rows}\) of its 471 rows answer both "
                                              r"'clean' and 'temperature'"):
        cfa_tool.fit(MODEL, frame)
    path = tmp_path / "split.csv"
    frame.to_csv(path, index=False)
    done = run("fit", str(MODEL), "--data", str(path))
    assert done.returncode == 3 and len(done.stderr.strip().splitlines()) == 1
    assert "answer both 'clean' and 'temperature'" in done.stderr and "take one of the two items out" in done.stderr


def test_a_pair_few_in_one_group_is_named_with_its_group():
    frame = pd.read_csv(DATA)
    south = frame.index[frame["district"] == "south"]
    frame.loc[south[:110], "clean"] = np.nan
    frame.loc[south[115:], "temperature"] = np.nan  # 5 of south's 230 rows answer both
    result = cfa_tool.fit(MODEL, frame, group="district", ordinal="all")
    said = [p for p in result.problems if p.kind is ProblemKind.FEW_ANSWERED_TOGETHER]
    assert len(said) == 1 and said[0].group == "south" and result.problems[0] is said[0]
    assert said[0].explanation.startswith("Few of this group's rows answer both items of the pair 'clean' and "
                                          "'temperature' (5 of 230 rows")
