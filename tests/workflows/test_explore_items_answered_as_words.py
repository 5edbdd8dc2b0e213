"""explore chooses its default items by one rule whatever the answers' coding (new-user trial s21, finding 3): with
every answer recorded as a word (an 'answers' statement coding them 1 to 5), years of service with one decimal were
explored as an item, while the same data coded as numbers left them out; with ordinal items the run then stopped on
their first fraction without naming the option that chooses the items.  Check values: the correlations the rule
reads against pandas' pairwise-complete Pearson correlations (DataFrame.corrwith).  Invented data: a fictional
transit agency's staff survey, fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.errors import DataError
from cfa_tool.workflows.explore import LeftOut, explore

ITEMS = [f"{p}{i}" for p in ("en", "be") for i in range(1, 5)]
WORDS = ["Strongly disagree", "Disagree", "Neither agree nor disagree", "Agree", "Strongly agree"]


def _survey(n: int = 400, seed: int = 21) -> pd.DataFrame:
    """Two factors of four items answered 1 to 5 (.4 apart), a department as text, and years of service with one
    decimal (a gamma(2, 3) variable) that has nothing to do with the answers."""
    rng = np.random.default_rng(seed)
    eta = rng.multivariate_normal(np.zeros(2), [[1, .4], [.4, 1]], size=n)
    frame = pd.DataFrame({"department": rng.choice(["Depot", "Control room", "Ticketing"], n),
                          "tenure_years": np.round(rng.gamma(2, 3, n), 1)})
    for k, name in enumerate(ITEMS):
        y = 0.75 * eta[:, k // 4] + np.sqrt(1 - 0.75 ** 2) * rng.standard_normal(n)
        frame[name] = np.searchsorted([-1.3, -0.4, 0.4, 1.3], y) + 1.0
    return frame


def _as_words(frame: pd.DataFrame) -> pd.DataFrame:
    return frame.assign(**{c: frame[c].map(lambda v: WORDS[int(v) - 1]) for c in ITEMS})


def _answers_file(tmp_path):
    path = tmp_path / "answers.cfa"
    path.write_text("answers " + ", ".join(f'"{w}" = {k}' for k, w in enumerate(WORDS, 1)) + "\n")
    return path


def test_years_of_service_are_left_out_whether_the_answers_are_words_or_numbers(tmp_path):
    numbers = _survey()
    assert numbers[ITEMS].corrwith(numbers["tenure_years"]).abs().max() < 0.30  # pandas: unrelated to the items
    as_numbers = explore(numbers, factors=2, replications=10)
    as_words = explore(_as_words(numbers), answers=_answers_file(tmp_path), factors=2, replications=10)
    assert list(as_numbers.items) == ITEMS and list(as_words.items) == ITEMS
    assert as_words.left_out == as_numbers.left_out == (("tenure_years", LeftOut.MEASURE_OFF_THE_SCALE),)
    note = next(str(n) for n in as_words.notes if str(n).startswith("Items:"))
    assert "Left out as measures rather than answers on the 1 to 5 scale that most columns hold" in note


def test_ordinal_items_recorded_as_words_are_explored_without_the_years_of_service(tmp_path):
    result = explore(_as_words(_survey()), answers=_answers_file(tmp_path), ordinal="all", factors=2,
                     replications=10)
    assert list(result.items) == ITEMS


def test_a_default_item_with_fractions_under_ordinal_names_the_option_that_chooses_the_items():
    frame = _survey()
    rng = np.random.default_rng(4)
    # hours of overtime with decimals that go with the first factor's answers: kept as an item by default
    frame["overtime_hours"] = np.round(np.clip(2 * frame[ITEMS[:4]].mean(axis=1) + rng.normal(0, 1, len(frame)),
                                               0, None), 1)
    assert frame[ITEMS].corrwith(frame["overtime_hours"]).abs().max() >= 0.30  # pandas: it goes with the items
    with pytest.raises(DataError) as caught:
        explore(frame, ordinal="all", factors=2, replications=10)
    message = str(caught.value)
    assert "ordinal item 'overtime_hours' has the answer" in message
    assert "name the items with items=..." in message
