"""Rotation criteria: value and gradient with respect to the rotated loadings L (p x m).

Gradient projection minimises Q(L); the forms below follow Bernaards & Jennrich (2005).

* varimax (Kaiser 1958): Q = -1/4 ||L^2 - 1 mean(L^2)||^2 (columns centred over items),
  dQ/dL = -L o (L^2 - 1 mean(L^2));
* oblimin (Jennrich 1979; direct quartimin when gamma = 0, Jennrich & Sampson 1966):
  with N = 11' - I (m x m) and C = 11'/p (p x p), X = (I - gamma C) L^2 N,
  Q = 1/4 sum(L^2 o X), dQ/dL = L o X;
* geomin (Yates 1987; Browne 2001): Q = sum_i (prod_k (l_ik^2 + eps))^(1/m),
  dQ/dL = (2/m) L / (L^2 + eps) o row values;
* partially specified target (Browne 1972): Q = ||W o (L - B)||^2 with W = 1 where the
  target B is specified and 0 elsewhere, dQ/dL = 2 W o (L - B).

Here L^2 and o are elementwise.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np


@dataclass(frozen=True, eq=False)
class Criterion:
    """A rotation criterion: ``evaluate(L)`` returns (Q, dQ/dL)."""

    name: str
    evaluate: Callable[[np.ndarray], tuple[float, np.ndarray]]


def varimax() -> Criterion:
    def evaluate(L):
        L2 = L * L
        centred = L2 - L2.mean(axis=0)
        return -0.25 * float(np.vdot(centred, centred)), -L * centred

    return Criterion("varimax", evaluate)


def oblimin(gamma: float = 0.0) -> Criterion:
    def evaluate(L):
        L2 = L * L
        X = L2.sum(axis=1, keepdims=True) - L2  # L^2 N: each entry the sum of the row's other squares
        if gamma != 0.0:
            X = X - gamma * X.mean(axis=0)
        return 0.25 * float(np.vdot(L2, X)), L * X

    return Criterion("quartimin" if gamma == 0.0 else "oblimin", evaluate)


def geomin(epsilon: float = 0.01) -> Criterion:
    def evaluate(L):
        m = L.shape[1]
        L2 = L * L + epsilon
        rows = np.exp(np.log(L2).mean(axis=1))
        return float(rows.sum()), (2.0 / m) * L / L2 * rows[:, None]

    return Criterion("geomin", evaluate)


def target(B: np.ndarray) -> Criterion:
    """``B`` has NaN where the target leaves a loading unspecified."""
    B = np.asarray(B, dtype=float)
    W = np.isfinite(B).astype(float)
    B0 = np.where(W > 0, B, 0.0)

    def evaluate(L):
        D = W * (L - B0)
        return float(np.vdot(D, D)), 2.0 * D

    return Criterion("target", evaluate)
