"""The Word file is pasted into a manuscript: it names no statement of the model language, no line of the model file
and no folder of the user's files (re-check s17, 03: "the 'answers' statement on line 7" twice in a Word file; 07:
"Model file: /home/<user>/.../x.cfa").  The terminal report, whose reader edits the model file, keeps each statement
with its line (note_parts.Command) and the paths as given; the HTML and Markdown files, pages people pass on, name the
files by their names as the Word file does.  A coding of answer words is said in one note in every view (re-check
s17, 04: "Answers recorded as words were coded 6 (agree) ..." followed by "The answers '6' and 'agree' share the code
6 ...").

The data are the bundled rider survey (invented, simulated with a fixed seed) with the answers 4 and 5 of the
punctuality items written as words in every other row ('Agree', 'Strongly agree') and one "Don't know", which the
model codes 3: an 'answers' statement listing the numbers 1 to 5 beside the two words, as a new user wrote it for a
workbook whose export wrote some answers as their labels."""

from __future__ import annotations

import io
import re
from contextlib import redirect_stderr, redirect_stdout

import docx
import pandas as pd
import pytest

from cfa_tool import cli
from cfa_tool.resources import resource_dir

PUNCTUALITY = ("on_time", "short_wait", "accurate_info", "easy_transfer")
ANSWERS = ('answers 1 = 1, 2 = 2, 3 = 3, 4 = 4, 5 = 5, "Agree" = 4, "Strongly agree" = 5, "Don\'t know" = 3 for '
           + ", ".join(PUNCTUALITY) + "\n")
MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text() + ANSWERS  # the statement on line 7
OTHER = MODEL + "covary on_time, short_wait\n"
# a population written with the statements a simulation reads: values given, fixed and held equal
POPULATION = ('name "Planned survey"\nfactor punctuality: on_time, short_wait, accurate_info, easy_transfer\n'
              "factor comfort: seat_available, clean, temperature, room_to_stand\n"
              "start loading(punctuality, short_wait) = 0.8\nfix loading(comfort, clean) = 0.7\n"
              "equal loading(comfort, temperature), loading(comfort, room_to_stand)\n")
WORDED_POPULATION = ('name "Planned survey"\nfactor punctuality: on_time, short_wait, accurate_info, easy_transfer\n'
                     'answers "Never" = 1, "Sometimes" = 2, "Often" = 3, "Always" = 4\n')
GROUPS = ('name "Planned survey"\nfactor punctuality: on_time, short_wait, accurate_info, easy_transfer\n'
          "in group north: start loading(punctuality, short_wait) = 0.5\n")
# the model language and the places of a model file, options and their Python keywords: none in a manuscript
SYNTAX = re.compile(r"statement|\bline \d|--[a-z]|\b[a-z_]+=\.\.\.|'(?:start|fix|equal|answers|in group|reversed)'")


def _word(path) -> str:
    document = docx.Document(str(path))
    return " ".join(" ".join([p.text for p in document.paragraphs]
                             + [c.text for t in document.tables for r in t.rows for c in r.cells]).split())


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    here = tmp_path_factory.mktemp("manuscript_words")
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    for item in PUNCTUALITY:
        data[item] = data[item].astype(object)
        every_other = data.index[::2]
        data.loc[every_other, item] = data.loc[every_other, item].map(
            {1: 1, 2: 2, 3: 3, 4: "Agree", 5: "Strongly agree"})
    data.loc[5, "on_time"] = "Don't know"
    data.to_csv(here / "worded.csv", index=False)
    # a column of answer words beside the numbers, which explore leaves out with the way to explore it
    survey = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    survey["satisfied"] = survey["on_time"].map({1: "Strongly disagree", 2: "Disagree", 3: "Neither agree nor disagree",
                                                 4: "Agree", 5: "Strongly agree"})
    survey.to_csv(here / "text_column.csv", index=False)
    for name, text in (("m.cfa", MODEL), ("other.cfa", OTHER), ("population.cfa", POPULATION),
                       ("worded_population.cfa", WORDED_POPULATION), ("groups.cfa", GROUPS)):
        (here / name).write_text(text)
    return here


def _run(argv) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = cli.main([str(a) for a in argv])
    return code, " ".join(out.getvalue().replace("│", " ").split()), err.getvalue()


COMMANDS = {
    "fit": lambda f: ["fit", f / "m.cfa", "--data", f / "worded.csv"],
    "check": lambda f: ["check", f / "m.cfa", "--data", f / "worded.csv"],
    "compare": lambda f: ["compare", f / "m.cfa", f / "other.cfa", "--data", f / "worded.csv"],
    "scores": lambda f: ["scores", f / "m.cfa", "--data", f / "worded.csv", "--output", f / "scores.csv"],
    "explore": lambda f: ["explore", "--data", f / "text_column.csv"],
    "replicate": lambda f: ["replicate", f / "m.cfa", "--data", f / "worded.csv", "--seed", "5"],
    "simulate": lambda f: ["simulate", f / "population.cfa", "--n", "300", "--seed", "1", "--output", f / "sim.csv"],
    "simulate words": lambda f: ["simulate", f / "worded_population.cfa", "--n", "300", "--seed", "1", "--output",
                                 f / "sim_words.csv"],
    "power-simulation": lambda f: ["power-simulation", f / "population.cfa", "--n", "200", "--replications", "20",
                                   "--seed", "1"],
    "power-simulation groups": lambda f: ["power-simulation", f / "groups.cfa", "--group-sizes", "north=200,south=200",
                                          "--replications", "20", "--seed", "1"],
}


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_the_word_file_names_no_statement_line_or_folder(folder, command):
    out = folder / f"{command.replace(' ', '_')}.docx"
    code, terminal, err = _run(COMMANDS[command](folder) + ["--docx", out])
    assert code == 0, err
    word = _word(out)
    found = SYNTAX.search(word)
    assert found is None, word[max(0, found.start() - 200):found.end() + 80]
    assert str(folder) not in word  # every file by its name (given here by its absolute path)
    if command in ("fit", "check", "compare", "scores", "replicate"):
        # the coding of the words, said once, without the statement; the terminal names the statement and its line
        assert word.count("recorded as words in 4 items") == 1 and "share the code" not in word
        assert "'Don't know', a word that usually means no answer, is analysed as the answer 3" in word
        assert "(the 'answers' statement on line 7)" in terminal
        assert "is analysed as the answer 3 because the 'answers' statement on line 7 codes it so" in terminal
    if command.startswith("simulate") or command.startswith("power-simulation") or command == "explore":
        assert "statement" in terminal  # the reader who edits the model file is told which statement
    if command == "explore":
        assert "are explored with an answers file that gives each word its code" in word


def test_a_scores_report_from_a_saved_fit_names_no_statement_in_word(folder):
    # the fit's notes and problems read back from its JSON keep their statements apart (re-check s17, 03's
    # neighbour): the saved fit's file names neither a statement nor its folder in the scores' Word file
    fit = folder / "saved_fit.json"
    assert _run(["fit", folder / "m.cfa", "--data", folder / "worded.csv", "--json", fit])[0] == 0
    out = folder / "from_fit.docx"
    code, terminal, err = _run(["scores", folder / "m.cfa", "--from-fit", fit, "--data", folder / "worded.csv",
                                "--output", folder / "from_fit.csv", "--docx", out])
    assert code == 0, err
    word = _word(out)
    assert SYNTAX.search(word) is None and str(folder) not in word
    assert "About the fit (not the scored data): answers recorded as words in 4 items" in word


def test_one_coding_note_in_every_view_and_paths_only_where_the_program_runs(folder):
    # re-check s17, 04: the coding and the answers sharing its codes were two notes saying one thing; 07: the
    # folders of the user's files in the Word file (and the HTML and Markdown files, which people pass on)
    html, markdown, word, saved = (folder / "fit.html", folder / "fit.md", folder / "fit.docx", folder / "fit.json")
    code, terminal, err = _run(["fit", folder / "m.cfa", "--data", folder / "worded.csv", "--html", html,
                                "--markdown", markdown, "--docx", word, "--json", saved])
    assert code == 0, err
    checked = _run(["check", folder / "m.cfa", "--data", folder / "worded.csv"])[1]
    page = " ".join(html.read_text().replace("&#x27;", "'").split())
    views = {"terminal": terminal, "check": checked, "HTML": page, "Markdown": " ".join(markdown.read_text().replace("\\_", "_").split()),
             "Word": _word(word)}
    coding = ("recorded as words in 4 items (on_time, short_wait, accurate_info, easy_transfer) were coded 3 (Don't "
              "know), 4 (Agree), 5 (Strongly agree); the numbers 1 to 5 kept their values")
    for name, text in views.items():
        assert text.count(coding) == 1, name
        assert "share the code" not in text, name
    # the terminal report keeps the paths as given; the files for others name the files by their names
    assert f"Model file: {folder / 'm.cfa'}" in terminal and f"Data: {folder / 'worded.csv'};" in terminal
    for name in ("HTML", "Markdown", "Word"):
        assert "Model file: m.cfa" in views[name] and "Data: worded.csv;" in views[name], name
        assert str(folder) not in views[name], name
    # a report written later from the JSON names them so too
    again = folder / "again.docx"
    assert _run(["report", saved, "--docx", again])[0] == 0
    assert "Model file: m.cfa" in _word(again) and str(folder) not in _word(again)


def test_files_that_share_a_name_keep_the_folders_that_tell_them_apart():
    from cfa_tool.reporting.document import file_names

    # hand-checked: the last folders that differ, as few as tell the files apart; one file written two ways is one
    assert file_names(["/home/a/wave1/x.csv", "/home/a/wave2/x.csv", "./m.cfa", "m.cfa", "C:\\survey\\r.csv"]) == {
        "/home/a/wave1/x.csv": "wave1/x.csv", "/home/a/wave2/x.csv": "wave2/x.csv", "./m.cfa": "m.cfa",
        "C:\\survey\\r.csv": "r.csv"}


def test_a_table_of_the_most_common_patterns_of_gaps_says_so_in_its_title():
    # the Word file of a new user's workbook (re-check s17) showed 'Missing answers' with 8 rows of its 191
    # patterns, read as every pattern; the count of distinct patterns from pandas, independently of the tool
    import numpy as np

    import cfa_tool
    from cfa_tool.reporting.reports import report_of

    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    items = [c for c in data.columns if c not in ("rider_id", "district")]
    rng = np.random.default_rng(18)
    for item in items:
        data.loc[rng.choice(len(data), 30, replace=False), item] = np.nan
    patterns = len(data[items].isna().drop_duplicates())
    assert patterns > 8
    report = report_of(cfa_tool.fit((resource_dir("models") / "rider_three_factors.cfa").read_text(), data))
    missing = next(t for t in report.tables if t.key == "missing")
    assert missing.title == f"Missing answers: the 8 most common of {patterns} patterns" and len(missing.rows) == 8
