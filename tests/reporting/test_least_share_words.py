"""The least share of a factor's items a row must answer for its item sum, in words: never a percentage rounded to
another number (hostile trial s20: --least-answered 0.0001 was printed 'at least 0%' in the methods paragraph and the
notes, while the rule applied was 'at least one item')."""

from __future__ import annotations

import pytest

from cfa_tool.reporting.score_words import share_words
from tests.conftest import run_cli


@pytest.mark.parametrize("share, words", [(0.5, "half"), (0.6, "60%"), (0.0001, "0.01%"), (0.001, "0.1%"),
                                          (0.75, "75%"), (1.0, "100%"), (0.123, "12.3%")])
def test_share_words(share, words):
    assert share_words(share) == words


def test_a_tiny_share_is_not_printed_as_zero(tmp_path, capsys, rider_demo, rider_model):
    data = tmp_path / "rider.csv"
    rider_demo.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    code, out, err = run_cli(["scores", model, "--data", data, "--method", "item-mean", "--least-answered", "0.0001",
                              "--output", tmp_path / "s.csv"], capsys)
    assert code == 0, err
    flat = " ".join(out.split())
    assert "at least 0%" not in flat and "fewer than 0%" not in flat and "at least 0.01%" in flat
