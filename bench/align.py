"""Benchmark of alignment across many groups: 30 groups of 500 rows, 10 items on one factor.

    python bench/align.py [--repeat 3]

Target (issue 19): the whole ``cfa_tool.align`` run (reading the data frame, the configural model in 30
groups with standard errors, the alignment with delta-method standard errors and flagging, and the Monte
Carlo check with its default number of trials) under 10 s on this 2-core machine.  The reference in the same
run is one multi-group fit of the configural model (``cfa_tool.fit`` with the group column, the work the
alignment starts from); the ratio says how many such fits the alignment costs.  Writes
bench/results/align.json and align.md.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "bench"))

from run import timed  # noqa: E402

GROUPS, ROWS, ITEMS = 30, 500, 10
TARGET_S = 10.0


def simulated(seed: int = 7):
    """One factor in 30 groups, means and variances drawn at random, every fifth group with one shifted intercept."""
    import pandas as pd

    rng = np.random.default_rng(seed)
    loadings = rng.uniform(0.6, 1.0, ITEMS)
    intercepts = rng.uniform(2.5, 3.5, ITEMS)
    frames = []
    for g in range(GROUPS):
        mean, sd = (0.0, 1.0) if g == 0 else (rng.normal(0, 0.5), np.sqrt(rng.uniform(0.7, 1.4)))
        nu = intercepts.copy()
        if g % 5 == 1:
            nu[g % ITEMS] += 0.5
        eta = mean + sd * rng.standard_normal(ROWS)
        frame = pd.DataFrame(nu + np.outer(eta, loadings) + rng.normal(0, 0.6, (ROWS, ITEMS)),
                             columns=[f"q{i + 1}" for i in range(ITEMS)])
        frame["country"] = f"c{g:02d}"
        frames.append(frame)
    return pd.concat(frames, ignore_index=True)


def main() -> None:
    import cfa_tool
    from cfa_tool.method import ALIGNMENT_TRIALS as DEFAULT_TRIALS

    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    data = simulated()
    model = "factor f: " + ", ".join(f"q{i + 1}" for i in range(ITEMS)) + "\n"
    scaled = model + "scale latent by variance\n"
    cases = []
    reference = timed(lambda: cfa_tool.fit(scaled, data, group="country", diagnostics=False,
                                           modification_indices=False), args.repeat)
    for trials in (0, DEFAULT_TRIALS):
        t, m, result = timed(lambda: cfa_tool.align(model, data, "country", trials=trials), args.repeat)
        cases.append({"case": f"align, {GROUPS} groups of {ROWS} rows, {ITEMS} items, {trials} Monte Carlo trials"
                              + (" (the default)" if trials == DEFAULT_TRIALS else ""),
                      "min_s": t, "median_s": m, "configural_fits": t / reference[0],
                      "mean_correlation": result.check.factors[0].mean_correlation if result.check else None})
    cases.append({"case": f"reference: one configural fit in {GROUPS} groups (cfa_tool.fit with the group column)",
                  "min_s": reference[0], "median_s": reference[1], "configural_fits": 1.0, "mean_correlation": None})
    out = ROOT / "bench" / "results"
    out.mkdir(exist_ok=True)
    (out / "align.json").write_text(json.dumps({"target_s": TARGET_S, "cases": cases}, indent=2) + "\n")
    lines = ["| case | min (s) | median (s) | in configural fits | target (s) |", "| --- | ---: | ---: | ---: | ---: |"]
    for c in cases:
        target = f"{TARGET_S:g}" if "default" in c["case"] else ""
        lines.append(f"| {c['case']} | {c['min_s']:.2f} | {c['median_s']:.2f} | {c['configural_fits']:.1f} | {target} |")
    (out / "align.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
