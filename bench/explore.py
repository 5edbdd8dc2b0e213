"""Benchmark of exploratory factor analysis: the whole exploration against scikit-learn in one run.

    python bench/explore.py [--repeat 5]

Writes bench/results/explore.json and bench/results/explore.md.  Speed is never asserted in the
test suite.  Target (issue 17): an exploration with the number of factors chosen automatically,
on 60 items and N = 2,000 with 100 parallel-analysis replications, under 5 s on this 2-core
machine.

What is timed, from a data frame to the answer:

* **ours**: ``sample_moments`` (data checks, covariance matrix), then ``explore_correlations``:
  parallel analysis (100 random matrices, components and factors), the minimum average partial
  tests, maximum-likelihood solutions with 1 to (largest count + 2) factors, the extraction at the
  recommended count, the rotation, the standard errors of the rotated loadings and factor
  correlations, and the draft model;
* **scikit-learn** (the reference, the ratio's numerator): ``FactorAnalysis`` with the number of
  factors given and varimax, on the same data: one maximum-likelihood extraction and rotation,
  without counting factors or standard errors (a fraction of the work above).

Both take turns in one process, so that the machine's load affects them alike (it is a shared
virtual machine: times move by up to 2x between runs).
"""

from __future__ import annotations

import argparse
import json
import statistics
import sys
import time
import warnings
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from cfa_tool.data.moments import sample_moments  # noqa: E402
from cfa_tool.exploration import (ExploreSettings, ExtractionMethod, RotationMethod, RotationSpec,  # noqa: E402
                                  explore_correlations, from_sample_moments)

warnings.filterwarnings("ignore")
TARGET_S = 5.0


def simulated(items: int, factors: int, n: int, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    per = items // factors
    L = np.zeros((items, factors))
    for i in range(items):
        L[i, i // per] = rng.uniform(0.5, 0.8)
    phi = 0.3 + 0.7 * np.eye(factors)
    sigma = L @ phi @ L.T + np.diag(1 - np.sum((L @ phi) * L, axis=1))
    return pd.DataFrame(rng.multivariate_normal(np.zeros(items), sigma, size=n), columns=[f"v{i + 1}" for i in range(items)])


def ours(data: pd.DataFrame, settings: ExploreSettings):
    moments = sample_moments(data, tuple(data.columns), "<bench>")
    return explore_correlations(from_sample_moments(moments), settings)


def reference(data: pd.DataFrame, factors: int):
    from sklearn.decomposition import FactorAnalysis

    return FactorAnalysis(factors, rotation="varimax").fit(data.to_numpy(float))


def interleaved(functions, repeat: int) -> list[tuple[float, float, object]]:
    times = [[] for _ in functions]
    outs = [None] * len(functions)
    for _ in range(repeat):
        for k, fn in enumerate(functions):
            start = time.perf_counter()
            outs[k] = fn()
            times[k].append(time.perf_counter() - start)
    return [(min(t), statistics.median(t), out) for t, out in zip(times, outs)]


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args()
    data = simulated(60, 6, 2000, 60)
    cases = [
        ("automatic count, maximum likelihood, quartimin (defaults)", ExploreSettings(replications=100)),
        ("automatic count, maximum likelihood, geomin (21 starts)",
         ExploreSettings(replications=100, rotation=RotationSpec(RotationMethod.GEOMIN))),
        ("automatic count, maximum likelihood, promax", ExploreSettings(replications=100,
                                                                         rotation=RotationSpec(RotationMethod.PROMAX))),
        ("automatic count, least squares, quartimin", ExploreSettings(replications=100,
                                                                       extraction=ExtractionMethod.LEAST_SQUARES)),
        ("6 factors given, maximum likelihood, quartimin (no count)", ExploreSettings(factors=6)),
    ]
    rows = []
    for name, settings in cases:
        (t_ours, m_ours, found), (t_ref, m_ref, _) = interleaved(
            [lambda s=settings: ours(data, s), lambda: reference(data, 6)], args.repeat)
        row = {"case": f"60 items, N = 2,000: {name}", "ours_min_s": t_ours, "ours_median_s": m_ours,
               "sklearn_min_s": t_ref, "sklearn_median_s": m_ref, "ratio": t_ref / t_ours,
               "factors_found": found.factors, "target_met": m_ours < TARGET_S}
        rows.append(row)
        print(row, flush=True)
    out = ROOT / "bench" / "results"
    out.mkdir(exist_ok=True)
    (out / "explore.json").write_text(json.dumps({"cases": rows, "target_s": TARGET_S}, indent=2) + "\n")
    lines = ["| case | ours min (s) | ours median (s) | scikit-learn min (s) | ratio (scikit-learn / ours) | factors found "
             "| under 5 s |", "| --- | ---: | ---: | ---: | ---: | ---: | --- |"]
    for r in rows:
        lines.append(f"| {r['case']} | {r['ours_min_s']:.3f} | {r['ours_median_s']:.3f} | {r['sklearn_min_s']:.3f} | "
                     f"{r['ratio']:.2f} | {r['factors_found']} | {r['target_met']} |")
    (out / "explore.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
