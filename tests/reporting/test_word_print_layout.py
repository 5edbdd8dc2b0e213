"""The Word report set for print, read back with python-docx (an independent reader of the file format): numbers
and intervals that cannot break across lines, wide matrices that fit the page, captions kept with their tables,
notes that apply to the fit, and manuscript text in words rather than command-line options."""

from __future__ import annotations

import html
import io

import docx
import pytest
from docx.enum.section import WD_ORIENT
from docx.oxml.ns import qn
from docx.shared import Emu, Pt

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.column_parts import column_parts, label_columns
from cfa_tool.reporting.document import Report, ResultKind
from cfa_tool.reporting.docx_report import BODY_SIZE, WIDE_SIZE, report_docx, typeset
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.note_parts import WORDS, Command, said
from cfa_tool.reporting.remedies import Remedy
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.tables import ReportTable
from cfa_tool.reporting.fit_document import fit_report, fit_tables
from cfa_tool.reporting.text_formats import report_markdown
from cfa_tool.resources import resource_dir
from tests.conftest import THREE_FACTORS

ORDINAL_WORDS = "ordinal"


@pytest.fixture(scope="module")
def rider():
    # the demo data hold 9 missing answers: a continuous fit by full-information ML of 12 items, whose item
    # correlation and residual correlation matrices have 11 numeric columns
    result = cfa_tool.fit(resource_dir("models") / "rider_three_factors.cfa", resource_dir("demo") / "rider_survey.csv")
    assert result.method.full_information and not result.method.ordinal
    return result


@pytest.fixture(scope="module")
def word(rider):
    return docx.Document(io.BytesIO(report_docx(fit_report(rider))))


def _tables_by_section(document) -> list[tuple[object, object]]:
    """(table, section) in the order of the body: a section ends at a paragraph that holds its properties."""
    sections, found, k = list(document.sections), [], 0
    tables = iter(document.tables)
    for child in document.element.body.iterchildren():
        if child.tag == qn("w:tbl"):
            found.append((next(tables), k))
        elif child.tag == qn("w:p") and child.find(f"{qn('w:pPr')}/{qn('w:sectPr')}") is not None:
            k += 1
    return [(table, sections[s]) for table, s in found]


def _text_width(section) -> float:
    return Emu(section.page_width - section.left_margin - section.right_margin).pt


def _table_width(table) -> float:
    return sum(int(c.get(qn("w:w"))) for c in table._tbl.tblGrid.findall(qn("w:gridCol"))) / 20


def test_typeset_keeps_numbers_and_intervals_whole():
    assert typeset("[-0.99, -0.77]") == "[\u22120.99,\u00a0\u22120.77]"
    assert typeset("-.02", numeric=True) == "\u2212.02"
    assert typeset("< .001", numeric=True) == "<\u00a0.001"
    # hyphens inside words and the words between intervals stay as they are
    assert typeset("Item-rest r and full-information ML, x1-x3") == "Item-rest r and full-information ML, x1-x3"
    assert typeset("from [.04, .09] to 0.5") == "from [.04,\u00a0.09] to 0.5"
    assert typeset("gave p = .186, N = 900 and r < -.30") == "gave p\u00a0=\u00a0.186, N\u00a0=\u00a0900 and r\u00a0<\u00a0\u2212.30"
    assert typeset("a = b") == "a = b"  # a relation between words may break as words do


def test_numeric_cells_do_not_wrap_and_hold_no_breakable_minus_or_space(word, rider):
    expected = fit_tables(rider)
    assert len(word.tables) == len(expected)
    for grid, table in zip(word.tables, expected):
        for r, row in enumerate(grid.rows[1:]):
            for cell, align, value in zip(row.cells, table.align, table.rows[r]):
                if align != "r":
                    continue
                assert cell._tc.tcPr.find(qn("w:noWrap")) is not None, (table.title, value)
                assert " " not in cell.text and "-" not in cell.text, (table.title, cell.text)
    intervals = [c.text for g in word.tables for row in g.rows for c in row.cells if c.text.startswith("[")]
    assert intervals and all(" " not in t for t in intervals)
    assert any("\u2212" in c.text for g in word.tables for row in g.rows for c in row.cells)  # negative values exist


def test_the_matrices_of_twelve_items_fit_a_portrait_page_at_the_body_type_and_every_table_fits_its_page(word, rider):
    # the item correlations and residual correlations of 12 items (11 number columns of two decimals) fit a
    # portrait page at 10 pt with the items' names (docx_report.table_layout); they were set on landscape pages at
    # 8 pt by their count of columns before
    placed = _tables_by_section(word)
    titles = [t.title for t in fit_tables(rider)]
    matrices = [k for k, t in enumerate(fit_tables(rider)) if t.key.startswith(("correlations_", "residual"))]
    assert len(matrices) == 2, titles
    for k, (table, section) in enumerate(placed):
        assert _table_width(table) <= _text_width(section) + 0.5, titles[k]
        assert section.orientation == WD_ORIENT.PORTRAIT and section.page_width < section.page_height, titles[k]
        if k in matrices:
            sizes = {run.font.size for row in table.rows for c in row.cells for p in c.paragraphs for run in p.runs}
            assert sizes == {Pt(BODY_SIZE)}
            assert table.rows[2].cells[0].text == "2 short_wait"  # the rows keep their items' names
    # the figures and cautions after the tables are on portrait pages
    assert word.sections[-1].orientation == WD_ORIENT.PORTRAIT


def test_captions_and_rows_are_kept_with_their_table_and_the_header_repeats(word):
    paragraphs = word.paragraphs
    labels = [k for k, p in enumerate(paragraphs) if p.text.startswith("Table ")]
    assert len(labels) == len(word.tables)
    for k in labels:
        assert paragraphs[k].paragraph_format.keep_with_next and paragraphs[k + 1].paragraph_format.keep_with_next
    for table in word.tables:
        assert table.rows[0]._tr.trPr.find(qn("w:tblHeader")) is not None
        assert all(p.paragraph_format.keep_with_next for row in table.rows for c in row.cells for p in c.paragraphs)


def test_a_table_too_wide_even_in_landscape_comes_in_parts_with_its_label_column():
    columns = ("Item",) + tuple(f"Column {k}" for k in range(1, 41))
    rows = tuple((f"item{i}",) + tuple(f"[-{i}.{k:02d}, {k}.50]" for k in range(1, 41)) for i in range(3))
    table = ReportTable("big", "A very wide table", columns, ("l",) + ("r",) * 40, rows, "The note.")
    document = docx.Document(io.BytesIO(report_docx(Report(ResultKind.FIT, "Wide", None, (), (table,)))))
    texts = [p.text for p in document.paragraphs]
    parts = len(document.tables)
    assert parts > 1 and texts.count("Table 1") == 1 and texts.count("Table 1 (continued)") == parts - 1
    assert texts.count("The note.") == 0 and sum(t.endswith("The note.") for t in texts) == 1  # one note, at the end
    seen = []
    for grid, section in _tables_by_section(document):
        assert section.orientation == WD_ORIENT.LANDSCAPE
        assert _table_width(grid) <= _text_width(section) + 0.5
        assert grid.rows[0].cells[0].text == "Item" and grid.rows[1].cells[0].text == "item0"
        seen += [c.text for c in grid.rows[0].cells[1:]]
    assert seen == list(columns[1:])  # every column once, in order


def test_column_parts_is_the_terminals_rule():
    assert column_parts([5, 3, 3], 20) == [[0, 1, 2]]
    assert column_parts([5, 3, 3, 3], 11) == [[0, 1, 2], [0, 3]]
    assert column_parts([5, 9, 9], 10) == [[0, 1], [0, 2]]  # a column wider than the room still gets a part
    # two label columns (factor, group) repeat in every part, so a number never loses its row's names (new-user trial)
    assert column_parts([6, 6, 4, 4, 4], 19, labels=2) == [[0, 1, 2], [0, 1, 3], [0, 1, 4]]
    assert label_columns(("l", "l", "r", "r"), [6, 6, 4, 4], 40) == 2
    assert label_columns(("l", "l", "r", "r"), [15, 15, 4, 4], 40) == 1  # labels may not take more than half the room
    assert label_columns(("l", "r", "l", "r"), [6, 4, 6, 4], 40) == 1
    # beyond half the room, the text columns it takes to tell the rows apart, while the widest other column fits
    named_twice = [("loading of x2 on visual", "std.", "0.1"), ("loading of x2 on visual", "unstd.", "0.2")]
    assert label_columns(("l", "l", "r"), [30, 8, 12], 60, named_twice) == 2
    assert label_columns(("l", "l", "r"), [30, 8, 12], 60, named_twice[:1]) == 1  # the first column tells them apart
    assert label_columns(("l", "l", "r"), [30, 8, 30], 60, named_twice) == 1  # no room beside them


def test_a_split_table_repeats_its_label_columns_in_the_terminal():
    from cfa_tool.reporting.tables import ReportTable
    from cfa_tool.reporting.terminal import rich_table, SafeConsole
    import io

    rows = tuple((f"factor{k}", f"group{k}", *(f"{v:.3f}" for v in range(6))) for k in range(3))
    table = ReportTable("t", "Differences", ("Factor", "Group", *(f"Column {k}" for k in range(6))),
                        ("l", "l", *("r" * 6)), rows)
    out = io.StringIO()
    SafeConsole(file=out, width=60, no_color=True).print(rich_table(table))
    parts = out.getvalue().split("continued")
    assert len(parts) > 1 and all("group2" in part for part in parts)


def test_split_tables_at_80_columns_keep_every_rows_names(hs_data):
    """A row of a table split into parts at 80 columns keeps its names in every part, on one line: the bootstrap's
    scale beside its parameter (each parameter has a row per scale), and the modification indices of a fit of
    several groups in a table per group, whose parameter words need not carry the group (they wrapped over two
    lines, differently in each part).  Holzinger & Swineford (1939) by school."""
    import cfa_tool
    from cfa_tool.reporting.terminal import report_text
    from cfa_tool.reporting.workflow_tables import bootstrap_report
    from cfa_tool.workflows.bootstrap import BootInterval, BootstrapResult

    fitted = cfa_tool.fit(THREE_FACTORS, hs_data)
    intervals = tuple(BootInterval("residual_covariance", ("x7", "x8"), scale, 0.2, (0.1, 0.3), (0.11, 0.31), 0.05)
                      for scale in ("unstandardized", "standardized"))
    text = report_text(bootstrap_report(BootstrapResult(fitted, 500, 500, 1, intervals, None, None)), 80)
    parts = text.split(", continued")
    assert len(parts) > 1
    for part in parts[1:]:
        rows = [line for line in part.splitlines() if "residual covariance of x7 and x8" in line]
        assert len(rows) == 2 and "unstd." in rows[0] and "std." in rows[1], part

    by_school = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
    grouped = fit_report(by_school)
    sections = [t.section for t in grouped.tables if t.key.startswith("modification")]
    assert sections == [f"Modification indices, group {g.label}" for g in by_school.groups]
    assert {g.label for g in by_school.groups} == {"Pasteur", "Grant-White"}
    text = report_text(grouped, 80)
    shown = text[text.index(sections[0]):]
    for line in shown[:shown.index("Freeing parameters")].splitlines():
        assert len(line.rstrip()) <= 80 and "in group" not in line
        if line.startswith(" residual covariance of") or line.startswith(" loading of"):
            assert line.rstrip()[-1].isdigit(), line  # the parameter's words and its number on one line


def test_no_ordinal_note_under_a_continuous_fit_in_any_format(rider, word):
    correlations = next(t for t in fit_tables(rider) if t.key.startswith("correlations_"))
    assert correlations.note == "With full-information estimation: the saturated model's estimates from every answer."
    assert ORDINAL_WORDS not in report_markdown(fit_report(rider)).lower()
    assert ORDINAL_WORDS not in report_html(fit_report(rider)).lower()
    assert not any(ORDINAL_WORDS in p.text.lower() for p in word.paragraphs)


def test_a_remedy_names_its_option_where_the_reader_runs_the_program_and_the_word_file_its_words_only(rider, word):
    # one report model: the remedy's option is a part of the note of its own (note_parts.Command); the terminal,
    # Markdown and HTML views show it after the words, the Word file (a manuscript: its reader runs nothing) keeps the
    # words and leaves the option out; the methods paragraph, for a paper, names none (the demo's rows with gaps:
    # Mardia's kurtosis on the items each row answered departs from normality, p = .023, and the remedy is named)
    [line] = T.normality_lines(rider)
    assert [p.text for p in line.parts if isinstance(p, Command)] == [
        f" ({remedy.option}; from Python, {remedy.keyword})" for remedy in (Remedy.ROBUST,)]
    report = fit_report(rider)
    note = next(t for t in report.tables if t.key == "fit").note  # under the fit table, in every view
    assert said(line) in said(note) and said(line, WORDS) in said(note, WORDS)
    assert "--" not in report.paragraph
    shown = " ".join(report_text(report, 2000).split())
    for remedy in (Remedy.ROBUST,):
        assert f"{remedy.words} ({remedy.option}; from Python, {remedy.keyword})" in shown
        assert f"{remedy.words} ({remedy.option}; from Python, {remedy.keyword})" in html.unescape(report_html(report))
    texts = [p.text for p in word.paragraphs]
    method = texts[texts.index("Summary for a paper") + 1]
    assert "--" not in method and method.startswith("A confirmatory factor analysis")
    assert not any(Remedy.ROBUST.option in t or "from Python" in t for t in texts)
    assert any(f"The data depart from normality: consider {Remedy.ROBUST.words}." in t for t in texts)


def test_a_matrix_column_is_as_wide_as_its_cells_with_true_minus_signs_and_its_properties_are_in_order():
    # 40 items of residual correlations such as -.05: each column holds '−.05' (U+2212, which Times sets at .564
    # of the type size, a hyphen at .333: Adobe's Times-Roman metrics, recalled from memory) on one line
    from cfa_tool.reporting.docx_report import WIDE_PADDING, WIDTH_MARGIN

    n = 40
    rows = tuple((f"{i + 1} y{i + 1}",) + ("-.05",) * i + ("",) * (n - 1 - i) for i in range(1, n))
    table = ReportTable("residuals_0", "Residual correlations", ("",) + tuple(str(k) for k in range(1, n)),
                        ("l",) + ("r",) * (n - 1), rows, heat=True, matrix=True)
    document = docx.Document(io.BytesIO(report_docx(Report(ResultKind.FIT, "Matrix", None, (), (table,)))))
    least = WIDTH_MARGIN * WIDE_SIZE * (564 + 278 + 500 + 500) / 1000 + WIDE_PADDING
    columns = [int(c.get(qn("w:w"))) / 20 for grid in document.tables
               for c in grid._tbl.tblGrid.findall(qn("w:gridCol"))[1:]]
    assert len(columns) == n - 1 and min(columns) >= least - 0.05  # (twentieths of a point, rounded)
    # properties in the order of the format (ECMA-376 Part 1, 17.4.60 and 17.4.70): the cell margins before the
    # table's look, a cell's shading and borders before its no-wrap
    for grid in document.tables:
        tags = [child.tag for child in grid._tbl.tblPr]
        assert tags.index(qn("w:tblCellMar")) < tags.index(qn("w:tblLook"))
        for row in grid.rows[1:]:
            for cell in row.cells[1:]:
                tags = [child.tag for child in cell._tc.tcPr]
                if qn("w:shd") in tags:
                    assert tags.index(qn("w:shd")) < tags.index(qn("w:noWrap"))
                if qn("w:tcBorders") in tags:
                    assert tags.index(qn("w:tcBorders")) < tags.index(qn("w:noWrap"))
