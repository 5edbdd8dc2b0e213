"""What exactly was fitted, in the terms a methods section uses.

A :class:`ModelDescription` lists every departure from a simple-structure model with
correlated factors: cross-loadings, residual covariances, factors held uncorrelated,
higher-order factors, how each factor got its scale, equal, fixed and bounded
parameters, ordinal items, and what is held equal across groups.  It is built once
from the specification and the parameter table, so that the methods paragraph (and
any other view) describes the model fitted, not a generic one.
"""

from __future__ import annotations

from dataclasses import dataclass

from cfa_tool.language.checks import exogenous_factors
from cfa_tool.language.names import read_reference, written_group, written_name
from cfa_tool.language.spec import Spec, equality_words
from cfa_tool.model.parameters import ParameterTable
from cfa_tool.numbers import word_list


#: the scale of a factor scaled by its variance in the first group, in a later group where its loadings are held equal
#: across groups: its variance is estimated there, the loadings held equal carrying the scale (metric invariance)
CARRIED_BY_LOADINGS = "loadings held equal"


@dataclass(frozen=True)
class FactorScale:
    """How one factor's scale is set."""
    factor: str
    # "marker", "variance", "effects", "fixed by the model" (a fix the model file states), or :data:`CARRIED_BY_LOADINGS`
    method: str
    marker: str | None = None  # the indicator whose loading is fixed, for marker scaling
    below_higher_order: bool = False  # its variance parameter is a disturbance variance
    marker_loading: float = 1.0  # the marker's fixed loading: -1 when every candidate is declared reversed
    passed_over: tuple[str, ...] = ()  # declared-reversed items before the marker, not taken as marker
    counted_reversed: tuple[str, ...] = ()  # effects coding: declared-reversed items, whose loadings count turned

    def to_dict(self) -> dict:
        out = {"factor": self.factor, "method": self.method, "marker": self.marker}
        if self.marker is not None and (self.marker_loading != 1.0 or self.passed_over):
            # only where a 'reversed' statement moved the marker, so that other models' results stay as they were
            out.update(marker_loading=self.marker_loading, reversed_items_passed_over=list(self.passed_over))
        if self.counted_reversed:
            out["loadings_counted_reversed"] = list(self.counted_reversed)
        return out


@dataclass(frozen=True)
class ModelDescription:
    """What exactly was fitted, in the terms of a methods section."""
    first_order: tuple[str, ...]
    higher_order: tuple[tuple[str, tuple[str, ...]], ...]  # (factor, the factors it explains)
    indicators: tuple[str, ...]
    cross_loadings: tuple[tuple[str, tuple[str, ...]], ...]  # (item, the factors it loads on)
    residual_covariances: tuple[tuple[str, str], ...]
    factor_covariances_added: tuple[tuple[str, str], ...]  # 'covary' between factors that are not otherwise correlated
    uncorrelated: tuple[tuple[str, str], ...]  # factor pairs held uncorrelated
    correlated_factors: bool  # first-order factors (without a higher-order factor) correlate freely
    scales: tuple[FactorScale, ...]
    # parameters are (kind, names, group) as the model file names them, e.g. ("loading", ("visual", "x2"), None)
    equal: tuple[tuple[tuple, ...], ...]  # each tuple one constraint
    fixed: tuple[tuple[tuple, float], ...]  # parameters the model file fixes (not for scaling)
    bounds: tuple[tuple[tuple, float | None, float | None], ...]
    ordinal: tuple[str, ...]
    invariant: tuple[str, ...]  # classes held equal across groups
    noninvariant: tuple[tuple, ...]  # parameters exempted
    method_factors: tuple[str, ...] = ()  # factors of a method of measurement, not traits
    # exploratory blocks: (factors, items, rotation); their factors, identification and loadings are described
    # by the block alone, not in the fields above
    exploratory: tuple[tuple[tuple[str, ...], tuple[str, ...], str], ...] = ()
    confirmatory_indicators: tuple[str, ...] = ()  # the items of the confirmatory (not exploratory) factors
    # each group's scales (group label, scales), when some factor is scaled differently in some group ('in group'
    # statements); empty when every group is scaled as ``scales`` says
    group_scales: tuple[tuple[str, tuple[FactorScale, ...]], ...] = ()
    # the items each 'reversed' statement declares reverse-keyed, with the lowest and highest answer of their scale
    reverse_keyed: tuple[tuple[tuple[str, ...], float, float], ...] = ()
    # the group labels of a model fitted in groups (empty for one group): the texts that name a group write it among
    # them (language.names.written_group)
    groups: tuple[str, ...] = ()
    # higher-order factors whose part of the model is just-identified (:func:`higher_order_saving`): the fit
    # equals that of their factors correlated freely and does not test them
    just_identified_higher_order: tuple[str, ...] = ()
    # the degrees of freedom the higher-order structure saves over its first-order factors correlated freely
    # (:func:`higher_order_saving`; None when some higher-order factor could not be checked)
    higher_order_df: int | None = None

    def to_dict(self) -> dict:
        keyed = {"reverse_keyed": [{"items": list(items), "lowest": lo, "highest": hi}
                                   for items, lo, hi in self.reverse_keyed]} if self.reverse_keyed else {}
        return keyed | {
            "exploratory_blocks": [{"factors": list(f), "items": list(i), "rotation": r} for f, i, r in self.exploratory],
            "first_order_factors": list(self.first_order),
            "higher_order_factors": [{"factor": f, "explains": list(lower),
                                      "just_identified": f in self.just_identified_higher_order}
                                     for f, lower in self.higher_order],
            "higher_order_df_saved": self.higher_order_df,
            "indicators": list(self.indicators),
            "cross_loadings": [{"item": x, "factors": list(fs)} for x, fs in self.cross_loadings],
            "residual_covariances": [list(p) for p in self.residual_covariances],
            "factor_covariances_added": [list(p) for p in self.factor_covariances_added],
            "uncorrelated_factors": [list(p) for p in self.uncorrelated],
            "correlated_factors": self.correlated_factors,
            "scales": [s.to_dict() for s in self.scales],
            "scales_by_group": [{"group": label, "scales": [s.to_dict() for s in scales]}
                                for label, scales in self.group_scales],
            "equal": [[_ref_dict(r) for r in e] for e in self.equal],
            "fixed": [{**_ref_dict(r), "value": value} for r, value in self.fixed],
            "bounds": [{**_ref_dict(r), "lower": lo, "upper": hi} for r, lo, hi in self.bounds],
            "ordinal_items": list(self.ordinal),
            "held_equal_across_groups": equality_words(self.invariant),
            "noninvariant": [_ref_dict(r) for r in self.noninvariant],
            "method_factors": list(self.method_factors),
        }


def split_label(label: str) -> tuple[str, tuple[str, ...], str | None]:
    """A parameter's machine label as the parameter table writes it ('loading(F1, x1)',
    'residual_variance(x9) [north]', 'variance("At work, I feel full of energy.")') read into its kind, its
    variables and its group (None without one), by the model language's quoting rules
    (:func:`cfa_tool.language.names.read_reference`): a name's commas and brackets stay in the name."""
    return read_reference(label)


def parameter_words(kind: str, names: tuple[str, ...], group: str | None = None,
                    observed: tuple[str, ...] | frozenset | None = None, article: bool = True,
                    quoted: bool = False, groups: tuple[str, ...] = ()) -> str:
    """A parameter in the words a researcher uses: 'the loading of helpful on courtesy', 'the residual variance
    of temperature', 'the covariance of factors F1 and F2', '... in group north'.  ``kind`` is a parameter
    table kind (factor_variance, residual_covariance, ...) or a model file's (variance, covariance: then
    ``observed`` tells an item's residual from a factor; without it they stay 'variance' and 'covariance');
    ``article`` False leaves out the leading 'the' (a table cell); ``quoted`` writes the names as the model language
    writes them (:func:`cfa_tool.language.names.written_name`: in double quotes unless plain), for the lists of a
    methods paragraph, where a name's commas would run into the list's; ``groups`` (the fit's labels) or ``quoted``
    write the group as every text names a group among them (:func:`cfa_tool.language.names.written_group`).  The one
    place that turns parameters into words."""
    if kind in ("variance", "covariance") and observed is not None:
        kind = ("residual_" if names and names[0] in observed else "factor_") + kind
    if quoted:
        names = tuple(written_name(n) for n in names[:1]) + (
            tuple(names[1:]) if kind == "threshold" else tuple(written_name(n) for n in names[1:]))
    pair = word_list(map(str, names))
    if kind == "loading" and len(names) == 2:
        text = f"loading of {names[1]} on {names[0]}"
    elif kind == "threshold" and len(names) == 2:
        text, article = f"threshold {names[1]} of {names[0]}", False
    elif kind == "threshold" and len(names) > 2:  # several thresholds of one item: (item, 1, 2, 3)
        text, article = f"thresholds {', '.join(map(str, names[1:-1]))} and {names[-1]} of {names[0]}", False
    else:
        text = {"factor_variance": f"variance of factor {pair}",
                "disturbance_variance": f"disturbance variance of factor {pair}",  # below a higher-order factor
                "factor_covariance": f"covariance of factors {pair}",
                "residual_variance": f"residual variance of {pair}",
                "residual_covariance": f"residual covariance of {pair}",
                "intercept": f"intercept of {pair}",
                "mean": f"mean of {pair}",
                "threshold": f"thresholds of {pair}"}.get(kind, f"{kind.replace('_', ' ')} of {pair}")
    if group is not None:
        text += f" in group {written_group(group, groups) if quoted or groups else group}"
    return ("the " if article else "") + text


def label_words(label: str, article: bool = True, observed: tuple[str, ...] | frozenset | None = None,
                quoted: bool = False, groups: tuple[str, ...] = ()) -> str:
    """A machine label ('residual_variance(x9) [north]') in words ('the residual variance of x9 in group north');
    ``observed``: the model's items, for labels in a model file's words ('variance(x9)'); ``quoted`` as in
    :func:`parameter_words`, ``groups`` too."""
    kind, names, group = split_label(label)
    return parameter_words(kind, names, group, observed=observed, article=article, quoted=quoted, groups=groups)


def _ref_dict(ref: tuple) -> dict:
    kind, names, group = ref
    return {"kind": kind, "variables": list(names), "group": group}


def _ref(ref) -> tuple:
    return (ref.kind, tuple(ref.names), ref.group)


def describe(spec: Spec, table: ParameterTable) -> ModelDescription:
    """The model as fitted: from the specification (what the file says) and the parameter table
    (how the tool completed it: scales, defaults)."""
    latent = set(spec.factor_names)
    block = spec.exploratory_factors  # described by their block

    def outside(*names) -> bool:
        return not block.intersection(names)

    higher = tuple((f.name.text, tuple(i.text for i in f.indicators if i.text in latent))
                   for f in spec.factors if any(i.text in latent for i in f.indicators))
    first_order = tuple(f.name.text for f in spec.factors if any(i.text not in latent for i in f.indicators)
                        and outside(f.name.text))
    factors_of: dict[str, list[str]] = {}
    for f in (f for f in spec.factors if outside(f.name.text)):
        for i in f.indicators:
            if i.text not in latent:
                factors_of.setdefault(i.text, []).append(f.name.text)
    cross = tuple((x, tuple(fs)) for x, fs in factors_of.items() if len(fs) > 1)
    residual = tuple((p.first.text, p.second.text) for p in spec.covary if p.first.text not in latent)
    exo = set(exogenous_factors(spec))
    added = tuple(p.key() for p in spec.covary if p.first.text in latent and not (p.first.text in exo and p.second.text in exo))
    uncorrelated = tuple((p.first.text, p.second.text) for p in spec.uncorrelated if outside(p.first.text, p.second.text))
    exo_first = [f for f in first_order if f in exo]
    held = {frozenset(p) for p in uncorrelated}
    correlated = any(frozenset((a, b)) not in held for i, a in enumerate(exo_first) for b in exo_first[i + 1:])
    scales = [tuple(s for s in _scales(spec, table, g) if outside(s.factor)) for g in range(table.n_groups)]
    untested, saving = higher_order_saving(spec, table)
    return ModelDescription(
        first_order=first_order,
        higher_order=higher,
        indicators=spec.observed_names,
        cross_loadings=cross,
        confirmatory_indicators=tuple(factors_of),
        residual_covariances=residual,
        factor_covariances_added=added,
        uncorrelated=uncorrelated,
        correlated_factors=correlated,
        scales=scales[0],
        group_scales=tuple(zip(table.groups, scales)) if len(set(scales)) > 1 else (),
        equal=tuple(tuple(_ref(r) for r in group) for group in spec.equal),
        fixed=tuple((_ref(ref), setting.value) for setting in spec.fixed for ref in setting.refs if outside(*ref.names)),
        bounds=tuple((_ref(ref), b.lower, b.upper) for b in spec.bounds for ref in b.refs),
        ordinal=tuple(n.text for n in spec.ordinal),
        invariant=tuple(spec.invariant),
        noninvariant=tuple(_ref(r) for r in spec.noninvariant),
        method_factors=tuple(n.text for n in spec.method),
        exploratory=tuple((b.factor_names, b.item_names, b.rotation.text) for b in spec.exploratory),
        reverse_keyed=tuple((tuple(i.text for i in k.items), k.minimum, k.maximum) for k in spec.reversed),
        groups=tuple(table.groups) if table.multigroup else (),
        just_identified_higher_order=untested,
        higher_order_df=saving,
    )


def higher_order_saving(spec: Spec, table: ParameterTable) -> tuple[tuple[str, ...], int | None]:
    """The higher-order factors whose part of the model is just-identified, and the degrees of freedom the
    higher-order structure as a whole saves (None when some higher-order factor cannot be checked).

    A part is just-identified when the model with the factor taken out and the factors it explains correlated freely
    has as many free parameters (in every group, with what the model holds equal across groups).  The higher-order
    model is nested in that one (it restricts the first-order factors' covariance matrix, which the other leaves
    free), so with no degree of freedom between them the two fit alike and the fit says nothing of the higher-order
    structure: a second-order factor over exactly three first-order factors, 3 loadings (one fixed for its scale) and
    its variance and 3 disturbances for 3 variances and 3 covariances (Rindskopf & Rose 1988; Brown 2015, ch. 8,
    recalled from memory).  A second-order factor over two first-order factors is identified only through its
    covariance with another factor (Rindskopf & Rose 1988), so taken out alone it may save nothing while the structure
    it shares with another saves a degree of freedom: two correlated second-order factors over two first-order factors
    each have 2 loadings, 2 variances, a covariance and 4 disturbances for the 4 factors' 10 variances and covariances,
    1 df (newuser-s23, finding 4).  So the parts that save nothing alone are said untested only when taking all of
    them out together saves nothing either; the saving of the whole structure is the difference in free parameters
    from the model with every checked higher-order factor taken out, the df of the test of the structure against the
    first-order factors correlated freely.

    Checked only where taking a factor out leaves every other statement's meaning alone: a factor explaining
    factors only, explained by none, whose factors no other factor explains and no statement names by their variance,
    covariance or mean (nor the factor itself), without exploratory blocks."""
    from dataclasses import replace

    from cfa_tool.errors import ModelError
    from cfa_tool.language.checks import all_refs
    from cfa_tool.model.parameters import build_parameter_table

    if spec.exploratory:
        return (), None
    latent = set(spec.factor_names)
    explained: dict[str, int] = {}
    for f in spec.factors:
        for i in f.indicators:
            if i.text in latent:
                explained[i.text] = explained.get(i.text, 0) + 1
    # every name a statement reads other than an item's loading (a loading on a factor, a variance, a mean, ...)
    named = {n for r in all_refs(spec) if r.kind != "loading" or r.names[-1] in latent for n in r.names}
    named |= {n.text for p in spec.covary + spec.uncorrelated for n in (p.first, p.second)}
    named |= {n.text for s in spec.scaling for n in s.factors}
    ordinal = {}
    for p in table.parameters:
        if p.kind == "threshold" and p.group == 0:
            ordinal[p.variables[0]] = ordinal.get(p.variables[0], 0) + 1

    def saved(taken_out: set[str]) -> int | None:
        """Free parameters gained by taking these higher-order factors out (None when that model cannot be built)."""
        alternative = replace(spec, factors=tuple(g for g in spec.factors if g.name.text not in taken_out))
        try:
            other = build_parameter_table(alternative, table.groups if table.multigroup else None,
                                          mean_structure=table.mean_structure, ordinal=ordinal or None)
        except ModelError:
            return None
        return other.n_free - table.n_free

    checked, alone = [], []
    for f in spec.factors:
        lower = [i.text for i in f.indicators]
        h = f.name.text
        if (h in explained or not all(x in latent for x in lower) or any(explained[x] > 1 for x in lower)
                or named & {h, *lower}):
            continue
        own = saved({h})
        if own is None:
            continue
        checked.append(h)
        if own == 0:
            alone.append(h)
    if not checked:
        return (), None
    whole = saved(set(checked))
    together = 0 if len(alone) == 1 else whole if len(alone) == len(checked) else saved(set(alone))
    # the saving of the whole structure only where every higher-order factor could be taken out
    higher = sum(any(i.text in latent for i in f.indicators) for f in spec.factors)
    return (tuple(alone) if alone and together == 0 else ()), (whole if len(checked) == higher else None)


def factor_scales(spec: Spec, table: ParameterTable, group: int = 0) -> dict[str, FactorScale]:
    """How each factor's scale is set in ``group``, by the factor's name (what decides the way a factor points, for
    the caution on factors without a majority of their items: assessment.reliability.keying_warnings)."""
    return {s.factor: s for s in _scales(spec, table, group)}


def _scales(spec: Spec, table: ParameterTable, group: int = 0) -> tuple[FactorScale, ...]:
    """How each factor got its scale, read from one group's parameters."""
    out = []
    below = {i.text for f in spec.factors for i in f.indicators if i.text in set(spec.factor_names)}
    keyed = table.reverse_keyed
    for name in spec.factor_names:
        endogenous = name in below
        own = [p for p in table.parameters if p.group == group and (
            (p.kind == "loading" and p.variables[0] == name) or (p.kind == "factor_variance" and p.variables == (name,)))]
        scale = [p for p in own if p.origin == "scale"]
        if any(p.origin == "user" for p in own) and not scale:
            out.append(FactorScale(name, "fixed by the model", None, endogenous))
        elif any(p.kind == "factor_variance" for p in scale):
            out.append(FactorScale(name, "variance", None, endogenous))
        elif any(p.kind == "loading" and p.free for p in scale):
            items = [p.variables[1] for p in own if p.kind == "loading"]
            out.append(FactorScale(name, "effects", None, endogenous,
                                   counted_reversed=tuple(x for x in items if (name, x) in keyed)))
        elif scale:
            marker = scale[0].variables[1]
            indicators = next(f.indicators for f in spec.factors if f.name.text == name)
            before = [i.text for i in indicators[:[i.text for i in indicators].index(marker)]]
            out.append(FactorScale(name, "marker", marker, endogenous, scale[0].offset,
                                   tuple(x for x in before if (name, x) in keyed)))
        else:
            method = spec.scaling_of(name)
            if method == "variance" and any(p.kind == "factor_variance" and p.free for p in own):
                method = CARRIED_BY_LOADINGS  # a later group of a model holding the loadings equal (hostile s21)
            out.append(FactorScale(name, method, None, endogenous))
    return tuple(out)
