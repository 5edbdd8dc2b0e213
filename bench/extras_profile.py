"""Processor time of each extra of the default call, measured inside default fits (twenty-third round).

    python bench/extras_profile.py [--items 9 30 60] [--fits 30]

Wraps, in the fit's own modules, every extra the default call adds to the lean one (the score tests, Mardia's tests
and the whitened rows they share with the case diagnostics, reliability, normalized residuals, case diagnostics,
the per-group blocks ``_group_diagnostics`` and ``_summary``, ``to_dict()``) and reads the fitting thread's
processor time (``time.thread_time``: other processes do not add to it, so it holds still on a loaded machine
better than wall time) around each call.  Prints, per number of items, the median per fit of each piece in the
default call (with ``to_dict()``) and in the lean call, taken in turns, and of the two whole calls.  Nested pieces:
reliability, the normalized residuals and the case diagnostics are parts of ``_group_diagnostics``; ``_summary``
(the items' shape and answer ranges) runs in both calls.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
import warnings
from collections import defaultdict
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

from run import simulated  # noqa: E402

import cfa_tool  # noqa: E402
from cfa_tool.pipeline import continuous, results  # noqa: E402

warnings.filterwarnings("ignore")
HS_MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
PIECES = {  # name in the report: (module, attribute)
    "score tests (modification indices)": (continuous, "modification_indices"),
    "whitened rows": (continuous, "whitened_rows"),
    "Mardia's tests": (continuous, "mardia"),
    "_group_diagnostics": (continuous, "_group_diagnostics"),
    "  reliability": (continuous, "reliability"),
    "  normalized residuals": (continuous, "normalized_residuals"),
    "  case diagnostics": (continuous, "case_diagnostics"),
    "_summary": (continuous, "_summary"),
}
spent: dict[str, float] = defaultdict(float)  # seconds of each piece since it was last cleared


def thread_timed(name: str, fn, into: dict[str, float] = spent):
    """``fn`` wrapped so that the processor time of the calling thread in each call (``time.thread_time``) is added to
    ``into[name]`` (a defaultdict(float)): the one timing wrapper of the bench's profiles (bench/fiml_patterns.py too)."""
    def wrapper(*args, **kwargs):
        start = time.thread_time()
        try:
            return fn(*args, **kwargs)
        finally:
            into[name] += time.thread_time() - start
    return wrapper


def install() -> None:
    for name, (module, attribute) in PIECES.items():
        setattr(module, attribute, thread_timed(name, getattr(module, attribute)))
    results.FitResult.to_dict = thread_timed("to_dict()", results.FitResult.to_dict)


def data_for(items: int):
    if items == 9:
        from semopy.examples import holzinger39
        return HS_MODEL, holzinger39.get_data()
    text, _, data = simulated(items, items // 10, 1000, items)
    return text, data


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--items", type=int, nargs="+", default=[9, 30, 60])
    parser.add_argument("--fits", type=int, default=30)
    args = parser.parse_args()
    install()
    names = list(PIECES) + ["to_dict()"]
    table = {}
    for items in args.items:
        text, data = data_for(items)
        calls = {"default": lambda: cfa_tool.fit(text, data).to_dict(),
                 "lean": lambda: cfa_tool.fit(text, data, diagnostics=False, modification_indices=False)}
        whole = {call: [] for call in calls}
        pieces = {call: defaultdict(list) for call in calls}
        for _ in range(args.fits + 2):
            for call, run in calls.items():
                spent.clear()
                start = time.thread_time()
                run()
                whole[call].append(time.thread_time() - start)
                for name in names:
                    pieces[call][name].append(spent[name])
        # the first two fits of each size warm the caches and the model's layouts
        table[items] = {(call, name): statistics.median(pieces[call][name][2:]) for call in calls for name in names}
        for call in calls:
            table[items][(call, "whole call")] = statistics.median(whole[call][2:])
    print("| piece (ms, default / lean call) | " + " | ".join(f"{i} items" for i in args.items) + " |")
    print("| --- |" + " ---: |" * len(args.items))
    for name in names + ["whole call"]:
        print(f"| {name} | " + " | ".join(f"{table[i][('default', name)] * 1e3:.3f} / {table[i][('lean', name)] * 1e3:.3f}"
                                         for i in args.items) + " |")
    print("| extras (default - lean) | " + " | ".join(
        f"{(table[i][('default', 'whole call')] - table[i][('lean', 'whole call')]) * 1e3:.3f}" for i in args.items) + " |")


if __name__ == "__main__":
    main()
