"""The report's tables as plain data (title, columns, rows of text), shared by
every reporter: terminal, HTML, Markdown, LaTeX and CSV format the same tables."""

from __future__ import annotations

from dataclasses import dataclass

from cfa_tool.assessment.reliability import Keying
from cfa_tool.reporting.numbers import missing, num, p_value, unit

GUIDE_NOTE = (
    "Guide values are common practice (Hu & Bentler 1999), not laws: they were derived for particular models and "
    "conditions, and meeting them does not prove the model right."
)
HIGH_STAKES_NOTE = (
    "If this scale is used for decisions about people (screening, hiring, diagnosis), such use needs evidence of "
    "validity for that purpose and the judgement of a licensed professional under local rules."
)
MAX_RESIDUAL_MATRIX = 20

KIND_TITLES = {
    "loading": "Loadings",
    "factor_variance": "Factor variances",
    "factor_covariance": "Factor covariances (standardized: correlations)",
    "residual_variance": "Residual (error) variances",
    "residual_covariance": "Residual covariances (standardized: residual correlations)",
    "intercept": "Intercepts",
    "mean": "Factor means",
    "threshold": "Thresholds of ordinal items (standardized: on the latent response's scale in this group)",
}


@dataclass(frozen=True)
class ReportTable:
    key: str
    title: str
    columns: tuple[str, ...]
    align: tuple[str, ...]  # "l" or "r" per column
    rows: tuple[tuple[str, ...], ...]
    note: str | None = None
    flagged: tuple[int, ...] = ()  # rows that show a problem of the solution (marked in every format)
    # the same content as numbers, for data files (CSV), where a cell such as '< .001' or '[.04, .09]' would be
    # text: None when every text cell already reads as a number
    value_columns: tuple[str, ...] | None = None
    values: tuple[tuple, ...] | None = None
    faint: tuple[tuple[int, int], ...] = ()  # (row, column) cells shown faintly (e.g. small loadings)


def _table(key: str, title: str, columns: list[tuple[str, str]], rows: list[list[str]], note: str | None = None,
           flagged: tuple[int, ...] = (), values: tuple[list[str], list[list]] | None = None) -> ReportTable:
    return ReportTable(key, title, tuple(c for c, _ in columns), tuple(a for _, a in columns),
                       tuple(tuple(r) for r in rows), note, flagged,
                       tuple(values[0]) if values else None, tuple(tuple(v) for v in values[1]) if values else None)


@dataclass(frozen=True)
class ProblemNotice:
    """What every view of a result shows before anything else when the solution has problems."""

    heading: str
    lines: tuple[str, ...]
    inadmissible: bool


NOT_ADMISSIBLE = "This solution is not admissible: do not interpret its estimates or its fit"
CAUTION = "Check before interpreting this solution"


def problem_notice(result) -> ProblemNotice | None:
    """The problems of ``result``'s solution as a heading and one line per problem (None when there are none)."""
    problems = getattr(result, "problems", ())
    if not problems:
        return None
    lines = tuple((f"Group {p.group}: " if p.group is not None else "") + f"{p.explanation} What to try: {p.advice}"
                  for p in problems)
    inadmissible = not result.admissible
    return ProblemNotice(NOT_ADMISSIBLE if inadmissible else CAUTION, lines, inadmissible)


def row_problem(result, kind: str, variables: tuple[str, ...], group: str | None) -> str:
    """The few words a table row shows when its parameter is part of a problem ('' when it is not)."""
    for p in getattr(result, "problems", ()):
        if p.touches(kind, variables, group):
            return p.kind.short
    return ""


def p_phrase(p) -> str:
    text = p_value(p)
    return text if text.startswith("<") else f"= {text}"


def fit_table(result) -> ReportTable:
    f = result.fit
    low, high = f.rmsea_ci90
    rows = [
        ["Chi-square test", f"{f.chi_square:.3f} on {f.df} df, p {p_phrase(f.p_value)}", "p > .05 (very sensitive to N)"],
        ["CFI", unit(f.cfi), ">= .95"],
        ["TLI", unit(f.tli), ">= .95"],
        ["RMSEA [90% interval]", f"{unit(f.rmsea)} [{unit(low)}, {unit(high)}]", "<= .06"],
        ["  test of close fit (RMSEA <= .05)", f"p {p_phrase(f.rmsea_p_close)}", ""],
        ["SRMR", unit(f.srmr), "<= .08"],
    ]
    if missing(f.rmsea_p_close):
        rows = [r for r in rows if not r[0].startswith("  test of close fit")]
    if f.df == 0:  # nothing to test: CFI, TLI and RMSEA are not defined
        rows = [["Chi-square test", "0 df: no test", "the model is just-identified: it reproduces the data exactly, "
                                                     "so its fit cannot be tested"], rows[-1]]
    r = result.robust
    if r is not None:
        rlow, rhigh = r.rmsea_robust_ci90
        rows += [
            [f"Scaled chi-square ({r.method})", f"{r.chi_square_scaled:.3f} on {r.df} df, p {p_phrase(r.p_value_scaled)}",
             "the test to read for these data"],
            ["  scaling factor", num(r.scaling_factor), "1 under normality"],
            ["Robust CFI / TLI", f"{unit(r.cfi_robust)} / {unit(r.tli_robust)}", ">= .95"],
            ["Robust RMSEA [90% interval]", f"{unit(r.rmsea_robust)} [{unit(rlow)}, {unit(rhigh)}]", "<= .06"],
        ]
    rows.append(["Baseline (independence) chi-square", f"{f.baseline_chi_square:.3f} on {f.baseline_df} df", ""])
    if not missing(f.log_likelihood):  # least-squares estimators have no likelihood
        rows += [["Log-likelihood", num(f.log_likelihood), ""],
                 ["AIC / BIC / adjusted BIC", f"{num(f.aic)} / {num(f.bic)} / {num(f.sabic)}", "lower is better"]]
    rows.append(["Free parameters", str(f.n_free_parameters), ""])
    return _table("fit", "Model fit", [("Index", "l"), ("Value", "r"), ("Guide", "l")], rows, GUIDE_NOTE,
                  values=(["Index", "Value", "df", "p", "90% lower", "90% upper"], _fit_values(result)))


def _fit_values(result) -> list[list]:
    """The fit table's numbers, one index per row (for data files)."""
    f, r, nan = result.fit, result.robust, None
    rows = [["Chi-square", f.chi_square, f.df, f.p_value, nan, nan]]
    if f.df > 0:
        rows += [["CFI", f.cfi, nan, nan, nan, nan], ["TLI", f.tli, nan, nan, nan, nan],
                 ["RMSEA", f.rmsea, nan, nan, *f.rmsea_ci90]]
        if not missing(f.rmsea_p_close):
            rows.append(["Test of close fit (RMSEA <= .05)", nan, nan, f.rmsea_p_close, nan, nan])
    rows.append(["SRMR", f.srmr, nan, nan, nan, nan])
    if r is not None:
        rows += [[f"Scaled chi-square ({r.method})", r.chi_square_scaled, r.df, r.p_value_scaled, nan, nan],
                 ["Scaling factor", r.scaling_factor, nan, nan, nan, nan],
                 ["Robust CFI", r.cfi_robust, nan, nan, nan, nan], ["Robust TLI", r.tli_robust, nan, nan, nan, nan],
                 ["Robust RMSEA", r.rmsea_robust, nan, nan, *r.rmsea_robust_ci90]]
    rows.append(["Baseline (independence) chi-square", f.baseline_chi_square, f.baseline_df, nan, nan, nan])
    if not missing(f.log_likelihood):
        rows += [["Log-likelihood", f.log_likelihood, nan, nan, nan, nan], ["AIC", f.aic, nan, nan, nan, nan],
                 ["BIC", f.bic, nan, nan, nan, nan], ["Adjusted BIC", f.sabic, nan, nan, nan, nan]]
    rows.append(["Free parameters", f.n_free_parameters, nan, nan, nan, nan])
    return rows


def estimate_tables(result, group: int = 0) -> list[ReportTable]:
    tables = []
    label = result.groups[group].label
    r_squared = result.groups[group].r_squared
    suffix = "" if label is None else f"_{group}"
    for kind, title in KIND_TITLES.items():
        rows = [r for r in result.estimates if r.kind == kind and r.group == label]
        if not rows:
            continue
        first = "Factor" if kind == "loading" else "Variable"
        cols = [(first, "l")]
        if kind in ("loading", "factor_covariance", "residual_covariance", "threshold"):
            cols.append(({"loading": "Indicator", "threshold": "Step"}.get(kind, "With"), "l"))
        cols += [("Estimate", "r"), ("SE", "r"), ("z", "r"), ("p", "r"), ("95% CI", "r"), ("Standardized", "r")]
        if kind == "loading":
            cols.append(("R²", "r"))
        marks = [row_problem(result, kind, r.variables, r.group) for r in rows]
        if kind == "loading":  # an indicator with R-squared above 1 is marked on its loading rows
            marks = [m or ("R² above 1: impossible" if r_squared.get(r.variables[1], 0.0) > 1.0 else "")
                     for m, r in zip(marks, rows)]
        if any(marks):
            cols.append(("Problem", "l"))
        body = []
        numbers = []
        previous = None
        for r, mark in zip(rows, marks):
            numbers.append(list(r.variables) + [r.estimate, r.se if r.free else None, r.z, r.p_value, r.ci95[0], r.ci95[1],
                                                r.standardized, "yes" if r.free else "no"]
                           + ([r_squared.get(r.variables[1])] if kind == "loading" else []) + ([mark] if any(marks) else []))
            names = list(r.variables)
            if kind in ("loading", "threshold"):
                shown = names[0] if names[0] != previous else ""
                previous = names[0]
                names[0] = shown
            ci = "" if missing(r.ci95[0]) else f"[{num(r.ci95[0])}, {num(r.ci95[1])}]"
            cells = names + [num(r.estimate), num(r.se) if r.free else "fixed", num(r.z, 2), p_value(r.p_value), ci,
                             num(r.standardized)]
            if kind == "loading":
                r2 = r_squared.get(r.variables[1])
                cells.append(num(r2) if r2 is not None else "")
            if any(marks):
                cells.append(mark)
            body.append(cells)
        value_columns = [c for c, _ in cols[:len(rows[0].variables)]] + [
            "Estimate", "SE", "z", "p", "95% CI lower", "95% CI upper", "Standardized", "Free"] + (
            ["R²"] if kind == "loading" else []) + (["Problem"] if any(marks) else [])
        tables.append(_table(kind + suffix, title, cols, body, flagged=tuple(i for i, m in enumerate(marks) if m),
                             values=(value_columns, numbers)))
    return tables


def residual_table(result, group: int = 0) -> ReportTable | None:
    """Lower triangle of the residual correlations (sample minus model)."""
    names = result.observed
    if len(names) > MAX_RESIDUAL_MATRIX or len(names) < 2 or not result.converged:
        return None
    r = result.groups[group].residual_correlations
    rows = [[f"{i + 1} {name}"] + [unit(r[i, j], 2) for j in range(i)] + [""] * (len(names) - 1 - i)
            for i, name in enumerate(names) if i > 0]
    return _table(f"residuals_{group}", "Residual correlations (sample minus model)",
                  [("", "l")] + [(str(k + 1), "r") for k in range(len(names) - 1)], rows)


def group_table(result) -> ReportTable:
    rows = [[str(g.label), str(g.data.n_obs), num(g.chi_square), unit(g.srmr)] for g in result.groups]
    return _table("groups", f"Groups ({result.group_column})",
                  [("Group", "l"), ("N", "r"), ("Share of chi-square", "r"), ("SRMR", "r")], rows)


def missing_table(result) -> ReportTable | None:
    summary = result.missing_data
    if not summary:
        return None
    rows = [[p["pattern"], str(p["rows"])] for p in summary["patterns"][:8]]
    low = sorted(summary["coverage"].items(), key=lambda kv: kv[1])[:5]
    note = f"{summary['n_patterns']} patterns. Lowest coverage: " + ", ".join(f"{name} {100 * share:.1f}%" for name, share in low)
    return _table("missing", "Missing answers",
                  [("Pattern of answers (x) and gaps (.), items in model order", "l"), ("Rows", "r")], rows, note)


def modification_table(result, limit: int = 10) -> ReportTable | None:
    rows = result.reported_modification_indices()
    if not rows:
        return None
    shown = rows[:limit] if result.mi_top is None else rows
    title = f"Largest modification indices (at least {result.mi_threshold:g}; {len(shown)} of {len(rows)} shown)"
    body = []
    for m in shown:
        where = f" in {m.group}" if m.group is not None else ""
        body.append([f"{m.kind.replace('_', ' ')} {', '.join(m.variables)}{where}", num(m.index, 2), num(m.expected_change),
                     num(m.standardized_expected_change)])
    return _table("modification", title, [("Parameter that could be freed", "l"), ("Index", "r"), ("Expected change", "r"),
                                          ("Standardized", "r")], body)


def reliability_table(result, group: int = 0) -> ReportTable | None:
    rows = result.groups[group].reliability
    if not rows:
        return None
    body = []
    for r in rows:
        fl = "" if r.fornell_larcker_holds is None else ("yes" if r.fornell_larcker_holds else "no")
        body.append([r.factor, str(len(r.items)), unit(r.omega), unit(r.omega_total), unit(r.composite_reliability),
                     unit(r.average_variance_extracted), fl, unit(r.alpha)])
    ordinal = "polychoric" in result.estimator
    note = (("Ordinal versions, on the latent responses behind the items (alpha from the polychoric correlations). "
             if ordinal else "") + keying_sentence(rows) +
            "Omega: share of the keyed item sum's variance due to the factor (for a higher-order factor: omega "
            "hierarchical); omega total: due to all factors; CR: composite reliability; AVE: average variance extracted; "
            "'sqrt(AVE) > r': the Fornell-Larcker comparison with every other factor; alpha from the sample covariances "
            "of the keyed items.")
    return _table(f"reliability_{group}", "Reliability and validity" + (" (ordinal)" if ordinal else ""),
                  [("Factor", "l"), ("Items", "r"), ("Omega", "r"), ("Omega total", "r"), ("CR", "r"), ("AVE", "r"),
                   ("sqrt(AVE) > r", "l"), ("Alpha", "r")], body, note)


def keying_sentence(rows) -> str:
    """Which items every coefficient treats as reversed, and why."""
    lists = [f"{r.factor}: {', '.join(r.reversed)}" for r in rows if r.reversed]
    declared = any(r.keying is Keying.DECLARED for r in rows)
    if not lists:
        return ("Every item is keyed as the 'reversed' statement says: none is reversed. " if declared else
                "Every item loads in its factor's direction, so none is reversed for scoring. ")
    why = ("as the 'reversed' statement declares" if declared else
           "their loadings have the sign opposite to most items of their factor")
    return f"Computed for keyed sums; reversed for scoring ({why}): {'; '.join(lists)}. "


def sum_score_table(result, group: int = 0) -> ReportTable | None:
    rows = [r for r in result.groups[group].reliability if r.sum_score_sd is not None]
    if not rows:
        return None
    body = [[r.factor, str(len(r.items)), ", ".join(r.reversed), num(r.sum_score_mean, 2), num(r.sum_score_sd, 2),
             unit(min(r.item_total), 2) if r.item_total else ""] for r in rows]
    note = "The sum of each factor's items with reverse-keyed items reversed; SD with divisor N - 1."
    if any(r.sum_score_mean is None for r in rows):
        note += (" A mean is shown once the answer scale of the reversed items is known: declare it with "
                 "'reversed ITEMS on LOWEST to HIGHEST'.")
    return _table(f"sum_scores_{group}", "Keyed sum scores",
                  [("Factor", "l"), ("Items", "r"), ("Reversed for scoring", "l"), ("Mean", "r"), ("SD", "r"),
                   ("Lowest item-rest r", "r")], body, note)


def htmt_table(result, group: int = 0) -> ReportTable | None:
    pairs = result.groups[group].htmt
    if not pairs:
        return None
    return _table(f"htmt_{group}", "Heterotrait-monotrait ratios",
                  [("Factor", "l"), ("Factor", "l"), ("HTMT", "r")], [[h.first, h.second, unit(h.ratio, 2)] for h in pairs],
                  "Henseler, Ringle & Sarstedt (2015), on the keyed items, in absolute value. Common practice reads "
                  "values above .85 (or .90) as a sign that two factors are not distinct.")


def case_table(result, group: int = 0) -> ReportTable | None:
    cases = result.groups[group].influential_cases
    if not cases:
        return None
    named = any(c.id is not None for c in cases)
    ids = [[c.id or ""] if named else [] for c in cases[:5]]
    return _table(f"cases_{group}", "Rows that contribute most to the chi-square",
                  [("Data row", "r")] + ([("Id", "l")] if named else [])
                  + [("Share of chi-square", "r"), ("Squared Mahalanobis distance", "r"), ("p", "r")],
                  [[str(c.row), *i, num(c.chi_square_share, 2), num(c.mahalanobis, 2), p_value(c.p_value)]
                   for c, i in zip(cases[:5], ids)],
                  "Each row's share sums over all rows to the chi-square; large shares and distances point at rows worth checking.",
                  values=(["Data row"] + (["Id"] if named else []) + ["Share of chi-square", "Squared Mahalanobis distance", "p"],
                          [[c.row, *i, c.chi_square_share, c.mahalanobis, c.p_value] for c, i in zip(cases[:5], ids)]))


def item_table(result) -> ReportTable:
    d = result.data
    rest: dict[str, tuple[str, float, bool]] = {}  # item -> (factor, corrected item-total r, reversed)
    if not result.multigroup:
        for r in result.groups[0].reliability:
            for item, value in zip(r.items, r.item_total):
                rest.setdefault(item, (r.factor, value, item in r.reversed))
    if not rest:
        return _table("items", "Items (analysed rows)", [("Item", "l"), ("Mean", "r"), ("SD", "r")],
                      [[name, num(m, 2), num(s, 2)] for name, m, s in zip(d.variables, d.means, d.sds)])
    body = []
    for name, m, s in zip(d.variables, d.means, d.sds):
        factor, value, flipped = rest.get(name, ("", float("nan"), False))
        body.append([name, num(m, 2), num(s, 2), factor, "reversed" if flipped else "", unit(value, 2)])
    return _table("items", "Items (analysed rows)",
                  [("Item", "l"), ("Mean", "r"), ("SD", "r"), ("Factor", "l"), ("Keying", "l"), ("Item-rest r", "r")],
                  body, "Item-rest r: the correlation of the (keyed) item with the keyed sum of the other items of its "
                        "factor (corrected item-total correlation).")


def normality_lines(result) -> list[str]:
    lines = []
    for g in result.groups:
        n = g.normality
        if n is None:
            continue
        where = f" in group {g.label}" if g.label is not None else ""
        line = (f"Multivariate normality{where} (Mardia 1970): skewness {n.skewness:.3f}, chi-square {n.skewness_chi_square:.2f} "
                f"on {n.skewness_df} df, p {p_phrase(n.skewness_p_value)}; kurtosis {n.kurtosis:.3f} "
                f"(normal: {n.kurtosis_expected:g}), z = {n.kurtosis_z:.2f}, p {p_phrase(n.kurtosis_p_value)}.")
        if (n.skewness_p_value < 0.05 or n.kurtosis_p_value < 0.05) and result.robust is None:
            line += " The data depart from normality: consider the scaled test (--test satorra-bentler)."
        lines.append(line)
    return lines


def local_fit_line(result) -> str | None:
    local = result.largest_residual_correlation()
    if not local:
        return None
    a, b, r = local
    return f"Local fit: the largest residual correlation is between {a} and {b}: {unit(r, 2)}."


def status_line(result) -> str:
    status = f"converged in {result.iterations} iterations" if result.converged else f"DID NOT CONVERGE ({result.message})"
    return f"Estimation: {result.estimator}, {status}"
