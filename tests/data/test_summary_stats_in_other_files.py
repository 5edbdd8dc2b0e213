"""A covariance matrix laid out as summary statistics ('covariance' in the first cell, a lower triangle, a row 'n')
but saved as a workbook or a tab-separated file is refused with the reason: summary statistics are read from .csv and
.stats files (hostile trial s13, H10).  The workbook's message told the user to write 'covariance' in the first cell
"(now 'covariance')"; the .tsv's said "line 2 has 2 fields but the header has 13".  The same matrix as .csv is read.

Data: the covariance matrix of the bundled demo's items (a fictional transit agency's rider survey, simulated with a
fixed seed), computed by pandas."""

from __future__ import annotations

import pandas as pd
import pytest

from tests.conftest import run_cli


@pytest.fixture(scope="module")
def layout(rider_demo) -> list[list]:
    items = list(rider_demo.columns[2:])
    cov = rider_demo[items].cov()
    return ([["covariance"] + items] + [[a] + [round(cov.iloc[i, j], 5) for j in range(i + 1)]
                                        for i, a in enumerate(items)] + [["n", len(rider_demo)]])


def test_summary_statistics_in_a_workbook_or_tsv_say_which_files_hold_them(layout, rider_model, tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text(rider_model)
    (tmp_path / "cov.csv").write_text("\n".join(",".join(map(str, r)) for r in layout) + "\n")
    (tmp_path / "cov.tsv").write_text("\n".join("\t".join(map(str, r)) for r in layout) + "\n")
    width = len(layout[0])
    pd.DataFrame([r + [None] * (width - len(r)) for r in layout]).to_excel(tmp_path / "cov.xlsx", header=False,
                                                                           index=False)
    code, _, _ = run_cli(["fit", model, "--data", tmp_path / "cov.csv"], capsys)
    assert code == 0
    code, _, err = run_cli(["fit", model, "--data", tmp_path / "cov.xlsx"], capsys)
    assert code == 2
    assert "holds a covariance matrix laid out as summary statistics" in err
    assert "summary statistics are read from comma-separated .csv files and .stats files only" in err
    assert "(now 'covariance')" not in err
    code, _, err = run_cli(["fit", model, "--data", tmp_path / "cov.tsv"], capsys)
    assert code == 2
    assert "summary statistics are read from comma-separated .csv files and .stats files only" in err
    assert "fields but the header" not in err
