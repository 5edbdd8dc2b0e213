"""Every layout of the path diagram, checked for text that overlaps or leaves the picture.

The extent of a text is estimated from its font size and its characters, on the safe side: each character as
wide as the font the drawing names draws it (reporting/text_extent.py: Helvetica's advance widths, from Adobe's
font metrics, the AFM files of the 35 standard PostScript fonts, bold where the text is bold; other scripts by
class; the browser test below checks that the estimate is never narrower than the text Chromium draws), the
text as 1 em tall (0.8 em above the baseline, 0.2 em below), and the white halo drawn around value labels
(stroke-width 3) adds 1.5 units on every side.  Two boxes overlap when they share more than a hair (0.5 units)
in both directions.
"""

from __future__ import annotations

import re
import shutil
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.diagram import diagram_file, path_diagram
from cfa_tool.reporting.text_extent import text_width

from tests.conftest import THREE_FACTORS, simulate_cfa
from tests.commands.test_cli import run

SVG = "{http://www.w3.org/2000/svg}"
HALO = 1.5


def estimated_width(node) -> float:
    """The estimated width of an SVG text element (its font size, its weight and its characters)."""
    return text_width("".join(node.itertext()), float(node.get("font-size")), bold=node.get("font-weight") == "bold")


def text_boxes(svg: str) -> tuple[list[tuple[str, float, float, float, float]], float, float]:
    """(text, left, top, right, bottom) of every text element in ``svg``, in the picture's units, with the
    picture's width and height (translations of enclosing groups applied)."""
    root = ET.fromstring(svg)
    _, _, width, height = (float(v) for v in root.get("viewBox").split())
    boxes = []

    def walk(node, dx: float, dy: float) -> None:
        move = re.fullmatch(r"translate\(([-\d.]+)(?:[ ,]([-\d.]+))?\)", node.get("transform", "") or "translate(0)")
        dx, dy = dx + float(move.group(1)), dy + float(move.group(2) or 0)
        if node.tag == SVG + "text":
            size = float(node.get("font-size"))
            text = "".join(node.itertext())
            x, y = float(node.get("x")) + dx, float(node.get("y")) + dy
            w = estimated_width(node)
            left = {"start": x, "middle": x - w / 2, "end": x - w}[node.get("text-anchor", "start")]
            halo = HALO if node.get("stroke") else 0.0
            boxes.append((text, left - halo, y - 0.8 * size - halo, left + w + halo, y + 0.2 * size + halo))
        for child in node:
            walk(child, dx, dy)

    walk(root, 0.0, 0.0)
    return boxes, width, height


def overlaps(svg: str) -> list[str]:
    """Pairs of texts that overlap, and texts that leave the picture, in words."""
    boxes, width, height = text_boxes(svg)
    found = [f"{t!r} leaves the picture" for t, l, u, r, b in boxes if l < 0 or u < 0 or r > width or b > height]
    for i, (t1, l1, u1, r1, b1) in enumerate(boxes):
        for t2, l2, u2, r2, b2 in boxes[i + 1:]:
            if min(r1, r2) - max(l1, l2) > 0.5 and min(b1, b2) - max(u1, u2) > 0.5:
                found.append(f"{t1!r} overlaps {t2!r}")
    return found


def _bifactor(items: int, parts: int, rows: int, seed: int):
    """A bifactor model fitted to data simulated from it: a general factor on every item (loadings .6) and
    ``parts`` specific factors on consecutive items (.5), all uncorrelated."""
    size = items // parts
    loadings = np.zeros((items, parts + 1))
    loadings[:, 0] = 0.6
    for i in range(items):
        loadings[i, 1 + i // size] = 0.5
    names = [f"item{i + 1:02d}" for i in range(items)]
    data = simulate_cfa(loadings, np.eye(parts + 1), np.diag(np.full(items, 0.4)), rows, seed, names)
    specific = [f"part_{j + 1}" for j in range(parts)]
    return cfa_tool.fit(f"factor general: item01..{names[-1]}\n"
                        + "".join(f"factor {f}: {names[size * j]}..{names[size * j + size - 1]}\n" for j, f in enumerate(specific))
                        + "scale latent by variance\nuncorrelated general, " + ", ".join(specific) + "\n", data)


def method_data():
    """800 rows of ten items v1..v10 simulated from two correlated traits (.4) of five items each (loadings .7) and
    a method factor on four of them, two of each trait (.4)."""
    loadings = np.zeros((10, 3))
    loadings[:5, 0] = loadings[5:, 1] = 0.7
    loadings[[1, 3, 6, 8], 2] = 0.4
    phi = np.eye(3)
    phi[0, 1] = phi[1, 0] = 0.4
    return simulate_cfa(loadings, phi, np.diag(np.full(10, 0.4)), 800, 6, [f"v{i + 1}" for i in range(10)])


@pytest.fixture(scope="module")
def shapes(hs_data):
    out = {"small": cfa_tool.fit(THREE_FACTORS + "covary x1, x4\ncovary x7, x9\n", hs_data),
           "higher-order": cfa_tool.fit(THREE_FACTORS + "factor ability: visual, textual, speed\n", hs_data),
           "groups": cfa_tool.fit(THREE_FACTORS, hs_data, group="school")}
    # bifactor: a general factor on every item, three specific factors, all uncorrelated
    out["bifactor"] = _bifactor(12, 3, 800, 5)
    # a method factor on the reverse-keyed items of two traits
    data = method_data()
    out["method factor"] = cfa_tool.fit("factor trust: v1..v5\nfactor loyalty: v6..v10\nfactor wording: v2, v4, v7, v9\n"
                                        "method wording\nuncorrelated wording, trust\nuncorrelated wording, loyalty\n"
                                        "scale latent by variance\n", data)
    out["method factor, correlated"] = cfa_tool.fit("factor trust: v1..v5\nfactor loyalty: v6..v10\n"
                                                    "factor wording: v2, v4, v7, v9\nmethod wording\nscale latent by variance\n", data)
    from tests.exploration.test_exploratory_blocks import GEOMIN

    out["exploratory block"] = cfa_tool.fit(GEOMIN, hs_data)
    # 60 items in six correlated factors, with two residual covariances
    loadings = np.zeros((60, 6))
    for i in range(60):
        loadings[i, i // 10] = 0.7
    names = [f"rating_{i + 1:02d}" for i in range(60)]
    data = simulate_cfa(loadings, 0.5 * np.eye(6) + 0.5, np.diag(np.full(60, 0.5)), 1500, 7, names)
    out["60 items"] = cfa_tool.fit("\n".join(f"factor part{j + 1}: " + ", ".join(names[10 * j:10 * j + 10]) for j in range(6))
                                   + "\ncovary rating_03, rating_04\ncovary rating_15, rating_18\ncovary rating_16, rating_17\n"
                                   "covary rating_14, rating_19\ncovary rating_18, rating_20\ncovary rating_29, rating_41\n", data)
    # 60 items in ten factors under one higher-order factor, and a bifactor model of 48 items
    loadings = np.zeros((60, 10))
    for i in range(60):
        loadings[i, i // 6] = 0.7
    names = [f"i{i + 1:02d}" for i in range(60)]
    data = simulate_cfa(loadings, 0.4 * np.eye(10) + 0.6, np.diag(np.full(60, 0.5)), 1500, 8, names)
    out["higher-order, 60 items"] = cfa_tool.fit("".join(f"factor f{j + 1}: " + ", ".join(names[6 * j:6 * j + 6]) + "\n"
                                                         for j in range(10))
                                                 + "factor g: " + ", ".join(f"f{j + 1}" for j in range(10)) + "\n", data)
    out["bifactor, 48 items"] = _bifactor(48, 4, 1500, 9)
    # two traits of 20 items each and a method factor on every fourth item: each trait is wider than a band
    loadings = np.zeros((40, 3))
    loadings[:20, 0] = loadings[20:, 1] = 0.7
    loadings[1::4, 2] = 0.4
    phi = np.eye(3)
    phi[0, 1] = phi[1, 0] = 0.4
    names = [f"v{i + 1}" for i in range(40)]
    data = simulate_cfa(loadings, phi, np.diag(np.full(40, 0.4)), 1500, 10, names)
    out["method factor, 40 items"] = cfa_tool.fit("factor trust: v1..v20\nfactor loyalty: v21..v40\nfactor wording: "
                                                  + ", ".join(names[1::4]) + "\nmethod wording\nuncorrelated wording, trust\n"
                                                  "uncorrelated wording, loyalty\nscale latent by variance\n", data)
    return out


LAYOUTS = ("small", "higher-order", "groups", "bifactor", "method factor", "method factor, correlated", "exploratory block",
           "60 items", "higher-order, 60 items", "bifactor, 48 items", "method factor, 40 items")


@pytest.mark.parametrize("shape", LAYOUTS)
def test_no_label_overlaps_another_or_leaves_the_picture(shapes, shape):
    result = shapes[shape]
    pictures = [(path_diagram(result, g), 1) for g in range(len(result.groups))] + [(diagram_file(result), len(result.groups))]
    for svg, groups in pictures:
        assert overlaps(svg) == []
        root = ET.fromstring(svg)  # every factor drawn once per group, every item too
        assert len(root.findall(f".//{SVG}ellipse")) == groups * len(result.latent)
        assert len(root.findall(f".//{SVG}rect[@class='indicator']")) == groups * len(result.observed)


def test_the_checker_finds_an_overlap():
    svg = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 50"><text x="10" y="20" font-size="10">abcdef</text>'
           '<g transform="translate(20,0)"><text x="10" y="24" font-size="10">x</text></g>'
           '<text x="95" y="40" font-size="10">far</text></svg>')
    assert overlaps(svg) == ["'far' leaves the picture", "'abcdef' overlaps 'x'"]


CONVERTER = shutil.which("rsvg-convert") is not None


@pytest.mark.skipif(not CONVERTER, reason="rsvg-convert (librsvg2-bin) is not installed")
@pytest.mark.parametrize("suffix", [".pdf", ".png", ".svg"])
def test_cli_writes_the_diagram_of_every_group_in_each_format(tmp_path, hs_data, suffix):
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data)
    model = tmp_path / "three.cfa"
    model.write_text(THREE_FACTORS)
    out = tmp_path / f"d{suffix}"
    resolution = ["--dpi", "150"] if suffix == ".png" else []  # a resolution applies to a PNG only
    proc = run("fit", str(model), "--data", str(data), "--group-column", "school", "--diagram", str(out), *resolution)
    assert proc.returncode == 0, proc.stderr
    content = out.read_bytes()
    if suffix == ".pdf":
        assert content.startswith(b"%PDF-") and b"%%EOF" in content[-1024:]
        # the page is the drawing at its natural size: 72 points per 96 SVG units (rsvg-convert's convention)
        svg = diagram_file(cfa_tool.fit(THREE_FACTORS, hs_data, group="school"))
        width, height = (float(v) for v in ET.fromstring(svg).get("viewBox").split()[2:])
        box = re.search(rb"/MediaBox \[\s*0 0 ([\d.]+) ([\d.]+)\s*\]", content)
        assert box is not None and abs(float(box.group(1)) - width * 0.75) < 1 and abs(float(box.group(2)) - height * 0.75) < 1
    elif suffix == ".png":
        assert content[:8] == b"\x89PNG\r\n\x1a\n"
        assert content[25] == 2  # colour type 2: RGB without an alpha channel, so nothing is transparent (PNG spec, 11.2.2)
    else:
        svg = content.decode()
        assert svg.count('class="group-name"') == 2 and "Group Pasteur" in svg and "Group Grant-White" in svg
        from cfa_tool.reporting.diagram import Drawn, legend_lines

        shown = frozenset({Drawn.FIXED_LOADING, Drawn.ARC})  # markers' dashed arrows, the factors' arcs
        fitted = cfa_tool.fit(THREE_FACTORS, hs_data, group="school")
        assert svg.count('class="legend"') == len(legend_lines(fitted, shown)) and overlaps(svg) == []


def test_a_missing_converter_is_said_before_the_work(tmp_path, monkeypatch, capsys):
    from cfa_tool import cli
    from cfa_tool.reporting import picture

    monkeypatch.setattr(picture.shutil, "which", lambda name: None)
    for name in ("d.pdf", "d.png"):
        assert cli.main(["demo", "--diagram", str(tmp_path / name)]) == 2
        captured = capsys.readouterr()
        assert "needs the rsvg-convert program" in captured.err and "Model fit" not in captured.out
        assert not (tmp_path / name).exists()
    assert cli.main(["demo", "--diagram", str(tmp_path / "d.eps")]) == 2
    assert "must end in one of .svg, .png, .pdf" in capsys.readouterr().err


@pytest.mark.skipif(not CONVERTER, reason="rsvg-convert (librsvg2-bin) is not installed")
def test_word_figures_fit_on_the_page(shapes):
    import io

    from docx import Document
    from docx.shared import Emu, Inches

    from docx.shared import Pt

    from cfa_tool.reporting.docx_report import HEADING_ROOM, _figure_room, report_docx
    from cfa_tool.reporting.fit_document import fit_report

    from docx.oxml.ns import qn

    for shape, groups in (("small", 1), ("groups", 2), ("60 items", 1), ("method factor", 1)):
        report = fit_report(shapes[shape])
        document = Document(io.BytesIO(report_docx(report, 100)))
        pictures = document.inline_shapes
        # one figure per group; a drawing too large to print readably on one page goes on in strips, each under a
        # caption 'Figure n (continued)'
        captions = [p.text for p in document.paragraphs if p.text.startswith("Figure ")]
        assert [c for c in captions if not c.endswith("(continued)")] == [f"Figure {k + 1}" for k in range(groups)]
        assert len(pictures) == len(captions)
        k, found = 0, []  # the section of each picture: a section ends at a paragraph that holds its properties
        for child in document.element.body.iterchildren():
            if child.tag == qn("w:p"):
                found += [k] * len(child.findall(".//" + qn("wp:inline")))
                k += child.find(f"{qn('w:pPr')}/{qn('w:sectPr')}") is not None
        figure = [int(c.split()[1]) - 1 for c in captions]  # the figure each picture belongs to
        for picture, s, n in zip(pictures, found, figure):  # the width of its page's text area, unless that would
            section = document.sections[s]  # run off the page's foot (less the room of the caption and the note, and
            width = section.page_width - section.left_margin - section.right_margin  # of the Figures heading over
            room = _figure_room(report.figures[n].note, Emu(width).inches)  # the first figure)
            assert room >= 5 / 6  # at least the caption's two lines and the note's three, 12 pt (1/6 inch) each
            height = section.page_height - section.top_margin - section.bottom_margin - Inches(room) - \
                (Pt(HEADING_ROOM) if n == 0 else 0)
            assert picture.width <= width + 1 and picture.height <= height + 1
            assert abs(picture.width - width) <= 1 or abs(picture.height - height) <= 1
    notes = [p.text for p in Document(io.BytesIO(report_docx(fit_report(shapes["method factor"]), 100))).paragraphs]
    assert any("grey ellipses: method factors" in text for text in notes)


CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
MEASURE = """<script>
const out = [];
for (const svg of document.querySelectorAll("svg")) {
  svg.style.width = svg.getAttribute("width") + "px"; svg.style.minWidth = "0"; svg.style.height = "auto";
  const frame = svg.getBoundingClientRect();
  out.push([...svg.querySelectorAll("text")].map(t => {
    const r = t.getBoundingClientRect();
    return [t.textContent, r.left - frame.left, r.top - frame.top, r.right - frame.left, r.bottom - frame.top];
  }));
}
document.getElementById("out").textContent = JSON.stringify(out);
</script>"""


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_no_label_overlaps_and_the_estimate_is_on_the_safe_side(tmp_path, shapes):
    check_in_a_browser([diagram_file(shapes[shape]) for shape in LAYOUTS], tmp_path)


def check_in_a_browser(pictures: list[str], tmp_path) -> None:
    """The browser lays out every text with its real font; the boxes it reports (glyph extents, without the
    halo) must not overlap, must stay in the picture, and must be no wider than the test's estimate."""
    import html
    import json

    from tests.reporting.test_reports import _chromium

    page = tmp_path / "layouts.html"
    page.write_text("<!DOCTYPE html><html><body style='margin:0'>" + "".join(f"<div>{svg}</div>" for svg in pictures)
                    + "<pre id='out'></pre>" + MEASURE + "</body></html>", encoding="utf-8")
    dom = _chromium("--dump-dom", page.resolve().as_uri()).stdout
    measured = json.loads(html.unescape(re.search(r"<pre id=\"out\">(.*?)</pre>", dom, re.S).group(1)))
    assert len(measured) == len(pictures)
    for svg, real in zip(pictures, measured):
        estimated, width, height = text_boxes(svg)
        assert [t for t, *_ in real] == [t for t, *_ in estimated]
        for (text, l, u, r, b), (_, el, _, er, _) in zip(real, estimated):
            assert -0.5 <= l and r <= width + 0.5 and -0.5 <= u and b <= height + 0.5, text
            assert r - l <= er - el, text  # the estimate is at least as wide as the real text
        for i, (t1, l1, u1, r1, b1) in enumerate(real):
            for t2, l2, u2, r2, b2 in real[i + 1:]:
                assert not (min(r1, r2) - max(l1, l2) > 0.5 and min(b1, b2) - max(u1, u2) > 0.5), (t1, t2)


def test_correlations_of_the_bottom_row_with_factors_above_are_listed_not_drawn(shapes):
    svg = diagram_file(shapes["method factor, correlated"])
    listed = re.findall(r'class="listed-correlation"[^>]*>([^<]*)<', svg)
    assert [text.split(":")[0] for text in listed] == ["trust with wording", "loyalty with wording"]
    assert svg.count('class="covariance') == 1  # trust with loyalty, drawn as an arc


@pytest.mark.parametrize("shape", ["higher-order, 60 items", "bifactor, 48 items", "method factor, 40 items"])
def test_a_big_model_is_drawn_in_bands_as_wide_as_a_page_and_every_loading_is_drawn_or_listed(shapes, shape):
    """A model too wide for one row is drawn in bands no wider than ``MAX_WIDTH``; a factor whose lines would cross
    the bands (the higher-order factor, the general factor) is drawn once above them.  The general and method
    factors' loadings (one on every item) are listed there with their values; the higher-order factor's are arrows
    (along the left edge to the factors of lower bands); every other loading is an arrow."""
    from cfa_tool.reporting.diagram import MAX_WIDTH
    from cfa_tool.reporting.numbers import unit

    result = shapes[shape]
    svg = diagram_file(result)
    root = ET.fromstring(svg)
    assert float(root.get("viewBox").split()[2]) <= MAX_WIDTH
    names = ["".join(t.itertext()) for t in root.iter(SVG + "text") if t.get("class") == "name"]
    assert sorted(names) == sorted(list(result.latent) + list(result.observed))  # each factor and item once
    listed = re.findall(r'class="listed-loading"[^>]*>([^<]*)<', svg)
    arrows = len(root.findall(f".//{SVG}line[@class='loading']")) + len(root.findall(f".//{SVG}path[@class='loading routed']"))
    rows = [r for r in result.estimates if r.kind == "loading"]
    assert arrows + len(listed) == len(rows)
    apart = {"higher-order, 60 items": set(), "bifactor, 48 items": {"general"},
             "method factor, 40 items": {"wording"}}[shape]
    # a trait wider than a band goes on in the next band, named there: its loadings on those items are listed
    continued = {"method factor, 40 items": {f"v{i}" for i in (*range(11, 21), *range(31, 41))}}.get(shape, set())
    assert sorted(listed) == sorted(f"{r.variables[1]} on {r.variables[0]}: {unit(r.standardized, 2)}"
                                    for r in rows if r.variables[0] in apart or r.variables[1] in continued)
    named = re.findall(r'class="continued"[^>]*>([^<]*)<', svg)
    assert named == (["trust, continued (loadings listed above)", "loyalty, continued (loadings listed above)"]
                     if continued else [])


def test_the_legend_explains_only_what_the_drawing_shows(shapes, hs_data):
    """A legend that explains curved arrows under a drawing that lists its correlations instead (new-user trial 9)
    misleads: each part is explained only when drawn.  Counted from the SVG itself."""
    from cfa_tool.reporting.diagram import diagram_with_legend

    for shape in shapes:
        svg, legend = diagram_with_legend(shapes[shape])
        arcs = 'class="covariance"' in svg or 'class="residual-covariance"' in svg
        assert ("curved double arrows" in legend) == arcs, shape
        assert ("dashed arrows" in legend) == ('stroke-dasharray="5,4"' in svg), shape
        assert ("correlations that would cross" in legend) == ('class="listed-correlation"' in svg), shape
        assert ("loadings whose arrows would cross" in legend) == ('class="listed-loading"' in svg), shape
        assert ("arrows along the left edge" in legend) == ('class="loading routed"' in svg), shape
        assert ("red:" in legend) == ('#b3261e' in svg), shape
    one_factor = cfa_tool.fit("factor g: x1..x9\nscale latent by variance\n", hs_data)
    svg, legend = diagram_with_legend(one_factor)
    assert "curved" not in legend and "dashed" not in legend and "listed" not in legend


@pytest.mark.parametrize("shape", ["60 items", "higher-order, 60 items", "bifactor, 48 items", "method factor, 40 items"])
def test_a_big_model_prints_its_smallest_text_at_7_points_across_a_landscape_page(shapes, shape):
    """The legibility rule of diagram.py: a drawing in bands is at most MAX_WIDTH units wide and no text is smaller
    than SMALLEST_TEXT units, so across the Word report's landscape text width (8.5 inches: letter paper, less the
    1.25 inch side margins python-docx's template gives) its smallest text prints at 7 pt or more (1 pt = 1/72
    inch).  Before the rule, residual values were 10 units in bands 1000 wide: 6.1 pt."""
    from cfa_tool.reporting.diagram import MIN_FIGURE_TEXT, PRINT_WIDTH, SMALLEST_TEXT
    from cfa_tool.reporting.picture import smallest_text

    svg = diagram_file(shapes[shape])
    root = ET.fromstring(svg)
    assert root.get("data-breaks")  # drawn in bands
    assert min(float(t.get("font-size")) for t in root.iter(SVG + "text")) >= SMALLEST_TEXT
    assert MIN_FIGURE_TEXT == 7.0 and PRINT_WIDTH == 8.5
    assert smallest_text(svg, 8.5) >= 7.0


def _ellipses(root) -> dict[str, tuple[float, float, float, float]]:
    """(cx, cy, rx, ry) of each factor's ellipse, by the name written in it (the text after it)."""
    out, last = {}, None
    for node in root.iter():
        if node.tag == SVG + "ellipse":
            last = tuple(float(node.get(a)) for a in ("cx", "cy", "rx", "ry"))
        elif node.tag == SVG + "text" and node.get("class") == "name" and last is not None:
            out["".join(node.itertext())] = last
            last = None
    return out


@pytest.mark.parametrize("shape", ["higher-order, 60 items"])
def test_a_higher_order_factor_drawn_above_bands_has_an_arrow_to_each_of_its_factors(shapes, shape):
    """The second-order factor of a model drawn in bands was drawn apart, its loadings only listed.  Now each of
    its loadings is an arrow from its ellipse (drawn once, above the bands) to the top of its factor's ellipse:
    straight to the factors of the first band, along the left edge and over their band to the others, each with
    its standardized value; nothing is listed.  Read back from the SVG (each group is translated as a whole, so
    the coordinates of one group's drawing are comparable).  (The demo's higher-order model, whose twelve items
    fill a page's height, is drawn sideways, every arrow straight: tests/reporting/test_diagram_higher_order.py.)"""
    from cfa_tool.reporting.diagram import MARGIN
    from cfa_tool.reporting.numbers import unit

    result = shapes[shape]
    svg = diagram_file(result)
    root = ET.fromstring(svg)
    assert root.get("data-breaks")  # drawn in bands
    assert 'class="listed-loading"' not in svg
    ellipses = _ellipses(root)
    higher = [r for r in result.estimates if r.kind == "loading" and r.variables[1] in result.latent]
    assert higher
    ends = []
    for node in root.iter():
        if node.tag == SVG + "line" and node.get("class") == "loading":
            ends.append(((float(node.get("x1")), float(node.get("y1"))), (float(node.get("x2")), float(node.get("y2")))))
        elif node.tag == SVG + "path" and node.get("class") == "loading routed":
            numbers = [float(v) for v in re.findall(r"-?[0-9.]+", node.get("d"))]  # M x,y H x V y H x V y
            assert numbers[2] < MARGIN  # along the left edge, left of every item
            ends.append(((numbers[0], numbers[1]), (numbers[4], numbers[5])))
    routed = 0
    for r in higher:
        top, child = ellipses[r.variables[0]], ellipses[r.variables[1]]
        arrow = [(a, b) for a, b in ends if abs(b[0] - child[0]) < 0.2 and abs(b[1] - (child[1] - child[3])) < 0.2]
        assert len(arrow) == 1, r.variables  # one arrow ends at the top of the factor's ellipse
        (x, y), _ = arrow[0]
        on_left = abs(x - (top[0] - top[2])) < 0.2 and abs(y - top[1]) < 0.2
        on_bottom = abs(x - top[0]) < 0.2 and abs(y - (top[1] + top[3])) < 0.2
        assert on_left or on_bottom  # and starts on the higher-order factor's ellipse
        routed += on_left
        assert unit(r.standardized, 2) in ["".join(t.itertext()) for t in root.iter(SVG + "text")]
    assert routed >= 1  # some factor in a band below the first


@pytest.mark.parametrize("shape", LAYOUTS)
def test_each_arc_of_every_layout_keeps_its_value_readable(shapes, shape):
    """The arcs of these layouts (factor correlations, residual correlations, an exploratory block's factors, two
    groups), measured as tests/reporting/test_diagram_arcs.py measures the rows of 2 to 8 factors."""
    from tests.reporting.test_diagram_arcs import unreadable

    assert unreadable(diagram_file(shapes[shape])) == []
