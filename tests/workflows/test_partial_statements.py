"""The partial-invariance search names the model file's lines that give its partially invariant model (new-user trial
s22: the search freed the intercept of one item, and nothing said how to carry that into fit or scores).  Checked by
pasting the lines into the model file: fit's chi-square equals the ladder's partial step's (the same model fitted
twice, so to 1e-6 relative).

Outside reference: the Holzinger & Swineford (1939) data by school, whose scalar step does not hold (as published
analyses of these data report, recalled from memory: the intercepts of x3 and x7 differ between the schools)."""

from __future__ import annotations

import pytest

import cfa_tool
from cfa_tool.workflows.invariance import invariance
from tests.conftest import THREE_FACTORS, holzinger_swineford


@pytest.fixture(scope="module")
def searched():
    return invariance(THREE_FACTORS, holzinger_swineford(), "school", partial="auto")


def test_the_lines_give_the_partial_step_again(searched):
    lines = searched.partial_statements()
    assert lines and lines[0].startswith("invariance ")
    level = lines[0].split()[-1]
    step = next(s for s in searched.steps if s.level == level)
    assert step.holds and any(s.freed for s in searched.steps)
    assert all(line.startswith("noninvariant intercept(") for line in lines[1:])
    refit = cfa_tool.fit(THREE_FACTORS + "\n" + "\n".join(lines) + "\n", holzinger_swineford(), group="school")
    assert refit.fit.chi_square == pytest.approx(step.result.fit.chi_square, rel=1e-6)
    assert refit.fit.df == step.result.fit.df


def test_every_view_names_them(searched):
    lines = searched.partial_statements()
    text = " ".join(searched.summary(width=200).split())
    assert all(f"'{line}'" in text for line in lines)
    data = searched.to_dict()
    assert data["partial_model_statements"] == list(lines)
    assert all(f["model_statement"] in lines for f in data["freed"])


def test_no_lines_without_a_search():
    assert invariance(THREE_FACTORS, holzinger_swineford(), "school").partial_statements() == ()
