"""Cautions on what the row filters (--keep, keep=...) did to the sample, first in every view of every command that
takes them (composed with the data's other cautions by pipeline.inputs.data_problems): a filter that selects rows by
their answers to a model item, a filter whose value label several codes of the column carry, and one half (--half) of
halves drawn from a handful of clusters, with the halves of such clusters that replicate and explore draw."""

from __future__ import annotations

from cfa_tool.assessment.admissibility import Problem, ProblemKind
from cfa_tool.data.filter_text import filter_text
from cfa_tool.data.filters import merged_exclusions, quoted_filter
from cfa_tool.numbers import number, word_list
from cfa_tool.data.readers import LoadedData
from cfa_tool.errors import printable
from cfa_tool.language.spec import Spec
from cfa_tool.options import Option


def row_filter_problems(loaded: LoadedData, spec: Spec | None = None,
                        items: tuple[str, ...] | None = None, where: str = "") -> tuple[Problem, ...]:
    """The cautions on ``loaded``'s row filters (data.filters.RowFilter, as apply_filters counted them), in the
    filters' order: :func:`selected_on_item` for a filter on an item of ``spec`` (or, without a model, one of the
    ``items`` explored) that left out some of its answers (:func:`selections_on_items`), :func:`label_of_several_codes`
    for one whose label several codes carry.  ``where``: which of several files filtered alike the cautions are about
    (' on the calibration data (spring.csv)'; '' for one file)."""
    analysed = spec.observed_names if spec is not None else (items or ())
    # several '!=' of one column as their one list, as the notes and the methods paragraph say them
    filters = [f for f, _ in merged_exclusions(list(loaded.row_filters))]
    on_items = selections_on_items(filters, analysed)
    found: list[Problem] = []
    said: set = set()
    for f in filters:
        if f in on_items and f.column not in said:  # an item's filters as one caution, at the place of its first
            said.add(f.column)
            found.append(selected_on_item([g for g in on_items if g.column == f.column], spec, where))
        for one in f.members or (f,):  # a list's values each as its own comparison (data.filters.SET_OPERATORS)
            if one.shared:
                found.append(label_of_several_codes(one, where))
            if one.other_case:
                found.append(labels_by_case(one, where))
        if getattr(f, "units", ()):  # one half of a halves file drawn by cluster (data.halves.HalfRows)
            found += few_clusters_problems(f.units, f.cluster_column, f.explored, f.strata_column or None,
                                           f"{f.phrase()} of {f.halves_file}{where}")
    return tuple(found)


def few_clusters_problems(units: tuple[int, ...], cluster: str | None, explored: bool, strata: str | None = None,
                          analysed: str = "") -> tuple[Problem, ...]:
    """The caution, first in every view, of random halves drawn cluster by cluster from a handful of clusters
    (data.halves.few_clusters_caution: the one rule of replicate --data and explore --split, ``explored``, and of one
    half of their file read back, ``analysed`` naming it), as a problem of its own kind; () with enough clusters or
    without them (hostile s24b: two districts made two 'random halves' of one district each)."""
    from cfa_tool.data.halves import few_clusters_caution

    words = few_clusters_caution(units, cluster, explored, strata, analysed) if cluster and units else None
    if words is None:
        return ()
    return (Problem(ProblemKind.HALVES_OF_FEW_CLUSTERS, (), float(sum(units)), *words),)


def selections_on_items(filters, analysed) -> tuple:
    """The row ``filters`` (data.filters.RowFilter, as apply_filters counted them) that select rows by their answers
    to one of the ``analysed`` items and left out some of its answers: the one rule of the range-restriction caution
    (:func:`selected_on_item`) and of the methods paragraph's sentence on it."""
    return tuple(f for f in filters if f.column in analysed and f.dropped)


def selected_on_item(filters, spec: Spec | None, where: str = "") -> Problem:
    """Row ``filters`` (one, or several on the same column) that select rows by their answers to a model item: among
    the rows kept the item's answers spread differently (a cut at one end narrows them), which changes its
    correlations with the other items and so its loading, its factor's variance and the factor's reliability: range
    restriction, a textbook effect (Pearson 1903; Thorndike 1949, recalled from memory).  The rows are analysed as
    kept: the population may be meant so.  Several filters of one item are one caution naming the range they keep
    (data.filters.kept_range_words), as the methods paragraph names it (s21: one caution per filter).  ``where``: the
    file, as :func:`row_filter_problems` takes it."""
    from cfa_tool.data.filters import kept_range_words

    filters = list(filters) if isinstance(filters, (list, tuple)) else [filters]
    f = filters[0]
    item = f.column
    dropped = sum(g.dropped for g in filters)
    factors = ([factor.name.text for factor in spec.factors if any(i.text == item for i in factor.indicators)]
               if spec is not None else [])
    of = word_list(printable(name) for name in factors)
    what = (f"the loading of '{printable(item)}', the variance of {of} and the reliability (omega) of {of}" if factors
            else f"the loadings of '{printable(item)}'")
    several = len(filters) > 1
    which = (f"Row filters {word_list(quoted_filter(g) for g in filters)}{where} select" if several else
             f"Row filter {quoted_filter(f)}{where} selects")
    kept = f", keeping those where {kept_range_words(filters)}" if several else ""
    return Problem(
        ProblemKind.SELECTED_ON_ITEM, (), float(dropped),
        f"{which} rows by their answers to '{printable(item)}', "
        f"{f'an item of {of}' if factors else 'one of the items analysed'}{kept}: {'they' if several else 'it'} "
        f"left out {dropped} row{'s' if dropped != 1 else ''} with an answer to it. Among the rows kept the "
        f"item's answers spread differently (a cut at one end narrows them), which changes its correlations with the "
        f"other items (range restriction, a textbook effect: Pearson 1903, Thorndike 1949; recalled from memory): "
        f"{what} describe the rows kept, not the sample, and usually come out smaller.",
        f"select rows by a column that is not {'in the model' if factors else 'among the items'} (a district, a "
        f"wave, a date); if the population studied is "
        f"defined by the answers to '{printable(item)}', say in the report that the item's range was restricted by "
        f"the selection.")


def label_of_several_codes(f, where: str = "") -> Problem:
    """A row filter comparing the value labels of a coded column (SPSS, Stata) with a label that several codes
    carry (1 and 3 both 'north'): it keeps (or, with '!=', leaves out) the rows of every such code, as the group
    column reads them as one group (data.labels.label_notes).  A caution, not a refusal: the data file says the codes
    mean the same, and the researcher can filter by one code (a number compares with the codes) when they do not.
    ``where``: the file, as :func:`row_filter_problems` takes it."""
    codes = [f"{printable(code)} ({n} row{'s' if n != 1 else ''})" for code, n in f.shared]
    listed = word_list(codes)
    did = "kept" if f.operator == "=" else "left out"
    column = printable(f.column)
    first = f.shared[0][0]
    by_code = filter_text(f.column, f.operator, number(first) if number(first) is not None else first) or \
        f"{column} {f.operator} {first}"  # the one writer of a filter (data.filter_text): a code, compared as one
    both = "both" if len(f.shared) == 2 else "all"
    return Problem(
        ProblemKind.FILTER_LABEL_OF_SEVERAL_CODES, (), float(len(f.shared)),
        f"Row filter {quoted_filter(f)}{where} compares the value labels of '{column}', and codes {listed} {both} carry "
        f"the label '{printable(str(f.value))}': the filter {did} the rows of every one of them.",
        f"if the codes are different categories, filter by a code ({Option.KEEP.given(by_code)}"
        f" compares the codes themselves) or give the codes different value labels in the data file; if they are one "
        f"category, nothing needs changing.")


def labels_by_case(f, where: str = "") -> Problem:
    """A row filter comparing text that the column also holds written in other upper and lower case ('district =
    north' with 'North' in 63 rows): a filter matches text exactly, so those rows are treated as another value (left
    out by '=', kept by '!='), as the group column keeps such labels apart (pipeline.inputs.group_case_problems):
    only the researcher knows whether they are one.  A caution first, not a silent choice either way.  ``where``: the
    file, as :func:`row_filter_problems` takes it."""
    listed = word_list(f"'{printable(label)}' ({n} row{'s' if n != 1 else ''})" for label, n in f.other_case)
    column = printable(f.column)
    them = "it" if len(f.other_case) == 1 else "them"
    did = f"left {them} out" if f.operator == "=" else f"kept {them}"
    return Problem(
        ProblemKind.FILTER_LABELS_BY_CASE, (), float(sum(n for _, n in f.other_case)),
        f"Row filter {quoted_filter(f)}{where} matches text exactly, upper and lower case included, and '{column}' also "
        f"holds {listed}, which differ{'s' if len(f.other_case) == 1 else ''} from '{printable(str(f.value))}' only in "
        f"case: the filter {did}.",
        f"if they are one value, recode '{column}' in a copy of the file so that they are written alike; if they are "
        f"different values, nothing needs changing.")
