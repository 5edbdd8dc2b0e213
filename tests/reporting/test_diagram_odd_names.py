"""Names of every kind inside their shapes and inside the drawing.

Session note s21: the drawing estimated every character at 0.62 em, so that names of wide letters ('W' is 0.944 em
in Helvetica, 'M' and 'm' 0.833: Adobe's font metrics) ran out of their boxes and ellipses, and so did Cyrillic,
CJK and emoji names; a factor named in 200 characters made a drawing 1937 units wide (more than ``MAX_WIDTH``, its
text printed below 7 pt); long names in the lists of correlations ran out of a narrow drawing; and the value after a
name written right to left was drawn on its left, reversed ('17.\u2212' for '\u2212.17').  Measured on the SVG,
each text's box estimated as tests/reporting/test_diagram_layouts.text_boxes estimates it (each character's width in
the font the drawing names, on the safe side, which the browser tests check against the text Chromium draws).
"""

from __future__ import annotations

import functools
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.diagram import MAX_WIDTH, NAME_ROOM, NAME_SIZE, diagram_file
from cfa_tool.reporting.text_extent import LEFT_TO_RIGHT_MARK, text_width

from tests.conftest import simulate_cfa
from tests.reporting.test_diagram_fits_the_page import outside
from tests.reporting.test_diagram_layouts import (CHROMIUM, SVG, check_in_a_browser, estimated_width, method_data,
                                                  overlaps)


def _fit(factors: tuple[str, ...], items: tuple[tuple[str, ...], ...], seed: int = 1):
    """Correlated factors (loadings .7, correlations .4) of the named items, fitted to data simulated from them."""
    names = [name for block in items for name in block]
    loadings = np.zeros((len(names), len(factors)))
    row = 0
    for j, block in enumerate(items):
        loadings[row:row + len(block), j] = 0.7
        row += len(block)
    data = simulate_cfa(loadings, 0.6 * np.eye(len(factors)) + 0.4, np.diag(np.full(len(names), 0.51)), 300, seed,
                        names)
    model = "".join(f'factor "{f}": ' + ", ".join(f'"{n}"' for n in block) + "\n" for f, block in zip(factors, items))
    return cfa_tool.fit(model, data, modification_indices=False)


@functools.lru_cache(maxsize=None)
def _method(trust: str, loyalty: str, wording: str):
    """Two traits of five items and a method factor on four of them, correlated with the traits: its correlations
    listed above a narrow drawing (tests/reporting/test_diagram_layouts.py, 'method factor, correlated')."""
    data = method_data()
    return cfa_tool.fit(f'factor "{trust}": v1..v5\nfactor "{loyalty}": v6..v10\nfactor "{wording}": v2, v4, v7, v9\n'
                        f'method "{wording}"\nscale latent by variance\n', data)


ALIKE = "Perceived reliability of the night bus service on line {} as rated by riders on weekdays"
LONG = "Perceived reliability of the night bus service as reported by riders of the three city lines, "
ODD = {
    "wide and narrow letters": lambda: _fit(("WWWWWWWW", "iiiiiiii", "MiWmiWlw"),
                                            (("W1WWWWWWW", "WWWWWWWWWWWW", "MMMMMMMMMMMMMMMMMMMM"),
                                             ("i1iiiiiii", "iiiiiiiiiiiiiiiiiiii", "llllll"),
                                             ("MiWmiWlwW", "mWmWmWmWmWmWmWmWmWmW", "Wm_12"))),
    "wide letters from the top": lambda: _fit(("WWWWWWWWWWWWWWWW", "MMMMMMMM"),
                                              (("WWWWWWWWWWWWWW1", "WWWWWWWWWWWWWW2", "mmmmmmmmmmmmmmmmmmmm"),
                                               ("M1", "M2", "M3"))),
    "Greek and Cyrillic": lambda: _fit(("Удовлетворённость", "Ψυχολογία", "ЖШЩЮЖШЩЮ"),
                                       (("Вопрос1", "Вопрос2", "ЩЩЩЩЩЩЩЩ"), ("ερώτηση1", "ερώτηση2", "ΨΩΨΩΨΩΨΩ"),
                                        ("ЖЖЖЖЖЖЖЖЖЖЖЖЖЖЖЖЖЖЖЖ", "ШШ", "ЮЮ"))),
    "CJK and emoji": lambda: _fit(("満足度満足度満足度", "信頼性", "\U0001f600\U0001f600\U0001f600"),
                                  (("質問一", "質問二質問二質問二質問二", "質問三"), ("項目一", "項目二", "項目三"),
                                   ("\U0001f600a", "\U0001f600" * 7, "\U0001f44d\U0001f3fdx"))),
    "combining marks, right to left": lambda: _fit(("e\u0301e\u0301e\u0301e\u0301", "שביעות רצון", "رضا العملاء"),
                                                   (("b\u0308c\u0308", "q\u0303", "q\u0304\u0305\u0306\u0307\u0309"),
                                                    ("שאלה1", "שאלה2", "שאלה3"), ("سؤال1", "سؤال2", "سؤال3"))),
    "markup characters": lambda: _fit(("a & b", "x < y", "q > r"), (("i&1", "i<2", "i>3"), ("j&amp;1", "j<!--2", "j]]>3"),
                                                                    ("k1", "k'2", "k&lt;3"))),
    "control characters": lambda: _fit(("f\x1b[2J\x1b[2J",), (("WWW\x1b[31mWWW\x1b[0m\x07", "a\x07b", "c\x01d"),)),
    "a factor of 200 characters": lambda: _fit(((LONG * 3)[:200], "b"), (("x1", "x2", "x3"), ("y1", "y2", "y3"))),
    "long names alike but in their middle": lambda: _fit(tuple(ALIKE.format(k + 1) for k in range(3)),
                                                         (("x1", "x2", "x3"), ("y1", "y2", "y3"), ("z1", "z2", "z3"))),
    "long names listed": lambda: _method(LONG + "wave one", "Loyalty of riders who would choose the bus again",
                                         "Wording of the reverse-keyed statements in the second half"),
    "names right to left listed": lambda: _method("אמון", "נאמנות", "ניסוח"),
    "long names of bands listed": lambda: _fit(tuple(f"Satisfaction with part {k + 1} of the trip from home to the "
                                                     "workplace, as rated" for k in range(6)),
                                               tuple(tuple(f"q{k}_{j}" for j in range(6)) for k in range(6))),
    "60 items of one factor": lambda: _fit(("Everyday riding",), (tuple(f"WWWWWWWWWW{k:02d}" for k in range(60)),)),
}


def names_outside_their_shapes(svg: str) -> list[str]:
    """Names (texts of class 'name') whose estimated box leaves the shape drawn just before them (an item's box, a
    factor's ellipse), in words."""
    found = []
    last = None
    for node in ET.fromstring(svg).iter():
        tag = node.tag.replace(SVG, "")
        if tag in ("rect", "ellipse"):
            last = node
        if tag != "text" or node.get("class") != "name":
            continue
        size, w = float(node.get("font-size")), estimated_width(node)
        x, y = float(node.get("x")), float(node.get("y"))
        left, top, right, bottom = x - w / 2, y - 0.8 * size, x + w / 2, y + 0.2 * size  # (anchored in the middle)
        text = "".join(node.itertext())
        if last is None:
            found.append(f"{text!r} has no shape")
        elif last.tag == SVG + "rect":
            x0, y0 = float(last.get("x")), float(last.get("y"))
            x1, y1 = x0 + float(last.get("width")), y0 + float(last.get("height"))
            if not (x0 <= left and right <= x1 and y0 <= top and bottom <= y1):
                found.append(f"{text!r} ({right - left:.0f} wide) leaves its box ({x1 - x0:.0f} wide)")
        else:
            cx, cy, rx, ry = (float(last.get(a)) for a in ("cx", "cy", "rx", "ry"))
            if any(((px - cx) / rx) ** 2 + ((py - cy) / ry) ** 2 > 1 for px in (left, right) for py in (top, bottom)):
                found.append(f"{text!r} ({right - left:.0f} wide) leaves its ellipse ({2 * rx:.0f} wide)")
    return found


def test_the_measure_finds_a_name_outside_its_shape():
    svg = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 300 100">'
           '<rect class="indicator" x="10" y="10" width="60" height="34"/>'
           '<text class="name" x="40" y="31" font-size="12" text-anchor="middle">WWWWW</text>'
           '<ellipse cx="200" cy="50" rx="50" ry="24"/>'
           '<text class="name" x="200" y="54" font-size="13" text-anchor="middle">iiiiiiii</text></svg>')
    # five W: 12 x (5 x 0.944 + 0.15) = 58.4 units, inside 60; with a sixth it would not be
    assert names_outside_their_shapes(svg) == []
    assert names_outside_their_shapes(svg.replace("WWWWW", "WWWWWW")) == ["'WWWWWW' (70 wide) leaves its box (60 wide)"]
    # eight W at 13 units: 100.1 units, more than the ellipse's 96 at the text's top and bottom (6.6 from its centre)
    assert names_outside_their_shapes(svg.replace("iiiiiiii", "WWWWWWWW")) == \
        ["'WWWWWWWW' (100 wide) leaves its ellipse (100 wide)"]


@pytest.mark.parametrize("case", list(ODD))
def test_every_name_is_inside_its_shape_and_everything_inside_the_drawing(case):
    result = ODD[case]()
    svg = diagram_file(result)
    root = ET.fromstring(svg)  # (well-formed: every name escaped)
    assert names_outside_their_shapes(svg) == []
    assert outside(svg) == [] and overlaps(svg) == []
    assert float(root.get("viewBox").split()[2]) <= MAX_WIDTH
    assert len(root.findall(f".//{SVG}ellipse")) == len(result.latent)
    assert len(root.findall(f".//{SVG}rect[@class='indicator']")) == len(result.observed)


def test_names_with_markup_characters_are_drawn_as_written():
    drawn = ["".join(t.itertext()) for t in ET.fromstring(diagram_file(ODD["markup characters"]())).iter(SVG + "text")
             if t.get("class") == "name"]
    assert sorted(drawn) == sorted(["a & b", "x < y", "q > r", "i&1", "i<2", "i>3", "j&amp;1", "j<!--2", "j]]>3", "k1",
                                    "k'2", "k&lt;3"])


def test_a_name_too_long_for_its_ellipse_is_drawn_shortened_and_whole_in_its_title():
    """The factor of 200 characters: its beginning and its end joined by '…', no wider than NAME_ROOM, and its whole
    name the title of its ellipse (a browser shows it, a screen reader reads it); the drawing at most MAX_WIDTH wide
    (1937 units at 4bad237e)."""
    name = (LONG * 3)[:200]
    root = ET.fromstring(diagram_file(ODD["a factor of 200 characters"]()))
    shown = [t for t in root.iter(SVG + "text") if t.get("class") == "name" and "…" in "".join(t.itertext())]
    assert len(shown) == 1
    text = "".join(shown[0].itertext())
    head, tail = text.split("…")
    assert name.startswith(head) and name.endswith(tail) and len(head) > 20 and len(tail) > 5
    assert text_width(text, NAME_SIZE) <= NAME_ROOM
    titles = [e.find(SVG + "title") for e in root.iter(SVG + "ellipse")]
    assert [t.text for t in titles if t is not None] == [name]


def test_names_shortened_alike_keep_the_part_where_they_differ():
    """Shortened to their beginning and end, the three names would all read 'Perceived reliability of the night…on
    weekdays': each keeps, between two '…', the words around its line's number."""
    root = ET.fromstring(diagram_file(ODD["long names alike but in their middle"]()))
    drawn = [("".join(t.itertext())) for t in root.iter(SVG + "text") if t.get("class") == "name" and "…" in
             "".join(t.itertext())]
    assert len(drawn) == len(set(drawn)) == 3
    for k, text in enumerate(drawn):
        head, part, tail = text.split("…")
        whole = ALIKE.format(k + 1)
        assert whole.startswith(head) and whole.endswith(tail) and f"line {k + 1}" in part and part in whole


def test_long_names_in_the_lists_of_a_narrow_drawing_are_shortened_and_whole_in_their_titles():
    result = ODD["long names listed"]()
    svg = diagram_file(result)
    listed = re.findall(r'<g><title>([^<]*)</title><text class="listed-correlation[^>]*>([^<]*)</text></g>', svg)
    assert len(listed) == 2  # trust with wording, loyalty with wording: the first has a name shortened
    whole, drawn = listed[0]
    assert whole.startswith(LONG + "wave one with ") and "…" in drawn and drawn.endswith(whole[-5:])


def test_a_value_after_a_name_written_right_to_left_stays_after_it():
    """A left-to-right mark after each Hebrew name of a list's entry (Unicode Standard Annex 9, rules W7 and N1:
    without it, the colon and the value take the name's direction and are drawn on its left, '.05\u2212 :ניסוח')."""
    svg = diagram_file(ODD["names right to left listed"]())
    listed = re.findall(r'class="listed-correlation[^>]*>([^<]*)<', svg)
    assert len(listed) == 2
    for entry in listed:
        assert re.fullmatch(f"(אמון|נאמנות){LEFT_TO_RIGHT_MARK} with ניסוח{LEFT_TO_RIGHT_MARK}: \u2212?\\.\\d\\d", entry)


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_no_name_overlaps_and_the_estimate_is_on_the_safe_side(tmp_path):
    check_in_a_browser([diagram_file(make()) for make in ODD.values()], tmp_path)
