"""replicate on two sheets of one workbook (new-user trial s23, finding 10): an HR workbook holds one sheet per sample;
--sheet applied to both files and the same workbook twice was refused as 'the same file', so the second sheet had to
be exported by hand.  --validation-sheet (validation_sheet=) names the validation workbook's sheet; the same workbook
with the same sheet stays refused, with the way to name two.  The fit of each sheet is checked against the fit of the
same rows as a data frame.  The data are invented (a fictional transit agency's two rider surveys), simulated with a
fixed seed."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main

MODEL = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
ITEMS = ("seat", "clean", "quiet", "driver", "info", "punctual")


def _sample(seed: int, n: int = 250) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
    return pd.DataFrame(.7 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .7, (n, 6)), columns=ITEMS)


@pytest.fixture
def workbook(tmp_path):
    path = tmp_path / "surveys.xlsx"
    with pd.ExcelWriter(path) as writer:
        _sample(1).to_excel(writer, sheet_name="spring", index=False)
        _sample(2).to_excel(writer, sheet_name="autumn", index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    return path


def test_two_sheets_of_one_workbook_are_the_two_samples(workbook, capsys):
    found = cfa_tool.replicate(MODEL, workbook, workbook, sheet="spring", validation_sheet="autumn")
    reference = cfa_tool.replicate(MODEL, _sample(1), _sample(2))
    assert found.calibration_result.fit.chi_square == pytest.approx(reference.calibration_result.fit.chi_square,
                                                                    rel=1e-8)
    assert found.loose.fit.chi_square == pytest.approx(reference.loose.fit.chi_square, rel=1e-8)
    model = str(workbook.parent / "m.cfa")
    assert main(["replicate", model, "--calibration", str(workbook), "--validation", str(workbook),
                 "--sheet", "spring", "--validation-sheet", "autumn"]) == 0
    out = " ".join(capsys.readouterr().out.split())
    assert "the sheet 'autumn' was read, as named with --validation-sheet" in out
    assert "the sheet 'spring' was read, as named with --sheet" in out


def test_the_same_sheet_twice_or_a_sheet_without_its_file_is_refused(workbook, tmp_path, capsys):
    model = str(workbook.parent / "m.cfa")
    assert main(["replicate", model, "--calibration", str(workbook), "--validation", str(workbook),
                 "--sheet", "spring"]) == 2
    err = capsys.readouterr().err
    assert "the same file" in err and "--sheet and --validation-sheet" in err and len(err.strip().splitlines()) == 1
    assert main(["replicate", model, "--calibration", str(workbook), "--validation", str(workbook),
                 "--sheet", "spring", "--validation-sheet", "spring"]) == 2
    assert "--sheet and --validation-sheet name the same sheet of one workbook ('spring')" in capsys.readouterr().err
    assert main(["replicate", model, "--data", str(workbook), "--validation-sheet", "autumn"]) == 2
    assert "--validation-sheet names the sheet of the --validation file, and no --validation file is given" \
        in capsys.readouterr().err
    csv = tmp_path / "autumn.csv"
    _sample(2).to_csv(csv, index=False)
    assert main(["replicate", model, "--calibration", str(workbook), "--validation", str(csv),
                 "--sheet", "spring", "--validation-sheet", "autumn"]) == 2
    err = capsys.readouterr().err
    assert "is an Excel workbook" in err and "leave --validation-sheet out" in err
