"""Columns read under new names (--rename OLD=NEW; rename={'OLD': 'NEW'} from Python): a follow-up sample whose file
names an item differently is used without editing the file, and every report says which column of which file was read
under which name.

The reference for every result is the same data under the names the model uses: the Holzinger & Swineford (1939) file
(tests/datasets, 301 pupils) with columns renamed by pandas (``DataFrame.rename``) and written to CSV, so a run on the
renamed file with --rename must give exactly what the run on the original file gives.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import build_parser
from cfa_tool.data.readers import read_data
from cfa_tool.data.renamed_columns import ColumnRename, column_renames
from cfa_tool.errors import DataError, OptionError
from tests.conftest import DATASETS, holzinger_swineford, run_cli

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
#: the columns of the renamed copy: as a follow-up file might name them
IN_FILE = {"x3": "x3r", "school": "School"}
RENAME = "x3r=x3,School=school"
NOTE = "columns 'x3r' read as 'x3' and 'School' read as 'school'"


def _flat(text: str) -> str:
    """Terminal text with its line breaks and box borders taken out (the report wraps long notes)."""
    return " ".join(text.replace("│", " ").split())


@pytest.fixture()
def files(tmp_path):
    """The original file, its renamed copy (by pandas), two models."""
    hs = holzinger_swineford()
    renamed = tmp_path / "renamed.csv"
    hs.rename(columns=IN_FILE).to_csv(renamed)
    model = tmp_path / "hs.cfa"
    model.write_text(MODEL)
    other = tmp_path / "hs2.cfa"
    other.write_text(MODEL + "covary x1, x4\n")
    return {"renamed": renamed, "model": model, "other": other, "tmp": tmp_path}


#: each command that reads a data file, as it runs fast on the renamed file (the options after --data's file)
COMMANDS = {
    "fit": ["{model}", "--data", "{renamed}", "--group-column", "school"],
    "check": ["{model}", "--data", "{renamed}", "--group-column", "school"],
    "compare": ["{model}", "{other}", "--data", "{renamed}"],
    "invariance": ["{model}", "--data", "{renamed}", "--group-column", "school"],
    "replicate": ["{model}", "--data", "{renamed}"],
    "scores": ["{model}", "--data", "{renamed}", "--output", "{tmp}/scores.csv"],
    "explore": ["--data", "{renamed}", "--items", "x1,x2,x3,x4,x5,x6,x7,x8,x9", "--factors", "3"],
    "bootstrap": ["{model}", "--data", "{renamed}", "--replications", "20", "--workers", "1"],
    "cutoffs": ["{model}", "--data", "{renamed}", "--replications", "20", "--workers", "1"],
    "align": ["{model}", "--data", "{renamed}", "--group-column", "school", "--trials", "0"],
}


def _reads_data(parser) -> bool:
    return any(flag in parser._option_string_actions for flag in ("--data", "--calibration", "--validation"))


def test_every_command_that_reads_a_data_file_takes_the_option():
    """Found through the parser, not listed by hand: a command that reads data and lacks --rename fails here, and a
    command listed below that reads none does too."""
    commands = build_parser()._subparsers._group_actions[0].choices
    readers = {name for name, parser in commands.items() if _reads_data(parser)}
    assert readers == set(COMMANDS)
    assert all("--rename" in commands[name]._option_string_actions for name in readers)
    assert "--validation-rename" in commands["replicate"]._option_string_actions


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_every_command_reads_the_renamed_columns_and_says_so_in_every_report(command, files, capsys):
    argv = [command] + [a.format(**files) for a in COMMANDS[command]]
    saved = files["tmp"] / "result.json"
    code, out, err = run_cli(argv + ["--rename", RENAME, "--json", saved, "--markdown", files["tmp"] / "r.md"], capsys)
    assert code == 0, err
    said = f"renamed.csv: {NOTE} (--rename {RENAME})"
    assert said in _flat(out)
    if command in ("fit", "compare", "invariance"):  # their methods paragraphs name the columns renamed
        assert "the columns named x3r and School were analysed as x3 and school." in _flat(out)
    assert said in json.dumps(json.loads(saved.read_text()), ensure_ascii=False)
    assert said in (files["tmp"] / "r.md").read_text().replace("\\_", "_")
    # without the option the model's x3 (or the group column) is not a column of the file
    (files["tmp"] / "scores.csv").unlink(missing_ok=True)
    code, _, err = run_cli(argv, capsys)
    assert code == 2 and "renamed.csv" in err.splitlines()[0]


def test_a_renamed_file_gives_the_fit_of_the_original_names(files, capsys):
    """The reference: the fit of the original file, whose columns carry the model's names."""
    original = cfa_tool.fit(MODEL, str(HS_FILE), group="school")
    renamed = cfa_tool.fit(MODEL, str(files["renamed"]), group="school", rename={"x3r": "x3", "School": "school"})
    assert [r.estimate for r in renamed.estimates] == pytest.approx([r.estimate for r in original.estimates], abs=1e-12)
    assert renamed.fit.chi_square == pytest.approx(original.fit.chi_square, abs=1e-10)
    assert renamed.data.renamed == (ColumnRename("x3r", "x3"), ColumnRename("School", "school"))
    assert renamed.data.to_dict()["renamed_columns"] == [{"in_file": "x3r", "read_as": "x3"},
                                                         {"in_file": "School", "read_as": "school"}]
    assert "renamed_columns" not in original.data.to_dict()
    # the same from the text the command line takes, and from a data frame
    as_text = cfa_tool.fit(MODEL, str(files["renamed"]), group="school", rename=RENAME)
    assert as_text.fit.chi_square == renamed.fit.chi_square
    frame = holzinger_swineford().rename(columns=IN_FILE)
    by_frame = cfa_tool.fit(MODEL, frame, group="school", rename={"x3r": "x3", "School": "school"})
    assert by_frame.fit.chi_square == pytest.approx(original.fit.chi_square, abs=1e-10)
    assert f"<data frame>: {NOTE} (rename={{'x3r': 'x3', 'School': 'school'}})" in map(str, by_frame.warnings)


def test_the_methods_paragraph_html_and_word_name_the_renamed_columns(files, capsys):
    html, docx, md = (files["tmp"] / name for name in ("r.html", "r.docx", "r.md"))
    code, out, err = run_cli(["fit", files["model"], "--data", files["renamed"], "--rename", "x3r=x3", "--html", html,
                           "--docx", docx, "--markdown", md], capsys)
    assert code == 0, err
    sentence = f"In {files['renamed']}, the column named x3r was analysed as x3."
    assert sentence.replace(" ", "") in "".join(out.split())  # (a long path may be wrapped anywhere)
    # the files for others name the data file by its name, not its folders (re-check s17, 07)
    sentence = "In renamed.csv, the column named x3r was analysed as x3."
    assert sentence in md.read_text().replace("\\_", "_")
    import html as markup

    page = markup.unescape(html.read_text())
    assert sentence in page and "renamed.csv: column 'x3r' read as 'x3' (--rename x3r=x3)" in page
    import docx as word

    text = "\n".join(p.text for p in word.Document(str(docx)).paragraphs)
    # the Word file is a manuscript: the note names no option (note_parts.Command)
    assert sentence in text and "renamed.csv: column 'x3r' read as 'x3'" in text and "--rename" not in text


def test_renamed_before_any_option_looks_at_the_names(tmp_path):
    """Group, weights, id, row filters and ordinal items all named by their new names: the results equal those of
    the original names (pandas' rename the reference)."""
    hs = holzinger_swineford()
    k = np.arange(len(hs))
    hs = hs.assign(w=1.0 + (k % 3), pupil=[f"{i:03d}" for i in hs["id"]])
    renamed = hs.rename(columns={"school": "SCHOOL", "w": "WT", "pupil": "PUPIL", "x3": "x3r", "grade": "GRADE"})
    path = tmp_path / "renamed.csv"
    renamed.to_csv(path, index=False)
    plain = tmp_path / "plain.csv"
    hs.to_csv(plain, index=False)
    names = {"SCHOOL": "school", "WT": "w", "PUPIL": "pupil", "x3r": "x3", "GRADE": "grade"}
    options = {"weights": "w", "keep": ["grade = 7"]}
    original = cfa_tool.fit(MODEL, str(plain), group="school", **options)
    read = cfa_tool.fit(MODEL, str(path), group="school", rename=names, **options)
    assert read.fit.chi_square == pytest.approx(original.fit.chi_square, abs=1e-10)
    assert [g.label for g in read.groups] == [g.label for g in original.groups] == ["Grant-White", "Pasteur"]
    scored = cfa_tool.scores(MODEL, str(path), id_column="pupil", rename=names)
    assert scored.table.iloc[:, 0].tolist()[:3] == hs["pupil"].tolist()[:3]  # '001' kept as text, as without renames
    ordinal = hs.assign(**{x: np.clip(np.round(hs[x]), 0, 6) for x in ("x1", "x2", "x3")})
    ordinal.rename(columns={"x3": "x3r"}).to_csv(path, index=False)
    both = [cfa_tool.fit(MODEL, source, ordinal=["x1", "x2", "x3"], **extra) for source, extra in (
        (ordinal, {}), (str(path), {"rename": {"x3r": "x3"}}))]
    assert both[1].fit.chi_square == pytest.approx(both[0].fit.chi_square, abs=1e-8)


def test_no_answer_words_in_a_renamed_item_are_read_as_its_own(tmp_path):
    """An item column's text that says no answer is read as missing in the model's items only: the items are named
    by their new names, the file by its old ones, and the rename keeps them the same column."""
    hs = holzinger_swineford().astype({"x3": object})
    hs.loc[hs.index[4], "x3"] = "refused"
    plain, renamed = tmp_path / "plain.csv", tmp_path / "renamed.csv"
    hs.to_csv(plain)
    hs.rename(columns={"x3": "x3r"}).to_csv(renamed)
    checked = [cfa_tool.check(MODEL, str(plain)), cfa_tool.check(MODEL, str(renamed), rename={"x3r": "x3"})]
    assert checked[0].complete == checked[1].complete == len(hs) - 1


@pytest.mark.parametrize("rename, words", [
    ("x3R=x3", "renamed.csv: --rename x3R=x3: there is no column 'x3R' in the file; did you mean 'x3r'?"),
    ("x3=x3_new", "renamed.csv: --rename x3=x3_new: there is no column 'x3' in the file; did you mean 'x3r'?"),
    ("x1=x2", "renamed.csv: --rename x1=x2: the file already has a column 'x2'"),
    ("x3r=x3,x3r=x9", "renamed.csv: --rename renames the column 'x3r' twice"),
    ("x3r=x3,x1=x3", "renamed.csv: --rename gives two columns the name 'x3'"),
    ("x3r=x3r", "renamed.csv: --rename x3r=x3r changes nothing"),
    ("x3r", "--rename takes OLD=NEW"),
])
def test_a_rename_that_cannot_apply_is_a_one_line_error(files, capsys, rename, words):
    before = files["renamed"].read_bytes()
    code, out, err = run_cli(["fit", files["model"], "--data", files["renamed"], "--rename", rename], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1 and words in err, err
    assert files["renamed"].read_bytes() == before and not out


def test_a_file_that_needs_no_rename_is_told_so(files, capsys):
    code, _, err = run_cli(["fit", files["model"], "--data", HS_FILE, "--rename", "x3r=x3"], capsys)
    assert code == 2 and "there is no column 'x3r' in the file, which names the column 'x3' already" in err


def test_two_columns_may_swap_names(tmp_path):
    """NEW may be a column of the file when that column is renamed too: x1 and x2 swapped give the fit of the
    original with x1 and x2 swapped in the model (the reference)."""
    hs = holzinger_swineford()
    path = tmp_path / "hs.csv"
    hs.to_csv(path)
    swapped = cfa_tool.fit(MODEL, str(path), rename={"x1": "x2", "x2": "x1"})
    reference = cfa_tool.fit(MODEL.replace("x1, x2", "x2, x1"), str(path))
    assert swapped.fit.chi_square == pytest.approx(reference.fit.chi_square, abs=1e-10)


def test_replicate_renames_each_file_by_its_own_option(files, capsys):
    hs = holzinger_swineford()
    calibration, validation = files["tmp"] / "cal.csv", files["tmp"] / "val.csv"
    hs.iloc[:150].rename(columns={"x5": "x5a"}).to_csv(calibration)
    hs.iloc[150:].rename(columns={"x3": "x3_r"}).to_csv(validation)
    code, out, err = run_cli(["replicate", files["model"], "--calibration", calibration, "--validation", validation,
                           "--rename", "x5a=x5", "--validation-rename", "x3_r=x3"], capsys)
    assert code == 0, err
    assert "cal.csv: column 'x5a' read as 'x5' (--rename x5a=x5)" in _flat(out)
    assert "val.csv: column 'x3_r' read as 'x3' (--validation-rename x3_r=x3)" in _flat(out)
    # the reference: the same halves under the model's names
    hs.iloc[:150].to_csv(calibration)
    hs.iloc[150:].to_csv(validation)
    from cfa_tool.workflows.replication import replicate

    plain = replicate(MODEL, str(calibration), str(validation))
    hs.iloc[150:].rename(columns={"x3": "x3_r"}).to_csv(validation)
    read = replicate(MODEL, str(calibration), str(validation), validation_rename={"x3_r": "x3"})
    assert read.calibration_result.fit.chi_square == pytest.approx(plain.calibration_result.fit.chi_square, abs=1e-10)
    assert read.loose.fit.chi_square == pytest.approx(plain.loose.fit.chi_square, abs=1e-10)
    code, _, err = run_cli(["replicate", files["model"], "--data", calibration, "--validation-rename", "x3_r=x3"], capsys)
    assert code == 2 and "--validation-rename renames columns of the --validation file" in err


def test_summary_statistics_refuse_the_option():
    hs = holzinger_swineford()[[f"x{i}" for i in range(1, 10)]]
    with pytest.raises(OptionError, match=r"columns read under new names \(rename=\.\.\.\) cannot apply"):
        cfa_tool.fit(MODEL, covariance=hs.cov(), n_obs=len(hs), rename={"x3r": "x3"})


def test_the_option_is_a_keyword_of_every_python_entry_point():
    from cfa_tool.options import own_keywords
    from cfa_tool.workflows import alignment, bootstrap, compare, cutoffs, explore, factor_scores, invariance, replication

    for function in (cfa_tool.fit, cfa_tool.check, compare.compare, invariance.invariance, replication.split_half,
                     factor_scores.scores, factor_scores.score_with_fit, factor_scores.score_with_saved_fit,
                     explore.explore, bootstrap.bootstrap, cutoffs.cutoffs, alignment.align):
        assert "rename" in own_keywords(function), function.__name__
    assert {"rename", "validation_rename"} <= set(own_keywords(replication.replicate))


def test_the_renames_as_python_and_the_command_line_give_them():
    assert column_renames({"a": "b"}) == column_renames("a=b") == column_renames(["a=b"]) == (ColumnRename("a", "b"),)
    assert column_renames(['"item, one"=i1', "x=y"]) == (ColumnRename("item, one", "i1"), ColumnRename("x", "y"))
    assert column_renames(None) == column_renames([]) == ()
    with pytest.raises(OptionError, match="must map column names"):
        column_renames({"a": 1})
    with pytest.raises(OptionError, match="leaves a name empty"):
        column_renames("a=")


def test_an_excel_cell_is_named_by_its_letter_in_a_renamed_column(tmp_path):
    """The sheet's column letters follow the rename: a bad cell is named where the sheet has it (column D: x3r is the
    third item after the id column A... the letter read from openpyxl's own layout of the written sheet)."""
    from openpyxl import load_workbook

    hs = holzinger_swineford()[["id"] + [f"x{i}" for i in range(1, 10)]].astype({"x3": object})
    hs.iloc[4, hs.columns.get_loc("x3")] = "x"
    path = tmp_path / "hs.xlsx"
    hs.rename(columns={"x3": "x3r"}).to_excel(path, index=False)
    sheet = load_workbook(path).active
    letter = next(cell.column_letter for cell in sheet[1] if cell.value == "x3r")
    with pytest.raises(DataError, match=rf"cell {letter}6"):
        cfa_tool.fit(MODEL, str(path), rename={"x3r": "x3"})
    loaded = read_data(path, renames=(ColumnRename("x3r", "x3"),))
    assert "x3" in loaded.frame.columns and "x3r" not in loaded.frame.columns


def test_a_model_name_that_a_rename_took_away_is_said_to_be_renamed():
    # review s12: `--rename x1=first` with a model naming x1 said only "unknown variable 'x1' (not a column of ...)",
    # though x1 is a column of the file: the message names the renames
    from cfa_tool.errors import ModelError

    with pytest.raises(ModelError, match=r"unknown variable 'x1' \(not a column of holzinger_swineford_1939\.csv; "
                                         r"its columns read under new names: 'x1' as 'first'\)"):
        cfa_tool.fit(MODEL, HS_FILE, rename={"x1": "first"})


@pytest.mark.parametrize("option", [["--keep", "School = Pasteur"], ["--id", "School"], ["--group-column", "School"],
                                    ["--weights", "School"], ["--cluster", "School"], ["--strata", "School"],
                                    ["--missing-helpers", "School"]])
def test_an_option_naming_a_column_by_its_old_name_is_told_it_was_renamed(option, files, capsys):
    """A column option that names a column by the name --rename took away is told the new name, as the model's
    unknown-variable error is (review s12: it said only that the file has no such column, which it has)."""
    copy, model = files["renamed"], files["model"]
    code, out, err = run_cli(["fit", model, "--data", copy, "--rename", RENAME] + option, capsys)
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    assert "the column 'School' was renamed to 'school' by --rename School=school: name it 'school'" in err, err


def test_a_keyword_naming_a_column_by_its_old_name_is_told_it_was_renamed(files):
    """From Python the message names the keyword as given (rename={...})."""
    frame = pd.read_csv(files["renamed"], index_col=0)
    for keywords in ({"group": "School"}, {"keep": "School = Pasteur"}, {"id_column": "School"}):
        with pytest.raises(OptionError, match=r"the column 'School' was renamed to 'school' by "
                                              r"rename=\{'School': 'school'\}: name it 'school'"):
            cfa_tool.fit(MODEL, frame, rename={"School": "school", "x3r": "x3"}, **keywords)
