"""A root of a function of one variable inside a bracket, for the inverses of distribution functions (importing
scipy.optimize costs more than the few roots the report needs)."""

from __future__ import annotations

import math
from typing import Callable

EPS = 2.220446049250313e-16  # the spacing of floats at 1


def bracketed_root(f: Callable[[float], float], low: float, high: float, xtol: float = 0.0,
                   f_low: float | None = None, f_high: float | None = None, iterations: int = 200) -> float:
    """A root of ``f`` between ``low`` and ``high``, where ``f`` changes sign, by Brent's (1973) method as Press et al.
    (2007, section 9.3, zbrent) give it: inverse quadratic interpolation, or the secant, where it stays well inside
    the bracket and shrinks it fast enough, bisection otherwise, so that the bracket always holds a root and the
    search ends at worst as slowly as bisection.  The root is found to within 2 eps |x| + xtol / 2.  ``f_low`` and
    ``f_high``: f at the ends, when the caller has them.  Raises ValueError when f does not change sign."""
    a, b = float(low), float(high)
    fa = f(a) if f_low is None else f_low
    fb = f(b) if f_high is None else f_high
    if fa == 0.0:
        return a
    if fb == 0.0:
        return b
    if (fa > 0.0) == (fb > 0.0) or math.isnan(fa) or math.isnan(fb):
        raise ValueError("the function does not change sign between the ends of the bracket")
    c, fc = b, fb
    d = e = b - a
    for _ in range(iterations):
        if (fb > 0.0) == (fc > 0.0):  # the root lies between a and b: c takes a's place
            c, fc = a, fa
            d = e = b - a
        if abs(fc) < abs(fb):  # b is the best guess so far
            a, b, c = b, c, b
            fa, fb, fc = fb, fc, fb
        tol = 2.0 * EPS * abs(b) + 0.5 * xtol
        middle = 0.5 * (c - b)
        if abs(middle) <= tol or fb == 0.0:
            return b
        if abs(e) >= tol and abs(fa) > abs(fb):
            s = fb / fa
            if a == c:  # the secant
                p, q = 2.0 * middle * s, 1.0 - s
            else:  # inverse quadratic interpolation
                q, r = fa / fc, fb / fc
                p = s * (2.0 * middle * q * (q - r) - (b - a) * (r - 1.0))
                q = (q - 1.0) * (r - 1.0) * (s - 1.0)
            if p > 0.0:
                q = -q
            p = abs(p)
            if 2.0 * p < min(3.0 * middle * q - abs(tol * q), abs(e * q)):
                e, d = d, p / q
            else:
                d = e = middle
        else:
            d = e = middle
        a, fa = b, fb
        b += d if abs(d) > tol else math.copysign(tol, middle)
        fb = f(b)
    return b


def increasing_root(f: Callable[[float], tuple[float, float]], start: float, low: float = -math.inf,
                    high: float = math.inf, largest_step: float = math.inf, rtol: float = 1e-14,
                    iterations: int = 100) -> float:
    """A root of an increasing function, ``f(x)`` giving (value, slope), from ``start``: Newton's steps kept inside
    the bracket that the signs of the values seen so far give (starting from [``low``, ``high``]), bisection of it
    where a step would leave it (Press et al. 2007, section 9.4, rtsafe); no step longer than ``largest_step``
    (where the bracket is still open on that side, or a flat tail sends Newton's step far).  Ends when a step is
    below ``rtol`` |x| (or a bisected bracket that narrow), or at a zero; NaN when ``iterations`` do not get there.
    Values may be infinite (a logarithm of a probability that underflowed): they narrow the bracket, and the step
    towards the root is the longest."""
    x = float(start)
    for _ in range(iterations):
        value, slope = f(x)
        if value == 0.0:
            return x
        if value < 0.0:
            low = x
        else:
            high = x
        step = -value / slope if slope > 0.0 else math.copysign(math.inf, -value)
        step = max(-largest_step, min(largest_step, step))
        if abs(step) <= rtol * abs(x):
            return x + step
        following = x + step
        if not low < following < high:
            if math.isinf(low) or math.isinf(high):  # open on the side of the root: the longest step
                following = x + math.copysign(largest_step, -value)
            else:
                following = 0.5 * (low + high)
            if high - low <= rtol * abs(following):
                return following
        x = following
    return math.nan  # no convergence within ``iterations``: no root to give
