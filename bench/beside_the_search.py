"""The data-only diagnostics (whitened rows, Mardia's tests) in a second thread during the search, forced on against
in turn, taking turns (twenty-second round).

    python bench/beside_the_search.py [--rounds 20]

Each round fits 30 and 60 simulated items (N = 1,000) three times with the side thread forced on
(numerics.threads.FORCE_SIDE_THREAD: the load test of its guards skipped) and three times without, the order
alternating; prints the load average, then wall and processor times (min and median) and their ratios.
"""

from __future__ import annotations

import argparse
import os
import statistics
import sys
import time
import warnings
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

from run import simulated  # noqa: E402

import cfa_tool  # noqa: E402
import cfa_tool.numerics.threads as threads  # noqa: E402
from cfa_tool.pipeline import continuous  # noqa: E402

warnings.filterwarnings("ignore")


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--rounds", type=int, default=20)
    args = parser.parse_args()
    print(f"load average {os.getloadavg()[0]:.1f}")
    for items in (30, 60):
        text, _, data = simulated(items, items // 10, 1000, items)
        cfa_tool.fit(text, data).to_dict()
        wall = {True: [], False: []}
        cpu = {True: [], False: []}
        used = []
        real = continuous.Beside
        continuous.Beside = lambda *a: used.append(1) or real(*a)
        for k in range(args.rounds):
            for force in ((True, False) if k % 2 else (False, True)):
                threads.FORCE_SIDE_THREAD = force
                for _ in range(3):
                    w, c = time.perf_counter(), time.process_time()
                    cfa_tool.fit(text, data).to_dict()
                    wall[force].append(time.perf_counter() - w)
                    cpu[force].append(time.process_time() - c)
        continuous.Beside = real
        threads.FORCE_SIDE_THREAD = False
        for name, t in (("wall", wall), ("processor", cpu)):
            print(f"{items} items, {name}: in turn min {min(t[False]) * 1e3:.2f} median "
                  f"{statistics.median(t[False]) * 1e3:.2f} ms; beside min {min(t[True]) * 1e3:.2f} median "
                  f"{statistics.median(t[True]) * 1e3:.2f} ms; beside / in turn {min(t[True]) / min(t[False]):.3f} (min) "
                  f"{statistics.median(t[True]) / statistics.median(t[False]):.3f} (median)")
        print(f"  side thread started in {len(used)} fits (forced on: {3 * args.rounds})")
    print(f"load average {os.getloadavg()[0]:.1f}")


if __name__ == "__main__":
    main()
