"""Score tests: modification indices for fixed-at-zero parameters, and for
equality constraints across groups; for least-squares fits of ordinal items, the
robust score tests of :func:`least_squares_score_tests`.

For a parameter gamma not free in the model, with d = dF/dgamma at the
estimates and H the expected second derivatives of F,

    MI = (N/2) d^2 / h,   h = H_gg - H_gt H_tt^-1 H_tg          (Sorbom 1989)

and the expected parameter change is EPC = -d / h (Saris, Satorra & Sorbom
1987), shown also fully standardized.  Candidates: cross-loadings, residual
covariances between indicators, factor covariances fixed at zero, and (for
invariance) each group's copy of a parameter held equal across groups; for
the latter, gamma is a deviation of that group's value from the common one
(the univariate score test of an equality constraint; Sorbom 1989).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property
from typing import TYPE_CHECKING, Callable
from itertools import chain

import numpy as np

from cfa_tool.assessment.diagnostics import descending_order
from cfa_tool.assessment.held_rows import HeldRows
from cfa_tool.assessment.standardized import Standardization, standardization, standardize_entries
from cfa_tool.numerics.linalg import ScaledFactor, cholesky_log_det, inverse_quadratic_forms, scaled_inverse
from cfa_tool.estimation.objective import Objective, ScoreRoute
from cfa_tool.model.implied import StructuredModel, entry_derivatives
from cfa_tool.model.parameters import MATRIX_CODES, ParameterTable
from cfa_tool.model.rank_two import EntryBasis, entry_basis

if TYPE_CHECKING:  # the joint model of missing-data helpers (estimation.auxiliary), for the type hints only
    from cfa_tool.estimation.auxiliary import AuxiliaryLikelihood, JointModel


@dataclass(frozen=True)
class ModificationIndex:
    """The score test of freeing one fixed parameter, with the parameter's expected change."""
    kind: str
    variables: tuple[str, ...]
    index: float
    expected_change: float
    standardized_expected_change: float
    group: str | None = None

    def to_dict(self) -> dict:
        return {
            "kind": self.kind,
            "variables": list(self.variables),
            "group": self.group,
            "index": self.index,
            "expected_change": self.expected_change,
            "standardized_expected_change": self.standardized_expected_change,
        }


Candidate = tuple[str, tuple[str, ...], str, int, int]  # kind, variables, matrix, row, col


@dataclass(frozen=True, eq=False)
class ModificationIndices(HeldRows):
    """Every modification index of a fit, largest first, held as columns (a fit at 240 items has tens of thousands):
    a row, :class:`ModificationIndex`, is built when it is read.  ``rows[k]`` is the position of row k among
    ``candidates`` (every group's candidate entries in turn), ``groups[k]`` its group's position in ``labels``."""

    candidates: tuple[Candidate, ...] = ()
    labels: tuple[str | None, ...] = ()
    rows: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))
    groups: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))
    index: np.ndarray = field(default_factory=lambda: np.zeros(0))
    expected_change: np.ndarray = field(default_factory=lambda: np.zeros(0))
    standardized_expected_change: np.ndarray = field(default_factory=lambda: np.zeros(0))

    def _row(self, j: int) -> ModificationIndex:
        kind, variables, *_ = self.candidates[self.rows[j]]
        return ModificationIndex(kind, variables, float(self.index[j]), float(self.expected_change[j]),
                                 float(self.standardized_expected_change[j]), self.labels[self.groups[j]])

    def where(self, keep: np.ndarray) -> ModificationIndices:
        """The rows for which ``keep`` (one truth value per row) holds, in the same order."""
        return ModificationIndices(self.candidates, self.labels, self.rows[keep], self.groups[keep], self.index[keep],
                                   self.expected_change[keep], self.standardized_expected_change[keep])

    def reported(self, threshold: float, top: int | None) -> ModificationIndices:
        """The rows of at least ``threshold``, at most the ``top`` largest (all with None): these rows themselves
        when every row is reported."""
        shown = self._shown(threshold, top)
        return self if isinstance(shown, slice) and shown.stop == len(self) else self.where(shown)

    def reported_dicts(self, threshold: float, top: int | None) -> list[dict]:
        """:meth:`dicts` of :meth:`reported`'s rows, read from these rows' columns (no record of them built)."""
        return self.dicts(self._shown(threshold, top))

    def count_reaching(self, threshold: float) -> int:
        """How many rows have an index of at least ``threshold``."""
        return int(np.sum(self.index >= threshold))

    def _shown(self, threshold: float, top: int | None) -> slice | np.ndarray:
        """The positions of :meth:`reported`'s rows: the first ones when the rows are largest first (as
        :func:`collected_indices` orders them, NaN last), otherwise each row of at least ``threshold`` in turn."""
        keep = self.index >= threshold
        count = int(keep.sum())
        if keep[:count].all():  # largest first: the rows of at least the threshold are the first ``count``
            return slice(0, count if top is None else min(count, top))
        return np.flatnonzero(keep)[:top]

    def without(self, names: frozenset[str]) -> ModificationIndices:
        """The rows naming none of ``names``."""
        return self.where(np.array([names.isdisjoint(self.candidates[r][1]) for r in self.rows.tolist()], dtype=bool))

    def dicts(self, shown: slice | np.ndarray = slice(None)) -> list[dict]:
        """The rows (those at the positions ``shown``) as JSON-ready dictionaries (what ``ModificationIndex.to_dict``
        gives, NaN and infinities as None)."""
        columns = [c.tolist() if np.isfinite(c).all() else [v if v - v == 0.0 else None for v in c.tolist()]
                   for c in (self.index[shown], self.expected_change[shown], self.standardized_expected_change[shown])]
        candidates, labels = self.candidates, self.labels
        return [{"kind": c[0], "variables": list(c[1]), "group": labels[g], "index": mi, "expected_change": epc,
                 "standardized_expected_change": std}
                for c, g, mi, epc, std in zip(map(candidates.__getitem__, self.rows[shown].tolist()),
                                              self.groups[shown].tolist(), *columns)]


#: the modification indices of a fit that computed none (every such fit shares it: its columns are empty)
NO_INDICES = ModificationIndices()


class ScreenedIndices(HeldRows):
    """Every modification index of a fit, of which only the rows that can reach ``threshold`` were computed at the fit
    (``reaching``: exact, largest first, every row of at least ``threshold`` among them): what the report and the JSON
    show (the rows of at least the fit's threshold).  Any other reading (the columns, a row, the rows below the
    threshold) computes them all once (``complete``, the rows of ``reaching`` keeping their values) and reads those:
    the same rows as :class:`ModificationIndices` has."""

    def __init__(self, reaching: ModificationIndices, threshold: float, complete: Callable[[], ModificationIndices]):
        self.reaching, self.threshold, self._complete = reaching, threshold, complete

    def __repr__(self) -> str:  # without computing the rows below the threshold
        return f"ScreenedIndices(threshold={self.threshold!r}, reaching={self.reaching!r})"

    def __reduce__(self):
        """Pickled (and deep-copied) as every row, a :class:`ModificationIndices`: the function that computes the rows
        left out holds the fit's likelihood and cannot be pickled, and a caller's pickled result (multiprocessing,
        a cache on disk) must load as the same rows."""
        return _every_row, (self.every,)

    @cached_property
    def every(self) -> ModificationIndices:
        """Every row, computed when first read."""
        return self._complete()

    # the columns of every row (ModificationIndices' fields)
    candidates = property(lambda self: self.every.candidates)
    labels = property(lambda self: self.every.labels)
    rows = property(lambda self: self.every.rows)
    groups = property(lambda self: self.every.groups)
    index = property(lambda self: self.every.index)
    expected_change = property(lambda self: self.every.expected_change)
    standardized_expected_change = property(lambda self: self.every.standardized_expected_change)

    def _row(self, j: int) -> ModificationIndex:
        return self.every._row(j)

    def _known(self, threshold: float) -> ModificationIndices:
        """The rows that answer for ``threshold``: the computed ones at or above this object's threshold."""
        return self.reaching if threshold >= self.threshold else self.every

    def reported(self, threshold: float, top: int | None) -> ModificationIndices:
        return self._known(threshold).reported(threshold, top)

    def reported_dicts(self, threshold: float, top: int | None) -> list[dict]:
        return self._known(threshold).reported_dicts(threshold, top)

    def count_reaching(self, threshold: float) -> int:
        return self._known(threshold).count_reaching(threshold)

    def where(self, keep: np.ndarray) -> ModificationIndices:
        return self.every.where(keep)

    def without(self, names: frozenset[str]) -> ScreenedIndices:
        return ScreenedIndices(self.reaching.without(names), self.threshold, lambda: self.every.without(names))

    def dicts(self, shown: slice | np.ndarray = slice(None)) -> list[dict]:
        return self.every.dicts(shown)


def _every_row(every: ModificationIndices) -> ModificationIndices:
    """What a pickled :class:`ScreenedIndices` loads as: its every row."""
    return every


def collected_indices(candidates: list[list[Candidate]], labels: tuple[str | None, ...], index: np.ndarray,
                      expected_change: np.ndarray, standardized: np.ndarray, keep: np.ndarray) -> ModificationIndices:
    """The rows of every group's candidates (``candidates[g]``, whose statistics are ``index`` etc. in that order, group
    after group) for which ``keep`` holds, largest index first (ties in the candidates' order)."""
    if len(candidates) == 1:  # one group: every row's group is the first
        group = np.zeros(len(candidates[0]), dtype=np.intp)
    else:
        group = np.repeat(np.arange(len(candidates)), [len(c) for c in candidates])
    if keep.all():  # every row kept: the order of them all
        order = descending_order(index)
    else:
        kept = np.flatnonzero(keep)
        order = kept[descending_order(index[kept])]
    return ModificationIndices(tuple(chain.from_iterable(candidates)), tuple(labels), order, group[order], index[order],
                               expected_change[order], standardized[order])
CHUNK = 256  # candidates whose derivatives are held in memory at once


def candidate_entries(table: ParameterTable, exogenous: tuple[str, ...], group: int = 0) -> list[Candidate]:
    """Every zero parameter of one group that could be freed."""
    own = [p for p in table.parameters if p.group == group]
    present = {(p.matrix, p.row, p.col) for p in own if p.free or p.offset != 0.0}
    out: list[Candidate] = []
    lat, obs = table.latent, table.observed
    below = {p.variables[1] for p in own if p.matrix == "B"}
    first_order = [j for j, f in enumerate(lat) if any(p.matrix == "L" and p.col == j for p in own)]
    for i, x in enumerate(obs):
        for j in first_order:
            if ("L", i, j) not in present:
                out.append(("loading", (lat[j], x), "L", i, j))
    for i in range(len(obs)):
        for j in range(i):
            if ("T", i, j) not in present:
                out.append(("residual_covariance", (obs[j], obs[i]), "T", i, j))
    exo = set(exogenous)
    for i in range(len(lat)):
        for j in range(i):
            same_level = (lat[i] in exo and lat[j] in exo) or (lat[i] in below and lat[j] in below)
            if same_level and ("P", i, j) not in present:
                out.append(("factor_covariance", (lat[j], lat[i]), "P", i, j))
    return out


def constrained_entries(table: ParameterTable, kinds: tuple[str, ...], group: int) -> list[Candidate]:
    """Entries of one group whose free parameter is shared with another group."""
    groups_of_index: dict[int, set[int]] = {}
    for par in table.parameters:
        if len(par.terms) == 1:
            groups_of_index.setdefault(par.terms[0][0], set()).add(par.group)
    return [
        (par.kind, par.variables, par.matrix, par.row, par.col)
        for par in table.parameters
        if par.group == group and par.kind in kinds and len(par.terms) == 1 and len(groups_of_index[par.terms[0][0]]) > 1
    ]


@dataclass(frozen=True)
class CandidateLayout:
    """One group's candidate entries as (matrix code, row, column) arrays, cut into chunks of at most CHUNK
    candidates with the rank-two description of each chunk (:func:`~cfa_tool.model.rank_two.entry_basis`): fixed by
    the model's pattern, so a model's own candidates are laid out once and kept for its refits."""

    codes: np.ndarray
    rows: np.ndarray
    cols: np.ndarray
    chunks: tuple[slice, ...]
    bases: tuple[EntryBasis, ...]
    standardization: Standardization


def candidate_layout(cands: list[Candidate], p: int, m: int) -> CandidateLayout:
    codes, rows, cols = candidate_arrays(cands)
    chunks = tuple(_chunks(len(cands)))
    return CandidateLayout(codes, rows, cols, chunks,
                           tuple(entry_basis(codes[sl], rows[sl], cols[sl], p, m, with_pairs=False) for sl in chunks),
                           standardization(codes, rows, cols, p, m))


def score_tests(model: StructuredModel, theta: np.ndarray, likelihood, candidates: list[list[Candidate]],
                layouts: list[CandidateLayout] | None = None, mats: list | None = None,
                factor: ScaledFactor | None = None, joint: "JointModel | None" = None,
                threshold: float | None = None, information: np.ndarray | None = None
                ) -> ModificationIndices | ScreenedIndices:
    """MI and EPC for each group's candidate entries (``candidates[g]``; ``layouts[g]`` their
    :func:`candidate_layout`, made here when not given); ``mats``: each group's model matrices at theta when the
    caller has them (their implied moments computed once); ``factor``: with complete data, the
    :func:`~cfa_tool.numerics.linalg.scaled_factor` of the information at theta when the caller has made it (for the
    rank check and the standard errors); ``joint``: with missing-data helpers, see :func:`helper_modification_indices`.
    ``threshold``: the index the report and the JSON show rows from; with rank-two gathers, a ``factor``, the
    ``information`` it factorises and many candidates, only the candidates whose index can reach it are computed at
    once (:func:`_screened`), the others when read (:class:`ScreenedIndices`)."""
    table = model.table
    if layouts is None:
        layouts = [candidate_layout(c, model.p, model.m) for c in candidates]
    if mats is None:
        mats = [model.matrices(theta, g) for g in range(table.n_groups)]
    labels = tuple(table.groups) if table.multigroup else (None,) * table.n_groups
    if not any(candidates):
        return ModificationIndices(labels=labels)
    floor = 0.0
    if (threshold is not None and factor is not None and information is not None
            and likelihood.score_route is ScoreRoute.RANK_TWO
            and sum(map(len, candidates)) * len(factor.scales) ** 2 >= SCREEN_FROM):
        floor = _eigenvalue_floor(information, factor)

    def columns(screen: tuple[float, float] | None = None) -> list[np.ndarray]:
        return _score_columns(model, theta, likelihood, candidates, layouts, mats, factor, joint, screen)

    if floor <= 0.0:  # every index computed now
        return collected_indices(candidates, labels, *columns())
    mi, epc, std_epc, ok, computed = columns((floor, threshold))

    def complete() -> ModificationIndices:
        """Every row: the candidates left out computed now, those computed at the fit keeping their values."""
        every = columns()
        for column, known in zip(every, (mi, epc, std_epc, ok)):
            column[computed] = known[computed]
        return collected_indices(candidates, labels, *every)

    return ScreenedIndices(collected_indices(candidates, labels, mi, epc, std_epc, ok & computed), threshold, complete)


#: candidates times parameters squared from which the score tests are screened (:func:`_screened`): screening cost
#: more than it saved at 40 items (bench/run.py's model, about 7 million) and saved a fifth at 60 (38 million;
#: bench/README.md, twenty-eighth round)
SCREEN_FROM = 10_000_000


def _score_columns(model: StructuredModel, theta: np.ndarray, likelihood, candidates: list[list[Candidate]],
                   layouts: list[CandidateLayout], mats: list, factor: ScaledFactor | None, joint,
                   screen: tuple[float, float] | None) -> list[np.ndarray]:
    """[MI, EPC, standardized EPC, whether the candidate's information is positive] of every group's candidates in
    turn (:func:`score_tests`'s arguments); with ``screen`` = (floor, threshold) (:func:`_screened`), also whether each
    candidate's index was computed (the others' MI and EPC NaN, and not positive)."""
    rank_two = likelihood.score_route is ScoreRoute.RANK_TWO
    if rank_two:  # every block from rank-two derivatives, in chunks
        # the information itself only when the caller has not factorised it (the forms below read the factor alone)
        H_tt = likelihood.evaluate(theta).information if factor is None else None
        # made when used: one chunk's block of the information held at a time
        parts = [(g, weight, mats[g], likelihood.candidate_scores(theta, g, layouts[g].bases))
                 for g, weight in enumerate(likelihood.weights) if candidates[g]]
    else:
        H_tt, parts = _chunked_blocks(model, theta, likelihood, candidates, layouts, mats, joint)
    # one factorisation for every group and chunk (the caller's, for complete data)
    forms = inverse_quadratic_forms(H_tt, factor if rank_two else None)
    n = likelihood.n_total
    columns = []
    for g, weight, group_mats, blocks in parts:
        d, h_cc, h_ct, kept = [], [], [], []
        for d_part, H_ct, h_cc_part in blocks:
            if weight != 1.0:  # one group: nothing to weigh (H_ct, made for this loop, weighed in place)
                d_part, h_cc_part = weight * d_part, weight * h_cc_part
                H_ct *= weight
            d.append(d_part)
            h_cc.append(h_cc_part)
            if screen is None:
                h_ct.append(forms(H_ct.T))
            else:  # the rows that can reach the threshold, copied (H_ct may be remade in place for the next chunk)
                keep = _screened(d_part, H_ct, h_cc_part, factor.scales, n, *screen)
                kept.append(keep)
                h_ct.append(H_ct[keep])
        d, h_cc = _joined(d), _joined(h_cc)
        if screen is None:
            form = _joined(h_ct)
        else:
            computed = _joined(kept)
            form = np.full(len(d), np.nan)
            form[computed] = forms(_joined(h_ct).T)
        h = h_cc - form
        ok = h > 1e-10 * np.maximum(h_cc, 1e-300)
        if ok.all():  # every candidate's information positive (the usual case): the same quotients without the masks
            mi, epc = 0.5 * n * d**2 / h, -d / h
        else:
            mi = np.where(ok, 0.5 * n * d**2 / np.where(ok, h, 1.0), np.nan)
            epc = np.where(ok, -d / np.where(ok, h, 1.0), np.nan)
        lay = layouts[g]
        std_epc, _ = standardize_entries(group_mats, lay.codes, lay.rows, lay.cols, epc, lay.standardization,
                                         latent=False)
        columns.append((mi, epc, std_epc, ok) if screen is None else (mi, epc, std_epc, ok, computed))
    return [_joined(c) for c in zip(*columns)]


def _screened(d: np.ndarray, H_ct: np.ndarray, h_cc: np.ndarray, scales: np.ndarray, n: int, floor: float,
              threshold: float) -> np.ndarray:
    """Whether each candidate's index can reach ``threshold``: MI = (N/2) d^2 / (h_cc - b' H^-1 b) with b its row of
    ``H_ct``, and with D = diag(``scales``) and ``floor`` at most the smallest eigenvalue of D H D
    (:func:`_eigenvalue_floor`), b' H^-1 b = (D b)' (D H D)^-1 (D b) <= |D b|^2 / floor (the Rayleigh quotient's
    bound; Golub & Van Loan 2013, sec. 8.1), so MI <= (N/2) d^2 / (h_cc - |D b|^2 / floor) when that denominator is
    positive.  The bound is widened by a millionth and by 1e-10 h_cc (the rounding of the exact forms where they
    nearly cancel h_cc) and the threshold lowered by 1e-9, so that no index computed at or above the threshold is
    left out; NaN anywhere keeps the candidate."""
    bound = (H_ct * H_ct) @ (scales * scales) / floor
    lowest = h_cc - (bound * (1.0 + 1e-6) + 1e-10 * np.abs(h_cc))
    return ~(0.5 * n * d * d < threshold * (1.0 - 1e-9) * lowest)


def _eigenvalue_floor(information: np.ndarray, factor: ScaledFactor) -> float:
    """A positive number below the smallest eigenvalue of the scaled information D H D = L L' (``factor``: D and
    L^-1), or 0 when none is found.  Power iteration on (D H D)^-1 = L^-T L^-1 (from the vector of ones, 16 steps)
    gives a Rayleigh quotient r at most its largest eigenvalue 1 / lambda_min, so 0.9 / r is near lambda_min, above
    or below; D H D - mu I is positive definite exactly when every eigenvalue exceeds mu, which a Cholesky
    factorisation checks (mu halved up to three times when it fails).  The check's rounding moves the eigenvalues by
    at most 4 q^2 eps for a matrix of unit diagonal (Higham 2002, thm. 10.5), taken off mu."""
    inverse = factor.inverse
    q = len(inverse)
    x = np.full(q, 1.0 / np.sqrt(q))
    for _ in range(16):
        y = inverse.T @ (inverse @ x)
        size = np.sqrt(y @ y)
        if not size > 0.0:
            return 0.0
        x = y / size
    rayleigh = float(np.sum((inverse @ x) ** 2))
    if not rayleigh > 0.0 or not np.isfinite(rayleigh):
        return 0.0
    scaled = information * (factor.scales[:, None] * factor.scales)
    diagonal = np.diag_indices(q)
    mu = 0.9 / rayleigh
    for _ in range(4):
        shifted = scaled.copy()
        shifted[diagonal] -= mu
        if cholesky_log_det(shifted) is not None:
            return max(mu - 4.0 * q * q * np.finfo(float).eps, 0.0)
        mu *= 0.5
    return 0.0


def _joined(parts: list[np.ndarray] | tuple[np.ndarray, ...]) -> np.ndarray:
    """The arrays one after the other (the one array itself when there is one chunk of one group)."""
    return parts[0] if len(parts) == 1 else np.concatenate(parts)


def _chunks(count: int) -> list[slice]:
    """Slices of at most CHUNK candidates: their derivative blocks stay small (and in the processor's cache)."""
    return [slice(start, start + CHUNK) for start in range(0, count, CHUNK)]


def candidate_arrays(cands: list[Candidate]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(matrix code, row, column) arrays of candidate entries."""
    return (np.array([MATRIX_CODES[c[2]] for c in cands]), np.array([c[3] for c in cands]), np.array([c[4] for c in cands]))


def _chunked_blocks(model: StructuredModel, theta: np.ndarray, likelihood, candidates: list[list[Candidate]],
                    layouts: list[CandidateLayout], matrices: list, joint=None):
    """The same blocks from full derivative matrices, in chunks (incomplete data; every group's information is
    summed before the blocks are used, so they are held).  ``joint``: the model with missing-data helpers
    (estimation.auxiliary.JointModel) whose likelihood and ``theta`` these are; a candidate is an entry of the
    model's matrices, so its derivative is the model's with zeros in the helpers' rows and columns, and the
    information is the joint one, the helpers' parameters among the free ones."""
    q = len(theta)
    H_tt = np.zeros((q, q))
    parts = []
    for g, weight in enumerate(likelihood.weights):
        mats = matrices[g]
        group = likelihood.group_parts(theta, g)
        t_sigma, t_mu = (model if joint is None else joint).jacobian(theta, g)
        H_tt += weight * group.information(t_sigma, t_mu)
        if not candidates[g]:
            continue
        lay = layouts[g]
        blocks = []
        for sl in lay.chunks:  # bounded memory for models with thousands of candidates
            c_sigma, c_mu = entry_derivatives(mats, lay.codes[sl], lay.rows[sl], lay.cols[sl])
            if joint is not None:
                c_sigma, c_mu = _with_helpers(c_sigma, c_mu, joint.r)
            blocks.append((group.gradient(c_sigma, c_mu), group.information(c_sigma, c_mu, t_sigma, t_mu),
                           group.information_diagonal(c_sigma, c_mu)))
        parts.append((g, weight, mats, blocks))
    return H_tt, parts


def _with_helpers(d_sigma: np.ndarray, d_mu: np.ndarray, r: int) -> tuple[np.ndarray, np.ndarray]:
    """Derivatives over the items padded with zeros for ``r`` helpers (their moments do not move with the entry)."""
    E, p, _ = d_sigma.shape
    padded = np.zeros((E, p + r, p + r))
    padded[:, :p, :p] = d_sigma
    return padded, np.concatenate([d_mu, np.zeros((E, r))], axis=1)


def modification_indices(model: StructuredModel, theta: np.ndarray, likelihood: Objective,
                         exogenous: tuple[str, ...], mats: list | None = None,
                         factor: ScaledFactor | None = None, threshold: float | None = None,
                         information: np.ndarray | None = None) -> ModificationIndices | ScreenedIndices:
    """Score tests of every zero parameter that could be freed (``mats``, ``factor``, ``threshold`` and
    ``information``: as :func:`score_tests` takes them)."""
    return score_tests(model, theta, likelihood, *model_candidates(model, exogenous), mats=mats, factor=factor,
                       threshold=threshold, information=information)


def model_candidates(model: StructuredModel, exogenous: tuple[str, ...]) -> tuple[list, list]:
    """Each group's candidate entries (:func:`candidate_entries`) and their layouts: fixed by the model, built at its
    first fit and kept for its refits."""
    table = model.table
    key = ("modification candidates", exogenous)
    if key not in model.derived:
        candidates = [candidate_entries(table, exogenous, g) for g in range(table.n_groups)]
        model.derived[key] = candidates, [candidate_layout(c, model.p, model.m) for c in candidates]
    return model.derived[key]


def helper_modification_indices(model: StructuredModel, joint: "JointModel", theta: np.ndarray,
                                likelihood: "AuxiliaryLikelihood", exogenous: tuple[str, ...],
                                mats: list) -> ModificationIndices:
    """Score tests of every zero parameter that could be freed, in the fit with missing-data helpers (Graham 2003's
    saturated correlates): ``joint`` is its estimation.auxiliary.JointModel, ``theta`` and ``likelihood`` the joint
    fit's, ``mats`` each group's matrices of the model (not the joint ones).  The score and information of a
    candidate are those of the joint likelihood, the helpers' means and covariances free beside the model's
    parameters (Sorbom 1989's statistic with the patterns-fixed information of full-information ML)."""
    return score_tests(model, theta, likelihood, *model_candidates(model, exogenous), mats, joint=joint)


def equality_score_tests(model: StructuredModel, theta: np.ndarray, likelihood: Objective,
                         kinds: tuple[str, ...]) -> ModificationIndices:
    """Score tests for releasing each cross-group equality of the given kinds, per group."""
    table = model.table
    return score_tests(model, theta, likelihood, [constrained_entries(table, kinds, g) for g in range(table.n_groups)])


def least_squares_score_tests(D_model: np.ndarray, D_candidates: np.ndarray, residuals: np.ndarray, weights: np.ndarray,
                              gamma: np.ndarray, n_obs: int) -> tuple[np.ndarray, np.ndarray]:
    """Robust score tests (modification indices) and expected parameter changes for a least-squares fit.

    For a candidate with derivative row d and a = W d, the score at the estimates is a'e.
    Under the model sqrt(N) e ~ Q z with Q = I - D'(D W D')^-1 D W and z ~ N(0, Gamma),
    so the statistic N (a'e)^2 / (v' Gamma v) with v = Q'a is chi-square on 1 df
    (the generalized score test of Satorra 1989); the expected change is the
    candidate's share of a Gauss-Newton step of the enlarged model, (a'e) / (d'v).
    """
    A = D_candidates * weights[None, :]
    WD = D_model.T * weights[:, None]
    V = A - (A @ D_model.T) @ scaled_inverse(D_model @ WD) @ WD.T
    score = A @ residuals
    variance = np.einsum("ck,ck->c", V @ gamma, V)
    curvature = np.einsum("ck,ck->c", D_candidates, V)
    ok = (variance > 1e-12 * np.maximum(np.einsum("ck,ck->c", A @ gamma, A), 1e-300)) & (np.abs(curvature) > 1e-12)
    mi = np.where(ok, n_obs * score**2 / np.where(ok, variance, 1.0), np.nan)
    epc = np.where(ok, score / np.where(ok, curvature, 1.0), np.nan)
    return mi, epc
