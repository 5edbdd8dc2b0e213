"""The few distribution functions the tool needs, from scipy.special (importing
scipy.stats costs more than half a second at every start of the command)."""

from __future__ import annotations

import numpy as np
from scipy import special


def chi2_sf(x, df):
    if type(x) is float:  # one statistic: max() in place of numpy's (the same number, NaN kept, without an array)
        return special.chdtrc(df, max(x, 0.0))
    return special.chdtrc(df, np.maximum(x, 0.0))


def boundary_mixture_sf(x: float, df: int) -> float:
    """P(T >= x) for T distributed as the 50:50 mixture of chi-square(df - 1) and chi-square(df): the likelihood-ratio
    statistic when one of the df parameters tested lies on the boundary of its space (a variance at 0, a correlation
    at 1) and the others inside it (Self & Liang 1987; Stram & Lee 1994).  chi-square(0) is the point mass at 0."""
    x = max(float(x), 0.0)
    lower = (1.0 if x <= 0.0 else 0.0) if df == 1 else float(chi2_sf(x, df - 1))
    return 0.5 * lower + 0.5 * float(chi2_sf(x, df))


def chi2_cdf(x, df):
    return special.chdtr(df, np.maximum(x, 0.0))


def chi2_ppf(q, df):
    return special.chdtri(df, 1.0 - np.asarray(q, dtype=float))


def ncx2_cdf(x, df, nc):
    return special.chndtr(np.maximum(x, 0.0), df, nc) if np.all(np.asarray(nc) > 0) else chi2_cdf(x, df)


def ncx2_sf(x, df, nc):
    return 1.0 - ncx2_cdf(x, df, nc)


def ncx2_noncentrality(x, df, p):
    """The noncentrality at which the noncentral chi-square cdf at x equals p."""
    return float(special.chndtrinc(x, df, p))


def ncx2_ppf(q, df, nc):
    return special.chndtrix(q, df, nc) if nc > 0 else chi2_ppf(q, df)


def norm_cdf(x):
    return special.ndtr(x)


def norm_sf(x):
    if type(x) is float:  # one statistic: without the array
        return special.ndtr(-x)
    return special.ndtr(-np.asarray(x, dtype=float))


def norm_ppf(q):
    return special.ndtri(q)


def norm_pdf(x):
    x = np.asarray(x, dtype=float)
    return np.exp(-0.5 * x * x) / np.sqrt(2.0 * np.pi)
