"""How the Word report sets matrices (docx_report.table_layout, one rule), read back with python-docx (an
independent reader of the file format): a 10 x 10 matrix fits a portrait page at a readable size, its rows named by
number with a key in the note when the items' names are long; only a truly wide matrix turns the page and comes in
parts, whose later parts hold the rows of their columns only; the number columns of a matrix are equally wide.

Page sizes are python-docx's default template (US Letter, 8.5 x 11 inches, margins of 1.25 inches left and right:
a text width of 432 pt on a portrait page, 612 pt on a landscape one)."""

from __future__ import annotations

import io
from dataclasses import replace

import docx
import numpy as np
import pytest
from docx.enum.section import WD_ORIENT
from docx.oxml.ns import qn
from docx.shared import Emu, Pt

from cfa_tool.reporting.docx_report import BODY_SIZE, MATRIX_SIZE, WIDE_SIZE, report_docx, table_layout
from cfa_tool.reporting.document import Report, ResultKind
from cfa_tool.reporting.tables import ReportTable, _item_matrix

RNG = np.random.default_rng(3)


def _residuals(names: list[str]) -> ReportTable:
    r = RNG.uniform(-0.12, 0.12, (len(names), len(names)))
    return replace(_item_matrix("residuals_0", "Residual correlations (sample minus model)", names, r,
                                "Positive: the model underestimates the correlation."), heat=True)


def _factor_matrix(k: int) -> ReportTable:
    rows = tuple((f"{i + 1} factor{i + 1}", *(f"{RNG.uniform(-.6, .9):.2f}".replace("0.", ".") for _ in range(i)),
                  "1.000", *("" for _ in range(k - 1 - i))) for i in range(k))
    return ReportTable("factors", "Factor variances and correlations", ("",) + tuple(str(j + 1) for j in range(k)),
                       ("l",) + ("r",) * k, rows, "Diagonal: variances; below: correlations.")


def _document(*tables: ReportTable):
    return docx.Document(io.BytesIO(report_docx(Report(ResultKind.FIT, "Matrices", None, (), tables))))


def _placed(document) -> list[tuple[object, object]]:
    """(table, its section) in the order of the body."""
    sections, found, k = list(document.sections), [], 0
    tables = iter(document.tables)
    for child in document.element.body.iterchildren():
        if child.tag == qn("w:tbl"):
            found.append((next(tables), sections[k]))
        elif child.tag == qn("w:p") and child.find(f"{qn('w:pPr')}/{qn('w:sectPr')}") is not None:
            k += 1
    return found


def _widths(table) -> list[float]:
    return [int(c.get(qn("w:w"))) / 20 for c in table._tbl.tblGrid.findall(qn("w:gridCol"))]


def _sizes(table) -> set:
    return {run.font.size for row in table.rows for c in row.cells for p in c.paragraphs for run in p.runs}


def _text_width(section) -> float:
    return Emu(section.page_width - section.left_margin - section.right_margin).pt


TEN = ["on_time", "short_wait", "accurate_info", "easy_transfer", "seat_available", "clean", "temperature",
       "room_to_stand", "greeting", "helpful"]


@pytest.mark.parametrize("table", [_residuals(TEN), _factor_matrix(10)], ids=["residuals", "factors"])
def test_a_ten_by_ten_matrix_is_on_a_portrait_page_at_the_body_type(table):
    document = _document(table)
    [(grid, section)] = _placed(document)
    assert section.orientation == WD_ORIENT.PORTRAIT and section.page_width < section.page_height
    assert len(document.sections) == 1  # no landscape page anywhere
    assert _sizes(grid) == {Pt(BODY_SIZE)}
    assert sum(_widths(grid)) <= _text_width(section) + 0.5
    numbers = _widths(grid)[1:]
    assert max(numbers) - min(numbers) < 0.2  # the number columns alike (twentieths of a point, rounded)
    assert grid.rows[3].cells[0].text == table.rows[2][0]  # the rows keep their names: no key is needed


def test_a_ten_item_matrix_of_long_names_numbers_its_rows_with_a_key_in_the_note_on_a_portrait_page():
    # question texts as column names: beside ten number columns they leave no room, so the rows are numbered and
    # the note's key names each item
    names = [f"The bus {word} on my route, most days of the week" for word in
             ("came on time", "was clean", "was quiet", "had seats", "was warm", "was cool", "was safe", "was calm",
              "was bright", "was full")]
    table = _residuals(names)
    document = _document(table)
    [(grid, section)] = _placed(document)
    assert section.orientation == WD_ORIENT.PORTRAIT
    assert [row.cells[0].text for row in grid.rows[1:]] == [str(k) for k in range(1, 11)]
    assert _sizes(grid) in ({Pt(BODY_SIZE)}, {Pt(MATRIX_SIZE)})
    assert sum(_widths(grid)) <= _text_width(section) + 0.5
    note = next(p.text for p in document.paragraphs if p.text.startswith("Note."))
    assert "Items: 1 The bus came on time on my route, most days of the week; 2 The bus was clean" in note
    assert note.index("Positive: the model underestimates") < note.index("Items: ") < note.index("Shading")


def test_a_truly_wide_matrix_turns_the_page_and_its_later_parts_hold_the_rows_of_their_columns():
    names = [f"item_{k:02d}_word" for k in range(40)]
    table = _residuals(names)
    document = _document(table)
    placed = _placed(document)
    assert len(placed) >= 2
    for grid, section in placed:
        assert section.orientation == WD_ORIENT.LANDSCAPE
        assert _sizes(grid) == {Pt(WIDE_SIZE)}
        assert sum(_widths(grid)) <= _text_width(section) + 0.5
    first, later = placed[0][0], placed[1][0]
    assert len(first.rows) == 41  # the header and every item's row
    start = int(later.rows[0].cells[1].text)  # the first item of the later part's columns
    rows = [int(row.cells[0].text) for row in later.rows[1:]]
    assert rows == list(range(start + 1, 41))  # the rows above have no value in these columns
    assert all(row.cells[1].text for row in later.rows[1:])


def test_the_layout_is_one_rule_for_every_matrix():
    # table_layout decides the page and the type: portrait at 10 pt for ten items, landscape at 8 pt for forty
    document = docx.Document()
    ten, forty = table_layout(document, _residuals(TEN)), table_layout(document, _residuals(
        [f"item_{k:02d}_word" for k in range(40)]))
    assert (ten.landscape, ten.size, ten.key) == (False, BODY_SIZE, "")
    assert forty.landscape and forty.size == WIDE_SIZE and forty.key.startswith("Items: 1 item_00_word; 2 ")
