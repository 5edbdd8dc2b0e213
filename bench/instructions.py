"""Instructions per fit, counted by valgrind: a measure that does not move with the load of a
shared machine (wall-clock times here vary by up to 2x between runs).

    python bench/instructions.py                  # case 1, lean call; needs valgrind; about a minute
    python bench/instructions.py --call default   # case 1 as a user runs it: fit(text, data).to_dict()
    python bench/instructions.py --items 30 --fits 100 --call default   # a simulated model of run.py
    python bench/instructions.py --call bootstrap --fits 1000   # per bootstrap refit of case 1 (one process)
    python bench/instructions.py --all-columns    # case 1 with every column of its data, as bench/default_call.py fits it
    python bench/instructions.py --call grouped --fits 30   # case 1 by school (two groups), every column, default call
    python bench/instructions.py --call csv --fits 30       # case 1 read from its CSV file (every column) and fitted
    python bench/instructions.py --call spss --fits 30      # the rider survey read from an SPSS file and fitted
    python bench/instructions.py --call design --items 30 --fits 10 --base 1   # 1,000 rows in 50 clusters, cluster=
    python bench/instructions.py --call gaps --items 30 --fits 2 --base 1     # 10% of answers missing at random (FIML)

Runs the fit 10 (``--base``) and 10 + ``--fits`` (default 1000) times under ``valgrind --tool=callgrind`` in two
processes and reports the difference divided by ``--fits``, so that start-up (imports, the first fit)
cancels out.  One BLAS thread, as the tool uses for models of this size.  Instruction counts weigh Python-level work more heavily than
wall time does, so use them to compare versions of the code, and the timings in run.py for the ratios.
"""

from __future__ import annotations

import argparse
import os
import re
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

CHILD = """
import sys, warnings
warnings.filterwarnings("ignore")
import pandas as pd
import cfa_tool
call = sys.argv[4]
data = sys.argv[2] if call in ("csv", "spss") else pd.read_csv(sys.argv[2])  # a file: read by the tool at every fit
model = open(sys.argv[3]).read()
if call == "bootstrap":  # percentile intervals only, in this process: refits as the bootstrap runs them
    cfa_tool.bootstrap(model, data, replications=int(sys.argv[1]), seed=1, bollen_stine=False, bca=False, workers=1)
for _ in range(int(sys.argv[1]) if call != "bootstrap" else 0):
    if call == "lean":
        cfa_tool.fit(model, data, diagnostics=False, modification_indices=False)
    elif call == "grouped":
        cfa_tool.fit(model, data, group="school").to_dict()
    elif call == "design":
        cfa_tool.fit(model, data, cluster="cluster").to_dict()
    else:
        cfa_tool.fit(model, data).to_dict()
"""


def spss_file(path: Path) -> None:
    """The rider survey (demo/rider_survey.csv) as an SPSS file: value labels 1-5 and 9 'Refused' on every item (9
    written in a twentieth of the cells, no declared missing values: read as no answer by its label) and a case
    filter variable selecting every row."""
    import numpy as np
    import pandas as pd
    import pyreadstat

    frame = pd.read_csv(ROOT / "demo" / "rider_survey.csv")
    items = [c for c in frame.columns if c not in ("rider_id", "district")]
    rng = np.random.default_rng(17)
    for column in items:
        frame[column] = frame[column].astype(float).mask(rng.random(len(frame)) < 0.05, 9.0)
    frame["filter_$"] = 1.0
    scale = {1.0: "Very poor", 2.0: "Poor", 3.0: "Fair", 4.0: "Good", 5.0: "Very good", 9.0: "Refused"}
    pyreadstat.write_sav(frame, str(path), variable_value_labels={c: scale for c in items})


def count(fits: int, script: Path, data: Path, model: Path, call: str) -> subprocess.Popen:
    env = dict(os.environ, PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1")
    return subprocess.Popen(["valgrind", "--tool=callgrind", "--callgrind-out-file=/dev/null", sys.executable, str(script),
                             str(fits), str(data), str(model), call], env=env, stdout=subprocess.DEVNULL,
                            stderr=subprocess.PIPE, text=True)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--call", choices=["lean", "default", "bootstrap", "grouped", "csv", "spss", "design", "gaps"], default="lean",
                        help="lean: no modification indices or diagnostics; default: the full report and to_dict(); "
                             "bootstrap: a bootstrap of 10 and of 10 + --fits resamples (percentile intervals, one process); "
                             "grouped: the default call with group='school' (every column); csv: the default call on "
                             "the CSV file (every column), read at each fit; spss: the rider survey's three-factor "
                             "model on an SPSS file of its answers (value labels, a 'Refused' code), read at each fit; "
                             "design: the default call with cluster='cluster' on a simulated model of --items items "
                             "(1,000 rows in 50 clusters, bench/same_output.py's design case); gaps: the default call "
                             "on a simulated model of --items items with 10%% of the answers missing at random (1,000 "
                             "rows, nearly every row its own pattern: bench/fiml_patterns.py's case)")
    parser.add_argument("--items", type=int, default=9, help="9: Holzinger-Swineford (case 1); 30, 60...: run.py's simulated models")
    parser.add_argument("--fits", type=int, default=1000)
    parser.add_argument("--base", type=int, default=10,
                        help="fits in the first process (default 10), whose count is taken from the second's: fewer "
                             "for slow calls (an SPSS file's full-information fit) on a loaded machine")
    parser.add_argument("--all-columns", action="store_true",
                        help="case 1 with every column of the Holzinger-Swineford data (the school's name, a text column, "
                             "among them), as bench/default_call.py fits it; by default the nine items alone")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        script, data, model = Path(tmp) / "fit.py", Path(tmp) / "data.csv", Path(tmp) / "model.cfa"
        script.write_text(CHILD)
        if args.call == "spss":
            data = Path(tmp) / "rider.sav"
            spss_file(data)
            model.write_text((ROOT / "models" / "rider_three_factors.cfa").read_text())
        elif args.items == 9:
            from semopy.examples import holzinger39

            frame = holzinger39.get_data()
            every = args.all_columns or args.call in ("grouped", "csv")
            (frame if every else frame[[f"x{i}" for i in range(1, 10)]]).to_csv(data, index=False)
            model.write_text("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n")
        else:
            sys.path.insert(0, str(ROOT / "bench"))
            from run import simulated

            text, _, frame = simulated(args.items, args.items // 10, 1000, args.items)
            if args.call == "gaps":  # bench/fiml_patterns.py's case
                from fiml_patterns import gapped

                text, frame = gapped(args.items, 1000, 0.10)
            if args.call == "design":  # the clusters of bench/same_output.py's design case
                import numpy as np

                frame["cluster"] = np.random.default_rng(5).integers(0, 50, len(frame))
            frame.to_csv(data, index=False)
            model.write_text(text)
        runs = {n: count(n, script, data, model, args.call) for n in (args.base, args.base + args.fits)}
        totals = {}
        for n, proc in runs.items():
            _, err = proc.communicate()
            found = re.search(r"I\s+refs:\s+([\d,]+)", err)
            if proc.returncode != 0 or found is None:
                raise SystemExit(f"valgrind run with {n} fits failed:\n{err[-2000:]}")
            totals[n] = int(found.group(1).replace(",", ""))
    case = ("case 1" + (" (every column)" if args.all_columns or args.call in ("grouped", "csv") else "")
            if args.items == 9 else f"{args.items} items")
    case = "the rider survey (SPSS file)" if args.call == "spss" else case
    what = "bootstrap refit" if args.call == "bootstrap" else "fit"
    print(f"{case}, {args.call} call: {(totals[args.base + args.fits] - totals[args.base]) / args.fits:,.0f} "
          f"instructions per {what}")


if __name__ == "__main__":
    main()
