"""Reports: HTML (checked in a real headless browser when one is installed), the SVG
path diagram, Markdown, CSV and LaTeX tables, notebook display, and escaping."""

from __future__ import annotations

import re
import shutil
import io
import subprocess
import tempfile
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.reporting.diagram import path_diagram
from cfa_tool.reporting.escape import latex_text, markdown_text
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.paragraph import methods_paragraph
from cfa_tool.reporting.text_formats import report_markdown, report_table_files
from tests.conftest import simulate_cfa
from tests.commands.test_cli import DATA, MODEL, run

# these tests read words with a temporary path among them in the terminal report
pytestmark = pytest.mark.usefixtures("wide_terminal")


def figure_svgs(page: str) -> list[str]:
    """The SVG text of every picture of an HTML report (images with a base64 data address)."""
    import base64

    return [base64.b64decode(data).decode("utf-8")
            for data in re.findall(r'src="data:image/svg\+xml;base64,([^"]+)"', page)]


def _latex(report) -> str:
    """Every LaTeX table of a report, in order."""
    return "\n".join(text for name, text in report_table_files(report).items() if name.endswith(".tex"))


HOSTILE = "<script>alert(1)</script>"
HOSTILE_IMG = "<img src=x onerror=alert(1)>"


@pytest.fixture(scope="module")
def demo_result():
    return cfa_tool.fit(MODEL, DATA)


@pytest.fixture(scope="module")
def hostile_result():
    """A fit whose column names and title are markup."""
    loadings = np.zeros((6, 2))
    loadings[:3, 0] = [1.0, 0.8, 0.9]
    loadings[3:, 1] = [1.0, 1.1, 0.7]
    names = [HOSTILE, "b & c", "d", HOSTILE_IMG, "e_1", "f|g"]
    data = simulate_cfa(loadings, np.array([[1.0, 0.4], [0.4, 0.8]]), np.diag([0.5] * 6), 300, 4, names)
    model = f'name "{HOSTILE}"\nfactor "{HOSTILE_IMG} factor": "{HOSTILE}", "b & c", d\nfactor g: "{HOSTILE_IMG}", e_1, "f|g"\n'
    return cfa_tool.fit(model, data)


def _count(pattern: str, text: str) -> int:
    return len(re.findall(pattern, text))


def test_html_report_has_every_section_and_no_external_assets(demo_result):
    page = report_html(fit_report(demo_result))
    f = demo_result.fit
    for words in ("Summary for a paper", "Path diagram", "Model fit", "Factor ", "Factor variances and correlations", "Residual correlations",
                  "Largest modification indices", "Items: descriptive statistics (analysed rows)", "Correlations of the items", "not laws", "licensed professional",
                  f"\u03c7\u00b2({f.df}) = {f.chi_square:.2f}"):
        assert words in page, words
    assert "<script" not in page
    assert not re.search(r'(src|href)\s*=\s*["\']?(https?:)?//', page)
    assert "@import" not in page and "url(http" not in page


def test_diagram_has_one_ellipse_per_factor_and_one_rectangle_per_indicator(demo_result):
    svg = path_diagram(demo_result)
    assert _count(r"<ellipse\b", svg) == len(demo_result.latent) == 3
    assert _count(r"<rect\b", svg) == len(demo_result.observed) == 12
    assert _count(r'class="loading"', svg) == 12
    # its twelve items, too wide for one row, stand in one column (drawn sideways): its factor correlations are
    # drawn as arcs on the left of the factors, none listed (from the top, in two bands, they had been listed)
    assert _count(r'class="listed-correlation"', svg) == 0 and _count(r'class="covariance"', svg) == 3


def test_diagram_of_a_large_higher_order_model_is_legible():
    # 40 indicators, 8 factors, 2 higher-order factors: nothing may overlap
    loadings = np.zeros((40, 8))
    for i in range(40):
        loadings[i, i // 5] = 0.7
    data = simulate_cfa(loadings, 0.5 * np.eye(8) + 0.5, np.diag(np.full(40, 0.5)), 1500, 3,
                        [f"questionnaire_item_{i:02d}" for i in range(40)])
    lines = [f"factor trait{j}: " + ", ".join(f"questionnaire_item_{i:02d}" for i in range(5 * j, 5 * j + 5)) for j in range(8)]
    lines += ["factor upper_a: trait0, trait1, trait2, trait3", "factor upper_b: trait4, trait5, trait6, trait7"]
    result = cfa_tool.fit("\n".join(lines) + "\n", data)
    svg = path_diagram(result)
    assert _count(r"<ellipse\b", svg) == 10 and _count(r"<rect\b", svg) == 40
    boxes = [(float(y), float(x), float(w)) for x, y, w in
             re.findall(r'<rect class="indicator" x="([\d.]+)" y="([\d.]+)" width="([\d.]+)"', svg)]
    boxes.sort()  # row by row (the model is drawn in bands), left to right
    assert all(a[1] + a[2] < b[1] for a, b in zip(boxes, boxes[1:]) if a[0] == b[0])
    ellipses = [(float(cx), float(cy), float(rx)) for cx, cy, rx in
                re.findall(r'<ellipse class="factor" cx="([\d.]+)" cy="([\d.]+)" rx="([\d.]+)"', svg)]
    for (x1, y1, r1) in ellipses:
        for (x2, y2, r2) in ellipses:
            if (x1, y1) < (x2, y2) and y1 == y2:
                assert abs(x2 - x1) >= r1 + r2
    width = float(re.search(r'viewBox="0 0 ([\d.]+)', svg).group(1))
    assert all(cx + rx <= width for cx, _, rx in ellipses)


def test_user_strings_are_escaped_in_every_format(hostile_result):
    page = report_html(fit_report(hostile_result))
    svg = path_diagram(hostile_result)
    for text in (page, svg):
        assert HOSTILE not in text and HOSTILE_IMG not in text
        assert "&lt;script&gt;alert(1)&lt;/script&gt;" in text
    md = report_markdown(fit_report(hostile_result))
    assert HOSTILE not in md and "<img" not in md
    tex = _latex(fit_report(hostile_result))
    assert r"e\_1" in tex and r"b \& c" in tex
    assert markdown_text("a|b*c") == r"a\|b\*c"
    assert latex_text("50% of $x_1") == r"50\% of \$x\_1"


def test_methods_paragraph_reports_the_numbers(demo_result):
    text = methods_paragraph(demo_result)
    f = demo_result.fit
    assert f"\u03c7\u00b2({f.df}) = {f.chi_square:.2f}" in text
    assert "N = 480" in text and "maximum likelihood" in text and "90% CI [" in text and "SRMR" in text


def test_notebook_display(demo_result):
    fragment = demo_result._repr_html_()
    # the fit's one report (a notebook shows what every view shows), without a page around it
    assert fragment.startswith(f"<h1>{demo_result.model_name}</h1>") and "480 rows analysed" in fragment
    assert "Error variance" in fragment and "<html" not in fragment


def test_cli_writes_every_report(tmp_path):
    proc = run("fit", str(MODEL), "--data", str(DATA), "--html", str(tmp_path / "r.html"), "--markdown", str(tmp_path / "r.md"),
               "--diagram", str(tmp_path / "d.svg"), "--tables", str(tmp_path / "tables"))
    assert proc.returncode == 0, proc.stderr
    assert (tmp_path / "r.html").read_text().startswith("<!DOCTYPE html>")
    assert (tmp_path / "d.svg").read_text().startswith("<svg")
    assert "Model fit" in (tmp_path / "r.md").read_text()
    loadings = (tmp_path / "tables" / "factor_1.csv").read_text().splitlines()
    assert loadings[0].startswith("Item,Standardized loading,Loading,SE,z,p")
    assert "\\toprule" in (tmp_path / "tables" / "factor_1.tex").read_text()
    assert (tmp_path / "tables" / "factors.csv").read_text().startswith("Factor,With,Estimate")
    assert not list(tmp_path.glob(".*.tmp"))


@pytest.mark.skipif(shutil.which("rsvg-convert") is None, reason="rsvg-convert (librsvg2-bin) is not installed")
def test_cli_png_diagram(tmp_path):
    proc = run("demo", "--diagram", str(tmp_path / "d.png"))
    assert proc.returncode == 0, proc.stderr
    assert (tmp_path / "d.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
CHROMIUM_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                  "--disable-background-networking", "--disable-component-update", "--disable-sync"]


def _chromium(*args: str) -> subprocess.CompletedProcess:
    with tempfile.TemporaryDirectory() as profile:
        return subprocess.run([CHROMIUM, *CHROMIUM_FLAGS, f"--user-data-dir={profile}", *args],
                              capture_output=True, text=True, timeout=120)


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_report_in_a_real_browser(tmp_path, hostile_result):
    page = tmp_path / "report.html"
    page.write_text(report_html(fit_report(hostile_result)), encoding="utf-8")
    url = page.resolve().as_uri()
    shot = tmp_path / "report.png"
    done = _chromium("--window-size=1200,1600", f"--screenshot={shot}", "--enable-logging=stderr", "--v=0", url)
    assert shot.exists() and shot.stat().st_size > 10_000, done.stderr[-2000:]
    console = [line for line in done.stderr.splitlines() if "CONSOLE" in line]
    assert not console, console
    dom = _chromium("--dump-dom", url).stdout
    assert "<script>alert(1)</script>" not in dom and "<img src=\"x\"" not in dom
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in dom and "&lt;img src=x onerror=alert(1)&gt;" in dom
    pictures = figure_svgs(dom)  # the diagram is an image of its SVG: nothing in it can run
    assert len(pictures) == 1 and _count(r"<ellipse\b", pictures[0]) == 2 and _count(r"<rect\b", pictures[0]) == 6


def test_methods_paragraph_names_the_estimator_that_was_used():
    ordinal = methods_paragraph(cfa_tool.fit(MODEL, DATA, ordinal="all"))
    assert "polychoric" in ordinal and "maximum likelihood" not in ordinal and "scale-shifted" in ordinal
    fiml = methods_paragraph(cfa_tool.fit(MODEL, DATA, missing="full-information", test="yuan-bentler"))
    assert "full-information maximum likelihood" in fiml and "Yuan-Bentler" in fiml and "excluded listwise" not in fiml


HS_BASE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


@pytest.mark.parametrize("extra, words", [
    ("covary x7, x8\ncovary x8, x9\n", ["two residual covariances (x7 with x8 and x8 with x9)"]),
    ("", ["three correlated factors (visual, textual, and speed)",
          "fixing the loading of one indicator to 1 (x1 for visual, x4 for textual, and x7 for speed)"]),
    ("uncorrelated visual, speed\n", ["three correlated factors", "The covariance of visual and speed was fixed at zero."]),
    ("x9, x1", ["a cross-loading of x1 (on visual and speed)"]),
    ("equal loading(visual, x2), loading(visual, x3)\n",
     ["The loading of x2 on visual and the loading of x3 on visual were constrained to be equal."]),
    ("fix variance(x5) = 0.4\n", ["The residual variance of x5 was fixed at 0.4."]),
    ("bound variance(x9) >= 0\n", ["The residual variance of x9 was kept at or above 0."]),
    ("scale latent by variance\n", ["The scale of each factor was set by fixing its variance to 1."]),
    ("scale latent by effects\n", ["set by effects coding", "Little, Slegers & Card, 2006"]),
    # starts-s10: it said "The variance of factor textual was fixed at 0", as if textual had no variance at all
    ("factor g: visual, textual, speed\nfix variance(textual) = 0\nfix loading(textual, x4) = 1\n",
     ["The disturbance variance of factor textual was fixed at 0 and the loading of x4 on textual was fixed at 1."]),
    ("factor g: visual, textual, speed\nscale latent by variance\n",
     ["with a higher-order factor (g) explaining visual, textual, and speed,",
      "The scales of visual, textual, and speed were set by fixing their disturbance variances to 1"]),
])
def test_methods_paragraph_describes_each_model_feature(hs_data, extra, words):
    model = HS_BASE.replace("x7, x8, x9", extra) if extra == "x9, x1" else HS_BASE + extra
    model = model.replace("x9, x1", "x7, x8, x9, x1")
    text = methods_paragraph(cfa_tool.fit(model, hs_data))
    for w in words:
        assert w in text, (w, text)
    assert "\u03c7\u00b2(" in text and "CFI = ." in text and "0." not in text.split("CFI")[1][:8]


def test_methods_paragraph_states_missing_data_handling_and_groups(hs_data):
    holes = hs_data.copy().reset_index(drop=True)
    holes.loc[:29, "x1"] = np.nan  # rows 0 to 29
    full = methods_paragraph(cfa_tool.fit(HS_BASE, holes))
    assert "full-information maximum likelihood" in full and "including rows with missing answers" in full
    listwise = methods_paragraph(cfa_tool.fit(HS_BASE, holes, missing="listwise"))
    # new-user trial s16: the rows kept and what listwise deletion assumes (Little & Rubin 2002)
    assert ("the 271 complete rows were analysed and 30 of 301 rows with missing answers excluded listwise, which "
            "assumes that answers are missing completely at random, Little & Rubin, 2002" in " ".join(listwise.split()))
    assert "N = 271" in listwise
    grouped = methods_paragraph(cfa_tool.fit(HS_BASE + "invariance metric\n", hs_data, group="school"))
    # the group sizes of Holzinger & Swineford (1939): 156 pupils of the Pasteur school, 145 of Grant-White
    assert 'in two groups defined by school (Grant-White, n = 145; Pasteur, n = 156)' in " ".join(grouped.split())
    assert "Loadings were held equal across groups." in grouped


def test_csv_tables_hold_numbers(demo_result, tmp_path):
    from cfa_tool.reporting import tables as T
    from cfa_tool.reporting.text_formats import csv_table

    loading = pd.read_csv(pd.io.common.StringIO(csv_table(T.estimate_tables(demo_result)[0])))
    for column in ("Standardized loading", "Loading", "SE", "z", "p", "95% CI lower", "95% CI upper", "R²",
                   "Error variance"):
        assert pd.api.types.is_float_dtype(loading[column]), column
    free = [r for r in demo_result.estimates if r.kind == "loading" and r.free
            and r.variables[0] == demo_result.latent[0]]
    row = loading[loading["Item"] == free[0].variables[1]].iloc[0]
    assert row["p"] == free[0].p_value and row["95% CI upper"] == free[0].ci95[1]  # full precision, not '< .001'
    fit = pd.read_csv(pd.io.common.StringIO(csv_table(T.fit_table(demo_result))))
    chi = fit[fit["Index"] == "Chi-square"].iloc[0]
    assert chi["Value"] == demo_result.fit.chi_square and chi["df"] == demo_result.fit.df


def test_latex_tables_are_plain_ascii_with_macros(demo_result):
    tex = _latex(fit_report(demo_result))
    assert all(ord(ch) < 128 for ch in tex), sorted({ch for ch in tex if ord(ch) >= 128})
    assert r"R\textsuperscript{2}" in tex
    assert latex_text("\u03c7\u00b2 \u2265 .95") == r"$\chi$\textsuperscript{2} $\geq$ .95"


@pytest.mark.parametrize("model", ["demo", "heywood", "groups"])
def test_terminal_report_fits_80_columns(model, demo_result, hs_data):
    from cfa_tool.reporting.fit_document import fit_report
    from cfa_tool.reporting.terminal import report_text

    three = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    result = {"demo": lambda: demo_result,
              "heywood": lambda: cfa_tool.fit(three + "covary x7, x8\ncovary x8, x9\n", hs_data),
              "groups": lambda: cfa_tool.fit(three, hs_data, group="school")}[model]()
    text = report_text(fit_report(result), width=80)
    assert max(len(line) for line in text.splitlines()) <= 80


def test_workflow_commands_fit_80_columns(tmp_path, hs_data, monkeypatch):
    monkeypatch.setenv("COLUMNS", "80")  # the width of a terminal the output is not connected to
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data, index=False)
    three = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    (tmp_path / "a.cfa").write_text(three)
    (tmp_path / "b.cfa").write_text(three + "covary x7, x8\n")
    for args in (["compare", str(tmp_path / "a.cfa"), str(tmp_path / "b.cfa"), "--data", str(data)],
                 ["invariance", str(tmp_path / "a.cfa"), "--data", str(data), "--group-column", "school"]):
        proc = run(*args)
        assert proc.returncode == 0, proc.stderr
        assert max(len(line) for line in proc.stdout.splitlines()) <= 80, args[0]


def test_every_csv_table_of_a_fit_holds_full_precision_numbers(demo_result):
    # no table's data file may hold a number rounded for reading: each numeric cell parses as a float and
    # reliability, distinctness and modification tables carry the values themselves
    from cfa_tool.reporting import tables as T
    from cfa_tool.reporting.text_formats import csv_table

    omega = demo_result.groups[0].reliability[0].omega
    frame = pd.read_csv(pd.io.common.StringIO(csv_table(T.reliability_table(demo_result))))
    assert frame["Omega"].iloc[0] == omega
    mi = demo_result.reported_modification_indices()[0]
    frame = pd.read_csv(pd.io.common.StringIO(csv_table(T.modification_table(demo_result))))
    assert frame["Index"].iloc[0] == mi.index
    distinct = T.distinct_table(demo_result)
    if distinct is not None:
        frame = pd.read_csv(pd.io.common.StringIO(csv_table(distinct)))
        assert pd.api.types.is_float_dtype(frame["AVE (first)"])


def test_a_narrow_tables_title_and_note_wrap_at_the_terminal_width_not_the_tables():
    # found in use: a two-column table's note came out as a column of a few words per line
    from cfa_tool.reporting.tables import ReportTable
    from cfa_tool.reporting.terminal import SafeConsole, rich_table

    note = "A note long enough to need two lines at eighty columns, " * 2 + "which a narrow table must not squeeze."
    table = ReportTable("narrow", "A title longer than the two narrow columns of its table below it", ("A", "B"),
                        ("l", "r"), (("1", "2"),), note=note)
    console = SafeConsole(width=80, record=True, no_color=True, file=io.StringIO())
    console.print(rich_table(table))
    lines = console.export_text().splitlines()
    assert "A title longer than the two narrow columns of its table below it" in lines
    note_lines = [line for line in lines if line.startswith(("A note", "lines", "which"))]
    assert len(note_lines) <= 3 and max(len(line) for line in lines) <= 80


def test_a_table_wider_than_the_terminal_is_shown_in_parts_and_no_number_is_broken():
    # found in use: at 80 columns a 12-item residual matrix printed '-.02' as '-.0' above '2'
    from cfa_tool.reporting.tables import ReportTable
    from cfa_tool.reporting.terminal import SafeConsole, rich_table

    labels = [f"{k} accurate_info_{k}" for k in range(1, 13)]
    rows = tuple((label, *(f"{-0.01 * ((k + j) % 9):.2f}".replace("0.", ".") for j in range(12)))
                 for k, label in enumerate(labels))
    table = ReportTable("residuals", "Residual correlations", ("", *map(str, range(1, 13))), ("l",) + ("r",) * 12, rows)
    console = SafeConsole(width=80, record=True, no_color=True, file=io.StringIO())
    console.print(rich_table(table))
    text = console.export_text()
    assert max(len(line) for line in text.splitlines()) <= 80
    assert "Residual correlations, continued" in text
    for row in rows:  # every value appears whole on its row, in one part or another
        line_cells = [line.split() for line in text.splitlines() if line.split()[:2] == row[0].split()]
        shown = [cell for cells in line_cells for cell in cells[2:]]
        assert shown == list(row[1:]), (row[0], shown)


HIGHER_ORDER = """
factor visual: x1, x2, x3
factor textual: x4, x5, x6
factor speed: x7, x8, x9
factor ability: visual, textual, speed
"""


def test_higher_order_tables_show_the_implied_factor_correlations(hs_data):
    # In a second-order model the first-order factors correlate only through the higher-order factor, so
    # their implied correlation is the product of their standardized second-order loadings (Rindskopf & Rose
    # 1988). The factor matrix and the distinctness table must show those, not the zero covariance
    # parameters of the disturbances; the disturbance variances sit in the higher-order factor's table.
    from cfa_tool.reporting import tables as T

    result = cfa_tool.fit(HIGHER_ORDER, hs_data)
    std = {r.variables[1]: r.standardized for r in result.estimates
           if r.kind == "loading" and r.variables[0] == "ability"}
    expected = {("visual", "textual"): std["visual"] * std["textual"], ("visual", "speed"): std["visual"] * std["speed"],
                ("textual", "speed"): std["textual"] * std["speed"]}
    for (a, b), r in expected.items():
        assert T.implied_factor_correlation(result, 0, a, b) == pytest.approx(r, abs=1e-8)
    distinct = T.distinct_table(result, 0)
    shown = {(row[0], row[1]): float(row[2]) for row in distinct.rows}
    for pair, r in expected.items():
        assert shown[pair] == pytest.approx(r, abs=0.006)
    matrix = next(t for t in T.estimate_tables(result, 0) if t.key == "factors")
    assert float(matrix.rows[1][1]) == pytest.approx(expected[("visual", "textual")], abs=0.006)
    assert "Implied by the model" in matrix.note
    ability = next(t for t in T.estimate_tables(result, 0) if t.title.startswith("Factor ability"))
    disturbance = {r.variables[0]: r.estimate for r in result.estimates if r.kind == "factor_variance"}
    column = ability.columns.index("Disturbance")
    for row in ability.rows:
        assert float(row[column]) == pytest.approx(disturbance[row[0]], abs=6e-4)


def test_paragraph_names_second_order_loadings_and_a_single_correlation(hs_data):
    from cfa_tool.reporting.paragraph import methods_paragraph

    text = methods_paragraph(cfa_tool.fit(HIGHER_ORDER, hs_data))
    assert "Standardized loadings of the items ranged from" in text
    assert "loadings of the factors on the higher-order factor ranged from" in text
    two = cfa_tool.fit("factor visual: x1, x2, x3\nfactor speed: x7, x8, x9\n", hs_data)
    (r,) = [e.standardized for e in two.estimates if e.kind == "factor_covariance"]
    assert f"The factor correlation was {f'{r:.2f}'.replace('0.', '.', 1)}." in methods_paragraph(two)


def test_methods_paragraph_of_two_higher_order_factors():
    # two higher-order factors over two first-order factors each (new-user trial 6, U7): one clause for both,
    # without the doubled comma, and their correlation named as theirs (invented population values)
    from tests.conftest import FOUR_FACTORS, four_factor_rows

    rows = four_factor_rows(0.6, 7)
    model = FOUR_FACTORS + "factor e: a, b\nfactor f: c, d\n"
    result = cfa_tool.fit(model, rows)
    text = methods_paragraph(result)
    # and a note that each is identified only through the other (Kenny 1979 on two-indicator factors)
    said = " ".join(result.summary().split())
    assert ("Higher-order factors over two factors (e explains a and b; f explains c and d): each is identified only "
            "through its covariance with another higher-order factor") in said
    # with the notes on the estimation at the top, before the methods paragraph (re-check: it came last)
    assert said.index("Higher-order factors over two factors") < said.index("A confirmatory factor analysis")
    assert ("with higher-order factors e (explaining a and b) and f (explaining c and d), was estimated" in text), text
    assert ",," not in text
    assert "The standardized loadings of the first-order factors on the higher-order factors ranged from" in text
    assert "The correlation of the higher-order factors (e and f) was ." in text


def test_modification_indices_none_at_the_threshold_are_said_not_left_out(hs_data):
    """New-user trial 7, U11: with no index at the threshold the whole section vanished from every view.  Now a
    one-row table says none reaches it and names the largest (the maximum over every computed index)."""
    import cfa_tool
    from cfa_tool.reporting import tables as T

    text = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    result = cfa_tool.fit(text, hs_data, mi_threshold=1000)
    assert not len(result.reported_modification_indices())
    table = T.modification_table(result)
    largest = max(result.modification_indices, key=lambda m: m.index)
    assert table is not None and "none" in table.title
    assert table.rows[0][0].startswith("none reaches 1000; the largest: ")
    assert table.values[0][3] == largest.index and "at least 1000" in table.note
    lean = cfa_tool.fit(text, hs_data, modification_indices=False)
    assert T.modification_table(lean) is None  # not computed: nothing to say


def test_a_tables_folder_lists_its_tables_and_names_an_earlier_runs_left_behind(tmp_path):
    # hostile trial s11: a three-factor fit's tables, then a one-factor fit into the same folder: factor_2.csv,
    # factor_3.csv and distinct_0.csv of the other model stayed, untitled, and nothing was said
    folder = tmp_path / "tables"
    first = run("fit", str(MODEL), "--data", str(DATA), "--tables", str(folder))
    assert first.returncode == 0, first.stderr
    assert "Caution" not in first.stdout
    three = (folder / "contents.txt").read_text().splitlines()
    assert any(line.startswith("factor_3.csv, factor_3.tex: Factor ") for line in three)
    one = tmp_path / "one.cfa"
    one.write_text("factor f: on_time, short_wait, accurate_info, easy_transfer, seat_available, clean, temperature, "
                   "room_to_stand, greeting, helpful, respectful, clear_answers\n")
    second = run("fit", str(one), "--data", str(DATA), "--tables", str(folder))
    assert second.returncode == 0, second.stderr
    said = " ".join(second.stdout.split())
    assert "also holds" in said and "factor_2.csv, factor_2.tex, factor_3.csv, factor_3.tex" in said
    contents = (folder / "contents.txt").read_text()
    # the report's title, a model without a name titled by its file: the terminal's path, the tables' file name (the
    # tables go to manuscripts and colleagues, re-check s17, 07)
    assert "factor_3" not in contents and contents.splitlines()[0] == one.name
    assert first_title_of(second.stdout) == str(one)
    assert (folder / "factor_3.csv").exists()  # left in place: this run did not write it


def first_title_of(terminal: str) -> str:
    """The report's title as the terminal shows it (its first line that is not part of a problem box)."""
    return next(line.strip() for line in terminal.splitlines() if line.strip() and line.strip()[0] not in "┏┃┗╭│╰")


def test_an_earlier_fits_json_and_html_in_a_tables_folder_are_not_called_tables(tmp_path):
    # hostile tester s15 (08): a project folder holding an earlier fit's JSON and HTML (the files 'scores --from-fit'
    # and 'report' read) got "they belong to another report: delete them"; 'report r.json --tables .' said so of its
    # own input.  Only tables (CSV, LaTeX) an earlier run left there are named.
    first = run("fit", str(MODEL), "--data", str(DATA), "--json", str(tmp_path / "first.json"), "--html",
                str(tmp_path / "first.html"))
    assert first.returncode == 0, first.stderr
    second = run("fit", str(MODEL), "--data", str(DATA), "--keep", "district = north", "--tables", str(tmp_path))
    assert second.returncode == 0, second.stderr
    assert "also holds" not in second.stdout and "delete" not in second.stdout
    again = run("report", str(tmp_path / "first.json"), "--tables", str(tmp_path))
    assert again.returncode == 0, again.stderr
    assert "also holds" not in again.stdout and "delete" not in again.stdout
