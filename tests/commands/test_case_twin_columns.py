"""A column whose name differs from a name the run reads only in capital letters ('X3' beside the model's 'x3',
'School' beside the group column 'school'): names are matched exactly, so the exact one is read, and every command
says so in a note naming the other (s23: the exact match was taken without a word, so a researcher who meant the
recoded 'X3' could not tell which one the results describe).

The data are Holzinger & Swineford (1939) (tests/datasets, 301 pupils) with the twins added; the reference for each
result is the run on the file without them (the same numbers: the twins are not read).
"""

from __future__ import annotations

import json

import pytest

import cfa_tool
from tests.commands.test_renamed_columns import COMMANDS as RENAMED_COMMANDS
from tests.conftest import holzinger_swineford, run_cli

MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
ITEM_NOTE = ("the column 'x3' is read, as named; the column 'X3', whose name differs from it only in capital letters, "
             "is not read (names are matched exactly, capitals included)")
GROUP_NOTE = ("the column 'school' is read, as named; the column 'School', whose name differs from it only in capital "
              "letters, is not read")


def _flat(text: str) -> str:
    """Terminal text with its line breaks and box borders taken out (the report wraps long notes)."""
    return " ".join(text.replace("│", " ").split())


@pytest.fixture()
def files(tmp_path):
    hs = holzinger_swineford()
    # a recoded copy of x3 (its rows shuffled, seed 1) and the schools in capitals
    twins = hs.assign(X3=hs["x3"].sample(frac=1, random_state=1).to_numpy(), School=hs["school"].str.upper())
    data = tmp_path / "twins.csv"
    twins.to_csv(data)
    plain = tmp_path / "plain.csv"
    hs.to_csv(plain)
    model = tmp_path / "hs.cfa"
    model.write_text(MODEL)
    other = tmp_path / "hs2.cfa"
    other.write_text(MODEL + "covary x1, x4\n")
    return {"data": data, "plain": plain, "model": model, "other": other, "tmp": tmp_path}


#: each command that reads a data file, as it runs fast: the list the renamed columns' test keeps complete (found
#: through the parser there), on this test's file
COMMANDS = {command: [a.replace("{renamed}", "{data}") for a in argv] for command, argv in RENAMED_COMMANDS.items()}


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_every_command_reads_the_exact_name_and_says_so(command, files, capsys):
    argv = [command] + [a.format(**files) for a in COMMANDS[command]]
    saved = files["tmp"] / "result.json"
    code, out, err = run_cli(argv + ["--json", saved], capsys)
    assert code == 0, err
    assert ITEM_NOTE in _flat(out)
    assert ITEM_NOTE in json.dumps(json.loads(saved.read_text()), ensure_ascii=False)
    if "--group-column" in argv:  # a column an option names has its twin named too
        assert GROUP_NOTE in _flat(out)


def test_the_twins_change_nothing_and_a_run_reading_both_says_nothing(files):
    """The results of the file with the twins are those of the file without them (the twins are not read); a model
    that reads both 'x3' and 'X3' has no note (both are read, as named)."""
    twins = cfa_tool.fit(MODEL, str(files["data"]), group="school")
    plain = cfa_tool.fit(MODEL, str(files["plain"]), group="school")
    assert twins.fit.chi_square == pytest.approx(plain.fit.chi_square, rel=1e-12)
    said = list(map(str, twins.warnings))
    assert any(ITEM_NOTE in w for w in said) and any(GROUP_NOTE in w for w in said)
    assert not any("capital letters" in str(w) for w in plain.warnings)
    both = cfa_tool.fit(MODEL.replace("x1, x2, x3", "x1, x2, x3, X3"), str(files["data"]))
    assert not any("capital letters" in str(w) for w in both.warnings)
