"""Linear factor scores of data rows, block by block.

Each row is scored from the items it answered (for regression scores this is the
full-information posterior mean E[eta | x_o], which uses the sub-blocks of Sigma
for the answered items), with weights computed once per pattern of answered items
(:mod:`cfa_tool.scoring.weights`) and kept for the blocks that follow.  Rows are
handled in blocks, so memory does not grow with the number of rows beyond the
output; :func:`score_blocks` yields each block's scores for a writer that streams
them out.  A row without answers gets no scores (empty cells), counted by reason.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator
from dataclasses import dataclass

import numpy as np

from cfa_tool.data.patterns import group_patterns
from cfa_tool.scoring.methods import LINEAR_METHODS, ScoreMethod, Unscored, rows_without_answers
from cfa_tool.scoring.model import ScoringModel
from cfa_tool.scoring.weights import pattern_weights

BLOCK_ROWS = 65536  # rows per block: large enough that per-block overhead vanishes, small enough for the cache
CACHE_PATTERNS = 16384  # patterns whose weights are kept between blocks (bounded memory with scattered gaps)
GATHER_BELOW = 64  # patterns with fewer rows in a block are scored together by gathering their weights


@dataclass(frozen=True, eq=False)
class ScoreBlock:
    """One method's scores of a block of rows (rows in the order given)."""

    method: ScoreMethod
    factors: tuple[str, ...]
    scores: np.ndarray  # (n, m); NaN where no score
    standard_errors: np.ndarray  # (n, m): root mean squared error about the factor given the answered items
    unscored: dict  # Unscored -> (m,) number of rows without a score of each factor for that reason

    @property
    def n_rows(self) -> int:
        return len(self.scores)


class LinearScorer:
    """Scores rows of one group by one or more linear methods.

    Holds the group's model, its means, and the weights of the answer patterns seen so far (at most
    CACHE_PATTERNS of them, in arrays indexed by a slot per pattern); every result is a function of
    the rows given alone.
    """

    def __init__(self, model: ScoringModel, methods: tuple[ScoreMethod, ...] = (ScoreMethod.REGRESSION,)):
        methods = tuple(methods)
        if not methods:
            raise ValueError("no scoring method given")
        for method in methods:
            if method not in LINEAR_METHODS:
                raise ValueError(f"{method} is not a linear scoring method")
        self.model = model
        self.methods = methods
        self._mu = np.asarray(model.implied_mean)
        self._alpha = np.asarray(model.factor_means)
        self._reasons = tuple(Unscored)
        self._clear()

    def _clear(self) -> None:
        p, m = self.model.p, self.model.m
        self._slots: dict[bytes, int] = {}
        self._weights = {method: np.empty((0, p, m)) for method in self.methods}
        self._errors = {method: np.empty((0, m)) for method in self.methods}
        self._why = {method: np.empty((0, m), dtype=np.int8) for method in self.methods}  # 1 + index in Unscored, 0: scored

    @property
    def patterns_kept(self) -> int:
        """Answer patterns whose weights are kept for the blocks to come."""
        return len(self._slots)

    def _slots_of(self, patterns: np.ndarray) -> np.ndarray:
        """Slots of the patterns' weights, computing those not seen before."""
        keys = [bytes(row) for row in np.packbits(patterns, axis=1)]
        new = [k for k, key in enumerate(keys) if key not in self._slots]
        if new:
            if len(self._slots) + len(new) > CACHE_PATTERNS:
                self._clear()
                new = list(range(len(keys)))
            found = pattern_weights(self.model, patterns[new], self.methods)
            for method, pw in found.items():
                se = np.sqrt(np.clip(np.diagonal(pw.mean_squared_error, axis1=1, axis2=2), 0.0, None))
                why = np.array([[0 if r is None else 1 + self._reasons.index(r) for r in row] for row in pw.unscored],
                               dtype=np.int8).reshape(len(new), self.model.m)
                self._weights[method] = np.concatenate([self._weights[method], pw.weights])
                self._errors[method] = np.concatenate([self._errors[method], se])
                self._why[method] = np.concatenate([self._why[method], why])
            first = len(self._slots)
            for pos, k in enumerate(new):
                self._slots[keys[k]] = first + pos
        return np.array([self._slots[key] for key in keys], dtype=np.intp)

    def score(self, rows: np.ndarray) -> dict[ScoreMethod, ScoreBlock]:
        """Scores of a block of rows ((n, p), the model's items in its order, NaN for no answer)."""
        rows = np.asarray(rows, dtype=float)
        n, p = rows.shape
        if p != self.model.p:
            raise ValueError(f"rows have {p} columns; the model has {self.model.p} items")
        if np.isinf(rows).any():
            raise ValueError("rows contain infinite values")
        m = self.model.m
        mask = ~np.isnan(rows)
        answered = mask.any(axis=1)
        out = {method: (np.full((n, m), np.nan), np.full((n, m), np.nan)) for method in self.methods}
        counts = {method: rows_without_answers(answered, m) for method in self.methods}
        if not answered.any():
            return {method: ScoreBlock(method, self.model.factors, *out[method], counts[method]) for method in self.methods}
        if mask.all():  # complete rows: one pattern, no selection
            take = slice(None)
            centred = rows - self._mu
            patterns, index, sizes = mask[:1], np.zeros(n, dtype=np.intp), np.array([n])
        else:
            take = np.flatnonzero(answered)
            sub_mask = mask[take]
            centred = np.where(sub_mask, rows[take] - self._mu, 0.0)
            patterns, index, sizes = group_patterns(sub_mask)
        slots = self._slots_of(patterns)
        big = np.flatnonzero(sizes >= GATHER_BELOW)
        order = np.argsort(index, kind="stable") if len(big) > 1 or len(big) < len(sizes) else None
        ends = np.cumsum(sizes)
        small_rows = np.flatnonzero(sizes[index] < GATHER_BELOW)
        for method in self.methods:
            scores, ses = out[method]
            W = self._weights[method][slots]  # (P, p, m)
            errors = self._errors[method][slots]
            ses[take] = errors[0] if len(sizes) == 1 else errors[index]
            values = np.empty((len(centred), m))
            for k in big:
                sel = order[ends[k] - sizes[k]: ends[k]] if order is not None else slice(None)
                values[sel] = centred[sel] @ W[k]
            if len(small_rows):
                values[small_rows] = np.einsum("np,npm->nm", centred[small_rows], W[index[small_rows]])
            scores[take] = self._alpha + values
            why = self._why[method][slots]
            for code in np.unique(why[why > 0]):
                counts[method][self._reasons[code - 1]] = counts[method].get(self._reasons[code - 1], 0) + sizes @ (why == code)
        return {method: ScoreBlock(method, self.model.factors, *out[method], counts[method]) for method in self.methods}


def row_blocks(rows: np.ndarray, size: int = BLOCK_ROWS) -> Iterator[np.ndarray]:
    """Consecutive blocks of at most ``size`` rows (views, no copies)."""
    for start in range(0, len(rows), size):
        yield rows[start:start + size]


def score_blocks(model: ScoringModel, blocks: Iterable[np.ndarray],
                 methods: tuple[ScoreMethod, ...] = (ScoreMethod.REGRESSION,)) -> Iterator[dict[ScoreMethod, ScoreBlock]]:
    """Scores of each block of rows in turn, weights computed once per answer pattern."""
    scorer = LinearScorer(model, methods)
    for block in blocks:
        yield scorer.score(block)


def score_rows(model: ScoringModel, rows: np.ndarray, methods: tuple[ScoreMethod, ...] = (ScoreMethod.REGRESSION,),
               block_rows: int = BLOCK_ROWS) -> dict[ScoreMethod, ScoreBlock]:
    """Scores of all ``rows`` (n, p) by each method, computed block by block into one output."""
    rows = np.asarray(rows, dtype=float)
    methods = tuple(methods)
    if not methods:
        raise ValueError("no scoring method given")
    n, m = len(rows), model.m
    scores = {method: np.empty((n, m)) for method in methods}
    ses = {method: np.empty((n, m)) for method in methods}
    counts: dict = {method: {} for method in methods}
    start = 0
    for block in score_blocks(model, row_blocks(rows, block_rows), methods):
        for method, b in block.items():
            scores[method][start:start + b.n_rows] = b.scores
            ses[method][start:start + b.n_rows] = b.standard_errors
            for why, c in b.unscored.items():
                counts[method][why] = counts[method].get(why, np.zeros(m, dtype=np.int64)) + c
        start += block[methods[0]].n_rows
    return {method: ScoreBlock(method, model.factors, scores[method], ses[method], counts[method]) for method in methods}


def score_groups(models: dict, rows: np.ndarray, group_of_row: np.ndarray,
                 methods: tuple[ScoreMethod, ...] = (ScoreMethod.REGRESSION,),
                 block_rows: int = BLOCK_ROWS) -> dict[ScoreMethod, ScoreBlock]:
    """Scores of rows from several groups, each row by its own group's parameters (intercepts, factor
    means, loadings, ...); rows in the order given.  ``models`` maps each label of ``group_of_row``
    to that group's :class:`ScoringModel`; every row's label must be one of them."""
    group_of_row = np.asarray(group_of_row)
    labels = list(models)
    known = np.isin(group_of_row, np.array(labels, dtype=object))
    if not known.all():
        raise ValueError(f"row {int(np.flatnonzero(~known)[0])} belongs to no fitted group")
    first = models[labels[0]]
    n, m = len(rows), first.m
    scores = {method: np.full((n, m), np.nan) for method in methods}
    ses = {method: np.full((n, m), np.nan) for method in methods}
    counts: dict = {method: {} for method in methods}
    for label, model in models.items():
        if model.factors != first.factors or model.items != first.items:
            raise ValueError("every group must have the same items and factors")
        sel = np.flatnonzero(group_of_row == label)
        if not len(sel):
            continue
        part = score_rows(model, np.asarray(rows, dtype=float)[sel], methods, block_rows)
        for method, b in part.items():
            scores[method][sel] = b.scores
            ses[method][sel] = b.standard_errors
            for why, c in b.unscored.items():
                counts[method][why] = counts[method].get(why, np.zeros(m, dtype=np.int64)) + c
    return {method: ScoreBlock(method, first.factors, scores[method], ses[method], counts[method]) for method in methods}
