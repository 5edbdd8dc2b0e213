"""The path diagram of a higher-order and of a bifactor model, measured in its SVG.

Session note s19: the higher-order layout pushed first-order factors to the right of their items (a factor's
ellipse, wider than its few items, was moved along the row until it stood over another factor's items), the demo's
higher-order model carried one of its arrows down the left edge of the drawing and around a band of items, and the
demo's bifactor model listed its general factor's twelve loadings above the drawing instead of drawing them.  Each
first-order factor now stands beside its own items and a higher-order factor beyond them (a bifactor model's
general factor on the other side of the items from the specific factors), every loading an arrow, no two straight
arrows crossing, every text inside the picture and none on another (tests/reporting/test_diagram_layouts.py's
measure), for 2 to 8 first-order factors, short and long names, and the demo's models on the demo data.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting.diagram import diagram_file, path_diagram

from tests.conftest import simulate_cfa
from tests.reporting.test_diagram_layouts import _bifactor, overlaps

SVG = "{http://www.w3.org/2000/svg}"


def shapes(svg: str):
    """(factors: name -> (x, y) of its ellipse's centre, items: name -> (x, y) of its box's centre, the straight
    segments of every line and of every arrow carried along the edge) of a drawing of one group."""
    root = ET.fromstring(svg)
    group = root.find(f"{SVG}g/{SVG}g") or root.find(f"{SVG}g")
    ellipses = [(float(e.get("cx")), float(e.get("cy"))) for e in root.iter(f"{SVG}ellipse")]
    rects = [(float(r.get("x")) + float(r.get("width")) / 2, float(r.get("y")) + float(r.get("height")) / 2)
             for r in root.iter(f"{SVG}rect") if "indicator" in (r.get("class") or "")]
    factors, items = {}, {}
    for t in root.iter(f"{SVG}text"):
        if t.get("class") != "name":
            continue
        x, y = float(t.get("x")), float(t.get("y")) - 4
        near = [e for e in ellipses if abs(e[0] - x) < 0.2 and abs(e[1] - y) < 0.2]
        if near:
            factors[t.text] = near[0]
        else:
            items[t.text] = next(r for r in rects if abs(r[0] - x) < 0.2 and abs(r[1] - y) < 0.2)
    segments = [((float(e.get("x1")), float(e.get("y1"))), (float(e.get("x2")), float(e.get("y2"))))
                for e in root.iter(f"{SVG}line")]
    for path in root.iter(f"{SVG}path"):
        if "routed" in (path.get("class") or ""):  # M x,y H x V y H x V y
            steps = re.findall(r"([MHV])([-\d.]+)(?:,([-\d.]+))?", path.get("d"))
            x, y, points = 0.0, 0.0, []
            for op, a, b in steps:
                x, y = (float(a), float(b)) if op == "M" else (float(a), y) if op == "H" else (x, float(a))
                points.append((x, y))
            segments += list(zip(points, points[1:]))
    assert group is not None
    return factors, items, segments


def crossings(segments) -> list:
    """Pairs of segments that cross each other inside both (segments that meet at an end, such as two arrows from
    one factor, do not cross)."""
    found = []
    for i, (p1, p2) in enumerate(segments):
        for q1, q2 in segments[i + 1:]:
            d = (p2[0] - p1[0]) * (q2[1] - q1[1]) - (p2[1] - p1[1]) * (q2[0] - q1[0])
            if abs(d) < 1e-9:
                continue
            t = ((q1[0] - p1[0]) * (q2[1] - q1[1]) - (q1[1] - p1[1]) * (q2[0] - q1[0])) / d
            u = ((q1[0] - p1[0]) * (p2[1] - p1[1]) - (q1[1] - p1[1]) * (p2[0] - p1[0])) / d
            if 0.01 < t < 0.99 and 0.01 < u < 0.99:
                found.append(((p1, p2), (q1, q2)))
    return found


def higher_order(k: int, long_names: bool, per: int = 3):
    """A model of ``k`` first-order factors of ``per`` items each under one second-order factor (loadings .7 and .75
    in the population), fitted to 800 rows simulated from it."""
    loadings = np.zeros((k * per, k))
    for i in range(k * per):
        loadings[i, i // per] = 0.7
    names = [f"q{i + 1}" for i in range(k * per)]
    data = simulate_cfa(loadings, 0.4375 * np.eye(k) + 0.5625, np.diag(np.full(k * per, 0.51)), 800, 20 + k, names)
    traits = [f"first_order_trait_{j + 1}" if long_names else f"f{j + 1}" for j in range(k)]
    text = "".join(f"factor {t}: " + ", ".join(names[per * j:per * j + per]) + "\n" for j, t in enumerate(traits))
    text += "factor general_trait: " + ", ".join(traits) + "\n"
    if k == 2:  # two factors under one: identified with equal loadings
        text += f"equal loading(general_trait, {traits[0]}), loading(general_trait, {traits[1]})\n"
    return cfa_tool.fit(text, data), traits, names, per


def _check_higher_order(svg: str, traits, names, per: int, top: str = "general_trait") -> str:
    """The measures of a drawing of a higher-order model; the way it is laid out ('sideways' or 'from the top')."""
    assert overlaps(svg) == []
    factors, items, segments = shapes(svg)
    assert crossings(segments) == []
    sideways = len({round(items[n][0], 1) for n in names}) == 1
    across, down = (0, 1) if sideways else (1, 0)  # the axis along which the items stand, and the one beyond them
    for j, trait in enumerate(traits):
        own = [items[n] for n in names[per * j:per * j + per]]
        # beside its own items: within their extent, and between them and the higher-order factor
        assert min(p[down] for p in own) - 0.5 <= factors[trait][down] <= max(p[down] for p in own) + 0.5, trait
        assert factors[top][across] < factors[trait][across] < min(p[across] for p in own), trait
    return "sideways" if sideways else "from the top"


@pytest.mark.parametrize("long_names", [False, True], ids=["short names", "long names"])
@pytest.mark.parametrize("k", range(2, 9))
def test_each_first_order_factor_beside_its_items_and_the_higher_order_factor_beyond(k, long_names):
    result, traits, names, per = higher_order(k, long_names)
    svg = path_diagram(result)
    way = _check_higher_order(svg, traits, names, per)
    if k <= 5:  # up to 15 items: one column of items on a page, every arrow straight
        assert way == "sideways"
        assert svg.count('class="loading"') == len(traits) + len(names)
    assert overlaps(diagram_file(result)) == []


def test_the_demo_higher_order_model_draws_every_arrow_straight(rider_demo):
    from cfa_tool.resources import resource_dir

    result = cfa_tool.fit((resource_dir("models") / "rider_higher_order.cfa").read_text(), rider_demo)
    svg = path_diagram(result)
    traits = ["punctuality", "comfort", "courtesy"]
    names = list(result.observed)
    assert _check_higher_order(svg, traits, names, 4, top="service") == "sideways"
    assert svg.count('class="loading"') == 15 and "routed" not in svg  # 12 items' loadings and 3 of service
    assert svg.count('class="residual-covariance"') == 1  # easy_transfer with room_to_stand, drawn
    assert overlaps(diagram_file(result)) == []


def _check_bifactor(svg: str, general: str, specific: list[str], names: list[str]) -> None:
    assert overlaps(svg) == []
    factors, items, segments = shapes(svg)
    assert crossings(segments) == []
    assert 'class="listed-loading"' not in svg  # every loading an arrow
    per = len(names) // len(specific)
    xs = [items[n][0] for n in names]
    assert len({round(x, 1) for x in xs}) == 1  # the items in one column
    for j, f in enumerate(specific):
        own = [items[n][1] for n in names[per * j:per * j + per]]
        assert min(own) <= factors[f][1] <= max(own), f
        assert factors[general][0] < xs[0] < factors[f][0], f  # the general factor on the other side of the items


@pytest.mark.parametrize("parts", [2, 3, 4])
def test_a_bifactor_model_has_its_general_factor_on_the_other_side_of_the_items(parts):
    result = _bifactor(12, parts, 800, 30 + parts)
    svg = path_diagram(result)
    names = [f"item{i + 1:02d}" for i in range(12)]
    _check_bifactor(svg, "general", [f"part_{j + 1}" for j in range(parts)], names)
    assert svg.count('class="loading"') == 24
    assert overlaps(diagram_file(result)) == []


def test_the_demo_bifactor_model_draws_its_general_factors_loadings(rider_demo):
    from cfa_tool.resources import resource_dir

    result = cfa_tool.fit((resource_dir("models") / "rider_bifactor.cfa").read_text(), rider_demo)
    svg = path_diagram(result)
    _check_bifactor(svg, "experience", ["punctuality", "comfort", "courtesy"], list(result.observed))
    assert svg.count('class="loading"') == 24
    assert overlaps(diagram_file(result)) == []


def test_two_correlated_second_order_factors_keep_their_arc_on_the_left():
    """Six first-order factors under two correlated second-order factors: their correlation an arc on the left of
    the second-order factors, crossing no arrow (an arc is not straight: its value must stand clear of the rest)."""
    loadings = np.zeros((12, 6))
    for i in range(12):
        loadings[i, i // 2] = 0.75
    names = [f"v{i + 1}" for i in range(12)]
    phi = np.full((6, 6), 0.3) + np.kron(np.eye(2), np.full((3, 3), 0.25)) + 0.45 * np.eye(6)
    data = simulate_cfa(loadings, phi, np.diag(np.full(12, 0.45)), 900, 41, names)
    text = "".join(f"factor t{j + 1}: v{2 * j + 1}, v{2 * j + 2}\n" for j in range(6))
    text += "factor left: t1, t2, t3\nfactor right: t4, t5, t6\n"
    result = cfa_tool.fit(text, data)
    svg = path_diagram(result)
    assert overlaps(svg) == []
    factors, items, segments = shapes(svg)
    assert crossings(segments) == []
    assert svg.count('class="covariance"') == 1
    arc = re.search(r'class="covariance" d="M([-\d.]+),[-\d.]+ Q([-\d.]+)', svg)
    assert float(arc.group(2)) < float(arc.group(1)) < min(x for x, _ in factors.values()) + 200
    for j in range(6):
        own = [items[f"v{2 * j + 1}"][1], items[f"v{2 * j + 2}"][1]]
        assert min(own) <= factors[f"t{j + 1}"][1] <= max(own)
        parent = "left" if j < 3 else "right"
        assert factors[parent][0] < factors[f"t{j + 1}"][0] < items["v1"][0]


@pytest.mark.parametrize("model", ["rider_three_factors", "rider_one_factor"])
def test_the_demo_models_of_correlated_factors_stand_in_one_column(rider_demo, model):
    """The demo's twelve items are too wide for one row: from the top, the three-factor model was drawn in two bands,
    its three correlations listed above the drawing, and the one-factor model went on in a second band, six of its
    loadings listed.  Their items now stand in one column, each factor beside its own items, its correlations arcs
    on the left: every loading an arrow, every correlation an arc, nothing listed, no arrow crossing another."""
    from cfa_tool.resources import resource_dir

    result = cfa_tool.fit((resource_dir("models") / f"{model}.cfa").read_text(), rider_demo)
    svg = path_diagram(result)
    assert overlaps(svg) == [] and "listed" not in svg and not ET.fromstring(svg).get("data-breaks")
    factors, items, segments = shapes(svg)
    assert crossings(segments) == []
    assert len({round(x, 1) for x, _ in items.values()}) == 1
    assert svg.count('class="loading"') == 12 and svg.count('class="covariance"') == len(factors) * (len(factors) - 1) // 2
    children = {f: [r.variables[1] for r in result.estimates if r.kind == "loading" and r.variables[0] == f]
                for f in factors}
    for f, own in children.items():
        ys = [items[x][1] for x in own]
        assert min(ys) <= factors[f][1] <= max(ys) and factors[f][0] < items[own[0]][0]
    from tests.reporting.test_diagram_arcs import unreadable

    assert unreadable(diagram_file(result)) == []
