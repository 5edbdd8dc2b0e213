"""The invariance ladder reports its fits to a progress callback (the command line draws a bar from it):
the levels are announced first, each refit of the partial search when it is decided, and every fit is
counted once, so that the bar ends full."""

from __future__ import annotations

from cfa_tool.workflows.invariance import invariance
from tests.pipeline.test_ordinal_groups import MODEL, _draw, _two_groups


def test_progress_counts_every_fit_of_the_ladder_and_its_search():
    data = _two_groups(_draw(800, 4), _draw(800, 3, mean=0.3, shift={4: 0.5}))
    calls = []
    result = invariance(MODEL, data, "site", partial="auto", progress=lambda done, more=0: calls.append((done, more)))
    announced = sum(more for _, more in calls)
    done = sum(d for d, _ in calls)
    assert calls[0] == (0, len(result.steps))  # the five levels of the ordinal ladder, before any fit
    assert result.freed  # the search refitted at least once
    assert announced == done == len(result.steps) + len(result.freed)
