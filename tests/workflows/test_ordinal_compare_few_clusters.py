"""The few-clusters caution of ordinal items in one group, one count in every command (new-user trial s25, finding 4).

fit counts the thresholds among what the design-based covariance carries (the model's free parameters and the
thresholds of its first step: new-user trial s18); compare of the same model on the same rows and design, whose fits
estimate the thresholds with the model and leave them out of the count of free parameters as fit does, dropped
them, so that 60 teams against 21 parameters and 105 thresholds gave no caution.  Invented data (a fictional transit
agency's survey of riders in 20 depots), simulated with a fixed seed.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.assessment.admissibility import ProblemKind

TWO = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
ONE = "factor overall: seat, clean, quiet, driver, info, punctual\n"


def _depots(seed: int = 3) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    n, depots = 600, 20
    depot = np.repeat(np.arange(depots), n // depots)
    traits = (rng.normal(size=(n, 2)) @ np.linalg.cholesky([[1, .5], [.5, 1]]).T
              + rng.normal(0, .4, (depots, 2))[depot])
    answers = .7 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .7, (n, 6))
    frame = pd.DataFrame(np.searchsorted([-1, -.3, .3, 1], answers) + 1.0,
                         columns=["seat", "clean", "quiet", "driver", "info", "punctual"])
    frame["depot"] = depot
    return frame


def _few(problems) -> list[str]:
    return [" ".join(str(p.explanation).split()) for p in problems if p.kind is ProblemKind.FEW_CLUSTERS]


def test_ordinal_compare_counts_the_thresholds_as_fit_does():
    frame = _depots()
    fitted = _few(cfa_tool.fit(TWO, frame, ordinal="all", cluster="depot").problems)
    # 7 free parameters (6 loadings, 1 correlation) and 24 thresholds (6 items of 5 answers, 4 each), planted above
    assert fitted and fitted[0].startswith("Only 20 clusters in 'depot', no more than the 31 free parameters "
                                           "(7 of the model and 24 thresholds)")
    compared = cfa_tool.compare([TWO, ONE], frame, ordinal="all", cluster="depot")
    assert _few(compared.results[0].problems) == fitted  # the same words for the same model, rows and design
    assert _few(compared.results[1].problems)[0].startswith(
        "Only 20 clusters in 'depot', no more than the 30 free parameters (6 of the model and 24 thresholds)")
    # ... and first in the comparison's own box, as the continuous compare gives it
    from cfa_tool.reporting.workflow_tables import comparison_report

    notice = comparison_report(compared).notice
    assert notice is not None and any("no more than the 31 free parameters" in " ".join(str(line).split())
                                      for line in notice.lines)
