"""Workflows that fit one model many times, on all cores (this process and local worker processes, one BLAS thread each).

    python bench/many_fits.py                 # about a minute on an idle two-core machine
    python bench/many_fits.py --quick         # 200 bootstrap refits, 3 sample sizes of 100 replications

* 1,000 bootstrap refits of case 1 (Holzinger-Swineford, 9 items; percentile intervals only), target 0.25 s;
* 1,000 full-information bootstrap refits of case 1 with 10% of the answers removed at random (seeded),
  each resample's saturated model by EM and its fit by the casewise likelihood, one at a time (the stacked
  search has no casewise likelihood), target 10 s (16 ms per refit measured on one core, 2 cores);
* a power-by-sample-size curve: a 30-item, 3-factor model with population values (loadings .7, factor
  correlations .3, the tool's defaults) at 10 sample sizes from 100 to 1,000, 500 replications each
  (5,000 fits with standard errors), target 20 s;
* the simulated cutoffs of case 1 at the default 200 replications per population (no target: a figure to
  watch; with no cutoff separating the populations at N = 301, the search for the N that would adds four
  more samples of 200, 1,200 fits in all).

Each line names the processes and BLAS threads the workflows ran with: with several, this process computes batches
beside ``workers - 1`` worker processes (workflows.parallel); the processes that computed are counted and their
BLAS libraries asked for their threads from inside them (threadpoolctl), not taken from the settings.

Writes bench/results/many_fits.json and many_fits.md.
"""

from __future__ import annotations

import argparse
import json
import sys
import time
import warnings
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import cfa_tool  # noqa: E402

warnings.filterwarnings("ignore")


def timed(fn) -> float:
    start = time.perf_counter()
    fn()
    return time.perf_counter() - start


def _worker_threads(_task) -> tuple[int, tuple[int, ...]]:
    """(process id, threads of each BLAS library) of the process running this task."""
    import os

    from cfa_tool.numerics.threads import blas_libraries

    time.sleep(0.05)  # long enough that every process takes some of the tasks
    return os.getpid(), tuple(lib.num_threads for lib in blas_libraries())


def workers_and_threads() -> dict:
    """How many processes compute the workflows' batches (this one and its workers) and the BLAS threads each runs,
    read inside them."""
    from cfa_tool.workflows.parallel import default_workers, run_tasks

    workers = default_workers()
    if workers <= 1:
        return {"computing_processes": 1, "blas_threads_per_process": sorted({n for n in _worker_threads(0)[1]})}
    seen = run_tasks(_worker_threads, list(range(8 * workers)), workers, chunk=1)
    return {"computing_processes": len({pid for pid, _ in seen}),
            "blas_threads_per_process": sorted({n for _, threads in seen for n in threads})}


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true")
    args = parser.parse_args()
    from semopy.examples import holzinger39

    hs = holzinger39.get_data()
    model = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    refits = 200 if args.quick else 1000
    pool = workers_and_threads()
    threads = "/".join(map(str, pool["blas_threads_per_process"]))
    helpers = pool["computing_processes"] - 1
    where = (f"{helpers + 1} processes (this one and {helpers} worker{'s' if helpers > 1 else ''}), "
             f"{threads} BLAS thread(s) each" if helpers
             else f"one process, {threads} BLAS thread(s)")
    print(pool, flush=True)
    first = cfa_tool.fit(model, hs)  # imports and the model's layout, as in a session that has fitted it once
    rows = [{"case": f"{refits} bootstrap refits of case 1 ({where})", "seconds": timed(
        lambda: cfa_tool.bootstrap(model, hs, replications=refits, seed=1, bollen_stine=False, bca=False)),
        "target_s": 0.25 * refits / 1000}]
    print(rows[-1], flush=True)
    import numpy as np

    gappy = hs.copy()
    items = [f"x{k}" for k in range(1, 10)]
    values = gappy[items].to_numpy(dtype=float).copy()
    values[np.random.default_rng(1).random(values.shape) < 0.10] = np.nan
    gappy[items] = values
    rows.append({"case": f"{refits} full-information bootstrap refits of case 1, 10% of answers missing ({where})",
                 "seconds": timed(lambda: cfa_tool.bootstrap(model, gappy, replications=refits, seed=1, bca=False,
                                                             bollen_stine=False)),
                 "target_s": 10.0 * refits / 1000})
    print(rows[-1], flush=True)
    thirty = "\n".join(f"factor f{j + 1}: " + ", ".join(f"v{i + 1}" for i in range(j * 10, (j + 1) * 10)) for j in range(3))
    sizes = [100, 400, 1000] if args.quick else list(range(100, 1001, 100))
    replications = 100 if args.quick else 500
    rows.append({"case": f"power by sample size, 30 items, {len(sizes)} sizes x {replications} replications ({where})",
                 "seconds": timed(lambda: cfa_tool.power_simulation(thirty, sizes, replications=replications, seed=1)),
                 "target_s": 20.0 * len(sizes) * replications / 5000})
    print(rows[-1], flush=True)
    from cfa_tool.workflows.parallel import REFITS_TOGETHER, refits_together

    if 200 <= refits_together(REFITS_TOGETHER, len(first.theta)):  # run_tasks keeps a single batch in this process
        where = f"one process, {threads} BLAS thread(s): each population's 200 replications are one batch"
    rows.append({"case": f"cutoffs of case 1, 200 replications per population ({where})",
                 "seconds": timed(lambda: cfa_tool.cutoffs(model, hs, seed=1)), "target_s": None})
    print(rows[-1], flush=True)
    out = ROOT / "bench" / "results"
    out.mkdir(exist_ok=True)
    (out / "many_fits.json").write_text(json.dumps({"cases": rows, **pool}, indent=2) + "\n")
    lines = ["| case | seconds | target (s) |", "| --- | ---: | ---: |"]
    lines += [f"| {r['case']} | {r['seconds']:.2f} | {'-' if r['target_s'] is None else format(r['target_s'], 'g')} |"
              for r in rows]
    lines.append(f"\nProcesses computing: {pool['computing_processes']} (this one and its workers), BLAS threads in each: "
                 f"{', '.join(map(str, pool['blas_threads_per_process']))}.")
    (out / "many_fits.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
