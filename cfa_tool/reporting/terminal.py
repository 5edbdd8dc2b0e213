"""The terminal report (rich tables), in the tool's own layout."""

from __future__ import annotations

import io

from rich import box
from rich.console import Console
from rich.table import Table
from rich.text import Text

from cfa_tool.reporting.numbers import missing, num, p_value, unit

GUIDE_NOTE = (
    "Guide values are common practice (Hu & Bentler 1999), not laws: they were derived for particular models and "
    "conditions, and meeting them does not prove the model right."
)
HIGH_STAKES_NOTE = (
    "If this scale is used for decisions about people (screening, hiring, diagnosis), such use needs evidence of "
    "validity for that purpose and the judgement of a licensed professional under local rules."
)

_KIND_TITLES = {
    "loading": "Loadings",
    "factor_variance": "Factor variances",
    "factor_covariance": "Factor covariances (standardized: correlations)",
    "residual_variance": "Residual (error) variances",
    "residual_covariance": "Residual covariances (standardized: residual correlations)",
    "intercept": "Intercepts",
    "mean": "Factor means",
}


def _table(title: str, columns: list[tuple[str, str]]) -> Table:
    table = Table(title=title, title_justify="left", title_style="bold", box=box.SIMPLE_HEAD, pad_edge=False)
    for name, justify in columns:
        table.add_column(name, justify=justify)  # type: ignore[arg-type]
    return table


def fit_table(result) -> Table:
    f = result.fit
    table = _table("Model fit", [("Index", "left"), ("Value", "right"), ("Guide", "left")])
    table.add_row("Chi-square test", f"{f.chi_square:.3f} on {f.df} df, p {_p_phrase(f.p_value)}", "p > .05 (very sensitive to N)")
    table.add_row("CFI", unit(f.cfi), ">= .95")
    table.add_row("TLI", unit(f.tli), ">= .95")
    low, high = f.rmsea_ci90
    table.add_row("RMSEA [90% interval]", f"{unit(f.rmsea)} [{unit(low)}, {unit(high)}]", "<= .06")
    table.add_row("  test of close fit (RMSEA <= .05)", f"p {_p_phrase(f.rmsea_p_close)}", "")
    table.add_row("SRMR", unit(f.srmr), "<= .08")
    r = result.robust
    if r is not None:
        table.add_row(f"Scaled chi-square ({r.method})", f"{r.chi_square_scaled:.3f} on {r.df} df, p {_p_phrase(r.p_value_scaled)}",
                      "use this test with non-normal data")
        table.add_row("  scaling factor", num(r.scaling_factor), "1 under normality")
        table.add_row("Robust CFI / TLI", f"{unit(r.cfi_robust)} / {unit(r.tli_robust)}", ">= .95")
        low, high = r.rmsea_robust_ci90
        table.add_row("Robust RMSEA [90% interval]", f"{unit(r.rmsea_robust)} [{unit(low)}, {unit(high)}]", "<= .06")
    table.add_row("Baseline (independence) chi-square", f"{f.baseline_chi_square:.3f} on {f.baseline_df} df", "")
    table.add_row("Log-likelihood", num(f.log_likelihood), "")
    table.add_row("AIC / BIC / adjusted BIC", f"{num(f.aic)} / {num(f.bic)} / {num(f.sabic)}", "lower is better")
    table.add_row("Free parameters", str(f.n_free_parameters), "")
    return table


def _p_phrase(p) -> str:
    text = p_value(p)
    return text if text.startswith("<") else f"= {text}"


def normality_lines(result) -> list[str]:
    lines = []
    for g in result.groups:
        n = g.normality
        if n is None:
            continue
        where = f" in group {g.label}" if g.label is not None else ""
        line = (f"Multivariate normality{where} (Mardia 1970): skewness {n.skewness:.3f}, chi-square {n.skewness_chi_square:.2f} "
                f"on {n.skewness_df} df, p {_p_phrase(n.skewness_p_value)}; kurtosis {n.kurtosis:.3f} "
                f"(normal: {n.kurtosis_expected:g}), z = {n.kurtosis_z:.2f}, p {_p_phrase(n.kurtosis_p_value)}.")
        if (n.skewness_p_value < 0.05 or n.kurtosis_p_value < 0.05) and result.robust is None:
            line += " The data depart from normality: consider the scaled test (--test satorra-bentler)."
        lines.append(line)
    return lines


def estimate_tables(result, group: int = 0) -> list[Table]:
    tables = []
    label = result.groups[group].label
    r_squared = result.groups[group].r_squared
    for kind, title in _KIND_TITLES.items():
        rows = [r for r in result.estimates if r.kind == kind and r.group == label]
        if not rows:
            continue
        first = "Factor" if kind == "loading" else "Variable"
        cols = [(first, "left")]
        if kind in ("loading", "factor_covariance", "residual_covariance"):
            cols.append(("Indicator" if kind == "loading" else "With", "left"))
        cols += [("Estimate", "right"), ("SE", "right"), ("z", "right"), ("p", "right"), ("95% CI", "right"), ("Standardized", "right")]
        if kind == "loading":
            cols.append(("R²", "right"))
        table = _table(title, cols)
        for r in rows:
            names = list(r.variables)
            if kind == "loading":
                names[0] = names[0] if r is rows[0] or rows[rows.index(r) - 1].variables[0] != names[0] else ""
            ci = "" if missing(r.ci95[0]) else f"[{num(r.ci95[0])}, {num(r.ci95[1])}]"
            cells = names + [
                num(r.estimate),
                num(r.se) if r.free else "fixed",
                num(r.z, 2),
                p_value(r.p_value),
                ci,
                num(r.standardized),
            ]
            if kind == "loading":
                r2 = r_squared.get(r.variables[1])
                cells.append(num(r2) if r2 is not None else "")
            table.add_row(*cells)
        tables.append(table)
    return tables


def group_table(result) -> Table:
    table = _table(f"Groups ({result.group_column})", [("Group", "left"), ("N", "right"), ("Share of chi-square", "right"),
                                                       ("SRMR", "right")])
    for g in result.groups:
        table.add_row(str(g.label), str(g.data.n_obs), num(g.chi_square), unit(g.srmr))
    return table


def missing_table(result) -> Table | None:
    summary = result.missing_data
    if not summary:
        return None
    table = _table("Missing answers", [("Pattern of answers (x) and gaps (.), items in model order", "left"), ("Rows", "right")])
    for pattern in summary["patterns"][:8]:
        table.add_row(pattern["pattern"], str(pattern["rows"]))
    low = sorted(summary["coverage"].items(), key=lambda kv: kv[1])[:5]
    table.caption = f"{summary['n_patterns']} patterns. Lowest coverage: " + ", ".join(f"{name} {100 * share:.1f}%" for name, share in low)
    table.caption_justify = "left"
    return table


def modification_table(result) -> Table | None:
    rows = result.reported_modification_indices()
    if not rows:
        return None
    shown = rows[:10] if result.mi_top is None else rows
    title = f"Largest modification indices (at least {result.mi_threshold:g}; {len(shown)} of {len(rows)} shown)"
    table = _table(title, [("Parameter that could be freed", "left"), ("Index", "right"), ("Expected change", "right"), ("Standardized", "right")])
    for m in shown:
        where = f" in {m.group}" if m.group is not None else ""
        table.add_row(f"{m.kind.replace('_', ' ')} {', '.join(m.variables)}{where}", num(m.index, 2), num(m.expected_change), num(m.standardized_expected_change))
    return table


MAX_RESIDUAL_MATRIX = 20


def residual_table(result, group: int = 0) -> Table | None:
    """Lower triangle of the residual correlations (sample minus model)."""
    names = result.observed
    if len(names) > MAX_RESIDUAL_MATRIX or len(names) < 2:
        return None
    r = result.groups[group].residual_correlations
    table = _table("Residual correlations (sample minus model)", [("", "left")] + [(str(k + 1), "right") for k in range(len(names) - 1)])
    for i, name in enumerate(names):
        if i == 0:
            continue
        table.add_row(f"{i + 1} {name}", *[unit(r[i, j], 2) for j in range(i)], *[""] * (len(names) - 1 - i))
    return table


def render(result, console: Console) -> None:
    title = result.model_name
    console.print(Text(title, style="bold underline"))
    d = result.data
    console.print(f"Model file: {result.model_source}")
    console.print(f"Data: {d.source}; {d.n_obs} rows analysed of {d.rows_read} read")
    status = f"converged in {result.iterations} iterations" if result.converged else f"DID NOT CONVERGE ({result.message})"
    console.print(f"Estimation: {result.estimator}, {status}")
    console.print()
    missing = missing_table(result)
    if missing is not None:
        console.print(missing)
    if result.fit is not None and result.converged:
        console.print(fit_table(result))
        console.print(Text(GUIDE_NOTE, style="italic"))
        for line in normality_lines(result):
            console.print(line)
        local = result.largest_residual_correlation()
        if local:
            a, b, r = local
            console.print(f"Local fit: the largest residual correlation is between {a} and {b}: {unit(r, 2)}.")
        console.print()
    if result.multigroup and result.converged:
        console.print(group_table(result))
    for g, group in enumerate(result.groups):
        if result.multigroup:
            console.print(Text(f"Group {group.label} (N = {group.data.n_obs})", style="bold reverse"))
        for table in estimate_tables(result, g):
            console.print(table)
        table = residual_table(result, g) if result.converged else None
        if table is not None:
            console.print(table)
    mi = modification_table(result)
    if mi is not None:
        console.print(mi)
    if result.warnings:
        console.print(Text("Warnings", style="bold"))
        for w in result.warnings:
            console.print(f"  - {w}")
        console.print()
    console.print(Text(HIGH_STAKES_NOTE, style="italic"))


def render_text(result, width: int = 120) -> str:
    buffer = io.StringIO()
    console = Console(file=buffer, width=width, no_color=True, highlight=False, emoji=False, markup=False)
    render(result, console)
    return buffer.getvalue()
