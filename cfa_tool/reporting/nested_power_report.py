"""The parts of a power simulation's report about a model nested in the simulated one
(workflows.power_nested): the line that says what was fitted, the table of the difference test's power at each
sample size beside its noncentral chi-square approximation, and the methods paragraph."""

from __future__ import annotations

from cfa_tool.numbers import count_text, discrepancy_text
from cfa_tool.note_parts import Text
from cfa_tool.reporting.numbers import num, unit
from cfa_tool.reporting.paragraph import nested_power_paragraph
from cfa_tool.reporting.tables import ReportTable, _table


def boundary_words(nested) -> str:
    """What the nested model fixes on the boundary of the model's space, and which p-value the power is that of
    ('' when nothing lies there); said under the simulated power and the planned one alike."""
    if not nested.boundary:
        return ""
    df = nested.df_difference
    return (f" On the boundary of the model's parameter space: {'; '.join(nested.boundary)}. The fits, as every fit of this tool, do not hold an estimate inside that boundary (a "
            f"factor correlation may pass 1, reported as not admissible), so the power is that of the p-value from "
            f"chi-square with {df} df, which keeps its level where the nested model holds; the 50:50 mixture p-value "
            f"(Self & Liang 1987) assumes estimates held inside the boundary and rejects more often than its level "
            f"where they are not.")


def nested_parts(results) -> tuple[list[Text], tuple[ReportTable, ...], str | None]:
    """(lines, tables, paragraph) of the nested model of ``results`` (workflows.montecarlo results, one per sample
    size); nothing without one."""
    first = results[0]
    nested = getattr(first, "nested", None)
    if nested is None:
        return [], (), None
    df = nested.df_difference
    source = f" ({nested.source})" if nested.source and nested.source != nested.name else ""
    lines = [f"Each data set was also fitted by the nested model '{nested.name}'{source}, which has {df} "
             f"degree{'s' if df != 1 else ''} of freedom more; the difference of the two chi-squares is tested on "
             f"{df} df (Steiger, Shapiro & Browne 1985)."]
    rows, values = [], []
    for r in results:
        d = r.difference
        rows.append([count_text(r.n_obs), f"{count_text(d.pairs)} of {count_text(r.replications)}", unit(d.rejected, 2),
                     unit(d.monte_carlo_se, 3), unit(d.approximate, 2), num(d.noncentrality, 2)])
        values.append([r.n_obs, d.pairs, d.rejected, d.monte_carlo_se, d.approximate, d.noncentrality])
    holds = nested.discrepancy < 1e-8
    note = (f"Power: share of the replications in which both models converged whose chi-square difference ({df} df) "
            f"had p < {unit(first.alpha, 2)}; Monte Carlo SE: sqrt(p (1 - p) / R) over those replications. Approximate "
            f"power: the noncentral chi-square with {df} df and noncentrality N times the nested model's minimum "
            f"discrepancy at the population, {discrepancy_text(0.0 if holds else nested.discrepancy)} (Satorra & Saris 1985), which assumes "
            f"normal data and a discrepancy small beside the sampling error."
            + (" The nested model holds in this population (discrepancy 0), so the power column is the share of "
               "false rejections (nominal alpha)." if holds else ""))
    note += boundary_words(nested)
    table = _table("difference_test_power", f"Power of the difference test against '{nested.name}'",
                   [("N", "r"), ("Both converged", "r"), ("Power", "r"), ("Monte Carlo SE", "r"),
                    ("Approximate power", "r"), ("Noncentrality", "r")], rows, note,
                   values=(["N", "Replications both converged", "Power", "Monte Carlo SE",
                            "Approximate power (Satorra & Saris 1985)", "Noncentrality"], values))
    return lines, (table,), nested_power_paragraph(results)
