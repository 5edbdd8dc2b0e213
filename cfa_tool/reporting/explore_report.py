"""The report of an exploration as the one report model (cfa_tool.reporting.document.Report): its tables
(ReportTable), the scree plot (SVG) and the draft model, drawn by the shared renderers of every format."""

from __future__ import annotations

import numpy as np

from cfa_tool.exploration.choices import FitStatistic
from cfa_tool.exploration.rotation import ORIENTATION_RULE
from cfa_tool.language.names import names_text
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.options import Option
from cfa_tool.reporting import tables as T
from cfa_tool.reporting.escape import html_text as esc
from cfa_tool.data.halves import EXPLORE_NAMES, halves_named_alike
from cfa_tool.numbers import count_text
from cfa_tool.reporting.numbers import est_num, explored_unit, num, unit
from cfa_tool.reporting.tables import GUIDE_NOTE, ReportTable, _table

SPLIT_STATEMENT = ("The rows were {divided} (seed {seed}): the number of factors, the solution "
                   "and the draft model come from {explored} ({first} rows) alone; {confirming} "
                   "({second} rows) was not used to choose the model, only to fit it.")
COUNT_SECTION = "How many factors"
CONFIRMATION_SECTION = "Confirmation half: the draft model fitted"
SCREE_ROWS = 20  # positions shown in the eigenvalue table and the scree plot


PROBLEMS_HEADING = "Check before interpreting this solution"


def problem_notice(result) -> T.ProblemNotice | None:
    """The exploratory solution's problems as the notice every view shows first (None when there are none)."""
    lines = result.problems()
    return T.ProblemNotice(PROBLEMS_HEADING, tuple(lines), True) if lines else None


def header_lines(result) -> list[str]:
    ex = result.exploration
    half = f" ({EXPLORE_NAMES.phrase(0)})" if result.split is not None else ""
    kind = "polychoric" if ex.data.kind.value == "polychoric" else "Pearson"
    return [f"Data: {result.source}; {count_text(ex.data.n_obs)} rows analysed{half} of {count_text(result.rows_read)} read",
            f"Items ({len(result.items)}): {names_text(result.items)}",  # as --items takes them: commas stay inside
            f"{ex.settings.extraction.value} extraction from the {kind} correlations; " + rotation_phrase(ex)]


def rotation_phrase(ex) -> str:
    """The rotation as run: none for one factor (a rotation turns several factors), whatever was asked."""
    if ex.rotated.spec.method.value == "none":
        return "no rotation (one factor)" if ex.factors == 1 else "no rotation (the factors as extracted, uncorrelated)"
    return f"{ex.rotated.spec.method.value} rotation" + (" (oblique: the factors may correlate)" if ex.rotated.oblique
                                                         else " (orthogonal: uncorrelated factors)")


def count_table(result) -> ReportTable:
    from cfa_tool.workflows.explore import RULE_WORDS

    count = result.exploration.count
    rows = [[RULE_WORDS[s.rule], "" if s.factors is None else str(s.factors),
             "yes" if s.rule in count.combined else ""] for s in count.suggestions]
    return _table("factor_count", "How many factors: what each rule suggests",
                  [("Rule", "l"), ("Factors", "r"), ("Part of the recommendation", "l")], rows,
                  f"Parallel analysis: {count_text(count.parallel.replications)} {count.parallel.reference.phrase}, "
                  f"{count.parallel.percentile:g}th percentile (Glorfeld 1995). An empty cell: the rule found no "
                  f"count among the solutions tried" + (", or, for the lowest BIC, BIC is not defined for polychoric "
                                                        "correlations." if _scaled(result) else "."))


def eigenvalue_table(result) -> ReportTable:
    pa = result.exploration.count.parallel
    k = min(len(pa.component_eigenvalues), SCREE_ROWS)
    rows = [[str(i + 1), num(pa.component_eigenvalues[i]), num(pa.component_reference[i]),
             num(pa.factor_eigenvalues[i]), num(pa.factor_reference[i])] for i in range(k)]
    numbers = [[i + 1, *(v[i] for v in (pa.component_eigenvalues, pa.component_reference, pa.factor_eigenvalues,
                                         pa.factor_reference))] for i in range(k)]
    columns = [("Position", "r"), ("Components", "r"), ("Random components, 95th percentile", "r"),
               ("Factors", "r"), ("Random factors, 95th percentile", "r")]
    return _table("eigenvalues", "Eigenvalues beside those of random data", columns, rows,
                  "Components: eigenvalues of the correlation matrix; factors: of the reduced matrix (squared multiple "
                  "correlations on the diagonal). A factor counts while its eigenvalue exceeds the random one.",
                  values=([c for c, _ in columns], numbers))



def _scaled(result) -> bool:
    """The solutions' chi-square is mean-scaled (polychoric correlations): Satorra & Bentler (1994)."""
    return any(step.solution.fit.statistic is FitStatistic.MEAN_SCALED for step in result.fits)


#: what the fit table of polychoric solutions shows, and why it has no BIC
SCALED_NOTE = ("Chi-square and RMSEA of polychoric correlations: the statistic is mean-scaled (Satorra & Bentler 1994), "
               "and BIC is not given, as the solutions are not fitted by the likelihood of the answers. The RMSEA is "
               "the population-corrected one of the maximum-likelihood discrepancy, its noncentrality N F - c df "
               "(Brosseau-Liard, Savalei & Li 2012). These figures are the fit of the exploratory solutions by their "
               "own estimator: a confirmatory fit of the same items and factors estimates by diagonally weighted "
               "least squares and puts its mean and variance adjusted statistic into the usual RMSEA formula, so its "
               "RMSEA differs and is not comparable with these; compare models by the "
               "figures of one analysis.")
#: the same, where the solution's line gives its RMSEA (new-user trial 2 of s23: an exploration's .074 was read beside
#: a confirmatory fit's robust .041 of the same one factor)
SCALED_RMSEA = ("population-corrected, of maximum likelihood on the polychoric correlations: not comparable with a "
                "confirmatory fit's robust RMSEA; see the note under the table of fits")


def fits_table(result) -> ReportTable:
    """The fit of each solution tried: its chi-square test and RMSEA interval as one cell each for reading, and for the
    data files (CSV) as numbers in columns of their own (the chi-square, its df and p, the RMSEA and its bounds), which
    are written in the data file's decimal mark like every other number (hostile trial s24b, case 05: those cells were
    text of decimal points beside decimal commas in the same rows)."""
    rows, values = [], []
    scaled = _scaled(result)
    improper = any(step.improper for step in result.fits)  # a Problem column only where a solution has one
    for step in result.fits:
        f = step.solution.fit
        low, high = f.rmsea_ci90
        tested = f.df != 0
        test = f"{f.chi_square:.3f} on {f.df} df, p {T.p_phrase(f.p_value)}" if tested else "no test"
        problem = ["Heywood case" if step.improper else ""] if improper else []
        rows.append([str(step.factors), test, f"{unit(f.rmsea)} [{unit(low)}, {unit(high)}]" if tested else "",
                     *([] if scaled else [num(f.bic, 1)]), unit(f.srmr)] + problem)
        values.append([step.factors, *((f.chi_square, f.df, f.p_value, f.rmsea, low, high) if tested else
                                       (None, f.df, None, None, None, None)),
                       *([] if scaled else [f.bic]), f.srmr] + problem)
    chi_square = "Scaled chi-square" if scaled else "Chi-square"
    columns = [("Factors", "r"), (chi_square, "r"), ("RMSEA [90% interval]", "r"), *([] if scaled else [("BIC", "r")]),
               ("SRMR", "r"), *([("Problem", "l")] if improper else [])]
    value_columns = ["Factors", chi_square, "df", "p", "RMSEA", "RMSEA 90% lower", "RMSEA 90% upper",
                     *([] if scaled else ["BIC"]), "SRMR", *(["Problem"] if improper else [])]
    return _table("solution_fits", "Fit of maximum-likelihood solutions with 1 to K + 2 factors", columns, rows,
                  f"{SCALED_NOTE} {GUIDE_NOTE}" if scaled else GUIDE_NOTE,
                  flagged=tuple(i for i, s in enumerate(result.fits) if s.improper), values=(value_columns, values))


def _faint(matrix: np.ndarray, threshold: float, offset: int = 1) -> tuple[tuple[int, int], ...]:
    return tuple((i, j + offset) for i in range(matrix.shape[0]) for j in range(matrix.shape[1])
                 if abs(matrix[i, j]) < threshold)


def loading_table(result, structure: bool = False) -> ReportTable:
    ex = result.exploration
    names = ex.draft.factor_names
    matrix = ex.rotated.structure if structure else ex.rotated.pattern
    order = result.order or tuple(range(len(result.items)))
    shown = matrix[list(order)]
    threshold = ex.draft.threshold
    errors = ex.errors.pattern[list(order)] if (not structure and ex.errors is not None
                                                and ex.errors.unavailable is None) else None
    rows, numbers = [], []
    marked = not structure and any(result.items[k] in ex.solution.at_bound for k in order)  # a Problem column if any
    for i, k in enumerate(order):
        if errors is None:
            cells = [result.items[k]] + [explored_unit(v) for v in shown[i]]
            figures = [result.items[k], *shown[i]]
        else:  # each loading with its standard error beside it
            cells = [result.items[k]] + [c for v, e in zip(shown[i], errors[i])
                                         for c in (explored_unit(v), est_num(e, 3) if np.isfinite(e) else "")]
            figures = [result.items[k]] + [c for v, e in zip(shown[i], errors[i]) for c in (v, e)]
        if not structure:
            problem = ["at bound" if result.items[k] in ex.solution.at_bound else ""] if marked else []
            cells += [explored_unit(ex.communalities[k])] + problem
            figures += [ex.communalities[k]] + problem
        rows.append(cells)
        numbers.append(figures)
    cols = [("Item", "l")] + ([(n, "r") for n in names] if errors is None else
                              [c for n in names for c in ((n, "r"), ("SE", "r"))])
    value_columns = ["Item"] + (list(names) if errors is None else
                                [c for n in names for c in (n, f"SE of {n}")])
    if not structure:
        cols += [("Communality", "r")] + ([("Problem", "l")] if marked else [])
        value_columns += ["Communality"] + (["Problem"] if marked else [])
    title = ("Structure loadings (correlations of items with factors)" if structure else
             "Pattern loadings" + (" (oblique rotation)" if ex.rotated.oblique else ""))
    note = (f"Items sorted by the factor of their largest loading, then by its size. Loadings below {unit(threshold, 2)} "
            f"in absolute value are shown faintly. {ORIENTATION_RULE}")
    why_not = {"unrotated-several-factors": "the unrotated loadings of several factors are not a rotation's optimum",
               "uniqueness-at-bound": "a uniqueness is at its bound",
               "singular-information": "the information matrix is singular"}
    if not structure and ex.errors is not None and ex.errors.unavailable is not None:
        note += f" No standard errors: {why_not.get(ex.errors.unavailable.value, ex.errors.unavailable.value)}."
    if errors is not None:
        note += (" SE: standard errors of the pattern loadings by the delta method (Jennrich 1973; " +
                 ("normal theory for Pearson correlations" if ex.errors.normal_theory else
                  "from the asymptotic covariance of the polychoric correlations") + ").")
    at_bound = tuple(i for i, k in enumerate(order) if result.items[k] in ex.solution.at_bound) if not structure else ()
    return ReportTable(("structure" if structure else "pattern"), title, tuple(c for c, _ in cols),
                       tuple(a for _, a in cols), tuple(tuple(r) for r in rows), note, at_bound,
                       value_columns=tuple(value_columns), values=tuple(tuple(r) for r in numbers),
                       faint=_faint(shown, threshold) if errors is None else
                       tuple((int(i), int(1 + 2 * j)) for i, j in zip(*np.nonzero(np.abs(shown) < threshold))))


def factor_correlation_table(result) -> ReportTable | None:
    ex = result.exploration
    if not ex.rotated.oblique or ex.factors < 2:
        return None
    names = ex.draft.factor_names
    phi = ex.rotated.factor_correlations
    rows = [[names[i]] + [explored_unit(phi[i, j]) for j in range(i)] + [""] * (len(names) - 1 - i)
            for i in range(1, len(names))]
    numbers = [[names[i]] + [phi[i, j] for j in range(i)] + [None] * (len(names) - 1 - i)
               for i in range(1, len(names))]
    return _table("factor_correlations", "Factor correlations", [("", "l")] + [(n, "r") for n in names[:-1]], rows,
                  values=(["Factor", *names[:-1]], numbers))


def solution_line(result) -> str:
    ex = result.exploration
    f = ex.solution.fit
    r = ex.rotated
    rotation = ("" if r.spec.method.value == "none" or ex.factors == 1 else
                f" Rotation {'converged' if r.converged else 'DID NOT CONVERGE'}; {r.starts_at_best} of {r.starts} "
                f"starts reached the lowest criterion value.")
    scaled = "scaled chi-square (Satorra & Bentler 1994)" if f.statistic is FitStatistic.MEAN_SCALED else "chi-square"
    test = "no test (0 df)" if f.df == 0 or f.statistic is None else \
        f"{scaled} {f.chi_square:.3f} on {f.df} df, p {T.p_phrase(f.p_value)}, RMSEA {unit(f.rmsea)}" + (
            f" ({SCALED_RMSEA})" if f.statistic is FitStatistic.MEAN_SCALED else "")
    return f"The {ex.factors}-factor solution: {test}, SRMR {unit(f.srmr)}.{rotation}"


def same_data_caution() -> Note:
    """The caution of an exploration without random halves, naming the option as the caller writes it for the
    program's user (a manuscript leaves it out: note_parts)."""
    return Note(("The draft model was chosen from these data; fitted to the same data its fit looks better than it is. "
                 "Fit it to other data, or explore one random half and fit the draft on the other",
                 Command(f" ({Option.SPLIT}, a seed)"), "."))


def split_lines(result) -> list[Text]:
    s = result.split
    if s is None:
        return [same_data_caution()]
    lines = [SPLIT_STATEMENT.format(divided=s.divided_words(), explored=EXPLORE_NAMES.phrase(0),
                                    confirming=EXPLORE_NAMES.phrase(1), seed=s.seed, first=count_text(len(s.exploration_rows)),
                                    second=count_text(len(s.confirmation_rows)))]
    if s.how_drawn():  # by clusters or strata (workflows.explore.SplitHalves)
        lines.append(s.how_drawn())
    lines.append(halves_named_alike(s.seed, True, s.cluster, s.strata))  # replicate's names of the same halves
    if s.note:
        lines.append(f"No confirmation: {s.note}.")
    return lines


def explore_tables(result) -> tuple[list[ReportTable], list[ReportTable]]:
    """The tables of the number of factors, and those of the chosen solution."""
    out = [loading_table(result)]
    if result.exploration.rotated.oblique and result.factors > 1:
        out.append(loading_table(result, structure=True))
    extra = factor_correlation_table(result)
    if extra is not None:
        out.append(extra)
    return [count_table(result), eigenvalue_table(result), fits_table(result)], out


def confirmation_tables(result) -> list[ReportTable]:
    fit = result.split.confirmation if result.split is not None else None
    if fit is None:
        return []
    out = [T.fit_table(fit)] if fit.fit is not None and fit.converged else []
    # every factor's block and the factors' matrix (the loadings of the confirmed model)
    return out + [t for t in T.estimate_tables(fit) if t.key.split("_")[0] in ("factor", "factors")]


def _rules_caution() -> str:
    from cfa_tool.workflows.explore import RULES_CAUTION

    return RULES_CAUTION


def nice_ticks(low: float, high: float, most: int = 6) -> list[float]:
    """Round axis values within [low, high]: steps of 1, 2 or 5 times a power of ten, at most ``most`` of them,
    always with 0 when the range holds it (an axis of 4.0, 2.9, 1.9, 0.9, -0.2 reads badly)."""
    span = high - low if high > low else 1.0
    for step in (m * 10.0 ** e for e in range(int(np.floor(np.log10(span / most))) - 1, 10) for m in (1, 2, 5)):
        first = np.ceil(low / step - 1e-9) * step
        ticks = [float(round(v, 10)) + 0.0 for v in np.arange(first, high + step * 1e-9, step)]  # no -0
        if len(ticks) <= most:
            return ticks
    return [low, high]


def scree_svg(result, width: int = 560, height: int = 320) -> str:
    """Eigenvalues by position (components and factors) with the 95th percentiles of random data, as inline SVG."""
    pa = result.exploration.count.parallel
    k = min(len(pa.component_eigenvalues), SCREE_ROWS)
    series = [("Components", pa.component_eigenvalues[:k], "#1f3b73", ""),
              ("Components, random 95th percentile", pa.component_reference[:k], "#1f3b73", "6,4"),
              ("Factors", pa.factor_eigenvalues[:k], "#b3261e", ""),
              ("Factors, random 95th percentile", pa.factor_reference[:k], "#b3261e", "6,4")]
    low = min(0.0, float(min(s[1].min() for s in series)))
    high = float(max(s[1].max() for s in series))
    left, right, top, bottom = 48, 16, 16, 40
    legend = 18 * len(series) + 8

    def x(i: float) -> float:
        return left + (width - left - right) * (i / max(k - 1, 1))

    def y(v: float) -> float:
        return top + (height - top - bottom) * (1 - (v - low) / (high - low if high > low else 1))

    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height + legend}" '
             f'viewBox="0 0 {width} {height + legend}" role="img" aria-label="Scree plot">',
             f'<line x1="{left}" y1="{y(low):.1f}" x2="{width - right}" y2="{y(low):.1f}" stroke="#333"/>',
             f'<line x1="{left}" y1="{top}" x2="{left}" y2="{y(low):.1f}" stroke="#333"/>']
    if low < 0:
        parts.append(f'<line x1="{left}" y1="{y(0):.1f}" x2="{width - right}" y2="{y(0):.1f}" stroke="#bbb"/>')
    for i in range(k):
        parts.append(f'<text x="{x(i):.1f}" y="{y(low) + 16:.1f}" font-size="11" text-anchor="middle">{i + 1}</text>')
    for tick in nice_ticks(low, high):
        parts.append(f'<text x="{left - 6}" y="{y(tick) + 4:.1f}" font-size="11" text-anchor="end">{tick:g}</text>')
    parts.append(f'<text x="{(left + width - right) / 2:.1f}" y="{height - 6}" font-size="12" text-anchor="middle">'
                 f'Position</text>')
    for n, (label, values, colour, dash) in enumerate(series):
        points = " ".join(f"{x(i):.1f},{y(float(v)):.1f}" for i, v in enumerate(values))
        dashes = f' stroke-dasharray="{dash}"' if dash else ""
        parts.append(f'<polyline points="{points}" fill="none" stroke="{colour}" stroke-width="2"{dashes}/>')
        if not dash:
            parts += [f'<circle cx="{x(i):.1f}" cy="{y(float(v)):.1f}" r="3" fill="{colour}"/>' for i, v in enumerate(values)]
        ly = height + 12 + 18 * n
        parts.append(f'<line x1="{left}" y1="{ly}" x2="{left + 30}" y2="{ly}" stroke="{colour}" stroke-width="2"{dashes}/>')
        parts.append(f'<text x="{left + 38}" y="{ly + 4}" font-size="12">{esc(label)}</text>')
    parts.append("</svg>")
    return "".join(parts)


def explore_report(result):
    """The exploration as the one report model (cfa_tool.reporting.document.Report) that every view draws
    (terminal, notebook, HTML, Markdown, Word, tables, a saved result's report): the problems of the solution and
    of the confirmation half first; the data, the recommendation and its reasons; the notes on the data; the scree
    plot; the tables of the number of factors, of the solution and of the confirmation half; the draft model as
    written; the split of the rows (or the caution that the model was chosen from these data); the cautions."""
    from cfa_tool.reporting.document import Figure, Listing, Report, ResultKind, in_section

    notice = problem_notice(result)
    confirmation = result.split.confirmation if result.split is not None else None
    second = T.problem_notice(confirmation) if confirmation is not None else None
    if second is not None:  # a confirmation fit that is not admissible: first, under the heading every fit's has
        # (tables.problem_notice, the one rule), never under the exploration's softer one (hostile trial s17, finding 4)
        own = notice.lines if notice is not None else ()
        theirs = tuple("Confirmation half: " + x for x in second.lines)  # a Note stays one (its advice by the view)
        lines = theirs + own if second.inadmissible else own + theirs
        notice = T.ProblemNotice(second.heading if second.inadmissible or notice is None else notice.heading, lines,
                                 second.inadmissible or notice is not None)
    lines = tuple(header_lines(result)) + tuple(result.reasons()) + (solution_line(result),)
    count, solution = explore_tables(result)
    tables = (in_section(COUNT_SECTION, count) + in_section(f"The {result.factors}-factor solution", solution)
              + in_section(CONFIRMATION_SECTION, confirmation_tables(result)))
    return Report(ResultKind.EXPLORE, "Exploratory factor analysis", notice, lines, tuple(tables),
                  tuple(split_lines(result)), (_rules_caution(), GUIDE_NOTE),
                  figures=(Figure("Scree plot: eigenvalues beside those of random data", lambda: (scree_svg(result), "")),),
                  warnings=tuple(result.notes) + _keying_lines(result),
                  listings=(Listing("Draft model", result.draft_text),))


def _keying_lines(result) -> tuple[Text, ...]:
    """The draft's sentence on factors that correlate negatively (exploration.draft.keying_sentence), naming the
    model language's method statement: a trait split by its items' keying (new-user trial s24)."""
    from cfa_tool.exploration.draft import METHOD_WORDS

    before, after = getattr(result.exploration.draft, "keying", ("", ""))
    if not before:
        return ()
    return (Note((before, Command(" ('method NAME' in the model file, docs/model-language.md)", METHOD_WORDS), after)),)


__all__ = ["explore_report", "scree_svg"]
