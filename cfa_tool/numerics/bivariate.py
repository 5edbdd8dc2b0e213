"""The standard bivariate normal distribution, vectorised.

Phi2(h, k; rho) = Phi(h) Phi(k) + (1 / 2 pi) int_0^asin(rho) exp(-(h^2 + k^2 - 2 h k sin t) / (2 cos^2 t)) dt
(Sheppard's formula; see Drezner & Wesolowsky 1990), integrated by Gauss-Legendre
quadrature; infinite limits are handled exactly.
"""

from __future__ import annotations

import numpy as np
from scipy import special

_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(40)
BIG = 40.0  # beyond this many standard deviations the normal distribution is taken as complete


def _phi(x: np.ndarray) -> np.ndarray:
    return 0.5 * special.erfc(-x / np.sqrt(2.0))


def bivariate_cdf(h, k, rho) -> np.ndarray:
    """P(X <= h, Y <= k) for standard normals with correlation rho (arrays broadcast)."""
    h, k, rho = np.broadcast_arrays(np.asarray(h, float), np.asarray(k, float), np.asarray(rho, float))
    hc = np.clip(h, -BIG, BIG)
    kc = np.clip(k, -BIG, BIG)
    upper = np.arcsin(np.clip(rho, -0.999999, 0.999999))
    t = 0.5 * upper[..., None] * (_NODES + 1.0)
    sin_t, cos2 = np.sin(t), np.cos(t) ** 2
    expo = -(hc[..., None] ** 2 + kc[..., None] ** 2 - 2.0 * hc[..., None] * kc[..., None] * sin_t) / (2.0 * cos2)
    integral = 0.5 * upper * np.sum(_WEIGHTS * np.exp(expo), axis=-1)
    out = _phi(hc) * _phi(kc) + integral / (2.0 * np.pi)
    return np.clip(out, 0.0, 1.0)


def bivariate_pdf(h, k, rho) -> np.ndarray:
    h, k, rho = np.broadcast_arrays(np.asarray(h, float), np.asarray(k, float), np.asarray(rho, float))
    hc = np.clip(h, -BIG, BIG)
    kc = np.clip(k, -BIG, BIG)
    det = 1.0 - rho**2
    return np.exp(-(hc**2 - 2 * rho * hc * kc + kc**2) / (2 * det)) / (2 * np.pi * np.sqrt(det))
