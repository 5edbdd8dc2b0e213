"""A methods-and-results paragraph in the style journals in psychology ask for
(APA-like: chi-square(df) = x, p; CFI; TLI; RMSEA [90% CI]; SRMR)."""

from __future__ import annotations

from cfa_tool.reporting.numbers import unit


def _p(p: float) -> str:
    return "p < .001" if p < 0.001 else f"p = {unit(p)}"


def _list(words: list[str]) -> str:
    if len(words) <= 2:
        return " and ".join(words)
    return ", ".join(words[:-1]) + ", and " + words[-1]


def _estimator_phrase(result) -> str:
    text = result.estimator
    if "polychoric" in text:
        kind = "diagonally weighted" if text.startswith("diagonally") else "unweighted"
        extra = " and polyserial" if "polyserial" in text else ""
        return f"{kind} least squares on polychoric{extra} correlations of the ordinal items, with robust standard errors"
    if "full information" in text:
        base = "full-information maximum likelihood, which uses every available answer"
        return base + (" (Yuan-Bentler scaled test, robust standard errors)" if result.robust is not None else "")
    if result.robust is not None:
        return "maximum likelihood with the Satorra-Bentler scaled test and robust standard errors"
    return "maximum likelihood"


def _test_phrase(method: str) -> str:
    if method.startswith("scale-shifted"):
        return "mean-and-variance adjusted (scale-shifted) chi-square test"
    return f"{method} scaled chi-square test"


def methods_paragraph(result) -> str:
    if not result.converged or result.fit is None:
        return "The model did not converge, so no results are reported."
    f = result.fit
    n_items = len(result.observed)
    lower = {r.variables[1] for r in result.estimates if r.kind == "loading" and r.variables[1] in result.latent}
    higher = [f for f in result.latent if any(r.kind == "loading" and r.variables[0] == f and r.variables[1] in lower
                                               for r in result.estimates)]
    first = [f for f in result.latent if f not in higher]
    correlated = any(r.kind == "factor_covariance" for r in result.estimates)
    kind = ("correlated factors" if correlated else "factors") if len(first) > 1 else "factor"
    structure = f"{len(first)} {kind} ({_list(first)})"
    if higher:
        structure += f" explained by {'a higher-order factor' if len(higher) == 1 else 'higher-order factors'} ({_list(higher)})"
    loadings = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[1] in result.observed]
    d = result.data
    parts = []
    estimator = _estimator_phrase(result)
    sample = f"N = {result.n_obs}"
    if d.rows_dropped and "full information" not in result.estimator:
        sample += f"; {d.rows_dropped} of {d.rows_read} rows with missing answers were excluded listwise"
    groups = f" in {len(result.groups)} groups defined by {result.group_column}" if result.multigroup else ""
    parts.append(
        f"A confirmatory factor analysis with {structure} "
        f"and {n_items} indicators was estimated{groups} by {estimator} ({sample})."
    )
    low, high = f.rmsea_ci90
    if f.df == 0:
        parts.append("The model is just-identified (0 degrees of freedom): it reproduces the observed covariances "
                     "exactly, so its fit could not be tested.")
    elif result.robust is not None:
        r = result.robust
        rl, rh = r.rmsea_robust_ci90
        parts.append(
            f"The {_test_phrase(r.method)} gave chi-square({r.df}) = {r.chi_square_scaled:.2f}, {_p(r.p_value_scaled)} "
            f"(scaling factor {r.scaling_factor:.3f}); robust CFI = {unit(r.cfi_robust)}, robust TLI = {unit(r.tli_robust)}, "
            f"robust RMSEA = {unit(r.rmsea_robust)}, 90% CI [{unit(rl)}, {unit(rh)}], SRMR = {unit(f.srmr)}."
        )
    else:
        parts.append(
            f"The model fit was chi-square({f.df}) = {f.chi_square:.2f}, {_p(f.p_value)}, CFI = {unit(f.cfi)}, "
            f"TLI = {unit(f.tli)}, RMSEA = {unit(f.rmsea)}, 90% CI [{unit(low)}, {unit(high)}], SRMR = {unit(f.srmr)}."
        )
    if loadings:
        parts.append(f"Standardized loadings ranged from {unit(min(loadings), 2)} to {unit(max(loadings), 2)}.")
    corr = [r.standardized for r in result.estimates if r.kind == "factor_covariance"]
    if corr and not result.multigroup:
        parts.append(f"Factor correlations ranged from {unit(min(corr), 2)} to {unit(max(corr), 2)}.")
    if f.df > 0:
        parts.append("Fit was judged against conventional guide values (e.g., CFI >= .95, RMSEA <= .06, SRMR <= .08; "
                     "Hu & Bentler, 1999), which are conventions rather than strict criteria.")
    return " ".join(parts)
