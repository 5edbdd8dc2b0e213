"""Spec (+ groups) -> parameter table.

Matrices of each group (the "all-latent" form of a confirmatory model,
Bollen 1989, ch. 7; Sorbom 1974 for the mean structure):

* ``L`` (p x m): loadings of observed indicators on factors;
* ``B`` (m x m): loadings of factors on higher-order factors (row = lower factor);
* ``P`` (m x m, symmetric): factor variances and covariances (for a factor
  below a higher-order factor: its disturbance variance);
* ``T`` (p x p, symmetric): residual (error) variances and covariances;
* ``N`` (p): indicator intercepts and ``M`` (m): factor means, with groups only;
* ``K``: thresholds of ordinal items (all steps of all ordinal items, stacked),
  with groups only; they enter no moment matrix (see :mod:`cfa_tool.estimation.least_squares`).

Implied moments: Sigma = L A P A' L' + T and mu = N + L A M, A = (I - B)^-1.

Each matrix entry is an affine function of the free-parameter vector theta:
``value = offset + sum(coef * theta[index])``.  Plain free parameters have one
coefficient 1, equal parameters (within or across groups) share an index,
fixed parameters have none, and effects coding writes one loading as
``n - sum(other loadings)`` (Little, Slegers & Card 2006).  A 'reversed' statement orients factors:
marker scaling passes over a declared-reversed first item (:func:`marker_of`), and effects coding
averages the keyed loadings (a declared-reversed item's loading counted with its sign turned), so that
each factor points the way of the items not declared reversed.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from enum import Enum
from functools import cached_property
from typing import Callable

import numpy as np

from cfa_tool.numbers import rounded_number, user_number, word_list
from cfa_tool.numerics.plain import journal_decimal
from cfa_tool.suggest import close_names, did_you_mean
from cfa_tool.errors import ModelError, printable
from cfa_tool.options import Option
from cfa_tool.language.checks import all_refs, exogenous_factors
from cfa_tool.language.names import reference_text, written_group, written_name
from cfa_tool.language.spec import (GROUP_EQUALITY_WORDS, INVARIANCE_CLASSES, INVARIANCE_LEVELS, ParameterRef, Spec,
                                    equality_words, fix_sets_scale)

MATRIX_CODES = {"L": 0, "B": 1, "P": 2, "T": 3, "N": 4, "M": 5, "K": 6}


class Unapplied(Enum):
    """A statement that names a parameter which is not free where it names it (:func:`build_parameter_table`
    refuses it): how the error names the statement ('so a start value on it has no effect'), what its advice removes
    ('remove the start value'), and whether that advice may add that the invariance command reads the statement at a
    later step of its ladder (a start on a factor mean fixed at 0 in every group: the ladder frees that mean once the
    intercepts are held equal)."""

    START = ("a start value", "start value", True)
    BOUND = ("a bound", "bound", False)
    NONINVARIANT = ("'noninvariant'", "'noninvariant' statement", False)

    def __init__(self, phrase: str, removed: str, read_at_ladder_step: bool) -> None:
        self.phrase = phrase
        self.removed = removed
        self.read_at_ladder_step = read_at_ladder_step


@dataclass(frozen=True)
class Parameter:
    """One model-matrix entry of one group."""

    kind: str  # loading, factor_variance, factor_covariance, residual_variance, residual_covariance, intercept, mean, threshold
    variables: tuple[str, ...]
    matrix: str
    row: int
    col: int
    terms: tuple[tuple[int, float], ...]  # (index into theta, coefficient)
    offset: float
    origin: str  # "default", "user", "scale" (fixed or tied to give a factor its scale), "exploratory" (a block's echelon zero)
    group: int = 0

    @property
    def free(self) -> bool:
        return bool(self.terms)

    @property
    def label(self) -> str:
        return reference_text(self.kind, self.variables)


@dataclass(frozen=True)
class FixedThroughEquality:
    """A parameter an 'equal' statement holds equal to a fixed one, which is therefore fixed too, at the same value:
    its group, its kind and variables, the fixed parameter's, the value, and whether the fixed one was fixed to set a
    scale (a factor's marker loading, not a 'fix' statement).  Held in the table so that every fit can say so (the model file fixed only
    the other one)."""

    group: int
    kind: str
    variables: tuple[str, ...]
    fixed_kind: str
    fixed_variables: tuple[str, ...]
    value: float
    sets_scale: bool


@dataclass(frozen=True)
class ParameterTable:
    """Which matrix entries of which group are free, fixed or tied, and the free parameters' starts and bounds."""
    observed: tuple[str, ...]
    latent: tuple[str, ...]
    parameters: tuple[Parameter, ...]
    n_free: int
    start: np.ndarray  # theta start values (NaN where the start finder decides)
    lower: np.ndarray
    upper: np.ndarray
    free_labels: tuple[str, ...]  # one label per theta element (its first parameter)
    groups: tuple[str, ...] = ("",)
    mean_structure: bool = False
    multigroup: bool = False
    # (factor, item) of the items a 'reversed' statement declares, for the factors they orient (see keyed_pairs)
    reverse_keyed: frozenset[tuple[str, str]] = frozenset()
    # the parameters an 'equal' statement fixes by holding them equal to a fixed parameter
    fixed_through_equality: tuple[FixedThroughEquality, ...] = ()

    @property
    def p(self) -> int:
        return len(self.observed)

    @property
    def m(self) -> int:
        return len(self.latent)

    @property
    def n_groups(self) -> int:
        return len(self.groups)

    def entry_arrays(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(matrix code, row, col) arrays for all parameters (read-only, built once per table)."""
        return self._entry_arrays

    @cached_property
    def _entry_arrays(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        codes = np.array([MATRIX_CODES[p.matrix] for p in self.parameters], dtype=int)
        rows = np.array([p.row for p in self.parameters], dtype=int)
        cols = np.array([p.col for p in self.parameters], dtype=int)
        for a in (codes, rows, cols):
            a.setflags(write=False)
        return codes, rows, cols

    def group_array(self) -> np.ndarray:
        return self._group_array

    @cached_property
    def _group_array(self) -> np.ndarray:
        groups = np.array([p.group for p in self.parameters], dtype=int)
        groups.setflags(write=False)
        return groups

    @cached_property
    def scaled_by_loadings(self) -> bool:
        """Some factor takes its scale from a marker's fixed loading or from effects coding (the
        scalings that a restart by factor variances can stand in for)."""
        return any(par.origin == "scale" and par.kind == "loading" for par in self.parameters)

    def derived(self, key: str, build: Callable[[ParameterTable], object]) -> object:
        """``build(self)``, computed once per table and kept with it: what modules built on this one
        read from the table's structure (the start finder's plan).  Tables never change, so the
        result never goes stale."""
        memo = self.__dict__.setdefault("_derived", {})  # a frozen dataclass: its __dict__ holds the memo
        if key not in memo:
            memo[key] = build(self)
        return memo[key]

    def mapping(self) -> tuple[np.ndarray, np.ndarray]:
        """(J, offset) with entries = offset + J @ theta (read-only arrays, built once per table)."""
        return self._mapping

    @cached_property
    def _mapping(self) -> tuple[np.ndarray, np.ndarray]:
        J = np.zeros((len(self.parameters), self.n_free))
        offset = np.zeros(len(self.parameters))
        for e, par in enumerate(self.parameters):
            offset[e] = par.offset
            for index, coef in par.terms:
                J[e, index] += coef
        J.setflags(write=False)
        offset.setflags(write=False)
        return J, offset


def _kind_for(matrix: str, same: bool) -> str:
    return {
        "L": "loading",
        "B": "loading",
        "P": "factor_variance" if same else "factor_covariance",
        "T": "residual_variance" if same else "residual_covariance",
        "N": "intercept",
        "M": "mean",
        "K": "threshold",
    }[matrix]


def _fail(spec: Spec, message: str, ref_or_loc) -> ModelError:
    loc = getattr(ref_or_loc, "location", ref_or_loc)
    return ModelError(message, loc, spec.source_line(loc))


def build_parameter_table(spec: Spec, groups: tuple[str, ...] | None = None, mean_structure: bool = False,
                          ordinal: dict[str, int] | None = None) -> ParameterTable:
    """Lay out the matrices and decide which entries are free, fixed or tied.

    ``groups``: group labels for a multi-group model (always with a mean
    structure); None for one group, which has intercepts and factor means
    only when ``mean_structure`` (as full-information ML needs).
    ``ordinal``: with groups, the ordinal items and their numbers of thresholds.
    Their latent responses are identified as Wu & Estabrook (2016) set out:
    intercepts 0 and residual variances 1 in the first group (and in every group
    while the item's thresholds may differ); once thresholds are held equal,
    the other groups' intercepts and (for items with two or more thresholds,
    or with equal loadings and intercepts) residual variances are free; the
    factor means of later groups are free once thresholds, intercepts and a
    loading of one of their ordinal indicators are held equal.
    """
    multi = groups is not None
    means = multi or mean_structure
    if multi and spec.exploratory:
        block = spec.exploratory[0]
        raise _fail(spec, "exploratory blocks are fitted in one group only: their rotation is not held equal across "
                          "groups; fit each group on its own, or declare the factors with 'factor' lines", block.location)
    group_labels = tuple(groups) if multi else ("",)
    G = len(group_labels)
    latent = spec.factor_names
    observed = spec.observed_names
    lat_ix = {n: i for i, n in enumerate(latent)}
    obs_ix = {n: i for i, n in enumerate(observed)}
    exo = exogenous_factors(spec)
    _check_group_use(spec, group_labels, multi, means)
    ordinal = dict(ordinal or {})
    if multi:  # without groups, invariance statements have nothing to hold equal
        _check_threshold_use(spec, ordinal)
        _check_ordinal_intercept_fixes(spec, ordinal, group_labels[0])

    # ---- every entry of every group, keyed (group, kind, names)
    entries: dict[tuple, dict] = {}

    def add(g: int, key: tuple, matrix: str, row: int, col: int, variables: tuple[str, ...]) -> None:
        entries[(g, *key)] = dict(matrix=matrix, row=row, col=col, variables=variables, fixed=None, origin="default")

    zero = {p.key() for p in spec.uncorrelated}
    for g in range(G):
        for factor in spec.factors:
            f = factor.name.text
            for ind in factor.indicators:
                x = ind.text
                if x in lat_ix:
                    add(g, ("loading", (f, x)), "B", lat_ix[x], lat_ix[f], (f, x))
                else:
                    add(g, ("loading", (f, x)), "L", obs_ix[x], lat_ix[f], (f, x))
        for f in latent:
            add(g, ("variance", (f,)), "P", lat_ix[f], lat_ix[f], (f,))
        for x in observed:
            add(g, ("variance", (x,)), "T", obs_ix[x], obs_ix[x], (x,))
        for i, a in enumerate(exo):
            for b in exo[i + 1 :]:
                pair = tuple(sorted((a, b)))
                if pair not in zero:
                    add(g, ("covariance", pair), "P", lat_ix[pair[1]], lat_ix[pair[0]], (a, b))
        for pair in spec.covary:
            a, b = pair.first.text, pair.second.text
            if (g, "covariance", pair.key()) in entries:
                continue
            ix = lat_ix if a in lat_ix else obs_ix
            add(g, ("covariance", pair.key()), "P" if a in lat_ix else "T", max(ix[a], ix[b]), min(ix[a], ix[b]), (a, b))
        if means:
            for x in observed:
                add(g, ("intercept", (x,)), "N", obs_ix[x], 0, (x,))
            for f in latent:
                add(g, ("mean", (f,)), "M", lat_ix[f], 0, (f,))
                entries[(g, "mean", (f,))].update(fixed=0.0)
        position = 0
        for x in observed:
            for step in range(ordinal.get(x, 0)):
                add(g, ("threshold", (x, str(step + 1))), "K", position, 0, (x, str(step + 1)))
                position += 1

    def groups_of(ref: ParameterRef) -> range | list[int]:
        return range(G) if ref.group is None else [group_labels.index(ref.group)]

    def refs_in_order(refs):
        # settings for every group first, then group-specific ones, which override them
        return sorted(refs, key=lambda r: r.group is not None)

    # ---- the user's fixes and frees
    freed: set[tuple] = set()
    released: set[tuple] = set()  # entries a 'free' statement frees (fixed without it): the others are refused below
    for ref in refs_in_order(spec.freed):
        for g in groups_of(ref):
            freed.add((g, *ref.key()))
            if entries[(g, *ref.key())]["fixed"] is not None and ref.kind == "mean":
                entries[(g, *ref.key())].update(fixed=None, origin="user")
                released.add((g, *ref.key()))
    fixed_settings = [(ref, s.value) for s in spec.fixed for ref in s.refs]
    block_factors = spec.exploratory_factors
    fixed_by: dict[tuple, ParameterRef] = {}  # the 'fix' that applies to each entry a 'fix' statement fixes
    for ref, value in sorted(fixed_settings, key=lambda rv: rv[0].group is not None):
        for g in groups_of(ref):  # an exploratory block's echelon zeros orient it: they set no scale
            entries[(g, *ref.key())].update(fixed=value, origin="exploratory" if ref.names[0] in block_factors else "user")
            fixed_by[(g, *ref.key())] = ref

    invariant = _invariant_kinds(spec)
    exceptions = {r.key() for r in spec.noninvariant if r.group is None}  # let differ in every group
    # (group, kind, names) of a parameter set apart in one group ('in group audit: noninvariant intercept(x2)'): its
    # own free value there, the other groups' still held equal among themselves
    set_apart = {(group_labels.index(r.group), *r.key()) for r in spec.noninvariant if r.group is not None} \
        if multi else set()
    if multi:
        _check_set_apart_use(spec, ordinal)
        for ref in spec.noninvariant:
            kind = "threshold" if ref.kind == "threshold" else _entry_kind(entries[(0, *ref.key())])
            if kind not in invariant:
                word = next((w for w, kinds in INVARIANCE_CLASSES.items() if kind in kinds), kind)
                said = (f"in group {written_name(ref.group)}: noninvariant {replace(ref, group=None)}"
                        if ref.group is not None else f"noninvariant {ref}")
                raise _fail(spec, f"'{said}' exempts a parameter from being held equal across groups, but "
                                  f"{equality_words([word])[0]} are not held equal (no 'invariance' level or 'equal "
                                  f"across groups' statement holds them), so it has no effect", ref)

    def tied_across_groups(kind_key: tuple) -> bool:
        kind, names = kind_key
        if kind == "threshold":  # noninvariant threshold(x) releases every threshold of x
            return multi and G > 1 and "threshold" in invariant and (kind, names[:1]) not in exceptions
        return multi and G > 1 and _entry_kind(entries[(0, *kind_key)]) in invariant and kind_key not in exceptions

    def shares(g: int, kind_key: tuple) -> bool:
        """Whether group ``g``'s parameter is held equal to the other groups' that share it: its class held equal
        across groups, and the parameter neither exempted in every group nor set apart in ``g``."""
        return tied_across_groups(kind_key) and (g, *kind_key) not in set_apart

    def tied_with_first(g: int):
        """Whether a parameter of group ``g`` is held equal to the first group's, whose factor means (fixed at 0) and
        variances (under the variance scaling) set the origin and unit the other groups' are estimated against."""
        return lambda kind_key: shares(0, kind_key) and shares(g, kind_key)

    # ---- equal parameters share one index (union-find): the 'equal' statements' ties, read by the scales below too
    parent: dict[tuple, tuple] = {}

    def find(k: tuple) -> tuple:
        while parent.get(k, k) != k:
            k = parent[k]
        return k

    def union(a: tuple, b: tuple) -> None:
        ra, rb = find(a), find(b)
        if ra != rb:
            parent[rb] = ra

    for group in spec.equal:
        for g in groups_of(group[0]):
            keys = [(g, *r.key()) for r in group]
            for k in keys[1:]:
                union(keys[0], k)

    # an entry an 'equal' statement holds equal to one a 'fix' statement fixes is fixed by the user as much as that
    # one: a loading so fixed sets its factor's scale as a 'fix' on it would (none is added), or, at 0, sets none;
    # a factor scaled by its variance (one group) has that variance fixed at 1 as surely as a 'fix' would: an
    # 'equal' that holds another factor's variance to it scales that factor too (hostile s24b: it kept its marker)
    scale_ones = {} if multi else {
        (0, "variance", (f.name.text,)): 1.0 for f in spec.factors if spec.scaling_of(f.name.text) == "variance"
        and entries[(0, "variance", (f.name.text,))]["origin"] != "user"
        and not any(entries[(0, "loading", (f.name.text, i.text))]["origin"] == "user"
                    and entries[(0, "loading", (f.name.text, i.text))]["fixed"] not in (None, 0.0) for i in f.indicators)}
    reached = _reached_by_fixes(find, set(parent) | set(parent.values()), fixed_by, entries, scale_ones)

    # ---- the automatic scale of each factor in each group
    reverse_keyed = keyed_pairs(spec)
    effects: dict[tuple, list[tuple]] = {}  # the tied loading -> the other loadings of its factor
    for g in range(G):
        for factor in spec.factors:
            f = factor.name.text
            load_keys = [(g, "loading", (f, ind.text)) for ind in factor.indicators]
            var_key = (g, "variance", (f,))
            # a loading the model fixes at 0 (an item set apart, as for a nested comparison) sets no scale: the
            # automatic scale is kept and uses the factor's other loadings
            zero = {k for k in load_keys if entries[k]["origin"] == "user" and entries[k]["fixed"] is not None
                    and not fix_sets_scale("loading", entries[k]["fixed"])
                    or k in reached and not fix_sets_scale("loading", reached[k])}
            # (a variance held equal to one fixed at 0, a disturbance, sets no scale: the factor keeps its marker)
            if entries[var_key]["origin"] == "user" or reached.get(var_key, 0) != 0 or any(
                    entries[k]["origin"] == "user" or k in reached for k in load_keys if k not in zero):
                continue
            load_keys = [k for k in load_keys if k not in zero]
            method = spec.scaling_of(f)
            if method == "marker":
                candidates = [k for k in load_keys if k not in freed]
                if not candidates:
                    raise _scale_error(spec, f, "every loading of it is freed or fixed at 0, so no indicator can set "
                                                "its scale")
                keyed = {x for g_, x in reverse_keyed if g_ == f}
                marker, value = marker_of(candidates, keyed)
                entries[marker].update(fixed=value, origin="scale")
                # a freed loading that would have been the marker: its 'free' passes the scale to the next indicator
                released.update(k for k in load_keys if k in freed
                                and marker_of([c for c in load_keys if c not in freed or c == k], keyed)[0] == k)
            elif method == "variance":
                if var_key in freed:
                    raise _scaling_refused(spec, f, f"{_scaling_words(spec, f)} fixes the variance of '{f}' at 1, "
                                                    f"which a 'free' statement frees; keep one of the two")
                # with loadings held equal across groups, only the first group's variance sets the scale
                if g == 0 or not any(tied_with_first(g)(k[1:]) for k in load_keys):
                    if g > 0 and any(shares(g, k[1:]) and any(shares(h, k[1:]) for h in range(G) if h != g)
                                     for k in load_keys):
                        # held equal among the later groups only: each at variance 1 would hold their variances
                        # equal too, an equality the model does not state
                        raise _unit_left_unidentified(spec, factor, group_labels)
                    entries[var_key].update(fixed=1.0, origin="scale")
            else:  # effects coding: loadings average 1
                if multi:
                    every = not any(n.text == f for setting in spec.scaling for n in setting.factors)
                    raise _scaling_refused(spec, f, f"effects coding ({_scaling_words(spec, f)}) is not available "
                                                    f"with groups; scale " + ("the factors by markers or by their "
                                                    "variances" if every else f"'{f}' by a marker or by its variance"))
                if len(load_keys) < 2:
                    raise _scaling_refused(spec, f, f"effects coding ({_scaling_words(spec, f)}) needs at least two "
                                                    f"indicators of '{f}' whose loadings are not fixed at 0")
                effects[load_keys[-1]] = load_keys[:-1]
                entries[load_keys[-1]]["origin"] = "scale"
        # factor means: free outside the first group where the intercepts of their indicators are held equal
        if multi and g > 0:
            for factor in spec.factors:
                f = factor.name.text
                key = (g, "mean", (f,))
                if entries[key]["origin"] == "user":
                    continue
                if _mean_identified(spec, factor, entries, tied_with_first(g), lat_ix, ordinal):
                    entries[key].update(fixed=None, origin="default")
                elif _mean_identified(spec, factor, entries, tied_across_groups, lat_ix, ordinal):
                    raise _mean_left_unidentified(spec, factor, g, group_labels, set_apart)

    if multi:  # after the markers: a marker's loading freed in one group is named as such
        _check_group_frees_held_equal(spec, entries, shares, group_labels, released)

    # ---- latent responses of ordinal items: their location and scale (Wu & Estabrook 2016)
    for x, n_thresholds in ordinal.items():
        thresholds_equal = tied_across_groups(("threshold", (x, "1")))
        intercept_equal = tied_across_groups(("intercept", (x,)))
        loadings_equal = all(tied_across_groups(k[1:]) or entries[k]["fixed"] is not None
                             for k in entries if k[0] == 0 and k[1] == "loading" and k[2][1] == x)
        for g in range(G):
            free_intercept = g > 0 and thresholds_equal and not intercept_equal
            free_scale = (g > 0 and thresholds_equal and not tied_across_groups(("variance", (x,)))
                          and (n_thresholds >= 2 or (intercept_equal and loadings_equal)))
            if entries[(g, "intercept", (x,))]["origin"] != "user" and not free_intercept:
                entries[(g, "intercept", (x,))].update(fixed=0.0, origin="scale")
            if entries[(g, "variance", (x,))]["origin"] != "user" and not free_scale:
                entries[(g, "variance", (x,))].update(fixed=1.0, origin="scale")

    # ---- free indices: equal parameters share one index (the union-find above, ties across groups added here)
    tied_to: dict[tuple, tuple] = {}  # an entry fixed through a tie -> the fixed entry it is tied to
    if multi:
        tied_kinds: set[str] = set()  # kinds of which at least one parameter is held equal across groups
        anchors: dict[tuple, tuple] = {}  # each parameter held equal -> the first group's entry of those sharing it
        for key in entries:  # (entries are laid out group by group, the first group first)
            if not shares(key[0], key[1:]):
                continue
            first = anchors.setdefault(key[1:], key)
            if first != key:
                if entries[key]["fixed"] is None and entries[first]["fixed"] is None:
                    union(first, key)
                    tied_kinds.add(_entry_kind(entries[key]))
                elif key[1] == "mean" and entries[key]["fixed"] is None:
                    # a factor mean identified in this group and held equal: it takes the first group's (fixed) mean
                    entries[key].update(fixed=entries[first]["fixed"], origin="user")
                    tied_to[key] = first
                    tied_kinds.add("mean")
        _check_group_fixes_held_equal(spec, fixed_by, entries, shares, G)
        _check_equalities_hold(spec, tied_kinds)

    group_fixed: dict[tuple, tuple] = {}  # root of a set of tied entries -> the fixed entry among them
    for key, e in entries.items():
        if e["fixed"] is not None:
            other = group_fixed.setdefault(find(key), key)
            if entries[other]["fixed"] != e["fixed"]:  # a marker's 1 held equal to a 'fix' at 0, say: no value holds
                raise _tied_fixes_differ(spec, (other, key), entries, group_labels if multi else None)
    through: list[FixedThroughEquality] = []
    for key in entries:
        root = find(key)
        if root in group_fixed and entries[key]["fixed"] is None:
            if key in effects:
                raise _scale_error(spec, key[2][0], "a loading tied by effects coding cannot also be set equal to a fixed parameter")
            fixed_key = group_fixed[root]
            entries[key]["fixed"] = entries[fixed_key]["fixed"]
            entries[key]["origin"] = "user"
            tied_to[key] = fixed_key
            through.append(FixedThroughEquality(key[0], _entry_kind(entries[key]), tuple(key[2]),
                                                _entry_kind(entries[fixed_key]), tuple(fixed_key[2]),
                                                float(entries[key]["fixed"]), entries[fixed_key]["origin"] == "scale"))

    order = sorted(entries, key=lambda k: _sort_key(k, entries[k]))
    index_of_root: dict[tuple, int] = {}
    free_labels: list[str] = []
    for key in order:
        if entries[key]["fixed"] is not None or key in effects:
            continue
        root = find(key)
        if root not in index_of_root:
            index_of_root[root] = len(index_of_root)
            free_labels.append(_label(key, group_labels if multi else None))
    n_free = len(index_of_root)

    def free_index(ref: ParameterRef, g: int) -> int | None:
        key = (g, *ref.key())
        if key in effects or entries[key]["fixed"] is not None:
            return None
        return index_of_root[find(key)]

    def scale_fixed_everywhere(ref: ParameterRef) -> bool:
        """The parameter is fixed to give a factor its scale (a marker's loading, a factor's variance) or an ordinal
        item's latent response its origin and unit in every group the statement names: a start value, a bound or an
        exemption there would have no effect (:func:`cannot_apply` says why)."""
        keys = [(g, *ref.key()) for g in groups_of(ref)]
        return all(entries[k]["fixed"] is not None and entries[k]["origin"] == "scale" for k in keys)

    def no_effect(ref: ParameterRef, statement: Unapplied) -> ModelError:
        factor = ref.names[0]
        # a statement as the model language writes it (a loading held equal across groups is freed in every group:
        # one group's alone is refused, _check_group_frees_held_equal)
        freed = (f"in group {written_name(ref.group)}: free {replace(ref, group=None)}"
                 if ref.group is not None and not tied_across_groups(ref.key()) else f"free {replace(ref, group=None)}")
        how = (f"free it ('{freed}'; the next indicator then sets the scale) or scale '{factor}' another way"
               if ref.kind == "loading" else f"scale '{factor}' by a marker instead ('scale {written_name(factor)} by marker')")
        return _fail(spec, f"{ref} is fixed to set the scale of '{factor}', so {statement.phrase} on it has no effect; "
                           f"{how}", ref)

    def cannot_apply(ref: ParameterRef, statement: Unapplied) -> ModelError | None:
        """The error for a start value, a bound or an exemption (``statement``) on a parameter that is not free in
        any group the statement names (fixed by a 'fix', by a factor's scale, through a tie to a fixed parameter, or
        given by effects coding), or None when the statement applies somewhere."""
        keys = [(g, *ref.key()) for g in groups_of(ref)]
        reasons = [_why_not_free(spec, k, entries, effects, fixed_by, tied_to, multi, group_labels) for k in keys]
        if any(r is None for r in reasons):
            return None
        if scale_fixed_everywhere(ref) and ref.names[0] in lat_ix:  # a factor's (not an ordinal item's) scale
            return no_effect(ref, statement)  # the advice names the scale's other ways
        # the tie is named where there is one (a group's mean held equal to the first group's names the tie)
        at = next((i for i, k in enumerate(keys) if k in tied_to), 0)
        first_key, why = keys[at], reasons[at]
        # a factor mean fixed at 0 in every group for want of equal intercepts: its reason says 'every group' itself
        everywhere = (multi and ref.kind == "mean" and first_key not in tied_to and first_key not in fixed_by
                      and all(entries[(h, *ref.key())]["fixed"] is not None for h in range(G)))
        if multi and ref.group is None and not everywhere:
            # one reason in every group is said once, naming no group; else the reason of one group, as one of them
            # (new user s22: 'fixed in every group (in group North Hospital: ...)' read as contradicting itself)
            why = (f"{why}, in every group" if len(set(reasons)) == 1 else
                   f"fixed in every group (in group {written_group(group_labels[first_key[0]], group_labels)}, for one: {why})")
        how = (" (the invariance command reads it at the step that holds the intercepts equal)"
               if everywhere and statement.read_at_ladder_step else "")
        return _fail(spec, f"{ref} is {why}, so {statement.phrase} on it has no effect; remove the {statement.removed}"
                           f"{' or the tie' if first_key in tied_to else ''}{how}", ref)

    for ref in spec.freed:
        error = _free_without_effect(spec, ref, [(g, *ref.key()) for g in groups_of(ref)], released, entries, effects,
                                     fixed_by, tied_to, multi, group_labels, tied_with_first, lat_ix, ordinal)
        if error is not None:
            raise error
    for ref in spec.freed:
        if ref.kind == "mean":
            for g in groups_of(ref):
                if (g, *ref.key()) in released and not _mean_has_origin(spec, ref.names[0], g, entries, tied_with_first,
                                                                          lat_ix, ordinal, find):
                    raise _mean_without_origin(spec, ref, group_labels[g] if multi else None, g, find, entries)
    for setting in spec.starts:
        for ref in setting.refs:
            error = cannot_apply(ref, Unapplied.START)
            if error is not None:
                raise error
    for bound in spec.bounds:
        for ref in bound.refs:
            error = cannot_apply(ref, Unapplied.BOUND)
            if error is not None:
                raise error
    for ref in spec.noninvariant:
        if ref.kind != "threshold" and scale_fixed_everywhere(ref):
            if ref.group is not None and ref.kind == "loading" and ref.names[0] in lat_ix:
                raise _marker_set_apart(spec, ref)
            raise cannot_apply(ref, Unapplied.NONINVARIANT)

    start = np.full(n_free, np.nan)
    for k, value in _start_values(spec, groups_of, free_index, multi).items():
        start[k] = value
    lower = np.full(n_free, -np.inf)
    upper = np.full(n_free, np.inf)
    set_by: dict[tuple[int, str], ParameterRef] = {}  # (free parameter, side) -> the bound's parameter that set it
    for bound in spec.bounds:
        for ref in bound.refs:
            for g in groups_of(ref):  # (a loading effects coding gives was refused above: it is in no group free)
                k = free_index(ref, g)
                if k is None:
                    continue
                if bound.lower is not None and bound.lower > lower[k]:
                    lower[k], set_by[(k, "lower")] = bound.lower, ref
                if bound.upper is not None and bound.upper < upper[k]:
                    upper[k], set_by[(k, "upper")] = bound.upper, ref
                if lower[k] >= upper[k]:  # bounds on parameters held equal (one free parameter) that leave no room
                    low, high = set_by[(k, "lower")], set_by[(k, "upper")]
                    raise _fail(spec, f"the bounds leave no room: {low} is bounded to at least "
                                      f"{user_number(lower[k])} and {high} to at most {user_number(upper[k])}, and "
                                      f"the two are held equal (one value), so no value meets both; "
                                      f"change a bound or the equality", ref)

    parameters = []
    for key in order:
        e = entries[key]
        if key in effects:
            # keyed effects coding: sum_i k_i l_i = n with k_i = -1 for a declared-reversed item, +1 otherwise, so
            # l_last = k_last (n - sum_others k_i l_i); without a 'reversed' statement, the loadings average 1
            others = effects[key]
            key_of = {k: -1.0 if k[2] in reverse_keyed else 1.0 for k in (key, *others)}
            terms = _merge_terms([(index_of_root[find(k)], -key_of[key] * key_of[k]) for k in others
                                  if entries[k]["fixed"] is None])
            offset = key_of[key] * (float(len(others) + 1)
                                    - sum(key_of[k] * entries[k]["fixed"] for k in others if entries[k]["fixed"] is not None))
        elif e["fixed"] is not None:
            terms, offset = (), float(e["fixed"])
        else:
            terms, offset = ((index_of_root[find(key)], 1.0),), 0.0
        parameters.append(
            Parameter(
                kind=_kind_for(e["matrix"], e["row"] == e["col"]),
                variables=e["variables"],
                matrix=e["matrix"],
                row=e["row"],
                col=e["col"],
                terms=terms,
                offset=offset,
                origin=e["origin"],
                group=key[0],
            )
        )
    for array in (start, lower, upper):
        array.setflags(write=False)  # tables are shared between fits of the same model
    table = ParameterTable(observed, latent, tuple(parameters), n_free, start, lower, upper, tuple(free_labels),
                           group_labels, means, multi, reverse_keyed, tuple(through))
    fixed_values_possible(spec, table)  # no estimate can mend impossible fixed values: refused at their statement
    return table


def _start_values(spec: Spec, groups_of, free_index, multi: bool) -> dict[int, float]:
    """The start value of each free parameter the 'start' statements give (index -> value).

    A start given in one group ('in group north: start ...') replaces the start for every group there, in
    whatever order the two are written; two starts of one parameter in one scope, or two different starts of
    parameters that are one free parameter (held equal by 'equal', 'invariance' or 'equal across groups'), are
    an error naming both lines: one of them would go unused without a word (and simulate would draw its
    population from the other)."""
    given: dict[tuple, tuple[float, ParameterRef]] = {}  # (group, kind, names) -> the start that applies there
    for setting in spec.starts:
        for ref in setting.refs:
            for g in groups_of(ref):
                key = (g, *ref.key())
                if key in given:
                    value, first = given[key]
                    if (first.group is None) != (ref.group is None):  # one group's start replaces every group's
                        if ref.group is None:
                            continue
                    elif value != setting.value:
                        raise _fail(spec, f"{ref} is given the start value {user_number(setting.value)} here but {user_number(value)} on "
                                          f"line {first.location.line}; give it one", ref)
                given[key] = (setting.value, ref)
    starts: dict[int, tuple[float, ParameterRef, tuple]] = {}
    written = lambda item: (item[1][1].location.line, item[1][1].location.column)  # noqa: E731
    for key, (value, ref) in sorted(given.items(), key=written):
        index = free_index(ref, key[0])
        if index is None:
            continue
        if index not in starts:
            starts[index] = (value, ref, key)
            continue
        value0, ref0, key0 = starts[index]
        if value != value0:
            ties = []
            if key[1:] != key0[1:]:
                lines = sorted({group[0].location.line for group in spec.equal
                                if {r.key() for r in group} & {key0[1:], key[1:]}})
                if lines:
                    ties.append(f"(line{'s' if len(lines) > 1 else ''} {word_list(map(str, lines))})")
            if key[0] != key0[0]:
                where = spec.equalities_location
                ties.append("across groups" + (f" (line {where.line})" if where is not None  # else set by a step
                                               else " (by the invariance step being fitted)"))  # of 'invariance'
            exempt = (f", or let them differ across groups with 'noninvariant {reference_text(*key[1:])}'"
                      if multi and key[1:] == key0[1:] else "")
            held = " ".join(["held equal", word_list(ties)]).strip()
            raise _fail(spec, f"{ref0} and {ref} are {held} but given different start values: {user_number(value0)} on line "
                              f"{ref0.location.line} and {user_number(value)} on line {ref.location.line}; give them "
                              f"one{exempt}", ref)
    return {index: value for index, (value, _, _) in starts.items()}


#: why a factor mean with groups is fixed at 0 in every group (a start on it cannot apply in a plain fit)
MEANS_FIXED_EVERYWHERE = ("fixed at 0 in every group: a factor's mean is estimated only in the groups after the "
                          "first, and only when the loadings and intercepts of its indicators are held equal across "
                          "groups ('invariance scalar'), which this model does not do")


def _why_not_free(spec: Spec, key: tuple, entries: dict, effects: dict, fixed_by: dict, tied_to: dict, multi: bool,
                  group_labels: tuple[str, ...]) -> str | None:
    """Why the entry ``key`` (group, kind, names) is not a free parameter, in words that follow 'PARAMETER is'
    ('fixed at 1 by the 'fix' statement on line 4', 'fixed through its tie to loading(f, a) ...'), or None when
    it is free.  With groups, a factor mean that the model fixes at 0 counts as free at a step of the invariance
    ladder (``Spec.ladder_step``): the ladder frees it at the step that holds its indicators' intercepts equal, and
    the population of a power study with groups reads each group's mean from 'start' (workflows.group_population);
    in a plain fit it is fixed, and a start on it cannot apply."""
    e = entries[key]
    g, kind, names = key
    if key in effects:
        return (f"given by the other loadings of '{names[0]}' (effects coding makes them average 1), not a free "
                f"parameter")
    if e["fixed"] is None:
        return None
    value = e["fixed"]
    if key in tied_to:
        other = tied_to[key]
        label = reference_text(other[1], other[2]) + (f" in group {written_group(group_labels[other[0]], group_labels)}" if multi else "")
        lines = sorted({group[0].location.line for group in spec.equal
                        if (kind, names) in {r.key() for r in group}})
        if other[0] != g:
            where = spec.equalities_location
            how = "held equal across groups" + (f" (line {where.line})" if where is not None else "")
        else:
            how = f"held equal by the 'equal' statement{'s' if len(lines) > 1 else ''} on line" + (
                f"{'s' if len(lines) > 1 else ''} {word_list(map(str, lines))}")
        why = (_why_not_free(spec, other, entries, effects, fixed_by, tied_to, multi, group_labels)
               or f"fixed at {user_number(entries[other]['fixed'])} in the first group, which sets the origin of the means")
        return f"fixed through its tie to {label} ({how}), which is {why}"
    if key in fixed_by:
        ref = fixed_by[key]
        what = ("to orient its exploratory block" if e["origin"] == "exploratory" else "")
        return f"fixed at {user_number(value)} by the 'fix' statement on line {ref.location.line}" + (f" {what}" if what else "")
    if e["origin"] == "scale":
        if names[0] in spec.factor_names:
            return f"fixed at {user_number(value)} to set the scale of '{names[0]}'"
        return (f"fixed at {user_number(value)} to give the latent response of the ordinal item '{names[0]}' its "
                f"{'origin' if kind == 'intercept' else 'unit'} (Wu & Estabrook 2016)")
    if kind == "mean":
        if not multi:
            return "fixed at 0: with one group a factor's mean is 0, which sets the origin of its scale"
        if spec.ladder_step:
            # a start on a factor mean fixed at 0 applies at a later step of the invariance ladder, and in a
            # population with groups (power of the invariance tests) it gives the group's mean
            return None
        if any(entries[(h, kind, names)]["fixed"] is None for h in range(len(group_labels))):
            return ("fixed at 0 in the first group, which sets the origin of the means (the other groups' means are "
                    "differences from it)")
        return MEANS_FIXED_EVERYWHERE
    return f"fixed at {user_number(value)}"  # pragma: no cover - every fixed entry has one of the reasons above


def _reached_by_fixes(find, tied: set[tuple], fixed_by: dict, entries: dict,
                      scale_ones: dict | None = None) -> dict[tuple, float]:
    """The entries that 'equal' statements hold equal (``tied``, with ``find`` their ties' union-find: within a group
    and through any chain of statements) to an entry a 'fix' statement fixes, or to a factor's variance its variance
    scaling fixes at 1 (``scale_ones``), each with that value (before the automatic scales are added: see
    build_parameter_table)."""
    scale_ones = scale_ones or {}
    value_of = {find(k): entries[k]["fixed"] for k in fixed_by if entries[k]["fixed"] is not None}
    for k, value in scale_ones.items():
        value_of.setdefault(find(k), value)
    return {k: value_of[find(k)] for k in tied if find(k) in value_of and k not in fixed_by and k not in scale_ones}


def _tied_fixes_differ(spec: Spec, keys: tuple[tuple, tuple], entries: dict, group_labels) -> ModelError:
    """An 'equal' statement (or a chain of them) holds two parameters equal that are fixed at different values (by two
    'fix' statements, or a fix and a factor's automatic scale), so no value can hold both.  Refused at
    the first 'equal' statement naming either, with the way out."""
    def said(key: tuple) -> str:
        how = {"scale": f"as the marker that sets the scale of '{key[2][0]}'",
               "exploratory": "as an exploratory block's zero"}.get(entries[key]["origin"], "by a 'fix' statement")
        return f"{_label(key, group_labels)} is fixed at {user_number(entries[key]['fixed'])} {how}"

    where = next((group[0] for group in spec.equal if any(r.key() in (keys[0][1:], keys[1][1:]) for r in group)),
                 None)
    marker = any(entries[k]["origin"] == "scale" for k in keys)
    return _fail(spec, f"these parameters are held equal but fixed at different values: {said(keys[0])}, and "
                       f"{said(keys[1])}" + ("; list the item whose loading you fix or hold equal first in its "
                                             "factor (the marker is the first item), or give the factor a scale of "
                                             "its own with a 'fix' statement" if marker else ""),
                 where.location if where is not None else None)


def _entry_kind(entry: dict) -> str:
    return _kind_for(entry["matrix"], entry["row"] == entry["col"])


def _check_equalities_hold(spec: Spec, tied_kinds: set[str]) -> None:
    """Each class an 'equal across groups:' statement names must hold at least one parameter equal across groups:
    one whose every parameter is fixed in some group (by a 'fix', by a factor's scale, or, for factor means, at 0
    in every group while the intercepts are not held equal) changes nothing, and the methods text would claim an
    equality that was never imposed."""
    for words in spec.equal_across_groups:
        held = GROUP_EQUALITY_WORDS[words.text]
        if any(kind in tied_kinds for kind in INVARIANCE_CLASSES[held]):
            continue
        if held == "means":
            why = ("the factor means are fixed at 0 in every group unless the intercepts and loadings of their "
                   "indicators are held equal too ('invariance scalar', or 'equal across groups: loadings, "
                   "intercepts, factor means')")
        else:
            why = (f"every one of the model's {words.text} is fixed in some group (by a 'fix' statement, a factor's "
                   f"scale or a 'noninvariant' exemption)")
        raise _fail(spec, f"'equal across groups: {words.text}' holds nothing equal: {why}; remove it or free "
                          f"what it should hold", words)


def _check_group_fixes_held_equal(spec: Spec, fixed_by: dict, entries: dict, shares, G: int) -> None:
    """A parameter fixed in one group ('in group north: fix loading(f, b) = .5') while its class is held equal across
    groups ('invariance metric', 'equal across groups: loadings', a step of the invariance ladder) would leave the
    other groups' parameter free, or held equal among themselves only: the model fitted would not hold the class
    equal as its level says.  An error naming the statement, what holds the class equal and the two ways out (the
    'fix' for every group, or the parameter exempted by 'noninvariant'), unless every group has it fixed alike."""
    for key, ref in fixed_by.items():
        if ref.group is None or not shares(key[0], key[1:]):  # a parameter set apart in its group may be fixed there
            continue
        value = entries[key]["fixed"]
        if all(entries[(h, *key[1:])]["fixed"] == value for h in range(G) if shares(h, key[1:])):
            continue
        says, claim = _held_by(spec, "threshold" if ref.kind == "threshold" else _entry_kind(entries[key]))
        plain = replace(ref, group=None)
        raise _fail(spec, f"{ref} is fixed at {user_number(value)} in that group alone, but {says}: the other groups' {plain} "
                          f"would be left free, and {claim}; "
                          f"fix it in every group (the 'fix' statement without 'in group') to hold it "
                          f"equal at {user_number(value)}, set it apart in that group ('in group "
                          f"{written_name(ref.group)}: noninvariant {plain}') to fix it there alone, or exempt it in "
                          f"every group ('noninvariant {plain}') so that it may differ across groups; the report names "
                          f"either", ref)


def _held_by(spec: Spec, kind: str) -> tuple[str, str]:
    """What holds parameters of ``kind`` equal across groups, in words ('invariance scalar' (line 6) holds the
    intercepts equal across groups), and what the model would not be were one group's parameter set apart."""
    held = next(c for c, kinds in INVARIANCE_CLASSES.items() if kind in kinds)
    words = equality_words([held])[0]
    level = next((name for name, classes in INVARIANCE_LEVELS.items() if held in classes), None)
    stated = next((n for n in spec.equal_across_groups if GROUP_EQUALITY_WORDS[n.text] == held), None)
    if spec.ladder_step:
        return (f"the invariance ladder holds the {words} equal across groups from its {level} step on",
                "the models from that step on would not be the invariance the ladder reports")
    if stated is not None:
        return (f"'equal across groups: {stated.text}' (line {stated.location.line}) holds them equal across groups",
                "the model would not hold them equal as it says")
    where = spec.equalities_location
    return (f"'invariance {spec.invariance_level}'" + (f" (line {where.line})" if where is not None else "")
            + f" holds the {words} equal across groups",
            f"the model would not be the {spec.invariance_level} invariance it is said to be")


def _check_group_frees_held_equal(spec: Spec, entries: dict, shares, group_labels: tuple[str, ...],
                                  released: set) -> None:
    """A 'free' for one group ('in group audit: free intercept(x2)') of a parameter held equal across groups
    ('invariance scalar', 'equal across groups: intercepts', a step of the invariance ladder): a researcher means
    partial invariance in that group, that group's parameter its own and the other groups' still equal.  'free'
    releases what is fixed and leaves the equality as it is, so the statement would change nothing (a free parameter)
    or leave the group's other parameters of the class scaled apart (a freed marker): an error naming the statement,
    what holds the class equal and the statement that sets a parameter apart in one group ('in group audit:
    noninvariant intercept(x2)'), or in every group ('noninvariant'), which the reports name (new-user trial,
    nineteenth session)."""
    for ref in spec.freed:
        if ref.group is not None and shares(group_labels.index(ref.group), ref.key()):
            scale = ref.kind == "loading" and (group_labels.index(ref.group), *ref.key()) in released  # a marker
            raise _set_apart_in_one_group(spec, ref, _entry_kind(entries[(0, *ref.key())]), scale)


def _set_apart_in_one_group(spec: Spec, ref: ParameterRef, kind: str, scale: bool = False) -> ModelError:
    """The error of an 'in group' 'free' of a parameter of ``kind`` held equal across groups (or, at a step of the
    invariance ladder, held equal at a later step); ``scale``: the parameter is a marker's loading, which cannot be
    set apart in one group either (:func:`_marker_set_apart`)."""
    says, _ = _held_by(spec, kind)
    plain = replace(ref, group=None)
    group, named = written_name(ref.group), written_group(ref.group)  # in the statement; in the sentence
    if scale:
        return _fail(spec, f"'in group {group}: free {plain}' cannot set {plain} apart in group {named}: {says}, "
                           f"and {plain} is the marker that sets the scale of '{ref.names[0]}' in every group; make "
                           f"another indicator the marker ('free {plain}': the next indicator then sets the scale) and "
                           f"write 'in group {group}: noninvariant {plain}', or remove the statement", ref)
    return _fail(spec, f"'in group {group}: free {plain}' does not set {plain} apart in group {named}: {says}, and "
                       f"'free' leaves that equality as it is; write 'in group {group}: noninvariant {plain}' to "
                       f"estimate it freely in group {named} while the other groups' stay equal, or 'noninvariant "
                       f"{plain}' to let it differ in every group (the reports name either)", ref)


def _marker_set_apart(spec: Spec, ref: ParameterRef) -> ModelError:
    """The error of 'in group audit: noninvariant loading(f, x1)' where x1 is the marker of f.  Refused rather than
    rescaled: the marker's loading is 1 in every group and gives the factor its unit there; were it estimated in one
    group, that group's factor would need another unit, taken from a loading held equal to the other groups' (the
    next indicator's), and the loadings the others share would then mean another thing in that group.  The
    researcher chooses: another marker for every group, or the factor's variance as its scale."""
    plain = replace(ref, group=None)
    factor = ref.names[0]
    return _fail(spec, f"{plain} is the marker that sets the scale of '{factor}' in every group, so it cannot be set "
                       f"apart in group {written_group(ref.group)} alone; make another indicator the marker ('free "
                       f"{plain}': the next indicator then sets the scale, and this loading may be set apart) or scale "
                       f"'{factor}' by its variance ('scale {written_name(factor)} by variance')", ref)


def _check_set_apart_use(spec: Spec, ordinal: dict[str, int]) -> None:
    """A parameter of an ordinal item set apart in one group ('in group audit: noninvariant intercept(x2)') is not
    available yet: the latent responses' origin and unit follow from which of their thresholds, intercepts, loadings
    and residual variances are held equal (Wu & Estabrook 2016), group by group, which the parameter table lays out
    for all groups at once.  An error at the statement, naming the way that exists ('noninvariant', every group)."""
    for ref in spec.noninvariant:
        if ref.group is not None and ref.kind != "threshold" and set(ref.names) & set(ordinal):
            item = next(n for n in ref.names if n in ordinal)
            plain = replace(ref, group=None)
            raise _fail(spec, f"setting {plain} apart in group {written_group(ref.group)} alone is not available yet, "
                              f"as '{item}' is ordinal (its latent response's origin and unit follow from which of its "
                              f"parameters are held equal); write 'noninvariant {plain}' to let it differ in every "
                              f"group", ref)


def _unit_left_unidentified(spec: Spec, factor, group_labels: tuple[str, ...]) -> ModelError:
    """The error of statements that set apart, in the first group, every loading of a factor scaled by its variance
    that was held equal across groups: the first group's variance (1) no longer gives the other groups' factor its
    unit through a shared loading, and the other groups' variances, each fixed at 1 in its place, would be held
    equal among them, which the model does not say.  At the last such statement."""
    f = factor.name.text
    refs = [r for r in spec.noninvariant if r.group == group_labels[0] and r.kind == "loading" and r.names[0] == f]
    at = max(refs, key=lambda r: (r.location.line, r.location.column) if r.location is not None else (0, 0),
             default=None)
    return _fail(spec, f"these statements set apart every loading of '{f}' held equal in group "
                       f"{written_group(group_labels[0], group_labels)}, the first group, whose variance of '{f}' (1) gives the other "
                       f"groups' factor its unit through the loadings they share with it; keep at least one loading of "
                       f"'{f}' held equal in group {written_group(group_labels[0], group_labels)}, or let those loadings differ in "
                       f"every group ('noninvariant')", at)


def _mean_has_origin(spec: Spec, f: str, g: int, entries: dict, tied_with_first, lat_ix: dict, ordinal: dict,
                     find) -> bool:
    """Whether a factor mean a 'free' statement releases in group ``g`` can be estimated: an indicator's intercept is
    fixed in that group (the mean is then the indicator's mean less that intercept, over its loading), or held equal
    in that group to the intercept of an item of other factors whose means are fixed there (:func:`_origin_partners`:
    a longitudinal model's later occasion against the first, Little, Slegers & Card 2006; Brown 2015, ch. 7,
    recalled from memory), or, in a later group, an indicator's intercept and loading are held equal to the first
    group's, whose mean is the origin (Sorbom 1974).  Factors measured by other factors or by ordinal items are left
    to the check of the information matrix (their means' origins run through the lower factors' means or the
    thresholds).  ``find``: the root of a parameter's set of equal parameters (the model's 'equal' statements)."""
    factor = next(x for x in spec.factors if x.name.text == f)
    items = [i.text for i in factor.indicators]
    if any(x in lat_ix or x in ordinal for x in items):
        return True
    if any(entries[(g, "intercept", (x,))]["fixed"] is not None for x in items):
        return True
    if any(_origin_partners(spec, f, x, g, entries, find) for x in items):
        return True
    return g > 0 and _mean_identified(spec, factor, entries, tied_with_first(g), lat_ix, ordinal)


def _origin_partners(spec: Spec, f: str, x: str, g: int, entries: dict, find) -> list[str]:
    """The items whose intercepts in group ``g`` are held equal to that of ``x`` (an indicator of ``f``) and that
    indicate only factors other than ``f`` whose means are fixed there: each such intercept is its item's mean less
    its loadings times those fixed means, so the shared intercept gives the mean of ``f`` its origin, as the first
    occasion's mean (0) gives the later occasions' theirs when the intercepts are held equal over time (Little,
    Slegers & Card 2006; Brown 2015, ch. 7, recalled from memory).  Loadings need not be equal for this: they are
    identified by the covariances; equal loadings are what make the means comparable, which invariance judges."""
    root = find((g, "intercept", (x,)))
    out = []
    for key in entries:
        if key[0] != g or key[1] != "intercept" or key[2] == (x,) or find(key) != root:
            continue
        y = key[2][0]
        own = [h.name.text for h in spec.factors if any(i.text == y for i in h.indicators)]
        if own and f not in own and all(entries[(g, "mean", (h,))]["fixed"] is not None for h in own):
            out.append(y)
    return out


def _tied_intercepts(g: int, x: str, entries: dict, find) -> list[str]:
    """The other items whose intercepts in group ``g`` are held equal to that of ``x`` ('equal' statements)."""
    root = find((g, "intercept", (x,)))
    return [k[2][0] for k in entries if k[0] == g and k[1] == "intercept" and k[2] != (x,) and find(k) == root]


def _mean_without_origin(spec: Spec, ref: ParameterRef, group: str | None, g: int, find, entries: dict) -> ModelError:
    """The error of a 'free' of a factor mean that nothing gives an origin (the information matrix would be singular
    at any estimate: the mean and its indicators' intercepts trade off).  Its advice fixes the intercept of an
    indicator held equal to no other where there is one; where every one is, it names the intercepts the fix would
    fix too (newuser-s23: 'fix intercept(vig1_t2) = 0' fixed intercept(vig1_t1), held equal to it, without a word),
    and says what else gives the mean its origin: an intercept held equal to that of an item of a factor whose mean
    is fixed (:func:`_origin_partners`)."""
    f = ref.names[0]
    plain = replace(ref, group=None)
    items = next([i.text for i in x.indicators] for x in spec.factors if x.name.text == f)
    ties = {x: _tied_intercepts(g, x, entries, find) for x in items}
    first = next((x for x in items if not ties[x]), items[0])
    fix = f"fix an intercept of one indicator (as 'fix {ParameterRef('intercept', (first,), None)} = 0'"
    if ties[first]:
        tied = ", ".join(str(ParameterRef("intercept", (y,), None)) for y in ties[first])
        fix += (f", which fixes {tied} at 0 too, being held equal to it: every intercept of '{f}' is held equal to "
                f"another")
    fix += ")"
    # equalities within the group count only where they reach an intercept whose factors' means are fixed
    held = " (those held equal to others are held equal to intercepts whose items' factors have free means too)"
    if group is None:
        where, how = "", ""
        other = (", hold an intercept of one of its indicators equal to that of an item of a factor whose mean is "
                 "fixed (as the intercepts of one item at two occasions are, the first occasion's mean 0 the origin "
                 "of the later one's)")
    else:
        where = f" in group {written_group(group)}"
        how = ("; with groups, a factor's mean is estimated in the groups after the first where the loading and "
               "intercept of one of its indicators are held equal across groups ('invariance scalar'), the first "
               "group's mean being 0, the origin of the others', without a 'free' statement")
        other = ""
    return _fail(spec, f"'{'free ' + str(plain) if ref.group is None else f'in group {written_name(ref.group)}: free {plain}'}'"
                       f" frees the mean of '{f}'{where}, where nothing sets its origin: every intercept of its "
                       f"indicators is free{' there' if group is not None else ''} as well"
                       f"{held if any(ties.values()) else ''}, so the mean and the intercepts cannot be told apart{how}; "
                       f"{fix}{other} or remove the statement", ref)


def _mean_left_unidentified(spec: Spec, factor, g: int, group_labels: tuple[str, ...], set_apart: set) -> ModelError:
    """The error of statements that set apart, in one group, every intercept (or loading) that held the indicators
    of ``factor`` equal between group ``g`` and the first group: the difference of the factor's mean in group ``g``
    from the first group's has nothing left to be estimated from (Sorbom 1974: a factor mean is identified through an
    indicator whose intercept and loading are equal across the groups compared).  At the last such statement."""
    f = factor.name.text
    items = {i.text for i in factor.indicators}
    refs = [r for r in spec.noninvariant if r.group is not None and r.kind in ("intercept", "loading")
            and r.names[-1] in items and (r.kind == "intercept" or r.names[0] == f)]
    at = max(refs, key=lambda r: (r.location.line, r.location.column) if r.location is not None else (0, 0),
             default=None)
    named = at.group if at is not None else group_labels[g]
    if at is not None and at.group == group_labels[0]:
        whose = f"the mean of '{f}' in the other groups can no longer be compared with group {written_group(named, group_labels)}'s"
    else:
        whose = f"the mean of '{f}' in group {written_group(named, group_labels)} can no longer be compared with the other groups'"
    return _fail(spec, f"these statements set apart every intercept of the indicators of '{f}' that was held equal "
                       f"in group {written_group(named, group_labels)} (with its loading), so {whose} and is not identified; keep at "
                       f"least one intercept of '{f}' held equal in group {written_group(named, group_labels)}", at)


def _free_without_effect(spec: Spec, ref: ParameterRef, keys: list[tuple], released: set[tuple], entries: dict,
                         effects: dict, fixed_by: dict, tied_to: dict, multi: bool, group_labels: tuple[str, ...],
                         tied_with_first, lat_ix: dict, ordinal: dict) -> ModelError | None:
    """The error for a 'free' statement that changes nothing (None when it frees something): the parameter is free
    already in every group it names (only a factor's marker loading, a factor's mean and, with the variance
    scaling, a factor's variance are fixed by default), or it stays fixed whatever the statement says (the loading
    effects coding gives, an ordinal item's latent response fixed for its origin or unit, a tie to a fixed
    parameter).  As a start value or a bound on a fixed parameter is an error, so is this: the model listing shows
    the line, and a reader takes it for part of the model (new-user trial, nineteenth session)."""
    factors = {f.name.text: f for f in spec.factors}

    def frees(key: tuple) -> bool:
        if key not in released:
            return False
        g, kind, names = key
        # a later group's factor mean that its indicators' equal intercepts identify is free without the statement
        return not (kind == "mean" and multi and g > 0
                    and _mean_identified(spec, factors[names[0]], entries, tied_with_first(g), lat_ix, ordinal))

    if any(frees(k) for k in keys):
        return None
    kind = _entry_kind(entries[keys[0]])
    if spec.ladder_step and ref.group is not None and kind in {
            k for held in INVARIANCE_LEVELS["strict"] for k in INVARIANCE_CLASSES[held]}:
        # a step of the invariance ladder before the one that holds the class equal: what the statement is about
        return _set_apart_in_one_group(spec, ref, kind)
    reasons = [_why_not_free(spec, k, entries, effects, fixed_by, tied_to, multi, group_labels) for k in keys]
    fixed = next((i for i, r in enumerate(reasons) if r is not None), None)
    if fixed is None:
        why = "free already"
        if ref.kind == "loading":
            scale = next((e for k, e in entries.items() if k[0] == keys[0][0] and k[1] == "loading"
                          and k[2][0] == ref.names[0] and e["origin"] == "scale"), None)
            if scale is not None:
                why += f" ('{scale['variables'][1]}' sets the scale of '{ref.names[0]}')"
        elif ref.kind == "mean" and multi:
            why += (" (a later group's factor mean is estimated where its indicators' loadings and intercepts are held "
                    "equal across groups)")
        return _fail(spec, f"{ref} is {why}, so 'free' changes nothing: it releases a parameter fixed by default (a "
                           f"factor's marker loading or its mean); remove the statement", ref)
    why = reasons[fixed]
    if multi and len(keys) > 1:
        named = written_group(group_labels[keys[fixed][0]], group_labels)
        why += (f" in group {named}" if any(r is None for r in reasons) else f" (in group {named}, and fixed in every group)")
    return _fail(spec, f"{ref} is {why}, so 'free' on it has no effect; remove the statement", ref)


def _invariant_kinds(spec: Spec) -> set[str]:
    return {kind for word in spec.invariant for kind in INVARIANCE_CLASSES[word]}


def _mean_identified(spec, factor, entries, tied_across_groups, lat_ix, ordinal) -> bool:
    """A factor mean can be free in a later group when an intercept (or, for a
    higher-order factor, a lower factor's mean route) of one of its indicators
    is held equal across groups together with its loading (and, for an ordinal
    indicator, its thresholds)."""
    for ind in factor.indicators:
        x = ind.text
        if x in lat_ix:
            continue
        if x in ordinal and not tied_across_groups(("threshold", (x, "1"))):
            continue
        if tied_across_groups(("intercept", (x,))) and (
            tied_across_groups(("loading", (factor.name.text, x)))
            or entries[(0, "loading", (factor.name.text, x))]["fixed"] is not None
        ):
            return True
    return False


def group_statement(spec: Spec) -> str | None:
    """The first statement of ``spec`` that needs groups, in words ('in group north', 'noninvariant', or the
    equalities across groups), or None when the model has none."""
    refs = [r for r in all_refs(spec) if r.group is not None]
    if refs:
        return f"'in group {written_name(refs[0].group)}'"
    if spec.noninvariant:
        return "'noninvariant'"
    if spec.invariant:
        return f"{', '.join(equality_words(spec.invariant))} equal across groups"
    return None


def one_group_only(spec: Spec, what: str) -> None:
    """A model with statements that need groups cannot be used where there are none (simulation, power, the
    resampling commands): an error at the statement (file, line and column) that says so without advice about
    options these commands do not have."""
    statement = group_statement(spec)
    if statement is not None:
        refs = [r for r in all_refs(spec) if r.group is not None]  # where the statement is, as fit shows it
        where = (refs[0].location if refs else spec.noninvariant[0].location if spec.noninvariant
                 else spec.equalities_location)
        raise _fail(spec, f"{what}, and the model has {statement}, which needs groups: remove it for this command "
                          f"(fit, invariance and align take a group column)", where)


def no_mean_statements(spec: Spec, what: str) -> None:
    """A model with statements on intercepts or factor means cannot be used by a command that has no mean structure
    and no option to give it one (simulation, RMSEA power): an error at the statement that says so, without the
    fit's advice of groups or full-information ML, options these commands do not have (hostile tester s24)."""
    refs = [r for r in all_refs(spec) if r.kind in ("intercept", "mean")]
    if refs:
        raise _fail(spec, f"{refs[0]}: {what}, so a statement on intercepts or factor means cannot apply; remove it "
                          f"for this command (a fit estimates them with groups or by full-information ML)", refs[0])


def _check_group_use(spec: Spec, group_labels: tuple[str, ...], multi: bool, means: bool) -> None:
    refs = [r for r in all_refs(spec) if r.group is not None]
    mean_refs = [r for r in all_refs(spec) if r.kind in ("intercept", "mean")]
    groups = Option.GROUP_COLUMN.given("COLUMN")  # as the caller gives it: --group-column COLUMN, group='COLUMN'
    if mean_refs and not means:
        raise _fail(spec, f"{mean_refs[0]}: intercepts and factor means are estimated only in a fit with a mean "
                          f"structure, and this one has none: give groups ({groups}) or fit by full-information ML "
                          f"({Option.INCOMPLETE_ROWS.given('full-information')}, the default when answers are "
                          f"missing)", mean_refs[0])
    if not multi:
        if refs:
            raise _fail(spec, f"'in group {written_name(refs[0].group)}' needs groups: give the group column ({groups})", refs[0])
        if spec.noninvariant:
            raise _fail(spec, "'noninvariant' lets a parameter differ across groups, and this fit has no groups: give "
                              f"the group column ({groups}) or remove the statement", spec.noninvariant[0])
        if spec.invariant:
            raise _fail(spec, f"the model holds {', '.join(equality_words(spec.invariant))} equal across groups, and "
                              f"this fit has no groups: give the group column ({groups}) or remove the "
                              f"statement", spec.equalities_location)
        return
    for ref in refs:
        if ref.group not in group_labels:
            guess = close_names(ref.group, group_labels)
            hint = did_you_mean(ref.group, guess[0]) if guess else (
                f"; the groups are {word_list(written_group(g, group_labels) for g in group_labels)}")
            raise _fail(spec, f"there is no group {written_group(ref.group, group_labels)} in the data{hint}", ref)


def _check_ordinal_intercept_fixes(spec: Spec, ordinal: dict[str, int], first_group: str) -> None:
    """A 'fix' of an ordinal item's intercept at a value other than 0 in every group or in the first one, where none
    of its thresholds is fixed, is refused at its line: the item's free thresholds carry its latent response's
    location, so the value only moves every threshold by as much, the fit unchanged, while the report reads the
    thresholds on the latent response's scale with intercept 0 (Wu & Estabrook 2016's location; hostile s19).  A fix
    in a later group, beside thresholds held equal, sets that group's difference and stays."""
    thresholds_fixed = {r.names[0] for s in spec.fixed for r in s.refs if r.kind == "threshold"}
    for setting in spec.fixed:
        for ref in setting.refs:
            x = ref.names[0] if ref.names else None
            if (ref.kind != "intercept" or x not in ordinal or setting.value == 0 or x in thresholds_fixed
                    or ref.group not in (None, first_group)):
                continue
            where = "" if ref.group is None else f" in group {ref.group}"
            raise _fail(spec, f"{ref} is fixed at {user_number(setting.value)}{where}, but '{x}' is ordinal: its "
                              f"free thresholds carry its location, so this value would only move each of them by "
                              f"{user_number(setting.value)} and change nothing in the fit, while the report reads "
                              f"them with the intercept at 0; leave the statement out, or fix a threshold to set the "
                              f"location", ref)


def _check_threshold_use(spec: Spec, ordinal: dict[str, int]) -> None:
    for ref in spec.noninvariant:
        if ref.kind == "threshold" and ref.names[0] not in ordinal:
            raise _fail(spec, f"{ref}: '{ref.names[0]}' is not treated as ordinal in a multi-group fit, so it has no "
                              f"thresholds (declare it with 'ordinal {ref.names[0]}' or {Option.ORDINAL}, and give "
                              f"{Option.GROUP_COLUMN})", ref)
    if "thresholds" in spec.invariant and not ordinal:
        raise ModelError("holding thresholds equal across groups applies to ordinal items in a multi-group fit, and this fit has none "
                         f"(declare them with 'ordinal ...' or {Option.ORDINAL}, and give {Option.GROUP_COLUMN})",
                         spec.equalities_location,
                         spec.source_line(spec.equalities_location))


def _merge_terms(terms: list[tuple[int, float]]) -> tuple[tuple[int, float], ...]:
    merged: dict[int, float] = {}
    for index, coef in terms:
        merged[index] = merged.get(index, 0.0) + coef
    return tuple((i, c) for i, c in merged.items() if c != 0.0)


_KIND_ORDER = {"loading": 0, "variance": 1, "covariance": 2, "intercept": 3, "mean": 4, "threshold": 5}


def _sort_key(key: tuple, entry: dict) -> tuple:
    # by group; then loadings, variances (factors before residuals), covariances, intercepts, means
    g, kind = key[0], key[1]
    matrix_rank = {"L": 0, "B": 0, "P": 1, "T": 2, "N": 3, "M": 4, "K": 5}[entry["matrix"]]
    return (g, _KIND_ORDER[kind], matrix_rank, entry["col"] if kind == "loading" else entry["row"], entry["row"], entry["col"])


def _label(key: tuple, group_labels: tuple[str, ...] | None) -> str:
    return reference_text(key[1], key[2], group_labels[key[0]] if group_labels else None)


def _scaling_statement(spec: Spec, factor: str):
    """The 'scale' statement that gives ``factor`` its scaling method (Spec.scaling_of's rule) and the place to point
    at: the factor's name in a statement naming it, or a 'scale latent by ...' statement; (None, None) where no
    statement does (the marker by default)."""
    every = None
    for setting in spec.scaling:
        named = next((n for n in setting.factors if n.text == factor), None)
        if named is not None:
            return setting, named.location
        if not setting.factors:
            every = setting
    return (every, every.location) if every is not None else (None, None)


def _scaling_words(spec: Spec, factor: str) -> str:
    """The statement that scales ``factor``, as written ('scale a by effects', 'scale latent by effects')."""
    setting, _ = _scaling_statement(spec, factor)
    if setting is None:
        return "the marker, by default"
    return f"'scale {'latent' if not setting.factors else written_name(factor)} by {setting.method}'"


def _scaling_refused(spec: Spec, factor: str, message: str) -> ModelError:
    """An error of the scaling a 'scale' statement asks for, at that statement (re-check s18: with groups, 'scale a
    by effects' on line 3 was refused at the factor's line 1 as "factor 'a' has no scale"); at the factor's line
    where no statement names the method."""
    _, loc = _scaling_statement(spec, factor)
    if loc is None:
        loc = next((f.name.location for f in spec.factors if f.name.text == factor), None)
    return ModelError(message, loc, spec.source_line(loc))


def _scale_error(spec: Spec, factor: str, why: str) -> ModelError:
    loc = next((f.name.location for f in spec.factors if f.name.text == factor), None)
    return ModelError(f"factor '{factor}' has no scale: {why}", loc, spec.source_line(loc))


def keyed_pairs(spec: Spec) -> frozenset[tuple[str, str]]:
    """(factor, item) for each item a 'reversed' statement declares and each factor it orients: every factor
    the item loads on, except method factors (a wording factor describes a way of answering, not a trait) and
    the factors of exploratory blocks (their rotation orients them)."""
    declared = spec.reverse_keyed
    unkeyed = spec.method_factors | spec.exploratory_factors
    return frozenset((f.name.text, i.text) for f in spec.factors if f.name.text not in unkeyed
                     for i in f.indicators if i.text in declared)


def marker_of(candidates: list[tuple], reverse_keyed: set[str]) -> tuple[tuple, float]:
    """The loading that sets a factor's scale under marker scaling, and its fixed value.

    ``candidates``: the factor's loadings that the model does not free, in the order of its indicators
    (keys ending in (factor, indicator)).  The marker is the first of them whose indicator a 'reversed'
    statement does not declare reverse-keyed, fixed at 1, so that the factor points the way of its trait
    (the way its items not declared reversed point).  When every candidate is declared reversed, the first
    is fixed at -1: the factor then runs against its items' raw answers, which the declaration says run
    against the trait.  Without a 'reversed' statement the first candidate is fixed at 1, as the usual
    marker-variable scaling does (Bollen 1989, ch. 7)."""
    keyed = [k for k in candidates if k[-1][1] not in reverse_keyed]
    return (keyed[0], 1.0) if keyed else (candidates[0], -1.0)


# The values a model file gives ('fix' statements, and 'start' statements where they describe a population): every
# population covariance matrix is positive semi-definite, so its variances are at least 0, its correlations within
# +/-1, and so is every principal submatrix (Horn & Johnson 2013, Observation 7.1.2).  Values that break this are
# refused at their statements: by every fit for the fixed values (:func:`fixed_values_possible`), which no estimate
# can change, and by simulate and the power and cutoff workflows for the population they draw from (fixed and start
# values).

def fixed_values_possible(spec: Spec, table: ParameterTable) -> None:
    """An error at the statement when the model's fixed values alone make every group's covariance matrix impossible
    (a fixed correlation beyond +/-1, fixed factor or residual correlations that cannot hold together): no estimate
    can mend them, and a fit would fail to start or report the user's own value as a finding (hostile tester s15).
    Without a fixed covariance nothing can be impossible here (negative fixed variances are refused by the
    language's checks), so most models are not looked at."""
    if not any(r.kind == "covariance" for s in spec.fixed for r in s.refs):
        return
    values = given_entries(table, starts=False)
    for g in range(table.n_groups):
        label = table.groups[g] if table.multigroup else None
        given_values_possible(spec, table, values, g, label, starts=False)
        impossible_fixed_values(table, spec.source, starts=False, group=g, spec=spec)


def as_written(par) -> str:
    """A parameter as a model file's 'fix' statement names it: variance(a2), covariance(f1, f2), loading(f1, a3)."""
    word = {"factor_variance": "variance", "residual_variance": "variance", "factor_covariance": "covariance",
            "residual_covariance": "covariance"}.get(par.kind, par.kind)
    return reference_text(word, par.variables)


def _values(how: str) -> str:
    return "fixed values" if how == "fixed at" else "start values"


def _settings_for(spec: Spec, label: str | None, starts: bool = True) -> dict[tuple, tuple]:
    """The 'start' (unless not ``starts``) and 'fix' statements that set a variance or covariance of group ``label``
    (None: a model of one group): (kind, variables) as the parameter table keys them -> (reference, value, how it was
    given); a statement for the group overrides one for every group (and a 'fix' a 'start', as the parameter table
    takes them)."""
    latent = set(spec.factor_names)
    found: dict[tuple, tuple] = {}
    for how, settings in (("given the start value", spec.starts if starts else ()), ("fixed at", spec.fixed)):
        for ref in sorted((r for s in settings for r in s.refs if r.kind in ("variance", "covariance")
                           and r.group in (None, label)), key=lambda r: r.group is not None):
            value = next(s.value for s in settings if ref in s.refs)
            level = "factor" if ref.names[0] in latent else "residual"
            names = ref.names if ref.kind == "covariance" else ref.names[:1]
            found[(f"{level}_{ref.kind}", tuple(names))] = (ref, value, how)
    return found


def given_values_possible(spec: Spec, table: ParameterTable, values: np.ndarray, group: int = 0,
                          label: str | None = None, starts: bool = True, search_start: bool = False) -> None:
    """An error at the 'start' or 'fix' statement (file, line and column, as a model error shows them) whose value
    makes the population of group ``label`` (None: of a model of one group) impossible, with the parameter and the
    value: a variance below zero, or a covariance larger than the product of the two standard deviations that
    population has (a correlation beyond +/-1; Horn & Johnson 2013, Observation 7.1.2).  ``values``: every table
    entry's value (StructuredModel.entry_values), of which group ``group``'s are read.  ``search_start``: the values
    are a fit's start values, its free variances taken from the data, at which the search could not begin (hostile
    trial s18: 'fix covariance(a, b) = 5' between factors of variance about 0.5 was blamed on the start values)."""
    entry = {(par.kind, par.variables): float(v) for par, v in zip(table.parameters, values) if par.group == group}
    settings = _settings_for(spec, label, starts)
    named = None if label is None else printable(written_group(label, table.groups))
    whose = "" if label is None else f" of group {named}"

    def fail(ref, how: str, words: str) -> ModelError:
        where = "" if label is None or ref.group is not None else f" (a value for every group, here group {named})"
        if search_start:
            return ImpossibleAtStart(f"the model{whose} cannot hold a covariance larger than the variances allow: {ref}{where} "
                              f"is {how} {words} (the variances as the data give them at the start of the search, "
                              f"where the search could not begin); fix it at a value within those bounds, or scale "
                              f"both by their variances and fix a correlation between -1 and 1",
                              ref.location, spec.source_line(ref.location))
        return ModelError(f"the {_values(how)} make the population covariance matrix{whose} impossible: {ref}{where} "
                          f"is {how} {words}", ref.location, spec.source_line(ref.location))

    for (kind, names), (ref, value, how) in settings.items():
        if kind.endswith("_variance") and value < 0:
            raise fail(ref, how, f"{user_number(value)}, and a variance cannot be negative")
    for (kind, names), (ref, value, how) in settings.items():
        if not kind.endswith("_covariance"):
            continue
        variance = kind.replace("covariance", "variance")
        a, b = names
        va, vb = entry.get((variance, (a,))), entry.get((variance, (b,)))
        covariance = entry.get((kind, (a, b)), entry.get((kind, (b, a))))
        if va is None or vb is None or covariance is None or not va >= 0 or not vb >= 0 or np.isnan(covariance):
            continue  # a value not given yet (NaN), or a negative variance said above
        bound = np.sqrt(va * vb)
        if abs(covariance) > bound * (1 + 1e-9):
            correlation = f", a correlation of {covariance / bound:.2f}" if bound > 0 else ""
            shown = [user_number(v) if (variance, (x,)) in settings else rounded_number(v)  # given, or computed
                     for x, v in ((a, va), (b, vb))]
            raise fail(ref, how, f"{user_number(value)}, beyond what the variances of {a} ({shown[0]}) and {b} "
                                 f"({shown[1]}) allow{correlation}")


class ImpossibleAtStart(ModelError):
    """A 'fix' statement's covariance beyond what the variances at a search's start allow, so that the search could
    not begin (:func:`fixed_values_at_start`): the model error of a fit, but in a resampling refit that starts from
    its sample's data that replicate's failure, counted as the refits count one that does not converge
    (pipeline.continuous.replicate_fits)."""


def fixed_values_at_start(spec: Spec, table: ParameterTable, values: np.ndarray,
                          labels: tuple[str, ...] | None = None) -> None:
    """The error of a search that could not begin because a 'fix' statement's covariance lies beyond what the
    variances at the start (``values``: every table entry's start value, the free variances from the data) allow,
    named at the statement (:func:`given_values_possible`), in each group (``labels``; None: one group)."""
    for g, label in enumerate(labels or (None,)):
        given_values_possible(spec, table, values, g, label, starts=False, search_start=True)


def given_entries(table: ParameterTable, starts: bool = True) -> np.ndarray:
    """Each table entry's value as the model file gives it ('fix' and, unless not ``starts``, 'start' statements, the
    values that set the factors' scales), NaN where the file gives none."""
    values = np.full(len(table.parameters), np.nan)
    for i, par in enumerate(table.parameters):
        if not par.free:
            values[i] = par.offset
        elif starts and len(par.terms) == 1:
            index, coefficient = par.terms[0]
            values[i] = par.offset + coefficient * table.start[index]
    return values


def impossible_fixed_values(table: ParameterTable, source: str, starts: bool = True, group: int = 0,
                            spec: Spec | None = None) -> None:
    """An error (the model file is the bad input) when the values the model file gives ('fix' and 'start'
    statements, and the values that set each factor's scale) cannot belong to any population: a variance below
    zero, or covariances whose correlations (with both variances given too) lie beyond +/-1 or cannot hold together
    (their correlation matrix is not positive definite).  A covariance matrix is positive semi-definite, so each
    of its variances is at least 0, each correlation within +/-1, and so is every principal submatrix (Horn &
    Johnson 2013, Observation 7.1.2).  With ``spec``, correlations that cannot hold together are refused at the first
    statement that fixes one of them (re-check s15: the file alone was named)."""
    given: dict[tuple, tuple[float, str, object]] = {}  # (kind, variables) -> (value, how it was given, parameter)
    for par in table.parameters:
        if par.group != group:
            continue
        if not par.free:
            given[(par.kind, par.variables)] = (par.offset, "fixed at", par)
        elif starts and len(par.terms) == 1 and not np.isnan(table.start[par.terms[0][0]]):  # a 'start' statement
            index, coefficient = par.terms[0]
            value = par.offset + coefficient * table.start[index]
            given[(par.kind, par.variables)] = (value, "given the start value", par)
    for value, how, par in given.values():
        if par.kind in ("factor_variance", "residual_variance") and value < 0:
            raise ModelError(f"{source}: the {_values(how)} make the population covariance matrix impossible: "
                             f"{as_written(par)} is {how} {user_number(value)}, and a variance cannot be negative")
    for kind, names in (("factor", table.latent), ("residual", table.observed)):
        variance = {x: given[(f"{kind}_variance", (x,))][0] for x in names if (f"{kind}_variance", (x,)) in given}
        pairs = {}
        for (k, variables), (value, how, par) in given.items():
            a, b = variables[0], variables[-1]
            if k == f"{kind}_covariance" and a in variance and b in variance:
                pairs[frozenset((a, b))] = (value, how, par)
        for value, how, par in pairs.values():
            a, b = par.variables
            if abs(value) > np.sqrt(variance[a] * variance[b]) * (1 + 1e-9):  # zero variances: a zero covariance only
                raise ModelError(f"{source}: the {_values(how)} make the population covariance matrix impossible: "
                                 f"{as_written(par)} is {how} {user_number(value)}, beyond what the variances of {a} and {b} "
                                 f"allow (a correlation beyond +/-1)")
        # the largest set of these variables whose covariances are all given: it must be positive definite
        members = sorted({x for pair in pairs for x in pair}, key=list(names).index)
        while len(members) > 2:
            lacking = [sum(frozenset((x, y)) not in pairs for y in members if y != x) for x in members]
            if not any(lacking):
                break
            members.pop(int(np.argmax(lacking)))
        if len(members) < 3:
            continue
        sd = np.sqrt([variance[x] for x in members])
        corr = np.eye(len(members))
        for i in range(len(members)):
            for j in range(i):
                corr[i, j] = corr[j, i] = pairs[frozenset((members[i], members[j]))][0] / (sd[i] * sd[j])
        # a population to draw rows from needs a positive definite matrix; a fit's fixed values only need one that
        # some population has: correlations fixed at 1 (factors merged, as a test of their distinctness does) are a
        # singular matrix, not an impossible one
        smallest = np.linalg.eigvalsh(corr)[0]
        if smallest <= 0 if starts else smallest < -1e-9:
            values = [f"{journal_decimal(corr[i, j], digits=2)} ({members[i]} with {members[j]})"  # each pair with its value
                      for i in range(len(members)) for j in range(i + 1, len(members))]
            what = "factor correlations" if kind == "factor" else "residual correlations"
            hows = {pairs[frozenset((members[i], members[j]))][1] for i in range(len(members)) for j in range(i)}
            how = "fixed at" if hows == {"fixed at"} else "given as"
            said = (f"the {what} {how} {word_list(values)} cannot hold together (their "
                    f"matrix is not positive {'' if starts else 'semi-'}definite), so no population has them; change "
                    f"the values")
            statements = (tuple(spec.starts) if starts else ()) + tuple(spec.fixed) if spec is not None else ()
            ref = next((r for setting in statements for r in setting.refs if r.kind == "covariance"
                        and frozenset(r.names) in pairs and set(r.names) <= set(members)), None)
            if ref is None:
                raise ModelError(f"{source}: {said}")
            raise ModelError(said, ref.location, spec.source_line(ref.location))
