"""Benchmark suite: this project against semopy on the same models and data, in one run.

    python bench/run.py [--repeat 5] [--quick]
    python bench/run.py --only questionnaire    # the cases of issue 21 alone

Writes bench/results/results.json and bench/results/results.md (questionnaire.json and .md with --only).  Speed is
reported as ratios measured in the same process and run, never asserted in
the test suite.  Each case also checks that both programs reached the same
chi-square (to 1e-4 relative) where both compute one.
"""

from __future__ import annotations

import argparse
import compileall
import json
import os
import statistics
import subprocess
import sys
import time
import warnings
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import cfa_tool  # noqa: E402
from cfa_tool.assessment.modification import modification_indices  # noqa: E402
from cfa_tool.data.moments import sample_moments  # noqa: E402
from cfa_tool.pipeline.continuous import FitOptions, estimate  # noqa: E402
from cfa_tool.language import parse_model  # noqa: E402
from cfa_tool.language.checks import exogenous_factors  # noqa: E402

warnings.filterwarnings("ignore")
FIML_LIMIT = 300  # seconds granted to the reference FIML fit
BLOCK = 5  # consecutive fits per turn (see interleaved)


def timed(fn, repeat: int) -> tuple[float, float, object]:
    times = []
    out = None
    for _ in range(repeat):
        start = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - start)
    return min(times), statistics.median(times), out


def simulated(items: int, factors: int, n: int, seed: int) -> tuple[str, str, pd.DataFrame]:
    rng = np.random.default_rng(seed)
    per = items // factors
    L = np.zeros((items, factors))
    for i in range(items):
        L[i, i // per] = rng.uniform(0.5, 0.9)
    phi = 0.3 + 0.7 * np.eye(factors)
    sigma = L @ phi @ L.T + np.diag(1 - (L**2).sum(axis=1))
    data = pd.DataFrame(rng.multivariate_normal(np.zeros(items), sigma, size=n), columns=[f"v{i + 1}" for i in range(items)])
    ours = "\n".join(f"factor f{j + 1}: " + ", ".join(f"v{i + 1}" for i in range(j * per, (j + 1) * per)) for j in range(factors))
    theirs = "\n".join(f"f{j + 1} =~ " + " + ".join(f"v{i + 1}" for i in range(j * per, (j + 1) * per)) for j in range(factors))
    return ours + "\n", theirs, data


def semopy_fit(description: str, data: pd.DataFrame):
    import semopy

    model = semopy.Model(description)
    model.fit(data)
    model.inspect()  # standard errors
    stats = semopy.calc_stats(model)  # fit indices
    return float(stats.T["Value"]["chi2"])


def interleaved(functions, repeat: int, block: int = 1) -> list[tuple[float, float, object]]:
    """Time several functions taking turns, so that a change in the machine's load affects them alike.

    Each turn runs a function ``block`` times in a row: fits repeated in a loop (bootstraps,
    simulations, searches) run with their code and data in the processor's caches, while a single
    fit right after another program's finds them evicted (about 0.5 ms more for case 1 here, as bench/README.md says)."""
    times = [[] for _ in functions]
    outs = [None] * len(functions)
    for _ in range(repeat):
        for k, fn in enumerate(functions):
            for _ in range(block):
                start = time.perf_counter()
                outs[k] = fn()
                times[k].append(time.perf_counter() - start)
    return [(min(t), statistics.median(t), out) for t, out in zip(times, outs)]


def case_fit(name, ours_text, theirs_text, data, repeat, block: int = 1) -> dict:
    (t_ours, m_ours, r), (t_full, _, _), (t_ref, m_ref, chi_ref) = interleaved([
        # the same work as the reference: estimates, standard errors, fit indices
        lambda: cfa_tool.fit(ours_text, data, diagnostics=False, modification_indices=False),
        # the full report a user gets by default (adds modification indices, reliability, diagnostics, Mardia's tests)
        lambda: cfa_tool.fit(ours_text, data),
        lambda: semopy_fit(theirs_text, data),
    ], repeat, block)
    return {"case": name, "ours_min_s": t_ours, "ours_median_s": m_ours, "semopy_min_s": t_ref, "semopy_median_s": m_ref,
            "speedup": t_ref / t_ours, "ours_full_report_min_s": t_full, "chi_square_ours": r.fit.chi_square,
            "chi_square_semopy": chi_ref, "same_chi_square": abs(r.fit.chi_square - chi_ref) <= 1e-4 * max(1.0, chi_ref),
            "consecutive_fits": block}


def case_mi(name, ours_text, data, repeat) -> dict:
    spec = parse_model(ours_text)
    moments = sample_moments(data, spec.observed_names, "<bench>")
    est = estimate(spec, [(None, moments)], FitOptions())
    t, m, mis = timed(lambda: modification_indices(est.model, est.theta, est.likelihood, exogenous_factors(spec)), repeat)
    return {"case": name, "ours_min_s": t, "ours_median_s": m, "count": len(mis)}


def case_fiml(repeat) -> dict:
    import semopy

    rng = np.random.default_rng(4)
    n, p, k = 10_000, 20, 4
    L = np.zeros((p, k))
    for i in range(p):
        L[i, i % k] = rng.uniform(0.5, 0.9)
    sigma = L @ (0.3 + 0.7 * np.eye(k)) @ L.T + np.diag(1 - (L**2).sum(axis=1))
    X = rng.multivariate_normal(np.zeros(p), sigma, size=n)
    X[rng.random(X.shape) < 0.15] = np.nan
    data = pd.DataFrame(X, columns=[f"v{i + 1}" for i in range(p)])
    ours = "\n".join(f"factor f{j}: " + ", ".join(f"v{i + 1}" for i in range(p) if i % k == j) for j in range(k)) + "\n"
    theirs = "\n".join(f"f{j} =~ " + " + ".join(f"v{i + 1}" for i in range(p) if i % k == j) for j in range(k))
    t_ours, m_ours, r = timed(lambda: cfa_tool.fit(ours, data, missing="full-information"), repeat)
    # semopy's FIML (a model with means fitted by ML to incomplete rows) runs in a child process
    # with a time limit, because on this case it takes many minutes
    path = ROOT / "bench" / "results" / "fiml.csv"
    data.to_csv(path, index=False)
    script = ("import time, pandas as pd, semopy; d = pd.read_csv(%r); m = semopy.ModelMeans(%r); "
              "t = time.perf_counter(); m.fit(d, obj='ML'); print(time.perf_counter() - t)") % (str(path), theirs)
    try:
        done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=FIML_LIMIT)
        t_ref = float(done.stdout.strip().splitlines()[-1])
        note = ""
    except subprocess.TimeoutExpired:
        t_ref = float(FIML_LIMIT)
        note = f"semopy did not finish within {FIML_LIMIT} s; the ratio is a lower bound"
    return {"case": "FIML N=10000, 20 items, 15% missing", "ours_min_s": t_ours, "ours_median_s": m_ours,
            "semopy_min_s": t_ref, "semopy_median_s": t_ref, "speedup": t_ref / t_ours, "note": note}


def case_bootstrap(ours_text, theirs_text, data, replications) -> dict:
    import semopy

    start = time.perf_counter()
    cfa_tool.bootstrap(ours_text, data, replications=replications, seed=1, bollen_stine=False, bca=False)
    ours = time.perf_counter() - start
    rng = np.random.default_rng(1)
    reference_reps = max(20, replications // 20)
    start = time.perf_counter()
    for _ in range(reference_reps):
        sample = data.iloc[rng.integers(0, len(data), len(data))]
        semopy.Model(theirs_text).fit(sample)
    per_fit = (time.perf_counter() - start) / reference_reps
    return {"case": f"{replications} bootstrap refits of case 1 (2 cores)", "ours_min_s": ours, "ours_median_s": ours,
            "semopy_min_s": per_fit * replications, "semopy_median_s": per_fit * replications,
            "speedup": per_fit * replications / ours, "note": f"semopy time extrapolated from {reference_reps} refits, one core"}


def case_questionnaire(repeat) -> list[dict]:
    """The questionnaire of issue 21: 25 six-point items on five traits, reverse-keyed items (markers among
    them), cross-loadings left out of the model, N = 2,800 with 1% of the answers missing (simulated by
    tests/corpus.py).  Each estimator with the default (marker) scaling and the full report, as a user
    runs it; then the same model on answers with no common factor, where every estimator must give up."""
    import semopy

    from cfa_tool.errors import EstimationError
    from tests.corpus import Case, questionnaire

    q = questionnaire(Case(105, 25, 5, 2800, 6, 0.01))
    complete = q.data.dropna()
    estimators = [("maximum likelihood (complete rows)", {}, complete, 1.0),
                  ("full-information ML", {"missing": "full-information"}, q.data, 3.0),
                  ("ordinal, diagonally weighted least squares", {"ordinal": "all"}, q.data, 3.0)]
    rows = []
    for label, options, frame, target in estimators:
        t, m, r = timed(lambda: cfa_tool.fit(q.model(), frame, **options), repeat)
        row = {"case": f"questionnaire, 25 items, 5 factors, N = 2800, full report: {label}", "ours_min_s": t, "ours_median_s": m,
               "target_s": target, "iterations": r.iterations, "chi_square_ours": r.fit.chi_square}
        if not options:
            t_ref, m_ref, chi_ref = timed(lambda: semopy_fit(q.reference_model(), complete), repeat)
            row.update(semopy_min_s=t_ref, semopy_median_s=m_ref, speedup=t_ref / t, chi_square_semopy=chi_ref,
                       same_chi_square=abs(r.fit.chi_square - chi_ref) <= 1e-4 * chi_ref)
        rows.append(row)
    rng = np.random.default_rng(1)
    noise = pd.DataFrame(rng.integers(1, 7, size=q.data.shape).astype(float), columns=q.data.columns)
    noise = noise.mask(rng.random(noise.shape) < 0.01)
    for label, options, frame, _ in estimators:
        frame = noise.dropna() if not options else noise

        def give_up():
            try:
                cfa_tool.fit(q.model(), frame, **options)
            except EstimationError as exc:
                return str(exc)
            raise AssertionError("a model of answers without a common factor converged")

        t, m, message = timed(give_up, max(1, repeat // 2))
        rows.append({"case": f"questionnaire model on answers without a common factor, gives up: {label}",
                     "ours_min_s": t, "ours_median_s": m, "target_s": 10.0, "message": message})
    return rows


def case_cold_start(repeat) -> dict:
    model = ROOT / "bench" / "results" / "hs.cfa"
    data = ROOT / "bench" / "results" / "hs.csv"
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    # an installed copy has its modules compiled to bytecode; a checkout run with PYTHONDONTWRITEBYTECODE
    # would compile them at every start (about 0.1 s here), which is not what a user waits for
    compileall.compile_dir(str(ROOT / "cfa_tool"), quiet=1)

    def run():
        subprocess.run([sys.executable, "-m", "cfa_tool", "fit", str(model), "--data", str(data)], check=True,
                       capture_output=True, env=env)

    def bare():
        subprocess.run([sys.executable, "-c", "pass"], check=True, capture_output=True)

    t, m, _ = timed(run, repeat)
    b, _, _ = timed(bare, repeat)
    return {"case": "command-line cold start, fit of case 1 with terminal report", "ours_min_s": t, "ours_median_s": m,
            "python_startup_s": b}


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=5)
    parser.add_argument("--quick", action="store_true", help="skip the 120-item case and use 200 bootstrap refits")
    parser.add_argument("--only", choices=["questionnaire"],
                        help="run only the questionnaire cases (written to results/questionnaire.json and .md)")
    args = parser.parse_args()
    if args.only == "questionnaire":
        rows = case_questionnaire(args.repeat)
        write_results(rows, float("nan"), [], "questionnaire")
        return
    from semopy.examples import holzinger39

    hs = holzinger39.get_data()
    hs_ours = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
    hs_theirs = "visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9"
    (ROOT / "bench" / "results").mkdir(exist_ok=True)
    (ROOT / "bench" / "results" / "hs.cfa").write_text(hs_ours)
    hs[[f"x{i}" for i in range(1, 10)]].to_csv(ROOT / "bench" / "results" / "hs.csv", index=False)
    rows = [case_fit("Holzinger-Swineford, 9 items, N = 301", hs_ours, hs_theirs, hs, args.repeat, block=BLOCK),
            case_fit("Holzinger-Swineford, single fits alternating with the reference (cold caches)", hs_ours, hs_theirs,
                     hs, args.repeat * BLOCK)]
    print(rows[-2], rows[-1], flush=True)
    sizes = [(30, 3), (60, 6)] + ([] if args.quick else [(120, 12)])
    growth = []
    for items, factors in sizes:
        ours, theirs, data = simulated(items, factors, 1000, items)
        repeat = args.repeat if items <= 60 else max(2, args.repeat // 2)  # the 120-item reference takes seconds per fit
        row = case_fit(f"simulated, {items} items, {factors} factors, N = 1000", ours, theirs, data, repeat,
                       block=BLOCK if items <= 60 else 1)
        rows.append(row)
        print(row, flush=True)
        growth.append((items, row["ours_min_s"]))
    rows.append(case_mi("all modification indices, case 1", hs_ours, hs, args.repeat))
    ours60, _, data60 = simulated(60, 6, 1000, 60)
    rows.append(case_mi("all modification indices, 60 items", ours60, data60, max(2, args.repeat // 2)))
    rows.append(case_fiml(max(2, args.repeat // 2)))
    rows.append(case_bootstrap(hs_ours, hs_theirs, hs, 200 if args.quick else 1000))
    rows.extend(case_questionnaire(max(2, args.repeat // 2)))
    rows.append(case_cold_start(args.repeat))
    x = np.log([g[0] for g in growth])
    y = np.log([g[1] for g in growth])
    exponent = float(np.polyfit(x, y, 1)[0]) if len(growth) >= 2 else float("nan")
    write_results(rows, exponent, growth, "results")


def write_results(rows: list[dict], exponent: float, growth: list, name: str) -> None:
    out = ROOT / "bench" / "results"
    out.mkdir(exist_ok=True)
    (out / f"{name}.json").write_text(json.dumps({"cases": rows, "growth_exponent": exponent}, indent=2) + "\n")
    lines = ["| case | ours min (s) | ours median (s) | semopy min (s) | ratio (semopy / ours) | same chi-square "
             "| ours, full report (s) | target (s) |",
             "| --- | ---: | ---: | ---: | ---: | --- | ---: | ---: |"]
    for r in rows:
        full = f"{r['ours_full_report_min_s']:.4f}" if "ours_full_report_min_s" in r else ""
        target = f"{r['target_s']:g}" if "target_s" in r else ""
        lines.append(f"| {r['case']} | {r['ours_min_s']:.4f} | {r['ours_median_s']:.4f} | "
                     f"{r.get('semopy_min_s', float('nan')):.4f} | {r.get('speedup', float('nan')):.1f} | "
                     f"{r.get('same_chi_square', '')} | {full} | {target} |")
    if growth:
        lines.append("")
        lines.append(f"Growth of fit time with the number of items (30 to {growth[-1][0]}): exponent {exponent:.2f}.")
    (out / f"{name}.md").write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
