"""A spreadsheet's row of totals or means is recognised before anything else judges its values (new-user trial s13,
U2; hostile trial s13, H5): a totals row under answers on a scale that a 'reversed' statement declares was refused
with advice to give the thirteen column sums as --missing-codes (which the methods paragraph then reported as codes
of no answer); a means row labelled 'Average' that a row filter kept was analysed without a word, because it was
compared with the kept rows only.

Data: the bundled demo (a fictional transit agency's rider survey, simulated with a fixed seed), with a totals row
and a means row computed here by pandas, not by the tool."""

from __future__ import annotations

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.data.odd_values import OddKind
from cfa_tool.errors import DataError
from tests.conftest import run_cli

REVERSED = "\nreversed room_to_stand on 1 to 5\n"


def _with_row(frame: pd.DataFrame, values: pd.Series, rider_id: str, district: str) -> pd.DataFrame:
    row = values.to_frame().T
    row.insert(0, "rider_id", rider_id)
    row.insert(1, "district", district)
    return pd.concat([frame, row], ignore_index=True)


def test_a_totals_row_is_named_before_the_declared_scale(rider_demo, rider_model, tmp_path, capsys):
    items = list(rider_demo.columns[2:])
    totals = _with_row(rider_demo, rider_demo[items].sum(), "Total", "")
    data = tmp_path / "survey.csv"
    totals.to_csv(data, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(rider_model + REVERSED)
    code, _, err = run_cli(["check", model, "--data", data], capsys)
    assert code == 2
    row = len(totals) + 1  # the file's row: the header is row 1
    assert err.startswith(f"cfa-tool: Row {row} of survey.csv holds the sums of the other rows' answers")
    assert "a spreadsheet's totals row, not anyone's answers" in err  # the words every command refuses it with (s15)
    assert '--keep "rider_id != Total"' in err and "--missing-codes" not in err
    # left out as advised, the data are read
    code, _, _ = run_cli(["check", model, "--data", data, "--keep", "rider_id != Total"], capsys)
    assert code == 0
    # a value outside the scale in an ordinary row is still the scale's error, with its --missing-codes advice
    typo = rider_demo.copy()
    typo.loc[3, "room_to_stand"] = 9
    with pytest.raises(Exception, match="--missing-codes|missing_codes"):
        cfa_tool.fit(rider_model + REVERSED, typo)


def test_a_means_row_kept_by_a_filter_is_a_caution_first(rider_demo, rider_model):
    items = list(rider_demo.columns[2:])
    means = _with_row(rider_demo, rider_demo[items].mean().round(2), "", "Average")
    whole = cfa_tool.fit(rider_model, means)
    assert "holds the means of the other rows' answers" in whole.problems[0].explanation
    kept = cfa_tool.fit(rider_model, means, keep="district != south")
    assert kept.n_obs == int((rider_demo["district"] != "south").sum()) + 1  # the means row is analysed ...
    first = kept.problems[0]
    # ... and said first: among the kept rows its label 'Average' names it (review s15: a summary row by its label)
    assert first.explanation.startswith(f"Row labelled {len(rider_demo)} of <data frame> ('Average') holds the means "
                                        f"of the rows above it in {len(items)} item columns")
    # a filter that leaves the row out says nothing of it
    plain = cfa_tool.fit(rider_model, means, keep="district = north")
    assert not any("means of the other rows" in p.explanation for p in plain.problems)
