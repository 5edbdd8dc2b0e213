"""Instructions per fit of case 1, counted by valgrind: a measure that does not move with the load of a
shared machine (wall-clock times here vary by up to 2x between runs).

    python bench/instructions.py          # needs valgrind; takes about a minute

Runs the fit 10 and 1010 times under ``valgrind --tool=callgrind`` in two processes and reports the
difference divided by 1000, so that start-up (imports, the first fit) cancels out.  One BLAS thread,
as the tool uses for models of this size.  Instruction counts weigh Python-level work more heavily than
wall time does, so use them to compare versions of the code, and the timings in run.py for the ratios.
"""

from __future__ import annotations

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
data = pd.read_csv(sys.argv[2])
model = "factor visual: x1, x2, x3\\nfactor textual: x4, x5, x6\\nfactor speed: x7, x8, x9\\n"
for _ in range(int(sys.argv[1])):
    cfa_tool.fit(model, data, diagnostics=False, modification_indices=False)
"""


def count(fits: int, script: Path, data: Path) -> subprocess.Popen:
    env = dict(os.environ, PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1")
    return subprocess.Popen(["valgrind", "--tool=callgrind", "--callgrind-out-file=/dev/null", sys.executable, str(script),
                             str(fits), str(data)], env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)


def main() -> None:
    from semopy.examples import holzinger39

    with tempfile.TemporaryDirectory() as tmp:
        script, data = Path(tmp) / "fit.py", Path(tmp) / "hs.csv"
        script.write_text(CHILD)
        holzinger39.get_data()[[f"x{i}" for i in range(1, 10)]].to_csv(data, index=False)
        runs = {n: count(n, script, data) for n in (10, 1010)}
        totals = {}
        for n, proc in runs.items():
            _, err = proc.communicate()
            found = re.search(r"I\s+refs:\s+([\d,]+)", err)
            if proc.returncode != 0 or found is None:
                raise SystemExit(f"valgrind run with {n} fits failed:\n{err[-2000:]}")
            totals[n] = int(found.group(1).replace(",", ""))
    print(f"case 1: {(totals[1010] - totals[10]) / 1000:,.0f} instructions per fit")


if __name__ == "__main__":
    main()
