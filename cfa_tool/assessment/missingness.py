"""Little's (1988) test of answers missing completely at random, for rows of continuous items with gaps.

    d^2 = sum over the missing-data patterns j of n_j (ybar_j - mu_j)' Sigma_jj^-1 (ybar_j - mu_j),
    df  = sum_j p_j - p,

with mu and Sigma the maximum-likelihood estimates of the unrestricted normal model (by EM, the saturated model
the full-information fit already has), ybar_j the mean of pattern j's n_j rows on the p_j items they answered, and
mu_j, Sigma_jj the parts of mu and Sigma for those items (Little 1988, J. Amer. Statist. Assoc. 83, 1198-1202,
eq. 5).  Under MCAR and normality d^2 is approximately chi-square on df.  The patterns' counts and means come
grouped (data.patterns.PatternData) and Sigma_jj^-1 of every pattern from one precision matrix
(data.patterns.embedded_inverse), so the test costs one p x p inverse and one small block per pattern.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from cfa_tool.numerics import distributions as dist

if TYPE_CHECKING:
    from cfa_tool.data.patterns import PatternData


#: the test's name in every view (table note, methods paragraph)
TEST_NAME = "Little's (1988) test of answers missing completely at random"
#: what the test cannot show and what the fit needs instead, in every view that gives the test
READING = ("A non-significant test does not show that the answers are missing completely at random: it compares "
           "only the items analysed across the patterns of gaps, and missingness that goes with other variables "
           "(age, say) can escape it. Full-information ML needs only that answers are missing at random given the "
           "variables in its likelihood: the items analysed, and any auxiliary variables given with "
           "--missing-helpers (from Python, missing_helpers=[...]), which enter the likelihood beside the model "
           "without changing it (Graham 2003); a variable that goes with the missingness belongs there.")
#: what a fit of the complete rows only assumes, and where the test is given instead
LISTWISE_NEEDS = ("Leaving out the rows with gaps assumes that the answers are missing completely "
                  f"at random; {TEST_NAME} is given with full-information ML, the default when answers are missing.")
#: why a fit with sampling weights, clusters or strata has no test
NOT_WITH_DESIGN = (f"{TEST_NAME} is not computed with sampling weights, clusters or strata: its chi-square assumes "
                   "independent rows, each counted once (or by its frequency weight).")


@dataclass(frozen=True)
class CompletelyAtRandomTest:
    """Little's test of one fit: its statistic over every group (the groups' d^2 and df added up: MCAR within each
    group), the patterns it compared, and each group's part when there are several (label, d^2, df, p)."""

    chi_square: float
    df: int
    p_value: float
    patterns: int
    groups: tuple[tuple[str, float, int, float], ...] = ()

    def to_dict(self) -> dict:
        out = {"method": "Little (1988)", "chi_square": self.chi_square, "df": self.df, "p_value": self.p_value,
               "patterns": self.patterns}
        if self.groups:
            out["groups"] = [{"group": label, "chi_square": d2, "df": df, "p_value": p}
                             for label, d2, df, p in self.groups]
        return out


def little_distance(data: PatternData, mu: np.ndarray, sigma: np.ndarray) -> tuple[float, int]:
    """(d^2, df) of Little's (1988) test for one sample's patterns ``data`` and its EM estimates ``mu``, ``sigma``
    (rows weighted by frequency weights count as often as their weight: ``data.counts`` are then sums of weights).
    NaN for d^2 where Sigma is not positive definite."""
    from cfa_tool.data.patterns import embedded_inverse  # (the report's words alone do not load it)

    p = len(mu)
    df = int(data.observed.sum()) - p
    found = embedded_inverse(sigma, data.observed)
    if found is None:
        return float("nan"), df
    inverse = found[0]  # Sigma_jj^-1 of each pattern embedded in p x p, zeros outside its answered items
    dev = np.where(data.observed, data.means - mu, 0.0)
    d2 = float(np.einsum("j,ja,jab,jb->", data.counts, dev, inverse, dev))
    return d2, df


def completely_at_random_test(samples: list[tuple[str | None, PatternData, np.ndarray, np.ndarray]]
                              ) -> CompletelyAtRandomTest | None:
    """Little's (1988) test over one or several groups' (label, patterns, EM mean, EM covariance); None when no
    group has more than one pattern (nothing to compare) or d^2 cannot be computed."""
    parts = [(label, *little_distance(data, mu, sigma)) for label, data, mu, sigma in samples]
    d2 = sum(part[1] for part in parts)
    df = sum(part[2] for part in parts)
    if df <= 0 or not np.isfinite(d2):
        return None
    groups = tuple((str(label), float(d), int(f), float(dist.chi2_sf(d, f)) if f > 0 else float("nan"))
                   for label, d, f in parts) if len(parts) > 1 else ()
    return CompletelyAtRandomTest(float(d2), int(df), float(dist.chi2_sf(d2, df)),
                                  int(sum(len(data.counts) for _, data, _, _ in samples)), groups)
