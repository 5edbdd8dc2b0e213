"""A note's advice to the program's user is a part of its own (cfa_tool.note_parts.Command): the terminal, Markdown
and HTML views, whose reader runs the program, name the option; the Word file, a manuscript, keeps the words and
names no option.  A note that refers to another table of the report names it as each view names its tables: by
number in Word, by title elsewhere."""

from __future__ import annotations

import html
import io
import json
import re

import docx
import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.options import on_command_line
from cfa_tool.note_parts import WORDS, Command, Note, TableReference, View, numbered, said, titled
from cfa_tool.reporting.document import Report
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.json_report import to_json
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown
from cfa_tool.resources import resource_dir
from tests.conftest import THREE_FACTORS, holzinger_swineford

OPTION = re.compile(r"--[a-z]")


def _word_text(data: bytes) -> str:
    """Every paragraph and table cell of a Word file, as python-docx reads them."""
    document = docx.Document(io.BytesIO(data))
    return " ".join([p.text for p in document.paragraphs]
                    + [cell.text for table in document.tables for row in table.rows for cell in row.cells])


def _flat(text: str) -> str:
    return " ".join(text.split())


@pytest.fixture(scope="module")
def fits():
    """Three fits whose notes give advice: rows left out listwise (Holzinger & Swineford's data with 40 answers of
    x1 removed: full-information ML would keep them; their answers depart from normality: the robust test), the demo's
    rows with gaps fitted by full-information ML (a fit of the complete rows only would leave them out; Mardia's
    tests need complete rows; auxiliary variables enter the likelihood as missing-data helpers), and the same with a
    helper (an invented age column, fixed seed); fitted as the command line fits, whose options the advice names
    (options.on_command_line)."""
    data = holzinger_swineford()
    data.loc[data.index[:40], "x1"] = np.nan
    demo = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    model = (resource_dir("models") / "rider_three_factors.cfa").read_text()
    aged = demo.assign(age=np.random.default_rng(15).integers(18, 80, len(demo)))
    with on_command_line():
        return _fits(data, demo, model, aged)


def _fits(data, demo, model, aged):
    return {"listwise": (cfa_tool.fit(THREE_FACTORS, data, missing="listwise"),
                         ("--incomplete-rows full-information", "--robust; from Python, test='robust'")),
            "gaps": (cfa_tool.fit(model, demo),
                     ("--incomplete-rows listwise", "--missing-helpers (from Python, missing_helpers=[...])",
                      "--robust; from Python, test='robust'")),
            "helpers": (cfa_tool.fit(model, aged, missing_helpers=["age"]),
                        ("--incomplete-rows listwise", "--missing-helpers (from Python, missing_helpers=[...])"))}


@pytest.mark.parametrize("case", ["listwise", "gaps", "helpers"])
def test_the_word_file_names_no_option_and_the_terminal_names_each(fits, case):
    result, options = fits[case]
    report = fit_report(result)
    word = _word_text(report_docx(report, 72))
    assert not OPTION.search(word), OPTION.search(word)
    terminal = _flat(report_text(report, 3000))
    page = html.unescape(report_html(report))
    for option in options:
        assert option in terminal and option in page
    assert set(OPTION.findall(report_markdown(report))) == set(OPTION.findall(terminal))


def test_the_word_file_keeps_the_advice_in_words(fits):
    listwise, gaps = _word_text(report_docx(fit_report(fits["listwise"][0]), 72)), \
        _word_text(report_docx(fit_report(fits["gaps"][0]), 72))
    assert "What to try: full-information ML would use every answer they have." in listwise
    assert "consider the scaled test and robust standard errors." in listwise
    # the statement stays whole where the command was in the middle of it
    assert ", the default when answers are missing; a fit of the complete rows only would leave those rows out" in gaps
    assert ("the items analysed, and any auxiliary variables, which enter the likelihood beside the model without "
            "changing it (Graham 2003)") in gaps


def test_missing_data_helpers_are_not_advised_the_remedies_they_refuse(fits):
    # with helpers, a fit of the complete rows only and the robust test are refused (pipeline.continuous,
    # pipeline.inputs): the note on Mardia's kurtosis (rows with gaps, each on the items it answered) names neither,
    # though the answers depart from normality (z = -2.27)
    report = fit_report(fits["helpers"][0])
    note = said(next(t for t in report.tables if t.key == "fit").note)
    assert "each on the items it answered" in note and "are not offered with missing-data helpers" in note
    assert "--robust" not in note and "--incomplete-rows" not in note
    assert "--robust" in said(next(t for t in fit_report(fits["gaps"][0]).tables if t.key == "fit").note)
    for refused in ({"missing": "listwise"}, {"test": "robust"}):
        with pytest.raises(cfa_tool.errors.OptionError):
            cfa_tool.fit((resource_dir("models") / "rider_three_factors.cfa").read_text(),
                         pd.read_csv(resource_dir("demo") / "rider_survey.csv").assign(age=1.0),
                         missing_helpers=["age"], **refused)


def test_a_saved_report_keeps_the_advice_apart_and_the_json_result_says_it_in_full(fits):
    result = fits["gaps"][0]
    payload = json.loads(to_json(result))
    report = Report.from_dict(payload["report"])
    fresh = fit_report(result)
    assert report.warnings == fresh.warnings and [t.note for t in report.tables] == [t.note for t in fresh.tables]
    assert any(isinstance(w, Note) for w in report.warnings)
    assert not OPTION.search(_word_text(report_docx(report, 72)))
    # the result's own warnings, for a program that reads the JSON, as the program's user reads them
    assert any("(--incomplete-rows listwise)" in w for w in payload["warnings"])


def test_a_note_is_said_as_each_view_says_it():
    note = Note(("see ", TableReference("b"), "; choose another", Command(" with --this", " in words"), "."))
    tables = [type("T", (), {"key": k, "title": t})() for k, t in (("a", "First"), ("b", "Second"))]
    assert said(note, titled(tables)) == 'see the table "Second"; choose another with --this.'
    assert said(note, numbered(tables)) == "see Table 2; choose another in words."
    assert said(note, View(False)) == "see a table of this report; choose another in words."
    assert Note.from_dict(json.loads(json.dumps(note.to_dict()))) == note
    assert str("x " + note + " y") == "x see a table of this report; choose another with --this. y"
    assert said("plain words", WORDS) == "plain words"


def test_a_power_simulation_names_its_population_table_as_each_view_names_tables():
    # its note said "the table below" in every view; Word numbers its tables, and a result read back without its
    # population has no such table
    from dataclasses import replace

    from cfa_tool.language import parse_model
    from cfa_tool.reporting.workflow_tables import montecarlo_report
    from cfa_tool.workflows.montecarlo import monte_carlo_power
    from tests.workflows.test_planning_and_resampling import POPULATION

    result = monte_carlo_power(parse_model(POPULATION), 100, replications=5, seed=4, workers=1)
    report = montecarlo_report(result)
    keys = [t.key for t in report.tables]
    note = report.tables[0].note
    (reference,) = [p for p in note.parts if isinstance(p, TableReference)]
    population = report.tables[keys.index(reference.key)]
    assert population is not report.tables[0]
    assert f"Population values are in Table {keys.index(reference.key) + 1};" in _word_text(report_docx(report, 72))
    assert f'Population values are in the table "{population.title}";' in _flat(report_text(report, 3000))
    bare = montecarlo_report(replace(result, population=None))
    assert len(bare.tables) == 1 and bare.tables[0].note.endswith("Mean estimates and SDs are in the JSON result.")
