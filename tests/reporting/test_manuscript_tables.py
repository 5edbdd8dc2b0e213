"""What a manuscript's tables, notes and figure look like (new user s17, a public-health researcher who pasted the
Word file into a manuscript): tables titled as a journal titles them, not as questions (S4a); one typographic rule
for the printed views, the Word file, the HTML page and the path diagram they show: the true minus (U+2212) and the
signs ≥ and ≤ in the guide cells as in the paragraph, √AVE rather than 'sqrt(AVE)' (S4c, S4d); no table of factor
means that holds only fixed zeros (S4e).

The data are the bundled rider survey (invented, simulated with a fixed seed), and a copy of it with the item
'clean' scored in reverse (6 - answer), whose loading is then negative; Holzinger & Swineford (1939) for groups.
No value here is an estimate: the checks are on words and signs, and on which parameters the fit holds free."""

from __future__ import annotations

import io
import re

import docx
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.reports import report_of
from cfa_tool.resources import resource_dir
from tests.conftest import THREE_FACTORS, holzinger_swineford

HYPHEN_VALUE = re.compile(r"(?<![\w.])-\.?\d")  # a value written with the hyphen-minus ('-.63', '-0.12')


def _word(report) -> tuple[str, list[str]]:
    """The Word file's text (paragraphs and cells) and its table cells alone, no-break spaces read as spaces."""
    document = docx.Document(io.BytesIO(report_docx(report)))
    cells = [c.text.replace("\u00a0", " ") for t in document.tables for r in t.rows for c in r.cells]
    return " ".join([p.text.replace("\u00a0", " ") for p in document.paragraphs] + cells), cells


@pytest.fixture(scope="module")
def reversed_fit(tmp_path_factory):
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    data["clean"] = 6 - data["clean"]  # answers 1 to 5: the item now reads in reverse
    path = tmp_path_factory.mktemp("reversed") / "reversed.csv"
    data.to_csv(path, index=False)
    return cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa", path)


def test_no_table_is_titled_as_a_question(reversed_fit):
    report = report_of(reversed_fit)
    titles = [t.title for t in report.tables]
    assert "Reliability of the scale scores" in titles
    assert "Distinctness of the factors: correlations, HTMT and AVE" in titles
    assert not [t for t in titles if "?" in t], titles


def test_the_printed_views_set_minus_signs_and_relations_by_one_rule(reversed_fit):
    report = report_of(reversed_fit)
    clean = next(r for r in reversed_fit.estimates if r.kind == "loading" and r.variables[1] == "clean")
    assert clean.standardized < 0  # the item scored in reverse loads against its factor
    value = f"{clean.standardized:.2f}".replace("0.", ".")  # '-.79' as the terminal and CSV write it
    printed = "\u2212" + value[1:]
    # the diagram (a figure of the Word file and of the HTML page) writes it as the tables do
    svg = report.figures[0].svg
    assert f">{printed}</text>" in svg and f">{value}</text>" not in svg
    text, cells = _word(report)
    assert printed in cells and not HYPHEN_VALUE.search(" ".join(cells))
    # a guide cell and the paragraph: one sign for 'at least'
    assert "\u2265 .95" in cells and "CFI \u2265 .95" in text
    assert ">=" not in text and "<=" not in text
    assert "sqrt(" not in text and "\u221aAVE > |r|" in " ".join(text.split())
    html = report_html(report)
    assert "&gt;=" not in html and "&lt;=" not in html and f">{printed}</td>" in html


def test_a_table_of_factor_means_fixed_at_zero_is_left_out(reversed_fit):
    report = report_of(reversed_fit)
    assert all(not r.free and r.estimate == 0.0 for r in reversed_fit.estimates if r.kind == "mean")
    assert "Factor means" not in [t.title for t in report.tables]
    intercepts = next(t for t in report.tables if t.title == "Intercepts")
    assert ("The means of punctuality, comfort, and courtesy are fixed at 0 (not estimated), so no table shows them."
            in intercepts.note)


def test_a_group_whose_factor_means_are_estimated_keeps_its_table():
    result = cfa_tool.fit(THREE_FACTORS + "invariance scalar\n", holzinger_swineford(), group="school",
                          reference_group="Pasteur")
    titles = [t.title for t in report_of(result).tables]
    assert "Factor means, group Grant-White" in titles and "Factor means, group Pasteur" not in titles
    pasteur = next(t for t in report_of(result).tables if t.title == "Intercepts, group Pasteur")
    assert "The means of visual, textual, and speed are fixed at 0 in this group (not estimated)" in pasteur.note


def test_the_keyed_sums_note_says_the_scale_is_declared_in_the_model_in_words(reversed_fit):
    # 'clean' loads against its factor and no statement gives its answer scale: no mean of the keyed sum, and the
    # note says how to have one; the model statement only where the reader edits the model file
    from cfa_tool.reporting.terminal import report_text

    report = report_of(reversed_fit)
    text, _ = _word(report)
    terminal = " ".join(report_text(report, 120).replace("│", " ").split())
    assert "the answer scale of the reversed items is known: declare it in the model." in " ".join(text.split())
    assert "'reversed ITEMS on LOWEST to HIGHEST'" not in text
    assert "declare it in the model with 'reversed ITEMS on LOWEST to HIGHEST'." in terminal
