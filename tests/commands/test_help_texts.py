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
