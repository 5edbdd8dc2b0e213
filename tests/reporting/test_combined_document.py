"""The report model of a document of several results (reporting.combined), drawn by the Word, HTML and Markdown
writers: a reference to a table in a result's problems names that result's table in the "Read first" notice (by its
number in the whole Word file, by its title and result elsewhere), though another result has a table of the same
key; the cautions that several results give are said once; a result that read no data does not make the others'
data differ.  The reports are made here by hand (two small reports of the same shape as a comparison's)."""

from __future__ import annotations

import io

import docx

from cfa_tool.note_parts import Note, TableReference
from cfa_tool.reporting.combined import combined
from cfa_tool.reporting.docx_report import combined_docx
from cfa_tool.reporting.document import DataRead, Report, ResultKind
from cfa_tool.reporting.html_report import combined_html
from cfa_tool.reporting.tables import ProblemNotice, ReportTable
from cfa_tool.reporting.text_formats import combined_markdown

CAUTION = "Guide values are conventions, not laws."


def _table(key: str, title: str) -> ReportTable:
    return ReportTable(key, title, ("Model", "CFI"), ("l", "r"), (("a", ".95"),))


def _report(kind: ResultKind, title: str, tables, notice=None, data=(DataRead("d.csv", "abc"),)) -> Report:
    return Report(kind, title, notice, ("A line.",), tuple(tables), cautions=(CAUTION,), paragraph=f"{title} was run.",
                  data=data)


def test_a_table_named_in_a_problem_is_that_results_table():
    notice = ProblemNotice("Check before interpreting these solutions",
                           (Note(("A model is on the boundary; see the note under ", TableReference("model_fit"), ".")),),
                           False)
    first = _report(ResultKind.COMPARE, "Model comparison", [_table("model_fit", "Fit of each model"),
                                                             _table("other", "Other")])
    second = _report(ResultKind.COMPARE, "Model comparison", [_table("model_fit", "Fit of the rival models")], notice)
    document = combined([(first, "a.json"), (second, "b.json")])
    texts = [p.text for p in docx.Document(io.BytesIO(combined_docx(document))).paragraphs]
    # the second result's table is the third of the document
    assert "Result 2 (comparison of models): A model is on the boundary; see the note under Table 3." in texts
    assert "see the note under Table 3." in texts[texts.index("Result 2. Model comparison") + 2]  # in its part too
    html = combined_html(document)
    assert 'see the note under the table &quot;Fit of the rival models&quot; of Result 2.' in html
    assert 'the table "Fit of the rival models" of Result 2' in combined_markdown(document)
    # the cautions both give: once, at the end
    assert texts.count(CAUTION) == 1 and texts.index(CAUTION) > texts.index("Result 2. Model comparison")
    assert html.count(CAUTION) == 1


def test_a_result_of_no_data_leaves_the_others_the_same_rows():
    fit = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")])
    plan = _report(ResultKind.POWER, "Power of the RMSEA test", [_table("power", "Power")], data=())
    document = combined([(fit, "fit.json"), (plan, "power.json")])
    assert document.notice is None
    assert document.lines == ("Result 1 (confirmatory factor analysis) read d.csv, every row of the file as it stands.",
                              "Result 2 (statistical power) read no data file (it plans or simulates).")


def test_the_same_name_another_file_and_other_rows():
    a = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")])
    b = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], data=(DataRead("w2/d.csv", "def"),))
    c = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")],
                data=(DataRead("d.csv", "abc", ("code 9 read as missing",)),))
    document = combined([(a, "a.json"), (b, "b.json"), (c, "c.json")])
    lines = [str(line) for line in document.notice.lines]
    assert lines[0].startswith("These results do not all describe the same rows of data")
    assert lines[1:] == ["Result 1 (confirmatory factor analysis): d.csv, every row of the file as it stands.",
                         "Result 2 (confirmatory factor analysis): w2/d.csv, every row of the file as it stands.",
                         "Result 3 (confirmatory factor analysis): d.csv, code 9 read as missing."]
