"""A methods-and-results paragraph as psychology journals ask for it (APA 7th edition style:
chi-square with its degrees of freedom, p, CFI, TLI, RMSEA with its 90% interval, SRMR;
no leading zero for values that cannot exceed 1).

The paragraph describes exactly the model fitted: every departure from simple structure
(cross-loadings, residual covariances, uncorrelated factors, higher-order factors,
equal, fixed and bounded parameters), the items declared reverse-keyed, how each factor got
its scale, the estimator and test, how missing answers were handled (with counts, and the
values read as no answer), the groups with their sizes and where factor means were
estimated, and the reliability of each factor's keyed sum that the fit computed.  It reads
all of that from the result's typed fields, never from a generic template.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from cfa_tool.numbers import discrepancy_text, user_number, count_text
from cfa_tool.method import (MISSING_AT_RANDOM, MISSING_COMPLETELY_AT_RANDOM, DecisionRule, DifferenceMethod, Information, FitTest, Items, MissingData,
                              WeightKind, Weighting)
from cfa_tool.assessment.admissibility import (DESIGN_CAUTIONS, ProblemKind, design_cautions, design_cautions_by_kind,
                                               design_doubts, failure_words)
from cfa_tool.assessment.directions import relative_direction
from cfa_tool.assessment.method_factors import bifactor_parts, cross_cutting_factors, uncorrelated_pairs
from cfa_tool.assessment.reliability import BifactorPart, Keying, miskeyed
from cfa_tool.data.non_answers import non_answer_clause
from cfa_tool.data.answer_words import coding_described, named_codes, numbers_recoded
from cfa_tool.data.descriptives import FEW_CATEGORIES
from cfa_tool.data.odd_values import OddKind
from cfa_tool.exploration.choices import BlockErrors, FactorNaming
from cfa_tool.language.names import written_group, written_name
from cfa_tool.language.spec import equality_words
from cfa_tool.model.description import CARRIED_BY_LOADINGS, parameter_words, split_label
from cfa_tool.note_parts import WORDS as MANUSCRIPT, capitalised, said as said_in  # ('said' names sentences here)
from cfa_tool.reporting.numbers import (est_num, est_unit, fit_index_text, guides_text, missing, num, p_phrase, short,
                                        signed, unit)
from cfa_tool.reporting.numbers import word_list as _list

CHI = "\u03c7\u00b2"
#: the indices whose guides the paragraph names as examples
READ_FIRST = ("cfi", "rmsea", "srmr")
WORDS = {1: "one", 2: "two", 3: "three", 4: "four", 5: "five", 6: "six", 7: "seven", 8: "eight", 9: "nine", 10: "ten"}


def _count(n: int, noun: str, plural: str | None = None) -> str:
    return f"{WORDS.get(n, count_text(n))} {noun if n == 1 else (plural or noun + 's')}"


def _p(p: float) -> str:
    return f"p {p_phrase(p)}"


def mcar_score_tests(paper: bool = False) -> str:
    """What score tests of a full-information fit of rows with gaps rest on, in one wording for every view (the note
    under a fit's modification indices, the invariance report's note, the methods text): the information with the
    patterns of answers held fixed, the expected one, valid when answers are missing completely at random (Kenward &
    Molenberghs 1998); ``paper``: the citation as the methods text writes it."""
    return ("rest on the information with the patterns of answers held fixed, which holds when answers are missing "
            f"completely at random (Kenward & Molenberghs{', ' if paper else ' '}1998)")


def _name(name) -> str:
    """An item, factor, group or column as the model language writes it, in double quotes unless a plain word
    (language.names.written_name), so that names holding commas or full stops do not run together in a list."""
    return written_name(str(name))


def _group_names(groups) -> list[str]:
    """The groups' labels written alike by the one rule of prose (language.names.written_group): every one in double
    quotes when any needs them, so that a list of groups does not quote some and not others (new user s14), none
    when each is one word or number (new-user trial s20)."""
    labels = [g.label for g in groups]
    return [written_group(label, labels) for label in labels]


def group_labels(result) -> tuple[str, ...]:
    """The group labels of a fit in groups (empty for one group), among which every text names each group
    (language.names.written_group)."""
    return tuple(g.label for g in result.groups) if getattr(result, "multigroup", False) else ()


def group_words(result, g: int) -> str:
    """Group ``g`` of ``result`` as its headings and titles name it: by the one rule of every text of the report
    (language.names.written_group among the fit's groups: 'North', or '"South side"' with every label quoted when
    one needs it; s23: the headings wrote the label bare beside the quoted one of the notes)."""
    return written_group(result.groups[g].label, group_labels(result))


def _phrase(problem, result) -> str:
    """A problem of ``result`` in the paragraph's words: its names quoted as the model language writes them, its
    group named among the fit's groups (language.names.written_group)."""
    return problem.phrase(quoted=True, groups=group_labels(result))


def _names(names) -> str:
    """Names as a sentence lists them, each written by :func:`_name`."""
    return _list([_name(n) for n in names])


def _pair(pair) -> str:
    return f"{_name(pair[0])} with {_name(pair[1])}"


def _correlation_kinds(result) -> tuple[str, str]:
    """(kind, aside): the correlations of an ordinal fit's items by their numbers of categories, tetrachoric between
    items with two, polychoric otherwise (the tetrachoric is the polychoric correlation of two-category items)."""
    counts = [len(c) for c in result.data.categories if c]  # continuous items beside them have none
    if counts and all(c == 2 for c in counts):
        return "tetrachoric", ""
    if any(c == 2 for c in counts):
        return "polychoric", " (tetrachoric between items with two categories)"
    return "polychoric", ""


def design_sentence(result) -> str:
    """The sampling design of ``result`` as the methods paragraph states it."""
    method = result.method
    kind = _correlation_kinds(result)[0] if method.ordinal else "polychoric"  # the estimator's phrase has the aside
    return result.design.sentence(method.full_information, method.ordinal, f"{kind} correlations",
                                  method.weighting is Weighting.DIAGONAL)


def _design_sentences(results) -> list[str]:
    """The design of fits of the same rows (the first's words) and its cautions (too few clusters, a small effective
    sample), those of the fit with the most free parameters, which they weigh on most: beside the design they doubt."""
    first = results[0]
    if getattr(first, "design", None) is None:
        return []
    most, problems = design_cautions(results)
    own = [(r, tuple(p for p in r.problems if p.kind in DESIGN_CAUTIONS)) for r in results]
    if (len(results) == 1 or all(found == problems for _, found in own if found)
            or len({r.model_name for r in results}) < len(results)):  # the steps of one model: its largest's
        return [design_sentence(first)] + [p.explanation for p in problems]
    # the models' cautions differ (each its own figures, re-check s18): each kind of caution said once, in the words of
    # the model with the most free parameters that has it, naming the others it concerns (new-user trial s27: three
    # models of one design repeated the same caution three times, 1,063 words)
    parts = [design_sentence(first)]
    for r, p, alike in design_cautions_by_kind(results):
        also = f" (the same caution, with its own figures, for {_names([o.model_name for o in alike])})" if alike else ""
        parts.append(f"For {_name(r.model_name)}{also}: {p.explanation}")
    return parts


def ordinal_item_names(result) -> tuple[str, ...]:
    """The items a fit read as ordinal, in the model's order: those with answer categories in its data summary (with
    ordinal and continuous items in one fit, the paragraph, the reliability table and the estimator's words name them
    by this one reading)."""
    return tuple(x for x, c in zip(result.observed, result.data.categories) if c)


def factors_by_item_kind(result, rows) -> tuple[tuple[str, ...], tuple[str, ...]]:
    """With ordinal and continuous items in one fit (else two empty tuples): the factors of ``rows`` (a group's
    reliability rows) whose items are all continuous, and those mixing both kinds, by the one reading of which items
    were ordinal (:func:`ordinal_item_names`).  The reliability table's note and the methods paragraph name them by this
    one rule."""
    if result.method.items is not Items.MIXED:
        return (), ()
    ordinal = set(ordinal_item_names(result))
    continuous = tuple(r.factor for r in rows if not ordinal & set(r.items))
    mixed = tuple(r.factor for r in rows if ordinal & set(r.items) and not set(r.items) <= ordinal)
    return continuous, mixed


def mixed_kinds_sentence(factors, paper: bool = False) -> str:
    """What is (not) reported of the reliability of factors whose items mix ordinal and continuous ones, in one wording
    for the reliability table's note and the methods paragraph (``paper``: the paragraph's, its names as the model
    language writes them and the coefficient in words rather than by its column): no omega of the answers' sum (Green &
    Yang 2009 give it for a sum of ordinal answers alone), and no reliability of the factor's keyed sum ('' without
    such factors)."""
    if not factors:
        return ""
    many = len(factors) > 1
    names = _names(factors) if paper else _list([str(f) for f in factors])
    coefficient = "omega of the answers' sum" if paper else "Sum omega"
    source = "Green & Yang, 2009," if paper else "Green & Yang 2009"
    text = (f"The factor{'s' if many else ''} {names}, with ordinal and continuous items, {'have' if many else 'has'} "
            f"no {coefficient} ({source} give it for a sum of ordinal answers alone)")
    if paper:
        return text + f", so no reliability of {'their' if many else 'its'} keyed sum score is reported."
    return (text + f": {'their' if many else 'its'} other columns describe the sum of the ordinal items' latent "
            f"responses and the continuous items' values, which no one observes, so no reliability of "
            f"{'their' if many else 'its'} keyed sum score is given.")


def _estimator_phrase(result) -> str:
    method = result.method
    if method.ordinal:
        kind, aside = _correlation_kinds(result)
        extra = " and polyserial" if method.items is Items.MIXED else ""
        moments = (" (and the means and variances of the continuous items)"
                   if method.items is Items.MIXED and method.thresholds else "")
        if method.items is Items.MIXED:  # which items were ordinal, which continuous (all of them read as ordinal)
            ordinal = ordinal_item_names(result)
            others = len(result.observed) - len(ordinal)
            rest = "item" if others == 1 else f"{WORDS.get(others, others)} items"
            # one aside, not two in a row (s22: '... as continuous) (and the means and variances of ...)')
            fitted = ", their means and variances fitted beside the correlations" if moments else ""
            which = f" ({_list([_name(x) for x in ordinal])} treated as ordinal, the other {rest} as continuous{fitted})"
            return (f"{method.weighting.label} least squares on {kind}{extra} correlations{aside}{which}, "
                    f"with robust standard errors")
        return (f"{method.weighting.label} least squares on {kind}{extra} correlations{aside} of the ordinal "
                f"items{moments}, with robust standard errors")
    base = "full-information maximum likelihood" if method.full_information else "maximum likelihood"
    if result.robust is not None:
        test = (FitTest.YUAN_BENTLER if method.full_information else FitTest.SATORRA_BENTLER).design_phrase(
            result.robust.design)
        bread = "" if method.bread is None else f" whose sandwich is built on the {method.bread.label}"
        return f"{base} with {test} and robust standard errors{bread}"
    if method.information in (Information.EXPECTED, Information.OBSERVED):  # where the standard errors come from
        return f"{base}, with standard errors from the {method.information.label}"
    return base


def _test_phrase(test: FitTest, design: bool = False) -> str:
    if test is FitTest.SCALE_SHIFTED:
        return test.phrase
    if design:  # a design-based scaling (method.FitTest.design_label)
        return f"design-based scaled chi-square test ({test.label} scaling)"
    return f"{test.label} scaled chi-square test"


def _factor_items(result) -> dict[str, set[str]]:
    """Each factor's items (observed indicators), from the first group's loadings (a loading the model fixes at 0
    makes no item of the factor)."""
    label = result.groups[0].label if result.groups else None
    out: dict[str, set[str]] = {}
    for r in result.estimates:
        if (r.kind == "loading" and r.variables[1] in result.observed and r.group in (None, label)
                and (r.free or r.estimate != 0)):
            out.setdefault(r.variables[0], set()).add(r.variables[1])
    return out


@dataclass(frozen=True)
class _Shape:
    """The fitted model's departures from simple structure among its factors, read once from the result: each
    factor's items, the pairs of factors whose correlation is zero (held by 'uncorrelated', a covariance fixed at
    0, or the structure above them: assessment.method_factors.uncorrelated_pairs on the first group's factor
    covariances), the general factors of a bifactor structure with their specific factors (the one rule,
    assessment.method_factors.bifactor_parts, on the same loadings and zero correlations as the reliability rows'
    parts), and the undeclared factors of a method factor's shape."""

    items: dict[str, set[str]]
    uncorrelated: frozenset[frozenset[str]]
    general: dict[str, tuple[str, ...]]
    unnamed: tuple[str, ...]

    @property
    def nested(self) -> set[str]:
        """The factors of the bifactor structures, general and specific."""
        return set(self.general) | {f for specific in self.general.values() for f in specific}

    def apart(self, factors) -> bool:
        """Whether every two of ``factors`` are uncorrelated."""
        factors = list(factors)
        return all(frozenset((a, b)) in self.uncorrelated for i, a in enumerate(factors) for b in factors[i + 1:])


def _shape(result, d) -> _Shape:
    """The model's :class:`_Shape`, from the result's loadings and factor covariances and its description ``d``."""
    items = _factor_items(result)
    g = result.groups[0] if result.groups else None
    if g is not None and g.latent_covariance is not None:
        zero = uncorrelated_pairs(tuple(result.latent), g.latent_covariance)
    else:  # a result without its factors' covariance matrix: the pairs the model file holds uncorrelated
        zero = {frozenset(p) for p in d.uncorrelated}
    blocks = {f for factors, _, _ in d.exploratory for f in factors}
    confirmatory = {f: x for f, x in items.items() if f not in blocks}
    declared = frozenset(d.method_factors)
    general = bifactor_parts(confirmatory, declared, zero)
    nested = set(general) | {f for specific in general.values() for f in specific}
    unnamed = tuple(f for f in cross_cutting_factors(confirmatory, declared) if f not in declared and f not in nested)
    return _Shape(items, frozenset(zero), general, unnamed)


def _bifactor_structure(shape: _Shape, d, traits: list[str]) -> str:
    """'a bifactor structure (...): a general factor (g) on 15 items and three specific factors (...), ...'"""
    phrases = []
    for general, specific in shape.general.items():
        n = len(shape.items[general])
        phrases.append(f"a general factor ({_name(general)}) on {'all ' if n == len(d.indicators) else ''}"
                       f"{_count(n, 'item')} and {_count(len(specific), 'specific factor')} ({_names(specific)}), "
                       f"each on its own part of those items and uncorrelated with the general factor"
                       f"{' and with each other' if shape.apart(specific) else ''}")
    rest = [f for f in traits if f not in shape.nested]
    text = f"a bifactor structure (Holzinger & Swineford, 1937; Reise, 2012), {_list(phrases)}"
    if rest:
        text += f", and {_count(len(rest), 'other factor')} ({_names(rest)})"
    return text + ","


def _structure(d, shape: _Shape) -> str:
    methods = set(d.method_factors)
    traits = [f for f in d.first_order if f not in methods]
    n_first = len(traits)
    parts = shape.general
    noun = "trait factor" if methods else "factor"
    held = shape.uncorrelated
    pairs = [frozenset((a, b)) for i, a in enumerate(traits) for b in traits[i + 1:]]
    if n_first == 0:
        factors = ""
    elif parts:
        factors = _bifactor_structure(shape, d, traits)
    elif n_first == 1:
        factors = f"one {noun} ({_name(traits[0])})"
    else:
        if pairs and all(p in held for p in pairs):
            kind = f"uncorrelated {noun}s"
        elif d.correlated_factors and any(p not in held for p in pairs):
            kind = f"correlated {noun}s"
        else:
            kind = f"{noun}s"
        factors = f"{_count(n_first, kind[:-1], kind)} ({_names(traits)})"
    if methods:
        named = [f for f in d.first_order if f in methods]
        factors += f"{',' if parts else ''} and {_count(len(named), 'method factor')} ({_names(named)})"
    if d.exploratory:  # each part with its own items: a block's, and the confirmatory factors'
        parts = [f"{_count(len(d.confirmatory_indicators), 'indicator')} of {factors}"] if factors else []
        parts += [f"{_count(len(items), 'indicator')} of {_count(len(f), 'exploratory factor')} ({_names(f)})"
                  for f, items, _ in d.exploratory]
        text = _list(parts)
    else:
        text = f"{_count(len(d.indicators), 'indicator')} of {factors}"
    if len(d.higher_order) == 1:
        higher, lower = d.higher_order[0]
        text += f", with a higher-order factor ({_name(higher)}) explaining {_names(lower)},"
    elif d.higher_order:
        text += (", with higher-order factors " + _list([f"{_name(higher)} (explaining {_names(lower)})"
                                                         for higher, lower in d.higher_order]) + ",")
    return text


def _parameter(ref: tuple, d) -> str:
    """A model file's parameter (kind, names, group) in words: 'the loading of x2 on visual'; the variance of a
    factor below a higher-order factor is its disturbance variance."""
    kind, names, group = ref
    if kind == "variance" and names and any(s.factor == names[0] and s.below_higher_order for s in d.scales):
        kind = "disturbance_variance"
    return parameter_words(kind, tuple(names), group, d.indicators, quoted=True, groups=d.groups)


def set_apart_words(groups: int, verb: str) -> str:
    """From what a parameter set apart in one group ('in group audit: noninvariant intercept(x2)') is set apart, the
    one rule of the methods paragraph, the ladder's paragraph and its note, each giving the verb of its tense ('were'
    in a paper's past, 'are' in a report's present): the other group's, with two groups; with more, the other groups',
    which stay held equal among themselves, as a clause: 'set apart from the other groups', which were held equal
    among themselves' (not 'estimated freely': the first group's mean set apart stays 0, the origin, and a 'fix' in
    that group may follow).  A caller that goes on after it closes the clause with a comma (s23: three wordings,
    one in brackets)."""
    if groups == 2:
        return "set apart from the other group's"
    return f"set apart from the other groups', which {verb} held equal among themselves"


def _exceptions(d) -> tuple[str, str]:
    """The exemptions of a model's equalities across groups: those of every group ('noninvariant intercept(x2)'), a
    clause after 'held ... equal across groups' (', except the intercept of x2'), and those set apart in one group
    ('in group audit: noninvariant intercept(x2)'), a sentence of their own (:func:`set_apart_words`; s22: they ran on
    after a comma, a comma splice).  ('', '') when there are none."""
    every = [r for r in d.noninvariant if r[2] is None]
    one = [r for r in d.noninvariant if r[2] is not None]
    clause = f", except {_list([_parameter(r, d) for r in every])}" if every else ""
    sentence = (f"{_capital(_list([_parameter(r, d) for r in one]))} {'was' if len(one) == 1 else 'were'} "
                f"{set_apart_words(len(d.groups), 'were')}." if one else "")
    return clause, sentence


def _held_equal_sentences(d, subject: str = "") -> str:
    """What a model in groups holds equal across groups, in sentences: '{subject} held loadings and intercepts equal
    across groups, except ...', or without ``subject`` 'Loadings and intercepts were held equal across groups, except
    ...'; then the parameters set apart in one group (:func:`_exceptions`)."""
    classes = _list(equality_words(d.invariant))
    clause, sentence = _exceptions(d)
    held = (f"{subject} held {classes} equal across groups{clause}." if subject else
            f"{_capital(classes)} were held equal across groups{clause}.")  # (every class's words are plural)
    return held + (f" {sentence}" if sentence else "")


def _declared_words(refs, d) -> str:
    """A step's parameters the model file exempts from its equalities, in the words of the ladder's sentences
    ('partial with ...'): those of every group specified as not held equal across groups, those set apart in one
    group set apart from the other group's (with more groups: the other groups', which were held equal among
    themselves: :func:`set_apart_words`, a clause the caller closes)."""
    def words(chosen) -> str:
        return _list([_parameter((r.kind, r.names, r.group), d) if d is not None else str(r) for r in chosen])

    every = [r for r in refs if r.group is None]
    one = [r for r in refs if r.group is not None]
    parts = [f"{words(every)} specified as not held equal across groups"] if every else []
    if one:  # last, its clause closed by the caller (set_apart_words)
        parts.append(f"{words(one)} {set_apart_words(len(d.groups) if d is not None else 0, 'were')}")
    return _list(parts)


def _scale_sentence(d) -> str:
    """How each factor got its scale; with factors scaled differently in some group, those factors group by group.
    A factor scaled by its variance in the first group whose variance later groups estimate, its loadings held
    equal across groups (model.description.CARRIED_BY_LOADINGS), is on one metric: said in a sentence of its own
    (hostile s21: the paragraph said every group's variances were fixed at 1)."""
    first = {s.factor: s for s in d.scales}
    carried = {f: labels for f, labels in _carried_groups(d).items() if f in first}
    group_scales = []
    for label, scales in d.group_scales:
        group_scales.append((label, tuple(first[s.factor] if s.factor in carried and s.method == CARRIED_BY_LOADINGS
                                          else s for s in scales)))
    shared = [s for s in d.scales if all(s in scales for _, scales in group_scales)]
    if len(shared) == len(d.scales):
        sentences = [_scales_in_words(d.scales, d.scales)]
        if carried:  # the variances fixed in the first group only
            sentences[0] = sentences[0][:-1] + f" in group {written_group(d.groups[0], d.groups)}."
    else:
        sentences = [_scales_in_words(shared, d.scales)] if shared else []
        for label, scales in group_scales:
            own = [s for s in scales if s not in shared]
            if own:
                words = _scales_in_words(own, scales)
                sentences.append(f"In group {written_group(label, d.groups)}, {words[:1].lower()}{words[1:]}")
        different = [s.factor for s in d.scales if s not in shared]
        sentences.append(f"Scaled differently in different groups, {_names(different)} "
                         f"{'are' if len(different) > 1 else 'is'} not on the same metric in every group.")
    if carried:
        sentences.append(_carried_sentence(d, carried))
    return " ".join(sentences)


def _carried_groups(d) -> dict[str, list[str]]:
    """Each factor whose scale the loadings held equal carry in some groups -> those groups."""
    out: dict[str, list[str]] = {}
    for label, own in d.group_scales:
        for s in own:
            if s.method == CARRIED_BY_LOADINGS:
                out.setdefault(s.factor, []).append(label)
    return out


def _carried_sentence(d, carried: dict[str, list[str]]) -> str:
    """Which factors' variances the later groups estimate, their loadings held equal across groups carrying the scale
    set in the first group."""
    groups = sorted({g for labels in carried.values() for g in labels}, key=list(d.groups).index)
    where = (f"group {written_group(groups[0], d.groups)}" if len(groups) == 1
             else "groups " + _list([written_group(g, d.groups) for g in groups]))
    every = len(carried) == len(d.scales)
    whose = "the factors" if every and len(carried) > 1 else _names(list(carried))
    several = len(carried) > 1
    return (f"In {where}, the variance{'s' if several else ''} of {whose} {'were' if several else 'was'} estimated, "
            f"the loadings held equal across groups carrying the scale set in group "
            f"{written_group(d.groups[0], d.groups)}.")


def _scales_in_words(chosen, every) -> str:
    """The scaling of the ``chosen`` factors in a sentence (``every``: all the factors of the same group)."""
    by_method: dict[tuple, list] = {}
    for s in chosen:
        by_method.setdefault((s.method, s.below_higher_order and s.method == "variance"), []).append(s)
    parts = []
    for (method, disturbance), scales in by_method.items():
        names = [s.factor for s in scales]
        whose = "each factor" if len(scales) == len(every) and len(scales) > 1 else (
            "the factor" if len(every) == 1 else _names(names))
        subject = f"the scales of {whose} were" if len(scales) > 1 and whose != "each factor" else f"the scale of {whose} was"
        if method == "marker":
            markers = (_list([f"{_name(s.marker)} for {_name(s.factor)}" for s in scales]) if len(scales) > 1
                       else _name(scales[0].marker))
            factors = {x.factor for x in every}
            which = ("one indicator (for a higher-order factor, one of its factors)"
                     if any(s.marker in factors for s in scales) else "one indicator")
            parts.append(f"{subject} set by fixing the loading of {which} to 1 ({markers})"
                         + _keyed_markers(scales))
        elif method == "variance":
            which = "disturbance variance" if disturbance else "variance"
            whose = _names(names) if disturbance else whose
            subject = f"the scales of {whose} were" if len(scales) > 1 and whose != "each factor" else f"the scale of {whose} was"
            parts.append(f"{subject} set by fixing {'their' if len(names) > 1 and whose != 'each factor' else 'its'} "
                         f"{which}{'s' if len(names) > 1 and whose != 'each factor' else ''} to 1")
        elif method == "effects":
            turned = [x for s in scales for x in s.counted_reversed]
            parts.append(f"{subject} set by effects coding, the loadings of each factor constrained to average 1 "
                         f"(Little, Slegers & Card, 2006)" + (
                             f", the loadings of {_names(turned)}, declared reverse-keyed, counted with their signs "
                             f"turned" if turned else ""))
        else:
            parts.append(f"{subject} set by parameters the model fixes")
    sentence = "; ".join(parts)
    return sentence[0].upper() + sentence[1:] + "."


def _keyed_markers(scales) -> str:
    """How a 'reversed' statement chose markers: a declared-reversed first item is passed over, so that the
    factor points the way of its trait; a factor whose every item is declared reversed has its marker fixed
    at -1.  Empty when the statement changed no marker."""
    passed = [s for s in scales if s.passed_over]
    against = [s for s in scales if s.marker_loading < 0]
    words = []
    if passed:
        items = _names([x for s in passed for x in s.passed_over])
        several = sum(len(s.passed_over) for s in passed) > 1
        words.append(f"{items}, declared reverse-keyed, {'were' if several else 'was'} not taken as "
                     f"marker{'s' if several else ''}, so that {'their factors point the way of their traits' if several else 'its factor points the way of its trait'}")
    if against:  # each subject in the number of its verb (s23)
        many = len(against) > 1
        words.append(f"every item of {_names([s.factor for s in against])} is declared reverse-keyed, so the "
                     f"loading{'s' if many else ''} of {_names([s.marker for s in against])} "
                     f"{'were' if many else 'was'} fixed to -1 instead")
    return f"; {'; '.join(words)}" if words else ""


def _block_sentences(result, d) -> str:
    """What an exploratory block is and how it was fitted and rotated (Asparouhov & Muthén 2009)."""
    rotated = {b.factors: b for b in getattr(result, "exploratory", ())}
    out = []
    for factors, items, rotation in d.exploratory:
        block = next((b for b in rotated.values() if set(b.factors) == set(factors)), None)
        kind = "oblique" if block is None or block.oblique else "orthogonal"
        target = " towards the zeros the model file names (partially specified target; Browne 1972)" \
            if rotation == "target" else ""
        opening = (f"The loadings of {_names(factors)} on every one of {_count(len(items), 'item')} "
                   f"({_names(items)}) were estimated as an exploratory block (exploratory structural equation "
                   f"modelling; Asparouhov & Muthén, 2009): ")
        if len(factors) == 1:
            out.append(opening + "one factor, with its variance fixed to 1 (one factor: no rotation); its loadings are "
                                 "reported standardized by the items' model-implied standard deviations.")
            continue
        naming = (" Each factor's name was given to the rotated factor on which the block's item of the same position "
                  f"({_names(items[:len(factors)])}) loads most, signed so that this item loads positively."
                  if block is not None and block.names_by is FactorNaming.ANCHOR_ITEMS else "")
        errors = ("Standard errors of the rotated loadings and factor correlations are delta-method values (implicit "
                  "differentiation of the rotation's conditions)"
                  if block is None or block.errors is BlockErrors.DELTA_METHOD
                  else "Standard errors of the rotated loadings could not be computed")
        out.append(opening + f"fitted with the factors' variances fixed to 1, uncorrelated, "
                   f"and the loading of the k-th factor on each of the block's first k - 1 items fixed at 0, then "
                   f"rotated by {rotation} ({kind}){target} on the loadings standardized by the items' model-implied "
                   f"standard deviations; the rotation does not change the fit.{naming} {errors}, and modification "
                   f"indices that name the block's factors are not reported.")
    return " ".join(out)


def _departures(d, shape: _Shape) -> str:
    """The departures from simple structure; ``shape``: the model's factors as the fit read them (:func:`_shape`):
    a bifactor model's general factors with their specific factors and the undeclared factors of a method factor's
    shape, whose loadings are no cross-loadings, and the zero correlations the structure's sentence states."""
    included, sentences = _departure_parts(d, shape)
    return " ".join(([f"The model also included {_included_words(included)}."] if included else []) + sentences)


#: the parameters a model adds to simple structure, one entry each (:func:`_departure_parts`), in the order a
#: sentence lists their kinds
_INCLUDED = ("cross-loading", "residual covariance", "disturbance covariance")


def _included_words(included) -> str:
    """The parameters a model adds to simple structure ((kind, words) of :func:`_departure_parts`) as a sentence
    lists them: 'a cross-loading of x4 (on f1 and f2) and two residual covariances (x1 with x2 and x3 with x5)'."""
    parts = [words for kind, words in included if kind == "cross-loading"]
    pairs = [words for kind, words in included if kind == "residual covariance"]
    if pairs:
        parts.append(f"{_count(len(pairs), 'residual covariance')} ({_list(pairs)})")
    pairs = [words for kind, words in included if kind == "disturbance covariance"]
    if pairs:
        parts.append(f"{_count(len(pairs), 'covariance')} between factor disturbances ({_list(pairs)})")
    return _list(parts)


def _departure_parts(d, shape: _Shape) -> tuple[list[tuple[str, str]], list[str]]:
    """The departures from simple structure (:func:`_departures`) as (the parameters added, one (kind, words) each:
    a cross-loading, a residual covariance, a covariance of factor disturbances; the other sentences), so that a
    comparison can say a model by what differs from another (:func:`_model_sentences`)."""
    included: list[tuple[str, str]] = []
    general, unnamed = shape.general, shape.unnamed
    methods = set(d.method_factors) | set(general) | set(unnamed)
    for item, factors in d.cross_loadings:
        if sum(f not in methods for f in factors) > 1:  # a loading on a method factor is not a cross-loading
            included.append(("cross-loading", f"a cross-loading of {_name(item)} (on "
                                              f"{_names([f for f in factors if f not in methods])})"))
    included += [("residual covariance", _pair(p)) for p in d.residual_covariances]
    included += [("disturbance covariance", _pair(p)) for p in d.factor_covariances_added]
    sentences = []
    if d.method_factors:
        many = len(d.method_factors) > 1
        sentences.append(f"The {'factors' if many else 'factor'} {_names(d.method_factors)} "
                         f"{'stand' if many else 'stands'} for a way of answering, not a trait: "
                         f"{'they get' if many else 'it gets'} no reliability or discriminant-validity coefficients.")
    for factor in unnamed:
        items = [x for x, factors in d.cross_loadings if factor in factors]
        sentences.append(f"The factor {_name(factor)} loads only on items that load on other factors too "
                         f"({_names(items)}), as a method factor does (what items share in the way they are "
                         f"answered, such as their wording; Marsh, 1996); it was not declared a method factor, so it "
                         f"was treated as a trait.")
    stated = set()  # the zero correlations the bifactor structure's sentence states
    for g, specific in general.items():
        stated |= {frozenset((g, f)) for f in specific}
        if shape.apart(specific):
            stated |= {frozenset((a, b)) for i, a in enumerate(specific) for b in specific[i + 1:]}
    uncorrelated = [p for p in d.uncorrelated if frozenset(p) not in stated]
    if uncorrelated:
        pairs = _list([f"{_name(a)} and {_name(b)}" for a, b in uncorrelated])
        sentences.append(f"The covariance{'s' if len(uncorrelated) > 1 else ''} of {pairs} "
                         f"{'were' if len(uncorrelated) > 1 else 'was'} fixed at zero.")
    sentences += _equality_sentences(d)
    # a factor covariance fixed at 0 that the structure's sentence states already is not said again
    fixed = [(r, value) for r, value in d.fixed
             if not (r[0] == "covariance" and r[2] is None and value == 0 and frozenset(r[1]) in stated)]
    if fixed:
        sentences.append(_capital(_list([f"{_parameter(r, d)} was fixed at {user_number(value)}" for r, value in fixed])) + ".")
    if d.bounds:
        def bound(ref, lo, hi):
            if lo is not None and hi is not None:
                return f"{_parameter(ref, d)} was kept between {user_number(lo)} and {user_number(hi)}"
            return f"{_parameter(ref, d)} was kept at or above {user_number(lo)}" if lo is not None else \
                f"{_parameter(ref, d)} was kept at or below {user_number(hi)}"
        sentences.append(_capital(_list([bound(*b) for b in d.bounds])) + ".")
    return included, sentences


#: kinds of the model file's parameters whose equalities one sentence gathers, by the words of their plural
_GATHERED_EQUALITIES = {"intercept": "intercepts", "loading": "loadings", "variance": "residual variances"}


def _equality_sentences(d) -> list[str]:
    """The model file's equalities ('equal' statements): those of one kind of parameter in one group ('equal
    intercept(x1_t1), intercept(x1_t2)' for each item of a longitudinal model) gathered in one sentence that lists
    each pair or set, the others one sentence each (newuser-s23: 44 sentences, one per equality)."""
    def kind_of(group) -> tuple | None:
        kinds, groups = {r[0] for r in group}, {r[2] for r in group}
        kind = next(iter(kinds))
        if len(kinds) > 1 or len(groups) > 1 or kind not in _GATHERED_EQUALITIES:
            return None
        if kind == "variance" and not all(r[1][0] in d.indicators for r in group):
            return None  # factors' variances: said one by one
        return kind, next(iter(groups))

    def short(ref) -> str:
        kind, names, _ = ref
        return f"{_name(names[1])} on {_name(names[0])}" if kind == "loading" else _name(names[0])

    gathered: dict[tuple, list] = {}
    for group in d.equal:
        key = kind_of(group)
        if key is not None:
            gathered.setdefault(key, []).append(group)
    out, said = [], set()
    for group in d.equal:
        key = kind_of(group)
        if key is None or len(gathered[key]) == 1:
            out.append(f"{_capital(_list([_parameter(r, d) for r in group]))} were constrained to be equal.")
        elif key not in said:
            said.add(key)
            sets = gathered[key]
            pairs = all(len(g) == 2 for g in sets)
            where = f" in group {written_group(key[1], d.groups)}" if key[1] is not None else ""
            listed = "; ".join(_list([short(r) for r in g]) for g in sets)
            out.append(f"The {_GATHERED_EQUALITIES[key[0]]}{where} were constrained to be equal within each of "
                       f"{_count(len(sets), 'pair' if pairs else 'set')} ({listed}).")
    return out


def _one_group_means(result, d) -> str:
    """What a one-group fit with a mean structure holds of its factors' means, when it is more than their origin: a
    mean the model file frees, or means fixed at 0 (the default) beside intercepts held equal across factors, where
    the fixing holds those factors' means equal to one another, a restriction the fit tests (newuser-s23: a
    longitudinal model's equal intercepts with both occasions' means at 0, said only by a table note).  '' otherwise
    (the means at 0 then only give the intercepts their origin, Sorbom 1974)."""
    means = [r for r in result.estimates if r.kind == "mean" and r.variables[0] in d.first_order + tuple(
        h for h, _ in d.higher_order)]
    zero = [r.variables[0] for r in means if not r.free and r.origin != "user"]  # a 'fix' is said with the fixes
    free = [r.variables[0] for r in means if r.free]
    factors_of: dict[str, set] = {}
    for r in result.estimates:
        if r.kind == "loading":
            factors_of.setdefault(r.variables[1], set()).add(r.variables[0])
    across = set()  # factors at 0 whose items' intercepts are held equal to those of items of another such factor
    for group in d.equal:
        if all(r[0] == "intercept" for r in group):
            owners = [factors_of.get(r[1][0], set()) & set(zero) for r in group]
            if len(set().union(*owners)) > 1:
                across |= set().union(*owners)
    if not free and not across:
        return ""
    many = len(zero) > 1
    text = f"The mean{'s' if many else ''} of {_names(zero)} {'were' if many else 'was'} fixed at zero" if zero else ""
    if free:
        estimated = (f"the mean{'s' if len(free) > 1 else ''} of {_names(free)} "
                     f"{'were' if len(free) > 1 else 'was'} estimated")
        text = f"{text} and {estimated}" if text else _capital(estimated)
    if across:
        ordered = [f for f in zero if f in across]
        these = "these factors" if len(ordered) == len(zero) else _names(ordered)
        text += (f"; as intercepts were held equal across {these}, fixing their means at zero is a restriction the fit "
                 f"tests (no difference between them), not only the origin of the intercepts")
    return text + "."


def _range(values: list[float], one: str, many: str) -> str:
    """'{many} ranged from a to b' (in absolute value when some are negative), or '{one} was a' for one value: the
    subject in the number of its verb (s23: 'The standardized loadings ... was 1.00')."""
    if len(values) == 1:
        return f"{one} was {est_unit(values[0], 2)}"
    return f"{many} {_spread(values)}"


def _spread(values: list[float]) -> str:
    """'ranged from a to b' of several values, in absolute value when some are negative."""
    if any(v < 0 for v in values):
        sizes = [abs(v) for v in values]
        return f"ranged from {est_unit(min(sizes), 2)} to {est_unit(max(sizes), 2)} in absolute value"
    return f"ranged from {est_unit(min(values), 2)} to {est_unit(max(values), 2)}"


def _capital(text: str) -> str:
    """``text`` as a sentence, by the one rule of a line's capital (note_parts.capitalised): a name keeps its case."""
    return capitalised(text)


#: what pairwise present rows assume, at the end of the rows' phrase (inside parentheses: the citation after a comma)
_PAIRWISE_ASSUMPTION = f", which assumes that {MISSING_COMPLETELY_AT_RANDOM}, Little & Rubin, 2002"
#: new-user trial s11: the fit and invariance paragraphs said every answer was used without the assumption it rests on
_FULL_INFORMATION_ASSUMPTION = f", which assumes that {MISSING_AT_RANDOM}, Little & Rubin, 2002"
#: what listwise deletion assumes (the same assumption as pairwise present rows, said of the rows left out)
_LISTWISE_ASSUMPTION = _PAIRWISE_ASSUMPTION


#: the source of planned missingness (recalled from memory: Graham, Taylor, Olchowski & Cumsille 2006, Psychological
#: Methods 11, 323-343)
PLANNED_MISSING_SOURCE = "Graham, Taylor, Olchowski & Cumsille, 2006"


def form_gaps(summary: dict | None):
    """The block of items a large share of the rows left unanswered together (data.shared_gaps.SharedGaps), from a
    fit's missing-data summary; None without one."""
    from cfa_tool.data.shared_gaps import SharedGaps

    return SharedGaps.from_dict((summary or {}).get("shared_gaps"))


def _form_rows(form) -> str:
    """'792 rows (33.0%) answered none of the 8 items book3, ... and rel4' of a shorter form's block."""
    share = f"{100 * form.share:.1f}%"
    return (f"{count_text(form.rows)} {'row' if form.rows == 1 else 'rows'} ({share}) answered none of the "
            f"{len(form.items)} items {_names(form.items)}")


def form_gaps_sentence(summary: dict | None) -> str:
    """The sentence of the table of missing-data patterns on a shorter form's gaps (data.shared_gaps: a third of the
    rows given a form of 8 of the 16 items, new-user trial s28): which rows, which items, and what that means for the
    estimation: gaps by design when a column of the file marks those rows as a form, else the pattern such a form
    leaves, with what its gaps are if the rows stopped answering instead; '' without such a block."""
    form = form_gaps(summary)
    if form is None:
        return ""
    alone = f" ({count_text(form.alone)} of them answered every other item)" if form.alone != form.rows else ""
    if form.marked_by:
        column, value = form.marked_by
        return (f" {_form_rows(form)}{alone}: a shorter form of the questionnaire, given to the rows where "
                f"{_name(column)} is '{value}'. Its gaps are missing by design (completely at random when the form was "
                f"assigned at random; planned missingness, {PLANNED_MISSING_SOURCE}), and full-information estimation "
                f"uses every answer those rows gave; the other gaps are answers not given, assumed missing at random.")
    return (f" {_form_rows(form)}{alone}, the pattern a shorter form of the questionnaire leaves (planned missingness, "
            f"{PLANNED_MISSING_SOURCE}). If those rows were given such a form, their gaps are missing by design "
            f"(completely at random when the form was assigned at random) and full-information estimation uses every "
            f"answer they gave; if they stopped answering or skipped those items, the gaps are theirs, assumed missing "
            f"at random like the others.")


def _form_gaps_clause(result) -> str:
    """The clause of the methods paragraph's rows on a shorter form's gaps (:func:`form_gaps_sentence`'s facts in
    a manuscript's words); '' without such a block."""
    form = form_gaps(getattr(result, "missing_data", None))
    if form is None:
        return ""
    if form.marked_by:
        column, value = form.marked_by
        return (f"; {_form_rows(form)}, a shorter form given to the rows where {_name(column)} is '{value}', so that "
                f"their gaps are missing by design and, with the form assigned at random, completely at random "
                f"(planned missingness; {PLANNED_MISSING_SOURCE})")
    return (f"; {_form_rows(form)}, the pattern of a shorter form of the questionnaire, whose gaps, if the form was "
            f"given by design, are missing by design and, with the form assigned at random, completely at random "
            f"(planned missingness; {PLANNED_MISSING_SOURCE})")


def _listwise_clause(dropped: int, read: int, kept: int) -> str:
    """The rows listwise deletion left out and kept, with what it assumes (Little & Rubin, 2002), inside the
    parentheses of the rows' phrase (new-user trial s16: the text said only how many were excluded)."""
    return (f"; the {count_text(kept)} complete {'row was' if kept == 1 else 'rows were'} analysed and {count_text(dropped)} of {count_text(read)} rows "
            f"with missing answers excluded listwise{_LISTWISE_ASSUMPTION}")


def _pairs_with_gaps(result) -> bool:
    """Whether some correlation of an ordinal fit came from fewer rows than were analysed (pairwise present rows)."""
    pairs = result.data.pair_range
    return pairs is not None and pairs[0] < result.n_obs


def _read_as_missing(data) -> str:
    """What was read as no answer, in clauses of the rows' phrase: the codes the user declared (--missing-codes) and
    the values the data file itself marks as no answer, with their items ('' when neither).  A code declared that no
    item cell held is not named: nothing was treated so (the notes say no cell holds it)."""
    clauses = []
    found = getattr(data, "codes_found", None)
    codes = [user_number(c) for c in (getattr(data, "missing_codes", ()) if found is None else found)]
    if codes:
        clauses.append(f"the code{'s' if len(codes) > 1 else ''} {_list(codes)}, declared to mean no answer, "
                       f"{'were' if len(codes) > 1 else 'was'} treated as missing")
    marked = non_answer_clause(getattr(data, "non_answers", ()), source=getattr(data, "source", None),
                               model_items=tuple(getattr(data, "variables", ())))
    if marked:
        clauses.append(marked)
    return "; ".join(clauses)


def _kept_as_answers(data) -> str:
    """The values of the items that look like no answers (a missing-value code, a totals or means row:
    data.odd_values) but were analysed as answers, as the file holds them, in a clause of the rows' phrase ('' when
    there are none)."""
    odd = list(getattr(data, "odd_values", ()))
    found = [o.kept_words() for o in odd]
    if not found:
        return ""
    # one finding of one value (or row); several codes set apart are several values (s23: 'the codes 8 and 9 ...;
    # this was analysed')
    one = len(found) == 1 and not (odd[0].kind is OddKind.SET_APART and len(odd[0].distinct_values()) > 1)
    return (f"{'; '.join(found)}; {'this was' if one else 'these were'} analysed as answers, as the file holds "
            f"{'it' if one else 'them'}")


def _lowest_coverage(result) -> float | None:
    """The smallest share of the rows that answered an item: from the fit's missing-data summary, or, for a fit
    without one (the steps of an invariance ladder), from the rows answering each item in each group (None when
    neither is at hand)."""
    if result.multigroup and result.groups and all(g.data.answered and g.data.n_obs for g in result.groups):
        # each group judged on its own rows: an item nearly unanswered in one group hides in a pooled share
        return min(min(g.data.answered) / (g.data.answered_of or g.data.n_obs) for g in result.groups)
    if result.missing_data is not None:
        coverage = result.missing_data.get("coverage", {})
        return min(coverage.values()) if coverage else 1.0
    answered = [g.data.answered for g in result.groups]
    if not answered or not all(answered) or not result.n_obs:
        return None
    return min(sum(counts) for counts in zip(*answered)) / result.n_obs


#: full-information ML of rows without a missing answer (asked for, or chosen by a robust test of it): the complete-data
#: likelihood with the item means estimated, so no assumption about missing answers enters (Enders 2010, ch. 4)
_NOTHING_MISSING = ("no answer on the model's variables was missing, so full-information estimation was the ordinary "
                    "maximum likelihood fit of the complete data, with the item means estimated")


def _sample_phrase(result) -> str:
    data = result.data
    text = _n_of_rows(result.n_obs, result)
    full_information = result.method.full_information
    low = _lowest_coverage(result) if full_information else None
    if low is not None and low >= 1.0:  # asked for on complete rows: nothing was missing, nothing was assumed
        text += f"; {_NOTHING_MISSING}"
    elif low is not None:
        floor = math.floor(1000 * low) / 10  # never rounded up: 99.96% is not 'every row'
        rows = "each group's rows" if result.multigroup else "the rows"  # _lowest_coverage judges each group apart
        text += (f"; every answer of every row was used, including rows with missing answers{_FULL_INFORMATION_ASSUMPTION}"
                 f"; each item was answered in at least {floor:g}% of {rows}")
    pairs = data.pair_range
    if _pairs_with_gaps(result):
        text += (f"; every answer was used: each item's thresholds from the rows that answered it and each correlation "
                 f"from the rows that answered both items, {count_text(pairs[0])} to {count_text(pairs[1])} rows per pair"
                 f"{_pairs_by_group(result)}{_PAIRWISE_ASSUMPTION}")
    if (low is not None and low < 1.0) or _pairs_with_gaps(result):
        text += _form_gaps_clause(result)
    read = _read_as_missing(data)
    if read:
        text += f"; {read}"
    kept = _kept_as_answers(data)
    if kept:
        text += f"; {kept}"
    without_group = getattr(data, "without_group", 0)
    by_design = getattr(data, "by_design", 0)
    dropped = data.rows_dropped - without_group - by_design
    helped = getattr(data, "helpers_only", 0)
    if helped:  # kept by the saturated-correlates likelihood (pipeline.inputs.with_helpers)
        text += (f"; {count_text(helped)} of these rows answered no item but an auxiliary variable and entered the likelihood "
                 f"through {'it' if len(result.method.helpers) == 1 else 'them'}")
    if dropped:
        if full_information or result.method.missing is MissingData.PAIRWISE:
            neither = " or auxiliary variable" if result.method.helpers else ""
            text += (f"; {count_text(dropped)} of {count_text(data.rows_read)} rows answered no model variable{neither} and "
                     f"{'was' if dropped == 1 else 'were'} left out")
        else:
            text += _listwise_clause(dropped, data.rows_read, data.rows_read - data.rows_dropped)
    if without_group:
        text += _without_group_clause(without_group, data.rows_read, result.group_column)
    if by_design:
        text += (f"; {count_text(by_design)} of {count_text(data.rows_read)} row{'s' if data.rows_read != 1 else ''} "
                 f"{'was' if by_design == 1 else 'were'} left out by the sampling design (a weight of 0, or no answer "
                 f"and no weight, cluster or stratum)")
    return text


def _completely_at_random_sentence(result) -> str:
    """Little's (1988) test of the rows with gaps, in one sentence with the assumption the fit rests on ('' when the
    fit has no such test)."""
    test = getattr(result, "completely_at_random", None)
    if test is None:
        return ""
    from cfa_tool.assessment.missingness import TEST_NAME  # (fits without the test do not load it)

    figures = f"{CHI}({test.df}) = {test.chi_square:.2f}, {_p(test.p_value)}"
    given = "the items analysed" + (" and the auxiliary variables" if result.method.helpers else "")
    if test.p_value < 0.05:
        # evidence, not proof, as the non-significant case is worded (new-user trial s21: p = .006 on one half of
        # answers made missing completely at random, a chance rejection, read as a fact)
        return (f"{TEST_NAME} was significant ({figures}), evidence that the answers are not missing completely at "
                f"random; full-information ML rests on their being missing at random given {given}.")
    return (f"{TEST_NAME} was not significant ({figures}), which does not show that they are; full-information ML "
            f"needs only that the answers be missing at random given {given}.")


def helpers_sentence(helpers: tuple[str, ...]) -> str:
    """The one sentence on the auxiliary variables of a full-information fit (the missing-data helpers)."""
    many = len(helpers) > 1
    linked = "each correlated with every item's residual and with each other" if many else \
        "correlated with every item's residual"
    return (f"The auxiliary variable{'s' if many else ''} {_names(helpers)} entered the likelihood "
            f"in Graham's (2003) saturated-correlates form, {linked} and outside the model, so that answers need be "
            f"missing at random only given the items and {'these variables' if many else 'this variable'}, while the "
            f"model's degrees of freedom, chi-square and fit indices describe the model alone (the baseline model "
            f"keeping the auxiliary variables' correlations free, Savalei & Bentler, 2009; the log-likelihood includes "
            f"them and the information criteria's penalty counts the model's parameters only, so both compare only "
            f"fits with the same auxiliary variables).")


def _pairs_by_group(result) -> str:
    """' over the groups and 40 to 55 in A and 200 to 270 in B': each group's rows per pair of items, where its
    polychoric correlations were computed ('' for one group)."""
    ranges = [(g.label, g.data.pair_range) for g in result.groups] if result.multigroup else []
    if not ranges or any(r is None for _, r in ranges):
        return ""
    labels = [label for label, _ in ranges]
    return " over the groups and " + _list([f"{low} to {high} in group {written_group(label, labels)}"
                                            for label, (low, high) in ranges])


def _n_of_rows(n: float, result) -> str:
    """'N = 301', with the rows a row filter chose (:func:`_filtered`); under frequency weights N is no count of
    rows, so the rows it sums are named before the file's ('N = 565, the sum of the frequency weights of 272 of the 480
    rows in the data file, those where ...'; hostile s21: 'N = 623 of the 480 rows')."""
    design = getattr(result, "design", None)
    summed = ""
    if result.data.row_filters and design is not None and design.columns.weights is not None and \
            design.columns.kind is WeightKind.FREQUENCY:
        summed = f", the sum of the frequency weights of {count_text(design.rows)}"
    return f"N = {count_text(n)}{summed}" + _filtered(result.data)


def _filtered(data, file: str = "the data file") -> str:
    """' of the 301 rows in the data file, those where school was Pasteur': the rows the row filters (--keep) chose,
    each filter worded by RowFilter.in_words, several '!=' of one column as one clause (data.filters.filters_in_words),
    then the rows a filter left out for an empty cell ('; 54 rows with no value of mode were left out'); '' without
    filters.  ``file``: the file's words (replicate's two files are named).  Said inside the parentheses of a
    sample's description, and so without parentheses of its own (new-user trial 18: 'those where the row fell in
    half A of two random halves (seed 11; listed in halves.csv)' nested them)."""
    if not data.row_filters:
        return ""
    from cfa_tool.data.filters import filters_in_words

    empty = [f for f in data.row_filters if f.empty]
    verb = "was" if [f.empty for f in empty] == [1] else "were"
    return (f" of the {count_text(data.rows_in_file)} rows in {file}, those where {_list(filters_in_words(data.row_filters))}"
            + (f"; {_list([f.empty_words() for f in empty])} {verb} left out" if empty else ""))


def range_restriction_sentence(filters, analysed, factor_items: dict | None = None, where: str = "") -> str:
    """That row ``filters`` (data.filters.RowFilter) selected rows by their answers to ``analysed`` items, by the one
    rule of the report's caution (pipeline.row_filter_cautions.selections_on_items): the items' range is restricted
    among the rows kept, so their loadings, their factors' variances and reliability describe those rows (range
    restriction; the caution gives its sources).  ``factor_items``: each factor's items (:func:`_factor_items`; None
    for models that place the items differently, as a comparison's may); ``where``: 'In the calibration sample, '
    for one of two files.  '' when no filter selected on an item."""
    from cfa_tool.pipeline.row_filter_cautions import selections_on_items

    found = selections_on_items(filters, analysed)
    if not found:
        return ""
    items = list(dict.fromkeys(f.column for f in found))
    factors = [factor for factor, on in (factor_items or {}).items() if any(x in on for x in items)]

    def of(item: str) -> str:
        mine = [factor for factor, on in (factor_items or {}).items() if item in on]
        return f"an item of {_names(mine)}; " if mine else ""

    from cfa_tool.data.filters import kept_range_words

    def kept(item: str) -> str:  # the item's filters as the one range they keep, and the answers they left out
        mine = [f for f in found if f.column == item]
        dropped = sum(f.dropped for f in mine)
        return (f"{kept_range_words(mine)} ({of(item)}{count_text(dropped)} row{'s' if dropped != 1 else ''} with an "
                f"answer to it left out)")

    parts = [kept(item) for item in items]
    many = len(items) > 1
    loading = f"the loading{'s' if many else ''} of {_names(items)}"
    what = (f"{loading}, the variance{'s' if len(factors) > 1 else ''} of {_names(factors)} and "
            f"{'their' if len(factors) > 1 else 'its'} reliability" if factors else
            f"{loading}, the variances of the factors {'they measure' if many else 'it measures'} and their reliability")
    return _capital(f"{where}the rows were selected by their answers to {_names(items)}, keeping those where "
                    f"{_list(parts)}, so "
                    f"{'those items' if many else 'that item'} had a restricted range among the rows analysed (range "
                    f"restriction): {what} describe the rows kept, not the whole sample, and usually come out smaller.")


def _fit_range_restriction(result) -> str:
    """:func:`range_restriction_sentence` of a fit (or a ladder's first step) of rows."""
    filters = getattr(result.data, "row_filters", ())
    return range_restriction_sentence(filters, result.observed, _factor_items(result)) if filters else ""


def renamed_sentence(data) -> str:
    """'In survey.csv, the column named SL3r was analysed as SL3_r.': the columns read under new names (--rename),
    whose new names the paragraph uses ('' when none were renamed)."""
    renamed = getattr(data, "renamed", ())
    if not renamed:
        return ""
    from cfa_tool.data.renamed_columns import rename_sentence

    return rename_sentence(renamed, "the data frame" if data.source == "<data frame>" else data.source)


def _without_group_clause(count: int, read: int, column: str | None) -> str:
    """'; 48 of 480 rows had no value of district, the group column, and were left out' (said inside the parentheses
    of the rows analysed, so without parentheses of its own)."""
    where = f" of {_name(column)}, the group column," if column else " in the group column"
    return (f"; {count_text(count)} of {count_text(read)} row{'s' if read != 1 else ''} had no value{where} and "
            f"{'was' if count == 1 else 'were'} left out")
def few_categories_sentence(results) -> str:
    """That items of at most FEW_CATEGORIES answer categories were analysed as continuous (the fit's note says so;
    the methods text must too, since it describes the model fitted: new-user trial s15), with the preference for
    ordered categories (Rhemtulla, Brosseau-Liard & Savalei 2012), over the items of ``results`` (the fits of one
    text: a fit, the models compared, the steps of a ladder); empty when there are none."""
    items = tuple(dict.fromkeys(x for r in results for x in r.data.variables))
    found = {x for r in results for x in getattr(r.data, "few_categories", ())}
    few = tuple(x for x in items if x in found)
    if not few:
        return ""
    every = len(few) == len(items)
    which = (f"all {len(few)} items" if every and len(few) > 2 else "both items" if every and len(few) == 2
             else f"the item {_name(few[0])}" if len(few) == 1 else f"{len(few)} of the {len(items)} items "
             f"({_names(few)})")
    return (f"The answers to {which} had at most {WORDS[FEW_CATEGORIES]} categories and were analysed as continuous; "
            f"with so few categories, analysing them as ordered categories is usually preferred (Rhemtulla, "
            f"Brosseau-Liard, & Savalei, 2012).")


def answer_coding_sentence(data) -> str:
    """How answers recorded as words were coded (the model's 'answers' statements), e.g. 'Answers recorded as words
    were coded 1 (Strongly disagree) to 5 (Strongly agree).', naming the items when a statement coded only some of
    them; empty when the answers were numbers."""
    joined = joined_sentence(data)
    record = getattr(data, "answer_coding", ())
    if not record:
        return joined
    numbers = set(getattr(data, "numbers_only", ()))  # items whose answers held no word: their numbers were read
    worded = tuple((tuple(x for x in items if x not in numbers), answers) for items, answers in record)
    read = tuple((tuple(x for x in items if x in numbers), named_codes(answers)) for items, answers in record
                 if not numbers_recoded(answers))
    # numbers the statement codes as other numbers (1 = 5, ..., 5 = 1): said as coded, never as the numbers' meaning
    recoded = tuple((tuple(x for x in items if x in numbers), answers) for items, answers in record
                    if numbers_recoded(answers))
    variables = set(getattr(data, "variables", ()))

    def said(entries: tuple, opening: str) -> str:
        entries = tuple(e for e in entries if e[0])
        if not entries:
            return ""
        if len(entries) == 1 and set(entries[0][0]) >= variables:  # every item alike
            return f"{opening} {coding_described(entries[0][1])}."
        return f"{opening} " + "; ".join(f"{coding_described(answers)} for {_names(items)}"
                                         for items, answers in entries) + "."

    return " ".join(s for s in (said(worded, "Answers recorded as words were coded"),
                                said(read, "Answers were recorded as the numbers"),
                                said(recoded, "Answers recorded as numbers were coded"), joined) if s)


def joined_sentence(data, where: str = "") -> str:
    """Which answer categories of which ordinal items were analysed as one (the model's 'join answers' statements,
    data.joined_answers), e.g. 'Answers 0 and 1 of item3 and item4 were analysed as one category (coded 1), for
    categories chosen by few respondents.'; empty without joins.  ``where``: the analyses it holds for beside the
    fit's (', in the fit and in every resample' for the bootstrap's methods lines)."""
    record = getattr(data, "joined_answers", ())
    if not record:
        return ""
    parts = [f"answers {_list([user_number(v) for v in values])} of {_names(items)} (coded {user_number(into)})"
             for items, values, into in record]
    return (f"Neighbouring answer categories of ordinal items were analysed as one category: {'; '.join(parts)}; "
            f"the thresholds and polychoric correlations are those of the joined categories{where}.")


def _matrix_sentence(result, subject: str = "The model was") -> str:
    """For a fit of summary statistics: which matrix was analysed instead of rows of answers ('' for rows), and,
    for correlations without standard deviations, what that means for the estimates (Cudeck 1989)."""
    from cfa_tool.data.summary_stats import AnalysedMatrix, NotGiven, given_with

    analysed = getattr(result.data, "analysed", None)
    if analysed is None:
        return ""
    text = (f"{subject} fitted to summary statistics, not to rows of answers: {analysed.value}"
            + f", and N = {count_text(result.n_obs)} as given {given_with(result.data.source)}")
    if analysed is AnalysedMatrix.CORRELATION:
        text += ("; the correlations were analysed as if they were covariances, so the unstandardized estimates are in "
                 "standard-deviation units and their standard errors are only approximate (Cudeck, 1989), while the "
                 "standardized solution and the fit are unaffected")
    if NotGiven.MEANS not in result.data.not_given:  # given beside the matrix, never fitted (hostile tester s24)
        text += (". The items' means given with the matrix were not fitted (the model has no means); they give only "
                 "the means of the keyed sum scores")
    return text + "."


def _fit_sentence(result) -> str:
    f = result.fit
    low, high = f.rmsea_ci90
    if f.df == 0:
        return ("The model is just-identified (0 degrees of freedom): it reproduces the observed covariances exactly, "
                "so its fit could not be tested.")
    if result.robust is not None and missing(result.robust.chi_square_scaled):  # a scaling factor not positive
        return (f"The {_test_phrase(result.robust.test, result.robust.design)} could not be computed, as the estimate "
                f"of its scaling factor was not positive; the normal-theory test gave {CHI}({f.df}) = "
                f"{f.chi_square:.2f}, {_p(f.p_value)}, and SRMR = {fit_index_text('srmr', f.srmr)}.")
    if result.robust is not None:
        r = result.robust
        rl, rh = r.rmsea_robust_ci90
        pieces = ", ".join(f"{name} {value:.3f}" for name, value in r.pieces)
        return (f"The {_test_phrase(r.test, r.design)} gave {CHI}({r.df}) = {r.chi_square_scaled:.2f}, {_p(r.p_value_scaled)} "
                f"({pieces}); robust CFI = {fit_index_text('cfi', r.cfi_robust)}, robust TLI = "
                f"{fit_index_text('tli', r.tli_robust)}, robust RMSEA = {fit_index_text('rmsea', r.rmsea_robust)}, 90% CI [{unit(rl)}, {unit(rh)}], "
                f"SRMR = {fit_index_text('srmr', f.srmr)}.")
    return (f"The model fit was {CHI}({f.df}) = {f.chi_square:.2f}, {_p(f.p_value)}, CFI = {fit_index_text('cfi', f.cfi)}, "
            f"TLI = {fit_index_text('tli', f.tli)}, RMSEA = {fit_index_text('rmsea', f.rmsea)}, 90% CI [{unit(low)}, {unit(high)}], SRMR = {fit_index_text('srmr', f.srmr)}.")


def _uninformative_baseline_sentence(result) -> str:
    """That the baseline model misfits little, so CFI and TLI are bounded by it and read beside RMSEA and SRMR, when
    a caution of ``result`` says so (assessment.admissibility.uninformative_baseline_problems); '' otherwise."""
    from cfa_tool.assessment.fit_indices import UNINFORMATIVE_BASELINE_RMSEA as BOUND, baseline_fits_words

    found = next((p for p in result.problems if p.kind is ProblemKind.UNINFORMATIVE_BASELINE), None)
    if found is None:
        return ""
    robust = "robust " if result.robust is not None else ""
    # the index's figure, not a claim about the items, which may correlate well within their factors (s25)
    opening = (f"The baseline (independence) model had an RMSEA of "
               f"{unit(found.value, 3, BOUND)}, below the rule of thumb of {unit(BOUND)} (Kenny, Kaniskan & McCoach, "
               f"2015)")
    fits = baseline_fits_words(result.fit, result.robust, paper=True)
    if fits:  # the indices have no value to read beside anything: the caution's words (s22)
        return f"{opening}, and {fits}."
    return (f"{opening}, so the {robust}CFI and TLI below, which compare the model with that baseline, were read "
            f"beside the RMSEA and SRMR.")


def non_normal_sentence(problems, groups: tuple[str, ...] = (), several: bool = False) -> str:
    """That the answers departed from multivariate normality enough to matter, so that the normal-theory chi-square
    and standard errors are off, when a caution among ``problems`` says so (assessment.admissibility.
    non_normal_problems; ``groups``: the fit's labels, each group named among them; ``several``: the chi-squares of
    several models of those answers, a comparison's or a ladder's); '' otherwise.  A limit of the results, in a
    paper's words: no advice and no option."""
    found = [p for p in problems if p.kind is ProblemKind.NON_NORMAL_ANSWERS]
    if not found:
        return ""
    where = [f" in group {written_group(p.group, groups)}" if p.group is not None else "" for p in found]
    ratios = _list([f"{p.value:.2f} times its normal value{w}" for p, w in zip(found, where)])
    heavy = [p.value > 1 for p in found]
    effect = ("too large and the standard errors too small" if all(heavy) else
              "too small and the standard errors too large" if not any(heavy) else
              "off (too large where the tails are heavier than normal, too small where they are lighter) and so are "
              "the standard errors")
    return (f"The answers departed from multivariate normality (Mardia's multivariate kurtosis {ratios}; Mardia, "
            f"1970), so the normal-theory {'chi-squares below tend' if several else 'chi-square below tends'} to be "
            f"{effect} (Browne, 1984).")


def _method_items(result, factor: str) -> list[str]:
    """The items a method factor loads on, in the model's order."""
    return [r.variables[1] for r in result.estimates
            if r.kind == "loading" and r.variables[0] == factor and r.variables[1] in result.observed
            and (r.group is None or r.group == result.groups[0].label)]


def _weak_factor_sentence(result, subject: str) -> str:
    """Sentences on the method factors of ``result`` that carry next to nothing and on factors that point against
    their items ('' when there are none)."""
    weak = [_phrase(p, result) for p in result.problems if p.kind is ProblemKind.WEAK_METHOD_FACTOR]
    turned = [_phrase(p, result) for p in result.problems if p.kind is ProblemKind.FACTOR_POINTS_AGAINST_ITEMS]
    keyed_against = [_phrase(p, result) for p in result.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
    markers = [p for p in result.problems if p.kind is ProblemKind.WEAK_MARKER]  # hostile s23
    # the factors that point against their items, by (factor, group): a weak or miskeyed marker turns its factor too
    pointing = {(r.factor, g.label if len(result.groups) > 1 else None) for g in result.groups
                for r in g.reliability if r.points_against}

    def directing(found) -> bool:
        return any((split_label(p.parameters[0])[1][0], p.group) in pointing for p in found)

    parts = []

    def its(found: list) -> str:  # each factor's, or theirs (s23: 'its' after a list of several)
        return "its" if len(found) == 1 else "their"

    if markers:
        parts.append(f"{subject} has {_list([_phrase(p, result) for p in markers])}; the standardized loadings do "
                     f"not depend on {'it' if len(markers) == 1 else 'them'}"
                     + (", but the factor's direction does, so its correlations, mean differences and scores read the "
                        "wrong way." if directing(markers) else "."))
    if weak:
        parts.append(f"{subject} has {_list(weak)} (a common-practice guide for negligible loadings): {its(weak)} "
                     f"items share little beyond the other factors they load on.")
    if turned:
        parts.append(f"{subject} has {_list(turned)}: {its(turned)} correlations, mean differences and scores read "
                     f"the wrong way.")
    if keyed_against:  # a typing error in the statement, or answers coded the other way (new user s17)
        one = len(keyed_against) == 1
        against = [p for p in result.problems if p.kind is ProblemKind.KEYING_AGAINST_LOADINGS]
        parts.append(f"{subject} has {_list(keyed_against)}: the keyed sum{'' if one else 's'} "
                     f"add{'s' if one else ''} items that run against each other, so {its(keyed_against)} "
                     f"reliability is not reported here"
                     + (f"; {'the factor points' if one else 'the factors point'} the way of those items, against "
                        f"{its(keyed_against)} other items, so {its(keyed_against)} correlations, mean differences and "
                        f"scores read the wrong way too." if directing(against) else "."))
    return " ".join(parts)


def _reverse_keyed_sentence(d) -> str:
    """The items a 'reversed' statement declares reverse-keyed, with their answer scale ('' without one)."""
    parts = []
    for items, lowest, highest in d.reverse_keyed:
        many = len(items) > 1
        parts.append(f"the item{'s' if many else ''} {_names(items)} {'were' if many else 'was'} declared "
                     f"reverse-keyed (worded against {'their factors' if many else 'its factor'}; answers from "
                     f"{user_number(lowest)} to {user_number(highest)})")
    return _capital("; ".join(parts)) + "." if parts else ""


def _unreached_sentence(d, problems) -> str:
    """That no answer reached an end of a declared reverse-keyed scale, when the data's cautions say so
    (pipeline.inputs.scale_ends_problems; ``problems``: the cautions of the fit, comparison or ladder): the keyed sums'
    means then depend on the scale declared, which a paragraph stating that scale must not leave out."""
    unreached = [p for p in problems if p.kind is ProblemKind.SCALE_ENDS_UNREACHED]
    if not d.reverse_keyed or not unreached:
        return ""
    both = any(p.value == 2 for p in unreached)
    scale = "that declared scale" if len(d.reverse_keyed) == 1 else "a declared scale"
    return (f"No answer of the items it covers reached {'either end' if both else 'an end'} of {scale}, so the means "
            f"of the keyed sums depend on the scale declared (their spread, correlations and omega do not).")


def _scale_sentences(d, problems=(), keys_said: bool = False) -> list[str]:
    """The items declared reverse-keyed (with the ends of their declared scale that no answer reached, among
    ``problems``; ``keys_said``: said already, for every model of a comparison), then how each factor got its scale
    (what the declaration changed in it)."""
    return [sentence for _, sentence in _scale_pieces(d, problems, keys_said) if sentence]


def _scale_pieces(d, problems=(), keys_said: bool = False) -> list[tuple[str, str]]:
    """:func:`_scale_sentences` each with its kind ('' where a model has none of that kind)."""
    return [("keyed", "" if keys_said else _reverse_keyed_sentence(d)), ("unreached", _unreached_sentence(d, problems)),
            ("scale", _scale_sentence(d) if d.scales else ""), ("method scale", _method_scale_sentence(d))]


def _method_scale_sentence(d) -> str:
    """How a method factor scaled by a marker got its direction when some of its items are declared reverse-keyed:
    a 'reversed' statement does not orient method factors, so the marker is the method factor's first item at +1
    and the factor points the way of its items' raw answers ('' when no method factor is in that case)."""
    keyed = {x for items, _, _ in d.reverse_keyed for x in items}
    clauses = [f"the loading of {_name(s.factor)}'s first item, {_name(s.marker)}, was fixed to +1, so that {_name(s.factor)} points the "
               f"way of its items' raw answers" for s in d.scales
               if s.factor in set(d.method_factors) and s.method == "marker" and s.marker in keyed]
    if not clauses:
        return ""
    return f"The reverse-keyed declaration does not orient method factors: {'; '.join(clauses)}."


def _keyed_sum_words(rows) -> str:
    """Which items the keyed sums reverse and why (the reliability rows' own keys), as a closing clause."""
    reversed_items = list(dict.fromkeys(x for r in rows for x in r.reversed))
    if not reversed_items:
        return ""
    declared = all(r.keying is Keying.DECLARED for r in rows)
    why = ("as declared" if declared else
           f"as {'their loadings run' if len(reversed_items) > 1 else 'its loading runs'} against the other items of "
           f"{'their factors' if len(reversed_items) > 1 else 'its factor'}")
    return f", with {_names(reversed_items)} reversed in the sums ({why})"


def _negative_count(rows, groups: list) -> str:
    """How many of the items' standardized loadings (``rows``, estimate rows) are negative: '6 negative', with groups
    '6 negative in each group' or 'negative: 6 in A and 5 in B' (the rows of every group counted together would read
    as one group's)."""
    negative = [r for r in rows if r.standardized < 0]
    if not groups:
        return f"{len(negative)} negative"
    counts = [sum(r.group == g for r in negative) for g in groups]
    if len(set(counts)) == 1:
        return f"{counts[0]} negative in each group"
    return "negative: " + _list([f"{n} in group {written_group(g, groups)}" for n, g in zip(counts, groups)])


def _reliability_sentence(result) -> str:
    """The reliability of each factor's keyed sum score as the fit computed it (assessment.reliability): omega
    (McDonald 1999), for a higher-order factor omega hierarchical (Zinbarg, Revelle, Yovel & Li 2005); for ordinal
    items the omega of the observed sum of the answers' codes (Green & Yang 2009).  A fit of one group only: with
    groups the coefficients differ by group and stay in the report's tables.  '' when none was computed."""
    if result.multigroup or not result.groups:
        return ""
    # a factor whose loadings contradict the declared keying: its sum's coefficients describe no scale, and the
    # solution's sentence on the problem says so (_weak_factor_sentence)
    rows = [r for r in result.groups[0].reliability if not miskeyed(r)]

    def shown(value) -> bool:
        return value is not None and math.isfinite(value)

    if result.method.ordinal:
        # a bifactor model's: the share of the general factor alone, or of a specific factor beyond it, not the
        # reliability of a sum (s22: '.29 for comfort' read as its subscale's reliability)
        parts_of = [r for r in rows if shown(r.observed_sum_omega) and r.bifactor is not None]
        found = [r for r in rows if shown(r.observed_sum_omega) and r.bifactor is None and r.level != "higher-order"]
        # a higher-order factor's: the share of its items' sum due to it alone (s23: left out, the table showing it)
        above = [r for r in rows if shown(r.observed_sum_omega) and r.level == "higher-order"]
        # factors of continuous items beside ordinal ones: omega of their items' keyed sum (hostile s21: left out)
        only_continuous, mixed = factors_by_item_kind(result, rows)
        continuous = [r for r in rows if r.factor in only_continuous and r.level != "higher-order"
                      and r.bifactor is None and shown(r.omega)]
        parts = []
        if found:
            values = _list([f"{est_unit(r.observed_sum_omega, 2)} for {_name(r.factor)}" for r in found])
            parts.append(f"The reliability of the factors' keyed sums of the answers' codes (the omega of the observed "
                         f"sum, from the fitted thresholds, loadings and factor variances; Green & Yang, 2009) was "
                         f"{values}{_keyed_sum_words(found)}.")
        if above:
            parts.append(f"For the higher-order factor{'s' if len(above) > 1 else ''}, omega hierarchical of the keyed "
                         f"sum of the answers' codes of the items below it, the share of that sum's variance due to the "
                         f"higher-order factor alone (from the fitted thresholds, "
                         f"loadings and factor variances; Green & Yang, 2009; Zinbarg, Revelle, Yovel & Li, 2005), was "
                         f"{_list([f'{est_unit(r.observed_sum_omega, 2)} for {_name(r.factor)}' for r in above])}"
                         f"{_keyed_sum_words(above)}.")
        general = [r for r in parts_of if r.bifactor is BifactorPart.GENERAL]
        specific = [r for r in parts_of if r.bifactor is BifactorPart.SPECIFIC]
        if general:
            parts.append(f"For the general factor{'s' if len(general) > 1 else ''} of the bifactor model, omega "
                         f"hierarchical of the keyed sum of the answers' codes, the share of that sum's variance due to "
                         f"the general factor alone (from the fitted thresholds, loadings and factor variances; Green & "
                         f"Yang, 2009; Rodriguez, Reise & Haviland, 2016), was "
                         f"{_list([f'{est_unit(r.observed_sum_omega, 2)} for {_name(r.factor)}' for r in general])}"
                         f"{_keyed_sum_words(general)}.")
        if specific:
            parts.append(f"Omega hierarchical subscale of the keyed subscale sum of the answers' codes, the share due "
                         f"to a specific factor beyond the general factor (Rodriguez, Reise & Haviland, 2016), was "
                         f"{_list([f'{est_unit(r.observed_sum_omega, 2)} for {_name(r.factor)}' for r in specific])}"
                         f"{_keyed_sum_words(specific)}.")
        if continuous:
            values = _list([f"{est_unit(r.omega, 2)} for {_name(r.factor)}" for r in continuous])
            parts.append(f"For the keyed sum scores of the factors of continuous items, omega (McDonald, 1999) was "
                         f"{values}{_keyed_sum_words(continuous)}.")
        if mixed:  # the table's note says it; the paragraph too (hostile s22: the paragraph said nothing of them)
            parts.append(mixed_kinds_sentence(mixed, paper=True))
        return " ".join(parts)
    first = [r for r in rows if r.level != "higher-order" and r.bifactor is None and shown(r.omega)]
    higher = [r for r in rows if (r.level == "higher-order" or r.bifactor is BifactorPart.GENERAL)
              and shown(r.omega_hierarchical)]
    specific = [r for r in rows if r.bifactor is BifactorPart.SPECIFIC and shown(r.omega)]
    parts = []
    if first:
        parts.append(f"omega (McDonald, 1999) was "
                     f"{_list([f'{est_unit(r.omega, 2)}{_delta_brackets(r)} for {_name(r.factor)}' for r in first])}")
    if higher:
        general = any(r.bifactor is BifactorPart.GENERAL for r in higher)
        parts.append("omega hierarchical (Zinbarg, Revelle, Yovel & Li, 2005"
                     + ("; Rodriguez, Reise & Haviland, 2016" if general else "") + ") was "
                     + _list([f"{est_unit(r.omega_hierarchical, 2)}{_delta_brackets(r)} for {_name(r.factor)}"
                              for r in higher]))
    if any(_delta_brackets(r) for r in first + higher):  # relint-s24: the delta-method intervals the table shows
        parts[-1] += " (in brackets, 95% delta-method intervals; Raykov, 2002)"
    if specific:
        parts.append("omega hierarchical subscale, the share of a specific factor's keyed subscale sum due to that "
                     "factor beyond the general factor (Rodriguez, Reise & Haviland, 2016), was "
                     + _list([f"{est_unit(r.omega, 2)} for {_name(r.factor)}" for r in specific]))
    if not parts:
        return ""
    return (f"For the reliability of the factors' keyed sum scores, {'; '.join(parts)}"
            f"{_keyed_sum_words(first + higher + specific)}.")


def _delta_brackets(r) -> str:
    """' [.55, .70]', a factor's omega's delta-method 95% interval (assessment.reliability_intervals.delta_interval),
    or '' (also for an interval that passes 0 or 1, which no reliability can reach: the table's note sends the reader
    to the bootstrap's interval there, and a paper's text does not print an impossible bound)."""
    from cfa_tool.assessment.reliability_intervals import delta_interval

    interval = delta_interval(r)
    if interval is None or interval[0] < 0 or interval[1] > 1:
        return ""
    return f" [{unit(interval[0], 2)}, {unit(interval[1], 2)}]"


def _factor_means_sentence(result) -> str:
    """Where a fit in groups estimated its factor means and where it fixed them at zero (its own mean parameters):
    with intercepts held equal the means of every group but the reference are estimated; without, every group's
    are zero ('' for one without mean parameters); a fit of one group says it where the means are more than the
    intercepts' origin (:func:`_one_group_means`)."""
    means = [r for r in result.estimates if r.kind == "mean"]
    if not means:
        return ""
    if not result.multigroup:
        return "" if result.description is None else _one_group_means(result, result.description)
    labels = group_labels(result)
    at_zero = [g for g in labels if all(not r.free and r.estimate == 0.0 for r in means if r.group == g)]
    estimated = {g: [r.variables[0] for r in means if r.group == g and r.free] for g in labels}
    every = {r.variables[0] for r in means}
    if len(at_zero) == len(labels):
        return "The factor means were fixed at zero in every group."
    parts = [f"fixed at zero in {'group' if len(at_zero) == 1 else 'groups'} {_list([written_group(g, labels) for g in at_zero])}"] if at_zero else []
    whole = [g for g in labels if estimated[g] and set(estimated[g]) == every]
    if whole:
        parts.append(f"estimated in {'group' if len(whole) == 1 else 'groups'} {_list([written_group(g, labels) for g in whole])}")
    parts += [f"estimated for {_names(estimated[g])} in group {written_group(g, labels)}" for g in labels
              if estimated[g] and g not in whole]
    return f"The factor means were {_list(parts)}." if parts else ""


def _latent_response_sentence(result) -> str:
    """How an ordinal fit in groups identified its items' latent responses in each group (Wu & Estabrook 2016), read
    from its own intercept and residual-variance parameters of the items with thresholds ('' for other fits)."""
    items = {r.variables[0] for r in result.estimates if r.kind == "threshold"}
    if not result.multigroup or not items:
        return ""

    def state(kind: str, group: str, value: float) -> str:
        """'fixed at 1', 'estimated', or with the items whose own value departs from that (a 'fix' the model file
        states: review s14, where 'partly estimated' stood for residual variances that were all fixed)."""
        own = [r for r in result.estimates if r.kind == kind and r.group == group and r.variables[0] in items]
        # a latent response held at variance 1 instead (its residual variance derived: pipeline.ordinal)
        held = [r for r in own if r.origin == "derived"]
        own = [r for r in own if r.origin != "derived"]
        fixed = [r for r in own if not r.free]
        if held:
            instead = (f"{_names([r.variables[0] for r in held])}: the latent response's variance at 1 instead, its "
                       f"residual variance following from the loadings" if len(held) == 1 else
                       f"{_names([r.variables[0] for r in held])}: the latent responses' variances at 1 instead, their "
                       f"residual variances following from the loadings")
            if not own:
                return "following from latent-response variances fixed at 1"
            return state_of(own, fixed, value) + f" ({instead})"
        return state_of(own, fixed, value)

    def state_of(own: list, fixed: list, value: float) -> str:
        if len(fixed) == len(own):
            apart = [f"{_name(r.variables[0])}'s at {user_number(r.estimate)}" for r in fixed if r.estimate != value]
            return f"fixed at {user_number(value)}" + (f" ({_list(apart)})" if apart else "")
        if not fixed:
            return "estimated"
        return f"estimated (except {_list([f'{_name(r.variables[0])} fixed at {user_number(r.estimate)}' for r in fixed])})"

    patterns: dict[tuple[str, str], list[str]] = {}
    for g in result.groups:
        patterns.setdefault((state("intercept", g.label, 0.0), state("residual_variance", g.label, 1.0)),
                            []).append(g.label)
    every = group_labels(result)  # each group named by the one rule of group names (s22: '"8"', no 'group', here)
    phrases = [f"intercepts {a} and residual variances {b} in "
               + (f"{'group' if len(labels) == 1 else 'groups'} {_list([written_group(g, every) for g in labels])}"
                  if len(patterns) > 1 else "every group")
               for (a, b), labels in patterns.items()]
    return (f"The latent responses behind the ordinal items had {'; '.join(phrases)} (the identification of Wu & "
            f"Estabrook, 2016).")


def _stated(result) -> bool:
    """Whether the model fixes every parameter (a population or published values tested on the data): nothing was
    estimated."""
    return not result.parameter_labels


def _stated_discrepancy(result) -> str:
    """The discrepancy a model fixing every parameter was tested by: the one its estimator minimises (for ordinal
    items least squares on the polychoric correlations, review s14: the text said maximum likelihood)."""
    method = result.method
    if method.ordinal:
        kind, aside = _correlation_kinds(result)
        extra = " and polyserial" if method.items is Items.MIXED else ""
        statistics = "thresholds and " if method.thresholds else ""
        return (f"the {method.weighting.label} least-squares discrepancy from the {statistics}{kind}{extra} "
                f"correlations{aside}")
    return ("the full-information maximum-likelihood discrepancy" if method.full_information else
            "the maximum-likelihood discrepancy")


def _stated_groups_sentence(result, d) -> str:
    """What holds across the groups of a model fixing every parameter: each parameter at its stated value in every
    group, the same in each or, where an 'in group' statement gave a group its own, different (review s14: the text
    said the parameters were estimated separately in each group, with no invariance constraints)."""
    values: dict[tuple, set[float]] = {}
    for r in result.estimates:
        values.setdefault((r.kind, r.variables), set()).add(r.estimate)
    differ = [key for key, held in values.items() if len(held) > 1]
    if not differ:
        return ("Every parameter was fixed at the same stated value in every group, so the groups were held to one "
                "model (each parameter equal across groups).")
    named = [parameter_words(kind, tuple(names), None, d.indicators, quoted=True) for kind, names in differ]
    return (f"Every parameter was fixed at a stated value in every group, the same value in each group except "
            f"{_list(named)}, stated differently for different groups.")


def analysis_name(d) -> str:
    """The analysis the model is, as the methods text names it (``d``: its model.description.ModelDescription, or
    None): an exploratory factor analysis when every factor is in one exploratory block and the model has no other
    part (no residual covariance, no higher-order factor); an exploratory structural equation model when an
    exploratory block is one part among others (the block's own sentence names the method: Asparouhov & Muthén,
    2009); else a confirmatory factor analysis.  Hostile trial s26, 01: a model of one exploratory block alone was
    called "a confirmatory factor analysis with 12 indicators of three exploratory factors"."""
    if d is None or not d.exploratory:
        return "a confirmatory factor analysis"
    if (len(d.exploratory) == 1 and not d.first_order and not d.confirmatory_indicators and not d.higher_order
            and not d.residual_covariances):
        return "an exploratory factor analysis"
    return "an exploratory structural equation model"


def _estimated_by(result, groups: str) -> str:
    """'was estimated by maximum likelihood, with standard errors from ...'; for a model fixing every parameter,
    what was done instead (review s13: the text said estimated, with standard errors, where nothing was)."""
    if _stated(result):
        base = _stated_discrepancy(result)
        return (f"with every parameter fixed at a stated value was tested against the data{groups} by {base}, so "
                f"nothing was estimated and no standard errors apply")
    return f"was estimated{groups} by {_estimator_phrase(result)}"


def methods_paragraph(result) -> str:
    if not result.converged or result.fit is None:
        return "The model did not converge, so no results are reported."
    d = result.description
    groups = (f" in {_count(len(result.groups), 'group')} defined by {_name(result.group_column)} ("
              + "; ".join(f"{w}, n = {count_text(g.data.n_obs)}" for w, g in zip(_group_names(result.groups), result.groups)) + ")"
              if result.multigroup else "")
    parts = []
    if d is not None:
        shape = _shape(result, d)
        parts.append(f"{_capital(analysis_name(d))} with {_structure(d, shape)} {_estimated_by(result, groups)} "
                     f"({_sample_phrase(result)}).")
        parts += _scale_sentences(d, result.problems)
        if d.exploratory:
            parts.append(_block_sentences(result, d))
        departures = _departures(d, shape)
        if departures:
            parts.append(departures)
        if d.invariant:
            parts.append(_held_equal_sentences(d))
        elif result.multigroup and _stated(result):  # nothing estimated: the stated values are what holds
            parts.append(_stated_groups_sentence(result, d))
        elif result.multigroup:  # a reviewer must not take the groups' estimates for invariant ones
            parts.append("No invariance constraints were imposed: the parameters were estimated separately in each "
                         "group, with the same pattern in every group" + (
                             " (apart from the equality constraints above)" if d.equal else "") + ".")
        parts += [sentence for sentence in (_factor_means_sentence(result), _latent_response_sentence(result))
                  if sentence]
    else:
        parts.append(f"{_capital(analysis_name(d))} with {len(result.observed)} indicators "
                     f"{_estimated_by(result, groups)} ({_sample_phrase(result)}).")
    matrix = _matrix_sentence(result)
    if matrix:  # right after the sentence naming the estimation and N
        parts.insert(1, matrix)
    few = few_categories_sentence([result])
    if few:
        parts.insert(1, few)
    coding = answer_coding_sentence(result.data)
    if coding:
        parts.insert(1, coding)
    renamed = renamed_sentence(result.data)
    if renamed:  # the names above are those the columns were read under
        parts.insert(1, renamed)
    restricted = _fit_range_restriction(result)
    if restricted:  # right after the sentence naming the rows the filters chose
        parts.insert(1, restricted)
    parts += _design_sentences([result])
    missingness = _completely_at_random_sentence(result)
    if missingness:
        parts.append(missingness)
    if result.method.helpers:
        parts.append(helpers_sentence(result.method.helpers))
    inadmissible = not result.admissible
    if inadmissible:
        serious = [p for p in result.problems if p.kind.inadmissible]
        named = [_phrase(p, result) for p in serious]
        if all(p.kind is ProblemKind.ON_BOUND for p in serious):
            parts.append(f"The solution lies on a boundary ({_list(named)}): the unrestricted estimate would lie beyond "
                         f"the bound, so the solution is not admissible as it stands, and standard errors and tests "
                         f"of parameters at a bound are not reliable.")
        else:
            parts.append(f"The solution was not admissible: it has {_list(named)}. Its estimates therefore cannot "
                         f"describe a population and its fit is not evidence for the model; the values below are "
                         f"reported only so that the problem can be judged.")
    weak = _weak_factor_sentence(result, "The solution")
    if weak:
        parts.append(weak)
    small = _small_groups(result)
    if small:  # the report's first caution, before the fit (new user s14)
        parts.append(small)
    baseline = _uninformative_baseline_sentence(result)
    if baseline:  # before the CFI and TLI it says how to read
        parts.append(baseline)
    tails = non_normal_sentence(result.problems, group_labels(result))
    if tails:  # before the chi-square it qualifies
        parts.append(tails)
    parts.append(_fit_sentence(result))
    untested = [(h, lower) for h, lower in (d.higher_order if d is not None else ())
                if h in getattr(d, "just_identified_higher_order", ())]
    if untested and result.fit.df > 0:  # right after the fit it qualifies
        parts.append(" ".join(f"The part of the model above the first-order factors, the higher-order factor "
                              f"{_name(h)} explaining {_names(lower)}, is just-identified, so this fit equals that of "
                              f"those factors correlated freely and does not test the higher-order structure "
                              f"(Rindskopf & Rose, 1988)." for h, lower in untested))
    methods = set(getattr(result.description, "method_factors", ()) or ())
    item_loadings = [r for r in result.estimates if r.kind == "loading" and r.variables[1] in result.observed
                     and r.variables[0] not in methods]
    loadings = [r.standardized for r in item_loadings]
    second = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[1] not in result.observed]
    blocks = getattr(result, "exploratory", ())
    groups = group_labels(result)
    # with groups the rows are every group's: the range spans them, and the count of negative ones is per group
    across = f" across the {_count(len(groups), 'group')}" if groups else ""
    if loadings:
        which = "on the confirmatory factors " if blocks else ("of the items " if second else "")
        if _stated(result):  # the values given, not estimates
            which = "implied by the stated values " + which
        negative = sum(v < 0 for v in loadings)
        if negative:  # reverse-keyed items: a range from -.76 to .81 would read as if -.76 were the weakest
            sizes = [abs(v) for v in loadings]
            parts.append(f"Standardized loadings {which}ranged from {est_unit(min(sizes), 2)} to {est_unit(max(sizes), 2)} in "
                         f"absolute value{across} ({_negative_count(item_loadings, groups)}).")
        else:
            parts.append(f"Standardized loadings {which}ranged from {est_unit(min(loadings), 2)} to "
                         f"{est_unit(max(loadings), 2)}{across}.")
    for factor in sorted(methods):  # apart from the traits' loadings, which they would otherwise widen
        items = _method_items(result, factor)
        on_factor = [r.standardized for r in result.estimates if r.kind == "loading" and r.variables[0] == factor
                     and r.variables[1] in result.observed]
        if items:
            loads = _range(on_factor, "its standardized loading", "its standardized loadings")
            parts.append(f"The method factor {_name(factor)} was indicated by {_names(items)}; {loads}"
                         f"{across if len(on_factor) > 1 else ''}.")
    higher = {r.variables[0] for r in result.estimates if r.kind == "loading" and r.variables[1] not in result.observed}
    if second:
        on = "the higher-order factor" if len(higher) == 1 else "the higher-order factors"
        said = _range(second, f"The standardized loading of the factor on {on}",
                      f"The standardized loadings of the {'factors' if len(higher) == 1 else 'first-order factors'} "
                      f"on {on}")
        parts.append(f"{said}{across if len(second) > 1 else ''}.")  # every group's, as the items'
    # the estimated correlations: one the model fixes (at 0 in a bifactor model) the methods part states
    correlated = [r for r in result.estimates if r.kind == "factor_covariance" and r.free]
    corr = [r.standardized for r in correlated]
    if len(corr) > len(groups) and groups:  # each group's correlations, standardized in its own group
        parts.append(f"Factor correlations ranged from {est_unit(min(corr), 2)} to {est_unit(max(corr), 2)}{across}.")
    elif corr and groups:
        parts.append(f"The factor correlation ranged from {est_unit(min(corr), 2)} to {est_unit(max(corr), 2)}{across}.")
    if corr and not result.multigroup:
        which = " of the confirmatory factors" if blocks else ""
        if higher and all(set(r.variables) <= higher for r in correlated):
            which = " of the higher-order factors" + (f" ({_names(sorted(higher))})" if len(corr) == 1 else "")
        if len(corr) == 1:
            parts.append(f"The {'' if which.startswith(' of the higher') else 'factor '}correlation{which} was "
                         f"{est_unit(corr[0], 2)}.")
        else:
            parts.append(f"Factor correlations{which} ranged from {est_unit(min(corr), 2)} to {est_unit(max(corr), 2)}.")
    reliability = _reliability_sentence(result)
    if reliability:
        parts.append(reliability)
    if result.fit.df > 0 and not inadmissible:
        parts.append(f"Fit was judged against conventional guide values (e.g., {guides_text(READ_FIRST, signs=True)}; "
                     f"Hu & Bentler, 1999), which are conventions rather than strict criteria.")
    return " ".join(parts)


def _values_of(factors, values) -> str:
    """'.93 for punctuality, .88 for comfort, and .90 for courtesy' (values missing for a factor left out)."""
    return _list([f"{est_unit(v, 2)} for {_name(f)}" for f, v in zip(factors, values) if not math.isnan(v)])


def _items_of_factors(fit) -> dict[str, set[str]]:
    """Each factor's items, directly or through the factors below it, from the fit's loading rows (a saved fit's
    too)."""
    below: dict[str, set[str]] = {}
    for r in fit.estimates:
        if r.kind == "loading":
            below.setdefault(r.variables[0], set()).add(r.variables[1])

    def items(f: str, seen: frozenset = frozenset()) -> set[str]:
        out: set[str] = set()
        for x in below.get(f, ()):
            out |= items(x, seen | {f}) if x in below and x not in seen else ({x} if x not in below else set())
        return out

    return {f: items(f) for f in below}


def _scored_with_gaps(result) -> tuple[int, int]:
    """(rows scored that missed some answers of a factor, rows scored that answered none of some factor's items but
    answered others), from the scores file's items-answered columns (workflows.factor_scores.answered_column)."""
    from cfa_tool.workflows.factor_scores import answered_column

    items = _items_of_factors(result.fit)
    columns = [(answered_column(f), len(items.get(f, ()))) for f in result.factors
               if answered_column(f) in result.table.columns and items.get(f)]
    if not columns:
        return 0, 0
    answered = np.column_stack([result.table[c].to_numpy(dtype=float) for c, _ in columns])
    total = np.array([n for _, n in columns], dtype=float)
    scored = np.isfinite(answered).all(axis=1) & (np.nansum(answered, axis=1) > 0)
    gaps = scored & (answered < total).any(axis=1)
    none = scored & (answered == 0).any(axis=1)
    return int(gaps.sum()), int(none.sum())


def scores_paragraph(result) -> str:
    """The methods paragraph of factor scores (workflows.factor_scores.ScoreResult): the fit's own paragraph (the
    fit above, or the saved one's), then how the scores were computed, from the result's typed fields: each method
    with its authors, whose parameters, how rows with missing answers were scored (the items answered; a factor
    none of whose items a row answered predicted from the other answers or left empty; item sums prorated by the
    least share), the rows without a score, and the scores' determinacy (Grice, 2001) and reliability (Beauducel,
    2011; omega of the item sums, McDonald, 1999; the posterior means' reliability in the data)."""
    # (the scoring modules load here, not with a fit's report: the command's cold start)
    from cfa_tool.reporting.score_words import METHOD_LABELS, SCORE_METHOD_WORDS, share_words
    from cfa_tool.scoring.methods import (DETERMINACY_CAUTION, ITEM_METHODS, PREDICTING_METHODS, ScoreMethod,
                                          UnansweredFactor)
    from cfa_tool.workflows.factor_scores import NotScored

    fit = result.fit
    saved = getattr(fit, "payload", None)
    if saved is None:
        parts = [methods_paragraph(fit)]
    else:  # an earlier fit read from its JSON result: its own paragraph, as that report gave it
        earlier = (saved.get("report") or {}).get("paragraph")
        parts = [earlier] if earlier else []
    grouped = len(result.quality) > 1
    whose = "each group's own estimated parameters" if grouped else "the estimated parameters"
    methods = _list([SCORE_METHOD_WORDS[m] for m in result.methods])
    if result.scored_source:
        parts.append(f"With {whose} of that fit (to {_count(fit.n_obs, 'row')}), the rows of {result.scored_source} "
                     f"were scored on {_count(len(result.factors), 'factor')} as {methods}.")
    else:
        parts.append(f"Each row's scores on the {_count(len(result.factors), 'factor')} were computed from {whose} "
                     f"as {methods}.")
    parts.append(_centred_scores_sentence(result))
    gaps, none = _scored_with_gaps(result)
    factor_methods = [m for m in result.methods if m not in ITEM_METHODS]
    if gaps and factor_methods:
        said = (f"The {_count(gaps, 'row')} with missing answers {'was' if gaps == 1 else 'were'} scored from the "
                f"items {'it' if gaps == 1 else 'they'} answered")
        predicting = [m for m in factor_methods if m in PREDICTING_METHODS]
        if none and predicting and result.unanswered is UnansweredFactor.PREDICT:
            said += (f"; where a row answered none of a factor's items, its {_list([METHOD_LABELS[m] for m in predicting])} "
                     f"score of that factor is a prediction from its other answers through the factors' correlations, "
                     f"not a measurement of it")
        elif none and result.unanswered is UnansweredFactor.LEAVE_EMPTY:
            said += "; where a row answered none of a factor's items, its score of that factor was left empty"
        parts.append(said + ".")
    written = _list([METHOD_LABELS[m] + "s" for m in ITEM_METHODS if m in result.methods])  # 'item sums'
    if result.item_sums:
        rule = result.item_sums[0].rule
        parts.append(f"{_capital(written)} were computed for rows that answered at least "
                     f"{share_words(rule.least_share)} of a factor's items"
                     + (" (a common-practice rule, no single source)" if rule.default else "")
                     + (", prorated from the items answered (the mean of the answered keyed items times the number of "
                        "items)" if ScoreMethod.ITEM_SUM in result.methods else
                        ", as the mean of the keyed items answered") + "; rows that answered fewer have none.")
    empty = {why: n for why, n in result.not_scored.items()}
    if empty:
        parts.append(f"Of the {count_text(result.rows)} rows in the data, {WORDS.get(sum(empty.values()), count_text(sum(empty.values())))} "
                     f"{'has' if sum(empty.values()) == 1 else 'have'} no score ("
                     + "; ".join(f"{why.words}: {count_text(n)}" for why, n in empty.items() if isinstance(why, NotScored)) + ").")
    for q in result.quality:
        where = f" in group {written_group(q.group, group_labels(fit))}" if grouped and q.group is not None else ""
        if hasattr(q, "methods"):
            parts.append(f"With every item answered, the determinacy of the factors{where} (the correlation of the "
                         f"regression scores with their factor; Grice, 2001) was {_values_of(q.factors, q.determinacy)}.")
            shown = [m for m in q.methods if m.method in result.methods and m.method is not ScoreMethod.REGRESSION]
            for m in shown:
                parts.append(f"The reliability of the {METHOD_LABELS[m.method]} scores{where} (their squared "
                             f"correlation with the factor; Beauducel, 2011) was {_values_of(m.factors, m.reliability)}.")
        else:
            parts.append(f"The reliability of the posterior means{where} in these data (their variance over that "
                         f"variance plus the mean posterior variance) was {_values_of(q.factors, q.reliability)}.")
        sums = next((g for g in result.item_sums if g.group == q.group), None)
        # the fit's paragraph above gives the same omega of the keyed sums (the item sums' reliability is the fit's)
        in_fit = saved is None and not fit.multigroup and bool(_reliability_sentence(fit))
        if sums is not None and not in_fit and any(not math.isnan(w) for w in sums.omega):
            parts.append(f"The reliability of the keyed {written}{where} of rows that answered every item, omega "
                         f"(McDonald, 1999), was {_values_of(sums.factors, sums.omega)}.")
    low = list(result.low_determinacy)
    if low:
        parts.append(f"The scores of {_names(low)} fall below a determinacy of {unit(DETERMINACY_CAUTION, 2)} (common "
                     f"practice) and are not suited to decisions about individuals.")
    return " ".join(p for p in parts if p)


def _centred_scores_sentence(result) -> str:
    """That the groups' factor scores are each centred at zero and do not compare across the groups, when the
    scores' caution says so (workflows.factor_scores.not_comparable_problems); '' otherwise."""
    from cfa_tool.workflows.factor_scores import centred_factors

    if not any(p.kind is ProblemKind.SCORES_NOT_COMPARABLE_ACROSS_GROUPS for p in result.fit.problems):
        return ""
    centred = centred_factors(result.fit.estimates)
    which = "" if len(centred) == len(result.factors) else f" of {_names(list(centred))}"
    return (f"As the model fixed the factor means{which} at zero in every group, each group's factor scores{which} "
            f"are centred at zero in that group's own units and do not compare across the groups.")


#: which of a pair's difference tests a comparison's paragraph reports: the one to read for the fits' test
_PREFERRED = (DifferenceMethod.SCALE_SHIFTED, DifferenceMethod.SATORRA_BENTLER_2010,
              DifferenceMethod.SATORRA_BENTLER_2001, DifferenceMethod.LIKELIHOOD_RATIO)


#: where a model's name stands in the pieces of :func:`_model_pieces`, filled in when a piece is said
_MODEL = "\x00model\x00"


def _model_pieces(result, keys_said: bool = False) -> list[tuple[str, str]]:
    """Exactly one model of a comparison as (kind, words) pieces, its name written :data:`_MODEL`: its factors and
    indicators ('structure'), how its factors got their scales ('scale'), each parameter it adds to simple structure
    (a cross-loading, a residual covariance, a covariance of disturbances: :data:`_INCLUDED`), its other departures
    ('departure': equalities, fixed values, bounds, method factors), its factor means ('means') and its equalities
    across groups ('groups'); the scale's sentences by their kinds (:func:`_scale_pieces`) (``keys_said``: the items declared reverse-keyed were said once for every model)."""
    d = result.description
    if d is None:
        return [("structure", f"{_MODEL} had {_count(len(result.observed), 'indicator')}.")]
    shape = _shape(result, d)
    pieces = [("structure", f"{_MODEL} had {_structure(d, shape).rstrip(',')}.")]
    pieces += [(kind, sentence) for kind, sentence in _scale_pieces(d, result.problems, keys_said) if sentence]
    included, sentences = _departure_parts(d, shape)
    pieces += included + [("departure", sentence) for sentence in sentences]
    means = "" if result.multigroup else _factor_means_sentence(result)
    if means:  # a one-group model's means where they are more than the intercepts' origin, as fit's paragraph says
        pieces.append(("means", means.replace("The mean", f"In {_MODEL}, the mean", 1) if means.startswith("The mean")
                       else f"In {_MODEL}, {means[0].lower()}{means[1:]}"))
    if result.multigroup:  # what distinguishes grouped models: their equalities across groups
        pieces.append(("groups", _held_equal_sentences(d, _MODEL) if d.invariant else
                       f"{_MODEL} held no parameter equal across groups (the same pattern in every group)."))
    return pieces


def _model_sentences(name: str, pieces: list[tuple[str, str]], first: list[tuple[str, str]] | None = None,
                     short: str = "", first_name: str = "Model 1") -> str:
    """One model of a comparison in words: in full (its :func:`_model_pieces`), or, given an earlier model's pieces
    (``first``, named ``first_name``), by what differs from it when they share some, so that the paragraph of models of
    many items stays of a manuscript's size (new-user trial s25: two longitudinal models of 18 items took about 1,000
    words, each model's lists said again): what this model adds is said in full, what it leaves out of the first
    model is named, and nothing else differs.  ``name``: its first mention ('Model 2 (free)'), ``short`` the later
    ones ('Model 2')."""
    short = short or name
    same = [p for p in pieces if first is not None and p in first]
    if not same:  # nothing shared (or the first model itself): every piece in full
        return _said_in_full(pieces, name)
    added = [p for p in pieces if p not in first]
    replaced = {kind for kind, _ in added if kind not in _INCLUDED and kind != "departure"}
    # the first model's pieces this one lacks, but for those its own of the same kind replace (its structure, how its
    # factors got their scales, its items declared reverse-keyed, its means, its equalities across groups)
    dropped = [p for p in first if p not in pieces and p[0] not in replaced]
    if not added and not dropped:
        return f"{name} was specified as {first_name}."
    lines = []
    for kind, words in added:
        if kind in _INCLUDED:
            continue
        if _MODEL in words:  # the sentence names the model itself
            lines.append(words.replace(_MODEL, short))
        elif words.startswith("The "):
            lines.append(f"in {short}, the {words[4:]}")
        else:
            lines.append(f"in {short}: {words}")
    more = [p for p in added if p[0] in _INCLUDED]
    if more:
        lines.append(f"{short} also included {_included_words(more)}.")
    fewer = [p for p in dropped if p[0] in _INCLUDED]
    if fewer:
        lines.append(f"{short} did not include {first_name}'s {_included_words(fewer)}.")
    left = [_in_sentence(words.replace(_MODEL, first_name)).removesuffix(".") for kind, words in dropped
            if kind not in _INCLUDED]
    if left:
        lines.append(f"{short} left out {'this part' if len(left) == 1 else 'these parts'} of {first_name}: "
                     f"{'; '.join(left)}.")
    return " ".join([f"{name} was specified as {first_name} except as follows."] + [_capital(line) for line in lines])


#: the first words of the paragraph's sentences that go on in lower case inside another sentence (a name keeps its case)
_SENTENCE_WORDS = ("The ", "In ", "No ", "A ", "An ", "Each ", "Every ")


def _in_sentence(text: str) -> str:
    """A sentence of the paragraph as it goes on after a colon: its first word in lower case when it is one of
    :data:`_SENTENCE_WORDS`, never a name."""
    return text[:1].lower() + text[1:] if text.startswith(_SENTENCE_WORDS) else text


def _said_in_full(pieces: list[tuple[str, str]], name: str) -> str:
    """A model's :func:`_model_pieces` as sentences, its name ``name``."""
    parts, included = [], [p for p in pieces if p[0] in _INCLUDED]
    for kind, words in pieces:
        if kind in _INCLUDED:
            if included:  # said once, where the first of them stands
                parts.append(f"{_MODEL} also included {_included_words(included)}.")
                included = []
            continue
        parts.append(words)
    return " ".join(parts).replace(_MODEL, name)


def _fit_figures(result) -> str:
    """A model's fit in a few figures: the test the comparison reads (the corrected one when there is one)."""
    f, r = result.fit, result.robust
    if not result.converged or f is None:
        return failure_words(result)
    if f.df == 0:
        return "was just-identified (0 df), so its fit could not be tested"
    if r is not None and missing(r.chi_square_scaled):  # a scaling factor not positive (inference.robust.robust_fit)
        return (f"had no scaled test (its scaling factor's estimate was not positive); normal-theory {CHI}({f.df}) = "
                f"{f.chi_square:.2f}, {_p(f.p_value)}, SRMR = {fit_index_text('srmr', f.srmr)}")
    if r is not None:
        low, high = r.rmsea_robust_ci90
        cfi = ("not computed (the baseline model's scaling factor was not positive)"
               if r.not_computed and missing(r.cfi_robust) else fit_index_text('cfi', r.cfi_robust))
        return (f"{CHI}({r.df}) = {r.chi_square_scaled:.2f}, {_p(r.p_value_scaled)}, robust CFI = {cfi}, "
                f"robust RMSEA = {fit_index_text('rmsea', r.rmsea_robust)}, 90% CI [{unit(low)}, {unit(high)}], SRMR = {fit_index_text('srmr', f.srmr)}")
    low, high = f.rmsea_ci90
    return (f"{CHI}({f.df}) = {f.chi_square:.2f}, {_p(f.p_value)}, CFI = {fit_index_text('cfi', f.cfi)}, RMSEA = {fit_index_text('rmsea', f.rmsea)}, "
            f"90% CI [{unit(low)}, {unit(high)}], SRMR = {fit_index_text('srmr', f.srmr)}")


def _comparison_rows(comparison) -> str:
    """The rows every model of a comparison was fitted to, and how rows with gaps were handled."""
    n, dropped = comparison.n_obs, comparison.rows_dropped
    if comparison.missing is MissingData.FULL_INFORMATION and (_lowest_coverage(comparison.results[0]) or 0) >= 1.0:
        how = _NOTHING_MISSING
    elif comparison.missing is MissingData.FULL_INFORMATION:
        how = "every answer of every row was used, including rows with missing answers" + _FULL_INFORMATION_ASSUMPTION
    elif comparison.missing is MissingData.PAIRWISE:
        how = ("every answer was used: each item's thresholds from the rows that answered it and each correlation "
               "from the rows that answered both items" + (_PAIRWISE_ASSUMPTION if _pairs_with_gaps(comparison.results[0])
                                                            else ""))
    else:
        how = (f"{count_text(dropped)} of {count_text(n + dropped)} rows with a missing answer on some model's variables were excluded listwise"
               if dropped else "")
    without = getattr(comparison, "without_group", 0)
    read_rows = n + dropped + without
    if how.startswith(f"{count_text(dropped)} of {count_text(n + dropped)} rows"):
        how = how.replace(f"{count_text(dropped)} of {count_text(n + dropped)} rows", f"{count_text(dropped)} of {count_text(read_rows)} rows", 1)
    left = (f"; {count_text(dropped)} of {count_text(read_rows)} rows answered none of some model's variables and were left out"
            if dropped and comparison.missing is not MissingData.LISTWISE else "")
    if without:
        left += _without_group_clause(without, read_rows, comparison.results[0].group_column)
    data = comparison.results[0].data
    read = _read_as_missing(data)
    kept = _kept_as_answers(data)
    return (_n_of_rows(n, comparison.results[0]) + (f"; {how}" if how else "") + left + (f"; {read}" if read else "")
            + (f"; {kept}" if kept else ""))


def comparison_paragraph(comparison) -> str:
    """The methods-and-results paragraph of a comparison: exactly the models compared (each one's factors, scales and
    departures from simple structure), the estimator and the rows, which difference test was used (with its authors)
    and its result for every nested pair, whether a restricted model sits on the boundary of the general model's
    space (Self & Liang 1987; Stoel, Garre, Dolan & van den Wittenboer 2006) and which distribution its difference
    was read against (nesting.BoundaryReading: the usual chi-square when the estimation does not hold the one
    parameter there inside it, Savalei & Kolenikov 2008), and the pairs that are not nested."""
    from cfa_tool.workflows.nesting import BoundaryReading

    names, results = comparison.names, comparison.results
    label = {name: f"Model {k}" for k, name in enumerate(names, start=1)}
    first = results[0]
    counts = sorted({len(r.observed) for r in results})
    if len({frozenset(r.observed) for r in results}) == 1:
        of = f"of the same {_count(counts[0], 'indicator')}"
    elif len(counts) > 1:
        of = f"of {WORDS.get(counts[0], str(counts[0]))} to {_count(counts[-1], 'indicator')}"
    else:
        of = f"of {_count(counts[0], 'indicator')} each, not all the same items,"
    groups = (f" in {_count(len(first.groups), 'group')} defined by {_name(first.group_column)}"
              f" ({_list(_group_names(first.groups))})" if first.multigroup else "")
    matrix = _matrix_sentence(first, "The models were")
    same = "summary statistics" if matrix else "rows"
    parts = [f"{_capital(_count(len(names), 'model'))} {of} were compared on the same {same} "
             f"({_comparison_rows(comparison)}){groups}, each estimated by {_estimator_phrase(first)}."]
    if matrix:  # summary statistics: said once, right after what was compared
        parts.append(matrix)
    coding = answer_coding_sentence(first.data)  # the models read the answers one way (workflows.compare)
    if coding:
        parts.append(coding)
    few = few_categories_sentence(results)
    if few:
        parts.append(few)
    renamed = renamed_sentence(first.data)  # the models read one file
    if renamed:
        parts.append(renamed)
    restricted = range_restriction_sentence(first.data.row_filters, {x for r in results for x in r.observed})
    if restricted:  # the models may place the items differently: their factors are not named
        parts.append(restricted)
    keys = {tuple(r.description.reverse_keyed) if r.description is not None else None for r in results}
    keys_said = len(keys) == 1 and bool(next(iter(keys)))  # every model declares the same items: said once
    if keys_said:
        said = _reverse_keyed_sentence(first.description)
        parts.append(f"In every model, {said[:1].lower()}{said[1:]}")
    pieces = [_model_pieces(r, keys_said) for r in results]
    for k, (name, own) in enumerate(zip(names, pieces)):  # each by what differs from the earlier model nearest it
        near = max(range(k), key=lambda j: (sum(p in pieces[j] for p in own), -j), default=None)
        parts.append(_model_sentences(f"{label[name]} ({name})", own, None if near is None else pieces[near],
                                      label[name], "" if near is None else label[names[near]]))
    parts += _design_sentences(list(results))
    statistic = f" (the {first.robust.statistic()} and robust indices)" if first.robust is not None else ""
    for name, r in zip(names, results):  # problems first: before the figures a reader might take as support
        if r.converged and not r.admissible:
            found = _list([_phrase(p, r) for p in r.problems if p.kind.inadmissible])
            parts.append(f"The solution of {label[name]} was not admissible ({found}): its fit is not evidence for it.")
    small = _small_groups(max(results, key=lambda r: sum(p.kind is ProblemKind.SMALL_GROUP for p in r.problems)))
    # the same rows in every model: the caution of the model with the most such groups (review s14)
    if small:
        parts.append(small)
    fitted = next((r for r in results if r.converged), None)  # the same rows in every model: the first's answers
    tails = non_normal_sentence(comparison.problems, group_labels(fitted), True) if fitted is not None else ""
    if tails:  # before the chi-squares it qualifies
        parts.append(tails)
    parts.append(f"Fit{statistic}: " + "; ".join(f"{label[name]}, {_fit_figures(r)}" for name, r in zip(names, results)) + ".")
    for name, r in zip(names, results):
        weak = _weak_factor_sentence(r, f"The solution of {label[name]}") if r.converged else ""
        if weak:
            parts.append(weak)
    pairs: dict[tuple[str, str], list] = {}
    for t in comparison.tests:
        pairs.setdefault((t.restricted, t.general), []).append(t)
    shown = {pair: [t for t in sorted(found, key=lambda t: _PREFERRED.index(t.method)) if not t.not_computed]
             for pair, found in pairs.items()}
    methods = sorted({found[0].method for found in shown.values() if found}, key=_PREFERRED.index)
    if methods:
        fits = ("" if first.method.ordinal or first.robust is None else
                " of the normal-theory chi-squares" if methods == [DifferenceMethod.LIKELIHOOD_RATIO] else
                f" of the {first.robust.statistic(plural=True)}")
        parts.append(f"Nested models (found numerically: the general model reproduces the restricted model's implied "
                     f"{'thresholds and correlations' if first.method.ordinal else 'moments'}; Bentler & Satorra, 2010) "
                     f"were compared by {_list([m.phrase for m in methods])}{fits}"
                     + ("; the difference of two full-information fits is a likelihood-ratio test when answers are "
                        "missing at random (Little & Rubin, 2002)." if first.method.full_information else "."))
    missed = {(t.method, t.not_computed) for t in comparison.tests if t.not_computed}
    # the whole reason (new user s17: it was cut at its first ';'), as a manuscript says it (no option), without the
    # advice to the reader of the tables (nesting.DifferenceTest.advice)
    parts += [f"{_capital(method.phrase)} was not computed: {said_in(reason, MANUSCRIPT)}." for method, reason in
              sorted(missed, key=lambda m: _PREFERRED.index(m[0]))]
    by_name = dict(zip(names, results))

    def undefined(restricted: str, general: str) -> bool:
        return compared_cfi_not_defined(by_name[restricted]) or compared_cfi_not_defined(by_name[general])

    for (restricted, general), found in pairs.items():
        pair = f"{label[restricted]} against {label[general]}"
        if not shown[(restricted, general)]:  # why each was not is said above; the changes in fit stay descriptions
            t = sorted(found, key=lambda t: _PREFERRED.index(t.method))[0]
            changes = ("" if first.method.ordinal or math.isnan(t.delta_cfi) else
                       f"; {_change('CFI', t.delta_cfi)}, {_change('RMSEA', t.delta_rmsea)}")
            if not first.method.ordinal and undefined(restricted, general):
                changes = f"; \u0394CFI not defined, {_change('RMSEA', t.delta_rmsea)}"
            parts.append(f"For {pair} no difference statistic could be computed{changes}.")
            continue
        t = shown[(restricted, general)][0]
        which = f", {t.method}" if len(methods) > 1 else ""
        cfi = "\u0394CFI not defined" if undefined(restricted, general) else _change('CFI', t.delta_cfi)
        sentence = (f"{pair}: {CHI}({t.df_difference}) = {num(t.chi_square_difference, 2)}, {_p(t.p_value)}{which}"
                    + ("." if first.method.ordinal else f"; {cfi}, {_change('RMSEA', t.delta_rmsea)}."))
        if t.boundary and t.boundary_reading is BoundaryReading.CHI_SQUARE:  # unconstrained: the usual chi-square
            sentence += (f" {label[restricted]} has {_list(list(t.boundary))}, on the boundary of the parameter "
                         f"space of {label[general]}; as the estimation did not hold {label[general]}'s estimates "
                         f"inside that boundary (estimates beyond it are reported as improper solutions), the "
                         f"difference follows the usual chi-square distribution (Savalei & Kolenikov, 2008).")
        elif t.boundary:
            sentence += (f" Because {label[restricted]} has {_list(list(t.boundary))}, values on the boundary of the "
                         f"parameter space of {label[general]}, the difference does not follow the usual chi-square "
                         f"distribution (Self & Liang, 1987; Stoel, Garre, Dolan, & van den Wittenboer, 2006)")
            sentence += (f"; with one parameter on the boundary held inside it by a bound of {label[general]} (any "
                         f"other there unbounded), its "
                         f"p-value from the 50:50 mixture of chi-square distributions with {t.df_difference - 1} and "
                         f"{t.df_difference} df is {_p(t.boundary_p_value)}."
                         if not math.isnan(t.boundary_p_value) else
                         f", so its p-value, from the usual chi-square distribution with {t.df_difference} df, is "
                         f"only approximate.")
        parts.append(sentence)
    for n in comparison.not_nested:
        after = ("; as equivalent models fit any data equally well, the data cannot choose between them, and the "
                 "choice rests on theory (MacCallum, Wegener, Uchino, & Fabrigar, 1993)" if n.equivalent
                 else " and were compared by AIC and BIC" if n.information_criteria else "")
        parts.append(f"{label[n.first]} and {label[n.second]} were not tested against each other ({n.reason}){after}.")
    if pairs and first.method.ordinal:
        parts.append("Changes in CFI and RMSEA were not used: each model's indices come from its own adjusted "
                     "statistic, so their changes cannot be compared across models.")
    elif pairs and comparison.change_guides_apply:
        parts.append("Changes in CFI and RMSEA were read against conventional guides (Cheung & Rensvold, 2002; Chen, "
                     "2007), which are conventions rather than tests.")
    elif pairs:
        parts.append("Changes in CFI and RMSEA are reported as descriptions only: the conventional guides for them "
                     "(Cheung & Rensvold, 2002; Chen, 2007) were set for tests of measurement invariance across "
                     "groups, not for rival structures.")
    return " ".join(parts)


#: what each invariance level adds, in a paragraph's words (the class names of workflows.invariance's ladders)
_HELD_EQUAL = {"thresholds": "thresholds", "loadings": "loadings", "intercepts": "intercepts",
               "residuals": "error variances and covariances"}


#: a level's name before 'invariance' in a sentence
_LEVEL_WORDS = {"thresholds": "threshold"}


def _step_figures(step, steps) -> str:
    """A step's difference test and changes in fit against the step before it among ``steps``."""
    t = step.versus_previous
    if t is None or t.not_computed:
        return "no difference statistic"
    if step.untested:
        return "0 degrees of freedom"
    text = f"{CHI}({t.df_difference}) = {num(t.chi_square_difference, 2)}, {_p(t.p_value)}"
    if not step.result.method.ordinal:  # the adjusted indices of ordinal fits are not compared between models
        from cfa_tool.workflows.invariance import (CFI_GUIDE, RMSEA_GUIDE, SRMR_GUIDE, SRMR_GUIDE_LATER,
                                                   delta_cfi_not_defined)

        before = steps[steps.index(step) - 1].result
        cfi = ("\u0394CFI not defined" if delta_cfi_not_defined(step.result, before)
               else _change('CFI', t.delta_cfi, CFI_GUIDE))
        text += f", {cfi}, {_change('RMSEA', t.delta_rmsea, RMSEA_GUIDE)}"
        if step.delta_srmr is not None:
            text += (f", \u0394SRMR = "
                     f"{signed(step.delta_srmr, beside=SRMR_GUIDE.get(step.level, SRMR_GUIDE_LATER))}")
    return text


def cfi_not_defined_sentence(result) -> str:
    """What an invariance ladder does where CFI has no value (workflows.invariance.cfi_not_defined: the baseline
    model fits the data no worse than the model, so CFI is 0/0): the configural model is judged by RMSEA and SRMR,
    and a step whose change in CFI is not defined by the other rules of its decision ('' when every CFI has a
    value).  The one sentence of the paragraph and of the steps' table."""
    from cfa_tool.workflows.invariance import cfi_not_defined, delta_cfi_not_defined
    from cfa_tool.method import DecisionRule

    steps = result.steps
    models = [s.level for s in steps if cfi_not_defined(s.result)]
    if not models:
        return ""
    ordinal = steps[0].result.method.ordinal
    index = "robust CFI" if any(s.result.robust is not None for s in steps) and not ordinal else "CFI"
    text = (f"{index} and TLI were not defined for the {_list(models)} model{'s' if len(models) > 1 else ''}: the "
            f"baseline (independence) model fits these data no worse than {'they do' if len(models) > 1 else 'it does'} "
            f"(both noncentralities at most 0, so CFI is 0/0 and TLI divides by at most 0), and neither then says "
            f"anything about fit")
    if steps[0].level in models:
        text += "; the configural model was judged by RMSEA and SRMR alone"
    later = [s.level for k, s in enumerate(steps) if k and s.versus_previous is not None and not s.untested
             and delta_cfi_not_defined(s.result, steps[k - 1].result)]
    if later and not ordinal:
        rule = result.rule
        by = ("by \u0394RMSEA and \u0394SRMR alone" if rule is DecisionRule.FIT_CHANGE else
              "by the difference test, \u0394RMSEA and \u0394SRMR" if rule is DecisionRule.BOTH else
              "by the difference test alone, as every step is under this rule")
        text += (f"; \u0394CFI was not defined at the {_list(later)} step{'s' if len(later) > 1 else ''}, "
                 f"{'which were' if len(later) > 1 else 'which was'} judged {by}")
    return text + "."


def compared_cfi_not_defined(result) -> bool:
    """Whether a fit's CFI, or its robust CFI, has no value though it was computed: the baseline model fits the data
    no worse than the model (both noncentralities at most 0, so CFI is 0/0; assessment.fit_indices.cfi_from), not a
    robust index left uncomputed (a scaling factor not positive), which the reports mark otherwise.  A change in CFI
    from or to such a fit is 'not defined' in every view of a comparison."""
    fit, robust = result.fit, result.robust
    if not result.converged or fit is None or result.method.ordinal:
        return False
    return missing(fit.cfi) or (robust is not None and not robust.not_computed and missing(robust.cfi_robust))


def _change(index: str, value: float, guide: float | None = None) -> str:
    """A change in a fit index in a sentence: '\u0394CFI = +.002', or 'no \u0394CFI' when a robust index it needs
    was not computed (a scaling factor not positive: inference.robust.robust_fit), never an empty place."""
    return f"no \u0394{index}" if missing(value) else f"\u0394{index} = {signed(value, beside=guide)}"


def _held(step, basis: str = "") -> str:
    """Whether an invariance step held, in words, problems first: a search that did not converge or an
    inadmissible solution says so, and a step that met its test but rests on a step that did not hold
    (``basis``: that step in words) is not called held."""
    if not step.result.converged:
        return "could not be judged: " + ("it could not be estimated" if _not_estimated(step.result)
                                          else "its estimation did not converge")
    if not step.result.admissible:
        return "did not hold: its solution was not admissible"
    if step.untested:
        return "was not tested: its model adds no equality to the step before"
    if getattr(step, "unjudged", ""):  # the robust figures its rule reads were not computed
        return f"could not be judged: {step.unjudged}"
    if step.holds and basis:
        return f"cannot be read as held, though it met its test: it rests on {basis}"
    return "held" if step.holds else "did not hold"


def _basis(steps, k: int) -> str:
    """The first step before step ``k`` whose estimation did not converge, whose solution is not admissible or that
    did not hold (:func:`unsound_basis`), in words ('' when there is none: a step after a configural model that
    merely misfits is marked by the closing sentence)."""
    from cfa_tool.workflows.invariance import unsound_basis  # an invariance ladder's: loaded with one

    failed = unsound_basis(steps, k)
    if failed is None:
        return ""
    why = (("could not be estimated" if _not_estimated(failed.result) else "did not converge")
           if not failed.result.converged else "was not admissible" if not failed.result.admissible
           else "was not tested" if failed.untested else "did not hold")
    return f"the {failed.level} step, which {why}"


def _not_estimated(result) -> str:
    """Why a result could not be estimated, in a few words, when its problems say it (a Heywood case driving the
    estimates without bound, a model the data do not identify); '' for a search that did not converge."""
    from cfa_tool.assessment.admissibility import ProblemKind

    kinds = {p.kind for p in result.problems}
    if ProblemKind.UNBOUNDED_HEYWOOD in kinds:
        return "a Heywood case: the estimates grow without bound"
    if ProblemKind.NOT_IDENTIFIED in kinds:
        return "not identified with these data"
    return ""


def _step_problems(steps) -> str:
    """The steps whose estimation did not converge or whose solution is not admissible, in one sentence that
    comes before any step's result ('' when there are none)."""
    clauses = []
    for step in steps:
        if not step.result.converged and _not_estimated(step.result):
            clauses.append(f"the {step.level} model could not be estimated ({_not_estimated(step.result)})")
        elif not step.result.converged:
            clauses.append(f"the estimation of the {step.level} model did not converge")
        elif not step.result.admissible:
            found = _list([_phrase(p, step.result) for p in step.result.problems if p.kind.inadmissible])
            clauses.append(f"the solution of the {step.level} model was not admissible ({found})")
    if not clauses:
        return ""
    return (f"{_capital(_list(clauses))}: {'such a step' if len(clauses) == 1 else 'such steps'} and the steps "
            f"resting on {'it' if len(clauses) == 1 else 'them'} cannot show that invariance holds, whatever "
            f"their fit.")


def _small_groups(result) -> str:
    """The sample or the groups with fewer rows than their model's free parameters (ProblemKind.SMALL_SAMPLE,
    SMALL_GROUP): the caution that opens the report, worded for the paper from the same facts
    (assessment.admissibility.RowsPerParameter), in one sentence ('' when none)."""
    small = [p.rows_per_parameter for p in result.problems
             if p.kind in (ProblemKind.SMALL_SAMPLE, ProblemKind.SMALL_GROUP) and p.rows_per_parameter is not None]
    if not small:
        return ""
    if small[0].group is None:
        (facts,) = small
        return (f"The sample had {count_text(facts.rows)} rows for the {facts.parameters} free parameters of the model"
                f"{facts.besides()}, fewer rows than parameters, so every estimate and fit index rests on too few "
                f"answers.")
    labels = group_labels(result) or tuple(f.group for f in small)
    if len(small) == 1:
        (facts,) = small
        return (f"Group {written_group(facts.group, labels)} had {count_text(facts.rows)} rows for the {facts.parameters} free "
                f"parameters of its model{facts.besides()}, so its estimates, and every comparison with the other groups, rest on too "
                f"few answers.")
    named = _list([f"{written_group(f.group, labels)} ({count_text(f.rows)} rows for {f.parameters} parameters)" for f in small])
    return (f"Groups {named} had fewer rows than the free parameters of their model, so their estimates, and every "
            f"comparison with the other groups, rest on too few answers.")


def _ladder_means(steps, groups) -> str:
    """Where the ladder's models fixed the factor means and where they estimated them, read from each step's own mean
    parameters: at zero in every group until the first step that estimates some (scalar, with intercepts held equal),
    from which on the reference group's stay at zero (s22: 'the factor means of group north were fixed at zero' said
    of the configural model, whose means are zero in every group)."""
    reference = written_group(groups[0], groups)
    estimated = next((s.level for s in steps if any(r.kind == "mean" and r.free for r in s.result.estimates)), None)
    if estimated is None:
        return "the factor means were fixed at zero in every group at every step"
    if estimated == steps[0].level:
        return f"the factor means were fixed at zero in group {reference}, the reference group"
    return (f"the factor means were fixed at zero in every group up to the {estimated} step, from which on they were "
            f"estimated in the other groups against group {reference}, the reference group, whose means stayed at "
            f"zero")


def invariance_paragraph(result, levels) -> str:
    """The methods-and-results paragraph of an invariance ladder: the groups and rows, exactly the models of the
    ladder (what each level holds equal, ``levels`` being the ladder's (level, classes held equal, ...) rows), the
    estimator, how each step was judged (the difference test with its authors and the rule), each step's result
    with what a partial-invariance search freed, and the latent mean differences of the scalar model."""
    from cfa_tool.workflows.invariance import CONFIGURAL_INDICES

    steps = result.steps
    first = steps[0].result
    sizes = "; ".join(f"{w}, n = {count_text(g.data.n_obs)}" for w, g in zip(_group_names(first.groups), first.groups))
    held = {level: classes for level, classes, *_ in levels}
    ladder = []
    for step in steps:
        classes = held.get(step.level, ())
        ladder.append(step.level if not classes else
                      f"{step.level} ({_list([_HELD_EQUAL.get(c, c) for c in classes])} equal across groups)")
    parts = [f"Measurement invariance across {_name(result.group_column)} ({_count(len(result.groups), 'group')}: {sizes}) "
             f"was tested with a sequence of models, each adding equality constraints to the one before: "
             f"{_list(ladder)}"
             + ("; thresholds before loadings as Wu & Estabrook (2016) set out" if first.method.ordinal else "") + "."]
    d = first.description
    if d is not None:
        shape = _shape(first, d)
        parts.append(f"The configural model had {_structure(d, shape).rstrip(',')}, with the same pattern in every "
                     f"group, estimated by {_estimator_phrase(first)} ({_sample_phrase(first)}); "
                     f"{_ladder_means(steps, result.groups)}.")
        parts += _scale_sentences(d, getattr(result, "data_problems", ()))
        carried = next(((step.level, step.result.description) for step in steps[1:] if step.result.description
                        is not None and any(s.method == CARRIED_BY_LOADINGS for _, own in
                                            step.result.description.group_scales for s in own)), None)
        if carried is not None:  # the later groups' variances estimated once loadings are held equal (hostile s21)
            level, later = carried
            sentence = _carried_sentence(later, _carried_groups(later))
            parts.append(f"From the {level} step on, {sentence[0].lower()}{sentence[1:]}")
        departures = _departures(d, shape)
        if departures:
            parts.append(departures.replace("The model also included", "The configural model also included", 1))
    restricted = _fit_range_restriction(first)
    if restricted:
        parts.append(restricted)
    coding = answer_coding_sentence(first.data)
    if coding:
        parts.append(coding)
    few = few_categories_sentence([first])  # every step fits the same items
    if few:
        parts.append(few)
    renamed = renamed_sentence(first.data)
    if renamed:
        parts.append(renamed)
    parts += _design_sentences([s.result for s in steps])
    methods = sorted({s.versus_previous.method for s in steps[1:] if s.versus_previous is not None
                      and not s.versus_previous.not_computed}, key=_PREFERRED.index)
    # the level as the user gave it (reporting.numbers.short: .005 is not '.01')
    rule = result.rule.description.replace("alpha", short(result.alpha)).replace(">=", "\u2265")
    parts.append("The configural model was judged by its own fit against conventional guide values ("
                 f"{guides_text(CONFIGURAL_INDICES, signs=True)}; Hu & Bentler, 1999); each later model by "
                 f"{rule}" + (f", the difference test being {_list([m.phrase for m in methods])}" if methods else "")
                 + ".")
    undefined = cfi_not_defined_sentence(result)
    if undefined:
        parts.append(undefined)
    if result.freed:  # the search's guide, as the table of freed parameters and the JSON name it
        # with rows with gaps, normal-theory score tests rest on the expected information: the assumption the report's
        # note and the JSON name is the paper's too (review s13)
        assumed = f", which with rows with gaps {mcar_score_tests(paper=True)}" if result.score_tests_assume_mcar else ""
        parts.append(f"The partial-invariance search was guided by {result.score_tests.phrase}{assumed}.")
    problems = _step_problems(steps)
    if problems:  # problems first: before any step reads as held
        parts.append(problems)
    small = _small_groups(first)
    if small:  # the report's first caution, in the paper too (new user s14)
        parts.append(small)
    tails = non_normal_sentence(getattr(result, "data_problems", ()), group_labels(first), True)
    if tails:  # before the chi-squares it qualifies
        parts.append(tails)
    # the tests and robust indices that judge the steps mean little under this design (too few clusters for the
    # parameters, one cluster dominating: admissibility.design_doubts): no step is said to hold or not by them alone
    # (new-user trial s25: 'Strict invariance did not hold (p = .043)' beside the caution that called the test
    # unreliable; hostile s25b: 'The configural model held' on the robust indices that caution names)
    doubted = any(design_doubts(s.result) for s in steps)
    configural = _held(steps[0])
    if doubted:
        configural = {"held": "met the guide values", "did not hold": "did not meet the guide values"}.get(configural,
                                                                                                          configural)
    parts.append(f"The configural model {configural}" + (f" ({_fit_figures(first)})." if first.converged else "."))
    passed, failed = (("passed its difference test", "failed its difference test")
                      if result.rule is DecisionRule.DIFFERENCE_TEST else ("met the rule", "did not meet the rule"))

    def judged(step, basis: str = "") -> str:
        words = _held(step, basis)
        return {"held": passed, "did not hold": failed}.get(words, words) if doubted else words

    for k, step in enumerate(steps[1:], start=1):
        name = _capital(_LEVEL_WORDS.get(step.level, step.level))
        basis = _basis(steps, k)
        declared = _declared_words(step.declared, d)
        earlier = [(f, s.level) for s in steps[1:k] for f in s.freed]  # freed by the search before: still free
        if earlier and not step.partial:
            kept = _list([f"{f.words(quoted=True, groups=result.groups)} (freed at the {level} step)"
                          for f, level in earlier])
            extra = f" and {declared}" if step.declared else ""
            parts.append(f"{name} invariance, partial with {kept} still free{extra}, {judged(step, basis)} "
                         f"({_step_figures(step, steps)}).")
        elif step.declared and not step.partial:
            parts.append(f"{name} invariance, partial with {declared}, "
                         f"{judged(step, basis)} ({_step_figures(step, steps)}).")
        elif step.partial:
            full = step.full_test
            with_all = (f"{CHI}({full.df_difference}) = {num(full.chi_square_difference, 2)}, {_p(full.p_value)}"
                        if full is not None and not full.not_computed else "no difference statistic")
            if step.full_result is not None and step.full_result.converged and not step.full_result.admissible:
                found = _list([_phrase(p, step.full_result) for p in step.full_result.problems if p.kind.inadmissible])
                with_all += f"; its solution was not admissible: {found}"
            freed = _list([f.words(quoted=True, groups=result.groups) for f in step.freed])
            state = (("still " + (failed if doubted else "did not hold")) if not step.holds and step.result.admissible
                     else (passed if doubted else "held") if step.holds and not basis
                     else "met its test" if step.holds else judged(step, basis))
            after = f" but cannot be read as held: it rests on {basis}" if step.holds and basis else ""
            others = "with every other equality" if step.declared else "with every equality"
            if earlier:
                others += " but those freed at earlier steps"
            if step.declared:  # last: its words may end in a clause (set_apart_words)
                others += f" and {declared}"
            parts.append(f"{name} invariance {failed if doubted else 'did not hold'} {others} ({with_all}); after freeing {freed}, "
                         f"chosen one at a time by score tests (a data-driven search that capitalises on chance and "
                         f"needs confirmation in new data), it {state} as partial invariance ({_step_figures(step, steps)}){after}.")
        else:
            parts.append(f"{name} invariance {judged(step, basis)} ({_step_figures(step, steps)}).")
    if doubted:
        parts.append("These steps were judged by tests and robust fit indices that, as said above, the sampling design "
                     "leaves unreliable, so no step's result is a firm finding.")
    # a step that held after an inadmissible or unconverged one says so above
    conditional = [s.level for k, s in enumerate(steps) if s.conditional and not (s.holds and _basis(steps, k))]
    if conditional:
        parts.append(f"The {_list(conditional)} step{'s were' if len(conditional) > 1 else ' was'} tested after a step "
                     f"that {failed if doubted else 'did not hold'}, so {'they compare' if len(conditional) > 1 else 'it compares'} models "
                     f"already rejected.")
    if result.latent_differences:
        diffs = "; ".join(f"{_name(x.factor)} in group {written_group(x.group, result.groups)}, {est_num(x.mean, 2)} "
                          f"(SE = {est_num(x.se, 2)}, {_p(x.p_value)}, "
                          f"d = {est_num(x.standardized, 2)})" for x in result.latent_differences)
        scalar = next(k for k, s in enumerate(steps) if s.level == "scalar")
        basis = _basis(steps, scalar)
        source = (f"atent mean differences from the "
                  f"{'partially invariant ' if any(s.partly_equal for s in steps if s.level != 'strict') else ''}"
                  f"scalar model")
        against = f"against group {written_group(result.groups[0], result.groups)} (d: over the pooled latent standard deviation): {diffs}."
        parts.append(f"Resting on {basis}, the l{source} cannot be read as established; {against}" if basis else
                     f"L{source}, {against}")
        totals = list(dict.fromkeys(x.factor for x in result.latent_differences if x.total))
        if totals:
            parts.append(f"For {_names(totals)}, explained by a higher-order factor, these are the total means and "
                         f"variances the model implies (Bollen, 1989), not those of the disturbances.")
    if result.latent_differences and result.means_not_estimated:
        many = len(result.means_not_estimated) > 1
        parts.append(f"The mean{'s' if many else ''} of the higher-order factor{'s' if many else ''} "
                     f"{_names(result.means_not_estimated)} {'were' if many else 'was'} fixed at zero in every "
                     f"group (the means of the factors {'they explain' if many else 'it explains'} were free), so no "
                     f"difference was estimated for {'them' if many else 'it'}.")
    elif result.latent_note and not result.latent_differences:  # why there are none (the note of the table else)
        parts.append(_capital(result.latent_note.rstrip(".")) + ".")
    parts.append("The guide values are conventions rather than strict criteria." if first.method.ordinal else
                 "The guide values and change-in-fit guides (Cheung & Rensvold, 2002; Chen, 2007) are conventions "
                 "rather than strict criteria.")
    return " ".join(parts)


# ---------------------------------------------------------------- replication

def _sample_rows_phrase(rows, data=None, file: str = "") -> str:
    """One sample's rows (workflows.replication.SampleRows) and how those with gaps were used, with what that
    assumes (Little & Rubin, 2002); with ``data`` (its fit's data summary) that row filters chose, the rows of
    ``file`` they kept (:func:`_filtered`).  Said in parentheses, as fit's (:func:`_sample_phrase`), so without
    parentheses of its own: its citations after a comma."""
    filters = data is not None and data.row_filters
    text = (f"N = {count_text(rows.analysed)}{_filtered(data, file)}" if filters
            else f"N = {count_text(rows.analysed)} of {count_text(rows.read)} rows read")
    if rows.missing is MissingData.FULL_INFORMATION and rows.with_gaps:
        text += (f"; {count_text(rows.with_gaps)} with missing answers, whose every answer was used by full-information maximum "
                 f"likelihood{_FULL_INFORMATION_ASSUMPTION}")
    elif rows.missing is MissingData.PAIRWISE and rows.with_gaps:
        text += (f"; {count_text(rows.with_gaps)} with missing answers, used pairwise: each item's thresholds from the rows that "
                 f"answered it and each correlation from the rows that answered both items{_PAIRWISE_ASSUMPTION}")
    if rows.left_out and rows.missing is MissingData.LISTWISE:
        text += f"; {count_text(rows.left_out)} with missing answers excluded listwise{_LISTWISE_ASSUMPTION}"
    elif rows.left_out:
        text += f"; {count_text(rows.left_out)} answering no model variable left out"
    if not rows.with_gaps and not rows.left_out:
        text += ", none with missing answers"
    return text


def _loading_pairs(rep) -> list[tuple[tuple[str, str], float, float]]:
    """((factor, item), calibration, validation) standardized loadings of the items, in the calibration's order."""
    def loadings(result) -> dict:
        return {r.variables: r.standardized for r in result.estimates
                if r.kind == "loading" and r.variables[1] in result.observed}

    calibration, validation = loadings(rep.calibration_result), loadings(rep.loose)
    return [(key, value, validation[key]) for key, value in calibration.items() if key in validation]


#: the least size of a standardized loading, in both samples, whose change of sign is named as an item coded the
#: other way round (a rule of thumb of this tool: loadings below .20 in size are commonly read as weak, and their sign
#: may change by chance)
REVERSED_LOADING_SIZE = 0.20


def _reversed(a: float, b: float) -> bool:
    """Two standardized loadings of one item of opposite signs, both at least :data:`REVERSED_LOADING_SIZE` in size."""
    return a * b < 0 and min(abs(a), abs(b)) >= REVERSED_LOADING_SIZE


def _turned(pairs) -> dict[str, float]:
    """Each factor's direction in the second of two solutions relative to the first (``pairs``: ((factor, item),
    first loading, second loading)), by the one rule (:func:`cfa_tool.assessment.directions.relative_direction`): a
    factor turned as a whole in one group or sample (by a marker that hardly measures it, whose sign is chance:
    hostile s23) then turns none of its items, and an item coded the other way round is told from the others by its
    sign relative to theirs, the marker's too; a factor of as many reverse-worded items as others keeps its
    direction (new-user s24)."""
    by_factor: dict = {}
    for (factor, _), a, b in pairs:
        first, second = by_factor.setdefault(factor, ([], []))
        first.append(a)
        second.append(b)
    return {factor: relative_direction(first, second) for factor, (first, second) in by_factor.items()}


def reversed_loadings(rep) -> list[tuple[tuple[str, str], float, float]]:
    """((factor, item), calibration, validation) of the standardized loadings that have opposite signs in the two
    samples once each factor is put the same way round in both (:func:`_turned`), both at least
    :data:`REVERSED_LOADING_SIZE` in size (none when the loose refit did not converge)."""
    if not rep.loose.converged:
        return []
    pairs = _loading_pairs(rep)
    turned = _turned(pairs)
    return [(key, a, b) for key, a, b in pairs if _reversed(a, b * turned[key[0]])]


def reversed_across_groups(result) -> list[tuple[tuple[str, str], str, float, str, float]]:
    """((factor, item), first group, its loading, other group, its loading) of the standardized loadings of a grouped
    fit (the configural model of an invariance ladder) whose sign in a group is the opposite of the first group's once
    the factor is put the same way round in both (:func:`_turned`), both at least :data:`REVERSED_LOADING_SIZE` in
    size: an item coded the other way round in one group."""
    if not result.converged:
        return []
    first: dict = {}  # (factor, item): (the first group of the item, its loading there)
    later: dict = {}  # (first group, later group): ((factor, item), first loading, later loading) of their items
    for r in result.estimates:
        if r.kind != "loading" or r.variables[1] not in result.observed or r.standardized is None:
            continue
        if r.variables not in first:
            first[r.variables] = (r.group, r.standardized)
            continue
        group, a = first[r.variables]
        later.setdefault((group, r.group), []).append((r.variables, a, r.standardized))
    found = []
    for (group, other), pairs in later.items():
        turned = _turned(pairs)
        found += [(key, group, a, other, b) for key, a, b in pairs if _reversed(a, b * turned[key[0]])]
    return found


def _one_solution_sentence(rep) -> str:
    """The test of one solution in both samples (workflows.replication), or why it was not made."""
    t = rep.same_solution
    free = "thresholds" if rep.adjusted else "intercepts"
    if t.not_computed:
        return (f"Whether one solution holds in both samples was not tested ({said_in(t.not_computed, MANUSCRIPT)}); "
                f"the cross-validation "
                f"index alone describes the replication.")
    held = ("loading, error covariance and factor variance and covariance" if rep.adjusted else
            "loading, error variance and covariance and factor variance and covariance")
    return (f"Whether one solution holds in both samples was tested by fitting the two samples together with every "
            f"{held} held equal (the {free} free "
            f"in each sample; Jöreskog, 1971) against the two samples fitted separately, by {t.method.phrase}: "
            f"{CHI}({t.df_difference}) = {t.chi_square_difference:.2f}, {_p(t.p_value)}.")


def _replication_sentences(rep, lead: str, test: bool = True) -> list[str]:
    """The figures of one replication: its solutions' problems first, the fits, the test of one solution (unless
    ``test`` is False: random halves test it once, for both directions), the cross-validation index and the
    largest difference of standardized loadings."""
    parts = []
    for name, result in (("calibration", rep.calibration_result), ("validation", rep.loose)):
        if result.converged and not result.admissible:
            found = _list([_phrase(p, result) for p in result.problems if p.kind.inadmissible])
            parts.append(f"{lead}the solution in the {name} sample was not admissible ({found}): its estimates and "
                         f"fit do not describe a population.")
    statistic = f" (the {rep.calibration_result.robust.statistic()} and robust indices)" \
        if rep.adjusted and rep.calibration_result.robust is not None else ""
    parts.append(f"{lead}fit{statistic} in the calibration sample, {_fit_figures(rep.calibration_result)}; in the "
                 f"validation sample, {_fit_figures(rep.loose)}.")
    if test:
        parts.append(_one_solution_sentence(rep))
    parts.append(f"The cross-validation index (Cudeck & Browne, 1983) was {rep.cvi:.4f} (saturated model: "
                 f"{rep.cvi_saturated:.4f}; smaller is better), a description without a test.")
    pairs = _loading_pairs(rep) if rep.loose.converged else []
    if pairs:
        (factor, item), a, b = max(pairs, key=lambda k: abs(k[2] - k[1]))
        parts.append(f"Standardized loadings differed between the samples by at most {est_unit(abs(b - a), 2)} "
                     f"({_name(item)} on {_name(factor)}: {est_unit(a, 2)} and {est_unit(b, 2)}).")
        reversed_ = reversed_loadings(rep)
        if reversed_:  # said in the manuscript too: the test above fails for the coding (hostile s20)
            parts.append(f"The loading{'s' if len(reversed_) > 1 else ''} of "
                         + _list([f"{_name(item)} on {_name(factor)}" for (factor, item), _, _ in reversed_])
                         + " had opposite signs in the two samples, as an item coded the other way round in one of "
                           "them would.")
    return [_capital(p) for p in parts]


def replication_paragraph(replications) -> str:
    """The methods-and-results paragraph of a replication (workflows.replication): exactly the model, the estimator,
    each sample's rows and how rows with gaps were used (with the assumption each way makes), how random halves
    were drawn, then for each replication its fits, the test of one solution in both samples (or why it was not
    made), the cross-validation index (Cudeck & Browne, 1983) and the largest difference of standardized loadings."""
    reps = list(getattr(replications, "replications", None) or [replications])
    first = reps[0]
    result = first.calibration_result
    d = result.description
    model = (f"{analysis_name(d)} with {_structure(d, _shape(result, d)).rstrip(',')}" if d is not None else
             f"{analysis_name(d)} of {_count(len(result.observed), 'indicator')}")
    estimator = _estimator_phrase(result)
    other = _estimator_phrase(first.loose)
    by = estimator if other == estimator else f"{estimator} (in the validation sample by {other})"
    if first.split is not None:
        from cfa_tool.data.halves import half_phrase

        rows = first.split
        parts = [f"The replication of {model} was examined in {rows.halves_words}, {rows.drawn_phrase}, of {count_text(rows.split)} of "
                 f"the {count_text(rows.in_file)} rows of one data file{rows.kept_words()}: each half served once as the calibration sample, where the model was "
                 f"estimated by {by}, and once as the validation sample, where it was refitted (double "
                 f"cross-validation; Cudeck & Browne, 1983), and whether one solution holds in both halves was "
                 f"tested once, with the same two halves either way: {half_phrase(False, 0)} "
                 f"({_sample_rows_phrase(first.rows[0])}) and {half_phrase(False, 1)} "
                 f"({_sample_rows_phrase(first.rows[1])})."] if first.rows else []
    else:
        parts = [f"The replication of {model} was examined in two samples: the model was estimated in a calibration "
                 f"sample ({_sample_rows_phrase(first.rows[0], result.data, first.calibration)}) and refitted in a "
                 f"validation sample ({_sample_rows_phrase(first.rows[1], first.loose.data, first.validation)}), each "
                 f"time by {by}."] if first.rows else []
    if first.split is not None:  # the filters chose the rows of the file before the split
        parts.append(first.split.independence_sentence())  # halves drawn by cluster: the rows within each half
        parts.append(range_restriction_sentence(first.split.filters, result.observed, _factor_items(result)))
    else:
        parts += [range_restriction_sentence(r.data.row_filters, r.observed, _factor_items(r), f"in the {name} sample, ")
                  for name, r in (("calibration", result), ("validation", first.loose))]
    parts = [p for p in parts if p]
    coding = answer_coding_sentence(result.data)
    if coding:
        parts.append(coding)
    # halves of one file read it once: said once, without naming the one file (whose clauses say 'the data file'
    # themselves: new-user trial s21 read 'In the data file, values the data file marks as no answer ...')
    for r in ((result,) if first.split is not None else (result, first.loose)):
        read, kept = _read_as_missing(r.data), _kept_as_answers(r.data)
        where = "" if first.split is not None else f"in {r.data.source}, "
        if read or kept:
            parts.append(_capital(where + "; ".join(x for x in (read, kept) if x)) + ".")
    for k, rep in enumerate(reps):
        lead = (f"calibrated on half {'AB'[k]} and validated on half {'BA'[k]}: " if len(reps) > 1 else "")
        parts += _replication_sentences(rep, lead, k == 0)
    return " ".join(parts)


def nested_power_paragraph(results) -> str:
    """The methods-and-results paragraph of a power simulation with a nested model (workflows.montecarlo results, one
    per sample size, each with its ``difference``: workflows.power_nested.DifferencePower): how the data sets were
    drawn and fitted, the difference test and its level, the simulated power at each size beside its noncentral
    chi-square approximation (Satorra & Saris 1985)."""
    first = results[0]
    nested = first.nested
    sizes = _list([f"N = {count_text(r.n_obs)}" for r in results])
    powers = _list([f"{unit(r.difference.rejected, 2)} at N = {count_text(r.n_obs)}" for r in results])
    approximate = _list([unit(r.difference.approximate, 2) for r in results])
    items = len(first.observed)
    return (f"The power of the chi-square difference test of the nested model '{nested.name}' against the model was "
            f"estimated by Monte Carlo simulation: {count_text(first.replications)} data sets "
            + (f"of {sizes} rows of {items} normally distributed items were drawn" if len(results) == 1 else
               f"of {items} normally distributed items were drawn for each sample size ({sizes})")
            + f" from the population the model's values "
            f"describe (seed {first.seed}); each was fitted by maximum likelihood under both models, and the "
            f"likelihood-ratio chi-square difference ({_count(nested.df_difference, 'degree')} of freedom) was tested "
            f"at alpha = {unit(first.alpha, 2)} (Steiger, Shapiro & Browne, 1985). Of the data sets in which both "
            f"models converged, the share that rejected the nested model was {powers}. The noncentral chi-square approximation "
            f"(Satorra & Saris, 1985), with noncentrality N times the nested model's minimum discrepancy at the "
            f"population ({discrepancy_text(nested.discrepancy)}), gives {approximate}.")
