"""The report model of a document of several results (reporting.combined), drawn by the Word, HTML and Markdown
writers: a reference to a table in a result's problems names that result's table in the "Read first" notice (by its
number in the whole Word file, by its title and result elsewhere), though another result has a table of the same
key; the cautions that several results give are said once; a result that read no data does not make the others'
data differ.  The reports are made here by hand (two small reports of the same shape as a comparison's)."""

from __future__ import annotations

import io
from dataclasses import replace

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
    # HTML and Markdown number the tables through as Word does (one numbering: combined.table_numbers)
    assert "A model is on the boundary; see the note under Table 3." in html and "Table 3. Fit of the rival models" in html
    markdown = combined_markdown(document)
    assert "see the note under Table 3." in markdown and "**Table 3. Fit of the rival models**" in markdown
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


def test_html_and_markdown_number_tables_and_figures_through_as_word_does():
    from cfa_tool.reporting.document import Figure, drawn

    svg = '<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"></svg>'
    first = replace(_report(ResultKind.FIT, "One factor", [_table("fit", "Model fit"), _table("est", "Estimates")]),
                    figures=(Figure("Path diagram", drawn(svg)),))
    second = replace(_report(ResultKind.COMPARE, "Model comparison", [_table("model_fit", "Fit of each model")]),
                     figures=(Figure("Path diagram of the rival", drawn(svg)),))
    document = combined([(first, "a.json"), (second, "b.json")])
    texts = [p.text for p in docx.Document(io.BytesIO(combined_docx(document))).paragraphs]
    assert "Table 3" in texts  # Word's caption of the second result's first table (python-docx reads it back)
    for text in (combined_html(document), combined_markdown(document)):
        # never again at 1 in a later result: the second result's table is Table 3, its figure Figure 2
        assert "Table 1. Model fit" in text and "Table 2. Estimates" in text and "Table 3. Fit of each model" in text
        assert "Figure 1. Path diagram" in text and "Figure 2. Path diagram of the rival" in text


def test_the_read_first_notice_advises_options_as_running_the_results_command_again():
    from cfa_tool.note_parts import Command

    advice = Note(("the search stopped at its limit. What to try: raise the limit", Command(" (--max-iterations)"),
                   "; or compare a model without it", Command(" (cfa-tool compare)", runs="compare",
                                                             inside=" (among the models compared here)"), "."))
    notice = ProblemNotice("Check before interpreting these solutions", (advice,), False)
    fit = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], notice)
    rival = _report(ResultKind.COMPARE, "Model comparison", [_table("model_fit", "Fit of each model")], notice)
    document = combined([(fit, "fit.json"), (rival, "compare.json")])
    for text in (combined_html(document), combined_markdown(document)):
        text = text.replace("&quot;", '"')
        # an option of the result's own command, read in a report of saved results: said as running it again
        assert "Result 1 (confirmatory factor analysis): The search stopped at its limit. What to try: raise the " \
               "limit (when running fit again: cfa-tool fit ... --max-iterations)" in text
        assert "(--max-iterations)" not in text  # nor in the result's own part
        # the result's own command is not advised as another analysis: its own report's words
        assert "Result 2 (comparison of models): The search stopped at its limit. What to try: raise the limit " \
               "(when running compare again: cfa-tool compare ... --max-iterations); or compare a model without it " \
               "(among the models compared here)." in text
        assert "without it (cfa-tool compare) (among" not in text


def test_an_option_the_results_command_does_not_take_is_said_as_its_own_report_says_it():
    # bootstrap takes no --robust: its own report says 'a fit of the model with --robust' (note_parts.Command's
    # elsewhere), and so does a document of saved results, never 'when running bootstrap again: ... --robust'
    from cfa_tool.note_parts import Command
    from cfa_tool.options import Option, taken_by

    advice = Note(("the answers have heavy tails. What to try: the scaled test",
                   Command(" (--robust)", takes=taken_by(Option.ROBUST), elsewhere=" (a fit of the model with --robust)"),
                   "."))
    notice = ProblemNotice("Check before interpreting these solutions", (advice,), False)
    boot = _report(ResultKind.BOOTSTRAP, "Bootstrap", [_table("fit", "Model fit")], notice)
    fit = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], notice)
    document = combined([(boot, "boot.json"), (fit, "fit.json")])
    for text in (combined_html(document), combined_markdown(document)):
        assert "the scaled test (a fit of the model with --robust)." in text
        assert "when running bootstrap again" not in text
        assert "the scaled test (when running fit again: cfa-tool fit ... --robust)." in text


def test_a_caution_saved_with_leading_lines_leads_none():
    # a saved notice edited by hand to a caution with a leading line: a caution leads nothing (the document's
    # notice once stopped with an internal error ranking it among the grave kinds)
    from cfa_tool.reporting.tables import NoticeKind

    saved = _report(ResultKind.FIT, "F", [], ProblemNotice("Check", ("A caution.",), False)).to_dict()
    saved["notice"]["problem_kind"], saved["notice"]["leading"] = "caution", 1
    edited = Report.from_dict(saved)
    assert (edited.notice.kind, edited.notice.leading) == (NoticeKind.CAUTION, 0)
    other = _report(ResultKind.FIT, "G", [_table("fit", "Model fit")])
    document = combined([(edited, "c.json"), (other, "g.json")])
    assert document.notice.heading == "Read first: check these results before interpreting them"


def test_the_read_first_heading_says_the_kinds_of_problem_and_the_gravest_lead():
    from cfa_tool.reporting.combined import READ_FIRST_CAUTIONS
    from cfa_tool.reporting.tables import NoticeKind

    # a check stopped by its data (nothing fitted, no solution at all) beside a fit with a caution: no solution is
    # inadmissible, so the heading says what the check found, not 'not admissible' (hostile s28)
    stopped = ProblemNotice("1 problem in the data stops an ordinal fit: fix each before fitting",
                            ("Item a has fractional answers (2.5).", "A caution on the check."), True,
                            NoticeKind.DATA_STOP_FIT, 1)
    caution = ProblemNotice("Check before interpreting this solution", ("The reliability is low.",), False)
    check = _report(ResultKind.CHECK, "Model check", [], stopped)
    scores = _report(ResultKind.SCORES, "Factor scores", [_table("scores", "Scores")], caution)
    document = combined([(scores, "sc.json"), (check, "chk.json")])
    assert document.notice.heading == "Read first: problems in the data stop a fit: fix them before fitting"
    assert "not admissible" not in document.notice.heading
    # the check's line that stops the fit leads, though its result comes second; its caution after the scores' one
    assert [str(x) for x in document.notice.lines] == [
        "Result 2 (check of the model and the data): Item a has fractional answers (2.5).",
        "Result 1 (factor scores): The reliability is low.",
        "Result 2 (check of the model and the data): A caution on the check."]
    # an inadmissible solution (its first line the negative variance, then a caution) leads every other line (the
    # gravest kind first, as the heading names them), whatever the results' order
    bad = ProblemNotice("This solution is not admissible: do not interpret its estimates or its fit",
                        ("The residual variance of x1 is negative (-0.216).", "The reliability is low."), True,
                        NoticeKind.NOT_ADMISSIBLE, 1)
    fit = _report(ResultKind.FIT, "Two factors", [_table("fit", "Model fit")], bad)
    document = combined([(scores, "sc.json"), (check, "chk.json"), (fit, "fit.json")])
    assert document.notice.heading == ("Read first: some solutions are not admissible: do not interpret them; "
                                       "problems in the data stop a fit: fix them before fitting")
    lines = [str(x) for x in document.notice.lines]
    assert lines[:2] == ["Result 3 (confirmatory factor analysis): The residual variance of x1 is negative (-0.216).",
                         "Result 2 (check of the model and the data): Item a has fractional answers (2.5)."]
    # the same caution in the same words from two results: said once, naming both
    assert lines[2] == "Results 1 and 3 (factor scores, confirmatory factor analysis): The reliability is low."
    assert sum("reliability is low" in x for x in lines) == 1
    for text in (combined_html(document), combined_markdown(document)):
        assert text.index("x1 is negative") < text.index("fractional answers") < text.index("reliability is low")
    # cautions only: the heading of cautions
    assert combined([(scores, "sc.json"), (scores, "sc2.json")]).notice.heading == READ_FIRST_CAUTIONS


def test_a_saved_notice_keeps_its_kind_and_leading_lines():
    from cfa_tool.reporting.tables import NoticeKind

    stopped = ProblemNotice("1 problem stops a fit", ("Item a has fractional answers.", "A caution."), True,
                            NoticeKind.DATA_STOP_FIT, 1)
    report = Report.from_dict(_report(ResultKind.CHECK, "Model check", [], stopped).to_dict())
    assert (report.notice.kind, report.notice.leading) == (NoticeKind.DATA_STOP_FIT, 1)
    # a notice saved before it kept them: an inadmissible one's every line leads, a caution's none
    saved = _report(ResultKind.FIT, "F", [], stopped).to_dict()
    del saved["notice"]["problem_kind"], saved["notice"]["leading"]
    assert (Report.from_dict(saved).notice.kind, Report.from_dict(saved).notice.leading) == (NoticeKind.NOT_ADMISSIBLE, 2)


def test_files_of_one_name_told_apart_by_their_contents():
    # three results read 'd.csv' from two folders: the first and third the same bytes (checksum 'abc'), the second
    # other bytes: the first and third share a label, the second has its own (hostile s28: all three were labelled
    # 'another file of this name: its contents differ')
    a = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")])
    b = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], data=(DataRead("d.csv", "def"),))
    c = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")],
                data=(DataRead("d.csv", "abc", ('rows where district == "north"',)),))
    lines = [str(line) for line in combined([(a, "a.json"), (b, "b.json"), (c, "c.json")]).notice.lines]
    assert lines[0].endswith("Files of one name with other contents are told apart as versions, numbered in the "
                             "order the results read them.")
    assert lines[1:] == ["Result 1 (confirmatory factor analysis): d.csv (version 1), every row of the file as it stands.",
                         "Result 2 (confirmatory factor analysis): d.csv (version 2), every row of the file as it stands.",
                         'Result 3 (confirmatory factor analysis): d.csv (version 1), rows where district == "north".']


def test_a_tables_folder_of_several_results_is_written_one_way_and_says_it():
    from cfa_tool.data.csv_convention import CsvConvention
    from cfa_tool.reporting.text_formats import combined_table_files

    # Result 1 read a CSV file of semicolons and decimal commas, Result 2 a Stata file (no convention: commas and
    # points): every CSV file of the folder in the first's convention, said once (new-user trial s28: the folder
    # mixed the two, and a spreadsheet set for decimal commas opened Result 2's tables as one column of text)
    semicolons = CsvConvention(";", ",")
    notice = ProblemNotice("Check before interpreting this solution", ("A caution.",), False)
    first = replace(_report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], notice),
                    csv_convention=semicolons)
    second = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], data=(DataRead("d.dta", "def"),))
    files = combined_table_files(combined([(first, "a.json"), (second, "b.json")]))
    csvs = {name: text for name, text in files.items() if name.endswith(".csv")}
    assert set(csvs) == {"read_first.csv", "result1-problems.csv", "result1-fit.csv", "result2-fit.csv"}
    assert files["result1-fit.csv"] == files["result2-fit.csv"] == "Model;CFI\na;,95\n"  # (one column: no separator)
    contents = files["contents.txt"]
    assert contents.count("The CSV files") == 1
    assert ("The CSV files of every result: fields separated by semicolons, decimals written with commas, one way for "
            "the whole folder, so that a spreadsheet opens them all alike (as in the data of Result 1; Result 2 read "
            "data written otherwise") in contents


def test_the_same_bytes_read_by_other_paths_are_one_file():
    # the same file (checksum 'abc') given as a path with folders by one run and by its name by another: one name,
    # the first result's, and the two results describe the same rows (a trial of s28 named it
    # 'scratch/transit.csv' for one result and 'transit.csv' for another, as if they were two files)
    a = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], data=(DataRead("/home/r/survey/d.csv", "abc"),))
    b = _report(ResultKind.COMPARE, "Model comparison", [_table("fit", "Model fit")])
    document = combined([(a, "a.json"), (b, "b.json")])
    assert document.notice is None
    assert document.lines == ("Both results read the same data the same way: d.csv, every row of the file as it "
                              "stands.",)
    # beside a result of other data, each result's line names its file: the first two alike
    c = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], data=(DataRead("e.dta", "def"),))
    lines = [str(x) for x in combined([(a, "a.json"), (b, "b.json"), (c, "c.json")]).notice.lines]
    assert lines[1:] == ["Result 1 (confirmatory factor analysis): d.csv, every row of the file as it stands.",
                         "Result 2 (comparison of models): d.csv, every row of the file as it stands.",
                         "Result 3 (confirmatory factor analysis): e.dta, every row of the file as it stands."]


def test_a_saved_fit_marked_not_admissible_by_hand_leads_with_that_line_alone():
    from cfa_tool import __version__
    from cfa_tool.reporting.reports import saved_report

    # a fit whose report gives one caution, its file marked not admissible afterwards: the line that says so leads
    # a document of several results, the fit's caution after the other result's grave line (a notice rebuilt so
    # counted every line as grave)
    caution = ProblemNotice("Check before interpreting this solution", ("The reliability is low.",), False)
    fit = _report(ResultKind.FIT, "One factor", [_table("fit", "Model fit")], caution)
    payload = {"tool": "cfa-tool", "version": __version__, "command": "fit", "admissible": False, "problems": [],
               "report": fit.to_dict()}
    edited = saved_report(payload, "fit.json")
    assert edited.notice.inadmissible and edited.notice.leading == 1
    bad = ProblemNotice("This solution is not admissible: do not interpret its estimates or its fit",
                        ("The residual variance of x1 is negative.",), True)
    other = _report(ResultKind.FIT, "Two factors", [_table("fit", "Model fit")], bad)
    lines = [str(x) for x in combined([(edited, "fit.json"), (other, "other.json")]).notice.lines]
    assert "marked not admissible in this file" in lines[0]
    assert lines[1:] == ["Result 2 (confirmatory factor analysis): The residual variance of x1 is negative.",
                         "Result 1 (confirmatory factor analysis): The reliability is low."]
