"""A model of 0 degrees of freedom has no CFI, as it has no TLI and no RMSEA (its chi-square is 0 by construction, so
CFI = 1 - 0 / lambda_baseline = 1 tests nothing; Bentler 1990's index compares noncentralities that such a model
cannot have): every view that lists CFI leaves it empty (hostile trial s20: replicate printed CFI 1.000 for the
calibration fit and for a 'loose replication' of a just-identified model, compare and invariance did likewise, while
fit printed none)."""

from __future__ import annotations

import math

from cfa_tool.assessment.fit_indices import cfi_value
from tests.conftest import run_cli


def test_cfi_is_not_defined_at_zero_df():
    assert math.isnan(cfi_value(0.0, 0, 500.0, 3))
    # beside it, a model with df: 1 - (10 - 5) / (500 - 10) (Bentler 1990)
    assert cfi_value(10.0, 5, 500.0, 10) == 1 - 5 / 490


def test_replicate_and_compare_leave_cfi_empty_for_a_just_identified_model(tmp_path, capsys, rider_demo):
    data = tmp_path / "rider.csv"
    rider_demo.to_csv(data, index=False)
    model = tmp_path / "f3.cfa"
    model.write_text("factor f: on_time, short_wait, accurate_info\n")
    code, out, err = run_cli(["replicate", model, "--data", data, "--seed", "1", "--json", tmp_path / "r.json"], capsys)
    assert code == 0, err
    for line in out.splitlines():
        if line.strip().startswith(("Calibration fit", "Loose: same model refitted")):
            assert line.split()[-1] == "0", line  # the df is the last cell: no CFI beside it
    tied = tmp_path / "tied.cfa"  # the same items, two loadings held equal: 1 df
    tied.write_text("factor f: on_time, short_wait, accurate_info\nequal loading(f, short_wait), loading(f, accurate_info)\n")
    code, out, err = run_cli(["compare", model, tied, "--data", data], capsys)
    assert code == 0, err
    row = next(line for line in out.splitlines() if line.split()[:1] == ["CFI"] and len(line.split()) < 4)
    assert len(row.split()) == 2, row  # the tied model's value only (the just-identified one has none)
