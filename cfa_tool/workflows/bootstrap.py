"""Nonparametric bootstrap of a fit (Efron & Tibshirani 1993).

Rows are resampled with replacement and the model refitted, starting from the
original estimates.  Intervals: percentile, and bias-corrected and
accelerated (BCa; Efron 1987) with the acceleration from the jackknife.  The
Bollen-Stine (1992) p-value of the chi-square test resamples rows transformed
so that the model holds exactly, Y = (X - m) S^-1/2 Sigma^1/2 + m, and counts
the bootstrap chi-squares at least as large as the observed one.
Replications that do not converge are counted and reported, never dropped
silently.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import linalg

from cfa_tool import distributions as dist

from cfa_tool import options as check
from cfa_tool.errors import OptionError
from cfa_tool.fitting import moments_from_rows, replicate_fit
from cfa_tool.results import FitResult, clean
from cfa_tool.workflows.parallel import run_tasks


@dataclass(frozen=True)
class BootInterval:
    kind: str
    variables: tuple[str, ...]
    scale: str  # "unstandardized" or "standardized"
    estimate: float
    percentile: tuple[float, float]
    bca: tuple[float, float]
    bootstrap_se: float

    def to_dict(self) -> dict:
        return clean({"kind": self.kind, "variables": list(self.variables), "scale": self.scale, "estimate": self.estimate,
                      "percentile_ci95": list(self.percentile), "bca_ci95": list(self.bca), "bootstrap_se": self.bootstrap_se})


@dataclass(frozen=True)
class BootstrapResult:
    replications: int
    converged: int
    seed: int
    intervals: tuple[BootInterval, ...]
    bollen_stine_p: float | None
    bollen_stine_converged: int | None

    def to_dict(self) -> dict:
        return clean({"replications": self.replications, "converged": self.converged,
                      "not_converged": self.replications - self.converged, "seed": self.seed,
                      "bollen_stine_p_value": self.bollen_stine_p, "bollen_stine_converged": self.bollen_stine_converged,
                      "intervals": [i.to_dict() for i in self.intervals]})


def _replicate(task):
    spec, rows, names, seed, start = task
    rng = np.random.default_rng(seed)
    sample = rows[rng.integers(0, len(rows), len(rows))]
    fit = replicate_fit(spec, moments_from_rows(sample, names), start=start, fit_indices_wanted=True)
    return fit.converged, fit.values, fit.standardized, fit.chi_square


def _jackknife(task):
    spec, rows, names, index, start = task
    fit = replicate_fit(spec, moments_from_rows(np.delete(rows, index, axis=0), names), start=start, fit_indices_wanted=False)
    return fit.converged, fit.values, fit.standardized


def bootstrap_options(replications: int, seed: int, workers: int | None) -> tuple[int, int]:
    """The bootstrap's options checked (at least 10 resamples)."""
    check.workers(workers)
    return check.replications(replications, minimum=10), check.seed(seed)


def bollen_stine_rows(rows: np.ndarray, sigma: np.ndarray) -> np.ndarray:
    """Rows transformed to have the model-implied covariance matrix exactly (Bollen & Stine 1992)."""
    mean = rows.mean(axis=0)
    dev = rows - mean
    S = dev.T @ dev / len(rows)
    transform = np.real(linalg.inv(linalg.sqrtm(S)) @ linalg.sqrtm(sigma))
    return dev @ transform + mean


def bootstrap_fit(result: FitResult, spec, rows: np.ndarray, replications: int = 1000, seed: int = 1,
                  bollen_stine: bool = True, bca: bool = True, workers: int | None = None, cluster: str | None = None,
                  progress=None) -> BootstrapResult:
    """Bootstrap a converged single-group fit of complete ``rows`` (columns in the model's order)."""
    if result.multigroup:
        raise OptionError("the bootstrap works on single-group fits")
    if not result.converged:
        raise OptionError("the model did not converge, so there is nothing to bootstrap")
    replications, seed = bootstrap_options(replications, seed, workers)
    moments_rows = rows
    names = result.observed
    start = result.theta
    seeds = np.random.SeedSequence(seed).generate_state(2 * replications)
    tasks = [(spec, moments_rows, names, int(s), start) for s in seeds[:replications]]
    draws = run_tasks(_replicate, tasks, workers, cluster, progress)
    ok = [d for d in draws if d[0]]
    values = np.array([d[1] for d in ok])
    standardized = np.array([d[2] for d in ok])
    jack_values = jack_std = None
    if bca and ok:
        jtasks = [(spec, moments_rows, names, i, start) for i in range(len(moments_rows))]
        jack = [j for j in run_tasks(_jackknife, jtasks, workers, cluster) if j[0]]
        jack_values = np.array([j[1] for j in jack])
        jack_std = np.array([j[2] for j in jack])
    intervals = []
    for e, row in enumerate(result.estimates):
        if not row.free and row.kind != "loading":
            continue
        for scale, draws_e, point, jack_e in (
            ("unstandardized", values[:, e] if ok else None, row.estimate, None if jack_values is None else jack_values[:, e]),
            ("standardized", standardized[:, e] if ok else None, row.standardized, None if jack_std is None else jack_std[:, e]),
        ):
            if scale == "unstandardized" and not row.free:
                continue
            if draws_e is None or np.ptp(draws_e) == 0:
                continue
            intervals.append(BootInterval(row.kind, row.variables, scale, point, _percentile(draws_e),
                                          _bca(draws_e, point, jack_e) if jack_e is not None else (np.nan, np.nan),
                                          float(np.std(draws_e, ddof=1))))
    p_bs = converged_bs = None
    if bollen_stine:
        transformed = bollen_stine_rows(moments_rows, result.implied_covariance)
        btasks = [(spec, transformed, names, int(s), start) for s in seeds[replications:]]
        bdraws = [d for d in run_tasks(_replicate, btasks, workers, cluster, progress) if d[0]]
        converged_bs = len(bdraws)
        if bdraws:
            p_bs = float(np.mean([d[3] >= result.fit.chi_square for d in bdraws]))
    return BootstrapResult(replications, len(ok), seed, tuple(intervals), p_bs, converged_bs)


def _percentile(draws: np.ndarray) -> tuple[float, float]:
    low, high = np.percentile(draws, [2.5, 97.5])
    return float(low), float(high)


def _bca(draws: np.ndarray, point: float, jack: np.ndarray, level: float = 0.95) -> tuple[float, float]:
    """Efron (1987): z0 from the share of draws below the estimate, acceleration from the jackknife."""
    share = np.mean(draws < point) + 0.5 * np.mean(draws == point)
    if share <= 0 or share >= 1:
        return (float("nan"), float("nan"))
    z0 = dist.norm_ppf(share)
    d = jack.mean() - jack
    denom = 6.0 * (np.sum(d**2) ** 1.5)
    a = float(np.sum(d**3) / denom) if denom > 0 else 0.0
    out = []
    for q in ((1 - level) / 2, (1 + level) / 2):
        z = dist.norm_ppf(q)
        adjusted = dist.norm_cdf(z0 + (z0 + z) / (1 - a * (z0 + z)))
        out.append(float(np.percentile(draws, 100 * adjusted)))
    return out[0], out[1]
