"""Counts a researcher reads (N, rows read, kept, left out, replications) are grouped by thousands from 1,000 up,
in every view, by the one rule (cfa_tool.numbers.count_text): APA style groups the digits of numbers of 1,000 and
more (American Psychological Association 2020, Publication Manual, 7th ed., sec. 6.38; recalled from memory).  The
nineteenth round found the methods paragraph saying 'N = 5000136' beside '5,000,136' in the data line.

A number a command takes stays in plain digits ('--n 1500,1630'), where a grouping comma would split it.
"""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

from tests.conftest import run_cli, simulate_cfa

THREE = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\nfactor c: y7, y8, y9\n"

#: a count of 1,000 or more printed without its grouping comma, in the phrases the reports count rows with
UNGROUPED = re.compile(r"\b(?:N|n) = \d{4,}|\b\d{4,} (?:rows|of|replications|samples|resamples|converged)\b"
                       r"|\bof (?:the )?\d{4,}\b|\bkept \d{4,}")


def _rows(tmp_path) -> str:
    L = np.zeros((9, 3))
    for k in range(3):
        L[3 * k:3 * k + 3, k] = 0.7
    data = simulate_cfa(L, np.eye(3) * 0.7 + 0.3, np.diag(np.full(9, 0.51)), n=2400, seed=20)
    data.loc[:129, "y1"] = np.nan  # 130 rows with a gap
    data.loc[2390:, [f"y{i}" for i in range(1, 10)]] = np.nan  # 10 rows that answer nothing
    data["age"] = np.resize(np.arange(16, 86), len(data))  # invented ages; the filter below keeps 2,366 of 2,400
    data["region"] = np.where(np.arange(len(data)) % 2, "north", "south")
    path = tmp_path / "rows.csv"
    data.to_csv(path, index=False)
    return str(path)


def test_the_counts_of_a_fit_are_grouped_in_every_view(tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text(THREE)
    markdown = tmp_path / "r.md"
    code, out, err = run_cli(["fit", model, "--data", _rows(tmp_path), "--keep", "age >= 18", "--markdown", markdown],
                             capsys)
    assert code == 0, err
    text = out + markdown.read_text()
    assert "2,400 rows" in text and "N = 2," in text  # rows in the file, and N, grouped
    assert not UNGROUPED.findall(text), UNGROUPED.findall(text)


def test_listwise_and_groups_are_grouped(tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text(THREE)
    code, out, err = run_cli(["fit", model, "--data", _rows(tmp_path), "--incomplete-rows", "listwise",
                              "--group-column", "region"], capsys)
    assert code == 0, err
    assert not UNGROUPED.findall(out), UNGROUPED.findall(out)
    assert "n = 1,130" in out  # each group's size in the paragraph: 2,260 complete rows, half in each region


def test_summary_statistics_n_as_given_is_grouped(tmp_path, capsys):
    L = np.zeros((9, 3))
    for k in range(3):
        L[3 * k:3 * k + 3, k] = 0.7
    sigma = L @ (np.eye(3) * 0.7 + 0.3) @ L.T + np.diag(np.full(9, 0.51))
    names = [f"y{i}" for i in range(1, 10)]
    frame = pd.DataFrame(sigma, columns=names)
    frame.insert(0, "covariance", names)
    path = tmp_path / "cov.csv"
    text = frame.to_csv(index=False) + "n,12345\n"
    path.write_text(text)
    model = tmp_path / "m.cfa"
    model.write_text(THREE)
    code, out, err = run_cli(["fit", model, "--data", path], capsys)
    assert code == 0, err
    assert "N = 12,345" in out and not UNGROUPED.findall(out), UNGROUPED.findall(out)


def test_a_power_plans_sample_sizes_grouped_in_words_and_plain_in_the_command(tmp_path, capsys):
    # 160 items of 4 factors: 160 loadings + 160 residual variances + 10 factor (co)variances - 4 markers = 326 free
    # parameters; N = 1,500 is below 5 per parameter (1,630; Bentler & Chou 1987, a rule of thumb, as the tool says)
    items = [f"q{i}" for i in range(1, 161)]
    model = tmp_path / "m.cfa"
    model.write_text("".join(f"factor f{k}: {', '.join(items[40 * k:40 * k + 40])}\n" for k in range(4)))
    markdown = tmp_path / "power.md"
    code, _, err = run_cli(["power", model, "--n", "1500", "--markdown", markdown], capsys)
    assert code == 0, err
    flat = " ".join(markdown.read_text().split())
    assert re.search(r"--n \d+,1500,1630'", flat) and "1500, 1630" in flat  # as the command and Python take them
    assert "N = 1,500" in flat and "1,630 rows here" in flat and "and 1,630 rows, say" not in flat


def test_random_halves_count_their_rows_grouped(tmp_path, capsys):
    model = tmp_path / "m.cfa"
    model.write_text(THREE)
    markdown = tmp_path / "halves.md"
    code, out, err = run_cli(["replicate", model, "--data", _rows(tmp_path), "--seed", "3", "--keep", "age >= 18",
                              "--markdown", markdown], capsys)
    assert code == 0, err
    text = out + markdown.read_text()
    assert "of the 2,400 rows in the file" in text and not UNGROUPED.findall(text), UNGROUPED.findall(text)
    assert not re.search(r"\| \d{4,} \|", markdown.read_text())  # the rows table's cells: grouped too


def test_alignment_counts_its_rows_grouped(tmp_path, capsys):
    path = tmp_path / "sites.csv"
    frame = pd.read_csv(_rows(tmp_path))
    frame["site"] = np.resize(list("abcdef"), len(frame))  # six invented sites of 400 rows
    frame.to_csv(path, index=False)
    model = tmp_path / "m.cfa"
    model.write_text(THREE)
    code, out, err = run_cli(["align", model, "--data", path, "--group-column", "site", "--trials", "0"], capsys)
    assert code == 0, err
    flat = " ".join(out.split())  # 2,390 rows: the 10 that answer nothing are left out
    assert "2,390 rows in 6 groups of site" in flat and not UNGROUPED.findall(flat), UNGROUPED.findall(flat)
