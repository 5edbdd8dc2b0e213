"""An exploration is one report (cfa_tool.reporting.document.Report) drawn by the shared renderers, and it says
every word and number its former layout of its own said: the words of that layout's terminal text, HTML page
and Markdown file, kept for two seeded runs on the Holzinger & Swineford (1939) data in
data/explore_words_before.json, are all found in the same format of the report model's views (layout may change).
The scree plot's former axis values (five even splits of the range) were taken out of the kept words when the
axis got round values; the caution's '--split SEED' when the report names the option as the caller writes it
(options.Option: 'split=...' from Python); the close-fit rule's '0.05' became '.05' ('05' once its dot is stripped)
when it was written as every other RMSEA guide is (new-user trial s21); a loading's '.00' ('00'), '.01' and '-.01' once a
value below the last decimal's unit was printed to its two significant digits, never as a rounded zero (s23: '.0046',
'-.0059')."""

from __future__ import annotations

import json
import re
from dataclasses import replace
from pathlib import Path

import pytest

from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown
from tests.reporting.explore_words import CASES, case, html_words, markdown_words, words

BEFORE = json.loads((Path(__file__).parent / "data" / "explore_words_before.json").read_text())


@pytest.fixture(scope="module", params=sorted(CASES))
def shown(request):
    result = case(request.param)
    report = report_of(result)
    return request.param, result, report


def test_every_word_and_number_of_the_former_layout_is_in_each_format(shown):
    name, result, report = shown
    views = {"text": words(report_text(report)), "html": html_words(report_html(report)),
             "markdown": markdown_words(report_markdown(report))}
    for view, found in views.items():
        missing = set(BEFORE[name][view]) - found
        assert not missing, f"{name}, {view}: {sorted(missing)}"
    # the objects show the same report: the notebook's HTML and the summary text
    assert html_words(result._repr_html_()) >= set(BEFORE[name]["html"]) - {"Made", "by", "cfa-tool", "VERSION"}  # (the page's last line)
    assert words(result.summary()) == views["text"]


def test_the_report_holds_the_scree_plot_the_draft_model_and_the_sections(shown):
    name, result, report = shown
    assert [f.title for f in report.figures] == ["Scree plot: eigenvalues beside those of random data"]
    assert "<polyline" in report.figures[0].svg
    assert [(x.title, x.text) for x in report.listings] == [("Draft model", result.draft_text)]
    sections = [t.section for t in report.tables]
    assert sections[:3] == ["How many factors"] * 3
    assert sections[3] == f"The {result.factors}-factor solution"
    assert ("Confirmation half: the draft model fitted" in sections) == (result.split is not None)
    assert report.warnings == result.notes
    if name == "four_factors":  # the Heywood case comes first in every view
        assert report.notice is not None and report.notice.lines[0].startswith("Heywood case")
        assert report_markdown(report).startswith("## Check before interpreting this solution")
        page = report_html(report)
        assert page.index('id="problems"') < page.index("<h1>")


def test_the_scree_plot_axis_has_round_values():
    # new-user trial: the axis read 4.0, 3.0, 1.9, 0.9, -0.2
    from cfa_tool.reporting.explore_report import nice_ticks

    assert nice_ticks(-0.2, 4.0) == [0.0, 1.0, 2.0, 3.0, 4.0]
    assert nice_ticks(0.0, 1.37) == [0.0, 0.5, 1.0]
    assert nice_ticks(-0.05, 0.4) == [0.0, 0.1, 0.2, 0.3, 0.4]
    assert all(f"{t:g}" != "-0" for t in nice_ticks(-0.2, 4.0))


def test_a_problem_column_only_where_a_row_has_a_problem(shown):
    # new-user trial: an always-empty "Problem" column spilled the tables into "(..., continued)" parts
    name, result, report = shown
    fits = next(t for t in report.tables if t.key == "solution_fits")
    pattern = next(t for t in report.tables if t.key == "pattern")
    improper = [str(step.factors) for step in result.fits if step.improper]
    assert ("Problem" in fits.columns) == bool(improper)
    at_bound = [row[0] for row in pattern.rows if row[0] in result.exploration.solution.at_bound]
    assert ("Problem" in pattern.columns) == bool(at_bound)
    if improper:  # the marks stand in the rows of the improper solutions and nowhere else
        marked = [row[0] for row in fits.rows if row[fits.columns.index("Problem")]]
        assert marked == improper
    if at_bound:
        marked = [row[0] for row in pattern.rows if row[pattern.columns.index("Problem")]]
        assert marked == at_bound
    assert all(len(row) == len(t.columns) for t in (fits, pattern) for row in t.rows)
    assert name != "four_factors" or at_bound  # the Heywood case of the four factors keeps its column
    assert name != "split" or not at_bound


def test_the_draft_model_printed_in_a_narrow_terminal_is_the_same_model(shown):
    # new-user trial: the draft's '#' comment lines wrapped in an 80-column terminal, continuing without '#', so the
    # printed draft could not be copied as a model
    from cfa_tool.language.parser import parse_model

    _, result, report = shown
    printed = report_text(report, width=80).splitlines()
    assert max(len(line) for line in result.draft_text.splitlines()) <= 78  # the draft file's own lines fit a terminal
    start = printed.index("Draft model") + 1
    end = next(k for k in range(start, len(printed)) if printed[k].startswith(str(report.notes[0])[:30]))  # the next part
    listing = printed[start:end]
    assert max(len(line) for line in printed) <= 80
    copied = "\n".join(listing)
    model_lines = [x for x in copied.splitlines() if x.strip() and not x.lstrip().startswith("#")]
    def model(text: str) -> str:  # the model read, without its text and the places of its words
        return re.sub(r"Location\([^)]*\)", "", repr(replace(parse_model(text), text="")))

    assert model(copied) == model(result.draft_text)  # copied from the terminal: the same model
    assert model_lines == [x for x in result.draft_text.splitlines() if x.strip() and not x.lstrip().startswith("#")]

    def comments(text: str) -> list[str]:
        return " ".join(x.lstrip()[1:] for x in text.splitlines() if x.lstrip().startswith("#")).split()

    assert comments(copied) == comments(result.draft_text)  # the comments' words, every one behind a '#'


def test_the_loadings_note_says_how_signs_are_set(shown):
    from cfa_tool.exploration.rotation import ORIENTATION_RULE

    _, _, report = shown
    pattern = next(t for t in report.tables if t.key == "pattern")
    assert ORIENTATION_RULE in pattern.note and "most of its loadings of .30 or more" in ORIENTATION_RULE
