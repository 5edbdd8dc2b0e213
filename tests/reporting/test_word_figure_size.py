"""The path diagram in the Word report prints its labels at a readable size: a drawing whose smallest text would
print below MIN_FIGURE_TEXT points across a portrait page (a model of many items drawn wide) is set on a landscape
page of its own, where it prints larger; a small drawing stays on the portrait page.  The page, the section and the
picture's printed width are read back with python-docx (an independent reader of the format); the text sizes are
those of the SVG's font-size attributes scaled by the printed width (1 pt = 1/72 inch)."""

from __future__ import annotations

import io
import re

import docx
import pytest
from docx.enum.section import WD_ORIENT
from docx.oxml.ns import qn
from docx.shared import Emu

import cfa_tool
from cfa_tool.reporting.docx_report import MIN_FIGURE_TEXT, report_docx
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.picture import png_converter
from cfa_tool.resources import resource_dir
from tests.conftest import THREE_FACTORS, holzinger_swineford

pytestmark = pytest.mark.skipif(png_converter() is None, reason="the Word figure needs rsvg-convert")


def _figure(report) -> tuple[object, float]:
    """(the orientation of the picture's section, its printed width in inches) of the first figure."""
    document = docx.Document(io.BytesIO(report_docx(report, dpi=96)))
    k = 0
    for child in document.element.body.iterchildren():
        if child.tag != qn("w:p"):
            continue
        if child.findall(".//" + qn("wp:inline")):
            break
        if child.find(f"{qn('w:pPr')}/{qn('w:sectPr')}") is not None:
            k += 1
    return document.sections[k].orientation, Emu(document.inline_shapes[0].width).inches


#: nine of the rider survey's items in three correlated factors: one row of items about 960 units wide (the demo's
#: twelve, too wide for one row, are drawn sideways, in a column that fits a portrait page: reporting.diagram)
WIDE = ("factor punctuality: on_time, short_wait, accurate_info\nfactor comfort: seat_available, clean, temperature\n"
        "factor courtesy: greeting, helpful, respectful\n")


def _wide_report():
    return fit_report(cfa_tool.fit(WIDE, resource_dir("demo") / "rider_survey.csv"))


def _smallest_points(svg: str, inches: float) -> float:
    width = float(re.search(r'<svg[^>]*?\swidth="([0-9.]+)"', svg).group(1))
    return min(float(s) for s in re.findall(r'font-size="([0-9.]+)"', svg)) * inches * 72 / width


def test_a_wide_diagram_goes_on_a_landscape_page():
    report = _wide_report()
    svg = report.figures[0].svg
    orientation, inches = _figure(report)
    assert orientation == WD_ORIENT.LANDSCAPE
    portrait = _smallest_points(svg, 6.0)  # the text width of the default page: letter, 1.25 in side margins
    assert portrait < MIN_FIGURE_TEXT and _smallest_points(svg, inches) > 1.1 * portrait


def test_a_small_diagram_stays_on_the_portrait_page():
    report = fit_report(cfa_tool.fit(THREE_FACTORS, holzinger_swineford()))  # nine items
    orientation, inches = _figure(report)
    assert orientation == WD_ORIENT.PORTRAIT and _smallest_points(report.figures[0].svg, inches) >= MIN_FIGURE_TEXT


def _items_in_factors(factors: int):
    """A report of 6 * ``factors`` items in ``factors`` factors of six (simulated with a fixed seed)."""
    import numpy as np
    import pandas as pd

    rng = np.random.default_rng(7)
    k = factors
    scores = rng.multivariate_normal(np.zeros(k), 0.4 * np.ones((k, k)) + 0.6 * np.eye(k), size=600)
    data = pd.DataFrame({f"item{j + 1:02d}": 0.7 * scores[:, j // 6] + 0.6 * rng.standard_normal(600) + 3
                         for j in range(6 * k)})
    model = "".join(f"factor f{f + 1}: " + ", ".join(f"item{j + 1:02d}" for j in range(6 * f, 6 * f + 6)) + "\n"
                    for f in range(k))
    return fit_report(cfa_tool.fit(model, data))


def test_a_diagram_of_forty_two_items_goes_on_in_strips():
    # forty-two items in seven factors of six: drawn in four bands of factors, too small to read across one page
    # (about 4.7 pt, below ONE_PAGE_TEXT), so the Word figure is cut between the bands, in strips across landscape
    # pages whose labels print at MIN_FIGURE_TEXT or more
    from cfa_tool.reporting.docx_report import ONE_PAGE_TEXT, _document, _figure_areas
    from cfa_tool.reporting.picture import svg_strips

    report = _items_in_factors(7)
    svg = report.figures[0].svg
    width, height = (float(re.search(rf'<svg[^>]*?\s{a}="([0-9.]+)"', svg).group(1)) for a in ("width", "height"))
    breaks = [float(b) for b in re.search(r'data-breaks="([0-9. ]+)"', svg).group(1).split()]
    assert len(breaks) == 3  # four bands
    areas = _figure_areas(_document("x", None), report.figures[0].note, heading=True)  # portrait, landscape
    assert _smallest_points(svg, max(min(w, h * width / height) for w, h in areas)) < ONE_PAGE_TEXT  # whole
    document = docx.Document(io.BytesIO(report_docx(report, dpi=96)))
    pictures = document.inline_shapes
    captions = [p.text for p in document.paragraphs if p.text.startswith("Figure ")]
    assert captions == ["Figure 1"] + ["Figure 1 (continued)"] * (len(pictures) - 1) and len(pictures) >= 2
    for picture in pictures:  # each strip across the landscape page: its labels at least MIN_FIGURE_TEXT points
        assert abs(Emu(picture.width).inches - 8.5) < 0.01
        assert _smallest_points(svg, Emu(picture.width).inches) >= MIN_FIGURE_TEXT
    assert len(pictures) <= len(breaks) + 1  # cut only between bands (picture.svg_strips), where nothing is drawn
    strips = svg_strips(svg, 0.0)  # every cut made: each strip's top is a break
    assert [float(re.search(r'viewBox="0 ([0-9.]+) ', s).group(1)) for s in strips][1:] == breaks


@pytest.mark.parametrize("case", ["higher-order", "thirty items", "demo"])
def test_a_figure_that_reads_on_one_page_is_not_cut_across_two(case):
    # the bundled higher-order model's figure was cut into two strips on two landscape pages, the second half empty
    # (and so was the demo's): a drawing whose smallest text prints at ONE_PAGE_TEXT or more whole on one page goes
    # there, in the orientation where it prints larger, sized for the page less its heading, caption and note
    from docx.shared import Emu as E

    from cfa_tool.reporting.docx_report import HEADING_ROOM, ONE_PAGE_TEXT, _figure_room

    data = resource_dir("demo") / "rider_survey.csv"
    report = (_items_in_factors(5) if case == "thirty items" else
              fit_report(cfa_tool.fit(resource_dir("models") / ("rider_higher_order.cfa" if case == "higher-order"
                                                                else "rider_three_factors.cfa"), data)))
    svg = report.figures[0].svg
    document = docx.Document(io.BytesIO(report_docx(report, dpi=96)))
    assert [p.text for p in document.paragraphs if p.text.startswith("Figure ")] == ["Figure 1"]
    assert len(document.inline_shapes) == 1
    orientation, inches = _figure(report)
    assert _smallest_points(svg, inches) >= ONE_PAGE_TEXT
    if case == "higher-order":  # a tall drawing prints larger across the portrait page's width
        assert orientation == WD_ORIENT.PORTRAIT and abs(inches - 6.0) < 0.01
    section = next(s for s in document.sections if s.orientation == orientation)
    text_height = E(section.page_height - section.top_margin - section.bottom_margin).inches
    across = E(section.page_width - section.left_margin - section.right_margin).inches
    shape = document.inline_shapes[0]
    assert E(shape.height).inches + _figure_room(report.figures[0].note, across) + HEADING_ROOM / 72 <= text_height + 1e-6


def test_the_heading_room_is_taken_before_the_layout_is_chosen():
    """One computation of a figure's room: with the figures' heading on its page the layout is chosen for the room
    left under the heading (before, the room was taken after the choice, so a drawing chosen to print at a size
    printed smaller)."""
    from cfa_tool.reporting.docx_report import HEADING_ROOM, _document, _figure_areas, _figure_layout

    report = fit_report(cfa_tool.fit(resource_dir("models") / "rider_higher_order.cfa",
                                     resource_dir("demo") / "rider_survey.csv"))
    figure = report.figures[0]
    document = _document("x", None)
    plain, headed = _figure_areas(document, figure.note), _figure_areas(document, figure.note, heading=True)
    for (w, h), (w2, h2) in zip(plain, headed):
        assert w2 == w and h2 == pytest.approx(h - HEADING_ROOM / 72)
    landscape, pieces, area = _figure_layout(document, figure.svg, figure.note, heading=True)
    assert area == headed[landscape] and len(pieces) == 1


def test_the_caption_the_drawing_and_its_note_are_kept_on_one_page():
    # the note under the rider survey's diagram fell alone on a page of its own: the drawing filled the page's
    # height with no room for the note.  Now the caption keeps with the picture and the picture with the note, and
    # the picture is sized for the page's text height less the caption's and the note's lines (Times' widths).
    from docx.shared import Emu as E

    from cfa_tool.reporting.docx_report import _figure_room

    report = _wide_report()
    document = docx.Document(io.BytesIO(report_docx(report, dpi=96)))
    paragraphs = document.paragraphs
    pictured = [k for k, p in enumerate(paragraphs) if p._p.findall(".//" + qn("wp:inline"))]
    note = next(k for k, p in enumerate(paragraphs) if p.text.startswith("Note. Standardized values"))
    assert note == pictured[-1] + 1
    for k in pictured:  # 'Figure 1', its title, the picture: each kept with the next paragraph
        assert paragraphs[k - 2].text.startswith("Figure 1")
        assert paragraphs[k - 2].paragraph_format.keep_with_next and paragraphs[k - 1].paragraph_format.keep_with_next
    assert paragraphs[pictured[-1]].paragraph_format.keep_with_next
    section = next(s for s in document.sections if s.orientation == WD_ORIENT.LANDSCAPE)
    text_height = E(section.page_height - section.top_margin - section.bottom_margin).inches
    # the note's three lines and the caption's two at 12 pt: at least 5 lines of 12 pt (1/6 inch) kept free
    across = E(section.page_width - section.left_margin - section.right_margin).inches
    room = _figure_room(report.figures[0].note, across)
    assert room >= 5 / 6
    for shape in document.inline_shapes:
        assert E(shape.height).inches + room <= text_height + 1e-6


@pytest.mark.parametrize("wide", [True, False])
def test_the_figures_heading_is_on_the_page_of_the_first_figure(wide):
    # new-user trial: the "Figures" heading was left alone at the foot of a portrait page, the wide diagram under it
    # starting a landscape page; now the heading opens the first figure's section, kept with it, with room for it
    from docx.shared import Emu as E

    from cfa_tool.reporting.docx_report import FIGURES, HEADING_ROOM, _figure_room

    report = _wide_report() if wide else fit_report(cfa_tool.fit(THREE_FACTORS, holzinger_swineford()))
    document = docx.Document(io.BytesIO(report_docx(report, dpi=96)))
    paragraphs = document.paragraphs
    heading = [k for k, p in enumerate(paragraphs) if p.text == FIGURES and p.style.name.startswith("Heading")]
    picture = next(k for k, p in enumerate(paragraphs) if p._p.findall(".//" + qn("wp:inline")))
    assert len(heading) == 1 and heading[0] < picture
    between = paragraphs[heading[0]:picture]
    assert all(p._p.find(f"{qn('w:pPr')}/{qn('w:sectPr')}") is None for p in between)  # no section (page) break
    assert [p.text for p in between[1:2]] == ["Figure 1"]
    assert all(p.paragraph_format.keep_with_next for p in between)
    orientation, _ = _figure(report)
    assert orientation == (WD_ORIENT.LANDSCAPE if wide else WD_ORIENT.PORTRAIT)
    section = next(s for s in document.sections if s.orientation == orientation)
    text_height = E(section.page_height - section.top_margin - section.bottom_margin).inches
    across = E(section.page_width - section.left_margin - section.right_margin).inches
    shape = document.inline_shapes[0]
    assert E(shape.height).inches + _figure_room(report.figures[0].note, across) + HEADING_ROOM / 72 <= text_height + 1e-6
