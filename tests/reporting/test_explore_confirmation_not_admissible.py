"""explore --split: a draft model whose fit to the confirmation half is not admissible is headed as every fit that is
not admissible is (tables.problem_notice, the one rule), its lines first, in every view (hostile trial s17,
finding 4); before, the exploration's softer heading 'Check before interpreting this solution' stood above it.

The data are simulated here (seed 1): x1 correlates .8 with x2 and x3, which correlate .5, so one factor of the
three asks for a loading of x1 above 1 (r12 r13 / r23 = lambda1^2 = 1.28 for three indicators of one factor,
Bollen 1989, ch. 7): a negative residual variance of x1 in the confirmation fit."""

from __future__ import annotations

import numpy as np
import pandas as pd

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.reports import report_of
from cfa_tool.reporting.text_formats import report_markdown


def test_a_confirmation_fit_not_admissible_is_headed_so_and_comes_first():
    rng = np.random.default_rng(1)
    R = np.eye(6)
    R[0, 1] = R[1, 0] = R[0, 2] = R[2, 0] = .8
    R[1, 2] = R[2, 1] = .5
    R[3:, 3:] = .49
    np.fill_diagonal(R, 1.0)
    R[:3, 3:] = R[3:, :3] = .3
    data = pd.DataFrame(rng.multivariate_normal(np.zeros(6), R, size=400).round(4),
                        columns=["x1", "x2", "x3", "y1", "y2", "y3"])
    result = cfa_tool.explore(data, factors=2, split=3)
    confirmation = result.split.confirmation
    assert not confirmation.admissible  # the case this test is about (a negative residual variance)
    report = report_of(result)
    assert report.notice.heading == T.NOT_ADMISSIBLE and report.notice.inadmissible
    assert str(report.notice.lines[0]).startswith("Confirmation half: ")
    assert report_markdown(report).startswith(f"## {T.NOT_ADMISSIBLE}")
