"""A Heywood case of ordinal items fitted with thresholds as parameters (compare, a fit with groups, invariance) is
said as the solution that is not admissible it is, never as a model 'not identified' to be given constraints
(hostile trial s17, finding 2).

With residual variances held at 1 (thresholds as parameters; Wu & Estabrook 2016), an item whose correlations ask for
a negative residual variance in the correlation metric has loadings and factor variances that grow without bound, and
the information matrix turns singular at the search's end.  The data are simulated here (seed 1): two factors of
three items, x1 correlating .8 with x2 and x3 while x2 and x3 correlate .5 (.8 * .8 / .5 = 1.28 > 1: one factor
explaining them asks for a loading of x1 above 1, by the one-factor identity r12 r13 / r23 = lambda1^2 of
three indicators, Bollen 1989, ch. 7), cut into five categories."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.cli import main
from cfa_tool.errors import NotIdentified, UnboundedSolution
from tests.heywood_data import ITEMS, heywood_draws

MODEL = "factor a: x1, x2, x3\nfactor b: y1, y2, y3\n"


@pytest.fixture(scope="module")
def answers() -> pd.DataFrame:
    rng = np.random.default_rng(1)
    frame = pd.DataFrame(np.digitize(heywood_draws(rng), [-1.5, -.5, .5, 1.5]) + 1, columns=ITEMS)
    frame["g"] = np.where(rng.random(400) < .5, "a", "b")
    return frame


def test_one_group_fit_shows_the_negative_residual_variance(answers):
    result = cfa_tool.fit(MODEL, answers, ordinal="all")
    kinds = {p.kind for p in result.problems}
    assert ProblemKind.NEGATIVE_RESIDUAL_VARIANCE in kinds and ProblemKind.NOT_IDENTIFIED not in kinds


def test_a_fit_with_groups_says_heywood_not_unidentified(answers):
    with pytest.raises(UnboundedSolution) as stop:
        cfa_tool.fit(MODEL, answers, ordinal="all", group="g")
    assert not isinstance(stop.value, NotIdentified)
    text = str(stop.value)
    assert "not admissible" in text and "x1" in text and "Heywood" in text
    assert "not identified" not in text and "add constraints" not in text


def test_compare_reports_it_as_not_admissible(answers, tmp_path, capsys):
    answers.to_csv(tmp_path / "h.csv", index=False)
    (tmp_path / "hey.cfa").write_text(MODEL)
    (tmp_path / "one.cfa").write_text("factor a: x1, x2, x3, y1, y2, y3\n")
    code = main(["compare", str(tmp_path / "hey.cfa"), str(tmp_path / "one.cfa"), "--data", str(tmp_path / "h.csv"),
                 "--ordinal", "all", "--json", str(tmp_path / "c.json")])
    out = " ".join(capsys.readouterr().out.replace("┃", " ").split())
    assert code == 0
    assert "hey could not be estimated: the solution is not admissible" in out.lower()
    assert "not identified" not in out
    import json

    problems = [p["kind"] for m in json.loads((tmp_path / "c.json").read_text())["models"] for p in m["problems"]]
    assert "not identified" not in problems and ProblemKind.UNBOUNDED_HEYWOOD.value in problems
