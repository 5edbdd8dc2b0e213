"""A weak item (standardized loading below .20 in size, common practice's line of a negligible loading:
assessment.method_factors.SMALL_LOADING) that loads against the declared keying is a weak item, not evidence that the
keying is wrong: the sign of a loading that small is sampling error's to turn.  s23's closing note: an item not
declared reversed, standardized -.08, was called a contradiction of the declared keying, first in every view, and its
factor's omega withheld.  Now a note says what the evidence is (a loading too small for its sign to count), and the
keying caution, where an item does contradict the keying, gives the standardized loadings it rests on.

Data: simulated with a fixed seed (two factors correlating .5, five and four items answered 1 to 5; a2 and b3 worded
against their factors and declared reversed; a5's population loading -.08 in one set, -.5 in the other)."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind
from cfa_tool.assessment.method_factors import SMALL_LOADING
from cfa_tool.reporting.paragraph import methods_paragraph

MODEL = "factor a: a1, a2, a3, a4, a5\nfactor b: b1, b2, b3, b4\nreversed a2, b3 on 1 to 5\n"


def _answers(a5: float) -> pd.DataFrame:
    rng = np.random.default_rng(24)
    n = 400
    f = rng.normal(size=n)
    g = 0.5 * f + np.sqrt(0.75) * rng.normal(size=n)

    def item(latent, loading):
        x = loading * latent + np.sqrt(1 - loading ** 2) * rng.normal(size=n)
        return np.clip(np.round(3 + 1.1 * x), 1, 5)

    return pd.DataFrame({"a1": item(f, .7), "a2": item(f, -.7), "a3": item(f, .7), "a4": item(f, .6),
                         "a5": item(f, a5), "b1": item(g, .7), "b2": item(g, .7), "b3": item(g, -.7),
                         "b4": item(g, .6)})


def _standardized(result, item: str) -> float:
    [value] = [e.standardized for e in result.estimates if e.kind == "loading" and e.variables == ("a", item)]
    return value


def test_a_weak_item_against_the_keying_is_a_weak_item_not_a_contradiction():
    result = cfa_tool.fit(MODEL, _answers(-0.08))
    a5 = _standardized(result, "a5")
    assert a5 < 0 and abs(a5) < SMALL_LOADING  # the case: weak, and against the keying (not declared reversed)
    assert not [p for p in result.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
    [row] = [r for r in result.groups[0].reliability if r.factor == "a"]
    assert row.against_keying == ()
    [note] = [str(w) for w in result.warnings if "a5 hardly measures factor 'a'" in str(w)]
    assert f"standardized loading -{f'{abs(a5):.2f}'[1:]}" in note and "a weak item, whose sign says nothing" in note
    # its factor's reliability is reported (the keyed sum is the declared one, a5 in it as worded)
    assert "omega (McDonald, 1999) was" in methods_paragraph(result) and " for a " in methods_paragraph(result)


def test_a_strong_item_against_the_keying_is_named_with_the_loadings_it_rests_on():
    result = cfa_tool.fit(MODEL, _answers(-0.5))
    a5, a2 = _standardized(result, "a5"), _standardized(result, "a2")
    assert a5 < -SMALL_LOADING and a2 < -SMALL_LOADING  # a5 against the keying, a2 declared reversed
    [caution] = [p for p in result.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
    said = str(caution.explanation)
    assert f"(standardized loadings: a5 -{f'{-a5:.2f}'[1:]}; of the other items a1 " in said
    assert f"declared reversed: a2 -{f'{-a2:.2f}'[1:]})" in said
    assert not [w for w in result.warnings if "hardly measures" in str(w)]
