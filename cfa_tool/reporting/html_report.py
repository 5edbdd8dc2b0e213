"""One self-contained HTML file (inline CSS and SVG, no scripts, no external
assets) with everything a researcher needs for a paper."""

from __future__ import annotations

from cfa_tool.version import __version__
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.diagram import MIN_FIGURE_TEXT
from cfa_tool.reporting.picture import smallest_text, svg_size
from cfa_tool.reporting.document import PARAGRAPH_HEADING, WARNINGS, by_file_name
from cfa_tool.reporting.escape import html_text as esc
from cfa_tool.reporting.numbers import printed, printed_line
from cfa_tool.note_parts import RUNNING, View, said, titled
from cfa_tool.reporting.tables import ReportTable

CSS = """
body{font-family:Georgia,'Times New Roman',serif;max-width:1100px;margin:2em auto;padding:0 1em;color:#1a1a1a;line-height:1.45}
h1{font-size:1.6em;margin-bottom:.2em} h2{font-size:1.2em;border-bottom:1px solid #999;margin-top:1.8em}
table{border-collapse:collapse;margin:.6em 0 1.2em;font-size:.92em}
caption{text-align:left;font-weight:bold;padding:.3em 0}
th{border-top:2px solid #333;border-bottom:1px solid #333;padding:.25em .7em;font-weight:normal;font-style:italic}
td{padding:.2em .7em} tbody tr:last-child td{border-bottom:2px solid #333}
td.r,th.r{text-align:right;font-variant-numeric:tabular-nums} td.l,th.l{text-align:left}
.note{font-size:.88em;color:#444;max-width:60em} .caution{background:#fff7e6;border-left:4px solid #e0a030;padding:.6em 1em}
.summary{background:#f4f7fb;border-left:4px solid #1f3b73;padding:.8em 1em} pre{background:#f6f6f6;padding:.8em;overflow-x:auto}
.diagram{overflow-x:auto;border:1px solid #ddd;padding:.5em;margin:1em 0} td.heat{text-align:right;min-width:3em}
.diagram img{display:block;max-width:100%;height:auto}
ul.warnings li{margin:.3em 0}
.problems{background:#fdecea;border:2px solid #b3261e;padding:.6em 1em;margin:1em 0}
.problems.caution-only{background:#fff7e6;border-color:#e0a030} .problems h2,.problems h3{border:none;margin:.2em 0;color:#b3261e}
.problems li{margin:.35em 0} tr.problem td{background:#fdecea;color:#8c1d18;font-weight:bold}
td.faint{color:#aaa}
table.matrix td,table.matrix th{padding:.15em .35em} table.matrix td.l{white-space:nowrap}
div.wide{overflow-x:auto;max-width:100%} table.matrix{font-size:.8em}
table.matrix td:first-child{position:sticky;left:0;background:#fff}
@media print{
body{max-width:none;margin:0;padding:0;font-size:10pt;line-height:1.3}
body>h2~h2{break-before:page} h1,h2,caption{break-after:avoid}
tr,li,figure,.problems,.caution,.summary{break-inside:avoid} thead{display:table-header-group}
p,li,pre,.summary{white-space:pre-wrap;overflow-wrap:anywhere} pre{overflow:visible}
table{font-size:8.5pt} .diagram{overflow:visible;border:none;padding:0} .diagram img{max-width:100%;height:auto}
div.wide{overflow:visible;page:wide} figure.landscape{page:wide} table.matrix{font-size:6pt} table.matrix td,table.matrix th{padding:0 .12em}
table.matrix td:first-child{position:static} td.heat{min-width:0}
*{-webkit-print-color-adjust:exact;print-color-adjust:exact}
}
@page{margin:10mm}
@page wide{size:A4 landscape;margin:10mm}
"""
# the width of the text area of a printed page, in inches, with the margins above: portrait, the narrower of A4
# (210 mm) and US letter (8.5 in); landscape, A4 (297 mm)
PAGE_MARGIN_MM = 10.0
PORTRAIT_INCHES = min(210.0 / 25.4, 8.5) - 2 * PAGE_MARGIN_MM / 25.4  # 7.48
LANDSCAPE_INCHES = (297.0 - 2 * PAGE_MARGIN_MM) / 25.4  # 10.91
CSS_PIXEL = 1 / 96  # inches (CSS 2.1): a drawing no wider than the page prints at one user unit to a pixel


def printed_inches(svg: str, page: float) -> float:
    """How wide the drawing ``svg`` prints on a page ``page`` inches wide: at its own size (a user unit to a CSS
    pixel), or scaled down to the page's width (the picture's max-width)."""
    return min(page, svg_size(svg)[0] * CSS_PIXEL)


def landscape_figure(svg: str) -> bool:
    """Whether the drawing ``svg`` prints on a landscape page: across a portrait page its smallest text would be
    below the legibility rule's MIN_FIGURE_TEXT points (reporting.diagram), and a landscape page prints it larger."""
    size = smallest_text(svg, printed_inches(svg, PORTRAIT_INCHES))
    return size is not None and size < MIN_FIGURE_TEXT


def _set(text: str) -> str:
    """A table's text (its title, header, cells and note), the methods paragraph and a figure's note as the page
    prints them: by the printed views' one typographic rule (reporting.numbers.printed: the true minus, '\u2265' for
    '>='), as the Word file sets the same parts; escaped.  The model file's listing is shown as written."""
    return esc(printed(text))


def _heat(text: str) -> str:
    colour = T.heat_colour(text)
    return "" if colour is None else f' style="background:{colour}"'


def _indent(text: str) -> str:
    """A cell's indent (tables.indented) as its padding: HTML collapses spaces, and the row would read as one of its
    own (new-user trial s16)."""
    spaces = T.indented(text)[0]
    return f' style="padding-left:{0.35 + 0.5 * spaces:g}em"' if spaces else ""


def table_html(table: ReportTable, view: View = RUNNING, heading: str = "", ids: str = "") -> str:
    """A table with its caption and its note (and ``heading``, the section's heading it opens, when given).  A matrix
    of the items prints on a landscape page of its own: the heading and the note go on that page with it (a heading
    had been left alone at the foot of the portrait page before it, the note alone on a page after it)."""
    head = "".join(f'<th class="{a}">{_set(c)}</th>' for c, a in zip(table.columns, table.align))
    faint = set(table.faint)
    body = "".join(('<tr class="problem">' if k in table.flagged else "<tr>")
                   + "".join(f'<td class="{a}{" faint" if (k, j) in faint else ""}"'
                             f'{_heat(v) if table.heat and a == "r" else _indent(v)}>{_set(T.indented(v)[1])}</td>'
                             for j, (v, a) in enumerate(zip(row, table.align))) + "</tr>"
                   for k, row in enumerate(table.rows))
    note = " ".join(text for text in (said(table.note or "", view), T.HEAT_LEGEND if table.heat else "") if text)
    note = f'<p class="note">{_set(note)}</p>' if note else ""
    matrix = ' class="matrix"' if table.matrix else ""  # a matrix of the items: compact cells
    html = (f'<table id="{esc(ids + table.key)}"{matrix}><caption>{_set(table.title)}</caption><thead><tr>{head}</tr></thead>'
            f"<tbody>{body}</tbody></table>")
    # a matrix scrolls inside its own box on screen (its item column kept in view) and prints on a landscape page
    return f'<div class="wide">{heading}{html}{note}</div>' if table.matrix else heading + html + note


def notice_html(notice: T.ProblemNotice | None, view: View = RUNNING, ids: str = "", level: int = 2) -> str:
    """The problems box; ``ids``: what the page's ids start with (a part of a page of several results), ``level``:
    its heading's."""
    if notice is None:
        return ""
    cls = "problems" if notice.inadmissible else "problems caution-only"
    items = "".join(f"<li>{esc(printed_line(line, view))}</li>" for line in notice.lines)
    return (f'<div class="{cls}" id="{ids}problems" role="alert"><h{level}>{esc(notice.heading)}</h{level}>'
            f'<ul>{items}</ul></div>')


def report_html_fragment(report, heading: bool = False, level: int = 1, ids: str = "", view: View | None = None) -> str:
    """Any command's report (cfa_tool.reporting.document.Report) as an HTML fragment (also what notebooks show):
    the problems first, then (with ``heading``) the title, what was done, the tables, the notes and the cautions;
    the title at heading ``level`` and the sections under it, and every id starting with ``ids`` (a part of a page
    of several results: reporting.combined).
    Pictures are images of their SVG (a data address), so that nothing in a saved result can run as a script.  A
    note's advice names its command (the reader runs the program), and a table it refers to is named by its title
    (cfa_tool.note_parts)."""
    import base64

    if view is None:  # (a part of a document numbered through names its tables by number: reporting.combined)
        view = titled(report.tables, running=report.kind.value)  # its own command not advised in it
    sub = f"h{level + 1}"
    parts = [notice_html(report.notice, view, ids, level + 1)] + ([f"<h{level}>{esc(report.title)}</h{level}>"]
                                                                  if heading else [])
    parts += [f'<p class="note">{esc(printed_line(line, view))}</p>' for line in report.lines]
    if report.warnings:
        parts.append(f'<div class="caution" id="{ids}warnings"><strong>{esc(WARNINGS)}</strong><ul class="warnings">'
                     + "".join(f"<li>{esc(printed_line(w, view))}</li>" for w in report.warnings) + "</ul></div>")
    if report.paragraph:
        parts += [f"<{sub}>{PARAGRAPH_HEADING}</{sub}>",
                  f'<p class="summary" id="{ids}methods-paragraph">{_set(report.paragraph)}</p>']
    for figure in report.figures:
        data = base64.b64encode(figure.svg.encode("utf-8")).decode("ascii")
        wide = " landscape" if landscape_figure(figure.svg) else ""  # printed on a landscape page, as wide tables
        parts += [f'<figure class="diagram{wide}"><figcaption>{esc(figure.title)}</figcaption>'
                  f'<img alt="{esc(figure.title)}" src="data:image/svg+xml;base64,{data}"></figure>']
        if figure.note:
            parts.append(f'<p class="note">{_set(figure.note)}</p>')
    section = ""
    for table in report.tables:
        heading = f"<{sub}>{esc(table.section)}</{sub}>" if table.section and table.section != section else ""
        section = table.section
        parts.append(table_html(table, view, heading, ids))
    for listing in report.listings:
        lines = "\n".join(esc(line) for line in listing.text.split("\n"))  # its line breaks kept, other controls shown
        parts += [f"<{sub}>{esc(listing.title)}</{sub}>", f"<pre>{lines}</pre>"]
    if report.notes:
        parts.append('<ul class="warnings">' + "".join(f"<li>{esc(printed_line(w, view))}</li>" for w in report.notes) + "</ul>")
    parts += cautions_html(report.cautions, view)
    return "\n".join(p for p in parts if p)


def cautions_html(cautions, view: View = RUNNING) -> list[str]:
    return [f'<p class="caution">{esc(printed_line(c, view))}</p>' for c in cautions]


def report_html(report) -> str:
    """Any command's report as one self-contained HTML file, a page people pass on: the user's files named by their
    names, not their folders (document.by_file_name)."""
    report = by_file_name(report)
    return _page(report.title, report_html_fragment(report, heading=True))


def combined_html(document) -> str:
    """A document of several results (reporting.combined.Combined) as one self-contained HTML file: the "Read
    first" notice, the title and what the results read, each result under its heading (its own problems first, its
    ids apart from the other parts'), and the cautions once."""
    from cfa_tool.reporting.combined import figure_numbers, notice_view, numbered_part, table_numbers

    whole = notice_view(document, numbers=True, commands=True)  # the tables numbered through, as in Word
    parts = [notice_html(document.notice, whole), f"<h1>{esc(document.title)}</h1>"]
    parts += [f'<p class="note">{esc(printed_line(line, whole))}</p>' for line in document.lines]
    for part, first_table, first_figure in zip(document.parts, table_numbers(document), figure_numbers(document)):
        report, view = numbered_part(part.report, first_table, first_figure)
        parts += [f'<section id="result-{part.number}"><h2>{esc(part.heading)}</h2>',
                  report_html_fragment(report, level=2, ids=f"result-{part.number}-", view=view), "</section>"]
    if document.cautions:
        parts += ["<h2>Cautions</h2>", *cautions_html(document.cautions, whole)]
    return _page(document.title, "\n".join(p for p in parts if p))


def _page(title: str, body: str) -> str:
    body = f'{body}\n<p class="note">Made by cfa-tool {esc(__version__)}.</p>'
    return (f'<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8">'
            f'<meta name="viewport" content="width=device-width, initial-scale=1">'
            f"<title>{esc(title)}</title><style>{CSS}</style></head>\n<body>\n{body}\n</body></html>\n")
