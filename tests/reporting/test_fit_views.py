"""Every view of one fit (terminal, summary(), notebook, HTML, Markdown, Word) holds the same notices and tables in
the same order, the problems first and the cautions about the data right under the title; read back by
independent readers where there is one (python-docx for Word, Python's HTML parser for HTML)."""

from __future__ import annotations

import html
import io
import re
from html.parser import HTMLParser

import docx
import numpy as np
import pytest
from docx.oxml.ns import qn

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.note_parts import RUNNING, WORDS, said
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.document import WARNINGS, sentence
from cfa_tool.reporting.docx_report import report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import report_markdown
from tests.commands.test_cli import run

# two residual covariances among the speed items: the residual variance of x9 goes below zero in the
# Holzinger-Swineford (1939) data (a solution that is not admissible; see tests/assessment/test_admissibility.py)
HEYWOOD = ('name "Three abilities, two residual covariances"\n'
           "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
           "covary x7, x8\ncovary x8, x9\n")


@pytest.fixture(scope="module")
def troubled(hs_data):
    """A fit with a problem, rows left out listwise (40 rows lose x1: more than 5%, a prominent warning) and -99
    codes read as missing."""
    data = hs_data.copy()
    data.loc[data.index[:40], "x1"] = np.nan
    data.loc[data.index[50:55], "x2"] = -99
    result = cfa_tool.fit(HEYWOOD, data, missing="listwise", missing_codes=(-99,))
    assert not result.admissible and any(p.kind is ProblemKind.ROWS_LEFT_OUT and p.explanation.startswith(
        "Listwise deletion left out 45") for p in result.problems)
    return result


def _plain(text: str) -> str:
    """Text as a reader sees it, for finding things in order: one space between words, true minus signs and
    non-breaking spaces as plain ones, Markdown's escapes removed."""
    text = text.replace("\u2212", "-").replace("\u00a0", " ").replace("\\", "")
    return " ".join(re.sub("[\u2500-\u257f]", " ", text).split())  # the terminal's frames aside


class _Text(HTMLParser):
    """The text a browser shows, without the style sheet and the page's title."""

    def __init__(self):
        super().__init__()
        self.parts, self.skip = [], False

    def handle_starttag(self, tag, attrs):
        self.skip = tag in ("style", "title")

    def handle_endtag(self, tag):
        self.skip = False

    def handle_data(self, data):
        if not self.skip:
            self.parts.append(data)


def _html_text(page: str) -> str:
    parser = _Text()
    parser.feed(page)
    return " ".join(parser.parts)


def _word_text(data: bytes) -> str:
    """The paragraphs and table cells of a Word file in the order of its body."""
    document = docx.Document(io.BytesIO(data))
    tables = iter(document.tables)
    paragraphs = iter(document.paragraphs)
    out = []
    for child in document.element.body.iterchildren():
        if child.tag == qn("w:p"):
            out.append(next(paragraphs).text)
        elif child.tag == qn("w:tbl"):
            out += [cell.text for row in next(tables).rows for cell in row.cells]
    return " ".join(out)


def _markers(report, view=RUNNING) -> list[str]:
    """What every view shows, in order: the problems, the title, the warnings, the sections and the tables; the
    lines as ``view`` says them (a manuscript's without the commands of their advice)."""
    out = [report.notice.heading, *(said(x, view) for x in report.notice.lines), report.title, WARNINGS,
           *(said(x, view) for x in report.warnings)]
    section = ""
    for table in report.tables:
        if table.section and table.section != section:
            out.append(table.section)
        section = table.section
        out.append(table.title)
    return out + [listing.title for listing in report.listings] + [said(x, view) for x in report.cautions]


def _in_order(text: str, markers: list[str]) -> None:
    at = 0
    for marker in markers:
        found = text.find(_plain(marker), at)
        assert found >= 0, f"{marker!r} missing or out of order after {text[max(0, at - 80):at]!r}"
        at = found + len(_plain(marker))


def test_every_view_of_a_fit_shows_the_same_notices_and_tables_in_the_same_order(troubled):
    report = fit_report(troubled)
    views = {"terminal": report_text(report, 100), "summary": troubled.summary(100),
             "notebook": _html_text(troubled._repr_html_()), "HTML": _html_text(report_html(report)),
             "Markdown": report_markdown(report), "Word": _word_text(report_docx(report, 72))}
    for name, text in views.items():
        text = _plain(html.unescape(text) if name in ("notebook", "HTML", "Markdown") else text).removeprefix("## ")
        assert text.startswith(_plain(T.NOT_ADMISSIBLE)), name  # the problems before anything else
        _in_order(text, _markers(report, WORDS if name == "Word" else RUNNING))
    assert views["terminal"] == views["summary"]


def test_the_data_cautions_come_first_in_the_caution_box(troubled):
    # the rows left out listwise: in the box of problems and cautions of every format, before the title (it was
    # only among the notes under the title, which the other commands' boxes did not match)
    report = fit_report(troubled)
    first_table = report.tables[0].title
    for text in (report_text(report, 100), report_markdown(report), _word_text(report_docx(report, 72)),
                 _html_text(report_html(report))):
        text = _plain(html.unescape(text))
        listwise = text.index("Listwise deletion left out 45 of 301 rows")  # (as a sentence: document.sentence)
        assert listwise < text.index(report.title) < text.index(first_table)
        assert text.count("Listwise deletion left out 45 of 301 rows") == 1  # not again among the notes
    assert any(said(line).startswith("Listwise deletion left out 45") for line in report.notice.lines)
    assert any(p["kind"] == ProblemKind.ROWS_LEFT_OUT.value for p in troubled.to_dict()["problems"])


def test_the_word_report_holds_the_normality_tests_and_the_warnings(troubled):
    texts = [_plain(p.text) for p in docx.Document(io.BytesIO(report_docx(fit_report(troubled), 72))).paragraphs]
    [normality] = T.normality_lines(troubled)
    assert any(_plain(said(normality, WORDS)) in t for t in texts)  # under the fit table, in its note
    assert _plain(said(sentence(troubled.warnings[0]), WORDS)) in texts
    assert WARNINGS in texts


def test_the_methods_paragraph_names_no_option_where_the_advice_does(troubled):
    report = fit_report(troubled)
    assert "--robust" in said(report.tables[[t.key for t in report.tables].index("fit")].note)
    assert "--" not in report.paragraph
    assert not re.search(r"--[a-z]", report_markdown(report).split("## Summary for a paper")[1].split("##")[0])


def test_the_residual_matrix_is_shaded_in_html_and_word(troubled):
    report = fit_report(troubled)
    residuals = next(t for t in report.tables if t.key == "residuals_0")
    assert residuals.heat and residuals.matrix and residuals.section == "Local fit"
    page = report_html(report)
    table = page[page.index('<table id="residuals_0" class="matrix">'):]
    table = table[:table.index("</table>")]
    # the shade of a cell: its colour (red positive, blue negative) mixed with white by |value| / .15
    cells = re.findall(r'style="background:(#[0-9a-f]{6})">([^<]*)<', table)
    # (a negative value printed with the true minus, reporting.numbers.printed)
    assert cells and all(colour == T.heat_colour(text.replace("\u2212", "-")) for colour, text in cells)
    assert T.heat_colour(".30") == "#c82828" and T.heat_colour("-.15") == "#2850c8" and T.heat_colour(".00") == "#ffffff"
    assert T.heat_colour("-.03") == "#" + "".join(f"{round(255 + (c - 255) * 0.2):02x}" for c in (40, 80, 200))
    assert "background:" not in report_markdown(report) and T.HEAT_LEGEND in page
    word = docx.Document(io.BytesIO(report_docx(report)))
    shaded = [cell for t in word.tables for row in t.rows for cell in row.cells
              if cell._tc.tcPr is not None and cell._tc.tcPr.find(qn("w:shd")) is not None]
    assert len(shaded) == len(cells)
    for cell in shaded:
        properties = [child.tag for child in cell._tc.tcPr]  # in the order the format requires (shd before noWrap)
        assert properties.index(qn("w:shd")) < properties.index(qn("w:noWrap"))
        assert "#" + cell._tc.tcPr.find(qn("w:shd")).get(qn("w:fill")) == T.heat_colour(cell.text.replace("\u2212", "-"))


def test_a_matrix_of_more_items_than_a_terminal_shows_is_in_the_files_and_said_in_the_terminal():
    from tests.conftest import simulate_cfa

    items = T.MAX_TERMINAL_MATRIX + 5
    data = simulate_cfa(np.full((items, 1), 0.6), np.eye(1), np.eye(items) * 0.64, 400, seed=2)
    result = cfa_tool.fit("factor f: " + ", ".join(data.columns) + "\n", data)
    report = fit_report(result)
    matrices = [t for t in report.tables if t.matrix]
    assert [t.key for t in matrices] == ["residuals_0", "correlations_0"] and all(len(t.rows) == items for t in matrices)
    text = " ".join(report_text(report).split())
    for table in matrices:
        assert f"{table.title}: {items} items, more than the {T.MAX_TERMINAL_MATRIX} a terminal shows readably" in text
        assert f'<table id="{table.key}" class="matrix">' in report_html(report)
    assert not report.notes  # not left out of the files
    # beyond MAX_MATRIX items no view shows the matrices, and the report says so and where the values are
    wide = type("Wide", (), {"observed": tuple(f"q{k}" for k in range(T.MAX_MATRIX + 1))})()
    assert str(T.matrices_left_out(wide)).startswith(f"The correlations of the items and the residual correlations are not "
                                                f"shown as tables: {T.MAX_MATRIX + 1} items")
    # the JSON result named for the command line and for Python alike (advice round s17: '--json' alone)
    assert "The JSON result (--json; from Python, result.to_dict()) holds" in str(T.matrices_left_out(wide))
    assert T.matrices_left_out(result) is None


def test_a_saved_fit_gives_the_same_views_again(troubled):
    from cfa_tool.reporting.document import Report

    report = fit_report(troubled)
    again = Report.from_dict(report.to_dict())
    assert report_html(again) == report_html(report) and report_markdown(again) == report_markdown(report)


MODEL = "factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"


def test_dpi_without_a_picture_cannot_apply(tmp_path):
    from cfa_tool.resources import resource_dir

    data = str(resource_dir("demo") / "rider_survey.csv")
    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    for extra in ([], ["--html", str(tmp_path / "r.html")], ["--diagram", str(tmp_path / "d.svg")]):
        proc = run("fit", str(model), "--data", data, "--dpi", "150", *extra)
        assert proc.returncode == 2 and proc.stdout == "", proc.stderr
        assert len(proc.stderr.strip().splitlines()) == 1 and "--dpi" in proc.stderr and "Traceback" not in proc.stderr
        assert not (tmp_path / "r.html").exists() and not (tmp_path / "d.svg").exists()
    proc = run("demo", "--dpi", "150")
    assert proc.returncode == 2 and "--dpi" in proc.stderr
    saved = tmp_path / "r.json"
    assert run("fit", str(model), "--data", data, "--json", str(saved)).returncode == 0
    proc = run("report", str(saved), "--dpi", "150", "--html", str(tmp_path / "again.html"))
    assert proc.returncode == 2 and "--docx" in proc.stderr and not (tmp_path / "again.html").exists()


def test_report_writes_the_files_alone_and_the_terminal_view_when_none_is_asked(tmp_path):
    from cfa_tool.resources import resource_dir

    model = tmp_path / "m.cfa"
    model.write_text(MODEL)
    saved = tmp_path / "r.json"
    fit = run("fit", str(model), "--data", str(resource_dir("demo") / "rider_survey.csv"), "--json", str(saved),
              "--html", str(tmp_path / "fit.html"))
    assert fit.returncode == 0 and "Model fit" in fit.stdout  # fit: the report and a line per file
    shown = run("report", str(saved))
    assert shown.returncode == 0 and "Model fit" in shown.stdout
    written = run("report", str(saved), "--html", str(tmp_path / "again.html"))
    assert written.returncode == 0 and written.stdout.strip() == f"HTML report written to {tmp_path / 'again.html'}"


def test_control_characters_in_a_model_are_shown_as_escapes_in_every_view(hs_data):
    # a name and a comment holding an escape and a bell: Word's XML allows no control character (python-docx
    # refuses one), and a terminal would act on it
    result = cfa_tool.fit('name "a\x1bb"\n# note \x07 bell\nfactor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n',
                          hs_data)
    report = fit_report(result)
    word = _word_text(report_docx(report, 72))
    for text in (result.summary(), report_html(report), report_markdown(report), word):
        assert "\x1b" not in text and "\x07" not in text
        assert "x1bb" in text and "x07 bell" in text
