"""The first fit of a fresh process: the command line's cold start, and the Python API's import plus first fit
against semopy's, each in new processes taking turns (so that a change in the machine's load affects them alike).

    python bench/cold_start.py [--runs 9] [--imports] [--stages 5] [--instructions]
        # --imports: the slowest imports of one command-line run
        # --stages N: the processor time of each stage of the command's start, median of N fresh processes
        # --instructions: the instructions of one command-line run, counted by valgrind (needs valgrind; a
        #   minute or more): a measure the machine's load does not move

Case 1 (Holzinger-Swineford, 9 items, N = 301), from a CSV file:

* command line: ``cfa-tool fit model.cfa --data data.csv`` (the terminal report, run as ``python -m cfa_tool``:
  the program's own end, ``cli.program``, included; the stages below stop after the reports);
* Python API: ``import cfa_tool, pandas``; read the CSV; ``cfa_tool.fit(text, data).to_dict()`` (the default call);
* semopy: ``import semopy, pandas``; read the CSV; fit, inspect and calc_stats.

Each child runs with its compiled bytecode cached (in a temporary folder, as an installed package has it: without
it every start compiles the tool's modules again) and one BLAS thread.  Reports the median wall time and the median
processor time (user + system, of the child alone) over ``--runs`` runs, and the load average before and after:
on a shared machine the processor time is the steadier measure.  Writes bench/results/cold_start.json.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"
REFERENCE = "visual =~ x1 + x2 + x3\ntextual =~ x4 + x5 + x6\nspeed =~ x7 + x8 + x9"

API = """
import sys
import pandas as pd
import cfa_tool
cfa_tool.fit(open(sys.argv[1]).read(), pd.read_csv(sys.argv[2])).to_dict()
"""

SEMOPY = """
import sys, warnings
warnings.filterwarnings("ignore")
import pandas as pd
import semopy
model = semopy.Model(sys.argv[1])
model.fit(pd.read_csv(sys.argv[2]))
model.inspect()
semopy.calc_stats(model)
"""


STAGES = """
import contextlib, io, json, sys, time
marks, last = {}, time.process_time()


def mark(name):
    global last
    now = time.process_time()
    marks[name] = 1000.0 * (now - last)
    last = now


import numpy
mark("numpy")
import pandas
mark("pandas")
import lark
mark("lark")
import cfa_tool
cfa_tool.parse_model(open(sys.argv[1]).read())
mark("the model grammar's parser and the first model parsed")
import rich.console, rich.table
mark("rich")
import cfa_tool.cli, cfa_tool.commands.fit, cfa_tool.pipeline.inputs, cfa_tool.reporting.terminal
mark("the tool's own modules")
sys.argv = ["cfa-tool", "fit", sys.argv[1], "--data", sys.argv[2]]
for name in ("the first fit and its terminal report", "a second fit and report in the same process"):
    with contextlib.redirect_stdout(io.StringIO()):
        cfa_tool.cli.main()  # as the program runs it: its arguments from the command line
    mark(name)
print(json.dumps(marks))
"""


def stage_times(script: Path, model: Path, data: Path, env: dict, runs: int) -> dict[str, float]:
    """Median processor milliseconds of each stage of the command's start over ``runs`` fresh processes."""
    found = []
    for _ in range(runs):
        done = subprocess.run([sys.executable, str(script), str(model), str(data)], env=env, capture_output=True,
                              text=True, check=True)
        found.append(json.loads(done.stdout.strip().splitlines()[-1]))
    return {name: statistics.median(run[name] for run in found) for name in found[0]}


def instructions(command: list[str], env: dict) -> int:
    """Instructions of one run of ``command`` (valgrind's callgrind, which counts every instruction the process
    and its libraries execute)."""
    done = subprocess.run(["valgrind", "--tool=callgrind", "--callgrind-out-file=/dev/null", *command], env=env,
                          stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    found = [line for line in done.stderr.splitlines() if "Collected" in line]
    if done.returncode != 0 or not found:
        raise SystemExit(f"valgrind {' '.join(command[:3])}... failed:\n{done.stderr[-2000:]}")
    return int(found[-1].split()[-1])


def run_child(command: list[str], env: dict) -> tuple[float, float]:
    """(wall seconds, processor seconds of the child) of one run; a failing child stops the benchmark."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run(command, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if done.returncode != 0:
        raise SystemExit(f"{' '.join(command[:3])}... failed:\n{done.stderr[-2000:]}")
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--runs", type=int, default=9)
    parser.add_argument("--imports", action="store_true", help="also list the slowest imports of one command-line run")
    parser.add_argument("--stages", type=int, default=0, metavar="N",
                        help="also the processor time of each stage of the start (median of N fresh processes)")
    parser.add_argument("--instructions", action="store_true",
                        help="also the instructions of one command-line run, counted by valgrind's callgrind")
    args = parser.parse_args()
    from semopy.examples import holzinger39

    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        data, model, api, ref = tmp / "data.csv", tmp / "model.cfa", tmp / "api.py", tmp / "semopy_fit.py"
        holzinger39.get_data()[[f"x{i}" for i in range(1, 10)]].to_csv(data, index=False)
        model.write_text(MODEL)
        api.write_text(API)
        ref.write_text(SEMOPY)
        (tmp / "stages.py").write_text(STAGES)
        env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        env.update(PYTHONPATH=str(ROOT), PYTHONPYCACHEPREFIX=str(tmp / "bytecode"), OPENBLAS_NUM_THREADS="1")
        commands = {
            "command line: cfa-tool fit": [sys.executable, "-m", "cfa_tool", "fit", str(model), "--data", str(data)],
            "Python API: import + first default fit": [sys.executable, str(api), str(model), str(data)],
            "semopy: import + first fit": [sys.executable, str(ref), REFERENCE, str(data)],
        }
        for command in commands.values():  # bytecode compiled and cached, files in the system's cache
            run_child(command, env)
        load_before = os.getloadavg()
        times = {name: [] for name in commands}
        for _ in range(args.runs):
            for name, command in commands.items():
                times[name].append(run_child(command, env))
        load_after = os.getloadavg()
        rows = [{"case": name, "wall_median_s": statistics.median(w for w, _ in runs),
                 "cpu_median_s": statistics.median(c for _, c in runs), "wall_min_s": min(w for w, _ in runs),
                 "cpu_min_s": min(c for _, c in runs)} for name, runs in times.items()]
        api_row, ref_row = rows[1], rows[2]
        print(f"load average {load_before[0]:.1f} before, {load_after[0]:.1f} after; {args.runs} runs each, taking turns")
        for row in rows:
            print(f"{row['case']:42s} wall {row['wall_median_s']:.3f} s (min {row['wall_min_s']:.3f}), "
                  f"processor {row['cpu_median_s']:.3f} s (min {row['cpu_min_s']:.3f})")
        print(f"semopy / Python API, processor time: {ref_row['cpu_median_s'] / api_row['cpu_median_s']:.2f}x")
        if args.imports:
            found = subprocess.run([sys.executable, "-X", "importtime", *commands["command line: cfa-tool fit"][1:]],
                                   env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True).stderr
            top = [line.split("|") for line in found.splitlines() if line.startswith("import time:") and "|" in line]
            top = sorted(((int(c), n.rstrip()) for _, c, n in (t for t in top if t[1].strip().isdigit())), reverse=True)
            print("slowest imports (cumulative microseconds):")
            for micro, name in top[:25]:
                print(f"  {micro:9d} {name}")
        stages = {}
        if args.stages:
            stages = stage_times(tmp / "stages.py", model, data, env, args.stages)
            print(f"stages of the command's start, processor milliseconds (median of {args.stages} runs; "
                  f"load average {os.getloadavg()[0]:.1f}):")
            for name, ms in stages.items():
                print(f"  {ms:7.1f}  {name}")
            print(f"  {sum(list(stages.values())[:-1]):7.1f}  up to the first report")
        counted = None
        if args.instructions:
            counted = instructions(commands["command line: cfa-tool fit"], env)
            print(f"instructions of one command-line run (callgrind): {counted:,}")
        out = ROOT / "bench" / "results"
        out.mkdir(exist_ok=True)
        (out / "cold_start.json").write_text(json.dumps({"load_average": [load_before, load_after], "runs": args.runs,
                                                         "rows": rows, "stages_ms": stages,
                                                         "command_instructions": counted}, indent=2))


if __name__ == "__main__":
    main()
