"""The notes and cautions of reading the data name an option as the caller wrote it: '--missing-codes -99' on the
command line, 'missing_codes=[-99]' in Python (review s12: data/missing_codes.py, matching.py, odd_values.py,
non_answers.py and readers.py wrote '--missing-codes' and '--sheet' as literal text, also to Python callers)."""

from __future__ import annotations

import pandas as pd

import cfa_tool
from cfa_tool import cli
from tests.commands.test_cli import DATA, MODEL


def _with_code(tmp_path):
    """The rider survey with -99 (a forgotten missing-value code) in 15 answers of on_time."""
    frame = pd.read_csv(DATA)
    frame.loc[frame.index[:15], "on_time"] = -99
    path = tmp_path / "coded.csv"
    frame.to_csv(path, index=False)
    return frame, path


def test_missing_code_advice_and_notes_name_the_keyword_in_python(tmp_path):
    frame, _ = _with_code(tmp_path)
    result = cfa_tool.fit(MODEL, frame, missing_codes=[77])
    said = " ".join([f"{p.explanation} {p.advice}" for p in result.problems] + list(map(str, result.warnings)))
    assert "missing_codes=[77, -99]" in said  # the odd value's advice, the code given kept (s22)
    assert "codes given with missing_codes=" in said  # the note that no cell holds 77
    assert "--missing-codes" not in said


def test_missing_code_advice_and_notes_name_the_flag_on_the_command_line(tmp_path, capsys):
    _, path = _with_code(tmp_path)
    report = tmp_path / "report.md"
    assert cli.main(["fit", str(MODEL), "--data", str(path), "--missing-codes", "77", "--markdown", str(report)]) == 0
    text = " ".join(report.read_text(encoding="utf-8").split())
    assert "give --missing-codes 77,-99" in text and "codes given with --missing-codes (77)" in text
    assert "missing_codes=" not in text
