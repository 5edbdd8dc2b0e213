"""Every number of a report table's CSV file (--tables) is a cell of its own in the data file's decimal mark (hostile
trial s24b, case 05: explore's solution_fits.csv from a file of semicolons and decimal commas held
'400.763 on 54 df, p < .001' and '.146 [.133, .160]', text of decimal points, beside '9515,1' and ',110' in the same
rows, so that a spreadsheet of decimal commas read neither the chi-square nor the RMSEA as numbers).

The data are the bundled rider survey (invented, simulated with a fixed seed), its first 300 complete rows saved as a spreadsheet
of a decimal-comma locale saves CSV: a byte-order mark, semicolons, decimal commas, CRLF line ends, in Windows-1252.

Check values and their sources:
* the one-factor exploratory solution by maximum likelihood is the one-factor confirmatory model (the same
  covariance structure, Lambda Lambda' + Psi; Lawley & Maxwell 1971, recalled from memory), so its chi-square in
  solution_fits.csv equals the one the fit of models/rider_one_factor.cfa reports of the same rows;
* its degrees of freedom, ((p - k)^2 - (p + k)) / 2 = ((12 - 1)^2 - 13) / 2 = 54 for p = 12 items and k = 1 factor
  (Lawley & Maxwell 1971, recalled from memory);
* its p-value, the upper tail of the chi-square distribution by scipy.stats.chi2.sf.
"""

from __future__ import annotations

import io
import json
import re

import pandas as pd
import pytest
from scipy import stats

from cfa_tool.cli import main
from cfa_tool.resources import resource_dir

ROWS = 300
#: a cell a spreadsheet reads as a number: digits with an optional minus, a decimal comma and exponent (the tables'
#: own cells such as '.52' are written with the file's mark by reporting.text_formats)
NUMBER = re.compile(r"[-\u2212]?(\d+|\d*\.\d+)(e[-+]?\d+)?")


@pytest.fixture(scope="module")
def comma_file(tmp_path_factory):
    folder = tmp_path_factory.mktemp("comma_tables")
    frame = pd.read_csv(resource_dir("demo") / "rider_survey.csv").dropna().head(ROWS)  # one reading of gaps in both
    data = folder / "umfrage.csv"
    data.write_bytes(b"\xef\xbb\xbf" + frame.to_csv(index=False, sep=";", decimal=",",
                                                     lineterminator="\r\n").encode("cp1252"))
    return folder, data


def _run(argv) -> None:
    import contextlib

    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
        assert main([str(a) for a in argv]) == 0


def test_explore_writes_the_solutions_fit_as_numbers_in_the_files_mark(comma_file):
    folder, data = comma_file
    _run(["explore", "--data", data, "--replications", 20, "--tables", folder / "explored"])
    one = folder / "one.cfa"
    one.write_text((resource_dir("models") / "rider_one_factor.cfa").read_text())
    _run(["fit", one, "--data", data, "--json", folder / "one.json"])
    raw = (folder / "explored" / "solution_fits.csv").read_text(encoding="utf-8-sig")
    assert not re.search(r"\d\.\d|(^|[;\[ ])\.\d", raw), raw  # no decimal point anywhere in the file
    fits = pd.read_csv(io.StringIO(raw), sep=";", decimal=",").set_index("Factors")
    numbers = ["Chi-square", "df", "p", "RMSEA", "RMSEA 90% lower", "RMSEA 90% upper", "BIC", "SRMR"]
    assert all(pd.api.types.is_numeric_dtype(fits[c]) for c in numbers), fits.dtypes
    confirmed = json.loads((folder / "one.json").read_text())["fit"]
    assert fits.loc[1, "df"] == 54  # ((12 - 1)^2 - 13) / 2 (Lawley & Maxwell 1971, recalled from memory)
    assert fits.loc[1, "Chi-square"] == pytest.approx(confirmed["chi_square"], rel=1e-5)  # one factor: one model
    assert fits.loc[1, "p"] == pytest.approx(stats.chi2.sf(fits.loc[1, "Chi-square"], 54), rel=1e-6, abs=1e-300)
    assert (fits["RMSEA 90% lower"] <= fits["RMSEA"]).all() and (fits["RMSEA"] <= fits["RMSEA 90% upper"]).all()


COMMANDS = {  # the commands whose reports are swept, each on the same decimal-comma file
    "fit": lambda d, m, o: ["fit", m, "--data", d],
    "compare": lambda d, m, o: ["compare", m, o, "--data", d],
    "invariance": lambda d, m, o: ["invariance", m, "--data", d, "--group-column", "district"],
    "replicate": lambda d, m, o: ["replicate", m, "--data", d, "--seed", 3],
    "scores": lambda d, m, o: ["scores", m, "--data", d, "--output", d.with_name("scores.csv")],
    "explore": lambda d, m, o: ["explore", "--data", d, "--replications", 20, "--split", 5],
}
ALIGN = {"align": lambda d, m, o: ["align", m, "--data", d, "--group-column", "district", "--trials", 20]}


@pytest.fixture(scope="module")
def swept_reports(comma_file) -> dict[str, dict]:
    """The JSON report of each command of the sweep (COMMANDS, then align), each run once on the decimal-comma file
    for the module's tests."""
    folder, data = comma_file
    three, one = folder / "three.cfa", folder / "one.cfa"
    three.write_text((resource_dir("models") / "rider_three_factors.cfa").read_text())
    one.write_text((resource_dir("models") / "rider_one_factor.cfa").read_text())
    reports = {}
    for name, argv in {**COMMANDS, **ALIGN}.items():
        saved = folder / f"swept_{name}.json"
        _run([*argv(data, three, one), "--json", saved])
        reports[name] = json.loads(saved.read_text())["report"]
    return reports


def test_a_table_of_text_in_a_number_column_gives_its_numbers_for_the_files(swept_reports):
    """The neighbours of the case: a table whose number columns (right-aligned) hold a cell that is not a number ('<
    .001', '[.04, .09]', '17.5 on 24 df') gives the same content as numbers (ReportTable.values), which the CSV file
    writes in the data file's mark; swept over the reports of every command that reads a data file and fits."""
    text_cells = []
    for name in COMMANDS:
        report = swept_reports[name]
        assert report["csv_convention"]["decimal_mark"] == ","
        tables = report["tables"] + ([report["problem_table"]] if report.get("problem_table") else [])
        assert tables
        for table in tables:
            if table["values"] is not None:
                continue
            text_cells += [(name, table["key"], cell) for row in table["rows"]
                           for cell, align in zip(row, table["align"])
                           if align == "r" and cell.strip() and not NUMBER.fullmatch(cell.strip())]
    assert text_cells == []


#: a cell of a number rounded for reading: a decimal mark with digits after it ('.82', '0.037', '3.986')
DECIMAL = re.compile(r"[-\u2212]?\d*\.\d+")


def test_no_table_file_holds_numbers_rounded_for_reading(comma_file, swept_reports):
    """fixleft s26: explore's loadings, factor correlations and eigenvalues, scores' quality, correlation and
    keyed-sum tables and align's tables of items, groups and its Monte Carlo check had no numbers for the files (ReportTable.values), so their CSV files held the rounded text of
    the printed views, '.82' written ',82': a spreadsheet reads two decimals of a loading, not the loading.  Every
    table with a decimal number in a number column now gives its values; swept over every command of the sweep
    above (the same runs: swept_reports), and the files of explore and scores checked against the JSON's figures, in
    the data file's mark."""
    folder, data = comma_file
    three = folder / "three.cfa"
    rounded = []
    for name, report in swept_reports.items():
        rounded += [(name, table["key"]) for table in report["tables"] if table["values"] is None
                    and any(align == "r" and DECIMAL.fullmatch(cell.strip())
                            for row in table["rows"] for cell, align in zip(row, table["align"]))]
    assert rounded == []
    _run(["explore", "--data", data, "--replications", 20, "--factors", 3, "--tables", folder / "three_factors",
          "--json", folder / "three_factors.json"])
    pattern = pd.read_csv(folder / "three_factors" / "pattern.csv", sep=";", decimal=",", encoding="utf-8-sig")
    shown = json.loads((folder / "three_factors.json").read_text())["report"]["tables"]
    (table,) = [t for t in shown if t["key"] == "pattern"]
    assert pattern.columns.tolist() == table["value_columns"]
    for row, values in zip(pattern.itertuples(index=False), table["values"]):
        assert list(row)[1:] == pytest.approx(values[1:], abs=1e-12)  # as computed, not to two decimals
    assert any(abs(v * 100 - round(v * 100)) > 1e-6 for v in pattern.iloc[:, 1])  # more than two decimals
    _run(["scores", three, "--data", data, "--output", folder / "scored.csv", "--tables", folder / "scored"])
    quality = pd.read_csv(folder / "scored" / "score_quality_0.csv", sep=";", decimal=",", encoding="utf-8-sig")
    assert pd.api.types.is_float_dtype(quality["Determinacy"])
    assert all(abs(v * 1000 - round(v * 1000)) > 1e-9 for v in quality["Determinacy"])  # not three decimals
