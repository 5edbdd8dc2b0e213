"""Terminal tables for comparisons, invariance ladders and replications."""

from __future__ import annotations

from rich.console import Console
from rich.text import Text

from cfa_tool.reporting.numbers import missing, num, p_value, unit
from cfa_tool.reporting.terminal import GUIDE_NOTE, HIGH_STAKES_NOTE, _table


def _admissible_cell(result) -> str:
    if not result.converged:
        return "did not converge"
    return "yes" if result.admissible else "NO"


def _problem_warnings(named_results, console: Console) -> None:
    """One warning per model whose solution is not admissible (problems first)."""
    for name, r in named_results:
        if r.converged and not r.admissible:
            console.print(Text(f"Warning: the solution of {name} is not admissible (" + "; ".join(
                p.phrase() for p in r.problems if p.kind.inadmissible) + "): do not interpret its estimates or fit, and "
                "do not choose it over another model on its fit.", style="bold"))


_COMPARISON_ROWS = ("Admissible", "Free parameters", "Chi-square", "df", "p", "CFI", "TLI", "RMSEA",
                    "  90% interval", "SRMR", "AIC", "BIC")
_ROBUST_ROWS = ("Scaled chi-square", "  scaling factor", "  p", "Robust CFI", "Robust TLI", "Robust RMSEA",
                "  90% interval")


def _comparison_cells(r, robust_rows: bool) -> list[str]:
    width = len(_COMPARISON_ROWS) + (len(_ROBUST_ROWS) if robust_rows else 0)
    if r.fit is None or not r.converged:
        return [_admissible_cell(r)] + [""] * (width - 1)
    f = r.fit
    low, high = f.rmsea_ci90
    tested = f.df > 0
    cells = [_admissible_cell(r), str(f.n_free_parameters), f"{f.chi_square:.3f}", str(f.df), p_value(f.p_value),
             unit(f.cfi), unit(f.tli), unit(f.rmsea) if tested else "", f"[{unit(low)}, {unit(high)}]" if tested else "",
             unit(f.srmr), num(f.aic, 1), num(f.bic, 1)]
    if robust_rows:
        rb = r.robust
        if rb is None:
            cells += [""] * len(_ROBUST_ROWS)
        else:
            rl, rh = rb.rmsea_robust_ci90
            cells += [f"{rb.chi_square_scaled:.3f}", num(rb.scaling_factor), p_value(rb.p_value_scaled),
                      unit(rb.cfi_robust), unit(rb.tli_robust), unit(rb.rmsea_robust), f"[{unit(rl)}, {unit(rh)}]"]
    return cells


def render_comparison(comparison, console: Console) -> None:
    console.print(Text("Model comparison", style="bold underline"))
    _problem_warnings(zip(comparison.names, comparison.results), console)
    total = comparison.n_obs + comparison.rows_dropped
    if comparison.rows_dropped > 0.05 * total:  # problems first
        console.print(Text(f"Warning: {comparison.rows_dropped} of {total} rows ({100 * comparison.rows_dropped / total:.0f}%) "
                           f"miss an answer on some model's variables and are left out of every model, so that all are "
                           f"compared on the same rows; the rows left out may differ from those kept.", style="bold"))
    console.print(f"All models fitted to the same {comparison.n_obs} rows ({comparison.rows_dropped} rows with a missing "
                  f"answer on any model's variables left out).")
    # one column per model, one row per index: readable in 80 columns for the usual two to four models
    table = _table("Fit of each model", [("", "left")] + [(name, "right") for name in comparison.names])
    robust_rows = any(r.robust is not None for r in comparison.results)
    cells = [_comparison_cells(r, robust_rows) for r in comparison.results]
    for k, label in enumerate(_COMPARISON_ROWS + (_ROBUST_ROWS if robust_rows else ())):
        table.add_row(label, *[c[k] for c in cells], style="bold" if k == 0 else None)
    console.print(table)
    fitted = [(name, r) for name, r in zip(comparison.names, comparison.results) if r.converged and r.fit is not None]
    lowest: dict[str, list[str]] = {}
    for index in ("AIC", "BIC"):
        scored = [(getattr(r.fit, index.lower()), name, r) for name, r in fitted
                  if not missing(getattr(r.fit, index.lower()))]
        if len(scored) > 1:
            _, name, best = min(scored, key=lambda t: t[0])
            if not best.admissible:
                lowest.setdefault(name, []).append(index)
    for name, indices in lowest.items():
        console.print(Text(f"The lowest {' and '.join(indices)} belong{'s' if len(indices) == 1 else ''} to {name}, whose "
                           f"solution is not admissible: that is no reason to prefer it.", style="bold"))
    pairs: dict[tuple[str, str], list] = {}
    for t in comparison.tests:
        pairs.setdefault((t.restricted, t.general), []).append(t)
    for (restricted, general), found in pairs.items():  # one small table per nested pair: readable in 80 columns
        tests = _table(f"{restricted} (restricted) against {general}: difference tests",
                       [("Test", "left"), ("Difference (df)", "right"), ("p", "right"), ("\u0394CFI", "right"),
                        ("\u0394RMSEA", "right")])
        for t in found:
            if t.not_computed:
                tests.add_row(t.method, f"not computed ({t.df_difference})", "", "", "")
            else:
                tests.add_row(t.method, f"{t.chi_square_difference:.3f} ({t.df_difference})", p_value(t.p_value),
                              f"{t.delta_cfi:+.3f}", f"{t.delta_rmsea:+.3f}")
        for column in tests.columns[1:]:
            column.no_wrap = True
        console.print(tests)
        for t in found:
            if t.not_computed:
                console.print(f"{t.method}: not computed: {t.not_computed}.")
    for n in comparison.not_nested:
        advice = " Compare them by AIC and BIC (lower is better)." if n.information_criteria else ""
        console.print(f"Not tested: {n.first} and {n.second}: {n.reason}.{advice}")
    if comparison.tests:
        console.print("Changes in CFI and RMSEA are read against common-practice guides (a fall in CFI of more than .010, "
                      "Cheung & Rensvold 2002; a rise in RMSEA of .015 or more, Chen 2007), which are conventions, "
                      "not tests.")
    console.print(Text(GUIDE_NOTE, style="italic"))


def _level_fit_cells(result, adjusted: bool) -> list[str]:
    fit, robust = result.fit, result.robust
    if fit is None or not result.converged:
        return ["did not converge", "", "", "", ""]
    if adjusted and robust is not None:  # ordinal items: the adjusted statistic and robust indices
        return [f"{robust.chi_square_scaled:.2f} ({robust.df})", p_value(robust.p_value_scaled),
                unit(robust.cfi_robust), unit(robust.rmsea_robust), unit(fit.srmr)]
    return [f"{fit.chi_square:.2f} ({fit.df})", p_value(fit.p_value), unit(fit.cfi), unit(fit.rmsea), unit(fit.srmr)]


def _step_cells(t, delta_srmr) -> list[str]:
    return [f"{t.chi_square_difference:.2f} ({t.df_difference})", p_value(t.p_value), f"{t.delta_cfi:+.3f}",
            f"{t.delta_rmsea:+.3f}", "" if delta_srmr is None else f"{delta_srmr:+.3f}"]


def render_invariance(result, console: Console) -> None:
    console.print(Text(f"Measurement invariance across {result.group_column} ({', '.join(result.groups)})", style="bold underline"))
    console.print(f"Reference group (factor means fixed at zero): {result.groups[0]}")
    for w in result.warnings:  # problems first
        console.print(Text(f"Warning: {w}", style="bold"))
    console.print(f"Each step after the configural one is judged by "
                  f"{result.rule.description.replace('alpha', unit(result.alpha, 2))}.")
    # two narrow tables (each level's own fit; each step against the one before) read in 80 columns;
    # a partially invariant step shows first with every equality, then with the freed ones
    table = _table("Fit of each level", [("Level", "left"), ("Chi-square (df)", "right"), ("p", "right"),
                                         ("CFI", "right"), ("RMSEA", "right"), ("SRMR", "right"), ("Admissible", "left")])
    steps = _table("Each step against the one before", [("Level", "left"), ("Difference (df)", "right"), ("p", "right"),
                                                        ("\u0394CFI", "right"), ("\u0394RMSEA", "right"),
                                                        ("\u0394SRMR", "right"), ("Holds", "left")])
    adjusted = any(step.result.robust is not None for step in result.steps)
    for step in result.steps:
        label = f"{step.level} ({len(step.freed)} freed)" if step.partial else step.level
        if step.partial and step.full_result is not None:
            table.add_row(f"{step.level} (all equal)", *_level_fit_cells(step.full_result, adjusted),
                          _admissible_cell(step.full_result))
            if step.full_test is not None:
                before = result.steps[result.steps.index(step) - 1].result
                srmr = step.full_result.fit.srmr - before.fit.srmr
                steps.add_row(f"{step.level} (all equal)", *_step_cells(step.full_test, srmr),
                              "yes" if step.full_holds else "no")
        bad = step.result.converged and not step.result.admissible
        table.add_row(label, *_level_fit_cells(step.result, adjusted), _admissible_cell(step.result),
                      style="bold red" if bad else None)
        verdict = ("yes" if step.holds else "no") + (" *" if step.conditional else "")
        if step.versus_previous is not None:
            steps.add_row(label, *_step_cells(step.versus_previous, step.delta_srmr), verdict)
        else:
            steps.add_row(label, "its own fit", "", "", "", "", verdict)
    for t in (table, steps):
        t.columns[0].no_wrap = True
    console.print(table)
    console.print(steps)
    if any(step.conditional for step in result.steps):
        console.print("* tested after a step that did not hold: the comparison is between models already rejected.")
    if adjusted:
        console.print("Ordinal items: chi-square, CFI and RMSEA come from the scale-shifted adjusted statistic, and each "
                      "difference test is adjusted in the same way (Asparouhov & Muthen 2006). The adjusted statistic's "
                      "scale and shift are estimated anew for each model, so it can fall when constraints are added: "
                      "compare steps by the difference tests, not by the statistics or indices of the levels.")
    console.print("The configural model holds when it fits by the guide values (CFI >= .95, RMSEA <= .06, SRMR <= .08; Hu & "
                  "Bentler 1999). Change-in-fit guides are common practice: CFI falling by no more than .010 (Cheung & "
                  "Rensvold 2002), RMSEA rising by less than .015, SRMR by less than .030 for loadings and .010 after "
                  "(Chen 2007). All guides are conventions, not laws.")
    if result.freed:
        many = len(result.groups) > 2
        freed = _table("Parameters freed by the partial-invariance search",
                       [("Level", "left"), ("Parameter", "left")] + ([("Group", "left")] if many else [])
                       + [("Score test", "right")])
        for f in result.freed:
            freed.add_row(f.level, f"{f.kind.replace('_', ' ')} {', '.join(f.variables)}",
                          *([str(f.group)] if many else []), num(f.score, 2))
        console.print(freed)
    for step in result.steps:
        if step.stopped and (step.partial or step.stopped != "the step holds"):
            freed_words = f"freed {len(step.freed)} parameter{'s' if len(step.freed) != 1 else ''} and " \
                if step.partial else ""
            console.print(f"The search at the {step.level} step {freed_words}stopped: {step.stopped}.")
        if not step.holds and step.culprits:
            top = step.culprits[:5]
            console.print(f"Likeliest sources of misfit at the {step.level} step (score tests): " + "; ".join(
                f"{c.kind.replace('_', ' ')} {', '.join(c.variables)} in {c.group} ({c.index:.2f})" for c in top))
    if result.latent_differences:
        latent = _table("Latent mean and variance differences", [
            ("Factor", "left"), ("Group", "left"), ("Mean", "right"), ("SE", "right"), ("95% CI", "right"),
            ("p", "right"), ("d", "right"), ("Var. ratio", "right")])
        latent.columns[4].no_wrap = True
        for d in result.latent_differences:
            latent.add_row(d.factor, d.group, num(d.mean), num(d.se), f"[{num(d.ci95[0], 2)}, {num(d.ci95[1], 2)}]",
                           p_value(d.p_value), num(d.standardized, 2), num(d.variance_ratio, 2))
        console.print(latent)
    console.print(result.latent_note)
    console.print(Text(HIGH_STAKES_NOTE, style="italic"))


def render_replication(replications, console: Console) -> None:
    for rep in replications:
        console.print(Text(f"Replication: calibrated on {rep.calibration}, validated on {rep.validation}", style="bold underline"))
        _problem_warnings([(f"the calibration fit ({rep.calibration})", rep.calibration_result),
                           (f"the loose refit ({rep.validation})", rep.loose)], console)
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


def render_bootstrap(pair, console: Console) -> None:
    result, boot = pair
    console.print(Text(f"Bootstrap of {result.model_name}", style="bold underline"))
    console.print(f"{boot.replications} resamples of {result.n_obs} rows (seed {boot.seed}); {boot.converged} converged, "
                  f"{boot.replications - boot.converged} did not and are left out of the intervals.")
    if boot.bollen_stine_p is not None:
        console.print(f"Bollen-Stine bootstrap p-value of the chi-square test: {unit(boot.bollen_stine_p)} "
                      f"({boot.bollen_stine_converged} converged resamples; normal-theory p {p_value(result.fit.p_value)}).")
    table = _table("Bootstrap intervals (95%)", [("Parameter", "left"), ("Scale", "left"), ("Estimate", "right"),
                                                 ("Bootstrap SE", "right"), ("Percentile", "right"), ("BCa", "right")])
    for i in boot.intervals:
        table.add_row(f"{i.kind.replace('_', ' ')} {', '.join(i.variables)}", i.scale, num(i.estimate), num(i.bootstrap_se),
                      f"[{num(i.percentile[0])}, {num(i.percentile[1])}]", f"[{num(i.bca[0])}, {num(i.bca[1])}]")
    console.print(table)


def render_power(result, console: Console) -> None:
    console.print(Text("Power of the RMSEA test (MacCallum, Browne & Sugawara 1996)", style="bold underline"))
    console.print(f"Test of {result.test} fit: H0 RMSEA = {result.rmsea_null:g} against RMSEA = {result.rmsea_alternative:g}, "
                  f"df = {result.df}, alpha = {result.alpha:g}.")
    if result.power is not None:
        console.print(f"Power with N = {result.n_obs}: {result.power:.3f}")
    console.print(f"Smallest N for power {result.target_power:g}: {result.required_n}")
    if result.note:
        console.print(f"Note: {result.note}.")


def render_population(simulated, console: Console) -> None:
    """The population a simulation drew from: each free parameter, in the model's units and
    standardized, and whether the model file gave it or it took the default."""
    population = simulated.population
    console.print(Text("Population values used", style="bold underline"))
    if population.fitted_from is not None:
        console.print(f"Every value is an estimate of the earlier fit in {population.fitted_from}. The data follow the "
                      f"fitted model exactly, so they carry none of that model's misfit to the data it was fitted to.")
    else:
        console.print("Defaults are set on the standardized metric (loadings .7, factor correlations .3, item variances "
                      "1) and converted to the model's scaling; values from 'start' and 'fix' statements replace them.")
    table = _table("", [("Parameter", "left"), ("Value", "right"), ("Standardized", "right"), ("From", "left")])
    for v in population.values():
        table.add_row(f"{v['kind'].replace('_', ' ')} {', '.join(v['variables'])}", num(v["value"]),
                      num(v["standardized"]), "default" if v["default"] else
                      ("earlier fit" if population.fitted_from is not None else "model file"))
    console.print(table)


def _percent(share: float) -> str:
    return "" if share != share else f"{100 * share:+.1f}"


def render_montecarlo(result, console: Console) -> None:
    if hasattr(result, "results"):  # a power curve: several sample sizes
        render_power_curve(result, console)
        return
    console.print(Text(f"Monte Carlo power: N = {result.n_obs}, {result.replications} replications (seed {result.seed})",
                       style="bold underline"))
    console.print(f"{result.converged} of {result.replications} replications converged "
                  f"({100 * result.converged / result.replications:.1f}%).")
    if result.defaulted:
        console.print("Population values not given in the model file took defaults: " + ", ".join(result.defaulted))
    # what decides the plan first: power, then whether intervals and estimates can be trusted at this N
    table = _table("Per parameter", [("Parameter", "left"), ("Power", "right"), ("Coverage", "right"),
                                     ("Estimate bias %", "right"), ("SE bias %", "right")])
    for p in result.parameters:
        table.add_row(p.label, unit(p.power, 2), f"{100 * p.coverage:.1f}%", _percent(p.relative_bias),
                      _percent(p.se_bias))
    table.columns[0].min_width = min(max((len(p.label) for p in result.parameters), default=9), 36)
    table.columns[0].overflow = "fold"  # a parameter's name is never cut short
    console.print(table)
    console.print(f"Power: share of replications in which the parameter differs from zero at alpha {unit(result.alpha, 2)}; "
                  f"coverage: share of 95% Wald intervals that hold the population value (nominal 95%); bias: mean estimate (or mean SE) against the population "
                  f"value (or the SD of the estimates). Population values, mean estimates and SDs are in the JSON "
                  f"(--json).")


def render_power_curve(curve, console: Console) -> None:
    """Power per parameter (rows) and sample size (columns), then each size's convergence."""
    first = curve.results[0]
    console.print(Text(f"Monte Carlo power by sample size: {first.replications} replications per size (seed {first.seed})",
                       style="bold underline"))
    console.print("Converged: " + ", ".join(f"{r.converged} of {r.replications} at N = {r.n_obs}" for r in curve.results) + ".")
    if first.defaulted:
        console.print("Population values not given in the model file took defaults: " + ", ".join(first.defaulted))
    table = _table("Power per parameter", [("Parameter", "left")] + [(f"N = {n}", "right") for n in curve.sample_sizes])
    for k, p in enumerate(first.parameters):
        table.add_row(p.label, *(unit(r.parameters[k].power, 2) for r in curve.results))
    table.columns[0].min_width = min(max((len(p.label) for p in first.parameters), default=9), 36)
    table.columns[0].overflow = "fold"
    console.print(table)
    console.print(f"Power: share of replications in which the parameter differs from zero at alpha {unit(first.alpha, 2)}. "
                  f"Coverage and bias at each sample size are in the JSON (--json).")


def render_cutoffs(pair, console: Console) -> None:
    from cfa_tool.workflows.cutoffs import N_STEPS, SIZE_STEPS

    result, cut = pair
    console.print(Text(f"Model-specific fit cutoffs for {result.model_name}", style="bold underline"))
    console.print(f"{cut.replications} samples of N = {cut.n_obs} from the fitted model and from the model with "
                  f"{cut.misspecification} left out (seed {cut.seed}).")
    table = _table("Cutoffs", [("Index", "left"), ("Level", "right"), ("Cutoff", "right"), ("This model", "right"),
                               ("Reading", "left")])
    for c in cut.cutoffs:
        if c.cutoff is None:
            found = ([f"by N = {c.separating_n:,}"] if c.separating_n is not None else []) + (
                [f"for a misspecification of {unit(c.separating_size, 2)} at this N"] if c.separating_size is not None else [])
            reading = f"none at N = {cut.n_obs:,}" + ("; one exists " + ", or ".join(found) if found else
                                                      "; none either at 16 times this N or 3 times the misspecification")
        else:
            reading = "beyond the cutoff: misfit at least that large is likely" if c.beyond else "within the cutoff"
        table.add_row(c.index.upper(), f"{100 * c.level:.0f}%", unit(c.cutoff) if c.cutoff is not None else "",
                      unit(c.observed), reading)
    console.print(table)
    if any(c.cutoff is None for c in cut.cutoffs):
        console.print(f"Where no cutoff exists, these fit indices cannot tell this model from one with {cut.misspecification} "
                      f"left out at this sample size: a good value of them is no evidence against that misspecification. "
                      f"Look at the modification indices and residual correlations for it, or gather more data. The "
                      f"sample sizes and sizes of misspecification quoted were found by simulating at "
                      f"{', '.join(map(str, N_STEPS))} times this N and {', '.join(f'{s:g}' for s in SIZE_STEPS)} times "
                      f"the misspecification, not by extrapolating.")
    console.print("These cutoffs hold for this model, sample size and kind of misspecification only; they are guides, not laws.")
