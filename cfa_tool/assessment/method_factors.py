"""Method factors that carry next to nothing.

A method factor stands beside the traits for what some items share in the way they are answered (the
reverse-keyed items' wording factor), and a bifactor-like factor is one whose every item loads on another
factor too.  When every standardized loading of such a factor is small (below .20 in absolute value: common
practice, the size below which a loading is usually read as negligible), its items share little beyond the
other factors they load on, and the factor is hardly distinguishable from no factor at all.

Where the factor is uncorrelated with every other factor of its items, each item's explained variance splits
into the factor's part and the others', so the factor's share of its items' common variance is

    ECV_f = sum_i lambda_if^2 / sum_i R^2_i

over its items i, with lambda the standardized loadings (explained common variance; Reise 2012, Rodriguez, Reise
& Haviland 2016).  With correlated factors no such split exists and the share is not computed.

Of these cross-cutting factors, one not declared a method factor that holds every item of two or more other trait
factors and is uncorrelated with each of them is the general factor of a bifactor model (Holzinger & Swineford 1937;
Reise 2012), and those factors are its specific factors (:func:`bifactor_parts`); the others are method factors,
declared or not.
"""

from __future__ import annotations

from collections.abc import Collection

import numpy as np

from cfa_tool.assessment.admissibility import Problem, ProblemKind
from cfa_tool.language.names import reference_text
from cfa_tool.numbers import rounded_number

#: standardized loadings below this size (in absolute value) are read as negligible (common practice)
SMALL_LOADING = 0.20


def cross_cutting_factors(loadings: dict[str, set[str]], declared: frozenset[str]) -> list[str]:
    """Factors that stand beside others on the same items: declared method factors, and factors whose every item
    loads on another factor too, a declared method factor aside (it stands beside every factor of its items, so
    that a trait whose items all load on it too is no more method-like for that: new-user s24, where an acquiescence
    factor on every item had each trait called method-like).  ``loadings``: each factor's items (observed indicators
    only)."""
    out = []
    for factor, items in loadings.items():
        if not items:
            continue
        others = set().union(*(i for f, i in loadings.items() if f != factor and f not in declared))
        if factor in declared or items <= others:
            out.append(factor)
    return out


def bifactor_parts(loadings: dict[str, set[str]], declared: frozenset[str],
                   uncorrelated: Collection[frozenset[str]]) -> dict[str, tuple[str, ...]]:
    """The general factors of a bifactor structure with their specific factors: among the cross-cutting factors
    (:func:`cross_cutting_factors`, the one rule), a factor not declared a method factor whose items include every
    item of at least two other factors (not method factors either), each held uncorrelated with it (``uncorrelated``:
    the pairs of factors whose correlation is zero), is a general factor (Holzinger & Swineford 1937; Reise 2012).
    Empty when the model has none."""
    out = {}
    for factor in cross_cutting_factors(loadings, declared):
        items = loadings[factor]
        if factor in declared:
            continue
        specific = tuple(f for f, own in loadings.items() if f != factor and f not in declared and own and own < items)
        if len(specific) >= 2 and all(frozenset((factor, f)) in uncorrelated for f in specific):
            out[factor] = specific
    return out


#: a factor correlation at most this small in size is zero: one the model fixes at zero or implies to be, rounding aside
ZERO_CORRELATION = 1e-10


def uncorrelated_pairs(latent: tuple[str, ...], covariance: np.ndarray) -> set[frozenset[str]]:
    """The pairs of factors whose correlation is zero in ``covariance``, the factors' (model-implied, total)
    covariance or correlation matrix in the order of ``latent``: the pairs :func:`bifactor_parts` reads as held
    uncorrelated, whether by an 'uncorrelated' statement, a fixed covariance of 0 or the structure above them."""
    sd = np.sqrt(np.maximum(covariance.diagonal(), 1e-300))
    with np.errstate(divide="ignore", invalid="ignore"):
        zero = np.abs(np.nan_to_num(covariance / (sd[:, None] * sd), nan=1.0)) <= ZERO_CORRELATION
    first, second = np.nonzero(np.triu(zero, 1))
    return {frozenset((latent[a], latent[b])) for a, b in zip(first.tolist(), second.tolist())}


def weak_factor_problems(estimates, latent: tuple[str, ...], observed: tuple[str, ...], groups,
                         declared: frozenset[str], leave_out: frozenset[str] = frozenset()) -> list[Problem]:
    """A caution for every method or bifactor-like factor (see :func:`cross_cutting_factors`) whose standardized
    loadings are all below SMALL_LOADING in absolute value, per group.  ``estimates``: the result's EstimateRows;
    ``groups``: its GroupResults (label, r_squared, latent_covariance); ``leave_out``: factors not to judge (those
    of exploratory blocks, whose rotated loadings are reported elsewhere)."""
    items_of = set(observed)
    by_group: dict = {}
    on_factors: dict = {}  # a higher-order factor's loadings on the factors below it: judged with its items'
    for r in estimates:  # one pass: a fit of many groups has thousands of rows
        if r.kind == "loading":
            (by_group if r.variables[1] in items_of else on_factors).setdefault(r.group, []).append(r)
    out = []
    for group in groups:
        rows = by_group.get(group.label, [])
        loadings: dict[str, set[str]] = {}
        for r in rows:
            loadings.setdefault(r.variables[0], set()).add(r.variables[1])
        for factor in cross_cutting_factors(loadings, declared):
            if factor in leave_out:
                continue
            own = [r for r in rows if r.variables[0] == factor]
            above = [r for r in on_factors.get(group.label, []) if r.variables[0] == factor]
            sizes = np.abs([r.standardized for r in own + above])  # every loading of the factor, not its items' only
            if not len(sizes) or not np.all(np.isfinite(sizes)) or sizes.max() >= SMALL_LOADING:
                continue
            share = None if above else _common_variance_share(factor, own, rows, group, latent)
            kind = "method factor" if factor in declared else "factor"
            beside = "" if factor in declared else ", whose every item loads on another factor too,"
            explained = ("" if share is None else
                         f" It explains {100 * share:.0f}% of its items' common variance (explained common variance; "
                         f"Reise 2012), so its variance and any reliability of it are negligible.")
            out.append(Problem(
                ProblemKind.WEAK_METHOD_FACTOR, (reference_text("factor_variance", (factor,)),), float(sizes.max()),
                f"The {kind} {factor}{beside} has only small standardized loadings (at most {loading_size(sizes.max())} in size, "
                f"below {loading_size(SMALL_LOADING)}: common practice): its items share little beyond the other factors they "
                f"load on.{explained}",
                f"Do not read {factor} as a substantive effect; fit the model without it and compare the two (the "
                f"difference then sits on a boundary, which compare says), and report it as negligible if theory "
                f"calls for keeping it.", group.label if len(groups) > 1 else None))
    return out


def loading_size(value: float) -> str:
    """A loading's size as reports write it: '.19'; one below .005 to two significant digits, never a rounded zero
    ('.0044', the rule of reporting.numbers.est_unit)."""
    if 0 < value < 0.005:
        return rounded_number(value, 2).removeprefix("0")
    text = f"{value:.2f}"
    if float(text) >= SMALL_LOADING > value:  # .1996 is not '.20'
        text = f"{value:.3f}"
    return text.removeprefix("0")


def _common_variance_share(factor: str, own, rows, group, latent: tuple[str, ...]) -> float | None:
    """ECV_f of the module docstring; None when the factor correlates with another factor of its items, or an
    item's R-squared is missing."""
    items = {r.variables[1] for r in own}
    others = {r.variables[0] for r in rows if r.variables[1] in items and r.variables[0] != factor}
    phi = group.latent_covariance
    if phi is None:
        return None
    k = latent.index(factor)
    for other in others:
        j = latent.index(other)
        scale = np.sqrt(abs(phi[k, k] * phi[j, j]))
        if scale == 0 or abs(phi[k, j]) / scale > 1e-8:
            return None
    explained = [group.r_squared.get(x) for x in items]
    if any(r2 is None or not np.isfinite(r2) for r2 in explained) or sum(explained) <= 0:
        return None
    return float(sum(r.standardized ** 2 for r in own) / sum(explained))
