"""Advice names only options of the command whose report gives it (an option that cannot apply is an error, so an
advised option the command refuses sends the reader into one): the caution on answers far from normal advises the
scaled test and robust standard errors, --robust in fit, compare and invariance (options.TAKEN_BY), and in
the reports of bootstrap, cutoffs, replicate and scores, which refuse it, a fit of the model with --robust
(note_parts.Command.takes; s28: they advised '(--robust)').  Data: a one-factor model's answers with heavy tails
(multivariate t with 4 degrees of freedom, loadings .8, residual SDs .6; invented, seeded), whose kurtosis the
caution names (Mardia 1970)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool import cli
from cfa_tool.note_parts import Command, Note, View

ELSEWHERE = "(a fit of the model with --robust)"


@pytest.fixture(scope="module")
def heavy(tmp_path_factory):
    rng = np.random.default_rng(5)
    n = 600
    factor = rng.standard_normal((n, 1))
    scale = np.sqrt(rng.chisquare(4, size=(n, 1)) / 4)
    x = (0.8 * factor + 0.6 * rng.standard_normal((n, 6))) / scale
    folder = tmp_path_factory.mktemp("heavy")
    pd.DataFrame(x, columns=[f"x{i}" for i in range(1, 7)]).round(3).to_csv(folder / "heavy.csv", index=False)
    (folder / "heavy.cfa").write_text("factor f: x1, x2, x3, x4, x5, x6\n", encoding="utf-8")
    return folder


RUNS = {"fit": [], "bootstrap": ["--replications", "20", "--workers", "1"],
        "cutoffs": ["--replications", "20", "--workers", "1"], "replicate": [], "scores": ["--output", "s.csv"]}


@pytest.mark.parametrize("command", sorted(RUNS))
def test_the_robust_advice_names_an_option_of_the_command_or_a_fit(command, heavy, monkeypatch):
    monkeypatch.chdir(heavy)
    out = heavy / f"{command}.md"
    assert cli.main([command, "heavy.cfa", "--data", "heavy.csv", *RUNS[command], "--markdown", str(out)]) == 0
    text = " ".join(out.read_text(encoding="utf-8").split())
    assert "depart from multivariate normality" in text
    if command == "fit":
        assert "robust standard errors (--robust)" in text and ELSEWHERE not in text
    else:
        assert "(--robust)" not in text and f"robust standard errors {ELSEWHERE}" in text


def test_a_command_part_says_what_each_view_reads():
    part = Command(" (--robust)", takes=("fit", "compare"), elsewhere=" (a fit with --robust)")
    note = Note(("try it", part))
    assert [note.said(View(True, running=r)) for r in ("fit", "compare", "bootstrap", "")] == [
        "try it (--robust)", "try it (--robust)", "try it (a fit with --robust)", "try it (--robust)"]
    assert note.said(View(False, running="bootstrap")) == "try it"  # a manuscript names no option
    assert Note.from_dict(note.to_dict()) == note  # a saved report keeps it


def test_the_commands_declared_to_take_the_robust_test_are_those_that_do():
    from cfa_tool.cli import build_parser
    from cfa_tool.options import TAKEN_BY, Option

    parser = build_parser()
    sub = next(a for a in parser._actions if a.choices and "fit" in a.choices)  # noqa: SLF001 - argparse's own list
    taking = {name for name, p in sub.choices.items()
              if any("--robust" in a.option_strings and a.help is not None and "==SUPPRESS==" not in a.help
                     for a in p._actions)}  # noqa: SLF001
    assert taking == set(TAKEN_BY[Option.ROBUST]) | {"demo"}  # demo's report is a fit's
