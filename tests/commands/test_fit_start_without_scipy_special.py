"""A plain ``cfa-tool fit`` computes its p-values, RMSEA interval and cautions without loading scipy.special,
scipy.stats or scipy.optimize (scipy.special alone costs about 0.1 s at a start: numerics/distributions.py)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

DATA = Path(__file__).resolve().parents[1] / "datasets" / "holzinger_swineford_1939.csv"
MODEL = "factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n"

CHILD = """
import sys
from cfa_tool import cli
sys.argv = ["cfa-tool", "fit", sys.argv[1], "--data", sys.argv[2]]
code = cli.main()
slow = ("scipy.special", "scipy.stats", "scipy.optimize")
print(code, sorted(m for m in sys.modules if m.startswith(slow)), file=sys.stderr)
"""


def test_a_plain_fit_loads_no_scipy_special(tmp_path):
    model = tmp_path / "three.cfa"
    model.write_text(MODEL)
    done = subprocess.run([sys.executable, "-c", CHILD, str(model), str(DATA)], capture_output=True, text=True,
                          check=True)
    # the report has its p-values and the RMSEA interval: Holzinger & Swineford (1939), three factors, 90% interval
    # (.071, .114) (recalled from memory of widely published analyses; tests/pipeline/
    # test_holzinger_swineford_published.py)
    assert "85.306 on 24 df, p < .001" in done.stdout and ".092 [.071, .114]" in done.stdout
    code, loaded = done.stderr.strip().splitlines()[-1].split(" ", 1)
    assert code == "0"
    assert loaded == "[]"
