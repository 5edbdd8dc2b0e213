"""Is the default call's output the same on two versions of the code?  A check for speed work.

    python bench/same_output.py --write /tmp/before.pickle            # on the old code (PYTHONPATH=<old tree>)
    python bench/same_output.py --write /tmp/after.pickle             # on the new code
    python bench/same_output.py --compare /tmp/before.pickle /tmp/after.pickle

Fits the cases of bench/default_call.py (Holzinger-Swineford with every column, 30, 60 and 120 simulated
items) plus a model with groups, one with gaps in the data (full-information estimation), one of ordinal
items and three under a sampling design (30 simulated items in 50 clusters; Holzinger-Swineford by school with
sampling weights and clusters within each school, and with clusters the schools share), and keeps ``fit(...).to_dict()`` of each.  The comparison is exact: the same keys in the same order,
the same types, the same numbers to the last bit (NaN equal to NaN), the same text.  A change made for
speed must leave every one of them as it was.

    python bench/same_output.py --compare /tmp/before.pickle /tmp/after.pickle --near 1e-6

also counts, case by case, the numbers that differ by more than 1e-6 times the larger of the two or 1 (relative above
1, absolute below): for a change that moves where the search stops (a closed-form Hessian in place of differences of
the gradient), which no exact comparison can pass.  The exact count is still printed, and still sets the exit status.
"""

from __future__ import annotations

import argparse
import math
import pickle
import sys
import warnings
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

from run import simulated  # noqa: E402

HS_MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"


def cases() -> dict[str, dict]:
    import cfa_tool
    from semopy.examples import holzinger39

    warnings.filterwarnings("ignore")
    hs = holzinger39.get_data()
    out = {"Holzinger-Swineford, every column": cfa_tool.fit(HS_MODEL, hs).to_dict()}
    for items in (30, 60, 120):
        text, _, data = simulated(items, items // 10, 1000, items)
        out[f"simulated, {items} items"] = cfa_tool.fit(text, data).to_dict()
    out["Holzinger-Swineford, two schools"] = cfa_tool.fit(HS_MODEL, hs, group="school").to_dict()
    gaps = hs.copy()
    rng = np.random.default_rng(11)
    for column in [f"x{i}" for i in range(1, 10)]:
        gaps.loc[rng.random(len(gaps)) < 0.08, column] = np.nan
    out["Holzinger-Swineford, gaps, full-information"] = cfa_tool.fit(HS_MODEL, gaps, missing="full-information").to_dict()
    rider = pd.read_csv(ROOT / "demo" / "rider_survey.csv")
    model = (ROOT / "models" / "rider_three_factors.cfa").read_text()
    out["rider survey, ordinal"] = cfa_tool.fit(model, rider, ordinal="all").to_dict()
    out["rider survey, continuous"] = cfa_tool.fit(model, rider).to_dict()
    out.update(design_cases(hs))
    return out


def design_cases(hs: pd.DataFrame) -> dict[str, dict]:
    """Fits under a sampling design (the design-based standard errors, scaled test and score tests): invented
    clusters and weights, drawn with fixed seeds."""
    import cfa_tool

    text, _, data = simulated(30, 3, 1000, 30)
    data["cluster"] = np.random.default_rng(5).integers(0, 50, len(data))
    rng = np.random.default_rng(7)
    within = hs.assign(w=rng.lognormal(0, 0.4, len(hs)),
                       cluster=hs["school"].astype(str) + "-" + rng.integers(0, 12, len(hs)).astype(str))
    shared = hs.assign(cluster=rng.integers(0, 15, len(hs)))
    return {"simulated, 30 items, 50 clusters": cfa_tool.fit(text, data, cluster="cluster").to_dict(),
            "Holzinger-Swineford by school, weights and clusters in each school":
                cfa_tool.fit(HS_MODEL, within, group="school", weights="w", cluster="cluster").to_dict(),
            "Holzinger-Swineford by school, clusters the schools share":
                cfa_tool.fit(HS_MODEL, shared, group="school", cluster="cluster").to_dict()}


def differences(a, b, where: str = "") -> list[str]:
    """Every place where two to_dict() outputs differ (exactly: type, key order, bits)."""
    if type(a) is not type(b):
        return [f"{where}: type {type(a).__name__} against {type(b).__name__}"]
    if isinstance(a, dict):
        if list(a) != list(b):
            return [f"{where}: keys {list(a)} against {list(b)}"]
        return [d for key in a for d in differences(a[key], b[key], f"{where}/{key}")]
    if isinstance(a, (list, tuple)):
        if len(a) != len(b):
            return [f"{where}: length {len(a)} against {len(b)}"]
        return [d for i, (x, y) in enumerate(zip(a, b)) for d in differences(x, y, f"{where}[{i}]")]
    if isinstance(a, float):
        same = (math.isnan(a) and math.isnan(b)) or (a == b and math.copysign(1, a) == math.copysign(1, b))
        return [] if same else [f"{where}: {a!r} against {b!r}"]
    if isinstance(a, np.ndarray):
        return [] if a.dtype == b.dtype and np.array_equal(a, b, equal_nan=a.dtype.kind == "f") else [f"{where}: arrays differ"]
    return [] if a == b else [f"{where}: {a!r} against {b!r}"]


def beyond(found: list[str], near: float) -> dict[str, int]:
    """Per case, how many of the exact comparison's differences ``found`` are not two numbers within ``near`` times the
    larger of their magnitudes or 1 (a difference of another kind, a type or a text, always counts)."""
    counts: dict[str, int] = {}
    for line in found:
        case = line.split("/")[1]
        counts.setdefault(case, 0)
        where, _, values = line.rpartition(": ")
        first, _, second = values.partition(" against ")
        try:
            a, b = float(first), float(second)
        except ValueError:
            counts[case] += 1
            continue
        if not abs(a - b) <= near * max(abs(a), abs(b), 1.0):
            counts[case] += 1
    return counts


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--write", type=Path)
    parser.add_argument("--compare", type=Path, nargs=2)
    parser.add_argument("--near", type=float, help="also count, per case, differences beyond this share (see above)")
    args = parser.parse_args()
    if args.write:
        import cfa_tool

        args.write.write_bytes(pickle.dumps(cases()))
        print(f"{args.write}: the code in {Path(cfa_tool.__file__).parent}")
    if args.compare:
        before, after = (pickle.loads(p.read_bytes()) for p in args.compare)
        found = differences(before, after)
        for line in found[:40]:
            print(line)
        print(f"{len(before)} cases, {len(found)} differences")
        if args.near is not None:
            for case, n in beyond(found, args.near).items():
                exact = sum(line.split("/")[1] == case for line in found)
                print(f"{case}: {exact} differences, {n} of them beyond {args.near:g} of the larger number or 1")
        raise SystemExit(1 if found else 0)


if __name__ == "__main__":
    main()
