"""A plain fit (``cfa_tool.fit`` on a data frame, then ``to_dict``) does not import scipy.linalg: its linear algebra
goes through numpy.linalg, and importing scipy.linalg costs about 80 ms of every start of the command (issue 20;
bench/cold_start.py).  Run in a fresh process, whose modules are its own."""

from __future__ import annotations

import subprocess
import sys

CHILD = """
import sys
import numpy as np
import pandas as pd
import cfa_tool

rng = np.random.default_rng(20)  # two factors of three items, simulated: loadings .7, factor correlation .3
phi = np.array([[1.0, 0.3], [0.3, 1.0]])
loadings = np.kron(np.eye(2), np.full((3, 1), 0.7))
factors = rng.multivariate_normal(np.zeros(2), phi, 200)
rows = factors @ loadings.T + rng.normal(0.0, np.sqrt(0.51), (200, 6))
frame = pd.DataFrame(rows, columns=[f"q{i}" for i in range(1, 7)])
result = cfa_tool.fit("factor f: q1, q2, q3\\nfactor g: q4, q5, q6\\n", frame).to_dict()
print(result["converged"], "scipy.linalg" in sys.modules)
"""


def test_a_plain_fit_leaves_scipy_linalg_unimported():
    done = subprocess.run([sys.executable, "-c", CHILD], capture_output=True, text=True, check=True)
    converged, imported = done.stdout.split()
    assert converged == "True"
    assert imported == "False"
