"""The values of a fan of arrows drawn sideways, each clear of the other arrows of its fan.

Session note s20: in a steep fan (a factor's arrows to sixteen items in one column) each loading's value stood 1.2
units from the next arrow, so that its white halo cut that arrow and the value could be read as either arrow's.  Now
a fan runs across as far as its values need (reporting.diagram._fan_run).  Measured on the SVG: each value's box,
estimated as tests/reporting/test_diagram_layouts.text_boxes estimates text (each character's width in Helvetica,
from Adobe's font metrics, 1 em tall), keeps its halo (1.5 units) and a unit of air from every arrow but its own; no two
texts overlap and everything lies inside the picture (tests/reporting/test_diagram_fits_the_page.outside).
"""

from __future__ import annotations

import functools
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.diagram import MAX_WIDTH, diagram_file
from cfa_tool.reporting.text_extent import text_width

from tests.conftest import simulate_cfa
from tests.reporting.test_diagram_fits_the_page import _names, correlated, outside
from tests.reporting.test_diagram_layouts import CHROMIUM, HALO, SVG, check_in_a_browser, overlaps

@functools.lru_cache(maxsize=None)
def higher_order(factors: int, items: int):
    """``factors`` first-order factors of ``items`` items (loadings .7) under one higher-order factor."""
    p = factors * items
    loadings = np.zeros((p, factors))
    for i in range(p):
        loadings[i, i // items] = 0.7
    names, traits = _names("q", p, 6), _names("f", factors, 6)
    data = simulate_cfa(loadings, 0.5 * np.eye(factors) + 0.5, np.diag(np.full(p, 0.51)), 500, 2, names)
    model = "".join(f"factor {f}: " + ", ".join(names[j * items:(j + 1) * items]) + "\n" for j, f in enumerate(traits))
    return cfa_tool.fit(model + "factor top: " + ", ".join(traits) + "\n", data, modification_indices=False)


@functools.lru_cache(maxsize=None)
def bifactor(parts: int, items: int):
    """A general factor on every item (loadings .6) and ``parts`` specific factors of ``items`` items (.5)."""
    p = parts * items
    loadings = np.zeros((p, parts + 1))
    loadings[:, 0] = 0.6
    for i in range(p):
        loadings[i, 1 + i // items] = 0.5
    names, specific = _names("q", p, 20), _names("s", parts, 6)
    data = simulate_cfa(loadings, np.eye(parts + 1), np.diag(np.full(p, 0.4)), 800, 3, names, method="cholesky")
    model = "factor general: " + ", ".join(names) + "\n" + "".join(
        f"factor {f}: " + ", ".join(names[j * items:(j + 1) * items]) + "\n" for j, f in enumerate(specific))
    return cfa_tool.fit(model + "scale latent by variance\nuncorrelated general, " + ", ".join(specific) + "\n", data,
                        modification_indices=False)


@functools.lru_cache(maxsize=None)
def one_factor(items: int, seed: int = 4):
    """One factor of ``items`` items named in 20 characters, about a third of them reverse-keyed (loadings -.7)."""
    signs = np.where(np.random.default_rng(seed).random(items) < 0.3, -0.7, 0.7)
    names = _names("q", items, 20)
    data = simulate_cfa(signs[:, None], np.eye(1), np.diag(np.full(items, 0.51)), 600, seed, names)
    return cfa_tool.fit("factor f1: " + ", ".join(names) + "\n", data, modification_indices=False)


FANS = {
    "one factor, 12 items": lambda: one_factor(12),
    "one factor, 16 items": lambda: one_factor(16),  # each value 1.2 units from the next arrow at cadd83a7
    "one factor, 18 items": lambda: one_factor(18),
    "three factors, 15 items": lambda: correlated(3, 5, 20, 6),
    "higher-order, 8 x 2": lambda: higher_order(8, 2),
    "higher-order, 5 x 3": lambda: higher_order(5, 3),
    "bifactor, 2 x 6": lambda: bifactor(2, 6),
    "bifactor, 4 x 3": lambda: bifactor(4, 3),
}
CLEARANCE = HALO + 1.0  # from a value's text to another arrow: its white halo and a unit of air


def _segment_distance(segment: tuple[float, ...], box: tuple[float, ...]) -> float:
    """The least distance between a straight segment and a box (0 where they meet), the segment sampled densely."""
    x1, y1, x2, y2 = segment
    t = np.linspace(0.0, 1.0, 801)
    xs, ys = x1 + t * (x2 - x1), y1 + t * (y2 - y1)
    dx = np.maximum(np.maximum(box[0] - xs, xs - box[2]), 0.0)
    dy = np.maximum(np.maximum(box[1] - ys, ys - box[3]), 0.0)
    return float(np.hypot(dx, dy).min())


def crowded(svg: str) -> list[str]:
    """Values of loadings nearer than ``CLEARANCE`` to an arrow other than their own (each value follows its arrow
    in the SVG), in words."""
    found = []
    for group in ET.fromstring(svg).iter(SVG + "g"):
        arrows, values, last = [], [], None
        for node in group:
            if node.tag == SVG + "line" and node.get("class") == "loading":
                last = tuple(float(node.get(a)) for a in ("x1", "y1", "x2", "y2"))
                arrows.append(last)
            elif node.tag == SVG + "text" and node.get("class", "").startswith("value") and last is not None:
                values.append(("".join(node.itertext()), float(node.get("x")), float(node.get("y")), last))
                last = None
        for text, x, y, own in values:
            half = text_width(text, 12) / 2  # (values are drawn at 12 units)
            box = (x - half, y - 0.8 * 12, x + half, y + 0.2 * 12)
            near = min((_segment_distance(a, box) for a in arrows if a != own), default=np.inf)
            if near < CLEARANCE:
                found.append(f"{text} at ({x:.0f}, {y:.0f}) is {near:.1f} units from another arrow")
    return found


def test_the_measure_finds_a_value_on_another_arrow():
    svg = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 200 200"><g>'
           '<line class="loading" x1="0" y1="100" x2="100" y2="0"/><text class="value" x="78" y="26">.70</text>'
           '<line class="loading" x1="0" y1="100" x2="100" y2="20"/><text class="value" x="78" y="42">.71</text>'
           '<line class="loading" x1="0" y1="100" x2="100" y2="200"/><text class="value" x="78" y="180">.72</text>'
           '</g></svg>')
    # .70's box (12 x (0.278 + 2 x 0.556 + 0.15) = 18.48 wide: 68.76 to 87.24 across, 16.4 to 28.4 down) has its
    # corner (87.24, 28.4) 1.808 / sqrt(1.64) = 1.41 units from the second arrow (0.8 x + y = 100), less than its
    # halo and a unit of air; .71's box has its corner (68.76, 32.4) 1.16 / sqrt(2) = 0.82 units from the first
    # (x + y = 100); .72 is alone
    assert crowded(svg) == [".70 at (78, 26) is 1.4 units from another arrow",
                            ".71 at (78, 42) is 0.8 units from another arrow"]


@pytest.mark.parametrize("shape", list(FANS))
def test_each_value_of_a_steep_fan_stands_clear_of_the_other_arrows(shape):
    """Drawn sideways (the items in one column: every item's box at one x), no two texts overlap, everything lies
    inside the picture, and each loading's value keeps its halo and a unit of air from every other arrow."""
    svg = diagram_file(FANS[shape]())
    root = ET.fromstring(svg)
    assert len({node.get("x") for node in root.iter(SVG + "rect") if node.get("class") == "indicator"}) == 1
    assert float(root.get("viewBox").split()[2]) <= MAX_WIDTH
    assert overlaps(svg) == []
    assert outside(svg) == []
    assert crowded(svg) == []


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_no_text_overlaps_and_the_estimate_is_on_the_safe_side(tmp_path):
    check_in_a_browser([diagram_file(make()) for make in FANS.values()], tmp_path)
