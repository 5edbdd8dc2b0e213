"""What a user runs by default, against the lean call and semopy, in one run.

    python bench/default_call.py [--repeat 5] [--quick]     # --quick skips the 120- and 240-item models

The default call is ``cfa_tool.fit(text, data).to_dict()``: estimates, standard errors and fit indices
plus every modification index, reliability, normalized residuals, case diagnostics and Mardia's tests,
turned into the JSON-ready dictionary.  The lean call is ``fit(text, data, diagnostics=False,
modification_indices=False)``, the same work as semopy's fit, inspect and calc_stats.  The three take
turns (see run.interleaved), so a change in the machine's load affects them alike; each case checks that
both programs reach the same chi-square (1e-4 relative).  Then the growth of both calls with the number
of items (30 to 240, ten items per factor, N = 1,000; ours only) as the slope of log time on log items,
and the peak memory of each call at 240 items (tracemalloc, which sees numpy's arrays).

Writes bench/results/default_call.json and default_call.md.
"""

from __future__ import annotations

import argparse
import json
import sys
import tracemalloc
import warnings
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "bench"))

from run import BLOCK, interleaved, semopy_fit, simulated  # noqa: E402

import cfa_tool  # noqa: E402

warnings.filterwarnings("ignore")


def lean(text, data):
    return cfa_tool.fit(text, data, diagnostics=False, modification_indices=False)


def default(text, data):
    result = cfa_tool.fit(text, data)
    result.to_dict()
    return result


def case(name, ours, theirs, data, repeat, block) -> dict:
    (t_lean, m_lean, r), (t_default, m_default, _), (t_ref, m_ref, chi_ref) = interleaved(
        [lambda: lean(ours, data), lambda: default(ours, data), lambda: semopy_fit(theirs, data)], repeat, block)
    return {"case": name, "default_min_s": t_default, "default_median_s": m_default, "lean_min_s": t_lean,
            "lean_median_s": m_lean, "semopy_min_s": t_ref, "semopy_median_s": m_ref,
            "default_over_lean": t_default / t_lean, "semopy_over_default": t_ref / t_default,
            "semopy_over_lean": t_ref / t_lean, "chi_square_ours": r.fit.chi_square, "chi_square_semopy": chi_ref,
            "same_chi_square": abs(r.fit.chi_square - chi_ref) <= 1e-4 * max(1.0, chi_ref)}


def peak_memory(fn) -> float:
    tracemalloc.start()
    try:
        fn()
        return tracemalloc.get_traced_memory()[1] / 2**20
    finally:
        tracemalloc.stop()


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=5)
    parser.add_argument("--quick", action="store_true", help="skip the 120- and 240-item models")
    args = parser.parse_args()
    from semopy.examples import holzinger39

    hs = holzinger39.get_data()
    rows = [case("Holzinger-Swineford, 9 items, N = 301", "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\n"
                 "factor speed: x7, x8, x9\n", "visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9",
                 hs, args.repeat, BLOCK)]
    print(rows[-1], flush=True)
    for items in (30, 60) + (() if args.quick else (120,)):
        ours, theirs, data = simulated(items, items // 10, 1000, items)
        repeat, block = (args.repeat, BLOCK) if items <= 60 else (max(2, args.repeat // 2), 1)
        rows.append(case(f"simulated, {items} items, {items // 10} factors, N = 1000", ours, theirs, data, repeat, block))
        print(rows[-1], flush=True)
    growth = []
    for items in (30, 60, 120) + (() if args.quick else (240,)):
        ours, _, data = simulated(items, items // 10, 1000, items)
        (t_lean, _, _), (t_default, _, _) = interleaved([lambda: lean(ours, data), lambda: default(ours, data)],
                                                        max(2, args.repeat // (1 if items <= 60 else 2)))
        growth.append({"items": items, "lean_min_s": t_lean, "default_min_s": t_default})
        print(growth[-1], flush=True)
    x = np.log([g["items"] for g in growth])
    exponents = {call: float(np.polyfit(x, np.log([g[f"{call}_min_s"] for g in growth]), 1)[0]) for call in ("lean", "default")}
    memory = {}
    if not args.quick:
        ours, _, data = simulated(240, 24, 1000, 240)
        memory = {"items": 240, "lean_peak_mb": peak_memory(lambda: lean(ours, data)),
                  "default_peak_mb": peak_memory(lambda: default(ours, data))}
    write(rows, growth, exponents, memory)


def write(rows, growth, exponents, memory) -> None:
    out = ROOT / "bench" / "results"
    out.mkdir(exist_ok=True)
    (out / "default_call.json").write_text(json.dumps({"cases": rows, "growth": growth, "growth_exponents": exponents,
                                                        "memory": memory}, indent=2) + "\n")
    lines = ["| case | default min (s) | lean min (s) | semopy min (s) | default / lean | semopy / default "
             "| semopy / lean | same chi-square |",
             "| --- | ---: | ---: | ---: | ---: | ---: | ---: | --- |"]
    for r in rows:
        lines.append(f"| {r['case']} | {r['default_min_s']:.4f} | {r['lean_min_s']:.4f} | {r['semopy_min_s']:.4f} | "
                     f"{r['default_over_lean']:.2f} | {r['semopy_over_default']:.1f} | {r['semopy_over_lean']:.1f} | "
                     f"{r['same_chi_square']} |")
    lines += ["", "| items | default min (s) | lean min (s) |", "| ---: | ---: | ---: |"]
    lines += [f"| {g['items']} | {g['default_min_s']:.4f} | {g['lean_min_s']:.4f} |" for g in growth]
    lines += ["", f"Growth with items ({growth[0]['items']} to {growth[-1]['items']}): exponent "
                  f"{exponents['default']:.2f} for the default call, {exponents['lean']:.2f} for the lean call."]
    if memory:
        lines.append(f"Peak memory at {memory['items']} items (tracemalloc): default call {memory['default_peak_mb']:.0f} MB, "
                     f"lean call {memory['lean_peak_mb']:.0f} MB.")
    (out / "default_call.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
