"""``cfa-tool report A.json B.json C.json --docx paper.docx``: several saved results as one document for a manuscript
(new-user trial s26, finding 07: each command wrote its own Word file, and 'report' took one result, so a fit, its
rival model and its invariance ladder were merged by hand, with two 'Table 1's).  The results come in the order
given, each under its own heading; the Word file numbers its tables and figures through the whole document; the
problems of every result come first in a "Read first" notice naming the result each belongs to, and again first in
that result's part; each result keeps its own methods paragraph; the cautions are said once; results of other data,
or of the same file read with other row filters or missing codes, are said so at the top.  Errors (a file that is not
a saved result, or of another version, a result given twice, an output that would replace an input) are one line,
exit 2, and nothing is written.

Data: Holzinger & Swineford (1939), the 301 children's nine ability tests (tests/datasets, as conftest.hs_data reads
them): an open data set, written to a CSV file here."""

from __future__ import annotations

import json
import re
import shutil
from pathlib import Path

import docx
import pytest

from cfa_tool.cli import main
from cfa_tool.note_parts import TableReference, numbered
from cfa_tool.reporting.docx_report import typeset
from cfa_tool.reporting.tables import NOT_ADMISSIBLE

THREE = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ONE = "factor g: x1, x2, x3, x4, x5, x6, x7, x8, x9\n"
# the speed factor's residuals tied so that a residual variance goes below zero (a solution that is not admissible;
# the same model as tests/reporting/test_report_model.py's)
HEYWOOD = THREE + "covary x7, x8\ncovary x8, x9\n"


@pytest.fixture(scope="module")
def folder(tmp_path_factory, hs_data) -> Path:
    """The saved results: a fit, a comparison with a one-factor rival, an invariance ladder by school, a fit that is
    not admissible, and a fit of one school's rows."""
    here = tmp_path_factory.mktemp("several")
    hs_data.to_csv(here / "hs.csv", index=False)
    (here / "three.cfa").write_text(THREE)
    (here / "one.cfa").write_text(ONE)
    (here / "heywood.cfa").write_text(HEYWOOD)
    for command in (["fit", "three.cfa", "--data", "hs.csv", "--json", "fit.json"],
                    ["compare", "three.cfa", "one.cfa", "--data", "hs.csv", "--json", "compare.json"],
                    ["invariance", "three.cfa", "--data", "hs.csv", "--group-column", "school", "--json", "inv.json"],
                    ["fit", "heywood.cfa", "--data", "hs.csv", "--json", "heywood.json"],
                    ["fit", "three.cfa", "--data", "hs.csv", "--keep", "school = Pasteur", "--json", "pasteur.json"]):
        with pytest.MonkeyPatch.context() as patch:
            patch.chdir(here)
            assert main(command) == 0, command
    return here


def _run(folder: Path, monkeypatch, *arguments) -> int:
    monkeypatch.chdir(folder)
    return main(["report", *arguments])


def _saved(folder: Path, name: str) -> dict:
    return json.loads((folder / name).read_text())["report"]


def _captions(document, word: str) -> list[int]:
    """The numbers of the document's table (or figure) captions in their order, continued parts left out."""
    found = [re.fullmatch(rf"{word} (\d+)", p.text) for p in document.paragraphs]
    return [int(m.group(1)) for m in found if m]


def _headings(document, level: int) -> list[str]:
    return [p.text for p in document.paragraphs if p.style.name == f"Heading {level}"]


def test_tables_and_figures_are_numbered_through_the_document_in_the_order_given(folder, monkeypatch, capsys):
    assert _run(folder, monkeypatch, "fit.json", "compare.json", "inv.json", "--docx", "paper.docx") == 0
    assert "Word report written to paper.docx" in capsys.readouterr().out
    document = docx.Document(folder / "paper.docx")
    saved = [_saved(folder, n) for n in ("fit.json", "compare.json", "inv.json")]
    count = sum(len(r["tables"]) for r in saved)
    assert _captions(document, "Table") == list(range(1, count + 1))  # never restarting at 1 in a later result
    figures = sum(len(r["figures"]) for r in saved)
    from cfa_tool.reporting.picture import png_converter

    if png_converter() is not None:
        assert _captions(document, "Figure") == list(range(1, figures + 1))
    # a manuscript names no option, in the Read first notice (the comparison's advice to use --robust) or elsewhere
    words = [p.text for p in document.paragraphs] + [c.text for t in document.tables for r in t.rows for c in r.cells]
    assert not [w for w in words if re.search(r"(?<![\w-])--[a-z]", w) or "cfa-tool" in w]
    headings = _headings(document, 1)
    assert headings == ["Result 1. Confirmatory factor analysis: " + saved[0]["title"],
                        "Result 2. " + saved[1]["title"], "Result 3. " + saved[2]["title"]]
    # each table's number follows its result's part: the compare's tables come after the fit's, before the ladder's
    texts = [p.text for p in document.paragraphs]
    first_of_compare = texts.index(f"Table {len(saved[0]['tables']) + 1}")
    assert texts.index(headings[1]) < first_of_compare < texts.index(headings[2])
    # each result keeps its own methods paragraph, under its own heading, in its part
    paragraphs = [texts[k + 1] for k, p in enumerate(document.paragraphs)
                  if p.style.name == "Heading 2" and p.text == "Summary for a paper"]
    assert paragraphs == [typeset(r["paragraph"]) for r in saved]
    # the other order gives the other headings' order, and the numbers still run through
    assert _run(folder, monkeypatch, "inv.json", "compare.json", "--docx", "other.docx") == 0
    other = docx.Document(folder / "other.docx")
    assert _headings(other, 1) == ["Result 1. " + saved[2]["title"], "Result 2. " + saved[1]["title"]]
    assert _captions(other, "Table") == list(range(1, len(saved[2]["tables"]) + len(saved[1]["tables"]) + 1))


def test_a_reference_to_a_table_names_its_number_in_the_whole_document():
    # a note's reference to a table of its own result (note_parts.TableReference) names the number the table has in
    # the document: the second result's first table, after five tables of the first, is Table 6
    class Table:
        def __init__(self, key: str):
            self.key = key

    view = numbered([Table("fit"), Table("estimates")], start=6)
    assert view.name(TableReference("estimates")) == "Table 7"


def test_problems_come_first_each_named_by_its_result_and_first_in_its_part(folder, monkeypatch):
    assert _run(folder, monkeypatch, "fit.json", "heywood.json", "--docx", "problems.docx", "--html", "problems.html", "--markdown", "problems.md") == 0
    document = docx.Document(folder / "problems.docx")
    texts = [p.text for p in document.paragraphs if p.text]
    assert texts[0].startswith("Read first")
    top = texts[1:texts.index("Results")]
    assert top and all(line.startswith("Result 2 (confirmatory factor analysis): ") for line in top)
    # in its part, the problems before anything else the part says
    part = texts.index(_headings(document, 1)[1])
    assert texts[part + 1] == NOT_ADMISSIBLE and texts.index("Model file: heywood.cfa") > part + 1
    # the first result has no problems: its part starts with its model file
    first = texts.index(_headings(document, 1)[0])
    assert texts[first + 1] == "Model file: three.cfa"
    html = (folder / "problems.html").read_text()
    assert html.index("Read first") < html.index("<h1>") < html.index('id="result-2-problems"') < html.index(
        "Model file: heywood.cfa")
    assert html.count('id="problems"') == 1  # each part's ids its own: no two elements of one id
    markdown = (folder / "problems.md").read_text()
    assert markdown.startswith("## Read first") and markdown.index("# Results") > markdown.index("Result 2 (")
    for text in (html, markdown, "\n".join(texts)):  # the cautions once, at the end
        assert text.count("licensed professional") == 1
        assert text.index("licensed professional") > text.index("Result 2. ")


def test_results_of_other_rows_are_said_so_at_the_top(folder, monkeypatch):
    # (Markdown: the notice is the same model's as in Word, whose writing of two fits' tables takes seconds)
    assert _run(folder, monkeypatch, "fit.json", "pasteur.json", "--markdown", "rows.md") == 0
    top = [line.removeprefix("- ").replace("\\", "") for line in
           (folder / "rows.md").read_text().split("\n# Results")[0].split("\n") if line]
    assert top[0].startswith("## Read first")
    assert any("do not all describe the same rows" in line for line in top)
    assert "Result 1 (confirmatory factor analysis): hs.csv, every row of the file as it stands." in top
    assert "Result 2 (confirmatory factor analysis): hs.csv, rows where school = Pasteur." in top
    # the same file read the same way: one plain line under the title, none in the notice
    assert _run(folder, monkeypatch, "compare.json", "inv.json", "--docx", "same.docx") == 0
    texts = [p.text for p in docx.Document(folder / "same.docx").paragraphs if p.text]
    title = texts.index("Results")
    assert not any("same rows" in line for line in texts[:title])
    assert texts[title + 1] == "Both results read the same data the same way: hs.csv, every row of the file as it stands."


def test_a_file_of_the_same_name_with_other_contents_is_another_data_file(folder, monkeypatch, hs_data):
    other = folder / "wave2"
    other.mkdir(exist_ok=True)
    hs_data.iloc[:200].to_csv(other / "hs.csv", index=False)
    shutil.copy(folder / "three.cfa", other / "three.cfa")
    monkeypatch.chdir(other)
    assert main(["fit", "three.cfa", "--data", "hs.csv", "--json", "fit2.json"]) == 0
    assert _run(folder, monkeypatch, "fit.json", "wave2/fit2.json", "--markdown", "names.md") == 0
    top = (folder / "names.md").read_text().split("# Results")[0].replace("\\", "")
    # told apart by their contents: each its own version (hostile s28: both were 'its contents differ')
    assert "do not all describe the same rows" in top
    assert "Result 1 (confirmatory factor analysis): hs.csv (version 1), every row" in top
    assert "Result 2 (confirmatory factor analysis): hs.csv (version 2), every row" in top


def test_values_a_stata_file_marks_as_no_answer_are_said_as_read(folder, monkeypatch, hs_data):
    # the Holzinger-Swineford rows written as a Stata file whose items x1 and x2 hold the code 9, labelled 'Refused'
    # in the file, in 20 rows: the fit reads them as no answer by the file's label, and the saved report's data_read
    # and a document of several results say so, never 'as it stands' (new-user trial s28: a .dta file read so was
    # said to be read 'as it stands' beside a CSV file read with --missing-codes 8,9)
    import pyreadstat

    coded = hs_data[["x1", "x2", "x3", "x4", "x5", "x6", "x7", "x8", "x9"]].copy()
    coded.iloc[:20, :2] = 9.0
    pyreadstat.write_dta(coded, str(folder / "hs_coded.dta"),
                         variable_value_labels={c: {9: "Refused"} for c in ("x1", "x2")})
    monkeypatch.chdir(folder)
    assert main(["fit", "three.cfa", "--data", "hs_coded.dta", "--json", "dta.json"]) == 0
    assert _saved(folder, "dta.json")["data_read"][0]["reading"] == [
        "values the file marks as no answer read as missing: 9 'Refused'"]
    assert _run(folder, monkeypatch, "fit.json", "dta.json", "--markdown", "dta.md") == 0
    top = (folder / "dta.md").read_text().split("# Results")[0].replace("\\", "")
    assert ("Result 2 (confirmatory factor analysis): hs_coded.dta, values the file marks as no answer read as "
            "missing: 9 'Refused'.") in top


def test_a_result_saved_before_results_recorded_their_data(folder, monkeypatch):
    for name in ("fit.json", "compare.json"):
        payload = json.loads((folder / name).read_text())
        del payload["report"]["data_read"]
        (folder / f"old-{name}").write_text(json.dumps(payload))
    assert _run(folder, monkeypatch, "old-fit.json", "pasteur.json", "--markdown", "old.md") == 0
    top = (folder / "old.md").read_text().split("# Results")[0]
    assert "Result 1 (confirmatory factor analysis): hs.csv, every row" in top  # from the fit's own data part
    assert _run(folder, monkeypatch, "fit.json", "old-compare.json", "--markdown", "old2.md") == 0
    top = (folder / "old2.md").read_text().split("# Results")[0]
    assert "Result 2 (comparison of models) does not record the data it read" in top


@pytest.mark.parametrize("case", ["not a result", "another version", "twice", "twice by another spelling",
                                  "a copy", "output over an input", "diagram"])
def test_errors_are_one_line_exit_2_and_nothing_written(folder, monkeypatch, capsys, case):
    monkeypatch.chdir(folder)
    if case == "another version":
        payload = json.loads((folder / "fit.json").read_text())
        payload["version"] = "0.99.0"
        (folder / "newer.json").write_text(json.dumps(payload))
    if case == "a copy":
        shutil.copy(folder / "compare.json", folder / "compare-copy.json")
    results = {"not a result": ["fit.json", "three.cfa"], "another version": ["fit.json", "newer.json"],
               "twice": ["fit.json", "compare.json", "fit.json"],
               "twice by another spelling": ["fit.json", "./fit.json"], "a copy": ["compare.json", "compare-copy.json"],
               "output over an input": ["fit.json", "compare.json"], "diagram": ["fit.json", "compare.json"]}[case]
    extra = {"output over an input": ["--html", "compare.json"], "diagram": ["--diagram", "d.svg"]}.get(case, [])
    before = {name: (folder / name).read_bytes() for name in results}
    capsys.readouterr()
    assert main(["report", *results, "--docx", "error.docx", *extra]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err, err
    assert not (folder / "error.docx").exists() and not (folder / "d.svg").exists()
    assert {name: (folder / name).read_bytes() for name in results} == before
    expected = {"not a result": "three.cfa", "another version": "0.99.0", "twice": "given twice",
                "twice by another spelling": "given twice", "a copy": "given twice",
                "output over an input": "compare.json", "diagram": "--diagram"}[case]
    assert expected in err


def test_tables_of_several_results_each_named_by_its_result(folder, monkeypatch):
    assert _run(folder, monkeypatch, "fit.json", "heywood.json", "--tables", "tables") == 0
    names = {p.name for p in (folder / "tables").iterdir()}
    fit_tables = [t["key"] for t in _saved(folder, "fit.json")["tables"]]
    assert {f"result1-{k}.csv" for k in fit_tables} <= names and {f"result2-{k}.csv" for k in fit_tables} <= names
    assert "read_first.csv" in names
    contents = (folder / "tables" / "contents.txt").read_text()
    assert contents.index("Result 1. ") < contents.index("result1-fit.csv") < contents.index("Result 2. ")


def test_without_a_file_the_terminal_shows_read_first_then_each_result(folder, monkeypatch, capsys):
    monkeypatch.setenv("COLUMNS", "100")
    capsys.readouterr()
    assert _run(folder, monkeypatch, "fit.json", "heywood.json") == 0
    out = capsys.readouterr().out
    assert out.index("Read first: some solutions are not admissible") < out.index("Model file: three.cfa") \
        < out.index("Model file: heywood.cfa")
    assert "Result 2 (confirmatory factor analysis): " in out[:out.index("Model file: three.cfa")]


def test_one_saved_result_advises_an_option_as_running_its_command_again(folder, monkeypatch, hs_data):
    # the Holzinger-Swineford rows with gaps in x1 and x5: the fit's report advises '--incomplete-rows listwise' (a
    # note) and '--robust' (under the fit table); a reader of 'report fit.json --html' runs 'report', which takes
    # neither: its views say them as running the fit again, as a document of several results does, and are
    # otherwise the fit's own (the HTML, with those words put back, is the fit's byte for byte)
    gaps = hs_data.copy()
    gaps.loc[::7, "x1"] = None
    gaps.loc[::11, "x5"] = None
    gaps.to_csv(folder / "gaps.csv", index=False)
    monkeypatch.chdir(folder)
    assert main(["fit", "three.cfa", "--data", "gaps.csv", "--json", "gaps.json", "--html", "gaps-fit.html"]) == 0
    assert _run(folder, monkeypatch, "gaps.json", "--html", "gaps-report.html") == 0
    fit, report = ((folder / f"gaps-{name}.html").read_text() for name in ("fit", "report"))
    assert "(--incomplete-rows listwise)" in fit and "(--robust; from Python" in fit
    assert "(--incomplete-rows" not in report and "(--robust" not in report
    again = {"(when running fit again: cfa-tool fit ... --incomplete-rows listwise)": "(--incomplete-rows listwise)",
             "(when running fit again: cfa-tool fit ... --robust; from Python,": "(--robust; from Python,"}
    for said_so, option in again.items():
        assert said_so in report
        report = report.replace(said_so, option)
    assert report == fit


def test_several_results_on_the_terminal_advise_an_option_as_running_their_command_again(folder, monkeypatch,
                                                                                         hs_data, capsys):
    # the terminal's view of several saved results, each result's own report in turn: an option its notes advise is
    # said as running its command again, as the one saved result's views and the documents say it (the terminal once
    # printed '(--incomplete-rows listwise)' there, as if it were an option of 'report')
    gaps = hs_data.copy()
    gaps.loc[::7, "x1"] = None
    gaps.to_csv(folder / "gaps-terminal.csv", index=False)
    monkeypatch.chdir(folder)
    assert main(["fit", "three.cfa", "--data", "gaps-terminal.csv", "--json", "gaps-terminal.json"]) == 0
    monkeypatch.setenv("COLUMNS", "250")
    capsys.readouterr()
    assert _run(folder, monkeypatch, "gaps-terminal.json", "fit.json") == 0
    out = " ".join(capsys.readouterr().out.split())
    assert "(when running fit again: cfa-tool fit ... --incomplete-rows listwise)" in out
    assert "(--incomplete-rows listwise)" not in out
