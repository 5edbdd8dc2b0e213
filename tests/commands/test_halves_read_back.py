"""A half read back under another handling of rows with gaps, and the sheet a halves file records.

replicate --data draws its halves from the rows fit would analyse: with --incomplete-rows listwise the rows with an
answer to every model variable, else every row with an answer.  A half of complete rows is read back by a run that
leaves rows with gaps out too (fit --incomplete-rows listwise; check, which describes the rows), and refused by one
that keeps them, naming the handling and what to run (review s14: the refusal blamed the reading options).  Check
values: the rows pandas selects from the saved halves file, fitted alone (the half's rows are complete, so every
handling of gaps fits them alike), and replicate's own calibration fit of half A.  Data: the Holzinger & Swineford
(1939) rows (tests/datasets) with gaps written in by this test (every 9th row misses x4, rows 40 and 41 miss every
item)."""

from __future__ import annotations

import io
from contextlib import redirect_stderr, redirect_stdout

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool import cli
from cfa_tool.data.halves import RandomHalf, draw_halves, halves_text
from cfa_tool.errors import DataError
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.commands.test_fit_one_half import two_waves
from tests.commands.test_halves_file import _run
from tests.conftest import DATASETS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
TWIN = MODEL + "covary x1, x4\n"  # a second model: compare refuses a model compared with itself
ITEMS = [f"x{k}" for k in range(1, 10)]


@pytest.fixture(scope="module")
def gaps(tmp_path_factory):
    """The Holzinger & Swineford rows with gaps: 34 rows miss x4 (every 9th), two rows miss every item."""
    folder = tmp_path_factory.mktemp("gaps")
    data = pd.read_csv(HS_FILE)
    data.loc[data.index[::9], "x4"] = None
    data.loc[[38, 39], ITEMS] = None  # file rows 40 and 41 (the header is row 1)
    path = folder / "gaps.csv"
    data.to_csv(path, index=False)
    return folder, path, data


def _saved_rows(halves, name: str):
    saved = pd.read_csv(halves)
    return saved.loc[saved["half"] == name, "row"].to_numpy()


def _complete_halves(gaps, capsys, name: str):
    """The halves file ``name`` (in the fixture's folder) that replicate --data --incomplete-rows listwise --seed 3
    writes from the rows with an answer to every item, and the model file; written once."""
    folder, data, _ = gaps
    model, halves = folder / "hs.cfa", folder / name
    model.write_text(MODEL)
    if not halves.exists():
        code, _, err = _run(["replicate", model, "--data", data, "--incomplete-rows", "listwise", "--seed", 3,
                             "--halves-file", halves], capsys)
        assert code == 0, err
    return model, halves


def test_halves_of_the_complete_rows_read_back_when_rows_with_gaps_are_left_out(gaps, capsys):
    folder, data, frame = gaps
    model, halves = _complete_halves(gaps, capsys, "complete.csv")
    complete = frame.dropna(subset=ITEMS)
    assert len(pd.read_csv(halves)) == len(complete) == 301 - 34 - 2
    rows_a = _saved_rows(halves, "A")
    direct = cfa_tool.fit(MODEL, frame.iloc[rows_a - 2])  # pandas' selection of the saved rows (lines to positions)
    pair = cfa_tool.split_half(MODEL, str(data), seed=3, missing="listwise")
    half = cfa_tool.fit(MODEL, str(data), keep=RandomHalf(str(halves), "A"), missing="listwise")
    assert half.n_obs == direct.n_obs == pair[0].calibration_result.n_obs == len(rows_a) == 133
    assert half.fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-9)
    assert half.fit.chi_square == pytest.approx(pair[0].calibration_result.fit.chi_square, rel=1e-9)
    note = next(n for n in half.warnings if "half A (seed 3)" in n)
    assert ("133 of the 265 rows split at random into two halves, those with an answer to every model variable "
            "(34 rows with gaps left out before the split, as missing='listwise' leaves them out)") in note
    assert "two random halves of the rows with an answer to every model variable, drawn with seed 3" in \
        " ".join(methods_paragraph(half).split())

    # a run that keeps rows with gaps is refused, naming the handling and what to run (exit 2, one line)
    code, _, err = _run(["fit", model, "--data", data, "--half", halves, "A"], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert (f"{halves} split the 265 rows of {data} with an answer to every model variable: it leaves out rows 2, 11, "
            f"20, 29, 38 and 29 more, which miss some answers, as --incomplete-rows listwise leaves them out, and this "
            f"run keeps the rows with gaps; give --incomplete-rows listwise") in err
    assert "replicate MODEL --data FILE --seed 3 --halves-file NEW.csv, without --incomplete-rows listwise" in err
    with pytest.raises(DataError, match=r"this run keeps the rows with gaps; give missing='listwise'") as refused:
        cfa_tool.fit(MODEL, str(data), keep=RandomHalf(str(halves), "A"), missing="full-information")
    # a Python caller is told the function that uses the same halves, and that the command line writes their file
    assert ("(from Python, split_half(model, data, seed=3), without missing='listwise', uses the same halves without "
            "a file; on the command line, cfa-tool replicate MODEL --data FILE --seed 3 --halves-file NEW.csv, "
            "without --incomplete-rows listwise)") in str(refused.value)
    # check describes the rows of the half: all complete, the note says how they were drawn
    found = cfa_tool.check(MODEL, str(data), keep=RandomHalf(str(halves), "B"))
    assert found.rows == 265 - 133
    assert any("34 rows with gaps left out before the split, as missing='listwise' leaves them out" in n
               for n in found.notes)


def test_halves_of_every_row_with_an_answer_read_back_under_either_handling(gaps, capsys):
    folder, data, frame = gaps
    model, halves = folder / "hs.cfa", folder / "answered.csv"
    model.write_text(MODEL)
    code, _, err = _run(["replicate", model, "--data", data, "--seed", 3, "--halves-file", halves], capsys)
    assert code == 0, err
    assert len(pd.read_csv(halves)) == 299  # rows 40 and 41 answer no item, and are split into neither half
    rows_b = _saved_rows(halves, "B")
    for missing in ("listwise", None):
        half = cfa_tool.fit(MODEL, str(data), keep=RandomHalf(str(halves), "B"), missing=missing)
        chosen = frame.iloc[rows_b - 2]
        direct = cfa_tool.fit(MODEL, chosen, missing=missing)
        assert half.n_obs == direct.n_obs == (len(chosen.dropna(subset=ITEMS)) if missing else len(rows_b))
        assert half.fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-9)
        assert not any("left out before the split" in n for n in half.warnings)


def test_explore_halves_of_every_row_read_back_under_either_handling(gaps, capsys):
    folder, data, frame = gaps
    halves = folder / "explored.csv"
    code, _, err = _run(["explore", "--data", data, "--items", "x1..x9", "--factors", 3, "--split", 4,
                         "--replications", 5, "--halves-file", halves], capsys)
    assert code == 0, err
    assert len(pd.read_csv(halves)) == 301
    for missing in ("listwise", None):
        half = cfa_tool.fit(MODEL, str(data), keep=RandomHalf(str(halves), "confirmation"), missing=missing)
        direct = cfa_tool.fit(MODEL, frame.iloc[_saved_rows(halves, "confirmation") - 2], missing=missing)
        assert half.n_obs == direct.n_obs
        assert half.fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-9)
    # halves that leave out a complete row are of another selection of rows, whatever the handling of gaps
    rows = np.array([r for r in range(2, 303) if r != 3])  # file row 3 answers every item
    first, second = draw_halves(len(rows), 4)
    fewer = folder / "fewer.csv"
    fewer.write_text(halves_text([("exploration", tuple(rows[first])), ("confirmation", tuple(rows[second]))], 4,
                                 data))
    with pytest.raises(DataError, match=r"split 300 rows, and .* holds 301; it leaves out row 3: the halves are of "
                                        r"another selection of rows; give the names_row=\.\.\., first_data_row="
                                        r"\.\.\. and keep=\.\.\. of the run that drew them \(this run reads their sheet\)$"):
        cfa_tool.fit(MODEL, str(data), keep=RandomHalf(str(fewer), "confirmation"), missing="listwise")


def test_the_sheet_read_is_recorded_and_old_halves_files_keep_working(tmp_path, monkeypatch, capsys):
    """The halves file records the sheet read (the first shown when none is asked for), and a half read back is
    checked by it without opening the workbook again; a file written before s15 (its last column the sheet asked
    for, 'sheet') is read as it was."""
    book = two_waves(tmp_path)
    halves = tmp_path / "halves.csv"
    code, _, err = _run(["explore", "--data", book, "--items", "x1..x9", "--factors", 3, "--split", 5,
                         "--replications", 5, "--halves-file", halves], capsys)
    assert code == 0, err
    saved = pd.read_csv(halves, keep_default_na=False)
    assert set(saved["sheet_read"]) == {"Wave1"}  # no --sheet: the first sheet, by name
    old = tmp_path / "old.csv"
    saved.rename(columns={"sheet_read": "sheet"}).assign(sheet="").to_csv(old, index=False)  # no sheet asked for

    import cfa_tool.data.halves as halves_module

    def opened(*_):
        raise AssertionError("the workbook was opened again to learn its sheet")

    with monkeypatch.context() as patch:
        patch.setattr(halves_module, "sheet_read", opened)
        for sheet in (None, "Wave1"):
            half = cfa_tool.fit(MODEL, str(book), sheet=sheet, keep=RandomHalf(str(halves), "confirmation"))
            assert half.n_obs == 150
        with pytest.raises(DataError, match="holds the halves of the sheet 'Wave1' of 'waves.xlsx', and this run "
                                            "reads the sheet 'Wave2': give sheet='Wave1'"):
            cfa_tool.fit(MODEL, str(book), sheet="Wave2", keep=RandomHalf(str(halves), "confirmation"))
    # the file of an earlier version: the sheet asked for (none: the first shown) is learnt from the workbook
    assert cfa_tool.fit(MODEL, str(book), keep=RandomHalf(str(old), "confirmation")).n_obs == 150
    with pytest.raises(DataError, match="holds the halves of the sheet 'Wave1'"):
        cfa_tool.fit(MODEL, str(book), sheet="Wave2", keep=RandomHalf(str(old), "confirmation"))


#: every Python workflow that fits the rows it reads, called on a half (``keep``) with a handling of rows with gaps
#: (``missing``: None, the default, keeps them); replications as few as each allows
WORKFLOWS = {
    "compare": lambda data, keep, missing: cfa_tool.compare([MODEL, TWIN], data, keep=keep, missing=missing),
    "invariance": lambda data, keep, missing: cfa_tool.invariance(MODEL, data, group="school", keep=keep,
                                                                  missing=missing),
    "align": lambda data, keep, missing: cfa_tool.align(MODEL, data, group="school", keep=keep, missing=missing,
                                                        trials=0),
    "bootstrap": lambda data, keep, missing: cfa_tool.bootstrap(MODEL, data, replications=10, keep=keep,
                                                                missing=missing),
    "scores": lambda data, keep, missing: cfa_tool.scores(MODEL, data, keep=keep, missing=missing),
    "split_half": lambda data, keep, missing: cfa_tool.split_half(MODEL, data, keep=keep, missing=missing)[0],
}


@pytest.mark.parametrize("workflow", sorted(WORKFLOWS))
def test_every_workflow_reads_a_half_of_the_complete_rows_by_fits_rule(gaps, capsys, workflow):
    # re-check s15 (reading): in Python only fit refused a half of the complete rows under a handling that keeps rows
    # with gaps; the others analysed it and their methods text could say that rows with gaps were kept
    data = gaps[1]
    keep = [RandomHalf(str(_complete_halves(gaps, capsys, "complete.csv")[1]), "A")]
    run = WORKFLOWS[workflow]
    for missing in (None, "full-information"):
        with pytest.raises(DataError, match=r"which miss some answers, as missing='listwise' leaves them out, and "
                                            r"this run keeps the rows with gaps; give missing='listwise'"):
            run(str(data), keep, missing)
    said = str(run(str(data), keep, "listwise").to_dict())
    assert ("133 of the 265 rows split at random into two halves, those with an answer to every model variable "
            "(34 rows with gaps left out before the split, as missing='listwise' leaves them out)") in said


def test_a_workflow_given_the_half_fits_the_rows_pandas_selects(gaps, capsys):
    folder, data, frame = gaps
    halves = _complete_halves(gaps, capsys, "complete.csv")[1]
    direct = cfa_tool.fit(MODEL, frame.iloc[_saved_rows(halves, "A") - 2])  # pandas' selection of the saved rows
    compared = cfa_tool.compare([MODEL, TWIN], str(data), keep=[RandomHalf(str(halves), "A")], missing="listwise")
    assert compared.results[0].n_obs == direct.n_obs == 133
    assert compared.results[0].fit.chi_square == pytest.approx(direct.fit.chi_square, rel=1e-9)


@pytest.fixture(scope="module")
def grouped_halves(gaps, tmp_path_factory):
    """The rows with gaps with a group column, the model, a twin and the halves of the complete rows that replicate
    --data --incomplete-rows listwise --seed 3 writes (133 and 132 of the 265)."""
    folder = tmp_path_factory.mktemp("grouped_halves")
    frame = gaps[2].assign(school=np.where(np.arange(len(gaps[2])) % 2, "north", "south"))
    data, model, twin, halves = folder / "grouped.csv", folder / "hs.cfa", folder / "twin.cfa", folder / "halves.csv"
    frame.to_csv(data, index=False)
    model.write_text(MODEL)
    twin.write_text(TWIN)
    out = io.StringIO()
    with redirect_stdout(out), redirect_stderr(io.StringIO()):
        assert cli.main(["replicate", str(model), "--data", str(data), "--incomplete-rows", "listwise", "--seed", "3",
                         "--halves-file", str(halves)]) == 0
    return folder, data, model, twin, halves, frame


@pytest.mark.parametrize("command", ["compare", "invariance", "scores", "bootstrap", "cutoffs", "replicate", "explore",
                                     "align"])
def test_every_command_that_selects_rows_takes_the_half_of_a_halves_file(grouped_halves, command):
    # new-user trial s17: explore --split says to confirm on the confirmation half, but only fit and check took
    # --half; compare (a rival model), invariance, scores, bootstrap, cutoffs and replicate refused it as an
    # unrecognized argument, so a command-line user compared rival models on every row, the exploration half
    # included.  Check: the command analyses the half's rows (for scores: scores exactly the rows pandas selects from
    # the saved halves file) and its report names the half.
    folder, data, model, twin, halves, frame = grouped_halves
    chosen = _saved_rows(halves, "A")
    argv = {"compare": ["compare", model, twin],
            "invariance": ["invariance", model, "--group-column", "school"],
            "scores": ["scores", model, "--output", folder / "scores.csv"],
            "bootstrap": ["bootstrap", model, "--replications", 20],
            "cutoffs": ["cutoffs", model, "--replications", 20],
            "replicate": ["replicate", model],
            "explore": ["explore", "--items", "x1..x9", "--factors", 3, "--replications", 5],
            "align": ["align", model, "--group-column", "school"]}[command]
    rows = [] if command == "explore" else ["--incomplete-rows", "listwise"]
    out = io.StringIO()
    with redirect_stdout(out), redirect_stderr(io.StringIO()) as err:
        code = cli.main([str(a) for a in argv + ["--data", data, "--half", halves, "A"] + rows])
    assert code == 0, err.getvalue()
    said = " ".join(out.getvalue().split())
    assert f"Only the rows of half A (seed 3) of {halves}" in said, said[:800]
    assert "133 of the 265 rows split at random into two halves" in said
    if command == "scores":
        written = pd.read_csv(folder / "scores.csv")
        assert written.index[written.iloc[:, 0].notna()].tolist() == sorted(chosen - 2)
