"""A description of the data is never put in parentheses inside parentheses.

New-user trial 18: replicate's cautions named each fit 'The loose refit (data/belonging.dta (half B, seed 11))', and
the methods paragraph of fit, compare and scores on one half said the rows analysed as '(N = 240 of the 480 rows in
the data file, those where the row fell in half A of two random halves (seed 11; listed in halves.csv); ...)';
a row filter's rows left out for an empty cell ('(54 rows with no value of district left out)') and replicate's
samples ('(N = 240 ...; used pairwise (each item's thresholds ...) ... (Little & Rubin, 2002))') nested the same
way, and so did the rows without a group ('(N = ...; 29 of 480 rows had no value in the group column (district)
...)').  Each command is run on the command line and its terminal report, Markdown and Word file are read: no
parenthesis inside another one names the data (a file, a half, rows, a filter, a sample), and none is inside the
description of the rows analysed.
"""

from __future__ import annotations

import re

import pytest

from tests.conftest import run_cli

#: words of a description of the data (what a parenthesis inside another must not hold); an option in parentheses
#: ('(--incomplete-rows listwise)') is no description of the data, nor the title of a table the terminal goes on
#: with ('(Items: descriptive statistics (analysed rows), continued)')
DATA_WORDS = re.compile(r"rider|half|(?<![-\w])rows|seed|listed in|left out|N = |Little & Rubin|pairwise")


def nested(text: str) -> list[str]:
    """Each outermost parenthesis of ``text`` that holds another one naming the data, or that describes the rows
    analysed ('(N = 240 ...') and holds any other."""
    found, opened, bad = [], [], set()
    for i, ch in enumerate(text):
        if ch == "(":
            opened.append(i)
        elif ch == ")" and opened:
            start = opened.pop()
            if opened and (DATA_WORDS.search(text[start:i + 1]) and not text.startswith("(--", start)
                           or text.startswith("(N = ", opened[0])):
                bad.add(opened[0])
            elif not opened and start in bad and not text.endswith(", continued)", 0, i + 1):
                found.append(text[start:i + 1][:300])
    return found


def test_the_measure_finds_a_description_in_parentheses_in_parentheses():
    assert nested("The loose refit (d.dta (half B, seed 11)): poor fit (CFI .86, below .90)") == [
        "(d.dta (half B, seed 11))"]
    assert nested("(N = 9; 2 rows had no value in the group column (g))") == ["(N = 9; 2 rows had no value in the "
                                                                             "group column (g))"]
    assert nested("fit (\u03c7\u00b2(44) = 46.30, p = .378) and (a table (sample minus model), continued)") == []


def _word_text(path) -> str:
    from docx import Document

    document = Document(str(path))
    cells = [cell.text for table in document.tables for row in table.rows for cell in row.cells]
    return "\n".join([p.text for p in document.paragraphs] + cells)


def _flat(text: str) -> str:
    """A terminal report's words as one line: its box borders and line breaks taken out."""
    return " ".join(re.sub(r"[\u2500-\u257f]", " ", text).split())


@pytest.fixture(scope="module")
def files(tmp_path_factory, rider_demo):
    folder = tmp_path_factory.mktemp("nested")
    data = rider_demo.copy()
    data.loc[::17, "district"] = None  # a filter on district leaves these rows out
    data.to_csv(folder / "rider.csv", index=False)
    data.iloc[:240].to_csv(folder / "first.csv", index=False)
    data.iloc[240:].to_csv(folder / "second.csv", index=False)
    return folder


@pytest.mark.parametrize("command", ["replicate halves", "replicate two files", "fit half", "compare half",
                                     "scores half", "fit groups"])
def test_no_description_of_the_data_in_parentheses_in_parentheses(files, rider_model, capsys, command):
    from cfa_tool.resources import resource_dir

    model, other = resource_dir("models") / "rider_one_factor.cfa", resource_dir("models") / "rider_three_factors.cfa"
    data, halves = files / "rider.csv", files / "halves.csv"
    keep = ["--keep", "district != north"]
    if not halves.exists():
        code, _, err = run_cli(["replicate", other, "--data", data, *keep, "--seed", "11", "--halves-file", halves],
                               capsys)
        assert code == 0, err
    stem = files / command.replace(" ", "_")
    outputs = ["--markdown", f"{stem}.md", "--docx", f"{stem}.docx"]
    argv = {"replicate halves": ["replicate", model, "--data", data, *keep, "--seed", "11"],
            "replicate two files": ["replicate", model, "--calibration", files / "first.csv", "--validation",
                                    files / "second.csv", *keep],
            "fit half": ["fit", model, "--data", data, *keep, "--half", halves, "A"],
            "compare half": ["compare", model, other, "--data", data, *keep, "--half", halves, "A"],
            "scores half": ["scores", model, "--data", data, *keep, "--half", halves, "A", "--output",
                            f"{stem}.csv"],
            "fit groups": ["fit", model, "--data", data, "--group-column", "district"]}[command]
    code, out, err = run_cli(argv + outputs, capsys)
    assert code == 0, err
    texts = {"terminal": _flat(out), "Markdown": (stem.with_suffix(".md")).read_text(encoding="utf-8").replace("\\", ""),
             "Word": _word_text(stem.with_suffix(".docx"))}
    for view, text in texts.items():
        assert "rows in" in text or "rows read" in text, view  # the description of the data is there
        assert nested(text) == [], view
