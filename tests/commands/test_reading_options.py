"""The reading options (--sheet, --names-row, --first-data-row, --missing-codes, --rename, --keep) are passed to the
workflows by one function (commands.options.reading_args), never threaded by hand command by command."""

from __future__ import annotations

import inspect
import re
from pathlib import Path

import pytest

from cfa_tool import cli, commands
from cfa_tool.commands import options as O

COMMANDS_DIR = Path(commands.__file__).parent

#: every reading option given, with the keywords the workflows receive (the flag's value as the parser reads it)
GIVEN = ["--sheet", "answers", "--names-row", "2", "--first-data-row", "4", "--missing-codes=-99,999",
         "--rename", "q1=item1", "--keep", "district = north"]
READ = {"sheet": "answers", "names_row": 2, "first_data_row": 4, "missing_codes": (-99.0, 999.0),
        "rename": ["q1=item1"], "keep": ["district = north"]}


@pytest.mark.parametrize("command", ["fit", "check", "compare", "invariance", "bootstrap", "cutoffs", "scores",
                                     "align", "explore", "replicate"])
def test_every_command_reads_the_options_through_one_function(command):
    parser = cli.build_parser(command)
    before = {"compare": ["m1.cfa", "m2.cfa", "--data", "d.csv"], "explore": ["--data", "d.csv"],
              "replicate": ["m.cfa", "--data", "d.csv"], "scores": ["m.cfa", "--data", "d.csv", "--output", "s.csv"],
              "invariance": ["m.cfa", "--data", "d.csv", "--group-column", "g"],
              "align": ["m.cfa", "--data", "d.csv", "--group-column", "g"]}.get(command, ["m.cfa", "--data", "d.csv"])
    args = parser.parse_args([command, *before, *GIVEN])
    assert O.reading_args(args) == READ


def test_a_command_without_the_options_reads_with_their_defaults():
    args = cli.build_parser("demo").parse_args(["demo"])
    assert O.reading_args(args) == {"sheet": None, "names_row": None, "first_data_row": None, "missing_codes": (),
                                    "keep": [], "rename": []}


def test_the_half_of_a_halves_file_follows_the_filters():
    args = cli.build_parser("fit").parse_args(["fit", "m.cfa", "--data", "d.csv", "--keep", "a = 1",
                                               "--half", "h.csv", "confirmation"])
    keep = O.reading_args(args)["keep"]
    assert keep[0] == "a = 1" and type(keep[1]).__name__ == "RandomHalf" and len(keep) == 2


def test_no_command_threads_a_reading_option_by_hand():
    by_hand = re.compile(r"\bargs\.(sheet|names_row|first_data_row|missing_codes|rename)\b|\bkeep=args\.keep\b")
    for path in COMMANDS_DIR.glob("*.py"):
        if path.name == "options.py":
            continue
        found = by_hand.findall(path.read_text(encoding="utf-8"))
        assert not found, f"{path.name} passes {found} by hand: use commands.options.reading_args"


def test_the_command_line_reads_no_private_part_of_argparse():
    assert "_option_string_actions" not in inspect.getsource(cli)
    assert "missing-helpers" not in inspect.getsource(cli)  # its refusal: commands.options.refuse_missing_helpers


@pytest.mark.parametrize("command, grouped", [("fit", True), ("check", True), ("align", True), ("explore", False),
                                              ("cutoffs", False)])
def test_data_twice_names_the_group_column_where_there_is_one(command, grouped, capsys):
    argv = {"explore": ["explore"], "align": ["align", "m.cfa", "--group-column", "g"]}.get(command, [command, "m.cfa"])
    with pytest.raises(SystemExit) as stop:
        cli.main([*argv, "--data", "a.csv", "--data", "b.csv"])
    err = capsys.readouterr().err
    assert stop.value.code == 2 and "--data is given twice; give it once" in err
    assert ("give that column with --group-column" in err) is grouped
    assert "use 'cfa-tool replicate'" in err


@pytest.mark.parametrize("command", ["check", "compare", "scores", "demo"])
def test_missing_helpers_cannot_apply_but_to_fit(command, capsys):
    argv = {"compare": ["compare", "m1.cfa", "m2.cfa", "--data", "d.csv"],
            "scores": ["scores", "m.cfa", "--data", "d.csv", "--output", "s.csv"], "demo": ["demo"]}.get(
        command, [command, "m.cfa", "--data", "d.csv"])
    with pytest.raises(SystemExit) as stop:
        cli.build_parser(command).parse_args([*argv, "--missing-helpers", "age"])
    assert stop.value.code == 2
    assert ("--missing-helpers cannot apply: missing-data helpers (auxiliary variables) are offered by fit only so far"
            in capsys.readouterr().err)


@pytest.mark.parametrize("option, instead", [("--validation-names-row", "the row of --data is given with --names-row"),
                                             ("--validation-first-data-row", "that of --data is given with "
                                                                             "--first-data-row"),
                                             ("--validation-rename", "the columns of --data are renamed with --rename")])
def test_validation_options_without_a_validation_file(option, instead, tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text("f =~ a + b + c\n")
    data = tmp_path / "d.csv"
    data.write_text("a,b,c\n1,2,3\n")
    value = "x=y" if option.endswith("rename") else "2"
    code = cli.main(["replicate", str(model), "--data", str(data), option, value])
    err = capsys.readouterr().err
    assert code == 2 and f"{option} " in err and "the --validation file, and no --validation file is given" in err
    assert instead in err
