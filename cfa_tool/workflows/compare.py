"""Compare rival models fitted to the same rows of data."""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.pipeline.inputs import (_described, rows_named, _no_group_notes, choose_missing_handling, has_group, design_test, few_categories, keeps_rows_with_gaps, load_spec, make_options, moments_for,
                                      refuse_large_robust_route,
                                      missing_codes_option, of_summary_statistics,
                                      data_problems, odd_values_named, reference_group_applies, reference_note,
                                      with_missing_reading,
                                      ordinal_estimator_option, ordinal_items_of, read_inputs_with_notes,
                                      refuse_for_summary, refuse_row_options,
                                      summary_source, with_design)
from cfa_tool.assessment.admissibility import non_normal_problems, solution_first
from cfa_tool.data.answer_words import code_answer_words, coding_json, refuse_different_codings
from cfa_tool.data.joined_answers import refuse_different_joins
from cfa_tool.data.labels import label_notes
from cfa_tool.data.matching import check_columns, check_declared_ranges, chosen_columns
from cfa_tool.data.moments import row_numbers
from cfa_tool.data.odd_values import odd_values
from cfa_tool.data.renamed_columns import ColumnRenames
from cfa_tool.data.sample_design import check_design, design_columns, design_summary, design_weights
from cfa_tool.data.summary_stats import read_summary_file
from cfa_tool.errors import EstimationError, NotIdentified, OptionError, estimation_of, printable
from cfa_tool.numbers import cut_list, word_list
from cfa_tool.options import Option, group_column, own_keywords
from cfa_tool.estimation.ml import NormalLikelihood
from cfa_tool.pipeline.continuous import (fit_moments, full_information_instead, pairwise_instead,
                                          full_information_likelihood, listwise_problem, model_structure,
                                          unanswered_problem,
                                          ordered_moments, unestimated)
from cfa_tool.language.spec import Spec, with_ordinal_levels
from cfa_tool.method import ORDINAL_FIT_CHANGE_WHY, FitTest, MissingData
from cfa_tool.pipeline.results import FitResult, clean
from cfa_tool.workflows.nesting import (DifferenceTest, boundary_of, difference_test, heavy_tailed_groups, is_nested,
                                       REJECTED_RESTRICTION, rejects, tails_not_judged_note,
                                       tails_said_once,
                                       probably_equivalent, scaled_difference_tests, scaling_at_restricted)
from cfa_tool.views import Presentable


@dataclass(frozen=True)
class NotNested:
    """A pair of models that are not nested, and why."""
    first: str
    second: str
    reason: str
    # AIC and BIC of the two can be compared: both maximum-likelihood fits of the same variables and rows
    information_criteria: bool = True
    # probably equivalent models (nesting.probably_equivalent): they fit any data equally well, so the data cannot
    # choose between them (their AIC and BIC are equal too)
    equivalent: bool = False


@dataclass(frozen=True, eq=False)
class Comparison(Presentable):
    """Several models fitted to the same rows and compared."""
    names: tuple[str, ...]
    results: tuple[FitResult, ...]
    tests: tuple[DifferenceTest, ...]
    not_nested: tuple[NotNested, ...]
    n_obs: int
    rows_dropped: int
    # how rows with gaps were handled: every model fitted to the same rows, complete ones (listwise) or, by
    # full-information ML, every row answering some of each model's variables
    missing: MissingData = MissingData.LISTWISE
    notes: tuple[str, ...] = ()
    problems: tuple = ()  # of the data, first in every view (pipeline.inputs.data_problems; assessment.admissibility.Problem)
    without_group: int = 0  # rows left out for having no value in the group column (not in rows_dropped)
    # with a normal-theory difference test: the groups (or 'these rows') whose answers are heavier-tailed than normal
    # (workflows.nesting.heavy_tailed_groups), cautioned first in every view
    heavy_tails: tuple[str, ...] = ()
    # of those, the groups the caution on the difference tests names: those without a caution of their own on answers
    # far from normal among ``problems``, which says what the tails do to the differences (nesting.tails_said_once)
    heavy_tails_cautioned: tuple[str, ...] = ()

    @property
    def change_guides_apply(self) -> bool:
        """Whether the change-in-fit guides (Cheung & Rensvold 2002; Chen 2007) apply: they were set for steps of
        measurement invariance, equalities added across groups, so for models with groups only (and never for
        ordinal fits, whose adjusted indices are not compared across models)."""
        return self.results[0].multigroup and not self.results[0].method.ordinal

    def to_dict(self) -> dict:
        return {
            "data_problems": [p.to_dict() for p in self.problems],
            "n_obs": self.n_obs,
            "rows_dropped": self.rows_dropped,
            "rows_without_group": self.without_group,
            "incomplete_rows": self.missing.value,
            "notes": [str(x) for x in self.notes],
            "heavy_tailed_answers": list(self.heavy_tails),
            "group_column": self.results[0].group_column if self.results[0].multigroup else None,
            "groups": [g.label for g in self.results[0].groups] if self.results[0].multigroup else [],
            "models": [
                {"name": name, "source": r.model_source, "converged": r.converged, "admissible": r.admissible,
                 "problems": [p.to_dict() for p in r.problems],
                 "description": r.description.to_dict() if r.description is not None else None,
                 "fit": clean(r.fit.to_dict()) if r.fit is not None and r.converged else None,
                 "robust": clean(r.robust.to_dict()) if r.robust is not None and r.converged else None}
                for name, r in zip(self.names, self.results)
            ],
            "tests": [t.to_dict() for t in self.tests],
            # ordinal fits: the tests' delta_cfi and delta_rmsea are null, and why
            "fit_index_changes_left_out": ORDINAL_FIT_CHANGE_WHY if self.results[0].method.ordinal else None,
            "change_guides_apply": self.change_guides_apply,
            "design": self.results[0].design.to_dict() if self.results[0].design is not None else None,
            "not_nested": [dict(first=n.first, second=n.second, reason=n.reason,
                                information_criteria_comparable=n.information_criteria,
                                equivalent=n.equivalent) for n in self.not_nested],
            # how the models coded answers recorded as words (one coding for all: refuse_different_codings), as fit's
            # JSON has it
            **({"data": {"answer_coding": coding_json(self.results[0].data.answer_coding)}}
               if getattr(self.results[0].data, "answer_coding", ()) else {}),
        }


def compare(models: list[str | Path | Spec], data: pd.DataFrame | str | Path, group: str | None = None,
            reference_group: str | None = None, sheet: str | None = None, names_row: int | None = None, first_data_row: int | None = None, missing_codes: tuple[float, ...] = (),
            keep: tuple[str, ...] | list[str] = (), rename: ColumnRenames = None, ordinal: str | list[str] | None = None,
            ordinal_estimator: str | None = None, weights: str | None = None, cluster: str | None = None,
            strata: str | None = None, weight_kind: str | None = None, id_column: str | None = None,
            **options: object) -> Comparison:
    """Fit every model to the same rows and test each nested pair.

    Rows with gaps are kept as ``fit`` keeps them: with missing answers every model is fitted by
    full-information ML to the rows that answer some of each model's variables (the chi-square difference of
    two such fits is a likelihood-ratio test under missingness at random; Little & Rubin 2002), and with
    ``missing='listwise'`` to the rows complete on every model's variables.

    A sampling design (``weights``, ``cluster``, ``strata``, ``weight_kind``, as for ``fit``) weights every
    fit and makes the difference tests the scaled ones of the design-based statistics.

    With ordinal items (an 'ordinal' statement in any model, or ``ordinal``) every model is fitted
    by least squares on thresholds and polychoric correlations and nested pairs get the adjusted
    difference test.

    ``id_column``: the column that names each row (never analysed), beside the row numbers of the cautions about
    rows, as for ``fit``."""
    if isinstance(models, (str, Spec)) or not hasattr(models, "__iter__"):
        raise OptionError("compare takes a list of models (model files, model texts or parsed models)")
    models = list(models)
    if len(models) < 2:
        raise OptionError("comparing needs at least two models")
    # each model's reliability, so that the keying its loadings contradict is a problem of its solution, first, as in
    # fit (assessment.reliability.keying_problems); not the other diagnostics
    fit_options = replace(make_options(options, COMPARE_KEYWORDS), diagnostics=False, reliability=True)
    design = design_columns(weights, cluster, strata, weight_kind)
    specs = [load_spec(m) for m in models]
    _no_model_twice(specs)
    names = _unique_names(specs)
    _same_item_types(specs, names, [ordinal_items_of(spec, ordinal) for spec in specs])
    ordinal_items = set().union(*(ordinal_items_of(spec, ordinal) for spec in specs))
    specs = [with_ordinal_levels(spec, ordinal_items) for spec in specs]
    ordinal_estimator = ordinal_estimator_option(ordinal_estimator, ordinal_items)
    if design is not None and not ordinal_items:  # ordinal items always get sandwich errors and adjusted tests
        fit_options = design_test(fit_options, design)
    group_column(group)
    if summary_source(data):
        refuse_row_options(f"'{data}'", sheet, missing_codes, keep, group, id_column, names_row=names_row,
                           first_data_row=first_data_row, rename=rename)
        for spec in specs:  # an estimator without ordinal items is refused above
            refuse_for_summary(spec, f"'{data}'", ordinal)
        if design is not None:
            raise OptionError(f"summary statistics hold no rows, so a {design.names[0][0]} column cannot apply; give the "
                              f"raw data")
        return _some_estimated(_compare_summary(specs, names, data, fit_options, group))
    refuse_different_codings(specs, names)
    refuse_different_joins(specs, names)
    _, loaded, notes = read_inputs_with_notes(specs[0], data, sheet, missing_codes, keep,
                                              (id_column,) if isinstance(id_column, str) else (),
                                              items={x for spec in specs for x in spec.observed_names}, names_row=names_row, first_data_row=first_data_row,
                                              rename=rename, chosen=chosen_columns(group, id_column, design=design),
                                              keeps_gaps=keeps_rows_with_gaps(fit_options.missing))
    used = list(dict.fromkeys(x for spec in specs for x in spec.observed_names))  # in the models' order, as named
    id_rows = rows_named(loaded, id_column, used, group)  # (ids, their column), which the cautions about rows give
    if design is not None:  # the weights parsed once, as fit parses them, for the check and the groups weighted out
        loaded = replace(loaded, weights=design_weights(loaded.frame, design, tuple(used), group, loaded.source))
    frame, source = loaded.frame, loaded.source
    at = np.arange(len(frame))  # each compared row's place among the rows read, where its parsed weight is
    coded = set(specs[0].observed_names)  # items of the later models only, each once: their answer words as codes
    for spec in specs[1:]:
        named = check_columns(spec, list(frame.columns), source, loaded.sheet_hint(), chosen_columns(group, id_column, design=design))
        notes = list(notes) + [n for n in named if n not in notes]
        frame, coding_notes = code_answer_words(spec, frame, source, tuple(x for x in spec.observed_names if x not in coded),
                                                missing_codes=missing_codes_option(missing_codes),  # as fit reads them
                                                value_labels=loaded.value_labels)
        coded |= set(spec.observed_names)
        notes = list(notes) + coding_notes
        check_declared_ranges(spec, frame, source, loaded.value_labels)  # every model's 'reversed ... on' scale
    without_group = 0
    if group is not None and group in frame.columns:  # rows without a group value: left out, and said
        labelled = has_group(frame, group)  # the one rule of groups: a cell of invisible characters alone has none
        without_group = int((~labelled).sum())
        frame, at = frame.loc[labelled], at[labelled]
        # the labels' notes of the rows read, as fit gives them (pipeline.inputs.moments_for): a cell of invisible
        # characters alone is named there, its row among those without a group
        notes = list(notes) + _no_group_notes(without_group, group, len(labelled)) + label_notes(loaded.frame, group)
    # values that look like no answers in any model's items, among the rows compared: first in the report, and
    # named first when a fit fails
    loaded = replace(loaded, odd_values=odd_values(frame, used, row_numbers(frame)))
    with odd_values_named(loaded):
        pairwise = False
        few: tuple[str, ...] = ()  # items of few answer categories analysed as continuous
        if ordinal_items:
            if fit_options.missing is MissingData.FULL_INFORMATION or fit_options.test is FitTest.YUAN_BENTLER:
                raise OptionError("ordinal items are compared on every answer (pairwise present rows, as fit uses them) or "
                                  f"on the complete rows ({Option.INCOMPLETE_ROWS.given('listwise')}); full-information "
                                  f"ML and its Yuan-Bentler test are for continuous items")
            pairwise = fit_options.missing is not MissingData.LISTWISE
        else:
            fit_options, missing_notes = choose_missing_handling(fit_options, frame, tuple(used), None, design=design)
            few, few_note = few_categories(frame, tuple(used))
            notes = list(missing_notes) + few_note + list(notes)
        # the rows every model can use with full-information ML or pairwise present rows: some answers to each
        answers = [frame[list(spec.observed_names)].notna().to_numpy().any(axis=1) for spec in specs]
        some = np.logical_and.reduce(answers)
        unanswered = int((~some).sum())  # of the rows listwise deletion leaves out, those no method keeps
        if fit_options.missing is MissingData.FULL_INFORMATION or pairwise:
            kept = some
        else:
            kept = frame[used].notna().to_numpy().all(axis=1)
        complete, at = frame.loc[kept], at[kept]
        dropped = len(loaded.frame) - len(complete) - without_group  # rows with missing answers (or none)
        if design is not None:
            complete, design_notes = check_design(complete, design, tuple(used), group, source,
                                                  loaded.weights[at] if loaded.weights is not None else None)
            notes = list(notes) + design_notes
        if ordinal_items:
            found = _compare_ordinal(specs, names, complete, source, group, reference_group,
                                     replace(fit_options, missing=None if pairwise else MissingData.LISTWISE),
                                     ordinal_items, ordinal_estimator, dropped, design, pairwise, notes)
            reference_group_applies(found.results, reference_group)
            found = replace(found, notes=tuple(found.notes) + tuple(reference_note(found.results, complete, group,
                                                                                   reference_group)))
            found = _some_estimated(_with_data_problems(found, loaded, specs, group, design, dropped, pairwise, True,
                                                        id_rows, unanswered))
            return replace(found, results=tuple(with_missing_reading(r, loaded, missing_codes) for r in found.results),
                           without_group=without_group)
        for spec, name in zip(specs, names):  # every model's, before any moments or fit
            with estimation_of(f"model {name}"):
                refuse_large_robust_route(spec, fit_options, design)
        results = []
        data_groups = []
        for spec, name in zip(specs, names):
            groups, _ = moments_for(spec, complete, source, group, reference_group, fit_options.missing, design=design)
            data_groups.append(groups)
            with estimation_of(f"model {name}"):
                try:
                    result = fit_moments(spec, groups, fit_options, group_column=group)
                except NotIdentified as failure:  # reported among the others, as one that does not converge is
                    result = unestimated(spec, groups, fit_options, group, failure)
            result = with_missing_reading(_described(result, spec, tuple(label for label, _ in groups)
                                                     if group is not None else None), loaded, missing_codes)
            mine = tuple(x for x in few if x in spec.observed_names)  # the methods text names them
            result = replace(result, data=replace(result.data, few_categories=mine)) if mine else result
            results.append(with_design(result, design_summary(complete, design, [m for _, m in groups], [g for g, _ in groups]),
                                       [m for _, m in groups])
                           if design is not None else result)
        reference_group_applies(results, reference_group)
        notes = list(notes) + reference_note(results, complete, group, reference_group)
        tests, not_nested = _pairwise_tests(specs, names, results, data_groups)
        normal_fits = all(r.robust is None for r in results if r.converged)
        normal_theory = bool(tests) and normal_fits
        heavy, unjudged, tails, cautioned = _tails(names, results, data_groups, group is not None, normal_fits,
                                                   tests)
        if not normal_theory:  # no difference test: nothing rests on normal tails but the fits' own figures
            heavy, unjudged, cautioned = (), (), ()
        if unjudged:
            notes = list(notes) + [tails_not_judged_note(unjudged)]
        return _some_estimated(_with_data_problems(Comparison(tuple(names), tuple(results), tuple(tests),
                                                              tuple(not_nested), len(complete), dropped,
                                                              fit_options.missing, tuple(notes), tails,
                                                              without_group=without_group, heavy_tails=heavy,
                                                              heavy_tails_cautioned=cautioned),
                                                   loaded, specs, group, design, dropped, False, False, id_rows,
                                                   unanswered))


def _tails(names, results, data_groups, grouped: bool, normal_fits: bool, tests):
    """The answers' tails judged once for each set of items the models hold (fixleft s26: judged on the first model's
    items alone; models of the same items, as nested ones are, share one judgement, said without naming them), by
    Mardia's (1970) kurtosis (workflows.nesting.heavy_tailed_groups): (every group heavier-tailed than normal, the
    groups not judged, the cautions on answers far from normal under normal-theory fits as fit gives them
    (assessment.admissibility.non_normal_problems), and the heavy-tailed groups the caution on the difference tests
    names: those without a caution of their own, whose caution says what the tails do to the differences instead,
    so that nothing is said twice (workflows.nesting.tails_said_once))."""
    if not normal_fits:
        return (), (), (), ()
    labels = tuple(label for label, _ in data_groups[0]) if grouped else None
    sets: dict[tuple[str, ...], list[int]] = {}
    for k, groups in enumerate(data_groups):
        sets.setdefault(tuple(groups[0][1].names), []).append(k)
    decided = REJECTED_RESTRICTION if any(rejects(t) for t in tests) else None
    heavy, unjudged, tails, cautioned = [], [], [], []
    for models in sets.values():
        items = f"on the items of {word_list([names[k] for k in models])}" if len(sets) > 1 else ""
        found, left, judged = heavy_tailed_groups([m for _, m in data_groups[models[0]]], labels, items)
        problems = non_normal_problems(judged, None, results[0].method, f" {items}" if items else "")
        apart, problems = tails_said_once(found, judged, problems, decided)
        heavy += found
        unjudged += left
        tails += problems
        cautioned += apart
    return tuple(heavy), tuple(unjudged), tuple(tails), tuple(cautioned)


def _some_estimated(found: Comparison) -> Comparison:
    """``found`` when at least one model could be estimated (the others are reported as such among them, problems
    first); otherwise the EstimationError that says why of each, as fit stops on a model it cannot estimate."""
    if any(r.converged for r in found.results):
        return found
    from cfa_tool.assessment.admissibility import WHY_NOT_ESTIMATED, ProblemKind

    def why(r: FitResult) -> str:
        small = "".join(f"{p.explanation} " for p in r.problems
                        if p.kind in (ProblemKind.SMALL_SAMPLE, ProblemKind.SMALL_GROUP))
        identified = not any(p.kind in WHY_NOT_ESTIMATED for p in r.problems)
        return small + (f"the estimation did not converge ({r.message})" if identified else r.message)

    raise NoneEstimated("no model could be estimated, so nothing is compared: " + "; ".join(
        f"model {name}: {why(r)}" for name, r in zip(found.names, found.results)), found)


class NoneEstimated(EstimationError):
    """No model of a comparison could be estimated; ``comparison``: the comparison, whose results a route that
    compares models of its own (workflows.occasions) says in its words (s28: the ladder over occasions advised
    'start' statements, which it refuses, in compare's message)."""

    def __init__(self, message: str, comparison: Comparison):
        self.comparison = comparison
        super().__init__(message)


#: the keywords of :func:`compare` besides the fit options it passes on (an unknown keyword's near names,
#: make_options), read from its signature once
COMPARE_KEYWORDS = own_keywords(compare)


def _with_data_problems(found: Comparison, loaded, specs, group, design, dropped: int, pairwise: bool,
                        ordinal: bool, named: tuple[dict, str | None] = ({}, None), unanswered: int = 0) -> Comparison:
    """The comparison with the cautions on the data (pipeline.inputs.data_problems, as fit gives them): each model's
    own before its problems (its declared scales, its items judged by its fit's coverage), and all of them once in
    the comparison's, then the ``dropped`` rows listwise deletion left out of every model
    (pipeline.continuous.listwise_problem), of which ``unanswered`` answered none of some model's variables.
    ``named``: the rows' ids and their column (pipeline.inputs.rows_named)."""
    results, found_all = [], []
    for r, spec in zip(found.results, specs):
        coverage = (r.missing_data or {}).get("coverage", {})
        own = data_problems(loaded, spec, group, design, named[0], names=tuple(spec.observed_names),
                            coverage=coverage, n_obs=r.n_obs,
                            listwise=found.missing is MissingData.LISTWISE and not pairwise, id_column=named[1])
        found_all += own
        results.append(replace(r, problems=solution_first(tuple(p for p in own if p not in r.problems)
                                                          + tuple(r.problems))))
    if found.missing is not MissingData.FULL_INFORMATION and not pairwise and dropped:  # after the data's, as in fit
        left = listwise_problem(dropped, found.n_obs + dropped, " from every model",
                                pairwise_instead() if ordinal else full_information_instead(), unanswered)
        found_all += [left] if left is not None else []
    elif dropped:  # full-information ML or pairwise present rows: rows that answered none of some model's variables
        left = unanswered_problem(dropped, found.n_obs + dropped, what="none of some model's variables")
        found_all += [left] if left is not None else []
    # the data's cautions, then those the comparison found of its answers (answers far from normal)
    return replace(found, results=tuple(results), problems=tuple(dict.fromkeys(found_all + list(found.problems))))


def _compare_ordinal(specs, names, complete, source, group, reference_group, fit_options, ordinal_items, method,
                     dropped, design=None, pairwise: bool = False, notes=()) -> Comparison:
    from cfa_tool.workflows.ordinal_compare import fit_ordinal_models, ordinal_difference_test

    estimations, results = fit_ordinal_models(specs, complete, source, group, reference_group, fit_options,
                                              ordinal_items, method, design, pairwise)
    results = [_described(r, spec, tuple(g.label for g in r.groups) if group is not None else None, ordinal_items)
               for r, spec in zip(results, specs)]
    def test_pair(a: int, b: int) -> tuple[list[DifferenceTest], str]:
        test, reason = ordinal_difference_test(estimations[a], estimations[b], results[a], results[b], names[a], names[b])
        return ([test] if test is not None else []), reason

    tests, not_nested = _each_pair(names, results, test_pair, specs, likelihood=False)
    return Comparison(tuple(names), tuple(results), tuple(tests), tuple(not_nested), len(complete), dropped,
                      MissingData.PAIRWISE if pairwise else MissingData.LISTWISE, tuple(notes))


def _compare_summary(specs, names, path, fit_options, group) -> Comparison:
    """Rival models fitted to one summary-statistics file (normal-theory tests only)."""
    if group is not None:
        raise OptionError("groups need raw data; a summary-statistics file describes one group")
    if fit_options.test is not FitTest.NORMAL:
        raise OptionError("summary statistics allow only the normal-theory test")
    moments, notes = read_summary_file(path)
    results = []
    for spec, name in zip(specs, names):
        check_columns(spec, list(moments.names), moments.source)
        with estimation_of(f"model {name}"):
            try:
                fitted = fit_moments(spec, moments, fit_options)
            except NotIdentified as failure:  # reported among the others, as with rows of data
                fitted = unestimated(spec, moments, fit_options, None, failure)
            results.append(_described(of_summary_statistics(fitted, moments, ()), spec, None))
    tests, not_nested = _pairwise_tests(specs, names, results, [[(None, moments)]] * len(specs))
    return Comparison(tuple(names), tuple(results), tuple(tests), tuple(not_nested), moments.n_obs, 0,
                      notes=tuple(notes))


def _pairwise_tests(specs, names, results, data_groups) -> tuple[list[DifferenceTest], list[NotNested]]:
    def structure(k: int):
        """Model k's parameter table, index arrays and likelihood on its rows, laid out as its fit was."""
        labels = tuple(label for label, _ in data_groups[k]) if results[k].multigroup else None
        fiml = results[k].method.full_information
        table, model = model_structure(specs[k], labels, fiml)
        moments = [ordered_moments(m, table.observed) for _, m in data_groups[k]]
        return table, model, full_information_likelihood(model, moments) if fiml else NormalLikelihood(model, moments)

    def test_pair(a: int, b: int) -> tuple[list[DifferenceTest], str]:
        nested, reason, m10 = is_nested(results[a], specs[b], results[b])
        if not nested:
            return [], reason
        tests = [difference_test(results[a], results[b], names[a], names[b])]
        if results[a].robust is not None and results[b].robust is not None:
            general = results[b]
            fiml = general.method.full_information
            table, model, likelihood = structure(b)
            # the nesting check fitted M10 already in the fit's own layout: its estimates start the search there
            start = m10.theta if len(m10.theta) == table.n_free else general.theta
            at = scaling_at_restricted(results[a], table, model, likelihood, start, general.fit.df,
                                       structure(a)[2] if fiml else None)
            tests.extend(scaled_difference_tests(results[a], general, names[a], names[b], at.general, at.why_not,
                                                 restricted_scaling=at.restricted))
        return tests, ""

    return _each_pair(names, results, test_pair, specs, likelihood=True)


def _each_pair(names, results, test_pair, specs, likelihood: bool) -> tuple[list[DifferenceTest], list[NotNested]]:
    """Every pair of models, the one with more degrees of freedom first (the candidate restricted model):
    ``test_pair(a, b)`` gives its difference tests, or none and the reason they are not nested.  Models
    of different variables are not compared at all: their statistics describe different data.
    ``likelihood``: the fits are maximum-likelihood fits, whose AIC and BIC exist."""
    tests: list[DifferenceTest] = []
    not_nested: list[NotNested] = []
    for i in range(len(results)):
        for j in range(i + 1, len(results)):
            a, b = (i, j) if _df(results[i]) >= _df(results[j]) else (j, i)
            different = _different_variables(specs[a], specs[b], names[a], names[b])
            if different:
                not_nested.append(NotNested(names[a], names[b], different, information_criteria=False))
                continue
            if not (results[a].converged and results[b].converged):
                failed = [names[k] for k in (a, b) if not results[k].converged]
                not_nested.append(NotNested(names[a], names[b], f"{word_list(failed)} could not be estimated",
                                            information_criteria=False))
                continue
            found, reason = test_pair(a, b)
            if found:
                boundary = boundary_of(specs[a], results[a], specs[b], results[b])
                tests.extend(boundary.mark(t) for t in found)
            else:
                why = _no_information_criteria(results[a], results[b], likelihood)
                not_nested.append(NotNested(names[a], names[b], reason + (f"; {why}" if why else ""),
                                            information_criteria=not why,
                                            equivalent=probably_equivalent(results[a], results[b])))
    return tests, not_nested


def _no_information_criteria(first: FitResult, second: FitResult, likelihood: bool) -> str:
    """Why AIC and BIC cannot compare two fits ('' when both have them): the one rule every view and the JSON
    follow (least-squares fits of ordinal items have no likelihood; a fit weighted by sampling weights has only a
    pseudo-likelihood, so its AIC and BIC are not defined)."""
    if not likelihood:
        return "AIC and BIC do not exist for least-squares fits of ordinal items, so no information criterion compares them either"
    if any(r.fit is None or r.fit.aic is None or r.fit.bic is None or not (np.isfinite(r.fit.aic) and np.isfinite(r.fit.bic))
           for r in (first, second)):
        weighted = any(r.design is not None and r.design.columns.weights is not None for r in (first, second))
        return (("AIC and BIC are not defined for fits weighted by sampling weights (a weighted likelihood is a "
                 "pseudo-likelihood)" if weighted else "AIC and BIC are not defined for these fits")
                + ", so no information criterion compares them either")
    return ""


def _different_variables(first: Spec, second: Spec, first_name: str, second_name: str) -> str:
    """Why two models cannot be compared at all ('' when they use the same variables)."""
    a, b = set(first.observed_names), set(second.observed_names)
    if a == b:
        return ""

    def listed(names: set[str]) -> str:
        shown = sorted(names)[:5]
        return ", ".join(shown) + (", ..." if len(names) > 5 else "")

    parts = []
    if a - b:
        parts.append(f"{listed(a - b)} only in {first_name}")
    if b - a:
        parts.append(f"{listed(b - a)} only in {second_name}")
    return (f"the models use different variables ({'; '.join(parts)}), so they describe different data: no test, fit "
            f"index difference, AIC or BIC compares them")


def _df(result: FitResult) -> float:
    return result.fit.df if result.fit is not None else float("-inf")


def _same_item_types(specs: list[Spec], names: list[str], ordinal: list[set[str]]) -> None:
    """Refuse models that treat a shared item differently (ordinal in one, continuous in another): they then
    describe different data, and fitting the continuous one as ordinal would change it silently."""
    for i, first in enumerate(specs):
        for j in range(i + 1, len(specs)):
            shared = set(first.observed_names) & set(specs[j].observed_names)
            one, other = ordinal[i] & shared, ordinal[j] & shared
            if one != other:
                ordinal_in, continuous_in = (i, j) if one - other else (j, i)
                items = sorted((one ^ other), key=specs[ordinal_in].observed_names.index)
                shown = cut_list(items, 4)
                raise OptionError(f"the models {_named(specs[ordinal_in], names[ordinal_in])} and "
                                  f"{_named(specs[continuous_in], names[continuous_in])} treat {shown} differently "
                                  f"(ordinal in the first, continuous in the second), so they describe different data "
                                  f"and cannot be compared; declare the same 'ordinal' items in every model")


def _named(spec: Spec, name: str) -> str:
    """A model as the comparison calls it, with its file when the name is its title."""
    source = Path(spec.source).name
    return f"'{name}'" if Path(spec.source).stem == name or not spec.source else f"'{name}' ({source})"


def _no_model_twice(specs: list[Spec]) -> None:
    """Refuse a model given twice (the same file, or files of the same text): its comparison with itself tests
    nothing and reads as 'probably equivalent models', a slip for another model (hostile tester, sixteenth round)."""
    seen: dict[str, Spec] = {}
    for spec in specs:
        text = "\n".join(line.rstrip() for line in spec.text.strip().splitlines())
        if text in seen:
            first = seen[text]
            where = (f"'{printable(first.source)}' is given twice" if first.source == spec.source else
                     f"'{printable(first.source)}' and '{printable(spec.source)}' hold the same model text")
            raise OptionError(f"{where}: a model compared with itself tests nothing; give the other model you meant")
        seen[text] = spec


def _unique_names(specs: list[Spec]) -> list[str]:
    """Each model's name: its title, else its file's name; models of one title are told apart by their files
    ('three factors (invm)'), and by a number only when the files do not differ either."""
    first = [spec.title or Path(spec.source).stem for spec in specs]
    names = []
    for spec, name in zip(specs, first):
        if first.count(name) > 1 and spec.title and Path(spec.source).stem not in ("", "<model text>"):
            name = f"{name} ({Path(spec.source).stem})"
        base, k = name, 2
        while name in names:
            name = f"{base} ({k})"
            k += 1
        names.append(name)
    return names
