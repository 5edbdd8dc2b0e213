"""One self-contained HTML file (inline CSS and SVG, no scripts, no external
assets) with everything a researcher needs for a paper."""

from __future__ import annotations

from cfa_tool.version import __version__
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.diagram import BLOCK_LEGEND, legend_text, path_diagram
from cfa_tool.reporting.escape import html_text as esc
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.tables import GUIDE_NOTE, HIGH_STAKES_NOTE, ReportTable

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
.diagram{overflow-x:auto;border:1px solid #ddd;padding:.5em} td.heat{text-align:right;min-width:3em}
ul.warnings li{margin:.3em 0}
.problems{background:#fdecea;border:2px solid #b3261e;padding:.6em 1em;margin:1em 0}
.problems.caution-only{background:#fff7e6;border-color:#e0a030} .problems h2{border:none;margin:.2em 0;color:#b3261e}
.problems li{margin:.35em 0} tr.problem td{background:#fdecea;color:#8c1d18;font-weight:bold}
td.faint{color:#aaa}
"""


def table_html(table: ReportTable) -> str:
    head = "".join(f'<th class="{a}">{esc(c)}</th>' for c, a in zip(table.columns, table.align))
    faint = set(table.faint)
    body = "".join(('<tr class="problem">' if k in table.flagged else "<tr>")
                   + "".join(f'<td class="{a}{" faint" if (k, j) in faint else ""}">{esc(v)}</td>'
                             for j, (v, a) in enumerate(zip(row, table.align))) + "</tr>"
                   for k, row in enumerate(table.rows))
    note = f'<p class="note">{esc(table.note)}</p>' if table.note else ""
    return (f'<table id="{esc(table.key)}"><caption>{esc(table.title)}</caption><thead><tr>{head}</tr></thead>'
            f"<tbody>{body}</tbody></table>{note}")


def heat_map(result, group: int = 0) -> str:
    """Residual correlations as a lower-triangle table whose cells are shaded by size and sign."""
    names = result.observed
    r = result.groups[group].residual_correlations
    head = "".join(f'<th class="r">{k + 1}</th>' for k in range(len(names)))
    rows = []
    for i, name in enumerate(names):
        cells = []
        for j in range(len(names)):
            if j >= i:
                cells.append("<td></td>")
                continue
            v = float(r[i, j])
            strength = min(abs(v) / 0.15, 1.0)
            colour = f"rgba(200,40,40,{strength:.2f})" if v > 0 else f"rgba(40,80,200,{strength:.2f})"
            cells.append(f'<td class="heat" style="background:{colour}">{esc(f"{v:.2f}".replace("0.", ".", 1))}</td>')
        rows.append(f'<tr><td class="l">{i + 1} {esc(name)}</td>{"".join(cells)}</tr>')
    return (f'<table id="residual-heat-map"><caption>Residual correlations (sample minus model); red: the model '
            f'underestimates, blue: it overestimates; full colour at |r| &gt;= .15</caption>'
            f'<thead><tr><th></th>{head}</tr></thead><tbody>{"".join(rows)}</tbody></table>')


def problem_banner(result) -> str:
    """The problems of the solution as a banner above everything else ('' when there are none)."""
    return notice_html(T.problem_notice(result))


def notice_html(notice: T.ProblemNotice | None) -> str:
    if notice is None:
        return ""
    cls = "problems" if notice.inadmissible else "problems caution-only"
    items = "".join(f"<li>{esc(line)}</li>" for line in notice.lines)
    return f'<div class="{cls}" id="problems" role="alert"><h2>{esc(notice.heading)}</h2><ul>{items}</ul></div>'


def result_tables_html(result) -> str:
    """The tables of a fit, as an HTML fragment (also what notebooks show): the problems first, then
    the rows used, then the tables."""
    d = result.data
    parts = [problem_banner(result)] if T.problem_notice(result) is not None else []
    parts += [f'<p class="note">N = {esc(T.rows_phrase(d))}'
             f"{'' if not d.rows_dropped else f'; {d.rows_dropped} rows left out'}. {esc(T.status_line(result))}.</p>"]
    if result.fit is not None and result.converged:
        parts.append(table_html(T.fit_table(result)))
    for g, group in enumerate(result.groups):
        if result.multigroup:
            parts.append(f"<h3>Group {esc(group.label)} (N = {group.data.n_obs})</h3>")
        parts.extend(table_html(t) for t in T.estimate_tables(result, g))
    mi = T.modification_table(result)
    if mi is not None:
        parts.append(table_html(mi))
    return "\n".join(parts)


def html_report(result) -> str:
    d = result.data
    sections = [
        problem_banner(result),
        f"<h1>{esc(result.model_name)}</h1>",
        f'<p class="note">Model file {esc(result.model_source)}; data {esc(d.source)}; {esc(T.rows_phrase(d))}'
        f"{'' if not d.rows_dropped else f', {d.rows_dropped} left out'}. {esc(T.status_line(result))}.</p>",
    ]
    if not result.converged:
        sections.append('<p class="caution">The estimation did not converge. Nothing below is a result.</p>')
    sections += [
        "<h2>Summary for a paper</h2>",
        f'<p class="summary" id="methods-paragraph">{esc(methods_paragraph(result))}</p>',
        "<h2>Path diagram" + ("s" if result.multigroup else "") + "</h2>",
        *(f'<div class="diagram">{path_diagram(result, g)}</div>' for g in range(len(result.groups))),
        f'<p class="note">{esc(legend_text(result))}</p>',
    ]
    if getattr(result, "exploratory", ()):
        sections.append(f'<p class="note">{esc(BLOCK_LEGEND)}</p>')
    if result.fit is not None and result.converged:
        sections += ["<h2>Fit</h2>", table_html(T.fit_table(result))]
        sections += [f'<p class="note">{esc(line)}</p>' for line in T.normality_lines(result)]
        local = T.local_fit_line(result)
        if local:
            sections.append(f"<p>{esc(local)}</p>")
        if result.multigroup:
            sections.append(table_html(T.group_table(result)))
    sections.append("<h2>Estimates</h2>")
    for g, group in enumerate(result.groups):
        if result.multigroup:
            sections.append(f"<h3>Group {esc(group.label)} (N = {group.data.n_obs})</h3>")
        sections.extend(table_html(t) for t in T.estimate_tables(result, g))
        for extra in (T.reliability_table(result, g), T.sum_score_table(result, g), T.distinct_table(result, g),
                      T.case_table(result, g)):
            if extra is not None:
                sections.append(table_html(extra))
    if result.converged and len(result.observed) > 1:
        sections.append("<h2>Local fit</h2>")
        sections.append(heat_map(result))
    mi = T.modification_table(result)
    if mi is not None:
        sections.append(table_html(mi))
        sections.append('<p class="note">Freeing parameters because of large modification indices capitalises on chance; '
                        "a model changed that way needs confirmation in new data.</p>")
    sections.append("<h2>Data</h2>")
    sections.append(table_html(T.item_table(result)))
    for g in range(len(result.groups)):
        for extra in (T.category_table(result, g), T.correlation_table(result, g)):
            if extra is not None:
                sections.append(table_html(extra))
    missing = T.missing_table(result)
    if missing is not None:
        sections.append(table_html(missing))
    if result.labels:
        items = "".join(f"<li>{esc(k)}: {esc(v)}</li>" for k, v in result.labels.get("variables", {}).items())
        scales = "".join(
            f"<li>{esc(k)}: " + "; ".join(f"{esc(f'{code:g}')} = {esc(text)}" for code, text in v.items()) + "</li>"
            for k, v in result.labels.get("values", {}).items())
        sections.append(f"<h3>Labels from the data file</h3><ul>{items}{scales}</ul>")
    sections.append("<h2>Model</h2>")
    sections.append(f"<pre>{esc(result.model_text)}</pre>")
    if result.warnings:
        sections.append("<h2>Notes and warnings</h2>")
        sections.append('<ul class="warnings">' + "".join(f"<li>{esc(w)}</li>" for w in result.warnings) + "</ul>")
    sections.append("<h2>Cautions</h2>")
    sections.append(f'<p class="caution">{esc(GUIDE_NOTE)}</p><p class="caution">{esc(HIGH_STAKES_NOTE)}</p>')
    sections.append(f'<p class="note">Made by cfa-tool {esc(__version__)}.</p>')
    body = "\n".join(sections)
    return (f'<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8">'
            f'<meta name="viewport" content="width=device-width, initial-scale=1">'
            f"<title>{esc(result.model_name)}</title><style>{CSS}</style></head>\n<body>\n{body}\n</body></html>\n")


def report_html_fragment(report, heading: bool = False) -> str:
    """Any command's report (cfa_tool.reporting.document.Report) as an HTML fragment (also what notebooks show):
    the problems first, then (with ``heading``) the title, what was done, the tables, the notes and the cautions.
    Pictures are images of their SVG (a data address), so that nothing in a saved result can run as a script."""
    import base64

    parts = [notice_html(report.notice)] + ([f"<h1>{esc(report.title)}</h1>"] if heading else [])
    parts += [f'<p class="note">{esc(line)}</p>' for line in report.lines]
    if report.paragraph:
        parts += ["<h2>Summary for a paper</h2>", f'<p class="summary" id="methods-paragraph">{esc(report.paragraph)}</p>']
    for figure in report.figures:
        data = base64.b64encode(figure.svg.encode("utf-8")).decode("ascii")
        parts += [f'<figure class="diagram"><figcaption>{esc(figure.title)}</figcaption>'
                  f'<img alt="{esc(figure.title)}" src="data:image/svg+xml;base64,{data}"></figure>']
        if figure.note:
            parts.append(f'<p class="note">{esc(figure.note)}</p>')
    parts += [table_html(t) for t in report.tables]
    if report.notes:
        parts.append('<ul class="warnings">' + "".join(f"<li>{esc(w)}</li>" for w in report.notes) + "</ul>")
    parts += [f'<p class="caution">{esc(c)}</p>' for c in report.cautions]
    return "\n".join(p for p in parts if p)


def report_html(report) -> str:
    """Any command's report as one self-contained HTML file."""
    body = f'{report_html_fragment(report, heading=True)}\n<p class="note">Made by cfa-tool {esc(__version__)}.</p>'
    return (f'<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8">'
            f'<meta name="viewport" content="width=device-width, initial-scale=1">'
            f"<title>{esc(report.title)}</title><style>{CSS}</style></head>\n<body>\n{body}\n</body></html>\n")
