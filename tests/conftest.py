"""Shared fixtures.

The Holzinger & Swineford (1939) data (301 pupils, tests x1..x9) and Bollen's (1989)
political-democracy data (75 countries) are public data sets kept in tests/datasets/
(see its README), so that every test but the comparisons with semopy runs without it.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

DATASETS = Path(__file__).resolve().parent / "datasets"

THREE_FACTORS = """
name "Holzinger-Swineford, three abilities"
factor visual: x1, x2, x3
factor textual: x4, x5, x6
factor speed: x7, x8, x9
"""

ONE_FACTOR = """
factor ability: x1..x9
"""


def holzinger_swineford() -> pd.DataFrame:
    """Holzinger & Swineford (1939): 301 pupils, ability tests x1..x9, two schools."""
    return pd.read_csv(DATASETS / "holzinger_swineford_1939.csv", index_col=0)


def political_democracy() -> pd.DataFrame:
    """Bollen (1989): industrialization (x1..x3) and political democracy (y1..y8) of 75 countries."""
    return pd.read_csv(DATASETS / "political_democracy_bollen_1989.csv", index_col=0)


@pytest.fixture(scope="session")
def hs_data() -> pd.DataFrame:
    return holzinger_swineford()


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


def single_group(model, data):
    """A model and its variables' single-group sample moments, read as cfa_tool.fit reads them."""
    from cfa_tool.data.moments import sample_moments
    from cfa_tool.pipeline.inputs import read_inputs

    spec, frame, source = read_inputs(model, data)
    return spec, sample_moments(frame, spec.observed_names, source)
