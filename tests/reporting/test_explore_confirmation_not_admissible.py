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
from tests.heywood_data import ITEMS, heywood_draws


def test_a_confirmation_fit_not_admissible_is_headed_so_and_comes_first():
    data = pd.DataFrame(heywood_draws(np.random.default_rng(1)).round(4), columns=ITEMS)
    result = cfa_tool.explore(data, factors=2, split=3)
    confirmation = result.split.confirmation
    assert not confirmation.admissible  # the case this test is about (a negative residual variance)
    report = report_of(result)
    assert report.notice.heading == T.NOT_ADMISSIBLE and report.notice.inadmissible
    assert str(report.notice.lines[0]).startswith("Confirmation half: ")
    assert report_markdown(report).startswith(f"## {T.NOT_ADMISSIBLE}")
