"""Mardia's tests beside the score tests in a second thread (numerics.threads.side_thread) against the two in turn.

    python bench/side_by_side.py [--repeat 7] [--items 30 60 120]

The default call ``fit(text, data).to_dict()`` of run.py's simulated models, with the second thread forced on
(whatever the machine's load: this measures what the rule would allow on an idle machine) and off, taking turns
(see run.interleaved); the load average is printed beside each row, since the second thread can only pay when a
core is idle.  Also checks that both give the same ``to_dict()`` to the bit (bench/same_output.differences).
"""

from __future__ import annotations

import argparse
import os
import sys
import time
import warnings
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

from run import interleaved, simulated  # noqa: E402
from same_output import differences  # noqa: E402

import cfa_tool  # noqa: E402
from cfa_tool.numerics import threads  # noqa: E402
from cfa_tool.pipeline import continuous  # noqa: E402

warnings.filterwarnings("ignore")


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=7)
    parser.add_argument("--items", type=int, nargs="*", default=[30, 60, 120])
    args = parser.parse_args()
    load = os.getloadavg
    threads.os.getloadavg = lambda: (0.0, 0.0, 0.0)  # the rule's load check set aside: forced on
    shown = continuous.SIDE_BY_SIDE_ITEMS
    for items in args.items:
        text, _, data = simulated(items, items // 10, 1000, items)

        def call(beside: bool):
            continuous.SIDE_BY_SIDE_ITEMS = shown if beside else 10**9
            return cfa_tool.fit(text, data).to_dict()

        found = differences(call(False), call(True))
        before = load()[0]
        start = time.perf_counter()
        (t_turn, m_turn, _), (t_side, m_side, _) = interleaved([lambda: call(False), lambda: call(True)],
                                                               args.repeat, 10 if items <= 60 else 1)
        print(f"{items} items: in turn {1e3 * t_turn:.2f} ms (median {1e3 * m_turn:.2f}), beside {1e3 * t_side:.2f} ms "
              f"(median {1e3 * m_side:.2f}); beside / in turn {t_side / t_turn:.2f} (min), {m_side / m_turn:.2f} "
              f"(median); {len(found)} differences in to_dict(); load {before:.2f} -> {load()[0]:.2f} "
              f"({time.perf_counter() - start:.0f} s)", flush=True)
    continuous.SIDE_BY_SIDE_ITEMS = shown
    threads.os.getloadavg = load


if __name__ == "__main__":
    main()
