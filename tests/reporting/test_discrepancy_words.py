"""A minimum discrepancy in words by one rule in every view (numbers.discrepancy_text): compare's nesting check wrote
'discrepancy 0.000058' beside 'discrepancy 0.2' (s26), power's paragraphs four decimals, which write a small positive
value as 0.0000."""

from __future__ import annotations

from cfa_tool.numbers import discrepancy_text
from cfa_tool.workflows import nesting


def test_four_decimals_and_never_a_rounded_zero():
    assert discrepancy_text(0.2) == "0.2000" and discrepancy_text(0.0019) == "0.0019"
    assert discrepancy_text(0.000058) == "0.0001"  # rounded as every other value (half up at the fifth decimal)
    assert discrepancy_text(0.00003) == "below 0.0001"  # positive: never written as zero
    assert discrepancy_text(0.0) == "0" and discrepancy_text(-1e-13) == "0"  # a rounding error below zero


def test_the_nesting_check_says_it_by_that_rule(monkeypatch):
    # the nesting check's refusal, its fit of the general model at the restricted one's moments replaced by one whose
    # minimum discrepancy is 0.000058 (the value compare wrote unrounded in s26)
    from types import SimpleNamespace

    monkeypatch.setattr(nesting, "general_at_implied", lambda *a, **k: SimpleNamespace(converged=True, value=0.000058))
    restricted = SimpleNamespace(observed=("a", "b"), multigroup=False, fit=SimpleNamespace(df=5))
    general = SimpleNamespace(observed=("a", "b"), multigroup=False, fit=SimpleNamespace(df=4))
    nested, reason, _ = nesting.is_nested(restricted, None, general)
    assert not nested and "(discrepancy 0.0001)" in reason
