"""The parsed model: frozen dataclasses that say what the model file said.

A :class:`Spec` knows nothing about data.  Every name and statement keeps the
place it was written so that later checks (against data, identification) can
point at it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

from cfa_tool.errors import Location
from cfa_tool.numbers import user_number
from cfa_tool.language.names import composed, reference_text, written_group, written_name

#: Parameter kinds a reference may name, with the number of names each takes.
REFERENCE_KINDS: dict[str, int] = {"loading": 2, "variance": 1, "covariance": 2, "intercept": 1, "mean": 1, "threshold": 1}

#: Classes of parameters that 'invariant' can hold equal across groups, with the
#: parameter kinds each covers.
INVARIANCE_CLASSES: dict[str, tuple[str, ...]] = {
    "loadings": ("loading",),
    "intercepts": ("intercept",),
    "residuals": ("residual_variance", "residual_covariance"),
    "variances": ("factor_variance",),
    "covariances": ("factor_covariance",),
    "means": ("mean",),
    "thresholds": ("threshold",),  # of ordinal items
}

#: What a researcher writes after 'equal across groups:', and the class of parameters each stands for.
GROUP_EQUALITY_WORDS: dict[str, str] = {
    "loadings": "loadings",
    "intercepts": "intercepts",
    "thresholds": "thresholds",
    "error variances": "residuals",  # the items' residual variances and covariances
    "factor variances": "variances",
    "factor covariances": "covariances",
    "factor means": "means",
}

#: The invariance levels a model may state ('invariance scalar'), with the classes each holds equal; for
#: ordinal items every level from metric on holds the thresholds equal too (Wu & Estabrook 2016).
INVARIANCE_LEVELS: dict[str, tuple[str, ...]] = {
    "configural": (),
    "thresholds": ("thresholds",),
    "metric": ("loadings",),
    "scalar": ("loadings", "intercepts"),
    "strict": ("loadings", "intercepts", "residuals"),
}


def equality_words(classes) -> list[str]:
    """The words a researcher writes for classes of parameters held equal across groups."""
    by_class = {c: w for w, c in GROUP_EQUALITY_WORDS.items()}
    return [by_class.get(c, c) for c in classes]


#: Ways to give a factor its scale.
SCALING_METHODS = ("marker", "variance", "effects")


def fix_sets_scale(kind: str, value: float) -> bool:
    """Whether fixing a factor's loading or variance at ``value`` gives the factor its scale (then no automatic
    scale is added, and a 'scale' statement for the factor would be a second one).  A fixed variance does; a
    fixed loading does unless it is 0: a zero loading sets its item apart from the factor (as for a nested
    comparison) and says nothing of the factor's unit (Bollen 1989, ch. 7: a latent variable takes its scale from
    a loading fixed at a value other than 0 or from its fixed variance).  The one rule of the language's checks
    and of the parameter table."""
    return kind != "loading" or value != 0


@dataclass(frozen=True)
class Name:
    """A name as the model text writes it, with where it stands."""
    text: str
    location: Location

    def __str__(self) -> str:
        return self.text


@dataclass(frozen=True)
class ParameterRef:
    """``kind(name, ...)``, e.g. ``loading(comfort, clean)``."""

    kind: str
    names: tuple[str, ...]
    location: Location
    group: str | None = None  # set by 'in group NAME:'; None means every group

    def key(self) -> tuple:
        """Identity of the parameter, order-free for covariances."""
        if self.kind == "covariance":
            return (self.kind, tuple(sorted(self.names)))
        return (self.kind, self.names)

    def __str__(self) -> str:
        """'loading(f, x2)', 'loading(f, x2) in group "land 01"': the group named by the one rule of group labels
        in messages (language.names.written_group; s24: 'in group land 01' bare ran into the sentence)."""
        text = reference_text(self.kind, self.names)
        return f"{text} in group {written_group(self.group)}" if self.group is not None else text


@dataclass(frozen=True)
class Factor:
    """A factor statement: the factor's name and its indicators."""
    name: Name
    indicators: tuple[Name, ...]


@dataclass(frozen=True)
class NamePair:
    """Two variables named together by ``covary`` or ``uncorrelated``."""

    first: Name
    second: Name

    def key(self) -> tuple[str, str]:
        return tuple(sorted((self.first.text, self.second.text)))  # type: ignore[return-value]


@dataclass(frozen=True)
class ValueSetting:
    """``fix``/``start`` statements: parameters set to a number."""

    refs: tuple[ParameterRef, ...]
    value: float


@dataclass(frozen=True)
class BoundSetting:
    """A statement of lower and upper bounds on parameters."""
    refs: tuple[ParameterRef, ...]
    lower: float | None
    upper: float | None


@dataclass(frozen=True)
class ScaleSetting:
    """``scale latent by METHOD`` (factors empty) or ``scale f, g by METHOD``."""

    factors: tuple[Name, ...]
    method: str
    location: Location


@dataclass(frozen=True)
class ReverseKeying:
    """``reversed a, b on 1 to 6``: items worded against their trait, answered on a scale from
    ``minimum`` to ``maximum`` (an answer x counts as minimum + maximum - x in the keyed sum)."""

    items: tuple[Name, ...]
    minimum: float
    maximum: float
    location: Location


#: marks a cell can hold unseen (zero-width spaces and joiners, direction marks, a byte-order mark, a soft hyphen)
_INVISIBLE_MARKS = dict.fromkeys(map(ord, "\u00ad\u200b\u200c\u200d\u200e\u200f\u202a\u202b\u202c\u202d\u202e"
                                      "\u2060\u2061\u2062\u2063\u2064\ufeff"))


def answer_key(word: str) -> str:
    """How an answer word is matched: case, the spaces around it, the kind and number of spaces inside it (a
    no-break space is a space), invisible marks (a zero-width space) and the Unicode form of its accents (names'
    one rule, :func:`~cfa_tool.language.names.composed`: 'Neutre' + U+0300 is 'Neutrè') do not count ('  agree '
    and 'Strongly\u00a0agree' are 'Agree' and 'Strongly agree'); the word itself must be whole (no partial
    matches)."""
    return composed(composed(" ".join(word.translate(_INVISIBLE_MARKS).split())).casefold())


@dataclass(frozen=True)
class AnswerWord:
    """One ``"Agree" = 4`` of an ``answers`` statement: the word as written (or a number the column may hold,
    ``word`` None then) and the code it stands for."""

    word: str | None
    number: float | None  # a number listed as an answer ('99 = 9'); None for a word
    code: float
    location: Location

    @property
    def shown(self) -> str:
        return self.word if self.word is not None else user_number(self.number)


@dataclass(frozen=True)
class AnswerCoding:
    """``answers "Disagree" = 1, "Agree" = 2 [for ITEMS]``: what each answer recorded as a word means.  ``items``
    empty: every item no other ``answers ... for`` statement names."""

    answers: tuple[AnswerWord, ...]
    items: tuple[Name, ...]
    location: Location
    # the saved fit whose coding this is, when scores read other data with it (None: a statement of the model file)
    carried_from: str | None = field(default=None, compare=False)

    @property
    def origin(self) -> str:
        """Where the coding was stated, for notes and errors."""
        if self.carried_from is not None:
            return f"the coding of answer words saved with the earlier fit {self.carried_from}"
        return f"the 'answers' statement on line {self.location.line}"

    @property
    def item_names(self) -> tuple[str, ...]:
        return tuple(i.text for i in self.items)

    def codes_by_word(self) -> dict[str, float]:
        """Matching key of each listed word -> its code."""
        return {answer_key(a.word): a.code for a in self.answers if a.word is not None}

    def codes_by_number(self) -> dict[float, float]:
        return {a.number: a.code for a in self.answers if a.number is not None}

    def codes(self) -> tuple[float, ...]:
        """The distinct codes the statement gives, lowest first: the values a column it covers can hold once read
        (data.answer_words reads every cell as the code of its word or of its number, words and numbers alike), so
        the item's answer categories.  ``answers 1 = 1, ..., 7 = 7, "agree" = 6`` gives seven, not the one word's."""
        return tuple(sorted({a.code for a in self.answers}))



@dataclass(frozen=True)
class JoinedAnswers:
    """``join answers 0, 1 as 1 for item3, item4``: neighbouring answer categories of ordinal items analysed as one
    category, coded ``into`` (one of ``values``), after any 'answers' statement has coded answer words; the same in
    every group and every command that reads the rows (data.joined_answers)."""

    values: tuple[float, ...]  # the codes joined, as written (at least two, whole numbers, each once)
    into: float  # the code of the joined category: one of ``values``
    items: tuple[Name, ...]
    location: Location
    value_locations: tuple[Location, ...] = field(default=(), compare=False)  # where each value is written

    @property
    def item_names(self) -> tuple[str, ...]:
        return tuple(i.text for i in self.items)

    @property
    def merged(self) -> tuple[float, ...]:
        """The codes recoded as ``into``: the joined values other than it, lowest first."""
        return tuple(sorted(v for v in self.values if v != self.into))

    @property
    def statement(self) -> str:
        """The statement as the language writes it (:func:`join_statement`)."""
        return join_statement(self.values, self.into, self.item_names)


def join_statement(values, into: float, items) -> str:
    """The one writer of a 'join answers' statement ('join answers 0, 1 as 1 for item3, "Item 4"'): the codes lowest
    first, the names as the language writes them (quoted unless plain), so that the text parses back to them; advice
    that offers the statement (data.answer_counts, data.polychoric) and the reports that name it use it alike."""
    return (f"join answers {', '.join(user_number(v) for v in sorted(values))} as {user_number(into)} "
            f"for {', '.join(written_name(x) for x in items)}")


#: The rotations an exploratory block may name (gradient-projection criteria; see exploration.rotation).
BLOCK_ROTATIONS = ("geomin", "target", "quartimin", "varimax")
DEFAULT_BLOCK_ROTATION = "geomin"


@dataclass(frozen=True)
class ExploratoryBlock:
    """``exploratory factors F1, F2 from item1..item9 rotated by geomin``: factors whose loadings on every
    item of the block are estimated and then rotated (exploratory structural equation modelling, Asparouhov &
    Muthén 2009).  ``near zero F1: item4, item5`` lines give a target rotation its targeted zeros.

    The parser writes the block's identification into the model as ordinary statements: each factor
    loads on every item of the block, its variance is 1, the block's factors are uncorrelated, and the
    loading of the j-th factor on each of the first j - 1 items is 0 (echelon form; m(m-1)/2 zeros); the
    fitted loadings are rotated afterwards."""

    factors: tuple[Name, ...]
    items: tuple[Name, ...]
    rotation: Name  # one of BLOCK_ROTATIONS
    location: Location
    targets: tuple[tuple[Name, tuple[Name, ...]], ...] = ()  # (factor, items whose loading is aimed at 0)

    @property
    def factor_names(self) -> tuple[str, ...]:
        return tuple(f.text for f in self.factors)

    @property
    def item_names(self) -> tuple[str, ...]:
        return tuple(i.text for i in self.items)

    def echelon_zeros(self) -> tuple[tuple[str, str], ...]:
        """(factor, item) of the loadings fixed at 0 to identify the unrotated block."""
        return tuple((f.text, self.items[i].text) for j, f in enumerate(self.factors) for i in range(j))

    def target_matrix(self) -> list[list[float]]:
        """items x factors: 0 where a 'near zero' line aims a loading, NaN elsewhere (free)."""
        rows = {x: i for i, x in enumerate(self.item_names)}
        cols = {f: j for j, f in enumerate(self.factor_names)}
        target = [[float("nan")] * len(cols) for _ in rows]
        for factor, items in self.targets:
            for item in items:
                target[rows[item.text]][cols[factor.text]] = 0.0
        return target


@dataclass(frozen=True)
class Spec:
    """Everything a model file says, in the order it said it."""

    source: str
    text: str
    title: str | None
    factors: tuple[Factor, ...]
    covary: tuple[NamePair, ...] = ()
    uncorrelated: tuple[NamePair, ...] = ()
    fixed: tuple[ValueSetting, ...] = ()
    freed: tuple[ParameterRef, ...] = ()
    equal: tuple[tuple[ParameterRef, ...], ...] = ()
    starts: tuple[ValueSetting, ...] = ()
    bounds: tuple[BoundSetting, ...] = ()
    scaling: tuple[ScaleSetting, ...] = ()
    invariant: tuple[str, ...] = ()
    noninvariant: tuple[ParameterRef, ...] = ()
    # the words of each 'equal across groups:' statement as written ('factor means'), where they are
    equal_across_groups: tuple[Name, ...] = ()
    ordinal: tuple[Name, ...] = ()
    reversed: tuple[ReverseKeying, ...] = ()
    method: tuple[Name, ...] = ()  # factors of method, not of a trait (wording, acquiescence): no reliability
    invariance_level: str | None = None  # the level an 'invariance' statement names
    # where the first 'invariance' or 'equal across groups' statement is (for messages about it)
    equalities_location: Location | None = field(default=None, compare=False)
    answers: tuple[AnswerCoding, ...] = ()  # 'answers' statements: what answers recorded as words mean
    exploratory: tuple[ExploratoryBlock, ...] = ()  # their factors are in ``factors`` too, with their identification
    joins: tuple[JoinedAnswers, ...] = ()  # 'join answers' statements: categories of ordinal items analysed as one
    # one step of the invariance ladder (workflows.invariance.spec_of_level): a start on a factor mean fixed at 0 at
    # this step applies at the steps that free it (and gives a group's mean in a power study's population), so it is
    # not refused here as it is in a plain fit
    ladder_step: bool = False
    lines: tuple[str, ...] = field(default=(), repr=False, compare=False)

    def __hash__(self) -> int:
        """Specs that compare equal have the same source and text, whose hashes Python keeps with the strings: a
        Spec keys the caches every fit reads (its model structure, its description) without hashing every
        statement on each look-up (specs built from one text differ in their other fields, and compare so)."""
        return hash((self.source, self.text))

    @cached_property
    def factor_names(self) -> tuple[str, ...]:
        return tuple(f.name.text for f in self.factors)

    @cached_property
    def observed_names(self) -> tuple[str, ...]:
        """Indicators that are not factors, in order of first appearance."""
        latent = set(self.factor_names)
        seen: dict[str, None] = {}
        for factor in self.factors:
            for ind in factor.indicators:
                if ind.text not in latent:
                    seen.setdefault(ind.text, None)
        return tuple(seen)

    @property
    def exploratory_factors(self) -> frozenset[str]:
        """Factors of exploratory blocks."""
        return frozenset(f for block in self.exploratory for f in block.factor_names)

    @property
    def method_factors(self) -> frozenset[str]:
        """Factors the model declares as method factors (not traits)."""
        return frozenset(n.text for n in self.method)

    @property
    def reverse_keyed(self) -> dict[str, tuple[float, float]]:
        """Items declared reverse-keyed, with the minimum and maximum of their answer scale."""
        return {item.text: (k.minimum, k.maximum) for k in self.reversed for item in k.items}

    def answer_codings(self) -> dict[str, AnswerCoding]:
        """Each item an 'answers' statement covers -> that statement (a statement without 'for' covers the items
        no other statement names)."""
        named = {item: c for c in self.answers for item in c.item_names}
        general = [c for c in self.answers if not c.items]
        out = dict(named)
        if general:
            out.update({x: general[0] for x in self.observed_names if x not in named})
        return {x: out[x] for x in self.observed_names if x in out}

    def joined_items(self) -> dict[str, tuple[JoinedAnswers, ...]]:
        """Each item a 'join answers' statement names -> the statements that name it, in the order written."""
        out: dict[str, list[JoinedAnswers]] = {}
        for join in self.joins:
            for item in join.item_names:
                out.setdefault(item, []).append(join)
        return {x: tuple(v) for x, v in out.items()}

    def first_mention(self, name: str) -> Location | None:
        """Where ``name`` first appears as an indicator (for error messages)."""
        for factor in self.factors:
            for ind in factor.indicators:
                if ind.text == name:
                    return ind.location
        return None

    def source_line(self, location: Location | None) -> str | None:
        if location is None or not (1 <= location.line <= len(self.lines)):
            return None
        return self.lines[location.line - 1]

    def scaling_of(self, factor: str) -> str:
        """The scaling method that applies to ``factor``: a 'scale' statement naming it, else 'scale latent by ...',
        else the marker (language.checks allows each at most once, so no order decides)."""
        every = "marker"
        for setting in self.scaling:
            if any(f.text == factor for f in setting.factors):
                return setting.method
            if not setting.factors:
                every = setting.method
        return every


def with_ordinal_levels(spec: "Spec", ordinal_items) -> "Spec":
    """The model with the thresholds held equal too when it states an invariance level from metric on and has
    ordinal items (whether an 'ordinal' statement or an option names them)."""
    from dataclasses import replace

    if (spec.invariance_level in ("metric", "scalar", "strict") and ordinal_items
            and "thresholds" not in spec.invariant):
        return replace(spec, invariant=("thresholds",) + tuple(spec.invariant))
    return spec
