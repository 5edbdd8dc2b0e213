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


@pytest.fixture
def wide_terminal(monkeypatch):
    """Reports printed 250 columns wide (COLUMNS), wider than any temporary path a test writes: for tests that read
    words with a path among them in the terminal report, which a long temporary path (longer under parallel
    workers, a folder per worker) would otherwise break where the 80 columns of an unconnected terminal end."""
    monkeypatch.setenv("COLUMNS", "250")


@pytest.fixture(scope="session", autouse=True)
def one_blas_thread_per_worker():
    """Under parallel test workers (pytest-xdist, one process per core) each worker's BLAS runs one thread, so
    that the workers never oversubscribe the cores (the package's own rule for its worker processes)."""
    import os

    if os.environ.get("PYTEST_XDIST_WORKER"):
        from cfa_tool.numerics.threads import one_blas_thread_from_now

        one_blas_thread_from_now()


@pytest.fixture(scope="session", autouse=True)
def child_processes_compile_once(tmp_path_factory):
    """The command runs a test starts as a process of its own (``python -m cfa_tool``: the cold start, pipes,
    signals, what a fresh interpreter imports) keep the package's compiled bytecode in one folder of the test run,
    where the environment forbids writing it (PYTHONDONTWRITEBYTECODE): each such process otherwise compiled every
    module again, about 0.8 s of processor time on a 2-core test machine (an installed package keeps its bytecode)."""
    import os

    if not os.environ.get("PYTHONDONTWRITEBYTECODE") or os.environ.get("PYTHONPYCACHEPREFIX"):
        yield
        return
    with pytest.MonkeyPatch.context() as patch:
        patch.delenv("PYTHONDONTWRITEBYTECODE")
        patch.setenv("PYTHONPYCACHEPREFIX", str(tmp_path_factory.mktemp("bytecode")))
        yield


@pytest.fixture(scope="session")
def rider_demo() -> pd.DataFrame:
    """The bundled demo data: a fictional transit agency's rider survey, simulated with a fixed seed."""
    from cfa_tool.resources import resource_dir

    return pd.read_csv(resource_dir("demo") / "rider_survey.csv")


@pytest.fixture(scope="session")
def rider_model() -> str:
    """The bundled three-factor model of the demo data."""
    from cfa_tool.resources import resource_dir

    return (resource_dir("models") / "rider_three_factors.cfa").read_text()


def run_cli(argv, capsys) -> tuple[int, str, str]:
    """The command line run in this process on ``argv`` (paths and numbers as text): (exit code, output, errors)."""
    from cfa_tool.cli import main

    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def fit_refused(model_text: str, data, tmp_path, capsys) -> str:
    """The one-line error of ``fit`` of ``model_text`` on the file ``data`` run on the command line, asserted to exit
    with 2 (bad input) on one line."""
    model = tmp_path / "m.cfa"
    model.write_text(model_text)
    code, _, err = run_cli(["fit", model, "--data", data], capsys)
    assert code == 2 and len(err.strip().splitlines()) == 1, err
    return err


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


def simulate_cfa(loadings: np.ndarray, phi: np.ndarray, theta: np.ndarray, n: int, seed: int, names=None,
                 method: str = "svd") -> pd.DataFrame:
    """Normal data from Sigma = L Phi L' + Theta (a test helper, not part of the tool).  ``method``: numpy's
    factor of Sigma the draws are made by.  Its default, "svd", gives rows that depend on the machine's LAPACK
    kernels when Sigma has repeated eigenvalues (equal loadings on factors alike: the vectors of such an
    eigenvalue are any basis of its space), so a model of such a design fitted to them can differ from one
    processor to another; "cholesky" is the same on every machine: designs of equal loadings whose test depends on
    the sample drawn use it."""
    rng = np.random.default_rng(seed)
    sigma = loadings @ phi @ loadings.T + theta
    data = rng.multivariate_normal(np.zeros(len(sigma)), sigma, size=n, method=method)
    names = names or [f"y{i + 1}" for i in range(len(sigma))]
    return pd.DataFrame(data, columns=names)


def five_point_answers(n: int, seed: int) -> pd.DataFrame:
    """Two factors of four five-point items (a1-a4, b1-b4), a2 and b3 reverse-keyed (negative population loadings),
    factors correlated .3: simulated normal responses cut at -1.2, -0.4, 0.4 and 1.2 (a test helper)."""
    loadings = np.zeros((8, 2))
    loadings[:4, 0] = [0.7, -0.6, 0.7, 0.6]
    loadings[4:, 1] = [0.6, 0.7, -0.7, 0.6]
    phi = np.array([[1.0, 0.3], [0.3, 1.0]])
    theta = np.diag(1 - np.diag(loadings @ phi @ loadings.T))
    names = ["a1", "a2", "a3", "a4", "b1", "b2", "b3", "b4"]
    latent = simulate_cfa(loadings, phi, theta, n=n, seed=seed, names=names)
    return latent.apply(lambda x: 1 + np.searchsorted([-1.2, -0.4, 0.4, 1.2], x)).astype(float)


def exact_cfa_rows(loadings: np.ndarray, phi: np.ndarray, theta: np.ndarray, n: int, seed: int,
                   names=None) -> pd.DataFrame:
    """Rows whose sample covariance matrix (divisor N) is exactly Sigma = L Phi L' + Theta and whose means are 0:
    seeded normal draws, whitened by their own covariance and coloured by Sigma's Cholesky factor (a test helper).
    A fit to them recovers the population values, whatever the random number generator's version draws, for tests
    whose premise is a population value (a small loading, say) rather than a sample's."""
    rng = np.random.default_rng(seed)
    sigma = loadings @ phi @ loadings.T + theta
    Z = rng.standard_normal((n, len(sigma)))
    Z -= Z.mean(axis=0)
    white = np.linalg.solve(np.linalg.cholesky(Z.T @ Z / n), Z.T).T
    names = names or [f"y{i + 1}" for i in range(len(sigma))]
    return pd.DataFrame(white @ np.linalg.cholesky(sigma).T, columns=names)


FOUR_FACTORS = "factor a: y1, y2, y3\nfactor b: y4, y5, y6\nfactor c: y7, y8, y9\nfactor d: y10, y11, y12\n"


def four_factor_rows(within: float, seed: int, n: int = 500) -> pd.DataFrame:
    """Rows of FOUR_FACTORS (items y1-y12, loadings .7, residual variances .51): a and b correlate .6, c and d
    ``within``, the pairs .3 with each other (invented population values; a test helper)."""
    L = np.zeros((12, 4))
    for k in range(4):
        L[3 * k:3 * k + 3, k] = 0.7
    phi = np.array([[1.0, 0.6, 0.3, 0.3], [0.6, 1.0, 0.3, 0.3], [0.3, 0.3, 1.0, within], [0.3, 0.3, within, 1.0]])
    return simulate_cfa(L, phi, np.diag(np.full(12, 0.51)), n, seed)


def single_group(model, data):
    """A model and its variables' single-group sample moments, read as cfa_tool.fit reads them."""
    from cfa_tool.data.moments import sample_moments
    from cfa_tool.pipeline.inputs import read_inputs

    spec, frame, source = read_inputs(model, data)
    return spec, sample_moments(frame, spec.observed_names, source)
