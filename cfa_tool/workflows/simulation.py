"""Population models and simulated data.

Population values come from the model file: ``start`` (or ``fix``) statements give
them, in the model's own units.  Every free parameter without one takes a default
defined on the standardized metric, whatever the model's scaling: standardized
loadings .7 (.7 / sqrt(k) for an item on k factors; negative for items a ``reversed``
statement declares reverse-keyed), factor correlations .3 (paths of
.7 from a higher-order factor), residual covariances 0, and each item's variance 1.
That standardized population is converted to the model's own parameterization
(marker, variance or effects scaling, fixed values, equal parameters) by fitting the
model to its covariance matrix, which the model reproduces exactly.  Values the model
file gives replace the defaults; the remaining defaults then follow the factor
variances in force (a defaulted loading keeps its standardized value, a defaulted
factor covariance its correlation of .3), and residual variances without a value are
set so that each item's variance stays 1.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

import numpy as np
import pandas as pd
from cfa_tool.data.csv_convention import PLAIN, CsvConvention, convention_in
from cfa_tool.numbers import rounded_number, user_number
from cfa_tool.model.parameters import no_mean_statements, one_group_only
from cfa_tool.numerics.linalg import log_det_pd
from cfa_tool.numerics import distributions as dist

from cfa_tool import options as check
from cfa_tool.errors import ModelError, OptionError, printable
from cfa_tool.language.spec import Spec
from cfa_tool.model.implied import ModelMatrices, StructuredModel
from cfa_tool.model.parameters import (ParameterTable, as_written, given_entries, build_parameter_table,
                                      given_values_possible, impossible_fixed_values)
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.views import Presentable

#: Defaults on the standardized metric
STANDARDIZED_LOADING = 0.7
FACTOR_CORRELATION = 0.3


class ItemMeans(Enum):
    """Where the items' population means come from."""

    CENTRED = "every item centred at 0 (a population from the model file)"
    INTERCEPTS = "the earlier fit's intercepts (and factor means)"
    SAMPLE_MEANS = "the item means of the rows the earlier fit was fitted to (it estimated no intercepts)"
    UNKNOWN = "not known to the earlier fit (summary statistics without means): every item centred at 0"
    THRESHOLDS = "set by the earlier fit's thresholds"
    CUT = "set by the thresholds that cut their latent responses into categories (answers 1 to k)"


class ValueSource(Enum):
    """Where a population value came from (the population table's 'From' column and its JSON 'from')."""

    DEFAULT = "default"
    START = "start"  # a 'start' statement of the model file
    FIXED = "fix"  # a 'fix' statement of the model file
    SCALE = "scale (fixed)"  # fixed to give a factor its scale
    EARLIER_FIT = "earlier fit"
    EQUAL = "equal"  # an 'equal' statement holds it at the value of the parameter its row's 'equal_to' names


@dataclass(frozen=True, eq=False)
class Population:
    """A model's population values, from which samples are simulated."""
    spec: Spec
    table: ParameterTable
    theta: np.ndarray
    sigma: np.ndarray
    defaulted: tuple[str, ...]  # labels of the parameters that took default values
    fitted_from: str | None = None  # the earlier fit the values come from (None: the model file and defaults)
    #: ordinal items: each item's thresholds on its standardized latent response, in model order of the items (None:
    #: every item continuous); set by an earlier ordinal fit or by a number of categories
    thresholds: dict[str, np.ndarray] | None = None
    #: the continuous items' means, in model order of the items (None: every item centred at 0), and their source
    means: np.ndarray | None = None
    means_from: ItemMeans = ItemMeans.CENTRED
    #: an earlier fit of a correlation matrix without standard deviations: values in standard-deviation units
    standard_units: bool = False
    #: what the earlier fit's data had that simulated rows do not (its sampling design, its missing answers)
    not_carried: tuple[str, ...] = ()
    #: the thresholds are those of equally likely categories (--categories), not of the earlier fit
    equal_categories: bool = False
    #: an earlier continuous fit's values put on the scale of latent responses of variance 1
    #: (:func:`on_latent_response_scale`), for items cut into categories and fitted as ordinal
    standardized: bool = False
    #: the answer codes of the earlier ordinal fit's items, lowest first, one more than its thresholds (0 to 10, or
    #: 1, 2, 4, 5 with 3 never chosen), which simulated answers are written in so that the file reads back with that
    #: fit (hostile s22: written 1 to k, which scores --from-fit of the same fit refused); None: answers 1 to k
    answer_codes: dict[str, tuple[float, ...]] | None = None
    #: how the data file of the earlier fit was written (data.csv_convention: its separator, decimal mark and
    #: byte-order mark), in which simulated rows and report tables are written, as every CSV file made from that data
    #: file; commas and points without one (a model file's values, a fit of a workbook or of summary statistics)
    csv_convention: CsvConvention = PLAIN

    @property
    def ordinal_items(self) -> tuple[str, ...]:
        return tuple(x for x in self.observed if self.thresholds and x in self.thresholds)

    @property
    def observed(self) -> tuple[str, ...]:
        return self.table.observed

    def values(self) -> list[dict]:
        """Each parameter's population value, unstandardized and standardized, whether it was a default and
        where it came from (a :class:`ValueSource` word), for the report and JSON: the free parameters, those an
        'equal' statement holds equal to one of them (from 'equal', with ``equal_to``: the kind and variables of the
        parameter whose row gives the shared value's source), and the values the model fixes (its 'fix' statements
        and the values that set each factor's scale)."""
        from cfa_tool.assessment.standardized import standardize_entries

        model = StructuredModel(self.table)
        entries = model.entry_values(self.theta)
        codes, rows, cols = self.table.entry_arrays()
        standardized = standardize_entries(model.matrices(self.theta), codes, rows, cols, entries)[0]
        defaulted = set(self.defaulted)
        out, first = [], {}  # each free parameter's first entry: (kind, variables)
        for e, par in enumerate(self.table.parameters):
            if not par.free:
                if par.kind not in ("intercept", "mean", "threshold") and par.origin in ("user", "scale"):
                    source = ValueSource.SCALE if par.origin == "scale" else ValueSource.FIXED
                    out.append({"kind": par.kind, "variables": list(par.variables), "value": float(entries[e]),
                                  "standardized": float(standardized[e]), "default": False, "from": source.value})
                continue
            if par.terms[0][0] in first:
                kind, variables = first[par.terms[0][0]]
                out.append({"kind": par.kind, "variables": list(par.variables), "value": float(entries[e]),
                            "standardized": float(standardized[e]), "default": False,
                            "from": ValueSource.EQUAL.value, "equal_to": {"kind": kind, "variables": list(variables)}})
                continue
            first[par.terms[0][0]] = (par.kind, par.variables)
            default = self.table.free_labels[par.terms[0][0]] in defaulted
            source = (ValueSource.EARLIER_FIT if self.fitted_from is not None else ValueSource.DEFAULT if default
                      else ValueSource.START)
            out.append({"kind": par.kind, "variables": list(par.variables), "value": float(entries[e]),
                        "standardized": float(standardized[e]), "default": default, "from": source.value})
        if self.means is not None:  # each item's population mean; standardized: in its standard deviations
            out.extend({"kind": "item_mean", "variables": [x], "value": float(mu),
                        "standardized": float(mu / np.sqrt(self.sigma[k, k])), "default": False,
                        "from": ValueSource.EARLIER_FIT.value}
                       for k, (x, mu) in enumerate(zip(self.observed, self.means)) if x not in self.ordinal_items)
        chosen = self.fitted_from is None or self.equal_categories  # by the number of categories, not a fit
        for item in self.ordinal_items:  # on the latent response's scale (variance 1): standardized already
            out.extend({"kind": "threshold", "variables": [item, str(step + 1)], "value": float(tau),
                        "standardized": float(tau), "default": chosen,
                        "from": (ValueSource.DEFAULT if chosen else ValueSource.EARLIER_FIT).value}
                       for step, tau in enumerate(self.thresholds[item]))
        return out


def standardized_population(table: ParameterTable, reverse_keyed: frozenset = frozenset()) -> np.ndarray:
    """The covariance matrix of the default population on the standardized metric, built from the
    model's structure (which entries exist), not from its scaling; items in ``reverse_keyed`` load
    negatively."""
    m, p = len(table.latent), len(table.observed)
    L, B, P, T = np.zeros((p, m)), np.zeros((m, m)), np.zeros((m, m)), np.zeros((p, p))
    codes, rows, cols = table.entry_arrays()
    present = np.array([par.free or par.offset != 0.0 for par in table.parameters], dtype=bool)
    paths = present & ((codes == 0) | (codes == 1))
    per_item = np.bincount(rows[present & (codes == 0)], minlength=p)
    per_factor = np.bincount(rows[present & (codes == 1)], minlength=m)
    for code, r, c in zip(codes[paths], rows[paths], cols[paths]):
        if code == 0:
            sign = -1.0 if table.observed[r] in reverse_keyed else 1.0
            L[r, c] = sign * STANDARDIZED_LOADING / np.sqrt(per_item[r])
        else:
            B[r, c] = STANDARDIZED_LOADING / np.sqrt(per_factor[r])
    covary = present & (codes == 2) & (rows != cols)
    residual = present & (codes == 3) & (rows != cols)
    # factor (disturbance) variances: 1 for factors without a higher-order factor, 1 - explained
    # below one, found from the top down (a factor's total variance 1 once those above it are)
    A = np.linalg.inv(np.eye(m) - B)
    endogenous = B.any(axis=1)
    P[np.diag_indices(m)] = 1.0
    for _ in range(m):
        total = A @ P @ A.T
        explained = np.diag(B @ total @ B.T)
        P[endogenous, endogenous] = np.clip(1.0 - explained[endogenous], 0.05, None)
    sd = np.sqrt(np.diag(P))
    for r, c in zip(rows[covary], cols[covary]):
        P[r, c] = P[c, r] = FACTOR_CORRELATION * sd[r] * sd[c]
    mats = ModelMatrices(L, B, P, T, np.zeros(p), np.zeros(m))
    common = np.diag(mats.implied_covariance())
    T[np.diag_indices(p)] = np.clip(1.0 - common, 0.05, None)
    del residual  # residual covariances are 0 in the default population
    return ModelMatrices(L, B, P, T, np.zeros(p), np.zeros(m)).implied_covariance()


def _defaults_beside_given(table: ParameterTable, model: StructuredModel, theta: np.ndarray, open_: np.ndarray,
                           target: np.ndarray, standardized_target: np.ndarray, spec_source: str) -> np.ndarray:
    """With some values given in the model file, the defaulted ones follow the factor variances in
    force: a loading keeps its standardized default, a factor covariance its default correlation,
    and each residual variance makes its item's variance 1 (an error where the given values leave it
    nothing: hostile s20 found a silent floor of 0.1 beside a report saying item variances were 1).
    Only parameters that are one matrix entry each (not tied to others by 'equal' or effects coding)
    are adjusted."""
    codes, rows, cols = table.entry_arrays()
    uses = np.bincount([t[0] for par in table.parameters for t in par.terms], minlength=table.n_free)
    simple = {}
    for e, par in enumerate(table.parameters):
        if len(par.terms) == 1 and par.terms[0][1] == 1.0 and uses[par.terms[0][0]] == 1 and open_[par.terms[0][0]]:
            simple[par.terms[0][0]] = e
    target_sd = np.sqrt(np.diag(target))
    theta = theta.copy()
    for _ in range(3):  # factor variances depend on higher-order paths: settle in a few rounds
        mats = model.matrices(theta)
        factor_sd = np.sqrt(np.clip(np.diag(mats.latent_covariance()), 1e-12, None))
        for k, e in simple.items():
            r, c = rows[e], cols[e]
            if codes[e] == 0:  # loading of item r on factor c
                theta[k] = standardized_target[e] * target_sd[r] / factor_sd[c]
            elif codes[e] == 1:  # path from higher-order factor c to factor r
                theta[k] = standardized_target[e] * factor_sd[r] / factor_sd[c]
            elif codes[e] == 2 and r != c:
                theta[k] = FACTOR_CORRELATION * factor_sd[r] * factor_sd[c]
        residual = [(k, e) for k, e in simple.items() if codes[e] == 3 and rows[e] == cols[e]]
        for k, _ in residual:
            theta[k] = 0.0
        common = np.diag(model.implied(theta))
        for k, e in residual:
            theta[k] = target_sd[rows[e]] ** 2 - common[rows[e]]
    for k, e in residual:  # the item's variance 1 cannot hold what the given values make its factors explain
        if theta[k] <= 0:
            item = table.observed[rows[e]]
            variance = target_sd[rows[e]] ** 2
            # digits enough to tell the share from the variance (1.002 was '1.00', more than the 1; its residual
            # '-0.00'; 1e8 was '100004000.04': s22, by the one rule of a computed number, rounded_number)
            explained = (f"{rounded_number(common[rows[e]], apart_from=variance)} of its variance, more than"
                         if theta[k] < 0 else "all of its variance,")
            raise ModelError(f"{spec_source}: with the values the model file gives, the factors of item '{printable(item)}' "
                             f"explain {explained} the {user_number(variance)} its standardized default allows, so its "
                             f"default residual variance would be {rounded_number(theta[k])}; give the population value of "
                             f"variance({printable(item)}) with a 'start' statement, or smaller loadings")
    return theta


def standardized_entries(table: ParameterTable, model: StructuredModel, theta: np.ndarray) -> np.ndarray:
    from cfa_tool.assessment.standardized import standardize_entries

    codes, rows, cols = table.entry_arrays()
    return standardize_entries(model.matrices(theta), codes, rows, cols, model.entry_values(theta))[0]


def fitted_estimates(fitted) -> tuple[str, bool, bool, dict]:
    """An earlier fit as the dict of its JSON (``fit --json``), last, with where it came from and whether it has
    groups and ordinal items: ``fitted`` is a fit result, that dict or the path of that JSON file."""
    from pathlib import Path

    from cfa_tool.input_files import input_json
    from cfa_tool.pipeline.results import FitResult

    if isinstance(fitted, FitResult):
        payload = fitted.to_dict()
        return "the fit result given", fitted.multigroup, bool(fitted.method.ordinal), payload
    from cfa_tool.model.saved_estimates import saved_fit_payload

    source = "the result given"
    if isinstance(fitted, (str, Path)):
        source = f"'{printable(str(fitted))}'"
        fitted = input_json(fitted, "fit result", OptionError)
    fitted = saved_fit_payload(fitted, source, marked=False)  # a fit's to_dict() saved by hand serves too
    return source, "groups" in fitted, bool(fitted.get("ordinal_items")), fitted


def _population_from_fit(spec: Spec, fitted) -> Population:
    """Population values taken from an earlier fit of the same model: every free parameter's estimate, so
    reverse-keyed loadings, negative correlations and the observed residual variances carry over.  The rows are
    read by the one reader of saved estimates (:mod:`cfa_tool.model.saved_estimates`)."""
    from cfa_tool.assessment.admissibility import refuse_inadmissible_saved_fit, saved_fit_problems
    from cfa_tool.model.saved_estimates import saved_rows, values_on_model

    source, grouped, ordinal, payload = fitted_estimates(fitted)
    rows = saved_rows(payload["estimates"], source)  # read once: a row that is not a number is named here
    problems = saved_fit_problems(payload, rows, source)
    if grouped:
        raise OptionError(f"{source}: the fit has groups; population values are taken from a fit of one group")
    refuse_inadmissible_saved_fit(payload, problems, source, "it cannot serve as a population")
    if spec.starts:
        raise OptionError("give population values either by 'start' statements or from a fitted result, not both")
    table = build_parameter_table(spec)
    # intercepts and factor means (a fit with gaps or groups estimates them) are not part of a population whose
    # items are simulated centred: set aside for the items' means, not taken for the parameters of another model
    saved = values_on_model(rows, table, source, spec.source,
                            aside=("intercept", "mean", "threshold"))
    thresholds = saved.thresholds()
    if ordinal and not thresholds:
        raise OptionError(f"{source}: the fit is of ordinal items but gives no thresholds")
    theta = saved.theta
    model = StructuredModel(table)
    sigma = model.implied(theta)
    if log_det_pd(sigma) is None:  # not positive definite, or not finite
        raise OptionError(f"{source}: its estimates imply a covariance matrix that is not positive definite or not finite "
                          f"(check its estimates for impossible values)")
    cuts = {x: thresholds[x] for x in table.observed if x in thresholds}
    if any(np.any(np.diff(t) <= 0) for t in cuts.values()):
        raise OptionError(f"{source}: its thresholds are not increasing finite numbers")
    means, means_from = _fitted_means(model, theta, saved, payload, table.observed, ordinal)
    not_given = payload.get("data", {}).get("not_given", ()) if isinstance(payload.get("data"), dict) else ()
    not_carried = tuple(what for what, had in (("sampling design", payload.get("design") is not None),
                                               ("pattern of missing answers", payload.get("missing_data") is not None)) if had)
    return Population(spec, table, theta, sigma, (), source, cuts or None, means, means_from,
                      "standard_deviations" in not_given, not_carried,
                      answer_codes=_fitted_answer_codes(payload, cuts, source) or None,
                      csv_convention=convention_in(payload))


def _fitted_answer_codes(payload: dict, cuts: dict[str, np.ndarray], source: str) -> dict[str, tuple[float, ...]]:
    """Each ordinal item's answer codes in the earlier fit, lowest first: the values of its data summary's answer
    categories (:func:`cfa_tool.pipeline.results.saved_categories`, the reader scores --from-fit checks new answers
    by), one more than the item's thresholds.  A fit that recorded no categories (written before they were saved)
    gives none, and its items are written 1 to k; categories that do not match the thresholds are an error."""
    from cfa_tool.model.saved_estimates import AGAIN
    from cfa_tool.pipeline.results import saved_categories

    if not cuts:
        return {}
    data = payload.get("data")
    try:
        categories = dict(zip((str(x) for x in data["variables"]), saved_categories(data)))
    except (AttributeError, KeyError, TypeError, ValueError):
        raise OptionError(f"{source}: the fit's data summary (its answer categories) is missing or changed by hand; "
                          f"{AGAIN}") from None
    out = {}
    for item, thresholds in cuts.items():
        codes = tuple(value for value, _ in categories.get(item, ()))
        if not codes:
            continue
        if len(codes) != len(thresholds) + 1 or not np.all(np.isfinite(codes)) or np.any(np.diff(codes) <= 0):
            raise OptionError(f"{source}: the answer categories of '{printable(item)}' in the fit's data summary "
                              f"({', '.join(user_number(c) for c in codes)}) are not the {len(thresholds) + 1} "
                              f"increasing answers its {len(thresholds)} thresholds cut; {AGAIN}")
        out[item] = codes
    return out


def _fitted_means(model: StructuredModel, theta: np.ndarray, saved, payload: dict, observed: tuple[str, ...],
                  ordinal: bool) -> tuple[np.ndarray | None, ItemMeans]:
    """The items' population means from an earlier fit: nu + L (I - B)^-1 alpha from its intercepts and factor
    means when it estimated them (the model-implied means, Bollen 1989, ch. 8), else the item means of the rows it
    was fitted to (the maximum-likelihood means of a model without a mean structure); none when the fit knew no
    means (summary statistics without them) or its items are ordinal (their thresholds set the answers).
    ``saved``: the fit's values (:class:`~cfa_tool.model.saved_estimates.SavedValues`), its intercepts set aside."""
    if ordinal:
        return None, ItemMeans.THRESHOLDS
    intercepts = [saved.aside_value("intercept", (x,)) for x in observed]
    if all(v is not None for v in intercepts):
        mats = model.matrices(theta)
        alpha = np.array([saved.aside_value("mean", (f,)) or 0.0 for f in model.table.latent])
        return np.array(intercepts) + mats.L @ (mats.A @ alpha), ItemMeans.INTERCEPTS
    data = payload.get("data")
    try:
        if "means" in data.get("not_given", ()):
            return None, ItemMeans.UNKNOWN
        names = [str(v) for v in data["variables"]]
        means = np.array([float(data["means"][names.index(x)]) for x in observed])
    except (AttributeError, KeyError, TypeError, ValueError, IndexError):
        raise OptionError("the earlier fit's data summary (its item means) is missing or changed by hand") from None
    if not np.isfinite(means).all():
        raise OptionError("the earlier fit's item means are not finite numbers")
    return means, ItemMeans.SAMPLE_MEANS


def model_order_labels(table) -> dict[str, str]:
    """Each free parameter's label (``table.free_labels``, a model file's reference, whose pair of names is sorted)
    -> the same reference with the pair in the order the model names it (the parameter's variables), as the
    population table and the fit name it: one parameter named one way in one report (new-user trial s21: 'dedication
    and vigour' in the power table, 'vigour and dedication' in the population table)."""
    from cfa_tool.language.names import read_reference, reference_text

    first = {}
    for par in table.parameters:
        if len(par.terms) == 1 and par.terms[0][1] == 1.0:
            first.setdefault(par.terms[0][0], par)
    out = {}
    for k, label in enumerate(table.free_labels):
        kind, names, group = read_reference(label)
        par = first.get(k)
        if par is not None and len(names) == 2 and sorted(names) == sorted(par.variables):
            names = par.variables
        out[label] = reference_text(kind, names, group)
    return out


def population_from_spec(spec: Spec, fitted=None) -> Population:
    """The population of ``spec``: its 'start' and 'fix' values with standardized defaults beside them, or,
    with ``fitted`` (a fit result, its JSON dict or the JSON file), the estimates of that earlier fit."""
    from cfa_tool.data.moments import SampleMoments
    from cfa_tool.pipeline.continuous import FitOptions, estimate

    one_group_only(spec, "the simulation draws rows of one group")
    no_mean_statements(spec, "the simulation draws rows of items about means of 0 (or an earlier fit's), and its "
                             "model has no intercepts or factor means")
    if fitted is not None:
        return _population_from_fit(spec, fitted)
    _no_factor_without_variance(spec)
    table = build_parameter_table(spec)
    model = StructuredModel(table)
    given_values_possible(spec, table, given_entries(table))  # at their statements, before any default
    impossible_fixed_values(table, spec.source)
    given = table.start.copy()
    kind_of: dict[int, str] = {}
    for par in table.parameters:
        if len(par.terms) == 1:
            kind_of.setdefault(par.terms[0][0], par.kind)
    target = standardized_population(table, frozenset(spec.reverse_keyed))
    n = 1_000_000  # the moments are the population's: N only scales the (unused) test statistic
    moments = SampleMoments(table.observed, target, np.zeros(table.p), n, n, 0, "<population>")
    try:
        est = estimate(spec, [(None, moments)], FitOptions(diagnostics=False, modification_indices=False))
    except ModelError:  # a fixed covariance beyond the variances at the search's start, which a fit of data names
        est = None  # in its words; here they are the defaults': said below as a population near them
    if est is None or not est.converged:
        written = [f"{as_written(par)} = {user_number(par.offset)}" for par in table.parameters
                   if par.group == 0 and not par.free and par.origin == "user"]
        if written:  # values the file gives that no population near the standardized defaults can hold
            raise ModelError(f"{spec.source}: no population near the standardized defaults (loadings .7, factor "
                             f"correlations .3, item variances 1) has the values fixed in the model file "
                             f"({', '.join(written)}): check them against the factors' variances they imply, or give "
                             f"the other values with 'start' statements")
        raise OptionError("the model's structure could not be given default population values (the model may not be "
                          "identified); give them with 'start' statements")
    theta = np.where(np.isnan(given), est.theta, given)
    # a defaulted residual covariance is 0 exactly, not the fit's rounding of it (hostile s20: -4.2e-18 made an
    # estimate bias of 1e17 percent)
    codes, rows, cols = table.entry_arrays()
    for par, code, r, c in zip(table.parameters, codes, rows, cols):
        if code == 3 and r != c and par.free and len(par.terms) == 1 and np.isnan(given[par.terms[0][0]]):
            theta[par.terms[0][0]] = 0.0
    defaulted = [table.free_labels[k] for k in range(table.n_free) if np.isnan(given[k])]
    if not np.isnan(given).all():
        theta = _defaults_beside_given(table, model, theta, np.isnan(given), target,
                                       standardized_entries(table, model, est.theta), spec.source)
    beyond_bounds(spec, table, theta, given)
    _defaults_held_apart(spec, table, model, theta, given)
    given_values_possible(spec, table, model.entry_values(theta))  # a covariance beside the variances it met
    sigma = model.implied(theta)
    if log_det_pd(sigma) is None:  # not positive definite, or not finite
        raise OptionError("the population values imply a covariance matrix that is not positive definite or not finite "
                          "(check the model's fixed and start values for impossible ones)")
    return Population(spec, table, theta, sigma, tuple(defaulted))


def _no_factor_without_variance(spec: Spec) -> None:
    """Refuse a population in which a factor below no other has variance 0 ('start variance(f) = 0'), as the model
    language refuses 'fix variance(f) = 0': such a factor measures nothing, and the defaults of its loadings, set on
    the standardized metric through the factor's SD, would be divided by 0 (hostile s20: loadings of 700,000 and a
    power table of zeros).  A higher-order factor's indicators may have a residual variance of 0."""
    from cfa_tool.language.checks import exogenous_factors, factor_without_variance

    top = set(exogenous_factors(spec))
    for setting in spec.starts:
        for ref in setting.refs:
            if factor_without_variance(ref, setting.value, top):
                raise ModelError(f"{ref} is given a population value of 0: a factor without variance measures nothing, "
                                 f"and the simulated items would not measure it; give it a positive value (1 sets the "
                                 f"factor's scale) or remove the statement", ref.location, spec.source_line(ref.location))


def _defaults_held_apart(spec: Spec, table: ParameterTable, model: StructuredModel, theta: np.ndarray,
                         given: np.ndarray) -> None:
    """Refuse a default population whose loadings an 'equal' statement keeps from their standardized defaults: a
    reverse-keyed item's loading (default -.7) held equal to a plainly keyed one's (+.7) can only be met halfway, at
    0, and a simulation from it would draw items that do not measure their factor while the population table calls
    the value the default.  A defaulted loading whose standardized population value has the other sign than its
    default, or less than half its size (a line of this project, not a published one: equal loadings of one sign but
    of items on different numbers of factors meet near their defaults, well above it), is named with the 'equal'
    statement that holds it."""
    codes, rows, cols = table.entry_arrays()
    per_item = np.bincount(rows[codes == 0], minlength=table.p)
    reversed_items = frozenset(spec.reverse_keyed)
    std = standardized_entries(table, model, theta)
    for e, par in enumerate(table.parameters):
        if codes[e] != 0 or not par.free or len(par.terms) != 1 or not np.isnan(given[par.terms[0][0]]):
            continue
        item = table.observed[rows[e]]
        default = (-1.0 if item in reversed_items else 1.0) * STANDARDIZED_LOADING / np.sqrt(per_item[rows[e]])
        if std[e] * default > 0 and abs(std[e]) >= 0.5 * abs(default):
            continue
        key = ("loading", tuple(par.variables))
        held = next((refs for refs in spec.equal if any(ref.key() == key for ref in refs)), None)
        if held is None:
            continue
        ref = next(ref for ref in held if ref.key() == key)
        raise ModelError(
            f"the default population values cannot hold here: this 'equal' statement holds {ref} (default "
            f"{journal_decimal(default, digits=2)}{', a reverse-keyed item' if item in reversed_items else ''}) equal to "
            f"{', '.join(str(other) for other in held if other is not ref)}, whose default differs, so the simulated "
            f"loading would be {journal_decimal(std[e], digits=2)} (standardized), not a default; give their common population value "
            f"with a 'start' statement", held[0].location, spec.source_line(held[0].location))



def _bound_words(lower: float | None, upper: float | None) -> str:
    """A bound in words: 'at least 0', 'at most 0.1', 'between 0 and 1' (None or an infinite limit: none)."""
    low = lower is not None and np.isfinite(lower)
    high = upper is not None and np.isfinite(upper)
    if low and high:
        return f"between {user_number(lower)} and {user_number(upper)}"
    return f"at least {user_number(lower)}" if low else f"at most {user_number(upper)}"


def beyond_bounds(spec: Spec, table: ParameterTable, theta: np.ndarray, given: np.ndarray) -> None:
    """Refuse a population value that a 'bound' statement of the same model forbids, whether a 'start' statement
    gave it (``given``: the table's start values, NaN where none) or it took the default: in a simulation the
    population is where every replication starts, and a population beyond the model's own bound holds every
    replication's estimate at the bound (coverage 0, standard errors meaningless).  A 'start' value is named with
    both lines where the two statements name the same parameter (else with the parameter they share through an
    'equal' statement).  A default held at a bound is refused too: the fit that converts the standardized defaults
    to the model's scaling stops there when the standardized default lies beyond it."""
    with np.errstate(invalid="ignore"):  # infinite bounds are no bounds
        held = np.isnan(given) & np.any([np.isfinite(limit) & (np.abs(theta - limit) <= 1e-8 * np.maximum(1.0, np.abs(limit)))
                                         for limit in (table.lower, table.upper)], axis=0)
    outside = np.flatnonzero((theta < table.lower) | (theta > table.upper) | held).tolist()
    if not outside:
        return
    k = outside[0]
    bound = _bound_words(table.lower[k], table.upper[k])
    if held[k]:  # the conversion to the model's scaling stopped a default at the bound: its standardized default lies beyond
        raise ModelError(f"{spec.source}: the default population value of {table.free_labels[k]} lies beyond the "
                         f"model's own bound ({bound}) and is held at it ({rounded_number(theta[k])}), so the simulated samples "
                         f"would hold its estimate at the bound; give its population value with a 'start' statement "
                         f"within the bound")
    if np.isnan(given[k]):
        raise ModelError(f"{spec.source}: the default population value {rounded_number(theta[k])} of {table.free_labels[k]} lies "
                         f"outside the model's own bound ({bound}), so every simulated sample would hold its estimate "
                         f"at the bound; give its population value with a 'start' statement within the bound")
    consequence = "every simulated sample would hold its estimate at the bound; change the start value or the bound"
    for setting in spec.starts:
        for ref in setting.refs:
            for statement in spec.bounds:
                for other in statement.refs:
                    if other.key() != ref.key() or (other.group is not None and ref.group is not None
                                                    and other.group != ref.group):
                        continue
                    if ((statement.lower is not None and setting.value < statement.lower)
                            or (statement.upper is not None and setting.value > statement.upper)):
                        raise ModelError(
                            f"the population value {user_number(setting.value)} of {ref} (its 'start' value) lies outside the "
                            f"model's own bound on it ({_bound_words(statement.lower, statement.upper)}, line "
                            f"{other.location.line}): {consequence}", ref.location, spec.source_line(ref.location))
    raise ModelError(f"{spec.source}: the population value {user_number(given[k])} of {table.free_labels[k]} (a 'start' value, "
                     f"shared through an 'equal' statement) lies outside the model's own bound ({bound}) on a "
                     f"parameter held equal to it: {consequence}")


def simulate_rows(sigma: np.ndarray, n: int, rng: np.random.Generator, means: np.ndarray | None = None) -> np.ndarray:
    chol = np.linalg.cholesky(sigma)
    rows = rng.standard_normal((n, len(sigma))) @ chol.T
    return rows + (0.0 if means is None else means)


def on_latent_response_scale(population: Population) -> Population:
    """An earlier continuous fit's population with every item's variance 1: the scale of the latent responses that
    ordinal items are fitted on (their residual variances follow from it), for answers cut into categories from it
    (``--categories`` or an 'answers' statement with a continuous fit: new-user trial s21, whose advice went in a
    circle).  The model's values for the standardized covariance matrix D^-1/2 Sigma D^-1/2 (D its diagonal) are
    found by fitting the model to that matrix, which it reproduces exactly when the model is invariant under a
    change of the items' scales (Cudeck 1989, recalled from memory: every loading and residual variance that a
    rescaling changes is free or set only to scale a factor); a model whose fixed values a rescaling would change
    cannot reproduce it, which is an error."""
    from dataclasses import replace

    from cfa_tool.data.moments import SampleMoments
    from cfa_tool.pipeline.continuous import FitOptions, estimate

    table = population.table
    sd = np.sqrt(np.diag(population.sigma))
    target = population.sigma / np.outer(sd, sd)
    n = 1_000_000  # the moments are the population's: N only scales the (unused) test statistic
    moments = SampleMoments(table.observed, target, np.zeros(table.p), n, n, 0, "<population>")
    model = StructuredModel(table)
    try:
        est = estimate(replace(population.spec, starts=()), [(None, moments)],
                       FitOptions(diagnostics=False, modification_indices=False))
    except (ModelError, OptionError):
        est = None
    if est is None or not est.converged or np.abs(model.implied(est.theta) - target).max() > 1e-6:
        raise OptionError(f"the values of the continuous fit in {population.fitted_from} cannot be put on the scale "
                          f"of latent responses of variance 1 that ordinal items are fitted on: the model fixes values "
                          f"that a change of the items' scales would change; give the JSON result of an ordinal fit "
                          f"of these items (a fit with {check.Option.ORDINAL})")
    return replace(population, theta=est.theta, sigma=model.implied(est.theta), means=None,
                   means_from=ItemMeans.CUT, standardized=True)


def equal_thresholds(categories: int) -> np.ndarray:
    """The thresholds of a standardized latent response that give ``categories`` equally likely categories:
    the normal quantiles Phi^-1(c / k), c = 1 .. k-1."""
    return dist.norm_ppf(np.arange(1, categories) / categories)


def answer_categories(spec: Spec) -> dict[str, tuple[float, ...]]:
    """Each item an 'answers' statement covers -> its answer categories, the distinct codes the statement gives
    (language.spec.AnswerCoding.codes: the values a fit reads from such a column, numbers listed beside the words
    included)."""
    return {x: c.codes() for x, c in spec.answer_codings().items()}


def scale_answers(spec: Spec) -> dict[str, tuple[tuple[float, ...], object]]:
    """Each item a 'reversed ... on MIN to MAX' statement puts on a scale (its own items and their factor's other
    items, by the one rule of data.matching.declared_scales) -> (its answers MIN, MIN + 1, ..., MAX, the statement):
    simulate writes such an item as whole answers on that scale, cut as an 'answers' statement's (hostile tester s24:
    continuous values around 0, which the same model file then refused as outside the scale).  A scale whose ends
    are not whole numbers, or of more answers than a category count may have, is an error at the statement."""
    if not spec.reversed:
        return {}
    from cfa_tool.data.matching import declared_scales

    out = {}
    for x, (low, high, keying, _) in declared_scales(spec, pd.DataFrame(columns=list(spec.observed_names))).items():
        count = high - low + 1
        if not (float(low).is_integer() and float(high).is_integer()) or count > check.MAX_CATEGORIES:
            raise ModelError(f"simulated answers of '{printable(x)}' would be whole answers on the scale "
                             f"{user_number(low)} to {user_number(high)} this statement declares, which "
                             + ("does not run between whole numbers" if count <= check.MAX_CATEGORIES else
                                f"has more than {check.MAX_CATEGORIES} answers")
                             + "; remove the statement from a copy of the model file to simulate continuous values",
                             keying.location, spec.source_line(keying.location))
        out[x] = (tuple(float(v) for v in np.arange(low, high + 1)), keying)
    return out


def written_answers(coding) -> tuple[tuple[str | None, float | None, float], ...]:
    """How simulate writes the categories of an 'answers' statement (``coding``): each code, lowest first, as the
    answer the statement lists first with that code, a word or a number, as (word, number, code) triples; the file
    then reads back through the same statement."""
    first: dict[float, tuple[str | None, float | None, float]] = {}
    for a in coding.answers:
        first.setdefault(a.code, (a.word, a.number, a.code))
    return tuple(first[code] for code in coding.codes())


def _coding_error(spec: Spec, item: str, what: str) -> ModelError:
    """An error naming the 'answers' statement that covers ``item`` (its line, with the line shown)."""
    coding = spec.answer_codings()[item]
    return ModelError(what.replace("{origin}", coding.origin), coding.location, spec.source_line(coding.location))


def refuse_set_residual_variances_first(spec: Spec, categories: int | None) -> None:
    """The rule on residual variances of items cut into categories (:func:`with_categories`) checked before the
    population is built, when the model or ``categories`` declares items ordinal: its words say why such a statement
    cannot apply, where the parameter table would only say that a 'free' of the residual variance changes nothing."""
    if categories is not None or spec.ordinal or spec.answers:
        from cfa_tool.pipeline.ordinal import refuse_set_residual_variances

        refuse_set_residual_variances(spec)


def with_categories(population: Population, spec: Spec, categories: int | None,
                    command: str = "simulate") -> Population:
    """The population with thresholds for its ordinal items: those of an earlier ordinal fit, or equally
    likely ``categories`` for the items an 'ordinal' statement declares (every item without one).

    Items an 'answers' statement covers are answers in its categories (:func:`answer_categories`): cut into as many
    equally likely categories as it lists codes (an ordinal item of an earlier fit keeps its thresholds, whose number
    of categories must agree), so an 'ordinal' statement needs no --categories for them, and a number of categories
    that differs from the statement's is an error.  ``simulate`` writes every such item as the statement's answers,
    ordinal or not; a ``command`` that fits the samples (power-simulation) treats items the model does not declare
    ordinal as continuous, which answers in a few categories are not: such an item is an error naming the statement.
    With any item cut, a statement on a residual variance is an error at its line
    (:func:`cfa_tool.pipeline.ordinal.refuse_set_residual_variances`, the rule of the ordinal fit)."""
    from dataclasses import replace

    from cfa_tool.data.joined_answers import refuse_joins_without_answers

    # drawn answers are cut into the categories asked for: a join of the data has nothing to join
    refuse_joins_without_answers(spec, command, "draws its answers in the categories it is given (give the number of "
                                                "categories the joined items have)")
    declared = [x.text for x in spec.ordinal]
    coded = answer_categories(spec)
    scaled = {x: codes for x, codes in scale_answers(spec).items() if x not in coded}
    thresholds = dict(population.thresholds or {})
    if population.thresholds is not None:
        if categories is not None:
            raise OptionError(f"the categories come from the thresholds of the earlier fit in "
                              f"{population.fitted_from}, so a number of categories cannot apply; leave it out")
        lacking = [x for x in declared if x not in population.thresholds]
        if lacking:
            raise OptionError(f"the model declares '{lacking[0]}' ordinal, but the earlier fit in "
                              f"{population.fitted_from} treated it as continuous and gives no thresholds for it")
        for x, codes in coded.items():
            if x in thresholds and len(thresholds[x]) + 1 != len(codes):
                raise _coding_error(spec, x, f"the earlier fit in {population.fitted_from} has "
                                             f"{len(thresholds[x]) + 1} answer categories of '{printable(x)}', and "
                                             f"{{origin}} lists {len(codes)} codes for it; give the model file the "
                                             f"fit was made with (if it is that file, the fit's rows answered only "
                                             f"{len(thresholds[x]) + 1} of those codes, and the fit gives no "
                                             f"thresholds for the others)")
        cut = set(thresholds)
    else:
        if categories is None:
            lacking = [x for x in declared if x not in coded and x not in scaled]
            if lacking:
                raise OptionError(f"the model declares ordinal items ({', '.join(lacking[:5])}); give the number of "
                                  f"categories to cut them into ({check.Option.CATEGORIES})")
        cut = set(declared) if declared or categories is None else set(population.observed)
        for x in population.observed:
            if x in cut and x in coded:
                if categories is not None and len(coded[x]) != categories:
                    raise _coding_error(spec, x, f"{check.Option.CATEGORIES.given(categories)} cuts '{printable(x)}' "
                                                 f"into {categories} categories, and {{origin}} lists {len(coded[x])} "
                                                 f"codes for it; leave {check.Option.CATEGORIES} out (the statement gives the "
                                                 f"categories) or make them agree")
                thresholds[x] = equal_thresholds(len(coded[x]))
            elif x in cut and x in scaled and categories is not None and len(scaled[x][0]) != categories:
                keying = scaled[x][1]
                raise ModelError(f"{check.Option.CATEGORIES.given(categories)} cuts '{printable(x)}' into {categories} "
                                 f"categories, and this statement declares its scale {user_number(keying.minimum)} to "
                                 f"{user_number(keying.maximum)}, {len(scaled[x][0])} answers; leave "
                                 f"{check.Option.CATEGORIES} out (the scale gives the categories) or make them agree",
                                 keying.location, spec.source_line(keying.location))
            elif x in cut and x in scaled:
                thresholds[x] = equal_thresholds(len(scaled[x][0]))
            elif x in cut:
                thresholds[x] = equal_thresholds(categories)
    for x, (codes, keying) in scaled.items():  # continuous values are no answers on the statement's scale
        if x in cut:
            continue
        if command != "simulate":
            raise ModelError(f"this statement puts the answers of '{printable(x)}' on the scale "
                             f"{user_number(keying.minimum)} to {user_number(keying.maximum)}, and {command} "
                             f"simulates continuous values for the items the model does not declare ordinal; declare "
                             f"them ordinal (an 'ordinal' statement, or {check.Option.CATEGORIES.given(len(codes))}) "
                             f"to simulate answers on the scale, or remove the statement from a copy of the model "
                             f"file for the power of continuous answers",
                             keying.location, spec.source_line(keying.location))
        thresholds[x] = equal_thresholds(len(codes))  # simulate writes answers on the scale
    for x, codes in coded.items():
        if x in cut:
            continue
        if command != "simulate":
            raise _coding_error(spec, x, f"{{origin}} records the answers of '{printable(x)}' in {len(codes)} "
                                         f"categories, and {command} simulates continuous answers for the items "
                                         f"the model does not declare ordinal; declare them ordinal (an 'ordinal' "
                                         f"statement, or {check.Option.CATEGORIES.given(len(codes))}) to simulate answers in the "
                                         f"statement's categories (an earlier continuous fit's values then put on "
                                         f"the scale of latent responses of variance 1), or remove the statement "
                                         f"from a copy of the model file for the power of continuous answers")
        thresholds[x] = equal_thresholds(len(codes))  # simulate writes the statement's answers
    if thresholds:  # ordinal items in one group: the one rule of every command that fits or draws them
        from cfa_tool.pipeline.ordinal import refuse_set_residual_variances

        refuse_set_residual_variances(spec)
    if set(thresholds) == set(population.thresholds or ()):  # nothing cut beyond the earlier fit's items
        return population
    return replace(population, thresholds={x: thresholds[x] for x in population.observed if x in thresholds},
                   equal_categories=population.thresholds is None or population.equal_categories,
                   answer_codes=population.answer_codes)


def written_as_words(frame: pd.DataFrame, spec: Spec, observed: tuple[str, ...]) -> pd.DataFrame:
    """Simulated answers (categories 1..k) of the items an 'answers' statement covers, as the statement's answers:
    the c-th lowest code as :func:`written_answers` writes it, so the file reads back through the same statement
    (data.answer_words)."""
    codings = spec.answer_codings()
    for x in observed:
        if x not in codings:
            continue
        by_category = {c + 1: word if word is not None else (int(number) if number == int(number) else number)
                       for c, (word, number, _) in enumerate(written_answers(codings[x]))}
        frame[x] = frame[x].map(lambda v: by_category.get(int(v)) if pd.notna(v) else None).astype(object)
    return frame


def cut_at_thresholds(rows: np.ndarray, sigma: np.ndarray, observed: tuple[str, ...],
                      thresholds: dict[str, np.ndarray], codes: dict[str, tuple[float, ...]] | None = None) -> np.ndarray:
    """Latent responses (``rows``, covariance ``sigma``) as answers 1..k: each ordinal item's response standardized
    and cut at its thresholds (answer c when tau_(c-1) < y* <= tau_c), written as the c-th of the item's ``codes``
    where they give them (an earlier fit's own answers); continuous items are left as they are."""
    out = rows.copy()
    sd = np.sqrt(np.diag(sigma))
    for k, item in enumerate(observed):
        if item in thresholds:
            category = np.searchsorted(thresholds[item], rows[:, k] / sd[k], side="left")
            own = (codes or {}).get(item)
            out[:, k] = category + 1 if own is None else np.asarray(own, dtype=float)[category]
    return out


@dataclass(frozen=True, eq=False)
class SimulatedData(Presentable):
    """Rows simulated from a population, with the population they came from."""

    frame: pd.DataFrame
    population: Population
    seed: int
    categories: int | None
    missing: float
    #: the items written as the words of the model's 'answers' statements (their answer categories)
    worded: tuple[str, ...] = ()
    #: the items written as whole answers on the scale a 'reversed ... on MIN to MAX' statement declares
    #: (:func:`scale_answers`)
    scaled: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        from cfa_tool.data.answer_words import coding_json, coding_record

        return {"rows": len(self.frame), "variables": list(self.frame.columns), "seed": self.seed,
                "categories": self.categories, "ordinal_items": list(self.population.ordinal_items),
                "missing_share": self.missing, "population": self.population.values(),
                **({"written_as_words": list(self.worded),
                    "answer_coding": coding_json(coding_record(self.population.spec))} if self.worded else {})}


def simulate(spec, n: int, seed: int = 1, categories: int | None = None, missing: float = 0.0,
             population=None) -> SimulatedData:
    """Data from the model's population values (``spec``: a model file, model text or parsed model):
    continuous, or ordinal with ``categories`` categories (whole numbers 1..k; from an earlier ordinal fit, its own
    answer codes), with a share ``missing``
    of answers removed completely at random.  Items an 'ordinal' statement declares are cut into
    categories (and need ``categories``); without such a statement ``categories`` cuts every item.
    ``population``: an earlier fit of the same model (result, JSON dict or JSON file) whose estimates are
    the population values."""
    from cfa_tool.pipeline.inputs import load_spec, without_exploratory_blocks

    spec = without_exploratory_blocks(load_spec(spec), "simulate", "a population needs every loading, and a block's "
                                      "loadings are known only up to its rotation")
    n = check.whole_number("the number of rows to simulate", n, 1)
    seed = check.seed(seed)
    missing = check.real_number("the share of missing answers", missing, 0.0, 1.0, open_high=True)
    if categories is not None:
        categories = check.whole_number("the number of categories", categories, 2, check.MAX_CATEGORIES)
    p = len(spec.observed_names)
    if n * p > check.MAX_SIMULATED_CELLS:
        raise OptionError(f"{n:,} rows of {p} variables are more than {check.MAX_SIMULATED_CELLS:,} values; "
                          f"simulate fewer rows at a time")
    refuse_set_residual_variances_first(spec, categories)
    population = with_categories(population_from_spec(spec, population), spec, categories, "simulate")
    rng = np.random.default_rng(seed)
    rows = simulate_rows(population.sigma, n, rng)
    cut = population.ordinal_items
    if population.means is not None:  # continuous items about their means; ordinal ones are cut from centred ones
        rows += np.where(np.isin(np.asarray(population.observed), cut), 0.0, population.means)
    worded = tuple(x for x in population.observed if x in spec.answer_codings())
    # the earlier fit's own answer codes (written_as_words writes the worded items' categories as the statement's)
    own = {x: c for x, c in (population.answer_codes or {}).items() if x not in worded}
    scaled = []
    for x, (codes, _) in scale_answers(spec).items():  # answers on a 'reversed' statement's scale, as MIN to MAX
        if x in cut and x not in worded and x not in own and len(population.thresholds[x]) + 1 == len(codes):
            own[x] = codes
            scaled.append(x)
    if cut:
        rows = cut_at_thresholds(rows, population.sigma, population.observed, population.thresholds, own)
    if missing:
        rows[rng.random(rows.shape) < missing] = np.nan
    frame = pd.DataFrame(rows, columns=list(population.observed))
    if cut:  # whole answers as whole numbers (a nullable integer type keeps the gaps)
        frame = frame.astype({x: "Int64" for x in cut if all(float(c).is_integer() for c in own.get(x, (1.0,)))})
    if worded:  # the model's 'answers' statements: the words, as the data the model reads hold them
        frame = written_as_words(frame, spec, population.observed)
    return SimulatedData(frame, population, seed, categories, missing, worded,
                         tuple(x for x in population.observed if x in scaled))
