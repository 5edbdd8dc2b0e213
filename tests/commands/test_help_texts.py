"""Every command's --help text is printed (argparse expands '%' in help strings, so a bare '5%' breaks it)."""

from __future__ import annotations

import argparse
from pathlib import Path

import pytest

from cfa_tool.cli import build_parser

DOCS = Path(__file__).resolve().parents[2] / "docs"


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


def test_the_docs_name_the_commands_that_take_workers_as_the_parsers_do():
    # a hostile trial: the README said 'simulation commands take --workers' and 'align' (which simulates its
    # Monte Carlo check) rejected it. The sentence, now in docs/commands.md, is read and held against each parser's
    # options.
    import re

    page = (DOCS / "commands.md").read_text(encoding="utf-8")
    sentence = next(line for line in page.splitlines() if "`--workers N`" in line)
    with_workers, seed_only = sentence.split("`--workers N`")[0], sentence.split("take `--seed N` only")[0]
    listed = set(re.findall(r"`([a-z-]+)`", with_workers.split("take")[0]))
    alone = set(re.findall(r"`([a-z-]+)`", seed_only.split(";")[-1]))
    commands = _commands()
    takes = {name for name, p in commands.items() if "--workers" in p._option_string_actions}
    seeded = {name for name, p in commands.items() if "--seed" in p._option_string_actions}
    assert listed == takes == {"bootstrap", "cutoffs", "power-simulation"}
    assert alone == seeded - takes


def test_the_data_files_page_names_options_the_fit_takes_and_filters_that_parse():
    # the data-files page (the README's section until the reference pages), in sections with headings: every
    # option it names is an option of 'fit' (the command the page describes), each value written beside one is one
    # the option takes, and each --keep example is a row filter that parses
    import re

    from cfa_tool.cli import build_parser
    from cfa_tool.data.filters import parse_filter

    section = (DOCS / "data-files.md").read_text(encoding="utf-8")
    headings = re.findall(r"^## (.+)$", section, re.M)
    assert headings[:3] == ["Reading files", "Encodings", "Excel workbooks"] and len(headings) >= 8
    fit = _commands()["fit"]
    written = re.findall(r"`(--[a-z-]+)(?: ([^`]+))?`", section)
    assert {option for option, _ in written} >= {"--sheet", "--keep", "--missing-codes", "--incomplete-rows"}
    for option, value in written:
        assert option in fit._option_string_actions, option  # noqa: SLF001 - argparse's own table
        if value and option != "--sheet":  # NAME: a placeholder
            args = build_parser("fit").parse_args(["fit", "m.cfa", "--data", "d.csv", f"{option}={value.strip(chr(39))}"])
            if option == "--keep":
                assert parse_filter(args.keep[0]).column in ("district", "visit_date", "rider_id")
