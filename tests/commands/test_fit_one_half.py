"""``--half HALVES.csv NAME`` of fit and check: the rows of one random half that explore --split wrote with
--halves-file, read from the data file itself and checked against it (the same contents by SHA-256, the same rows
split), so that an edited draft model is fitted on the confirmation half alone.  Check values: the rows of the half
selected by pandas from the saved file (not by this tool's reader) and fitted alone give the same N and chi-square;
explore's own fit of its draft on the confirmation half gives them too.  Data: the Holzinger & Swineford (1939) rows
(tests/datasets) and the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed)."""

from __future__ import annotations

import json
import shutil

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.halves import RandomHalf
from cfa_tool.errors import DataError, OptionError
from tests.commands.test_halves_file import _run
from tests.conftest import DATASETS

# these tests read words with a temporary path among them in the terminal report
pytestmark = pytest.mark.usefixtures("wide_terminal")

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
EDITED = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


@pytest.fixture()
def explored(tmp_path, capsys):
    """The Holzinger & Swineford rows copied, explored with --split 11 and their halves saved."""
    data = tmp_path / "hs.csv"
    shutil.copy(HS_FILE, data)
    halves, js = tmp_path / "halves.csv", tmp_path / "explore.json"
    code, out, err = _run(["explore", "--data", data, "--items", "x1..x9", "--factors", 3, "--split", 11,
                           "--halves-file", halves, "--json", js], capsys)
    assert code == 0, err
    assert f"--half {halves} confirmation" in out  # the report's last lines say how to fit the half
    return data, halves, json.loads(js.read_text())


def test_fit_of_the_confirmation_half_is_a_fit_of_its_rows_alone(explored, tmp_path, capsys):
    data, halves, explore_json = explored
    model = tmp_path / "edited.cfa"
    model.write_text(EDITED)
    js = tmp_path / "fit.json"
    code, out, err = _run(["fit", model, "--data", data, "--half", halves, "confirmation", "--json", js], capsys)
    assert code == 0, err
    result = json.loads(js.read_text())
    # the reference: the rows pandas selects from the saved file (lines of the CSV; the header is line 1)
    saved = pd.read_csv(halves)
    lines = saved.loc[saved["half"] == "confirmation", "row"].to_numpy()
    direct = cfa_tool.fit(EDITED, pd.read_csv(data).iloc[lines - 2])
    assert result["n_obs"] == direct.n_obs == len(lines) == 150  # 301 rows: the exploration half takes 151
    assert result["fit"]["chi_square"] == pytest.approx(direct.fit.chi_square, rel=1e-9)
    # explore fitted its draft (the same three factors here) on the same rows
    draft = explore_json["split"]["confirmation"]
    assert draft["n_obs"] == 150
    assert result["data"]["row_filters"] == [f"confirmation half (seed 11) of {halves}"]
    assert result["data"]["rows_in_file"] == 301
    # the data line, the note and the methods paragraph name the half, the seed and the rows
    flat = " ".join(out.split())
    assert f"150 rows analysed of 150 kept by the row filter 'confirmation half (seed 11) of {halves}' (301 rows" in flat
    assert f"Only the rows of the confirmation half (seed 11) of {halves} are analysed: 150 of the 301 rows" in flat
    assert (f"N = 150 of the 301 rows in the data file, those where the row fell in the confirmation half of two "
            f"random halves, drawn with seed 11 and listed in {halves.name}") in flat  # the file's name, not its
    # folder (s18), and no parentheses inside the sample's own (s18)
    start = flat.index("N = 150 of the 301 rows in the data file")
    assert str(halves.parent) not in flat[start:start + 400]


def test_check_and_python_read_the_same_half(explored):
    data, halves, _ = explored
    found = cfa_tool.check(EDITED, str(data), keep=RandomHalf(str(halves), "exploration"))
    assert found.rows == 151 and found.rows_in_file == 301
    assert any("exploration half (seed 11)" in note for note in found.notes)


def test_halves_of_another_file_or_selection_are_refused(explored, tmp_path):
    data, halves, _ = explored
    other = tmp_path / "other.csv"
    pd.read_csv(data).iloc[::-1].to_csv(other, index=False)  # the same number of rows, other contents
    with pytest.raises(DataError, match="holds the halves of a data file with other contents"):
        cfa_tool.fit(EDITED, str(other), keep=RandomHalf(str(halves), "confirmation"))
    # 146 boys (sex = 1) of 301 pupils, as the data file holds them
    with pytest.raises(DataError, match=r"split 301 rows, and .* holds 146 after the row filters"):
        cfa_tool.fit(EDITED, str(data), keep=["sex = 1", RandomHalf(str(halves), "confirmation")])
    with pytest.raises(OptionError, match="holds the halves 'confirmation' and 'exploration', not 'B'"):
        cfa_tool.fit(EDITED, str(data), keep=RandomHalf(str(halves), "B"))
    with pytest.raises(OptionError, match="give that file's path as the data, not a data frame"):
        cfa_tool.fit(EDITED, pd.read_csv(data), keep=RandomHalf(str(halves), "confirmation"))


@pytest.mark.parametrize("text, words", [
    ("row,half\n2,confirmation\n", "line 1: a halves file of an earlier version"),
    ("a,b,c\n", "line 1: not a halves file"),
    ("row,half,seed,data_file,data_sha256\n2,A,1,x.csv,00\n", "line 1: a halves file of an earlier version"),
    ("row,half,seed,data_file,data_sha256,sheet\n2,A,1,x.csv,00,\n2,B,1,x.csv,00,\n", "line 3: row 2 is listed twice (line 2"),
    ("row,half,seed,data_file,data_sha256,sheet\n2,A,1,x.csv,00,\n3,B,2,x.csv,00,\n", "line 3: another seed or data file"),
    ("row,half,seed,data_file,data_sha256,sheet\nx,A,1,x.csv,00,\n", "line 2, column row: 'x' is not a row number"),
])
def test_a_broken_halves_file_is_a_one_line_error_with_its_line(tmp_path, capsys, text, words):
    halves = tmp_path / "halves.csv"
    halves.write_text(text)
    model = tmp_path / "m.cfa"
    model.write_text(EDITED)
    code, _, err = _run(["check", model, "--data", HS_FILE, "--half", halves, "A"], capsys)
    assert code == 2 and words in err.splitlines()[0] and len(err.splitlines()) == 1
    assert halves.read_text() == text


def test_halves_edited_by_hand_or_of_another_seed_are_refused(explored, tmp_path, capsys):
    """The seed draws the halves (data.halves.draw_halves, numpy's generator): a file with 30 exploration rows
    relabelled, another seed written in, or the halves' names swapped is refused, not analysed as the half it names
    (a hostile tester's finding: 270 rows, 30 of them the model was chosen on, reported as the confirmation half)."""
    data, halves, _ = explored
    model = tmp_path / "edited.cfa"
    model.write_text(EDITED)
    saved = pd.read_csv(halves, keep_default_na=False)
    relabelled = saved.copy()
    relabelled.loc[relabelled.index[relabelled["half"] == "exploration"][:30], "half"] = "confirmation"
    reseeded = saved.assign(seed=99)
    swapped = saved.assign(half=saved["half"].map({"exploration": "confirmation", "confirmation": "exploration"}))
    for name, frame in (("relabelled", relabelled), ("reseeded", reseeded), ("swapped", swapped)):
        path = tmp_path / f"{name}.csv"
        frame.to_csv(path, index=False)
        before = path.read_bytes()
        code, _, err = _run(["fit", model, "--data", data, "--half", path, "confirmation"], capsys)
        assert code == 2, name
        seed = 99 if name == "reseeded" else 11
        assert f"its halves are not those seed {seed} draws from its 301 rows (edited by hand" in err, name
        assert len(err.strip().splitlines()) == 1 and path.read_bytes() == before


def two_waves(folder):
    """A workbook of two sheets: Wave1, the Holzinger & Swineford rows, and Wave2, the same rows reordered."""
    hs = pd.read_csv(HS_FILE)
    book = folder / "waves.xlsx"
    with pd.ExcelWriter(book) as writer:
        hs.to_excel(writer, sheet_name="Wave1", index=False)
        hs.iloc[::-1].to_excel(writer, sheet_name="Wave2", index=False)
    return book


def test_halves_of_another_sheet_are_refused(tmp_path, capsys):
    """explore --sheet Wave1 --split, then fit --sheet Wave2 --half: the workbook's checksum is the same, so the halves
    file names the sheet it was drawn from and another sheet is refused (a hostile tester's finding: the second
    sheet's rows, the same riders reordered, were fitted as the confirmation half)."""
    book = two_waves(tmp_path)
    halves = tmp_path / "halves.csv"
    code, _, err = _run(["explore", "--data", book, "--sheet", "Wave1", "--items", "x1..x9", "--factors", 3,
                         "--split", 5, "--halves-file", halves], capsys)
    assert code == 0, err
    assert set(pd.read_csv(halves)["sheet_read"]) == {"Wave1"}
    model = tmp_path / "m.cfa"
    model.write_text(EDITED)
    code, _, err = _run(["fit", model, "--data", book, "--sheet", "Wave2", "--half", halves, "confirmation"], capsys)
    assert code == 2 and "holds the halves of the sheet 'Wave1' of 'waves.xlsx', and this run reads the sheet 'Wave2'" \
        in err
    # Wave1 is the first sheet: a run without --sheet reads it, and is the same sheet (review s14: it was refused)
    code, _, err = _run(["fit", model, "--data", book, "--half", halves, "confirmation"], capsys)
    assert code == 0, err
    code, out, err = _run(["fit", model, "--data", book, "--sheet", "Wave1", "--half", halves, "confirmation"], capsys)
    assert code == 0, err
    second = tmp_path / "second.csv"
    code, _, err = _run(["explore", "--data", book, "--sheet", "Wave2", "--items", "x1..x9", "--factors", 3,
                         "--split", 5, "--halves-file", second], capsys)
    assert code == 0, err
    code, _, err = _run(["fit", model, "--data", book, "--half", second, "confirmation"], capsys)
    assert code == 2 and ("holds the halves of the sheet 'Wave2' of 'waves.xlsx', and this run reads the sheet "
                          "'Wave1' (the first sheet; no sheet asked for): give --sheet Wave2") in err


def test_a_halves_file_that_is_a_folder_or_a_workbook_is_said_so(tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text(EDITED)
    book = tmp_path / "h.xlsx"
    pd.DataFrame({"row": [2], "half": ["A"]}).to_excel(book, index=False)
    for path, words in ((tmp_path, "is a folder, not the CSV file --halves-file wrote"),
                        (book, "not a halves file (not text: a workbook or another binary file")):
        code, _, err = _run(["fit", model, "--data", HS_FILE, "--half", path, "A"], capsys)
        assert code == 2 and words in err and "Error)" not in err
