"""The correlation arcs of the path diagram: each value readable as the value of its own pair of factors.

With three or more correlated factors in a row the arcs cross (two arcs between interleaved pairs of a row
must), and a value drawn where two other arcs cross cannot be told apart from theirs (new-user trial 18: the
.52 between the second and third of four factors sat on the crossing of the arcs from the first to the third
and from the second to the fourth).  Measured on the SVG itself: each arc is the quadratic Bezier curve of its
path, sampled densely; each value's box is estimated as the layout tests estimate text
(tests/reporting/test_diagram_layouts.text_boxes: each character's width in Helvetica, from Adobe's font metrics,
with the white halo).  A value is readable as its arc's when no other arc passes through its box, its box overlaps
no other text, and its own arc is the nearest curve to its centre.
"""

from __future__ import annotations

import functools
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.diagram import diagram_file

from tests.conftest import simulate_cfa
from tests.reporting.test_diagram_layouts import CHROMIUM, HALO, SVG, check_in_a_browser, estimated_width, overlaps

ARCS = ("covariance", "residual-covariance")


def arcs_and_values(svg: str) -> list[tuple[np.ndarray, tuple[float, float, float, float], str]]:
    """Each arc of ``svg`` (points along its curve, in the picture's units) with its value's box (left, top,
    right, bottom) and text: the value is the text element that follows the arc's path."""
    root = ET.fromstring(svg)
    found, pending = [], []

    def walk(node, dx: float, dy: float) -> None:
        move = re.fullmatch(r"translate\(([-\d.]+)(?:[ ,]([-\d.]+))?\)", node.get("transform", "") or "translate(0)")
        dx, dy = dx + float(move.group(1)), dy + float(move.group(2) or 0)
        kind = (node.get("class") or "").split()
        if node.tag == SVG + "path" and kind and kind[0] in ARCS:
            x1, y1, cx, cy, x2, y2 = (float(v) for v in re.findall(r"-?\d+(?:\.\d+)?", node.get("d")))
            t = np.linspace(0.0, 1.0, 2001)[:, None]
            ends = np.array([[x1 + dx, y1 + dy], [cx + dx, cy + dy], [x2 + dx, y2 + dy]])
            pending.append((1 - t) ** 2 * ends[0] + 2 * t * (1 - t) * ends[1] + t ** 2 * ends[2])
        elif node.tag == SVG + "text" and pending:
            size, text = float(node.get("font-size")), "".join(node.itertext())
            x, y = float(node.get("x")) + dx, float(node.get("y")) + dy
            w = estimated_width(node)
            left = {"start": x, "middle": x - w / 2, "end": x - w}[node.get("text-anchor", "start")]
            found.append((pending.pop(), (left - HALO, y - 0.8 * size - HALO, left + w + HALO, y + 0.2 * size + HALO),
                          text))
        for child in node:
            walk(child, dx, dy)

    walk(root, 0.0, 0.0)
    assert not pending  # every arc has its value
    return found


def unreadable(svg: str) -> list[str]:
    """The values of ``svg``'s arcs that a reader could take for another arc's, in words (empty when none)."""
    arcs = arcs_and_values(svg)
    found = []
    for k, (points, (left, top, right, bottom), text) in enumerate(arcs):
        centre = np.array([(left + right) / 2, (top + bottom) / 2])
        own = np.min(np.hypot(*(points - centre).T))
        for j, (other, _, other_text) in enumerate(arcs):
            if j == k:
                continue
            inside = (other[:, 0] > left) & (other[:, 0] < right) & (other[:, 1] > top) & (other[:, 1] < bottom)
            if inside.any():
                found.append(f"the arc of {other_text} passes through the value {text}")
            if np.min(np.hypot(*(other - centre).T)) <= own:
                found.append(f"the value {text} is as near the arc of {other_text} as its own")
    return found + overlaps(svg)


def correlated(sizes: list[int], seed: int, long_names: bool = False, rows: int = 500):
    """A model of correlated factors with ``sizes`` items each, fitted to data simulated from it (loadings .7,
    correlations of either sign, so that some values take four characters: '−.35')."""
    rng = np.random.default_rng(seed)
    m, p = len(sizes), sum(sizes)
    loadings = np.zeros((p, m))
    starts = np.cumsum([0] + sizes)
    for j in range(m):
        loadings[starts[j]:starts[j + 1], j] = 0.7
    phi = 1.5 * np.eye(m)
    for a in range(m):
        for b in range(a):
            phi[a, b] = phi[b, a] = rng.uniform(-0.4, 0.6)
    phi /= np.sqrt(np.outer(np.diag(phi), np.diag(phi)))
    assert np.linalg.eigvalsh(phi).min() > 0  # a correlation matrix a population can have
    stem = "belonging_teacher_support_" if long_names else "y"
    names = [f"{stem}{i + 1:02d}" for i in range(p)]
    data = simulate_cfa(loadings, phi, np.diag(np.full(p, 0.5)), rows, seed, names)
    model = "".join(f"factor f{j + 1}: {', '.join(names[starts[j]:starts[j + 1]])}\n" for j in range(m))
    return cfa_tool.fit(model, data)


def second_order(seed: int):
    """Four factors of two items under two correlated higher-order factors, each over two of them, and two more
    factors of two items correlated with both and with each other: four correlated factors in the row above the
    first-order factors.  (Six factors under three, and a seventh, made a row 1147 units wide, which is now drawn in
    bands, its correlations listed: the legibility rule of reporting.diagram.MAX_WIDTH.)"""
    lower = np.zeros((12, 6))
    for i in range(12):
        lower[i, i // 2] = 0.75
    upper = np.zeros((6, 4))
    for j in range(4):
        upper[j, j // 2] = 0.8
    upper[4, 2] = upper[5, 3] = 1.0
    psi = 0.5 * np.eye(4) + 0.5
    phi = upper @ psi @ upper.T + np.diag([0.36] * 4 + [0.0, 0.0])
    names = [f"q{i + 1}" for i in range(12)]
    data = simulate_cfa(lower, phi, np.diag(np.full(12, 0.45)), 800, seed, names)
    model = "".join(f"factor f{j + 1}: q{2 * j + 1}, q{2 * j + 2}\n" for j in range(6))
    model += "factor h1: f1, f2\nfactor h2: f3, f4\n"
    return cfa_tool.fit(model, data)


SHAPES = {
    "2 factors": lambda: correlated([3, 3], 1),
    "3 factors": lambda: correlated([3, 3, 3], 2),
    "4 factors": lambda: correlated([4, 4, 4, 4], 3),
    "4 factors, long names": lambda: correlated([4, 4, 4, 4], 4, long_names=True),
    "4 factors, uneven": lambda: correlated([2, 6, 3, 4], 5),
    "5 factors": lambda: correlated([3, 3, 3, 3, 3], 6),
    "6 factors": lambda: correlated([2, 3, 2, 3, 2, 3], 7),
    "7 factors": lambda: correlated([2] * 7, 8),
    "8 factors": lambda: correlated([2] * 8, 9),
    "higher-order": lambda: second_order(10),
}


@functools.lru_cache(maxsize=None)
def drawing(shape: str) -> str:
    return diagram_file(SHAPES[shape]())


@pytest.mark.parametrize("shape", list(SHAPES))
def test_each_correlation_is_read_from_its_own_arc(shape):
    svg = drawing(shape)
    assert 'class="listed-correlation"' not in svg  # drawn as arcs, in one row
    factors = 4 if shape == "higher-order" else int(shape.split()[0])  # (h1, h2, f5 and f6 correlated)
    assert svg.count('class="covariance') == factors * (factors - 1) // 2  # an arc for every pair
    assert unreadable(svg) == []


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_no_value_of_an_arc_overlaps_another_text(tmp_path):
    check_in_a_browser([drawing(shape) for shape in SHAPES], tmp_path)


def test_the_measure_finds_a_value_on_a_crossing():
    """Two arcs that cross at (100, 55.6) (each curve's point at t = 2/3 and 1/3): a value drawn there is named,
    one drawn on its own arc away from the other (at t = 0.8, (170, 68)) is not."""
    arc = '<path class="covariance" d="M{},100 Q{},{} {},100"/>'
    value = '<text class="value" x="{}" y="{}" font-size="12" text-anchor="middle" stroke="#fff">{}</text>'
    svg = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 300 120">'
           + arc.format(0, 75, 0, 150) + value.format(100, 59.6, ".40")
           + arc.format(50, 125, 0, 200) + value.format(170, 72.0, ".30") + "</svg>")
    assert unreadable(svg) == ["the arc of .30 passes through the value .40",
                               "the value .40 is as near the arc of .30 as its own"]
