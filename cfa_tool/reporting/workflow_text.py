"""Terminal tables for comparisons, invariance ladders and replications."""

from __future__ import annotations

from rich.console import Console
from rich.text import Text

from cfa_tool.reporting.numbers import num, p_value, unit
from cfa_tool.reporting.terminal import GUIDE_NOTE, HIGH_STAKES_NOTE, _table


def _fit_cells(fit) -> list[str]:
    low, high = fit.rmsea_ci90
    return [f"{fit.chi_square:.3f}", str(fit.df), p_value(fit.p_value), unit(fit.cfi), unit(fit.tli),
            f"{unit(fit.rmsea)} [{unit(low)}, {unit(high)}]", unit(fit.srmr), num(fit.aic, 1), num(fit.bic, 1)]


_FIT_COLUMNS = [("Chi-square", "right"), ("df", "right"), ("p", "right"), ("CFI", "right"), ("TLI", "right"),
                ("RMSEA [90% interval]", "right"), ("SRMR", "right"), ("AIC", "right"), ("BIC", "right")]


def _difference_cells(t) -> list[str]:
    return [f"{t.chi_square_difference:.3f}", str(t.df_difference), p_value(t.p_value), f"{t.delta_cfi:+.3f}",
            f"{t.delta_rmsea:+.3f}"]


def render_comparison(comparison, console: Console) -> None:
    console.print(Text("Model comparison", style="bold underline"))
    console.print(f"All models fitted to the same {comparison.n_obs} rows ({comparison.rows_dropped} rows with a missing "
                  f"answer on any model's variables left out).")
    table = _table("Fit of each model", [("Model", "left"), ("Parameters", "right")] + _FIT_COLUMNS)
    for name, r in zip(comparison.names, comparison.results):
        if r.fit is None or not r.converged:
            table.add_row(name, "", "did not converge", *[""] * (len(_FIT_COLUMNS) - 1))
        else:
            table.add_row(name, str(r.fit.n_free_parameters), *_fit_cells(r.fit))
    console.print(table)
    if comparison.tests:
        tests = _table("Nested models: chi-square difference tests",
                       [("Restricted model", "left"), ("General model", "left"), ("Test", "left"), ("Difference", "right"),
                        ("df", "right"), ("p", "right"), ("Change in CFI", "right"), ("Change in RMSEA", "right")])
        for t in comparison.tests:
            tests.add_row(t.restricted, t.general, t.method, *_difference_cells(t))
        console.print(tests)
    for n in comparison.not_nested:
        console.print(f"Not tested: {n.first} and {n.second}: {n.reason}. Compare them by AIC and BIC (lower is better).")
    console.print(Text(GUIDE_NOTE, style="italic"))


def render_invariance(result, console: Console) -> None:
    console.print(Text(f"Measurement invariance across {result.group_column} ({', '.join(result.groups)})", style="bold underline"))
    console.print(f"Reference group (factor means fixed at zero): {result.groups[0]}")
    table = _table("The ladder", [("Level", "left"), ("Chi-square", "right"), ("df", "right"), ("p", "right"),
                                  ("CFI", "right"), ("RMSEA", "right"), ("Difference", "right"), ("df", "right"),
                                  ("p", "right"), ("Change in CFI", "right"), ("Change in RMSEA", "right"), ("Holds", "left")])
    for step in result.steps:
        fit = step.result.fit
        cells = ([f"{fit.chi_square:.3f}", str(fit.df), p_value(fit.p_value), unit(fit.cfi), unit(fit.rmsea)]
                 if fit is not None else ["did not converge", "", "", "", ""])
        diff = _difference_cells(step.versus_previous) if step.versus_previous is not None else [""] * 5
        table.add_row(step.level, *cells, *diff, "yes" if step.holds else "no")
    console.print(table)
    console.print(f"A step holds when its chi-square difference test has p >= {unit(result.alpha, 2)}. Common-practice guides: "
                  f"change in CFI no lower than -.01 (Cheung & Rensvold 2002), change in RMSEA below .015 (Chen 2007).")
    if result.freed:
        freed = _table("Parameters freed by the partial-invariance search",
                       [("Level", "left"), ("Parameter", "left"), ("Score test", "right")])
        for f in result.freed:
            freed.add_row(f.level, f"{f.kind.replace('_', ' ')} {', '.join(f.variables)}", num(f.score, 2))
        console.print(freed)
    for step in result.steps:
        if not step.holds and step.culprits:
            top = step.culprits[:5]
            console.print(f"Likeliest sources of misfit at the {step.level} step (score tests): " + "; ".join(
                f"{c.kind.replace('_', ' ')} {', '.join(c.variables)} in {c.group} ({c.index:.2f})" for c in top))
    for w in result.warnings:
        console.print(f"Warning: {w}")
    console.print(Text(HIGH_STAKES_NOTE, style="italic"))


def render_replication(replications, console: Console) -> None:
    for rep in replications:
        console.print(Text(f"Replication: calibrated on {rep.calibration}, validated on {rep.validation}", style="bold underline"))
        table = _table("", [("Check", "left"), ("Chi-square", "right"), ("df", "right"), ("p", "right"), ("RMSEA", "right"),
                            ("CFI", "right")])
        cal = rep.calibration_result.fit
        table.add_row(f"Calibration fit (N = {rep.calibration_result.n_obs})", f"{cal.chi_square:.3f}", str(cal.df),
                      p_value(cal.p_value), unit(cal.rmsea), unit(cal.cfi))
        if rep.loose.fit is not None and rep.loose.converged:
            f = rep.loose.fit
            table.add_row(f"Loose: same model refitted (N = {rep.loose.n_obs})", f"{f.chi_square:.3f}", str(f.df),
                          p_value(f.p_value), unit(f.rmsea), unit(f.cfi))
        else:
            table.add_row("Loose: same model refitted", "did not converge", "", "", "", "")
        table.add_row("Tight: all calibration estimates fixed", f"{rep.tight_chi_square:.3f}", str(rep.tight_df),
                      p_value(rep.tight_p_value), unit(rep.tight_rmsea), "")
        console.print(table)
        console.print(f"Cross-validation index (Cudeck & Browne 1983): {rep.cvi:.4f}; saturated model: {rep.cvi_saturated:.4f} "
                      f"(smaller is better).")
        console.print()
