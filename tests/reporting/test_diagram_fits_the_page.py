"""A path diagram as wide as a page allows, every part of it inside the picture.

The legibility rule of reporting/diagram.py: no text smaller than ``SMALLEST_TEXT`` units and no drawing wider than
``MAX_WIDTH`` (1049) units, so that across the Word report's landscape text width (8.5 inches) its smallest text
prints at 7 pt or more (journals' artwork guides ask for about 6 to 8 pt: common practice).  Session note s20 found
drawings from the top wider than that: a factor of six items named in 20 characters (1126 units: its items were
drawn whole up to a tenth wider than a band), factors whose ellipses are wider than their items (eight factors of
two items named in 20 characters: 1952 units), higher-order factors with their disturbances (1147 units), and a key
of long question texts (1511 units).  (Its crowded fans drawn sideways: tests/reporting/test_diagram_fans.py.)

Measured on the SVG: every text's box (estimated as tests/reporting/test_diagram_layouts.text_boxes estimates it:
each character's width in Helvetica, from Adobe's font metrics, 1 em tall, the white halo around values) and every shape (boxes,
ellipses, circles, straight arrows, the routed arrows' polylines, the arcs' quadratic curves sampled densely) lies
inside the viewBox, no two texts overlap, and the viewBox is at most ``MAX_WIDTH`` wide.
"""

from __future__ import annotations

import functools
import html
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.diagram import MAX_WIDTH, diagram_file, path_diagram

from tests.conftest import simulate_cfa
from tests.reporting.test_diagram_layouts import CHROMIUM, SVG, check_in_a_browser, overlaps, text_boxes

FILL = "abcdefghijklnopqrstuvxyz"  # letters of about average width ('m' and 'w' are wider)


def _names(prefix: str, count: int, length: int) -> list[str]:
    return [f"{prefix}{k + 1:02d}".ljust(length, FILL[k % len(FILL)]) for k in range(count)]


@functools.lru_cache(maxsize=None)
def correlated(factors: int, items: int, item_name: int, factor_name: int, higher: int = 0):
    """``factors`` correlated factors of ``items`` items each (loadings .7, correlations .4), items and factors named
    in ``item_name`` and ``factor_name`` characters; with ``higher``, the factors two by two under that many
    correlated higher-order factors (and the rest on their own, correlated with them)."""
    p = factors * items
    loadings = np.zeros((p, factors))
    for i in range(p):
        loadings[i, i // items] = 0.7
    names, traits = _names("q", p, item_name), _names("f", factors, factor_name)
    data = simulate_cfa(loadings, 0.6 * np.eye(factors) + 0.4, np.diag(np.full(p, 0.51)), 400, factors + items, names)
    model = "".join(f"factor {f}: " + ", ".join(names[j * items:(j + 1) * items]) + "\n" for j, f in enumerate(traits))
    model += "".join(f"factor h{k + 1}: {traits[2 * k]}, {traits[2 * k + 1]}\n" for k in range(higher))
    return cfa_tool.fit(model, data, modification_indices=False)


@functools.lru_cache(maxsize=None)
def long_questions():
    """Eight items named by full question texts of 190 characters (a survey platform's export): drawn as I1..I8, the
    texts in a key under the drawing."""
    question = ("Thinking about your trips in the last four weeks, how much do you agree that the bus or train you took "
                "arrived at the stop at the time the printed timetable or the app had promised (item {})")
    names = [question.format(k + 1) for k in range(8)]
    data = simulate_cfa(np.kron(np.eye(2), np.full((4, 1), 0.7)), 0.6 * np.eye(2) + 0.4, np.diag(np.full(8, 0.51)),
                        400, 1, names)
    model = "".join(f"factor f{j + 1}: " + ", ".join(f'"{n}"' for n in names[4 * j:4 * j + 4]) + "\n" for j in range(2))
    return cfa_tool.fit(model, data, modification_indices=False)


#: drawings from the top (and, where a model fits a page's column, sideways), from the ordinary to the widest
WIDE = {
    "2 x 4, names of 12": lambda: correlated(2, 4, 12, 6),
    "4 x 5, names of 12": lambda: correlated(4, 5, 12, 12),
    "6 x 8, short names": lambda: correlated(6, 8, 4, 6),
    "3 x 6, names of 20": lambda: correlated(3, 6, 20, 6),  # 1126 units wide at cadd83a7
    "8 x 6, names of 20": lambda: correlated(8, 6, 20, 20),  # 1126
    "5 x 2, factor names of 20": lambda: correlated(5, 2, 4, 20),  # 1244
    "8 x 2, factor names of 20": lambda: correlated(8, 2, 4, 20),  # 1952
    "8 x 3, factor names of 20": lambda: correlated(8, 3, 4, 20),  # 1244
    "8 x 2, short names": lambda: correlated(8, 2, 4, 6),  # 1074
    "higher-order, 7 x 2 under 3": lambda: correlated(7, 2, 4, 6, higher=3),  # 1147
    "questions of 190 characters": long_questions,  # 1511
}


def shape_boxes(svg: str) -> list[tuple[str, float, float, float, float]]:
    """(kind, left, top, right, bottom) of every shape of the drawing, in the picture's units (the translations of
    enclosing groups applied); the white background and the arrowheads' marker left out."""
    boxes = []

    def walk(node, dx: float, dy: float) -> None:
        move = re.fullmatch(r"translate\(([-\d.]+)(?:[ ,]([-\d.]+))?\)", node.get("transform", "") or "translate(0)")
        dx, dy = dx + float(move.group(1)), dy + float(move.group(2) or 0)
        tag = node.tag.replace(SVG, "")
        at = {k: float(v) for k, v in node.attrib.items() if re.fullmatch(r"-?[\d.]+", v)}
        points = []
        if tag == "rect" and node.get("class"):
            points = [(at["x"], at["y"]), (at["x"] + at["width"], at["y"] + at["height"])]
        elif tag in ("ellipse", "circle"):
            rx, ry = (at["rx"], at["ry"]) if tag == "ellipse" else (at["r"], at["r"])
            points = [(at["cx"] - rx, at["cy"] - ry), (at["cx"] + rx, at["cy"] + ry)]
        elif tag == "line":
            points = [(at["x1"], at["y1"]), (at["x2"], at["y2"])]
        elif tag == "path" and node.get("class"):
            d = node.get("d")
            numbers = [float(v) for v in re.findall(r"-?[\d.]+", d)]
            if "Q" in d:  # M x0,y0 Q cx,cy x1,y1: the curve, sampled
                (x0, y0, cx, cy, x1, y1), t = numbers[:6], np.linspace(0.0, 1.0, 201)
                xs = (1 - t) ** 2 * x0 + 2 * t * (1 - t) * cx + t ** 2 * x1
                ys = (1 - t) ** 2 * y0 + 2 * t * (1 - t) * cy + t ** 2 * y1
                points = list(zip(xs, ys))
            else:  # M x,y then H x and V y steps
                x, y = numbers[:2]
                points = [(x, y)]
                for step, value in re.findall(r"([HV])(-?[\d.]+)", d):
                    x, y = (float(value), y) if step == "H" else (x, float(value))
                    points.append((x, y))
        if points:
            xs, ys = [x + dx for x, _ in points], [y + dy for _, y in points]
            boxes.append((node.get("class") or tag, min(xs), min(ys), max(xs), max(ys)))
        for child in node:
            walk(child, dx, dy)

    walk(ET.fromstring(svg), 0.0, 0.0)
    return boxes


def outside(svg: str) -> list[str]:
    """What leaves the picture, texts and shapes, in words."""
    texts, width, height = text_boxes(svg)
    return [f"{what!r} leaves the picture ({left:.0f}, {top:.0f}, {right:.0f}, {bottom:.0f} of {width:.0f} x {height:.0f})"
            for what, left, top, right, bottom in texts + shape_boxes(svg)
            if left < -0.5 or top < -0.5 or right > width + 0.5 or bottom > height + 0.5]


def test_the_measure_finds_a_shape_outside_the_picture():
    svg = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 60">'
           '<rect class="indicator" x="10" y="10" width="30" height="20"/>'
           '<g transform="translate(50,0)"><ellipse cx="40" cy="20" rx="15" ry="10"/></g>'
           '<path class="covariance" d="M10,50 Q50,90 90,50"/></svg>')
    assert outside(svg) == ["'ellipse' leaves the picture (75, 10, 105, 30 of 100 x 60)",
                            "'covariance' leaves the picture (10, 50, 90, 70 of 100 x 60)"]


@pytest.mark.parametrize("shape", list(WIDE))
def test_a_drawing_is_no_wider_than_a_page_and_everything_is_inside_it(shape):
    result = WIDE[shape]()
    svg = diagram_file(result)
    root = ET.fromstring(svg)
    assert float(root.get("viewBox").split()[2]) <= MAX_WIDTH
    assert outside(svg) == []
    assert overlaps(svg) == []
    # every factor and item drawn, once: nothing was left out to make it fit
    assert len(root.findall(f".//{SVG}ellipse")) == len(result.latent)
    assert len(root.findall(f".//{SVG}rect[@class='indicator']")) == len(result.observed)


@pytest.mark.parametrize("factors", [3, 5])
def test_a_factor_whose_named_items_are_wider_than_a_band_is_drawn_whole_with_short_labels(factors):
    """Eight items named in 20 characters are 1254 units wide (each name's characters as wide as Helvetica draws
    them, 16 units for the box, 14 between boxes), more than a band's 989: rather than cut each factor over two
    bands, half its loadings listed, every item is drawn with its short label (I1, I2, ...), named in the key, and
    every loading is an arrow.  (Six such items, 923 units wide, fit a band with their names: before each character
    was estimated alike, at 0.62 em, they did not.)"""
    result = correlated(factors, 8, 20, 6)
    svg = diagram_file(result)
    assert 'class="listed-loading"' not in svg and 'class="continued"' not in svg
    root = ET.fromstring(svg)
    assert len(root.findall(f".//{SVG}line[@class='loading']")) == len(result.observed)
    drawn = ["".join(t.itertext()) for t in root.iter(SVG + "text") if t.get("class") == "name"]
    assert sorted(drawn) == sorted([f"I{k + 1}" for k in range(len(result.observed))] + list(result.latent))
    assert re.findall(r'class="key"[^>]*>([^<]*)<', svg) == list(result.observed)


def test_a_long_question_goes_on_in_lines_of_the_key():
    """Each question of 190 characters is named in the key beside its label, in two lines that give it whole."""
    svg = diagram_file(long_questions())
    lines = re.findall(r'class="(key|key-more)"[^>]*>([^<]*)<', svg)
    named = []
    for kind, text in lines:
        if kind == "key":
            named.append(text)
        else:
            named[-1] += " " + text
    assert named == list(long_questions().observed)
    assert len(lines) == 16


@functools.lru_cache(maxsize=None)
def long_group_names():
    """Two groups, one named in 149 characters (a survey's description of a mode of answering)."""
    data = simulate_cfa(np.kron(np.eye(2), np.full((3, 1), 0.7)), 0.6 * np.eye(2) + 0.4, np.diag(np.full(6, 0.51)), 400, 1,
                        [f"y{i + 1}" for i in range(6)])
    data["mode"] = np.where(np.arange(400) % 2, LONG_GROUP, "online")
    return cfa_tool.fit("factor a: y1, y2, y3\nfactor b: y4, y5, y6\n", data, group="mode")


LONG_GROUP = ("Riders who answered the survey on paper at a station kiosk during the second survey wave of the year, "
              "in the evening, after their last trip of the day")


def test_a_long_group_name_goes_on_in_lines_inside_the_picture():
    """At cadd83a7 the name ran out of the picture (a drawing 767 units wide, the name's estimated extent reaching
    1165); now the drawing is widened to hold it up to MAX_WIDTH, and the rest goes on in a line under it."""
    for svg in (diagram_file(long_group_names()), *(path_diagram(long_group_names(), g) for g in (0, 1))):
        assert outside(svg) == [] and overlaps(svg) == []
        assert float(ET.fromstring(svg).get("viewBox").split()[2]) <= MAX_WIDTH
    names = [html.unescape(n) for n in re.findall(r'class="group-name"[^>]*>([^<]*)<', diagram_file(long_group_names()))]
    # every label quoted, one needing quotes (the one rule of the report's group names; s24: they were bare)
    assert names[-1] == 'Group "online"' and " ".join(names[:-1]) == f'Group "{LONG_GROUP}"' and len(names) == 3


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_no_text_overlaps_and_the_estimate_is_on_the_safe_side(tmp_path):
    check_in_a_browser([diagram_file(make()) for make in (*WIDE.values(), long_group_names)], tmp_path)
