"""Reports of items named by their full question texts (40 to 90 characters, as a survey platform exports them):
every item drawn in the path diagram with a short label and a key that names it, terminal tables whose name
column wraps instead of cutting the numbers into parts, matrices numbered with every number's item named, and
table files in full precision.  The questions are invented (a fictional transit agency's rider survey)."""

from __future__ import annotations

import base64
import csv
import io
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.diagram import LONG_NAME, diagram_file, path_diagram
from cfa_tool.reporting.fit_document import fit_report
from cfa_tool.reporting.html_report import report_html
from cfa_tool.reporting.terminal import report_text
from cfa_tool.reporting.text_formats import csv_table, latex_table, report_markdown

from tests.conftest import THREE_FACTORS, simulate_cfa
from tests.reporting.test_diagram_layouts import CHROMIUM, SVG, check_in_a_browser, overlaps

QUESTIONS = [
    "The bus usually arrives at my stop at the time the timetable promises.",
    "When a connection is missed, the next one comes soon enough for me.",
    "I can rely on the evening service to run as often as it says it will.",
    "Delays are announced early enough for me to change my plans.",
    "The last trip of the night has never left me stranded at the stop.",
    "Drivers answer my questions about routes politely and patiently.",
    "Staff at the ticket office take the time to explain fares to me.",
    "When I complained, somebody from the agency got back to me in time.",
    "I feel treated as a passenger who matters, not as a number.",
    "The staff on board help riders who need assistance with the steps.",
    "The seats on the buses I ride are clean and in good repair.",
    "On a hot day the inside of the vehicle stays at a comfortable temperature.",
    "The shelters at my stops keep me dry while I wait in the rain.",
    "Screens and announcements on board tell me clearly where we are.",
    "I find it easy to get a seat or a safe place to stand on my usual trips.",
]
FACTORS = ("punctuality", "courtesy", "comfort")


def _quoted(names) -> str:
    return ", ".join(f'"{name}"' for name in names)


def _data(seed: int, general: float = 0.0):
    """Rows of 15 items, five to each of three factors (loadings .7, factor correlations .5), or, with a
    ``general`` loading, of a bifactor model: every item on a general factor as well, the four factors
    uncorrelated (specific loadings .5)."""
    loadings = np.zeros((15, 4))
    for i in range(15):
        loadings[i, 1 + i // 5] = 0.5 if general else 0.7
    loadings[:, 0] = general
    phi = np.eye(4) if general else np.block([[np.eye(1), np.zeros((1, 3))], [np.zeros((3, 1)), 0.5 * np.eye(3) + 0.5]])
    implied = loadings @ phi @ loadings.T
    return simulate_cfa(loadings, phi, np.diag(1 - np.diag(implied)), 600, seed, QUESTIONS, method="cholesky")


THREE = "".join(f"factor {f}: {_quoted(QUESTIONS[5 * k:5 * k + 5])}\n" for k, f in enumerate(FACTORS))


@pytest.fixture(scope="module")
def long_fit():
    return cfa_tool.fit(THREE, _data(21))


@pytest.fixture(scope="module")
def long_shapes():
    data = _data(22)
    groups = data.assign(depot=np.where(np.arange(len(data)) % 2 == 0, "north", "south"))
    general = _data(23, general=0.6)
    return {
        "higher-order": cfa_tool.fit(THREE + f"factor service: {', '.join(FACTORS)}\n", data),
        "bifactor": cfa_tool.fit(f"factor general: {_quoted(QUESTIONS)}\n" + THREE + "scale latent by variance\n"
                                 "uncorrelated general, " + ", ".join(FACTORS) + "\n", general),
        "method factor": cfa_tool.fit(THREE + f"factor wording: {_quoted(QUESTIONS[1::4])}\nmethod wording\n"
                                      "uncorrelated wording, " + ", ".join(FACTORS) + "\nscale latent by variance\n", data),
        "groups": cfa_tool.fit(THREE, groups, group="depot"),
    }


def _box_texts(svg: str) -> list[str]:
    root = ET.fromstring(svg)
    return ["".join(t.itertext()) for t in root.iter(SVG + "text") if t.get("class") == "name"]


def _key(svg: str) -> list[tuple[str, str]]:
    labels = re.findall(r'class="key-label"[^>]*>([^<]*)<', svg)
    names = [t.replace("&#x27;", "'").replace("&#39;", "'") for t in re.findall(r'class="key"[^>]*>([^<]*)<', svg)]
    return list(zip(labels, names))


def test_the_questions_are_long_and_the_test_names_short():
    # the rule the tests below rely on: these names are long, those of the other diagram tests short
    assert all(len(q) > LONG_NAME for q in QUESTIONS) and len(set(QUESTIONS)) == 15
    assert all(len(x) <= LONG_NAME for x in ("x1", "rating_01", "item01", "v40", "part_1"))


def test_every_item_is_drawn_with_a_short_label_and_named_in_the_key(long_fit):
    for svg in (path_diagram(long_fit), diagram_file(long_fit)):
        root = ET.fromstring(svg)
        assert len(root.findall(f".//{SVG}rect[@class='indicator']")) == 15
        assert sorted(_box_texts(svg)) == sorted(list(FACTORS) + [f"I{k}" for k in range(1, 16)])
        assert 'class="continued"' not in svg and 'class="listed-loading"' not in svg  # all 15 loadings are arrows
        assert len(root.findall(f".//{SVG}line[@class='loading']")) == 15
        assert _key(svg) == [(f"I{k + 1}", q) for k, q in enumerate(QUESTIONS)]
        assert overlaps(svg) == []


@pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed (.ci/run installs it)")
def test_in_a_browser_the_key_overlaps_nothing(long_fit, long_shapes, tmp_path):
    check_in_a_browser([diagram_file(long_fit), diagram_file(long_shapes["bifactor"])], tmp_path)


def test_a_model_with_short_names_is_drawn_with_its_names_and_no_key(hs_data):
    svg = path_diagram(cfa_tool.fit(THREE_FACTORS, hs_data))
    assert sorted(_box_texts(svg)) == sorted(["visual", "textual", "speed"] + [f"x{k}" for k in range(1, 10)])
    assert 'class="key' not in svg


@pytest.mark.parametrize("shape", ["higher-order", "bifactor", "method factor", "groups"])
def test_every_diagram_kind_draws_short_labels_with_the_key(long_shapes, shape):
    result = long_shapes[shape]
    groups = len(result.groups)
    for svg, drawings in [(path_diagram(result, g), 1) for g in range(groups)] + [(diagram_file(result), groups)]:
        root = ET.fromstring(svg)
        assert len(root.findall(f".//{SVG}rect[@class='indicator']")) == drawings * 15
        boxes = [t for t in _box_texts(svg) if t not in result.latent]
        assert sorted(boxes) == sorted([f"I{k}" for k in range(1, 16)] * drawings)
        assert _key(svg) == [(f"I{k + 1}", q) for k, q in enumerate(QUESTIONS)]  # once, under every group's drawing
        assert overlaps(svg) == []


def test_the_key_is_in_every_view_of_the_diagram(long_fit):
    report = fit_report(long_fit)
    for text in (report_html(report), report_markdown(report)):  # the picture's SVG, as an image's data address
        picture = base64.b64decode(re.search(r"data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)", text).group(1)).decode()
        assert _key(picture) == [(f"I{k + 1}", q) for k, q in enumerate(QUESTIONS)]


def test_terminal_tables_at_80_columns_wrap_the_names_and_keep_the_numbers_together(long_fit):
    text = report_text(fit_report(long_fit), width=80)
    lines = text.split("\n")
    assert max(len(line.rstrip()) for line in lines) <= 80
    # a factor's loading table: the standardized and raw loadings, SE, interval and p beside the wrapped names
    # (before: one column to a part, seven parts per factor)
    heads = [line.split() for line in lines if line.split()[:2] == ["Item", "Std."]]
    assert len(heads) == 3 and all(h == ["Item", "Std.", "Loading", "SE", "95%", "CI", "p"] for h in heads)
    assert sum("continued" in line for line in lines) <= 8
    # the residual and correlation matrices: numbered rows, every number's item named in the key under them
    for title in ("Residual correlations (sample minus model)", "Correlations of the items (N = 600)"):
        part = text[text.index(title):]
        key = [re.match(r"\s*(\d+) (.*\S)", line).groups() for line in part.split("\n")
               if re.match(r"\s*\d+ [A-Z]", line)][:15]
        assert key == [(str(k + 1), q) for k, q in enumerate(QUESTIONS)]
    assert len(lines) < 700  # 1,307 lines for a fit of this size before


def test_a_short_named_matrix_in_the_terminal_keeps_its_names(hs_data):
    text = report_text(fit_report(cfa_tool.fit(THREE_FACTORS, hs_data)), width=80)
    part = text[text.index("Residual correlations"):]
    assert re.search(r"^ 1 x1\s*$", part, re.M) and re.search(r"^ 9 x9 ", part, re.M)


def test_matrix_files_name_every_item_and_hold_full_precision(long_fit):
    """The correlations in the CSV file are the sample correlations in full precision: numpy's corrcoef of the
    data (complete rows, maximum likelihood: the sample covariance's correlations, whatever its divisor)."""
    data = _data(21)
    expected = np.corrcoef(data.to_numpy(), rowvar=False)
    table = T.correlation_table(long_fit, 0)
    assert [row[0] for row in table.rows] == [f"{k + 1} {q}" for k, q in enumerate(QUESTIONS)]  # item 1 has its row
    rows = list(csv.reader(io.StringIO(csv_table(table))))
    assert rows[0] == ["Item"] + [str(k) for k in range(1, 15)]
    assert rows[1] == ["1 " + QUESTIONS[0]] + [""] * 14
    got = np.array([[float(v) for v in row[1:i + 1]] + [0.0] * (15 - i) for i, row in enumerate(rows[1:])])
    lower = np.tril(expected, -1)[:, :14]
    assert np.allclose(got[:, :14], lower, atol=1e-12, rtol=0)
    residual_rows = list(csv.reader(io.StringIO(csv_table(T.residual_table(long_fit, 0)))))
    r = long_fit.groups[0].residual_correlations
    assert float(residual_rows[3][1]) == pytest.approx(r[2, 0], abs=1e-15) and len(residual_rows[3][1]) > 6


def test_sum_score_file_holds_full_precision(long_fit):
    """Keyed sums of the complete rows (no item reversed): mean and SD (divisor N - 1) as pandas computes them."""
    data = _data(21)
    rows = list(csv.DictReader(io.StringIO(csv_table(T.sum_score_table(long_fit, 0)))))
    for k, row in enumerate(rows):
        sums = data[QUESTIONS[5 * k:5 * k + 5]].sum(axis=1)
        assert row["Factor"] == FACTORS[k] and row["Items"] == "5"
        assert float(row["Mean"]) == pytest.approx(sums.mean(), abs=1e-10)
        assert float(row["SD"]) == pytest.approx(sums.std(ddof=1), abs=1e-10)
        assert len(row["SD"]) > 6  # not the two decimals of the report


def test_latex_wraps_long_text_in_a_column_of_fixed_width(long_fit, hs_data):
    long = latex_table(T.estimate_tables(long_fit, 0)[0])
    assert re.search(r"\\begin\{tabular\}\{p\{0\.\d+\\linewidth\}r+\}", long)
    matrix = latex_table(T.correlation_table(long_fit, 0))
    assert re.search(r"\\begin\{tabular\}\{p\{0\.25\\linewidth\}r{14}\}", matrix)  # room left for 14 numbers
    short = latex_table(T.estimate_tables(cfa_tool.fit(THREE_FACTORS, hs_data), 0)[0])
    assert re.search(r"\\begin\{tabular\}\{lr+\}", short)


def test_a_matrix_saved_without_the_first_items_row_is_numbered_as_before():
    old = T.ReportTable("residuals_0", "Residual correlations", ("", "1", "2"), ("l", "r", "r"),
                        (("2 b item", ".10", ""), ("3 c item", ".20", "-.05")), matrix=True)
    assert T.matrix_row_numbers(old) == ["2", "3"]
    keyed, key = T.matrix_key(old)
    assert [row[0] for row in keyed.rows] == ["2", "3"] and key == (("2", "b item"), ("3", "c item"))
    assert T.terminal_matrix_left_out(old) is None
    wide = T.ReportTable("r", "R", ("Item",) + tuple(map(str, range(1, 30))), ("l",) + ("r",) * 29,
                         tuple((f"{k + 1} q{k + 1}",) + ("",) * 29 for k in range(30)), matrix=True)
    assert T.terminal_matrix_left_out(wide).startswith("R: 30 items")


def test_a_table_wider_than_the_terminal_wraps_its_widest_text_and_its_number_headings():
    from rich.console import Console

    from cfa_tool.reporting.terminal import rich_table

    table = T.ReportTable("t", "Counts", ("Reason", "Method", "Random values, 95th percentile", "Rows"),
                          ("l", "l", "r", "r"),
                          (("no answers on any of the model's items, nor on the group column", "joint", "0.441", "12"),
                           ("a reason", "each factor alone", "1.390", "3")))
    buffer = io.StringIO()
    Console(file=buffer, width=60, no_color=True).print(rich_table(table))
    text = buffer.getvalue()
    assert "continued" not in text and max(len(line) for line in text.split("\n")) <= 60
    # the text wrapped between words; the numbers whole, their long heading wrapped between its words
    assert "each factor alone" in text and "no answers on any of the model's items, nor on the group column" not in text
    assert re.search(r"0\.441\s+12", text) and re.search(r"1\.390\s+3", text)
    heading = [line.split() for line in text.split("\n")[2:6]]
    assert [words[0] for words in heading[:3]] == ["Random", "values,", "95th"] and heading[3][-2:] == ["percentile", "Rows"]


def test_short_labels_never_take_a_name_of_the_model():
    # re-check 8: with long names and a column literally named 'I3', the key read "I2 = I3" and "I3 = <another item>"
    from types import SimpleNamespace

    from cfa_tool.reporting.diagram import item_labels

    observed = ("The bus came on time, as the timetable said", "I3", "Information at the stop was accurate")
    labels = item_labels(SimpleNamespace(observed=observed, latent=("punctuality",)))
    assert set(labels) == set(observed) and not set(labels.values()) & set(observed)
    assert labels["I3"] == "item2"
    plain = item_labels(SimpleNamespace(observed=observed[:1] + ("x2", "x3"), latent=("f",)))
    assert list(plain.values()) == ["I1", "I2", "I3"]


def test_a_long_one_word_item_name_is_never_broken_in_a_terminal_table():
    # new-user trial s18 (14): item names of 28 to 30 characters (Stata allows 32) were folded mid-name in 80 columns,
    # 'belonging_school_engagement_0' above '1', which reads as two items; the name column now keeps its longest word
    # whole, and what does not fit beside it goes to a part of whole columns
    from rich.console import Console

    from cfa_tool.reporting.terminal import rich_table

    names = [f"belonging_{facet}_{k:02d}" for facet in ("teacher_support", "school_engagement") for k in (1, 2)]
    heads = ("Item", "1 Strongly disagree", "2 Disagree", "3 Agree", "4 Strongly agree")
    table = T.ReportTable("t", "Answers per category", heads, ("l", "r", "r", "r", "r"),
                          tuple((name, "130 (11%)", "325 (29%)", "437 (39%)", "243 (21%)") for name in names))
    buffer = io.StringIO()
    Console(file=buffer, width=80, no_color=True).print(rich_table(table))
    text = buffer.getvalue()
    assert max(len(line) for line in text.split("\n")) <= 80
    rows = [line.split()[0] for line in text.split("\n") if line.startswith(" belonging")]
    assert rows and set(rows) == set(names)  # every row starts with a whole name, in every part
    assert all(re.search(r"\d+ \(\d+%\)", line) for line in text.split("\n") if line.startswith(" belonging"))


@pytest.mark.parametrize("width", [80, 60, 40])
def test_a_name_longer_than_its_column_is_carried_over_after_an_underscore_never_cut(width):
    # re-check s18 (R12): names of 52 to 56 characters (CSV and SPSS allow them) were cut mid-name at 80 columns,
    # 'short_wait_with_a_really_very_long_descriptive_suffi' above 'x'; a name longer than its column now goes on in
    # the next line after one of its '_': every piece of a name printed is a run of its whole parts ('very_long_'),
    # in every terminal table (an estimates table, and a matrix with the key under it)
    from rich.console import Console

    from cfa_tool.reporting.terminal import rich_table

    names = [f"{x}_with_a_really_very_long_descriptive_suffix" for x in ("on_time", "short_wait", "accurate_info")]
    table = T.ReportTable("t", "Loadings", ("Item", "Std.", "Loading", "SE", "95% CI", "p"),
                          ("l", "r", "r", "r", "r", "r"),
                          tuple((name, ".65", "0.887", "0.084", "[0.72, 1.05]", "< .001") for name in names))
    matrix = T.ReportTable("m", "Residual correlations", ("Item", "1", "2"), ("l", "r", "r"),
                           (("1 " + names[0], "", ""), ("2 " + names[1], ".01", ""), ("3 " + names[2], "-.02", ".03")),
                           matrix=True)
    runs = set()
    for name in names:
        parts = re.findall(r"[^_]*_|[^_]+$", name)
        runs |= {"".join(parts[i:j]) for i in range(len(parts)) for j in range(i + 1, len(parts) + 1)}
    for report in (table, matrix):
        buffer = io.StringIO()
        Console(file=buffer, width=width, no_color=True).print(rich_table(report))
        text = buffer.getvalue()
        assert max(len(line) for line in text.split("\n")) <= width
        pieces = [w for w in re.findall(r"[a-z_]+", text) if "_" in w or w in ("suffix", "x", "su", "suffi")]
        assert pieces and all(p in runs for p in pieces), [p for p in pieces if p not in runs]
        assert sum(p.startswith(("on_time", "short_wait", "accurate_info")) for p in pieces) >= 3
