"""The Word file is a manuscript: its notes and cautions name no option, while the terminal report, whose reader runs
the program, still gives each piece of advice with its option (note_parts.Command).  One sweep over the commands
that write a Word file, on two data files whose cautions carry advice (re-check s15, R3: the SPSS case filter's
--keep, the summary block's --keep and a code given for a labelled answer's --missing-codes reached the Word file).

The data are the bundled rider survey (invented, simulated with a fixed seed) with what a researcher's file can hold
added by hand: an SPSS case filter selecting the north district, value labels calling the middle answer 'Neutral'
given as a code of no answer; and, in a CSV copy, -99 in 15 answers of on_time, a 'Finished' column marking 30 rows
unfinished and the means and standard deviations of the items under the data (a summary block)."""

from __future__ import annotations

import io
import re
from contextlib import redirect_stderr, redirect_stdout

import docx
import pandas as pd
import pytest

from cfa_tool import cli
from cfa_tool.note_parts import Note
from cfa_tool.resources import resource_dir

OPTION = re.compile(r"--[a-z]")
ITEMS = ("on_time,short_wait,accurate_info,easy_transfer,seat_available,clean,temperature,room_to_stand,greeting,"
         "helpful,respectful,clear_answers")


def _word_text(path) -> str:
    """Every paragraph and table cell of a Word file, as python-docx reads them."""
    document = docx.Document(str(path))
    return " ".join([p.text for p in document.paragraphs]
                    + [cell.text for table in document.tables for row in table.rows for cell in row.cells])


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    pyreadstat = pytest.importorskip("pyreadstat")
    folder = tmp_path_factory.mktemp("word_options")
    base = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    items = ITEMS.split(",")
    model = folder / "three.cfa"
    model.write_text((resource_dir("models") / "rider_three_factors.cfa").read_text())
    other = folder / "one.cfa"
    other.write_text((resource_dir("models") / "rider_one_factor.cfa").read_text())
    filtered = base.drop(columns=["rider_id"]).assign(**{"filter_$": (base.district == "north").astype(float)})
    labels = {c: {1.0: "Disagree strongly", 2.0: "Disagree", 3.0: "Neutral", 4.0: "Agree", 5.0: "Agree strongly"}
              for c in items}
    pyreadstat.write_sav(filtered, str(folder / "filtered.sav"),
                         variable_value_labels=labels | {"filter_$": {0.0: "Not Selected", 1.0: "Selected"}},
                         column_labels={"filter_$": "district = 'north' (FILTER)"})
    coded = base.copy()
    coded.loc[coded.index[:15], "on_time"] = -99
    coded["Finished"] = ["True"] * (len(coded) - 30) + ["False"] * 30
    summary = pd.DataFrame([dict(rider_id=label, district="", Finished="", **getattr(coded[items], stat)().round(2))
                            for label, stat in (("Mean", "mean"), ("SD", "std"))])
    pd.concat([coded, summary]).to_csv(folder / "summary.csv", index=False)
    return folder, model, other


# what the terminal must still say of each file's advice, and the words the Word file says it with instead; the
# summary rows have no district, so a command comparing the districts leaves them out as rows without a group
CASES = {
    "filtered.sav": (["--missing-codes", "3"], (
        ('give --keep "filter_$ = 1"', "keep the rows where filter_$ = 1", True),
        ("--missing-codes 3 read as no answer", "given as a code of no answer, was read as no answer", True),
        ("leave 3 out of --missing-codes", "leave 3 out of the codes of no answer", True))),
    "summary.csv": ([], (
        # the Word file sets a number's minus as the true minus (reporting.numbers.printed), the terminal as typed
        ("give --missing-codes -99", "If \u221299 means 'no answer', read \u221299 as no answer", True),
        ('--keep "rider_id != Mean" --keep "rider_id != SD"', "leave them out with a row filter; statistics", False),
        ('--keep "Finished = True"', "keep only the rows where Finished = True", True))),
}
GROUPED = ("invariance", "align")
COMMANDS = {
    "fit": lambda m, o, d, out: ["fit", m, "--data", d],
    "compare": lambda m, o, d, out: ["compare", m, o, "--data", d],
    "invariance": lambda m, o, d, out: ["invariance", m, "--data", d, "--group-column", "district"],
    "scores": lambda m, o, d, out: ["scores", m, "--data", d, "--output", out.with_suffix(".csv")],
    "explore": lambda m, o, d, out: ["explore", "--data", d, "--items", ITEMS],
    "align": lambda m, o, d, out: ["align", m, "--data", d, "--group-column", "district"],
    "replicate": lambda m, o, d, out: ["replicate", m, "--data", d, "--seed", "5"],
}


@pytest.mark.parametrize("data", sorted(CASES))
@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_the_word_file_names_no_option_and_the_terminal_gives_the_advice(files, command, data, monkeypatch):
    # a Note is searched for words in tests only: the tool decides nothing by the words of a note (an internal error
    # if it did, failing the run below)
    def searched(note, text):
        raise AssertionError(f"the tool searched a note for {text!r}")

    monkeypatch.setattr(Note, "__contains__", searched)
    folder, model, other = files
    extra, advice = CASES[data]
    out = folder / f"{command}_{data}.docx"
    argv = [str(a) for a in COMMANDS[command](model, other, folder / data, out)] + extra + ["--docx", str(out)]
    terminal, errors = io.StringIO(), io.StringIO()
    with redirect_stdout(terminal), redirect_stderr(errors):
        code = cli.main(argv)
    assert code == 0, errors.getvalue()
    word = _word_text(out)
    assert not OPTION.search(word), word[max(0, OPTION.search(word).start() - 200):OPTION.search(word).end() + 60]
    said = " ".join(terminal.getvalue().replace("│", " ").split())
    flat = " ".join(word.split())
    for option, manuscript, grouped_too in advice:
        if command in GROUPED and not grouped_too:
            continue
        assert option in said, option
        assert manuscript in flat, manuscript


def test_the_scores_report_says_its_options_in_words_in_word(files):
    # item sums with a least share of 90% on answers with gaps (25 removed from each item, fixed seed): rows left
    # empty, no standard errors written; the terminal names --least-answered and --standard-errors, Word neither
    import numpy as np

    folder, model, _ = files
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rng = np.random.default_rng(16)
    for item in ITEMS.split(","):
        data.loc[rng.choice(len(data), 25, replace=False), item] = np.nan
    data.to_csv(folder / "gaps.csv", index=False)
    out = folder / "sums.docx"
    terminal = io.StringIO()
    with redirect_stdout(terminal):
        code = cli.main(["scores", str(model), "--data", str(folder / "gaps.csv"), "--method", "item-sum,regression",
                         "--least-answered", "0.9", "--output", str(folder / "sums.csv"), "--docx", str(out)])
    assert code == 0
    word = " ".join(_word_text(out).split())
    said = " ".join(terminal.getvalue().replace("│", " ").split())
    assert not OPTION.search(word)
    for option, words in (("(set by --least-answered)", "(a setting of the run)"),
                          ("must answer for its item sum and mean: 90% (--least-answered 0.9).",
                           "must answer for its item sum and mean: 90%."),
                          ("written with --standard-errors;", "not written in this run's scores file;")):
        assert option in said and words in word, (option, words)
    assert "answered fewer than 90% of the factor's items" in word


def test_the_word_file_names_no_command_in_the_modification_note(tmp_path):
    """Re-check s16 (N3): every full-information fit's Word file said "comparing the two fits ('cfa-tool compare')
    tests it": a command name, advice to the program's user, which the terminal keeps."""
    from pathlib import Path

    import cfa_tool
    from cfa_tool.reporting.docx_report import report_docx
    from cfa_tool.reporting.reports import report_of
    from cfa_tool.reporting.terminal import report_text

    root = Path(__file__).resolve().parents[2]
    result = cfa_tool.fit(root / "models" / "rider_three_factors.cfa", root / "demo" / "rider_survey.csv")
    report = report_of(result)
    document = docx.Document(io.BytesIO(report_docx(report)))
    text = " ".join([p.text for p in document.paragraphs]
                    + [c.text for t in document.tables for r in t.rows for c in r.cells])
    assert "comparing the two fits tests it" in text and "cfa-tool compare" not in text
    assert "('cfa-tool compare')" in " ".join(report_text(report).split())


@pytest.mark.parametrize("command", ["fit", "scores"])
def test_rows_read_past_by_the_names_and_first_data_row_options_are_said_without_them_in_word(tmp_path, command):
    """New-user trial s21: the note 'row 2 was not read as data (... as --first-data-row 3 asks)' reached the Word
    files of fit, invariance and scores; the note of --names-row too.  The terminal keeps the options."""
    base = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    header = ",".join(base.columns)
    questions = ",".join(f'"Question {k}"' for k in range(len(base.columns)))
    rows = base.to_csv(index=False, header=False).splitlines()
    data = tmp_path / "export.csv"
    data.write_text("\n".join(["Rider survey export" + "," * (len(base.columns) - 1), header, questions] + rows) + "\n")
    model = resource_dir("models") / "rider_three_factors.cfa"
    out = tmp_path / f"{command}.docx"
    argv = [command, str(model), "--data", str(data), "--names-row", "2", "--first-data-row", "4", "--docx", str(out)]
    argv += ["--output", str(tmp_path / "s.csv")] if command == "scores" else []
    terminal = io.StringIO()
    with redirect_stdout(terminal):
        assert cli.main(argv) == 0
    said = " ".join(terminal.getvalue().replace("│", " ").split())
    assert "as --names-row asks" in said and "as --first-data-row 4 asks" in said
    word = " ".join(_word_text(out).split())
    assert not OPTION.search(word), word[max(0, OPTION.search(word).start() - 200):OPTION.search(word).end() + 60]
    assert ("export.csv: row 3 was not read as data (between the column names in row 2 and the first row of data, "
            "4)") in word
    assert "export.csv: the column names were read from row 2; row 1 above it was not read" in word
