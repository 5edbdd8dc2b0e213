"""The words a message gives to copy are quoted by one rule, options.shell_word (options.quoted_word for a name a
'did you mean' suggests): the list of codes of --missing-codes (data.non_answers.codes_given) and the near name of
suggest.did_you_mean had rules of their own, under which a word with a '!' broke in an interactive bash (history
expansion) and a name with an apostrophe was cut at it ("did you mean 'St Mary's'?").  The shells that read them back
are the references: bash itself (history expansion on, as in a terminal) and Python's shlex (POSIX rules)."""

from __future__ import annotations

import csv
import shlex
import shutil
import subprocess

import pytest

from cfa_tool.data.non_answers import codes_given
from cfa_tool.options import on_command_line
from cfa_tool.suggest import did_you_mean

WORDS = [("Weiß nicht!", "Keine Angabe"), ("No, not asked", "$5 or less"), ("it's not known",), ('say "no"', "n/a")]


def _bash_reads(command: str) -> list[str]:
    """The arguments bash gives a program for ``command`` typed at its prompt (history expansion on, as in a
    terminal)."""
    script = f"set -o history -H\nprintf '%s\\0' {command}\n"
    done = subprocess.run(["bash", "-c", script], capture_output=True, check=False)
    assert done.returncode == 0, done.stderr.decode()
    return done.stdout.decode().split("\0")[:-1]


@pytest.mark.parametrize("words", WORDS)
def test_the_codes_advice_gives_reach_the_tool_as_given(words):
    with on_command_line():
        advice = codes_given(words)
    flag, value = shlex.split(advice)
    assert flag == "--missing-codes" and next(csv.reader([value])) == list(words)  # as the option reads its list
    if shutil.which("bash"):
        (value_in_bash,) = _bash_reads(advice.removeprefix("--missing-codes "))
        assert next(csv.reader([value_in_bash])) == list(words)


def test_a_word_with_an_exclamation_mark_survives_an_interactive_shell():
    # 'Weiß nicht!,Keine Angabe' in double quotes: bash read '!,Keine' as a history event ('event not found')
    if not shutil.which("bash"):
        pytest.skip("no bash on this machine")
    with on_command_line():
        advice = codes_given(("Weiß nicht!", "Keine Angabe"))
    assert _bash_reads(advice) == ["--missing-codes", "Weiß nicht!,Keine Angabe"]


@pytest.mark.parametrize("name", ["district", "St Mary's", 'the "north" route', "cost $"])
def test_a_suggested_name_pastes_as_one_word(name):
    with on_command_line():
        said = did_you_mean("x", name)
    quoted = said.removeprefix("; did you mean ").removesuffix("?")
    assert shlex.split(quoted) == [name]
    if name == "district":  # a plain name reads as it always did
        assert quoted == "'district'"


def test_a_suggested_name_in_the_python_api_is_a_python_string():
    import ast

    said = did_you_mean("St Marys", "St Mary's")
    assert ast.literal_eval(said.removeprefix("; did you mean ").removesuffix("?")) == "St Mary's"
