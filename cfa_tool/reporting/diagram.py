"""Path diagram as SVG, drawn by the tool.

Conventions of the field: factors as ellipses, observed indicators as
rectangles, single-headed arrows for loadings (labelled with standardized
values), curved double-headed arrows for covariances (labelled with
correlations), and a small circle for each residual term, labelled with the
share of the indicator's variance it leaves unexplained.  Only ellipses are
factors and only rectangles are indicators, so the drawing can be checked by
counting them.

A higher-order or a bifactor model whose items fit in one column of a page's height is drawn sideways
(``_sideways``): from the left, the factors of the highest level, each level's factors beside what they load on,
the first-order factors each beside its own items, the items in one column and their residuals; a bifactor model's
general factor on the left of the items and its specific factors on their right, the residuals under the items.
No two arrows cross.

Any other model is laid out from the top: higher-order factors (one row per level), the factors
of the traits each over its own items (moved along the row only as far as its last item, the items
moved instead when a factor needs more room: ``_place_items``), the items, and, when the model
has them, a bottom row for factors that load on items of several traits: the
general factor of a bifactor model and method factors (grey).  Residual
circles then sit beside their items, so the lines from the bottom row reach
the items unobstructed.  A model whose items, or the factors over them, do not
fit in one row of ``MAX_WIDTH`` is drawn in bands of whole factors, one band under
the other, each as wide as its items or its factors need (``_factor_room``);
a factor whose items alone are wider than a band goes on in the next band,
named there, its loadings to those items listed;
its factor correlations, and residual correlations that would join two bands,
are then listed at the top of the drawing instead of arcs crossing the bands;
so are correlations between a factor of the bottom row and one above it.  The
factors whose lines would cross the bands (higher-order, general and method
factors) are then drawn in a row of their own above the bands, under the lists.
A higher-order factor keeps its arrows: straight down to its factors in the
first band, and for those of later bands a line from the left of its ellipse
down the left edge of the drawing and over the band to the top of each factor
(each such factor's value beside it).  The loadings of general and method
factors (one on every item), and a cross-loading that would join two bands, are
listed with the correlations.  No text is drawn smaller than ``SMALLEST_TEXT``
and no band wider than ``MAX_WIDTH``: the legibility rule stated there.
Arcs between factors leave each ellipse at their own point of its top, so they
do not all meet at one point, and rise in proportion to their length, so two arcs
that share a factor never cross (arcs between interleaved pairs of a row must cross
once); each correlation's value stands on its own arc, at its apex unless another
arc or value is there, then at the nearest free point along it.  The root element
names the heights between bands (and between groups), where nothing is drawn, in
``data-breaks``: the Word report cuts a drawing too large for one page there
(reporting.picture.svg_strips).
"""

from __future__ import annotations

import enum
import math
import textwrap
from dataclasses import dataclass, field

import numpy as np

from cfa_tool.errors import printable
from cfa_tool.reporting.escape import html_text as esc
from cfa_tool.reporting.numbers import printed, unit
from cfa_tool.reporting.text_extent import ELLIPSIS, in_line, shortened, text_width, wrapped

ROW_GAP = 130
BOX_H = 34
ELLIPSE_RY = 24
RESIDUAL_R = 11
BOX_GAP = 14  # between neighbouring items
SIDE_GAP = 10  # between an item and its residual beside it
MARGIN = 30.0
# Legibility rule: no text of a drawing prints below MIN_FIGURE_TEXT points.  Every text is at least SMALLEST_TEXT
# units high, and a band of items is at most MAX_WIDTH units wide, so that a band set across the widest text area a
# report gives it, PRINT_WIDTH inches (the Word report's landscape page: letter paper, 1.25 inch side margins),
# prints its smallest text at SMALLEST_TEXT * 72 * PRINT_WIDTH / MAX_WIDTH >= MIN_FIGURE_TEXT points (1 pt = 1/72
# inch).  The Word report sets a drawing of several bands whole on one page when its text prints at least
# reporting.docx_report.ONE_PAGE_TEXT there, and cuts it into strips between the bands otherwise (where each prints
# at MIN_FIGURE_TEXT or more; reporting.picture.svg_strips); the HTML report shows it at one unit to a pixel up to its width (at least 900 pixels wide), so its smallest text
# is at least 12 * 900 / MAX_WIDTH, about 10 pixels, at normal zoom.
MIN_FIGURE_TEXT = 7.0  # points: journals' artwork guides ask for about 6 to 8 pt (common practice)
SMALLEST_TEXT = 12  # units: the size of the values, the lists and the key
PRINT_WIDTH = 8.5  # inches
MAX_WIDTH = math.floor(SMALLEST_TEXT * 72 * PRINT_WIDTH / MIN_FIGURE_TEXT)  # 1049: wider bands break into the next
BAND_GAP = 40.0
EDGE_X, EDGE_STEP = 8.0, 7.0  # the lines down the left edge carrying higher-order factors' arrows to lower bands
LANE_GAP = 20.0  # between such lines over a band's factors (a value's height and some air)
# a factor whose items are wider than a band is drawn in parts over several bands (session note s20: drawn whole up to
# a tenth wider, six items of 20-character names made a drawing 1126 units wide, its text 6.5 pt across the page)
# the width of a text: reporting.text_extent.text_width, each character's advance width in the font the drawing names
NAME_SIZE = 13  # font size of a factor's name in its ellipse
ITEM_SIZE = 12  # font size of an item's name in its box
NAME_ROOM = 300.0  # units: a name wider than this at NAME_SIZE (about 45 characters) is drawn shortened, '…' in its
# middle (drawn_names), its whole name the title of its shape (a factor of 200 characters had made a
# drawing 1937 units wide, its ellipse alone 1800); lists and labels name it so too (session note s21)
VALUE_ROOM = text_width("\u2212.00", SMALLEST_TEXT)  # the widest value the drawing writes ('−.63')
PROBLEM_COLOUR = "#b3261e"  # parts of the drawing that show a problem of the solution
METHOD_FILL = "#e6e6e6"  # method factors: a way of answering, not a trait
FACTOR_FILL = "#eef3fb"


LONG_NAME = 20  # an item name longer than this: every item drawn with a short label, named in a key under the drawing
KEY_TITLE = "Items"


def item_labels(result) -> dict[str, str]:
    """What each item's box shows when some item's name is long (more than ``LONG_NAME`` characters, as the full
    question texts of a survey platform's export): I1, I2, ... in the order of the data's items (the numbers of
    the item matrices of the report), named in a key under the drawing; empty when every name is short (the
    names drawn themselves)."""
    observed = list(result.observed)
    if all(len(name) <= LONG_NAME for name in observed):
        return {}
    return short_labels(result)


def short_labels(result) -> dict[str, str]:
    """I1, I2, ... for the items in the order of the data's items, each label no name of the model (see
    ``item_labels``; also for a drawing from the top whose factor's items, named, are wider than a band:
    ``_layout``)."""
    observed = list(result.observed)
    names = set(observed) | set(result.latent)
    for prefix in LABEL_PREFIXES:  # never a label that is also a name of the model (a column called 'I3')
        labels = {name: f"{prefix}{k + 1}" for k, name in enumerate(observed)}
        if not names & set(labels.values()):
            return labels
    return {name: f"#{k + 1}" for k, name in enumerate(observed)}


#: the short labels' letters, the first one no name of the model takes (I1, I2, ...; then item1, ...; then Q1, ...)
LABEL_PREFIXES = ("I", "item", "Q", "V")


def _value(value: float) -> str:
    """A standardized value as the drawing writes it: two decimals without the leading zero (reporting.numbers.unit,
    as the tables), set by the printed views' one rule (reporting.numbers.printed: '\u2212.63', as the Word file's and
    the HTML page's tables print it)."""
    return printed(unit(value, 2))


def drawn_names(names) -> dict[str, str]:
    """Each of ``names`` (a model's factors and items) as the drawing writes it (its control characters as escapes:
    ``printable``, as ``esc`` writes them): whole up to ``NAME_ROOM``, else shortened in its middle
    (``text_extent.shortened``); names that would be shortened alike ('Perceived reliability of the…rated by riders'
    for the ratings of line 1 and of line 2) keep, between two '…', the part where each differs from the others, and
    when even these are alike, they are written whole: two shapes never read alike."""
    whole = {name: printable(name) for name in names}
    shown = {name: shortened(text, NAME_SIZE, NAME_ROOM) for name, text in whole.items()}
    alike: dict[str, list[str]] = {}
    for name, text in shown.items():
        alike.setdefault(text, []).append(name)
    for group in (g for g in alike.values() if len(g) > 1):
        for name in group:
            text = whole[name]
            head, tail = shown[name].split(ELLIPSIS, 1)
            differs = min(next((k for k, (a, b) in enumerate(zip(text, whole[other])) if a != b),
                               min(len(text), len(whole[other]))) for other in group if other != name)
            part = text[max(len(head), differs - 6):min(len(text) - len(tail), differs + 10)]
            shown[name] = f"{head}{ELLIPSIS}{part}{ELLIPSIS}{tail}"
    counts: dict[str, int] = {}
    for text in shown.values():
        counts[text] = counts.get(text, 0) + 1
    return {name: text if counts[text] == 1 else whole[name] for name, text in shown.items()}


def _box_width(text: str) -> float:
    """The width of an item's box around ``text`` (as drawn: ``drawn_names``): the text (its estimate holds the overhang
    of its ends, ``text_extent.OVERHANG``) and 8 units either side."""
    return max(46.0, text_width(text, ITEM_SIZE) + 16.0)


#: a factor's name is drawn across its ellipse at most this share of the ellipse's width at the name's height (its
#: box reaches 6.6 units from the centre, where the ellipse is sqrt(1 - (6.6 / 24) ** 2) = 96% of its width)
NAME_SHARE = 0.8


def _ellipse_rx(text: str) -> float:
    """The half-width of a factor's ellipse: its name as drawn (``text``: ``drawn_names``) across ``NAME_SHARE`` of
    it, and 16 units of air either side."""
    return max(42.0, text_width(text, NAME_SIZE) / 2 / NAME_SHARE + 16.0)


def _name_text(x: float, y: float, text: str, size: int) -> str:
    """A factor's or an item's name drawn centred at (x, y), as the drawing writes it (``text``)."""
    return (f'<text class="name" x="{x:.1f}" y="{y:.1f}" font-size="{size}" text-anchor="middle">'
            f'{esc(text)}</text>')


def _closed(inside: str, tag: str) -> str:
    """The end of an element's start tag: empty ('/>'), or holding ``inside`` and closed."""
    return f">{inside}</{tag}>" if inside else "/>"


def _whole_name(name: str, names: dict[str, str]) -> str:
    """The title of a shape whose name is drawn shortened (``names``: ``drawn_names``): the whole name (shown as a
    tooltip by a browser, read by a screen reader); nothing when it is drawn whole."""
    return f"<title>{esc(name)}</title>" if names[name] != printable(name) else ""


def _label(x: float, y: float, text: str, size: int = SMALLEST_TEXT, anchor: str = "middle", cls: str = "value",
           problem: bool = False) -> str:
    colour = f' fill="{PROBLEM_COLOUR}" font-weight="bold"' if problem else ""
    return (f'<text class="{cls}{" problem" if problem else ""}" x="{x:.1f}" y="{y:.1f}" font-size="{size}" '
            f'text-anchor="{anchor}"{colour} paint-order="stroke" stroke="#ffffff" stroke-width="3">{esc(text)}</text>')


BLOCK_LOADING_DRAWN = 0.30  # rotated loadings of exploratory blocks drawn from this size on (common practice)
BLOCK_LEGEND = "exploratory blocks: their rotated loadings of .30 or more in absolute value are drawn"
LEGEND_LINE = 95  # characters in a line of a standalone file's legend
class Drawn(enum.Enum):
    """Parts a drawing may hold that its legend explains only when they are there; ``value`` is the legend's words."""

    FIXED_LOADING = "dashed arrows: loadings fixed to set a factor's scale"
    ARC = "curved double arrows: correlations"
    LISTED_CORRELATION = "correlations that would cross the drawing are listed above it instead of drawn"
    LISTED_LOADING = "loadings whose arrows would cross a row of items are listed above the drawing"
    ROUTED_LOADING = ("arrows along the left edge: loadings of a factor drawn above the rows on factors of the rows "
                      "below")
    DISTURBANCE = "a circle joined to a factor: the share of its variance the higher-order factors do not explain"
    PROBLEM = "red: a value that makes the solution impossible or doubtful (see the report)"


BASE_LEGEND = ("Standardized values. Ellipses: factors; rectangles: observed items; circles under or beside items: "
               "residual terms (share of variance not explained)")
METHOD_LEGEND = "grey ellipses: method factors (a way of answering, not a trait)"


@dataclass(frozen=True)
class Legend:
    """What a fit's legend says beside the parts each drawing holds: whether it has method factors and exploratory
    blocks (of ``result``: :meth:`of`)."""

    method_factors: bool = False
    blocks: bool = False

    @classmethod
    def of(cls, result) -> "Legend":
        return cls(bool(_method_factors(result)), bool(getattr(result, "exploratory", ())))


def legend_parts(result, drawn: frozenset[Drawn]) -> list[str]:
    """What the shapes, lines and colours of ``result``'s drawings mean, one clause for each part ``drawn`` holds
    (never a part they do not show); ``result`` may be its :class:`Legend`."""
    legend = result if isinstance(result, Legend) else Legend.of(result)
    parts = [BASE_LEGEND] + [d.value for d in Drawn if d in drawn and d is not Drawn.PROBLEM]
    if legend.method_factors:
        parts.append(METHOD_LEGEND)
    if legend.blocks:
        parts.append(BLOCK_LEGEND)
    return parts + ([Drawn.PROBLEM.value] if Drawn.PROBLEM in drawn else [])


def legend_text(result, drawn: frozenset[Drawn]) -> str:
    """The legend under a diagram in a report, as one sentence."""
    return "; ".join(legend_parts(result, drawn)) + "."


def legend_lines(result, drawn: frozenset[Drawn]) -> list[str]:
    """The legend of a standalone file, in lines (the last one red when a part is drawn red)."""
    parts = legend_parts(result, drawn)
    problem = parts.pop() if Drawn.PROBLEM in drawn else None
    lines = textwrap.wrap("; ".join(parts) + ".", LEGEND_LINE)
    return lines + ([problem[0].upper() + problem[1:] + "."] if problem else [])


def _method_factors(result) -> frozenset[str]:
    description = getattr(result, "description", None)
    return frozenset(description.method_factors) if description is not None else frozenset()


@dataclass
class _Layout:
    """Where everything of one group's drawing goes (computed once, drawn by ``_draw``)."""
    centre: dict[str, float] = field(default_factory=dict)  # x of every factor and item
    y_of: dict[str, float] = field(default_factory=dict)  # y of every factor's centre and every item box's top
    widths: dict[str, float] = field(default_factory=dict)
    band_of: dict[str, int] = field(default_factory=dict)
    level: dict[str, int] = field(default_factory=dict)
    bottom: frozenset[str] = frozenset()  # general and method factors, drawn under the items
    side_residuals: bool = False
    order: list[str] = field(default_factory=list)
    home: dict[str, str] = field(default_factory=dict)  # the factor each item is drawn under
    width: float = 0.0
    height: float = 0.0
    banded: bool = False  # drawn in more than one band
    drop_level: dict = field(default_factory=dict)  # depth of each arc between residuals drawn (see _nesting)
    table: list[tuple[str, str, str]] = field(default_factory=list)  # correlations listed instead of drawn
    apart: frozenset[str] = frozenset()  # factors drawn in a row above the bands, their loadings listed
    listed_loadings: list[tuple[str, str]] = field(default_factory=list)  # (factor, item or factor) listed, not drawn
    table_top: float = MARGIN  # where the lists of values not drawn begin
    continued: list[tuple[str, tuple[str, ...]]] = field(default_factory=list)  # (factor, its items in a later band)
    shown: dict[str, str] = field(default_factory=dict)  # the short label drawn for an item (see item_labels)
    names: dict[str, str] = field(default_factory=dict)  # every factor and item as the drawing writes it (drawn_names)
    breaks: list[float] = field(default_factory=list)  # the middle of each gap between bands, where nothing is drawn
    routed: dict[str, int] = field(default_factory=dict)  # higher-order factors drawn apart, their arrows drawn: lane
    via_edge: frozenset = frozenset()  # (factor, factor) loadings drawn along the left edge and over the band
    lane_top: dict[int, float] = field(default_factory=dict)  # the top of each band's factors

    def lane(self, factor: str, band: int) -> tuple[float, float]:
        """Where the arrows of a higher-order factor drawn above the bands run (``routed``): x of its line down the
        left edge, y of its line over the factors of ``band``."""
        k = self.routed[factor]
        return EDGE_X + EDGE_STEP * k, self.lane_top[band] - LANE_GAP * (k + 1)

    def text(self, name: str) -> str:
        """What the drawing shows for a factor or item: an item's short label, or the name (``drawn_names``)."""
        return self.shown.get(name) or self.names[name]


def _cross_factors(latent, children, obs_set, methods) -> frozenset[str]:
    """Method factors and general factors: first-order factors whose items belong to two or more other
    first-order factors that have fewer items (the general factor of a bifactor model)."""
    items = {f: {c for c in children[f] if c in obs_set} for f in latent}
    first = [f for f in latent if items[f] and len(items[f]) == len(children[f])]
    cross = {f for f in first if f in methods}
    for f in first:
        others = [g for g in first if g != f and g not in methods and items[g] & items[f]]
        if len(others) >= 2 and all(len(items[g]) < len(items[f]) for g in others):
            cross.add(f)
    return frozenset(cross)


def _children(latent, rows) -> dict[str, list[str]]:
    """What each factor loads on (items and factors), in the order of the model's loadings."""
    children: dict[str, list[str]] = {f: [] for f in latent}
    for r in rows:
        if r.kind == "loading":
            children[r.variables[0]].append(r.variables[1])
    return children


def _levels(latent, children, obs_set) -> dict[str, int]:
    """Each factor's level: 1 for a factor of items only, one more than the highest factor it loads on otherwise."""
    level: dict[str, int] = {}

    def level_of(f: str, seen: frozenset = frozenset()) -> int:
        if f in level:
            return level[f]
        below = [c for c in children[f] if c not in obs_set and c not in seen]
        level[f] = 1 + max((level_of(c, seen | {f}) for c in below), default=0)
        return level[f]

    for f in latent:
        level_of(f)
    return level


def _layout(result, rows, obs_set, room: float = MAX_WIDTH - 2 * MARGIN, relabel: bool = True) -> _Layout:
    """Where everything of one group's drawing laid out from the top goes, its bands of items at most ``room`` wide
    (the factors over them counted: ``_factor_room``); with ``relabel``, its items drawn with short labels when a
    factor's named items are wider than a band and labelled are not."""
    observed, latent = list(result.observed), list(result.latent)
    loadings = [r for r in rows if r.kind == "loading"]
    children = _children(latent, rows)
    lay = _Layout(shown=item_labels(result), level=_levels(latent, children, obs_set),
                  names=drawn_names(latent + observed))
    level = lay.level
    cross = _cross_factors(latent, children, obs_set, _method_factors(result))
    top = max(level.values(), default=1)
    # each item sits under its home factor: the trait factor with its largest loading (in size)
    home: dict[str, str] = {}
    for r in sorted(loadings, key=lambda r: (r.variables[0] not in cross, abs(r.standardized))):
        if r.variables[1] in obs_set:
            home[r.variables[1]] = r.variables[0]
    lay.home = home
    homes = [f for f in latent if f in home.values()]
    lay.order = sorted(observed, key=lambda x: (homes.index(home[x]) if x in home else len(homes), observed.index(x)))
    lay.widths = {x: _box_width(lay.text(x)) for x in lay.order}
    # a model whose items (or factors) do not fit in one row is drawn in bands of whole factors; the factors whose lines
    # would cross the bands (higher-order, general and method factors) are then drawn apart, above the bands
    blocks: list[list[str]] = []
    for x in lay.order:
        if blocks and home.get(x) == home.get(blocks[-1][0]):
            blocks[-1].append(x)
        else:
            blocks.append([x])
    disturbed = _disturbed(rows, latent, children)
    arcs = frozenset(frozenset(r.variables) for r in rows if r.kind == "factor_covariance")
    too_wide = [block for block in blocks if block[0] in home and sum(lay.widths[x] + BOX_GAP for x in block) > room]
    labels = short_labels(result) if too_wide and not lay.shown and relabel else {}
    if labels and all(sum(_box_width(labels[x]) + BOX_GAP for x in block) <= room for block in too_wide):
        # a factor whose items, named, are wider than a band and, labelled, fit one: every item drawn with its
        # short label, named in the key, rather than the factor cut over two bands with half its loadings listed
        lay.shown = labels
        lay.widths = {x: _box_width(lay.text(x)) for x in lay.order}
    bands = _bands(blocks, {x: lay.widths[x] + BOX_GAP for x in lay.order},
                   [_factor_room(home.get(block[0]), disturbed, arcs, level, lay.text) for block in blocks], room)
    wrap = len(bands) > 1
    lay.apart = frozenset(f for f in latent if wrap and (level[f] > 1 or f in cross))
    lay.bottom = frozenset() if wrap else cross
    lay.side_residuals = bool(lay.bottom)
    step = {x: lay.widths[x] + (SIDE_GAP + 2 * RESIDUAL_R + BOX_GAP // 2 if lay.side_residuals else BOX_GAP)
            for x in lay.order}
    if not wrap:
        bands = [list(lay.order)]
    for b, band in enumerate(bands):
        for x in band:
            lay.band_of[x] = b
    for f in latent:
        kids = [home_item for home_item in children[f] if home_item in lay.band_of]
        lay.band_of[f] = -1 if f in lay.apart else min((lay.band_of[k] for k in kids), default=0)
    for b, band in enumerate(bands):  # the part of a factor drawn in a band under the one that holds its ellipse
        for f in dict.fromkeys(home.get(x) for x in band):
            if f is not None and f not in lay.apart and lay.band_of[f] != b:
                lay.continued.append((f, tuple(x for x in band if home.get(x) == f)))
    # x positions: items band by band from the left margin, factors over their own items
    joined = frozenset() if wrap else arcs
    first_order = {f for f in latent if level[f] == 1 and f not in lay.apart and f not in lay.bottom}
    width = _place_items(bands, step, lay, first_order, disturbed, joined)
    for lvl in range(1, top + 1):
        for f in [f for f in latent if level[f] == lvl and f not in lay.apart and f not in lay.centre]:
            kids = [c for c in children[f] if c in lay.centre]
            own = [c for c in kids if home.get(c) == f and lay.band_of[c] == lay.band_of[f]] or kids
            lay.centre[f] = sum(lay.centre[c] for c in own) / len(own) if own else width / 2
    _spread_factors([f for f in latent if f not in lay.apart],
                    {f: (lay.band_of[f], level[f], f in lay.bottom) for f in latent}, lay.centre, disturbed, lay.text,
                    joined)
    width = max(width, max((lay.centre[f] + _ellipse_rx(lay.text(f)) + 50 for f in latent if f not in lay.apart),
                           default=0.0),
                200.0)
    lay.width = width
    # a higher-order factor drawn above the bands keeps its arrows (lay.routed): straight to factors of the band
    # under it, along the left edge and over their band to factors of the bands below; the general and method
    # factors' loadings (one for every item) are listed instead
    lay.routed = {f: k for k, f in enumerate(sorted((f for f in lay.apart if level[f] > 1 and f not in cross),
                                                    key=lambda f: (-level[f], latent.index(f))))}
    # correlations between factors of different bands, and loadings not drawn, go to lists at the top
    lay.banded = len(bands) > 1
    lay.drop_level = _nesting([r.variables for r in rows if r.kind == "residual_covariance"
                               and lay.band_of[r.variables[0]] == lay.band_of[r.variables[1]]], lay)
    for r in rows:
        a, b = r.variables[0], r.variables[-1]
        if r.kind == "factor_covariance" and (lay.banded or (a in lay.bottom) != (b in lay.bottom)) or \
                r.kind == "residual_covariance" and lay.band_of.get(a) != lay.band_of.get(b):
            lay.table.append((r.kind, a, b))
        elif r.kind == "loading" and (a in lay.apart and a not in lay.routed
                                      or a not in lay.apart and lay.band_of[a] != lay.band_of[b]):
            lay.listed_loadings.append((a, b))
    # a drawing narrower than an entry of its lists is made as wide as that entry (its names shortened beyond
    # NAME_ROOM, no entry is wider than MAX_WIDTH allows: session note s21, a list ran 185 units out of a drawing)
    width = lay.width = max([width] + [2 * MARGIN + _entry_width(entries, lay.text) for entries in _lists(lay)])
    lay.table_top = y = MARGIN
    for entries in _lists(lay):
        y += 18 + 16 * math.ceil(len(entries) / _table_columns(entries, width, lay.text)) + 10
    # factors drawn apart, under the lists: highest level first, in rows as wide as the bands, each factor whose
    # arrows go along the left edge first in a row of its own (nothing between it and the edge)
    apart_rows: list[list[str]] = []
    for f in sorted(lay.apart, key=lambda f: (-level[f], f not in lay.routed, latent.index(f))):
        need = 2 * _ellipse_rx(lay.text(f)) + 16 + (2 * RESIDUAL_R + 40 if f in disturbed else 0)
        if not apart_rows or f in lay.routed or \
                sum(_apart_width(g, disturbed, lay.text) for g in apart_rows[-1]) + need > width - 2 * MARGIN:
            apart_rows.append([])
        apart_rows[-1].append(f)
    for row in apart_rows:
        x = (width - sum(_apart_width(g, disturbed, lay.text) for g in row)) / 2
        for f in row:
            lay.centre[f] = x + 8 + _ellipse_rx(lay.text(f))
            lay.y_of[f] = y + ELLIPSE_RY
            x += _apart_width(f, disturbed, lay.text)
        y += 2 * ELLIPSE_RY + 20
    last_row = set(apart_rows[-1]) if apart_rows else set()
    lay.via_edge = frozenset((r.variables[0], r.variables[1]) for r in loadings if r.variables[0] in lay.routed
                             and r.variables[1] not in obs_set and r.variables[1] not in lay.apart
                             and (lay.band_of[r.variables[1]] > 0 or r.variables[0] not in last_row))
    for b in range(len(bands)):
        in_band = [f for f in latent if lay.band_of[f] == b and f not in lay.bottom and f not in lay.apart]
        arcs = [r for r in rows if r.kind == "factor_covariance" and not lay.banded and not any(v in lay.bottom for v in r.variables)]
        y += _arc_rise(rows, lay, [r.variables for r in arcs]) + (24 if arcs else 0)
        if b == 0 and any(r.variables[0] in lay.routed and r.variables[1] in in_band and r.variables not in lay.via_edge
                          for r in loadings):  # straight arrows from the row above: room for them and their values
            y += ROW_GAP - 2 * ELLIPSE_RY - 20
        lanes = [lay.routed[f] for f, c in lay.via_edge if lay.band_of[c] == b]
        y += LANE_GAP * (max(lanes) + 1) + 6 if lanes else 0.0  # room for the lanes over the band's factors
        levels = max((level[f] for f in in_band), default=1)
        y_ind = y + (levels * ROW_GAP if in_band else 36)  # a band of items only: room for the name over them
        lay.lane_top[b] = y_ind - ROW_GAP + BOX_H / 2 - ELLIPSE_RY  # the top of the band's (first-order) factors
        for f in in_band:
            lay.y_of[f] = y_ind - level[f] * ROW_GAP + BOX_H / 2
        for x in bands[b]:
            lay.y_of[x] = y_ind
        y = y_ind + BOX_H
        if lay.side_residuals:
            y += RESIDUAL_R + 20
        else:
            y += 48 + RESIDUAL_R
        drops = [_drop(depth) for pair, depth in lay.drop_level.items() if lay.band_of[pair[0]] == b]
        y += max(drops, default=0.0) + (20 if drops else 0)
        if b < len(bands) - 1:
            lay.breaks.append(y + BAND_GAP / 2)
            y += BAND_GAP
    if lay.bottom:
        y += ROW_GAP - 20
        for f in lay.bottom:
            lay.y_of[f] = y
        bottom_arcs = [r for r in rows if r.kind == "factor_covariance" and all(v in lay.bottom for v in r.variables)]
        y += ELLIPSE_RY + _arc_rise(rows, lay, [r.variables for r in bottom_arcs])
    lay.height = y + 40
    return lay


def _place_items(bands: list[list[str]], step: dict[str, float], lay: _Layout, first_order: set[str],
                 disturbed: set[str], joined: frozenset) -> float:
    """The x of every item, band by band from the left margin, and of each first-order factor drawn over its own
    items (``first_order``): at their middle, or to the right of it as far as its last item when the factor on its
    left needs the room (``_need``); only when even that is too little are its items moved right, so that a factor
    is never pushed along the row beyond its own items over another factor's (session note s19: the first-order
    factors of a higher-order model, their ellipses and disturbance circles wider than their two or three items,
    had stood to the right of them).  The drawing's width."""
    width = 200.0
    for band in bands:
        x, last = MARGIN, None
        blocks: list[list[str]] = []
        for name in band:
            if blocks and lay.home.get(name) == lay.home.get(blocks[-1][0]):
                blocks[-1].append(name)
            else:
                blocks.append([name])
        for block in blocks:
            f = lay.home.get(block[0])
            centres, at = [], x
            for name in block:
                centres.append(at + lay.widths[name] / 2)
                at += step[name]
            shift = 0.0
            if f in first_order and lay.band_of[f] == lay.band_of[block[0]]:
                want = max(sum(centres) / len(centres), MARGIN + _ellipse_rx(lay.text(f)))  # (its ellipse inside)
                if last is not None:
                    want = max(want, lay.centre[last] + _need(last, f, disturbed, joined, lay.text))
                shift = max(0.0, want - centres[-1])
                lay.centre[f] = want
                last = f
            for name, centre in zip(block, centres):
                lay.centre[name] = centre + shift
            x = at + shift
        width = max(width, x - BOX_GAP + MARGIN)
    return width


def _need(a: str, b: str, disturbed: set[str], joined: frozenset, text) -> float:
    """How far apart the centres of neighbouring factors ``a`` (on the left) and ``b`` of one row must stand: their
    ellipses, ``a``'s disturbance circle on its right and, for neighbours joined by an arc, the room of its value."""
    ra, rb = _ellipse_rx(text(a)), _ellipse_rx(text(b))  # (text: each name as drawn)
    need = ra + rb + 16 + (2 * RESIDUAL_R + 40 if a in disturbed else 0)
    if frozenset((a, b)) in joined:
        need = max(need, SHORTEST_ARC + PORT_SPREAD * (ra + rb))
    return need


def _disturbed(rows, latent, children) -> set[str]:
    """Factors explained by a higher-order factor: they get a disturbance circle at their right."""
    below = {c for f in latent for c in children[f]}
    return {r.variables[0] for r in rows if r.kind == "factor_variance" and r.variables[0] in below}


def _bands(blocks: list[list[str]], step: dict[str, float], rooms: list[tuple[float, float]],
           room: float) -> list[list[str]]:
    """The items in bands no wider than ``room`` (``MAX_WIDTH`` less the margins) of whole factors (``blocks``), as
    many to a band as fit, each block as wide as its items or as the room its factor needs over them (``rooms``: in
    one row, with the arcs of its correlations; in bands, without: ``_factor_room``), whichever is wider; a factor
    whose items are wider than a band in even parts over several bands."""
    def wide(k: int, banded: bool) -> float:
        return max(sum(step[x] for x in blocks[k]), rooms[k][banded])

    if sum(wide(k, False) for k in range(len(blocks))) <= room:
        return [[x for block in blocks for x in block]]
    parts: list[tuple[list[str], float]] = []
    for k, block in enumerate(blocks):
        if sum(step[x] for x in block) > room:
            split = _parts(block, step, room)
            parts += [(split[0], max(sum(step[x] for x in split[0]), rooms[k][1]))] + \
                [(part, sum(step[x] for x in part)) for part in split[1:]]
        else:
            parts.append((block, wide(k, True)))
    bands: list[list[str]] = [[]]
    used = 0.0
    for part, width in parts:
        if bands[-1] and used + width > room:
            bands.append([])
            used = 0.0
        bands[-1].extend(part)
        used += width
    return bands


def _factor_room(f: str | None, disturbed: set[str], arcs: frozenset, level: dict[str, int],
                 text) -> tuple[float, float]:
    """The width a first-order factor's block of items needs for the factor drawn over it (0 for items of no
    factor), in one row and in bands: its ellipse with room either side for its neighbours', and its disturbance
    circle on its right; in one row, where its correlations are arcs, also the room ``_need`` keeps for an arc's
    value (half on each side of it).  The sum of a row's rooms is about the sum of the distances ``_need`` sets
    between its factors; where the drawing still comes out wider than ``MAX_WIDTH``, ``_draw`` makes its bands
    narrower."""
    if f is None or level.get(f, 1) > 1:
        return 0.0, 0.0
    rx = _ellipse_rx(text(f))  # (text: its name as drawn)
    banded = 2 * rx + 16 + (2 * RESIDUAL_R + 40 if f in disturbed else 0)
    joined = any(f in pair for pair in arcs)
    return (max(banded, SHORTEST_ARC + 2 * PORT_SPREAD * rx) if joined else banded), banded


def _parts(block: list[str], step: dict[str, float], room: float) -> list[list[str]]:
    """A factor's items in as few parts of about equal size as fit in ``room`` each (one part when they fit)."""
    count = max(1, math.ceil(sum(step[x] for x in block) / room))
    while True:
        size = math.ceil(len(block) / count)
        parts = [block[k:k + size] for k in range(0, len(block), size)]
        if all(sum(step[x] for x in part) <= room for part in parts) or size == 1:
            return parts
        count += 1


def continued_label(factor: str) -> str:  # (factor: its name as drawn)
    """What stands over a factor's items drawn in a band under its ellipse."""
    return f"{in_line(factor)}, continued (loadings listed above)"


def _apart_width(f: str, disturbed: set[str], text) -> float:
    """Room a factor drawn apart takes in its row: its ellipse, a gap, and its disturbance circle if it has one."""
    return 2 * _ellipse_rx(text(f)) + 16 + (2 * RESIDUAL_R + 40 if f in disturbed else 0)


def _lists(lay: _Layout) -> list[list]:
    """The lists above a drawing in bands, each non-empty: loadings not drawn as arrows, then correlations not
    drawn as arcs."""
    return [entries for entries in (lay.listed_loadings, lay.table) if entries]


LIST_SIZE = SMALLEST_TEXT  # font size of the lists above the drawing and of the key


def _entry_width(entries, shown=str) -> float:
    """Width of one column of a list: 260 units, or more for long entries (their text with the widest value, in
    bold as a value of a problem is drawn, and a gap of 20 units)."""
    longest = max((text_width(_entry_text(e, "\u2212.00", shown), LIST_SIZE, bold=True) for e in entries), default=0.0)
    return max(260.0, longest + 20)


def _entry_text(entry, value: str = "", shown=str) -> str:
    """An entry of a list above the drawing: 'f1 on g' for a loading, 'a with b' or 'a with b (residuals)' for a
    correlation, with its ``value``, each name as ``shown`` draws it (a name written right to left kept apart from
    the words after it: ``text_extent.in_line``)."""
    if len(entry) == 2:
        factor, target = entry
        text = f"{in_line(shown(target))} on {in_line(shown(factor))}"
    else:
        kind, a, b = entry
        text = f"{in_line(shown(a))} with {in_line(shown(b))}{'' if kind == 'factor_covariance' else ' (residuals)'}"
    return f"{text}: {value}" if value else text


def _table_columns(table, width: float, shown=str) -> int:
    return max(1, int((width - 2 * MARGIN) // _entry_width(table, shown)))


def _drop(level: int) -> float:
    """Depth of an arc between two residuals: one step deeper for every arc it spans or touches."""
    return 6 + 18 * level


def _nesting(pairs: list[tuple[str, ...]], lay: _Layout) -> dict[tuple[str, ...], int]:
    """A level (1, 2, ...) for each arc between two residuals of one band: shorter arcs first, each one level
    below every arc of its band whose span overlaps or touches its own, so that nested arcs and arcs that share
    an item keep their labels apart."""
    spans = {p: sorted((lay.centre[p[0]], lay.centre[p[1]])) for p in pairs}
    levels: dict[tuple[str, ...], int] = {}
    for p in sorted(pairs, key=lambda q: (spans[q][1] - spans[q][0], spans[q][0])):
        (a, b), band = spans[p], lay.band_of[p[0]]
        under = [levels[q] for q in levels if lay.band_of[q[0]] == band and spans[q][0] <= b and a <= spans[q][1]]
        levels[p] = 1 + max(under, default=0)
    return levels


def path_diagram(result, group: int = 0, legend: bool = False) -> str:
    """The model of ``result`` (one group's standardized values) as an SVG document string.  Elements whose
    parameter is part of a problem of the solution (a negative residual variance, a correlation beyond
    +/-1, ...) are drawn in red with the class ``problem``."""
    return _document(result, [group], legend)


def diagram_with_legend(result, group: int = 0) -> tuple[str, str]:
    """Group ``group``'s drawing (SVG text) and the legend a report puts under it: the parts it shows, only."""
    drawing = _draw(result, group)
    return _document(result, [group], False, [drawing]), legend_text(result, drawing.drawn)


def diagram_file(result) -> str:
    """The diagram a standalone file holds: every group's drawing, one under the other, each named, with the
    legend once at the bottom."""
    return _document(result, list(range(len(result.groups))), legend=True)


def _document(result, groups: list[int], legend: bool, drawings: list | None = None) -> str:
    drawings = drawings or [_draw(result, g) for g in groups]
    return _composed(result.model_name, [result.groups[g].label for g in groups], drawings,
                     Legend.of(result) if legend else None)


def _composed(model_name: str, labels: list, drawings: list, legend: "Legend | None") -> str:
    """The SVG document of ``drawings`` (one per group, named by ``labels``, None for a fit without groups), one
    under the other, with the items' key once at the bottom and, given a ``legend``, the legend in lines."""
    lines = legend_lines(legend, frozenset().union(*(d.drawn for d in drawings))) if legend is not None else []
    key = [(short, name) for name, short in next((d.shown for d in drawings if d.shown), {}).items()]
    # from a label to its name: the widest label (bold) and a space
    indent = max((text_width(short, LIST_SIZE, bold=True) for short, _ in key), default=0.0) + text_width(" ", LIST_SIZE)
    # a name too long for a line of MAX_WIDTH goes on in lines under it (a 190-character question had made the
    # picture 1511 units wide, and every text of the drawing smaller on the page: the legibility rule of MAX_WIDTH)
    room = MAX_WIDTH - 2 * MARGIN - indent - 30
    key_lines = [wrapped(printable(name), LIST_SIZE, room) for _, name in key]
    key_column = indent + max((text_width(line, LIST_SIZE) for part in key_lines for line in part), default=0.0) + 30
    width = max([d.width for d in drawings] + [2 * MARGIN + text_width(line, SMALLEST_TEXT) for line in lines]
                + ([2 * MARGIN + key_column] if key else []))
    goes_on = any(len(part) > 1 for part in key_lines)
    key_columns = max(1, int((width - 2 * MARGIN) // key_column)) if key and not goes_on else 1
    key_rows = math.ceil(len(key) / key_columns) if not goes_on else sum(len(part) for part in key_lines)
    key_height = 18 + 16 * key_rows + 10 if key else 0
    height = sum(d.height for d in drawings) + key_height + (10 + 18 * len(lines) if lines else 0)
    title = esc(model_name) + ("" if labels == [None] else " — group " + ", ".join(esc(str(x)) for x in labels))
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" class="path-diagram" viewBox="0 0 {width:.0f} {height:.0f}" '
        f'width="{width:.0f}" height="{height:.0f}" style="width:100%;height:auto;min-width:{min(width, 900):.0f}px" '
        f'font-family="Helvetica, Arial, sans-serif" role="img">',
        f"<title>{title}</title>",
        '<defs><marker id="head" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="7" markerHeight="7" orient="auto-start-reverse">'
        '<path d="M0,0 L10,5 L0,10 z" fill="#333"/></marker></defs>',
    ]
    if legend is not None:
        parts.append(f'<rect width="{width:.0f}" height="{height:.0f}" fill="#ffffff"/>')
    y = 0.0
    breaks = []  # where the drawing can be cut into strips that cut nothing: between bands and between groups
    for k, drawing in enumerate(drawings):
        parts.append(f'<g transform="translate(0,{y:.0f})">')
        parts.extend(drawing.parts)
        parts.append("</g>")
        breaks += [round(y) + b for b in drawing.breaks] + ([round(y + drawing.height)] if k < len(drawings) - 1 else [])
        y += drawing.height
    if breaks:
        parts[0] = parts[0].replace(' role="img">', f' role="img" data-breaks="{" ".join(f"{b:.0f}" for b in breaks)}">')
    if key:  # the items' names, under the drawing of every group
        parts.append(f'<text class="key-title" x="{MARGIN:.1f}" y="{y + 14:.1f}" font-size="{LIST_SIZE}" '
                     f'font-weight="bold">{KEY_TITLE}</text>')
        row = 0  # the key's line, from its top (every entry one line, in columns, unless some name is wrapped)
        for k, ((short, name), part) in enumerate(zip(key, key_lines)):
            if not goes_on:
                row = k % key_rows
            x, line_y = MARGIN + (key_column * (k // key_rows) if not goes_on else 0.0), y + 32 + 16 * row
            parts.append(f'<text class="key-label" x="{x:.1f}" y="{line_y:.1f}" font-size="{LIST_SIZE}" '
                         f'font-weight="bold">{esc(short)}</text>')
            for j, text in enumerate(part):  # the name's first line 'key', the lines it goes on in 'key-more'
                parts.append(f'<text class="{"key" if j == 0 else "key-more"}" x="{x + indent:.1f}" '
                             f'y="{line_y + 16 * j:.1f}" font-size="{LIST_SIZE}">{esc(text)}</text>')
            row += len(part)
        y += key_height
    red = any(Drawn.PROBLEM in d.drawn for d in drawings)
    for k, line in enumerate(lines):
        colour = f' fill="{PROBLEM_COLOUR}"' if red and k == len(lines) - 1 else ""
        parts.append(f'<text class="legend" x="{MARGIN:.1f}" y="{y + 16 + 18 * k:.1f}" font-size="{SMALLEST_TEXT}"{colour}>{esc(line)}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


@dataclass(frozen=True)
class Drawing:
    """One group's drawing: its size, its SVG elements, the heights between its bands where nothing is drawn (where
    the Word report may cut it into strips), the parts its legend explains and the items' short labels it draws."""

    width: float
    height: float
    parts: list[str]
    breaks: list[float]
    drawn: frozenset[Drawn]
    shown: dict[str, str] = field(default_factory=dict)  # each item's short label drawn, when drawn so (the key)

    def to_dict(self) -> dict:
        return {"width": self.width, "height": self.height, "parts": list(self.parts), "breaks": list(self.breaks),
                "drawn": [d.name for d in Drawn if d in self.drawn], "shown": dict(self.shown)}

    @classmethod
    def from_dict(cls, d: dict) -> "Drawing":
        """The drawing :meth:`to_dict` saved; a ValueError (KeyError, TypeError) for a part of another type, as a file
        changed by hand may hold."""
        width, height = _size(d["width"]), _size(d["height"])
        parts, breaks, shown = d["parts"], d["breaks"], d["shown"]
        if not (isinstance(parts, list) and all(isinstance(p, str) for p in parts) and isinstance(breaks, list)
                and isinstance(shown, dict) and all(isinstance(v, str) for v in (*shown, *shown.values()))):
            raise ValueError("a saved drawing's parts, breaks or labels of another type")
        return cls(width, height, parts, [_size(b) for b in breaks], frozenset(Drawn[name] for name in d["drawn"]),
                   shown)


def _size(value) -> float:
    """A size or place of a saved drawing: a finite number, not below zero (a ValueError otherwise)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) or value < 0:
        raise ValueError("a saved drawing's size that is no number")
    return float(value) if isinstance(value, float) else value


@dataclass(frozen=True)
class PathDrawings:
    """A fit's path diagram drawn once: each group's :class:`Drawing`, with what the pictures' titles and legend take
    of the fit (its model's name, its groups' labels, :class:`Legend`).  A report's figure of each group, its legend
    as text (:meth:`figure`), and the file of every group with one legend (:meth:`file`, what ``fit --diagram``
    writes) are both made from it, so that a saved fit keeps the drawing once (s28: its JSON held it twice, as the
    figures and as the file) and ``report`` renders both as the fit did, byte for byte."""

    model_name: str
    labels: tuple[str | None, ...]
    drawings: tuple[Drawing, ...]
    legend: Legend

    @classmethod
    def of(cls, result) -> "PathDrawings":
        return cls(result.model_name, tuple(None if g.label is None else str(g.label) for g in result.groups),
                   tuple(_draw(result, g) for g in range(len(result.groups))), Legend.of(result))

    def figure(self, group: int) -> tuple[str, str]:
        """Group ``group``'s drawing (SVG text) and the legend a report puts under it: the parts it shows, only."""
        drawing = self.drawings[group]
        return (_composed(self.model_name, [self.labels[group]], [drawing], None),
                legend_text(self.legend, drawing.drawn))

    def file(self) -> str:
        """The diagram a standalone file holds: every group's drawing, one under the other, each named, with the
        legend once at the bottom."""
        return _composed(self.model_name, list(self.labels), list(self.drawings), self.legend)

    def to_dict(self) -> dict:
        return {"model": self.model_name, "groups": list(self.labels), "drawings": [d.to_dict() for d in self.drawings],
                "method_factors": self.legend.method_factors, "blocks": self.legend.blocks}

    @classmethod
    def from_dict(cls, d: dict) -> "PathDrawings":
        labels, drawings = d["groups"], d["drawings"]
        if not (isinstance(d["model"], str) and isinstance(labels, list) and isinstance(drawings, list)
                and len(labels) == len(drawings) > 0 and all(x is None or isinstance(x, str) for x in labels)):
            raise ValueError("a saved path diagram of another shape")
        return cls(d["model"], tuple(labels), tuple(Drawing.from_dict(x) for x in drawings),
                   Legend(bool(d["method_factors"]), bool(d["blocks"])))


def _draw(result, group: int) -> Drawing:
    """One group's drawing: its size, SVG elements, the heights between its bands and the parts its legend explains."""
    label = result.groups[group].label
    rows = [r for r in result.estimates if r.group == label] + _block_rows(result)
    problems = getattr(result, "problems", ())

    def flagged(kind: str, variables: tuple[str, ...]) -> bool:
        return any(p.touches(kind, variables, label) for p in problems)

    def stroke(kind: str, variables: tuple[str, ...], normal: str = "#333") -> str:
        return f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"' if flagged(kind, variables) else f'stroke="{normal}"'

    latent = list(result.latent)
    obs_set = set(result.observed)
    side = _sideways(result, rows, obs_set)
    if side is not None:
        return _draw_sideways(result, group, rows, side, flagged)
    lay = _layout(result, rows, obs_set)
    room = MAX_WIDTH - 2 * MARGIN
    while lay.width > MAX_WIDTH and room > MAX_WIDTH / 4:  # what the rooms of the factors left out (higher-order
        room -= lay.width - MAX_WIDTH + 10  # factors wider than the factors under them): the bands made narrower
        lay = _layout(result, rows, obs_set, room)
    centre, y_of = lay.centre, lay.y_of
    methods = _method_factors(result)
    parts: list[str] = []
    drawn: set[Drawn] = set()
    named, head, lay.width = _group_name(result, group, lay.width)  # the group is named on its own diagram
    parts += named
    parts.append(f'<g transform="translate(0,{head:.0f})">')
    y = lay.table_top
    for entries in _lists(lay):
        loadings = len(entries[0]) == 2
        drawn.add(Drawn.LISTED_LOADING if loadings else Drawn.LISTED_CORRELATION)
        title = "Loadings not drawn as arrows" if loadings else "Correlations not drawn as arcs"
        parts.append(f'<text class="table-title" x="{MARGIN:.1f}" y="{y + 2:.1f}" font-size="{LIST_SIZE}" '
                     f'font-weight="bold">{title}</text>')
        columns = _table_columns(entries, lay.width, lay.text)
        per = math.ceil(len(entries) / columns)
        for k, entry in enumerate(entries):
            kind, variables = ("loading", entry) if loadings else (entry[0], entry[1:])
            r = next(r for r in rows if r.kind == kind and r.variables == variables)
            bad = flagged(kind, variables) or loadings and result.groups[group].r_squared.get(variables[1], 0.0) > 1.0
            text = _label(MARGIN + _entry_width(entries, lay.text) * (k // per), y + 20 + 16 * (k % per),
                          _entry_text(entry, _value(r.standardized), lay.text), size=LIST_SIZE, anchor="start",
                          cls="listed-loading" if loadings else "listed-correlation", problem=bad)
            whole = _entry_text(entry, _value(r.standardized))  # a name drawn shortened: the whole entry its title
            parts.append(text if all(lay.names[n] == printable(n) for n in entry[-2:]) else
                         f"<g><title>{esc(whole)}</title>{text}</g>")
        y += 18 + 16 * per + 10
    # loadings: an item's home factor first, so that a cross-loading's value moves along its line if it would
    # cover another
    placed: list[tuple[float, float, float, float]] = []
    for r in sorted((r for r in rows if r.kind == "loading"), key=lambda r: lay.home.get(r.variables[1]) != r.variables[0]):
        f, target = r.variables
        if r.variables in lay.listed_loadings:
            continue
        if r.variables in lay.via_edge:  # from a factor above the bands: left, down the edge, over the band, down
            edge, lane = lay.lane(f, lay.band_of[target])
            x1, y1, x2, y2 = centre[f] - _ellipse_rx(lay.text(f)), y_of[f], centre[target], y_of[target] - ELLIPSE_RY
            dashed = ' stroke-dasharray="5,4"' if not r.free else ""
            parts.append(f'<path class="loading routed" d="M{x1:.1f},{y1:.1f} H{edge:.1f} V{lane:.1f} H{x2:.1f} '
                         f'V{y2:.1f}" fill="none" stroke="#333" stroke-width="1.3"{dashed} marker-end="url(#head)"/>')
            drawn.add(Drawn.ROUTED_LOADING)
            drawn.update({Drawn.FIXED_LOADING} if not r.free else set())
            text = _value(r.standardized)
            lx, ly = _free_spot([(x2 - 6 - text_width(text, SMALLEST_TEXT) / 2, lane - 4)], text, placed)
            impossible = result.groups[group].r_squared.get(target, 0.0) > 1.0
            parts.append(_label(lx, ly, text, problem=impossible or flagged(r.kind, r.variables)))
            continue
        from_below = f in lay.bottom
        x1, y1 = centre[f], y_of[f] + (-ELLIPSE_RY if from_below else ELLIPSE_RY)
        if target in obs_set:
            x2, y2 = centre[target], y_of[target] + (BOX_H if from_below else 0)
        else:
            x2, y2 = centre[target], y_of[target] - ELLIPSE_RY
        impossible = result.groups[group].r_squared.get(target, 0.0) > 1.0  # R-squared above 1
        parts += _loading(r, (x1, y1, x2, y2), (0.8, 0.9, 0.7, 0.6) if from_below else (0.72, 0.6, 0.84, 0.5, 0.4),
                          placed, impossible or flagged(r.kind, r.variables))
        drawn.update({Drawn.FIXED_LOADING} if not r.free else set())
    # covariances between factors (arcs above, or below for the bottom row) and between residuals (arcs below)
    ports = _ports(rows, lay)
    arcs = {}  # each factor covariance drawn: its curve (ends, the control point's height) and its value's text
    for r in rows:
        if r.kind == "factor_covariance" and (r.kind, *r.variables) not in lay.table:
            a, b = r.variables
            below = a in lay.bottom and b in lay.bottom
            (xa, ya), (xb, yb) = sorted((ports[(r.variables, a)], ports[(r.variables, b)]))
            y = min(ya, yb) if not below else max(ya, yb)
            arcs[r.variables] = (xa, ya, xb, yb, y + 2 * (1 if below else -1) * _lift(xb - xa), _value(r.standardized))
    obstacles = placed + [(centre[f] - _ellipse_rx(lay.text(f)), y_of[f] - ELLIPSE_RY, centre[f] + _ellipse_rx(lay.text(f)),
                           y_of[f] + ELLIPSE_RY) for f in latent]
    spots = dict(zip(arcs, _arc_values(list(arcs.values()), obstacles)))
    for r in rows:
        if r.variables in arcs and r.kind == "factor_covariance":
            xa, ya, xb, yb, control, text = arcs[r.variables]
            bad = flagged(r.kind, r.variables)
            parts.append(_arc(xa, ya, xb, yb, control, "covariance", bad))
            drawn.add(Drawn.ARC)
            parts.append(_label(*spots[r.variables], text, problem=bad))
        elif r.kind == "residual_covariance" and lay.band_of[r.variables[0]] == lay.band_of[r.variables[1]]:
            a, b = r.variables
            (xa, _), (xb, _) = sorted((_residual_centre(a, lay), _residual_centre(b, lay)))
            y = _residual_centre(a, lay)[1] + RESIDUAL_R
            drop = _drop(lay.drop_level[r.variables])
            bad = flagged(r.kind, r.variables)
            parts.append(_arc(xa, y, xb, y, y + drop * 2, "residual-covariance", bad))
            drawn.add(Drawn.ARC)
            parts.append(_label((xa + xb) / 2, y + drop + 4, _value(r.standardized), problem=bad))  # on the arc's lowest point
    # the items of a factor that go on in a later band: named over them, their loadings listed above
    for f, items in lay.continued:
        text = continued_label(lay.text(f))
        half = text_width(text, SMALLEST_TEXT) / 2 + 2  # over the middle of the items, inside the picture
        x = min(max((lay.centre[items[0]] + lay.centre[items[-1]]) / 2, half), lay.width - half)
        parts.append(_label(x, y_of[items[0]] - 12, text, cls="continued"))
    # factors
    for f in latent:
        rx = _ellipse_rx(lay.text(f))
        bad = flagged("factor_variance", (f,))
        fill = METHOD_FILL if f in methods else FACTOR_FILL
        parts.append(f'<ellipse class="factor{" method" if f in methods else ""}{" problem" if bad else ""}" '
                     f'cx="{centre[f]:.1f}" cy="{y_of[f]:.1f}" rx="{rx:.1f}" ry="{ELLIPSE_RY}" fill="{fill}" '
                     + (f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"' if bad else 'stroke="#1f3b73" stroke-width="1.5"')
                     + _closed(_whole_name(f, lay.names), "ellipse"))
        parts.append(_name_text(centre[f], y_of[f] + 4, lay.text(f), NAME_SIZE))
    # disturbances of factors explained by higher-order factors
    children_of = {r.variables[1] for r in rows if r.kind == "loading"}
    for r in rows:
        if r.kind == "factor_variance" and r.variables[0] in children_of:
            f = r.variables[0]
            rx = _ellipse_rx(lay.text(f))
            cx, cy = centre[f] + rx + 30, y_of[f]
            bad = flagged(r.kind, r.variables)
            parts.append(f'<circle class="residual{" problem" if bad else ""}" cx="{cx:.1f}" cy="{cy:.1f}" r="{RESIDUAL_R}" '
                         f'fill="#fff" {stroke(r.kind, r.variables)}/>')
            drawn.add(Drawn.DISTURBANCE)
            parts.append(f'<line x1="{cx - RESIDUAL_R:.1f}" y1="{cy:.1f}" x2="{centre[f] + rx:.1f}" y2="{cy:.1f}" '
                         f'stroke="#333" marker-end="url(#head)"/>')
            parts.append(_label(cx, cy - RESIDUAL_R - 5, _value(r.standardized), problem=bad))
    # indicators and their residuals
    residual = {r.variables[0]: r for r in rows if r.kind == "residual_variance"}
    for name in lay.order:
        parts += _indicator(lay.text(name), centre[name] - lay.widths[name] / 2, y_of[name], lay.widths[name],
                            _residual_centre(name, lay), lay.side_residuals, residual.get(name),
                            flagged("residual_variance", (name,)), stroke("residual_variance", (name,)),
                            _whole_name(name, lay.names))
    parts.append("</g>")
    if any(PROBLEM_COLOUR in part for part in parts):
        drawn.add(Drawn.PROBLEM)
    return Drawing(lay.width, lay.height + head, parts, [head + b for b in lay.breaks], frozenset(drawn), lay.shown)


GROUP_NAME_SIZE = 15  # font size of a group's name over its drawing


def _group_name(result, group: int, width: float) -> tuple[list[str], float, float]:
    """Group ``group``'s name over its drawing ('Group north', 'Group "east side"' among labels one of which needs
    quotes: the one rule of the report's group names, paragraph.group_words, as the figure's title names it; s23:
    the label bare; nothing without groups): its texts, the height they take and the drawing's width, widened to hold
    the name up to ``MAX_WIDTH``; a name longer than that goes on in lines under it (a group label of 88 characters had
    run 137 units past a drawing 767 wide, out of the picture)."""
    from cfa_tool.reporting.paragraph import group_words

    if result.groups[group].label is None:
        return [], 0.0, width
    text = f"Group {printable(group_words(result, group))}"
    lines = wrapped(text, GROUP_NAME_SIZE, MAX_WIDTH - 2 * MARGIN, bold=True)
    width = max(width, min(MAX_WIDTH, 2 * MARGIN + max(text_width(line, GROUP_NAME_SIZE, bold=True) for line in lines)))
    parts = [f'<text class="group-name" x="{MARGIN:.1f}" y="{20 + 18 * k}" font-size="{GROUP_NAME_SIZE}" '
             f'font-weight="bold">{esc(line)}</text>' for k, line in enumerate(lines)]
    return parts, 26.0 + 18 * (len(lines) - 1), width


def _loading(r, ends: tuple[float, float, float, float], shares: tuple[float, ...], placed: list,
             problem: bool) -> list[str]:
    """A loading's straight arrow (dashed when fixed) from (x1, y1) to (x2, y2), ``ends``, and its value on it at the
    first of ``shares`` of the way where it covers none of the ``placed`` boxes (``_free_spot``); red when
    ``problem``."""
    x1, y1, x2, y2 = ends
    dashed = ' stroke-dasharray="5,4"' if not r.free else ""
    text = _value(r.standardized)
    spot = _free_spot([(x1 + k * (x2 - x1), y1 + k * (y2 - y1) + 4) for k in shares], text, placed)
    return [f'<line class="loading" x1="{x1:.1f}" y1="{y1:.1f}" x2="{x2:.1f}" y2="{y2:.1f}" stroke="#333" '
            f'stroke-width="1.3"{dashed} marker-end="url(#head)"/>', _label(*spot, text, problem=problem)]


def _indicator(text: str, left: float, top: float, width: float, circle: tuple[float, float], beside: bool, residual,
               bad: bool, stroke: str, title: str = "") -> list[str]:
    """An item's box with its name (``text``, as drawn), and its residual: a circle on the box's right (``beside``)
    or under it, its arrow to the box, its value over it (beside) or on its right (under the box); red when
    ``bad``; the box's ``title``, the item's whole name, when it is drawn shortened (``_whole_name``)."""
    cx, cy = circle
    out = [f'<rect class="indicator" x="{left:.1f}" y="{top:.1f}" width="{width:.1f}" height="{BOX_H}" '
           f'fill="#ffffff" stroke="#333" stroke-width="1.3"' + _closed(title, "rect"),
           f'<text class="name" x="{left + width / 2:.1f}" y="{top + BOX_H / 2 + 4:.1f}" font-size="{ITEM_SIZE}" '
           f'text-anchor="middle">{esc(text)}</text>',
           f'<circle class="residual{" problem" if bad else ""}" cx="{cx:.1f}" cy="{cy:.1f}" r="{RESIDUAL_R}" '
           f'fill="#fff" {stroke}/>']
    if beside:
        out.append(f'<line x1="{cx - RESIDUAL_R:.1f}" y1="{cy:.1f}" x2="{left + width:.1f}" y2="{cy:.1f}" '
                   f'stroke="#333" marker-end="url(#head)"/>')
    else:
        out.append(f'<line x1="{cx:.1f}" y1="{cy - RESIDUAL_R:.1f}" x2="{cx:.1f}" y2="{top + BOX_H:.1f}" '
                   f'stroke="#333" marker-end="url(#head)"/>')
    if residual is not None:
        value = _value(residual.standardized)
        out.append(_label(cx, cy - RESIDUAL_R - 5, value, problem=bad) if beside else
                   _label(cx + RESIDUAL_R + 3, cy + 4, value, anchor="start", problem=bad))
    return out


def _free_spot(spots: list[tuple[float, float]], text: str, placed: list, size: int = SMALLEST_TEXT) -> tuple[float, float]:
    """The first of ``spots`` (centre, baseline) where a label ``text`` covers none of the ``placed`` boxes (the
    first spot when none is free); its box is added to ``placed``.  Extent of a text as the layout tests estimate
    it: its characters' widths (``text_extent.text_width``), 1 em tall, with its white halo."""
    half = text_width(text, size) / 2 + 1.5

    def box(x: float, y: float) -> tuple[float, float, float, float]:
        return x - half, y - 0.8 * size - 1.5, x + half, y + 0.2 * size + 1.5

    def free(b) -> bool:
        return all(min(b[2], p[2]) <= max(b[0], p[0]) or min(b[3], p[3]) <= max(b[1], p[1]) for p in placed)

    chosen = next((spot for spot in spots if free(box(*spot))), spots[0])
    placed.append(box(*chosen))
    return chosen


def _residual_centre(name: str, lay: _Layout) -> tuple[float, float]:
    if lay.side_residuals:
        return lay.centre[name] + lay.widths[name] / 2 + SIDE_GAP + RESIDUAL_R, lay.y_of[name] + BOX_H / 2
    return lay.centre[name], lay.y_of[name] + BOX_H + 48


PORT_SPREAD = 0.55  # the arcs of a factor leave its ellipse this share of its half-width either side of its centre


def _port_offsets(rows, lay: _Layout) -> dict:
    """Where each arc between two factors leaves each ellipse, in x from its centre: the arcs of one factor are
    spread over the top of its ellipse (the bottom for the bottom row), so arcs do not all meet at one point.  From
    left to right:
    the arcs to factors on the left, nearest first, then those to factors on the right, farthest first; so of
    two arcs with a common end the longer one's other end lies beyond the shorter one's at both ends, and, as
    every arc rises by the same share of its length (``_lift``), it stays above the shorter one: arcs that share
    a factor never cross."""
    ends: dict[str, list[tuple[float, tuple]]] = {}
    for r in rows:
        if r.kind == "factor_covariance":
            a, b = r.variables
            ends.setdefault(a, []).append((lay.centre[b] - lay.centre[a], r.variables))
            ends.setdefault(b, []).append((lay.centre[a] - lay.centre[b], r.variables))
    ports = {}
    for f, arcs in ends.items():
        rx = _ellipse_rx(lay.text(f))
        arcs.sort(key=lambda e: (e[0] > 0, abs(e[0]) if e[0] <= 0 else -abs(e[0])))
        n = len(arcs)
        for k, (_, variables) in enumerate(arcs):
            ports[(variables, f)] = 0.0 if n == 1 else PORT_SPREAD * rx * (2 * k / (n - 1) - 1)
    return ports


def _ports(rows, lay: _Layout) -> dict:
    """Each arc's ends on the ellipses of its factors (see ``_port_offsets``)."""
    ports = {}
    for (variables, f), dx in _port_offsets(rows, lay).items():
        dy = ELLIPSE_RY * math.sqrt(max(0.0, 1 - (dx / _ellipse_rx(lay.text(f))) ** 2))
        ports[(variables, f)] = (lay.centre[f] + dx, lay.y_of[f] + (dy if f in lay.bottom else -dy))
    return ports


def _arc_rise(rows, lay: _Layout, pairs) -> float:
    """The height of the highest arc between the factors of ``pairs`` (their x positions known)."""
    offsets = _port_offsets(rows, lay)
    return max((_lift(abs(lay.centre[a] + offsets[((a, b), a)] - lay.centre[b] - offsets[((a, b), b)]))
                for a, b in pairs), default=0.0)


#: an arc between two factors rises this share of the distance between its ends (a quadratic curve: it leaves
#: each end at the same slope, 4 * ARC_RISE, whatever its length)
ARC_RISE = 0.24
#: the shortest arc between neighbouring factors, end to end: its value needs room between the other arcs that
#: leave the two factors (they rise at its slope from the ports beside its ends), so neighbours joined by an arc
#: are set at least this much further apart than its ends lie inside their ellipses (factors of two short items
#: each stand about so far apart, 120 units); found by drawing rows of 3 to 8 factors of random sizes, names and
#: signs of correlations (tests/reporting/test_diagram_arcs.py measures a fixed set)
SHORTEST_ARC = 74.0


def _lift(span: float) -> float:
    """Height of a covariance arc between two factors' ellipses ``span`` apart (from end to end): proportional,
    so that of two arcs with a common end the longer never crosses the shorter (see ``_port_offsets``): for
    y = 4h(x - x0)(x1 - x)/(x1 - x0), the curve of a rise h proportional to its span, the height at any x grows as
    either end moves out.  Arcs of like spans rise alike, so their values stand in one line, nested by span."""
    return ARC_RISE * span


#: where on its arc a correlation's value may go, in order of preference: the apex first, then along the
#: curve to either side (a share of the way from its left end)
ARC_SPOTS = (0.5, 0.44, 0.56, 0.38, 0.62, 0.32, 0.68, 0.26, 0.74, 0.2, 0.8)
ARC_CLEARANCE = 1.0  # units between a value's box and any other arc


def _arc_values(arcs: list[tuple[float, float, float, float, float, str]], blocked: list) -> list[tuple[float, float]]:
    """Where the value of each arc (x1, y1, x2, y2, control point's height, text) goes (centre, baseline): on its
    own curve (its white halo interrupts the line, as on a loading's arrow), at the first of ``ARC_SPOTS`` where
    its box crosses no other arc (with ``ARC_CLEARANCE``) and covers none of the ``blocked`` boxes (other values,
    ellipses; each value's box is added as it is placed); shorter arcs first, which have the fewest such spots.
    Where none is free, the spot that covers the fewest boxes, then that the fewest points of other arcs enter.
    Extent of a text as ``_free_spot``."""
    t = np.linspace(0.0, 1.0, 401)[:, None]

    def curve(arc, at):
        x1, y1, x2, y2, control, _ = arc
        return (1 - at) ** 2 * np.array([x1, y1]) + 2 * at * (1 - at) * np.array([(x1 + x2) / 2, control]) \
            + at ** 2 * np.array([x2, y2])

    points = [curve(arc, t) for arc in arcs]
    spots: dict[int, tuple[float, float]] = {}
    for k in sorted(range(len(arcs)), key=lambda k: arcs[k][2] - arcs[k][0]):
        others = np.concatenate([points[j] for j in range(len(arcs)) if j != k] or [np.empty((0, 2))])
        half = text_width(arcs[k][5], SMALLEST_TEXT) / 2 + 1.5
        best = None
        for share in ARC_SPOTS:
            x, y = curve(arcs[k], share)
            baseline = y + 4
            box = (x - half, baseline - 0.8 * SMALLEST_TEXT - 1.5, x + half, baseline + 0.2 * SMALLEST_TEXT + 1.5)
            near = others[(others[:, 0] > box[0] - ARC_CLEARANCE) & (others[:, 0] < box[2] + ARC_CLEARANCE)
                          & (others[:, 1] > box[1] - ARC_CLEARANCE) & (others[:, 1] < box[3] + ARC_CLEARANCE)]
            covered = sum(min(box[2], p[2]) > max(box[0], p[0]) and min(box[3], p[3]) > max(box[1], p[1])
                          for p in blocked)
            cost = (covered, len(near))
            if best is None or cost < best[0]:
                best = (cost, (x, baseline), box)
            if cost == (0, 0):
                break
        spots[k] = best[1]
        blocked.append(best[2])
    return [spots[k] for k in range(len(arcs))]


def _arc(x1: float, y1: float, x2: float, y2: float, control_y: float, cls: str, problem: bool = False,
         control_x: float | None = None) -> str:
    """A double-headed curve from (x1, y1) to (x2, y2) through the control point (``control_x``, ``control_y``):
    above or under its ends (``control_x`` None: midway across), or beside them (a drawing laid out sideways)."""
    look = f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"' if problem else 'stroke="#555" stroke-width="1.1"'
    across = (x1 + x2) / 2 if control_x is None else control_x
    return (f'<path class="{cls}{" problem" if problem else ""}" d="M{x1:.1f},{y1:.1f} Q{across:.1f},{control_y:.1f} '
            f'{x2:.1f},{y2:.1f}" fill="none" {look} marker-start="url(#head)" marker-end="url(#head)"/>')


def _spread_factors(latent: list[str], row_of: dict, centre: dict[str, float], disturbed: set[str], text,
                    joined: frozenset = frozenset()) -> None:
    """Push apart factors of one row whose ellipses (and disturbance circles) would overlap, and neighbours
    joined by an arc (``joined``: pairs as frozensets) whose arc would be too short to carry its value (``text``:
    each name as drawn)."""
    for row in set(row_of.values()):
        ordered = sorted((f for f in latent if row_of[f] == row), key=lambda f: centre[f])
        for a, b in zip(ordered, ordered[1:]):
            need = _need(a, b, disturbed, joined, text)
            if centre[b] - centre[a] < need:
                centre[b] = centre[a] + need


def _block_rows(result) -> list:
    """The rotated exploratory blocks as rows to draw: loadings of .30 or more in absolute value (the block's
    report table shows every loading) and the rotated factors' correlations."""
    from types import SimpleNamespace

    out, drawn = [], set()
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
                for a, f in enumerate(block.factors) for k, g in enumerate(block.other_factors)
                if g not in drawn]  # two blocks' correlations: drawn once, with the first block
        drawn.update(block.factors)
    return out


# ---------------------------------------------------------------------------------------------------------------
# Sideways: a model of a page's height of items, drawn from left to right (see _sideways)
# ---------------------------------------------------------------------------------------------------------------

#: the height a drawing laid out sideways may take: its items in one column on a portrait page of the Word report
#: (letter paper, 1 inch margins: 9 inches of text, less about 1.5 for the caption and the legend under it) print their
#: smallest text at ``MIN_FIGURE_TEXT`` or more, the legibility rule of ``MAX_WIDTH`` turned on its side
PRINT_HEIGHT = 7.5  # inches
SIDEWAYS_HEIGHT = math.floor(SMALLEST_TEXT * 72 * PRINT_HEIGHT / MIN_FIGURE_TEXT)  # 925 units
FAN = 120.0  # across from a factor's ellipse to what it loads on: the room for the arrows and their values, and
FACTOR_FAN = 90.0  # across to factors: a few arrows, their values far apart; either wider when the fan is steep:
VALUE_SHARE = 0.78  # a loading's value stands this share of the way to its head when nothing is there (_loading)
FAN_CLEARANCE = 3.0  # units between a value's text and any other arrow of its fan: its white halo (1.5) and as much air
BLOCK_GAP = 12.0  # between the items of two factors in the column of items
ITEM_COLUMN = 96.0  # least width of the item boxes under which a residual hangs (its value beside it, in the box's width)
DISTURBANCE_GAP = 8.0  # between a factor's ellipse and its disturbance circle above it
HANG = 6.0  # between an item's box and its residual circle under it (room for the arrowhead), and under the circle


@dataclass
class _Side:
    """Where everything of one group's drawing laid out sideways goes (computed once by ``_sideways``)."""
    kind: str  # "higher-order", "bifactor" or "correlated"
    x: dict[str, float]  # centre of every factor and item
    y: dict[str, float]
    box: float  # the width of every item's box
    below: bool  # residuals hang under their items (bifactor: factors on both sides of the items)
    disturbed: frozenset[str]  # factors with a disturbance circle above them
    right: frozenset[str]  # factors to the right of the items (a bifactor model's specific factors)
    drops: dict  # depth of each arc between residuals (to the right of the residuals)
    shown: dict[str, str]
    names: dict[str, str]  # every factor and item as the drawing writes it (drawn_names)
    width: float = 0.0
    height: float = 0.0

    def text(self, name: str) -> str:
        return self.shown.get(name) or self.names[name]


def _sideways(result, rows, obs_set) -> _Side | None:
    """The layout of a higher-order model or of a bifactor model, from left to right, when it applies (None
    otherwise: the drawing is then laid out from the top by ``_layout``).  A higher-order model: the factors of the
    highest level on the left, each level's factors in a column centred on what they load on, the first-order factors
    each beside its own items, the items in one column, the residuals on their right; its blocks of items in the
    order of the factors above them, so that no two arrows cross.  A bifactor model: the general factor on the left
    of the column of items, the specific factors on its right, each beside its own items, the residuals under their
    items.  It applies when every item loads on one factor (a bifactor model: on the general factor and at most one
    other), each factor below another on that one only, the correlations are between factors of the left column
    only (a bifactor model: none, nor between residuals), and the drawing is no higher than ``SIDEWAYS_HEIGHT`` nor
    wider than ``MAX_WIDTH``; never with method factors or exploratory blocks.  A model of correlated factors (or of
    one) is drawn so too, its correlations as arcs on the left of its factors, when its items or its factors (long
    names over few items) are too wide for one row: from the top it would be drawn in bands, its correlations (the
    demo's three factors) or its loadings (the demo's one factor, on a second band) listed instead of drawn.  A fan
    of arrows runs across as far as its values need to stand apart (``_fan_run``)."""
    latent, observed = list(result.latent), list(result.observed)
    if _method_factors(result) or getattr(result, "exploratory", ()):
        return None
    children = _children(latent, rows)
    level = _levels(latent, children, obs_set)
    cross = _cross_factors(latent, children, obs_set, frozenset())
    parents: dict[str, list[str]] = {}
    for f in latent:
        for c in children[f]:
            parents.setdefault(c, []).append(f)
    higher = any(level[f] > 1 for f in latent)
    covariances = [r.variables for r in rows if r.kind == "factor_covariance"]
    residual_pairs = [r.variables for r in rows if r.kind == "residual_covariance"]
    if higher and cross or any(x not in parents for x in observed):
        return None
    shown = item_labels(result)
    if not higher and not cross:
        row = _layout(result, rows, obs_set, relabel=False)  # (drawn sideways with their names rather than labelled)
        if not row.banded and row.width <= MAX_WIDTH:
            return None  # correlated factors that fit in one row, items and factors: drawn from the top, arcs above
    if not cross:
        top = max(level.values())
        if any(len(p) > 1 for p in parents.values()) or \
                any(a in parents or b in parents or level[a] != top or level[b] != top for a, b in covariances):
            return None
        general, right = None, frozenset()
    else:
        if len(cross) != 1 or covariances or residual_pairs:
            return None
        (general,) = cross
        if any(len([p for p in parents[x] if p != general]) > 1 for x in observed):
            return None
        right = frozenset(f for f in latent if f != general)
    # the order from the top: a depth-first walk from each factor that loads on no other (a higher-order model), or
    # the specific factors in the model's order with the items of the general factor only where they come
    blocks: list[tuple[str | None, list[str]]] = []
    if not cross:
        def walk(f: str) -> None:
            items = [c for c in children[f] if c in obs_set]
            if items:
                blocks.append((f, items))
            for c in children[f]:
                if c not in obs_set:
                    walk(c)

        for f in latent:
            if f not in parents:
                walk(f)
    else:
        for x in observed:
            own = next((p for p in parents[x] if p != general), None)
            if blocks and own is not None and blocks[-1][0] == own:
                blocks[-1][1].append(x)
            else:
                blocks.append((own, [x]))
        if len({f for f, _ in blocks if f is not None}) != sum(f is not None for f, _ in blocks):
            return None  # a specific factor's items apart in the data: their arrows would cross
    below = bool(cross)
    names = drawn_names(latent + observed)
    box = max([_box_width(shown.get(x) or names[x]) for x in observed] + ([ITEM_COLUMN] if below else []))
    disturbed = frozenset(f for f in latent if f in parents)
    side = _Side("higher-order" if higher else "bifactor" if cross else "correlated", {}, {}, box, below, disturbed,
                 right, {}, shown, names)
    # heights: the items block by block, a block moved down when its factor's disturbance would meet the factor above
    pitch = BOX_H + (2 * HANG + 2 * RESIDUAL_R + 2 if below else BOX_GAP)
    y, last = MARGIN, -math.inf  # the top of the next item; the lowest point of the last factor of items drawn
    for f, items in blocks:
        if f is not None:
            centre = y + (len(items) - 1) * pitch / 2 + BOX_H / 2
            up = ELLIPSE_RY + (DISTURBANCE_GAP + 2 * RESIDUAL_R if f in disturbed else 0)
            y += max(0.0, last + 10 - (centre - up))
        for k, x in enumerate(items):
            side.y[x] = y + k * pitch + BOX_H / 2
        if f is not None:
            side.y[f] = (side.y[items[0]] + side.y[items[-1]]) / 2
            last = side.y[f] + ELLIPSE_RY
        y += len(items) * pitch + (BLOCK_GAP / 2 if below else BLOCK_GAP)  # (residuals under items part them)
    for lvl in range(2, max(level.values()) + 1):
        for f in latent:
            if level[f] == lvl and not children[f][0] in obs_set:
                side.y[f] = sum(side.y[c] for c in children[f]) / len(children[f])
    if general is not None:
        side.y[general] = (side.y[observed[0]] + side.y[observed[-1]]) / 2
    # across: the columns of factors from the highest level, then the items, then (bifactor) the specific factors
    left_of = [lvl for lvl in range(max(level.values()), 0, -1)] if not cross else [1]
    column = {lvl: [f for f in latent if (level[f] == lvl if not cross else f == general)] for lvl in left_of}
    arcs_room = _side_arc_room(covariances, side)
    x = MARGIN + arcs_room
    def fan(factors) -> float:  # across to what they load on, wider when their arrows are steep (_fan_run)
        items = any(c in obs_set for f in factors for c in children[f])
        return max(_fan_run(side.y[f], [side.y[c] for c in children[f]], FAN if items else FACTOR_FAN)
                   for f in factors)

    for lvl in left_of:
        rx = max(_ellipse_rx(side.text(f)) for f in column[lvl])
        for f in column[lvl]:
            side.x[f] = x + rx
        x += 2 * rx + fan(column[lvl])
    for name in observed:
        side.x[name] = x + box / 2
    x += box
    if below:
        rx = max(_ellipse_rx(side.text(f)) for f in right)
        for f in right:
            side.x[f] = x + fan(right) + rx
        x += fan(right) + 2 * rx
    else:
        side.drops = _nest_levels({p: sorted((side.y[p[0]], side.y[p[1]])) for p in residual_pairs})
        deepest = max((_drop(d) for d in side.drops.values()), default=0.0)
        x += SIDE_GAP + 2 * RESIDUAL_R + (deepest + 4 + VALUE_ROOM if side.drops else 0.0)
        x += VALUE_ROOM / 2 + 3  # a residual's value over its circle reaches past it
    side.width = max(x + MARGIN, 200.0)
    lowest = max(side.y[x] + BOX_H / 2 for x in observed) + (HANG + 2 * RESIDUAL_R if below else 0.0)
    side.height = lowest + MARGIN
    if side.height > SIDEWAYS_HEIGHT or side.width > MAX_WIDTH:
        return None
    return side


def _fan_run(start: float, ends: list[float], least: float) -> float:
    """How far across a fan of arrows from one factor at height ``start`` to things at heights ``ends`` must run (at
    least ``least``) for each arrow's value, at ``VALUE_SHARE`` of the way to its head, to stand ``FAN_CLEARANCE``
    clear of every other arrow of the fan (session note s20: a factor's fan to sixteen items ran 163 units across,
    each value 1.2 units from the next arrow, so that its halo cut that arrow and the values read as belonging to
    either).  Extent of a value as ``_free_spot`` estimates it (``VALUE_ROOM``, the width of '−.00'), the
    arrows as straight lines from the factor's edge to the things' edges, in steps of 4 units up to twice
    ``MAX_WIDTH`` (a drawing so wide is then drawn from the top)."""
    half = VALUE_ROOM / 2 + FAN_CLEARANCE
    run = least
    while run < 2 * MAX_WIDTH:
        clear = True
        for k, end in enumerate(ends):
            x, base = VALUE_SHARE * run, start + VALUE_SHARE * (end - start) + 4
            box = (x - half, base - 0.8 * SMALLEST_TEXT - FAN_CLEARANCE, x + half, base + 0.2 * SMALLEST_TEXT + FAN_CLEARANCE)
            if any(_meets((0.0, start, run, other), box) for j, other in enumerate(ends) if j != k and other != end):
                clear = False
                break
        if clear:
            return run
        run += 4.0
    return run


def _meets(segment: tuple[float, float, float, float], box: tuple[float, float, float, float]) -> bool:
    """Whether the straight segment (x1, y1, x2, y2) enters the box (left, top, right, bottom): the segment clipped
    to the box's sides (Liang & Barsky 1984) keeps some length."""
    x1, y1, x2, y2 = segment
    dx, dy = x2 - x1, y2 - y1
    low, high = 0.0, 1.0
    for p, q in ((-dx, x1 - box[0]), (dx, box[2] - x1), (-dy, y1 - box[1]), (dy, box[3] - y1)):
        if p == 0:
            if q < 0:
                return False
        elif p < 0:
            low = max(low, q / p)
        else:
            high = min(high, q / p)
        if low > high:
            return False
    return True


def _side_arc_room(covariances, side: _Side) -> float:
    """Room on the left of the left column for the arcs between its factors (their bulge and a value beside it);
    0 without arcs.  Called before the factors' x are known: their heights are."""
    if not covariances:
        return 0.0
    return max(_lift(abs(side.y[a] - side.y[b])) for a, b in covariances) + VALUE_ROOM + 10


def _nest_levels(spans: dict) -> dict:
    """A level (1, 2, ...) for each arc of ``spans`` (pair: (low, high)): shorter arcs first, each one level beyond
    every arc whose span overlaps or touches its own, so that nested arcs and arcs that share an end keep their
    values apart."""
    levels: dict = {}
    for p in sorted(spans, key=lambda q: (spans[q][1] - spans[q][0], spans[q][0])):
        a, b = spans[p]
        levels[p] = 1 + max((levels[q] for q in levels if spans[q][0] <= b and a <= spans[q][1]), default=0)
    return levels


def _side_ports(covariances, side: _Side) -> dict:
    """Where each arc between two factors of the left column leaves each ellipse: spread over its left side, in the
    order ``_port_offsets`` gives the top of an ellipse (turned on its side), so that arcs with a common end never
    cross."""
    ends: dict[str, list[tuple[float, tuple]]] = {}
    for a, b in covariances:
        ends.setdefault(a, []).append((side.y[b] - side.y[a], (a, b)))
        ends.setdefault(b, []).append((side.y[a] - side.y[b], (a, b)))
    ports = {}
    for f, arcs in ends.items():
        arcs.sort(key=lambda e: (e[0] > 0, abs(e[0]) if e[0] <= 0 else -abs(e[0])))
        n = len(arcs)
        for k, (_, pair) in enumerate(arcs):
            dy = 0.0 if n == 1 else PORT_SPREAD * ELLIPSE_RY * (2 * k / (n - 1) - 1)
            dx = _ellipse_rx(side.text(f)) * math.sqrt(max(0.0, 1 - (dy / ELLIPSE_RY) ** 2))
            ports[(pair, f)] = (side.x[f] - dx, side.y[f] + dy)
    return ports


def _draw_sideways(result, group: int, rows, side: _Side, flagged) -> Drawing:
    """One group's drawing laid out by ``_sideways``."""
    r_squared = result.groups[group].r_squared
    parts: list[str] = []
    drawn: set[Drawn] = set()
    named, head, side.width = _group_name(result, group, side.width)
    parts += named
    parts.append(f'<g transform="translate(0,{head:.0f})">')
    x, y = side.x, side.y
    obs_set = set(result.observed)
    half = side.box / 2
    # the boxes' and ellipses' room, which no value may cover
    placed: list[tuple[float, float, float, float]] = \
        [(x[n] - half, y[n] - BOX_H / 2, x[n] + half, y[n] + BOX_H / 2) for n in result.observed] + \
        [(x[f] - _ellipse_rx(side.text(f)), y[f] - ELLIPSE_RY, x[f] + _ellipse_rx(side.text(f)), y[f] + ELLIPSE_RY)
         for f in result.latent]

    def stroke(kind: str, variables) -> str:
        return f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"' if flagged(kind, variables) else 'stroke="#333"'

    for r in (r for r in rows if r.kind == "loading"):
        f, target = r.variables
        rightward = f not in side.right
        rx = _ellipse_rx(side.text(f))
        x1, y1 = x[f] + (rx if rightward else -rx), y[f]
        reach = half if target in obs_set else _ellipse_rx(side.text(target))
        x2, y2 = x[target] + (-reach if rightward else reach), y[target]
        # its value near the arrow's head, where the arrows of a fan stand farthest apart
        parts += _loading(r, (x1, y1, x2, y2), (0.78, 0.66, 0.88, 0.55, 0.45), placed,
                          r_squared.get(target, 0.0) > 1.0 or flagged(r.kind, r.variables))
        drawn.update({Drawn.FIXED_LOADING} if not r.free else set())
    # correlations between factors of the left column: arcs on its left
    covariances = [r for r in rows if r.kind == "factor_covariance"]
    ports = _side_ports([r.variables for r in covariances], side)
    for r in covariances:
        a, b = r.variables
        (xa, ya), (xb, yb) = sorted((ports[(r.variables, a)], ports[(r.variables, b)]), key=lambda p: p[1])
        control = min(xa, xb) - 2 * _lift(yb - ya)
        bad = flagged(r.kind, r.variables)
        parts.append(_arc(xa, ya, xb, yb, (ya + yb) / 2, "covariance", bad, control_x=control))
        drawn.add(Drawn.ARC)
        text = _value(r.standardized)

        def on_curve(t: float) -> tuple[float, float]:
            cx = (1 - t) ** 2 * xa + 2 * t * (1 - t) * control + t ** 2 * xb
            cy = (1 - t) ** 2 * ya + 2 * t * (1 - t) * (ya + yb) / 2 + t ** 2 * yb
            return cx, cy + 4

        parts.append(_label(*_free_spot([on_curve(t) for t in ARC_SPOTS], text, placed), text, problem=bad))
    # factors, and the disturbances of those below another factor (a circle above each)
    for f in result.latent:
        bad = flagged("factor_variance", (f,))
        parts.append(f'<ellipse class="factor{" problem" if bad else ""}" cx="{x[f]:.1f}" cy="{y[f]:.1f}" '
                     f'rx="{_ellipse_rx(side.text(f)):.1f}" ry="{ELLIPSE_RY}" fill="{FACTOR_FILL}" '
                     + (f'stroke="{PROBLEM_COLOUR}" stroke-width="2.5"' if bad else 'stroke="#1f3b73" stroke-width="1.5"')
                     + _closed(_whole_name(f, side.names), "ellipse"))
        parts.append(_name_text(x[f], y[f] + 4, side.text(f), NAME_SIZE))
    for r in rows:
        if r.kind == "factor_variance" and r.variables[0] in side.disturbed:
            f = r.variables[0]
            cx, cy = x[f], y[f] - ELLIPSE_RY - DISTURBANCE_GAP - RESIDUAL_R
            bad = flagged(r.kind, r.variables)
            parts.append(f'<circle class="residual{" problem" if bad else ""}" cx="{cx:.1f}" cy="{cy:.1f}" '
                         f'r="{RESIDUAL_R}" fill="#fff" {stroke(r.kind, r.variables)}/>')
            parts.append(f'<line x1="{cx:.1f}" y1="{cy + RESIDUAL_R:.1f}" x2="{cx:.1f}" y2="{y[f] - ELLIPSE_RY:.1f}" '
                         f'stroke="#333" marker-end="url(#head)"/>')
            drawn.add(Drawn.DISTURBANCE)
            parts.append(_label(cx + RESIDUAL_R + 3, cy + 4, _value(r.standardized), anchor="start", problem=bad))
    # items, their residuals (on their right, or under them) and the arcs between residuals (on the right)
    residual = {r.variables[0]: r for r in rows if r.kind == "residual_variance"}
    for name in result.observed:
        parts += _indicator(side.text(name), x[name] - half, y[name] - BOX_H / 2, side.box, _side_residual(name, side),
                            not side.below, residual.get(name), flagged("residual_variance", (name,)),
                            stroke("residual_variance", (name,)), _whole_name(name, side.names))
    for r in rows:
        if r.kind == "residual_covariance":
            (xa, ya), (_, yb) = sorted((_side_residual(v, side) for v in r.variables), key=lambda p: p[1])
            drop = _drop(side.drops[r.variables])
            bad = flagged(r.kind, r.variables)
            parts.append(_arc(xa + RESIDUAL_R, ya, xa + RESIDUAL_R, yb, (ya + yb) / 2, "residual-covariance", bad,
                              control_x=xa + RESIDUAL_R + 2 * drop))
            drawn.add(Drawn.ARC)
            parts.append(_label(xa + RESIDUAL_R + drop + 4, (ya + yb) / 2 + 4, _value(r.standardized), anchor="start",
                                problem=bad))  # beside the arc's farthest point
    parts.append("</g>")
    if any(PROBLEM_COLOUR in part for part in parts):
        drawn.add(Drawn.PROBLEM)
    return Drawing(side.width, side.height + head, parts, [], frozenset(drawn), side.shown)


def _side_residual(name: str, side: _Side) -> tuple[float, float]:
    """The centre of an item's residual circle in a drawing laid out sideways: on its right, or under it."""
    if side.below:
        return side.x[name], side.y[name] + BOX_H / 2 + HANG + RESIDUAL_R
    return side.x[name] + side.box / 2 + SIDE_GAP + RESIDUAL_R, side.y[name]
