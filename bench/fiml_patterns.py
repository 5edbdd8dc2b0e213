"""The default fit of rows with gaps at random (full-information ML, nearly every row its own pattern): processor time,
peak memory and where the time goes (twenty-fourth round, issue 20).

    python bench/fiml_patterns.py                          # 30 and 60 items of 1,000 rows, 100 items of 1,500 rows
    python bench/fiml_patterns.py --cases 60:1000 --gaps 0.1
    python bench/fiml_patterns.py --write /tmp/after.pickle        # the outputs of the same-output cases
    python bench/fiml_patterns.py --compare /tmp/before.pickle /tmp/after.pickle

Each case runs in a process of its own (one BLAS thread): bench/run.py's simulated model (items / 10 factors,
seed = items) with 10% of the answers (``--gaps``) removed at random (seed items + 1), fitted by
``cfa_tool.fit(text, frame).to_dict()`` as a user runs it (rows with gaps are kept by full-information ML by
default).  Printed per case: the fitting thread's processor time of the whole call (``time.thread_time``: other
processes do not add to it), the peak of the memory numpy and Python allocate (``tracemalloc``, a second fit in
the same process) and the process's resident peak, and the processor time of the pieces below, each taken where the
fit calls it (inclusive: the search holds the evaluations and the Hessians it asks for; the assessment holds the
score tests, the baseline and the case diagnostics).

``--write`` and ``--compare``: ``fit(...).to_dict()`` of the same-output cases of this round (Holzinger-Swineford's
nine items with 10% gaps, 30 and 60 simulated items with 10% gaps, two schools with gaps, and 150 rows of 12 items
each with its own pattern: two or three items left out), compared number by number: the largest relative difference of each case, and the count
of numbers beyond ``--near`` (default 1e-10) of the larger magnitude (numbers below 1e-4 in both: of 1e-4, so that
rounding noise about zero, such as a residual of 1e-16 on a diagonal that is zero, does not count).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import pickle
import subprocess
import sys
import time
import warnings
from collections import defaultdict
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

from run import simulated  # noqa: E402

FLOOR = 1e-4  # numbers smaller than this in both are compared absolutely, at this scale
HS_MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
#: name in the report: (module path, attribute, class or None)
PIECES = {
    "the search (value, gradient, information, Hessians)": ("cfa_tool.pipeline.continuous", "estimate", None),
    "  evaluate: value, gradient, patterns-fixed information": ("cfa_tool.estimation.fiml", "evaluate", "MissingDataLikelihood"),
    "  value alone (line search)": ("cfa_tool.estimation.fiml", "value", "MissingDataLikelihood"),
    "observed Hessian (search and standard errors)": ("cfa_tool.estimation.fiml", "observed_hessian", "MissingDataLikelihood"),
    "gradient row by row": ("cfa_tool.estimation.fiml", "gradient", "MissingDataLikelihood"),
    "information in the moments (robust routes)": ("cfa_tool.estimation.fiml", "moment_hessian", "MissingDataLikelihood"),
    "patterns' sums (pattern_data)": ("cfa_tool.data.patterns", "pattern_data", None),
    "saturated model (EM)": ("cfa_tool.data.em", "em_saturated", None),
    "the assessment (after the search)": ("cfa_tool.pipeline.continuous", "assess", None),
    "  score tests (modification indices)": ("cfa_tool.pipeline.continuous", "modification_indices", None),
    "  baseline model": ("cfa_tool.estimation.fiml", "fiml_baseline", None),
    "  case diagnostics and other group diagnostics": ("cfa_tool.pipeline.continuous", "_group_diagnostics", None),
    "    case diagnostics (rows with gaps)": ("cfa_tool.pipeline.continuous", "incomplete_case_diagnostics", None),
    "  Little's test (missing completely at random)": ("cfa_tool.pipeline.continuous", "_completely_at_random", None),
    "  kurtosis with gaps (Mardia's, rows with gaps)": ("cfa_tool.pipeline.continuous", "_kurtosis_with_gaps", None),
    "to_dict()": (None, None, None),
}


def gapped(items: int, rows: int, share: float) -> tuple[str, pd.DataFrame]:
    """bench/run.py's simulated model of ``items`` items (items / 10 factors, seed ``items``), ``share`` of the answers
    removed at random (seed items + 1)."""
    text, _, frame = simulated(items, max(1, items // 10), rows, items)
    rng = np.random.default_rng(items + 1)
    return text, frame.mask(rng.random(frame.shape) < share)


def child(items: int, rows: int, share: float) -> dict:
    """One case in this process: thread times of the pieces in one default fit, then tracemalloc's peak in a second."""
    import importlib
    import resource
    import tracemalloc

    import cfa_tool
    from cfa_tool.numerics.threads import one_blas_thread
    from extras_profile import thread_timed  # the bench's one timing wrapper

    warnings.filterwarnings("ignore")
    spent: dict[str, float] = defaultdict(float)
    for name, (module, attribute, owner) in PIECES.items():
        if module is None:
            continue
        target = importlib.import_module(module)
        target = getattr(target, owner) if owner else target
        setattr(target, attribute, thread_timed(name, getattr(target, attribute), spent))
    text, frame = gapped(items, rows, share)
    patterns = len(np.unique(~np.isnan(frame.to_numpy()), axis=0))
    with one_blas_thread():
        start = time.thread_time()
        result = cfa_tool.fit(text, frame)
        middle = time.thread_time()
        out = result.to_dict()
        whole = time.thread_time() - start
        spent["to_dict()"] = time.thread_time() - middle
        pieces = dict(spent)
        tracemalloc.start()
        cfa_tool.fit(text, frame).to_dict()
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
    return {"items": items, "rows": rows, "patterns": patterns, "whole": whole, "pieces": pieces,
            "traced_peak_mb": peak / 2 ** 20, "resident_peak_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
            "chi_square": out["fit"]["chi_square"] if "fit" in out and "chi_square" in out["fit"] else None}


def same_output_cases() -> dict[str, dict]:
    import cfa_tool
    from semopy.examples import holzinger39

    warnings.filterwarnings("ignore")
    hs = holzinger39.get_data()
    out = {}
    nine = hs.copy()
    items9 = [f"x{i}" for i in range(1, 10)]
    rng = np.random.default_rng(24)
    nine[items9] = nine[items9].mask(rng.random((len(nine), 9)) < 0.10)
    out["Holzinger-Swineford, 10% gaps"] = cfa_tool.fit(HS_MODEL, nine).to_dict()
    out["Holzinger-Swineford by school, 10% gaps"] = cfa_tool.fit(HS_MODEL, nine, group="school").to_dict()
    for items in (30, 60):
        text, frame = gapped(items, 1000, 0.10)
        out[f"{items} items, 10% gaps"] = cfa_tool.fit(text, frame).to_dict()
    from itertools import combinations

    text, _, frame = simulated(12, 3, 150, 5)
    left_out = (list(combinations(range(12), 2)) + list(combinations(range(12), 3)))[:150]  # each row its own pattern
    mask = np.ones(frame.shape, dtype=bool)
    for i, items in enumerate(left_out):
        mask[i, list(items)] = False
    out["one row per pattern, 12 items"] = cfa_tool.fit(text, frame.where(mask)).to_dict()
    return out


def numbers(a, where: str = ""):
    """(place, value) of every number in a to_dict() output."""
    if isinstance(a, dict):
        for key, value in a.items():
            yield from numbers(value, f"{where}/{key}")
    elif isinstance(a, (list, tuple)):
        for i, value in enumerate(a):
            yield from numbers(value, f"{where}[{i}]")
    elif isinstance(a, float) or (isinstance(a, int) and not isinstance(a, bool)):
        yield where, float(a)
    elif isinstance(a, np.ndarray) and a.dtype.kind == "f":
        for i, value in enumerate(a.ravel()):
            yield f"{where}[{i}]", float(value)
    else:
        yield where, a


def compare(before: dict, after: dict, near: float) -> int:
    bad = 0
    for case in before:
        a, b = list(numbers(before[case])), list(numbers(after[case]))
        if [w for w, _ in a] != [w for w, _ in b]:
            print(f"{case}: the outputs' keys differ")
            bad += 1
            continue
        worst, where, beyond, exact = 0.0, "", 0, True
        for (place, x), (_, y) in zip(a, b):
            if not isinstance(x, float) or not isinstance(y, float):
                if x != y:
                    print(f"{case}{place}: {x!r} against {y!r}")
                    beyond += 1
                    exact = False
                continue
            if (math.isnan(x) and math.isnan(y)) or x == y:
                continue
            exact = False
            scale = max(abs(x), abs(y))
            gap = abs(x - y) / max(scale, FLOOR)
            if gap > worst:
                worst, where = gap, f"{place}: {x!r} against {y!r}"
            beyond += gap > near
        print(f"{case}: {'identical to the bit' if exact else f'largest relative difference {worst:.2e} ({where})'}; "
              f"{beyond} beyond {near:g}")
        bad += beyond
    return bad


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--cases", nargs="*", default=["30:1000", "60:1000", "100:1500"], help="items:rows")
    parser.add_argument("--gaps", type=float, default=0.10)
    parser.add_argument("--child", nargs=3, help=argparse.SUPPRESS)
    parser.add_argument("--write", type=Path)
    parser.add_argument("--compare", type=Path, nargs=2)
    parser.add_argument("--near", type=float, default=1e-10)
    args = parser.parse_args()
    if args.child:
        print(json.dumps(child(int(args.child[0]), int(args.child[1]), float(args.child[2]))))
        return
    if args.write:
        import cfa_tool

        args.write.write_bytes(pickle.dumps(same_output_cases()))
        print(f"{args.write}: the code in {Path(cfa_tool.__file__).parent}")
        return
    if args.compare:
        before, after = (pickle.loads(p.read_bytes()) for p in args.compare)
        raise SystemExit(1 if compare(before, after, args.near) else 0)
    for case in args.cases:
        items, rows = (int(x) for x in case.split(":"))
        done = subprocess.run([sys.executable, __file__, "--child", str(items), str(rows), str(args.gaps)],
                              env=dict(os.environ, OPENBLAS_NUM_THREADS="1"),
                              capture_output=True, text=True)
        if done.returncode:
            raise SystemExit(done.stderr[-2000:])
        found = json.loads(done.stdout.strip().splitlines()[-1])
        print(f"\n{items} items, {rows:,} rows, {args.gaps:.0%} gaps ({found['patterns']:,} patterns): "
              f"{found['whole']:.2f} s of processor time, peak {found['traced_peak_mb']:.0f} MB traced "
              f"({found['resident_peak_mb']:.0f} MB resident); chi-square {found['chi_square']}")
        for name in PIECES:
            if name in found["pieces"]:
                print(f"  {name:58s} {found['pieces'][name]:8.3f} s")


if __name__ == "__main__":
    main()
