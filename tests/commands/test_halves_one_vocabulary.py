"""One vocabulary of halves (data.halves.HalfNames): explore --split names its halves 'exploration' and
'confirmation', replicate --data 'A' and 'B', and every report says each half in its command's words, declared once:
'the exploration half', 'half A' (s25: a half of replicate's file read back was 'the A half' where replicate's own
report says 'half A'); the message that a halves file was written names its halves as its column holds them; a half
asked for by the other command's name is refused naming the name this file gives the same half (the same seed draws
the same halves of the same rows, the first of one command being the first of the other).  The rider survey demo data
are invented (a fictional transit agency), simulated with a fixed seed."""

from __future__ import annotations

import pytest

from cfa_tool.resources import resource_dir
from tests.conftest import run_cli

MODEL = resource_dir("models") / "rider_three_factors.cfa"
DATA = resource_dir("demo") / "rider_survey.csv"


@pytest.fixture(scope="module")
def halves(tmp_path_factory):
    """The halves files of replicate --data and explore --split, seed 1, and what each command said of them."""
    import io
    from contextlib import redirect_stderr, redirect_stdout

    from cfa_tool.cli import main

    folder = tmp_path_factory.mktemp("halves")
    said = {}
    for command, argv in (("replicate", ["replicate", MODEL, "--data", DATA, "--halves-file", folder / "rep.csv"]),
                          ("explore", ["explore", "--data", DATA, "--split", "1", "--factors", "3",
                                       "--halves-file", folder / "exp.csv"])):
        out = io.StringIO()
        with redirect_stdout(out), redirect_stderr(io.StringIO()):
            assert main([str(a) for a in argv]) == 0
        said[command] = " ".join(out.getvalue().split())
    return folder, said


def test_the_vocabulary_is_declared_once():
    from cfa_tool.data.halves import EXPLORE_NAMES, REPLICATE_NAMES, half_phrase

    assert EXPLORE_NAMES.names == ("exploration", "confirmation") and REPLICATE_NAMES.names == ("A", "B")
    assert [half_phrase(True, k) for k in (0, 1)] == ["the exploration half", "the confirmation half"]
    assert [half_phrase(False, k) for k in (0, 1)] == ["half A", "half B"]
    assert REPLICATE_NAMES.label(1) == "Half B" and EXPLORE_NAMES.label(0) == "Exploration half"


def test_the_written_message_names_the_halves_as_the_file_holds_them(halves):
    folder, said = halves
    assert (f"The rows of each half written to {folder / 'rep.csv'} (half A and half B, named 'A' and 'B' in its "
            f"column half, as --half {folder / 'rep.csv'} NAME takes them)") in said["replicate"]
    assert (f"(the exploration half and the confirmation half, named 'exploration' and 'confirmation' in its column "
            f"half, as --half {folder / 'exp.csv'} NAME takes them)") in said["explore"]


@pytest.mark.parametrize("file, asked, named", [("exp.csv", "B", "confirmation"), ("exp.csv", "A", "exploration"),
                                                ("rep.csv", "confirmation", "B"), ("rep.csv", "exploration", "A")])
def test_a_half_named_as_the_other_command_names_it_is_refused_with_this_files_name(halves, capsys, file, asked,
                                                                                    named):
    folder, _ = halves
    code, _, err = run_cli(["fit", MODEL, "--data", DATA, "--half", folder / file, asked], capsys)
    assert code == 2 and err.count("\n") == 1
    assert f"not '{asked}'; '{asked}' is what" in err
    assert f"names '{named}': give --half {folder / file} {named}" in err


def test_a_half_of_replicates_file_is_said_as_replicate_says_it(halves, capsys):
    folder, _ = halves
    code, out, _ = run_cli(["fit", MODEL, "--data", DATA, "--half", folder / "rep.csv", "A"], capsys)
    assert code == 0
    said = " ".join(out.split())
    assert f"Only the rows of half A (seed 1) of {folder / 'rep.csv'} are analysed" in said
    assert "the row fell in half A of two random halves, drawn with seed 1" in said
    assert "the A half" not in said and "A half (seed" not in said
    code, out, _ = run_cli(["fit", MODEL, "--data", DATA, "--half", folder / "exp.csv", "confirmation"], capsys)
    said = " ".join(out.split())
    assert code == 0 and f"Only the rows of the confirmation half (seed 1) of {folder / 'exp.csv'}" in said
