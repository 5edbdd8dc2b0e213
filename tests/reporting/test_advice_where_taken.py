"""Advice names only what the command whose report shows it takes (an option that cannot apply is an error, so an
advised option the command refuses sends the reader into one): one declared table of the commands that take each
option such advice names (options.TAKEN_BY), checked against the command line's parsers; every advice in the package
that names one of them says where it is taken (note_parts.Command's ``takes``), so that a report of another command
says it its own way.  s28 (hostile tester): cutoffs and align advised '(--cluster school)', which they refuse;
replicate, which takes --cluster to draw its halves, did not name it; over occasions the error of a ladder that
could estimate no step advised 'start' statements, which that route refuses.  The data are invented: answers of 30
schools of 16 rows (seeded), and a rider survey's waves (seeded) for the ladder over occasions."""

from __future__ import annotations

import ast
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.note_parts import View
from cfa_tool.options import TAKEN_BY, Option, on_command_line

PACKAGE = Path(cfa_tool.__file__).parent


def _parsers() -> dict:
    from cfa_tool.cli import build_parser

    parser = build_parser()
    return next(a for a in parser._actions if a.choices and "fit" in a.choices).choices  # noqa: SLF001


def _taken(parser) -> set[str]:
    """The flags a command's parser takes and shows (a hidden flag is there only to refuse it)."""
    return {flag for a in parser._actions  # noqa: SLF001 - argparse's own list
            if a.help is None or "==SUPPRESS==" not in str(a.help) for flag in a.option_strings}


@pytest.mark.parametrize("option", sorted(TAKEN_BY, key=lambda o: o.flag), ids=lambda o: o.flag)
def test_the_table_of_commands_that_take_each_option_is_the_parsers(option):
    taking = {name for name, parser in _parsers().items() if option.flag in _taken(parser)}
    assert taking - {"demo"} == set(TAKEN_BY[option])  # demo's report is a fit's


def _advice_naming_declared_options():
    """(file:line, the options the Command names, the option its ``takes`` is of) for every Command(...) of the
    package that names an option of the table."""
    declared = {o.name for o in TAKEN_BY}
    for path in sorted(PACKAGE.rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if not (isinstance(node, ast.Call) and getattr(node.func, "id", None) == "Command"):
                continue
            text = [*node.args[:2], *(k.value for k in node.keywords if k.arg in ("text", "words"))]
            named = {n.attr for arg in text for n in ast.walk(arg) if isinstance(n, ast.Attribute)
                     and isinstance(n.value, ast.Name) and n.value.id == "Option"} & declared
            if not named:
                continue
            takes = next((k.value for k in node.keywords if k.arg == "takes"), None)
            of = (takes.args[0].attr if isinstance(takes, ast.Call) and getattr(takes.func, "id", None) == "taken_by"
                  and takes.args and isinstance(takes.args[0], ast.Attribute) else None)
            yield f"{path.relative_to(PACKAGE.parent)}:{node.lineno}", named, of


def test_every_advice_naming_an_option_of_the_table_says_where_it_is_taken():
    found = list(_advice_naming_declared_options())
    assert len(found) >= 15  # the sweep of s28 found 20 such pieces of advice: the scan reads them
    wrong = [(where, named, of) for where, named, of in found if len(named) != 1 or of not in named]
    assert not wrong


def _schools(n_schools: int = 30, each: int = 16) -> pd.DataFrame:
    rng = np.random.default_rng(28)
    n = n_schools * each
    factor = rng.standard_normal(n)
    frame = pd.DataFrame({f"x{i}": (0.7 * factor + 0.7 * rng.standard_normal(n)).round(2) for i in range(1, 5)})
    frame.insert(0, "school", np.repeat(np.arange(1, n_schools + 1), each))
    return frame


def _unit_advice(**kind) -> object:
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.pipeline.inputs import data_problems, screened

    items = ("x1", "x2", "x3", "x4")
    with on_command_line():
        found = data_problems(screened(_schools(), items, "schools.csv"), names=items, **kind)
    return next(p for p in found if p.kind is ProblemKind.UNIT_ROWS_AS_INDEPENDENT).advice


@pytest.mark.parametrize("command", ["fit", "compare", "invariance", "bootstrap", "scores", "check"])
def test_the_schools_advice_names_cluster_in_the_commands_that_take_it(command):
    said = _unit_advice().said(View(True, running=command))
    assert "sampling design (--cluster school) so that the standard errors" in said


@pytest.mark.parametrize("command", ["cutoffs", "align"])
def test_the_schools_advice_of_cutoffs_and_align_is_a_fit_of_the_model(command):
    said = _unit_advice().said(View(True, running=command))
    assert "(--cluster school)" not in said and "(a fit of the model with --cluster school)" in said
    assert _unit_advice().said(View(False, running=command)).count("cluster") == 1  # a manuscript: no option


def test_replicate_draws_its_halves_by_the_schools():
    said = _unit_advice(takes_design=False, halves=True).said(View(True, running="replicate"))
    assert "draw the halves cluster by cluster, the schools for the clusters (--cluster school)" in said
    said = _unit_advice(takes_design=False).said(View(True, running="explore"))  # no halves: no option offered
    assert "--cluster" not in said


def test_replicates_split_sentence_names_the_option_with_the_schools():
    from cfa_tool.reporting.workflow_tables import _split_sentence
    from cfa_tool.workflows.replication import SplitRows

    with on_command_line():
        said = _split_sentence(SplitRows(480, 480, False, unit_column="school"))
        by_cluster = _split_sentence(SplitRows(480, 480, False, cluster="school", units=(15, 15)))
    assert str(said).endswith("from the column that names each row's cluster (--cluster school).")
    assert said.said(View(False)).endswith("from the column that names each row's cluster.")  # a manuscript
    assert "--cluster" not in str(by_cluster)


def test_sparse_answers_advice_in_explore_is_a_fit_of_the_model():
    from cfa_tool.assessment.missingness import sparse_answers_problem

    values = np.array([[1, 2, np.nan], [2, np.nan, 3], [3, 1, np.nan], [1, np.nan, 2], [2, 2, 2.0]])
    values[4, 2] = np.nan  # x2 and x3 never answered together
    with on_command_line():
        advice = sparse_answers_problem(values, ("x1", "x2", "x3")).advice
    assert "gaps (--incomplete-rows listwise) would keep" in advice.said(View(True, running="fit"))
    assert ("gaps (a fit of the model with --incomplete-rows listwise) would keep"
            in advice.said(View(True, running="explore")))


def test_a_ladder_over_occasions_that_estimates_nothing_advises_what_it_takes():
    from cfa_tool.errors import EstimationError
    from cfa_tool.workflows.occasions import invariance_over_occasions

    rng = np.random.default_rng(5)
    n = 150
    eta = rng.multivariate_normal([0.0, 0.3], [[1.0, 0.6], [0.6, 1.0]], size=n)
    rows = [{"person": f"p{i}", "wave": w, **{f"v{j}": 3 + 0.8 * eta[i, w - 1] + 0.6 * rng.standard_normal()
                                             for j in range(1, 5)}} for i in range(n) for w in (1, 2)]
    with on_command_line(), pytest.raises(EstimationError) as error:
        invariance_over_occasions("factor f: v1, v2, v3, v4\n", pd.DataFrame(rows), occasion_column="wave",
                                  id_column="person", max_iterations=1)
    said = str(error.value)
    assert "'start" not in said and "the configural model over occasions did not converge" in said
    assert f"raise the limit ({Option.MAX_ITERATIONS.flag})" in said


def test_explores_halves_are_drawn_by_the_schools_with_split_only():
    from cfa_tool.assessment.admissibility import ProblemKind
    from cfa_tool.workflows.explore import explore

    def advice(**split):
        with on_command_line():
            found = explore(_schools(), items=["x1", "x2", "x3", "x4"], factors=1, replications=2, **split)
        return next(str(p.advice) for p in found.data_problems if p.kind is ProblemKind.UNIT_ROWS_AS_INDEPENDENT)

    assert "the schools for the clusters (--cluster school)" in advice(split=3)
    assert "--cluster" not in advice()  # without --split, explore's --cluster applies to nothing
