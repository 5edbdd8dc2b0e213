"""Checks of meaning on a parsed :class:`Spec` (no data needed).

Each check raises :class:`ModelError` pointing at the statement or name at
fault: duplicate factors, circular higher-order factors, references to
parameters the model does not have, contradictory constraints, and factors
with too few indicators to be identified.
"""

from __future__ import annotations

from dataclasses import replace

from cfa_tool.numbers import user_number, word_list

from cfa_tool.suggest import close_names
from cfa_tool.errors import Location, ModelError
from cfa_tool.options import Option
from cfa_tool.language.names import written_group, written_name
from cfa_tool.language.spec import NamePair, ParameterRef, Spec, answer_key, fix_sets_scale


def _fail(spec: Spec, message: str, location: Location | None) -> ModelError:
    return ModelError(message, location, spec.source_line(location))


def exogenous_factors(spec: Spec) -> tuple[str, ...]:
    """Factors that are not indicators of another factor."""
    below = {ind.text for f in spec.factors for ind in f.indicators}
    return tuple(n for n in spec.factor_names if n not in below)


def existing_parameters(spec: Spec) -> set[tuple]:
    """Keys (as :meth:`ParameterRef.key`) of every parameter the model has before constraints."""
    keys: set[tuple] = set()
    for factor in spec.factors:
        for ind in factor.indicators:
            keys.add(("loading", (factor.name.text, ind.text)))
    for name in spec.factor_names + spec.observed_names:
        keys.add(("variance", (name,)))
    keys.update(("intercept", (x,)) for x in spec.observed_names)
    keys.update(("mean", (f,)) for f in spec.factor_names)
    zero = {p.key() for p in spec.uncorrelated}
    exo = exogenous_factors(spec)
    for i, a in enumerate(exo):
        for b in exo[i + 1 :]:
            pair = tuple(sorted((a, b)))
            if pair not in zero:
                keys.add(("covariance", pair))
    for pair in spec.covary:
        keys.add(("covariance", pair.key()))
    return keys


#: Limits on a model's size, far above any questionnaire, that keep checks and fitting within reach
MAX_INDICATORS = 2_000
MAX_FACTORS = 500


def check_spec(spec: Spec) -> None:
    _check_size(spec)
    _check_factors(spec)
    _check_scaling(spec)
    _check_ordinal(spec)
    _check_method(spec)
    _check_reversed(spec)
    _check_answers(spec)
    _check_joins(spec)
    _check_pairs(spec)
    _check_covary_without_effect(spec)
    _check_references(spec)
    _check_contradictions(spec)
    _check_indicator_counts(spec)


def _check_factors(spec: Spec) -> None:
    seen: dict[str, Location] = {}
    for factor in spec.factors:
        name = factor.name
        if name.text in seen:
            first = seen[name.text]
            raise _fail(spec, f"factor '{name}' is declared twice (first on line {first.line}); list all its indicators in one statement", name.location)
        seen[name.text] = name.location
        inds: set[str] = set()
        for ind in factor.indicators:
            if ind.text in inds:
                raise _fail(spec, f"'{ind}' is listed twice as an indicator of '{name}'", ind.location)
            if ind.text == name.text:
                raise _fail(spec, f"factor '{name}' cannot be an indicator of itself", ind.location)
            inds.add(ind.text)
    # circular higher-order structures: follow "factor -> its latent indicators" (depth first, with an
    # explicit stack, so that long chains of higher-order factors need no recursion)
    children = {f.name.text: [i.text for i in f.indicators if i.text in seen] for f in spec.factors}
    state: dict[str, int] = {}
    for root in seen:
        if root in state:
            continue
        path = [root]
        state[root] = 1
        stack = [iter(children[root])]
        while stack:
            child = next(stack[-1], None)
            if child is None:
                state[path.pop()] = 2
                stack.pop()
            elif state.get(child) == 1:
                cycle = path[path.index(child) :] + [child]
                raise _fail(spec, "factors cannot indicate each other in a circle: " + " -> ".join(cycle), seen[path[-1]])
            elif child not in state:
                state[child] = 1
                path.append(child)
                stack.append(iter(children[child]))


def _check_size(spec: Spec) -> None:
    if len(spec.factors) > MAX_FACTORS:
        factor = spec.factors[MAX_FACTORS]
        raise _fail(spec, f"the model declares {len(spec.factors):,} factors; this tool fits at most {MAX_FACTORS:,}",
                    factor.name.location)
    indicators = spec.observed_names
    if len(indicators) > MAX_INDICATORS:
        raise _fail(spec, f"the model has {len(indicators):,} indicators; this tool fits at most {MAX_INDICATORS:,}",
                    spec.first_mention(indicators[MAX_INDICATORS]))


def _check_scaling(spec: Spec) -> None:
    """Every factor a 'scale' statement names must be a factor of the model; a factor named by two
    'scale' statements, or named by one and scaled by the model's own fix of its loading or variance,
    gets two scales: an error, never a silent choice; so is 'scale latent by ...' given twice.  A statement naming a
    factor takes precedence over 'scale latent by ...' in either order (Spec.scaling_of)."""
    factors = set(spec.factor_names)
    named: dict[str, object] = {}
    every = None  # the first 'scale latent by ...' statement
    fixed_scale: dict[str, object] = {}
    block = spec.exploratory_factors  # their zeros fix the block's orientation, not a scale
    for setting in spec.fixed:
        for ref in setting.refs:
            if ref.names[0] in block:
                continue
            if (ref.group is None and ref.kind in ("loading", "variance") and ref.names[0] in factors
                    and fix_sets_scale(ref.kind, setting.value)):
                fixed_scale.setdefault(ref.names[0], ref)
    for setting in spec.scaling:
        if not setting.factors:  # 'scale latent by ...': every factor outside exploratory blocks
            if every is not None:
                raise _fail(spec, f"'scale latent by ...' is given twice (the first, 'by {every.method}', on line "
                                  f"{every.location.line}); give one scale for every factor, and name a factor in a "
                                  f"'scale' statement of its own to scale it otherwise", setting.location)
            every = setting
            if "latent" in factors:
                raise _fail(spec, f"'latent' is both a factor of this model and the word for every factor in 'scale "
                                  f"latent by {setting.method}'; to scale the factor latent alone write it in double "
                                  f"quotes ('scale \"latent\" by {setting.method}'), or rename the factor",
                            setting.location)
            if factors and factors <= block:
                raise _fail(spec, f"'scale latent by {setting.method}' applies to no factor: this model's factors are "
                                  f"all in exploratory blocks, whose factors have variance 1 before rotation; remove "
                                  f"the statement", setting.location)
        for name in setting.factors:
            if name.text in named:
                raise _fail(spec, f"'{name}' is named by two 'scale' statements (the first on line "
                                  f"{named[name.text].line}); give each factor one scale", name.location)
            named[name.text] = name.location
            if name.text in fixed_scale:
                ref = fixed_scale[name.text]
                raise _fail(spec, f"'scale {written_name(name.text)} by {setting.method}' and the fix of {ref} (line {ref.location.line}) both "
                                  f"set the scale of '{name}'; keep one of them", name.location)
        for name in setting.factors:
            if name.text not in factors:
                guess = close_names(name.text, spec.factor_names)
                if guess:
                    hint = f"; did you mean '{guess[0]}'?"
                elif name.text in set(spec.observed_names):
                    hint = "; it is an indicator, and only factors are scaled"
                else:
                    hint = f"; the factors are {', '.join(spec.factor_names[:10])}" + (", ..." if len(factors) > 10 else "")
                raise _fail(spec, f"'scale' names '{name}', which is not a factor of this model{hint}", name.location)


def _check_ordinal(spec: Spec) -> None:
    observed = set(spec.observed_names)
    for name in spec.ordinal:
        if name.text in spec.factor_names:
            raise _fail(spec, f"'{name}' is a factor; only indicators can be ordinal", name.location)
        if name.text not in observed:
            raise _unknown_name(spec, name.text, name.location)


def _check_method(spec: Spec) -> None:
    seen: set[str] = set()
    for name in spec.method:
        if name.text not in spec.factor_names:
            if name.text in spec.observed_names:
                raise _fail(spec, f"'{name}' is an indicator; 'method' marks factors that stand for a method of "
                                  f"measurement (wording, acquiescence), not traits", name.location)
            raise _unknown_name(spec, name.text, name.location)
        if name.text in seen:
            raise _fail(spec, f"'{name}' is named as a method factor twice", name.location)
        seen.add(name.text)
        for factor in spec.factors:
            if factor.name.text == name.text and any(i.text in spec.factor_names for i in factor.indicators):
                raise _fail(spec, f"'{name}' explains other factors; a method factor stands for a way of answering "
                                  f"items and loads on items only", name.location)
            if any(i.text == name.text for i in factor.indicators):
                raise _fail(spec, f"'{name}' is explained by the higher-order factor '{factor.name}'; a method factor "
                                  f"(a way of answering) is not part of a trait", name.location)
    if spec.method and len(seen) == len(spec.factor_names):
        raise _fail(spec, "every factor is marked as a method factor; a model needs at least one trait",
                    spec.method[0].location)


def _check_reversed(spec: Spec) -> None:
    seen: dict[str, Location] = {}
    for keying in spec.reversed:
        _items_once(spec, keying.items, seen, "only items can be reverse-keyed",
                    "'{name}' is declared reversed twice (first on line {line}); declare each item once")


def _items_once(spec: Spec, names, seen: dict[str, Location], of_factor: str, twice: str) -> None:
    """Items named by a statement that says something of items: each an item of the model (``of_factor`` ends the
    message about a factor) and named once across such statements (``seen``: the first mention of each; ``twice``
    the message, with {name} and {line})."""
    observed = set(spec.observed_names)
    for name in names:
        if name.text in spec.factor_names:
            raise _fail(spec, f"'{name}' is a factor; {of_factor}", name.location)
        if name.text not in observed:
            raise _unknown_name(spec, name.text, name.location)
        if name.text in seen:
            raise _fail(spec, twice.format(name=name, line=seen[name.text].line), name.location)
        seen[name.text] = name.location


def _check_answers(spec: Spec) -> None:
    """'answers' statements: each word listed once (matching ignores case and surrounding spaces), each item
    covered by one statement, at most one statement for every item (without 'for')."""
    covered: dict[str, Location] = {}
    general: Location | None = None
    for coding in spec.answers:
        words: dict[object, str] = {}
        for answer in coding.answers:
            key = answer_key(answer.word) if answer.word is not None else answer.number
            if key in words:
                raise _fail(spec, f"the answer '{answer.shown}' is listed twice in this statement (as "
                                  f"'{words[key]}' too; case and surrounding spaces do not count); list each answer "
                                  f"once", answer.location)
            words[key] = answer.shown
        if not any(a.word is not None for a in coding.answers):
            raise _fail(spec, "an 'answers' statement lists words the cells hold, such as 'answers \"Disagree\" = 1, "
                              "\"Agree\" = 2'; this one lists numbers only", coding.location)
        if not coding.items:
            if general is not None:
                raise _fail(spec, f"a second 'answers' statement for every item (the first is on line {general.line}); "
                                  f"name the items of the others with 'for ITEMS'", coding.location)
            general = coding.location
        _items_once(spec, coding.items, covered, "'answers' says what the answers to items mean",
                    "the answers of '{name}' are given twice (first on line {line}); give each item's answers once")


def _check_joins(spec: Spec) -> None:
    """'join answers' statements: each item named an item of the model, and an item's codes joined by one statement
    only (two statements of one item that share a code would join in an order; one statement says the category)."""
    observed = set(spec.observed_names)
    joined: dict[str, list] = {}
    for join in spec.joins:
        for name in join.items:
            if name.text in spec.factor_names:
                raise _fail(spec, f"'{name}' is a factor; 'join answers' joins answer categories of ordinal items",
                            name.location)
            if name.text not in observed:
                raise _unknown_name(spec, name.text, name.location)
            for earlier in joined.get(name.text, ()):
                shared = sorted(set(earlier.values) & set(join.values))
                if shared:
                    both = sorted(set(earlier.values) | set(join.values))
                    raise _fail(spec, f"the answers {', '.join(user_number(v) for v in shared)} of '{name}' are "
                                      f"joined by the statement on line {earlier.location.line} too; join the "
                                      f"category once, in one statement ('join answers "
                                      f"{', '.join(user_number(v) for v in both)} as ...')", name.location)
            joined.setdefault(name.text, []).append(join)


def _known_names(spec: Spec) -> list[str]:
    return list(spec.factor_names) + list(spec.observed_names)


def _unknown_name(spec: Spec, name: str, location: Location | None) -> ModelError:
    guess = close_names(name, _known_names(spec))
    hint = f"; did you mean '{guess[0]}'?" if guess else ""
    return _fail(spec, f"'{name}' is not a factor or an indicator in this model{hint}", location)


def _check_pairs(spec: Spec) -> None:
    known = set(_known_names(spec))
    latent = set(spec.factor_names)
    for word, pairs in (("covary", spec.covary), ("uncorrelated", spec.uncorrelated)):
        for pair in pairs:
            for n in (pair.first, pair.second):
                if n.text not in known:
                    raise _unknown_name(spec, n.text, n.location)
            if pair.first.text == pair.second.text:
                raise _fail(spec, f"'{word}' names '{pair.first}' twice; a variable's variance is addressed as variance({pair.first})", pair.second.location)
            if (pair.first.text in latent) != (pair.second.text in latent):
                raise _fail(
                    spec,
                    f"'{pair.first}' and '{pair.second}' are a factor and an indicator; only two factors or two indicators' residuals can covary",
                    pair.second.location,
                )
    exo = set(exogenous_factors(spec))
    for pair in spec.uncorrelated:
        a, b = pair.first.text, pair.second.text
        if a in latent and not (a in exo and b in exo):
            raise _fail(spec, f"'{a}' and '{b}' are already uncorrelated unless you covary them (a factor below a higher-order factor has no free covariances)", pair.first.location)
        if a not in latent:
            raise _fail(spec, f"residuals of '{a}' and '{b}' are uncorrelated unless you covary them; no statement is needed", pair.first.location)
    for word, pairs in (("covary", spec.covary), ("uncorrelated", spec.uncorrelated)):
        seen: dict[tuple[str, str], NamePair] = {}
        for pair in pairs:  # the same pair again: the methods paragraph counted 'two residual covariances' (s18)
            if pair.key() in seen:
                first = seen[pair.key()].first.location
                again = pair.first.location
                where = (f"on line {first.line} and again on line {again.line}"
                         if first is not None and again is not None and first.line != again.line else "twice")
                raise _fail(spec, f"'{word}' names '{pair.first}' and '{pair.second}' {where}; name each pair once",
                            pair.first.location)
            seen[pair.key()] = pair
    covaried = {p.key(): p for p in spec.covary}
    for pair in spec.uncorrelated:
        if pair.key() in covaried:
            raise _fail(spec, f"'{pair.first}' and '{pair.second}' are declared both to covary and to be uncorrelated", pair.first.location)


def _check_covary_without_effect(spec: Spec) -> None:
    """A 'covary' of two factors below no other factor changes nothing: their covariance is estimated by default
    (unless 'uncorrelated' fixes it at 0, a contradiction _check_pairs refuses). As 'free' of a parameter free
    already is refused (model.parameters._free_without_effect), so is this: the model listing shows the line and
    a reader takes it for part of the model (hostile trial s26, 02)."""
    exo = set(exogenous_factors(spec))
    for pair in spec.covary:
        a, b = pair.first.text, pair.second.text
        if a in exo and b in exo:
            raise _fail(spec, f"'{pair.first}' and '{pair.second}' covary already (the covariance of two factors "
                              f"below no other factor is estimated by default), so 'covary' changes nothing; remove "
                              f"the statement", pair.first.location)


def all_refs(spec: Spec) -> list[ParameterRef]:
    refs: list[ParameterRef] = []
    for setting in spec.fixed + spec.starts:
        refs.extend(setting.refs)
    refs.extend(spec.freed)
    for group in spec.equal:
        refs.extend(group)
    for bound in spec.bounds:
        refs.extend(bound.refs)
    refs.extend(spec.noninvariant)
    return refs


def _check_references(spec: Spec) -> None:
    existing = existing_parameters(spec)
    known = set(_known_names(spec))
    latent = set(spec.factor_names)
    zero = {p.key() for p in spec.uncorrelated}
    noninvariant = set(map(id, spec.noninvariant))
    for ref in all_refs(spec):
        for name in ref.names:
            if name not in known:
                raise _unknown_name(spec, name, ref.location)
        if ref.kind == "threshold":
            if ref.names[0] not in spec.observed_names:
                raise _fail(spec, f"'{ref.names[0]}' is a factor: thresholds belong to ordinal items", ref.location)
            if id(ref) not in noninvariant:
                raise _fail(spec, f"{ref}: thresholds come from the data and can only be named in 'noninvariant' "
                                  f"(to let them differ across groups)", ref.location)
            continue
        if ref.key() in existing:
            continue
        if ref.kind == "loading":
            f, x = ref.names
            if f not in latent:
                raise _fail(spec, f"in {ref}, '{f}' is not a factor; the factor comes first, as in loading(factor, item)", ref.location)
            raise _fail(spec, f"{ref} is not in the model: '{x}' is not an indicator of '{f}' (add it to 'factor {f}: ...' to allow a cross-loading)", ref.location)
        if ref.kind == "covariance":
            a, b = ref.names
            if a == b:
                raise _fail(spec, f"{ref} names one variable twice; write variance({a})", ref.location)
            if ref.key()[1] in zero:
                raise _fail(spec, f"{ref} is fixed at zero by 'uncorrelated'; remove that statement to set it", ref.location)
            raise _fail(spec, f"{ref} is not in the model; declare it with 'covary {a}, {b}' first", ref.location)
        if ref.kind == "intercept":
            raise _fail(spec, f"'{ref.names[0]}' is a factor: factors have means, not intercepts; write mean({ref.names[0]})", ref.location)
        if ref.kind == "mean":
            raise _fail(spec, f"'{ref.names[0]}' is an indicator: indicators have intercepts; write intercept({ref.names[0]})", ref.location)
        raise _fail(spec, f"{ref} is not a parameter of this model", ref.location)  # pragma: no cover


def _gkey(ref: ParameterRef) -> tuple:
    return (ref.group, ref.key())


def _check_zero_disturbances(spec: Spec, fixed: dict[tuple, tuple[float, ParameterRef]], lower: set[str]) -> None:
    """A factor below a higher-order factor whose variance (its disturbance, the part the factor above does not
    explain) is fixed at 0 in every group is a multiple of the factor above, which sets no scale for it: fixed
    by the user, the variance takes the place of the automatic marker, so some loading of the factor, or its
    loading on the factor above, must be fixed at a value other than 0 (Bollen 1989, ch. 7: every latent
    variable needs a scale)."""
    loads = {ref.names for (group, (kind, _)), (value, ref) in fixed.items()
             if kind == "loading" and group is None and fix_sets_scale(kind, value)}
    for (group, (kind, names)), (value, ref) in fixed.items():
        if kind != "variance" or value != 0.0 or group is not None or names[0] not in lower:
            continue
        f = names[0]
        if any(f in pair for pair in loads):
            continue
        above = next(g.name.text for g in spec.factors if any(i.text == f for i in g.indicators))
        first = next(g.indicators[0].text for g in spec.factors if g.name.text == f)
        raise _fail(spec, f"{ref} is fixed to 0: '{f}' is then a multiple of '{above}', which sets no scale for "
                          f"'{f}' (a fixed variance takes the place of its marker); also fix one of its loadings, "
                          f"such as 'fix {ParameterRef('loading', (f, first), ref.location)} = 1'", ref.location)


def _repeated(what: str, first: ParameterRef, again: ParameterRef) -> str:
    """The error of a statement that repeats an earlier one exactly ('fix variance(x) = 0.5' twice), naming both
    lines, as a repeated 'scale latent by ...' is an error naming the first's: a repeat is most often a copy left
    behind or a line meant for another parameter, and a methods paragraph must not state it twice."""
    if first.location is not None and again.location is not None and first.location.line == again.location.line:
        return f"{what} twice in this statement (line {again.location.line}); name it once"
    where = f"on line {first.location.line} and again on line {again.location.line}" if first.location is not None \
        and again.location is not None else "twice"
    return f"{what} {where}; give it once (remove one, or correct the parameter it names)"


def factor_without_variance(ref: ParameterRef, value: float, top) -> bool:
    """Whether a 'fix' or 'start' value gives a factor below no other (``top``: language.checks.exogenous_factors)
    variance 0: a factor that measures nothing (a higher-order factor's indicators may have residual variance 0)."""
    return ref.kind == "variance" and value == 0 and len(set(ref.names)) == 1 and ref.names[0] in top


def _check_contradictions(spec: Spec) -> None:
    fixed: dict[tuple, tuple[float, ParameterRef]] = {}
    latent = set(spec.factor_names)
    top = set(exogenous_factors(spec))  # factors below no other (the rest are a higher-order factor's indicators)
    for setting in spec.fixed:
        for ref in setting.refs:
            if ref.kind == "variance" and setting.value < 0:
                raise _fail(spec, f"{ref} is fixed to {user_number(setting.value)}, but a variance cannot be negative; fix it to 0 "
                                  f"or more", ref.location)
            if factor_without_variance(ref, setting.value, top):
                # a higher-order factor's own part (its residual variance) may be 0; a factor with no variance at
                # all measures nothing, and its loadings cannot be estimated
                raise _fail(spec, f"{ref} is fixed to 0: a factor without variance measures nothing, and its "
                                  f"loadings cannot be estimated; fix it to a positive value (1 sets the factor's "
                                  f"scale) or remove the statement", ref.location)
            key = _gkey(ref)
            if key in fixed and fixed[key][0] != setting.value:
                raise _fail(spec, f"{ref} is fixed to {user_number(setting.value)} here but to {user_number(fixed[key][0])} on line {fixed[key][1].location.line}", ref.location)
            if key in fixed:  # the same fix again: the methods paragraph stated it twice (re-check s18)
                raise _fail(spec, _repeated(f"{ref} is fixed to {user_number(setting.value)}", fixed[key][1], ref),
                            ref.location)
            fixed[key] = (setting.value, ref)
    _check_zero_disturbances(spec, fixed, latent - top)
    freed: dict[tuple, ParameterRef] = {}
    for ref in spec.freed:
        if _gkey(ref) in fixed:
            raise _fail(spec, f"{ref} is both fixed (line {fixed[_gkey(ref)][1].location.line}) and freed", ref.location)
        if _gkey(ref) in freed:
            raise _fail(spec, _repeated(f"{ref} is freed", freed[_gkey(ref)], ref), ref.location)
        freed[_gkey(ref)] = ref
    started: dict[tuple, tuple[float, ParameterRef]] = {}
    for setting in spec.starts:
        for ref in setting.refs:
            if _gkey(ref) in fixed:
                raise _fail(spec, f"{ref} is fixed, so a start value for it has no effect; remove one of the two", ref.location)
            if started.get(_gkey(ref), (None,))[0] == setting.value:  # two different ones: model.parameters says so
                raise _fail(spec, _repeated(f"{ref} is given the start value {user_number(setting.value)}", started[_gkey(ref)][1],
                                            ref), ref.location)
            started[_gkey(ref)] = (setting.value, ref)
    for bound in spec.bounds:
        for ref in bound.refs:
            if _gkey(ref) in fixed:
                raise _fail(spec, f"{ref} is fixed, so a bound on it has no effect; remove one of the two", ref.location)
    lower: dict[tuple, tuple[float, ParameterRef]] = {}
    upper: dict[tuple, tuple[float, ParameterRef]] = {}
    for bound in spec.bounds:
        for ref in bound.refs:
            key = _gkey(ref)
            # a second bound on the same side, as a second fix or start, is an error naming the first's line (the fit
            # kept the last one and the methods paragraph stated both)
            for side, value, word in ((lower, bound.lower, "at least"), (upper, bound.upper, "at most")):
                if value is None:
                    continue
                if key in side and side[key][0] != value:
                    raise _fail(spec, f"{ref} is bounded to {word} {user_number(value)} here but to {word} {user_number(side[key][0])} on line "
                                      f"{side[key][1].location.line}; give it one bound on each side", ref.location)
                if key in side:  # the same bound again: stated twice by the methods paragraph (re-check s18)
                    raise _fail(spec, _repeated(f"{ref} is bounded to {word} {user_number(value)}", side[key][1], ref),
                                ref.location)
                side[key] = (value, ref)
            if ref.kind == "variance" and bound.upper is not None and bound.upper < 0:
                raise _fail(spec, f"{ref} is bounded to at most {user_number(bound.upper)}, but a variance cannot be negative",
                            ref.location)
            if key in lower and key in upper and lower[key][0] == upper[key][0]:  # hostile s24b: fitted as free
                raise _fail(spec, f"the bounds on {ref} leave it one value, {user_number(lower[key][0])}, so they fix "
                                  f"it: write 'fix {ref} = {user_number(lower[key][0])}' instead of the two bounds",
                            ref.location)
            if key in lower and key in upper and lower[key][0] > upper[key][0]:
                raise _fail(spec, f"the bounds on {ref} leave no room: at least {user_number(lower[key][0])} and at most "
                                  f"{user_number(upper[key][0])}", ref.location)
    exempt: dict[tuple, ParameterRef] = {}
    for ref in spec.noninvariant:  # named again: 'except the intercept of clean and the intercept of clean' (s18)
        if _gkey(ref) in exempt:
            raise _fail(spec, _repeated(f"{ref} is named noninvariant", exempt[_gkey(ref)], ref), ref.location)
        exempt[_gkey(ref)] = ref
    for ref in spec.noninvariant:
        if ref.group is None:
            continue
        plain = replace(ref, group=None)
        if ref.kind == "threshold":  # the identification of ordinal items' latent responses group by group: not yet
            raise _fail(spec, f"setting the thresholds of '{ref.names[0]}' apart in group {written_group(ref.group)} "
                              f"alone is not available yet; write 'noninvariant {plain}' to let them differ in every "
                              f"group", ref.location)
        every = exempt.get((None, ref.key()))
        if every is not None:
            raise _fail(spec, f"'in group {written_name(ref.group)}: noninvariant {plain}' sets apart in one group what "
                              f"'noninvariant {plain}' on line {every.location.line} already lets differ in every "
                              f"group; keep one of the two", ref.location)
    held: dict[frozenset, tuple[ParameterRef, ...]] = {}
    for group in spec.equal:
        key = frozenset(_gkey(r) for r in group)
        if key in held and len(key) == len(group):  # the same equality again: stated twice by the methods paragraph
            first, again = held[key][0].location, group[0].location
            where = (f"on line {first.line} and again on line {again.line}" if first is not None and again is not None
                     else "twice")
            raise _fail(spec, f"these parameters are set equal {where}; give each 'equal' statement once",
                        group[0].location)
        held.setdefault(key, group)
        values = {fixed[_gkey(r)][0] for r in group if _gkey(r) in fixed}
        if len(values) > 1:
            raise _fail(spec, f"these parameters are set equal but are fixed to different values ({', '.join(user_number(v) for v in sorted(values))})", group[0].location)
        kinds = {r.kind for r in group}
        keys = [_gkey(r) for r in group]
        if len(set(keys)) < len(keys):
            raise _fail(spec, "'equal' names the same parameter twice", group[0].location)
        if len(kinds) > 1:
            raise _fail(spec, "'equal' can only join parameters of one kind (all loadings, all variances, ...)", group[0].location)
        if len({r.group for r in group}) > 1:
            raise _fail(spec, "'equal' within 'in group' applies to one group; to hold parameters equal across groups use 'invariance LEVEL' or 'equal across groups: ...'", group[0].location)


def _single_indicator_remedy(spec: Spec, name: str, x: str, scaled: set) -> str:
    """What to write for factor ``name`` whose one indicator is ``x``: add indicators, or fix the indicator's
    residual at 0.  A factor as that indicator (a higher-order factor over one factor) then also needs one of its own
    loadings fixed, since its variance fixed at 0 takes the place of its marker (:func:`_check_zero_disturbances`):
    both lines are given at once (hostile s22: following the first advice gave a second error).  ``scaled``: the
    keys of the loadings and variances the model fixes at values that set a scale."""
    below = next((f for f in spec.factors if f.name.text == x), None)
    if below is None or any(("loading", (x, i.text)) in scaled for i in below.indicators):
        return f"add indicators or fix its residual, e.g. 'fix variance({written_name(x)}) = 0'"
    zero = ParameterRef("variance", (x,), below.name.location)
    loading = ParameterRef("loading", (x, below.indicators[0].text), below.name.location)
    return (f"add indicators, or fix the disturbance variance of '{x}' at 0 and give '{x}' its scale by one of its "
            f"loadings, in two lines: 'fix {zero} = 0' and 'fix {loading} = 1' (a higher-order factor over one factor "
            f"is that factor itself, so '{name}' can also be left out)")


def _check_indicator_counts(spec: Spec) -> None:
    fixed_keys = {r.key() for s in spec.fixed for r in s.refs if r.group is None}
    set_apart = {r.key() for s in spec.fixed for r in s.refs if r.group is None and not fix_sets_scale(r.kind, s.value)}
    constrained = (fixed_keys - set_apart) | {r.key() for g in spec.equal for r in g}
    exo = exogenous_factors(spec)
    zero = {p.key() for p in spec.uncorrelated}
    # a covariance fixed at 0 in every group ('fix covariance(a, b) = 0') is 'uncorrelated a, b' by another name:
    # a two-indicator factor needs a covariance other than zero with another factor (Bollen 1989, ch. 7, the
    # two-indicator rule).  Fixed at another value it identifies the loadings: with marker loadings the
    # covariance of the first items is that value, and each other loading is a covariance across the factors over it
    fixed_zero = {r.key()[1]: r for s in spec.fixed for r in s.refs
                  if r.group is None and r.kind == "covariance" and s.value == 0}
    zero |= set(fixed_zero)
    covary_partners: dict[str, list[str]] = {}
    for pair in spec.covary:
        a, b = pair.key()
        covary_partners.setdefault(a, []).append(b)
        covary_partners.setdefault(b, []).append(a)
    exo_set = set(exo)
    for factor in spec.factors:
        name = factor.name.text
        inds = [i.text for i in factor.indicators]
        if len(inds) == 1:
            x = inds[0]
            if ("variance", (x,)) not in fixed_keys:
                raise _fail(spec, f"factor '{name}' has a single indicator '{x}' and cannot be identified; "
                                  + _single_indicator_remedy(spec, name, x, fixed_keys - set_apart), factor.name.location)
        elif len(inds) == 2:
            # the two loadings and the factor's variance give one covariance: identified when two of the three are
            # fixed (at values other than 0) or held equal, e.g. a loading and the variance both fixed
            loads_constrained = (sum(("loading", (name, x)) in constrained for x in inds)
                                 + (("variance", (name,)) in constrained)) >= 2
            if name in exo_set:
                partners = [o for o in exo if o != name and tuple(sorted((name, o))) not in zero][:1]
            else:
                partners = covary_partners.get(name) or ["(higher-order factor)"]
            if not partners and not loads_constrained:
                fixes = [f"'fix {ref} = 0'" for pair, ref in fixed_zero.items() if name in pair]
                by_fix = f" ({word_list(fixes)} holds its covariance at 0)" if fixes else ""
                raise _fail(
                    spec,
                    f"factor '{name}' has two indicators and no correlation with another factor{by_fix}, so it cannot "
                    f"be identified; add an indicator, let it correlate with another factor, or set its loadings equal",
                    factor.name.location,
                )


def refuse_continuous_joins(spec: Spec, ordinal_items, how: str = "") -> None:
    """A 'join answers' statement naming an item the run analyses as continuous is an error at the item's name: the
    statement analyses neighbouring categories as one, which an ordinal item's thresholds allow, while a continuous
    item's recoded answers would have another scale (other means, variances and covariances) with no threshold to
    absorb it.  ``how``: how the run declares ordinal items (an 'ordinal' statement or the command's option), for the
    message."""
    for join in spec.joins:
        for name in join.items:
            if name.text not in ordinal_items:
                declared = how or f"an 'ordinal' statement or {Option.ORDINAL}"
                raise _fail(spec, f"'join answers' joins categories of ordinal items, and '{name}' is analysed as "
                                  f"continuous, whose recoded answers would change its scale; declare it ordinal "
                                  f"with {declared}, or remove it from the statement", name.location)
