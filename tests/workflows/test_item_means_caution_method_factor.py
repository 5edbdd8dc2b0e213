"""Scores of several groups with a declared method factor (an acquiescence factor on every item) and one intercept
set apart in one group (new-user trial s24): the caution that the groups' item means do not compare named the method
factor too ('The item means of warm, acq ...'), which gets no item mean (its column is empty).  It names the trait
alone now.  The data: two four-item traits, two items of each reverse-keyed, acquiescence .3 on every raw answer,
warm3's intercept .6 higher in group B (simulated here, seeded)."""
from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind

MODEL = """factor warm: warm1, warm2, warm3, warm4
factor calm: calm1, calm2, calm3, calm4
reversed warm2, warm4, calm2, calm4 on 1 to 5
factor acq: warm1, warm2, warm3, warm4, calm1, calm2, calm3, calm4
method acq
uncorrelated acq, warm
uncorrelated acq, calm
invariance scalar
in group B: noninvariant intercept(warm3)
"""


def _data() -> pd.DataFrame:
    rng = np.random.default_rng(3)
    loadings, frames = [0.7, -0.6, 0.65, -0.55], []
    for group, n in (("A", 500), ("B", 400)):
        traits = rng.multivariate_normal([0, 0], [[1, 0.3], [0.3, 1]], n)
        acq = rng.normal(size=n)
        cols = {}
        for t, trait in enumerate(("warm", "calm")):
            for i, w in enumerate(loadings):
                x = (w * traits[:, t] + 0.3 * acq + np.sqrt(1 - w * w - 0.09) * rng.normal(size=n)
                     + (0.6 if group == "B" and t == 0 and i == 2 else 0.0))
                cols[f"{trait}{i + 1}"] = 1 + (x[:, None] > np.array([-1.5, -0.5, 0.4, 1.3])).sum(axis=1)
        frames.append(pd.DataFrame({"grp": group, **cols}))
    return pd.concat(frames, ignore_index=True)


def test_the_item_means_caution_names_the_trait_and_not_the_method_factor():
    result = cfa_tool.scores(MODEL, _data(), group="grp", methods=["regression", "item-mean"])
    [caution] = [p for p in result.fit.problems if p.kind is ProblemKind.ITEM_SUMS_ACROSS_GROUPS]
    text = f"{caution.explanation} {caution.advice}"
    assert "warm3" in text and "warm" in text
    assert "acq" not in text.replace("acquiescence", "")
