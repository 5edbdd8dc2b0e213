"""A percentile bootstrap loads no scipy.linalg (about 80 ms of a start): only the Bollen-Stine transformation takes
its matrix square root, and imports it where it is used."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CODE = """
import sys, warnings
warnings.filterwarnings("ignore")
import pandas as pd
import cfa_tool
data = pd.read_csv(sys.argv[1])
model = "factor visual: x1, x2, x3\\nfactor textual: x4, x5, x6\\nfactor speed: x7, x8, x9\\n"
cfa_tool.bootstrap(model, data, replications=10, seed=1, bollen_stine=sys.argv[2] == "yes", bca=False, workers=1)
print("scipy.linalg" in sys.modules)
"""


def loads_scipy_linalg(bollen_stine: str) -> bool:
    done = subprocess.run([sys.executable, "-c", CODE, str(ROOT / "tests" / "datasets" / "holzinger_swineford_1939.csv"),
                           bollen_stine], cwd=ROOT, capture_output=True, text=True, check=True)
    return done.stdout.strip().splitlines()[-1] == "True"


def test_a_percentile_bootstrap_leaves_scipy_linalg_unloaded():
    assert not loads_scipy_linalg("no")
    assert loads_scipy_linalg("yes")  # the Bollen-Stine bootstrap loads it where it needs it
