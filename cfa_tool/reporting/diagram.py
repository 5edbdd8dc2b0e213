"""Path diagram as SVG, drawn by the tool.

Conventions of the field: factors as ellipses, observed indicators as
rectangles, single-headed arrows for loadings (labelled with standardized
values), curved double-headed arrows for covariances (labelled with
correlations), and a small circle for each residual term, labelled with the
share of the indicator's variance it leaves unexplained.  Layout: indicators in
one row, each factor centred over its indicators, higher-order factors above
the factors they explain.  Only ellipses are factors and only rectangles are
indicators, so the drawing can be checked by counting them.
"""

from __future__ import annotations

from cfa_tool.reporting.escape import html_text as esc
from cfa_tool.reporting.numbers import unit

ROW_GAP = 130
BOX_H = 34
ELLIPSE_RY = 24
RESIDUAL_R = 11
PROBLEM_COLOUR = "#b3261e"  # parts of the drawing that show a problem of the solution


def _box_width(name: str) -> float:
    return max(58.0, 7.4 * len(name) + 18.0)


def _ellipse_rx(name: str) -> float:
    return max(42.0, 4.4 * len(name) + 22.0)


def _label(x: float, y: float, text: str, size: int = 11, anchor: str = "middle", cls: str = "value",
           problem: bool = False) -> str:
    colour = f' fill="{PROBLEM_COLOUR}" font-weight="bold"' if problem else ""
    return (f'<text class="{cls}{" problem" if problem else ""}" x="{x:.1f}" y="{y:.1f}" font-size="{size}" '
            f'text-anchor="{anchor}"{colour} paint-order="stroke" stroke="#ffffff" stroke-width="3">{esc(text)}</text>')



BLOCK_LOADING_DRAWN = 0.30  # rotated loadings of exploratory blocks drawn from this size on (common practice)
LEGEND = ("Standardized values. Ellipses: factors; rectangles: observed items; circles: residual terms (share of "
          "variance not explained); dashed arrows: loadings fixed to set a factor's scale; curved double arrows: "
          "correlations.")
BLOCK_LEGEND = "Exploratory blocks: their rotated loadings of .30 or more in absolute value are drawn."


def path_diagram(result, group: int = 0, legend: bool = False) -> str:
    """The model of ``result`` (one group's standardized values) as an SVG document string.  Elements whose
    parameter is part of a problem of the solution (a negative residual variance, a correlation beyond
    +/-1, ...) are drawn in red with the class ``problem``."""
    label = result.groups[group].label
    rows = [r for r in result.estimates if r.group == label] + _block_rows(result)
    problems = getattr(result, "problems", ())

    def flagged(kind: str, variables: tuple[str, ...]) -> bool:
        return any(p.touches(kind, variables, label) for p in problems)

    def stroke(kind: str, variables: tuple[str, ...], normal: str = "#333") -> str:
        return f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"' if flagged(kind, variables) else f'stroke="{normal}"'

    observed, latent = list(result.observed), list(result.latent)
    obs_set = set(observed)
    loadings = [r for r in rows if r.kind == "loading"]
    children: dict[str, list[str]] = {f: [] for f in latent}
    for r in loadings:
        children[r.variables[0]].append(r.variables[1])

    level: dict[str, int] = {}

    def level_of(f: str, seen: frozenset = frozenset()) -> int:
        if f in level:
            return level[f]
        below = [c for c in children[f] if c not in obs_set and c not in seen]
        level[f] = 1 + max((level_of(c, seen | {f}) for c in below), default=0)
        return level[f]

    for f in latent:
        level_of(f)
    top = max(level.values(), default=1)

    # indicators ordered by the first factor they load on
    first_factor = {}
    for r in loadings:
        if r.variables[1] in obs_set:
            first_factor.setdefault(r.variables[1], latent.index(r.variables[0]))
    order = sorted(observed, key=lambda x: (first_factor.get(x, len(latent)), observed.index(x)))
    margin = 30.0
    x = margin
    centre: dict[str, float] = {}
    widths: dict[str, float] = {}
    for name in order:
        widths[name] = _box_width(name)
        centre[name] = x + widths[name] / 2
        x += widths[name] + 14
    width = max(x - 14 + margin, 200.0)
    for lvl in range(1, top + 1):
        for f in [f for f in latent if level[f] == lvl]:
            kids = [c for c in children[f] if c in centre]
            own = [c for c in kids if c in obs_set and first_factor.get(c) == latent.index(f)] or kids
            centre[f] = sum(centre[c] for c in own) / len(own) if own else width / 2
    _spread_factors(latent, level, centre)
    width = max(width, max((centre[f] + _ellipse_rx(f) + 50 for f in latent), default=0.0))
    # room above the top row for the arcs of factor covariances
    lifts = [_lift(abs(centre[r.variables[0]] - centre[r.variables[1]])) for r in rows if r.kind == "factor_covariance"]
    arc_room = max(lifts, default=0.0) + 24
    y_ind = margin + arc_room + top * ROW_GAP
    y_of = {f: y_ind - level[f] * ROW_GAP + BOX_H / 2 for f in latent}
    y_res = y_ind + BOX_H + 48
    drops = [20 + 0.08 * abs(centre[r.variables[0]] - centre[r.variables[1]]) for r in rows if r.kind == "residual_covariance"]
    height = y_res + RESIDUAL_R + max(drops, default=0.0) + 50
    legend_y = height
    legend_lines = ["Standardized values. Ellipses: factors; rectangles: observed items;",
                    "circles: residual terms (share of variance not explained);",
                    "dashed arrows: loadings fixed to set a factor's scale; curved double arrows: correlations."]
    if problems:
        legend_lines.append("Red: a value that makes the solution impossible or doubtful (see the report).")
    if legend:  # a file that stands alone says what its shapes mean
        height += 10 + 18 * len(legend_lines)
        width = max(width, 640.0)
    if label is not None:  # the group is named on its own diagram
        margin_top = 26
        height += margin_top
    else:
        margin_top = 0

    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" class="path-diagram" viewBox="0 0 {width:.0f} {height:.0f}" '
        f'width="{width:.0f}" height="{height:.0f}" style="width:100%;height:auto;min-width:{min(width, 900):.0f}px" '
        f'font-family="Helvetica, Arial, sans-serif" role="img">',
        f"<title>{esc(result.model_name)}{'' if label is None else ' — group ' + esc(label)}</title>",
        '<defs><marker id="head" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="7" markerHeight="7" orient="auto-start-reverse">'
        '<path d="M0,0 L10,5 L0,10 z" fill="#333"/></marker></defs>',
    ]
    if label is not None:
        parts.append(f'<text class="group-name" x="{margin:.1f}" y="20" font-size="15" font-weight="bold">'
                     f'Group {esc(label)}</text>')
        parts.append(f'<g transform="translate(0,{margin_top})">')
    # loadings
    for r in loadings:
        f, target = r.variables
        x1, y1 = centre[f], y_of[f] + ELLIPSE_RY
        if target in obs_set:
            x2, y2 = centre[target], y_ind
        else:
            x2, y2 = centre[target], y_of[target] - ELLIPSE_RY
        dashed = ' stroke-dasharray="5,4"' if not r.free else ""
        parts.append(f'<line class="loading" x1="{x1:.1f}" y1="{y1:.1f}" x2="{x2:.1f}" y2="{y2:.1f}" stroke="#333" '
                     f'stroke-width="1.3"{dashed} marker-end="url(#head)"/>')
        lx, ly = x1 + 0.72 * (x2 - x1), y1 + 0.72 * (y2 - y1)
        impossible = result.groups[group].r_squared.get(target, 0.0) > 1.0  # R-squared above 1
        parts.append(_label(lx, ly + 4, unit(r.standardized, 2), problem=impossible or flagged(r.kind, r.variables)))
    # covariances between factors (arcs above) and between residuals (arcs below)
    for r in rows:
        if r.kind == "factor_covariance":
            a, b = r.variables
            xa, xb = sorted((centre[a], centre[b]))
            y = min(y_of[a], y_of[b]) - ELLIPSE_RY
            lift = _lift(xb - xa)
            bad = flagged(r.kind, r.variables)
            parts.append(_arc(xa, y, xb, y, -lift, "covariance", bad))
            parts.append(_label((xa + xb) / 2, y - lift / 2 - 4, unit(r.standardized, 2), problem=bad))
        elif r.kind == "residual_covariance":
            a, b = r.variables
            xa, xb = sorted((centre[a], centre[b]))
            y = y_res + RESIDUAL_R
            drop = 20 + 0.08 * (xb - xa)
            bad = flagged(r.kind, r.variables)
            parts.append(_arc(xa, y, xb, y, drop, "residual-covariance", bad))
            parts.append(_label((xa + xb) / 2, y + drop / 2 + 14, unit(r.standardized, 2), problem=bad))
    # factors
    for f in latent:
        rx = _ellipse_rx(f)
        bad = flagged("factor_variance", (f,))
        parts.append(f'<ellipse class="factor{" problem" if bad else ""}" cx="{centre[f]:.1f}" cy="{y_of[f]:.1f}" '
                     f'rx="{rx:.1f}" ry="{ELLIPSE_RY}" fill="#eef3fb" '
                     + (f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"/>' if bad else 'stroke="#1f3b73" stroke-width="1.5"/>'))
        parts.append(f'<text class="name" x="{centre[f]:.1f}" y="{y_of[f] + 4:.1f}" font-size="13" text-anchor="middle">{esc(f)}</text>')
    # disturbances of factors below higher-order factors
    for r in rows:
        if r.kind == "factor_variance" and level.get(r.variables[0], 1) < top and any(
                r.variables[0] in children[g] for g in latent):
            f = r.variables[0]
            rx = _ellipse_rx(f)
            cx, cy = centre[f] + rx + 30, y_of[f]
            parts.append(f'<circle class="residual" cx="{cx:.1f}" cy="{cy:.1f}" r="{RESIDUAL_R}" fill="#fff" stroke="#333"/>')
            parts.append(f'<line x1="{cx - RESIDUAL_R:.1f}" y1="{cy:.1f}" x2="{centre[f] + rx:.1f}" y2="{cy:.1f}" '
                         f'stroke="#333" marker-end="url(#head)"/>')
            parts.append(_label(cx, cy - RESIDUAL_R - 5, unit(r.standardized, 2)))
    # indicators and their residuals
    for name in order:
        w = widths[name]
        parts.append(f'<rect class="indicator" x="{centre[name] - w / 2:.1f}" y="{y_ind:.1f}" width="{w:.1f}" height="{BOX_H}" '
                     f'fill="#ffffff" stroke="#333" stroke-width="1.3"/>')
        parts.append(f'<text class="name" x="{centre[name]:.1f}" y="{y_ind + BOX_H / 2 + 4:.1f}" font-size="12" '
                     f'text-anchor="middle">{esc(name)}</text>')
        bad = flagged("residual_variance", (name,))
        parts.append(f'<circle class="residual{" problem" if bad else ""}" cx="{centre[name]:.1f}" cy="{y_res:.1f}" '
                     f'r="{RESIDUAL_R}" fill="#fff" {stroke("residual_variance", (name,))}/>')
        parts.append(f'<line x1="{centre[name]:.1f}" y1="{y_res - RESIDUAL_R:.1f}" x2="{centre[name]:.1f}" y2="{y_ind + BOX_H:.1f}" '
                     f'stroke="#333" marker-end="url(#head)"/>')
        resid = next((r for r in rows if r.kind == "residual_variance" and r.variables[0] == name), None)
        if resid is not None:
            parts.append(_label(centre[name] + RESIDUAL_R + 3, y_res + 4, unit(resid.standardized, 2), size=10, anchor="start",
                                problem=bad))
    if label is not None:
        parts.append("</g>")
    if legend:
        for k, line in enumerate(legend_lines):
            colour = f' fill="{PROBLEM_COLOUR}"' if problems and k == len(legend_lines) - 1 else ""
            parts.append(f'<text class="legend" x="{margin:.1f}" y="{legend_y + margin_top + 16 + 18 * k:.1f}" '
                         f'font-size="11"{colour}>{esc(line)}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def _lift(distance: float) -> float:
    """Height of a covariance arc over two factors this far apart."""
    return 26 + 0.12 * distance


def _arc(x1: float, y1: float, x2: float, y2: float, bend: float, cls: str, problem: bool = False) -> str:
    cx, cy = (x1 + x2) / 2, y1 + bend * 2
    look = f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"' if problem else 'stroke="#555" stroke-width="1.1"'
    return (f'<path class="{cls}{" problem" if problem else ""}" d="M{x1:.1f},{y1:.1f} Q{cx:.1f},{cy:.1f} {x2:.1f},{y2:.1f}" '
            f'fill="none" {look} marker-start="url(#head)" marker-end="url(#head)"/>')


def _spread_factors(latent: list[str], level: dict[str, int], centre: dict[str, float]) -> None:
    """Push apart factors of one level whose ellipses would overlap."""
    for lvl in set(level.values()):
        row = sorted((f for f in latent if level[f] == lvl), key=lambda f: centre[f])
        for a, b in zip(row, row[1:]):
            need = _ellipse_rx(a) + _ellipse_rx(b) + 16
            if centre[b] - centre[a] < need:
                centre[b] = centre[a] + need


def _block_rows(result) -> list:
    """The rotated exploratory blocks as rows to draw: loadings of .30 or more in absolute value (the block's
    report table shows every loading) and the rotated factors' correlations."""
    from types import SimpleNamespace

    out = []
    for block in getattr(result, "exploratory", ()):
        for i, item in enumerate(block.items):
            for j, factor in enumerate(block.factors):
                if abs(block.standardized[i, j]) >= BLOCK_LOADING_DRAWN:
                    out.append(SimpleNamespace(kind="loading", variables=(factor, item), free=True, group=None,
                                               standardized=float(block.standardized[i, j])))
        m = len(block.factors)
        if block.oblique:
            out += [SimpleNamespace(kind="factor_covariance", variables=(block.factors[b], block.factors[a]), free=True,
                                    group=None, standardized=float(block.correlations[a, b]))
                    for a in range(m) for b in range(a)]
        out += [SimpleNamespace(kind="factor_covariance", variables=(f, g), free=True, group=None,
                                standardized=float(block.other_correlations[a, k]))
                for a, f in enumerate(block.factors) for k, g in enumerate(block.other_factors)]
    return out
