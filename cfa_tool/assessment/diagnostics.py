"""Local and case diagnostics.

* normalized residuals (s_ij - sigma_ij) / sqrt((sigma_ii sigma_jj + sigma_ij^2) / N),
  approximately standard normal under the model (Bollen 1989, p. 258);
* Mahalanobis distance of each row from the centroid, d^2 = (x - m)' S^-1 (x - m)
  (Mahalanobis 1936), chi-square on p df for normal data;
* each row's share of the chi-square: with means saturated,
  2 (l_i(saturated) - l_i(model)) = log|Sigma| - log|S| + d_i' Sigma^-1 d_i - d_i' S^-1 d_i,
  which sums over rows to the chi-square statistic exactly; under frequency weights w_i (a row counted w_i times)
  d_i is centred at the weighted mean, S is the weighted covariance (divisor sum w) and the share is w_i times the
  above, so that the shares again sum to the chi-square (that of the rows repeated by their weights);
* with incomplete rows (full-information ML), each row's distance on the items it answered o,
  d^2 = (x_o - m_o)' S_oo^-1 (x_o - m_o) under the saturated (EM) moments, chi-square on |o| df
  (Yuan & Bentler 2000; Enders 2010, ch. 10), its distance under the fitted model, and its share
  2 (l_i(saturated) - l_i(model)) = log|Sigma_oo| - log|S_oo| + d_model - d_saturated, which sums over
  rows to the full-information chi-square exactly (the casewise likelihood, Arbuckle 1996).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from cfa_tool.assessment.held_rows import HeldRows
from cfa_tool.assessment.normality import Whitened, whitened_rows
from cfa_tool.data.kept_rows import ROW_NAMED_BY, RowNaming
from cfa_tool.numerics import distributions as dist
from cfa_tool.numerics.linalg import spd_inverse
from cfa_tool.numerics.plain import clean


@dataclass(frozen=True)
class CaseDiagnostic:
    """One row's contribution to misfit: its Mahalanobis distance, p-value and share of the chi-square."""
    row: int  # the row's number in the file as a spreadsheet shows it (data.moments.row_numbers)
    mahalanobis: float
    p_value: float
    chi_square_share: float
    id: str | None = None  # the row's value in the id column (--id) or its row name, when the data have one
    answered: int | None = None  # rows with gaps: the items the row answered (the distances' df); None: every item
    model_mahalanobis: float | None = None  # rows with gaps: the distance under the fitted model's moments

    def to_dict(self, naming: RowNaming = RowNaming.FILE_ROW) -> dict:
        """The row as JSON: ``row`` is its number as ``naming`` (the fit's data.kept_rows.RowNaming) says, and
        ``row_named_by`` (data.kept_rows.ROW_NAMED_BY) says which: the file's row or the data frame's index label."""
        out = {"row": self.row, ROW_NAMED_BY: naming.json_word}
        if self.id is not None:
            out["id"] = self.id
        out.update(mahalanobis=self.mahalanobis, p_value=self.p_value, chi_square_share=self.chi_square_share)
        if self.answered is not None:
            out.update(answered=self.answered, model_mahalanobis=self.model_mahalanobis)
        return out


@dataclass(frozen=True, eq=False)
class Cases(HeldRows):
    """Case diagnostics held as columns, one value per row in each (assessment.held_rows, as ModificationIndices
    holds its rows): a row, :class:`CaseDiagnostic`, is built when it is read (a fit has twenty, which mostly only
    its JSON reads, from the columns: :func:`case_dicts`).  ``id``, ``answered`` and ``model_mahalanobis``: None when
    no row has one (each row's value, None among them, otherwise)."""

    rows: tuple[int, ...] = ()
    mahalanobis: tuple[float, ...] = ()
    p_value: tuple[float, ...] = ()
    chi_square_share: tuple[float, ...] = ()
    id: tuple[str | None, ...] | None = None
    answered: tuple[int | None, ...] | None = None
    model_mahalanobis: tuple[float | None, ...] | None = None

    def _row(self, j: int) -> CaseDiagnostic:
        return CaseDiagnostic(self.rows[j], self.mahalanobis[j], self.p_value[j], self.chi_square_share[j],
                              None if self.id is None else self.id[j],
                              None if self.answered is None else self.answered[j],
                              None if self.model_mahalanobis is None else self.model_mahalanobis[j])

    def named(self, ids: dict) -> Cases:
        """The rows, each named by its id (``ids``: row -> id; None for a row without one)."""
        return replace(self, id=tuple(ids.get(r) for r in self.rows))


def case_dicts(cases: Cases | tuple, naming: RowNaming = RowNaming.FILE_ROW) -> list[dict]:
    """The rows as JSON: what ``clean(case.to_dict(naming))`` (numerics.plain.clean) gives for each, built at once
    from the columns (``()``: a fit without case diagnostics); a row whose numbers are all finite Python floats (its
    row an int, its id text or None) needs no cleaning."""
    if not cases:
        return []
    word = naming.json_word
    m, p, s = cases.mahalanobis, cases.p_value, cases.chi_square_share
    if (cases.id is None and cases.answered is None and all(type(row) is int for row in cases.rows)
            and _finite_floats(m) and _finite_floats(p) and _finite_floats(s)):  # every row plain: checked at once
        return [{"row": row, ROW_NAMED_BY: word, "mahalanobis": a, "p_value": b, "chi_square_share": c}
                for row, a, b, c in zip(cases.rows, m, p, s)]
    none = (None,) * len(cases)
    out = []
    for row, id_, m, p, s, answered, model in zip(cases.rows, cases.id or none, cases.mahalanobis, cases.p_value,
                                                  cases.chi_square_share, cases.answered or none,
                                                  cases.model_mahalanobis or none):
        d = {"row": row, ROW_NAMED_BY: word}
        if id_ is not None:
            d["id"] = id_
        d["mahalanobis"], d["p_value"], d["chi_square_share"] = m, p, s
        plain = (type(row) is int and (id_ is None or type(id_) is str) and type(m) is float and type(p) is float
                 and type(s) is float and m - m == 0.0 and p - p == 0.0 and s - s == 0.0)
        if answered is not None:
            d["answered"], d["model_mahalanobis"] = answered, model
            plain = plain and type(answered) is int and type(model) is float and model - model == 0.0
        out.append(d if plain else clean(d))
    return out


def _finite_floats(values: tuple) -> bool:
    """Whether every value is a Python float and none NaN or infinite (a NaN or an infinity makes the sum one)."""
    return all(type(v) is float for v in values) and math.isfinite(sum(values))


def normalized_residuals(S: np.ndarray, sigma: np.ndarray, n_obs: int) -> np.ndarray:
    d = sigma.diagonal()
    scale = np.sqrt((d[:, None] * d + sigma**2) / n_obs)  # sigma_ii sigma_jj: numpy.outer's products, without its wrapper
    return (S - sigma) / scale


def case_diagnostics(rows: np.ndarray, sigma: np.ndarray, row_numbers: np.ndarray | None, top: int = 10,
                     whitened: Whitened | None = None,
                     inverse: tuple[np.ndarray, float] | None = None,
                     frequencies: np.ndarray | None = None) -> tuple[Cases, Cases]:
    """(rows with the largest Mahalanobis distances, rows with the largest shares of chi-square);
    ``whitened`` is :func:`~cfa_tool.assessment.normality.whitened_rows` of the rows (their distances from the
    centroid and the centred rows) and ``inverse`` (Sigma^-1, log|Sigma|) when the caller has them (the estimation's
    factorisation of Sigma).  ``frequencies``: frequency weights, each row counted as often as its weight (then
    ``whitened`` must come from the weighted mean and covariance, as the fit's moments are): each row's share is
    weighted, so that the shares sum to the chi-square."""
    n, p = rows.shape
    if whitened is None:
        whitened = whitened_rows(rows)
    d_sample = whitened.distances
    if inverse is None:
        inverse = spd_inverse(sigma)
        if inverse is None:
            raise np.linalg.LinAlgError("the implied covariance matrix is not positive definite")
    sigma_inv, log_det_sigma = inverse
    dev = whitened.centred
    d_model = np.einsum("ij,ij->i", dev @ sigma_inv, dev)
    share = log_det_sigma - whitened.log_det + d_model - d_sample
    if frequencies is not None:
        share = share * frequencies
    chosen = np.concatenate([largest_first(d_sample, top), largest_first(share, top)])
    numbers = (chosen + 1 if row_numbers is None else row_numbers[chosen]).tolist()
    distances = d_sample[chosen]
    found = (numbers, distances.tolist(), dist.chi2_sf(distances, p).tolist(), share[chosen].tolist())
    shown = len(numbers) // 2  # the rows shown: p-values only for them
    return Cases(*(tuple(c[:shown]) for c in found)), Cases(*(tuple(c[shown:]) for c in found))


#: values from which :func:`descending_order` tries numpy's default sort first (below it the stable sort is about as
#: fast as the checks that the default sort's order is the stable one)
QUICK_SORT_FROM = 512


def descending_order(values: np.ndarray) -> np.ndarray:
    """The positions of ``values``, largest first, ties in the order of their positions and NaN last: exactly
    ``np.argsort(-values, kind="stable")``.  Finite values no two of which are equal have one order whatever sorts
    them, so numpy's default sort (introsort, about a quarter of the stable sort's time on 2,070 modification indices)
    gives it; with a tie (0.0 and -0.0 among them), NaN or an infinity, the stable sort."""
    negative = -values
    if len(negative) >= QUICK_SORT_FROM and np.isfinite(negative).all():
        order = np.argsort(negative)
        ranked = negative[order]
        if (ranked[1:] != ranked[:-1]).all():  # no two equal: the one order
            return order
    return np.argsort(negative, kind="stable")


def largest_first(values: np.ndarray, top: int) -> np.ndarray:
    """The positions of the ``top`` largest of ``values``, largest first, ties in the order of their positions and NaN
    last: ``np.argsort(-values, kind="stable")[:top]``, without sorting all the rows (a partial sort finds the
    ``top``-th largest; only the values at least as large are sorted)."""
    negative = -values
    if len(negative) <= 4 * top:
        return descending_order(values)[:top]
    limit = np.partition(negative, top - 1)[top - 1]  # the top-th smallest of -values (NaN last, as in the sort)
    if np.isnan(limit):  # fewer than ``top`` numbers: the sort's order of the NaN
        return np.argsort(negative, kind="stable")[:top]
    among = np.flatnonzero(negative <= limit)  # every value as large as the top-th, ties included, by position
    return among[np.argsort(negative[among], kind="stable")][:top]


def incomplete_case_diagnostics(rows: np.ndarray, mean: np.ndarray, sigma: np.ndarray,
                                saturated: tuple[np.ndarray, np.ndarray], row_numbers: np.ndarray | None,
                                top: int = 10,
                                frequencies: np.ndarray | None = None) -> tuple[Cases, Cases]:
    """The case diagnostics of rows with gaps (NaN for a missing answer; every row answers some item) under
    full-information ML: (rows least likely under the saturated moments, by the p-value of their distance on
    chi-square with as many df as items answered; rows with the largest shares of the chi-square).  ``mean`` and
    ``sigma`` are the fitted model's, ``saturated`` the EM means and covariances (Yuan & Bentler 2000; Enders 2010).
    The shares sum over the rows to the full-information chi-square of the group; under ``frequencies`` (frequency
    weights) each row's share is weighted, as its casewise likelihood is."""
    observed = ~np.isnan(rows)
    answered = observed.sum(axis=1)
    distances = _answered_distances(rows, observed)
    d_saturated, log_det_saturated = distances(*saturated)
    d_model, log_det_model = distances(mean, sigma)
    share = log_det_model - log_det_saturated + d_model - d_saturated
    if frequencies is not None:
        share = share * frequencies
    p_values = dist.chi2_sf(d_saturated, answered)
    chosen = np.concatenate([np.lexsort((-d_saturated, p_values))[:top], np.argsort(-share, kind="stable")[:top]])
    numbers = (chosen + 1 if row_numbers is None else row_numbers[chosen]).tolist()
    found = (numbers, d_saturated[chosen].tolist(), p_values[chosen].tolist(), share[chosen].tolist(), None,
             answered[chosen].tolist(), d_model[chosen].tolist())
    shown = len(numbers) // 2

    def part(sl: slice) -> Cases:
        return Cases(*(None if c is None else tuple(c[sl]) for c in found))

    return part(slice(None, shown)), part(slice(shown, None))


def _answered_distances(rows: np.ndarray, observed: np.ndarray):
    """A function of (mean, sigma) giving each row's squared Mahalanobis distance on the items it answered and
    log|Sigma_oo| of those items, d_i = (x_o - mu_o)' Sigma_oo^-1 (x_o - mu_o) (Yuan & Bentler 2000; Enders 2010,
    ch. 10), every pattern's Sigma_oo^-1 in the Schur complement's low-rank form (data.patterns.PatternInverses:
    one p x p inverse and each pattern's block of missing items, no stack of one p x p matrix per pattern); the rows'
    patterns and their batches found once for both moments.  Raises LinAlgError where Sigma or some Sigma_oo is not
    positive definite."""
    from cfa_tool.data.patterns import (batch_members, group_patterns, inverse_quadratic_forms, missing_groups,
                                        pattern_inverses)

    distinct, index, _ = group_patterns(observed)
    missing = list(missing_groups(distinct))
    members = batch_members(missing, index)

    def distances(mean: np.ndarray, sigma: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        inverses = pattern_inverses(sigma, distinct, missing)
        if inverses is None:
            raise np.linalg.LinAlgError("an implied covariance matrix of answered items is not positive definite")
        dev = np.where(observed, rows - mean, 0.0)
        return inverse_quadratic_forms(inverses, dev, members), inverses.logdet[index]

    return distances
