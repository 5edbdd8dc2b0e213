"""Halves drawn cluster by cluster from a handful of clusters are a caution first in every view (hostile s24b, case
10: `replicate --data --cluster district` with the two districts of the demo data made halves that ARE the two
districts; the report said so in its third sentence, after 'split at random into two halves', called them 'two random
halves' in its title and methods text, and no caution came first; `explore --split --cluster district` neither).
The rule is one for both commands (data.halves.few_clusters_caution, in the words of few_clusters_words); the methods
text says what was done: which district went to which half, by a random draw.  The rider survey demo data are
invented (a fictional transit agency), simulated with a fixed seed; their district column has two values."""

from __future__ import annotations

import json
import re

import docx
import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.paragraph import replication_paragraph
from cfa_tool.reporting.reports import report_of
from cfa_tool.resources import resource_dir
from cfa_tool.workflows.replication import Replications, split_half

# these tests read words with a temporary path among them in the terminal report
pytestmark = pytest.mark.usefixtures("wide_terminal")

MODEL = resource_dir("models") / "rider_three_factors.cfa"
DATA = resource_dir("demo") / "rider_survey.csv"
CAUTION = "The halves were drawn cluster by cluster from only 2 clusters of district"


def _flat(text: str) -> str:
    return " ".join(re.sub(r"[│┃╭╮╰╯─━┏┓┗┛]", " ", text).split())


def _word_text(path) -> str:
    return " ".join(p.text for p in docx.Document(str(path)).paragraphs)


def _html_text(path) -> str:
    body = path.read_text(encoding="utf-8").split("<body", 1)[1]
    return " ".join(re.sub(r"<[^>]+>", " ", body).split())


@pytest.mark.parametrize("command", [
    ("replicate", str(MODEL), "--data", str(DATA), "--cluster", "district"),
    ("explore", "--data", str(DATA), "--split", "1", "--cluster", "district", "--factors", "3"),
])
def test_halves_of_two_districts_are_a_caution_first_in_every_view(command, tmp_path, capsys):
    from tests.conftest import run_cli

    outputs = {kind: tmp_path / f"report.{suffix}" for kind, suffix in
               (("--json", "json"), ("--html", "html"), ("--markdown", "md"), ("--docx", "docx"))}
    code, out, _ = run_cli([*command, *(a for kind, path in outputs.items() for a in (kind, path))], capsys)
    assert code == 0
    terminal = _flat(out)
    assert terminal.startswith("Check before interpreting"), terminal[:200]
    assert terminal.index(CAUTION) < terminal.index("Replication in" if command[0] == "replicate" else
                                                    "Exploratory factor analysis")
    # what to do instead, with the options as the terminal's reader runs them
    assert "test invariance across them (cfa-tool invariance MODEL --data FILE --group-column district)" in terminal
    assert "(--strata district in place of --cluster district)" in terminal
    report = json.loads(outputs["--json"].read_text(encoding="utf-8"))["report"]
    assert CAUTION in " ".join(str(part) for part in report["notice"]["lines"][0]["parts"])
    html = _html_text(outputs["--html"])
    assert html.index(CAUTION) < html.index("Replication in" if command[0] == "replicate" else "Data:")
    markdown = " ".join(outputs["--markdown"].read_text(encoding="utf-8").split())
    assert markdown.index(CAUTION) < markdown.index("rows of the file" if command[0] == "replicate" else "Data:")
    word = _word_text(outputs["--docx"])
    assert word.startswith("Check before interpreting") and CAUTION in word[:300]
    assert "--strata" not in word and "--group-column" not in word  # a manuscript names no option


def test_the_replication_says_what_was_done_not_random_halves(rider_demo):
    pair = split_half(MODEL, rider_demo, seed=1, cluster="district")
    report = report_of(Replications(pair))
    assert report.title == "Replication in two halves of only 2 clusters of district, each way"
    first = str(report.lines[0])
    assert first.startswith("The 480 rows of the file were split into two halves by their 2 clusters of district, "
                            "drawn at random: ")
    assert "split at random" not in first and "1 clusters" not in first
    # which district went to which half: the halves' own rows say it
    halves = {name: set(rider_demo.loc[list(rows), "district"]) for name, rows in
              (("A", pair[0].split.half_a), ("B", pair[0].split.half_b))}  # a frame's rows by index label
    assert all(len(d) == 1 for d in halves.values())
    a, b = halves["A"].pop(), halves["B"].pop()
    assert f"{a} to half A and {b} to half B" in first
    paragraph = " ".join(replication_paragraph(Replications(pair)).split())
    assert "random halves" not in paragraph
    assert (f"was examined in two halves of only 2 clusters of district, drawn cluster by cluster (whole clusters of "
            f"district to each half, by a random draw: {a} to half A and {b} to half B)") in paragraph
    assert "(1 cluster in half A, 1 in half B)" in paragraph


def test_explore_says_which_district_each_half_is(rider_demo):
    result = cfa_tool.explore(rider_demo, split=1, cluster="district", factors=3)
    lines = " ".join(str(line) for line in result.summary().split("\n"))
    assert "The rows were divided at random" not in lines
    explored = set(rider_demo.loc[list(result.split.exploration_rows), "district"])
    confirming = set(rider_demo.loc[list(result.split.confirmation_rows), "district"])
    assert len(explored) == len(confirming) == 1
    assert (f"divided into two halves by their 2 clusters of district, drawn at random: {explored.pop()} to the "
            f"exploration half and {confirming.pop()} to the confirmation half") in " ".join(lines.split())


def test_enough_clusters_are_no_caution(rider_demo):
    frame = rider_demo.copy()
    frame["household"] = np.arange(len(frame)) // 4  # 120 clusters: 60 in each half, far above the handful
    pair = split_half(MODEL, frame, seed=1, cluster="household")
    report = report_of(Replications(pair))
    assert report.title == "Replication in two random halves, each way"
    assert report.notice is None or not any("halves were drawn cluster by cluster" in str(line)
                                            for line in report.notice.lines)
    result = cfa_tool.explore(frame, split=1, cluster="household", factors=3)
    assert not any("halves were drawn" in line for line in result.problems())


@pytest.mark.parametrize("draw, name", [(("replicate", str(MODEL), "--data", str(DATA)), "B"),
                                        (("explore", "--data", str(DATA), "--split", "1", "--factors", "3"),
                                         "confirmation")])
def test_one_half_of_such_halves_read_back_is_the_same_caution_first(draw, name, tmp_path, capsys):
    """The neighbour: a fit of one half of their file (--half) analyses one district, which its data line calls 'a
    random half' (hostile s24b's case, one step on)."""
    from tests.conftest import run_cli

    halves = tmp_path / "halves.csv"
    assert run_cli([*draw, "--cluster", "district", "--halves-file", halves], capsys)[0] == 0
    code, out, _ = run_cli(["fit", MODEL, "--data", DATA, "--half", halves, name, "--json", tmp_path / "f.json"],
                           capsys)
    assert code == 0
    terminal = _flat(out)
    phrase = "half B" if name == "B" else "the confirmation half"
    assert terminal.startswith(f"Check before interpreting this solution - The rows analysed are {phrase} of {halves}, "
                               f"and the halves were drawn cluster by cluster from only 2 clusters of district"), \
        terminal[:300]
    saved = json.loads((tmp_path / "f.json").read_text(encoding="utf-8"))
    assert any(p["kind"] == "halves of few clusters" for p in saved["problems"])
    # the methods text names the cluster the half is (hostile s25b: 'half A of two random halves of the clusters')
    paragraph = " ".join(saved["report"]["paragraph"].split())
    assert "two random halves" not in paragraph
    assert re.search(r"the row fell in (half B|the confirmation half), the cluster (north|south) of district \(of 2 "
                     r"clusters drawn into two halves", paragraph), paragraph[:600]

