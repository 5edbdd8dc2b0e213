"""Shared fixtures.

The Holzinger & Swineford (1939) data (301 pupils, tests x1..x9) come from the
copy bundled with semopy (semopy/examples/holzinger_swineford39_data.csv), an
independent open-source project, so the project ships no copy of its own.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

THREE_FACTORS = """
name "Holzinger-Swineford, three abilities"
factor visual: x1, x2, x3
factor textual: x4, x5, x6
factor speed: x7, x8, x9
"""

ONE_FACTOR = """
factor ability: x1..x9
"""


@pytest.fixture(scope="session")
def hs_data() -> pd.DataFrame:
    from semopy.examples import holzinger39

    return holzinger39.get_data()


@pytest.fixture(scope="session")
def hs_three(hs_data):
    import cfa_tool

    return cfa_tool.fit(THREE_FACTORS, hs_data)


def simulate_cfa(loadings: np.ndarray, phi: np.ndarray, theta: np.ndarray, n: int, seed: int, names=None) -> pd.DataFrame:
    """Normal data from Sigma = L Phi L' + Theta (a test helper, not part of the tool)."""
    rng = np.random.default_rng(seed)
    sigma = loadings @ phi @ loadings.T + theta
    data = rng.multivariate_normal(np.zeros(len(sigma)), sigma, size=n)
    names = names or [f"y{i + 1}" for i in range(len(sigma))]
    return pd.DataFrame(data, columns=names)
