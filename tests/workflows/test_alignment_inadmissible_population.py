"""align's Monte Carlo check draws samples from the aligned solution; when the configural solution is not admissible
(a negative residual variance in one group) there is no population to draw from.  Hostile tester s15 (15): the box
said "not admissible" and the check still ran and reported its correlations.  It is refused as cutoffs, simulate
and power-simulation refuse an impossible population (exit 2), and the alignment without the check still runs.
Data: the bundled rider survey (invented) in four random regions and a fifth of 30 rows whose 'respectful' copies
'helpful' (so that its residual variance goes below zero)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.errors import OptionError
from cfa_tool.resources import resource_dir

MODEL = (resource_dir("models") / "rider_three_factors.cfa").read_text()


def _regions() -> pd.DataFrame:
    data = pd.read_csv(resource_dir("demo") / "rider_survey.csv")
    rng = np.random.default_rng(3)
    data["region"] = rng.choice(["a", "b", "c", "d"], len(data))
    tiny = data.index[:30]
    data.loc[tiny, "region"] = "tiny"
    data.loc[tiny, "respectful"] = data.loc[tiny, "helpful"]
    data.loc[tiny[:3], "respectful"] = data.loc[tiny[:3], "respectful"].clip(upper=4) + 1
    return data


def test_no_monte_carlo_check_from_an_impossible_solution():
    data = _regions()
    with pytest.raises(OptionError, match="not admissible .*Monte Carlo check cannot draw samples from it.*trials=0"):
        cfa_tool.align(MODEL, data, "region", trials=2, seed=1)
    result = cfa_tool.align(MODEL, data, "region", trials=0)  # the alignment itself, its caution first
    assert result.check is None and not result.configural.admissible
