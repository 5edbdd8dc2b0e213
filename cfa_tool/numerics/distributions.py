"""The chi-square, noncentral chi-square and normal distribution functions a report needs, with numpy and math only:
importing scipy.special costs about 0.1 s at a start of the command (30 ms on top of scipy.linalg, whose array layer
it shares; that layer loads numpy.testing and numpy.f2py), more than every p-value and interval of a report take.

One rule divides the work: the report's numbers (a test's p-value, an RMSEA interval, a power, a critical value, a
bootstrap interval's levels, an ordinal item's thresholds from its answer shares) come from here, for scalars or small
arrays; the modules that evaluate a distribution over large arrays in their own inner loops import scipy.special
themselves, at the point where they are first needed, since they are off a plain fit's path: ``numerics/bivariate.py``
(erfc in the bivariate normal probabilities of ordinal items' cells), ``data/polychoric.py`` (ndtr of every table's
cells and of every row's answer in the polyserial likelihood), ``assessment/ordinal_reliability.py`` (ndtr of the
thresholds of ordinal omega), ``scoring/ordinal.py`` (log_ndtr of every row's answer probabilities in the ordinal
scores) and ``scoring/quadrature.py`` (ndtri of the quadrature points).

Sources of the methods:

* the regularized incomplete gamma functions P(a, x) and Q(a, x) = 1 - P(a, x) (chi-square with 2a df at 2x) as
  sums of the terms D(b, x) = x^b e^-x / Gamma(b + 1): P(a, x) = sum over m >= 0 of D(a + m, x) (the series of
  Abramowitz & Stegun 1964, 6.5.29; Press et al. 2007, section 6.2, gser) where the terms fall from the start
  (x < a + 1), and Q(a + n, x) = Q(a, x) + sum over m < n of D(a + m, x) (the recurrence in a, A&S 6.5.21-22)
  where they fall downward, from a base a in (0, 1] (Q(1, x) = e^-x, Q(1/2, x) = erfc(sqrt x), else the continued
  fraction of Press et al. 2007, gcf, modified Lentz), unless they are negligible before it; both sums add
  positive terms only, so every value keeps its relative accuracy, and they are summed with numpy from the largest
  term out, the terms by ratios of neighbours and the largest one in Loader's (2000) saddle-point form
  exp(-stirlerr(b) - bd0(b, x)) / sqrt(2 pi b), which keeps about 12 digits for df in the tens of thousands (240
  items); arrays of upper tails with whole df (rows' Mahalanobis distances) by the same recurrence's finite sums
  from its base, element by element at once;
* the noncentral chi-square as the Poisson mixture of central ones (Johnson, Kotz & Balakrishnan 1995, eq. 29.2),
  summed over a window of the Poisson index around its largest term (of the cdf's terms or of the survival
  function's), widened while its edge terms are not negligible; the upper tail summed as such, never as 1 - cdf;
* quantiles by Newton's steps kept inside a bracket (Press et al. 2007, rtsafe; ``numerics/roots.py``), the slopes
  being sums over the same terms; the noncentrality for a given cdf value by Halley's steps in the same bracket (the
  second derivative a sum over the same terms too), started from the cube-root normal approximation (Abramowitz &
  Stegun 1964, 26.4.32, as recalled);
* the normal cdf by math.erfc, its quantile by Wichura's (1988) algorithm AS241 (coefficients as published).

Checked against scipy.special over wide grids in ``tests/numerics/test_distributions.py``.
"""

from __future__ import annotations

import math

import numpy as np

from cfa_tool.numerics.roots import increasing_root

_HALF_LOG_2PI = 0.5 * math.log(2.0 * math.pi)
_SQRT_HALF = math.sqrt(0.5)
_TAIL = 45.0  # a sum of falling terms is cut where its terms fall below e^-45 (3e-20) of its first
_NEGLIGIBLE = 1e-17  # a Poisson window is wide enough when its edge terms are below this share of its sum
_NAN = float("nan")
#: Newton's last step: once a step is below this share of x, the root is x plus it, its error of the order of the
#: step squared (the functions solved are smooth logarithms of probabilities)
_LAST_STEP = 1e-9
#: Halley's last step (the noncentrality for a cdf value): its error is of the order of the step cubed
_HALLEY_LAST_STEP = 1e-6


def _stirling_error(b: float) -> float:
    """ln Gamma(b + 1) - [(b + 1/2) ln b - b + ln sqrt(2 pi)], b > 0 (Loader 2000, stirlerr); above 15 by its
    asymptotic series (Abramowitz & Stegun 1964, 6.1.41) to the term in b^-9."""
    if b > 15.0:
        b2 = 1.0 / (b * b)
        return (1 / 12 - (1 / 360 - (1 / 1260 - (1 / 1680 - b2 / 1188) * b2) * b2) * b2) / b
    return math.lgamma(b + 1.0) - (b + 0.5) * math.log(b) + b - _HALF_LOG_2PI


def _deviance(b: float, y: float) -> float:
    """b ln(b / y) + y - b for b, y > 0 (Loader 2000, bd0): near b = y by its series in v = (b - y) / (b + y), where
    the direct form would lose its digits to cancellation."""
    if abs(b - y) < 0.1 * (b + y):
        v = (b - y) / (b + y)
        v2 = v * v
        total = (b - y) * v
        term = 2.0 * b * v
        j = 1
        while True:
            term *= v2
            following = total + term / (2 * j + 1)
            if following == total:
                return total
            total = following
            j += 1
    return b * math.log(b / y) + y - b


def _gamma_term(b: float, y: float) -> float:
    """D(b, y) = y^b e^-y / Gamma(b + 1) for b >= 0, y > 0: P(b, y) - P(b + 1, y), and at whole b the Poisson
    probability of b events at mean y; from b = 1 on in Loader's (2000) form exp(-stirlerr(b) - bd0(b, y)) /
    sqrt(2 pi b)."""
    if b < 1.0:
        return math.exp(b * math.log(y) - y - math.lgamma(b + 1.0))
    return math.exp(-_stirling_error(b) - _deviance(b, y)) / math.sqrt(2.0 * math.pi * b)


def _base_upper_gamma(a: float, y: float) -> float:
    """Q(a, y) for 0 < a <= 1 and y > 0: e^-y at a = 1, erfc(sqrt y) at a = 1/2; otherwise 1 - P(a, y) by P's series
    below a + 1 (1 - P there loses at most two or three digits for a above 0.005, df above 0.01) and Q's continued
    fraction above (Press et al. 2007, section 6.2, gser and gcf)."""
    if a == 1.0:
        return math.exp(-y)
    if a == 0.5:
        return math.erfc(math.sqrt(y))
    prefix = math.exp(a * math.log(y) - y - math.lgamma(a))  # y^a e^-y / Gamma(a)
    if y < a + 1.0:
        term = total = 1.0 / a
        n = a
        while term > 1e-17 * total:
            n += 1.0
            term *= y / n
            total += term
        return 1.0 - prefix * total
    tiny = 1e-300
    b = y + 1.0 - a
    c, d = 1.0 / tiny, 1.0 / b
    h = d
    for i in range(1, 1000):
        an = -i * (i - a)
        b += 2.0
        d = an * d + b
        d = 1.0 / (d if abs(d) >= tiny else tiny)
        c = b + an / c
        c = c if abs(c) >= tiny else tiny
        h *= d * c
        if abs(d * c - 1.0) <= 2.3e-16:  # the spacing of floats at 1
            break
    return prefix * h


def _falling_up(b: float, y: float) -> int:
    """How many terms D(b + 1, y), D(b + 2, y), ... follow D(b, y) before they fall below e^-45 of it, y < b + 1:
    the ratios y / (b + k) fall at least geometrically from y / (b + 1), and their product is at most
    exp(-m (m - 1) / (2 (b + m))) after m of them (ln(1 + u) >= u / (1 + u))."""
    ratio = y / (b + 1.0)
    geometric = _TAIL / -math.log(ratio) if ratio > 0.0 else 0.0
    gaussian = ((1 + 2 * _TAIL) + math.sqrt((1 + 2 * _TAIL) ** 2 + 8 * _TAIL * b)) / 2
    return math.ceil(min(geometric, gaussian)) + 2


def _falling_down(b: float, y: float) -> int:
    """How many terms D(b - 1, y), D(b - 2, y), ... follow D(b, y) before they fall below e^-45 of it, b < y: the
    ratios (b - i) / y fall at least geometrically from b / y, and their product is at most exp(-m (m - 1) / (2 b))
    after m of them."""
    geometric = _TAIL / -math.log(b / y) if b > 0.0 else 0.0
    gaussian = (1 + math.sqrt(1 + 8 * _TAIL * b)) / 2
    return math.ceil(min(geometric, gaussian)) + 2


def _central_terms(y: float, a: float, low: int, high: int,
                   upper: bool) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """(R(a + j, y), D(a + j, y), a + j, D(a + j + 1, y) / D(a + j, y) = y / (a + j + 1)) for j from ``low`` to
    ``high``, R = Q if ``upper`` else P: the central terms
    of :func:`_window_sum`, which do not depend on the noncentrality (a root in the noncentrality computes them once
    per window, :func:`_poisson_mixture`'s ``memo``)."""
    bottom = 1 - math.ceil(a)  # a + bottom lies in (0, 1]: where the recurrence of Q starts
    if upper:
        up = not a + low < y  # the terms D fall below the window: Q by its sum, else 1 - P by P's series
    else:
        up = a + high + 1.0 > y  # the terms D fall above the window: P by its series, else 1 - Q
    if up:
        first, last = low, high + _falling_up(a + high, y)
    else:
        first, last = max(low - _falling_down(a + low, y), bottom), high
    b = np.arange(first, last + 1, dtype=float)
    b += a
    peak = min(max(math.ceil(y - 1.0 - a), first), last)  # the largest D: D(b + 1) / D(b) = y / (b + 1)
    d = _from_largest(b, peak - first, _gamma_term(a + peak, y), y)
    window = slice(low - first, high - first + 1)
    if up:
        p = np.add.accumulate(d[::-1])[::-1][window]  # P(a + j, y): the sum of D(a + i, y) over i >= j, smallest first
        values = 1.0 - p if upper else p
    else:
        base = _base_upper_gamma(a + first, y) if first == bottom else 0.0  # else below e^-45 of the sum
        q = np.empty(len(d))  # Q(a + j, y) = Q(a + first, y) + the sum of D(a + i, y) over i < j
        q[0] = 0.0
        np.add.accumulate(d[:-1], out=q[1:])
        q = q[window]
        q += base
        values = q if upper else 1.0 - q
    b = b[window]
    return values, d[window], b, y / (b + 1.0)


def _window_sum(y: float, a: float, mu: float, low: int, high: int, upper: bool,
                central: tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray] | None = None
                ) -> tuple[float, float, float, float, float, float]:
    """(S, its first term, its last term, dS / d mu, dS / d ln y, d2S / d mu2) for S the sum over j from ``low`` to
    ``high`` of w_j R(a + j, y), R = Q if ``upper`` else P, w_j the Poisson probabilities of j at mean ``mu`` (1 at
    j = 0 when mu = 0).  The derivatives (for the steps of a root) are sums over the same window: d/d mu of the sum
    of w_j F_j is the sum of w_j (F_j+1 - F_j) (as d w_j / d mu = w_j-1 - w_j), so that of w_j P(a + j, y) is
    -sum w_j D(a + j, y) and the second derivative is -sum w_j (D(a + j + 1, y) - D(a + j, y)), with
    D(b + 1, y) = D(b, y) y / (b + 1); d/dy of P(b, y) is D(b - 1, y) = D(b, y) b / y.  ``central``:
    :func:`_central_terms` of the window when the caller has them."""
    values, d, b, rise = _central_terms(y, a, low, high, upper) if central is None else central
    sign = 1.0 if upper else -1.0
    if mu == 0.0:
        value, slope = float(values[0]), float(d[0])
        return value, value, value, sign * slope, -sign * a * slope, sign * slope * (float(rise[0]) - 1.0)
    i = np.arange(low, high + 1, dtype=float)
    m = min(max(math.floor(mu), low), high)  # the largest weight within the window
    w = _from_largest(i, m - low, _gamma_term(float(m), mu), mu)
    terms = w * values
    w *= d
    slope = sign * float(np.add.reduce(w))
    return (float(np.add.reduce(terms)), float(terms[0]), float(terms[-1]), slope, -sign * float(w @ b),
            sign * float(w @ rise) - slope)


def _from_largest(b: np.ndarray, k: int, largest: float, y: float) -> np.ndarray:
    """Terms proportional to y^b / Gamma(b + 1) at the consecutive points ``b`` (D(b, y), and at whole b the Poisson
    probabilities at mean y), from the k-th, ``largest``, by the ratios of neighbours t_i+1 / t_i = y / b_i+1 in
    products taken outward from it: nothing overflows, and a term underflows only where it is that small."""
    t = np.empty(len(b))
    t[k] = largest
    if k + 1 < len(t):
        above = t[k + 1:]
        np.divide(y, b[k + 1:], out=above)
        np.multiply.accumulate(above, out=above)
        above *= largest
    if k > 0:
        below = t[:k]
        np.divide(b[1:k + 1], y, out=below)  # t_i / t_i+1 = b_i+1 / y
        reverse = below[::-1]
        np.multiply.accumulate(reverse, out=reverse)
        below *= largest
    return t


def _poisson_mixture(y: float, a: float, mu: float, upper: bool,
                     memo: dict | None = None) -> tuple[float, float, float, float]:
    """(S, dS / d mu, dS / d ln y, d2S / d mu2) for S the sum over j of w_j P(a + j, y) (the noncentral chi-square
    cdf at x = 2y, 2a df, noncentrality 2 mu; Johnson, Kotz & Balakrishnan 1995, eq. 29.2) or, ``upper``, of
    w_j Q(a + j, y) (its survival function); w_j the Poisson probabilities at mean ``mu``, the central distribution
    at mu = 0.  y >= 0, a > 0, mu >= 0.  The window's centre is rounded down to a multiple of a quantum (a power of
    two between half and one Poisson standard deviation) and the window widened by one quantum, so that the
    noncentralities a root's last steps try share one window: ``memo`` (a dict kept by the caller for one y, a and
    tail) holds the central terms of the windows met (:func:`_central_terms`), and a step then computes only the
    Poisson weights."""
    if y <= 0.0:
        return (1.0 if upper else 0.0), 0.0, 0.0, 0.0
    if y == math.inf:
        return (0.0 if upper else 1.0), 0.0, 0.0, 0.0
    if mu == math.inf:
        return (1.0 if upper else 0.0), 0.0, 0.0, 0.0
    if mu == 0.0:
        total, _, _, slope_mu, slope_t, curvature = _window_sum(y, a, 0.0, 0, 0, upper)
        return total, slope_mu, slope_t, curvature
    # the terms' largest: where the ratio of neighbours w_j+1 R_j+1 / (w_j R_j) passes 1; in the tail of R near
    # j (a + j) = mu y, where R is near 1 at the Poisson mode
    centre = 2.0 * mu * y / (math.sqrt(a * a + 4.0 * mu * y) + a)
    centre = max(mu, centre) if upper else min(mu, centre)
    quantum = 1 << int(math.sqrt(centre + 1.0)).bit_length() - 1  # a power of two up to sqrt(centre + 1)
    start = math.floor(centre) // quantum * quantum
    spread = math.ceil(9.5 * math.sqrt(start + quantum + 1.0)) + 12  # 9.5 Poisson sd and more either side
    low, high = max(0, start - spread), start + quantum + spread
    for _ in range(64):
        central = None if memo is None else memo.get((low, high))
        if central is None:
            central = _central_terms(y, a, low, high, upper)
            if memo is not None:
                memo[low, high] = central
        total, first, last, slope_mu, slope_t, curvature = _window_sum(y, a, mu, low, high, upper, central)
        wider_low = low > 0 and first > _NEGLIGIBLE * total
        wider_high = last > _NEGLIGIBLE * total
        if not (wider_low or wider_high):
            break
        spread *= 2
        low = max(0, low - spread) if wider_low else low
        high = high + spread if wider_high else high
    return total, slope_mu, slope_t, curvature


def _each(function, *args):
    """``function`` of floats at each element of the broadcast arguments: a numpy float for scalar arguments (as a
    ufunc gives), an array of floats otherwise."""
    if all(isinstance(v, (float, int)) for v in args):
        return np.float64(function(*(float(v) for v in args)))
    arrays = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in args))
    values = [function(*point) for point in zip(*(x.ravel().tolist() for x in arrays))]
    return np.array(values, dtype=float).reshape(arrays[0].shape)[()]


def _chi2_tail(x: float, df: float, nc: float, upper: bool) -> float:
    if math.isnan(x) or not df > 0.0 or not nc >= 0.0:  # NaN in, NaN out; no distribution at df <= 0
        return _NAN
    return _poisson_mixture(max(x, 0.0) / 2.0, df / 2.0, nc / 2.0, upper)[0]


#: whole df up to which :func:`chi2_sf` sums arrays by the finite sums at once (the Mahalanobis distances of rows)
WHOLE_DF_SUMMED = 400


def _whole_df_sf(x: np.ndarray, df: np.ndarray | int) -> np.ndarray:
    """P(X > x) for arrays of x and whole df from 1 to WHOLE_DF_SUMMED, element by element at once: the recurrence
    Q(b + 1, y) = Q(b, y) + D(b, y) summed from its base (Abramowitz & Stegun 1964, section 26.4): with y = x / 2,
    e^-y times the sum of y^k / k! over k < df / 2 for even df, erfc(sqrt y) plus the sum of D(k + 1/2, y) over
    k < (df - 1) / 2 for odd df; every term positive, each in logarithms, b ln y - y - ln Gamma(b + 1).  ``df`` one
    whole number for every x (complete rows' distances, all on the number of items), or an array of them."""
    y = np.maximum(x, 0.0) / 2.0
    with np.errstate(divide="ignore", invalid="ignore"):
        log_y = np.log(y)
        if np.ndim(df) == 0:  # one df: the same terms without choosing between odd and even per element
            odd = df % 2 == 1
            total = _erfc_array(np.sqrt(y)) if odd else np.zeros(y.shape)
            for k in range(int(df) // 2):
                total += np.exp((k + 0.5 if odd else float(k)) * log_y - y
                                - (math.lgamma(k + 1.5) if odd else math.lgamma(k + 1.0)))
        else:
            odd = df % 2 == 1
            start = np.where(odd, 0.5, 0.0)  # b = start + k runs up to df / 2 - 1
            terms = df // 2  # how many of them
            total = np.where(odd, _erfc_array(np.sqrt(y)), 0.0) if odd.any() else np.zeros(y.shape)
            for k in range(int(terms.max(initial=0))):
                log_gamma = np.where(odd, math.lgamma(k + 1.5), math.lgamma(k + 1.0))
                total += np.where(k < terms, np.exp((start + k) * log_y - y - log_gamma), 0.0)
    return np.where(y == 0.0, 1.0, np.where(y == np.inf, 0.0, total))


def chi2_sf(x, df):
    """P(X > x), X chi-square with ``df`` (df > 0, whole or not)."""
    if not isinstance(x, (float, int)) or not isinstance(df, (float, int)):
        if isinstance(df, (int, np.integer)) and 1 <= df <= WHOLE_DF_SUMMED and np.size(x) > 1:
            return _whole_df_sf(np.asarray(x, dtype=float), int(df))  # one df for every x
        x, df = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(df, dtype=float))
        if x.size > 1 and np.all((df >= 1) & (df <= WHOLE_DF_SUMMED) & (df == np.floor(df))):
            return _whole_df_sf(x, df)
    return _each(lambda x, df: _chi2_tail(x, df, 0.0, True), x, df)


def boundary_mixture_sf(x: float, df: int) -> float:
    """P(T >= x) for T distributed as the 50:50 mixture of chi-square(df - 1) and chi-square(df): the likelihood-ratio
    statistic when one of the df parameters tested lies on the boundary of its space (a variance at 0, a correlation
    at 1) and the others inside it (Self & Liang 1987; Stram & Lee 1994).  chi-square(0) is the point mass at 0."""
    x = max(float(x), 0.0)
    lower = (1.0 if x <= 0.0 else 0.0) if df == 1 else float(chi2_sf(x, df - 1))
    return 0.5 * lower + 0.5 * float(chi2_sf(x, df))


def chi2_cdf(x, df):
    """P(X <= x), X chi-square with ``df``."""
    return _each(lambda x, df: _chi2_tail(x, df, 0.0, False), x, df)


def ncx2_cdf(x, df, nc):
    """P(X <= x), X noncentral chi-square with ``df`` and noncentrality ``nc`` (the central one at nc = 0)."""
    return _each(lambda x, df, nc: _chi2_tail(x, df, nc, False), x, df, nc)


def ncx2_sf(x, df, nc):
    """P(X > x), X noncentral chi-square with ``df`` and noncentrality ``nc``: the upper tail summed as such."""
    return _each(lambda x, df, nc: _chi2_tail(x, df, nc, True), x, df, nc)


def _quantile(q: float, df: float, nc: float) -> float:
    """x with P(X <= x) = q, X noncentral chi-square (df, nc): Newton's steps in t = ln(x / 2) (relative accuracy
    however small x) on the logarithm of the tail (the lower one, or the upper against 1 - q above the median), from
    the normal approximation (mean df + nc, variance 2 (df + 2 nc))."""
    if math.isnan(q) or not df > 0.0 or not nc >= 0.0 or not 0.0 <= q <= 1.0:
        return _NAN
    if q == 0.0:
        return 0.0
    if q == 1.0:
        return math.inf
    a, mu = df / 2.0, nc / 2.0
    upper = q > 0.5
    log_target = math.log(1.0 - q if upper else q)

    def rising(t: float) -> tuple[float, float]:  # increasing in t: the log of the tail against that of its target
        value, _, slope, _ = _poisson_mixture(math.exp(t) if t < 709.0 else math.inf, a, mu, upper)
        if value == 0.0:
            return (math.inf if upper else -math.inf), 0.0
        if upper:
            return log_target - math.log(value), -slope / value
        return math.log(value) - log_target, slope / value

    guess = a + mu + _normal_quantile(q) * math.sqrt(a + 2.0 * mu)  # mean and sd of X / 2
    t = increasing_root(rising, math.log(max(guess, 1e-3 * (a + mu), 1e-300)), largest_step=50.0, rtol=_LAST_STEP)
    return 2.0 * math.exp(t) if t < 709.0 else math.inf


def chi2_ppf(q, df):
    """The ``q`` quantile of chi-square with ``df``."""
    return _each(lambda q, df: _quantile(q, df, 0.0), q, df)


def ncx2_ppf(q, df, nc):
    """The ``q`` quantile of noncentral chi-square with ``df`` and noncentrality ``nc``."""
    return _each(_quantile, q, df, nc)


#: the normal quantiles within which the cube-root approximation starts the root in the noncentrality (p from
#: about 3e-7 to 1 - 3e-7): farther out, where x lies far below the bulk of the distribution, it can start it far off
CUBE_ROOT_WITHIN = 5.0


def _noncentrality_start(x: float, df: float, z: float) -> float:
    """A start for nc with P(X <= x) = p, z = z_p: the normal approximation (x = df + nc + z sqrt(2 (df + 2 nc)),
    solved for nc), and within :data:`CUBE_ROOT_WITHIN` the cube-root normal approximation of the noncentral
    chi-square (Abramowitz & Stegun 1964, 26.4.32, as recalled: Patnaik's 1949 two moments under Wilson & Hilferty's
    1931 cube root), with u = df + nc and c = 2 (df + 2 nc) / (9 u^2): ((x / u)^(1/3) - 1 + c) / sqrt(c) = z, solved
    by Newton's steps in u from the normal one: about four times nearer the exact root at the RMSEA's bounds
    (Holzinger & Swineford's chi-square of 85.3 on 24 df: 0.5 % against 2 to 3 %), a Newton step fewer."""
    square = z * z + x - df / 2.0
    s = 2.0 * (math.sqrt(square) - z) if square > 0.0 else 0.0  # s = sqrt(2 (df + 2 nc))
    normal = max((s * s / 2.0 - df) / 2.0, 0.0)
    if not abs(z) <= CUBE_ROOT_WITHIN:
        return normal
    u = df + normal
    for _ in range(8):
        c = (4.0 * u - 2.0 * df) / (9.0 * u * u)
        r = (x / u) ** (1.0 / 3.0)
        slope_c = (4.0 * df / u - 4.0) / (9.0 * u * u)
        root_c = math.sqrt(c)
        gap = (r - 1.0 + c) / root_c - z
        slope = (slope_c - r / (3.0 * u)) / root_c - (r - 1.0 + c) * slope_c / (2.0 * c * root_c)
        if not slope < 0.0:  # the approximation falls as nc grows: else no start from it
            return normal
        step = -gap / slope
        u = max(u + step, df)
        if abs(step) <= 1e-6 * u:
            break
    return u - df if math.isfinite(u) else normal


def _noncentrality(x: float, df: float, p: float, cdf_at_zero: float | None = None) -> float:
    """nc >= 0 with P(X <= x) = p, X noncentral chi-square (df, nc): NaN when even nc = 0 gives less than p (the cdf
    falls as nc grows), infinity at p = 0 with x > 0 (the cdf reaches 0 only in the limit), NaN at p = 0 with
    x = 0 (every nc gives it) and at x = infinity (none does).  ``cdf_at_zero``: P(X <= x) at nc = 0 when the
    caller has it (else computed).  Halley's steps (cubic convergence, from the second derivative, here a sum over
    the same terms; Press et al. 2007, section 9.4, as recalled) on the logarithm of the tail (the lower one, or the
    upper against 1 - p above p = 1/2), kept inside a bracket as Newton's are (:func:`numerics.roots.increasing_root`
    given Halley's step as a Newton step with the slope f' - f f'' / (2 f')), from the cube-root normal
    approximation (:func:`_noncentrality_start`): two evaluations at the RMSEA's bounds of a typical model, the
    central terms of the Poisson mixture computed at the first and reused at the second (:func:`_poisson_mixture`'s
    ``memo``)."""
    if math.isnan(x) or math.isnan(p) or not df > 0.0 or not 0.0 <= p <= 1.0:
        return _NAN
    y, a = max(x, 0.0) / 2.0, df / 2.0
    if p == 0.0:
        return math.inf if y > 0.0 else _NAN
    upper = p > 0.5
    log_target = math.log(1.0 - p if upper else p)
    memo: dict = {}

    def rising(mu: float) -> tuple[float, float]:  # increasing in mu: the log of the tail against that of its target
        value, slope, _, curvature = _poisson_mixture(y, a, mu, upper, memo)
        if value == 0.0:
            return (-math.inf if upper else math.inf), 0.0
        slope /= value
        gap = math.log(value) - log_target
        if not upper:  # f = log_target - log S: increasing as S falls
            gap, slope, curvature = -gap, -slope, -curvature
        # Halley's step as Newton's with the slope f' - f f'' / (2 f'), f'' = S'' / S - (S' / S)^2 (times the sign)
        halley = slope - gap * (curvature / value - (slope * slope if upper else -slope * slope)) / (2.0 * slope) \
            if slope > 0.0 else slope
        return gap, (halley if halley > 0.0 else slope)

    if cdf_at_zero is None:
        at_zero = rising(0.0)[0]
    else:  # the sign of the same difference: the cdf at nc = 0 against p
        at_zero = (1.0 if cdf_at_zero < p else -1.0) if cdf_at_zero != p else 0.0
    if at_zero > 0.0:
        return _NAN
    if at_zero == 0.0:
        return 0.0
    if y == math.inf:  # the cdf is 1 at every nc
        return _NAN
    guess = _noncentrality_start(2.0 * y, df, _normal_quantile(p)) / 2.0
    return 2.0 * increasing_root(rising, guess, low=0.0, largest_step=4.0 * math.sqrt(a + 2.0 * guess + 1.0),
                                 rtol=_HALLEY_LAST_STEP)


def ncx2_noncentrality(x, df, p, cdf_at_zero: float | None = None) -> float:
    """The noncentrality at which the noncentral chi-square cdf at x equals p; ``cdf_at_zero``: the central cdf at x
    when the caller has it."""
    return float(_noncentrality(float(x), float(df), float(p), cdf_at_zero))


def norm_cdf(x):
    """P(Z <= x), Z standard normal: erfc(-x / sqrt 2) / 2."""
    if type(x) is float:
        return np.float64(0.5 * math.erfc(-x * _SQRT_HALF))
    x = np.asarray(x, dtype=float)
    return (0.5 * _erfc_array(-x * _SQRT_HALF))[()]


def norm_sf(x):
    """P(Z > x), Z standard normal: erfc(x / sqrt 2) / 2."""
    if type(x) is float:  # one statistic: without the array
        return np.float64(0.5 * math.erfc(x * _SQRT_HALF))
    x = np.asarray(x, dtype=float)
    return (0.5 * _erfc_array(x * _SQRT_HALF))[()]


def _erfc_array(v: np.ndarray) -> np.ndarray:
    """math.erfc of each element of a float array (numpy has none, and scipy.special's import is kept off a plain
    fit's path): a list mapped at once, a third of the instructions of a numpy.frompyfunc's objects turned into
    floats."""
    return np.array(list(map(math.erfc, v.ravel().tolist())), dtype=float).reshape(v.shape)

#: Wichura (1988, AS241, PPND16): numerators and denominators of the rational approximations, highest power first
_CENTRAL = ((2.5090809287301226727e+3, 3.3430575583588128105e+4, 6.7265770927008700853e+4, 4.5921953931549871457e+4,
             1.3731693765509461125e+4, 1.9715909503065514427e+3, 1.3314166789178437745e+2, 3.3871328727963666080e+0),
            (5.2264952788528545610e+3, 2.8729085735721942674e+4, 3.9307895800092710610e+4, 2.1213794301586595867e+4,
             5.3941960214247511077e+3, 6.8718700749205790830e+2, 4.2313330701600911252e+1, 1.0))
_INTERMEDIATE = ((7.74545014278341407640e-4, 2.27238449892691845833e-2, 2.41780725177450611770e-1,
                  1.27045825245236838258e+0, 3.64784832476320460504e+0, 5.76949722146069140550e+0,
                  4.63033784615654529590e+0, 1.42343711074968357734e+0),
                 (1.05075007164441684324e-9, 5.47593808499534494600e-4, 1.51986665636164571966e-2,
                  1.48103976427480074590e-1, 6.89767334985100004550e-1, 1.67638483018380384940e+0,
                  2.05319162663775882187e+0, 1.0))
_FAR = ((2.01033439929228813265e-7, 2.71155556874348757815e-5, 1.24266094738807843860e-3, 2.65321895265761230930e-2,
         2.96560571828504891230e-1, 1.78482653991729133580e+0, 5.46378491116411436990e+0, 6.65790464350110377720e+0),
        (2.04426310338993978564e-15, 1.42151175831644588870e-7, 1.84631831751005468180e-5, 7.86869131145613259100e-4,
         1.48753612908506148525e-2, 1.36929880922735805310e-1, 5.99832206555887937690e-1, 1.0))


def _ratio(coefficients: tuple, r: float) -> float:
    numerator, denominator = coefficients
    n = d = 0.0
    for cn, cd in zip(numerator, denominator):  # Horner's scheme
        n, d = n * r + cn, d * r + cd
    return n / d


def _normal_quantile(p: float) -> float:
    """z with P(Z <= z) = p (Wichura 1988, AS241): NaN outside [0, 1], -inf and inf at its ends."""
    if not 0.0 < p < 1.0:
        return -math.inf if p == 0.0 else math.inf if p == 1.0 else _NAN
    q = p - 0.5
    if abs(q) <= 0.425:
        return q * _ratio(_CENTRAL, 0.180625 - q * q)
    r = math.sqrt(-math.log(p if q < 0.0 else 1.0 - p))
    z = _ratio(_INTERMEDIATE, r - 1.6) if r <= 5.0 else _ratio(_FAR, r - 5.0)
    return -z if q < 0.0 else z


def norm_ppf(q):
    """The ``q`` quantile of the standard normal."""
    return _each(_normal_quantile, q)


def norm_pdf(x):
    x = np.asarray(x, dtype=float)
    return np.exp(-0.5 * x * x) / np.sqrt(2.0 * np.pi)


def correlation_null_sf(r: float, n: int) -> float:
    """P(R >= r) for the correlation R of ``n`` pairs of values (n >= 3) drawn from two independent normal variables
    (R. A. Fisher 1915: t = R sqrt(n - 2) / sqrt(1 - R^2) follows Student's t with n - 2 df).  With theta = asin(r)
    (so that tan theta = t / sqrt(df)), Student's t's central probability A(t | df) = P(|T| <= t) is the finite sum of
    Abramowitz & Stegun (1964) 26.7.3 (odd df: 2/pi (theta + sin theta (cos theta + 2/3 cos^3 theta + ... + 2 4 ...
    (df - 3) / (1 3 ... (df - 2)) cos^(df-2) theta))) and 26.7.4 (even df: sin theta (1 + 1/2 cos^2 theta + ... + 1 3
    ... (df - 3) / (2 4 ... (df - 2)) cos^(df-2) theta)), and P(R >= r) = (1 - A) / 2 for r >= 0 (1 - that for r <
    0).  For n = 3, arccos(r) / pi."""
    if n < 3:
        return _NAN
    df = n - 2
    a = abs(min(max(r, -1.0), 1.0))
    theta = math.asin(a)
    s, c = a, math.sqrt(max(0.0, 1.0 - a * a))
    if df % 2:  # odd df
        term, total = c, 0.0
        for k in range(1, (df - 1) // 2 + 1):  # cos, 2/3 cos^3, (2 4)/(3 5) cos^5, ...: (df - 1) / 2 terms
            total += term
            term *= (2 * k) / (2 * k + 1) * c * c
        central = 2.0 / math.pi * (theta + s * total) if df > 1 else 2.0 * theta / math.pi
    else:
        term, total = 1.0, 0.0
        for k in range(1, df // 2 + 1):  # 1, 1/2 cos^2, (1 3)/(2 4) cos^4, ...: df / 2 terms
            total += term
            term *= (2 * k - 1) / (2 * k) * c * c
        central = s * total
    upper = 0.5 * (1.0 - central)
    return upper if r >= 0 else 1.0 - upper
