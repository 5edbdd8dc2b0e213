"""Identification checks: before fitting (counting rule, a scale for every
factor) and after (rank of the information matrix; Bollen 1989, ch. 4, and
the empirical check of McDonald & Krane 1979)."""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from cfa_tool.numbers import rounded_number, user_number
from cfa_tool.errors import ModelError, NotIdentified, UnboundedSolution
from cfa_tool.language.names import reference_text, written_name
from cfa_tool.language.spec import Spec
from cfa_tool.model.description import parameter_words, split_label
from cfa_tool.model.parameters import ParameterTable
from cfa_tool.numerics.linalg import ScaledFactor, scaled_factor


#: what a model of 0 degrees of freedom is, in every view that says it (the fit's table, check's summary)
JUST_IDENTIFIED = "the model is just-identified: it reproduces the data exactly, so its fit cannot be tested"


def moments_count(table: ParameterTable) -> int:
    """The variances and covariances (and means, with a mean structure) of the indicators, in every group: what a
    model of continuous items is fitted to, so that its degrees of freedom are this count less its free parameters
    (Bollen 1989, ch. 4)."""
    p = table.p
    return table.n_groups * (p * (p + 1) // 2 + (p if table.mean_structure else 0))


def fixed_through_equality_notes(table: ParameterTable) -> tuple[str, ...]:
    """A note for each parameter an 'equal' statement fixes by holding it equal to a fixed one
    (model.parameters.FixedThroughEquality): the model file fixed only the other one, and the report's tables then show
    both fixed, so the note says why, and that the restriction is the model's (one more degree of freedom than the
    equality alone would give, none counted for the fixed parameter)."""
    notes = []
    for tie in table.fixed_through_equality:
        group = table.groups[tie.group] if table.multigroup else None
        held = parameter_words(tie.kind, tie.variables, group, table.observed, groups=table.groups)
        fixed = parameter_words(tie.fixed_kind, tie.fixed_variables, group, table.observed, groups=table.groups)
        why = (("the marker that sets its factor's scale" if tie.kind == "loading" else
                "fixed to set its factor's scale") if tie.sets_scale else "by a 'fix' statement")
        note = (f"An 'equal' statement holds {held} equal to {fixed}, which is fixed at {user_number(tie.value)} "
                f"({why}): so {held} is fixed at {user_number(tie.value)} too, not estimated.")
        own = [par.variables[1] for par in table.parameters if par.origin == "scale" and par.kind == "loading"
               and not par.free  # (effects coding marks a free loading 'scale': no marker; hostile s24b)
               and par.group == tie.group and tie.kind == "loading" and par.variables[0] == tie.variables[0]]
        if tie.sets_scale and own:  # a factor scaled twice: a restriction the model file may not have meant
            note += (f" '{tie.variables[0]}' also takes its scale from its own marker ({own[0]}), so two of its "
                     f"loadings are fixed, one more restriction than its scale needs; to hold one item's loadings "
                     f"equal across factors, list that item first in each (each factor's marker).")
        notes.append(note)
    return tuple(notes)


def check_counting_rule(spec: Spec, table: ParameterTable) -> None:
    p, G = table.p, table.n_groups
    moments = moments_count(table)
    if table.n_free > moments:
        what = "variances and covariances" + (" and means" if table.mean_structure else "")
        per = f" in {G} groups" if G > 1 else ""
        raise ModelError(
            f"the model has {table.n_free} free parameters but {p} indicators{per} give only {moments} {what}, "
            f"so it cannot be identified (degrees of freedom {moments - table.n_free}); add constraints or indicators",
            spec.factors[0].name.location,
            spec.source_line(spec.factors[0].name.location),
        )
    for g in range(G):
        own = [par for par in table.parameters if par.group == g]
        for j, factor in enumerate(table.latent):
            scaled = any(
                (par.matrix in ("L", "B") and par.col == j and (not par.free and par.offset != 0.0 or par.origin == "scale"))
                or (par.matrix == "P" and par.row == j and par.col == j and not par.free)
                for par in own
            ) or (g > 0 and _scale_shared_with_first_group(table, j, g))
            if not scaled:
                loc = next(f.name.location for f in spec.factors if f.name.text == factor)
                raise ModelError(
                    f"factor '{factor}' has no scale: fix one of its loadings or its variance (or use 'scale {written_name(factor)} by ...')",
                    loc,
                    spec.source_line(loc),
                )


def _scale_shared_with_first_group(table: ParameterTable, j: int, g: int) -> bool:
    """A later group's factor takes its scale from the first group through a loading held equal across groups."""
    first = {par.terms for par in table.parameters if par.group == 0 and par.matrix in ("L", "B") and par.col == j and par.free}
    return any(par.terms in first for par in table.parameters if par.group == g and par.matrix in ("L", "B") and par.col == j and par.free)


def check_information_rank(information: np.ndarray, labels: tuple[str, ...], factor: ScaledFactor | None = None,
                           two_items: "tuple[tuple[str, tuple[str, str]], ...] | Callable[[], tuple]" = ()) -> None:
    """Raise if the information matrix is (numerically) singular, naming the parameters involved (and, when they hold
    a loading of a two-item factor among ``two_items``, :func:`~cfa_tool.assessment.convergence.two_item_factors`, or
    a function that finds them, called only for a singular matrix, that factor with the language's remedy); ``factor``:
    :func:`~cfa_tool.numerics.linalg.scaled_factor` of it when the caller has made it (the standard errors and the
    score tests read the same factor)."""
    if information.size == 0:
        return
    if _clearly_full_rank(scaled_factor(information) if factor is None else factor):
        return
    inv_scale = 1.0 / np.sqrt(np.maximum(information.diagonal(), 1e-300))
    normalised = information * (inv_scale[:, None] * inv_scale)
    vals = np.linalg.eigvalsh(normalised)  # eigenvalues only: the vectors are needed only to name a culprit
    if vals[0] > 1e-9 * max(vals[-1], 1.0):
        return
    vals, vecs = np.linalg.eigh(normalised)
    weights = np.abs(vecs[:, 0])
    involved = [labels[k] for k in np.argsort(-weights) if weights[k] > 0.1][:6]
    loadings = {names for kind, names, _ in map(split_label, involved) if kind == "loading"}
    if callable(two_items):  # found only when the information is singular (every converged fit comes here)
        two_items = two_items()
    pair = next(((f, items) for f, items in two_items if any((f, x) in loadings for x in items)), None)
    if pair is not None:  # a two-item factor's loadings among them (hostile s23b: advice to fix a residual variance)
        f, (a, b) = pair
        raise NotIdentified(
            f"the model is not identified with these data (the information matrix is singular); the parameters "
            f"involved are: {', '.join(involved)}: the factor '{f}' has two items ({a}, {b}) and is identified only "
            f"through its covariances with the other factors, which these data leave near zero (empirical "
            f"under-identification); hold its two loadings equal ('equal {reference_text('loading', (f, a))}, "
            f"{reference_text('loading', (f, b))}')",
            tuple(involved),
        )
    raise NotIdentified(
        "the model is not identified with these data (the information matrix is singular); "
        f"the parameters involved are: {', '.join(involved)}; fix one of them or add constraints",
        tuple(involved),
    )


def _clearly_full_rank(factor: ScaledFactor | None) -> bool:
    """Whether the smallest eigenvalue of the information scaled to unit diagonal, N = L L', surely exceeds 1e-9 times
    the largest (and 1e-9), the test of :func:`check_information_rank`, shown by its Cholesky factor at a third of the
    cost of the eigenvalues: lambda_min = 1 / ||L^-1||_2^2 >= 1 / ||L^-1||_F^2, and lambda_max <= trace N = q (Golub &
    Van Loan 2013, sec. 2.3).  False when this does not show it (or N has no Cholesky factor); the eigenvalues then
    decide."""
    if factor is None:
        return False
    bound = float(np.vdot(factor.inverse, factor.inverse))  # ||L^-1||_F^2 >= 1 / lambda_min
    return np.isfinite(bound) and 1.0 / bound > 1e-9 * max(len(factor.inverse), 1)


#: the share of a latent response's variance left to its residual below which a solution whose information is
#: singular is read as one driven to a Heywood case (the project's own bound, not a published one: at an admissible
#: solution an item that its factors explain to R-squared 0.999 is rare and, with a singular information, the
#: estimates are seen to grow without bound)
UNBOUNDED_RESIDUAL_SHARE = 1e-3


def check_bounded_responses(mats, observed: tuple[str, ...], groups: tuple, labels: tuple[str, ...],
                            theta: np.ndarray) -> None:
    """Raise :class:`~cfa_tool.errors.UnboundedSolution` when a latent response's residual variance is a share below
    :data:`UNBOUNDED_RESIDUAL_SHARE` of its implied variance in some group (``mats``: each group's model matrices,
    ``groups``: their labels, None for one group): with residual variances held at 1 (thresholds as parameters, the
    metric of Wu & Estabrook 2016), a solution the data push towards a negative residual variance in the metric of
    correlations (a Heywood case) has loadings and factor variances that grow without bound, and its singular
    information is the sign of that, not of a model the data do not identify.  Called when the information is
    singular (:func:`check_information_rank`); ``labels``, ``theta``: the free parameters, the largest named."""
    worst = None
    for g, m in enumerate(mats):
        total = np.diag(m.implied_covariance())
        share = np.diag(m.T) / np.where(total > 0, total, np.nan)
        j = int(np.nanargmin(share)) if np.isfinite(share).any() else None
        if j is not None and share[j] < UNBOUNDED_RESIDUAL_SHARE and (worst is None or share[j] < worst[0]):
            worst = (float(share[j]), j, g)
    if worst is None:
        return
    share, j, g = worst
    where = f" in group {groups[g]}" if groups[g] is not None else ""
    grown = [k for k in np.argsort(-np.abs(theta)).tolist()[:3] if abs(theta[k]) > 100]
    shown = ", ".join(f"{labels[k]} {rounded_number(theta[k])}" for k in grown)
    raise UnboundedSolution(
        f"the solution is not admissible: the factors explain all of {observed[j]}'s latent response{where} (its "
        f"residual's share of the variance goes to zero, {share:.1e}"
        + (f", while the estimates grow without bound: {shown}" if shown else "")
        + "), the data asking for a negative residual variance, impossible for real data (a Heywood case), so no "
        "estimate or test of it can be given; look for what the model leaves out near it (a residual covariance or "
        "cross-loading), for outlying rows, and whether the sample is small for the model; do not simply fix the "
        "value at a boundary to hide the problem",
        tuple(labels[k] for k in grown))
