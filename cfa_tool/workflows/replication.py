"""Does the structure hold in new data?  Calibrate on one sample, validate on another.

* loose replication: the same model refitted in the validation sample;
* tight replication: every parameter fixed at its calibration estimate, so the
  validation chi-square tests the calibration solution itself (df = p(p+1)/2);
* the cross-validation index CVI = F(S_validation, Sigma_calibration) (Cudeck &
  Browne 1983), beside the CVI of the saturated model (Sigma = S_calibration)
  for scale; smaller is better.
A split-half mode divides one data set at random (seeded) and runs both
directions (double cross-validation; Cudeck & Browne 1983).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.pipeline.inputs import continuous_only, load_frame, load_spec, make_options
from cfa_tool.assessment.fit_indices import chi_square_p, rmsea_value
from cfa_tool.data.matching import check_columns
from cfa_tool.data.moments import SampleMoments, sample_moments
from cfa_tool import options as check
from cfa_tool.errors import DataError, EstimationError, OptionError, estimation_of
from cfa_tool.numerics.linalg import log_det_pd
from cfa_tool.pipeline.continuous import fit_moments
from cfa_tool.language.spec import Spec
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.views import Presentable


@dataclass(frozen=True, eq=False)
class Replication(Presentable):
    calibration: str
    validation: str
    calibration_result: FitResult
    loose: FitResult
    tight_chi_square: float
    tight_df: int
    tight_p_value: float
    tight_rmsea: float
    cvi: float
    cvi_saturated: float

    def to_dict(self) -> dict:
        loose = self.loose.fit.to_dict() if self.loose.fit is not None else None
        return clean({
            "calibration": {"data": self.calibration, "n_obs": self.calibration_result.n_obs,
                            "admissible": self.calibration_result.admissible,
                            "problems": [p.to_dict() for p in self.calibration_result.problems],
                            "fit": self.calibration_result.fit.to_dict()},
            "validation": {"data": self.validation, "n_obs": self.loose.n_obs},
            "loose": {"fit": loose, "admissible": self.loose.admissible,
                      "problems": [p.to_dict() for p in self.loose.problems]},
            "tight": {"chi_square": self.tight_chi_square, "df": self.tight_df, "p_value": self.tight_p_value,
                      "rmsea": self.tight_rmsea},
            "cross_validation_index": self.cvi,
            "cross_validation_index_saturated": self.cvi_saturated,
        })


@dataclass(frozen=True, eq=False)
class Replications(Presentable):
    """The replications of one run: one (new data) or two (random halves, each way)."""

    replications: tuple[Replication, ...]

    def to_dict(self) -> dict:
        return {"replications": [r.to_dict() for r in self.replications]}


def discrepancy(S: np.ndarray, sigma: np.ndarray) -> float:
    """ML discrepancy F(S, Sigma) = log|Sigma| + tr(S Sigma^-1) - log|S| - p."""
    return float(log_det_pd(sigma) + np.trace(np.linalg.solve(sigma, S)) - log_det_pd(S) - len(S))


def _moments(spec: Spec, frame: pd.DataFrame, source: str) -> SampleMoments:
    check_columns(spec, [str(c) for c in frame.columns], source)
    return sample_moments(frame, spec.observed_names, source)


def replicate_moments(spec: Spec, calibration: SampleMoments, validation: SampleMoments, **options) -> Replication:
    fit_options = replace(make_options(options), diagnostics=False)
    with estimation_of(f"calibration sample {calibration.source}"):
        cal = fit_moments(spec, calibration, fit_options)
    if not cal.converged:
        raise EstimationError(f"the model did not converge in the calibration sample {calibration.source} ({cal.message})")
    with estimation_of(f"validation sample {validation.source}"):
        loose = fit_moments(spec, validation, fit_options)
    order = [validation.names.index(n) for n in cal.observed]
    S_val = validation.covariance[np.ix_(order, order)]
    sigma_cal = cal.implied_covariance
    F = discrepancy(S_val, sigma_cal)
    n = validation.n_obs
    p = len(S_val)
    df = p * (p + 1) // 2
    chi = n * F
    return Replication(
        calibration.source, validation.source, cal, loose, chi, df, chi_square_p(chi, df), rmsea_value(chi, df, n),
        F, discrepancy(S_val, cal.sample_covariance),
    )


def _same_file(first, second) -> bool:
    import os

    if isinstance(first, pd.DataFrame) or isinstance(second, pd.DataFrame):
        return first is second
    try:
        return os.path.samefile(first, second)
    except (OSError, TypeError, ValueError):
        return False


def replicate(model: str | Path | Spec, calibration: pd.DataFrame | str | Path, validation: pd.DataFrame | str | Path,
              **options) -> Replication:
    """Calibrate on one data set, validate on another."""
    spec = continuous_only(load_spec(model), "replicate")
    if _same_file(calibration, validation):
        raise OptionError("the calibration and the validation data are the same file; replication checks the model in "
                          "new data (or give one file as --data to split it in two random halves)")
    cal_frame, cal_source = load_frame(calibration)
    val_frame, val_source = load_frame(validation)
    return replicate_moments(spec, _moments(spec, cal_frame, cal_source), _moments(spec, val_frame, val_source), **options)


def split_half(model: str | Path | Spec, data: pd.DataFrame | str | Path, seed: int = 1, **options) -> tuple[Replication, Replication]:
    """Random halves A and B (seeded): calibrate on A and validate on B, then the reverse."""
    seed = check.seed(seed)
    spec = continuous_only(load_spec(model), "replicate")
    frame, source = load_frame(data)
    check_columns(spec, [str(c) for c in frame.columns], source)
    complete = frame.dropna(subset=list(spec.observed_names))
    if len(complete) < 4 * len(spec.observed_names):
        raise DataError(f"{source}: {len(complete)} complete rows are too few to split into two halves for "
                        f"{len(spec.observed_names)} variables")
    order = np.random.default_rng(seed).permutation(len(complete))
    half = len(order) // 2
    a = complete.iloc[np.sort(order[:half])]
    b = complete.iloc[np.sort(order[half:])]
    ma = sample_moments(a, spec.observed_names, f"{source} (half A, seed {seed})")
    mb = sample_moments(b, spec.observed_names, f"{source} (half B, seed {seed})")

    return replicate_moments(spec, ma, mb, **options), replicate_moments(spec, mb, ma, **options)
