"""Intervals for the reliability a fit reports: which coefficients each factor has, read from the fit's own
reliability rows (:func:`cfa_tool.assessment.reliability.reliability`), so that a bootstrap resample's coefficients
come from its refit by the same function and the same reading (one rule, no second formula), and which the fit
withholds, with the reason.

* omega of a first-order factor's keyed sum (McDonald 1999); omega hierarchical of a higher-order factor or of a
  bifactor model's general factor (Zinbarg, Revelle, Yovel & Li 2005); omega hierarchical subscale of a bifactor
  model's specific factor (Rodriguez, Reise & Haviland 2016); Cronbach's (1951) alpha of a first-order factor's keyed
  items; for ordinal items the omega of the keyed sum of the answers' codes (Green & Yang 2009) beside the
  latent-response coefficients.
* withheld, as the fit withholds them: a factor whose loadings contradict the declared keying
  (:func:`cfa_tool.assessment.reliability.miskeyed`: its keyed sum adds items that run against each other, and the
  fit's paragraph and scores give it no coefficient), and a factor with one item of its own (its coefficients only
  restate the error variance the model had to fix; Bollen 1989, ch. 7).  A solution that is not admissible (a
  Heywood case) has its every coefficient marked not interpretable, as the fit's reliability table marks it.

The bootstrap's intervals of these coefficients (percentile; bias-corrected and accelerated, Efron 1987, where the
bootstrap gives them for the estimates) are recommended for omega and alpha by Kelley & Pornprasertmanit (2016).
The fit itself gives omega a delta-method interval (Raykov 2002): omega -/+ 1.96 sqrt(g'Vg), g omega's analytic
derivatives in the free parameters (:func:`omega_matrix_gradient`), V the estimates' covariance.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import Enum

import numpy as np

from cfa_tool.assessment.reliability import BifactorPart, FactorReliability, miskeyed, sum_keys
from cfa_tool.numerics.plain import clean


class Coefficient(Enum):
    """A reliability coefficient a fit reports for a factor (module docstring)."""

    OMEGA = "omega"
    OMEGA_HIERARCHICAL = "omega hierarchical"
    OMEGA_SUBSCALE = "omega hierarchical subscale"
    SUM_OMEGA = "omega of the answers' sum"
    ALPHA = "alpha"


class Withheld(Enum):
    """Why a factor's reliability is withheld (module docstring); the value is the reason in words."""

    KEYING = ("its loadings contradict the keying the model declares, so its keyed sum adds items that run against "
              "each other and describes no scale (see the problems at the top)")
    ONE_ITEM = ("it has one item of its own, whose reliability is whatever the error variance the model fixes makes it "
                "(Bollen 1989, ch. 7)")


def withheld(row: FactorReliability) -> Withheld | None:
    """Why the fit withholds the reliability of ``row``'s factor, or None."""
    if miskeyed(row):
        return Withheld.KEYING
    if row.level == "first-order" and not math.isfinite(row.omega) and not math.isfinite(row.omega_total):
        return Withheld.ONE_ITEM  # the fit's rule: NaN omega and omega total for a factor of one item
    return None


def _omega_kind(row: FactorReliability) -> Coefficient:
    if row.level == "higher-order" or row.bifactor is BifactorPart.GENERAL:
        return Coefficient.OMEGA_HIERARCHICAL
    if row.bifactor is BifactorPart.SPECIFIC:
        return Coefficient.OMEGA_SUBSCALE
    return Coefficient.OMEGA


def coefficients(row: FactorReliability) -> tuple[tuple[Coefficient, float], ...]:
    """The coefficients the fit reports for ``row``'s factor with their values, in the order of its reliability
    table: the omega of the answers' sum (ordinal items), omega (hierarchical, or hierarchical subscale, as the
    factor's part makes it), alpha (first-order factors)."""
    out = []
    if row.observed_sum_omega is not None:
        out.append((Coefficient.SUM_OMEGA, float(row.observed_sum_omega)))
    out.append((_omega_kind(row), float(row.omega)))
    if row.alpha is not None:
        out.append((Coefficient.ALPHA, float(row.alpha)))
    return tuple(out)


Key = tuple[str, Coefficient]  # (factor, coefficient)


def coefficient_values(rows) -> dict[Key, float]:
    """Every coefficient of every factor of one fit's reliability ``rows`` (withheld ones too: the report withholds
    them), by (factor, coefficient): what each bootstrap resample's refit gives back."""
    return {(r.factor, c): v for r in rows for c, v in coefficients(r)}


def keyed_values(rows) -> tuple[tuple[str, Coefficient, float, tuple[str, ...]], ...]:
    """(factor, coefficient, value, the items reversed in the factor's keyed sum) of every coefficient of one fit's
    reliability ``rows``: what a refit whose keys come from its own loadings' signs (an ordinal resample) gives back,
    so that a coefficient of a sum keyed otherwise than the fit's is told apart (:func:`of_fit_sums`)."""
    return tuple((r.factor, c, v, tuple(r.reversed)) for r in rows for c, v in coefficients(r))


def of_fit_sums(values, fit_rows) -> dict[Key, float]:
    """:func:`keyed_values` of a refit read against the fit's reliability ``fit_rows``: each coefficient's value where
    the refit keyed the factor's sum as the fit did, NaN where its loadings' signs reversed other items (the
    coefficient of another sum, not a value of the fit's)."""
    keyed = {r.factor: tuple(r.reversed) for r in fit_rows}
    return {(f, c): (v if keyed.get(f) == reversed_ else float("nan")) for f, c, v, reversed_ in values}


@dataclass(frozen=True)
class ReliabilityInterval:
    """One coefficient's bootstrap intervals (95%) and standard error, or why it has none."""

    factor: str
    coefficient: Coefficient
    estimate: float
    percentile: tuple[float, float]
    bca: tuple[float, float]
    bootstrap_se: float
    #: why the fit withholds this factor's reliability (then no interval either)
    withheld: Withheld | None = None
    #: converged resamples in which the coefficient had no finite value: the interval is then not available, never
    #: taken from the other resamples alone
    without_value: int = 0

    @property
    def available(self) -> bool:
        """Whether the interval was computed (the coefficient not withheld, and finite in every converged resample)."""
        return self.withheld is None and not self.without_value

    def to_dict(self) -> dict:
        out = {"factor": self.factor, "coefficient": self.coefficient.value,
               "estimate": None if self.withheld is not None else self.estimate,  # withheld in every view
               "percentile_ci95": list(self.percentile), "bca_ci95": list(self.bca),
               "bootstrap_se": self.bootstrap_se}
        if self.withheld is not None:
            out.update(interval_available=False, withheld=self.withheld.value)
        elif self.without_value:
            out.update(interval_available=False, resamples_without_value=self.without_value)
        return clean(out)


# ---------------------------------------------------------------- the delta method for omega

#: the critical value of a two-sided 95% normal interval
Z95 = 1.959963984540054


def omega_matrix_gradient(mats, keys: np.ndarray, f: int) -> dict[int, np.ndarray]:
    """The derivatives of the keyed sum's omega of factor ``f`` (assessment.reliability.keyed_omega:
    omega = a^2 / (Phi_ff s), a = k'L Phi e_f, s = k'Sigma k = u'Phi u + k'Theta k with u = L'k, Phi = A P A' and
    A = (I - B)^-1) with respect to each entry of L, B, P and T taken as a general matrix (by matrix code:
    0 L, 1 B, 2 P, 3 T), for the delta method of Raykov (2002).  Analytic, by matrix calculus:
    d omega = 2a / (Phi_ff s) da - omega / Phi_ff dPhi_ff - omega / s ds, with
    dA/dL = k (Phi' e_f)', dA/dPhi = e_f u', ds/dL = k ((Phi + Phi')u)', ds/dPhi = u u', ds/dTheta = k k', and through
    Phi = A P A': d/dP = A' G A, d/dB = A' G Phi' + A' G' Phi for G the derivative in Phi (dA = A dB A).
    ``keys``: the items' keys (p) of the factor's sum, 0 for items outside it."""
    L, T = mats.L, mats.T
    phi = np.asarray(mats.latent_covariance(), dtype=float)
    u = L.T @ keys
    a = float((phi @ u)[f])
    s = float(u @ phi @ u + keys @ T @ keys)
    ff = float(phi[f, f])
    omega = a * a / (ff * s)
    lead = 2.0 * a / (ff * s)
    m = len(phi)
    e = np.zeros(m)
    e[f] = 1.0
    g_phi = lead * np.outer(e, u) - omega / ff * np.outer(e, e) - omega / s * np.outer(u, u)
    g_l = lead * np.outer(keys, phi[f, :]) - omega / s * np.outer(keys, (phi + phi.T) @ u)
    g_t = -omega / s * np.outer(keys, keys)
    if mats.has_paths:
        A = np.asarray(mats.A, dtype=float)
        g_p = A.T @ g_phi @ A
        g_b = A.T @ g_phi @ phi.T + A.T @ g_phi.T @ phi
    else:
        g_p, g_b = g_phi, np.zeros((m, m))
    return {0: g_l, 1: g_b, 2: g_p, 3: g_t}


def omega_gradient(mats, keys: np.ndarray, f: int, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray,
                   J: np.ndarray) -> np.ndarray:
    """The derivatives of factor ``f``'s omega with respect to the free parameters theta (q): those of
    :func:`omega_matrix_gradient` gathered at the parameter table's entries (``codes``, ``rows``, ``cols``: one
    group's; an entry of the symmetric P or T off the diagonal stands for both of its places) and carried to theta by
    the entries' coefficients ``J`` (every entry is affine in theta)."""
    return _EntryPlaces(codes, rows, cols).gathered(omega_matrix_gradient(mats, keys, f)) @ J


class _EntryPlaces:
    """Where each parameter-table entry sits (its matrix code, row and column), grouped by matrix once so that the
    derivatives of several factors' omegas are gathered at the entries without a search per factor."""

    def __init__(self, codes: np.ndarray, rows: np.ndarray, cols: np.ndarray) -> None:
        self.size = len(codes)
        self.places = []
        for code in (0, 1, 2, 3):
            where = np.flatnonzero(codes == code)
            if len(where):
                r, c = rows[where], cols[where]
                self.places.append((code, where, r, c, (r != c) if code in (2, 3) else None))

    def gathered(self, grads: dict[int, np.ndarray]) -> np.ndarray:
        """The derivatives in each entry (an off-diagonal entry of the symmetric P or T summing both places)."""
        d = np.zeros(self.size)
        for code, where, r, c, off in self.places:
            g = grads[code]
            d[where] = g[r, c] if off is None else g[r, c] + np.where(off, g[c, r], 0.0)
        return d


def entry_gradients(mats, keys: np.ndarray, factors: np.ndarray, codes: np.ndarray, rows: np.ndarray,
                    cols: np.ndarray) -> np.ndarray:
    """The derivatives of several factors' omegas (one per column of ``keys``, p x k, factor ``factors[j]``) in each
    parameter-table entry (k x entries), for a model without paths among the factors (Phi = P): the formulas of
    :func:`omega_matrix_gradient` evaluated at the entries only, for every factor at once (equal to gathering that
    function's matrices: tests/assessment/test_omega_delta_method.py compares the two routes, and the first with scipy's numerical derivatives)."""
    L, T = mats.L, mats.T
    phi = np.asarray(mats.latent_covariance(), dtype=float)
    U = L.T @ keys  # m x k
    PU = phi @ U
    k = keys.shape[1]
    cols_k = np.arange(k)
    a = PU[factors, cols_k]
    s = np.einsum("mk,mk->k", U, PU) + np.einsum("pk,pk->k", keys, T @ keys)
    ff = phi[factors, factors]
    omega = a * a / (ff * s)
    lead, w = 2.0 * a / (ff * s), omega / s
    W = (phi + phi.T) @ U  # m x k
    E = np.zeros_like(U)
    E[factors, cols_k] = 1.0
    D = np.zeros((k, len(codes)))
    at = np.flatnonzero(codes == 0)  # loadings: L[r, c] (item r, factor c)
    if len(at):
        r, c = rows[at], cols[at]
        D[:, at] = (keys[r] * (lead[None, :] * phi[factors][:, c].T - w[None, :] * W[c])).T
    at = np.flatnonzero(codes == 3)  # residual (co)variances: T[r, c], an off-diagonal entry for both places
    if len(at):
        r, c = rows[at], cols[at]
        D[:, at] = (-w[None, :] * keys[r] * keys[c] * np.where(r != c, 2.0, 1.0)[:, None]).T
    at = np.flatnonzero(codes == 2)  # factor (co)variances: P[r, c] = Phi[r, c]
    if len(at):
        r, c = rows[at], cols[at]

        def g(i, j):
            return lead[None, :] * E[i] * U[j] - (omega / ff)[None, :] * E[i] * E[j] - w[None, :] * U[i] * U[j]

        D[:, at] = (g(r, c) + np.where(r != c, 1.0, 0.0)[:, None] * g(c, r)).T
    return D


def with_omega_errors(rows, model, theta: np.ndarray, covariance: np.ndarray, group: int = 0,
                      declared=None, mats=None) -> tuple:
    """One group's reliability ``rows`` with the delta-method standard error of each factor's omega (Raykov 2002):
    sqrt(g' V g), g the analytic gradient of omega in theta (:func:`omega_gradient`) and V the estimates' covariance
    the fit computed (``covariance``, of theta: by its information, or the sandwich of a robust or design-based fit).
    Rows whose omega is withheld (:func:`withheld`) or not finite keep None.  Every factor's gradient is gathered at
    the entries by one plan and carried to theta by one product (the default call computes this on every fit).
    The keys of each sum: assessment.reliability.sum_keys of the group's fitted matrices (``declared``: the items of
    the model's 'reversed' statement, None without one), the one reading of the keys that made ``rows``.  ``mats``:
    the group's matrices at ``theta`` (model.implied.ModelMatrices) when the caller has them (the fit's, with their
    implied and latent covariances made), else made here."""
    from dataclasses import replace

    table = model.table
    latent, observed = table.latent, table.observed
    wanted = [k for k, r in enumerate(rows)
              if withheld(r) is None and math.isfinite(r.omega) and r.factor in latent]
    if not wanted:
        return tuple(rows)
    codes, erows, ecols = table.entry_arrays()
    J = model.J
    if table.multigroup:  # this group's entries
        sel = model.groups == group
        codes, erows, ecols, J = codes[sel], erows[sel], ecols[sel], J[sel]
    mats = model.matrices(theta, group) if mats is None else mats
    factors = np.array([latent.index(rows[k].factor) for k in wanted])
    keys = sum_keys(mats.L, mats.G, mats.latent_covariance(), mats.implied_covariance(), observed, declared)[:, factors]
    if mats.has_paths:  # higher-order factors: each factor's gradient through A = (I - B)^-1, one at a time
        places = _EntryPlaces(codes, erows, ecols)
        D = np.stack([places.gathered(omega_matrix_gradient(mats, keys[:, j], f)) for j, f in enumerate(factors)])
    else:
        D = entry_gradients(mats, keys, factors, codes, erows, ecols)
    G = D @ J
    variances = np.einsum("ij,ij->i", G @ covariance, G)
    out = list(rows)
    for k, variance in zip(wanted, variances):
        out[k] = replace(rows[k], omega_se=math.sqrt(variance) if variance >= 0 else float("nan"))
    return tuple(out)


def delta_interval(row: FactorReliability) -> tuple[float, float] | None:
    """The delta-method 95% interval of a factor's omega, omega -/+ 1.96 SE (Raykov 2002), None without a standard
    error."""
    if row.omega_se is None or not math.isfinite(row.omega_se):
        return None
    return row.omega - Z95 * row.omega_se, row.omega + Z95 * row.omega_se
