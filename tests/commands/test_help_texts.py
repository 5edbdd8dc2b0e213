"""Every command's --help text is printed (argparse expands '%' in help strings, so a bare '5%' breaks it)."""

from __future__ import annotations

import argparse

import pytest

from cfa_tool.cli import build_parser


def _commands() -> dict[str, argparse.ArgumentParser]:
    parser = build_parser()
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    return dict(sub.choices)


def test_there_are_commands():
    assert {"fit", "bootstrap", "cutoffs", "replicate", "check"} <= set(_commands())


@pytest.mark.parametrize("name", sorted(_commands()))
def test_help_of_every_command_is_printed(name):
    text = _commands()[name].format_help()
    assert "usage:" in text and "--help" in text
    if name in {"bootstrap", "cutoffs", "replicate"}:  # where a bare '5%' in --incomplete-rows' help broke it
        assert "every refit treats the rows as the fit does" in " ".join(text.split())


def test_the_readme_names_the_commands_that_take_workers_as_the_parsers_do():
    # a hostile trial: the README said 'simulation commands take --workers' and 'align' (which simulates its
    # Monte Carlo check) rejected it. The README's sentence is read and held against each parser's options.
    import re

    from cfa_tool.resources import resource_dir

    readme = (resource_dir("models").parent / "README.md").read_text()
    sentence = next(line for line in readme.splitlines() if "`--workers N`" in line)
    with_workers, seed_only = sentence.split("`--workers N`")[0], sentence.split("take `--seed N` only")[0]
    listed = set(re.findall(r"`([a-z-]+)`", with_workers.split("take")[0]))
    alone = set(re.findall(r"`([a-z-]+)`", seed_only.split(";")[-1]))
    commands = _commands()
    takes = {name for name, p in commands.items() if "--workers" in p._option_string_actions}
    seeded = {name for name, p in commands.items() if "--seed" in p._option_string_actions}
    assert listed == takes == {"bootstrap", "cutoffs", "power-simulation"}
    assert alone == seeded - takes
