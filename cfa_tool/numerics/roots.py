"""A root of an increasing function of one variable, for the inverses of distribution functions (importing
scipy.optimize costs more than the few roots the report needs): Newton's steps kept inside a bracket, the one
root-finder of the quantiles and of the noncentrality of the RMSEA's interval."""

from __future__ import annotations

import math
from typing import Callable


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
