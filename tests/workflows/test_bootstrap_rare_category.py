"""The bootstrap of ordinal items with an answer category given by one row (hostile s22, case 04).

A resample that draws no row giving the rare answer lacks that category.  It is fitted with the categories it holds
and kept (its correlations and loadings are those of the same latent responses cut more coarsely); only the threshold
with no answer on one side of it has no value there, so its interval is not available, with the count of resamples
that lacked the category, in every view; every other interval comes from all converged resamples.  Before session
23 such resamples were dropped, and the interval of the rare category's threshold ended at the estimate.

Check values: the chance that a resample of N rows drawn with replacement leaves out one given row, (1 - 1/N)^N
(Efron & Tibshirani 1993, ch. 6, the bootstrap's share of rows left out, recalled), with its binomial spread; a
threshold's first-step estimate, the normal quantile of the proportion of answers at or below it (Olsson 1979),
computed here with scipy."""

from __future__ import annotations

import csv
import json

import numpy as np
import pandas as pd
from scipy import stats

import cfa_tool
from cfa_tool.workflows.simulation import simulate
from tests.commands.test_cli import run

MODEL = "factor f: y1, y2, y3, y4\nordinal y1..y4\n"
N = 300


def _one_row_in_category_1(seed: int = 4) -> pd.DataFrame:
    data = simulate(MODEL, N, seed=seed, categories=5).frame
    ones = data.index[data["y2"] == 1]
    assert len(ones) > 1
    data.loc[ones[1:], "y2"] = 2  # category 1 of y2 now given by one row
    return data


def test_resamples_without_the_rare_category_are_kept_and_its_threshold_has_no_interval():
    boot = cfa_tool.bootstrap(MODEL, _one_row_in_category_1(), replications=100, seed=3, workers=1)
    # nothing left out for the lacked category: before, about a third of the resamples could not be analysed
    assert boot.failed == 0 and boot.converged >= 98
    lacked = {(c.item, c.category): c.samples for c in boot.lacked}
    assert set(lacked) == {("y2", 1.0)} and boot.resamples_lacking == lacked[("y2", 1.0)]
    # (1 - 1/300)^300 = .367 of the resamples leave the one row out; binomial SD at 100 resamples .048: 4.5 SDs
    share = (1 - 1 / N) ** N
    assert abs(lacked[("y2", 1.0)] / boot.converged - share) < 4.5 * np.sqrt(share * (1 - share) / boot.converged)
    first = next(i for i in boot.intervals if i.kind == "threshold" and i.variables == ("y2", "1"))
    assert not first.available and first.lacked_below == lacked[("y2", 1.0)] and first.lacked_above == 0
    assert np.isnan(first.percentile).all() and np.isnan(first.bootstrap_se)
    # every other interval is given, from all converged resamples, and holds its estimate
    others = [i for i in boot.intervals if i is not first]
    assert others and all(i.available for i in others)
    for i in others:
        if i.kind in ("loading", "threshold") and i.scale == "unstandardized":
            assert i.percentile[0] < i.estimate < i.percentile[1], i
    saved = boot.to_dict()["result"]
    assert saved["categories_lacked"] == [{"item": "y2", "category": 1.0, "samples": lacked[("y2", 1.0)]}]
    row = next(i for i in saved["intervals"] if i["variables"] == ["y2", "1"])
    assert row["interval_available"] is False and row["percentile_ci95"] == [None, None]
    assert row["resamples_without_answer_below"] == lacked[("y2", 1.0)]


def test_a_lacked_middle_category_leaves_its_two_thresholds_one_value():
    from cfa_tool.workflows.ordinal_resampling import OrdinalFitting, _refit, threshold_place

    data = simulate(MODEL, N, seed=8, categories=5).frame
    fitting = OrdinalFitting.of_fit(cfa_tool.parse_model(MODEL), cfa_tool.fit(MODEL, data), keep_levels=True)
    keys = tuple(("threshold", ("y3", str(k))) for k in range(1, 5)) + (("loading", ("f", "y3")),)
    sample = data.copy()
    sample.loc[sample["y3"] == 3, "y3"] = 4  # no row of this sample answers 3
    refit = _refit(fitting.fit(sample[list(fitting.names)].to_numpy(float)), keys, fitting.levels)
    assert refit.converged and refit.lost == (("y3", 3.0),) and refit.lacked == ()
    # each threshold is the normal quantile of the share of answers at or below it (Olsson 1979; scipy): the
    # thresholds on the two sides of the lacked answer 3 are the same, that of the share at or below 2
    y3 = sample["y3"].to_numpy()
    expected = [stats.norm.ppf(np.mean(y3 <= c)) for c in (1, 2, 2, 4)]
    np.testing.assert_allclose(refit.values[:4], expected, atol=1e-12)
    assert np.isfinite(refit.values[4])
    # an end category lacked: no value below (or above) the threshold next to it
    assert threshold_place((1.0, 2.0, 3.0), (2.0, 3.0), 1) == (0, -1)
    assert threshold_place((1.0, 2.0, 3.0), (1.0, 2.0), 2) == (0, 1)
    assert threshold_place((1.0, 2.0, 3.0, 4.0), (1.0, 3.0, 4.0), 2) == (1, 0)


def test_every_view_says_the_interval_is_not_available(tmp_path):
    _one_row_in_category_1().to_csv(tmp_path / "d.csv", index=False)
    (tmp_path / "m.cfa").write_text(MODEL)
    done = run("bootstrap", "m.cfa", "--data", "d.csv", "--replications", "60", "--workers", "1", "--json", "b.json",
               "--html", "b.html", "--docx", "b.docx", "--markdown", "b.md", "--tables", "t", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    first_box = done.stdout.split("\n\n")[0]
    assert "No interval for threshold 1 of y2" in " ".join(first_box.replace("│", " ").split())
    line = next(x for x in done.stdout.splitlines() if "threshold 1 of y2" in x and "unstd." in x)
    assert "not available" in line
    html = (tmp_path / "b.html").read_text()
    assert "No interval for threshold 1 of y2" in html and "not available" in html
    assert "not available" in (tmp_path / "b.md").read_text()
    import docx

    document = docx.Document(str(tmp_path / "b.docx"))
    assert any("No interval for threshold 1 of y2" in p.text for p in document.paragraphs)
    assert any(r.cells[0].text == "threshold 1 of y2" and "not available" in r.cells[-1].text.replace("\xa0", " ")
               for t in document.tables for r in t.rows)
    saved = json.loads((tmp_path / "b.json").read_text())["result"]
    assert next(i for i in saved["intervals"] if i["variables"] == ["y2", "1"])["interval_available"] is False
    with open(tmp_path / "t" / "bootstrap_intervals.csv", newline="") as f:
        rows = list(csv.DictReader(f))
    row = next(r for r in rows if r["Kind"] == "threshold" and r["Variables"].startswith("y2") and '"1"' in r["Variables"])
    assert row["Percentile lower"] == "" and row["Percentile upper"] == "" and int(row["Resamples without a value"]) > 0
