"""Nested-model tests.

Nesting is detected numerically (Bentler & Satorra 2010): model R is nested in
model G when G, fitted to the moments implied by R's estimates, reproduces
them exactly (minimum discrepancy zero) and R has more degrees of freedom.
"""

from __future__ import annotations

from dataclasses import dataclass

from cfa_tool.numerics import distributions as dist

from cfa_tool.data.moments import SampleMoments
from cfa_tool.pipeline.continuous import Estimation, FitOptions, estimate
from cfa_tool.language.spec import Spec
from cfa_tool.method import DifferenceMethod
from cfa_tool.pipeline.results import FitResult, clean

NESTING_TOLERANCE = 1e-7  # minimum discrepancy below which the implied moments count as reproduced


@dataclass(frozen=True)
class DifferenceTest:
    restricted: str
    general: str
    chi_square_difference: float
    df_difference: int
    p_value: float
    method: DifferenceMethod
    delta_cfi: float
    delta_rmsea: float
    not_computed: str = ""  # why the statistic could not be computed ('' when it was)

    def to_dict(self) -> dict:
        out = clean(dict(self.__dict__))
        out["not_computed"] = self.not_computed or None
        return out


def difference_test(restricted: FitResult, general: FitResult, restricted_name: str, general_name: str) -> DifferenceTest:
    """Likelihood-ratio chi-square difference test (Steiger, Shapiro & Browne 1985)."""
    r, g = restricted.fit, general.fit
    diff = r.chi_square - g.chi_square
    ddf = r.df - g.df
    p = float(dist.chi2_sf(max(diff, 0.0), ddf)) if ddf > 0 else float("nan")
    return DifferenceTest(restricted_name, general_name, diff, ddf, p, DifferenceMethod.LIKELIHOOD_RATIO, r.cfi - g.cfi, r.rmsea - g.rmsea)


def scaled_difference_tests(restricted: FitResult, general: FitResult, restricted_name: str, general_name: str,
                            general_scaling_at_restricted: float | None, without_positive: str = "") -> list[DifferenceTest]:
    """Scaled difference tests for Satorra-Bentler fits.

    2001: c_d = (df0 c0 - df1 c1) / (df0 - df1), T_d = (T0 - T1) / c_d (Satorra & Bentler 2001),
    which can be negative; 2010: c1 replaced by the general model's scaling factor evaluated at
    the restricted model's estimates, which keeps c_d positive (Satorra & Bentler 2010).  ``without_positive``:
    why that factor is not at hand (the 2010 row then says so).
    """
    r, g = restricted.fit, general.fit
    rr, gr = restricted.robust, general.robust
    ddf = r.df - g.df
    out = []
    delta_cfi = rr.cfi_robust - gr.cfi_robust
    delta_rmsea = rr.rmsea_robust - gr.rmsea_robust
    for method, c1 in ((DifferenceMethod.SATORRA_BENTLER_2001, gr.scaling_factor),
                       (DifferenceMethod.SATORRA_BENTLER_2010, general_scaling_at_restricted)):
        if c1 is None:
            if method is DifferenceMethod.SATORRA_BENTLER_2010:
                out.append(DifferenceTest(restricted_name, general_name, float("nan"), ddf, float("nan"), method,
                                          delta_cfi, delta_rmsea, without_positive or "the general model has no degrees "
                                          "of freedom, so its scaling factor at the restricted model's estimates is not "
                                          "defined"))
            continue
        cd = (r.df * rr.scaling_factor - g.df * c1) / ddf
        if cd > 0:
            diff = (r.chi_square - g.chi_square) / cd
            out.append(DifferenceTest(restricted_name, general_name, diff, ddf, float(dist.chi2_sf(max(diff, 0.0), ddf)),
                                      method, delta_cfi, delta_rmsea))
        else:
            out.append(DifferenceTest(restricted_name, general_name, float("nan"), ddf, float("nan"), method, delta_cfi,
                                      delta_rmsea, f"its scaling correction is not positive ({cd:.3f}), which can happen "
                                      f"with this version in small samples; " + (
                                          "read the strictly positive version" if not without_positive else
                                          "compare the models on the complete rows (--incomplete-rows listwise), "
                                          "where the strictly positive version is computed")))
    return out


def implied_moments(result: FitResult) -> list[tuple[str | None, SampleMoments]]:
    """Each group's model-implied moments, as if they were data of the same size."""
    out = []
    for group in result.groups:
        mean = group.implied_mean if group.implied_mean is not None else group.sample_mean
        out.append((group.label, SampleMoments(result.observed, group.implied_covariance, mean, group.data.n_obs,
                                               group.data.n_obs, 0, "implied moments")))
    return out


def is_nested(restricted: FitResult, general_spec: Spec, general: FitResult) -> tuple[bool, str, Estimation | None]:
    """Whether ``restricted`` is nested in ``general``, the reason when it is not, and the
    general model fitted to the restricted model's implied moments (Satorra & Bentler's M10)."""
    if set(restricted.observed) != set(general.observed):
        return False, "the models use different variables, so they are not fitted to the same covariance matrix", None
    if restricted.multigroup != general.multigroup:
        return False, "one model is fitted in groups and the other is not", None
    if restricted.fit.df == general.fit.df:
        same = abs(restricted.fit.chi_square - general.fit.chi_square) < 1e-6 * max(1.0, general.fit.chi_square)
        return False, "the models have the same degrees of freedom" + (
            " and the same chi-square: they are probably equivalent models" if same else ", so neither is a restricted form of the other"), None
    if restricted.fit.df < general.fit.df:
        return False, "the first model does not have more degrees of freedom than the second", None
    est = estimate(general_spec, implied_moments(restricted), FitOptions(), start=general.theta)
    if not est.converged:
        return False, "the nesting check did not converge", None
    if est.value > NESTING_TOLERANCE:
        return False, (f"the second model cannot reproduce the first model's implied covariances "
                       f"(discrepancy {est.value:.2g}), so the first is not a special case of it"), None
    return True, "", est
