"""One report model for every command: each command's result is turned into report tables once, and the
terminal, HTML, Markdown, Word and CSV/LaTeX files hold the same table titles and cells; 'cfa-tool report'
writes the same tables later from the saved JSON, and refuses a file that is not a result in one line."""

from __future__ import annotations

import csv
import io
import json
import re
from html.parser import HTMLParser
from pathlib import Path

import docx
import pytest

from cfa_tool import cli
from cfa_tool.reporting.docx_report import typeset
from cfa_tool.reporting.document import Report, by_file_name
from cfa_tool.reporting.escape import markdown_text
from cfa_tool.reporting.numbers import printed

THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
# a second factor whose correlation with the first is above 1 (a solution that is not admissible)
HEYWOOD = THREE + "covary x7, x8\ncovary x8, x9\n"


class _Tables(HTMLParser):
    """Each <table>'s caption and the text of its body cells, as a browser shows them."""

    def __init__(self):
        super().__init__()
        self.tables: list[tuple[str, list[list[str]]]] = []
        self._where: str | None = None
        self._text = ""

    def handle_starttag(self, tag, attrs):
        if tag == "table":
            self.tables.append(("", []))
        elif tag == "tr" and self.tables:
            self.tables[-1][1].append([])
        if tag in ("caption", "td", "th"):
            self._where, self._text = tag, ""

    def handle_endtag(self, tag):
        if tag == "caption":
            self.tables[-1] = (self._text, self.tables[-1][1])
        elif tag == "td":
            self.tables[-1][1][-1].append(self._text)
        if tag in ("caption", "td", "th"):
            self._where = None

    def handle_data(self, data):
        if self._where:
            self._text += data


def _html_tables(path: Path) -> list[tuple[str, list[list[str]]]]:
    parser = _Tables()
    parser.feed(path.read_text(encoding="utf-8"))
    return [(caption, [row for row in rows if row]) for caption, rows in parser.tables]


def _docx_tables(path: Path) -> list[tuple[str, list[list[str]]]]:
    """(title, body rows) of every numbered table: the title is the italic paragraph after 'Table k'."""
    document = docx.Document(str(path))
    paragraphs = [p.text for p in document.paragraphs]
    titles = [paragraphs[k + 1] for k, text in enumerate(paragraphs) if text.startswith("Table ")
              and text[6:].isdigit()]
    bodies = [[[cell.text for cell in row.cells] for row in table.rows[1:]] for table in document.tables]
    assert len(titles) == len(bodies)
    assert [p for p in paragraphs if p.startswith("Table ") and p[6:].isdigit()] == \
        [f"Table {k + 1}" for k in range(len(titles))]  # numbered in order
    return list(zip(titles, bodies))


def _report_lines(text: str) -> list[str]:
    """The report's lines, without those naming the files written (their paths are as long as they are)."""
    return [line for line in text.splitlines() if " written to " not in line]


def _run(args: list, capsys) -> tuple[int, str, str]:
    code = cli.main([str(a) for a in args])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def files(tmp_path_factory, hs_data):
    folder = tmp_path_factory.mktemp("report_model")
    data = folder / "hs.csv"
    hs_data.to_csv(data, index=False)
    (folder / "a.cfa").write_text(THREE)
    (folder / "b.cfa").write_text(THREE + "covary x7, x8\n")
    (folder / "heywood.cfa").write_text(HEYWOOD)
    return folder


def _group_option() -> str:
    """The option of invariance that names the group column ('--group-column' since the fit options were named
    around the researcher's questions; '--group' before)."""
    import argparse

    sub = next(a for a in cli.build_parser()._actions if isinstance(a, argparse._SubParsersAction))
    known = sub.choices["invariance"]._option_string_actions
    return "--group-column" if "--group-column" in known else "--group"


def _commands(folder: Path) -> dict[str, list]:
    a, data = folder / "a.cfa", folder / "hs.csv"
    return {
        "compare": ["compare", a, folder / "b.cfa", folder / "heywood.cfa", "--data", data],
        "invariance": ["invariance", a, "--data", data, _group_option(), "school"],
        "replicate": ["replicate", a, "--data", data, "--seed", 3],
        "bootstrap": ["bootstrap", a, "--data", data, "--replications", 20, "--workers", 1],
        "cutoffs": ["cutoffs", a, "--data", data, "--replications", 20, "--workers", 1],
        "power": ["power", a, "--n", 200],
        "power-simulation": ["power-simulation", a, "--n", 150, "--replications", 20, "--workers", 1],
        "simulate": ["simulate", a, "--n", 60, "--output", folder / "simulated.csv"],
        "fit": ["fit", folder / "heywood.cfa", "--data", data],
        "scores": ["scores", a, "--data", data, "--output", folder / "scores.csv"],
        "explore": ["explore", "--data", data, "--items", "x1..x9", "--factors", 3, "--replications", 20],
        "align": ["align", a, "--data", data, "--group-column", "school", "--trials", 2],
    }


@pytest.mark.parametrize("command", ["compare", "invariance", "replicate", "bootstrap", "cutoffs", "power",
                                     "power-simulation", "simulate", "fit", "scores", "explore", "align"])
def test_every_format_holds_the_same_tables_and_report_writes_them_again(command, files, capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "80")  # the width of a terminal the output is not connected to
    out = files / command
    out.mkdir()
    args = _commands(files)[command]
    written = [out / "r.json", out / "r.html", out / "r.md", out / "r.docx", out / "tables"]
    code, text, err = _run(args + ["--json", written[0], "--html", written[1], "--markdown", written[2], "--docx",
                                   written[3], "--tables", written[4]], capsys)
    assert code == 0, err
    saved = json.loads(written[0].read_text())
    assert saved["command"] == command
    report = Report.from_dict(saved["report"])
    assert report.tables, "a report without tables"
    titles = [t.title for t in report.tables]
    # the terminal: 80 columns, the title and every table's title
    assert max(len(line) for line in _report_lines(text)) <= 80
    assert report.title.split(" (")[0] in " ".join(text.split())
    for title in titles:
        assert title in " ".join(text.split())  # a long title wraps
    # the files for others name the user's files by their names (a replication's halves are named by their data
    # file): each is drawn from the report so named; the terminal keeps the paths as given
    shown_in_terminal, report = titles, by_file_name(report)
    titles = [t.title for t in report.tables]
    # HTML: every report table with its caption and cells
    shown = {caption: rows for caption, rows in _html_tables(written[1])}
    for table in report.tables:
        # a sub-row's leading spaces are the HTML cell's indent (padding), not text a browser would collapse; signs
        # set by the printed views' rule (reporting.numbers.printed), as the Word file's
        assert shown[printed(table.title)] == [[printed(c.lstrip(" ")) for c in r] for r in table.rows], table.title
    # Markdown: every title
    markdown = written[2].read_text()
    for title in titles:
        assert f"**{markdown_text(title)}**" in markdown
    # Word: numbered tables with the same titles and cells, problems first
    word = _docx_tables(written[3])
    assert [t for t, _ in word] == titles
    # the same cells, set for print (true minus signs, no line break inside a number or an interval)
    assert [rows for _, rows in word] == [[[typeset(v, t.align[j] == "r") for j, v in enumerate(r)] for r in t.rows]
                                          for t in report.tables]
    if report.notice is not None:
        paragraphs = [p.text for p in docx.Document(str(written[3])).paragraphs]
        assert paragraphs[0] == report.notice.heading
    # CSV and LaTeX: one pair per table (and the problems first), headers as in the table
    names = sorted(p.name for p in written[4].iterdir() if not p.name.startswith("."))
    keys = [t.key for t in report.tables] + (["problems"] if report.notice is not None else [])
    assert names == sorted([f"{k}.csv" for k in keys] + [f"{k}.tex" for k in keys] + ["contents.txt"])
    contents = (written[4] / "contents.txt").read_text().splitlines()  # the report and each file's table, named
    assert contents[0] == report.title and all(any(line.startswith(f"{k}.csv, {k}.tex: ") for line in contents)
                                               for k in keys)
    for table in report.tables:
        header = next(csv.reader(io.StringIO((written[4] / f"{table.key}.csv").read_text())))
        assert header == list(table.value_columns or table.columns)
        assert table.title.split(" ")[0] in (written[4] / f"{table.key}.tex").read_text() or "\\" in table.title
    # report: the same tables from the saved JSON, without fitting again
    again = files / f"{command}-again"
    again.mkdir()
    code, text, err = _run(["report", written[0], "--html", again / "r.html", "--docx", again / "r.docx",
                            "--markdown", again / "r.md", "--tables", again / "tables"], capsys)
    assert code == 0, err
    assert report.title not in text and "HTML report written to" in text  # its work is the files: no terminal view
    code, text, err = _run(["report", written[0]], capsys)  # no file asked for: the terminal view
    assert code == 0, err
    assert max(len(line) for line in _report_lines(text)) <= 80
    for title in shown_in_terminal:
        assert " ".join(title.split()) in " ".join(text.split())
    assert _docx_tables(again / "r.docx") == word
    replayed = {caption: rows for caption, rows in _html_tables(again / "r.html")}
    for table in report.tables:
        assert replayed[printed(table.title)] == [[printed(c.lstrip(" ")) for c in r] for r in table.rows]
    for name in names:
        assert _as_run((again / "tables" / name).read_text()) == (written[4] / name).read_text(), name
    assert _as_run((again / "r.md").read_text()) == markdown
    assert _as_run((again / "r.html").read_text()) == written[1].read_text()


def _as_run(text: str) -> str:
    """A view made by 'report' with the options it advises as its command's own view gives them: 'report' says each
    as running that command again ('(when running fit again: cfa-tool fit ... --robust)', as it takes none of them:
    reporting.combined.in_saved_words), otherwise the same."""
    return re.sub(r"\(when running ([a-z-]+) again: cfa-tool \1 \.\.\. (--)", r"(\2", text)


def test_problems_come_first_in_the_report_of_a_comparison(hs_data):
    from cfa_tool.reporting.html_report import report_html
    from cfa_tool.reporting.reports import report_of
    from cfa_tool.reporting.terminal import report_text
    from cfa_tool.reporting.text_formats import report_markdown
    from cfa_tool.workflows.compare import compare

    comparison = compare([THREE, HEYWOOD], hs_data)
    assert not comparison.results[1].admissible
    report = report_of(comparison)
    assert report.notice is not None and report.notice.inadmissible
    assert any("heywood" in line or "model 2" in line or comparison.names[1] in line for line in report.notice.lines)
    assert report.tables[0].flagged == (0,)  # the 'Admissible' row
    text = report_text(report, 80)
    assert text.index(report.notice.heading) < text.index(report.title)
    page = report_html(report)
    assert page.index('id="problems"') < page.index("<h1>")
    markdown = report_markdown(report)
    assert markdown.index(report.notice.heading.split(":")[0]) < markdown.index("# Model comparison")
    assert "Guide values are common practice" in text and "licensed professional" in " ".join(text.split())


def test_bootstrap_and_cutoffs_return_one_result_that_shows_itself(hs_data):
    import cfa_tool

    boot = cfa_tool.bootstrap(THREE, hs_data, replications=10, seed=2, workers=1, bollen_stine=False)
    assert boot.fit.converged and boot.converged == 10
    assert "Bootstrap intervals (95%)" in boot.summary(80)
    assert "<table" in boot._repr_html_()
    saved = boot.to_dict()
    assert saved["fit"]["fit"]["chi_square"] == boot.fit.fit.chi_square
    assert len(saved["result"]["intervals"]) == len(boot.intervals)
    cut = cfa_tool.cutoffs(THREE, hs_data, replications=20, seed=2, workers=1)
    assert cut.fit.n_obs == cut.n_obs == 301
    assert "Cutoffs" in cut.summary(80) and "guides, not laws" in cut.summary(80)
    assert "<table" in cut._repr_html_()


def test_a_check_shows_its_coverage_in_a_notebook(hs_data):
    import cfa_tool

    frame = hs_data.copy()
    frame.iloc[:10, frame.columns.get_loc("x1")] = float("nan")
    found = cfa_tool.check(THREE, frame)
    page = found._repr_html_()
    assert "Share of rows answering each model variable" in page
    assert '<td class="l">x1</td><td class="r">97%</td>' in page  # 291 of 301 rows answer x1 (96.7%)
    assert '<td class="l">x2</td><td class="r">100%</td>' in page
    assert found.summary().startswith("The model is valid")


def _error_line(err: str) -> str:
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    return lines[0]


@pytest.mark.parametrize("content, words", [
    (b"factor f: a, b, c\n", "is not JSON (line 1, column 1"),
    (b"\xff\xfe\x00", "is not UTF-8 text"),
    (b'{"a": 1}', "not a result written by cfa-tool"),
    (b"[1, 2]", "not a result written by cfa-tool"),
    (b'{"tool": "cfa-tool", "version": "0.1.0", "fit": {}}', "holds no 'report' part"),
    (b'{"tool": "cfa-tool", "version": "0.1.0", "report": {"kind": "fit", "title": "x"}}', "incomplete or changed by hand"),
    (b'{"tool": "cfa-tool", "version": "0.1.0", "report": {"kind": "nonsense", "title": "x", "notice": null, "lines": [],'
     b' "tables": []}}', "incomplete or changed by hand"),
])
def test_report_refuses_a_file_that_is_not_a_result_in_one_line(tmp_path, capsys, content, words):
    bad = tmp_path / "bad.json"
    bad.write_bytes(content)
    code, out, err = _run(["report", bad, "--html", tmp_path / "out.html"], capsys)
    assert code == 2
    line = _error_line(err)
    assert line.startswith("cfa-tool: ") and "bad.json" in line and words in line, line
    assert not (tmp_path / "out.html").exists()
    assert bad.read_bytes() == content


def test_report_never_replaces_its_input_or_a_file_it_did_not_write(tmp_path, capsys, hs_data):
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data, index=False)
    (tmp_path / "a.cfa").write_text(THREE)
    saved = tmp_path / "power.json"
    code, _, err = _run(["power", tmp_path / "a.cfa", "--n", 200, "--json", saved], capsys)
    assert code == 0, err
    before = saved.read_bytes()
    code, _, err = _run(["report", saved, "--markdown", saved], capsys)
    assert code == 2 and "input file" in _error_line(err)
    assert saved.read_bytes() == before
    code, _, err = _run(["report", tmp_path / "missing.json"], capsys)
    assert code == 2 and "does not exist" in _error_line(err)
    code, out, err = _run(["report", saved, "--html", "/dev/null"], capsys)  # a special file is written in place
    assert code == 0, err
    assert out == "HTML report written to /dev/null\n"  # the file alone: no terminal view beside it


def test_an_old_fit_result_names_what_to_do(tmp_path, capsys, hs_data):
    import cfa_tool
    from cfa_tool.reporting.json_report import to_json

    old = json.loads(to_json(cfa_tool.fit(THREE, hs_data)))
    del old["report"], old["command"]  # what versions before the report model wrote
    path = tmp_path / "old fit.json"
    path.write_text(json.dumps(old))
    code, _, err = _run(["report", path], capsys)
    assert code == 2 and "run the command again with --json" in _error_line(err)


@pytest.mark.parametrize("edit", ["short row", "no columns", "flag beyond the rows"])
def test_a_saved_report_edited_out_of_shape_is_a_one_line_error(tmp_path, capsys, hs_data, edit):
    # found by a hostile trial: a table row cut short crashed every format halfway through printing
    saved = tmp_path / "power.json"
    (tmp_path / "a.cfa").write_text(THREE)
    code, _, err = _run(["power", tmp_path / "a.cfa", "--n", 200, "--json", saved], capsys)
    assert code == 0, err
    payload = json.loads(saved.read_text())
    table = payload["report"]["tables"][0]
    if edit == "short row":
        table["rows"][0] = table["rows"][0][:-1]
    elif edit == "no columns":
        table["columns"], table["align"], table["rows"] = [], [], []
    else:
        table["flagged"] = [len(table["rows"]) + 3]
    saved.write_text(json.dumps(payload))
    code, out, err = _run(["report", saved], capsys)
    assert code == 2 and "incomplete or changed by hand" in _error_line(err) and out == ""


def test_a_saved_drawing_edited_without_its_size_is_a_one_line_error(tmp_path, capsys, hs_data):
    # hostile trial s18 (04): a figure's SVG without width and height on its root gave 'internal error: AttributeError'
    data = tmp_path / "hs.csv"
    hs_data.to_csv(data, index=False)
    (tmp_path / "a.cfa").write_text(THREE)
    saved = tmp_path / "fit.json"
    code, _, err = _run(["fit", tmp_path / "a.cfa", "--data", data, "--json", saved], capsys)
    assert code == 0, err
    payload = json.loads(saved.read_text())
    del payload["report"]["drawings"]["drawings"][0]["width"]  # the drawing of the figures and the diagram file
    saved.write_text(json.dumps(payload))
    for view in ("--html", "--docx"):
        code, out, err = _run(["report", saved, view, tmp_path / f"out.{view[2:]}"], capsys)
        assert code == 2 and "incomplete or changed by hand" in _error_line(err), err


@pytest.mark.parametrize("command", ["fit", "replicate", "invariance"])
def test_a_result_saved_before_reports_listed_their_files_names_them_by_name_for_others(command, files, capsys):
    # re-check s18 (R7): 'report OLD.json --docx' of a result saved without report.files (as every version before
    # the eighteenth round wrote it) printed 'Model file: /work/.../x.cfa' in Word; the files of such a result are its
    # model's and data's sources and the paths its report's words give, so that Word and HTML name each file by its
    # name whatever the result's age (the terminal keeps the paths as given)
    out = files / f"old-{command}"
    out.mkdir()
    code, _, err = _run(_commands(files)[command] + ["--json", out / "new.json"], capsys)
    assert code == 0, err
    saved = json.loads((out / "new.json").read_text())
    assert str(files) in json.dumps(saved["report"])  # the report's words give the folders
    del saved["report"]["files"]
    (out / "old.json").write_text(json.dumps(saved))
    code, text, err = _run(["report", out / "old.json", "--docx", out / "r.docx", "--html", out / "r.html"], capsys)
    assert code == 0, err
    word = " ".join(p.text for p in docx.Document(str(out / "r.docx")).paragraphs)
    word += " ".join(c.text for t in docx.Document(str(out / "r.docx")).tables for r in t.rows for c in r.cells)
    html = re.sub(r"data:image/[^\"]+", "", (out / "r.html").read_text())
    for view in (word, html):
        assert str(files) not in view
    if command != "invariance":  # whose report names no file in its words
        code, text, err = _run(["report", out / "old.json"], capsys)
        assert code == 0 and str(files) in "".join(text.split())  # the terminal: the paths as given
        assert "hs.csv" in word and "hs.csv" in html
