"""The scores file has the same columns in the same order in every run of a model: a researcher's script that reads
it by column must not break because one run had a row without any score, or a 'reversed' statement, and another
had not.  Data: Holzinger & Swineford (1939), tests/datasets; the column names are the README's."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cfa_tool.cli import main
from tests.conftest import DATASETS, THREE_FACTORS

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"
FACTORS = ["visual", "textual", "speed"]
LAST = ["same_answer_to_every_item", "why_not_scored"]


def _written(tmp_path, name: str, data, model: str, capsys) -> pd.DataFrame:
    model_file = tmp_path / f"{name}.cfa"
    model_file.write_text(model)
    out = tmp_path / f"{name}.csv"
    assert main(["scores", str(model_file), "--data", str(data), "--output", str(out), "--id", "id"]) == 0, \
        capsys.readouterr().err
    capsys.readouterr()
    return pd.read_csv(out, dtype={"id": str})


def test_the_columns_do_not_depend_on_the_rows_or_on_a_reversed_statement(tmp_path, capsys):
    raw = pd.read_csv(HS_FILE)
    gaps = raw.copy()
    gaps.loc[4, [f"x{i}" for i in range(1, 10)]] = np.nan  # a row with no answers: it has no score
    gaps.to_csv(tmp_path / "gaps.csv", index=False)
    plain = _written(tmp_path, "plain", HS_FILE, THREE_FACTORS, capsys)
    unscored = _written(tmp_path, "unscored", tmp_path / "gaps.csv", THREE_FACTORS, capsys)
    reversed_ = _written(tmp_path, "reversed", HS_FILE, THREE_FACTORS + "reversed x2 on 0 to 10\n", capsys)
    expected = ["id"] + [f"{f}_regression" for f in FACTORS] + [f"{f}_items_answered" for f in FACTORS] + LAST
    for written in (plain, unscored, reversed_):
        assert list(written.columns) == expected  # before: the last two came and went with the data and the model
    assert plain[LAST].isna().all().all()  # nothing to say: empty
    assert unscored["why_not_scored"].fillna("").tolist() == ["no answers" if k == 4 else "" for k in range(len(raw))]
    assert set(reversed_["same_answer_to_every_item"].dropna()) <= {0, 1} and reversed_["why_not_scored"].isna().all()


def test_the_help_names_the_columns(capsys):
    with pytest.raises(SystemExit):
        main(["scores", "--help"])
    text = " ".join(capsys.readouterr().out.split())
    assert "same_answer_to_every_item" in text and "why_not_scored" in text and "in this order in every run" in text
