"""Where CFI has no value (both noncentralities at most 0, so CFI = 1 - 0/0; Bentler 1990's formula), its change
between two models has none either: an invariance step is then judged by its other rules and the report says 'ΔCFI
not defined', a comparison says so, and the cutoffs of CFI come from the simulated samples where it has a value,
with their count said.  Before, the missing number failed every comparison: the ladder read 'did not hold' for
models that fit exactly, and one sample without a CFI left its cutoffs unset.

The data are built so that CFI is 0/0 by construction: rows whose covariance matrix is exactly that of a one-factor
model with loadings .2 (tests.conftest.exact_cfa_rows; invented population values), so every model of the ladder has
chi-square 0 (noncentrality at most 0) and the items correlate .04, too weakly for the baseline model's chi-square to
exceed its df at these N (baseline noncentrality at most 0 too).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from tests.conftest import exact_cfa_rows, run_cli

ITEMS = [f"x{i}" for i in range(1, 7)]
ONE = "factor f: " + ", ".join(ITEMS) + "\n"


def _weak(n: int, seed: int) -> pd.DataFrame:
    loadings = np.full((6, 1), 0.2)
    return exact_cfa_rows(loadings, np.eye(1), np.diag(1 - loadings[:, 0] ** 2), n, seed, ITEMS)


def test_an_invariance_step_without_delta_cfi_is_judged_by_the_other_changes(tmp_path, capsys):
    a, b = _weak(200, 1), _weak(200, 2)
    a["grp"], b["grp"] = "a", "b"
    data = tmp_path / "groups.csv"
    pd.concat([a, b]).to_csv(data, index=False)
    model = tmp_path / "one.cfa"
    model.write_text(ONE)
    markdown = tmp_path / "ladder.md"
    code, out, err = run_cli(["invariance", model, "--data", data, "--group-column", "grp", "--decide-by",
                              "fit-change", "--json", tmp_path / "ladder.json", "--markdown", markdown], capsys)
    assert code == 0, err
    import json

    steps = json.loads((tmp_path / "ladder.json").read_text())["steps"]
    # identical covariances and zero means in both groups: every equality holds exactly (chi-square 0 at each step)
    assert [s["holds"] for s in steps] == [True, True, True, True], [s["holds"] for s in steps]
    flat = " ".join(markdown.read_text().split())
    assert "did not hold" not in flat and "CFI nan" not in flat
    assert "-0.00" not in flat  # a difference that rounds to zero has no sign (reporting.numbers.num), as elsewhere
    assert "ΔCFI not defined" in flat  # each step's figures in the methods paragraph
    assert "which were judged by ΔRMSEA and ΔSRMR alone" in flat  # and how the steps were judged
    # TLI divides by chi2_b / df_b - 1, at most 0 here (Tucker & Lewis 1973): not defined either, and said so
    assert "CFI and TLI were not defined for the configural" in flat and "TLI divides by at most 0" in flat


def test_a_comparison_says_delta_cfi_is_not_defined(tmp_path, capsys):
    data = tmp_path / "weak.csv"
    _weak(300, 1).to_csv(data, index=False)
    one, equal = tmp_path / "one.cfa", tmp_path / "equal.cfa"
    one.write_text(ONE)
    equal.write_text(ONE + "equal loading(f, x2), loading(f, x3), loading(f, x4)\n")
    markdown = tmp_path / "compare.md"
    code, out, err = run_cli(["compare", one, equal, "--data", data, "--markdown", markdown], capsys)
    assert code == 0, err
    flat = " ".join(markdown.read_text().split())
    assert "ΔCFI not defined, ΔRMSEA" in flat  # the paragraph: not 'no ΔCFI', which names a figure not computed
    assert "ΔCFI not defined: CFI has no value for" in flat  # the difference tests' table says why


def test_cutoffs_of_cfi_come_from_the_samples_that_have_one():
    from cfa_tool.workflows.cutoffs import _cutoffs

    # well-separated distributions (as in test_planning_and_resampling's known-overlap case): correct CFI near 1,
    # misspecified near .85; a few samples of each without a CFI (NaN) must not unset the cutoff
    rng = np.random.default_rng(0)
    correct = np.column_stack([1 - np.abs(rng.normal(0, 0.005, 100)), np.abs(rng.normal(0, 0.01, 100)),
                               np.abs(rng.normal(0.02, 0.005, 100))])
    wrong = np.column_stack([0.85 - np.abs(rng.normal(0, 0.02, 100)), 0.1 + np.abs(rng.normal(0, 0.01, 100)),
                             0.08 + np.abs(rng.normal(0, 0.005, 100))])
    correct[:7, 0] = np.nan
    wrong[:2, 0] = np.nan
    found = _cutoffs(correct, wrong)
    assert found[("cfi", 0.95)] is not None and found[("cfi", 0.95)] < 0.9  # from the 93 and 98 samples with a CFI
    correct[:95, 0] = np.nan  # five left with a CFI: too few to set a cutoff (at least 10)
    assert _cutoffs(correct, wrong)[("cfi", 0.95)] is None


def test_cutoffs_count_and_say_the_samples_without_cfi(tmp_path, capsys):
    data = tmp_path / "weak.csv"
    _weak(300, 1).to_csv(data, index=False)
    model = tmp_path / "one.cfa"
    model.write_text(ONE)
    out_json = tmp_path / "cut.json"
    code, out, err = run_cli(["cutoffs", model, "--data", data, "--replications", "40", "--workers", "1",
                              "--json", out_json], capsys)
    assert code == 0, err
    import json

    result = json.loads(out_json.read_text())["result"]
    without = result["cfi_not_defined_correct"]
    assert without > 0  # the fitted model's samples fit exactly often enough, beside a baseline that fits too
    flat = " ".join(out.split())
    assert (f"CFI had no value in {without} of the {result['converged_correct']} converged samples from the fitted "
            f"model") in flat
    cfi = [c for c in result["cutoffs"] if c["index"] == "cfi"]
    assert all(c.get("beyond") is None for c in cfi)  # this model's CFI is 0/0: on neither side of any cutoff
    assert "this model's CFI is not defined" in flat or all(c.get("cutoff") is None for c in cfi)
