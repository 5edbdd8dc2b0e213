"""Little's (1988) test of answers missing completely at random, for rows of continuous items with gaps.

    d^2 = sum over the missing-data patterns j of n_j (ybar_j - mu_j)' Sigma_jj^-1 (ybar_j - mu_j),
    df  = sum_j p_j - p,

with mu and Sigma the maximum-likelihood estimates of the unrestricted normal model (by EM, the saturated model
the full-information fit already has), ybar_j the mean of pattern j's n_j rows on the p_j items they answered, and
mu_j, Sigma_jj the parts of mu and Sigma for those items (Little 1988, J. Amer. Statist. Assoc. 83, 1198-1202,
eq. 5).  Under MCAR and normality d^2 is approximately chi-square on df.  The patterns' counts and means come
grouped (data.patterns.PatternData) and Sigma_jj^-1 of every pattern from one precision matrix in the Schur
complement's low-rank form (data.patterns.PatternInverses), so the test costs one p x p inverse and one small block per
pattern, and no stack of one p x p matrix per pattern is made.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from cfa_tool.note_parts import Command, Note

from cfa_tool.numbers import count_text, counted, cut_list
from cfa_tool.numerics import distributions as dist

if TYPE_CHECKING:
    from cfa_tool.data.patterns import PatternData


#: the test's name in every view (table note, methods paragraph)
TEST_NAME = "Little's (1988) test of answers missing completely at random"
#: what the test cannot show and what the fit needs instead, in every view that gives the test
READING = Note(("A non-significant test does not show that the answers are missing completely at random: it compares "
                "only the items analysed across the patterns of gaps, and missingness that goes with other variables "
                "(age, say) can escape it. Full-information ML needs only that answers are missing at random given "
                "the variables in its likelihood: the items analysed, and any auxiliary variables",
                Command(" given with --missing-helpers (from Python, missing_helpers=[...])"),
                ", which enter the likelihood beside the model without changing it (Graham 2003); a variable that "
                "goes with the missingness belongs there."))
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
    # (the report's words alone do not load them)
    from cfa_tool.data.patterns import batch_members, inverse_quadratic_forms, pattern_inverses

    p = len(mu)
    df = int(data.observed.sum()) - p
    inverses = pattern_inverses(sigma, data.observed)  # Sigma_jj^-1 of each pattern in the Schur complement's form
    if inverses is None:
        return float("nan"), df
    dev = np.where(data.observed, data.means - mu, 0.0)
    members = batch_members(inverses.batches, np.arange(len(dev)))  # each pattern's mean its own row
    d2 = float(data.counts @ inverse_quadratic_forms(inverses, dev, members))
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


def never_together(values: np.ndarray, names: tuple[str, ...]) -> tuple[tuple[str, str], ...]:
    """The pairs of items (columns of ``values``, NaN where a row gave no answer) that no row answers both, in the
    items' order: their covariance has no data, so the saturated model of full-information ML has no estimate."""
    answered = (~np.isnan(values)).astype(float)
    together = answered.T @ answered
    rows, columns = np.nonzero(np.triu(together == 0, k=1) & (np.diag(together)[:, None] > 0)
                               & (np.diag(together)[None, :] > 0))
    return tuple((names[i], names[j]) for i, j in zip(rows, columns))


def sparse_answers_problem(values: np.ndarray, names: tuple[str, ...], failure: str | None = None,
                           group: str | None = None):
    """The caution of a data check (assessment.admissibility.Problem) when the saturated model of full-information
    ML (EM: Dempster, Laird & Rubin 1977) cannot be estimated from these rows with gaps: pairs of items no row answers
    together (:func:`never_together`), or, when ``failure`` says why EM failed, the pair answered together by the
    fewest rows and the rows that answer every item.  A fit of these rows would stop; the check reports them.
    ``group``: the group's label (the views name it before the explanation)."""
    from cfa_tool.assessment.admissibility import Problem, ProblemKind
    from cfa_tool.errors import printable

    answered = (~np.isnan(values)).astype(float)
    rows = answered[answered.any(axis=1)]
    complete = int(rows.all(axis=1).sum()) if len(rows) else 0
    pairs = never_together(values, names)
    if pairs:
        shown = cut_list(pairs, 5, lambda pair: f"'{printable(pair[0])}' and '{printable(pair[1])}'", sep="; ",
                         lead="; and ", noun="pair")
        which = f"both {shown}" if len(pairs) == 1 else f"both items of the pairs {shown}"
        said = (f"No row answers {which}, so {'their covariance has' if len(pairs) == 1 else 'those covariances have'} "
                f"no data: full-information ML cannot estimate the saturated model of these rows, and a fit of them "
                f"stops.")
        value = float(len(pairs))
    else:
        together = rows.T @ rows
        upper = np.triu_indices(len(names), k=1)
        least = int(np.argmin(together[upper]))
        i, j = upper[0][least], upper[1][least]
        said = (f"The rows with gaps answer too few items together for the saturated model of "
                f"full-information ML ({failure or 'it has no estimate'}): the fewest rows answering a pair of items "
                f"are {int(together[i, j])} ('{printable(names[i])}' and '{printable(names[j])}'), and {count_text(complete)} of "
                f"the {count_text(len(rows))} rows answer all {len(names)} items; a fit of these rows stops.")
        value = float(together[i, j])
    from cfa_tool.options import Option, taken_by

    which = "one of each pair never answered together" if pairs else "those answered together by few rows"
    advice = Note((f"analyse fewer items ({which}), or gather rows that answer them together; leaving out the rows "
                   f"with gaps",
                   Command(f" ({Option.INCOMPLETE_ROWS.given('listwise')})", takes=taken_by(Option.INCOMPLETE_ROWS),
                           elsewhere=f" (a fit of the model with {Option.INCOMPLETE_ROWS.given('listwise')})"),
                   f" would keep {counted(complete, 'complete row')}")) + (
        Note(("; or leave the group out with a row filter", Command(f" ({Option.KEEP})"))) if group is not None else "")
    return Problem(ProblemKind.SPARSE_ANSWERS, (), value, said, advice, group)
