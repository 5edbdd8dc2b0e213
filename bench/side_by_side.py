"""Could two of the default call's extras run side by side?  Mardia's tests (with the whitened rows they share with
the case diagnostics) in a second thread while the score tests run in the caller's, against the two in turn.

    python bench/side_by_side.py [--repeat 15] [--items 30 60 120]

Both pieces are taken from one default fit of run.py's simulated models (the arguments the fit passes them are
captured once) and timed alone, in turn and side by side, taking turns (each with one BLAS thread, as the fit runs
them).  Each piece does the same arithmetic whichever way it runs, and the script checks that the results are the
same to the bit.  The load average is printed beside each row: a second thread can only pay when a core is idle.
Twelfth round (bench/README.md): on this two-core machine side by side did not pay, so the fit runs them in turn.
"""

from __future__ import annotations

import argparse
import os
import statistics
import sys
import time
import warnings
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

from run import simulated  # noqa: E402

import cfa_tool  # noqa: E402
from cfa_tool.numerics.threads import blas_threads_for  # noqa: E402
from cfa_tool.pipeline import continuous  # noqa: E402

warnings.filterwarnings("ignore")


def captured(text, data) -> tuple:
    """(the score tests, whitened rows and Mardia's tests) of one default fit, each a function of no arguments."""
    seen = {}
    score_tests, whitened_rows = continuous.modification_indices, continuous.whitened_rows

    def keep_scores(*args, **kwargs):
        seen["scores"] = (args, kwargs)
        return score_tests(*args, **kwargs)

    def keep_rows(*args, **kwargs):
        seen["rows"] = (args, kwargs)
        return whitened_rows(*args, **kwargs)

    continuous.modification_indices, continuous.whitened_rows = keep_scores, keep_rows
    try:
        cfa_tool.fit(text, data)
    finally:
        continuous.modification_indices, continuous.whitened_rows = score_tests, whitened_rows
    (s_args, s_kwargs), (r_args, r_kwargs) = seen["scores"], seen["rows"]

    def normality():
        whitened = whitened_rows(*r_args, **r_kwargs)
        return continuous.mardia(r_args[0], whitened, None)

    return (lambda: score_tests(*s_args, **s_kwargs)), normality


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=15)
    parser.add_argument("--items", type=int, nargs="*", default=[30, 60, 120])
    args = parser.parse_args()
    side = ThreadPoolExecutor(max_workers=1)
    for items in args.items:
        text, _, data = simulated(items, items // 10, 1000, items)
        scores, normality = captured(text, data)
        with blas_threads_for(items):
            alone = (scores(), normality())
            together = side.submit(normality)
            beside = (scores(), together.result())
            same = alone[1] == beside[1] and all(
                np.array_equal(getattr(alone[0], k), getattr(beside[0], k), equal_nan=True)
                for k in ("rows", "groups", "index", "expected_change", "standardized_expected_change"))
            times: dict[str, list[float]] = {"scores": [], "normality": [], "in turn": [], "beside": []}
            load = os.getloadavg()[0]
            for _ in range(args.repeat):
                for name, fn in (("scores", scores), ("normality", normality)):
                    start = time.perf_counter()
                    fn()
                    times[name].append(time.perf_counter() - start)
                start = time.perf_counter()
                scores()
                normality()
                times["in turn"].append(time.perf_counter() - start)
                start = time.perf_counter()
                together = side.submit(normality)
                scores()
                together.result()
                times["beside"].append(time.perf_counter() - start)
        med = {k: 1e3 * statistics.median(v) for k, v in times.items()}
        low = {k: 1e3 * min(v) for k, v in times.items()}
        print(f"{items} items: score tests {med['scores']:.2f} ms, whitened rows and Mardia's tests {med['normality']:.2f} "
              f"ms; both in turn {med['in turn']:.2f} ms (min {low['in turn']:.2f}), side by side {med['beside']:.2f} ms "
              f"(min {low['beside']:.2f}): beside / in turn {med['beside'] / med['in turn']:.2f} (medians); same "
              f"results to the bit: {same}; load {load:.2f} -> {os.getloadavg()[0]:.2f}", flush=True)
    side.shutdown()


if __name__ == "__main__":
    main()
